"""``gradeline demo``: build everything from the bundled (invented) samples."""

from __future__ import annotations

import argparse
from typing import Any

from gradeline.cli._common import JOBS, SUMMARIES

NAME = "demo"


def add_parser(sub: Any) -> None:
    """Register the command."""
    p = sub.add_parser(
        NAME,
        help=SUMMARIES[NAME],
    )
    p.add_argument(
        "-o",
        "--output",
        default="gradeline-demo",
        metavar="OUTDIR",
        help="output folder (default gradeline-demo)",
    )
    p.add_argument("--jobs", type=JOBS, metavar="N", help="parallel processes")
    p.set_defaults(func=run)


def samples_dir() -> Any:
    """The bundled samples: packaged as gradeline.samples."""
    from importlib import resources

    return resources.files("gradeline.samples")


def run(args: argparse.Namespace) -> int:
    """Build the samples with their terrain and design speeds."""
    from gradeline.build import BuildJob, BuildOptions
    from gradeline.cli.build import run_jobs
    from gradeline.io.config import read_config

    base = samples_dir()
    bypass = str(base / "orrin-vale-bypass.xml")
    terrain = str(base / "orrin-vale-terrain.xml")
    link = str(base / "tarnholm-link.xml")
    cfg = read_config(str(base / "sheets.toml"))
    sheet = dict(cfg.get("sheet", {}))
    metric_sheet = {k: v for k, v in sheet.items() if k not in ("size", "scale", "interval")}
    metric_sheet["project"] = "Tarnholm Link Road (invented sample)"
    jobs = [
        BuildJob(bypass, BuildOptions(speed=50.0, speed_unit="mph", ground=terrain, sheet=sheet)),
        BuildJob(
            link,
            BuildOptions(
                speed=80.0, speed_unit="kmh", surface="Survey 2026 west", sheet=metric_sheet
            ),
        ),
    ]
    import os
    import sys

    code = run_jobs(jobs, args.output, args.jobs or (os.cpu_count() or 1))
    if code == 1:
        # findings are part of the demonstration, not a failure of it
        sys.stdout.write(
            "\nEverything was built. The samples are an invented scenario that fails "
            "some checks on purpose (the FINDINGS lines above), to show how findings "
            "are reported.\n"
        )
        return 0
    return code
