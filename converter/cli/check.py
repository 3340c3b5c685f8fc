"""``gradeline check``: cross-check stated LandXML values, and drawings' linework and labels."""

from __future__ import annotations

import argparse
from typing import Any

from gradeline.cli._common import (
    EXAGGERATION,
    STATION,
    SUMMARIES,
    TOLERANCE,
    add_common,
    add_ground,
    add_report,
    emit,
    warn,
)

NAME = "check"


def add_parser(sub: Any) -> None:
    """Register the command."""
    p = sub.add_parser(
        NAME,
        help=SUMMARIES[NAME],
        description=(
            "Recompute every stated value of the file from its coordinates (continuity, "
            "tangency, lengths, staStart, chord, delta, radius, directions, spiral values, PI "
            "points, alignment length; PVIs inside the alignment, curve overlaps, CircCurve "
            "lengths, ground profiles inside the alignment) and, with --dxf, audit drawings: "
            "profile linework against the computed finished grade, plan linework against "
            "the computed alignment, and every text stating a station, elevation, grade, "
            "L, K, A, E, R, delta, D or T against the value it names. Exit 0 when "
            "everything agrees within tolerance, 1 when any finding exceeds it, 2 for bad input."
        ),
    )
    add_common(p)
    p.add_argument(
        "--dxf",
        metavar="DRAWING",
        action="append",
        default=[],
        help="DXF profile or plan drawing to audit: linework and labels (repeatable)",
    )
    add_ground(p)
    p.add_argument(
        "--layer",
        metavar="NAME",
        help="profile drawings: layer of the finished-grade linework (default PROFILE-GRADE)",
    )
    p.add_argument(
        "--plan-layer",
        metavar="NAME",
        help="plan drawings: layer of the centreline (default PLAN-ALIGNMENT, else the layer "
        "lying nearest the alignment)",
    )
    p.add_argument(
        "--exaggeration",
        type=EXAGGERATION,
        metavar="E",
        help="vertical exaggeration of the drawing",
    )
    p.add_argument(
        "--datum",
        type=STATION,
        metavar="D",
        help="elevation at y = 0 (default: read from a gradeline drawing, else fitted)",
    )
    p.add_argument(
        "--transform",
        default="none",
        metavar="T",
        help="plan drawings: none (default), fit (rotation and shift fitted to the "
        "alignment), or DX,DY,DEG[,SCALE] (file = SCALE x drawing turned DEG, then shifted)",
    )
    p.add_argument(
        "--drawing-units",
        default="auto",
        metavar="U",
        help="units of the drawings: auto ($INSUNITS; refused when they differ from the "
        "file's), as-file, foot, us-foot, metre, millimetre, centimetre, inch",
    )
    p.add_argument("--no-labels", action="store_true", help="skip the audit of the drawings' texts")
    p.add_argument(
        "--against",
        metavar="OTHER",
        help="another description of the same alignment (LandXML or IFC 4.3, found by name): "
        "compare element by element and by samples along the common stations",
    )
    p.add_argument(
        "--tolerance",
        type=TOLERANCE,
        default=0.01,
        metavar="T",
        help="distance and elevation tolerance in file units (default 0.01)",
    )
    p.add_argument(
        "--angle-tolerance",
        type=TOLERANCE,
        default=2.0,
        metavar="SEC",
        help="angle and direction tolerance in seconds of arc (default 2)",
    )
    add_report(p)
    p.set_defaults(func=run)


def run(args: argparse.Namespace) -> int:
    """Write the cross-check report; exit 1 on findings over tolerance."""
    from gradeline import deliverables as dl
    from gradeline.analysis import check
    from gradeline.io import landxml

    doc = landxml.read(args.file)
    warn(dl.document_warnings(doc))
    opts = dl.CheckOptions(args.tolerance, args.angle_tolerance, args.json)
    tol = opts.tolerances()
    findings = dl.check_findings(doc, tol, args.alignment)
    from gradeline.io.ifc_read import looks_like_ifc

    if looks_like_ifc(args.file):  # the file's second description: its geometry
        findings += dl.representation_findings(doc, args.file, tol, args.alignment)
    if args.ground or args.surface:
        base = dl.open_alignment(doc, args.alignment, args.profile)
        with_tin, _ = dl.attach_ground(base, args.ground, args.surface)
        findings += check.check_ground_against_surface(
            base.alignment, with_tin.ground_at, tol, with_tin.alignment.grounds[0].name
        )
    if args.against:
        findings += dl.comparison(doc, args.alignment, args.profile, args.against, tol)
    drawings, stationing = [], None
    if args.dxf:
        from gradeline.analysis.drawing_audit import AuditOptions

        solved = dl.open_alignment(doc, args.alignment, args.profile)
        audit = AuditOptions(
            layer=args.layer,
            plan_layer=args.plan_layer,
            exaggeration=args.exaggeration,
            datum=args.datum,
            transform=args.transform,
            drawing_units=args.drawing_units,
            labels=not args.no_labels,
        )
        drawings = dl.drawing_audits(solved, args.dxf, tol, audit)
        stationing = solved.stationing
    text, over = dl.check_report(doc, findings, tol, opts, drawings, stationing)
    emit(text, args.output, [args.file, *args.dxf, *([args.against] if args.against else [])])
    return 1 if over else 0
