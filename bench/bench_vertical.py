"""Benchmark: elevations and grades at 1,000,000 stations on a 500-PVI profile.

Two plain-Python baselines, run on the same stations in the same process:

* ``scalar``: the straightforward per-station evaluation a spreadsheet-minded
  implementation does -- find the PVI interval (bisect), ask the curve on either
  side whether the station is on it, and apply the curve formula.
* ``tight``: a hand-tuned loop over the very piece table the vectorised code uses
  (bisect + one formula); the hardest baseline plain Python can offer.

Run: ``python bench/bench_vertical.py``. Target (issue 2): under 0.25 s and at
least 30x faster than the plain-Python per-station loop (``scalar``).
"""

from __future__ import annotations

import bisect
import math
import sys
import time
from pathlib import Path

import numpy as np

sys.path.insert(0, str(Path(__file__).resolve().parent.parent))

from bench._common import best_of, synthetic_profile  # noqa: E402
from gradeline.geometry import vertical

N_STATIONS = 1_000_000
N_PVI = 500


def scalar_loop(geom, stations):
    """Per-station evaluation from the curve records, one formula per kind."""
    pvi_s = geom.pvi_stations.tolist()
    pvi_z = geom.pvi_elevations.tolist()
    by_pvi = {c.index: c for c in geom.curves}
    z_out, g_out = [], []
    for s in stations:
        j = min(max(bisect.bisect_right(pvi_s, s) - 1, 0), len(pvi_s) - 2)
        curve = None
        for k in (j, j + 1):
            c = by_pvi.get(k)
            if c is not None and c.bvc_station <= s <= c.evc_station:
                curve = c
        if curve is None:
            g = (pvi_z[j + 1] - pvi_z[j]) / (pvi_s[j + 1] - pvi_s[j])
            z_out.append(pvi_z[j] + g * (s - pvi_s[j]))
            g_out.append(g)
            continue
        g1, g2 = curve.grade_in, curve.grade_out
        x = s - curve.bvc_station
        if curve.kind == "parabolic":
            rate = (g2 - g1) / curve.length
            z_out.append(curve.bvc_elevation + g1 * x + rate * x * x / 2)
            g_out.append(g1 + rate * x)
        elif curve.kind == "unsymmetric":
            l1, l2 = curve.length_in, curve.length_out
            gm = (g1 * l1 + g2 * l2) / (l1 + l2)
            if s <= curve.pvi_station:
                rate = (gm - g1) / l1
                z_out.append(curve.bvc_elevation + g1 * x + rate * x * x / 2)
                g_out.append(g1 + rate * x)
            else:
                xo = s - curve.pvi_station
                rate = (g2 - gm) / l2
                z_out.append(curve.pvi_elevation + curve.pvi_offset + gm * xo + rate * xo * xo / 2)
                g_out.append(gm + rate * xo)
        else:
            t1, t2 = math.atan(g1), math.atan(g2)
            sgn = 1.0 if t2 > t1 else -1.0
            r = curve.radius
            cx = curve.bvc_station - sgn * r * math.sin(t1)
            cy = curve.bvc_elevation + sgn * r * math.cos(t1)
            dx = s - cx
            root = math.sqrt(r * r - dx * dx)
            z_out.append(cy - sgn * root)
            g_out.append(sgn * dx / root)
    return z_out, g_out


def tight_loop(geom, stations):
    starts = geom.starts.tolist()
    y0, g0, c = geom.y0.tolist(), geom.g0.tolist(), geom.c.tolist()
    circ, cx, cy = geom.circular.tolist(), geom.cx.tolist(), geom.cy.tolist()
    r, sign = geom.r.tolist(), geom.sign.tolist()
    z_out, g_out = [], []
    for s in stations:
        i = max(bisect.bisect_right(starts, s) - 1, 0)
        if circ[i]:
            dx = s - cx[i]
            root = math.sqrt(r[i] * r[i] - dx * dx)
            z_out.append(cy[i] - sign[i] * root)
            g_out.append(sign[i] * dx / root)
        else:
            d = s - starts[i]
            z_out.append(y0[i] + d * (g0[i] + c[i] * d))
            g_out.append(g0[i] + 2 * c[i] * d)
    return z_out, g_out


def main() -> None:
    t0 = time.perf_counter()
    geom = vertical.solve(synthetic_profile(N_PVI))
    t_solve = time.perf_counter() - t0
    stations = np.random.default_rng(2).uniform(geom.start, geom.end, N_STATIONS)
    ordered = np.sort(stations)
    t_vec = best_of(lambda: vertical.evaluate(geom, stations), repeat=5)
    t_vec_sorted = best_of(lambda: vertical.evaluate(geom, ordered), repeat=5)
    sl = stations.tolist()
    t_scalar = best_of(lambda: scalar_loop(geom, sl), repeat=1)
    t_tight = best_of(lambda: tight_loop(geom, sl), repeat=1)
    z, g = vertical.evaluate(geom, stations)
    for name, loop in (("scalar", scalar_loop), ("tight", tight_loop)):
        zl, gl = loop(geom, sl[:50_000])
        assert np.allclose(z[:50_000], zl, atol=1e-9), name
        assert np.allclose(g[:50_000], gl, atol=1e-9), name
    print(f"profile: {N_PVI} PVIs, {len(geom.curves)} curves, solved in {t_solve * 1e3:.1f} ms")
    print(f"{N_STATIONS:,} stations, elevation and grade:")
    print(f"  vectorised, random order         : {t_vec:.3f} s")
    print(f"  vectorised, station order        : {t_vec_sorted:.3f} s")
    print(f"  plain-Python scalar loop         : {t_scalar:.3f} s  ({t_scalar / t_vec:.0f}x)")
    print(f"  plain-Python tight loop (pieces) : {t_tight:.3f} s  ({t_tight / t_vec:.0f}x)")


if __name__ == "__main__":
    main()
