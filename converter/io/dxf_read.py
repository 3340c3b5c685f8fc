"""DXF reader: linework and the stored profile mapping of a drawing (ezdxf)."""

from __future__ import annotations

import contextlib
import math
import os
from dataclasses import dataclass
from typing import Any

import ezdxf
import numpy as np
from ezdxf.document import Drawing as DxfDocument

from gradeline.render.dxf import META_PREFIX

__all__ = [
    "LINEWORK_TYPES",
    "layer_names",
    "plain_codes",
    "read_drawing",
    "read_linework",
    "read_mapping",
    "read_world",
]


def read_mapping(doc: DxfDocument) -> dict[str, str]:
    """The gradeline mapping values stored in a DXF document (empty if none)."""
    out: dict[str, str] = {}
    with contextlib.suppress(Exception):
        md = doc.ezdxf_metadata()
        for key in ("KIND", "EXAGGERATION", "DATUM", "ALIGNMENT", "PROFILE", "LINEAR_UNIT"):
            full = META_PREFIX + key
            if full in md:
                out[key.lower()] = md[full]
    if not out and doc.dxfversion >= "AC1018":
        for tag, value in doc.header.custom_vars:
            if tag.startswith(META_PREFIX):
                out[tag[len(META_PREFIX) :].lower()] = value
    return out


LINEWORK_TYPES = ("LINE", "LWPOLYLINE", "POLYLINE", "SPLINE", "ARC")


#: Largest DXF read (bytes): ezdxf holds a drawing in memory at about ten times its
#: size; a road's profile or plan is a few MB.
MAX_DXF_BYTES = 512 * 1024 * 1024


def read_drawing(path: str):
    """Open a DXF file for reading; bad files become :class:`InputError`.

    Only regular files up to :data:`MAX_DXF_BYTES` are read (a device such as
    ``/dev/zero`` would never end)."""
    import stat as st

    from gradeline.errors import InputError
    from gradeline.model import SourceRef

    try:
        info = os.stat(path)
    except OSError as err:
        raise InputError(
            f"cannot read the file ({err.strerror or err})", SourceRef(path), "DXF"
        ) from None
    if not st.S_ISREG(info.st_mode):
        raise InputError("not a regular file; give a DXF file", SourceRef(path), "DXF")
    if info.st_size > MAX_DXF_BYTES:
        raise InputError(
            f"{info.st_size:,} bytes is more than gradeline reads of a drawing ({MAX_DXF_BYTES:,})",
            SourceRef(path),
            "DXF",
        )
    try:
        return ezdxf.readfile(path)
    except OSError as err:
        raise InputError(
            f"cannot read the file ({err.strerror or err})", SourceRef(path), "DXF"
        ) from None
    except ezdxf.DXFStructureError as err:
        raise InputError(f"not a valid DXF file ({err})", SourceRef(path), "DXF") from None
    except Exception as err:  # ezdxf raises many kinds on damaged files
        raise InputError(
            f"not a readable DXF file ({type(err).__name__}: {err})", SourceRef(path), "DXF"
        ) from None


def read_linework(
    doc: DxfDocument, layer: str, tolerance: float, skipped: dict[str, int] | None = None
) -> list[np.ndarray]:
    """Every LINE, LWPOLYLINE, POLYLINE, SPLINE and ARC on ``layer`` as (n, 2) point arrays.

    Curved parts (splines, arcs, polyline bulges) are flattened so no point of the
    drawn curve is farther than ``tolerance`` from the returned polyline; straight
    parts keep their vertices exactly. Entities ezdxf cannot evaluate, or with
    non-finite coordinates, are left out and counted in ``skipped`` by reason.
    """

    def skip(reason: str) -> None:
        if skipped is not None:
            skipped[reason] = skipped.get(reason, 0) + 1

    from ezdxf import path as ezpath

    out: list[np.ndarray] = []
    query = " ".join(LINEWORK_TYPES)
    for entity in doc.modelspace().query(query):
        e: Any = entity  # the kind decides which methods it has
        if e.dxf.layer.upper() != layer.upper():
            continue
        kind = e.dxftype()
        try:
            if kind == "LINE":
                pts = [e.dxf.start, e.dxf.end]
            elif kind == "SPLINE":  # on the B-spline itself: ezdxf's path form approximates it
                pts = list(e.construction_tool().flattening(tolerance))
            elif kind == "ARC":
                pts = list(e.construction_tool().flattening(tolerance))
            elif kind == "LWPOLYLINE" and (flat := _straight_lwpolyline(e)) is not None:
                if not np.isfinite(flat).all():
                    skip("LWPOLYLINE with non-finite coordinates")
                elif len(flat) >= 2:
                    out.append(flat)
                continue
            elif kind == "POLYLINE" and not any(v.dxf.bulge for v in e.vertices):
                pts = [v.dxf.location for v in e.vertices]
            else:  # polylines with bulges: flatten their arcs
                pts = list(ezpath.make_path(e).flattening(distance=tolerance))
        except Exception:  # noqa: BLE001 - an entity ezdxf cannot evaluate
            skip(f"{kind} ezdxf cannot evaluate")
            continue
        arr = np.array([(p[0], p[1]) for p in pts], dtype=np.float64)
        if not np.isfinite(arr).all():
            skip(f"{kind} with non-finite coordinates")
            continue
        if len(arr) >= 2:
            out.append(arr)
    return out


def _straight_lwpolyline(e: Any) -> np.ndarray | None:
    """Vertices (n, 2) of an LWPOLYLINE without bulges, None if it has any.

    Read from ezdxf's vertex array (x, y, start width, end width, bulge per row)
    in one step; a 250,000-vertex polyline otherwise costs a Python call a vertex.
    """
    values = getattr(getattr(e, "lwpoints", None), "values", None)
    if isinstance(values, np.ndarray) and values.ndim == 2 and values.shape[1] == 5:
        if np.any(values[:, 4]):
            return None
        return np.array(values[:, :2], dtype=np.float64)
    if any(b for *_, b in e.get_points("xyb")):
        return None
    return np.array([(x, y) for x, y in e.get_points("xy")], dtype=np.float64).reshape(-1, 2)


def layer_names(doc: DxfDocument) -> list[str]:
    """Names of the layers that hold linework."""
    names = {e.dxf.layer for e in doc.modelspace().query(" ".join(LINEWORK_TYPES))}
    return sorted(names)


# --------------------------------------------------------------------------- world view
#: $INSUNITS codes of the drawing units this reader converts, with metres per unit.
INSUNITS: dict[int, tuple[str, float]] = {
    1: ("inch", 0.0254),
    2: ("foot", 0.3048),
    4: ("millimetre", 0.001),
    5: ("centimetre", 0.01),
    6: ("metre", 1.0),
    21: ("US survey foot", 1200.0 / 3937.0),
}

#: Deepest block nesting followed; deeper references are counted as skipped.
MAX_NESTING = 16


@dataclass(frozen=True, slots=True)
class DrawnPiece:
    """One drawn primitive in world coordinates.

    ``kind`` is ``line`` (two points), ``arc`` (a circular arc: ``radius`` and
    ``center`` exact, ``points`` flattened within the reading tolerance) or
    ``curve`` (a SPLINE or other curve, flattened: its true form is unknown).
    """

    kind: str
    points: np.ndarray
    layer: str
    handle: str
    radius: float | None = None
    center: tuple[float, float] | None = None


@dataclass(frozen=True, slots=True)
class DrawnText:
    """One text of a drawing in world coordinates, its formatting codes removed."""

    text: str
    x: float
    y: float
    height: float
    rotation: float  # degrees, counter-clockwise
    layer: str
    source: str  # TEXT, MTEXT, ATTRIB, ATTDEF or DIMENSION
    handle: str
    lines: int = 1  # lines of an MTEXT (the others are one line each)


@dataclass
class WorldView:
    """Everything the audit reads from a drawing, in world coordinates."""

    pieces: list[DrawnPiece]
    texts: list[DrawnText]
    skipped: dict[str, int]  # reason -> count (never silently dropped)
    unit: str | None  # from $INSUNITS, None when unitless or unknown

    def layers(self) -> list[str]:
        """Layers holding linework, sorted."""
        return sorted({p.layer for p in self.pieces})


def drawing_unit(doc: DxfDocument) -> tuple[str | None, float | None]:
    """Name and metres per unit of the drawing's $INSUNITS (None, None if unitless)."""
    try:
        code = int(doc.header.get("$INSUNITS", 0))
    except (TypeError, ValueError):
        return None, None
    found = INSUNITS.get(code)
    return (found[0], found[1]) if found else (None, None)


_TEXT_CODES = {"%%D": "\u00b0", "%%P": "\u00b1", "%%C": "\u00d8", "%%U": "", "%%O": "", "%%%": "%"}


def plain_codes(text: str) -> str:
    """TEXT special codes (%%d for the degree sign, ...) as the characters they stand for."""
    import re

    return re.sub(r"%%[dpcuo%]", lambda m: _TEXT_CODES[m.group(0).upper()], text, flags=re.I)


def read_world(doc: DxfDocument, tolerance: float) -> WorldView:
    """Linework and texts of model space in world coordinates, block references expanded.

    Block content on layer ``0`` takes the layer of its reference, as CAD programs
    show it. Curves are flattened within ``tolerance``; arcs and polyline bulges keep
    their exact radius. Entities that cannot be evaluated, or hold non-finite
    coordinates, are counted in ``skipped`` by reason.
    """
    view = WorldView([], [], {}, drawing_unit(doc)[0])
    _walk(doc.modelspace(), None, 0, view, tolerance)
    return view


def _skip(view: WorldView, reason: str) -> None:
    view.skipped[reason] = view.skipped.get(reason, 0) + 1


def _walk(entities: Any, parent_layer: str | None, depth: int, view: WorldView, tol: float) -> None:
    for entity in entities:
        e: Any = entity
        kind = e.dxftype()
        layer = e.dxf.get("layer", "0")
        if layer == "0" and parent_layer is not None:
            layer = parent_layer
        try:
            if kind == "INSERT":
                for attrib in e.attribs:
                    _text(attrib, layer if attrib.dxf.layer == "0" else attrib.dxf.layer, view)
                if depth >= MAX_NESTING:
                    _skip(view, f"block nested deeper than {MAX_NESTING}")
                    continue
                _walk(e.virtual_entities(), layer, depth + 1, view, tol)
            elif kind in ("TEXT", "MTEXT", "ATTRIB", "ATTDEF", "DIMENSION"):
                _text(e, layer, view)
            elif kind in LINEWORK_TYPES:
                for piece in _pieces(e, kind, layer, tol):
                    if np.isfinite(piece.points).all():
                        view.pieces.append(piece)
                    else:
                        _skip(view, f"{kind} with non-finite coordinates")
        except Exception as err:  # noqa: BLE001 - an entity ezdxf cannot evaluate
            _skip(view, f"{kind} that cannot be evaluated ({type(err).__name__})")


def _pieces(e: Any, kind: str, layer: str, tol: float) -> list[DrawnPiece]:
    handle = str(e.dxf.get("handle", ""))
    if kind == "LINE":
        a, b = e.dxf.start, e.dxf.end
        return [DrawnPiece("line", np.array([(a[0], a[1]), (b[0], b[1])], float), layer, handle)]
    if kind == "ARC":
        tool = e.construction_tool()  # in WCS
        pts = np.array([(p[0], p[1]) for p in tool.flattening(tol)], float)
        c = tool.center
        return [DrawnPiece("arc", pts, layer, handle, float(tool.radius), (c[0], c[1]))]
    if kind == "SPLINE":
        pts = np.array([(p[0], p[1]) for p in e.construction_tool().flattening(tol)], float)
        return [DrawnPiece("curve", pts, layer, handle)]
    ocs = e.ocs()
    if kind == "LWPOLYLINE":
        flat = None if ocs.transform else _straight_lwpolyline(e)
        if flat is not None:  # no bulges, in WCS: the parts straight from the vertex array
            if e.closed and len(flat) > 1:
                flat = np.vstack([flat, flat[:1]])
            flat.setflags(write=False)
            return [
                DrawnPiece("line", flat[i : i + 2], layer, handle) for i in range(len(flat) - 1)
            ]
        verts = [(x, y, b) for x, y, b in e.get_points("xyb")]
        closed, elevation = bool(e.closed), float(e.dxf.get("elevation", 0.0))
    elif e.is_2d_polyline:
        verts = [
            (v.dxf.location[0], v.dxf.location[1], v.dxf.get("bulge", 0.0)) for v in e.vertices
        ]
        closed, elevation = bool(e.is_closed), float(e.dxf.get("elevation", (0, 0, 0))[2])
    elif e.is_3d_polyline:  # in WCS, straight
        locs = [v.dxf.location for v in e.vertices]
        return [
            DrawnPiece("line", np.array([(a[0], a[1]), (b[0], b[1])], float), layer, handle)
            for a, b in zip(locs, locs[1:], strict=False)
        ]
    else:
        return []  # meshes and polyface: no linework to compare
    return _polyline_parts(verts, closed, elevation, ocs, layer, handle, tol)


def _polyline_parts(verts, closed, elevation, ocs, layer, handle, tol) -> list[DrawnPiece]:
    """Each vertex-to-vertex part of a 2D polyline: a line, or an arc from its bulge."""
    from ezdxf.math import Vec3, bulge_to_arc

    def wcs(x: float, y: float) -> tuple[float, float]:
        p = ocs.to_wcs(Vec3(x, y, elevation))
        return (p.x, p.y)

    if closed and len(verts) > 1:
        verts = [*verts, (verts[0][0], verts[0][1], 0.0)]
    out: list[DrawnPiece] = []
    for (x0, y0, bulge), (x1, y1, _) in zip(verts, verts[1:], strict=False):
        if not bulge:
            pts = np.array([wcs(x0, y0), wcs(x1, y1)], float)
            out.append(DrawnPiece("line", pts, layer, handle))
            continue
        center, a0, a1, r = bulge_to_arc((x0, y0), (x1, y1), bulge)
        sweep = (a1 - a0) % (2 * math.pi)
        step = 2 * math.acos(max(-1.0, 1 - tol / r)) if r > tol else math.pi / 2
        n = max(2, min(100_000, math.ceil(sweep / max(step, 1e-6)) + 1))
        t = a0 + sweep * np.linspace(0.0, 1.0, n)
        ocs_pts = [(center.x + r * math.cos(v), center.y + r * math.sin(v)) for v in t]
        if bulge < 0:  # bulge_to_arc gives the arc counter-clockwise: walk it backwards
            ocs_pts.reverse()
        pts = np.array([wcs(x, y) for x, y in ocs_pts], float)
        pts[0], pts[-1] = wcs(x0, y0), wcs(x1, y1)
        out.append(DrawnPiece("arc", pts, layer, handle, float(r), wcs(center.x, center.y)))
    return out


def _text(e: Any, layer: str, view: WorldView) -> None:
    kind = e.dxftype()
    lines = 1
    if kind == "MTEXT":
        text = e.plain_text(split=False)
        lines = text.count("\n") + 1
        x, y = e.dxf.insert[0], e.dxf.insert[1]
        height = float(e.dxf.get("char_height", 1.0))
        rotation = float(e.get_rotation())
    elif kind == "DIMENSION":
        text = e.dxf.get("text", "")
        if text in ("", "<>") or "<>" in text:
            try:
                measured = f"{float(e.get_measurement()):.2f}"
            except Exception:  # noqa: BLE001 - an angular or unusual dimension
                measured = ""
            text = measured if text in ("", "<>") else text.replace("<>", measured)
        if not e.dxf.hasattr("text_midpoint"):
            _skip(view, "DIMENSION without a text position")
            return
        p = e.dxf.text_midpoint
        x, y, height, rotation = p[0], p[1], 0.0, float(e.dxf.get("text_rotation", 0.0))
    else:  # TEXT, ATTRIB, ATTDEF
        text = plain_codes(e.dxf.get("text", ""))
        _, p, _ = e.get_placement()
        x, y = p[0], p[1]
        height = float(e.dxf.get("height", 1.0))
        rotation = float(e.dxf.get("rotation", 0.0))
    text = text.strip()
    if not text:
        return
    if not math.isfinite(height):
        height = 0.0  # read, never grouped with others
    if not (math.isfinite(x) and math.isfinite(y)):
        _skip(view, f"{kind} with non-finite coordinates")
        return
    handle = str(e.dxf.get("handle", ""))
    view.texts.append(
        DrawnText(text, float(x), float(y), height, rotation, layer, kind, handle, lines)
    )
