"""Plan-set layout, read back from the rendered PDF (pdfplumber) and DXF (ezdxf).

The PDF is taken apart as a reviewer's eye would: every glyph with its box, the
glyphs joined into the runs drawn together, and the stroked paths of the
alignment and the finished grade. Then nothing may overlap, cross those lines,
leave its view or the title block's cell, and every curve note must be whole.
The geometry checks here (oriented boxes, separating axes, segment clipping) are
written in this file, independent of the layout code they check.
"""

from __future__ import annotations

import io
import math
import sys
from pathlib import Path

import numpy as np
import pytest

pdfplumber = pytest.importorskip("pdfplumber")

from gradeline import open_alignment  # noqa: E402
from gradeline.present import labels  # noqa: E402
from gradeline.present.roles import ROLE_STYLE, Role  # noqa: E402
from gradeline.sheets.layout import sheet_geometry  # noqa: E402
from gradeline.sheets.pdf import SheetOptions, page_plan, render_sheets, title_cells  # noqa: E402
from tests.conftest import METRIC_SAMPLE, US_SAMPLE  # noqa: E402

ROOT = Path(__file__).resolve().parent.parent


# -- reading the PDF back -----------------------------------------------------------------
def font_size(ch) -> float:
    """The glyph's font size: pdfminer boxes each glyph as advance x font size in text
    space, then takes the axis-aligned box of it turned by the text matrix."""
    a, b = ch["matrix"][:2]
    cos, sin = abs(a) / math.hypot(a, b), abs(b) / math.hypot(a, b)
    w, h = ch["x1"] - ch["x0"], ch["bottom"] - ch["top"]
    if sin > 0.5:
        return (w - ch["adv"] * cos) / sin
    return (h - ch["adv"] * sin) / cos


class Run:
    """Glyphs drawn one after the other on one baseline: a label, or one line of a note."""

    def __init__(self, ch) -> None:
        a, b, c, d, e, f = ch["matrix"]
        self.size = font_size(ch)
        self.u = np.array([a, b]) / math.hypot(a, b)
        self.v = np.array([c, d]) / math.hypot(c, d)
        self.origin = np.array([e, f])
        self.length = 0.0
        self.text = ""
        self.add(ch)

    def add(self, ch) -> None:
        self.text += ch["text"]
        self.length += ch["adv"]

    def continues(self, ch) -> bool:
        a, b, c, d, e, f = ch["matrix"]
        size = font_size(ch)
        if abs(size - self.size) > 1e-3 * max(1.0, size):
            return False
        if np.abs(np.array([a, b]) / math.hypot(a, b) - self.u).max() > 1e-6:
            return False
        at = self.origin + self.u * self.length
        return bool(np.abs(np.array([e, f]) - at).max() < 0.05 * size)

    def corners(self, shrink: float = 0.0) -> np.ndarray:
        """Oriented box: advance along u, from the descender to the cap height along v."""
        lo, hi = -0.2 * self.size + shrink, 0.74 * self.size - shrink
        a, b = shrink, max(shrink, self.length - shrink)
        o, u, v = self.origin, self.u, self.v
        return np.array(
            [o + a * u + lo * v, o + b * u + lo * v, o + b * u + hi * v, o + a * u + hi * v]
        )


def read_runs(page) -> list[Run]:
    runs: list[Run] = []
    for ch in page.chars:
        if runs and runs[-1].continues(ch):
            runs[-1].add(ch)
        else:
            runs.append(Run(ch))
    return [r for r in runs if r.text.strip()]


def to_pdf_y(page_height: float, pts) -> np.ndarray:
    """pdfplumber's points (top-down) in PDF coordinates (bottom-up)."""
    a = np.array(pts, dtype=float).reshape(-1, 2)
    return np.column_stack([a[:, 0], page_height - a[:, 1]])


def flatten(path) -> list[tuple[float, float]]:
    """A path's points, each cubic Bezier evaluated at 32 parameters (not its control
    polygon, which lies off the curve)."""
    pts: list[tuple[float, float]] = []
    for cmd, *args in path:
        if cmd in ("m", "l"):
            pts.append(args[0])
        elif cmd == "c" and pts:
            p0 = np.array(pts[-1])
            c1, c2, p3 = (np.array(a) for a in args)
            for t in np.linspace(0, 1, 33)[1:]:
                q = (1 - t) ** 3 * p0 + 3 * (1 - t) ** 2 * t * c1 + 3 * (1 - t) * t * t * c2
                pts.append(tuple(q + t**3 * p3))
    return pts


def stroked_segments(page, rgb) -> np.ndarray:
    """(n, 4) segments of every stroked path in colour ``rgb``."""
    out = []
    for obj in page.curves + page.lines:
        col = obj.get("stroking_color")
        if (
            col is None
            or len(col) != 3
            or max(abs(x - y) for x, y in zip(col, rgb, strict=True)) > 0.02
        ):
            continue
        raw = flatten(obj["path"]) if obj.get("path") else obj["pts"]
        p = to_pdf_y(page.height, raw)
        if len(p) >= 2:
            out.append(np.hstack([p[:-1], p[1:]]))
    return np.vstack(out) if out else np.zeros((0, 4))


# -- independent geometry -----------------------------------------------------------------
def overlap(p: np.ndarray, q: np.ndarray) -> bool:
    """Separating-axis test of two convex quadrilaterals."""
    for poly in (p, q):
        for i in range(4):
            e = poly[(i + 1) % 4] - poly[i]
            n = np.array([-e[1], e[0]])
            if not n.any():
                continue
            a, b = p @ n, q @ n
            if a.max() <= b.min() or b.max() <= a.min():
                return False
    return True


def crossing_point(box: np.ndarray, seg: np.ndarray) -> np.ndarray | None:
    """Midpoint of the part of segment ``seg`` inside the convex ``box``, if any."""
    p0, p1 = seg[:2], seg[2:]
    d = p1 - p0
    t0, t1 = 0.0, 1.0
    for i in range(4):
        a, b = box[i], box[(i + 1) % 4]
        e = b - a
        n = np.array([-e[1], e[0]])  # inward for a counter-clockwise box
        num, den = n @ (p0 - a), n @ d
        if den == 0:
            if num < 0:
                return None
            continue
        t = -num / den
        if den > 0:
            t0 = max(t0, t)
        else:
            t1 = min(t1, t)
        if t0 > t1:
            return None
    return p0 + d * (t0 + t1) / 2


def inside(box: np.ndarray, rect, slack: float = 0.01) -> bool:
    x, y, w, h = rect
    return bool(
        box[:, 0].min() >= x - slack
        and box[:, 0].max() <= x + w + slack
        and box[:, 1].min() >= y - slack
        and box[:, 1].max() <= y + h + slack
    )


# -- the cases ----------------------------------------------------------------------------
def _bench_alignment():
    sys.path.insert(0, str(ROOT))
    from bench._common import synthetic_plan, synthetic_profile
    from gradeline.geometry import horizontal
    from gradeline.model import Alignment, Document
    from gradeline.model.units import Units
    from gradeline.solved import solve_alignment

    plan = synthetic_plan(200)
    length = horizontal.solve(plan).end
    prof = synthetic_profile(401, spacing=min(660.0, length / 400))
    al = Alignment("Fifty-mile test", profiles=(prof,), horizontal=plan)
    doc = Document("bench.xml", Units("foot"), (al,))
    return solve_alignment(doc, al, prof)


CASES = [
    ("bypass", US_SAMPLE, "Orrin Vale Bypass", "ansi-d"),
    ("bypass", US_SAMPLE, "Orrin Vale Bypass", "ansi-b"),
    ("kettle", US_SAMPLE, "Kettle Lane", "ansi-b"),
    ("tarnholm", METRIC_SAMPLE, None, "iso-a3"),
    ("tarnholm", METRIC_SAMPLE, None, "iso-a1"),
    ("bench", None, None, "ansi-d"),
]


@pytest.fixture(scope="module", params=CASES, ids=[f"{c[0]}-{c[3]}" for c in CASES])
def sheet_set(request):
    name, path, alignment, size = request.param
    ctx = _bench_alignment() if path is None else open_alignment(str(path), alignment)
    opts = SheetOptions(size=size)
    pdf = render_sheets(ctx, opts)
    doc = pdfplumber.open(io.BytesIO(pdf))
    pages = list(doc.pages)
    if name == "bench":  # 240 pages: the first sheets, every 20th and the table pages
        n = len(page_plan(ctx, opts).frames)
        keep = set(range(4)) | set(range(0, n, 20)) | set(range(n, len(pages)))
        pages = [pages[i] for i in sorted(keep)]
    read = [Page(p) for p in pages]
    doc.close()
    yield ctx, size, read


class Page:
    """What the tests need of one page, read once."""

    def __init__(self, page) -> None:
        self.page_number = page.page_number
        self.runs = read_runs(page)
        self.texts = {r.text for r in self.runs}
        self.segments = {
            role: stroked_segments(page, ROLE_STYLE[role].rgb) for role in (Role.PLAN, Role.GRADE)
        }


def _views(geo):
    cells = [(v.x, v.y, v.w, v.h) for v in title_cells(geo).values()]
    views = [(v.x, v.y, v.w, v.h) for v in (geo.plan, geo.profile)]
    b, t = geo.border, geo.title
    tables = (b.x, t.y + t.h, b.w, b.y + b.h - t.y - t.h)
    return views, cells, tables


def test_no_two_texts_overlap(sheet_set):
    ctx, size, pages = sheet_set
    for page in pages:
        runs = page.runs
        boxes = [r.corners(shrink=0.04 * r.size) for r in runs]
        bb = np.array([[b[:, 0].min(), b[:, 1].min(), b[:, 0].max(), b[:, 1].max()] for b in boxes])
        clashes = []
        for i in range(len(boxes)):
            near = np.flatnonzero(
                (bb[:, 0] < bb[i, 2])
                & (bb[:, 2] > bb[i, 0])
                & (bb[:, 1] < bb[i, 3])
                & (bb[:, 3] > bb[i, 1])
            )
            for j in near[near > i]:
                if overlap(boxes[i], boxes[j]):
                    clashes.append((runs[i].text, runs[j].text))
        assert clashes == [], f"page {page.page_number}: {clashes[:5]}"


def test_no_text_crosses_the_alignment_or_the_grade(sheet_set):
    ctx, size, pages = sheet_set
    geo = sheet_geometry(size)
    for page in pages:
        runs = page.runs
        for role, view in ((Role.PLAN, geo.plan), (Role.GRADE, geo.profile)):
            segs = page.segments[role]
            rect = (view.x, view.y, view.w, view.h)
            for r in runs:
                box = r.corners(shrink=0.04 * r.size)
                x0, y0 = box.min(axis=0)
                x1, y1 = box.max(axis=0)
                near = segs[
                    (np.maximum(segs[:, 0], segs[:, 2]) >= x0)
                    & (np.minimum(segs[:, 0], segs[:, 2]) <= x1)
                    & (np.maximum(segs[:, 1], segs[:, 3]) >= y0)
                    & (np.minimum(segs[:, 1], segs[:, 3]) <= y1)
                ]
                for seg in near:
                    hit = crossing_point(box, seg)
                    if hit is not None and inside(hit[None, :], rect, 0.0):
                        pytest.fail(f"page {page.page_number}: {r.text!r} crosses the {role} line")


def test_every_text_stays_in_its_view_or_cell(sheet_set):
    ctx, size, pages = sheet_set
    geo = sheet_geometry(size)
    for page in pages:
        views, cells, tables = _views(geo)
        border = (geo.border.x, geo.border.y, geo.border.w, geo.border.h)
        for r in page.runs:
            box = r.corners()
            assert inside(box, border), f"page {page.page_number}: {r.text!r} leaves the border"
            homes = views + cells + [tables]
            assert any(inside(box, h) for h in homes), (
                f"page {page.page_number}: {r.text!r} is cut by a view, the title block or a cell"
            )


def test_every_curve_note_is_whole(sheet_set):
    ctx, size, pages = sheet_set
    texts = [p.texts for p in pages]
    seen = set()
    for c in ctx.curves:
        note = labels.plan_curve_note(c, ctx.document.units)
        for found in texts:
            if note[0] in found or any(t.startswith(note[0] + " (") for t in found):
                missing = [t for t in note[1:] if t not in found]
                assert missing == [], f"curve {c.number}: lines missing {missing}"
                seen.add(c.number)
            elif labels.curve_table_tag(c.number) in found:
                seen.add(c.number)
    if ctx.alignment.name != "Fifty-mile test":  # there only some pages are read
        assert seen == {c.number for c in ctx.curves if c.pi_northing is not None}


# -- the DXF drawings: text extents from ezdxf's text size tools ----------------------------
def dxf_text_boxes(path) -> list[tuple[str, np.ndarray]]:
    """Every TEXT of the model space with its oriented box (font metrics from ezdxf)."""
    import ezdxf
    from ezdxf.tools.text_size import text_size

    doc = ezdxf.readfile(path)
    out = []
    for t in doc.modelspace().query("TEXT"):
        size = text_size(t)
        w, cap = size.width, size.cap_height
        dx = {0: 0.0, 1: -w / 2, 2: -w}.get(t.dxf.halign, 0.0)
        dy = {0: 0.0, 1: 0.0, 2: -cap / 2, 3: -cap}.get(t.dxf.valign, 0.0)
        at = t.dxf.align_point if (t.dxf.halign or t.dxf.valign) else t.dxf.insert
        a = math.radians(t.dxf.rotation)
        rot = np.array([[math.cos(a), -math.sin(a)], [math.sin(a), math.cos(a)]])
        local = np.array([[dx, dy], [dx + w, dy], [dx + w, dy + cap], [dx, dy + cap]])
        out.append((t.dxf.text, local @ rot.T + np.array([at.x, at.y])))
    return out


@pytest.mark.parametrize(
    ("sample", "alignment"),
    [(US_SAMPLE, "Orrin Vale Bypass"), (US_SAMPLE, "Kettle Lane"), (METRIC_SAMPLE, None)],
    ids=["bypass", "kettle", "tarnholm"],
)
def test_dxf_texts_do_not_overlap(tmp_path, sample, alignment):
    from gradeline.cli import main

    argv = ["dxf", str(sample), "-o", str(tmp_path / "p.dxf"), "--plan", str(tmp_path / "q.dxf")]
    assert main(argv + (["--alignment", alignment] if alignment else [])) == 0
    for name in ("p.dxf", "q.dxf"):
        boxes = dxf_text_boxes(tmp_path / name)
        clashes = [
            (boxes[i][0], boxes[j][0])
            for i in range(len(boxes))
            for j in range(i + 1, len(boxes))
            if overlap(boxes[i][1], boxes[j][1])
        ]
        assert clashes == [], f"{name}: {clashes[:5]}"
