"""Helpers shared by the benchmarks: timing and synthetic profiles."""

from __future__ import annotations

import math
import time
from collections.abc import Callable

import numpy as np

from gradeline.model import Profile, PVISpec


def best_of(fn: Callable[[], object], repeat: int = 5) -> float:
    """Best wall time of ``repeat`` calls, in seconds."""
    best = math.inf
    for _ in range(repeat):
        t0 = time.perf_counter()
        fn()
        best = min(best, time.perf_counter() - t0)
    return best


def synthetic_profile(n_pvi: int, spacing: float = 660.0, seed: int = 1) -> Profile:
    """A rolling profile of ``n_pvi`` PVIs with every kind of curve."""
    rng = np.random.default_rng(seed)
    stations = np.arange(n_pvi, dtype=float) * spacing
    grades = rng.uniform(-0.05, 0.05, n_pvi - 1)
    elevs = np.concatenate([[1000.0], 1000.0 + np.cumsum(grades * spacing)])
    specs = [PVISpec(float(stations[0]), float(elevs[0]))]
    kinds = ("parabolic", "unsymmetric", "circular", "none")
    for i in range(1, n_pvi - 1):
        kind = kinds[i % 4]
        s, z = float(stations[i]), float(elevs[i])
        if kind == "parabolic":
            specs.append(PVISpec(s, z, kind, 200.0, 200.0))
        elif kind == "unsymmetric":
            specs.append(PVISpec(s, z, kind, 150.0, 250.0))
        elif kind == "circular":
            dth = abs(math.atan(grades[i]) - math.atan(grades[i - 1]))
            r = 250.0 / math.tan(max(dth, 1e-4) / 2)
            specs.append(PVISpec(s, z, kind, radius=r))
        else:
            specs.append(PVISpec(s, z))
    specs.append(PVISpec(float(stations[-1]), float(elevs[-1])))
    return Profile("bench", tuple(specs))


def synthetic_plan(n_groups: int, seed: int = 3):
    """A plan of ``n_groups`` x (line, spiral, arc, spiral) elements, chained exactly."""
    from gradeline.geometry import horizontal
    from gradeline.model import HCurve, HLine, HorizontalAlignment, HSpiral

    rng = np.random.default_rng(seed)
    x, y, h = 500000.0, 4000000.0, 0.3
    els = []

    def end_of(el, h0):
        g = horizontal.solve(HorizontalAlignment((el,))).elements[-1]
        return g.x1, g.y1, g.heading1

    for i in range(n_groups):
        length = float(rng.uniform(200, 800))
        x1, y1 = x + length * math.cos(h), y + length * math.sin(h)
        els.append(HLine((y, x), (y1, x1)))
        x, y = x1, y1
        radius = float(rng.uniform(300, 3000))
        turn = 1.0 if i % 2 == 0 else -1.0  # alternate, so the plan never crosses itself
        rot = "ccw" if turn > 0 else "cw"
        ls = float(rng.uniform(60, 200))
        pi = (y + math.sin(h), x + math.cos(h))
        sp = HSpiral((y, x), (y, x), ls, math.inf, radius, rot, pi=pi)
        x, y, h = end_of(sp, h)
        els.append(HSpiral(sp.start, (y, x), ls, math.inf, radius, rot, pi=pi))
        sweep = float(rng.uniform(0.1, 0.6))
        cx, cy = x - turn * radius * math.sin(h), y + turn * radius * math.cos(h)
        a1 = math.atan2(y - cy, x - cx) + turn * sweep
        ex, ey = cx + radius * math.cos(a1), cy + radius * math.sin(a1)
        els.append(HCurve((y, x), (cy, cx), (ey, ex), rot))
        x, y, h = ex, ey, h + turn * sweep
        pi = (y + math.sin(h), x + math.cos(h))
        sp = HSpiral((y, x), (y, x), ls, radius, math.inf, rot, pi=pi)
        x2, y2, h2 = end_of(sp, h)
        els.append(HSpiral(sp.start, (y2, x2), ls, radius, math.inf, rot, pi=pi))
        x, y, h = x2, y2, h2
    return HorizontalAlignment(tuple(els))
