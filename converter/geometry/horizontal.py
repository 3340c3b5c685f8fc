"""Horizontal geometry: lines, arcs and spirals; coordinates at stations and back.

:func:`solve` chains the ``CoordGeom`` elements of an alignment into a
:class:`HorizontalGeometry`. Coordinates are authoritative: each element starts
at its own stated Start point, so a gap or kink between elements is reported
as a finding and never silently bridged.

Internally x = easting, y = northing and the heading is the math angle
(radians, counter-clockwise from east); curvature is positive when the road
turns left (``rot="ccw"``). Conversion to the file's direction convention and
unit happens only in :func:`gradeline.geometry.directions.direction_value`.

Spirals are evaluated from their curvature law k(s): the heading is the exact
integral of k, and the coordinates are the integrals of (cos, sin) of the
heading, taken by 8-point Gauss-Legendre quadrature on panels of at most 0.25 rad
of turning. The quadrature error bound is about 0.25**16 / 16! (relative,
below 1e-20), so the result is exact to float64 round-off for any spiral length
and radius; the tests compare it with ``scipy.special.fresnel``.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from functools import cached_property
from typing import TYPE_CHECKING

import numpy as np
from numpy.typing import ArrayLike, NDArray

from gradeline.errors import ModelError
from gradeline.geometry.directions import _detect_convention, wrap_angle
from gradeline.geometry.spirals import (
    _GL_T,
    _GL_W,
    _LAW,
    SPIRAL_TYPES,
    TANGENT_LAW,
    TWO_PI,
    _integrate_spiral,
    _panels,
    _shape,
    _shape_integral,
)
from gradeline.geometry.tangent_forms import TANGENT_FORMS, TangentForm, place
from gradeline.model import (
    HCurve,
    HElement,
    HIrregular,
    HLine,
    HorizontalAlignment,
    HSpiral,
    SourceRef,
)

if TYPE_CHECKING:
    from gradeline.geometry.station_offset import Projector

__all__ = [
    "SPIRAL_TYPES",
    "TANGENT_FORMS",
    "ElementGeom",
    "GeometryNote",
    "HorizontalGeometry",
    "curvature",
    "evaluate",
    "solve",
]


#: Stations this close beyond the POB or POE (file units) evaluate at the end:
#: exported coordinates are rounded, so a profile's end can sit a hair past the plan's.
END_TOLERANCE = 1e-6


@dataclass(frozen=True, slots=True)
class GeometryNote:
    """Something about the horizontal geometry a reviewer should see."""

    code: str
    index: int
    station: float
    message: str
    stated: float | None = None
    computed: float | None = None
    source: SourceRef | None = field(default=None, compare=False)


@dataclass(frozen=True, slots=True)
class ElementGeom:
    """One solved element (an IrregularLine gives one per straight piece)."""

    index: int
    kind: str  # "line", "arc" or a spiral type
    start_station: float
    length: float
    x0: float
    y0: float
    heading0: float
    k0: float
    k1: float
    x1: float
    y1: float
    heading1: float
    center: tuple[float, float] | None = None
    source: SourceRef | None = field(default=None, compare=False)
    form: TangentForm | None = field(default=None, compare=False, repr=False)

    @property
    def end_station(self) -> float:
        """Station at the element's end."""
        return self.start_station + self.length

    @property
    def element(self) -> str:
        """LandXML element name."""
        return {"line": "Line", "arc": "Curve"}.get(self.kind, "Spiral")


@dataclass(frozen=True, eq=False)
class HorizontalGeometry:
    """A solved horizontal alignment."""

    alignment: HorizontalAlignment
    elements: tuple[ElementGeom, ...]
    findings: tuple[GeometryNote, ...]
    convention: str
    convention_matches: tuple[int, int]
    s0: NDArray[np.float64]
    length: NDArray[np.float64]
    x0: NDArray[np.float64]
    y0: NDArray[np.float64]
    h0: NDArray[np.float64]
    k0: NDArray[np.float64]
    dk: NDArray[np.float64]
    law: NDArray[np.intp]
    panel_s: NDArray[np.float64]
    panel_x: NDArray[np.float64]
    panel_y: NDArray[np.float64]
    cos_h0: NDArray[np.float64]  # cos and sin of h0: a line needs no trigonometry per station
    sin_h0: NDArray[np.float64]

    @property
    def start(self) -> float:
        """Station of the point of beginning (POB)."""
        return float(self.s0[0])

    # lookup tables of the evaluation, built on first use
    @cached_property
    def element_lookup(self) -> _Buckets:
        """The element of a station."""
        return _Buckets(self.s0)

    @cached_property
    def panel_lookup(self) -> _Buckets:
        """The quadrature panel of a spiral station."""
        return _Buckets(self.panel_s)

    @cached_property
    def spiral_laws(self) -> frozenset[int]:
        """Law codes of the spirals integrated by panels."""
        return frozenset(int(v) for v in self.law if 0 < v != TANGENT_LAW)

    @cached_property
    def has_tangent_forms(self) -> bool:
        """Whether any spiral is a form defined from the tangent."""
        return bool((self.law == TANGENT_LAW).any())

    @cached_property
    def projector(self) -> Projector:
        """Station and offset of points, its index of samples built once for every
        caller (the audits of a build project many points each)."""
        from gradeline.geometry.station_offset import Projector

        return Projector(self)

    @cached_property
    def first_panel(self) -> NDArray[np.intp]:
        """Index of each element's first quadrature panel."""
        return np.searchsorted(self.panel_s, self.s0, side="left")

    @property
    def end(self) -> float:
        """Station of the point of ending (POE)."""
        return float(self.s0[-1] + self.length[-1])


def _xy(p: tuple[float, float]) -> tuple[float, float]:
    """(northing, easting) -> (x, y) = (easting, northing)."""
    return p[1], p[0]


def solve(
    horizontal: HorizontalAlignment,
    sta_start: float = 0.0,
    *,
    direction_unit: str = "decimal degrees",
    tol_distance: float = 1e-3,
    tol_angle: float = 1e-5,
) -> HorizontalGeometry:
    """Chain the elements of ``horizontal`` starting at station ``sta_start``.

    Parameters
    ----------
    horizontal : HorizontalAlignment
        Elements as read from ``CoordGeom``.
    sta_start : float
        Internal station of the point of beginning.
    direction_unit : str
        Unit of the stated directions, for telling the file's convention.
    tol_distance, tol_angle : float
        Gaps (file units) and kinks (radians) above these are findings.

    Raises
    ------
    ModelError
        A zero-length element, an unsupported spiral type, or a spiral whose
        start direction cannot be told.

    Examples
    --------
    >>> from gradeline.model import HLine, HorizontalAlignment
    >>> h = solve(HorizontalAlignment((HLine((0.0, 0.0), (300.0, 400.0)),)), 1000.0)
    >>> h.end, [round(float(v), 6) for v in evaluate(h, 1250.0)[:2]]
    (1500.0, [150.0, 200.0])
    """
    if not horizontal.elements:  # a PI list: lay its lines, arcs and spirals out first
        from dataclasses import replace

        from gradeline.geometry.pi_list import elements_from_pis

        horizontal = replace(
            horizontal, elements=elements_from_pis(list(horizontal.pis), horizontal.source)
        )
    geoms: list[ElementGeom] = []
    findings: list[GeometryNote] = []
    station = float(sta_start)
    prev: ElementGeom | None = None
    for index, el in enumerate(horizontal.elements):
        for g in _solve_element(index, el, station, prev):
            if prev is not None:
                gap = math.hypot(g.x0 - prev.x1, g.y0 - prev.y1)
                if gap > tol_distance:
                    findings.append(
                        GeometryNote(
                            "gap",
                            index,
                            g.start_station,
                            f"gap of {gap:.4f} between the end of element {prev.index + 1} "
                            f"({prev.element}) and the start of element {index + 1} ({g.element})",
                            0.0,
                            gap,
                            el.source,
                        )
                    )
                kink = abs(wrap_angle(g.heading0 - prev.heading1))
                if kink > tol_angle:
                    code = "angle-point" if prev.kind == g.kind == "line" else "kink"
                    what = "angle point" if code == "angle-point" else "direction changes"
                    findings.append(
                        GeometryNote(
                            code,
                            index,
                            g.start_station,
                            f"{what}: direction changes by {math.degrees(kink):.6f} degrees at the "
                            f"start of element {index + 1} ({g.element})",
                            0.0,
                            kink,
                            el.source,
                        )
                    )
            geoms.append(g)
            station = g.end_station
            prev = g
        findings.extend(_element_findings(index, el, geoms[-1], tol_distance))
    convention, matches = _detect_convention(horizontal, geoms, direction_unit)
    return _assemble(horizontal, geoms, findings, convention, matches)


def _solve_element(index: int, el: HElement, station: float, prev: ElementGeom | None):
    src = el.source
    if isinstance(el, HLine):
        return [_line(index, el.start, el.end, station, src)]
    if isinstance(el, HIrregular):
        out = []
        for a, b in zip(el.points, el.points[1:], strict=False):
            if a == b:
                continue
            g = _line(index, a, b, station, src)
            out.append(g)
            station = g.end_station
        if not out:
            raise ModelError("IrregularLine has zero length", src, "IrregularLine")
        return out
    if isinstance(el, HCurve):
        return [_arc(index, el, station, prev)]
    return [_spiral(index, el, station, prev)]


def _line(index, a, b, station, src) -> ElementGeom:
    x0, y0 = _xy(a)
    x1, y1 = _xy(b)
    length = math.hypot(x1 - x0, y1 - y0)
    if length == 0.0:
        raise ModelError("Line has zero length (Start equals End)", src, "Line")
    h = math.atan2(y1 - y0, x1 - x0)
    return ElementGeom(index, "line", station, length, x0, y0, h, 0.0, 0.0, x1, y1, h, None, src)


def _arc(index: int, el: HCurve, station: float, prev: ElementGeom | None) -> ElementGeom:
    xs, ys = _xy(el.start)
    xc, yc = _xy(el.center)
    xe, ye = _xy(el.end)
    radius = math.hypot(xs - xc, ys - yc)
    if radius == 0.0:
        raise ModelError("Curve radius is zero (Start equals Center)", el.source, "Curve")
    a1 = math.atan2(ys - yc, xs - xc)
    a2 = math.atan2(ye - yc, xe - xc)
    rot = el.rot
    if rot is None:
        if prev is not None:
            ccw_dir = a1 + math.pi / 2
            rot = "ccw" if abs(wrap_angle(ccw_dir - prev.heading1)) < math.pi / 2 else "cw"
        else:
            rot = "ccw" if wrap_angle(a2 - a1) > 0 else "cw"
    sign = 1.0 if rot == "ccw" else -1.0
    sweep = ((a2 - a1) if sign > 0 else (a1 - a2)) % TWO_PI
    if sweep == 0.0:
        raise ModelError("Curve has zero length (Start equals End)", el.source, "Curve")
    length = radius * sweep
    h0 = a1 + sign * math.pi / 2
    k = sign / radius
    h1 = h0 + k * length
    # the end point follows from Start, Center and the sweep: End is checked against it
    x1 = xc + radius * math.cos(a1 + sign * sweep)
    y1 = yc + radius * math.sin(a1 + sign * sweep)
    return ElementGeom(
        index, "arc", station, length, xs, ys, h0, k, k, x1, y1, h1, (xc, yc), el.source
    )


def _spiral(index: int, el: HSpiral, station: float, prev: ElementGeom | None) -> ElementGeom:
    if el.spi_type not in SPIRAL_TYPES:
        raise ModelError(
            f"spiral type {el.spi_type!r} is not a LandXML 1.2 spiType; gradeline computes "
            + ", ".join(SPIRAL_TYPES),
            el.source,
            "Spiral",
        )
    sign = 1.0 if el.rot == "ccw" else -1.0
    k0 = 0.0 if math.isinf(el.radius_start) else sign / el.radius_start
    k1 = 0.0 if math.isinf(el.radius_end) else sign / el.radius_end
    xs, ys = _xy(el.start)
    if el.pi is not None:
        xp, yp = _xy(el.pi)
        h0 = math.atan2(yp - ys, xp - xs)
    elif prev is not None:
        h0 = prev.heading1
    else:
        raise ModelError(
            "cannot tell the spiral's start direction: give its PI point or a preceding element",
            el.source,
            "Spiral",
        )
    if el.spi_type in TANGENT_FORMS:
        return _tangent_form(index, el, station, xs, ys, h0, sign)
    law = _LAW[el.spi_type]
    dk = k1 - k0
    L = el.length
    turn = abs(k0 + dk * float(_shape_integral(np.array([law]), np.array([1.0]))[0])) * L
    if turn > TWO_PI:
        raise ModelError(
            f"spiral turns through {math.degrees(turn):.0f} degrees (length {L:g} with radii "
            f"{el.radius_start:g} and {el.radius_end:g}); a road transition turns far less than "
            "a full circle",
            el.source,
            "Spiral",
        )
    n = _panels(law, L, k0, dk)
    x, y = xs, ys
    for i in range(n):
        dx, dy = _integrate_spiral(law, L, h0, k0, dk, L * i / n, L * (i + 1) / n)
        x, y = x + dx, y + dy
    h1 = h0 + k0 * L + dk * L * float(_shape_integral(np.array([law]), np.array([1.0]))[0])
    return ElementGeom(
        index, el.spi_type, station, L, xs, ys, h0, k0, k1, x, y, h1, None, el.source
    )


def _tangent_form(
    index: int, el: HSpiral, station: float, xs: float, ys: float, h0: float, sign: float
) -> ElementGeom:
    """A transition given by its equation from the tangent: it must touch one."""
    start_inf, end_inf = math.isinf(el.radius_start), math.isinf(el.radius_end)
    if start_inf == end_inf:
        raise ModelError(
            f"a {el.spi_type} transition runs between a tangent and an arc; this one has "
            f"radii {el.radius_start:g} and {el.radius_end:g}",
            el.source,
            "Spiral",
        )
    radius = el.radius_start if end_inf else el.radius_end
    try:
        form = place(el.spi_type, radius, el.length, end_inf, sign, (xs, ys), h0)
    except ValueError as exc:
        raise ModelError(str(exc), el.source, "Spiral") from None
    d = np.array([0.0, el.length])
    x, y, h, k = form.state(d)
    return ElementGeom(
        index,
        el.spi_type,
        station,
        el.length,
        xs,
        ys,
        h0,
        float(k[0]),
        float(k[1]),
        float(x[1]),
        float(y[1]),
        float(h[1]),
        None,
        el.source,
        form,
    )


def _element_findings(index: int, el: HElement, g: ElementGeom, tol: float) -> list[GeometryNote]:
    out: list[GeometryNote] = []
    if isinstance(el, HCurve):
        xc, yc = _xy(el.center)
        xe, ye = _xy(el.end)
        r_start = math.hypot(g.x0 - xc, g.y0 - yc)
        r_end = math.hypot(xe - xc, ye - yc)
        if abs(r_end - r_start) > tol:
            out.append(
                GeometryNote(
                    "radius",
                    index,
                    g.start_station,
                    f"Curve End is {r_end:.4f} from Center but Start is {r_start:.4f}: the points "
                    "do not lie on one circle",
                    r_start,
                    r_end,
                    el.source,
                )
            )
        stated = el.get("radius")
        if stated is not None and abs(abs(stated) - r_start) > tol:
            out.append(
                GeometryNote(
                    "radius",
                    index,
                    g.start_station,
                    f"stated radius {stated:.4f} disagrees with the Start-Center distance "
                    f"{r_start:.4f}",
                    stated,
                    r_start,
                    el.source,
                )
            )
    elif isinstance(el, HSpiral):
        xe, ye = _xy(el.end)
        miss = math.hypot(xe - g.x1, ye - g.y1)
        if miss > tol:
            out.append(
                GeometryNote(
                    "spiral-end",
                    index,
                    g.end_station,
                    f"stated End is {miss:.4f} from the end computed from Start, direction, "
                    f"length and radii of this {el.spi_type} spiral",
                    0.0,
                    miss,
                    el.source,
                )
            )
    return out


def _assemble(horizontal, geoms, findings, convention, matches) -> HorizontalGeometry:
    def ro(values, dtype=np.float64):
        arr = np.array(values, dtype=dtype)
        arr.flags.writeable = False
        return arr

    panel_s, panel_x, panel_y = [], [], []
    for g in geoms:
        law = _LAW[g.kind]
        if law == TANGENT_LAW:
            law = 0  # evaluated by its TangentForm, not by panels
        n = _panels(law, g.length, g.k0, g.k1 - g.k0) if law else 1
        x, y = g.x0, g.y0
        for i in range(n):
            panel_s.append(g.start_station + g.length * i / n)
            panel_x.append(x)
            panel_y.append(y)
            if law:
                dx, dy = _integrate_spiral(
                    law,
                    g.length,
                    g.heading0,
                    g.k0,
                    g.k1 - g.k0,
                    g.length * i / n,
                    g.length * (i + 1) / n,
                )
                x, y = x + dx, y + dy
    return HorizontalGeometry(
        alignment=horizontal,
        elements=tuple(geoms),
        findings=tuple(findings),
        convention=convention,
        convention_matches=matches,
        s0=ro([g.start_station for g in geoms]),
        length=ro([g.length for g in geoms]),
        x0=ro([g.x0 for g in geoms]),
        y0=ro([g.y0 for g in geoms]),
        h0=ro([g.heading0 for g in geoms]),
        k0=ro([g.k0 for g in geoms]),
        dk=ro([g.k1 - g.k0 for g in geoms]),
        law=ro([_LAW[g.kind] for g in geoms], np.intp),
        panel_s=ro(panel_s),
        panel_x=ro(panel_x),
        panel_y=ro(panel_y),
        cos_h0=ro(np.cos(np.array([g.heading0 for g in geoms]))),
        sin_h0=ro(np.sin(np.array([g.heading0 for g in geoms]))),
    )


#: Stations evaluated at a time: the quadrature's (n, 8) work arrays stay small.
_CHUNK = 1 << 16


class _Buckets:
    """A uniform bucket table of sorted starts, built once per geometry: for each
    station the last index i with ``starts[i] <= s`` (0 if none), the same as
    ``searchsorted(starts, s, "right") - 1`` clipped at 0, without a binary search
    per station."""

    def __init__(self, starts: NDArray[np.float64]) -> None:
        self.starts = starts
        n = len(starts)
        self.lo, hi = float(starts[0]), float(starts[-1])
        self.nb = 4 * n
        self.width = (hi - self.lo) / self.nb if hi > self.lo else 1.0
        edges = self.lo + self.width * np.arange(self.nb)
        self.table = np.maximum(np.searchsorted(starts, edges, side="right") - 1, 0)

    def find(self, s: NDArray[np.float64]) -> NDArray[np.intp]:
        starts, n = self.starts, len(self.starts)
        if n < 8 or len(s) < 64:  # few: a binary search each costs less than the steps
            return np.maximum(np.searchsorted(starts, s, side="right") - 1, 0)
        b = np.clip(((s - self.lo) / self.width).astype(np.intp), 0, self.nb - 1)
        idx = self.table[b]
        # a bucket edge computed in floating point may sit a hair past its station
        back = (starts[idx] > s) & (idx > 0)
        while back.any():
            idx[back] -= 1
            back = (starts[idx] > s) & (idx > 0)
        while True:
            ahead = idx + 1 < n
            ahead[ahead] = starts[idx[ahead] + 1] <= s[ahead]
            if not ahead.any():
                return idx
            idx[ahead] += 1


def _state(geom: HorizontalGeometry, s: NDArray[np.float64]):
    """x, y, heading and curvature at finite stations inside the alignment."""
    if len(s) <= _CHUNK:
        return _state_chunk(geom, s)
    out = [np.empty(len(s)) for _ in range(4)]
    for lo in range(0, len(s), _CHUNK):
        for arr, part in zip(out, _state_chunk(geom, s[lo : lo + _CHUNK]), strict=True):
            arr[lo : lo + _CHUNK] = part
    return tuple(out)


def _state_chunk(geom: HorizontalGeometry, s: NDArray[np.float64]):
    idx = np.minimum(geom.element_lookup.find(s), len(geom.s0) - 1)
    d = s - geom.s0[idx]
    law = geom.law[idx]
    x, y = np.empty(len(s)), np.empty(len(s))
    heading, kappa = np.empty(len(s)), np.empty(len(s))
    # lines: the chord form below with k = 0 (sinc 0 = 1), the cosines once per element
    straight = geom.k0[idx] == 0.0
    ln = np.flatnonzero((law == 0) & straight)
    if ln.size:
        e, dl = idx[ln], d[ln]
        heading[ln] = geom.h0[e] + 0.0  # h0 + 0 * d
        kappa[ln] = 0.0
        x[ln] = geom.x0[e] + dl * geom.cos_h0[e]
        y[ln] = geom.y0[e] + dl * geom.sin_h0[e]
    # arcs: exact chord form, stable for any radius
    la = np.flatnonzero((law == 0) & ~straight)
    if la.size:
        e, dl = idx[la], d[la]
        h0, k0 = geom.h0[e], geom.k0[e]
        heading[la] = h0 + k0 * dl
        kappa[la] = k0
        half = 0.5 * k0 * dl
        chord = dl * np.sinc(half / np.pi)
        x[la] = geom.x0[e] + chord * np.cos(h0 + half)
        y[la] = geom.y0[e] + chord * np.sin(h0 + half)
    for e in np.unique(idx[law == TANGENT_LAW]) if geom.has_tangent_forms else ():
        m = idx == e
        form = geom.elements[e].form
        assert form is not None
        x[m], y[m], heading[m], kappa[m] = form.state(d[m])
    sp = np.flatnonzero((law > 0) & (law != TANGENT_LAW))
    if sp.size:
        e = idx[sp]
        lw = law[sp]
        ds = d[sp]
        Ls, h0s, k0s, dks = geom.length[e], geom.h0[e], geom.k0[e], geom.dk[e]
        t = ds / Ls
        laws = geom.spiral_laws
        heading[sp] = h0s + k0s * ds + dks * Ls * _shape_integral(lw, t, laws)
        kappa[sp] = k0s + dks * _shape(lw, t, laws)
        p = geom.panel_lookup.find(s[sp])
        p = np.maximum(p, geom.first_panel[e])
        a = geom.panel_s[p] - geom.s0[e]
        b = ds
        u = a[:, None] + (b - a)[:, None] * (1.0 + _GL_T[None, :]) / 2.0
        # the law of each node (only the clothoid's F needs none)
        lw2 = lw[:, None] if laws <= {1} else np.repeat(lw[:, None], len(_GL_T), axis=1)
        th = (
            h0s[:, None]
            + k0s[:, None] * u
            + (dks * Ls)[:, None] * _shape_integral(lw2, u / Ls[:, None], laws)
        )
        halfw = (b - a) / 2.0
        x[sp] = geom.panel_x[p] + halfw * (np.cos(th) @ _GL_W)
        y[sp] = geom.panel_y[p] + halfw * (np.sin(th) @ _GL_W)
    return x, y, heading, kappa


def evaluate(
    geom: HorizontalGeometry, stations: ArrayLike
) -> tuple[NDArray[np.float64], NDArray[np.float64], NDArray[np.float64]]:
    """Northing, easting and heading (math angle, radians) at each station.

    Stations outside the alignment give NaN.
    """
    s_in = np.asarray(stations, dtype=np.float64)
    s = s_in.reshape(-1)
    north, east, heading = np.empty(len(s)), np.empty(len(s)), np.empty(len(s))
    # a chunk at a time: the work arrays stay a fraction of the outputs
    step = max(1, len(s)) if len(s) <= 2 * 8192 else min(_CHUNK, max(8192, len(s) // 16))
    for lo in range(0, len(s), step):
        part = s[lo : lo + step]
        # a station within rounding (1e-6) of an end counts as that end
        outside = ~((part >= geom.start - END_TOLERANCE) & (part <= geom.end + END_TOLERANCE))
        s_eval = np.clip(np.where(outside, geom.start, part), geom.start, geom.end)
        x, y, h, _ = _state_chunk(geom, s_eval)
        if outside.any():
            x[outside] = y[outside] = h[outside] = np.nan
        north[lo : lo + step], east[lo : lo + step], heading[lo : lo + step] = y, x, h
    shape = s_in.shape
    return north.reshape(shape), east.reshape(shape), heading.reshape(shape)


def curvature(geom: HorizontalGeometry, stations: ArrayLike) -> NDArray[np.float64]:
    """Signed curvature (1/file unit, positive turning left) at each station."""
    s_in = np.asarray(stations, dtype=np.float64)
    s = s_in.reshape(-1)
    outside = ~((s >= geom.start) & (s <= geom.end))
    k = _state(geom, np.where(outside, geom.start, s))[3]
    k[outside] = np.nan
    return k.reshape(s_in.shape)
