"""Cross-check of the plan: stated CoordGeom values against the solved geometry."""

from __future__ import annotations

import math

from gradeline.analysis.findings import Collector
from gradeline.geometry import horizontal
from gradeline.geometry.curve_data import tangent_intersection
from gradeline.geometry.horizontal import HorizontalGeometry
from gradeline.model import Alignment, Document, HCurve, HIrregular, HLine, HSpiral
from gradeline.model.units import angle_from_unit

__all__ = ["check_plan"]


# --------------------------------------------------------------------------- horizontal
def check_plan(c: Collector, al: Alignment, hz: HorizontalGeometry, doc: Document) -> None:
    units = doc.units
    conv = hz.convention

    joins = 0
    for f in hz.findings:
        el = hz.alignment.elements[f.index]
        if f.code == "gap":
            c.distance(
                el.element,
                f.index + 1,
                f.station,
                "gap at join (continuity)",
                f.computed,
                0.0,
                f.source,
                units.symbol,
                f.message,
                miss=True,
            )
        elif f.code == "angle-point":
            c.note(
                el.element,
                f.index + 1,
                f.station,
                "angle point between lines",
                "info",
                f.message + " (a deliberate angle point between two lines)",
                f.source,
            )
        elif f.code == "kink":
            c.angle(
                el.element,
                f.index + 1,
                f.station,
                "tangency at join",
                f.computed,
                0.0,
                f.source,
                units.angular,
                f.message,
            )
        elif f.code == "spiral-end":
            c.distance(
                el.element,
                f.index + 1,
                f.station,
                "End point (from Start, direction, length and radii)",
                f.computed,
                0.0,
                f.source,
                units.symbol,
                f.message,
                miss=True,
            )
        elif f.code == "radius" and "one circle" in f.message:
            c.distance(
                el.element,
                f.index + 1,
                f.station,
                "End-Center distance (radius at End)",
                f.computed,
                f.stated,
                f.source,
                units.symbol,
                f.message,
            )
    by_index: dict[int, list[horizontal.ElementGeom]] = {}
    for g in hz.elements:
        by_index.setdefault(g.index, []).append(g)
    for i in range(1, len(hz.elements)):
        a, b = hz.elements[i - 1], hz.elements[i]
        if a.index != b.index:
            joins += 1
    c.note(
        "CoordGeom",
        None,
        None,
        "joins checked for gaps and tangency",
        "ok" if joins else "info",
        f"{joins} joins between {len(hz.alignment.elements)} elements",
        hz.alignment.source,
    )
    for index, el in enumerate(hz.alignment.elements):
        parts = by_index[index]
        g0, g1 = parts[0], parts[-1]
        n = index + 1
        src = el.source
        length = sum(p.length for p in parts)
        c.distance(
            el.element, n, g0.start_station, "length", el.get("length"), length, src, units.symbol
        )
        c.distance(
            el.element,
            n,
            g0.start_station,
            "staStart",
            el.get("staStart"),
            g0.start_station,
            src,
            units.symbol,
        )
        if isinstance(el, (HLine, HIrregular)):
            c.direction(
                el.element,
                n,
                g0.start_station,
                "dir",
                el.get("dir"),
                g0.heading0,
                src,
                units.direction,
                conv,
            )
        if isinstance(el, (HCurve, HSpiral)):
            c.direction(
                el.element,
                n,
                g0.start_station,
                "dirStart",
                el.get("dirStart"),
                g0.heading0,
                src,
                units.direction,
                conv,
            )
            c.direction(
                el.element,
                n,
                g0.start_station,
                "dirEnd",
                el.get("dirEnd"),
                g1.heading1,
                src,
                units.direction,
                conv,
            )
        if isinstance(el, HCurve):
            r = 1.0 / abs(g0.k0)
            sweep = g0.length / r
            c.distance(
                "Curve",
                n,
                g0.start_station,
                "radius (Start-Center)",
                el.get("radius"),
                r,
                src,
                units.symbol,
            )
            c.distance(
                "Curve",
                n,
                g0.start_station,
                "chord",
                el.get("chord"),
                math.hypot(g0.x1 - g0.x0, g0.y1 - g0.y0),
                src,
                units.symbol,
            )
            d = el.get("delta")
            c.angle(
                "Curve",
                n,
                g0.start_station,
                "delta",
                None if d is None else abs(angle_from_unit(d, units.angular)),
                sweep,
                src,
                units.angular,
            )
            c.distance(
                "Curve",
                n,
                g0.start_station,
                "tangent",
                el.get("tangent"),
                r * math.tan(sweep / 2),
                src,
                units.symbol,
            )
            c.distance(
                "Curve",
                n,
                g0.start_station,
                "external",
                el.get("external"),
                r * (1 / math.cos(sweep / 2) - 1),
                src,
                units.symbol,
            )
            c.distance(
                "Curve",
                n,
                g0.start_station,
                "midOrd",
                el.get("midOrd"),
                r * (1 - math.cos(sweep / 2)),
                src,
                units.symbol,
            )
            _pi(c, "Curve", n, g0, el.pi, units.symbol, src)
            xe, ye = el.end[1], el.end[0]
            c.distance(
                "Curve",
                n,
                g0.end_station,
                "End point (on the arc from Start and Center)",
                math.hypot(xe - g0.x1, ye - g0.y1),
                0.0,
                src,
                units.symbol,
                miss=True,
            )
        if isinstance(el, HSpiral):
            theta = abs(g0.heading1 - g0.heading0)
            t = el.get("theta")
            c.angle(
                "Spiral",
                n,
                g0.start_station,
                "theta",
                None if t is None else abs(angle_from_unit(t, units.angular)),
                theta,
                src,
                units.angular,
            )
            _spiral_values(c, n, el, g0, theta, units.symbol, src)
            _pi(c, "Spiral", n, g0, el.pi, units.symbol, src)
    total = hz.end - hz.start
    c.distance("Alignment", None, hz.start, "length", al.length, total, al.source, units.symbol)


def _pi(c: Collector, element: str, n: int, g: horizontal.ElementGeom, stated, unit, src) -> None:
    if stated is None:
        return
    pi = tangent_intersection((g.x0, g.y0), g.heading0, (g.x1, g.y1), g.heading1)
    if pi is None:
        return
    miss = math.hypot(stated[1] - pi[0], stated[0] - pi[1])
    c.distance(
        element,
        n,
        g.start_station,
        "PI point (tangents' intersection)",
        miss,
        0.0,
        src,
        unit,
        miss=True,
    )


def _spiral_values(c: Collector, n: int, el: HSpiral, g, theta: float, unit: str, src) -> None:
    if math.isinf(el.radius_start):  # tangent at the start
        ox, oy, hd = g.x0, g.y0, g.heading0
        dx, dy = g.x1 - ox, g.y1 - oy
    elif math.isinf(el.radius_end):  # tangent at the end, measured back from it
        ox, oy, hd = g.x1, g.y1, g.heading1 + math.pi
        dx, dy = g.x0 - ox, g.y0 - oy
    else:
        return
    x = abs(dx * math.cos(hd) + dy * math.sin(hd))
    y = abs(-dx * math.sin(hd) + dy * math.cos(hd))
    c.distance("Spiral", n, g.start_station, "totalX", el.get("totalX"), x, src, unit)
    c.distance("Spiral", n, g.start_station, "totalY", el.get("totalY"), y, src, unit)
    if theta > 0:
        c.distance(
            "Spiral",
            n,
            g.start_station,
            "tanLong",
            el.get("tanLong"),
            x - y / math.tan(theta),
            src,
            unit,
        )
        c.distance(
            "Spiral",
            n,
            g.start_station,
            "tanShort",
            el.get("tanShort"),
            y / math.sin(theta),
            src,
            unit,
        )
