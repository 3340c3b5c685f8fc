"""Writing results: CSV and JSON serialisation and atomic file writes.

Nothing is lost: a file is written to a temporary name in the same folder and
renamed over the target only when complete, and no output may replace an input.
"""

from __future__ import annotations

import csv
import io
import json
import os
import stat
import tempfile
from collections.abc import Iterable, Mapping, Sequence
from typing import Any

from gradeline.errors import UsageError
from gradeline.present.labels import data_number

__all__ = ["csv_text", "input_name", "json_text", "refuse_overwrite", "write_atomic"]


def _cell(value: Any) -> Any:
    if isinstance(value, float):
        return data_number(value)
    return value


def _float_text(value: float) -> str:
    text = f"{value:.6f}".rstrip("0")
    return text + "0" if text.endswith(".") else text


def csv_text(rows: Iterable[Mapping[str, Any]], columns: Sequence[str]) -> str:
    """Rows as CSV with a header; floats rounded by :func:`gradeline.present.labels.data_number`."""
    buf = io.StringIO()
    writer = csv.writer(buf, lineterminator="\n")
    writer.writerow(columns)
    for row in rows:
        out = []
        for col in columns:
            v = _cell(row.get(col))
            out.append("" if v is None else _float_text(v) if isinstance(v, float) else v)
        writer.writerow(out)
    return buf.getvalue()


def input_name(path: str) -> str:
    """How deliverables name their input: its file name, the same on every machine
    and in every folder (so two builds of the same files are byte-identical)."""
    return os.path.basename(path) or path


def json_text(payload: Any) -> str:
    """A JSON document with floats rounded like the CSV cells, keys in given order."""

    def clean(obj: Any) -> Any:
        if isinstance(obj, Mapping):
            return {str(k): clean(v) for k, v in obj.items()}
        if isinstance(obj, (list, tuple)):
            return [clean(v) for v in obj]
        return _cell(obj)

    return json.dumps(clean(payload), indent=2, allow_nan=False) + "\n"


def refuse_overwrite(
    output: str | os.PathLike[str], inputs: Iterable[str | os.PathLike[str]]
) -> None:
    """Raise when ``output`` names one of the ``inputs``."""
    out = os.path.abspath(output)
    for src in inputs:
        same = os.path.abspath(src) == out
        if not same and os.path.exists(out) and os.path.exists(src):
            same = os.path.samefile(out, src)
        if same:
            raise UsageError(
                f"output {os.fspath(output)!r} is an input file; it is never overwritten"
            )


def write_atomic(path: str | os.PathLike[str], data: str | bytes) -> None:
    """Write ``data`` to ``path`` through a temporary file and a rename.

    Missing folders of ``path`` are created (``-o newdir/x.pdf``). A character
    device (``/dev/null``) is written to in place, never replaced; a FIFO, socket or
    folder is refused.
    """
    target = os.fspath(path)
    raw = data.encode("utf-8") if isinstance(data, str) else data
    try:
        mode = os.stat(target).st_mode
    except FileNotFoundError:
        mode = None
    except OSError:  # e.g. a path through a regular file: the write below says why
        mode = None
    if mode is not None and not stat.S_ISREG(mode):
        if stat.S_ISCHR(mode):
            # a character device (/dev/null, a terminal): written to, never replaced
            with open(target, "wb") as fh:
                fh.write(raw)
            return
        what = "folder" if stat.S_ISDIR(mode) else "FIFO, socket or device"
        raise UsageError(f"output {target!r} is a {what}, not a file; gradeline writes files")
    folder = os.path.dirname(os.path.abspath(target))
    os.makedirs(folder, exist_ok=True)
    fd, tmp = tempfile.mkstemp(prefix=".gradeline-", suffix=".part", dir=folder)
    try:
        umask = os.umask(0)
        os.umask(umask)
        os.chmod(tmp, 0o666 & ~umask)  # as an ordinary new file, not mkstemp's 0600
        with os.fdopen(fd, "wb") as fh:
            fh.write(raw)
            fh.flush()
            os.fsync(fh.fileno())
        os.replace(tmp, target)
    except BaseException:
        if os.path.exists(tmp):
            os.unlink(tmp)
        raise
