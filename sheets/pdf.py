"""PDF plan-and-profile sheets and table pages: the only module that imports reportlab.

It lays out records computed elsewhere -- drafting items from
:mod:`gradeline.present.drafting`, table text from :mod:`gradeline.sheets.tables`, frames and
viewports from :mod:`gradeline.sheets.layout` -- and never computes geometry itself.
"""

from __future__ import annotations

import functools
import io
import math
from dataclasses import dataclass, replace

import numpy as np
from reportlab.pdfgen import canvas as rl_canvas

from gradeline.present import labels
from gradeline.present.items import ArcItem, Circle, Drawing, Path, QuadCurve, Text
from gradeline.present.layout import DraftingLayout, default_layout
from gradeline.present.plan_drawing import plan_drawing
from gradeline.present.roles import ROLE_STYLE, Role
from gradeline.present.super_diagram import super_panels
from gradeline.sheets import fonts, operators, tables
from gradeline.sheets.layout import (
    TABLE_ROW,
    Frame,
    SheetGeometry,
    Viewport,
    clip_polyline,
    model_per_point,
    pack_tables,
    sheet_frames,
    sheet_geometry,
    split_blocks,
    table_capacity,
)
from gradeline.sheets.pens import style
from gradeline.sheets.super_page import PANELS_PER_PAGE, draw_super_page
from gradeline.sheets.views import (
    PaperXform,
    PlacedNote,
    SheetView,
    match_mark_paper,
    plan_layout,
    series_exaggeration,
    sheet_view,
)
from gradeline.solved import SolvedAlignment

__all__ = ["SheetOptions", "page_plan", "render_sheets"]

FONT = "Helvetica"
FONT_BOLD = "Helvetica-Bold"


@dataclass(frozen=True, slots=True)
class SheetOptions:
    """What the title block says and how the sheets are scaled."""

    size: str = "ansi-d"
    scale: float | None = None
    exaggeration: float = 10.0
    interval: float | None = None
    agency: str = ""
    project: str = ""
    project_number: str = ""
    sheet_title: str = ""
    designed_by: str = ""
    drawn_by: str = ""
    checked_by: str = ""
    date: str = ""
    design_speed: str = ""
    sheet_prefix: str = ""
    revisions: tuple[str, ...] = ()


_Xform = PaperXform


def _inside(paper: Text, vp: Viewport) -> bool:
    """Whether the text box lies inside ``vp``."""
    # a quick bound first: the box lies within its reach of its anchor point
    reach = paper.width + paper.height
    x0, y0, x1, y1 = vp.x, vp.y, vp.x + vp.w, vp.y + vp.h
    if x0 + reach < paper.x < x1 - reach and y0 + reach < paper.y < y1 - reach:
        return True
    return _within(paper.corner_points(), (x0, y0, x1, y1))


def _text(c, item: Text, xf: _Xform, vp: Viewport | None) -> None:
    _paper_text(c, xf.text(item), vp)


def _paper_text(c, paper: Text, vp: Viewport | None, bold: bool = False) -> None:
    """Draw a text already on paper, unless it would leave ``vp``."""
    if vp is not None and not _inside(paper, vp):
        return
    size = paper.height
    base = {"bottom": 0.0, "middle": -0.36 * size, "top": -0.72 * size}[paper.valign]
    fonts.draw_turned(
        c, (paper.x, paper.y), paper.rotation, 0.0, base, paper.text, size, bold, paper.halign
    )


def _within(points, box: tuple[float, float, float, float]) -> bool:
    """Whether every point lies in ``box`` (NaN never does)."""
    x0, y0, x1, y1 = box
    return all(x0 <= x <= x1 and y0 <= y <= y1 for x, y in points)


def _draw_items(c, items, xf: _Xform, vp: Viewport, f: float) -> None:
    box = (vp.x, vp.y, vp.x + vp.w, vp.y + vp.h)
    c.saveState()
    p = c.beginPath()
    p.rect(vp.x, vp.y, vp.w, vp.h)
    c.clipPath(p, stroke=0, fill=0)
    for item in items:
        if isinstance(item, Text):
            continue
        style(c, item.role, f)
        if isinstance(item, Path) or isinstance(item, ArcItem):
            model = item.points if isinstance(item, Path) else item.polyline
            paper = [xf(x, y) for x, y in model] if len(model) <= 16 else None
            if paper is not None and _within(paper, box):
                pieces: list = [paper]  # the common case, in plain floats
            else:  # nothing invisible stays in the file
                pieces = clip_polyline(xf.many(model) if paper is None else np.array(paper), vp)
            for piece in pieces:
                operators.polyline(c, piece)
        elif isinstance(item, QuadCurve):
            p0, p1, p2 = (np.array(xf(*q)) for q in item.control)
            c1, c2 = p0 + 2.0 / 3.0 * (p1 - p0), p2 + 2.0 / 3.0 * (p1 - p2)  # exact cubic form
            path = c.beginPath()
            path.moveTo(*p0)
            path.curveTo(*c1, *c2, *p2)
            c.drawPath(path, stroke=1, fill=0)
        elif isinstance(item, Circle):
            x, y = xf(*item.center)
            c.circle(x, y, item.radius * xf.k, stroke=1, fill=0)
    c.restoreState()
    for item in items:
        if isinstance(item, Text):
            style(c, item.role, f)
            _text(c, item, xf, vp)


def _notes(c, notes: tuple[PlacedNote, ...], f: float) -> None:
    for note in notes:
        style(c, "plan_notes", f)
        if note.leader is not None:
            (x0, y0), (x1, y1) = note.leader
            c.setLineWidth(0.5 * max(f, 0.6))
            c.line(x0, y0, x1, y1)
        for text, x, base in note.line_boxes():
            fonts.draw(c, x + 0.1 * note.size, base, text, note.size)
        if note.mark is not None:
            tag, mx, my = note.mark
            fonts.draw(c, mx, my - 0.36 * note.size, tag, note.size, bold=True, align="center")


def _item_boxes(drawing: Drawing) -> np.ndarray:
    """Model-space bounding box of every item (for culling per sheet)."""
    out = np.empty((len(drawing.items), 4))
    for i, it in enumerate(drawing.items):
        if isinstance(it, Text):
            out[i] = it.bounds()
            continue
        if isinstance(it, Path):
            pts = np.asarray(it.points)
        elif isinstance(it, (ArcItem,)):
            pts = np.asarray(it.polyline)
        elif isinstance(it, QuadCurve):
            pts = np.asarray(it.control)
        else:
            pts = np.array(
                [
                    [it.center[0] - it.radius, it.center[1] - it.radius],
                    [it.center[0] + it.radius, it.center[1] + it.radius],
                ]
            )
        out[i] = (pts[:, 0].min(), pts[:, 1].min(), pts[:, 0].max(), pts[:, 1].max())
    return out


@dataclass(frozen=True)
class PagePlan:
    """What the document will hold, computed before drawing (and by tests)."""

    frames: list[Frame]
    tables: list[tables.TextTable]
    table_pages: list[list[tuple[int, int, int, int]]]  # per page: table, rows, blocks
    super_panels: tuple = ()  # superelevation diagram panels, six a page

    @property
    def super_pages(self) -> int:
        """Pages of the superelevation diagram."""
        return -(-len(self.super_panels) // PANELS_PER_PAGE)

    @property
    def pages(self) -> int:
        """Total page count."""
        return len(self.frames) + len(self.table_pages) + self.super_pages


def _layout(ctx: SolvedAlignment, opts: SheetOptions) -> DraftingLayout:
    """The drafting layout of the sheets: labels scale with the sheet like its furniture
    (a half-size sheet has 0.7 of the full-size text, as ``SheetGeometry.text``)."""
    lay = default_layout(ctx.document.units, opts.scale, opts.exaggeration)
    factor = sheet_geometry(opts.size).factor
    return replace(lay, text_paper=lay.text_paper * min(1.0, max(factor, 0.7)))


def page_plan(ctx: SolvedAlignment, opts: SheetOptions) -> PagePlan:
    """Sheets and table pages of the document, without drawing anything."""
    geo = sheet_geometry(opts.size)
    lay = _layout(ctx, opts)
    start = min(ctx.start, ctx.horizontal.start if ctx.horizontal else ctx.start)
    end = max(ctx.end, ctx.horizontal.end if ctx.horizontal else ctx.end)
    frames = sheet_frames(start, end, geo, lay)
    interval = opts.interval or ctx.document.units.defaults.table_interval
    tabs = []
    if ctx.horizontal is not None:
        tabs.append(tables.horizontal_curve_table(ctx))
        tabs.append(tables.tangent_table(ctx))
        if ctx.alignment.superelevations:
            tabs.append(tables.superelevation_table(ctx))
    if ctx.geometry is not None:
        tabs.append(tables.vertical_curve_table(ctx))
        tabs.append(tables.station_table(ctx, interval))
    else:  # plan only: the sheets show the plan, the tables its coordinates
        tabs.append(tables.plan_station_table(ctx, interval))
    blocks = [table_blocks(tab, geo) for tab in tabs]
    capacity = table_capacity(geo, TABLE_ROW * geo.text)
    pages = pack_tables([len(tab.rows) for tab in tabs], capacity, blocks)
    panels = super_panels(ctx) if ctx.horizontal is not None else ()
    return PagePlan(frames, tabs, pages, panels)


@functools.lru_cache(maxsize=32)
def _column_widths(tab: tables.TextTable, ts: float) -> tuple[float, ...]:
    """Each column's natural width on the paper: its widest cell, plus padding.

    Only the longest cells of a column are measured (widths grow with length in
    these fonts closely enough to find the widest among the 12 longest).
    """
    out = []
    for j in range(len(tab.header)):
        w = fonts.text_width(tab.header[j], 0.9 * ts, True)
        longest = sorted({row[j] for row in tab.rows}, key=len, reverse=True)[:12]
        for cell in longest:
            w = max(w, fonts.text_width(cell, 0.9 * ts))
        out.append(w + 1.6 * ts)
    return tuple(out)


def table_blocks(tab: tables.TextTable, geo: SheetGeometry) -> int:
    """How many blocks of ``tab`` stand side by side across the page (at most 4)."""
    ts = geo.text
    natural = sum(_column_widths(tab, ts))
    width = geo.border.w - 4 * ts
    return max(1, min(4, int((width + 3 * ts) // (natural * 1.25 + 3 * ts))))


#: Title-block cells: name and share of the band's width, left to right.
TITLE_CELLS = (
    ("PROJECT", 0.17),
    ("SHEET", 0.13),
    ("SCALES", 0.14),
    ("LEGEND", 0.11),
    ("BY", 0.12),
    ("REVISIONS", 0.10),
    ("NOTE", 0.11),
    ("SEAL", 0.06),
    ("NUMBER", 0.06),
)


def title_cells(geo: SheetGeometry) -> dict[str, Viewport]:
    """Each title-block cell on the paper."""
    t = geo.title
    out, x = {}, t.x
    for name, frac in TITLE_CELLS:
        out[name] = Viewport(x, t.y, t.w * frac, t.h)
        x += t.w * frac
    return out


def _cell_lines(
    c, cell: Viewport, ts: float, caption: str, lines: list[tuple[str, bool]], size: float
) -> None:
    """A caption, then ``lines`` (text, bold) wrapped to the cell, shrunk until they fit."""
    c.setFillColorRGB(0, 0, 0)
    c.setFont(FONT, 0.7 * ts)
    c.drawString(cell.x + 0.4 * ts, cell.y + cell.h - 1.0 * ts, caption)
    avail_w, avail_h = cell.w - 0.8 * ts, cell.h - 1.8 * ts
    while True:
        wrapped = [(w, bold) for text, bold in lines for w in _wrap(text, bold, size, avail_w)]
        if len(wrapped) * 1.2 * size <= avail_h or size <= 0.45 * ts:
            break
        size *= 0.9
    y = cell.y + cell.h - 1.6 * ts - size
    for text, bold in wrapped[: max(1, int(avail_h // (1.2 * size)))]:
        fonts.draw(c, cell.x + 0.4 * ts, y, text, size, bold)
        y -= 1.2 * size


def _title_block(
    c,
    geo: SheetGeometry,
    ctx: SolvedAlignment,
    opts: SheetOptions,
    page: int,
    total: int,
    scales: list[str],
    sheet_title: str,
    legend: bool,
) -> None:
    f, ts = geo.factor, geo.text
    t = geo.title
    style(c, "frame", f)
    c.rect(geo.border.x, geo.border.y, geo.border.w, geo.border.h, stroke=1, fill=0)
    c.rect(t.x, t.y, t.w, t.h, stroke=1, fill=0)
    cells = title_cells(geo)
    for cell in cells.values():
        style(c, "frame", f)
        c.rect(cell.x, cell.y, cell.w, cell.h, stroke=1, fill=0)
    project = [(opts.agency, True), (opts.project or ctx.document.project, False)]
    if opts.project_number:
        project.append((f"PROJECT NO. {opts.project_number}", False))
    _cell_lines(c, cells["PROJECT"], ts, "AGENCY / PROJECT", [p for p in project if p[0]], ts)
    _cell_lines(
        c,
        cells["SHEET"],
        ts,
        "SHEET TITLE / ALIGNMENT",
        [(opts.sheet_title or sheet_title, True), (ctx.alignment.name, False)],
        1.1 * ts,
    )
    _cell_lines(c, cells["SCALES"], ts, "SCALES", [(s, False) for s in scales], 0.9 * ts)
    people = [
        ("DESIGNED", opts.designed_by),
        ("DRAWN", opts.drawn_by),
        ("CHECKED", opts.checked_by),
        ("DATE", opts.date),
        ("DESIGN SPEED", opts.design_speed),
    ]
    _cell_lines(c, cells["BY"], ts, "PREPARED", [(f"{k}: {v}", False) for k, v in people], 0.8 * ts)
    _cell_lines(
        c, cells["REVISIONS"], ts, "REVISIONS", [(r, False) for r in opts.revisions], 0.8 * ts
    )
    _cell_lines(c, cells["NOTE"], ts, "NOTE", [(labels.CAUTION, False)], 0.8 * ts)
    _cell_lines(c, cells["SEAL"], ts, "SEAL", [], ts)
    _cell_lines(
        c, cells["NUMBER"], ts, "SHEET", [(f"{opts.sheet_prefix}{page} OF {total}", True)], 1.3 * ts
    )
    if legend:
        _legend(c, cells["LEGEND"], geo, ctx)
    else:
        _cell_lines(c, cells["LEGEND"], ts, "LEGEND", [], ts)


def _legend(c, cell: Viewport, geo: SheetGeometry, ctx: SolvedAlignment) -> None:
    """A line sample and the words for each line a profile view draws."""
    ts, f = geo.text, geo.factor
    _cell_lines(c, cell, ts, "LEGEND", [], ts)
    entries = [(r, w) for r, w in labels.PROFILE_LEGEND if r != "ground" or ctx.alignment.grounds]
    if ctx.geometry is None:
        entries = [("plan", labels.PLAN_LEGEND)]
    size = 0.75 * ts
    y = cell.y + cell.h - 2.0 * ts
    for role, words in entries:
        style(c, role, f)
        c.line(cell.x + 0.4 * ts, y, cell.x + 2.6 * ts, y)
        c.setDash([])
        c.setFillColorRGB(0, 0, 0)
        fonts.draw(c, cell.x + 3.0 * ts, y - 0.3 * size, words, size)
        y -= 1.4 * size


def _wrap(text: str, bold: bool, size: float, width: float) -> list[str]:
    words, lines, line = text.split(), [], ""
    for w in words:
        trial = f"{line} {w}".strip()
        if fonts.text_width(trial, size, bold) <= width or not line:
            line = trial
        else:
            lines.append(line)
            line = w
    return lines + ([line] if line else [])


def _scale_bars(c, geo: SheetGeometry, ctx: SolvedAlignment, lay: DraftingLayout) -> None:
    """Graphic scales at the bottom of the title block's SCALES cell, sized to fit it."""
    f, ts = geo.factor, geo.text
    cell = title_cells(geo)["SCALES"]
    per_pt = model_per_point(lay)
    x, y = cell.x + 0.6 * ts, cell.y + 0.8 * ts
    unit = ctx.document.units.symbol
    length = lay.station_major
    room = cell.w - 1.2 * ts - (9.5 * ts if ctx.geometry is not None else 0.0)
    while length / per_pt > room and length > 1e-6:
        length /= 2
    w = length / per_pt
    style(c, "frame", f)
    c.setLineWidth(0.6)
    for k in range(4):
        c.setFillColorRGB(*((0, 0, 0) if k % 2 == 0 else (1, 1, 1)))
        c.rect(x + k * w / 4, y, w / 4, 0.35 * ts, stroke=1, fill=1)
    c.setFillColorRGB(0, 0, 0)
    size = 0.65 * ts
    fonts.draw(c, x, y + 0.6 * ts, "0", size)
    fonts.draw(c, x + w, y + 0.6 * ts, f"{length:g} {unit} HORIZONTAL", size, align="right")
    if ctx.geometry is None:  # plan only: no vertical scale to show
        return
    zstep, _ = lay.elevation_steps()
    while zstep * lay.exaggeration / per_pt > 0.4 * cell.h and zstep > 1e-6:
        zstep /= 2
    hv = zstep * lay.exaggeration / per_pt
    vx = x + w + 1.5 * ts
    for k in range(2):
        c.setFillColorRGB(*((0, 0, 0) if k % 2 == 0 else (1, 1, 1)))
        c.rect(vx, y + k * hv / 2, 0.35 * ts, hv / 2, stroke=1, fill=1)
    c.setFillColorRGB(0, 0, 0)
    fonts.draw(c, vx + 0.7 * ts, y, f"{zstep:g} {unit} VERTICAL", size)


def _north_arrow(c, geo: SheetGeometry, angle: float) -> None:
    """North arrow in the plan view's corner; ``angle`` is the view rotation (radians)."""
    ts = geo.text
    vp = geo.plan
    cx, cy = vp.x + vp.w - 3 * ts, vp.y + vp.h - 3.5 * ts
    # north (model +y) on paper after rotating the view by -angle
    nx, ny = math.sin(angle), math.cos(angle)
    r = 2.2 * ts
    style(c, "frame", geo.factor)
    c.setDash([])
    c.circle(cx, cy, r, stroke=1, fill=0)
    tip = (cx + nx * r, cy + ny * r)
    left = (cx - ny * 0.45 * r - nx * 0.5 * r, cy + nx * 0.45 * r - ny * 0.5 * r)
    right = (cx + ny * 0.45 * r - nx * 0.5 * r, cy - nx * 0.45 * r - ny * 0.5 * r)
    p = c.beginPath()
    p.moveTo(*tip)
    p.lineTo(*left)
    p.lineTo(cx, cy)
    p.lineTo(*right)
    p.close()
    c.drawPath(p, stroke=1, fill=1)
    c.setFont(FONT_BOLD, ts)
    c.drawCentredString(cx + nx * (r + 0.9 * ts), cy + ny * (r + 0.9 * ts) - 0.36 * ts, "N")


def _plan_reserved(geo: SheetGeometry) -> list[tuple[float, float, float, float]]:
    """Paper the plan view keeps for its own furniture: the title and the north arrow."""
    ts, vp = geo.text, geo.plan
    top = vp.y + vp.h
    return [
        (vp.x, top - 2.2 * ts, vp.x + 5.0 * ts, top),
        (vp.x + vp.w - 6.5 * ts, top - 7.0 * ts, vp.x + vp.w, top),
    ]


def _sheet(
    c,
    ctx,
    opts,
    geo,
    view: SheetView,
    total_frames: int,
    total_pages: int,
    plan: Drawing | None,
    plan_boxes: np.ndarray | None,
) -> None:
    f, ts = geo.factor, geo.text
    frame, prof, used = view.frame, view.profile, view.layout
    per_pt = model_per_point(used)
    h = used.text_height
    st = ctx.stationing
    # -- profile: its own datum and the exaggeration the view chose -----------
    y0 = prof.extents[1] if prof is not None else 0.0
    vp = geo.profile
    xf = _Xform(per_pt, (frame.view_start - 9 * h, y0), (vp.x, vp.y))
    if prof is not None:
        _draw_items(c, prof.items, xf, vp, f)
    else:
        c.setFillColorRGB(0, 0, 0)
        c.setFont(FONT_BOLD, 1.4 * ts)
        c.drawCentredString(vp.cx, vp.cy, labels.NO_PROFILE_NOTE)
    for m, other in ((frame.match_start, frame.number - 1), (frame.match_end, frame.number + 1)):
        if other < 1 or other > total_frames:
            continue
        style(c, "match", f)
        xm, grid_bottom = xf(m, 0.0)  # from the grid's bottom up, clear of the strip
        c.line(xm, max(vp.y, grid_bottom), xm, vp.y + vp.h - 2.2 * ts)
        c.setFont(FONT_BOLD, 0.85 * ts)
        text = labels.match_line_text(st.label(m), other)
        if other < frame.number:
            c.drawString(xm + 0.4 * ts, vp.y + vp.h - 2.0 * ts, text)
        else:
            c.drawRightString(xm - 0.4 * ts, vp.y + vp.h - 2.0 * ts, text)
    # -- plan: the alignment turned to run left to right ----------------------
    pv = view.plan
    if plan is not None and pv is not None and plan_boxes is not None:
        angle, mid = pv.angle, pv.centre
        pvp = geo.plan
        center_x = xf((pv.start + pv.end) / 2, 0.0)[0]
        pxf = _Xform(per_pt, mid, (center_x, pvp.cy), angle)
        size = used.text_height * pxf.k  # plan labels on the paper
        marks = [
            match_mark_paper(m, pxf, geo, frame.number, st.label(m.station), size) for m in pv.marks
        ]
        pv = plan_layout(pv, plan, plan_boxes, pxf, geo, _plan_reserved(geo), marks)
        _draw_items(c, pv.items, pxf, pvp, f)
        _notes(c, pv.notes, f)
        for seg, label in marks:
            style(c, "match", f)
            c.line(*seg)
            c.setFillColorRGB(*ROLE_STYLE[Role.MATCH].rgb)
            _paper_text(c, label, None, bold=True)
        _north_arrow(c, geo, angle)
    style(c, "frame", f)
    c.setDash([])
    for v in (geo.plan, geo.profile):
        c.rect(v.x, v.y, v.w, v.h, stroke=1, fill=0)
    c.setFont(FONT_BOLD, 1.2 * ts)
    c.setFillColorRGB(0, 0, 0)
    c.drawString(geo.plan.x + 0.5 * ts, geo.plan.y + geo.plan.h - 1.6 * ts, "PLAN")
    c.drawString(vp.x + 0.5 * ts, vp.y + vp.h - 1.6 * ts, "PROFILE")
    _title_block(
        c,
        geo,
        ctx,
        opts,
        frame.number,
        total_pages,
        labels.sheet_scale_lines(
            used.scale,
            used.exaggeration if prof is not None else None,
            view.asked_exaggeration,
            ctx.document.units.metric,
        ),
        labels.SHEET_TITLE_PLAN_PROFILE if prof is not None else labels.SHEET_TITLE_PLAN,
        True,
    )
    _scale_bars(c, geo, ctx, used)


def _table_page(c, geo: SheetGeometry, chunks) -> None:
    ts = geo.text
    rh = TABLE_ROW * ts
    b = geo.border
    x_left = b.x + 2 * ts
    page_w = b.w - 4 * ts
    gap = 3 * ts
    top = b.y + b.h - 1.5 * ts
    for tab, first, last, blocks in chunks:
        top -= rh
        c.setFillColorRGB(0, 0, 0)
        title = tab.title + (" (CONTINUED)" if first else "")
        fonts.draw(c, x_left, top + 0.45 * ts, title, 1.2 * ts, bold=True)
        natural = _column_widths(tab, ts)
        k = table_blocks(tab, geo)
        block_w = page_w if k == 1 else (page_w - (k - 1) * gap) / k
        widths = [block_w * w / sum(natural) for w in natural]
        tallest = 0
        for n, (a, z) in enumerate(split_blocks(first, last, blocks)):
            x0 = x_left + n * (block_w + gap)
            _table_block(c, geo, tab, a, z, x0, top, widths)
            tallest = max(tallest, z - a)
        y_end = top - (tallest + 1) * rh
        if not tab.rows:
            c.setFont(FONT, 0.9 * ts)
            c.drawString(x_left + 0.5 * ts, y_end - 1.2 * ts, "(none)")
        top = y_end - 2 * rh


def _table_block(c, geo, tab, first, last, x0, top, widths) -> None:
    """One block: header and rows ``first:last`` from ``top`` down, columns ``widths``."""
    ts = geo.text
    rh = TABLE_ROW * ts
    width = sum(widths)
    xs = [x0]
    for w in widths:
        xs.append(xs[-1] + w)
    rows = [tab.header] + list(tab.rows[first:last])
    style(c, "frame", geo.factor)
    c.setLineWidth(0.5)
    for r, row in enumerate(rows):
        y = top - (r + 1) * rh
        if r == 0:
            c.setFillColorRGB(0.88, 0.90, 0.94)
            c.rect(x0, y, width, rh, stroke=0, fill=1)
            c.setFillColorRGB(0, 0, 0)
        c.line(x0, y, x0 + width, y)
        for j, cell in enumerate(row):
            size = 0.9 * ts
            avail = xs[j + 1] - xs[j] - 0.6 * ts
            while fonts.text_width(cell, size, r == 0) > avail and size > 0.5 * ts:
                size *= 0.92
            fonts.draw(
                c, (xs[j] + xs[j + 1]) / 2, y + 0.55 * ts, cell, size, r == 0, align="center"
            )
    y_end = top - len(rows) * rh
    c.line(x0, top, x0 + width, top)
    for x in xs:
        c.line(x, top, x, y_end)


def render_sheets(ctx: SolvedAlignment, opts: SheetOptions) -> bytes:
    """The whole PDF: plan-and-profile sheets, then curve and station tables.

    Deterministic: reportlab's invariant mode pins dates and document IDs.
    """
    geo = sheet_geometry(opts.size)
    lay = _layout(ctx, opts)
    plan_info = page_plan(ctx, opts)
    total = plan_info.pages
    buf = io.BytesIO()
    c = rl_canvas.Canvas(buf, pagesize=(geo.width, geo.height), invariant=1, pageCompression=1)
    c.setTitle(f"{ctx.alignment.name} - plan and profile")
    c.setAuthor(opts.drawn_by or "gradeline")
    c.setCreator("gradeline")
    c.setSubject(labels.CAUTION)
    plan = plan_drawing(ctx, lay) if ctx.horizontal is not None else None
    boxes = _item_boxes(plan) if plan is not None else None
    used, profiles = series_exaggeration(ctx, lay, geo, plan_info.frames)
    for frame in plan_info.frames:
        view = sheet_view(
            ctx,
            used,
            geo,
            frame,
            len(plan_info.frames),
            profiles.get(frame.number),
            lay.exaggeration,
        )
        _sheet(c, ctx, opts, geo, view, len(plan_info.frames), total, plan, boxes)
        c.showPage()
    page = len(plan_info.frames)
    for chunks in plan_info.table_pages:
        page += 1
        _table_page(c, geo, [(plan_info.tables[i], a, b, k) for i, a, b, k in chunks])
        _title_block(
            c,
            geo,
            ctx,
            opts,
            page,
            total,
            [labels.NO_SCALE],
            labels.SHEET_TITLE_TABLES,
            False,
        )
        c.showPage()
    panels = list(plan_info.super_panels)
    for k in range(plan_info.super_pages):
        page += 1
        draw_super_page(c, geo, panels[k * PANELS_PER_PAGE : (k + 1) * PANELS_PER_PAGE])
        _title_block(
            c, geo, ctx, opts, page, total, [labels.NO_SCALE_DIAGRAM],
            labels.SHEET_TITLE_SUPER, False,
        )  # fmt: skip
        c.showPage()
    c.save()
    return buf.getvalue()
