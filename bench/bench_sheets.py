"""Benchmark: PDF plan-and-profile sheets of a 50-mile alignment at 1" = 50'.

Run: ``python bench/bench_sheets.py [--quick]``. Prints, for sets of 10, 50, 100 and
200 plan groups (line, spiral, arc, spiral) and their profiles: pages, the time
of ``render_sheets`` and, as the baseline measured in the same run, the time of
a bare reportlab canvas replaying exactly the drawing operations the product
issued (the same strings at the same places in the same fonts, the same paths,
colours and clips -- no geometry, layout or label text), written down in a
second, untimed run of the product. Each time is the best of three runs (two at
200 groups), the product's each on a freshly solved alignment with gradeline's
caches emptied, as in a new process. The ratio is what the product adds to
drawing; the per-page time across sizes shows whether it grows
linearly.
"""

from __future__ import annotations

import io
import math
import resource
import sys
import time
from pathlib import Path

import numpy as np

sys.path.insert(0, str(Path(__file__).resolve().parent.parent))

from reportlab.pdfgen import canvas as rl_canvas  # noqa: E402

_Canvas = rl_canvas.Canvas  # the real class, before the benchmark swaps in its recorder

from bench._common import synthetic_plan, synthetic_profile  # noqa: E402
from gradeline.geometry import horizontal  # noqa: E402
from gradeline.model import Alignment, Document, GroundPiece, GroundProfile  # noqa: E402
from gradeline.model.units import Units  # noqa: E402
from gradeline.sheets import pdf as sheets_pdf  # noqa: E402
from gradeline.sheets.pdf import SheetOptions, page_plan, render_sheets  # noqa: E402
from gradeline.solved import solve_alignment  # noqa: E402

#: Canvas calls replayed as they were made (everything but paths, which are rebuilt).
_PLAIN = (
    "drawString",
    "drawRightString",
    "drawCentredString",
    "setFont",
    "line",
    "rect",
    "circle",
    "saveState",
    "restoreState",
    "translate",
    "rotate",
    "setStrokeColorRGB",
    "setFillColorRGB",
    "setLineWidth",
    "setDash",
    "showPage",
)


class _Path:
    """A path whose operations are remembered for the replay."""

    def __init__(self, real) -> None:
        self.real, self.ops = real, []

    def __getattr__(self, name):
        method = getattr(self.real, name)

        def call(*args, **kw):
            self.ops.append((name, args, kw))
            return method(*args, **kw)

        return call


class Recorder(_Canvas):
    """A canvas that also writes down every drawing call made on it."""

    made: list[Recorder] = []  # every recorder, for the benchmark to read back

    def __init__(self, *args, **kw) -> None:
        super().__init__(*args, **kw)
        self.ops: list = []
        Recorder.made.append(self)

    def beginPath(self):  # noqa: N802 (reportlab's name)
        return _Path(super().beginPath())

    def drawPath(self, path, *args, **kw):  # noqa: N802
        self.ops.append(("path", path.ops, args, kw))
        return super().drawPath(path.real, *args, **kw)

    def clipPath(self, path, *args, **kw):  # noqa: N802
        self.ops.append(("clip", path.ops, args, kw))
        return super().clipPath(path.real, *args, **kw)


def _recording(name):
    def call(self, *args, **kw):
        self.ops.append((name, args, kw))
        return getattr(_Canvas, name)(self, *args, **kw)

    return call


for _name in _PLAIN:
    setattr(Recorder, _name, _recording(_name))


def replay(ops, pagesize) -> bytes:
    """The bare baseline: the recorded calls on a plain canvas."""
    buf = io.BytesIO()
    c = _Canvas(buf, pagesize=pagesize, invariant=1, pageCompression=1)
    for op in ops:
        if op[0] in ("path", "clip"):
            _, path_ops, args, kw = op
            p = c.beginPath()
            for name, a, k in path_ops:
                getattr(p, name)(*a, **k)
            (c.drawPath if op[0] == "path" else c.clipPath)(p, *args, **kw)
        else:
            name, args, kw = op
            getattr(c, name)(*args, **kw)
    c.save()
    return buf.getvalue()


def cold_caches() -> None:
    """Empty gradeline's caches of content (its bounded caches: text widths, font runs,
    text operators), as a fresh process has them. The unbounded ones hold what a
    process sets up once and the replay uses as well (fonts registered with reportlab,
    the operator check)."""
    for name, module in list(sys.modules.items()):
        if name.startswith("gradeline."):
            for obj in list(vars(module).values()):
                params = getattr(obj, "cache_parameters", None)
                if params is not None and params()["maxsize"] is not None:
                    obj.cache_clear()


def alignment(groups: int):
    plan = synthetic_plan(groups)
    length = horizontal.solve(plan).end
    n_pvi = max(3, round(2 * groups + 1))
    prof = synthetic_profile(n_pvi, spacing=min(660.0, length / (n_pvi - 1)))
    s = np.arange(0.0, prof.end + 1e-9, 10.0)
    z = 1000.0 + 30 * np.sin(s / 3000.0) + 4 * np.sin(s / 170.0)
    ground = GroundProfile("EG", (GroundPiece(tuple(s.tolist()), tuple(z.tolist())),))
    al = Alignment("Benchmark", profiles=(prof,), grounds=(ground,), horizontal=plan)
    doc = Document("bench.xml", Units("foot"), (al,))
    return solve_alignment(doc, al, prof), length


def main() -> None:
    sizes = (10, 50) if "--quick" in sys.argv else (10, 50, 100, 200)
    opts = SheetOptions(size="ansi-d", scale=50, project="Benchmark", date="2026-11-30")
    print(
        f"{'groups':>6} {'miles':>6} {'pages':>6} {'product s':>10} {'bare s':>8} "
        f"{'ratio':>6} {'ms/page':>8}"
    )
    for groups in sizes:
        ctx, length = alignment(groups)
        pages = page_plan(ctx, opts).pages
        repeat = 3 if groups <= 100 else 2
        pdf = render_sheets(ctx, opts)
        # a second run, untimed, writes the calls down (the recorder costs time too)
        sheets_pdf.rl_canvas.Canvas = Recorder  # type: ignore[misc]
        Recorder.made.clear()
        try:
            assert render_sheets(ctx, opts) == pdf
        finally:
            sheets_pdf.rl_canvas.Canvas = _Canvas  # type: ignore[misc]
        recorded = Recorder.made
        ops = recorded[0].ops
        again = replay(ops, recorded[0]._pagesize)
        product = bare = math.inf
        for _ in range(repeat):  # turn about, so that a slower minute slows both
            fresh, _ = alignment(groups)  # as in a fresh process: nothing solved or cached
            cold_caches()
            t0 = time.perf_counter()
            assert render_sheets(fresh, opts) == pdf
            product = min(product, time.perf_counter() - t0)
            t0 = time.perf_counter()
            replay(ops, recorded[0]._pagesize)
            bare = min(bare, time.perf_counter() - t0)
        # the replay draws the same: its file is within a few % of the product's
        assert abs(len(again) - len(pdf)) < 0.05 * len(pdf), (len(again), len(pdf))
        print(
            f"{groups:>6} {length / 5280:>6.1f} {pages:>6} {product:>10.1f} {bare:>8.1f} "
            f"{product / bare:>6.2f} {product / pages * 1000:>8.0f}"
        )
    peak_mb = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024
    print(f"peak resident memory {peak_mb:.0f} MB (the recorder keeps every call)")


if __name__ == "__main__":
    main()
