"""Drafted profile linework (from a DXF) against the computed finished grade."""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from gradeline.errors import GradelineError
from gradeline.geometry import vertical
from gradeline.geometry._runs import true_runs

__all__ = ["DrawingCheck", "check_linework", "fit_mapping"]


# --------------------------------------------------------------------------- drawings
@dataclass(frozen=True, slots=True)
class DrawingCheck:
    """Comparison of drafted profile linework with the computed finished grade."""

    exaggeration: float
    datum: float
    mapping_from: str  # "given", "drawing" or "fitted"
    samples: int
    max_deviation: float
    mean_deviation: float
    worst_station: float
    over: tuple[tuple[float, float, float], ...]  # (start, end, worst deviation) ranges
    uncovered: tuple[tuple[float, float], ...]  # profile stations the drawing lacks


def fit_mapping(lines: list[np.ndarray], geom: vertical.VerticalGeometry) -> tuple[float, float]:
    """Least-squares exaggeration and datum from linework drawn at x = station.

    Solves y = E z(x) + c for E and c; the datum is -c/E.
    """
    pts = np.concatenate(lines)
    z = vertical.elevation(geom, pts[:, 0])
    ok = np.isfinite(z)
    if ok.sum() < 2 or np.ptp(z[ok]) == 0:
        raise GradelineError(
            "cannot fit exaggeration and datum: the linework does not span "
            "the profile at x = station; give the mapping",
            choice="mapping",
        )
    a = np.column_stack([z[ok], np.ones(ok.sum())])
    (e, c0), *_ = np.linalg.lstsq(a, pts[ok, 1], rcond=None)
    return float(e), float(-c0 / e)


def _sample(lines: list[np.ndarray], step: float) -> np.ndarray:
    """Points along every polyline: its vertices plus points every ``step`` in between."""
    out = []
    for pts in lines:
        seg = np.diff(pts, axis=0)
        # n points per segment, at t = k / n, k = 0 .. n - 1
        span = np.abs(seg[:, 0])
        span[~np.isfinite(span)] = 0.0  # a non-finite vertex: its segment is one point
        n = np.maximum(1, np.ceil(span / step)).astype(np.int64)
        owner = np.repeat(np.arange(len(seg)), n)
        k = np.arange(int(n.sum())) - np.repeat(np.cumsum(n) - n, n)
        t = k / n[owner]
        part = np.empty((len(t) + 1, 2))
        part[:-1, 0] = pts[owner, 0] + t * seg[owner, 0]
        part[:-1, 1] = pts[owner, 1] + t * seg[owner, 1]
        part[-1] = pts[-1]
        out.append(part)
    return np.concatenate(out) if out else np.zeros((0, 2))


def check_linework(
    lines: list[np.ndarray],
    geom: vertical.VerticalGeometry,
    tol: float,
    exaggeration: float,
    datum: float,
    mapping_from: str,
    step: float = 1.0,
) -> DrawingCheck:
    """Deviation of drawn linework from the computed grade, sampled every ``step``."""
    span = sum(float(np.abs(np.diff(p[:, 0])).sum()) for p in lines)
    if span / step > 50_000_000:
        raise GradelineError(f"the linework spans {span:g} in x: too long to sample every {step:g}")
    pts = _sample(lines, step)
    s = pts[:, 0]
    z_drawn = pts[:, 1] / exaggeration + datum
    z_true = vertical.elevation(geom, s)
    inside = np.isfinite(z_true)
    dev = np.where(inside, z_drawn - z_true, np.nan)
    order = np.argsort(s[inside])
    ss, dd = s[inside][order], dev[inside][order]
    absd = np.abs(dd)
    over_runs = [
        (float(ss[i]), float(ss[j]), float(dd[i + int(np.argmax(absd[i : j + 1]))]))
        for i, j in true_runs(absd > tol)
    ]
    # coverage: union of the x-ranges of the pieces
    spans = sorted((float(p[:, 0].min()), float(p[:, 0].max())) for p in lines)
    uncovered = []
    cursor = geom.start
    for a, b in spans:
        if a > cursor + tol:
            uncovered.append((cursor, min(a, geom.end)))
        cursor = max(cursor, b)
        if cursor >= geom.end:
            break
    if cursor < geom.end - tol:
        uncovered.append((cursor, geom.end))
    uncovered = [(a, b) for a, b in uncovered if b > a]
    worst = int(np.argmax(absd)) if len(absd) else 0
    return DrawingCheck(
        exaggeration,
        datum,
        mapping_from,
        int(len(ss)),
        float(absd.max()) if len(absd) else math.nan,
        float(absd.mean()) if len(absd) else math.nan,
        float(ss[worst]) if len(ss) else math.nan,
        tuple(over_runs),
        tuple(uncovered),
    )
