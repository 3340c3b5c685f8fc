"""Design-control review of a profile: K-value checks and exact sight distance.

Per vertical curve (closed-form design checks, common practice after AASHTO
2018 Chapter 3): stopping sight distance on crests (both S < L and S > L),
headlight sight distance on sags, comfort, appearance, drainage on curbed
sections and, on request, passing sight distance.

Along the whole profile (exact, vectorised): the available sight distance at
every station in both directions of travel -- the distance to the first point
where an object of height h2 is hidden from an eye at h1 by the finished grade,
and the distance to the first point where the upper edge of the headlight
beam (height h, rising at angle beta) strikes the road -- compared with the
required stopping sight distance, with the grade correction on steep downgrades.

The controls are data (:mod:`gradeline.criteria`); results are plain records,
never printed here. These checks do not replace the governing agency's
standards or the responsible engineer's judgment.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from importlib import resources
from typing import Any

import numpy as np

from gradeline.analysis.sight import SightDistance, sight_distance
from gradeline.errors import InputError, UsageError
from gradeline.geometry import vertical
from gradeline.geometry._runs import true_runs
from gradeline.geometry.vertical import VerticalGeometry
from gradeline.model import SourceRef
from gradeline.model.units import UNIT_DEFAULTS

__all__ = [
    "Check",
    "Criteria",
    "CurveReview",
    "Deficiency",
    "Review",
    "SightDistance",
    "crest_length",
    "design_k_crest",
    "design_k_sag",
    "design_ssd",
    "load_criteria",
    "review_profile",
    "sag_length",
    "sight_distance",
    "stopping_distance",
]

MPH_TO_KMH = 1.609344


@dataclass(frozen=True, slots=True)
class Criteria:
    """One set of design controls (US customary or metric)."""

    name: str
    speed_unit: str
    eye_height: float
    object_height: float
    headlight_height: float
    headlight_angle_deg: float
    sag_constant: float
    sag_per_distance: float
    reaction_time: float
    deceleration: float
    brake_reaction_coefficient: float
    braking_coefficient: float
    gravity: float
    grade_coefficient: float
    grade_correction_from: float
    ssd_round_to: float
    k_round_slack: float
    comfort_divisor: float
    appearance_per_speed: float
    drainage_k_max: float
    passing_object_height: float
    radius_coefficient: float = 15.0
    e_max: float = 0.08
    passing_sight_distance: tuple[tuple[float, float], ...] = ()
    side_friction: tuple[tuple[float, float], ...] = ()

    pass_tolerance: float = 0.001  # relative: provided >= required * (1 - tol) passes
    #: keys of the criteria table gradeline does not know (read past; the review says so)
    unknown: tuple[str, ...] = ()

    def min_radius(self, speed: float, e_max: float | None = None) -> float | None:
        """Minimum horizontal radius V^2 / (c (e + f)) for a design speed (None off the table)."""
        if not self.side_friction:
            return None
        v = np.array([p[0] for p in self.side_friction])
        f = np.array([p[1] for p in self.side_friction])
        if speed < v[0] or speed > v[-1]:
            return None
        e = self.e_max if e_max is None else e_max
        return speed**2 / (self.radius_coefficient * (e + float(np.interp(speed, v, f))))

    @property
    def crest_constant(self) -> float:
        """200 (sqrt h1 + sqrt h2)^2: 2158 ft with 3.5/2.0 ft, 658 m with 1.08/0.60 m."""
        return 200.0 * (math.sqrt(self.eye_height) + math.sqrt(self.object_height)) ** 2

    @property
    def passing_constant(self) -> float:
        """200 (sqrt h1 + sqrt h2)^2 with the passing object height: 2800 ft (3.5/3.5 ft)."""
        return 200.0 * (math.sqrt(self.eye_height) + math.sqrt(self.passing_object_height)) ** 2

    def sag_denominator(self, s: float) -> float:
        """200 (h + S tan(beta)) as the published formula writes it.

        That is 400 + 3.5 S (ft) and 120 + 3.5 S (m).
        """
        return self.sag_constant + self.sag_per_distance * s

    def psd(self, speed: float) -> float | None:
        """Passing sight distance for a design speed (linear between table rows)."""
        if not self.passing_sight_distance:
            return None
        v = np.array([p[0] for p in self.passing_sight_distance])
        d = np.array([p[1] for p in self.passing_sight_distance])
        if speed < v[0] or speed > v[-1]:
            return None
        return float(np.interp(speed, v, d))


def criteria_table(path: str | None, metric: bool) -> tuple[dict[str, Any], str, str]:
    """The ``[us]`` or ``[metric]`` table of a criteria TOML file (default: the shipped
    AASHTO 2018 set), the file's name for messages, and the set's name.

    Raises
    ------
    InputError
        The file cannot be read, is not TOML, or lacks the table.
    """
    from gradeline.io.config import MAX_TOML_BYTES, parse_toml

    where = path or "aashto-2018.toml"
    try:
        if path is None:
            data = resources.files("gradeline.criteria").joinpath("aashto-2018.toml").read_bytes()
        else:
            with open(path, "rb") as fh:
                data = fh.read(MAX_TOML_BYTES + 1)
    except OSError as err:
        raise InputError(
            f"cannot read the file ({err.strerror})", SourceRef(where), "criteria"
        ) from None
    doc = parse_toml(data, where, "criteria")
    key = "metric" if metric else "us"
    table = doc.get(key)
    if not isinstance(table, dict):
        raise InputError(f"no [{key}] table of design controls", SourceRef(where), "criteria")
    name = doc.get("name", where)
    if not isinstance(name, str):
        raise InputError("'name' must be text", SourceRef(where), "criteria")
    return table, where, name


#: The range of every design control (low, high, low included): a value outside
#: is refused with the key named (zero, negative or absurd controls divide by zero
#: or pass anything).
CRITERIA_RANGES: dict[str, tuple[float, float, bool]] = {
    "eye_height": (0.0, 100.0, False),
    "object_height": (0.0, 100.0, False),
    "headlight_height": (0.0, 100.0, False),
    "headlight_angle_deg": (0.0, 10.0, False),
    "sag_constant": (0.0, 1e4, False),
    "sag_per_distance": (0.0, 100.0, False),
    "reaction_time": (0.0, 10.0, True),
    "deceleration": (0.0, 100.0, True),
    "brake_reaction_coefficient": (0.0, 10.0, True),
    "braking_coefficient": (0.0, 10.0, True),
    "gravity": (0.0, 100.0, True),
    "grade_coefficient": (0.0, 1e4, True),
    "grade_correction_from": (0.0, 1.0, False),
    "ssd_round_to": (0.0, 1000.0, True),
    "k_round_slack": (0.0, 0.99, False),
    "comfort_divisor": (0.0, 1e4, True),
    "appearance_per_speed": (0.0, 100.0, False),
    "drainage_k_max": (0.0, 1e5, True),
    "passing_object_height": (0.0, 100.0, False),
    "radius_coefficient": (0.0, 1e4, True),
    "e_max": (0.0, 0.2, True),
    "pass_tolerance": (0.0, 0.5, False),
}


def criteria_number(value: Any, key: str, where: str, bounds: tuple[float, float, bool]) -> float:
    """A control's value: a finite number within ``bounds`` (low, high, low excluded
    when the third item is True), else one InputError naming the key."""
    low, high, strict = bounds
    if isinstance(value, bool) or not isinstance(value, (int, float)):
        raise InputError(
            f"{key} must be a number, got {value!r}"[:200], SourceRef(where), "criteria"
        )
    try:
        v = float(value)
    except OverflowError:
        raise InputError(f"{key} is too large a number", SourceRef(where), "criteria") from None
    if not math.isfinite(v) or (v <= low if strict else v < low) or v > high:
        raise InputError(
            f"{key} = {v:g} is out of range: give {'more than' if strict else 'at least'} "
            f"{low:g} and at most {high:g}",
            SourceRef(where),
            "criteria",
        )
    return v


def criteria_pairs(
    tab: Any, key: str, where: str, bounds: tuple[float, float, bool]
) -> tuple[tuple[float, float], ...]:
    """A table of speed (or count) -> value, each checked; sorted by the key."""
    if not isinstance(tab, dict):
        raise InputError(f"{key} must be a table", SourceRef(where), "criteria")
    out = []
    for k, v in tab.items():
        try:
            speed = float(k)
        except ValueError:
            raise InputError(
                f"{key}: key {k!r} is not a number", SourceRef(where), "criteria"
            ) from None
        if not (math.isfinite(speed) and 0 < speed <= 1000):
            raise InputError(f"{key}: key {k!r} is out of range", SourceRef(where), "criteria")
        out.append((speed, criteria_number(v, f"{key}.{k}", where, bounds)))
    return tuple(sorted(out))


def load_criteria(path: str | None, metric: bool) -> Criteria:
    """Read a criteria TOML file (default: the shipped AASHTO 2018 set).

    Every control is checked (a number in its range, :data:`CRITERIA_RANGES`); keys
    gradeline does not know are listed in ``Criteria.unknown`` (the review prints
    them: a typo must not pass unnoticed).

    Raises
    ------
    InputError
        The file cannot be read, is not TOML, lacks a value, or holds one out of range.
    """
    table, where, name = criteria_table(path, metric)
    key = "metric" if metric else "us"
    values: dict[str, Any] = {"name": name}
    optional = ("radius_coefficient", "e_max", "pass_tolerance")
    for f in Criteria.__dataclass_fields__:
        if f in ("name", "passing_sight_distance", "side_friction", "unknown"):
            continue
        if f in optional and f not in table:
            continue
        if f not in table:
            raise InputError(f"[{key}] lacks {f!r}", SourceRef(where), "criteria")
        if f == "speed_unit":
            want = "kmh" if metric else "mph"
            if table[f] != want:
                raise InputError(
                    f"[{key}] speed_unit must be {want!r}, got {table[f]!r}"[:200],
                    SourceRef(where),
                    "criteria",
                )
            values[f] = want
            continue
        values[f] = criteria_number(table[f], f"[{key}] {f}", where, CRITERIA_RANGES[f])
    if "side_friction" not in table:
        raise InputError(
            f"[{key}] lacks the side_friction table (the radius checks need it)",
            SourceRef(where),
            "criteria",
        )
    values["side_friction"] = criteria_pairs(
        table["side_friction"], f"[{key}.side_friction]", where, (0.0, 1.0, True)
    )
    values["passing_sight_distance"] = criteria_pairs(
        table.get("passing_sight_distance", {}),
        f"[{key}.passing_sight_distance]",
        where,
        (0.0, 1e5, True),
    )
    known = set(Criteria.__dataclass_fields__) | {"superelevation"}
    values["unknown"] = tuple(f"[{key}] {k}" for k in table if k not in known)
    return Criteria(**values)


# --------------------------------------------------------------------------- formulas
def stopping_distance(crit: Criteria, speed: float, downgrade: float = 0.0) -> float:
    """Stopping sight distance (unrounded) for a design speed.

    ``downgrade`` (ratio, positive downhill) applies the grade correction
    V^2 / (c (a/g - G)) from ``grade_correction_from`` on.

    Examples
    --------
    >>> crit = load_criteria(None, metric=False)
    >>> round(stopping_distance(crit, 50.0), 1)  # 1.47*50*2.5 + 1.075*50^2/11.2
    423.7
    """
    reaction = crit.brake_reaction_coefficient * speed * crit.reaction_time
    if downgrade >= crit.grade_correction_from:
        grade = min(downgrade, steepest_corrected_grade(crit))
        braking = speed**2 / (crit.grade_coefficient * (crit.deceleration / crit.gravity - grade))
    else:
        braking = crit.braking_coefficient * speed**2 / crit.deceleration
    return reaction + braking


#: The grade correction V^2 / (c (a/g - G)) grows without bound as G nears a/g
#: (about 35 %); steeper downgrades are taken at this share of a/g (gradeline's
#: choice), and the review notes where that happened.
_STEEPEST_SHARE = 0.9


def steepest_corrected_grade(crit: Criteria) -> float:
    """The steepest downgrade the grade-corrected stopping distance is computed for."""
    return _STEEPEST_SHARE * crit.deceleration / crit.gravity


def design_ssd(crit: Criteria, speed: float, downgrade: float = 0.0) -> float:
    """Stopping sight distance rounded up to the design step (5 ft / 5 m)."""
    raw = stopping_distance(crit, speed, downgrade)
    return math.ceil(raw / crit.ssd_round_to - 1e-9) * crit.ssd_round_to


def _round_k(k: float, crit: Criteria) -> float:
    return float(math.ceil(k - crit.k_round_slack))


def design_k_crest(crit: Criteria, ssd: float) -> float:
    """Design K of a crest for stopping sight distance: S^2 / 2158 (658), rounded up."""
    return _round_k(ssd**2 / crit.crest_constant, crit)


def design_k_sag(crit: Criteria, ssd: float) -> float:
    """Design K of a sag for headlight sight distance: S^2 / (400 + 3.5 S), rounded up."""
    return _round_k(ssd**2 / crit.sag_denominator(ssd), crit)


def sight_case(a_pct: float, s: float, constant: float) -> str:
    """ "S < L" when the sight line S ends on the curve (A S^2 / C >= S), else "S > L"."""
    return "S < L" if abs(a_pct) * s * s / constant >= s else "S > L"


def crest_length(a_pct: float, s: float, constant: float) -> float:
    """Minimum crest length for sight distance S: A S^2/C when S < L, else 2S - C/A."""
    a = abs(a_pct)
    if a == 0:
        return 0.0
    long = a * s * s / constant
    return long if long >= s else max(0.0, 2.0 * s - constant / a)


def sag_length(a_pct: float, s: float, crit: Criteria) -> float:
    """Minimum sag length for headlight sight distance (S < L and S > L cases)."""
    a = abs(a_pct)
    if a == 0:
        return 0.0
    long = a * s * s / crit.sag_denominator(s)
    return long if long >= s else max(0.0, 2.0 * s - crit.sag_denominator(s) / a)


# --------------------------------------------------------------------------- per curve
@dataclass(frozen=True, slots=True)
class Check:
    """One control: what is required, what the curve provides, and the verdict."""

    name: str
    required: float
    provided: float
    unit: str
    verdict: str  # "pass", "fail" or "check"
    note: str = ""
    at_most: bool = False  # the provided value must not exceed the required one

    @property
    def margin(self) -> float:
        """Spare: provided minus required (required minus provided for an upper limit)."""
        return self.required - self.provided if self.at_most else self.provided - self.required


@dataclass(frozen=True, slots=True)
class CurveReview:
    """The checks of one vertical curve."""

    index: int
    curve: vertical.VerticalCurve
    checks: tuple[Check, ...]

    @property
    def failed(self) -> bool:
        """True when any check fails."""
        return any(c.verdict == "fail" for c in self.checks)


def _meets(provided: float, required: float, crit: Criteria) -> bool:
    """Provided meets required, within the criteria's relative pass tolerance.

    A value that prints equal to the requirement must not fail (a sag of
    R = 3000 m showed K required 30.00, provided 30.00 as a failure).
    """
    return provided >= required * (1.0 - crit.pass_tolerance) - 1e-9


def _verdict(ok: bool) -> str:
    return "pass" if ok else "fail"


def check_curve(
    curve: vertical.VerticalCurve,
    crit: Criteria,
    speed: float,
    *,
    curbed: bool = False,
    passing: bool = False,
    lu: str = "ft",
) -> tuple[Check, ...]:
    """All closed-form checks of one curve."""
    a = abs(curve.a_pct)
    length = curve.length
    k = curve.k if curve.k is not None else math.inf
    ssd = design_ssd(crit, speed)
    out: list[Check] = []
    note = (
        ""
        if curve.kind == "parabolic"
        else (
            f"{curve.kind} curve: formulas assume a symmetric parabola; see the exact sight "
            "distance"
        )
    )
    if curve.curve_type == "crest":
        need = crest_length(a, ssd, crit.crest_constant)
        case = sight_case(a, ssd, crit.crest_constant)
        out.append(
            Check(
                f"stopping sight distance {ssd:g} {lu} ({case})",
                need,
                length,
                lu,
                _verdict(_meets(length, need, crit)),
                note,
            )
        )
        kd = design_k_crest(crit, ssd)
        out.append(Check("design K, crest", kd, k, f"{lu}/%", _verdict(_meets(k, kd, crit))))
        if passing:
            psd = crit.psd(speed)
            if psd is not None:
                need = crest_length(a, psd, crit.passing_constant)
                out.append(
                    Check(
                        f"passing sight distance {psd:g} {lu}",
                        need,
                        length,
                        lu,
                        _verdict(_meets(length, need, crit)),
                    )
                )
    elif curve.curve_type == "sag":
        need = sag_length(a, ssd, crit)
        case = sight_case(a, ssd, crit.sag_denominator(ssd))
        out.append(
            Check(
                f"headlight sight distance {ssd:g} {lu} ({case})",
                need,
                length,
                lu,
                _verdict(_meets(length, need, crit)),
                note,
            )
        )
        kd = design_k_sag(crit, ssd)
        out.append(Check("design K, sag", kd, k, f"{lu}/%", _verdict(_meets(k, kd, crit))))
        need = a * speed**2 / crit.comfort_divisor
        out.append(
            Check(
                f"comfort (A V^2 / {crit.comfort_divisor:g})",
                need,
                length,
                lu,
                _verdict(_meets(length, need, crit)),
            )
        )
    need = crit.appearance_per_speed * speed
    out.append(
        Check(
            f"appearance ({crit.appearance_per_speed:g} V)",
            need,
            length,
            lu,
            _verdict(_meets(length, need, crit)),
        )
    )
    if curbed and curve.curve_type != "flat":
        flat = k > crit.drainage_k_max
        out.append(
            Check(
                f"drainage, curbed (K at most {crit.drainage_k_max:g})",
                crit.drainage_k_max,
                k,
                f"{lu}/%",
                "check" if flat else "pass",
                "a level spot near the high/low point needs drainage attention" if flat else "",
                at_most=True,
            )
        )
    return tuple(out)


@dataclass(frozen=True, slots=True)
class Deficiency:
    """A station range where available sight distance is below the requirement."""

    kind: str  # "stopping" or "headlight"
    direction: str  # "ahead" (up-station) or "behind"
    start: float
    end: float
    available_min: float
    required: float


def _runs(stations, available, required, kind, direction) -> list[Deficiency]:
    short = available < required - 1e-6
    return [
        Deficiency(
            kind,
            direction,
            float(stations[i]),
            float(stations[j]),
            float(np.min(available[i : j + 1])),
            float(np.max(required[i : j + 1])),
        )
        for i, j in true_runs(short)
    ]


@dataclass(frozen=True, eq=False)
class Review:
    """Everything the review found."""

    criteria: Criteria
    speed: float
    speed_unit: str
    ssd: float
    curves: tuple[CurveReview, ...]
    sight: SightDistance | None  # None without a profile
    deficiencies: tuple[Deficiency, ...]
    notes: tuple[str, ...] = field(default=())
    radius_checks: tuple[tuple[float, Check], ...] = ()  # (PC/TS station, check)
    #: required stopping sight distance at each sight-distance station, travelling
    #: up-station and down-station (grade-corrected); None without a profile
    required: tuple[np.ndarray, np.ndarray] | None = None
    #: the superelevation of the horizontal curves (gradeline.analysis.superelevation)
    superelevation: Any = None

    @property
    def failed(self) -> bool:
        """True when any check fails or any station range lacks sight distance."""
        return (
            any(c.failed for c in self.curves)
            or bool(self.deficiencies)
            or any(ch.verdict == "fail" for _, ch in self.radius_checks)
            or (self.superelevation is not None and self.superelevation.failed)
        )


def radius_checks(
    curves, crit: Criteria, speed: float, e_max: float | None = None, lu: str = "ft"
) -> tuple[tuple[float, Check], ...]:
    """Minimum radius for the design speed against each horizontal curve's radius."""
    need = crit.min_radius(speed, e_max)
    if need is None:
        return ()
    e = crit.e_max if e_max is None else e_max
    return tuple(
        (
            c.start_station,
            Check(
                f"minimum radius (e max {100 * e:g} %)",
                need,
                c.radius,
                lu,
                _verdict(_meets(c.radius, need, crit)),
            ),
        )
        for c in curves
    )


def review_profile(
    geom: VerticalGeometry | None,
    crit: Criteria,
    speed: float,
    *,
    curbed: bool = False,
    passing: bool = False,
    step: float | None = None,
    length_unit: str = "ft",
    horizontal_curves=(),
    e_max: float | None = None,
) -> Review:
    """Review ``geom`` for a design ``speed`` in the criteria's speed unit.

    Without a profile (``geom`` None, a plan-only alignment) only the
    horizontal curves are reviewed, and the notes say what was left out.
    """
    if not (math.isfinite(speed) and speed > 0):
        raise UsageError(f"design speed must be a positive number, got {speed:g}")
    ssd = design_ssd(crit, speed)
    notes = [
        "Sight distance is measured on the finished grade alone: cuts, barriers, "
        "structures and horizontal curvature can shorten it further.",
        "Checks do not replace the governing agency's standards or the responsible "
        "engineer's judgment.",
    ]
    if crit.unknown:
        notes.append(
            "The criteria file holds keys gradeline does not know, read past (a typo?): "
            + ", ".join(crit.unknown)
        )
    radii = radius_checks(horizontal_curves, crit, speed, e_max, length_unit)
    if geom is None:
        notes.insert(
            0,
            "The alignment has no profile: vertical curves and sight distance "
            "were not reviewed; only the horizontal curves were.",
        )
        return Review(crit, speed, crit.speed_unit, ssd, (), None, (), tuple(notes), radii)
    curves = tuple(
        CurveReview(
            i + 1, c, check_curve(c, crit, speed, curbed=curbed, passing=passing, lu=length_unit)
        )
        for i, c in enumerate(geom.curves)
    )
    st = step or UNIT_DEFAULTS[length_unit == "m"].sight_step
    if not (math.isfinite(st) and 0 < st <= geom.end - geom.start):
        raise UsageError(
            f"sight-distance step {st:g} must be positive and no longer than the profile "
            f"({geom.end - geom.start:g})",
            choice="step",
        )
    steepest = float(np.max(np.abs(geom.grades))) if len(geom.grades) else 0.0
    if steepest > steepest_corrected_grade(crit):
        notes.insert(
            0,
            f"Downgrades of up to {100 * steepest:.1f} % lie beyond the range of "
            "the grade-corrected stopping distance formula; they were taken as "
            f"{100 * steepest_corrected_grade(crit):.1f} %.",
        )
    reach = 1.25 * design_ssd(crit, speed, steepest)
    sd = sight_distance(geom, crit, step=st, reach=reach)
    _, g = vertical.evaluate(geom, sd.stations)
    req_ahead = np.array([design_ssd(crit, speed, max(0.0, -x)) for x in g])
    req_behind = np.array([design_ssd(crit, speed, max(0.0, x)) for x in g])
    defs = (
        _runs(sd.stations, sd.ahead, req_ahead, "stopping", "ahead")
        + _runs(sd.stations, sd.behind, req_behind, "stopping", "behind")
        + _runs(sd.stations, sd.headlight_ahead, req_ahead, "headlight", "ahead")
        + _runs(sd.stations, sd.headlight_behind, req_behind, "headlight", "behind")
    )
    notes_t = tuple(notes)
    return Review(
        crit,
        speed,
        crit.speed_unit,
        ssd,
        curves,
        sd,
        tuple(defs),
        notes_t,
        radii,
        (req_ahead, req_behind),
    )
