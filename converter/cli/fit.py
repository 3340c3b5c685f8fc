"""``gradeline fit``: recover PVIs and vertical curves from drafted DXF linework."""

from __future__ import annotations

import argparse
import os
import sys
from typing import Any

from gradeline.cli._common import (
    EXAGGERATION,
    STATION,
    STEP,
    SUMMARIES,
    drawing_mapping,
    inputs_of,
    warn,
    write_file,
)
from gradeline.errors import GradelineError, UsageError

NAME = "fit"

#: Linear units a drawing may state, by the short unit of --units.
_FEET = ("foot", "USSurveyFoot", "internationalFoot")


def add_parser(sub: Any) -> None:
    """Register the command."""
    p = sub.add_parser(
        NAME,
        help=SUMMARIES[NAME],
        description=(
            "Reads the LINE, LWPOLYLINE, POLYLINE, SPLINE and ARC entities on --layer, chains "
            "them in station order (x = station), maps y to elevation (given --exaggeration and "
            "--datum, or read from a gradeline drawing), finds the tangents and fits each bend "
            "as a symmetric or unsymmetrical parabola or a circular curve, and writes LandXML 1.2."
        ),
    )
    p.add_argument("drawing", metavar="DRAWING.dxf", help="DXF with the profile linework")
    p.add_argument("--layer", required=True, metavar="NAME", help="layer of the finished grade")
    p.add_argument("--exaggeration", type=EXAGGERATION, metavar="E", help="vertical exaggeration")
    p.add_argument("--datum", type=STATION, metavar="D", help="elevation at y = 0")
    p.add_argument(
        "--start-station",
        type=STATION,
        metavar="S",
        help="station of the first point (default: x itself is the station)",
    )
    p.add_argument(
        "--units", choices=("ft", "m"), help="units of the drawing (default: from it, else ft)"
    )
    p.add_argument(
        "--window",
        type=STEP,
        metavar="W",
        help="length over which bends are detected (default 80 ft / 24 m)",
    )
    p.add_argument(
        "--name", metavar="NAME", help="alignment name in the LandXML (default: file name)"
    )
    p.add_argument(
        "--profile-name", default="Fitted profile", metavar="NAME", help="ProfAlign name"
    )
    p.add_argument("-o", "--output", required=True, metavar="PATH", help="LandXML file to write")
    p.add_argument("--json", action="store_true", help="report as JSON")
    p.set_defaults(func=run)


def _report(args: argparse.Namespace, result: Any, units: Any, exag: float, datum: float) -> str:
    from gradeline.geometry.stations import Stationing
    from gradeline.render.outputs import json_text

    prof = result.profile
    stationing = Stationing(units)
    rows = []
    for c in result.curves:
        rows.append(
            {
                "pvi_station": c.pvi_station,
                "pvi_label": stationing.label(c.pvi_station),
                "pvi_elevation": c.pvi_elevation,
                "kind": c.kind,
                "length_in": c.length_in,
                "length_out": c.length_out,
                "length": c.length_in + c.length_out,
                "radius": c.radius,
                "rms": c.rms,
                "max_residual": c.max_residual,
            }
        )
    if args.json:
        return json_text(
            {
                "drawing": args.drawing,
                "layer": args.layer,
                "output": args.output,
                "exaggeration": exag,
                "datum": datum,
                "points": result.points,
                "rms": result.rms,
                "max_residual": result.max_residual,
                "worst_station": result.worst_station,
                "curves": rows,
                "pvis": [
                    {"station": p.station, "elevation": p.elevation, "kind": p.kind}
                    for p in prof.pvis
                ],
            }
        )
    out = [
        f"fitted {len(prof.pvis)} PVIs and {len(result.curves)} vertical curves to "
        f"{result.points} points on layer {args.layer!r}; worst residual "
        f"{result.max_residual:.4f} {units.symbol} at "
        f"{stationing.label(result.worst_station)}, rms {result.rms:.4f}",
        f"wrote {args.output}",
        "",
    ]
    for p in prof.pvis:
        c = next((r for r in rows if abs(r["pvi_station"] - p.station) < 1e-9), None)
        desc = (
            ""
            if c is None
            else (
                f"  {c['kind']}  L {c['length']:.3f}"
                + (
                    f" ({c['length_in']:.3f} + {c['length_out']:.3f})"
                    if c["kind"] == "unsymmetric"
                    else ""
                )
                + (f"  R {c['radius']:.1f}" if c["radius"] else "")
                + f"  residual max {c['max_residual']:.4f}"
            )
        )
        out.append(f"PVI {stationing.label(p.station)}  EL {p.elevation:.4f}{desc}")
    return "\n".join(out) + "\n"


def run(args: argparse.Namespace) -> int:
    """Fit the drawing, write LandXML and print the report."""
    from gradeline.analysis import fit
    from gradeline.io.dxf_read import layer_names, read_drawing, read_linework, read_mapping
    from gradeline.io.landxml_write import write_landxml
    from gradeline.model import Alignment, Document, Units

    dxf_doc = read_drawing(args.drawing)
    names = layer_names(dxf_doc)
    skipped: dict[str, int] = {}
    lines = read_linework(dxf_doc, args.layer, 0.0005, skipped)
    if not lines:
        left_out = ", ".join(f"{n} {why}" for why, n in sorted(skipped.items()))
        raise UsageError(
            f"{args.drawing}: no LINE, LWPOLYLINE, POLYLINE, SPLINE or ARC gradeline can "
            f"read on layer {args.layer!r}"
            + (f" ({left_out} left out)" if left_out else "")
            + "; layers with linework: "
            + (", ".join(names) or "none")
        )
    if skipped:
        warn(
            [
                GradelineError(f"{args.drawing}: {n} {why} on layer {args.layer!r} left out")
                for why, n in sorted(skipped.items())
            ]
        )
    mapping = read_mapping(dxf_doc)
    found = drawing_mapping(args, mapping)
    if found is None:
        raise UsageError(
            f"{args.drawing}: the drawing does not say how it maps to elevations; "
            "give --exaggeration and --datum"
        )
    exag, datum, _ = found
    if exag <= 0:
        raise UsageError("--exaggeration must be positive")
    unit = args.units or ("m" if mapping.get("linear_unit") == "meter" else "ft")
    stored = mapping.get("linear_unit")
    linear = "meter" if unit == "m" else (stored if stored in _FEET else "foot")
    try:
        pts = fit.chain(lines, gap=0.01 * max(1.0, exag))
    except fit.FitError as err:
        raise UsageError(
            f"{args.drawing}: layer {args.layer!r}: {err.message}", choice=err.choice
        ) from None
    if args.start_station is not None:
        pts[:, 0] = pts[:, 0] - pts[0, 0] + args.start_station
    pts[:, 1] = pts[:, 1] / exag + datum
    units = Units(linear)
    window = args.window or units.defaults.fit_window
    try:
        result = fit.fit_profile(pts, window=window, name=args.profile_name)
    except fit.FitError as err:
        raise UsageError(
            f"{args.drawing}: layer {args.layer!r}: {err.message}", choice=err.choice
        ) from None
    name = args.name or os.path.splitext(os.path.basename(args.drawing))[0]
    prof = result.profile
    al = Alignment(name, sta_start=prof.start, length=prof.end - prof.start, profiles=(prof,))
    out_doc = Document(args.output, units, (al,))
    write_file(args.output, write_landxml(out_doc), inputs_of(args))
    sys.stdout.write(_report(args, result, out_doc.units, exag, datum))
    return 0
