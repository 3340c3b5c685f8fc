"""``gradeline table``: elevation, grade and coordinates at stations and key points."""

from __future__ import annotations

import argparse
from typing import Any

from gradeline.cli._common import (
    STEP,
    SUMMARIES,
    add_common,
    add_ground,
    add_output,
    emit,
    inputs_of,
    warn,
    with_ground,
)

NAME = "table"


def add_parser(sub: Any) -> None:
    """Register the command."""
    p = sub.add_parser(
        NAME,
        help=SUMMARIES[NAME],
        description=(
            "Rows at every multiple of --interval plus every key point (START, BVC, "
            "PVI, HIGH/LOW, EVC, END), or exactly at the --at stations. grade is in "
            "percent; offset is finished grade minus tangent elevation."
        ),
    )
    add_common(p)
    add_ground(p)
    group = p.add_mutually_exclusive_group(required=True)
    group.add_argument(
        "--interval", type=STEP, metavar="D", help="row every D file units of station"
    )
    group.add_argument(
        "--at",
        metavar="STATIONS",
        help="comma-separated stations, e.g. 12+50,13+00 (after a station equation "
        "that repeats labels, add the region: 12+50@2)",
    )
    add_output(p)
    p.set_defaults(func=run)


def run(args: argparse.Namespace) -> int:
    """Write the station table."""
    from gradeline import deliverables as dl

    solved = with_ground(dl.open_alignment(args.file, args.alignment, args.profile), args)
    at = tuple(args.at.split(",")) if args.at is not None else None
    off: list = []
    text = dl.station_table(solved, dl.TableOptions(args.interval, at, args.format), off)
    warn(dl.plan_warnings(solved) + off)
    emit(text, args.output, inputs_of(args))
    return 0
