"""Existing ground from TIN surfaces: point location, interpolation and sampling.

A :class:`Surface` holds a LandXML TIN as numpy arrays (x = easting,
y = northing, z). :class:`TriangleIndex` is a uniform grid over the visible
faces (invisible ``i="1"`` faces are holes) that finds the triangle under any
number of points without a loop over faces. :func:`sample_alignment` walks an
alignment and returns the ground at every crossing of a TIN edge -- the exact
breakpoints, between which the ground line is straight -- and at requested
stations, with gaps where the alignment leaves the surface or crosses a hole.
"""

from __future__ import annotations

import math

import numpy as np
from numpy.typing import ArrayLike, NDArray

from gradeline.geometry import horizontal
from gradeline.geometry._runs import true_runs
from gradeline.geometry.horizontal import HorizontalGeometry
from gradeline.model import GroundPiece, GroundProfile, SourceRef, Surface

__all__ = ["Surface", "TriangleIndex", "ground_profile", "interpolate", "sample_alignment"]


def _least(v: NDArray[np.float64]) -> NDArray[np.float64]:
    """The least of each row of an (n, 3) array."""
    return np.minimum(np.minimum(v[:, 0], v[:, 1]), v[:, 2])


def _greatest(v: NDArray[np.float64]) -> NDArray[np.float64]:
    """The greatest of each row of an (n, 3) array."""
    return np.maximum(np.maximum(v[:, 0], v[:, 1]), v[:, 2])


class TriangleIndex:
    """Uniform grid over triangles: each cell lists the triangles whose box touches it.

    Built a block of triangles at a time with 32-bit cell lists, so a surface of
    millions of faces is indexed in a few times the memory of its arrays.
    """

    _BLOCK = 1 << 18  # triangles per block while building

    def __init__(self, surface: Surface) -> None:
        self.s = surface
        tri = surface.visible
        self.tri = tri
        x, y = surface.x, surface.y
        n = len(tri)
        blocks = range(0, n, self._BLOCK)
        if n:  # the box of the visible triangles' points
            lows = [
                (x[tri[lo : lo + self._BLOCK]].min(), y[tri[lo : lo + self._BLOCK]].min())
                for lo in blocks
            ]
            highs = [
                (x[tri[lo : lo + self._BLOCK]].max(), y[tri[lo : lo + self._BLOCK]].max())
                for lo in blocks
            ]
            self.x0, self.y0 = float(min(p[0] for p in lows)), float(min(p[1] for p in lows))
            span_x = float(max(p[0] for p in highs)) - self.x0
            span_y = float(max(p[1] for p in highs)) - self.y0
        else:
            self.x0 = self.y0 = span_x = span_y = 0.0
        area = max(span_x * span_y, 1e-12)
        cell = math.sqrt(area / max(n, 1)) * 1.5
        self.cell = cell
        self.nx = max(1, int(span_x / cell) + 1)
        self.ny = max(1, int(span_y / cell) + 1)
        cells_parts, owner_parts = [], []
        wide = np.int32 if self.nx * self.ny < 2**31 - 1 and n < 2**31 - 1 else np.int64
        for lo in blocks:
            t = tri[lo : lo + self._BLOCK]
            tx, ty = x[t], y[t]
            # the corners' least and greatest, column by column (ten times a reduction
            # along the rows' three values)
            ix0 = ((_least(tx) - self.x0) / cell).astype(np.int64)
            ix1 = ((_greatest(tx) - self.x0) / cell).astype(np.int64)
            iy0 = ((_least(ty) - self.y0) / cell).astype(np.int64)
            iy1 = ((_greatest(ty) - self.y0) / cell).astype(np.int64)
            del tx, ty
            wx, wy = ix1 - ix0 + 1, iy1 - iy0 + 1
            counts = wx * wy
            owner = np.repeat(np.arange(lo, lo + len(t)), counts)
            offset = np.arange(counts.sum()) - np.repeat(np.cumsum(counts) - counts, counts)
            k = owner - lo
            cx = ix0[k] + offset % wx[k]
            cy = iy0[k] + offset // wx[k]
            cells_parts.append((cy * self.nx + cx).astype(wide))
            owner_parts.append(owner.astype(wide))
            del owner, offset, k, cx, cy
        cells = np.concatenate(cells_parts) if cells_parts else np.zeros(0, np.int32)
        del cells_parts
        owners = np.concatenate(owner_parts) if owner_parts else np.zeros(0, np.int32)
        del owner_parts
        order = np.argsort(cells, kind="stable")
        self.items = owners[order]
        del owners, order
        # cell k lists items[start[k]:start[k + 1]]
        self.start = np.zeros(self.nx * self.ny + 1, dtype=np.int64)
        np.cumsum(np.bincount(cells, minlength=self.nx * self.ny), out=self.start[1:])

    def cells_of(self, px: NDArray[np.float64], py: NDArray[np.float64]) -> NDArray[np.int64]:
        """Cell number of each point (-1 outside the grid)."""
        ix = np.floor((px - self.x0) / self.cell).astype(np.int64)
        iy = np.floor((py - self.y0) / self.cell).astype(np.int64)
        ok = (ix >= 0) & (ix < self.nx) & (iy >= 0) & (iy < self.ny)
        return np.where(ok, iy * self.nx + ix, -1)

    def locate(self, px: ArrayLike, py: ArrayLike):
        """Triangle (index into visible faces, -1 if none) and weights (w1, w2) of each point."""
        px = np.asarray(px, dtype=np.float64).reshape(-1)
        py = np.asarray(py, dtype=np.float64).reshape(-1)
        x, y, tri = self.s.x, self.s.y, self.tri
        cell = self.cells_of(px, py)
        found = np.full(len(px), -1, dtype=np.int64)
        w1 = np.zeros(len(px))
        w2 = np.zeros(len(px))
        todo = np.flatnonzero(cell >= 0)
        n_in = self.start[cell[todo] + 1] - self.start[cell[todo]]
        rank = 0
        eps = 1e-12
        while todo.size:
            live = rank < n_in
            todo, n_in = todo[live], n_in[live]
            if not todo.size:
                break
            t = self.items[self.start[cell[todo]] + rank].astype(np.int64)
            # barycentric weights: solve [x1-x0, x2-x0; y1-y0, y2-y0] w = p - p0
            p0, p1, p2 = tri[t, 0], tri[t, 1], tri[t, 2]
            ax, ay = x[p0], y[p0]
            e1x, e1y = x[p1] - ax, y[p1] - ay
            e2x, e2y = x[p2] - ax, y[p2] - ay
            det = e1x * e2y - e2x * e1y
            dx, dy = px[todo] - ax, py[todo] - ay
            a = (dx * e2y - dy * e2x) / det
            b = (e1x * dy - e1y * dx) / det
            hit = (a >= -eps) & (b >= -eps) & (a + b <= 1 + eps)
            idx = todo[hit]
            found[idx] = t[hit]
            w1[idx], w2[idx] = a[hit], b[hit]
            todo, n_in = todo[~hit], n_in[~hit]
            rank += 1
        return found, w1, w2


def interpolate(index: TriangleIndex, px: ArrayLike, py: ArrayLike) -> NDArray[np.float64]:
    """Ground elevation at points (linear on each triangle; NaN off the surface or in a hole)."""
    t, a, b = index.locate(px, py)
    z = index.s.z
    tri = index.tri
    ok = t >= 0
    tt = np.where(ok, t, 0)
    z0, z1, z2 = z[tri[tt, 0]], z[tri[tt, 1]], z[tri[tt, 2]]
    out = z0 + a * (z1 - z0) + b * (z2 - z0)
    return np.where(ok, out, np.nan)


def _edges(index: TriangleIndex) -> tuple[NDArray[np.int64], NDArray[np.int64]]:
    tri = index.tri
    e = np.concatenate([tri[:, [0, 1]], tri[:, [1, 2]], tri[:, [2, 0]]])
    e.sort(axis=1)
    e = np.unique(e, axis=0)
    return e[:, 0], e[:, 1]


def _crossings(
    index: TriangleIndex, sx: NDArray[np.float64], sy: NDArray[np.float64], ss: NDArray[np.float64]
) -> NDArray[np.float64]:
    """Stations where the polyline (sx, sy at stations ss) crosses a TIN edge."""
    x, y = index.s.x, index.s.y
    tri = index.tri
    ax, ay = sx[:-1], sy[:-1]
    bx, by = sx[1:], sy[1:]
    out = []
    # candidate triangles: those registered in the cells of both segment ends
    # (segments are shorter than a cell, so this covers every triangle they touch
    # except through a cell corner, which the mid-point adds)
    mids = ((ax + bx) / 2, (ay + by) / 2)
    seg_cells = [
        index.cells_of(ax, ay),
        index.cells_of(bx, by),
        index.cells_of(*mids),
        index.cells_of(ax, by),
        index.cells_of(bx, ay),
    ]
    pairs_seg, pairs_tri = [], []
    seen: list[NDArray[np.intp]] = []
    for cells in seg_cells:
        # a cell already looked up for the same segment adds only repeats
        fresh = cells >= 0
        for before in seen:
            fresh &= cells != before
        seen.append(cells)
        ok = np.flatnonzero(fresh)
        n = index.start[cells[ok] + 1] - index.start[cells[ok]]
        seg = np.repeat(ok, n)
        pos = np.repeat(index.start[cells[ok]], n) + (
            np.arange(n.sum()) - np.repeat(np.cumsum(n) - n, n)
        )
        pairs_seg.append(seg)
        pairs_tri.append(index.items[pos])
    # a triangle registered in two cells of a segment is tested twice: its crossing
    # comes out twice, the same number, which the unique below keeps once
    seg = np.concatenate(pairs_seg)
    trs = np.concatenate(pairs_tri)
    for k0, k1 in ((0, 1), (1, 2), (2, 0)):
        p, q = tri[trs, k0], tri[trs, k1]
        ex, ey = x[q] - x[p], y[q] - y[p]
        dx, dy = bx[seg] - ax[seg], by[seg] - ay[seg]
        den = dx * ey - dy * ex
        ok = den != 0
        rx, ry = x[p] - ax[seg], y[p] - ay[seg]
        t = np.where(ok, (rx * ey - ry * ex) / np.where(ok, den, 1), -1)
        u = np.where(ok, (rx * dy - ry * dx) / np.where(ok, den, 1), -1)
        hit = ok & (t > 0) & (t < 1) & (u >= 0) & (u <= 1)
        out.append(ss[seg[hit]] + t[hit] * (ss[seg[hit] + 1] - ss[seg[hit]]))
    return np.unique(np.round(np.concatenate(out), 9)) if out else np.empty(0)


def sample_alignment(
    hz: HorizontalGeometry,
    index: TriangleIndex,
    *,
    step: float | None = None,
    stations: ArrayLike | None = None,
    lo: float | None = None,
    hi: float | None = None,
    chord: float = 0.001,
):
    """Ground along the alignment at every TIN edge crossing plus regular stations.

    Returns (stations, ground); ground is NaN where the alignment is off the
    surface or over a hole.
    """
    a = hz.start if lo is None else max(lo, hz.start)
    b = hz.end if hi is None else min(hi, hz.end)
    # a polyline of the alignment: chords within ``chord`` and shorter than a grid cell
    base = [np.array([a, b])]
    for g in hz.elements:
        s0, s1 = max(g.start_station, a), min(g.end_station, b)
        if s1 <= s0:
            continue
        k = max(abs(g.k0), abs(g.k1))
        h = min(index.cell * 0.9, math.sqrt(8 * chord / k) if k > 0 else index.cell * 0.9)
        n = max(2, math.ceil((s1 - s0) / h) + 1)
        if n > 20_000_000:
            from gradeline.errors import UsageError

            raise UsageError(
                f"sampling the surface along {s1 - s0:g} of alignment needs "
                f"{n:,} points (at most 20,000,000); is a length in the file wrong?"
            )
        base.append(np.linspace(s0, s1, n))
    ss = np.unique(np.concatenate(base))
    north, east, _ = horizontal.evaluate(hz, ss)
    cross = _crossings(index, east, north, ss)
    parts = [ss, cross]
    if step:
        parts.append(np.arange(math.ceil(a / step) * step, b + 1e-9, step))
    if stations is not None:
        parts.append(np.asarray(stations, dtype=np.float64).reshape(-1))
    st = np.unique(np.concatenate(parts))
    st = st[(st >= a) & (st <= b)]
    north, east, _ = horizontal.evaluate(hz, st)
    return st, interpolate(index, east, north)


def ground_profile(
    name: str,
    stations: NDArray[np.float64],
    ground: NDArray[np.float64],
    source: SourceRef | None = None,
) -> GroundProfile:
    """A :class:`GroundProfile` with one piece per run of stations on the surface."""
    pieces = [
        GroundPiece(tuple(stations[i : j + 1].tolist()), tuple(ground[i : j + 1].tolist()), source)
        for i, j in true_runs(np.isfinite(ground))
        if j > i
    ]
    return GroundProfile(name, tuple(pieces), source)
