"""DXF writer: the only module that imports ezdxf.

It serialises a :class:`~gradeline.present.drafting.Drawing` -- it never computes
geometry. Drawing units are the file's units; layers, linetypes and one text
style are defined in the file; the profile mapping (exaggeration, datum) is
written as header custom properties (DXF R2004 and later), as ezdxf metadata
and as a note on the info layer, so any program can map back.
"""

from __future__ import annotations

import contextlib
import io
import logging
from collections.abc import Iterator

import ezdxf
import numpy as np
from ezdxf.document import Drawing as DxfDocument

from gradeline.present.items import ArcItem, Circle, Drawing, Path, QuadCurve, Text
from gradeline.present.labels import plain_text
from gradeline.present.layout import DraftingLayout
from gradeline.present.roles import ROLE_STYLE, Role

__all__ = ["DXF_VERSIONS", "META_PREFIX", "add_vertices", "write_dxf"]

DXF_VERSIONS = {"R12": "R12", "R2000": "R2000", "R2010": "R2010"}

#: $INSUNITS codes (DXF reference): 2 feet, 6 metres, 21 US survey feet.
_INSUNITS = {"foot": 2, "internationalFoot": 2, "USSurveyFoot": 21, "meter": 6}

TEXT_STYLE = "GRADELINE"
META_PREFIX = "GRADELINE_"

_HALIGN = {"left": 0, "center": 1, "right": 2}
_VALIGN = {"bottom": 1, "middle": 2, "top": 3}


@contextlib.contextmanager
def _fixed_metadata() -> Iterator[None]:
    """Pin header dates and GUIDs so the same drawing gives the same bytes."""
    old = ezdxf.options.write_fixed_meta_data_for_testing
    ezdxf.options.write_fixed_meta_data_for_testing = True
    try:
        yield
    finally:
        ezdxf.options.write_fixed_meta_data_for_testing = old


def _setup(doc: DxfDocument, layout: DraftingLayout, roles: set[str], r12: bool) -> None:
    if "GL_DASHED" not in doc.linetypes:
        scale = layout.text_height
        doc.linetypes.add(
            "GL_DASHED",
            pattern=[1.5 * scale, 1.0 * scale, -0.5 * scale],
            description="gradeline dashed __ __ __",
        )
    if TEXT_STYLE not in doc.styles:
        doc.styles.add(TEXT_STYLE, font="txt" if r12 else "arial.ttf")
    for role in sorted(roles):
        style = ROLE_STYLE[Role(role)]
        color, linetype, weight = style.aci, style.linetype, style.lineweight
        doc.layers.add(
            layout.layer(role), color=color, linetype=linetype, lineweight=-3 if r12 else weight
        )


#: Paper of the (empty) paper-space layout, in millimetres: ISO A3 landscape.
PAPER_MM = (420.0, 297.0)
#: Millimetres per drawing unit, for the $INSUNITS codes LibreCAD converts.
_MM_PER_UNIT = {2: 304.8, 6: 1000.0}


def _paper(doc: DxfDocument, linear_unit: str) -> None:
    """Give the (empty) paper-space layout the limits of one A3 page in drawing units.

    Found with LibreCAD 2.2 (``librecad dxf2pdf``): it prints a layout's limits
    (the LAYOUT object's limmin/limmax, in paper-space drawing units) and
    converts them to millimetres by $INSUNITS. ezdxf leaves them at 420 x 297,
    right for a drawing in millimetres; a drawing in metres therefore printed on a
    page of 420 x 297 metres, 1,000 times too large (in feet, 304.8 times).
    US survey feet (21), which LibreCAD does not convert, keep the millimetre
    figures. The plot settings' paper size stays in millimetres, as the DXF
    reference has it.
    """
    code = _INSUNITS.get(linear_unit, 0)
    per = _MM_PER_UNIT.get(code, 1.0)
    w, h = PAPER_MM[0] / per, PAPER_MM[1] / per
    layout = doc.layouts.get("Layout1").dxf_layout
    layout.dxf.limmin = (0.0, 0.0, 0.0)
    layout.dxf.limmax = (w, h, 0.0)
    doc.header["$PLIMMIN"] = (0.0, 0.0)
    doc.header["$PLIMMAX"] = (w, h)


def _polyline(msp, points, layer: str, r12: bool) -> None:
    if r12:
        msp.add_polyline2d(points, dxfattribs={"layer": layer})
        return
    lw = msp.add_lwpolyline([], dxfattribs={"layer": layer})
    add_vertices(lw, points)


def add_vertices(lw, points) -> None:
    """Load all vertices of an LWPOLYLINE at once.

    ezdxf's ``append_points`` appends one vertex at a time, copying the array
    each time (quadratic in the vertex count); a 50,000-vertex ground line took
    seconds. Its vertex array takes a whole (n, 5) block in one step.
    """
    arr = np.zeros((len(points), 5))
    arr[:, :2] = np.asarray(points, dtype=np.float64)[:, :2]
    vertices = getattr(lw, "lwpoints", None)
    if vertices is not None and hasattr(vertices, "extend"):
        vertices.extend(arr)
    else:  # pragma: no cover - other ezdxf versions
        lw.append_points(arr[:, :2].tolist(), format="xy")


def _stable_classes(doc: DxfDocument) -> None:
    """Fix the order of the CLASSES section.

    ezdxf appends the classes of the entity types in use by iterating a set, so
    their order follows the string hash seed; required classes come first in
    ezdxf's own fixed order, the rest are sorted here.
    """
    from ezdxf.sections.classes import REQ_R2004, REQUIRED_CLASSES

    doc.commit_pending_changes()
    doc.classes.add_required_classes(doc.dxfversion)
    required = list(REQUIRED_CLASSES.get(doc.dxfversion, REQ_R2004))
    items = list(doc.classes.classes.items())
    first = sorted(
        (kv for kv in items if kv[0][0] in required), key=lambda kv: required.index(kv[0][0])
    )
    rest = sorted(kv for kv in items if kv[0][0] not in required)
    doc.classes.classes.clear()
    doc.classes.classes.update(first + rest)


def write_dxf(
    drawing: Drawing,
    layout: DraftingLayout,
    *,
    version: str = "R2010",
    curves: str = "spline",
    linear_unit: str = "foot",
) -> bytes:
    """Serialise ``drawing`` as DXF bytes.

    Parameters
    ----------
    version : {"R12", "R2000", "R2010"}
        DXF version. R12 has no SPLINE or LWPOLYLINE: curves become POLYLINEs.
    curves : {"spline", "polyline"}
        Parabolas as exact degree-2 SPLINEs or as polylines within the layout's
        chord tolerance.
    """
    with _fixed_metadata():
        return _write(drawing, layout, version, curves, linear_unit)


def _write(
    drawing: Drawing, layout: DraftingLayout, version: str, curves: str, linear_unit: str
) -> bytes:
    r12 = version == "R12"
    log = logging.getLogger("ezdxf")
    level = log.level
    log.setLevel(logging.ERROR)  # ezdxf.new warns that R12 has no $INSUNITS; we know
    try:
        doc = ezdxf.new(DXF_VERSIONS[version])
    finally:
        log.setLevel(level)
    if not r12:
        doc.header["$INSUNITS"] = _INSUNITS.get(linear_unit, 0)
    else:  # R12 has no $INSUNITS; the mapping note names the unit instead
        if "$INSUNITS" in doc.header:
            del doc.header["$INSUNITS"]
    doc.header["$MEASUREMENT"] = 1 if linear_unit == "meter" else 0
    roles = {i.role for i in drawing.items}  # a layer for each role drawn, no empty ones
    _setup(doc, layout, roles, r12)
    msp = doc.modelspace()
    exact_arcs = drawing.meta.get("kind") == "plan" or drawing.meta.get("exaggeration") == 1.0
    for item in drawing.items:
        layer = layout.layer(item.role)
        if isinstance(item, Path):
            if len(item.points) == 2:
                msp.add_line(item.points[0], item.points[1], dxfattribs={"layer": layer})
            else:
                _polyline(msp, item.points, layer, r12)
        elif isinstance(item, QuadCurve):
            if curves == "spline" and not r12:
                spline = msp.add_spline(dxfattribs={"layer": layer})
                spline.set_open_uniform([(x, y, 0.0) for x, y in item.control], degree=2)
            else:
                _polyline(msp, item.polyline, layer, r12)
        elif isinstance(item, ArcItem):
            if exact_arcs:
                msp.add_arc(
                    item.center,
                    item.radius,
                    item.start_deg,
                    item.end_deg,
                    dxfattribs={"layer": layer},
                )
            else:
                _polyline(msp, item.polyline, layer, r12)
        elif isinstance(item, Circle):
            msp.add_circle(item.center, item.radius, dxfattribs={"layer": layer})
        elif isinstance(item, Text):
            txt = msp.add_text(
                plain_text(item.text),  # a name's new line would end the DXF's group
                height=item.height,
                rotation=item.rotation,
                dxfattribs={"layer": layer, "style": TEXT_STYLE},
            )
            txt.dxf.halign = _HALIGN[item.halign]
            txt.dxf.valign = _VALIGN[item.valign]
            txt.dxf.insert = (item.x, item.y)
            txt.dxf.align_point = (item.x, item.y)
    meta = {
        k: plain_text(str(v))
        for k, v in sorted(drawing.meta.items())
        if isinstance(v, (str, int, float))  # records such as curve notes stay out
    }
    if not r12 and version != "R2000":
        for key, value in meta.items():
            doc.header.custom_vars.append(META_PREFIX + key.upper(), value)
    md = doc.ezdxf_metadata()
    for key, value in meta.items():
        md[META_PREFIX + key.upper()] = value
    x0, y0, x1, y1 = drawing.extents
    doc.header["$EXTMIN"] = (x0, y0, 0.0)
    doc.header["$EXTMAX"] = (x1, y1, 0.0)
    doc.header["$LIMMIN"] = (x0, y0)
    doc.header["$LIMMAX"] = (x1, y1)
    if not r12:
        _paper(doc, linear_unit)
        _stable_classes(doc)
    stream = io.StringIO()
    doc.write(stream)
    return stream.getvalue().encode(doc.output_encoding, errors="dxfreplace")
