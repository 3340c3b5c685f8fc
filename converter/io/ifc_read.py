"""IFC 4.3 reader: ``IfcAlignment`` business logic into the same model LandXML gives.

Horizontal segments become lines, arcs and spirals (clothoid, Bloss, cosine, sine,
Helmert) whose end is the next segment's start (IFC closes a layout with a
zero-length segment; a layout without it has its end computed, with a notice); vertical
segments become PVIs: a grade break between two gradients, a ``ParaCurve`` in
the middle of a parabolic arc (IFC's parabolic arcs are symmetric), a
``CircCurve`` at the tangents' intersection of a circular arc. Units come from
the project's unit assignment (metres, millimetres, feet; radians or degrees).
Stations: the first ``IfcReferent`` with ``Pset_Stationing.Station`` gives the
start, the others with ``IncomingStation`` are station equations.

Anything else -- another segment type, a layout that does not chain -- makes
that alignment broken with its reason (the others are read), as in LandXML.
"""

from __future__ import annotations

import math
import os
from typing import Any

from gradeline.errors import GradelineError, InputError
from gradeline.geometry import horizontal as plan_geometry
from gradeline.geometry.curve_data import tangent_intersection
from gradeline.model import (
    Alignment,
    Document,
    HCurve,
    HLine,
    HorizontalAlignment,
    HSpiral,
    Profile,
    PVISpec,
    SourceRef,
    StationEquation,
)
from gradeline.model.base import Broken, Notice
from gradeline.model.units import Units

__all__ = ["looks_like_ifc", "read_ifc"]


def _spiral_kinds() -> dict[str, str]:
    from gradeline.io.ifc_write import SPIRALS

    return {ifc: ours for ours, ifc in SPIRALS.items()}


#: IFC spiral segment types read, and the LandXML spiType each becomes.
_SPIRAL_KINDS = _spiral_kinds()


def looks_like_ifc(path: str) -> bool:
    """True for a STEP file (``ISO-10303-21;``) or a name ending ``.ifc``."""
    if path.lower().endswith(".ifc"):
        return True
    try:
        with open(path, "rb") as fh:
            return fh.read(64).lstrip().startswith(b"ISO-10303-21")
    except OSError:
        return False


def _units(model: Any) -> tuple[Units, float, float]:
    """(Units, file units per project length unit, radians per project angle unit)."""
    length, length_k, angle_k = "meter", 1.0, 1.0
    for assignment in model.by_type("IfcUnitAssignment")[:1]:
        for u in assignment.Units:
            kind = getattr(u, "UnitType", None)
            if kind == "LENGTHUNIT":
                if u.is_a("IfcSIUnit"):
                    length_k = {None: 1.0, "MILLI": 1e-3, "CENTI": 1e-2, "KILO": 1e3}.get(
                        u.Prefix, 1.0
                    )
                elif u.is_a("IfcConversionBasedUnit"):
                    factor = float(u.ConversionFactor.ValueComponent.wrappedValue)
                    if abs(factor - 1200.0 / 3937.0) < 1e-12:
                        length = "USSurveyFoot"
                    elif abs(factor - 0.3048) < 1e-12:
                        length = "foot"
                    else:  # inches, yards...: converted to metres
                        length_k = factor
            elif kind == "PLANEANGLEUNIT" and u.is_a("IfcConversionBasedUnit"):
                angle_k = float(u.ConversionFactor.ValueComponent.wrappedValue)
    return Units(length), length_k, angle_k


def read_ifc(path: str | os.PathLike[str]) -> Document:
    """Read the alignments of an IFC 4.3 file.

    Raises
    ------
    InputError
        The file cannot be opened as IFC, or holds no IfcAlignment.
    """
    name = os.fspath(path)
    src = SourceRef(name, None)
    try:
        import ifcopenshell
    except ImportError:
        raise InputError(
            "reading IFC needs ifcopenshell: pip install 'gradeline[ifc]'", src, "IFC"
        ) from None
    try:
        model = ifcopenshell.open(name)
    except Exception as err:  # noqa: BLE001 - ifcopenshell raises several kinds
        raise InputError(
            f"not a readable IFC file ({type(err).__name__}: {err})", src, "IFC"
        ) from None
    try:
        alignments = model.by_type("IfcAlignment")
    except RuntimeError:
        raise InputError(
            f"schema {model.schema} has no IfcAlignment (IFC 4.3 has)", src, "IFC"
        ) from None
    units, lk, ak = _units(model)
    read, broken, notices = [], [], []
    for al in alignments:
        if _parent_alignment(al) is not None:
            continue  # a child alignment of another: read with its parent
        for cant in _nested(al, "IfcAlignmentCant"):
            n = sum(1 for s in _ordered(cant) if float(s.DesignParameters.HorizontalLength) > 0)
            notices.append(
                Notice(
                    "ignored",
                    f"alignment {al.Name!r}: its IfcAlignmentCant (#{cant.id()}, {n} segments, "
                    "rail cant or superelevation) is read past: gradeline does not use cant yet",
                    src,
                    "IfcAlignmentCant",
                )
            )
        try:
            read.append(_alignment(model, al, lk, ak, name, notices))
        except GradelineError as err:
            broken.append(Broken(al.Name or f"#{al.id()}", err))
    if not read and not broken:
        raise InputError("no IfcAlignment in the file", src, "IFC")
    project = next((p.Name or "" for p in model.by_type("IfcProject")), "")
    return Document(name, units, tuple(read), project, src, tuple(broken), tuple(notices))


def _parent_alignment(al: Any) -> Any:
    for rel in getattr(al, "Nests", ()) or ():
        if rel.RelatingObject.is_a("IfcAlignment"):
            return rel.RelatingObject
    return None


def _nested(obj: Any, kind: str) -> list[Any]:
    out = []
    for rel in getattr(obj, "IsNestedBy", ()) or ():
        out += [o for o in rel.RelatedObjects if o.is_a(kind)]
    return out


def _fail(message: str, entity: Any, path: str) -> InputError:
    return InputError(f"{message} (#{entity.id()} {entity.is_a()})", SourceRef(path, None), "IFC")


def _alignment(
    model: Any, al: Any, lk: float, ak: float, path: str, notices: list[Notice]
) -> Alignment:
    horizontal = next(iter(_nested(al, "IfcAlignmentHorizontal")), None)
    # the vertical layouts: nested directly, or in child alignments (reusing the plan)
    verticals = _nested(al, "IfcAlignmentVertical")
    for child in _nested(al, "IfcAlignment"):
        verticals += _nested(child, "IfcAlignmentVertical")
    if horizontal is None:
        raise _fail("an alignment without an IfcAlignmentHorizontal", al, path)
    sta_start, equations = _stationing(al, lk)
    elements = _horizontal(horizontal, lk, ak, path, notices)
    profiles = tuple(
        Profile(v.Name or f"vertical {i + 1}", _pvis(v, lk, sta_start, path))
        for i, v in enumerate(verticals)
    )
    return Alignment(
        al.Name or f"#{al.id()}",
        sta_start=sta_start,
        description=al.Description or "",
        profiles=profiles,
        equations=equations,
        horizontal=HorizontalAlignment(elements),
        source=SourceRef(path, None),
    )


def _psets(entity: Any) -> dict[str, Any]:
    out: dict[str, Any] = {}
    for rel in getattr(entity, "IsDefinedBy", ()) or ():
        if rel.is_a("IfcRelDefinesByProperties"):
            pset = rel.RelatingPropertyDefinition
            for prop in getattr(pset, "HasProperties", ()) or ():
                if prop.is_a("IfcPropertySingleValue") and prop.NominalValue is not None:
                    out[prop.Name] = prop.NominalValue.wrappedValue
    return out


def _distance_along(referent: Any) -> float | None:
    place = referent.ObjectPlacement
    rel = getattr(place, "RelativePlacement", None)
    loc = getattr(rel, "Location", None)
    value = getattr(loc, "DistanceAlong", None)
    if value is None:
        return None
    return float(getattr(value, "wrappedValue", value))


def _stationing(al: Any, lk: float) -> tuple[float, tuple[StationEquation, ...]]:
    """Start station and equations from the alignment's referents (start 0 without)."""
    marks = []
    for ref in _nested(al, "IfcReferent"):
        props = _psets(ref)
        if "Station" not in props:
            continue
        d = _distance_along(ref)
        marks.append((d if d is not None else 0.0, props))
    marks.sort(key=lambda m: m[0])
    if not marks:
        return 0.0, ()
    start = float(marks[0][1]["Station"]) * lk
    eqs = tuple(
        StationEquation(float(p["IncomingStation"]) * lk, float(p["Station"]) * lk, start + d * lk)
        for d, p in marks[1:]
        if "IncomingStation" in p
    )
    return start, eqs


def _point(p: Any, lk: float) -> tuple[float, float]:
    x, y = (float(v) for v in p.Coordinates[:2])
    return (y * lk, x * lk)  # the model's (northing, easting)


#: Horizontal segment types not read, and why (the alignment is refused with this).
_NOT_READ = {
    "CUBIC": (
        "a CUBIC transition, which gradeline does not read: the schema describes a cubic "
        "parabola, while buildingSMART's reference tables for the type give a clothoid's "
        "coordinates, so the file could mean either"
    ),
    "VIENNESEBEND": (
        "a VIENNESEBEND transition, which gradeline does not read: its plan shape depends "
        "on the cant and the height of the centre of gravity, and gradeline does not apply cant"
    ),
}


def _horizontal(layout: Any, lk: float, ak: float, path: str, notices: list[Notice]) -> tuple:
    segs = [s.DesignParameters for s in _ordered(layout)]
    out: list[HLine | HCurve | HSpiral] = []
    for i, seg in enumerate(segs):
        length = float(seg.SegmentLength) * lk
        if length == 0:
            continue  # the closing zero-length segment (or a joint marker)
        nxt = next((s for s in segs[i + 1 :]), None)
        start = _point(seg.StartPoint, lk)
        h0 = float(seg.StartDirection) * ak
        if nxt is None:
            # files written before IFC 4.3 ADD2 may stop without the zero-length
            # segment that states the end: the end follows from the segment itself
            end, h1 = None, None
            notices.append(
                Notice(
                    "defaulted",
                    f"the horizontal layout #{layout.id()} ends without the zero-length "
                    "segment that states its end point; the end is computed from the last "
                    "segment's start, direction, length and radii",
                    SourceRef(path, None),
                    "IfcAlignmentHorizontal",
                )
            )
        else:
            end, h1 = _point(nxt.StartPoint, lk), float(nxt.StartDirection) * ak
        out.append(_element(seg, length, start, h0, end, h1, lk, path))
    if not out:
        raise _fail("a horizontal layout without segments", layout, path)
    return tuple(out)


def _element(
    seg: Any,
    length: float,
    start: tuple[float, float],
    h0: float,
    end: tuple[float, float] | None,
    h1: float | None,
    lk: float,
    path: str,
) -> HLine | HCurve | HSpiral:
    """One horizontal segment; ``end``/``h1`` None: computed from the segment."""
    r0 = float(seg.StartRadiusOfCurvature) * lk
    r1 = float(seg.EndRadiusOfCurvature) * lk
    kind = seg.PredefinedType
    src = SourceRef(path, None)
    if kind == "LINE":
        if end is None:
            end = (start[0] + length * math.sin(h0), start[1] + length * math.cos(h0))
        return HLine(start, end, (("length", length),), src)
    if kind == "CIRCULARARC":
        if r0 == 0:
            raise _fail("a CIRCULARARC of zero radius", seg, path)
        # the centre lies to the left of the start direction on a positive radius
        cx = start[1] - r0 * math.sin(h0)
        cy = start[0] + r0 * math.cos(h0)
        if end is None:  # the start turned about the centre through length / radius
            a = math.atan2(start[0] - cy, start[1] - cx) + length / r0
            end = (cy + abs(r0) * math.sin(a), cx + abs(r0) * math.cos(a))
        rot = "ccw" if r0 > 0 else "cw"
        stated = (("length", length), ("radius", abs(r0)))
        return HCurve(start, (cy, cx), end, rot, None, stated, src)
    if kind in _SPIRAL_KINDS:
        rot = "ccw" if (r1 if r1 != 0 else r0) > 0 else "cw"

        def spiral(end: tuple[float, float], pi: tuple[float, float]) -> HSpiral:
            return HSpiral(
                start,
                end,
                length,
                math.inf if r0 == 0 else abs(r0),
                math.inf if r1 == 0 else abs(r1),
                rot,
                _SPIRAL_KINDS[kind],
                pi,
                (("length", length),),
                src,
            )

        if end is None or h1 is None:
            # a PI on the start tangent gives the start direction; the law gives the rest
            ahead = (start[0] + length / 2 * math.sin(h0), start[1] + length / 2 * math.cos(h0))
            g = plan_geometry.solve(HorizontalAlignment((spiral(start, ahead),))).elements[0]
            end, h1 = (float(g.y1), float(g.x1)), float(g.heading1)
        # the PI where the start and end tangents meet: IFC states both directions
        meet = tangent_intersection((start[1], start[0]), h0, (end[1], end[0]), h1)
        if meet is None:  # parallel tangents: a point on the start tangent
            meet = (start[1] + length / 2 * math.cos(h0), start[0] + length / 2 * math.sin(h0))
        return spiral(end, (meet[1], meet[0]))
    why = _NOT_READ.get(kind, f"horizontal segment type {kind}, which gradeline does not read")
    raise _fail(why, seg, path)


def _ordered(layout: Any) -> list[Any]:
    """The IfcAlignmentSegments of a layout in their nesting order."""
    segs = []
    for rel in getattr(layout, "IsNestedBy", ()) or ():
        segs += [o for o in rel.RelatedObjects if o.is_a("IfcAlignmentSegment")]
    return segs


def _pvis(layout: Any, lk: float, sta_start: float, path: str) -> tuple[PVISpec, ...]:
    rows = []
    for seg in (s.DesignParameters for s in _ordered(layout)):
        length = float(seg.HorizontalLength) * lk
        if length == 0:
            continue
        rows.append(
            (
                seg,
                seg.PredefinedType,
                sta_start + float(seg.StartDistAlong) * lk,
                length,
                float(seg.StartHeight) * lk,
                float(seg.StartGradient),
                float(seg.EndGradient),
            )
        )
    if not rows:
        raise _fail("a vertical layout without segments", layout, path)
    pvis: list[PVISpec] = [PVISpec(rows[0][2], rows[0][4])]
    end = (0.0, 0.0)
    i = 0
    while i < len(rows):
        seg, kind, s0, length, z0, g0, g1 = rows[i]
        if i > 0 and kind == "CONSTANTGRADIENT" and rows[i - 1][1] == "CONSTANTGRADIENT":
            pvis.append(PVISpec(s0, z0))  # a grade break without a curve
        if kind == "CONSTANTGRADIENT":
            end = (s0 + length, z0 + g0 * length)
        elif kind == "PARABOLICARC":
            z1 = z0 + (g0 + g1) / 2 * length
            nxt = rows[i + 1] if i + 1 < len(rows) else None
            if nxt is not None and nxt[1] == "PARABOLICARC" and _unsymmetric(rows[i], nxt):
                # two parabolas meeting under the PVI: one unsymmetrical curve
                _, _, s1, l2, _, _, g2 = nxt
                pvis.append(PVISpec(s1, z0 + g0 * length, "unsymmetric", length, l2))
                end = (s1 + l2, z1 + (g1 + g2) / 2 * l2)
                i += 2
                continue
            half = length / 2
            pvis.append(PVISpec(s0 + half, z0 + g0 * half, "parabolic", half, half))
            end = (s0 + length, z1)
        elif kind == "CIRCULARARC":
            a0, a1 = math.atan(g0), math.atan(g1)
            if a1 == a0:
                raise _fail("a circular vertical arc without a change of gradient", seg, path)
            radius = length / (math.sin(a1) - math.sin(a0))  # positive on sags
            z1 = z0 + radius * (math.cos(a0) - math.cos(a1))
            t = (z1 - z0 - g1 * length) / (g0 - g1)
            arc = abs(radius * (a1 - a0))
            pvis.append(PVISpec(s0 + t, z0 + g0 * t, "circular", radius=radius, arc_length=arc))
            end = (s0 + length, z1)
        elif kind == "CLOTHOID":
            raise _fail(
                "a vertical CLOTHOID segment, which gradeline does not read (a road profile "
                "uses parabolic or circular curves)",
                seg,
                path,
            )
        else:
            raise _fail(f"vertical segment type {kind}, which gradeline does not read", seg, path)
        i += 1
    pvis.append(PVISpec(*end))
    return tuple(pvis)


def _unsymmetric(a: tuple, b: tuple) -> bool:
    """Whether two adjacent parabolic arcs are the halves of one unsymmetrical curve:
    they join (height and gradient) and their outer tangents meet above the joint."""
    _, _, s0, l1, z0, g0, gm = a
    _, _, s1, l2, zj, gm2, g2 = b
    z_end = zj + (gm2 + g2) / 2 * l2
    size = max(1.0, abs(z0), abs(z_end))
    return (
        abs(s0 + l1 - s1) <= 1e-9 * max(1.0, abs(s1))
        and abs(gm - gm2) <= 1e-12
        and abs(z0 + (g0 + gm) / 2 * l1 - zj) <= 1e-9 * size
        and abs((z0 + g0 * l1) - (z_end - g2 * l2)) <= 1e-9 * size
        and g0 != g2
    )


def representation_points(path: str | os.PathLike[str]) -> dict[str, tuple[Any, Any]]:
    """The geometric representation of each alignment, evaluated by ifcopenshell's
    geometry kernel: {name: (plan points (n, 2) x y or None, 3D points (n, 3) or None)},
    in the model's units (the business logic is what the model holds; this is the
    second description the file carries, for the check to compare)."""
    import ifcopenshell
    import ifcopenshell.geom
    import numpy as np

    model = ifcopenshell.open(os.fspath(path))
    _, lk, _ = _units(model)
    settings = ifcopenshell.geom.settings()
    settings.set("convert-back-units", True)  # in the file's own length unit
    out: dict[str, tuple[Any, Any]] = {}
    for al in model.by_type("IfcAlignment"):
        plan = curve3d = None
        rep = getattr(al, "Representation", None)
        for r in getattr(rep, "Representations", ()) or ():
            for item in r.Items:
                kind = (
                    "3d"
                    if item.is_a("IfcGradientCurve")
                    else ("plan" if item.is_a("IfcCompositeCurve") else None)
                )
                if kind is None:
                    continue
                try:
                    shape = ifcopenshell.geom.create_shape(settings, item)
                except Exception:  # noqa: BLE001 - a curve the kernel cannot evaluate
                    continue
                v = np.array(shape.verts, dtype=float).reshape(-1, 3) * lk
                if kind == "3d":
                    curve3d = v
                else:
                    plan = v[:, :2]
        out[al.Name or f"#{al.id()}"] = (plan, curve3d)
    return out
