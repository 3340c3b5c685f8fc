"""Vertical geometry: tangents, parabolic, unsymmetrical and circular curves.

:func:`solve` turns a :class:`~gradeline.model.Profile` into a
:class:`VerticalGeometry`: one record per vertical curve plus a piecewise
description of the finished grade that :func:`elevation` and :func:`grade`
evaluate over whole numpy arrays of stations.

Formulas (common practice, any highway design text): on a parabolic curve the
grade changes linearly, so ``y = y_BVC + g1*x + (g2 - g1)*x**2/(2L)``; the offset
from the tangent is ``A*x**2/(200L)`` with A in percent; the middle ordinate is
``A*L/800``. An unsymmetrical curve is two parabolas with a common tangent under
the PVI whose grade is ``(g1*l1 + g2*l2)/(l1 + l2)``; its offset at the PVI is
``l1*l2*(g2 - g1)/(2(l1 + l2))``. A circular curve is the arc of radius R
tangent to both grade lines; its tangent length along each grade line is
``R*tan(|theta2 - theta1|/2)`` with ``theta = atan(g)``.
"""

from __future__ import annotations

import math
from collections.abc import Callable
from dataclasses import dataclass, field

import numpy as np
from numpy.typing import ArrayLike, NDArray

from gradeline.errors import ModelError
from gradeline.model import CurveKind, Profile, SourceRef

__all__ = [
    "KeyPoint",
    "VerticalCurve",
    "VerticalGeometry",
    "elevation",
    "evaluate",
    "grade",
    "key_points",
    "solve",
    "tangent_elevation",
]

#: Stations closer than this (file units) count as the same point when curve
#: ends are compared; it absorbs rounding in exported files.
JOIN_TOLERANCE = 1e-6


@dataclass(frozen=True, slots=True)
class VerticalCurve:
    """Computed data of one vertical curve.

    Grades are ratios (0.02 = 2 %). ``length`` is the horizontal length from
    BVC to EVC. ``pvi_offset`` is the curve's elevation at the PVI station minus
    the PVI elevation: the (signed) middle ordinate, negative on crests.
    """

    index: int
    kind: CurveKind
    pvi_station: float
    pvi_elevation: float
    grade_in: float
    grade_out: float
    bvc_station: float
    bvc_elevation: float
    evc_station: float
    evc_elevation: float
    length_in: float
    length_out: float
    pvi_offset: float
    turning_station: float | None = None
    turning_elevation: float | None = None
    radius: float | None = None
    arc_length: float | None = None
    source: SourceRef | None = field(default=None, compare=False)

    @property
    def length(self) -> float:
        """Horizontal curve length L, BVC to EVC."""
        return self.evc_station - self.bvc_station

    @property
    def grade_change(self) -> float:
        """g2 - g1 as a ratio."""
        return self.grade_out - self.grade_in

    @property
    def a_pct(self) -> float:
        """Algebraic difference of grades A = g2 - g1, in percent."""
        return 100.0 * self.grade_change

    @property
    def k(self) -> float | None:
        """K = L/|A| (length per percent of grade change); None when A = 0."""
        a = abs(self.a_pct)
        return self.length / a if a > 0 else None

    @property
    def curve_type(self) -> str:
        """``crest``, ``sag`` or ``flat`` (no grade change)."""
        if self.grade_change < 0:
            return "crest"
        if self.grade_change > 0:
            return "sag"
        return "flat"


@dataclass(frozen=True, slots=True)
class KeyPoint:
    """A station that deserves a row of its own, with its tags (``BVC``, ...)."""

    station: float
    tags: tuple[str, ...]

    @property
    def text(self) -> str:
        """Tags joined for a table cell, e.g. ``EVC;BVC``."""
        return ";".join(self.tags)


@dataclass(frozen=True, eq=False)
class VerticalGeometry:
    """A solved profile: curve records plus piecewise finished-grade data.

    Piece ``i`` starts at ``starts[i]``. Polynomial pieces evaluate
    ``y0 + g0*d + c*d**2`` with ``d = s - starts[i]``; circular pieces
    (``circular[i]``) are ``cy - sign*sqrt(r**2 - (s - cx)**2)``, sign +1 on sags.
    """

    profile: Profile
    curves: tuple[VerticalCurve, ...]
    pvi_stations: NDArray[np.float64]
    pvi_elevations: NDArray[np.float64]
    starts: NDArray[np.float64]
    y0: NDArray[np.float64]
    g0: NDArray[np.float64]
    c: NDArray[np.float64]
    circular: NDArray[np.bool_]
    cx: NDArray[np.float64]
    cy: NDArray[np.float64]
    r: NDArray[np.float64]
    sign: NDArray[np.float64]
    lookup: _PieceLookup = field(repr=False)

    @property
    def start(self) -> float:
        """First station of the profile."""
        return float(self.pvi_stations[0])

    @property
    def end(self) -> float:
        """Last station of the profile."""
        return float(self.pvi_stations[-1])

    @property
    def grades(self) -> NDArray[np.float64]:
        """Grade of each tangent between consecutive PVIs (ratios)."""
        return np.diff(self.pvi_elevations) / np.diff(self.pvi_stations)


@dataclass(frozen=True, eq=False)
class _PieceLookup:
    """Uniform-grid index from a station to its piece.

    A binary search per station (``np.searchsorted``) costs a cache-unfriendly
    branch per level; a grid of buckets, each remembering the piece at its left
    edge, gets the piece with one multiply and a short forward correction.
    """

    lo: float
    inv_width: float
    table: NDArray[np.intp]
    next_start: NDArray[np.float64]

    @classmethod
    def build(cls, starts: NDArray[np.float64], end: float) -> _PieceLookup:
        n = len(starts)
        buckets = int(min(max(32 * n, 16), 1 << 20))
        width = (end - starts[0]) / buckets
        edges = starts[0] + width * np.arange(buckets)
        table = np.searchsorted(starts, edges, side="right") - 1
        np.clip(table, 0, n - 1, out=table)
        nxt = np.append(starts[1:], np.inf)
        for arr in (table, nxt):
            arr.flags.writeable = False
        return cls(float(starts[0]), 1.0 / width, table.astype(np.intp), nxt)

    def locate(self, s: NDArray[np.float64]) -> NDArray[np.intp]:
        """Index of the piece holding each (finite) station, clipped to the ends."""
        b = s - self.lo
        b *= self.inv_width
        bi = b.astype(np.intp)
        np.clip(bi, 0, len(self.table) - 1, out=bi)
        idx = self.table[bi]
        todo = np.flatnonzero(self.next_start[idx] <= s)
        while todo.size:
            idx[todo] += 1
            todo = todo[self.next_start[idx[todo]] <= s[todo]]
        return idx


def _plain(value: float) -> str:
    return f"{value:.3f}"


class _Builder:
    """Collects pieces while :func:`solve` walks the PVIs."""

    def __init__(self) -> None:
        self.rows: list[tuple[float, float, float, float, bool, float, float, float, float]] = []

    def poly(self, x0: float, x1: float, y0: float, g0: float, c: float) -> None:
        if x1 > x0:
            self.rows.append((x0, y0, g0, c, False, 0.0, 0.0, 0.0, 0.0))

    def arc(self, x0: float, x1: float, cx: float, cy: float, r: float, sign: float) -> None:
        if x1 > x0:
            self.rows.append((x0, 0.0, 0.0, 0.0, True, cx, cy, r, sign))


def _turning_on_parabola(x0: float, length: float, y0: float, g0: float, c: float):
    if c == 0.0:
        return None
    x = -g0 / (2.0 * c)
    if 0.0 <= x <= length:
        return x0 + x, y0 + g0 * x + c * x * x
    return None


def solve(profile: Profile, label: Callable[[float], str] | None = None) -> VerticalGeometry:
    """Compute every vertical curve of ``profile`` and its finished grade.

    Parameters
    ----------
    profile : Profile
        PVIs and curve specifications.
    label : callable, optional
        Formats a station for error messages (defaults to plain numbers).

    Returns
    -------
    VerticalGeometry

    Raises
    ------
    ModelError
        A curve overlaps its neighbour, runs past a profile end or past the
        neighbouring PVI; the error names the offending element and line.

    Examples
    --------
    >>> from gradeline.model import PVISpec, Profile
    >>> prof = Profile("FG", (PVISpec(0.0, 100.0),
    ...                       PVISpec(2000.0, 135.0, "parabolic", 800.0, 800.0),
    ...                       PVISpec(5000.0, 105.0)))
    >>> c = solve(prof).curves[0]
    >>> (c.bvc_station, round(c.bvc_elevation, 6), c.evc_station, round(c.evc_elevation, 6))
    (1200.0, 121.0, 2800.0, 127.0)
    >>> round(c.a_pct, 6), round(c.k, 4)
    (-2.75, 581.8182)
    """
    fmt = label or _plain
    pvis = profile.pvis
    st = np.array([p.station for p in pvis], dtype=np.float64)
    el = np.array([p.elevation for p in pvis], dtype=np.float64)
    grades = np.diff(el) / np.diff(st)
    build = _Builder()
    curves: list[VerticalCurve] = []
    pos_x, pos_y = float(st[0]), float(el[0])
    prev_was_curve = False
    n = len(pvis)
    for i in range(1, n - 1):
        spec = pvis[i]
        s_pvi, e_pvi = float(st[i]), float(el[i])
        g1, g2 = float(grades[i - 1]), float(grades[i])
        if spec.kind == "none":
            build.poly(pos_x, s_pvi, pos_y, g1, 0.0)
            pos_x, pos_y, prev_was_curve = s_pvi, e_pvi, False
            continue
        curve, pieces = _curve(i, spec, s_pvi, e_pvi, g1, g2)
        if curve.bvc_station < pos_x - JOIN_TOLERANCE:
            if prev_was_curve:
                why = (
                    f"vertical curves overlap: BVC {fmt(curve.bvc_station)} is before the "
                    f"previous EVC {fmt(pos_x)}; shorten one of the curves"
                )
            elif i == 1:
                why = (
                    f"vertical curve reaches past the start of the profile: BVC "
                    f"{fmt(curve.bvc_station)} is before {fmt(pos_x)}"
                )
            else:
                why = (
                    f"vertical curve starts before the previous PVI: BVC "
                    f"{fmt(curve.bvc_station)} is before {fmt(pos_x)}"
                )
            raise ModelError(why, spec.source, spec.element)
        s_next = float(st[i + 1])
        if curve.evc_station > s_next + JOIN_TOLERANCE and pvis[i + 1].kind == "none":
            where = "the end of the profile" if i + 1 == n - 1 else "the next PVI"
            raise ModelError(
                f"vertical curve reaches past {where}: EVC {fmt(curve.evc_station)} "
                f"is after {fmt(s_next)}",
                spec.source,
                spec.element,
            )
        build.poly(pos_x, curve.bvc_station, pos_y, g1, 0.0)
        for piece in pieces:
            if piece[0] == "poly":
                build.poly(*piece[1:])
            else:
                build.arc(*piece[1:])
        curves.append(curve)
        pos_x, pos_y, prev_was_curve = curve.evc_station, curve.evc_elevation, True
    build.poly(pos_x, float(st[-1]), pos_y, float(grades[-1]), 0.0)
    if not build.rows:  # a profile of zero-length pieces cannot occur: stations increase
        raise ModelError("profile has no length", profile.source, "ProfAlign")
    cols = list(zip(*build.rows, strict=True))

    def ro(values, dtype=np.float64):
        arr = np.array(values, dtype=dtype)
        arr.flags.writeable = False
        return arr

    st.flags.writeable = False
    el.flags.writeable = False
    starts = ro(cols[0])
    return VerticalGeometry(
        profile=profile,
        curves=tuple(curves),
        pvi_stations=st,
        pvi_elevations=el,
        starts=starts,
        y0=ro(cols[1]),
        g0=ro(cols[2]),
        c=ro(cols[3]),
        circular=ro(cols[4], np.bool_),
        cx=ro(cols[5]),
        cy=ro(cols[6]),
        r=ro(cols[7]),
        sign=ro(cols[8]),
        lookup=_PieceLookup.build(starts, float(st[-1])),
    )


def _curve(i, spec, s_pvi, e_pvi, g1, g2):
    """Curve record and its pieces for PVI ``i``."""
    if spec.kind in ("parabolic", "unsymmetric"):
        l1, l2 = spec.length_in, spec.length_out
        bvc, evc = s_pvi - l1, s_pvi + l2
        y_bvc, y_evc = e_pvi - g1 * l1, e_pvi + g2 * l2
        offset = l1 * l2 * (g2 - g1) / (2.0 * (l1 + l2))
        if l1 == l2:
            c = (g2 - g1) / (2.0 * (l1 + l2))
            pieces = [("poly", bvc, evc, y_bvc, g1, c)]
            turning = _turning_on_parabola(bvc, l1 + l2, y_bvc, g1, c)
        else:
            gm = (g1 * l1 + g2 * l2) / (l1 + l2)
            c1, c2 = (gm - g1) / (2.0 * l1), (g2 - gm) / (2.0 * l2)
            y_mid = e_pvi + offset
            pieces = [
                ("poly", bvc, s_pvi, y_bvc, g1, c1),
                ("poly", s_pvi, evc, y_mid, gm, c2),
            ]
            turning = _turning_on_parabola(bvc, l1, y_bvc, g1, c1) or _turning_on_parabola(
                s_pvi, l2, y_mid, gm, c2
            )
        curve = VerticalCurve(
            index=i,
            kind=spec.kind,
            pvi_station=s_pvi,
            pvi_elevation=e_pvi,
            grade_in=g1,
            grade_out=g2,
            bvc_station=bvc,
            bvc_elevation=y_bvc,
            evc_station=evc,
            evc_elevation=y_evc,
            length_in=l1,
            length_out=l2,
            pvi_offset=offset,
            turning_station=turning[0] if turning else None,
            turning_elevation=turning[1] if turning else None,
            source=spec.source,
        )
        return curve, pieces
    # Circular vertical curve: the arc tangent to both grade lines.
    t1, t2 = math.atan(g1), math.atan(g2)
    dtheta = t2 - t1
    if dtheta == 0.0:
        radius = abs(spec.radius) if spec.radius is not None else math.inf
        curve = VerticalCurve(
            i,
            "circular",
            s_pvi,
            e_pvi,
            g1,
            g2,
            s_pvi,
            e_pvi,
            s_pvi,
            e_pvi,
            0.0,
            0.0,
            0.0,
            radius=radius,
            arc_length=0.0,
            source=spec.source,
        )
        return curve, []
    if spec.radius is not None:
        radius = abs(spec.radius)
    else:
        radius = float(spec.arc_length) / abs(dtheta)
    tangent = radius * math.tan(abs(dtheta) / 2.0)
    bvc, y_bvc = s_pvi - tangent * math.cos(t1), e_pvi - tangent * math.sin(t1)
    evc, y_evc = s_pvi + tangent * math.cos(t2), e_pvi + tangent * math.sin(t2)
    sign = 1.0 if dtheta > 0 else -1.0
    cx = bvc - sign * radius * math.sin(t1)
    cy = y_bvc + sign * radius * math.cos(t1)
    turning = (cx, cy - sign * radius) if bvc <= cx <= evc else None
    y_at_pvi = cy - sign * math.sqrt(max(radius * radius - (s_pvi - cx) ** 2, 0.0))
    curve = VerticalCurve(
        index=i,
        kind="circular",
        pvi_station=s_pvi,
        pvi_elevation=e_pvi,
        grade_in=g1,
        grade_out=g2,
        bvc_station=bvc,
        bvc_elevation=y_bvc,
        evc_station=evc,
        evc_elevation=y_evc,
        length_in=s_pvi - bvc,
        length_out=evc - s_pvi,
        pvi_offset=y_at_pvi - e_pvi,
        turning_station=turning[0] if turning else None,
        turning_elevation=turning[1] if turning else None,
        radius=radius,
        arc_length=radius * abs(dtheta),
        source=spec.source,
    )
    return curve, [("arc", bvc, evc, cx, cy, radius, sign)]


def evaluate(
    geom: VerticalGeometry, stations: ArrayLike
) -> tuple[NDArray[np.float64], NDArray[np.float64]]:
    """Finished-grade elevation and grade (ratio) at each station.

    Stations outside the profile give NaN.

    Examples
    --------
    >>> from gradeline.model import PVISpec, Profile
    >>> prof = Profile("FG", (PVISpec(0.0, 100.0),
    ...                       PVISpec(2000.0, 135.0, "parabolic", 800.0, 800.0),
    ...                       PVISpec(5000.0, 105.0)))
    >>> z, g = evaluate(solve(prof), [1200.0, 2000.0, 6000.0])
    >>> z.round(4).tolist(), (g * 100).round(4).tolist()
    ([121.0, 129.5, nan], [1.75, 0.375, nan])
    """
    s_in = np.asarray(stations, dtype=np.float64)
    s = s_in.reshape(-1)
    # two reductions answer "all inside?" faster than a full mask (NaN fails both)
    any_outside = s.size > 0 and not (s.min() >= geom.start and s.max() <= geom.end)
    if any_outside:
        outside = ~((s >= geom.start) & (s <= geom.end))  # NaN counts as outside
        s = np.where(outside, geom.start, s)
    idx = geom.lookup.locate(s)
    d = s - geom.starts[idx]
    c = geom.c[idx]
    g0 = geom.g0[idx]
    # z = y0 + d*(g0 + c*d) and g = g0 + 2*c*d, in place to spare temporaries
    cd = c * d
    z = cd + g0
    z *= d
    z += geom.y0[idx]
    g = cd
    g *= 2.0
    g += g0
    on_arc = np.flatnonzero(geom.circular[idx])
    if on_arc.size:
        ci = idx[on_arc]
        dx = s[on_arc]
        dx -= geom.cx[ci]
        root = geom.r[ci]
        root *= root
        root -= dx * dx
        np.maximum(root, 0.0, out=root)
        np.sqrt(root, out=root)
        sign = geom.sign[ci]
        dx *= sign
        dx /= root
        g[on_arc] = dx
        root *= sign
        z[on_arc] = geom.cy[ci] - root
    if any_outside:
        z[outside] = np.nan
        g[outside] = np.nan
    return z.reshape(s_in.shape), g.reshape(s_in.shape)


def elevation(geom: VerticalGeometry, stations: ArrayLike) -> NDArray[np.float64]:
    """Finished-grade elevation at each station (NaN outside the profile).

    Examples
    --------
    >>> from gradeline.model import PVISpec, Profile
    >>> prof = Profile("FG", (PVISpec(0.0, 100.0),
    ...                       PVISpec(2000.0, 135.0, "parabolic", 800.0, 800.0),
    ...                       PVISpec(5000.0, 105.0)))
    >>> float(elevation(solve(prof), 1600.0))
    126.625
    """
    return evaluate(geom, stations)[0]


def grade(geom: VerticalGeometry, stations: ArrayLike) -> NDArray[np.float64]:
    """Finished-grade slope (ratio, rise/run) at each station (NaN outside).

    Examples
    --------
    >>> from gradeline.model import PVISpec, Profile
    >>> prof = Profile("FG", (PVISpec(0.0, 100.0), PVISpec(100.0, 102.0)))
    >>> float(grade(solve(prof), 50.0))
    0.02
    """
    return evaluate(geom, stations)[1]


def tangent_elevation(geom: VerticalGeometry, stations: ArrayLike) -> NDArray[np.float64]:
    """Elevation on the grade lines through the PVIs (NaN outside the profile).

    Examples
    --------
    >>> from gradeline.model import PVISpec, Profile
    >>> prof = Profile("FG", (PVISpec(0.0, 100.0),
    ...                       PVISpec(2000.0, 135.0, "parabolic", 800.0, 800.0),
    ...                       PVISpec(5000.0, 105.0)))
    >>> float(tangent_elevation(solve(prof), 2000.0))
    135.0
    """
    s = np.asarray(stations, dtype=np.float64)
    z = np.interp(s, geom.pvi_stations, geom.pvi_elevations)
    return np.where((s < geom.start) | (s > geom.end), np.nan, z)


def key_points(geom: VerticalGeometry) -> tuple[KeyPoint, ...]:
    """Stations of START, END, every PVI and every BVC, EVC, HIGH and LOW point.

    Tags that fall on the same station are merged into one key point.
    """
    found: list[tuple[float, int, str]] = [(geom.start, 0, "START")]
    curve_at = {c.index: c for c in geom.curves}
    for i in range(1, len(geom.pvi_stations) - 1):
        c = curve_at.get(i)
        if c is not None:
            found.append((c.bvc_station, 1, "BVC"))
            if c.turning_station is not None:
                found.append((c.turning_station, 3, "HIGH" if c.curve_type == "crest" else "LOW"))
            found.append((c.evc_station, 0, "EVC"))
        found.append((float(geom.pvi_stations[i]), 2, "PVI"))
    found.append((geom.end, 4, "END"))
    found.sort()
    merged: list[KeyPoint] = []
    for station, _, tag in found:
        if merged and abs(station - merged[-1].station) <= JOIN_TOLERANCE:
            if tag not in merged[-1].tags:
                merged[-1] = KeyPoint(merged[-1].station, merged[-1].tags + (tag,))
        else:
            merged.append(KeyPoint(station, (tag,)))
    return tuple(merged)
