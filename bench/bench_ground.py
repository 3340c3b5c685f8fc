"""Benchmark: a 2M-face TIN sampled along a 10-mile alignment at every edge
crossing and every foot.

Figures: our streaming parse vs a bare lxml ``iterparse`` pass over the same
file; our sampling vs matplotlib's ``LinearTriInterpolator`` on the same query
points; total time and peak memory. Run: ``python bench/bench_ground.py``
(writes the surface to a temporary folder first). Targets (issue 8): total under
10 s including the parse, parse within 2x of the bare pass, sampling at least 5x
faster than matplotlib, peak memory under 2 GB.
"""

from __future__ import annotations

import os
import resource
import sys
import tempfile
import time
from pathlib import Path

import numpy as np

sys.path.insert(0, str(Path(__file__).resolve().parent.parent))

from bench._common import synthetic_plan  # noqa: E402
from bench.make_surface import write  # noqa: E402
from gradeline.geometry import ground, horizontal
from gradeline.io import surface_reader


def bare_pass(path: str) -> int:
    from lxml import etree

    n = 0
    for _, el in etree.iterparse(path, events=("end",)):
        n += 1
        el.clear(keep_tail=False)
        parent = el.getparent()
        if parent is not None:
            while el.getprevious() is not None:
                del parent[0]
    return n


def main() -> None:
    with tempfile.TemporaryDirectory() as tmp:
        path = os.path.join(tmp, "terrain.xml")
        hz = horizontal.solve(synthetic_plan(39), 0.0)
        pn, pe, _ = horizontal.evaluate(hz, 20000.0)  # the pond sits on the alignment
        t0 = time.perf_counter()
        n_pts, n_faces = write(path, hole=(float(pe), float(pn)))
        t_gen = time.perf_counter() - t0
        size = os.path.getsize(path) / 2**20
        t0 = time.perf_counter()
        bare_pass(path)
        t_bare = time.perf_counter() - t0
        t0 = time.perf_counter()
        surf = surface_reader.read_surface(path)
        t_parse = time.perf_counter() - t0
    t0 = time.perf_counter()
    index = ground.TriangleIndex(surf)
    t_index = time.perf_counter() - t0
    t0 = time.perf_counter()
    s, z = ground.sample_alignment(hz, index, step=1.0)
    t_sample = time.perf_counter() - t0
    n, e, _ = horizontal.evaluate(hz, s)
    t0 = time.perf_counter()
    z2 = ground.interpolate(index, e, n)
    t_interp = time.perf_counter() - t0
    peak = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024  # before matplotlib
    import matplotlib.tri as mtri

    t0 = time.perf_counter()
    tri = mtri.Triangulation(surf.x, surf.y, triangles=surf.visible)
    ref = mtri.LinearTriInterpolator(tri, surf.z)
    zr = np.ma.filled(ref(e, n), np.nan)
    t_mpl = time.perf_counter() - t0
    ok = np.isfinite(zr) & np.isfinite(z2)
    assert np.allclose(z2[ok], zr[ok], rtol=1e-9)
    print(
        f"surface: {n_pts:,} points, {n_faces:,} faces, {size:.0f} MiB (written in {t_gen:.1f} s)"
    )
    print(
        f"parse: {t_parse:.2f} s; bare lxml iterparse pass: {t_bare:.2f} s "
        f"({t_parse / t_bare:.2f}x)"
    )
    print(
        f"alignment {hz.end - hz.start:,.0f} ft: {len(s):,} stations (every foot and every edge "
        f"crossing), {int(np.isnan(z).sum()):,} off the surface or in the hole"
    )
    print(
        f"index {t_index:.2f} s + sampling {t_sample:.2f} s; interpolation at the same "
        f"{len(s):,} points {t_interp:.3f} s vs matplotlib (triangulation + interpolator) "
        f"{t_mpl:.2f} s = {t_mpl / (t_index + t_interp):.1f}x"
    )
    print(
        f"total (parse + index + sampling) {t_parse + t_index + t_sample:.2f} s; "
        f"peak memory {peak:.0f} MB"
    )


if __name__ == "__main__":
    main()
