"""``gradeline dxf``: drafted profile (and plan) linework as DXF."""

from __future__ import annotations

import argparse
from typing import Any

from gradeline.cli._common import (
    EXAGGERATION,
    SCALE,
    SUMMARIES,
    add_common,
    add_ground,
    distinct_outputs,
    inputs_of,
    layer_names,
    warn,
    with_ground,
    write_all,
)
from gradeline.errors import GradelineError
from gradeline.present.roles import LAYER_ROLES

NAME = "dxf"


def add_parser(sub: Any) -> None:
    """Register the command."""
    p = sub.add_parser(
        NAME,
        help=SUMMARIES[NAME],
        description=(
            "Profile in model space at x = station, y = (elevation - datum) x exaggeration "
            "(datum and exaggeration are written into the drawing). Parabolic curves are "
            "exact degree-2 SPLINEs, or polylines within 0.005 ft / 0.002 m of the curve "
            "with --curves polyline (always in R12). Layer roles: " + ", ".join(LAYER_ROLES)
        ),
    )
    add_common(p)
    p.add_argument("-o", "--output", metavar="PATH", required=True, help="profile DXF to write")
    p.add_argument("--plan", metavar="PATH", help="also write the plan linework to this DXF")
    p.add_argument(
        "--superelevation",
        metavar="PATH",
        help="also write the superelevation diagram (cross slope of each lane) to this DXF",
    )
    add_ground(p)
    p.add_argument(
        "--exaggeration",
        type=EXAGGERATION,
        default=10.0,
        metavar="E",
        help="vertical exaggeration (default 10)",
    )
    p.add_argument(
        "--scale",
        type=SCALE,
        metavar="S",
        help='plot scale for text heights: 1" = S ft (default 50) or 1:S (default 500)',
    )
    p.add_argument(
        "--curves",
        choices=("spline", "polyline"),
        default="spline",
        help="parabolic curves as exact SPLINEs (default) or polylines",
    )
    p.add_argument(
        "--dxf-version",
        choices=("R2010", "R2000", "R12"),
        default="R2010",
        help="DXF version (default R2010)",
    )
    p.add_argument(
        "--layer",
        action="append",
        metavar="ROLE=NAME",
        help="rename a layer, e.g. --layer grade=C-ROAD-PROF (repeatable)",
    )
    p.add_argument("--config", metavar="FILE", help="TOML file; its [layers] table renames layers")
    p.set_defaults(func=run)


def run(args: argparse.Namespace) -> int:
    """Write the profile (and plan) DXF; a plan-only alignment gets its plan drawing."""
    from gradeline import deliverables as dl

    distinct_outputs(args.output, args.plan, args.superelevation)
    solved = dl.open_alignment(args.file, args.alignment, args.profile)
    solved = with_ground(solved, args)
    opts = dl.DrawingOptions(
        args.scale, args.exaggeration, args.curves, args.dxf_version, layer_names(args)
    )
    name = solved.alignment.name
    notes: list[GradelineError] = []
    outputs = []
    if solved.geometry is not None:
        outputs.append((args.output, dl.profile_dxf(solved, opts)))
        if args.plan and solved.horizontal is None:
            notes.append(
                GradelineError(
                    f"alignment {name!r} has no CoordGeom: no plan drawing, {args.plan} not written"
                )
            )
        elif args.plan:
            outputs.append((args.plan, dl.plan_dxf(solved, opts)))
    else:  # plan only: the plan drawing is what there is
        target = args.plan or args.output
        outputs.append((target, dl.plan_dxf(solved, opts)))
        notes.append(
            GradelineError(
                f"alignment {name!r} has no profile: wrote its plan drawing to {target}"
                + (f"; {args.output} not written" if args.plan else "")
            )
        )
    if args.superelevation:
        outputs.append((args.superelevation, dl.superelevation_dxf(solved, opts)))
    warn(dl.plan_warnings(solved) + notes)
    write_all(outputs, inputs_of(args))
    return 0
