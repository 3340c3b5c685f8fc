"""Benchmark: profile DXF of a 50-mile alignment with 400 PVIs and a dense ground line.

Figures: drafting (layout of every line and label) and writing, and a bare ezdxf
write of the same entities (same types, counts and vertex counts, vertices
loaded the same bulk way) as the baseline. Run: ``python bench/bench_dxf.py``.
Target (issue 4): under 10 s,
at most 1.5x the bare write.
"""

from __future__ import annotations

import io
import math
import sys
import time
from collections import Counter
from pathlib import Path

import numpy as np

sys.path.insert(0, str(Path(__file__).resolve().parent.parent))

from bench._common import synthetic_profile  # noqa: E402
from gradeline.model import Alignment, Document, GroundPiece, GroundProfile  # noqa: E402
from gradeline.model.units import Units  # noqa: E402
from gradeline.present import drafting
from gradeline.present.items import ArcItem, Circle, QuadCurve, Text  # noqa: E402
from gradeline.present.items import Path as DPath
from gradeline.present.layout import default_layout  # noqa: E402
from gradeline.render.dxf import add_vertices, write_dxf  # noqa: E402
from gradeline.solved import solve_alignment  # noqa: E402


def bare_write(drawing) -> float:
    import ezdxf

    t0 = time.perf_counter()
    doc = ezdxf.new("R2010")
    msp = doc.modelspace()
    for item in drawing.items:
        if isinstance(item, DPath):
            if len(item.points) == 2:
                msp.add_line(item.points[0], item.points[1])
            else:
                add_vertices(msp.add_lwpolyline([]), item.points)  # same bulk load
        elif isinstance(item, QuadCurve):
            msp.add_spline().set_open_uniform([(x, y, 0) for x, y in item.control], degree=2)
        elif isinstance(item, ArcItem):
            add_vertices(msp.add_lwpolyline([]), item.polyline)
        elif isinstance(item, Circle):
            msp.add_circle(item.center, item.radius)
        elif isinstance(item, Text):
            msp.add_text(item.text, height=item.height, rotation=item.rotation).dxf.insert = (
                item.x,
                item.y,
            )
    doc.write(io.StringIO())
    return time.perf_counter() - t0


def main() -> None:
    prof = synthetic_profile(401, spacing=660.0)
    end = prof.end
    s = np.arange(0.0, end + 1e-9, 5.0)
    z = 1000.0 + 30 * np.sin(s / 3000.0) + 4 * np.sin(s / 170.0)
    ground = GroundProfile("EG", (GroundPiece(tuple(s.tolist()), tuple(z.tolist())),))
    al = Alignment("Fifty-mile test", profiles=(prof,), grounds=(ground,))
    doc = Document("bench.xml", Units("foot"), (al,))
    ctx = solve_alignment(doc, al, prof)
    lay = default_layout(doc.units)
    t0 = time.perf_counter()
    d = drafting.profile_drawing(ctx, lay)
    t_draft = time.perf_counter() - t0
    t0 = time.perf_counter()
    data = write_dxf(d, lay, linear_unit="foot")
    t_write = time.perf_counter() - t0
    t_bare = bare_write(d)
    kinds = Counter(type(i).__name__ for i in d.items)
    print(
        f"profile: {end:,.0f} ft ({end / 5280:.0f} mi), {len(prof.pvis)} PVIs, "
        f"{len(s):,} ground points; {len(d.items):,} drawing items {dict(kinds)}"
    )
    print(f"drafting (layout, labels)  : {t_draft:.2f} s")
    print(f"DXF write (gradeline)      : {t_write:.2f} s, {len(data) / 2**20:.1f} MiB")
    print(f"bare ezdxf write, same ents: {t_bare:.2f} s")
    print(
        f"total {t_draft + t_write:.2f} s; write / bare = {t_write / t_bare:.2f}x, "
        f"(drafting + write) / bare = {(t_draft + t_write) / t_bare:.2f}x"
    )
    assert math.isfinite(t_write)


if __name__ == "__main__":
    main()
