"""``gradeline review``: design-control review of the profile for a design speed."""

from __future__ import annotations

import argparse
from typing import Any

from gradeline.cli._common import (
    E_MAX,
    STEP,
    SUMMARIES,
    add_common,
    add_report,
    add_speed,
    add_superelevation,
    emit,
    inputs_of,
    warn,
)

NAME = "review"


def add_parser(sub: Any) -> None:
    """Register the command."""
    p = sub.add_parser(
        NAME,
        help=SUMMARIES[NAME],
        description=(
            "Closed-form checks of every vertical curve for the design speed (crest stopping "
            "sight distance, sag headlight sight distance, comfort, appearance, drainage on "
            "curbed sections, passing sight distance on request) and the exact available "
            "sight distance along the finished grade in both directions. Default controls: "
            "AASHTO 2018 values shipped with gradeline; another agency's with --criteria. "
            "The review does not replace the governing agency's standards or the "
            "responsible engineer's judgment. Exit 0 all pass, 1 something fails, 2 bad input."
        ),
    )
    add_common(p)
    add_speed(p, "TOML design controls (see converter/criteria/)")
    p.add_argument(
        "--emax",
        type=E_MAX,
        metavar="E",
        help="maximum superelevation rate for the minimum-radius check (default 0.08)",
    )
    add_superelevation(p)
    p.add_argument(
        "--step",
        type=STEP,
        metavar="D",
        help="station step of the sight-distance run (default 10 ft / 5 m)",
    )
    add_report(p)
    p.set_defaults(func=run)


def run(args: argparse.Namespace) -> int:
    """Write the review; exit 1 when something fails."""
    from gradeline import deliverables as dl

    solved = dl.open_alignment(args.file, args.alignment, args.profile)
    opts = dl.ReviewOptions(
        args.speed,
        args.units,
        args.curbed,
        args.passing,
        args.criteria,
        args.emax,
        args.step,
        args.json,
        args.super_method,
        args.lanes_rotated,
    )
    text, failed = dl.review_report(solved, opts)
    warn(dl.plan_warnings(solved))
    emit(text, args.output, inputs_of(args))
    return 1 if failed else 0
