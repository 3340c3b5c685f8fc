"""Size vertical curves for a design speed from the PVIs alone.

For every interior PVI the minimum curve length of each control is computed
with the closed forms of :mod:`gradeline.analysis.review` (the same criteria,
so a designed profile passes the review it was designed for):

* crest: stopping sight distance (``L = A S^2 / C`` when S < L, else
  ``L = 2S - C / A``; S corrected for the steeper of the two grades taken as a
  downgrade, since traffic one way or the other descends it), the design K
  (``L = K A``), passing sight distance on request, appearance (``L = 3 V``,
  common practice);
* sag: headlight sight distance (``L = A S^2 / (400 + 3.5 S)`` or
  ``2S - (400 + 3.5 S) / A``; metric 120), the design K, comfort
  (``L = A V^2 / 46.5``; metric ``/ 395``), appearance;
* a minimum length the user gives.

The governing (longest) control is rounded up to the design step. Curves must
fit between their neighbours and inside the profile: where the wanted curves
overlap, each tangent is shared between its two curves in proportion to what
they want; a curve that no longer fits symmetrically gets the longest
symmetric length that does, else an unsymmetrical curve (L1, L2) of the
required total length, else the longest that fits, with each control it
misses and by how much.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field, replace

from gradeline.analysis import review
from gradeline.analysis.review import Criteria
from gradeline.errors import UsageError
from gradeline.model import Profile, PVISpec

__all__ = ["Control", "CurveDesign", "ProfileDesign", "design_profile"]

#: Lengths within this of each other are the same (file units): rounding noise.
_EPS = 1e-6


@dataclass(frozen=True, slots=True)
class Control:
    """One control's minimum length (or, ``at_most``, maximum) for one curve."""

    name: str
    formula: str
    length: float
    at_most: bool = False


@dataclass(frozen=True, slots=True)
class CurveDesign:
    """The designed curve at one PVI."""

    index: int  # PVI index in the profile (0 = the start)
    station: float
    elevation: float
    grade_in: float  # ratio
    grade_out: float
    controls: tuple[Control, ...]
    required: float  # the governing minimum, unrounded
    governing: str
    length_in: float  # chosen L1 (back) and L2 (ahead); both 0: no curve
    length_out: float
    status: str  # "designed", "shortened", "unsymmetrical", "short", "no curve"
    notes: tuple[str, ...] = ()
    room_in: float = math.inf  # what the neighbours and the profile ends leave
    room_out: float = math.inf
    was: float | None = None  # the input's curve length, if it had one

    @property
    def a_pct(self) -> float:
        """Algebraic grade difference, percent (negative on a crest)."""
        return (self.grade_out - self.grade_in) * 100.0

    @property
    def curve_type(self) -> str:
        """ "crest", "sag" or "none"."""
        if self.a_pct < 0:
            return "crest"
        return "sag" if self.a_pct > 0 else "none"

    @property
    def length(self) -> float:
        """Total horizontal length L1 + L2."""
        return self.length_in + self.length_out

    @property
    def k(self) -> float | None:
        """K provided, L / |A| (None without a curve)."""
        a = abs(self.a_pct)
        return self.length / a if a > 0 and self.length > 0 else None

    @property
    def symmetric(self) -> bool:
        """Whether L1 = L2."""
        return abs(self.length_in - self.length_out) <= _EPS

    def shortfalls(self) -> list[tuple[str, float]]:
        """Controls the chosen length misses: (name, how much longer it must be)."""
        return [
            (c.name, c.length - self.length)
            for c in self.controls
            if not c.at_most and c.length > self.length + _EPS
        ]


@dataclass(frozen=True)
class ProfileDesign:
    """The design of one profile: a curve for each interior PVI and the profile."""

    name: str
    speed: float
    speed_unit: str
    length_unit: str
    step: float
    curves: tuple[CurveDesign, ...]
    profile: Profile
    criteria: str
    notes: tuple[str, ...] = field(default=())

    @property
    def complete(self) -> bool:
        """True when every curve meets every control it was sized for."""
        return all(c.status != "short" for c in self.curves)


def _controls(
    a_pct: float,
    crit: Criteria,
    speed: float,
    downgrade: float,
    *,
    passing: bool,
    curbed: bool,
    min_length: float | None,
    lu: str,
) -> list[Control]:
    """Every control of a curve with grade difference ``a_pct`` (percent, signed)."""
    a = abs(a_pct)
    ssd = review.design_ssd(crit, speed, downgrade)
    out: list[Control] = []
    if a_pct < 0:  # crest
        c = crit.crest_constant
        case = review.sight_case(a, ssd, c)
        formula = f"L = A S^2 / {c:g}" if case == "S < L" else f"L = 2 S - {c:g} / A"
        out.append(
            Control(
                f"stopping sight distance {ssd:g} {lu} ({case})",
                formula,
                review.crest_length(a, ssd, c),
            )
        )
        kd = review.design_k_crest(crit, ssd)
        out.append(Control(f"design K, crest ({kd:g})", f"L = K A = {kd:g} A", kd * a))
        if passing:
            psd = crit.psd(speed)
            if psd is not None:
                cp = crit.passing_constant
                out.append(
                    Control(
                        f"passing sight distance {psd:g} {lu}",
                        f"L = A S^2 / {cp:.0f} (S < L) or 2 S - {cp:.0f} / A",
                        review.crest_length(a, psd, cp),
                    )
                )
    else:  # sag
        den = crit.sag_denominator(ssd)
        case = review.sight_case(a, ssd, den)
        formula = (
            f"L = A S^2 / ({crit.sag_constant:g} + {crit.sag_per_distance:g} S)"
            if case == "S < L"
            else f"L = 2 S - ({crit.sag_constant:g} + {crit.sag_per_distance:g} S) / A"
        )
        out.append(
            Control(
                f"headlight sight distance {ssd:g} {lu} ({case})",
                formula,
                review.sag_length(a, ssd, crit),
            )
        )
        kd = review.design_k_sag(crit, ssd)
        out.append(Control(f"design K, sag ({kd:g})", f"L = K A = {kd:g} A", kd * a))
        out.append(
            Control(
                "comfort",
                f"L = A V^2 / {crit.comfort_divisor:g}",
                a * speed**2 / crit.comfort_divisor,
            )
        )
    out.append(
        Control(
            "appearance", f"L = {crit.appearance_per_speed:g} V", crit.appearance_per_speed * speed
        )
    )
    if min_length:
        out.append(Control("minimum length (given)", f"L = {min_length:g}", min_length))
    if curbed:
        out.append(
            Control(
                f"drainage, curbed (K at most {crit.drainage_k_max:g})",
                f"L = {crit.drainage_k_max:g} A at most",
                crit.drainage_k_max * a,
                at_most=True,
            )
        )
    return out


def _up(x: float, step: float) -> float:
    """``x`` rounded up to the step (never down)."""
    return math.ceil(x / step - 1e-9) * step


def _down(x: float, step: float) -> float:
    return math.floor(x / step + 1e-9) * step


def design_profile(
    profile: Profile,
    crit: Criteria,
    speed: float,
    *,
    step: float,
    passing: bool = False,
    curbed: bool = False,
    min_length: float | None = None,
    length_unit: str = "ft",
) -> ProfileDesign:
    """Size a curve at every interior PVI of ``profile`` (its curves are replaced).

    ``speed`` is in the criteria's speed unit; ``step`` is the rounding step of
    the lengths. The first and last PVI are the ends of the profile.
    """
    if not (math.isfinite(speed) and speed > 0):
        raise UsageError(f"design speed must be a positive number, got {speed:g}")
    if not (math.isfinite(step) and step > 0):
        raise UsageError(f"the rounding step must be a positive length, got {step:g}")
    if min_length is not None and not (math.isfinite(min_length) and min_length >= 0):
        raise UsageError(f"--min-length must be a length of 0 or more, got {min_length:g}")
    pvis = profile.pvis
    if len(pvis) < 2:
        raise UsageError(f"profile {profile.name!r} needs at least two PVIs")
    st = [p.station for p in pvis]
    z = [p.elevation for p in pvis]
    for i in range(1, len(st)):
        if not st[i] > st[i - 1]:
            raise UsageError(
                f"profile {profile.name!r}: PVI stations must increase ({st[i]:g} after "
                f"{st[i - 1]:g})"
            )
    g = [(z[i + 1] - z[i]) / (st[i + 1] - st[i]) for i in range(len(st) - 1)]
    n = len(pvis)
    # 1. what each curve wants on its own
    wanted: dict[int, tuple[list[Control], float, str, float]] = {}
    for i in range(1, n - 1):
        a_pct = (g[i] - g[i - 1]) * 100.0
        if abs(a_pct) < 1e-9:
            continue
        # a vehicle travelling either way descends one of the two grades: the
        # stopping distance is corrected for the steeper (as the review's run is)
        downgrade = max(abs(g[i - 1]), abs(g[i]))
        ctl = _controls(
            a_pct,
            crit,
            speed,
            downgrade,
            passing=passing,
            curbed=curbed,
            min_length=min_length,
            lu=length_unit,
        )
        top = max((c for c in ctl if not c.at_most), key=lambda c: c.length)
        wanted[i] = (ctl, top.length, top.name, _up(top.length, step))
    # 2. the room of each curve on each side: the tangent from PVI j to j + 1 is
    # shared by its two curves in proportion to what they want (all of it to one
    # curve when the other PVI has none). The shares add up to the tangent, so
    # curves that keep to their rooms never overlap; the first and last PVI are
    # the profile's ends, which no curve passes.
    half = {i: w[3] / 2.0 for i, w in wanted.items()}
    room_in: dict[int, float] = {}
    room_out: dict[int, float] = {}
    for j in range(n - 1):
        d = st[j + 1] - st[j]
        left, right = half.get(j, 0.0), half.get(j + 1, 0.0)
        room_out[j] = d * left / (left + right) if left + right > 0 else 0.0
        room_in[j + 1] = d - room_out[j]
    # 3. choose
    curves: list[CurveDesign] = []
    new_pvis: list[PVISpec] = [PVISpec(st[0], z[0])]
    for i in range(1, n - 1):
        was = pvis[i].length if pvis[i].kind in ("parabolic", "unsymmetric") else None
        if i not in wanted:
            curves.append(
                CurveDesign(
                    i,
                    st[i],
                    z[i],
                    g[i - 1],
                    g[i],
                    (),
                    0.0,
                    "",
                    0.0,
                    0.0,
                    "no curve",
                    ("no grade change: no curve",),
                    was=was,
                )
            )
            new_pvis.append(PVISpec(st[i], z[i]))
            continue
        ctl, need, gov, want = wanted[i]
        r_in, r_out = room_in.get(i, math.inf), room_out.get(i, math.inf)
        notes: list[str] = []
        sym_max = 2.0 * min(r_in, r_out)
        if want <= sym_max + _EPS:
            l1 = l2 = want / 2.0
            status = "designed"
        elif need <= sym_max + _EPS:
            rounded = _down(sym_max, step)
            total = rounded if rounded >= need else sym_max
            l1 = l2 = total / 2.0
            status = "shortened"
            notes.append(
                f"shortened from {want:g} to {total:g} {length_unit} to fit between its neighbours"
            )
        elif need <= r_in + r_out + _EPS:
            short_room, long_room = sorted((r_in, r_out))
            b_side = min(long_room, max(_up(need - short_room, step), need - short_room))
            l1, l2 = (short_room, b_side) if r_in <= r_out else (b_side, short_room)
            status = "unsymmetrical"
            notes.append(
                f"a symmetric curve of {need:g} {length_unit} does not fit (room "
                f"{r_in:g} back, {r_out:g} ahead): unsymmetrical L1 = {l1:g}, L2 = {l2:g}; "
                "the closed forms assume a symmetric curve, the review's exact sight "
                "distance decides"
            )
        else:
            l1, l2 = r_in, r_out
            status = "short"
            notes.append(
                f"no curve of the required {need:g} {length_unit} fits: {r_in + r_out:g} "
                f"{length_unit} of room ({r_in:g} back, {r_out:g} ahead); move the PVIs "
                "or change the grades"
            )
        cd = CurveDesign(
            i, st[i], z[i], g[i - 1], g[i], tuple(ctl), need, gov, l1, l2, status,
            (), r_in, r_out, was,
        )  # fmt: skip
        for name, by in cd.shortfalls():
            notes.append(f"misses {name} by {by:.2f} {length_unit}")
        if any(ctl_.at_most and cd.length > ctl_.length + _EPS for ctl_ in ctl):
            notes.append(
                f"K {cd.k:.1f} is above {crit.drainage_k_max:g}: a level spot near the "
                "high or low point needs drainage attention"
            )
        cd = replace(cd, notes=tuple(notes))
        curves.append(cd)
        if cd.symmetric:
            new_pvis.append(PVISpec(st[i], z[i], "parabolic", l1, l2))
        else:
            new_pvis.append(PVISpec(st[i], z[i], "unsymmetric", l1, l2))
    new_pvis.append(PVISpec(st[-1], z[-1]))
    designed = Profile(profile.name, tuple(new_pvis))
    return ProfileDesign(
        profile.name,
        speed,
        crit.speed_unit,
        length_unit,
        step,
        tuple(curves),
        designed,
        crit.name,
        (
            "Lengths are sized with the closed forms for a symmetric parabola, the "
            "stopping sight distance corrected for the steeper adjacent grade as a "
            "downgrade; check them with the review's exact sight distance and against "
            "the governing agency's standards.",
            "The design does not replace the responsible engineer's judgment.",
        ),
    )
