"""Streaming reader of LandXML TIN surfaces (``Surface``/``Definition``/``Pnts``/``Faces``).

Same safe parser settings as :mod:`gradeline.io.landxml`; big files are never
held in memory whole.
"""

from __future__ import annotations

import os

from lxml import etree

from gradeline.errors import InputError
from gradeline.model import (
    SourceRef,
)

__all__ = ["read_surface", "surface_names"]


def surface_names(path: str | os.PathLike[str]) -> list[str]:
    """Names of the TIN surfaces in a file (streamed; point data is not kept)."""
    return [name for name, _ in _iter_surfaces(os.fspath(path), want=None, names_only=True)]


def read_surface(path: str | os.PathLike[str], name: str | None = None):
    """Stream one TIN surface (``Surfaces/Surface/Definition``) into numpy arrays.

    The file is read with ``iterparse`` and every element is cleared once read,
    so the whole DOM is never built; surfaces other than ``name`` are skipped.

    Returns
    -------
    gradeline.geometry.ground.Surface

    Raises
    ------
    InputError
        Not readable, no surface, several surfaces and no name, unknown name,
        bad point or face values, faces naming missing points, duplicate ids.
    """
    import gc

    from gradeline.model import Surface

    name_s = os.fspath(path)
    # millions of short-lived element proxies: the cyclic collector would walk the
    # growing lists again and again; nothing here makes reference cycles
    enabled = gc.isenabled()
    gc.disable()
    try:
        found = list(_iter_surfaces(name_s, want=name, names_only=False))
    finally:
        if enabled:
            gc.enable()
    names = [n for n, _ in found]
    src = SourceRef(name_s, None)
    if not names:
        raise InputError(
            "no TIN surface (Surfaces/Surface/Definition with Pnts and Faces)", src, "Surfaces"
        )
    if name is None and len(names) > 1:
        raise InputError(
            f"the file has {len(names)} surfaces; choose one: " + ", ".join(names),
            src,
            "Surfaces",
            choice="surface",
        )
    if name is not None and name not in names:
        raise InputError(
            f"no surface named {name!r}; surfaces: " + ", ".join(names), src, "Surfaces"
        )
    data = next(d for n, d in found if d is not None)
    return Surface(
        name=data["name"],
        ids=data["ids"],
        x=data["x"],
        y=data["y"],
        z=data["z"],
        faces=data["faces"],
        hidden=data["hidden"],
        source=SourceRef(name_s, data["line"]),
        linear_unit=data["unit"],
        skipped_faces=data["skipped"],
    )


def _iter_surfaces(path: str, want: str | None, names_only: bool):
    """Yield (name, data or None) for every surface; data only for the wanted one.

    Only ``Surface``, ``P``, ``F``, ``Pnts``, ``Faces`` and the unit elements
    reach Python (lxml filters the rest in C). Points and faces are taken from
    their parent in batches of a few thousand and then dropped, so the tree
    never holds more than one batch.
    """
    import numpy as np

    src = SourceRef(path, None)
    tags = ("{*}Surface", "{*}P", "{*}F", "{*}Pnts", "{*}Faces", "{*}Imperial", "{*}Metric")
    batch = 4096
    try:
        context = etree.iterparse(
            path,
            events=("end",),
            tag=tags,
            resolve_entities=False,
            no_network=True,
            load_dtd=False,
            huge_tree=True,
            remove_comments=True,
        )
        unit = None
        checked = False
        pts_text: list[str] = []
        ids: list[str] = []
        faces_text: list[str] = []
        hidden_flags: list[str | None] = []
        taking: dict[int, bool] = {}
        count = 0

        def wanted(holder) -> bool:
            key = id(holder)
            if key not in taking:
                surface = holder
                while surface is not None and not str(surface.tag).endswith("Surface"):
                    surface = surface.getparent()
                name = surface.get("name") if surface is not None else None
                taking.clear()
                taking[key] = (
                    (not names_only) and surface is not None and (want is None or name == want)
                )
            return taking[key]

        def take(holder, upto: int | None) -> None:
            kids = holder[:upto]
            if wanted(holder):
                if str(holder.tag).endswith("Pnts"):
                    ids.extend(k.get("id") or "" for k in kids)
                    pts_text.extend(k.text or "" for k in kids)
                else:
                    faces_text.extend(k.text or "" for k in kids)
                    hidden_flags.extend(k.get("i") for k in kids)
            del holder[:upto]

        for _, el in context:
            if not checked:
                checked = True
                tree = el.getroottree()
                if tree.docinfo.doctype or tree.docinfo.internalDTD is not None:
                    raise InputError(
                        "DOCTYPE declarations are not accepted", SourceRef(path, 1), "DOCTYPE"
                    )
            tag = el.tag
            last = tag[-1]
            if last in "PF" and (len(tag) == 1 or tag[-2] == "}"):
                count += 1
                if count % batch == 0:
                    parent = el.getparent()
                    if parent is not None:
                        take(parent, -1)  # keep the newest element: lxml may still hold it
                continue
            if tag.endswith("Pnts") or tag.endswith("Faces"):
                take(el, None)
                continue
            if tag.endswith("Surface"):
                current = el.get("name") or f"surface {el.sourceline}"
                if (not names_only) and (want is None or current == want) and (ids or faces_text):
                    hidden = [i for i, f in enumerate(hidden_flags) if f == "1"]
                    yield (
                        current,
                        _surface_arrays(
                            path,
                            current,
                            el.sourceline,
                            unit,
                            ids,
                            pts_text,
                            faces_text,
                            hidden,
                            np,
                        ),
                    )
                    ids, pts_text, faces_text, hidden_flags = [], [], [], []
                else:
                    yield current, None
                el.clear(keep_tail=False)
                taking.clear()
            elif unit is None:
                unit = el.get("linearUnit")
    except etree.XMLSyntaxError as err:
        msg = (err.msg or "not well-formed").splitlines()[0].split(", line ")[0]
        raise InputError(
            f"not well-formed ({msg}); the file may be truncated or not XML",
            SourceRef(path, err.lineno or 1),
            "XML",
        ) from None
    except OSError as err:
        raise InputError(f"cannot read the file ({err.strerror or err})", src, "LandXML") from None


def _numbers(text: str, dtype, np):
    """Whitespace-separated numbers as an array, or None when any is not a number.

    ``np.fromstring`` with a separator parses in C; when it meets a token it
    cannot read it stops and warns, which is turned into a slower exact parse.
    """
    import warnings

    with warnings.catch_warnings():
        warnings.simplefilter("error", DeprecationWarning)
        try:
            return np.fromstring(text, dtype=dtype, sep=" ")
        except (ValueError, DeprecationWarning):
            pass
    try:
        return np.array(text.split(), dtype=dtype)
    except ValueError:
        return None


def _surface_arrays(path, name, line, unit, ids, pts_text, faces_text, hidden, np):
    src = SourceRef(path, line)
    pts = _numbers(" ".join(pts_text), np.float64, np)
    if pts is None:
        raise InputError(f"surface {name!r}: a point is not 'northing easting elevation'", src, "P")
    if len(pts) != 3 * len(pts_text):
        raise InputError(
            f"surface {name!r}: every point needs northing, easting and elevation "
            f"({len(pts_text)} points, {len(pts)} values)",
            src,
            "P",
        )
    pts = pts.reshape(-1, 3)
    if not np.all(np.isfinite(pts)):
        raise InputError(f"surface {name!r}: a point has a non-finite value", src, "P")
    id_arr = _numbers(" ".join(ids), np.int64, np)
    if id_arr is None or len(id_arr) != len(ids):
        raise InputError(f"surface {name!r}: point ids must be whole numbers", src, "P")
    order = np.argsort(id_arr, kind="stable")
    sorted_ids = id_arr[order]
    dup = np.flatnonzero(np.diff(sorted_ids) == 0)
    if dup.size:
        raise InputError(
            f"surface {name!r}: point id {int(sorted_ids[dup[0]])} is used twice", src, "P"
        )
    f = _numbers(" ".join(faces_text), np.int64, np)
    if f is None:
        raise InputError(f"surface {name!r}: a face is not three point ids", src, "F")
    if len(f) != 3 * len(faces_text):
        raise InputError(f"surface {name!r}: every face needs three point ids", src, "F")
    f = f.reshape(-1, 3)
    pos = np.searchsorted(sorted_ids, f)
    pos_c = np.clip(pos, 0, len(sorted_ids) - 1)
    missing = sorted_ids[pos_c] != f
    if missing.any():
        bad = int(f[missing][0])
        raise InputError(
            f"surface {name!r}: a face names point id {bad}, which does not exist", src, "F"
        )
    faces = order[pos_c]
    hid = np.zeros(len(f), dtype=bool)
    hid[np.asarray(hidden, dtype=np.int64)] = True
    # degenerate (zero-area) faces carry no surface: dropped and counted
    x, y = pts[:, 1], pts[:, 0]
    a = faces
    area2 = (x[a[:, 1]] - x[a[:, 0]]) * (y[a[:, 2]] - y[a[:, 0]]) - (x[a[:, 2]] - x[a[:, 0]]) * (
        y[a[:, 1]] - y[a[:, 0]]
    )
    keep = area2 != 0
    skipped = int((~keep).sum())
    return {
        "name": name,
        "ids": id_arr,
        "x": x.copy(),
        "y": y.copy(),
        "z": pts[:, 2].copy(),
        "faces": faces[keep],
        "hidden": hid[keep],
        "line": line,
        "unit": unit,
        "skipped": skipped,
    }


# --------------------------------------------------------------------------- writer
