"""Pieces every command shares: the parser class, common options, output and warnings.

Imports here stay light (argparse and the standard library): ``gradeline
--help`` must not load numpy, lxml, ezdxf or reportlab.
"""

from __future__ import annotations

import argparse
import math
import sys
from collections.abc import Sequence
from typing import TYPE_CHECKING

from gradeline.errors import GradelineError, UsageError

if TYPE_CHECKING:
    from gradeline.solved import SolvedAlignment

__all__ = [
    "E_MAX",
    "EXAGGERATION",
    "JOBS",
    "LANES",
    "LENGTH",
    "PROG",
    "SCALE",
    "SPEED",
    "STATION",
    "STEP",
    "TOLERANCE",
    "number",
    "Parser",
    "add_common",
    "add_ground",
    "add_output",
    "add_report",
    "add_speed",
    "drawing_mapping",
    "emit",
    "layer_names",
    "warn",
    "with_ground",
    "write_file",
]

PROG = "gradeline"

#: Each command's one-line help, in the order ``gradeline --help`` lists them (the
#: command modules of :mod:`gradeline.cli` take their summary from here, so that
#: ``--help`` lists them without importing them).
SUMMARIES = {
    "info": "units, alignments, station ranges, profiles, curve counts",
    "table": "finished-grade elevation and grade at regular stations and key points",
    "dxf": "drafted profile (and plan) linework as DXF",
    "sheets": "printable PDF plan-and-profile sheets with curve and station tables",
    "review": "design-control review: sight distance, comfort, appearance, drainage "
    "(exit 1 on failure)",
    "design": "size vertical curves at the PVIs for a design speed; write the designed profile",
    "superelevation": "propose each horizontal curve's superelevation rate and transition "
    "for a design speed; write it into LandXML",
    "check": "cross-check stated LandXML values, and DXF drawings' linework and labels "
    "(exit 1 on findings)",
    "fit": "recover PVIs and vertical curves from drafted DXF profile linework; write LandXML",
    "convert": "LandXML to IFC 4.3 (IfcAlignment), or IFC 4.3 to LandXML 1.2",
    "build": "every deliverable for every alignment of files or folders, with a summary index",
    "demo": "build everything from the bundled samples (exit 0 when all was built; "
    "the samples fail a check on purpose)",
    "curves": "one row per vertical curve: PVI, grades, A, L, K, BVC/EVC, high/low point",
}


def number(
    low: float | None = None,
    high: float | None = None,
    *,
    open_low: bool = True,
    integer: bool = False,
):
    """An argparse ``type`` for a number in a sensible range: finite, above ``low``
    (or at least it with ``open_low`` False), at most ``high``. The message names the
    range; argparse adds the option's name.

    Examples
    --------
    >>> positive = number(0.0, 1000.0)
    >>> positive("10")
    10.0
    >>> positive("nan")
    Traceback (most recent call last):
    argparse.ArgumentTypeError: 'nan' is not a finite number
    >>> positive("0")
    Traceback (most recent call last):
    argparse.ArgumentTypeError: 0 is out of range: give more than 0 and at most 1000
    """

    def parse(text: str) -> float:
        try:
            value = int(text) if integer else float(text)
        except ValueError:
            raise argparse.ArgumentTypeError(
                f"{text!r} is not {'a whole' if integer else 'a'} number"
            ) from None
        if not math.isfinite(value):
            raise argparse.ArgumentTypeError(f"{text!r} is not a finite number")
        below = low is not None and (value <= low if open_low else value < low)
        if below or (high is not None and value > high):
            parts = []
            if low is not None:
                parts.append(f"{'more than' if open_low else 'at least'} {low:g}")
            if high is not None:
                parts.append(f"at most {high:g}")
            raise argparse.ArgumentTypeError(
                f"{value:g} is out of range: give {' and '.join(parts)}"
            )
        return value

    parse.__name__ = "number"  # argparse names the type in its own messages
    return parse


#: The ranges of the numeric options (one place; every command takes them from here).
EXAGGERATION = number(0.0, 1000.0)
SCALE = number(1.0, 100000.0, open_low=False)
STEP = number(0.0, 1e7)  # intervals, windows, steps: a positive length
LENGTH = number(0.0, 1e7, open_low=False)  # a length of 0 or more
STATION = number(-1e9, 1e9, open_low=False)  # a station or a datum elevation
SPEED = number(0.0, 300.0)  # mph or km/h
E_MAX = number(0.0, 0.2)
LANES = number(1.0, 10.0, open_low=False)
JOBS = number(1, 1024, open_low=False, integer=True)
TOLERANCE = number(0.0, 1e6)


class Parser(argparse.ArgumentParser):
    """argparse with one-line errors and exit 2."""

    def error(self, message: str) -> None:  # type: ignore[override]
        self.exit(2, f"{self.prog}: {message} (see --help)\n")


def warn(errors: Sequence[GradelineError]) -> None:
    """Print warnings, one line each."""
    for err in errors:
        sys.stderr.write(f"{PROG}: warning: {err}\n")


#: The options of any command that name a file it reads.
INPUT_OPTIONS = ("file", "drawing", "ground", "criteria", "config", "against", "dxf")


def inputs_of(args: argparse.Namespace) -> list[str]:
    """Every file a command reads (FILE, --ground, --dxf, --criteria, --config,
    --against, a fit's drawing): none of them may be an output."""
    out: list[str] = []
    for name in INPUT_OPTIONS:
        value = getattr(args, name, None)
        if isinstance(value, str):
            out.append(value)
        elif isinstance(value, (list, tuple)):
            out += [v for v in value if isinstance(v, str)]
    return out


def distinct_outputs(*paths: str | None) -> None:
    """Refuse two outputs of one run that name the same file (``-o p.dxf --plan ./p.dxf``)."""
    import os

    seen: dict[str, str] = {}
    for p in paths:
        if not p or p == "-":
            continue
        key = os.path.realpath(p)
        if key in seen:
            raise UsageError(f"{seen[key]!r} and {p!r} name the same output file")
        seen[key] = p


def write_all(outputs: Sequence[tuple[str, str | bytes]], inputs: Sequence[str]) -> None:
    """Write several outputs of one run: all of them, or (a write failing) none of
    those this run made -- a file that was there before is left as it was."""
    import os

    made: list[str] = []
    try:
        for path, data in outputs:
            existed = os.path.exists(path)
            write_file(path, data, inputs)
            if not existed:
                made.append(path)
    except BaseException:
        for path in made:
            try:
                os.unlink(path)
            except OSError:
                pass
        raise


def emit(text: str, output: str | None, inputs: Sequence[str]) -> None:
    """Write ``text`` to ``output`` atomically, or to standard output."""
    if output is None or output == "-":
        sys.stdout.write(text)
        return
    write_file(output, text, inputs)


def write_file(path: str, data: str | bytes, inputs: Sequence[str]) -> None:
    """Write one output atomically, refusing to replace an input."""
    from gradeline.render.outputs import refuse_overwrite, write_atomic

    refuse_overwrite(path, inputs)
    try:
        write_atomic(path, data)
    except OSError as err:
        raise UsageError(f"cannot write {path!r} ({err.strerror})") from None


def add_common(p: argparse.ArgumentParser, *, profile: bool = True) -> None:
    """FILE, --alignment and (usually) --profile."""
    p.add_argument("file", metavar="FILE", help="LandXML file")
    p.add_argument(
        "--alignment", metavar="NAME", help="alignment (needed when the file has several)"
    )
    if profile:
        p.add_argument("--profile", metavar="NAME", help="finished-grade profile (ProfAlign) name")


def add_ground(p: argparse.ArgumentParser) -> None:
    """--ground and --surface."""
    p.add_argument(
        "--ground",
        metavar="FILE",
        help="LandXML file with the existing-ground TIN (default: FILE itself when "
        "--surface is given)",
    )
    p.add_argument(
        "--surface",
        metavar="NAME",
        help="TIN surface to sample along the alignment (default: the only one)",
    )


def add_output(p: argparse.ArgumentParser) -> None:
    """--format and -o of the table commands."""
    p.add_argument(
        "--format", choices=("csv", "json"), default="csv", help="output format (default csv)"
    )
    p.add_argument("-o", "--output", metavar="PATH", help="write here instead of standard output")


def add_report(p: argparse.ArgumentParser) -> None:
    """--json and -o of the report commands."""
    p.add_argument("--json", action="store_true", help="write JSON instead of text")
    p.add_argument(
        "-o", "--output", metavar="PATH", help="write the report here instead of standard output"
    )


def add_speed(p: argparse.ArgumentParser, criteria_help: str = "TOML design controls") -> None:
    """--speed, --units, --curbed, --passing and --criteria (review and design)."""
    p.add_argument("--speed", type=SPEED, required=True, metavar="V", help="design speed")
    p.add_argument(
        "--units",
        choices=("mph", "kmh"),
        help="unit of --speed (default: mph for files in feet, kmh for metres)",
    )
    p.add_argument(
        "--curbed", action="store_true", help="curbed section: flag drainage on flat curves"
    )
    p.add_argument(
        "--passing", action="store_true", help="also check passing sight distance on crests"
    )
    p.add_argument("--criteria", metavar="FILE", help=criteria_help)


def add_superelevation(p: argparse.ArgumentParser) -> None:
    """--super-method and --lanes-rotated (review, superelevation, build)."""
    p.add_argument(
        "--super-method",
        choices=("open", "low-speed"),
        default="open",
        help="superelevation rates: the open-highway distribution of e and f (default) or "
        "low-speed urban streets",
    )
    p.add_argument(
        "--lanes-rotated",
        type=LANES,
        metavar="N",
        help="lanes rotated about the axis, for runoff lengths (default 1)",
    )


def with_ground(solved: SolvedAlignment, args: argparse.Namespace) -> SolvedAlignment:
    """The alignment with the TIN ground the options ask for, if any (warnings printed)."""
    if not (getattr(args, "ground", None) or getattr(args, "surface", None)):
        return solved
    from gradeline.deliverables import attach_ground

    solved, warnings = attach_ground(solved, args.ground, args.surface)
    warn(warnings)
    return solved


def layer_names(args: argparse.Namespace) -> dict[str, str]:
    """Layer renames from --config's [layers] table and --layer ROLE=NAME options."""
    from gradeline.io.config import read_config

    names: dict[str, str] = {}
    if getattr(args, "config", None):
        notes: list[GradelineError] = []
        cfg = read_config(args.config, notes)
        warn(notes)
        names.update(cfg.get("layers", {}))
    for item in getattr(args, "layer", None) or []:
        role, sep, name = item.partition("=")
        if not sep or not name.strip():
            raise UsageError(f"--layer {item!r}: write ROLE=NAME, e.g. grade=MY-GRADE")
        names[role.strip()] = name.strip()
    return names


def drawing_mapping(
    args: argparse.Namespace, stored: dict[str, str]
) -> tuple[float, float, str] | None:
    """(exaggeration, datum, how) from the options or the drawing; None when neither says."""
    if (args.exaggeration is None) != (args.datum is None):
        raise UsageError("give both --exaggeration and --datum, or neither")
    if args.exaggeration is not None:
        return args.exaggeration, args.datum, "given"
    if "exaggeration" in stored and "datum" in stored:
        try:
            exag, datum = float(stored["exaggeration"]), float(stored["datum"])
        except (TypeError, ValueError):
            exag = datum = math.nan
        if not (math.isfinite(exag) and 0 < exag <= 1000 and math.isfinite(datum)):
            raise UsageError(
                f"the drawing states exaggeration {stored['exaggeration']!r} and datum "
                f"{stored['datum']!r}, which cannot map it; give --exaggeration and --datum"[:300]
            )
        return exag, datum, "from the drawing"
    return None
