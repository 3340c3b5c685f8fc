"""Plan geometry from a list of PIs (``AlignPIs``), as older exporters write it.

Each interior PI may carry a circular curve of radius R and spirals of lengths
Ls1 (in) and Ls2 (out), of any LandXML spiral type. From the tangents between PIs this module
lays out the lines, arcs and spirals as ``CoordGeom`` would state them, so the
ordinary solver computes (and checks) the rest.

Layout (common practice; the unequal-spiral tangents from memory):

* deflection Δ between the back and the ahead tangent, positive turning left;
* a simple curve: T = R tan(Δ/2), PC = PI - T·d_in, PT = PI + T·d_out;
* with spirals: θs the spiral's turning (Ls / (2R) for every law along the arc,
  whose mean is 1/2) and the spiral end (Xs, Ys) in its tangent's frame (both
  computed exactly, see :mod:`gradeline.geometry.spirals`); shift
  p = Ys - R (1 - cos θs) and k = Xs - R sin θs; then
  T1 = k1 + (R + p1) tan(Δ/2) - (p1 - p2) / sin Δ and
  T2 = k2 + (R + p2) tan(Δ/2) + (p1 - p2) / sin Δ;
  TS = PI - T1·d_in, ST = PI + T2·d_out.
"""

from __future__ import annotations

import math

import numpy as np

from gradeline.errors import ModelError
from gradeline.geometry.spirals import _LAW, SPIRAL_TYPES, TANGENT_LAW, _integrate_spiral
from gradeline.geometry.tangent_forms import place
from gradeline.model import HCurve, HElement, HLine, HSpiral, PIEntry, Point, SourceRef

__all__ = ["elements_from_pis"]


def _unit(a: Point, b: Point) -> tuple[float, float]:
    dn, de = b[0] - a[0], b[1] - a[1]
    d = math.hypot(dn, de)
    if d == 0:
        raise ModelError("two consecutive PIs coincide", None, "AlignPI")
    return dn / d, de / d


def _heading(u: tuple[float, float]) -> float:
    """Math angle (from east, counter-clockwise) of a (north, east) unit vector."""
    return math.atan2(u[0], u[1])


def _at(p: Point, u: tuple[float, float], t: float) -> Point:
    return p[0] + t * u[0], p[1] + t * u[1]


def _spiral_end(kind: str, length: float, radius: float, src) -> tuple[float, float, float]:
    """End (x, y) and turning of a spiral from a tangent to radius R, in the tangent's frame."""
    if kind not in SPIRAL_TYPES:
        raise ModelError(
            f"spiral type {kind!r} is not a LandXML 1.2 spiType; gradeline computes "
            + ", ".join(SPIRAL_TYPES),
            src,
            "AlignPI",
        )
    law = _LAW[kind]
    if law == TANGENT_LAW:
        try:
            form = place(kind, radius, length, False, 1.0, (0.0, 0.0), 0.0)
        except ValueError as exc:
            raise ModelError(str(exc), src, "AlignPI") from None
        x, y, h, _ = form.state(np.array([length]))
        return float(x[0]), float(y[0]), float(h[0])
    x, y = 0.0, 0.0
    n = max(1, math.ceil(length / (2 * radius) / 0.25))
    for i in range(n):
        dx, dy = _integrate_spiral(
            law, length, 0.0, 0.0, 1.0 / radius, length * i / n, length * (i + 1) / n
        )
        x, y = x + dx, y + dy
    return x, y, length / (2 * radius)


def _local(p: Point, u: tuple[float, float], along: float, left: float) -> Point:
    """The point ``along`` the direction u and ``left`` of it, from p (north, east)."""
    h = _heading(u) + math.pi / 2  # left of u: its heading turned by +90 degrees
    left_vec = (math.sin(h), math.cos(h))  # (north, east) components
    return p[0] + along * u[0] + left * left_vec[0], p[1] + along * u[1] + left * left_vec[1]


def elements_from_pis(pis: list[PIEntry], source: SourceRef | None = None) -> tuple[HElement, ...]:
    """Lines, arcs and spirals through a PI list (first and last PI are POB and POE).

    Raises
    ------
    ModelError
        Fewer than two PIs, coinciding PIs, a curve on the first or last PI, or
        tangents too short for the curves laid on them.
    """
    if len(pis) < 2:
        raise ModelError("an AlignPIs list needs at least two PIs", source, "AlignPIs")
    for end in (pis[0], pis[-1]):
        if end.radius is not None:
            raise ModelError("the first and last PI cannot carry a curve", end.source, "AlignPI")
    out: list[HElement] = []
    cursor = pis[0].point
    for i in range(1, len(pis) - 1):
        prev, pi, nxt = pis[i - 1].point, pis[i], pis[i + 1].point
        d_in, d_out = _unit(prev, pi.point), _unit(pi.point, nxt)
        delta = math.remainder(_heading(d_out) - _heading(d_in), 2 * math.pi)
        if pi.radius is None or abs(delta) < 1e-12:
            out.append(HLine(cursor, pi.point, (), pi.source))  # an angle point
            cursor = pi.point
            continue
        r = pi.radius
        if not (math.isfinite(r) and r > 0):
            raise ModelError(f"curve radius must be positive, got {r:g}", pi.source, "AlignPI")
        side = 1.0 if delta > 0 else -1.0
        rot = "ccw" if delta > 0 else "cw"
        ad = abs(delta)
        ls1, ls2 = pi.spiral_in, pi.spiral_out
        x1 = y1 = x2 = y2 = th1 = th2 = 0.0
        kind_in, kind_out = pi.spiral_types
        if ls1:
            x1, y1, th1 = _spiral_end(kind_in, ls1, r, pi.source)
        if ls2:
            x2, y2, th2 = _spiral_end(kind_out, ls2, r, pi.source)
        p1, k1 = y1 - r * (1 - math.cos(th1)), x1 - r * math.sin(th1)
        p2, k2 = y2 - r * (1 - math.cos(th2)), x2 - r * math.sin(th2)
        t1 = k1 + (r + p1) * math.tan(ad / 2) - (p1 - p2) / math.sin(ad)
        t2 = k2 + (r + p2) * math.tan(ad / 2) + (p1 - p2) / math.sin(ad)
        if th1 + th2 > ad + 1e-12:
            raise ModelError(
                f"spirals of {ls1:g} and {ls2:g} turn more than the deflection "
                f"{math.degrees(ad):.4f} degrees at this PI",
                pi.source,
                "AlignPI",
            )
        ts, st = _at(pi.point, d_in, -t1), _at(pi.point, d_out, t2)
        back = math.dist(cursor, ts)
        if math.dist(cursor, pi.point) + 1e-9 < t1 or math.dist(pi.point, nxt) + 1e-9 < t2:
            raise ModelError(
                f"the tangents are too short for the curve of radius {r:g} (T {t1:.3f} / {t2:.3f})",
                pi.source,
                "AlignPI",
            )
        if back > 1e-9:
            out.append(HLine(cursor, ts, (), pi.source))
        sc = _local(ts, d_in, x1, side * y1) if ls1 else ts
        cs = _local(st, (-d_out[0], -d_out[1]), x2, -side * y2) if ls2 else st
        h_sc = _heading(d_in) + side * th1
        left = (math.sin(h_sc + math.pi / 2), math.cos(h_sc + math.pi / 2))
        center = (sc[0] + side * r * left[0], sc[1] + side * r * left[1])
        if ls1:
            out.append(HSpiral(ts, sc, ls1, math.inf, r, rot, kind_in, None, (), pi.source))
        arc_pi = None if (ls1 or ls2) else pi.point  # the arc's own PI only without spirals
        out.append(HCurve(sc, center, cs, rot, arc_pi, pi.curve_stated, pi.source))
        if ls2:
            out.append(HSpiral(cs, st, ls2, r, math.inf, rot, kind_out, None, (), pi.source))
        cursor = st
    last = pis[-1].point
    if math.dist(cursor, last) > 1e-9:
        out.append(HLine(cursor, last, (), pis[-1].source))
    return tuple(out)
