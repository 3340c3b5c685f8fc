"""Pieces every command shares: the parser class, common options, output and warnings.

Imports here stay light (argparse and the standard library): ``gradeline
--help`` must not load numpy, lxml, ezdxf or reportlab.
"""

from __future__ import annotations

import argparse
import sys
from collections.abc import Sequence
from typing import TYPE_CHECKING

from gradeline.errors import GradelineError, UsageError

if TYPE_CHECKING:
    from gradeline.solved import SolvedAlignment

__all__ = [
    "PROG",
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


class Parser(argparse.ArgumentParser):
    """argparse with one-line errors and exit 2."""

    def error(self, message: str) -> None:  # type: ignore[override]
        self.exit(2, f"{self.prog}: {message} (see --help)\n")


def warn(errors: Sequence[GradelineError]) -> None:
    """Print warnings, one line each."""
    for err in errors:
        sys.stderr.write(f"{PROG}: warning: {err}\n")


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
    p.add_argument("--speed", type=float, required=True, metavar="V", help="design speed")
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
        type=float,
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
        cfg = read_config(args.config)
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
        return float(stored["exaggeration"]), float(stored["datum"]), "from the drawing"
    return None
