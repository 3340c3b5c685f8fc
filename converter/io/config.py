"""The optional TOML configuration file (read with the standard library's tomllib)."""

from __future__ import annotations

import tomllib
from typing import Any

from gradeline.errors import GradelineError, InputError
from gradeline.model import SourceRef

__all__ = ["parse_toml", "read_config", "unknown_keys"]

#: Largest TOML file read (a configuration or criteria file is a few kB).
MAX_TOML_BYTES = 1024 * 1024

#: The tables a configuration file may hold.
CONFIG_TABLES = ("sheet", "layers")


def parse_toml(data: bytes, where: str, element: str) -> dict[str, Any]:
    """Parse TOML bytes; every failure is one InputError naming the file (and line).

    Raises
    ------
    InputError
        Too large, not UTF-8, not TOML, or nested too deeply to read.
    """
    if len(data) > MAX_TOML_BYTES:
        raise InputError(
            f"{len(data):,} bytes is too large for a TOML file of gradeline's "
            f"(at most {MAX_TOML_BYTES:,})",
            SourceRef(where),
            element,
        )
    try:
        return tomllib.loads(data.decode("utf-8"))
    except UnicodeDecodeError:
        raise InputError("not UTF-8 text", SourceRef(where), element) from None
    except tomllib.TOMLDecodeError as err:
        line = getattr(err, "lineno", None)
        msg = str(err).split(" (at line")[0]
        raise InputError(f"not valid TOML: {msg}", SourceRef(where, line), element) from None
    except RecursionError:
        raise InputError("nested too deeply to read", SourceRef(where), element) from None
    except ValueError as err:  # tomllib's limit on the digits of an integer
        raise InputError(
            f"holds a number too long to read ({str(err)[:80]})", SourceRef(where), element
        ) from None


def read_config(path: str, warnings: list[GradelineError] | None = None) -> dict[str, Any]:
    """Read a gradeline TOML configuration file: its ``[sheet]`` and ``[layers]``
    tables (each must be a table). Unknown top-level keys go to ``warnings``.

    Raises
    ------
    InputError
        The file cannot be read, is not valid TOML, or a table is not a table.
    """
    try:
        with open(path, "rb") as fh:
            data = fh.read(MAX_TOML_BYTES + 1)
    except OSError as err:
        raise InputError(
            f"cannot read the file ({err.strerror})", SourceRef(path), "config"
        ) from None
    cfg = parse_toml(data, path, "config")
    for key in CONFIG_TABLES:
        if key in cfg and not isinstance(cfg[key], dict):
            raise InputError(f"[{key}] must be a table", SourceRef(path), "config")
    if warnings is not None:
        warnings += unknown_keys(cfg, CONFIG_TABLES, path, "")
    return cfg


def unknown_keys(table: dict[str, Any], known, where: str, prefix: str) -> list[GradelineError]:
    """A warning for every key of ``table`` not in ``known`` (a typo is read past)."""
    return [
        GradelineError(f"{where}: unknown key {prefix}{key!r} read past (a typo?)")
        for key in table
        if key not in known
    ]
