"""``gradeline sheets``: printable PDF plan-and-profile sheets with curve and station tables."""

from __future__ import annotations

import argparse
from typing import Any

from gradeline.cli._common import (
    EXAGGERATION,
    SCALE,
    STEP,
    SUMMARIES,
    add_common,
    add_ground,
    inputs_of,
    warn,
    with_ground,
    write_file,
)

NAME = "sheets"


def add_parser(sub: Any) -> None:
    """Register the command."""
    p = sub.add_parser(
        NAME,
        help=SUMMARIES[NAME],
        description=(
            "Plan above, profile below, at true scale on ANSI D/B or ISO A1/A3 sheets split "
            "at match lines; then the horizontal and vertical curve tables and the "
            "station/elevation table. Options override the [sheet] table of --config."
        ),
    )
    add_common(p)
    p.add_argument("-o", "--output", metavar="PATH", required=True, help="PDF to write")
    add_ground(p)
    p.add_argument(
        "--size",
        choices=("ansi-d", "ansi-b", "iso-a1", "iso-a3"),
        help="sheet size (default ansi-d for feet, iso-a1 for metres)",
    )
    p.add_argument(
        "--scale",
        type=SCALE,
        metavar="S",
        help='horizontal scale: 1" = S ft (20, 40, 50, 100; default 50) or 1:S '
        "(250, 500, 1000; default 500)",
    )
    p.add_argument(
        "--exaggeration",
        type=EXAGGERATION,
        metavar="E",
        help="vertical exaggeration (default 10; lowered on a sheet whose profile "
        "would not fit, and the title block says so)",
    )
    p.add_argument(
        "--interval", type=STEP, metavar="D", help="station table interval (default 50 ft / 20 m)"
    )
    p.add_argument(
        "--config", metavar="FILE", help="TOML file with a [sheet] table (see samples/sheets.toml)"
    )
    p.set_defaults(func=run)


def run(args: argparse.Namespace) -> int:
    """Write the PDF sheets."""
    from gradeline import deliverables as dl
    from gradeline.io.config import read_config

    cfg = read_config(args.config) if args.config else {}
    sheet_cfg = dict(cfg.get("sheet", {}))
    dl.check_sheet_config(sheet_cfg, args.config or "config")
    solved = dl.open_alignment(args.file, args.alignment, args.profile)
    solved = with_ground(solved, args)
    overrides = {
        "size": args.size,
        "scale": args.scale,
        "exaggeration": args.exaggeration,
        "interval": args.interval,
    }
    opts = dl.sheet_options(solved, sheet_cfg, overrides, config_name=args.config or "config")
    data = dl.sheets_pdf(solved, opts)
    warn(dl.plan_warnings(solved))
    write_file(args.output, data, inputs_of(args))
    return 0
