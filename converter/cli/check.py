"""``gradeline check``: cross-check stated LandXML values and DXF profile linework."""

from __future__ import annotations

import argparse
from typing import Any

from gradeline.cli._common import add_common, add_ground, add_report, drawing_mapping, emit, warn
from gradeline.errors import UsageError

NAME = "check"


def add_parser(sub: Any) -> None:
    """Register the command."""
    p = sub.add_parser(
        NAME,
        help="cross-check stated LandXML values and DXF profile linework (exit 1 on findings)",
        description=(
            "Recompute every stated value of the file from its coordinates (continuity, "
            "tangency, lengths, staStart, chord, delta, radius, directions, spiral values, PI "
            "points, alignment length; PVIs inside the alignment, curve overlaps, CircCurve "
            "lengths, ground profiles inside the alignment) and, with --dxf, compare the "
            "profile linework on a layer with the computed finished grade. Exit 0 when "
            "everything agrees within tolerance, 1 when any finding exceeds it, 2 for bad input."
        ),
    )
    add_common(p)
    p.add_argument("--dxf", metavar="DRAWING", help="DXF with drafted profile linework")
    add_ground(p)
    p.add_argument(
        "--layer",
        metavar="NAME",
        help="layer of the finished-grade linework (default PROFILE-GRADE when present)",
    )
    p.add_argument(
        "--exaggeration", type=float, metavar="E", help="vertical exaggeration of the drawing"
    )
    p.add_argument(
        "--datum",
        type=float,
        metavar="D",
        help="elevation at y = 0 (default: read from a gradeline drawing, else fitted)",
    )
    p.add_argument(
        "--tolerance",
        type=float,
        default=0.01,
        metavar="T",
        help="distance and elevation tolerance in file units (default 0.01)",
    )
    p.add_argument(
        "--angle-tolerance",
        type=float,
        default=2.0,
        metavar="SEC",
        help="angle and direction tolerance in seconds of arc (default 2)",
    )
    add_report(p)
    p.set_defaults(func=run)


def _drawing(args: argparse.Namespace, doc: Any, tol: Any) -> tuple[Any, Any, str]:
    """The DXF linework check: (result, stationing, layer)."""
    from gradeline import deliverables as dl
    from gradeline.analysis import drawing_check
    from gradeline.io.dxf_read import layer_names, read_drawing, read_linework, read_mapping
    from gradeline.present.roles import LAYER_ROLES

    solved = dl.open_alignment(doc, args.alignment, args.profile, need_profile=True)
    assert solved.geometry is not None
    dxf_doc = read_drawing(args.dxf)
    names = layer_names(dxf_doc)
    layer = args.layer or ""
    if not layer:
        layer = next((n for n in names if n.upper() == LAYER_ROLES["grade"]), "")
        if not layer:
            raise UsageError(
                f"{args.dxf}: name the profile layer with --layer; layers with "
                "linework: " + (", ".join(names) or "none")
            )
    lines = read_linework(dxf_doc, layer, tol.distance / 20.0)
    if not lines:
        raise UsageError(
            f"{args.dxf}: no LINE, LWPOLYLINE, POLYLINE, SPLINE or ARC on layer "
            f"{layer!r}; layers with linework: " + (", ".join(names) or "none")
        )
    found = drawing_mapping(args, read_mapping(dxf_doc))
    if found is not None:
        exag, datum, how = found
    else:
        exag, datum = drawing_check.fit_mapping(lines, solved.geometry)
        how = "fitted by least squares"
    result = drawing_check.check_linework(lines, solved.geometry, tol.distance, exag, datum, how)
    return result, solved.stationing, layer


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
    if args.ground or args.surface:
        base = dl.open_alignment(doc, args.alignment, args.profile)
        with_tin, _ = dl.attach_ground(base, args.ground, args.surface)
        findings += check.check_ground_against_surface(
            base.alignment, with_tin.ground_at, tol, with_tin.alignment.grounds[0].name
        )
    drawing, stationing, layer = (None, None, args.layer or "")
    if args.dxf:
        drawing, stationing, layer = _drawing(args, doc, tol)
    text, over = dl.check_report(
        doc, findings, tol, opts, drawing, args.dxf or "", layer, stationing
    )
    emit(text, args.output, [args.file] + ([args.dxf] if args.dxf else []))
    return 1 if over else 0
