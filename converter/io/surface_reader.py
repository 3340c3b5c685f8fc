"""Streaming reader of LandXML TIN surfaces (``Surface``/``Definition``/``Pnts``/``Faces``).

Same safe parser settings as :mod:`gradeline.io.landxml`; big files are never
held in memory whole.
"""

from __future__ import annotations

import os
import re

from lxml import etree

from gradeline.errors import InputError
from gradeline.model import (
    SourceRef,
)

__all__ = ["read_surface", "surface_names"]


def surface_names(path: str | os.PathLike[str]) -> list[str]:
    """Names of the TIN surfaces in a file (streamed; point data is not kept)."""
    return [name for name, _ in _surfaces(os.fspath(path), want=None, names_only=True)]


def read_surface(path: str | os.PathLike[str], name: str | None = None):
    """Stream one TIN surface (``Surfaces/Surface/Definition``) into numpy arrays.

    The point and face blocks of an ordinary file are turned into arrays
    straight from the bytes, a chunk at a time, while lxml parses everything
    around them (see :func:`_plain_surfaces`); any other file is read with
    ``iterparse``, every element cleared once read. The whole DOM is never
    built; surfaces other than ``name`` are skipped.

    Returns
    -------
    gradeline.geometry.ground.Surface

    Raises
    ------
    InputError
        Not readable, no surface, several surfaces and no name, unknown name,
        bad point or face values, faces naming missing points, duplicate ids.
    """
    from gradeline.model import Surface

    name_s = os.fspath(path)
    found = _surfaces(name_s, want=name, names_only=False)
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


def _surfaces(path: str, want: str | None, names_only: bool) -> list[tuple[str, dict | None]]:
    """(name, data or None) of every surface: the byte path when the file allows it."""
    try:
        return _plain_surfaces(path, want, names_only)
    except _NotPlain:
        pass
    import gc

    # millions of short-lived element proxies: the cyclic collector would walk the
    # growing lists again and again; nothing here makes reference cycles
    enabled = gc.isenabled()
    gc.disable()
    try:
        return list(_iter_surfaces(path, want, names_only))
    finally:
        if enabled:
            gc.enable()


_TAGS = ("{*}Surface", "{*}P", "{*}F", "{*}Pnts", "{*}Faces", "{*}Imperial", "{*}Metric")


def _parser_options() -> dict:
    return {
        "resolve_entities": False,
        "no_network": True,
        "load_dtd": False,
        "huge_tree": True,
        "remove_comments": True,
    }


def _refuse_doctype(el, path: str) -> None:
    tree = el.getroottree()
    if tree.docinfo.doctype or tree.docinfo.internalDTD is not None:
        raise InputError("DOCTYPE declarations are not accepted", SourceRef(path, 1), "DOCTYPE")


# --------------------------------------------------------------------------- byte path


class _NotPlain(Exception):
    """Something the byte path does not read exactly; the file goes the iterparse way."""


_CHUNK = 1 << 20  # bytes read at a time
_BLOCKS = {b"<Pnts>": b"</Pnts>", b"<Faces>": b"</Faces>"}
_ITEM_END = {b"<Pnts>": b"</P>", b"<Faces>": b"</F>"}


def _plain_surfaces(path: str, want: str | None, names_only: bool):
    """Read the file in chunks; lxml parses all of it but the inside of each
    ``<Pnts>`` and ``<Faces>`` block, which is read straight into numpy.

    A block is taken this way only when it holds nothing but ``<P id="n">x y z</P>``
    or ``<F>a b c</F>`` / ``<F i="1">a b c</F>`` items and whitespace (checked:
    see :func:`_plain_points`, :func:`_plain_faces`). lxml is given the block's
    newlines in its place, so its line numbers stay those of the file, and keeps
    every guarantee of the parser settings for the rest. Anything else -- other
    markup, another namespace prefix, attributes, entity or character references,
    a malformed file -- raises :class:`_NotPlain`, and the caller reads the whole
    file the iterparse way, which gives the exact error where there is one.
    """
    import numpy as np

    parser = etree.XMLPullParser(events=("start", "end"), tag=_TAGS, **_parser_options())
    out: list[tuple[str, dict | None]] = []
    state: dict = {"unit": None, "checked": False, "surface": None, "take": False}
    parts: dict[str, list] = {k: [] for k in ("ids", "x", "y", "z", "faces", "hidden")}

    def events() -> etree._Element | None:
        last = None
        for ev, el in parser.read_events():
            if not state["checked"]:
                state["checked"] = True
                _refuse_doctype(el, path)
            tag = el.tag
            local = tag.rsplit("}", 1)[-1]
            if local in ("P", "F"):
                raise _NotPlain  # items lxml sees: a block this path did not recognise
            if ev == "start":
                if local == "Surface":
                    state["surface"] = el.get("name") or f"surface {el.sourceline}"
                    state["take"] = (not names_only) and (want is None or state["surface"] == want)
                last = el
                continue
            if local == "Surface":
                current = state["surface"]
                if state["take"] and (parts["ids"] or parts["faces"]):
                    out.append((current, _plain_arrays(path, current, el.sourceline, state, parts)))
                    for v in parts.values():
                        v.clear()
                else:
                    out.append((current, None))
                el.clear(keep_tail=False)
                state["surface"], state["take"] = None, False
            elif local in ("Imperial", "Metric") and state["unit"] is None:
                state["unit"] = el.get("linearUnit")
        return last

    try:
        with open(path, "rb") as fh:
            buf = b""
            block: bytes | None = None  # the opening tag of the block being read
            eof = False
            while True:
                if block is None:
                    hits = [(buf.find(tag), tag) for tag in _BLOCKS]
                    hits = [(i, tag) for i, tag in hits if i >= 0]
                    if hits:
                        i, tag = min(hits)
                        parser.feed(buf[: i + len(tag)])
                        last = events()
                        if last is None or not str(last.tag).endswith(tag[1:-1].decode()):
                            raise _NotPlain  # the text was not a start tag (a comment, CDATA...)
                        block, buf = tag, buf[i + len(tag) :]
                        continue
                    if eof:
                        parser.feed(buf)
                        parser.close()
                        events()
                        break
                    keep = 7  # a tag cut by the chunk boundary
                    parser.feed(buf[:-keep])
                    events()
                    buf = buf[-keep:]
                else:
                    close = _BLOCKS[block]
                    j = buf.find(close)
                    if j >= 0:
                        _take_block(block, buf[:j], state["take"], parts, np)
                        parser.feed(b"\n" * buf.count(b"\n", 0, j))
                        block, buf = None, buf[j:]
                        continue
                    if eof:
                        raise _NotPlain
                    cut = buf.rfind(_ITEM_END[block]) + len(_ITEM_END[block])
                    if cut >= len(_ITEM_END[block]):
                        _take_block(block, buf[:cut], state["take"], parts, np)
                        parser.feed(b"\n" * buf.count(b"\n", 0, cut))
                        buf = buf[cut:]
                data = fh.read(_CHUNK)
                eof = not data
                buf += data
    except etree.XMLSyntaxError:
        raise _NotPlain from None  # the iterparse path words the error with its line
    except OSError as err:
        raise InputError(
            f"cannot read the file ({err.strerror or err})", SourceRef(path, None), "LandXML"
        ) from None
    return out


def _take_block(block: bytes, data: bytes, take: bool, parts: dict, np) -> None:
    if not take:
        # skipped unread, but only when it is items of the block's kind and nothing
        # else (else the iterparse path decides, refusing a malformed file)
        end = _ITEM_END[block]
        n = data.count(end)
        if data.count(b"<") != 2 * n or data.count(end[:1] + end[2:3]) != n or b"&" in data:
            raise _NotPlain
        return
    if len(data) < 256 and not data.strip():
        return
    if block == b"<Pnts>":
        for key, values in zip(("ids", "y", "x", "z"), _plain_points(data, np), strict=True):
            parts[key].append(values)
    else:
        faces, hidden = _plain_faces(data, np)
        parts["faces"].append(faces)
        parts["hidden"].append(hidden)


def _strict(text: bytes, dtype, np):
    """All whitespace-separated numbers of ``text``, or :class:`_NotPlain`."""
    import warnings

    with warnings.catch_warnings():
        warnings.simplefilter("error", DeprecationWarning)
        try:
            return np.fromstring(text, dtype=dtype, sep=" ")
        except (ValueError, DeprecationWarning):
            raise _NotPlain from None


def _plain_points(data: bytes, np):
    """``<P id="n">north east elev</P>`` items as (ids, north, east, elev).

    Each tag is turned into a NaN marker, so every item must read as exactly
    [NaN, id, north, east, elev, NaN]; no other markup may be left over.
    """
    text = data.replace(b'<P id="', b" nan ").replace(b'">', b" ").replace(b"</P>", b" nan ")
    if b"<" in text:
        raise _NotPlain
    v = _strict(text, np.float64, np)
    if v.size % 6:
        raise _NotPlain
    v = v.reshape(-1, 6)
    if not (np.isnan(v[:, 0]).all() and np.isnan(v[:, 5]).all()):
        raise _NotPlain
    body = v[:, 1:5]
    if not np.isfinite(body).all():
        raise _NotPlain  # the iterparse path names the bad value
    ids = v[:, 1]
    if not (np.abs(ids) < 2.0**53).all() or not (ids == np.rint(ids)).all():
        raise _NotPlain
    return ids.astype(np.int64), v[:, 2].copy(), v[:, 3].copy(), v[:, 4].copy()


# an opening ``<F ...>`` tag with double-quoted attributes other than ``i`` (and
# ``i="1"`` for a hidden face); any other ``i`` value or quoting is left for lxml
_F_ATTRS = rb'(?:\s+(?!i\s*=)[A-Za-z_][\w.:-]*="[^"<&]*")*'
_F_SHOWN = re.compile(rb"<F" + _F_ATTRS + rb"\s*>")
_F_HIDDEN = re.compile(rb"<F" + _F_ATTRS + rb'\s+i="1"' + _F_ATTRS + rb"\s*>")


def _plain_faces(data: bytes, np):
    """``<F>a b c</F>`` and ``<F i="1">a b c</F>`` items (other attributes ignored,
    as the iterparse path ignores them) as (n x 3 ids, hidden flags).

    The opening tag becomes ``-1`` (``-3`` for a hidden face) and the closing
    tag ``-2``, so every item must read as exactly [-1 or -3, a, b, c, -2].
    """
    text = data.replace(b"<F>", b" -1 ").replace(b'<F i="1">', b" -3 ")
    if b"<F" in text:  # opening tags with other attributes (neighbours, codes...)
        text = _F_HIDDEN.sub(b" -3 ", _F_SHOWN.sub(b" -1 ", text))
    text = text.replace(b"</F>", b" -2 ")
    if b"<" in text:
        raise _NotPlain
    v = _strict(text, np.int64, np)
    if v.size % 5:
        raise _NotPlain
    v = v.reshape(-1, 5)
    if not v.size:
        return v[:, 1:4].copy(), np.zeros(0, bool)
    body, opening, closing = v[:, 1:4], v[:, 0], v[:, 4]
    if closing.min() != -2 or closing.max() != -2 or body.min() < 0:
        raise _NotPlain  # negative ids are read the iterparse way
    hidden = opening == -3
    if np.count_nonzero(hidden) + np.count_nonzero(opening == -1) != len(opening):
        raise _NotPlain
    # kept in 32 bits until the blocks are joined (widened then): half the memory
    narrow = np.int32 if body.max() < 2**31 else np.int64
    return body.astype(narrow), hidden


def _plain_arrays(path, name, line, state, parts):
    import numpy as np

    empty = {"ids": np.zeros(0, np.int64), "faces": np.zeros((0, 3), np.int64)}
    empty["hidden"] = np.zeros(0, bool)
    got = {}
    for key, chunks in parts.items():
        if not chunks:
            got[key] = empty.get(key, np.zeros(0))
        elif key == "faces":
            got[key] = np.concatenate(chunks, dtype=np.int64, casting="safe")
        else:
            got[key] = np.concatenate(chunks)
        chunks.clear()  # each list goes once joined: at most one extra copy alive
    return _surface_arrays(
        path,
        name,
        line,
        state["unit"],
        got["ids"],
        got["x"],
        got["y"],
        got["z"],
        got["faces"],
        got["hidden"],
        np,
    )


# --------------------------------------------------------------------------- iterparse path


def _iter_surfaces(path: str, want: str | None, names_only: bool):
    """Yield (name, data or None) for every surface; data only for the wanted one.

    Only ``Surface``, ``P``, ``F``, ``Pnts``, ``Faces`` and the unit elements
    reach Python (lxml filters the rest in C). Points and faces are taken from
    their parent in batches of a few thousand and then dropped, so the tree
    never holds more than one batch.
    """
    import numpy as np

    src = SourceRef(path, None)
    batch = 4096
    try:
        context = etree.iterparse(path, events=("end",), tag=_TAGS, **_parser_options())
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
                _refuse_doctype(el, path)
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
                    hidden = np.array([f == "1" for f in hidden_flags], dtype=bool)
                    yield (
                        current,
                        _text_arrays(
                            path, current, el.sourceline, unit, ids, pts_text, faces_text, hidden
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


def _whole_numbers(text: str, np):
    """Point ids: whole numbers, also when written as ``5.0`` or ``1e3`` (same id)."""
    got = _numbers(text, np.int64, np)
    if got is not None:
        return got
    f = _numbers(text, np.float64, np)
    if f is None or not np.isfinite(f).all() or not (np.abs(f) < 2.0**53).all():
        return None
    if not (f == np.rint(f)).all():
        return None
    return f.astype(np.int64)


def _text_arrays(path, name, line, unit, ids, pts_text, faces_text, hidden):
    import numpy as np

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
    id_arr = _whole_numbers(" ".join(ids), np)
    if id_arr is None or len(id_arr) != len(ids):
        raise InputError(f"surface {name!r}: point ids must be whole numbers", src, "P")
    f = _numbers(" ".join(faces_text), np.int64, np)
    if f is None:
        raise InputError(f"surface {name!r}: a face is not three point ids", src, "F")
    if len(f) != 3 * len(faces_text):
        raise InputError(f"surface {name!r}: every face needs three point ids", src, "F")
    pts = pts.reshape(-1, 3)
    x, y, z = pts[:, 1].copy(), pts[:, 0].copy(), pts[:, 2].copy()
    del pts
    return _surface_arrays(path, name, line, unit, id_arr, x, y, z, f.reshape(-1, 3), hidden, np)


def _surface_arrays(path, name, line, unit, id_arr, x, y, z, f, hid, np):
    """Check and index one surface's arrays (either path): ids unique, faces
    naming existing points, zero-area faces dropped and counted. ``f`` is
    turned into point indices in place."""
    src = SourceRef(path, line)
    if not (np.isfinite(x).all() and np.isfinite(y).all() and np.isfinite(z).all()):
        raise InputError(f"surface {name!r}: a point has a non-finite value", src, "P")
    n = len(id_arr)
    if n and int(id_arr[-1]) - int(id_arr[0]) == n - 1 and (np.diff(id_arr) == 1).all():
        # ids 1..n in order (the usual case): a face's index is its id minus the first
        f -= id_arr[0]
        if f.size and (f.min() < 0 or f.max() >= n):
            bad = int(f[(f < 0) | (f >= n)][0] + id_arr[0])
            raise InputError(
                f"surface {name!r}: a face names point id {bad}, which does not exist", src, "F"
            )
        faces = f
    else:
        order = np.argsort(id_arr, kind="stable")
        sorted_ids = id_arr[order]
        dup = np.flatnonzero(np.diff(sorted_ids) == 0)
        if dup.size:
            raise InputError(
                f"surface {name!r}: point id {int(sorted_ids[dup[0]])} is used twice", src, "P"
            )
        pos = np.searchsorted(sorted_ids, f)
        np.clip(pos, 0, max(n - 1, 0), out=pos)
        missing = sorted_ids[pos] != f if n else np.ones(f.shape, bool)
        if missing.any():
            bad = int(f[missing][0])
            raise InputError(
                f"surface {name!r}: a face names point id {bad}, which does not exist", src, "F"
            )
        faces = order[pos]
        del pos, missing
    # degenerate (zero-area) faces carry no surface: dropped and counted
    keep = np.empty(len(faces), dtype=bool)
    step = 1 << 16
    for lo in range(0, len(faces), step):
        a = faces[lo : lo + step]
        area2 = (x[a[:, 1]] - x[a[:, 0]]) * (y[a[:, 2]] - y[a[:, 0]]) - (
            x[a[:, 2]] - x[a[:, 0]]
        ) * (y[a[:, 1]] - y[a[:, 0]])
        keep[lo : lo + step] = area2 != 0
    skipped = int(len(keep) - np.count_nonzero(keep))
    if skipped:
        faces, hid = faces[keep], hid[keep]
    return {
        "name": name,
        "ids": id_arr,
        "x": x,
        "y": y,
        "z": z,
        "faces": faces,
        "hidden": hid,
        "line": line,
        "unit": unit,
        "skipped": skipped,
    }
