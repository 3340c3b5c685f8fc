"""``gradeline curves``: one row per horizontal and vertical curve."""

from __future__ import annotations

import argparse
from typing import Any

from gradeline.cli._common import SUMMARIES, add_common, add_output, emit, inputs_of, warn

NAME = "curves"


def add_parser(sub: Any) -> None:
    """Register the command."""
    p = sub.add_parser(NAME, help=SUMMARIES[NAME])
    add_common(p)
    add_output(p)
    p.set_defaults(func=run)


def run(args: argparse.Namespace) -> int:
    """Write the curve table."""
    from gradeline import deliverables as dl

    solved = dl.open_alignment(args.file, args.alignment, args.profile)
    text = dl.curve_table(solved, args.format)
    warn(dl.plan_warnings(solved))
    emit(text, args.output, inputs_of(args))
    return 0
