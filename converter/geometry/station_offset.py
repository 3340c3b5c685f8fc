"""Station and offset of plan points: nearest samples (scipy cKDTree), then Newton steps
on the exact geometry. Offsets are positive to the right, looking ahead.
"""

from __future__ import annotations

import math

import numpy as np
from numpy.typing import ArrayLike, NDArray

from gradeline.geometry.horizontal import HorizontalGeometry, _state

__all__ = ["Projector", "foot_points", "station_offset"]

#: Nearest samples refined for each point (the default; a geometry's own projector,
#: ``HorizontalGeometry.projector``, is built with it).
_CANDIDATES = 3


def _samples(geom: HorizontalGeometry) -> NDArray[np.float64]:
    total = geom.end - geom.start
    spacing = max(total / 200_000.0, 1e-9)
    parts = []
    for g in geom.elements:
        n = max(8, math.ceil(g.length / spacing))
        turn = (abs(g.k0) + abs(g.k1)) * g.length
        n = max(n, math.ceil(turn / 0.05))
        parts.append(g.start_station + g.length * np.arange(n) / n)
    parts.append(np.array([geom.end]))
    return np.concatenate(parts)


def foot_points(
    geom: HorizontalGeometry,
    px: NDArray[np.float64],
    py: NDArray[np.float64],
    s: NDArray[np.float64],
):
    """Newton steps from stations ``s`` to the foot points of (px, py) on the alignment.

    Returns the station (clamped to the ends), the along-tangent and left-normal
    components of the remaining vector, and the distance.
    """
    s = np.asarray(s, dtype=np.float64).copy()
    for _ in range(12):
        x, y, h, kap = _state(geom, s)
        c, sn = np.cos(h), np.sin(h)
        dx, dy = px - x, py - y
        t = dx * c + dy * sn
        o = -dx * sn + dy * c
        den = 1.0 - kap * o
        ok = den > 0.2
        step = np.where(ok, t / np.where(ok, den, 1.0), t)
        s_new = np.clip(s + step, geom.start, geom.end)
        done = np.abs(s_new - s) < 1e-10 * max(1.0, abs(geom.end))
        s = s_new
        if done.all():
            break
    x, y, h, _ = _state(geom, s)
    c, sn = np.cos(h), np.sin(h)
    dx, dy = px - x, py - y
    return s, dx * c + dy * sn, -dx * sn + dy * c, np.hypot(dx, dy)


def station_offset(
    geom: HorizontalGeometry,
    northing: ArrayLike,
    easting: ArrayLike,
    *,
    candidates: int = _CANDIDATES,
) -> tuple[NDArray[np.float64], NDArray[np.float64], NDArray[np.int8]]:
    """Station and offset of points; offset is positive to the right of the alignment.

    The foot point is refined with Newton's method on the exact geometry from
    the nearest few of a dense set of samples (``scipy.spatial.cKDTree``), and
    the nearest of those projections wins.

    Returns
    -------
    station, offset : ndarray
        For a point beyond an end (``status`` -1 before the POB, +1 after the
        POE) the station is measured along the end tangent's extension.
    status : ndarray of int8
        0 on the alignment, -1 before its start, +1 after its end.
    """
    proj = geom.projector if candidates == _CANDIDATES else Projector(geom, candidates)
    return proj(northing, easting)


class Projector:
    """:func:`station_offset` with its sample index built once, for many calls."""

    def __init__(self, geom: HorizontalGeometry, candidates: int = _CANDIDATES) -> None:
        from scipy.spatial import cKDTree  # nearest-neighbour index; heavy import kept local

        self.geom = geom
        self.samples = _samples(geom)
        sx, sy, _, _ = _state(geom, self.samples)
        self.tree = cKDTree(np.column_stack([sx, sy]))
        self.k = min(candidates, len(self.samples))

    def __call__(
        self, northing: ArrayLike, easting: ArrayLike
    ) -> tuple[NDArray[np.float64], NDArray[np.float64], NDArray[np.int8]]:
        """Station, offset (right +) and status of points, as :func:`station_offset`."""
        geom, samples, k = self.geom, self.samples, self.k
        n_in = np.asarray(northing, dtype=np.float64)
        px = np.asarray(easting, dtype=np.float64).reshape(-1)
        py = n_in.reshape(-1)
        _, nearest = self.tree.query(np.column_stack([px, py]), k=k)
        nearest = np.asarray(nearest).reshape(len(px), k)
        best_d = np.full(len(px), np.inf)
        best_s = np.zeros(len(px))
        best_t = np.zeros(len(px))
        best_o = np.zeros(len(px))
        for j in range(k):
            s, t_along, o, dist = foot_points(geom, px, py, samples[nearest[:, j]])
            better = dist < best_d - 1e-12
            best_d = np.where(better, dist, best_d)
            best_s = np.where(better, s, best_s)
            best_t = np.where(better, t_along, best_t)
            best_o = np.where(better, o, best_o)
        tol = 1e-9 * max(1.0, abs(geom.end))
        status = np.zeros(len(px), dtype=np.int8)
        before = (best_s <= geom.start + tol) & (best_t < -tol)
        after = (best_s >= geom.end - tol) & (best_t > tol)
        status[before] = -1
        status[after] = 1
        station = np.where(before | after, best_s + best_t, best_s)
        offset = -best_o
        shape = n_in.shape
        return station.reshape(shape), offset.reshape(shape), status.reshape(shape)
