"""Helpers shared by the benchmarks: timing and synthetic profiles."""

from __future__ import annotations

import math
import time
from collections.abc import Callable

import numpy as np

from converter.model import Profile, PVISpec


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
