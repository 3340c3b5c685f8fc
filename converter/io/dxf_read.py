"""DXF reader: linework and the stored profile mapping of a drawing (ezdxf)."""

from __future__ import annotations

import contextlib
from typing import Any

import ezdxf
import numpy as np
from ezdxf.document import Drawing as DxfDocument

from gradeline.render.dxf import META_PREFIX

__all__ = ["LINEWORK_TYPES", "layer_names", "read_drawing", "read_linework", "read_mapping"]


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


def read_drawing(path: str):
    """Open a DXF file for reading; bad files become :class:`InputError`."""
    from gradeline.errors import InputError
    from gradeline.model import SourceRef

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


def read_linework(doc: DxfDocument, layer: str, tolerance: float) -> list[np.ndarray]:
    """Every LINE, LWPOLYLINE, POLYLINE, SPLINE and ARC on ``layer`` as (n, 2) point arrays.

    Curved parts (splines, arcs, polyline bulges) are flattened so no point of the
    drawn curve is farther than ``tolerance`` from the returned polyline; straight
    parts keep their vertices exactly.
    """
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
                if len(flat) >= 2:
                    out.append(flat)
                continue
            elif kind == "POLYLINE" and not any(v.dxf.bulge for v in e.vertices):
                pts = [v.dxf.location for v in e.vertices]
            else:  # polylines with bulges: flatten their arcs
                pts = list(ezpath.make_path(e).flattening(distance=tolerance))
        except Exception:  # noqa: BLE001 - an entity ezdxf cannot evaluate
            continue
        arr = np.array([(p[0], p[1]) for p in pts], dtype=np.float64)
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
