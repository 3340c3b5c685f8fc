"""Benchmark: plan coordinates at 1,000,000 stations and station/offset of 100,000 points.

A 200-element alignment (50 x line, clothoid, arc, clothoid). Baselines are
plain-Python per-station loops over the same solved elements, run in the same
process (on a subset, scaled), and, for the coordinates, the floor of any
clothoid evaluator: ``scipy.special.fresnel`` at every station plus the element
lookup (``searchsorted``), at 10k to 10M stations, with the peak of traced
memory (tracemalloc) against the size of the outputs. Run:
``python bench/bench_horizontal.py``. Targets: coordinates under 0.5 s at 1M
stations (issue 3), at most 1.5x the fresnel floor and 2x the outputs' memory
(issue 16); station/offset under 1 s.
"""

from __future__ import annotations

import bisect
import math
import sys
import time
import tracemalloc
from pathlib import Path

import numpy as np

sys.path.insert(0, str(Path(__file__).resolve().parent.parent))

from scipy.special import fresnel  # noqa: E402

from bench._common import best_of, synthetic_plan  # noqa: E402
from gradeline.geometry import horizontal as H
from gradeline.geometry.station_offset import station_offset

GL_T, GL_W = np.polynomial.legendre.leggauss(8)
GL_T, GL_W = GL_T.tolist(), GL_W.tolist()


def python_point(geom, s):
    """One station at a time: bisect, closed form for lines/arcs, quadrature for spirals."""
    starts = geom.s0
    i = max(bisect.bisect_right(starts, s) - 1, 0)
    g = geom.elements[i]
    d = s - g.start_station
    if g.kind in ("line", "arc"):
        k = g.k0
        if k == 0.0:
            return g.x0 + d * math.cos(g.heading0), g.y0 + d * math.sin(g.heading0)
        return (
            g.x0 + (math.sin(g.heading0 + k * d) - math.sin(g.heading0)) / k,
            g.y0 - (math.cos(g.heading0 + k * d) - math.cos(g.heading0)) / k,
        )
    n = max(1, math.ceil((abs(g.k0) + abs(g.k1)) * g.length / 0.25))
    x, y = g.x0, g.y0
    dk = g.k1 - g.k0
    for p in range(n):
        a = g.length * p / n
        b = min(g.length * (p + 1) / n, d)
        if b <= a:
            break
        for t, w in zip(GL_T, GL_W, strict=False):
            u = a + (b - a) * (1 + t) / 2
            th = g.heading0 + g.k0 * u + dk * u * u / (2 * g.length)
            x += (b - a) / 2 * w * math.cos(th)
            y += (b - a) / 2 * w * math.sin(th)
    return x, y


def python_inverse(geom, px, py, samples, sx, sy):
    """Nearest sample by a scan, then Newton steps, one point at a time."""
    out = []
    for x, y in zip(px, py, strict=False):
        j = min(range(len(sx)), key=lambda i: (sx[i] - x) ** 2 + (sy[i] - y) ** 2)
        s = samples[j]
        for _ in range(6):
            n, e, h = (float(v) for v in H.evaluate(geom, s))
            t = (x - e) * math.cos(h) + (y - n) * math.sin(h)
            s = min(max(s + t, geom.start), geom.end)
        out.append(s)
    return out


def main() -> None:
    t0 = time.perf_counter()
    plan = synthetic_plan(50)
    geom = H.solve(plan, 0.0)
    t_solve = time.perf_counter() - t0
    rng = np.random.default_rng(5)
    stations = rng.uniform(geom.start, geom.end, 1_000_000)
    t_vec = best_of(lambda: H.evaluate(geom, stations), repeat=3)
    sub = stations[:20_000].tolist()
    geom.s0.tolist()
    t_loop = best_of(lambda: [python_point(geom, s) for s in sub], repeat=1) * 50
    n, e, _ = H.evaluate(geom, stations[:20_000])
    ref = np.array([python_point(geom, s) for s in sub])
    assert np.allclose(ref[:, 0], e, atol=1e-6) and np.allclose(ref[:, 1], n, atol=1e-6)

    s_pts = rng.uniform(geom.start, geom.end, 100_000)
    off = rng.uniform(-60, 60, 100_000)
    n, e, hd = H.evaluate(geom, s_pts)
    pn, pe = n - off * np.cos(hd), e + off * np.sin(hd)
    t_inv = best_of(lambda: station_offset(geom, pn, pe), repeat=3)
    s_back, o_back, _ = station_offset(geom, pn, pe)
    worst = max(np.max(np.abs(s_back - s_pts)), np.max(np.abs(o_back - off)))
    samples = np.linspace(geom.start, geom.end, 2000)
    sn, se, _ = H.evaluate(geom, samples)
    k = 200
    t_inv_loop = best_of(
        lambda: python_inverse(
            geom, pe[:k].tolist(), pn[:k].tolist(), samples.tolist(), se.tolist(), sn.tolist()
        ),
        repeat=1,
    ) * (100_000 / k)
    print(
        f"alignment: {len(plan.elements)} elements, {geom.end - geom.start:,.0f} ft, "
        f"solved in {t_solve * 1e3:.0f} ms"
    )
    print()
    print("| stations | ours | fresnel + lookup | ratio | peak memory / outputs |")
    print("| --- | --- | --- | --- | --- |")
    for n in (10_000, 100_000, 1_000_000, 10_000_000):
        st = rng.uniform(geom.start, geom.end, n)
        reps = 5 if n <= 1_000_000 else 2
        t_ours = best_of(lambda st=st: H.evaluate(geom, st), repeat=reps)
        t_floor = best_of(
            lambda st=st: (
                np.searchsorted(geom.s0, st, side="right"),
                fresnel(st * (3.0 / (geom.end - geom.start))),
            ),
            repeat=reps,
        )
        tracemalloc.start()
        out = H.evaluate(geom, st)
        peak = tracemalloc.get_traced_memory()[1]
        tracemalloc.stop()
        size = sum(a.nbytes for a in out)
        print(
            f"| {n:,} | {t_ours * 1e3:.1f} ms | {t_floor * 1e3:.1f} ms | "
            f"{t_ours / t_floor:.2f}x | {peak / 2**20:.1f} / {size / 2**20:.1f} MiB = "
            f"{peak / size:.2f}x |"
        )
    print()
    print(
        f"coordinates at 1,000,000 stations : {t_vec:.3f} s "
        f"(plain-Python loop {t_loop:.1f} s, {t_loop / t_vec:.0f}x)"
    )
    print(
        f"station/offset of 100,000 points  : {t_inv:.3f} s "
        f"(plain-Python loop {t_inv_loop:.0f} s, {t_inv_loop / t_inv:.0f}x); "
        f"worst round-trip error {worst:.1e} ft"
    )


if __name__ == "__main__":
    main()
