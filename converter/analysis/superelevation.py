"""Superelevation: the rate a curve needs for a design speed, the transition lengths
for that rate, a proposed transition, the review of a stated one, and the cross
slopes of both edges along the station.

Methods (AASHTO 2018, Chapter 3, recalled from memory; the data are in the
criteria TOML, ``[us.superelevation]`` and ``[metric.superelevation]``):

* open highways: the distribution of e and f by the parabola of the published
  method (method 5): side friction rises along a parabola in curvature 1/R,
  tangent at 1/R = 0 to the running-speed line and at the minimum radius
  reaching f max, with its vertical intersection where the average running
  speed needs e max without friction; e = V^2 / (c R) - f;
* low-speed urban streets (``method="low-speed"``): friction first, up to the
  low-speed f max, then e = V^2 / (c R) - f max;
* runoff L_r = w n1 e b_w / Delta (lane width, lanes rotated, rate, adjustment
  factor for the lanes rotated, maximum relative gradient for the speed) and
  tangent runout L_t = (e_NC / e) L_r.

Everything here is a check of numbers against controls: it does not replace the
governing agency's standards or the responsible engineer's judgment.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass, field
from typing import Any

import numpy as np
from numpy.typing import ArrayLike, NDArray

from gradeline.errors import InputError, UsageError
from gradeline.geometry.curve_data import HorizontalCurve
from gradeline.model.base import SourceRef
from gradeline.model.superelevation import Superelevation

__all__ = [
    "METHODS",
    "CurveSuper",
    "Rate",
    "SuperCheck",
    "SuperCriteria",
    "SuperReview",
    "Transition",
    "cross_slopes",
    "curve_of_records",
    "design_rate",
    "distribution_friction",
    "load_super_criteria",
    "match_records",
    "propose",
    "review_superelevation",
    "runoff_length",
    "runout_length",
    "with_records",
]

METHODS = ("open", "low-speed")


def _table(pairs: tuple[tuple[float, float], ...], x: float, what: str, unit: str) -> float:
    v = np.array([p[0] for p in pairs])
    y = np.array([p[1] for p in pairs])
    if not len(v) or x < v[0] or x > v[-1]:
        lo, hi = (f"{v[0]:g}", f"{v[-1]:g}") if len(v) else ("-", "-")
        raise UsageError(f"no {what} for {x:g} {unit} in the criteria (they cover {lo} to {hi})")
    return float(np.interp(x, v, y))


@dataclass(frozen=True, slots=True)
class SuperCriteria:
    """The superelevation controls of one unit system."""

    name: str
    speed_unit: str
    radius_coefficient: float
    side_friction: tuple[tuple[float, float], ...]
    normal_crown: float
    nc_below: float
    rate_step: float
    lane_width: float
    lanes_rotated: float
    runoff_on_tangent: float
    tangent_share_min: float
    tangent_share_max: float
    relative_gradient: tuple[tuple[float, float], ...]  # speed -> percent
    lane_factor: tuple[tuple[float, float], ...]
    running_speed: tuple[tuple[float, float], ...]
    low_speed_friction: tuple[tuple[float, float], ...]
    pass_tolerance: float = 0.001
    unknown: tuple[str, ...] = ()  # keys read past (the review says so)

    def f_max(self, speed: float, method: str = "open") -> float:
        """Side friction factor of the speed (the low-speed table for low-speed streets)."""
        pairs = self.low_speed_friction if method == "low-speed" else self.side_friction
        return _table(pairs, speed, "side friction factor", self.speed_unit)

    def delta(self, speed: float) -> float:
        """Maximum relative gradient of the speed, as a ratio (0.005 for 0.50 %)."""
        return _table(self.relative_gradient, speed, "relative gradient", self.speed_unit) / 100

    def factor(self, lanes: float) -> float:
        """Adjustment factor b_w for the number of lanes rotated."""
        return _table(self.lane_factor, lanes, "lane adjustment factor", "lanes")

    def running(self, speed: float) -> float:
        """Average running speed for a design speed."""
        return _table(self.running_speed, speed, "running speed", self.speed_unit)


#: The range of each superelevation control (low, high, low excluded).
SUPER_RANGES: dict[str, tuple[float, float, bool]] = {
    "normal_crown": (0.0, 0.1, True),
    "nc_below": (0.0, 0.1, False),
    "rate_step": (0.0, 0.01, True),
    "lane_width": (0.0, 100.0, True),
    "lanes_rotated": (1.0, 10.0, False),
    "runoff_on_tangent": (0.0, 1.0, False),
    "tangent_share_min": (0.0, 1.0, False),
    "tangent_share_max": (0.0, 1.0, False),
}
#: The tables, and the range of their values.
SUPER_TABLES: dict[str, tuple[float, float, bool]] = {
    "relative_gradient": (0.0, 5.0, True),
    "lane_factor": (0.0, 2.0, True),
    "running_speed": (0.0, 1000.0, True),
    "low_speed_friction": (0.0, 1.0, True),
}


def load_super_criteria(path: str | None, metric: bool) -> SuperCriteria:
    """The superelevation controls of a criteria TOML file (default: the shipped set),
    each checked against :data:`SUPER_RANGES`.

    Raises
    ------
    InputError
        The file cannot be read, lacks a value, or holds one out of range.
    """
    from gradeline.analysis.review import criteria_number, criteria_pairs, criteria_table

    table, where, name = criteria_table(path, metric)
    key = "metric" if metric else "us"
    sub = table.get("superelevation")
    if not isinstance(sub, dict):
        raise InputError(
            f"no [{key}.superelevation] table of superelevation controls",
            SourceRef(where),
            "criteria",
        )
    values: dict[str, Any] = {
        "name": name,
        "speed_unit": "kmh" if metric else "mph",
        "radius_coefficient": criteria_number(
            table.get("radius_coefficient", 15.0), "radius_coefficient", where, (0.0, 1e4, True)
        ),
        "side_friction": criteria_pairs(
            table.get("side_friction", {}), "side_friction", where, (0.0, 1.0, True)
        ),
        "pass_tolerance": criteria_number(
            table.get("pass_tolerance", 0.001), "pass_tolerance", where, (0.0, 0.5, False)
        ),
    }
    label = f"[{key}.superelevation]"
    for f, bounds in SUPER_RANGES.items():
        if f not in sub:
            raise InputError(f"{label} lacks {f!r}", SourceRef(where), "criteria")
        values[f] = criteria_number(sub[f], f"{label} {f}", where, bounds)
    for f, bounds in SUPER_TABLES.items():
        values[f] = criteria_pairs(sub.get(f, {}), f"{label}.{f}", where, bounds)
    if values["tangent_share_min"] > values["tangent_share_max"]:
        raise InputError(
            f"{label} tangent_share_min is above tangent_share_max", SourceRef(where), "criteria"
        )
    values["unknown"] = tuple(
        f"{label} {k}" for k in sub if k not in SUPER_RANGES and k not in SUPER_TABLES
    )
    return SuperCriteria(**values)


def _pairs(tab: Any) -> tuple[tuple[float, float], ...]:
    return tuple(sorted((float(k), float(v)) for k, v in dict(tab).items()))


# --------------------------------------------------------------------------- rates
def distribution_friction(curvature: float, speed: float, e_max: float, sc: SuperCriteria) -> float:
    """Side friction carried at curvature 1/R on an open highway (the parabola of the
    distribution method; zero at 1/R = 0, f max at the minimum radius)."""
    c, v = sc.radius_coefficient, speed
    f_max = sc.f_max(speed)
    x_max = c * (e_max + f_max) / v**2  # 1 / R min
    vr = sc.running(speed)
    x_pi = min(c * e_max / vr**2, x_max)  # the running speed needs e max there, f = 0
    h_pi = v**2 * x_pi / c - e_max  # design-speed friction at that curvature
    s1 = h_pi / x_pi
    s2 = (f_max - h_pi) / (x_max - x_pi) if x_max > x_pi else s1
    mo = x_pi * (x_max - x_pi) * (s2 - s1) / (2.0 * x_max)
    x = min(max(curvature, 0.0), x_max)
    if x <= x_pi:
        return mo * (x / x_pi) ** 2 + s1 * x
    return mo * ((x_max - x) / (x_max - x_pi)) ** 2 + h_pi + s2 * (x - x_pi)


@dataclass(frozen=True, slots=True)
class Rate:
    """A design superelevation rate: ``value`` ratio (0 for a normal crown), ``raw``
    the computed rate before rounding, ``label`` as tables print it."""

    value: float
    raw: float
    label: str
    beyond: bool = False  # the radius is below the minimum for the speed and e max


def design_rate(
    radius: float, speed: float, e_max: float, sc: SuperCriteria, method: str = "open"
) -> Rate:
    """The superelevation a curve of ``radius`` needs at ``speed`` with ``e_max``.

    A computed rate below ``nc_below`` keeps the normal crown (``NC``); up to the
    normal cross slope the adverse crown is removed (``RC``, at the normal cross
    slope); above, the rate is rounded up to ``rate_step`` and never beyond e max
    (``beyond`` is set when the radius needs more).
    """
    if method not in METHODS:
        raise UsageError(f"superelevation method must be one of {', '.join(METHODS)}")
    if not (math.isfinite(speed) and speed > 0):
        raise UsageError(f"design speed must be a positive number, got {speed:g}")
    if not 0 < e_max < 0.2:
        raise UsageError(f"e max must be a ratio between 0 and 0.2, got {e_max:g}")
    need = speed**2 / (sc.radius_coefficient * radius)
    if method == "low-speed":
        raw = max(0.0, need - sc.f_max(speed, method))
        beyond = raw > e_max * (1 + 1e-9)
    else:
        x_max = sc.radius_coefficient * (e_max + sc.f_max(speed)) / speed**2
        beyond = 1.0 / radius > x_max * (1 + 1e-9)
        raw = need - distribution_friction(1.0 / radius, speed, e_max, sc)
    raw = min(raw, e_max) if beyond else raw
    if raw < sc.nc_below:
        return Rate(0.0, raw, "NC", beyond)
    if raw <= sc.normal_crown:
        return Rate(sc.normal_crown, raw, "RC", beyond)
    step = sc.rate_step
    value = min(math.ceil(raw / step - 1e-9) * step, e_max)
    return Rate(value, raw, f"{100 * value:.1f} %", beyond)


def runoff_length(
    rate: float, speed: float, sc: SuperCriteria, lanes: float | None = None
) -> float:
    """Superelevation runoff L_r = w n1 e b_w / Delta for a rate (ratio).

    Examples
    --------
    >>> sc = load_super_criteria(None, metric=False)
    >>> round(runoff_length(0.08, 50, sc), 1)  # 12 ft x 0.08 / 0.50 %
    192.0
    >>> round(runoff_length(0.08, 50, sc, lanes=2), 1)  # x 2 x 0.75
    288.0
    """
    n = sc.lanes_rotated if lanes is None else lanes
    return sc.lane_width * n * rate * sc.factor(n) / sc.delta(speed)


def runout_length(rate: float, runoff: float, sc: SuperCriteria) -> float:
    """Tangent runout L_t = (e_NC / e) L_r (0 for a normal crown)."""
    return sc.normal_crown / rate * runoff if rate > 0 else 0.0


# --------------------------------------------------------------------------- design
@dataclass(frozen=True, slots=True)
class Transition:
    """A proposed transition for one horizontal curve."""

    number: int
    curve: HorizontalCurve
    rate: Rate
    runoff: float
    runout: float
    record: Superelevation | None  # None: the curve keeps its normal crown
    note: str = ""


def _place(curve: HorizontalCurve, rate: float, runoff: float, runout: float, share: float):
    """(stations of the transition, a note) for a curve: over the spirals when it has
    them, else ``share`` of the runoff before the PC and after the PT."""
    pc, pt = curve.start_station, curve.end_station
    if curve.spiral_in > 0 or curve.spiral_out > 0:
        sc_, cs = curve.sc_station or pc, curve.cs_station or pt
        return (pc - runout, pc, sc_, cs, pt, pt + runout), (
            "runoff over the spirals" if curve.spiral_in > 0 and curve.spiral_out > 0 else ""
        )
    begin_runoff = pc - share * runoff
    full = pc + (1 - share) * runoff
    end_full = pt - (1 - share) * runoff
    note = ""
    if end_full < full:  # a short curve: full rate held at its middle only
        full = end_full = (pc + pt) / 2
        note = "the curve is shorter than the runoff inside it: the full rate is held at its middle"
    return (
        begin_runoff - runout,
        begin_runoff,
        full,
        end_full,
        pt + share * runoff,
        pt + share * runoff + runout,
    ), note


def propose(
    curves: Sequence[HorizontalCurve],
    speed: float,
    e_max: float,
    sc: SuperCriteria,
    method: str = "open",
    lanes: float | None = None,
) -> tuple[Transition, ...]:
    """A transition for every curve: the design rate, runoff and runout lengths and
    their stations (a curve at normal crown gets none)."""
    out = []
    for i, c in enumerate(curves, start=1):
        rate = design_rate(c.radius, speed, e_max, sc, method)
        if rate.value == 0:
            out.append(Transition(i, c, rate, 0.0, 0.0, None))
            continue
        lr = runoff_length(rate.value, speed, sc, lanes)
        note = ""
        if c.spiral_in > 0:
            # the runoff runs over the spiral; the runout keeps its relative gradient
            if c.spiral_in < lr * (1 - sc.pass_tolerance):
                note = (
                    f"the spiral ({c.spiral_in:.1f}) is shorter than the runoff the rate needs "
                    f"({lr:.1f}): its relative gradient is steeper than the maximum"
                )
            lr = c.spiral_in
        lt = runout_length(rate.value, lr, sc)
        stations, placed = _place(c, rate.value, lr, lt, sc.runoff_on_tangent)
        note = "; ".join(n for n in (placed, note) if n)
        nc0, lc0, fs0, fs1, lc1, nc1 = stations
        record = Superelevation(
            rate.value, nc0, lc0, fs0, fs1, lc1, nc1, sta_start=fs0, sta_end=fs1
        )
        if rate.beyond:
            note = (note + "; " if note else "") + "the radius is below the minimum for the speed"
        out.append(Transition(i, c, rate, lr, lt, record, note))
    return tuple(out)


# --------------------------------------------------------------------------- review
@dataclass(frozen=True, slots=True)
class SuperCheck:
    """One superelevation control: required against provided."""

    what: str
    required: float | None
    provided: float | None
    unit: str  # "%" for rates, the length unit for lengths, "" for shares
    verdict: str  # "pass", "fail" or "n/a"
    note: str = ""


@dataclass(frozen=True, slots=True)
class CurveSuper:
    """A horizontal curve's superelevation review."""

    number: int
    curve: HorizontalCurve
    required: Rate
    record: Superelevation | None
    checks: tuple[SuperCheck, ...]

    @property
    def failed(self) -> bool:
        """True when any control fails."""
        return any(ch.verdict == "fail" for ch in self.checks)


@dataclass(frozen=True, slots=True)
class SuperReview:
    """Superelevation of every curve, and transitions that overlap."""

    speed: float
    speed_unit: str
    e_max: float
    method: str
    curves: tuple[CurveSuper, ...]
    overlaps: tuple[tuple[float, float], ...]  # (from, to) stations where two overlap
    unmatched: tuple[Superelevation, ...]  # stated transitions on no curve
    normal_crown: float = 0.02
    notes: tuple[str, ...] = field(default=())

    @property
    def failed(self) -> bool:
        """True when any curve fails a control or two transitions overlap."""
        return any(c.failed for c in self.curves) or bool(self.overlaps)


def match_records(
    curves: Sequence[HorizontalCurve], records: Sequence[Superelevation]
) -> list[Superelevation | None]:
    """The stated transition of each curve: the unused one overlapping it most."""
    used: set[int] = set()
    out: list[Superelevation | None] = []
    for c in curves:
        best, best_len = None, 0.0
        for j, r in enumerate(records):
            if j in used or r.first is None or r.last is None:
                continue
            ov = min(r.last, c.end_station) - max(r.first, c.start_station)
            if ov > best_len:
                best, best_len = j, ov
        if best is not None:
            used.add(best)
        out.append(None if best is None else records[best])
    return out


def _meets(provided: float, required: float, tol: float) -> bool:
    return provided >= required * (1 - tol) - 1e-9


def review_superelevation(
    curves: Sequence[HorizontalCurve],
    records: Sequence[Superelevation],
    speed: float,
    e_max: float,
    sc: SuperCriteria,
    *,
    method: str = "open",
    lanes: float | None = None,
    length_unit: str = "ft",
    tolerance: float = 0.01,
) -> SuperReview:
    """Stated superelevation against the rate, runoff and runout each curve needs.

    Per curve: the full rate against the design rate (and e max), each runoff
    against L_r for the stated rate, each runout against L_t, where the runoff
    lies (over the spirals, or 60 to 80 % before the PC), and whether the full
    rate is reached; between curves, transitions that overlap. ``tolerance`` is
    the station tolerance (file units).
    """
    matched = match_records(curves, records)
    tol = sc.pass_tolerance
    lu = length_unit
    out = []
    for i, (c, rec) in enumerate(zip(curves, matched, strict=True), start=1):
        need = design_rate(c.radius, speed, e_max, sc, method)
        checks: list[SuperCheck] = []
        if rec is None:
            # a file with no superelevation at all is listed, not failed: the rates may
            # live in another deliverable; one that states some must state every one
            verdict = "pass" if need.value == 0 else ("fail" if records else "n/a")
            note = (
                ""
                if need.value == 0
                else "no superelevation stated for this curve"
                if records
                else "the file states no superelevation"
            )
            checks.append(SuperCheck("full rate", 100 * need.value, None, "%", verdict, note))
            out.append(CurveSuper(i, c, need, None, tuple(checks)))
            continue
        e = rec.rate
        ok = _meets(e, need.value, tol)
        checks.append(
            SuperCheck("full rate", 100 * need.value, 100 * e, "%", "pass" if ok else "fail")
        )
        if e > e_max * (1 + tol):
            checks.append(SuperCheck("e max", 100 * e_max, 100 * e, "%", "fail", "above e max"))
        if e > 0:
            lr = runoff_length(e, speed, sc, lanes)
            lt = runout_length(e, lr, sc)
            for what, a, b, req in (
                ("runoff in", rec.begin_runoff, rec.full_super, lr),
                ("runout in", rec.begin_runout, rec.begin_runoff, lt),
                ("runoff out", rec.end_full, rec.end_runoff, lr),
                ("runout out", rec.end_runoff, rec.end_runout, lt),
            ):
                if a is None or b is None:
                    checks.append(SuperCheck(what, req, None, lu, "n/a", "stations not stated"))
                    continue
                got = b - a
                checks.append(
                    SuperCheck(what, req, got, lu, "pass" if _meets(got, req, tol) else "fail")
                )
            checks += _placement(c, rec, sc, tolerance)
        out.append(CurveSuper(i, c, need, rec, tuple(checks)))
    ordered = sorted(
        (r for r in records if r.first is not None and r.last is not None),
        key=lambda r: r.first or 0.0,
    )
    overlaps = tuple(
        (b.first, a.last)
        for a, b in zip(ordered, ordered[1:], strict=False)
        if a.last is not None and b.first is not None and a.last > b.first + tolerance
    )
    used = {id(r) for r in matched if r is not None}
    notes: tuple[str, ...] = (
        "Superelevation rates and lengths follow the criteria file's method and tables "
        "(AASHTO 2018 values recalled from memory); they do not replace the governing "
        "agency's standards or the responsible engineer's judgment.",
    )
    if not records:
        notes = (
            "The file states no superelevation: the rate each curve needs is listed, "
            "nothing was checked (gradeline superelevation proposes one).",
            *notes,
        )
    if sc.unknown:
        notes = (
            *notes,
            "The criteria file holds keys read past (a typo?): " + ", ".join(sc.unknown),
        )
    return SuperReview(
        speed,
        sc.speed_unit,
        e_max,
        method,
        tuple(out),
        tuple((float(a), float(b)) for a, b in overlaps if a is not None and b is not None),
        tuple(r for r in records if id(r) not in used),
        sc.normal_crown,
        notes,
    )


def _placement(c: HorizontalCurve, rec: Superelevation, sc: SuperCriteria, tol: float):
    """Where the runoff lies: over the spirals, or the share before the PC/after the PT."""
    out = []
    if c.spiral_in > 0 and rec.full_super is not None and c.sc_station is not None:
        late = rec.full_super - c.sc_station
        out.append(
            SuperCheck(
                "full rate by the SC",
                c.sc_station,
                rec.full_super,
                "station",
                "pass" if late <= tol else "fail",
                "" if late <= tol else "the full rate is reached past the SC",
            )
        )
    elif c.spiral_in == 0 and rec.begin_runoff is not None and rec.full_super is not None:
        span = rec.full_super - rec.begin_runoff
        if span > 0:
            share = (c.start_station - rec.begin_runoff) / span
            ok = sc.tangent_share_min - 1e-9 <= share <= sc.tangent_share_max + 1e-9
            out.append(
                SuperCheck(
                    "runoff before the PC",
                    sc.runoff_on_tangent,
                    share,
                    "share",
                    "pass" if ok else "fail",
                    ""
                    if ok
                    else f"outside {sc.tangent_share_min:.0%} to {sc.tangent_share_max:.0%}",
                )
            )
    if rec.full_super is not None and rec.end_full is not None and rec.end_full < rec.full_super:
        out.append(
            SuperCheck("full rate held", 0.0, rec.end_full - rec.full_super, "", "fail",
                       "the full rate ends before it is reached")
        )  # fmt: skip
    return out


# --------------------------------------------------------------------------- cross slopes
def cross_slopes(
    records: Sequence[Superelevation],
    curves: Sequence[HorizontalCurve],
    normal: float,
    stations: ArrayLike,
) -> tuple[NDArray[np.float64], NDArray[np.float64]]:
    """Cross slope of the left and right lanes (ratio, measured outward from the
    centreline: negative falls away from it) at each station.

    Normal crown is ``-normal`` on both sides. Through a transition the outside
    lane turns from ``-normal`` (begin runout) through level (begin runoff) to
    ``+e`` (full rate); the inside lane stays at ``-normal`` until the outside lane
    reaches ``+normal``, then turns with it to ``-e``; the exit mirrors it. The
    axis of rotation is the centreline. Stations the record does not state are
    taken where the runoff's own slope puts them.
    """
    s = np.asarray(stations, dtype=float)
    left = np.full(s.shape, -normal)
    right = np.full(s.shape, -normal)
    for rec, owner in zip(records, curve_of_records(curves, records), strict=True):
        pts = _breakpoints(rec, normal)
        if pts is None:
            continue
        xs, outside, inside = pts
        on = (s >= xs[0]) & (s <= xs[-1])
        if not on.any():
            continue
        out_v = np.interp(s[on], xs, outside)
        in_v = np.interp(s[on], xs, inside)
        if owner is not None and owner[1].delta > 0:  # a left curve banks down to the left
            right[on], left[on] = out_v, in_v
        else:
            left[on], right[on] = out_v, in_v
    return left, right


def curve_of_records(
    curves: Sequence[HorizontalCurve], records: Sequence[Superelevation]
) -> list[tuple[int, HorizontalCurve] | None]:
    """For each record, (number, curve) of the horizontal curve it belongs to (the
    numbering of the review, from 1), or None: :func:`match_records` read the other way."""
    owner = {
        id(r): (i, c)
        for i, (c, r) in enumerate(zip(curves, match_records(curves, records), strict=True), 1)
        if r is not None
    }
    return [owner.get(id(r)) for r in records]


def _breakpoints(rec: Superelevation, normal: float):
    """(stations, outside slope, inside slope) of a record, missing stations derived."""
    e = rec.rate
    full = rec.full_super if rec.full_super is not None else rec.sta_start
    end_full = rec.end_full if rec.end_full is not None else rec.sta_end
    if full is None or end_full is None or e <= 0:
        return None
    b0, e0 = _side(rec.begin_runout, rec.begin_runoff, full, e, normal, -1.0)
    b1, e1 = _side(rec.end_runout, rec.end_runoff, end_full, e, normal, +1.0)
    # where the outside lane reaches +normal: the inside lane starts to turn there
    rc_in = e0 + (full - e0) * min(normal / e, 1.0)
    rc_out = e1 - (e1 - end_full) * min(normal / e, 1.0)
    xs = np.array([b0, e0, rc_in, full, end_full, rc_out, e1, b1])
    outside = np.array([-normal, 0.0, min(normal, e), e, e, min(normal, e), 0.0, -normal])
    inside = np.array([-normal, -normal, -normal, -e, -e, -normal, -normal, -normal])
    xs = np.maximum.accumulate(xs)  # stations that coincide stay in order
    return xs, outside, inside


def _side(runout, runoff, full, e, normal, sign):
    """(runout station, runoff station) on one side, each derived when missing: the
    runoff's slope e / L_r carries on through the runout (L_t = normal / e L_r)."""
    if runoff is None and runout is not None:
        # level point where the outside lane crosses zero between runout and full
        runoff = runout + (full - runout) * normal / (normal + e)
    if runoff is None:
        runoff = full
    if runout is None:
        runout = runoff + sign * abs(full - runoff) * normal / e
    return float(runout), float(runoff)


def with_records(records: Sequence[Superelevation], proposal: Sequence[Transition]):
    """The stated records, or the proposal's where none is stated."""
    if records:
        return tuple(records)
    return tuple(t.record for t in proposal if t.record is not None)
