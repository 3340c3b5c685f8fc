"""``gradeline design``: size the vertical curves of a profile for a design speed."""

from __future__ import annotations

import argparse
import os
from typing import Any

from gradeline.cli._common import (
    LENGTH,
    SUMMARIES,
    add_speed,
    distinct_outputs,
    emit,
    inputs_of,
    write_file,
)
from gradeline.errors import UsageError

NAME = "design"


def add_parser(sub: Any) -> None:
    """Register the command."""
    p = sub.add_parser(
        NAME,
        help=SUMMARIES[NAME],
        description=(
            "From PVIs alone (a LandXML profile, its curves ignored, or a CSV of station and "
            "elevation), the minimum length of every control at each PVI (stopping or "
            "headlight sight distance, design K, comfort, appearance, passing sight distance "
            "on request, a given minimum), the governing one rounded up, checked against the "
            "neighbouring curves and the profile ends (a curve that does not fit is "
            "shortened, made unsymmetrical, or reported with what it misses). Writes the "
            "report and, with -o, LandXML 1.2 with the designed curves. Default controls: "
            "AASHTO 2018 values shipped with gradeline; the design does not replace the "
            "governing agency's standards or the responsible engineer's judgment. Exit 0 "
            "every curve meets its controls, 1 some cannot where the PVIs are, 2 bad input."
        ),
    )
    p.add_argument("file", metavar="FILE", help="LandXML file, or CSV of station,elevation")
    p.add_argument("--alignment", metavar="NAME", help="alignment (LandXML with several)")
    p.add_argument("--profile", metavar="NAME", help="profile (ProfAlign) to design")
    add_speed(p)
    p.add_argument(
        "--round",
        metavar="STEP",
        default=None,
        help="round lengths up to this step (default 50 ft / 10 m; 'station': 100)",
    )
    p.add_argument("--min-length", type=LENGTH, metavar="L", help="shortest curve to use")
    p.add_argument(
        "--length-unit",
        choices=("foot", "USSurveyFoot", "meter"),
        default=None,
        help="unit of a CSV's stations and elevations (default foot)",
    )
    p.add_argument("--name", metavar="NAME", help="alignment name for a CSV input")
    p.add_argument(
        "-o", "--output", metavar="OUT.xml", help="write the designed profile as LandXML 1.2"
    )
    p.add_argument(
        "--report", metavar="PATH", help="write the report here (default: standard output)"
    )
    p.add_argument("--json", action="store_true", help="report in JSON")
    p.add_argument(
        "--build",
        metavar="OUTDIR",
        help="also build every deliverable of the designed profile here (needs -o)",
    )
    p.set_defaults(func=run)


def _step(text: str | None, metric: bool) -> float:
    if text is None:
        return 10.0 if metric else 50.0
    if text.strip().lower() in ("station", "stations"):
        return 100.0
    try:
        value = float(text)
    except ValueError:
        raise UsageError(f"--round {text!r}: give a length or 'station'") from None
    import math

    if not (math.isfinite(value) and value > 0):
        raise UsageError(f"--round {text!r}: give a positive length")
    return value


def run(args: argparse.Namespace) -> int:
    """Design, report, and write what was asked."""
    from gradeline import deliverables as dl

    if args.build and not args.output:
        raise UsageError("--build needs -o OUT.xml: the designed file the build reads")
    doc, al, prof = dl.design_input(
        args.file, args.alignment, args.profile, args.length_unit, args.name
    )
    step = _step(args.round, doc.units.metric)
    design, new_doc = dl.design(
        doc,
        al,
        prof,
        dl.DesignOptions(
            args.speed,
            args.units,
            args.curbed,
            args.passing,
            args.criteria,
            step,
            args.min_length,
        ),
    )
    source = os.path.basename(args.file)
    text = dl.design_report(design, new_doc, al.name, source, args.json)
    distinct_outputs(args.report, args.output)
    emit(text, args.report, inputs_of(args))
    if args.output:
        write_file(args.output, dl.landxml_bytes(new_doc), inputs_of(args))
    if args.build:
        from gradeline.build import BuildJob, BuildOptions
        from gradeline.cli.build import run_jobs

        opts = BuildOptions(speed=args.speed, speed_unit=args.units)
        code = run_jobs([BuildJob(args.output, opts)], args.build, os.cpu_count() or 1)
        if code == 2:
            return 2
    return 0 if design.complete else 1
