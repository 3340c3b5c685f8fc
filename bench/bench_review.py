"""Benchmark: exact sight distance every 10 ft along a 50-mile profile with 400 PVIs.

Both directions, object visibility and headlight reach, finished grade sampled
every foot. Baseline: a plain-Python loop over the same samples for the
stopping sight distance ahead at a subset of stations, scaled. Run:
``python bench/bench_review.py``. Target (issue 6): under 5 s.
"""

from __future__ import annotations

import math
import sys
import time
from pathlib import Path

import numpy as np

sys.path.insert(0, str(Path(__file__).resolve().parent.parent))

from bench._common import synthetic_profile  # noqa: E402
from gradeline.analysis import review, sight
from gradeline.geometry import vertical


def python_sd(z, i, dx, window, h1, h2):
    eye = z[i] + h1
    best = -math.inf
    for k in range(1, window + 1):
        if i + k >= len(z):
            return math.inf
        t = (z[i + k] + h2 - eye) / (k * dx)
        if t <= best:
            return k * dx
        best = max(best, (z[i + k] - eye) / (k * dx))
    return math.inf


def main() -> None:
    geom = vertical.solve(synthetic_profile(401, spacing=660.0))
    crit = review.load_criteria(None, metric=False)
    reach = 1.25 * review.design_ssd(crit, 60.0, 0.05)
    t0 = time.perf_counter()
    sd = sight.sight_distance(geom, crit, step=10.0, reach=reach, sample=1.0)
    t_vec = time.perf_counter() - t0
    xs = geom.start + np.arange(int(geom.end - geom.start) + 1, dtype=float)
    z = vertical.elevation(geom, xs).tolist()
    window = int(math.ceil(reach))
    eyes = list(range(0, len(z), 10))[:2000]
    t0 = time.perf_counter()
    for i in eyes:
        python_sd(z, i, 1.0, window, crit.eye_height, crit.object_height)
    t_loop = (time.perf_counter() - t0) * (len(sd.stations) / len(eyes)) * 4  # 4 runs
    print(
        f"profile {geom.end - geom.start:,.0f} ft, {len(geom.pvi_stations)} PVIs; "
        f"{len(sd.stations):,} stations x 2 directions x (line of sight + headlight), "
        f"reach {reach:.0f} ft"
    )
    print(
        f"vectorised: {t_vec:.2f} s; plain-Python loop (scaled): {t_loop:.0f} s; "
        f"{t_loop / t_vec:.0f}x"
    )


if __name__ == "__main__":
    main()
