"""What each sheet shows, decided before anything is drawn.

For the whole sheet series: one vertical exaggeration (the asked one, or the
largest of its fractions that fits every window). For every frame: the profile
drawing of its window, and the plan view's rotation, transform, the plan items
it shows, its match-line marks and the place of every curve-data note on the
paper. :mod:`gradeline.sheets.pdf` only draws these; it never evaluates geometry
or chooses a position itself.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, replace

import numpy as np

from gradeline.present import drafting, labels
from gradeline.present.items import ArcItem, Drawing, Item, Path, Text, boxes_overlap
from gradeline.present.layout import DraftingLayout
from gradeline.present.plan_drawing import CurveNote
from gradeline.sheets import fonts
from gradeline.sheets.layout import (
    Frame,
    SheetGeometry,
    Viewport,
    model_per_point,
    segments_meet,
)
from gradeline.solved import SolvedAlignment

__all__ = [
    "MatchMark",
    "PaperXform",
    "PlacedNote",
    "PlanView",
    "SheetView",
    "match_mark_paper",
    "plan_layout",
    "series_exaggeration",
    "sheet_view",
]

#: Text size of curve-data notes relative to the sheet text, and their line pitch.
NOTE_PITCH = 1.45


#: Up to this many points, :meth:`PaperXform.many` works in plain floats (numpy's
#: per-call cost dominates; the operations, and so the results, are the same).
_FEW = 16


class PaperXform:
    """Model -> paper: optional rotation about a model point, then scale and shift."""

    def __init__(
        self,
        per_pt: float,
        origin: tuple[float, float],
        target: tuple[float, float],
        angle: float = 0.0,
    ) -> None:
        self.k = 1.0 / per_pt
        self.ox, self.oy = origin
        self.tx, self.ty = target
        self.c, self.s = math.cos(-angle), math.sin(-angle)
        self.angle_deg = -math.degrees(angle)

    def __call__(self, x: float, y: float) -> tuple[float, float]:
        dx, dy = x - self.ox, y - self.oy
        return (
            self.tx + self.k * (self.c * dx - self.s * dy),
            self.ty + self.k * (self.s * dx + self.c * dy),
        )

    def many(self, pts) -> np.ndarray:
        if len(pts) <= _FEW and not isinstance(pts, np.ndarray):
            return np.array([self(x, y) for x, y in pts], dtype=float).reshape(-1, 2)
        a = np.asarray(pts, dtype=float).reshape(-1, 2)
        dx, dy = a[:, 0] - self.ox, a[:, 1] - self.oy
        out = np.empty_like(a)
        out[:, 0] = self.tx + self.k * (self.c * dx - self.s * dy)
        out[:, 1] = self.ty + self.k * (self.s * dx + self.c * dy)
        return out

    def text(self, item: Text) -> Text:
        """``item`` on paper, turned so it never reads upside down."""
        x, y = self(item.x, item.y)
        rot = item.rotation + self.angle_deg
        halign, valign = item.halign, item.valign
        a = (rot + 180.0) % 360.0 - 180.0
        if a > 90.0 or a <= -90.0:
            rot = a + (-180.0 if a > 90.0 else 180.0)
            halign = {"left": "right", "right": "left"}.get(halign, halign)
            valign = {"bottom": "top", "top": "bottom"}.get(valign, valign)
        return Text(item.role, item.text, x, y, item.height * self.k, rot, halign, valign)


@dataclass(frozen=True, slots=True)
class MatchMark:
    """A match line on the plan: its station, the sheet it leads to, and where it sits."""

    station: float
    other_sheet: int
    easting: float
    northing: float
    heading: float  # radians, math angle


@dataclass(frozen=True, slots=True)
class PlacedNote:
    """A curve-data note on the paper: its lines from the top, its box and its pointer.

    ``leader`` runs from the box to the PI; where the note had to go further
    away, ``mark`` is a reference tag at the PI (text, x, y) instead. A note
    with no room on the sheet has no lines and only the tag, which points to
    the curve table.
    """

    number: int
    lines: tuple[str, ...]
    x: float  # left
    top: float
    size: float
    width: float
    height: float
    leader: tuple[tuple[float, float], tuple[float, float]] | None
    mark: tuple[str, float, float] | None

    def line_boxes(self) -> list[tuple[str, float, float]]:
        """(text, x, baseline) of each line."""
        pitch = NOTE_PITCH * self.size
        return [
            (t, self.x, self.top - (i + 1) * pitch + 0.35 * self.size)
            for i, t in enumerate(self.lines)
        ]


@dataclass(frozen=True, slots=True)
class PlanView:
    """How the plan is shown on one sheet: the chord between the match stations runs
    left to right."""

    start: float  # match stations clamped to the plan
    end: float
    angle: float  # radians: the rotation that makes the chord horizontal
    centre: tuple[float, float]  # model (easting, northing) at the view's centre
    marks: tuple[MatchMark, ...]
    span: tuple[float, float] = (-math.inf, math.inf)  # stations between the match lines
    xform: PaperXform | None = None
    items: tuple[Item, ...] = ()
    notes: tuple[PlacedNote, ...] = ()


@dataclass(frozen=True, slots=True)
class SheetView:
    """Everything one plan-and-profile sheet shows."""

    frame: Frame
    profile: Drawing | None  # None for a plan-only alignment
    layout: DraftingLayout  # with the exaggeration used on this sheet
    plan: PlanView | None
    asked_exaggeration: float = 0.0


#: Fractions of the asked exaggeration tried in turn when a window's profile is
#: too tall for the profile view; one is chosen for the whole sheet series.
_EXAGGERATION_DIVISORS = (1, 2, 2.5, 5, 10)


def _fits(height: float, lay: DraftingLayout, geo: SheetGeometry) -> bool:
    return height / model_per_point(lay) <= geo.profile.h - 2.5 * geo.text


def series_exaggeration(
    ctx: SolvedAlignment, lay: DraftingLayout, geo: SheetGeometry, frames: list[Frame]
) -> tuple[DraftingLayout, dict[int, Drawing]]:
    """The one exaggeration of the sheet series and, drafted at it, each window's profile.

    Each window has its own datum (the grid is renumbered), so only a window whose
    elevation range is taller than the profile view at the asked exaggeration
    lowers it, for every sheet alike. A window is measured before it is drafted
    (:meth:`~gradeline.present.drafting.ProfileDraft.prepare`): each profile is
    drawn once, at the exaggeration chosen.
    """
    if ctx.geometry is None:
        return lay, {}
    drafts: dict[int, drafting.ProfileDraft] = {}
    used = lay
    memos: dict[int, dict] = {fr.number: {} for fr in frames}  # kept from one try to the next

    def draft(fr: Frame) -> drafting.ProfileDraft:
        window = (fr.view_start, fr.view_end)
        d = drafting.ProfileDraft(ctx, used, "spline", window, True, memos[fr.number])
        d.prepare()
        return d

    for divisor in _EXAGGERATION_DIVISORS:
        exag = lay.exaggeration / divisor
        if divisor > 1 and exag < 1:
            break
        used = replace(lay, exaggeration=exag)
        drafts = {}
        for fr in frames:
            drafts[fr.number] = d = draft(fr)
            if not _fits(d.height(), used, geo) and exag > 1:
                break
        else:
            break
    for fr in frames:  # the smallest tried: draw what does not fit, clipped
        if fr.number not in drafts:
            drafts[fr.number] = draft(fr)
    return used, {n: d.finish() for n, d in drafts.items()}


def _plan(ctx: SolvedAlignment, frame: Frame, total_frames: int) -> PlanView | None:
    hz = ctx.horizontal
    if hz is None:
        return None
    a = min(max(frame.match_start, hz.start), hz.end)
    b = min(max(frame.match_end, hz.start), hz.end)
    (na, nb), (ea, eb), _ = ctx.plan_at([a, b])
    angle = math.atan2(nb - na, eb - ea)
    marks = []
    for m, other in ((frame.match_start, frame.number - 1), (frame.match_end, frame.number + 1)):
        if other < 1 or other > total_frames or not (hz.start <= m <= hz.end):
            continue
        n_, e_, hd = (float(v) for v in ctx.plan_at(m))
        marks.append(MatchMark(m, other, e_, n_, hd))
    first = -math.inf if frame.first else frame.match_start
    last = math.inf if frame.number == total_frames else frame.match_end
    return PlanView(a, b, angle, ((ea + eb) / 2, (na + nb) / 2), tuple(marks), (first, last))


# -- obstacles on the paper ---------------------------------------------------------
def _segments(items, xf: PaperXform) -> np.ndarray:
    """(n, 4) paper segments x0 y0 x1 y1 of every line item."""
    parts = []
    for it in items:
        if isinstance(it, Path):
            pts = it.points
        elif isinstance(it, ArcItem):
            pts = it.polyline
        else:
            continue
        p = xf.many(pts)
        if len(p) >= 2:
            parts.append(np.hstack([p[:-1], p[1:]]))
    return np.vstack(parts) if parts else np.zeros((0, 4))


class _Segments:
    """Paper segments (n, 4) with their extents kept, for many box tests."""

    def __init__(self, seg: np.ndarray) -> None:
        self.seg = seg
        self.xmax = np.maximum(seg[:, 0], seg[:, 2])
        self.xmin = np.minimum(seg[:, 0], seg[:, 2])
        self.ymax = np.maximum(seg[:, 1], seg[:, 3])
        self.ymin = np.minimum(seg[:, 1], seg[:, 3])

    def hit(self, box: tuple[float, float, float, float]) -> bool:
        """True when any segment meets the axis-aligned ``box``."""
        if not len(self.seg):
            return False
        x0, y0, x1, y1 = box
        near = ~((self.xmax < x0) | (self.xmin > x1) | (self.ymax < y0) | (self.ymin > y1))
        return bool(near.any() and segments_meet(self.seg[near], box))


def _extent(box: np.ndarray) -> tuple[float, float, float, float]:
    """x0, y0, x1, y1 of a corner array (NaN as numpy's min and max give it)."""
    lo, hi = box.min(axis=0).tolist(), box.max(axis=0).tolist()
    return lo[0], lo[1], hi[0], hi[1]


def _rect_corners(x0: float, y0: float, x1: float, y1: float) -> np.ndarray:
    return np.array([[x0, y0], [x1, y0], [x1, y1], [x0, y1]])


class _Room:
    """What is already on the plan view's paper, and whether a box is free of it."""

    def __init__(self, vp: Viewport, segments: np.ndarray, boxes: list[np.ndarray], gap: float):
        self.vp = vp
        self.segments = _Segments(segments)
        self.boxes = list(boxes)
        self.bounds = [_extent(b) for b in self.boxes]
        self.gap = gap

    def free(self, box: tuple[float, float, float, float]) -> bool:
        x0, y0, x1, y1 = box
        g = self.gap
        vp = self.vp
        if x0 < vp.x + g or y0 < vp.y + g or x1 > vp.x + vp.w - g or y1 > vp.y + vp.h - g:
            return False
        grown = (x0 - g, y0 - g, x1 + g, y1 + g)
        if self.segments.hit(grown):
            return False
        corners = _rect_corners(*grown)
        for b, (bx0, by0, bx1, by1) in zip(self.boxes, self.bounds, strict=True):
            if (
                bx1 >= grown[0]
                and bx0 <= grown[2]
                and by1 >= grown[1]
                and by0 <= grown[3]
                and boxes_overlap(corners, b)
            ):
                return False
        return True

    def take(self, box: tuple[float, float, float, float]) -> None:
        corners = _rect_corners(*box)
        self.boxes.append(corners)
        self.bounds.append(_extent(corners))


def _place_note(note: CurveNote, xf: PaperXform, room: _Room, size: float) -> PlacedNote | None:
    """Put ``note`` near its PI, clear of everything; farther with a tag; or tag only."""
    px, py = xf(*note.pi)
    vp = room.vp
    if not (vp.x <= px <= vp.x + vp.w and vp.y <= py <= vp.y + vp.h):
        px, py = xf(*note.middle)  # the PI lies off the view: point to the curve itself
    width = max(fonts.text_width(t, size) for t in note.lines) + 0.2 * size
    height = len(note.lines) * NOTE_PITCH * size + 0.3 * size
    # the outward direction on the paper first, then turning away from it
    ux, uy = note.outward
    a0 = math.atan2(xf.s * ux + xf.c * uy, xf.c * ux - xf.s * uy)
    turns = [0.0]
    for k in range(1, 9):
        turns += [k * math.pi / 8, -k * math.pi / 8]
    for r in (1.5, 3.0, 5.0, 8.0, 12.0, 18.0):
        for t in turns:
            a = a0 + t
            cx, cy = px + r * size * math.cos(a), py + r * size * math.sin(a)
            # the box corner nearest the PI sits at the candidate point
            x0 = cx if math.cos(a) >= 0 else cx - width
            y0 = cy if math.sin(a) >= 0 else cy - height
            box = (x0, y0, x0 + width, y0 + height)
            if room.free(box):
                room.take(box)
                ex = min(max(px, x0), x0 + width)
                ey = min(max(py, y0), y0 + height)
                return PlacedNote(
                    note.number,
                    note.lines,
                    x0,
                    y0 + height,
                    size,
                    width,
                    height,
                    ((ex, ey), (px, py)),
                    None,
                )
    tag = labels.curve_tag(note.number)
    tag_w = fonts.text_width(tag, size)
    tag_box = None
    for r in (1.0, 2.0, 3.0, 5.0, 8.0):
        for t in turns:
            a = a0 + t
            cx, cy = px + r * size * math.cos(a), py + r * size * math.sin(a)
            box = (cx - tag_w / 2, cy - 0.5 * size, cx + tag_w / 2, cy + 0.7 * size)
            if room.free(box):
                tag_box = box
                break
        if tag_box is not None:
            break
    if tag_box is None:  # not even a tag fits: the note stands apart without one
        tag_box = (px, py, px, py)
    else:
        room.take(tag_box)
    mark = (tag, (tag_box[0] + tag_box[2]) / 2, tag_box[1] + 0.5 * size)
    step = 1.5 * size
    for y0 in np.arange(vp.y + vp.h - height - step, vp.y, -step):
        for x0 in np.arange(vp.x + step, vp.x + vp.w - width, step):
            box = (float(x0), float(y0), float(x0) + width, float(y0) + height)
            if room.free(box):
                room.take(box)
                lines = (f"{note.lines[0]} ({tag})",) + note.lines[1:]
                return PlacedNote(
                    note.number, lines, box[0], box[3], size, width, height, None, mark
                )
    return PlacedNote(
        note.number,
        (),
        0.0,
        0.0,
        size,
        0.0,
        0.0,
        None,
        (labels.curve_table_tag(note.number), mark[1], mark[2]),
    )


def match_mark_paper(
    mark: MatchMark,
    xf: PaperXform,
    geo: SheetGeometry,
    sheet: int,
    station_label: str,
    label_size: float = 0.0,
) -> tuple[tuple[float, float, float, float], Text]:
    """A plan match line on the paper (x0, y0, x1, y1) and its label, beside the line."""
    ts = geo.text
    px, py = xf(mark.easting, mark.northing)
    da = math.radians(math.degrees(mark.heading) + xf.angle_deg)
    dx, dy = -math.sin(da), math.cos(da)  # across the alignment
    span = geo.plan.h * 0.42
    seg = (px - dx * span, py - dy * span, px + dx * span, py + dy * span)
    rot = math.degrees(math.atan2(dy, dx))
    if rot > 90.0 or rot <= -90.0:  # read from below or from the right, never upside down
        rot += -180.0 if rot > 90.0 else 180.0
        dx, dy = -dx, -dy
    # along the line from its upper end, on the side of this sheet's own plan
    ax, ay = px + dx * span, py + dy * span
    nx, ny = -math.sin(math.radians(rot)), math.cos(math.radians(rot))  # left of the text
    ahead = 1.0 if mark.other_sheet < sheet else -1.0  # where this sheet's plan lies
    toward = 1.0 if ahead * (nx * math.cos(da) + ny * math.sin(da)) > 0 else -1.0
    text = labels.match_line_text(station_label, mark.other_sheet)
    size = 0.85 * ts
    room = span - 1.5 * ts - label_size  # along the line, short of the alignment
    while fonts.text_width(text, size, True) > room and size > 0.5 * ts:
        size *= 0.9
    # beside the line, clear of a station label that sits across the alignment there
    off = toward * (0.45 * ts + 0.5 * label_size)
    label = Text(
        "match",
        text,
        ax + nx * off,
        ay + ny * off,
        size,
        rot,
        "right",
        "bottom" if toward > 0 else "top",
    )
    return seg, label


def plan_layout(
    view: PlanView,
    plan: Drawing,
    boxes: np.ndarray,
    xf: PaperXform,
    geo: SheetGeometry,
    reserved: list[tuple[float, float, float, float]],
    marks: list[tuple[tuple[float, float, float, float], Text]] = (),  # type: ignore[assignment]
) -> PlanView:
    """The plan items near this sheet, and every curve note placed on the paper."""
    vp = geo.plan
    per_pt = 1.0 / xf.k
    reach = math.hypot(vp.w, vp.h) * per_pt
    mid = view.centre
    near = (
        (boxes[:, 2] >= mid[0] - reach)
        & (boxes[:, 0] <= mid[0] + reach)
        & (boxes[:, 3] >= mid[1] - reach)
        & (boxes[:, 1] <= mid[1] + reach)
    )
    # curve notes are placed on the paper below, not where the model-space drawing has them
    items = tuple(
        it
        for it in (plan.items[i] for i in np.flatnonzero(near))
        if not (isinstance(it, Text) and it.role == "plan_notes")
    )
    line_items = [it for it in items if not isinstance(it, Text)]
    segs = _segments(line_items, xf)
    texts = []
    for it in items:
        if isinstance(it, Text):
            box = xf.text(it).corners()
            if (
                box[:, 0].min() >= vp.x
                and box[:, 0].max() <= vp.x + vp.w
                and (box[:, 1].min() >= vp.y and box[:, 1].max() <= vp.y + vp.h)
            ):
                texts.append(box)
    if marks:
        segs = np.vstack([segs, np.array([m[0] for m in marks])])
        texts += [m[1].corners() for m in marks]
    room = _Room(vp, segs, texts + [_rect_corners(*r) for r in reserved], 0.4 * geo.text)
    size = 0.9 * geo.text
    placed = []
    for note in plan.meta.get("notes", ()):
        first, last = view.span
        if not first <= note.station < last:
            continue  # another sheet of the series carries it
        p = _place_note(note, xf, room, size)
        if p is not None:
            placed.append(p)
    return replace(view, xform=xf, items=items, notes=tuple(placed))


def sheet_view(
    ctx: SolvedAlignment,
    lay: DraftingLayout,
    geo: SheetGeometry,
    frame: Frame,
    total_frames: int,
    profile: Drawing | None = None,
    asked_exaggeration: float = 0.0,
) -> SheetView:
    """The profile drawing and plan view of one sheet (``lay`` has the series exaggeration;
    ``asked_exaggeration`` is the one asked for, which the title block compares)."""
    plan = _plan(ctx, frame, total_frames)
    if ctx.geometry is None:
        return SheetView(frame, None, lay, plan, asked_exaggeration)
    if profile is None:
        profile = drafting.profile_drawing(
            ctx, lay, window=(frame.view_start, frame.view_end), strip=True
        )
    return SheetView(frame, profile, lay, plan, asked_exaggeration)
