"""The review page: a :class:`~gradeline.present.review_chart.ReviewChart` drawn on
one landscape ANSI B (11 x 17 in) page with reportlab. Draws, computes nothing."""

from __future__ import annotations

import io
import math

import numpy as np
from reportlab.lib.pagesizes import landscape
from reportlab.pdfgen import canvas as rl_canvas

from gradeline.present import labels
from gradeline.present.review_chart import ReviewChart
from gradeline.sheets import fonts

__all__ = ["review_pdf"]

_PAGE = landscape((792.0, 1224.0))  # ANSI B: 11 x 17 in
_GRADE = (0.10, 0.10, 0.10)
_STOP = (0.05, 0.35, 0.70)
_HEAD = (0.20, 0.55, 0.30)
_REQ = (0.80, 0.10, 0.10)
_SHORT = (1.00, 0.80, 0.80)


def review_pdf(chart: ReviewChart) -> bytes:
    """The page as PDF bytes (deterministic)."""
    buf = io.BytesIO()
    c = rl_canvas.Canvas(buf, pagesize=_PAGE, invariant=1, pageCompression=1)
    c.setTitle(chart.title)
    c.setCreator("gradeline")
    c.setSubject(labels.CAUTION)
    w, h = _PAGE
    m = 54.0
    fonts.draw(c, m, h - m, chart.title, 16, bold=True)
    fonts.draw(c, m, h - m - 20, chart.subtitle, 9)
    fonts.draw(c, m, h - m - 34, chart.summary, 10, bold=True)
    x0, x1 = m + 50, w - m - 150
    s0, s1 = float(chart.stations[0]), float(chart.stations[-1])

    def sx(s):
        return x0 + (np.asarray(s, dtype=float) - s0) / max(s1 - s0, 1e-9) * (x1 - x0)

    # finished grade, sight distance, K: from the top, with room for titles and ticks
    panels = [(h - m - 230, h - m - 62), (h - m - 500, h - m - 262), (m + 34, h - m - 532)]
    _grade_panel(c, chart, sx, x0, x1, *panels[0])
    _sight_panel(c, chart, sx, x0, x1, *panels[1])
    _k_panel(c, chart, sx, x0, x1, *panels[2])
    fonts.draw(c, m, m - 20, labels.CAUTION, 8)
    c.showPage()
    c.save()
    return buf.getvalue()


def _frame(c, x0, x1, y0, y1, title, ticks, sx, unit_note):
    c.setStrokeColorRGB(0.5, 0.5, 0.5)
    c.setLineWidth(0.5)
    c.rect(x0, y0, x1 - x0, y1 - y0, stroke=1, fill=0)
    c.setFillColorRGB(0, 0, 0)
    fonts.draw(c, x0, y1 + 6, title, 10, bold=True)
    fonts.draw(c, x1, y1 + 6, unit_note, 8, align="right")
    c.setStrokeColorRGB(0.85, 0.85, 0.85)
    for s, text in ticks:
        x = float(sx(s))
        c.line(x, y0, x, y1)
        c.setFillColorRGB(0.3, 0.3, 0.3)
        fonts.draw(c, x, y0 - 11, text, 7, align="center")


def _polyline(c, xs, ys, rgb, width=1.0, dash=None):
    ok = np.isfinite(xs) & np.isfinite(ys)
    c.setStrokeColorRGB(*rgb)
    c.setLineWidth(width)
    c.setDash(dash or [])
    path, pen = c.beginPath(), False
    for x, y, good in zip(xs.tolist(), ys.tolist(), ok.tolist(), strict=True):
        if not good:
            pen = False
            continue
        if pen:
            path.lineTo(x, y)
        else:
            path.moveTo(x, y)
            pen = True
    c.drawPath(path, stroke=1, fill=0)
    c.setDash([])


def _value_axis(c, x0, y0, y1, lo, hi, unit):
    step = _nice((hi - lo) / 5)
    v = math.ceil(lo / step) * step
    c.setFillColorRGB(0.3, 0.3, 0.3)
    while v <= hi + 1e-9:
        y = y0 + (v - lo) / (hi - lo) * (y1 - y0)
        fonts.draw(c, x0 - 4, y - 3, f"{v:g}", 7, align="right")
        v += step
    fonts.draw(c, x0 - 4, y1 + 6, unit, 7, align="right")


def _nice(x):
    e = 10 ** math.floor(math.log10(max(x, 1e-9)))
    return next(m * e for m in (1, 2, 5, 10) if m * e >= x)


def _grade_panel(c, chart, sx, x0, x1, y0, y1):
    z = chart.elevations
    lo, hi = float(np.nanmin(z)), float(np.nanmax(z))
    pad = max((hi - lo) * 0.1, 1.0)
    lo, hi = lo - pad, hi + pad
    _frame(c, x0, x1, y0, y1, "Finished grade", chart.station_ticks, sx, "elevation")
    for a, b, _ in chart.short:
        c.setFillColorRGB(*_SHORT)
        c.rect(float(sx(a)), y0, max(float(sx(b) - sx(a)), 1.5), y1 - y0, stroke=0, fill=1)
    ys = y0 + (z - lo) / (hi - lo) * (y1 - y0)
    _polyline(c, sx(chart.stations), ys, _GRADE, 1.2)
    _value_axis(c, x0, y0, y1, lo, hi, chart.length_unit)


def _sight_panel(c, chart, sx, x0, x1, y0, y1):
    hi = chart.cap
    _frame(
        c,
        x0,
        x1,
        y0,
        y1,
        "Available sight distance against the required stopping sight distance",
        chart.station_ticks,
        sx,
        f"{chart.length_unit}; values above {hi:.0f} drawn at the top",
    )
    for a, b, _ in chart.short:
        c.setFillColorRGB(*_SHORT)
        c.rect(float(sx(a)), y0, max(float(sx(b) - sx(a)), 1.5), y1 - y0, stroke=0, fill=1)

    def y(v):
        return y0 + np.asarray(v, dtype=float) / hi * (y1 - y0)

    xs = sx(chart.stations)
    for _name, values, dashed in chart.available:
        rgb = _HEAD if dashed else _STOP
        _polyline(c, xs, y(values), rgb, 0.8, [3, 2] if dashed else None)
    _polyline(c, xs, y(chart.required_ahead), _REQ, 1.2)
    _polyline(c, xs, y(chart.required_behind), _REQ, 1.2, [1, 2])
    _value_axis(c, x0, y0, y1, 0.0, hi, chart.length_unit)
    legend = [
        ("stopping sight distance available (both directions)", _STOP, None),
        ("headlight sight distance available (both directions)", _HEAD, [3, 2]),
        ("required, up-station", _REQ, None),
        ("required, down-station", _REQ, [1, 2]),
    ]
    lx, ly = x1 + 12, y1 - 10
    for text, rgb, dash in legend:
        c.setStrokeColorRGB(*rgb)
        c.setDash(dash or [])
        c.line(lx, ly + 3, lx + 18, ly + 3)
        c.setDash([])
        c.setFillColorRGB(0, 0, 0)
        for k, part in enumerate(_wrap(text, 24)):
            fonts.draw(c, lx + 22, ly - 9 * k, part, 7)
        ly -= 30
    c.setFillColorRGB(*_SHORT)
    c.rect(lx, ly, 18, 7, stroke=0, fill=1)
    c.setFillColorRGB(0, 0, 0)
    fonts.draw(c, lx + 22, ly, "lacks sight distance", 7)
    ly -= 16
    for _a, _b, what in chart.short[:12]:
        for k, part in enumerate(_wrap(f"{what}", 30)):
            fonts.draw(c, lx, ly - 9 * k, part, 6.5)
        ly -= 22


def _k_panel(c, chart, sx, x0, x1, y0, y1):
    ks = [v for b in chart.curves for v in (b.k, b.k_required) if v is not None]
    hi = max(ks) * 1.15 if ks else 1.0
    _frame(
        c,
        x0,
        x1,
        y0,
        y1,
        "K provided (bar) and design K (red tick) at each vertical curve",
        chart.station_ticks,
        sx,
        f"{chart.length_unit} per %",
    )
    for b in chart.curves:
        x = float(sx(b.station))
        if b.k is not None:
            top = y0 + min(b.k, hi) / hi * (y1 - y0)
            rgb = (0.85, 0.25, 0.25) if b.failed else (0.45, 0.60, 0.80)
            c.setFillColorRGB(*rgb)
            c.rect(x - 5, y0, 10, top - y0, stroke=0, fill=1)
        if b.k_required is not None:
            yr = y0 + b.k_required / hi * (y1 - y0)
            c.setStrokeColorRGB(*_REQ)
            c.setLineWidth(1.5)
            c.line(x - 9, yr, x + 9, yr)
        c.setFillColorRGB(0, 0, 0)
        fonts.draw(c, x, y1 - 10, f"{b.number} {b.curve_type}", 6.5, align="center")
    _value_axis(c, x0, y0, y1, 0.0, hi, "K")


def _wrap(text: str, width: int) -> list[str]:
    out, line = [], ""
    for word in text.split():
        if line and len(line) + 1 + len(word) > width:
            out.append(line)
            line = word
        else:
            line = f"{line} {word}".strip()
    return out + ([line] if line else [])
