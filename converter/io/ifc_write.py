"""IFC 4.3 writer: solved alignments as ``IfcAlignment`` (business logic and geometry).

Each alignment gets an ``IfcAlignmentHorizontal`` of ``IfcAlignmentHorizontalSegment``
(LINE, CIRCULARARC, CLOTHOID, BLOSSCURVE, COSINECURVE, SINECURVE: start point, start
direction, start and end radius, positive turning counter-clockwise, 0 for a straight
end) and, with a profile, an
``IfcAlignmentVertical`` of ``IfcAlignmentVerticalSegment`` (CONSTANTGRADIENT,
PARABOLICARC, CIRCULARARC: distance along from the start, horizontal length, start
height, start and end gradient). ifcopenshell's alignment API adds the geometric
representation (``IfcCompositeCurve``, ``IfcGradientCurve``), the closing zero-length
segments and the stationing referents. Lengths stay in the file's unit (an
``IfcConversionBasedUnit`` for feet), angles are radians.

The output is deterministic: GlobalIds are derived from the alignment's name and the
entity's place, and the header's time stamp is fixed.
"""

from __future__ import annotations

import hashlib
import math
from collections.abc import Sequence
from typing import Any

from gradeline.errors import UsageError
from gradeline.geometry.spirals import REVERSED

__all__ = ["IFC_SCHEMA", "SPIRALS", "segment_types", "write_ifc"]

IFC_SCHEMA = "IFC4X3_ADD2"

#: Spiral kinds with an IFC 4.3 segment type this writer emits, and that type. Each
#: law agrees with buildingSMART's published reference coordinates for the type to
#: 1e-13 m (tests/test_spiral_laws.py); ifcopenshell's evaluation of the written
#: geometry agrees to 1e-6 ft on a 250-ft transition, and to 1.4e-4 ft for the
#: Helmert curve, whose representation ifcopenshell builds from two polynomial
#: spirals (tests/test_ifc.py). The ``rev*`` types are the same laws (their
#: curvature runs from the arc), so they are written as their base type.
SPIRALS = {
    "clothoid": "CLOTHOID",
    "bloss": "BLOSSCURVE",
    "cosine": "COSINECURVE",
    "sinusoid": "SINECURVE",
    "biquadratic": "HELMERTCURVE",
}

#: The file's linear unit: the IFC name and metres per unit (None: the SI metre).
_UNITS: dict[str, tuple[str, float | None]] = {
    "meter": ("metre", None),
    "foot": ("foot", 0.3048),
    "internationalFoot": ("foot", 0.3048),
    "USSurveyFoot": ("US survey foot", 1200.0 / 3937.0),
}


def _radius(k: float) -> float:
    """Signed radius from a signed curvature (IFC: 0 stands for a straight end)."""
    return 0.0 if k == 0 else 1.0 / k


def _length_unit(f: Any, linear: str) -> Any:
    name, factor = _UNITS[linear]
    if factor is None:
        return f.createIfcSIUnit(None, "LENGTHUNIT", None, "METRE")
    dims = f.createIfcDimensionalExponents(1, 0, 0, 0, 0, 0, 0)
    metre = f.createIfcSIUnit(None, "LENGTHUNIT", None, "METRE")
    measure = f.createIfcMeasureWithUnit(f.createIfcLengthMeasure(factor), metre)
    return f.createIfcConversionBasedUnit(dims, "LENGTHUNIT", name, measure)


def segment_types(solved: Any) -> list[str]:
    """The IFC horizontal segment type of each plan element.

    Raises
    ------
    UsageError
        No plan geometry, or an element the writer does not write (named).
    """
    if solved.horizontal is None:
        raise UsageError(
            f"alignment {solved.alignment.name!r} has no plan geometry: IFC 4.3 alignments "
            "need a horizontal layout"
        )
    out = []
    for g in solved.horizontal.elements:
        kind = {"line": "LINE", "arc": "CIRCULARARC", **SPIRALS}.get(REVERSED.get(g.kind, g.kind))
        if kind is None:
            raise UsageError(
                f"alignment {solved.alignment.name!r}: element {g.index + 1} is a {g.kind} "
                "spiral, which has no IFC 4.3 segment type of the same law (lines, arcs, and "
                "clothoid, Bloss, cosine, sine and biquadratic spirals are written)"
            )
        out.append(kind)
    return out


def _horizontal(f: Any, layout: Any, solved: Any) -> None:
    from ifcopenshell.api import alignment as api

    for g, kind in zip(solved.horizontal.elements, segment_types(solved), strict=True):
        seg = f.createIfcAlignmentHorizontalSegment(
            None,
            None,
            f.createIfcCartesianPoint((float(g.x0), float(g.y0))),
            float(g.heading0),
            _radius(float(g.k0)),
            _radius(float(g.k1)),
            float(g.length),
            None,
            kind,
        )
        api.create_layout_segment(f, layout, seg)


def _on_circle(s: float, cx: float, cy: float, r: float, sign: float) -> tuple[float, float]:
    """Elevation and gradient at ``s`` on a circular piece (sign +1 on sags)."""
    root = math.sqrt(max(r * r - (s - cx) ** 2, 0.0))
    return cy - sign * root, sign * (s - cx) / root


def _vertical_pieces(solved: Any) -> list[tuple[str, float, float, float, float, float, float]]:
    """(type, start, horizontal length, start height, start and end gradient, radius)."""
    g = solved.geometry
    starts = [float(v) for v in g.starts]
    ends = starts[1:] + [float(g.end)]
    out = []
    for i, (s0, s1) in enumerate(zip(starts, ends, strict=True)):
        length = s1 - s0
        if length <= 0:
            continue
        if g.circular[i]:
            cx, cy, r, sign = float(g.cx[i]), float(g.cy[i]), float(g.r[i]), float(g.sign[i])
            z0, g0 = _on_circle(s0, cx, cy, r, sign)
            _, g1 = _on_circle(s1, cx, cy, r, sign)
            out.append(("CIRCULARARC", s0, length, z0, g0, g1, sign * r))
        else:
            y0, g0, c = float(g.y0[i]), float(g.g0[i]), float(g.c[i])
            if c == 0:
                out.append(("CONSTANTGRADIENT", s0, length, y0, g0, g0, 0.0))
            else:  # z'' = 2c: the parabola constant 1 / (2c), positive on sags
                out.append(("PARABOLICARC", s0, length, y0, g0, g0 + 2 * c * length, 0.5 / c))
    return out


def _vertical(f: Any, layout: Any, solved: Any, start: float) -> None:
    from ifcopenshell.api import alignment as api

    for kind, s0, length, z0, g0, g1, radius in _vertical_pieces(solved):
        seg = f.createIfcAlignmentVerticalSegment(
            None,
            None,
            s0 - start,
            length,
            z0,
            g0,
            g1,
            radius if kind != "CONSTANTGRADIENT" else None,
            kind,
        )
        api.create_layout_segment(f, layout, seg)


def write_ifc(solved_alignments: Sequence[Any], project: str = "") -> bytes:
    """IFC 4.3 (``IFC4X3_ADD2``) of solved alignments, as a STEP file's bytes.

    Raises
    ------
    UsageError
        An alignment without plan geometry, or with an element the writer does
        not write (a spiral other than a clothoid).
    """
    import ifcopenshell
    import ifcopenshell.api
    from ifcopenshell.api import alignment as api

    if not solved_alignments:
        raise UsageError("nothing to write: no alignment")
    units = solved_alignments[0].document.units
    f = ifcopenshell.api.run("project.create_file", version=IFC_SCHEMA)
    ifcopenshell.api.run(
        "root.create_entity", f, ifc_class="IfcProject", name=project or "gradeline"
    )
    angle = f.createIfcSIUnit(None, "PLANEANGLEUNIT", None, "RADIAN")
    ifcopenshell.api.run("unit.assign_unit", f, units=[_length_unit(f, units.linear), angle])
    model = ifcopenshell.api.run("context.add_context", f, context_type="Model")
    ifcopenshell.api.run(
        "context.add_context",
        f,
        context_type="Model",
        context_identifier="Axis",
        target_view="MODEL_VIEW",
        parent=model,
    )
    for solved in solved_alignments:
        al_model = solved.alignment
        segment_types(solved)  # refuses before anything is made
        al = api.create(f, al_model.name, include_vertical=solved.geometry is not None)
        start = float(solved.horizontal.start)
        _horizontal(f, api.get_horizontal_layout(al), solved)
        if solved.geometry is not None:
            vertical_layout = api.get_vertical_layout(al)
            if solved.profile is not None:
                vertical_layout.Name = solved.profile.name
            _vertical(f, vertical_layout, solved, start)
        if al_model.description:
            al.Description = al_model.description
        label0 = float(solved.stationing.label_value(start))
        api.add_stationing_referent(f, "start", al, 0.0, label0)
        for eq in al_model.equations:
            api.add_stationing_referent(
                f,
                "equation",
                al,
                float(eq.internal) - start,
                float(eq.ahead),
                incoming_station=float(eq.back),
            )
    _deterministic(f, project)
    return f.to_string().encode("utf-8")


def _deterministic(f: Any, project: str) -> None:
    """GlobalIds from a hash of the project name and each entity's place; fixed header."""
    import ifcopenshell.guid

    for n, entity in enumerate(f.by_type("IfcRoot")):
        digest = hashlib.sha256(f"{project}/{n}/{entity.is_a()}".encode()).hexdigest()[:32]
        entity.GlobalId = ifcopenshell.guid.compress(digest)
    header = f.header
    header.file_name.name = ""
    header.file_name.time_stamp = "2000-01-01T00:00:00"
    header.file_name.author = ("",)
    header.file_name.organization = ("",)
    header.file_name.preprocessor_version = "gradeline"
    header.file_name.originating_system = "gradeline"
    header.file_name.authorization = ""
