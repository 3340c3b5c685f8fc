"""Text and pen operators written straight into a reportlab page.

A sheet draws some 400 strings and 250 pen changes a page. reportlab's
``drawString`` builds a text object, shapes, measures and formats each string
through several layers of Python (about 40 microseconds a string), and each pen
change goes through four general setters. For the plain standard fonts and RGB
pens gradeline uses, this module appends the very operators those calls append,
built from reportlab's own pieces (``fp_str``, ``escapePDF``, ``unicode2T1`` and the
document's font registry), and sets the same canvas state.

Byte for byte the same is not assumed; it is checked. The first time a process
draws, :func:`ready` draws a set of probe strings and pens both ways on two
scratch canvases and compares the PDFs; if reportlab writes anything differently
(another version, a bidi or shaping add-on installed), every call goes through
reportlab's public methods instead. Only a plain ``Canvas`` drawing bottom-up
with no colour-space enforcement takes the direct path; anything else, such as a
subclass that records the calls (``bench/bench_sheets.py``), gets the public
methods.
"""

from __future__ import annotations

import io
import math
from functools import cache, lru_cache
from typing import Any

import numpy as np
from reportlab.lib.rl_accel import escapePDF, fp_str
from reportlab.pdfbase import pdfmetrics
from reportlab.pdfgen import canvas as rl_canvas
from reportlab.pdfgen.canvas import PATH_OPS

__all__ = ["pen", "plain_font", "polyline", "ready", "text", "turned_text"]

#: reportlab's canvas class as imported (a caller may swap the module's name later).
_CANVAS = rl_canvas.Canvas


@cache
def plain_font(name: str) -> bool:
    """Whether ``name`` is a font the direct path can write (a standard Type 1 font,
    neither embedded TrueType nor multi-byte CID)."""
    font = pdfmetrics.getFont(name)
    return not font._dynamicFont and not font._multiByte


def _font_op(c: Any, name: str, size: float) -> str:
    ops = c.__dict__.setdefault("_gradeline_font_ops", {})
    op = ops.get((name, size))
    if op is None:
        # registering the font in the document, as setFont does, on first use
        internal = c._doc.getInternalFontName(name)
        op = ops[(name, size)] = f"BT {internal} {fp_str(size)} Tf {fp_str(size * 1.2)} TL ET"
    return op


@lru_cache(maxsize=1 << 16)
def _single(name: str, s: str) -> str | None:
    """The text operator of ``s`` when the font encodes all of it (sheets repeat their
    texts: grid numbers, stations, table headings), else None."""
    font = pdfmetrics.getFont(name)
    pieces = pdfmetrics.unicode2T1(s, [font, *font.substitutionFonts])
    if any(f != font for f, _ in pieces):
        return None
    return " ".join(f"({escapePDF(t)}) Tj" for _, t in pieces)


def _formatted(c: Any, name: str, size: float, s: str) -> str:
    """What reportlab's text object writes for ``s`` in a plain font."""
    single = _single(name, s)
    if single is not None:
        return single
    font = pdfmetrics.getFont(name)
    out = []
    current = font
    for f, t in pdfmetrics.unicode2T1(s, [font, *font.substitutionFonts]):
        if f != current:
            out.append(_switch(c, f.fontName, size))
            current = f
        out.append(f"({escapePDF(t)}) Tj")
    if current != font:
        out.append(_switch(c, name, size))
    return " ".join(out)


def _switch(c: Any, name: str, size: float) -> str:
    return f"{c._doc.getInternalFontName(name)} {fp_str(size)} Tf {fp_str(size * 1.2)} TL"


def _text_direct(c: Any, name: str, size: float, x: float, y: float, s: str) -> None:
    c._fontname, c._fontsize, c._leading = name, size, size * 1.2
    code = c._code
    code.append(_font_op(c, name, size))
    code.append(f"BT 1 0 0 1 {fp_str(x, y)} Tm {_formatted(c, name, size, s)} T* ET")


def _turn_op(origin: tuple[float, float], angle: float) -> str:
    """The one ``cm`` operator of ``translate(*origin)`` then ``rotate(angle)`` after a
    ``saveState``: reportlab folds the rotation into the translation it has just
    written, reading that translation back from its text (so the origin is rounded as
    written), then multiplies the two matrices."""
    e0, f0 = float(fp_str(origin[0])), float(fp_str(origin[1]))
    # the product's translation: 1*0 + 0*0 + e0 and 0*0 + 1*0 + f0, as reportlab adds them
    return f"{_rotation(angle)} {fp_str(0.0 + e0, 0.0 + f0)} cm"


@lru_cache(maxsize=1 << 12)
def _rotation(angle: float) -> str:
    """The first four numbers of the folded matrix (translation 1 0 0 1 times the
    rotation), in reportlab's order of operations."""
    co, si = math.cos(angle * math.pi / 180), math.sin(angle * math.pi / 180)
    a0, b0, c0, d0 = 1.0, 0.0, 0.0, 1.0
    return fp_str(a0 * co + c0 * si, b0 * co + d0 * si, a0 * -si + c0 * co, b0 * -si + d0 * co)


def _turned_direct(c: Any, origin: tuple[float, float], angle: float, runs) -> None:
    # inside q ... Q the canvas state is restored, so none of it is set here
    code = c._code
    code.append("q")
    code.append(_turn_op(origin, angle))
    for name, size, x, y, s in runs:
        code.append(_font_op(c, name, size))
        code.append(f"BT 1 0 0 1 {fp_str(x, y)} Tm {_formatted(c, name, size, s)} T* ET")
    code.append("Q")


def _turned_public(c: Any, origin: tuple[float, float], angle: float, runs) -> None:
    c.saveState()
    c.translate(*origin)
    c.rotate(angle)
    for name, size, x, y, s in runs:
        _text_public(c, name, size, x, y, s)
    c.restoreState()


def _text_public(c: Any, name: str, size: float, x: float, y: float, s: str) -> None:
    c.setFont(name, size)
    c.drawString(x, y, s)


@cache
def _pen_ops(rgb: tuple[float, float, float], width: float, dash: tuple[float, ...]) -> tuple:
    colour = fp_str(rgb)
    return (f"{colour} RG", f"{colour} rg", f"{fp_str(width)} w", f"[{fp_str(list(dash))}] 0 d")


def _pen_direct(c: Any, rgb: tuple[float, float, float], width: float, dash: tuple) -> None:
    c._strokeColorObj = c._fillColorObj = rgb
    c._lineWidth = width
    c._code.extend(_pen_ops(rgb, width, dash))


def _pen_public(c: Any, rgb: tuple[float, float, float], width: float, dash: tuple) -> None:
    c.setStrokeColorRGB(*rgb)
    c.setFillColorRGB(*rgb)
    c.setLineWidth(width)
    c.setDash(list(dash))


def _polyline_direct(c: Any, points) -> None:
    first, *rest = points
    ops = [f"n {fp_str(*first)} m"]
    ops.extend([f"{fp_str(*q)} l" for q in rest])
    c._code.append(" ".join(ops))
    c._code.append(PATH_OPS[1, 0, c._fillMode])


def _polyline_public(c: Any, points) -> None:
    path = c.beginPath()
    first, *rest = points
    path.moveTo(*first)
    for q in rest:
        path.lineTo(*q)
    c.drawPath(path, stroke=1, fill=0)


#: Probe strings: plain, PDF-escaped characters, Western accents, an empty string,
#: and characters outside the font's encoding.
_PROBES = ("STA 12+34.56", "(a) \\ b", "Øresund é ß", "", "x\u2212y \u20ac", "\t")


def _probe(draw_text, draw_pen, draw_turned, draw_polyline) -> bytes:
    buf = io.BytesIO()
    c = _CANVAS(buf, pagesize=(200, 200), invariant=1, pageCompression=0)
    for i, s in enumerate(_PROBES):
        draw_pen(c, (0.1 * i, 0.5, 1.0), 0.25 + i, (3.0, 1.5 * i) if i % 2 else ())
        for name in ("Helvetica", "Helvetica-Bold"):
            draw_text(c, name, 6.5 + i, 10.123456 * i, 20.5 + i, s)
            runs = [(name, 5.0 + i, 0.0, -1.8, s), ("Helvetica", 7.0, 3.25, 0.0, s)]
            draw_turned(c, (33.3333333 * i, 12.7), (0.0, 90.0, -33.690067525979785)[i % 3], runs)
        c.line(0, 0, i, 10)
        draw_polyline(c, [(0.0, 1.0), (2.123456789, 3.5 * i), (-1e-7, 1e5)][: 1 + i % 3])
        draw_polyline(c, np.array([[1.0, 2.0], [3.0, 4.000004], [i, -i]]))
    c.saveState()
    c.restoreState()
    c.line(0, 0, 10, 10)
    c.showPage()
    c.save()
    return buf.getvalue()


@cache
def _verified() -> bool:
    try:
        direct = _probe(_text_direct, _pen_direct, _turned_direct, _polyline_direct)
        return direct == _probe(_text_public, _pen_public, _turned_public, _polyline_public)
    except Exception:  # noqa: BLE001 - any surprise means: use the public calls
        return False


def ready(c: Any) -> bool:
    """Whether ``c`` takes the direct path (a plain canvas, and the check passed);
    decided once a canvas (gradeline never changes a canvas's direction or colour
    space while drawing)."""
    if type(c) is not _CANVAS:
        return False
    known = c.__dict__.get("_gradeline_direct")
    if known is None:
        known = bool(c.bottomup) and not getattr(c, "_enforceColorSpace", None) and _verified()
        c.__dict__["_gradeline_direct"] = known
    return known


def text(c: Any, name: str, size: float, x: float, y: float, s: str, direct: bool) -> None:
    """Set font ``name`` at ``size`` and draw ``s`` at (x, y): what ``setFont`` and
    ``drawString`` do, directly when ``direct`` (from :func:`ready`) and the font is
    plain."""
    if direct and plain_font(name):
        _text_direct(c, name, size, x, y, s)
    else:
        _text_public(c, name, size, x, y, s)


def pen(c: Any, rgb: tuple[float, float, float], width: float, dash: tuple[float, ...]) -> None:
    """Stroke and fill colour ``rgb``, line width and dash (phase 0), as the four
    reportlab setters would set them."""
    if ready(c):
        _pen_direct(c, rgb, width, dash)
    else:
        _pen_public(c, rgb, width, dash)


def turned_text(c: Any, origin: tuple[float, float], angle: float, runs) -> None:
    """``runs`` of (font, size, x, y, text) drawn in a frame moved to ``origin`` and
    turned ``angle`` degrees, inside a saved and restored state: directly when
    :func:`ready` and every font is plain."""
    if ready(c) and all(plain_font(run[0]) for run in runs):
        _turned_direct(c, origin, angle, runs)
    else:
        _turned_public(c, origin, angle, runs)


def polyline(c: Any, points) -> None:
    """Stroke the open polyline through ``points`` (pairs), as a path of ``moveTo``,
    ``lineTo`` and ``drawPath(stroke=1, fill=0)``."""
    if ready(c):
        _polyline_direct(c, points)
    else:
        _polyline_public(c, points)
