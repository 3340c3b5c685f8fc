"""Two descriptions of one alignment (LandXML and IFC, or two revisions) compared.

Element by element -- kind, length, start point, start direction, radii; PVI
station, elevation, curve kind and length -- and by samples along the common
stations: plan position and finished-grade elevation at the same station. Every
comparison is a :class:`~gradeline.analysis.findings.Finding` ("stated" is the
other file's value, "computed" this file's), so the check report shows them.
"""

from __future__ import annotations

import math

import numpy as np

from gradeline.analysis.findings import Collector, Finding, Tolerances

__all__ = ["compare_alignments", "compare_representation"]

#: Most samples a side for the along-the-road comparison.
SAMPLES = 200_000


def _radius(k: float) -> float:
    return math.inf if k == 0 else 1.0 / abs(k)


def compare_alignments(a, b, tol: Tolerances, other: str) -> list[Finding]:
    """Findings of ``b`` (the file named ``other``) against ``a``."""
    c = Collector(a.alignment.name, tol)
    unit = a.document.units.symbol
    where = f"against {other}"
    if (a.horizontal is None) != (b.horizontal is None):
        c.note(
            "Alignment", None, None, "plan geometry", "over", f"only one file has a plan ({where})"
        )
    elif a.horizontal is not None:
        _plan(c, a, b, unit, where)
    if (a.geometry is None) != (b.geometry is None):
        c.note("Profile", None, None, "profile", "over", f"only one file has a profile ({where})")
    elif a.geometry is not None:
        _profile(c, a, b, unit, where)
    return c.items


def _plan(c: Collector, a, b, unit: str, where: str) -> None:
    ha, hb = a.horizontal, b.horizontal
    if len(ha.elements) != len(hb.elements):
        c.note(
            "CoordGeom",
            None,
            None,
            "elements",
            "over",
            f"{len(ha.elements)} elements here, {len(hb.elements)} in the other ({where})",
        )
    for i, (ea, eb) in enumerate(zip(ha.elements, hb.elements, strict=False)):
        el, n, s = ea.element, i + 1, ea.start_station
        if ea.kind != eb.kind:
            c.note(
                el,
                n,
                s,
                "element kind",
                "over",
                f"{ea.kind} here, {eb.kind} in the other ({where})",
            )
            continue
        c.distance(el, n, s, f"length ({where})", eb.length, ea.length, None, unit)
        c.distance(
            el,
            n,
            s,
            f"start point ({where})",
            math.hypot(eb.x0 - ea.x0, eb.y0 - ea.y0),
            0.0,
            None,
            unit,
            miss=True,
        )
        c.angle(
            el,
            n,
            s,
            f"start direction ({where})",
            eb.heading0,
            ea.heading0,
            None,
            "decimal degrees",
        )
        for name, ka, kb in (("radius at start", ea.k0, eb.k0), ("radius at end", ea.k1, eb.k1)):
            ra, rb = _radius(ka), _radius(kb)
            if math.isinf(ra) and math.isinf(rb):
                continue
            if math.isinf(ra) or math.isinf(rb) or (ka > 0) != (kb > 0):
                c.note(el, n, s, name, "over", f"{ra:g} here, {rb:g} in the other ({where})")
            else:
                c.distance(el, n, s, f"{name} ({where})", rb, ra, None, unit)
    lo, hi = max(ha.start, hb.start), min(ha.end, hb.end)
    c.distance(
        "Alignment", None, ha.start, f"start station ({where})", hb.start, ha.start, None, unit
    )
    c.distance("Alignment", None, ha.end, f"end station ({where})", hb.end, ha.end, None, unit)
    if hi <= lo:
        return
    s = _stations(lo, hi)
    na, ea_, _ = a.plan_at(s)
    nb, eb_, _ = b.plan_at(s)
    _worst(c, "Alignment", "plan position", s, np.hypot(na - nb, ea_ - eb_), unit, where)


def _profile(c: Collector, a, b, unit: str, where: str) -> None:
    ga, gb = a.geometry, b.geometry
    pa, pb = a.profile.pvis, b.profile.pvis
    if len(pa) != len(pb):
        c.note(
            "ProfAlign",
            None,
            None,
            "PVIs",
            "over",
            f"{len(pa)} PVIs here, {len(pb)} in the other ({where})",
        )
    else:
        for i, (x, y) in enumerate(zip(pa, pb, strict=True)):
            el, n = x.element, i + 1
            if x.kind != y.kind:
                c.note(
                    el,
                    n,
                    x.station,
                    "curve kind",
                    "over",
                    f"{x.kind} here, {y.kind} in the other ({where})",
                )
                continue
            c.distance(el, n, x.station, f"PVI station ({where})", y.station, x.station, None, unit)
            c.distance(
                el, n, x.station, f"PVI elevation ({where})", y.elevation, x.elevation, None, unit
            )
    ca = {round(k.pvi_station, 6): k for k in ga.curves}
    for k in gb.curves:
        mine = ca.get(round(k.pvi_station, 6))
        if mine is not None:
            c.distance(
                "Curve",
                None,
                k.pvi_station,
                f"curve length ({where})",
                k.length,
                mine.length,
                None,
                unit,
            )
    lo, hi = max(ga.start, gb.start), min(ga.end, gb.end)
    if hi <= lo:
        return
    s = _stations(lo, hi)
    _worst(c, "ProfAlign", "elevation", s, np.abs(a.elevation(s) - b.elevation(s)), unit, where)


def _stations(lo: float, hi: float) -> np.ndarray:
    """A sample every file unit from ``lo`` to ``hi`` (at most :data:`SAMPLES`)."""
    return np.linspace(lo, hi, int(min(SAMPLES, max(2, hi - lo))))


def _worst(c: Collector, element: str, what: str, s, d, unit: str, where: str) -> None:
    """One finding: the largest of the differences ``d`` at stations ``s``."""
    worst = int(np.nanargmax(d))
    c.distance(
        element,
        None,
        float(s[worst]),
        f"{what} at the same station ({where}; worst of {len(s)})",
        float(d[worst]),
        0.0,
        None,
        unit,
        miss=True,
    )


def compare_representation(a, plan, curve3d, tol: Tolerances) -> list[Finding]:
    """The geometric representation a file carries (evaluated points) against the
    alignment solved from its business logic: the largest offset from the plan and,
    for a 3D curve, the largest elevation difference at the same station."""

    c = Collector(a.alignment.name, tol)
    unit = a.document.units.symbol
    if a.horizontal is None:
        return c.items
    proj = a.horizontal.projector
    what = "geometric representation against the business logic"
    for name, pts in (("IfcCompositeCurve", plan), ("IfcGradientCurve", curve3d)):
        if pts is None or not len(pts):
            c.note(name, None, None, what, "info", "no such curve in the file, or not evaluated")
            continue
        st, off, status = proj(pts[:, 1], pts[:, 0])
        d = np.where(
            status == 0,
            np.abs(off),
            np.hypot(
                off, np.minimum(np.abs(st - a.horizontal.start), np.abs(st - a.horizontal.end))
            ),
        )
        _worst(c, name, f"{what}: plan position", st, d, unit, "ifcopenshell's evaluation")
        if name == "IfcGradientCurve" and a.geometry is not None:
            inside = (st >= a.geometry.start) & (st <= a.geometry.end)
            if inside.any():
                dz = np.abs(a.elevation(st[inside]) - pts[inside, 2])
                _worst(
                    c, name, f"{what}: elevation", st[inside], dz, unit, f"{inside.sum()} points"
                )
    return c.items
