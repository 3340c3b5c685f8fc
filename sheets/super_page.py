"""Superelevation diagram pages: the panels of
:func:`gradeline.present.super_diagram.super_panels` drawn six to a sheet.

Each panel is a chart, not a drawing to scale: stations across, the cross slope of
each lane (percent, outward from the centreline) up. Draws, computes nothing.
"""

from __future__ import annotations

from gradeline.present.roles import Role
from gradeline.present.super_diagram import SuperPanel
from gradeline.sheets import fonts
from gradeline.sheets.layout import SheetGeometry, Viewport
from gradeline.sheets.pens import style

__all__ = ["PANELS_PER_PAGE", "panel_boxes", "draw_super_page"]

PANELS_PER_PAGE = 6
_COLUMNS = 2


def panel_boxes(geo: SheetGeometry) -> list[Viewport]:
    """Where the panels of one page sit, left to right, top to bottom."""
    ts = geo.text
    b, t = geo.border, geo.title
    x0, x1 = b.x + 2 * ts, b.x + b.w - 2 * ts
    y0, y1 = t.y + t.h + 2 * ts, b.y + b.h - 2 * ts
    rows = PANELS_PER_PAGE // _COLUMNS
    gap = 3 * ts
    w = (x1 - x0 - (_COLUMNS - 1) * gap) / _COLUMNS
    h = (y1 - y0 - (rows - 1) * gap) / rows
    return [
        Viewport(x0 + col * (w + gap), y1 - (row + 1) * h - row * gap, w, h)
        for row in range(rows)
        for col in range(_COLUMNS)
    ]


def plot_area(box: Viewport, ts: float) -> Viewport:
    """The chart inside a panel: room for the title above, the slope values to the
    left and the station labels below."""
    left, below, above = 5.0 * ts, 9.0 * ts, 2.2 * ts
    return Viewport(box.x + left, box.y + below, box.w - left - ts, box.h - below - above)


def draw_super_page(c, geo: SheetGeometry, panels: list[SuperPanel]) -> None:
    """Up to :data:`PANELS_PER_PAGE` panels on the current page."""
    ts, f = geo.text, geo.factor
    for box, p in zip(panel_boxes(geo), panels, strict=False):
        area = plot_area(box, ts)

        def sx(s: float, p: SuperPanel = p, area: Viewport = area) -> float:
            return area.x + (s - p.first) / (p.last - p.first) * area.w

        def sy(v: float, p: SuperPanel = p, area: Viewport = area) -> float:
            return area.y + (v + p.top) / (2 * p.top) * area.h

        c.setFillColorRGB(0, 0, 0)
        fonts.draw(c, box.x, box.y + box.h - 1.2 * ts, p.title, 1.1 * ts, bold=True)
        legend = "LEFT LANE solid, RIGHT LANE dashed"
        fonts.draw(c, box.x + box.w, box.y + box.h - 1.2 * ts, legend, 0.8 * ts, align="right")
        v = -p.top
        while v <= p.top + 1e-9:
            style(c, Role.SUPER_AXIS if v == 0 else Role.SUPER_GRID, f)
            c.line(area.x, sy(v), area.x + area.w, sy(v))
            c.setFillColorRGB(0, 0, 0)
            fonts.draw(c, area.x - 0.5 * ts, sy(v) - 0.3 * ts, f"{v:+.0f} %" if v else "0 %",
                       0.8 * ts, align="right")  # fmt: skip
            v += 2.0
        for s, text in p.marks:
            style(c, Role.SUPER_GRID, f)
            c.line(sx(s), area.y, sx(s), area.y + area.h)
            c.saveState()
            c.translate(sx(s) + 0.3 * ts, area.y - 0.5 * ts)
            c.rotate(90)
            c.setFillColorRGB(0, 0, 0)
            fonts.draw(c, 0, 0, text, 0.8 * ts, align="right")
            c.restoreState()
        for role, values in ((Role.SUPER_LEFT, p.left), (Role.SUPER_RIGHT, p.right)):
            style(c, role, f)
            path = c.beginPath()
            path.moveTo(sx(p.stations[0]), sy(values[0]))
            for s, val in zip(p.stations[1:], values[1:], strict=True):
                path.lineTo(sx(s), sy(val))
            c.drawPath(path, stroke=1, fill=0)
        c.setFillColorRGB(0, 0, 0)
        fonts.draw(c, sx(p.rate_station), sy(p.top) - 1.1 * ts, f"FULL {p.rate_text}",
                   0.9 * ts, bold=True, align="center")  # fmt: skip
        style(c, Role.SUPER_AXIS, f)
        c.setDash([])
        c.rect(area.x, area.y, area.w, area.h, stroke=1, fill=0)
