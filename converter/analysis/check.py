"""Cross-check: recompute every stated value of a LandXML file, and compare
drafted profile linework with the computed finished grade.

Each comparison is a :class:`Finding` -- stated value, computed value,
difference and verdict -- so a reviewer sees exactly which element and which
value disagrees. Nothing here prints; :mod:`gradeline.render.reports` renders.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np

from gradeline.errors import GradelineError
from gradeline.geometry import horizontal, vertical
from gradeline.geometry._runs import true_runs
from gradeline.geometry.curve_data import tangent_intersection
from gradeline.geometry.horizontal import HorizontalGeometry
from gradeline.geometry.stations import Stationing
from gradeline.geometry.vertical import VerticalGeometry
from gradeline.model import Alignment, Document, HCurve, HIrregular, HLine, HSpiral, SourceRef
from gradeline.model.units import angle_from_unit, angle_to_unit
from gradeline.solved import SolvedAlignment, solve_alignment

__all__ = [
    "DEFAULT_ANGLE_TOLERANCE_SEC",
    "DEFAULT_TOLERANCE",
    "DrawingCheck",
    "Finding",
    "Tolerances",
    "check_alignment",
    "check_document",
    "check_linework",
    "fit_mapping",
]

#: Default tolerances: 0.01 file units for distances and elevations, 2 seconds
#: of arc for angles and directions (common practice for exported files).
DEFAULT_TOLERANCE = 0.01
DEFAULT_ANGLE_TOLERANCE_SEC = 2.0


@dataclass(frozen=True, slots=True)
class Tolerances:
    """Distance (file units) and angle (radians) tolerances."""

    distance: float = DEFAULT_TOLERANCE
    angle: float = math.radians(DEFAULT_ANGLE_TOLERANCE_SEC / 3600.0)


@dataclass(frozen=True, slots=True)
class Finding:
    """One comparison. ``verdict``: ``ok``, ``over`` (beyond tolerance) or ``info``."""

    alignment: str
    element: str  # e.g. "Curve" or "ParaCurve" or "DXF"
    index: int | None  # 1-based element number within its list
    station: float | None
    quantity: str
    stated: float | None
    computed: float | None
    difference: float | None
    verdict: str
    message: str = ""
    unit: str = ""
    source: SourceRef | None = field(default=None, compare=False)
    miss: bool = False  # ``stated`` is a distance between stated and computed points


class _Collector:
    def __init__(self, alignment: str, tol: Tolerances) -> None:
        self.alignment = alignment
        self.tol = tol
        self.items: list[Finding] = []

    def distance(
        self,
        element,
        index,
        station,
        quantity,
        stated,
        computed,
        source,
        unit="",
        message="",
        miss=False,
    ) -> None:
        if stated is None:
            return
        diff = stated - computed
        over = abs(diff) > self.tol.distance
        self.items.append(
            Finding(
                self.alignment,
                element,
                index,
                station,
                quantity,
                stated,
                computed,
                diff,
                "over" if over else "ok",
                message,
                unit,
                source,
                miss,
            )
        )

    def direction(
        self, element, index, station, quantity, stated, heading, source, unit, convention
    ) -> None:
        """A stated direction (file unit and convention) against a computed heading."""
        if stated is None:
            return
        computed = float(horizontal.direction_value(heading, convention, unit))
        diff = (angle_from_unit(stated, unit) - angle_from_unit(computed, unit) + math.pi) % (
            2 * math.pi
        ) - math.pi
        over = abs(diff) > self.tol.angle
        shown = angle_to_unit(diff, unit) if unit != "decimal dd.mm.ss" else math.degrees(diff)
        self.items.append(
            Finding(
                self.alignment,
                element,
                index,
                station,
                quantity,
                stated,
                computed,
                shown,
                "over" if over else "ok",
                "",
                unit,
                source,
            )
        )

    def angle(
        self,
        element,
        index,
        station,
        quantity,
        stated_rad,
        computed_rad,
        source,
        shown_unit: str,
        message="",
    ) -> None:
        if stated_rad is None:
            return
        diff = (stated_rad - computed_rad + math.pi) % (2 * math.pi) - math.pi
        over = abs(diff) > self.tol.angle
        self.items.append(
            Finding(
                self.alignment,
                element,
                index,
                station,
                quantity,
                angle_to_unit(stated_rad, shown_unit),
                angle_to_unit(computed_rad, shown_unit),
                angle_to_unit(diff, shown_unit)
                if shown_unit != "decimal dd.mm.ss"
                else math.degrees(diff),
                "over" if over else "ok",
                message,
                shown_unit,
                source,
            )
        )

    def note(
        self,
        element,
        index,
        station,
        quantity,
        verdict,
        message,
        source=None,
        stated=None,
        computed=None,
    ) -> None:
        diff = None if stated is None or computed is None else stated - computed
        self.items.append(
            Finding(
                self.alignment,
                element,
                index,
                station,
                quantity,
                stated,
                computed,
                diff,
                verdict,
                message,
                "",
                source,
            )
        )


# --------------------------------------------------------------------------- horizontal
def _check_horizontal(c: _Collector, al: Alignment, hz: HorizontalGeometry, doc: Document) -> None:
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
        "ok",
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


def _pi(c: _Collector, element: str, n: int, g: horizontal.ElementGeom, stated, unit, src) -> None:
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


def _spiral_values(c: _Collector, n: int, el: HSpiral, g, theta: float, unit: str, src) -> None:
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


# --------------------------------------------------------------------------- profile
def _check_profile(
    c: _Collector,
    al: Alignment,
    doc: Document,
    hz: HorizontalGeometry | None,
    known: dict[int, VerticalGeometry | None],
) -> None:
    units = doc.units
    st = Stationing(units, al.equations)
    lo = hz.start if hz is not None else al.sta_start
    hi = hz.end if hz is not None else (al.sta_start + al.length if al.length else None)
    for prof in al.profiles:
        for i, p in enumerate(prof.pvis, start=1):
            if hi is not None and not (lo - c.tol.distance <= p.station <= hi + c.tol.distance):
                c.note(
                    p.element,
                    i,
                    p.station,
                    "PVI inside the alignment",
                    "over",
                    f"PVI {st.label(p.station)} lies outside the alignment ({st.label(lo)} "
                    f"to {st.label(hi)})",
                    p.source,
                )
        try:
            geom = known.get(id(prof)) or vertical.solve(prof, label=st.label)
        except GradelineError as err:
            c.note(
                err.element or "ProfAlign",
                None,
                None,
                "profile geometry",
                "over",
                err.message,
                err.source,
            )
            continue
        c.note(
            "ProfAlign",
            None,
            None,
            f"profile {prof.name!r} solved",
            "ok",
            f"{len(geom.curves)} vertical curves, none overlapping or past an end",
            prof.source,
        )
        for curve in geom.curves:
            spec = prof.pvis[curve.index]
            if spec.kind != "circular":
                continue
            if spec.arc_length is not None and curve.arc_length is not None:
                c.distance(
                    "CircCurve",
                    curve.index + 1,
                    curve.pvi_station,
                    "length (arc R x change of grade angle)",
                    spec.arc_length,
                    curve.arc_length,
                    spec.source,
                    units.symbol,
                    ""
                    if abs(spec.arc_length - curve.arc_length) <= c.tol.distance
                    else (
                        f"the stated length matches the horizontal length {curve.length:.4f}"
                        if abs(spec.arc_length - curve.length) <= c.tol.distance
                        else ""
                    ),
                )
            if spec.radius is not None:
                sign_ok = (spec.radius > 0) == (curve.curve_type == "sag")
                c.note(
                    "CircCurve",
                    curve.index + 1,
                    curve.pvi_station,
                    "radius sign",
                    "ok" if sign_ok else "info",
                    "positive radius on a sag, negative on a crest"
                    if sign_ok
                    else f"radius {spec.radius:g} on a {curve.curve_type}: the sign differs from "
                    "the "
                    "usual convention (positive sag, negative crest)",
                    spec.source,
                )
    for gr in al.grounds:
        for piece in gr.pieces:
            if hi is None or not piece.stations:
                continue
            if piece.stations[0] < lo - c.tol.distance or piece.stations[-1] > hi + c.tol.distance:
                c.note(
                    "ProfSurf",
                    None,
                    piece.stations[0],
                    "ground profile inside the alignment",
                    "over",
                    f"ground {gr.name!r} runs {st.label(piece.stations[0])} to "
                    f"{st.label(piece.stations[-1])}, beyond the alignment ({st.label(lo)} to "
                    f"{st.label(hi)})",
                    piece.source,
                )


def check_alignment(solved: SolvedAlignment, tol: Tolerances = Tolerances()) -> list[Finding]:
    """Every self-consistency finding of one solved alignment.

    The plan and the solved profile are taken from ``solved``; the alignment's
    other profiles are solved here (a profile that does not solve is a finding).
    """
    al, doc = solved.alignment, solved.document
    c = _Collector(al.name, tol)
    hz = solved.horizontal
    if hz is not None:
        _check_horizontal(c, al, hz, doc)
    known = {id(solved.profile): solved.geometry} if solved.profile is not None else {}
    _check_profile(c, al, doc, hz, known)
    return c.items


def check_document(
    doc: Document, alignment: str | None = None, tol: Tolerances = Tolerances()
) -> list[Finding]:
    """Every self-consistency finding of the chosen alignment (or all of them)."""
    chosen = (
        [doc.alignment(alignment)]
        if alignment is not None or len(doc.alignments) == 1
        else list(doc.alignments)
    )
    if not chosen:
        doc.alignment(None)
    out: list[Finding] = []
    for al in chosen:
        if al.horizontal is not None:
            out.extend(check_alignment(solve_alignment(doc, al, None, need_profile=False), tol))
        else:
            c = _Collector(al.name, tol)
            _check_profile(c, al, doc, None, {})
            out.extend(c.items)
    return out


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
            "the profile at x = station; give --exaggeration and --datum"
        )
    a = np.column_stack([z[ok], np.ones(ok.sum())])
    (e, c0), *_ = np.linalg.lstsq(a, pts[ok, 1], rcond=None)
    return float(e), float(-c0 / e)


def _sample(lines: list[np.ndarray], step: float) -> np.ndarray:
    """Points along every polyline: its vertices plus points every ``step`` in between."""
    out = []
    for pts in lines:
        seg = np.diff(pts, axis=0)
        lengths = np.abs(seg[:, 0])
        for (x0, y0), (dx, dy), lx in zip(pts[:-1], seg, lengths, strict=True):
            n = max(1, int(math.ceil(lx / step)))
            t = np.arange(n) / n
            out.append(np.column_stack([x0 + t * dx, y0 + t * dy]))
        out.append(pts[-1:])
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


def check_ground_against_surface(
    alignment: Alignment, tin_at, tol: Tolerances, surface: str
) -> list[Finding]:
    """Stated ``ProfSurf`` points against the TIN surface at the same stations.

    ``tin_at`` maps an array of internal stations to TIN elevations (NaN off the
    surface). One finding per ground profile, at its worst point.
    """
    c = _Collector(alignment.name, tol)
    for gp in alignment.grounds:
        s = np.array([x for p in gp.pieces for x in p.stations])
        z = np.array([v for p in gp.pieces for v in p.elevations])
        if not len(s):
            continue
        tin = np.asarray(tin_at(s))
        on = np.isfinite(tin)
        if not on.any():
            c.note(
                "ProfSurf",
                None,
                None,
                f"ground {gp.name!r} against surface {surface!r}",
                "info",
                "no point of the ground profile lies on the surface",
                gp.source,
            )
            continue
        d = z[on] - tin[on]
        worst = int(np.argmax(np.abs(d)))
        over = int((np.abs(d) > tol.distance).sum())
        c.distance(
            "ProfSurf",
            None,
            float(s[on][worst]),
            f"ground {gp.name!r} against surface {surface!r} (worst point)",
            float(z[on][worst]),
            float(tin[on][worst]),
            gp.source,
            message=f"{over} of {int(on.sum())} points differ by more than {tol.distance:g}"
            + (f"; {int((~on).sum())} points off the surface" if (~on).any() else ""),
        )
    return c.items
