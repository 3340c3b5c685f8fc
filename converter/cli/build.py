"""``gradeline build``: every deliverable for every alignment, with a summary index."""

from __future__ import annotations

import argparse
import sys
from typing import Any

from gradeline.cli._common import JOBS, SPEED, SUMMARIES
from gradeline.errors import UsageError

NAME = "build"


def add_parser(sub: Any) -> None:
    """Register the command."""
    p = sub.add_parser(
        NAME,
        help=SUMMARIES[NAME],
        description=(
            "For every alignment: profile.dxf, plan.dxf, sheets.pdf, curves.csv, table.csv, "
            "check.txt and, with --speed, review.txt, in OUTDIR/<file>/<alignment>/, plus "
            "OUTDIR/index.txt and index.json. One failing alignment or file does not stop the "
            "others. Exit 0 all built and clean, 1 built with check or review findings, 2 when "
            "anything failed to build."
        ),
    )
    p.add_argument("inputs", nargs="+", metavar="FILE_OR_FOLDER", help="LandXML files or folders")
    p.add_argument("-o", "--output", required=True, metavar="OUTDIR", help="output folder")
    p.add_argument("--speed", type=SPEED, metavar="V", help="design speed for the review")
    p.add_argument("--units", choices=("mph", "kmh"), help="unit of --speed (default: the file's)")
    p.add_argument(
        "--ground",
        metavar="FILE|auto",
        help="LandXML file with the existing-ground TIN; 'auto': a terrain file "
        "(surfaces, no alignments) in the same folder with the same units",
    )
    p.add_argument(
        "--surface",
        metavar="NAME",
        help="TIN surface to sample along each alignment (default: the only one)",
    )
    p.add_argument("--alignment", metavar="NAME", help="build only this alignment of each file")
    p.add_argument(
        "--profile",
        metavar="NAME",
        help="build only this profile (default: every finished-grade profile, "
        "each in its own sub-folder when there are several)",
    )
    p.add_argument(
        "--jobs", type=JOBS, metavar="N", help="parallel processes (default: one a core)"
    )
    p.add_argument("--config", metavar="FILE", help="TOML with [sheet] and [layers] tables")
    p.set_defaults(func=run)


class Stopped(KeyboardInterrupt):
    """A build stopped by SIGTERM or Ctrl-C: caught wherever a ``KeyboardInterrupt`` is.

    Its own class, not ``KeyboardInterrupt`` itself: CPython (3.11, 3.12) remembers a
    ``KeyboardInterrupt`` that leaves code run by ``exec`` of a string (scipy runs its
    imports that way) and then ends the process by SIGINT, even though the build
    caught it and wrote its index. It compares the exact class, so a subclass is not
    remembered.
    """


def _stop(signum: int, frame: object) -> None:
    raise Stopped


def _catch_stops() -> dict[int, Any]:
    """SIGTERM, and Ctrl-C unless it is ignored, raise :class:`Stopped`; the old
    handlers, for :func:`_restore`."""
    import signal

    old: dict[int, Any] = {signal.SIGTERM: signal.signal(signal.SIGTERM, _stop)}
    if signal.getsignal(signal.SIGINT) is signal.default_int_handler:
        old[signal.SIGINT] = signal.signal(signal.SIGINT, _stop)
    return old


def _restore(old: dict[int, Any]) -> None:
    import signal

    for signum, handler in old.items():
        signal.signal(signum, handler)


def run_jobs(jobs: list[Any], outdir: str, workers: int) -> int:
    """Build the jobs with a progress bar on a terminal; print the index; exit code."""
    from gradeline.build import build, write_index
    from gradeline.render.outputs import refuse_overwrite

    for j in jobs:  # the output folder may not be an input file
        refuse_overwrite(outdir, [j.path])
    bar = None
    if sys.stderr.isatty():
        from tqdm import tqdm

        bar = tqdm(total=len(jobs), unit="file", desc="gradeline build", file=sys.stderr)
    old = _catch_stops()  # a stopped build still writes its index
    try:
        results = build(jobs, outdir, workers=workers, progress=bar.update if bar else None)
    finally:
        _restore(old)
        if bar is not None:
            bar.close()
    text, _ = write_index(results, outdir)
    sys.stdout.write(text)
    if any(r.failed for r in results):
        return 2
    if any(r.check_over or r.review_failed for r in results):
        return 1
    return 0


def run(args: argparse.Namespace) -> int:
    """Build every input."""
    import os

    from gradeline.build import BuildJob, BuildOptions, collect_inputs, output_folders
    from gradeline.io.config import read_config

    cfg = read_config(args.config) if args.config else {}
    files = collect_inputs(args.inputs)
    if not files:
        raise UsageError("no LandXML or IFC files found in " + ", ".join(args.inputs))
    auto = args.ground == "auto"
    opts = BuildOptions(
        speed=args.speed,
        speed_unit=args.units,
        ground=None if auto else args.ground,
        surface=args.surface,
        sheet=dict(cfg.get("sheet", {})),
        layers=dict(cfg.get("layers", {})),
        alignment=args.alignment,
        profile=args.profile,
    )
    jobs = [BuildJob(f, opts, d) for f, d in zip(files, output_folders(files), strict=True)]
    if auto:
        jobs = auto_ground(jobs)
    workers = args.jobs or (os.cpu_count() or 1)
    return run_jobs(jobs, args.output, workers)


def auto_ground(jobs: list[Any]) -> list[Any]:
    """Give each alignment file the terrain file of its folder that shares its units.

    A terrain file holds surfaces (or points) and no alignment. With several
    candidates the first by name is taken; a file with none builds without ground.
    """
    from dataclasses import replace
    from pathlib import Path

    from gradeline.errors import GradelineError
    from gradeline.io import landxml

    docs = {}
    for j in jobs:
        try:
            docs[j.path] = landxml.read(j.path)
        except GradelineError:
            continue  # build reports it
    terrain = sorted(p for p, d in docs.items() if d.has_surfaces and not d.names)
    out = []
    for j in jobs:
        doc = docs.get(j.path)
        if doc is None or not doc.names:
            out.append(j)
            continue
        match = next(
            (
                t
                for t in terrain
                if Path(t).parent == Path(j.path).parent
                and docs[t].units.linear == doc.units.linear
            ),
            None,
        )
        out.append(replace(j, options=replace(j.options, ground=match)) if match else j)
    return out
