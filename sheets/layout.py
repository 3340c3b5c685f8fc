"""Sheet layout engine: paper, viewports and the sheet series, as pure functions.

Everything is in PDF points (1/72 in) on paper and in file units in the model.
Nothing here draws; :mod:`gradeline.sheets.pdf` uses these numbers, and tests check them
without rendering anything.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from gradeline.errors import UsageError
from gradeline.present.layout import DraftingLayout

__all__ = [
    "PAPER_SIZES",
    "TABLE_ROW",
    "Frame",
    "SheetGeometry",
    "Viewport",
    "clip_segments",
    "clip_polyline",
    "sheet_frames",
    "sheet_geometry",
    "pack_tables",
    "split_blocks",
    "table_capacity",
]

POINT_M = 0.0254 / 72.0  # one PDF point in metres

#: Paper sizes (width, height) in points, landscape (common practice: ANSI D full
#: size, ANSI B half size; ISO A1 and A3 in metric work).
PAPER_SIZES: dict[str, tuple[float, float]] = {
    "ansi-d": (34 * 72.0, 22 * 72.0),
    "ansi-b": (17 * 72.0, 11 * 72.0),
    "iso-a1": (841 / 25.4 * 72.0, 594 / 25.4 * 72.0),
    "iso-a3": (420 / 25.4 * 72.0, 297 / 25.4 * 72.0),
}


@dataclass(frozen=True, slots=True)
class Viewport:
    """A rectangle on the sheet, in points."""

    x: float
    y: float
    w: float
    h: float

    @property
    def cx(self) -> float:
        """Centre x."""
        return self.x + self.w / 2

    @property
    def cy(self) -> float:
        """Centre y."""
        return self.y + self.h / 2


def clip_segments(
    seg: np.ndarray, box: tuple[float, float, float, float]
) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Liang-Barsky clipping of (n, 4) segments x0 y0 x1 y1 to the axis-aligned ``box``.

    Returns the parameters t0, t1 of each segment's part inside the box and a mask
    of the segments that have one.

    Examples
    --------
    >>> t0, t1, inside = clip_segments(np.array([[-1.0, 0.5, 3.0, 0.5]]), (0, 0, 1, 1))
    >>> t0.tolist(), t1.tolist(), inside.tolist()
    ([0.25], [0.5], [True])
    """
    if len(seg) <= 8:
        try:
            return _clip_few(seg, box)
        except (OverflowError, ZeroDivisionError):
            pass  # absurd coordinates: numpy's rules (inf, nan) below
    x0, y0, x1, y1 = box
    sx0, sy0, sx1, sy1 = seg.T
    dx, dy = sx1 - sx0, sy1 - sy0
    t0, t1 = np.zeros(len(seg)), np.ones(len(seg))
    outside = np.zeros(len(seg), dtype=bool)
    with np.errstate(divide="ignore", invalid="ignore"):
        for p, q in ((-dx, sx0 - x0), (dx, x1 - sx0), (-dy, sy0 - y0), (dy, y1 - sy0)):
            r = q / p
            parallel = p == 0
            outside |= parallel & (q < 0)
            t0 = np.where(~parallel & (p < 0), np.maximum(t0, r), t0)
            t1 = np.where(~parallel & (p > 0), np.minimum(t1, r), t1)
    return t0, t1, ~outside & (t0 <= t1)


def _nan_max(a: float, b: float) -> float:
    # np.maximum: NaN wins
    return a if a != a else (b if b != b or b > a else a)


def _nan_min(a: float, b: float) -> float:
    return a if a != a else (b if b != b or b < a else a)


def _clip_one(
    row: list[float], x0: float, y0: float, x1: float, y1: float
) -> tuple[float, float, bool]:
    """:func:`clip_segments` of one segment (x0 y0 x1 y1) in plain floats (the same
    operations, so the same results, without numpy's per-call cost)."""
    sx0, sy0, sx1, sy1 = row
    dx, dy = sx1 - sx0, sy1 - sy0
    t0, t1, outside = 0.0, 1.0, False
    for p, q in ((-dx, sx0 - x0), (dx, x1 - sx0), (-dy, sy0 - y0), (dy, y1 - sy0)):
        if p == 0:
            outside = outside or q < 0
        elif p < 0:
            t0 = _nan_max(t0, q / p)
        elif p > 0:
            t1 = _nan_min(t1, q / p)
    return t0, t1, not outside and t0 <= t1


def _clip_few(
    seg: np.ndarray, box: tuple[float, float, float, float]
) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """:func:`clip_segments` for a handful of segments, one at a time in plain floats."""
    x0, y0, x1, y1 = (float(v) for v in box)
    out = [_clip_one(row, x0, y0, x1, y1) for row in seg.tolist()]
    t0s, t1s, ins = zip(*out, strict=True) if out else ((), (), ())
    return np.array(t0s, dtype=float), np.array(t1s, dtype=float), np.array(ins, dtype=bool)


def segments_meet(seg: np.ndarray, box: tuple[float, float, float, float]) -> bool:
    """Whether any of the (n, 4) segments has a part inside ``box``: ``clip_segments``'s
    mask, any of it, stopping at the first (in plain floats up to 64 segments)."""
    if len(seg) > 64:
        return bool(clip_segments(seg, box)[2].any())
    x0, y0, x1, y1 = (float(v) for v in box)
    try:
        return any(_clip_one(row, x0, y0, x1, y1)[2] for row in seg.tolist())
    except (OverflowError, ZeroDivisionError):  # absurd coordinates: numpy's rules
        return bool(clip_segments(seg, box)[2].any())


def clip_polyline(pts: np.ndarray, vp: Viewport) -> list[np.ndarray]:
    """The pieces of a polyline inside the viewport, joined where they meet.

    Examples
    --------
    >>> [p.tolist() for p in clip_polyline(np.array([[-1.0, 0.5], [0.5, 0.5], [2.0, 0.5]]),
    ...                                      Viewport(0, 0, 1, 1))]
    [[[0.0, 0.5], [0.5, 0.5], [1.0, 0.5]]]
    """
    box = (vp.x, vp.y, vp.x + vp.w, vp.y + vp.h)
    lo, hi = pts.min(axis=0), pts.max(axis=0)
    if lo[0] >= box[0] and lo[1] >= box[1] and hi[0] <= box[2] and hi[1] <= box[3]:
        return [pts]
    a, b = pts[:-1], pts[1:]
    t0, t1, inside = clip_segments(np.hstack([a, b]), box)
    pieces: list[list[np.ndarray]] = []
    joined = False  # the last piece ends where this segment starts
    for i in np.flatnonzero(inside) if inside.any() else []:
        d = b[i] - a[i]
        p0, p1 = a[i] + t0[i] * d, a[i] + t1[i] * d
        if joined and i > 0 and inside[i - 1] and t0[i] == 0.0 and pieces:
            pieces[-1].append(p1)
        else:
            pieces.append([p0, p1])
        joined = t1[i] == 1.0
    return [np.array(p) for p in pieces]


@dataclass(frozen=True, slots=True)
class SheetGeometry:
    """Where everything sits on one sheet."""

    size: str
    width: float
    height: float
    margin: float
    border: Viewport
    title: Viewport
    plan: Viewport
    profile: Viewport
    text: float  # base text size of sheet furniture, points

    @property
    def factor(self) -> float:
        """Size relative to a full-size (ANSI D) sheet."""
        return self.width / PAPER_SIZES["ansi-d"][0]


def sheet_geometry(size: str) -> SheetGeometry:
    """Paper, border, title band, plan view (upper) and profile view (lower).

    Examples
    --------
    >>> g = sheet_geometry("ansi-d")
    >>> round(g.width / 72), round(g.height / 72), round(g.profile.w / 72, 2)
    (34, 22, 32.5)
    """
    if size not in PAPER_SIZES:
        raise UsageError(f"unknown sheet size {size!r}; choose one of " + ", ".join(PAPER_SIZES))
    width, height = PAPER_SIZES[size]
    f = width / PAPER_SIZES["ansi-d"][0]
    margin = 36.0 * f  # 0.5 in on a full-size sheet
    border = Viewport(margin, margin, width - 2 * margin, height - 2 * margin)
    title_h = 1.3 * 72.0 * f
    title = Viewport(border.x, border.y, border.w, title_h)
    inner = 0.25 * 72.0 * f
    usable_y = title.y + title.h + inner
    usable_h = border.y + border.h - inner - usable_y
    plan_h = usable_h * 0.36
    plan = Viewport(border.x + inner, usable_y + usable_h - plan_h, border.w - 2 * inner, plan_h)
    prof_h = usable_h - plan_h - inner
    profile = Viewport(border.x + inner, usable_y, border.w - 2 * inner, prof_h)
    return SheetGeometry(
        size, width, height, margin, border, title, plan, profile, 9.0 * max(f, 0.7)
    )


@dataclass(frozen=True, slots=True)
class Frame:
    """One sheet of the series: the stations it shows and its match lines."""

    number: int
    view_start: float
    view_end: float
    match_start: float
    match_end: float

    @property
    def first(self) -> bool:
        """True on sheet 1."""
        return self.number == 1


def model_per_point(layout: DraftingLayout) -> float:
    """Model length (file units) of one point of paper at the layout's scale."""
    return POINT_M / layout.paper_m * layout.scale


def sheet_frames(
    start: float, end: float, geometry: SheetGeometry, layout: DraftingLayout
) -> list[Frame]:
    """Split [start, end] into sheets with round match stations and a small overlap.

    Each sheet shows a whole number of major stations between its match lines
    (the first starts at the major station at or before ``start``) plus one
    minor station interval of overlap on each side.

    Examples
    --------
    >>> from gradeline.present.layout import default_layout
    >>> from gradeline.model.units import Units
    >>> lay = default_layout(Units("foot"))
    >>> fr = sheet_frames(1000.0, 6200.0, sheet_geometry("ansi-d"), lay)
    >>> len(fr), fr[0].match_start, fr[0].match_end, fr[0].view_start
    (4, 1000.0, 2400.0, 950.0)
    """
    if not end > start:
        raise UsageError("nothing to put on sheets: the alignment has no length")
    per_pt = model_per_point(layout)
    h = layout.text_height
    available = geometry.profile.w * per_pt - 2 * 9.0 * h  # room for elevation labels
    overlap = layout.station_minor
    major = layout.station_major
    span = math.floor((available - 2 * overlap) / major) * major
    if span < major:
        raise UsageError(
            f"scale {layout.scale:g} leaves less than one station per sheet on {geometry.size}; "
            "choose a smaller scale number or a larger sheet"
        )
    first = math.floor(start / major + 1e-9) * major
    count = max(1, math.ceil((end - first) / span - 1e-9))
    if count > 5000:
        raise UsageError(
            f"{count:,} sheets would be needed (at most 5,000); is a length in the "
            "file wrong, or should the scale be smaller?"
        )
    frames = []
    for i in range(count):
        m0 = first + i * span
        m1 = m0 + span
        frames.append(Frame(i + 1, m0 - overlap, m1 + overlap, m0, m1))
    return frames


def table_capacity(geometry: SheetGeometry, row_height: float) -> int:
    """Rows of ``row_height`` that fit between the top border and the title band."""
    top = geometry.border.y + geometry.border.h - 1.5 * geometry.text
    bottom = geometry.title.y + geometry.title.h + geometry.text
    return max(4, int((top - bottom) // row_height))


#: Rows a table chunk needs besides its body rows: title, header and a two-row gap.
TABLE_OVERHEAD = 4

Chunk = tuple[int, int, int, int]  # table, first row, end row, side-by-side blocks


def pack_tables(
    counts: list[int], capacity: int, blocks: list[int] | None = None
) -> list[list[Chunk]]:
    """Pack tables of ``counts`` body rows onto pages of ``capacity`` rows.

    Returns pages, each a list of (table index, first row, end row, blocks)
    chunks. A table of ``blocks[i]`` > 1 runs in that many blocks side by side
    (a narrow table on a wide sheet), each block with its own header; its rows
    fill the first block, then the next. Tables follow each other on a page
    while they fit; a long table continues on the next page with its title and
    header repeated. A chunk's height is its overhead plus the rows of its
    tallest block, so no page holds more than ``capacity`` rows.

    Examples
    --------
    >>> pack_tables([2, 5, 30], 20)
    [[(0, 0, 2, 1), (1, 0, 5, 1), (2, 0, 1, 1)], [(2, 1, 17, 1)], [(2, 17, 30, 1)]]
    >>> pack_tables([2, 50], 20, [1, 3])
    [[(0, 0, 2, 1), (1, 0, 30, 3)], [(1, 30, 50, 2)]]
    """
    blocks = blocks or [1] * len(counts)
    pages: list[list[Chunk]] = []
    page: list[Chunk] = []
    room = capacity
    for index, n in enumerate(counts):
        k = max(1, blocks[index])
        first = 0
        while first < n or (n == 0 and first == 0):
            if room <= TABLE_OVERHEAD:
                pages.append(page)
                page, room = [], capacity
            per_block = room - TABLE_OVERHEAD
            take = min(n - first, per_block * k)
            used_blocks = max(1, math.ceil(take / per_block)) if take else 1
            tall = math.ceil(take / used_blocks) if take else 0
            page.append((index, first, first + take, used_blocks))
            room -= tall + TABLE_OVERHEAD
            first += take
            if n == 0:
                break
    if page:
        pages.append(page)
    return pages


def split_blocks(first: int, end: int, blocks: int) -> list[tuple[int, int]]:
    """The row range of each side-by-side block of a chunk, filled one after the other.

    Examples
    --------
    >>> split_blocks(30, 50, 2)
    [(30, 40), (40, 50)]
    """
    per = math.ceil((end - first) / blocks) if end > first else 0
    return [(first + i * per, min(end, first + (i + 1) * per)) for i in range(blocks)]


#: Height of a table row as a multiple of the sheet text size.
TABLE_ROW = 1.7
