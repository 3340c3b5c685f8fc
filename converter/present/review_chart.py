"""The review as a picture: what the review page plots, computed once here.

A :class:`ReviewChart` holds, along the station, the finished grade, the
available sight distance (both directions, object and headlight) against the
required stopping sight distance, the ranges where it falls short, and the K
each vertical curve provides against the design K. The renderer
(:mod:`gradeline.sheets.review_page`) only draws it.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
from numpy.typing import NDArray

from gradeline.analysis.review import Review
from gradeline.present import labels
from gradeline.solved import SolvedAlignment

__all__ = ["CurveBar", "ReviewChart", "review_chart"]


@dataclass(frozen=True, slots=True)
class CurveBar:
    """One vertical curve: where, its K and the design K (None if no K check)."""

    number: int
    station: float
    label: str
    curve_type: str
    k: float | None
    k_required: float | None
    failed: bool


@dataclass(frozen=True)
class ReviewChart:
    """Everything the review page shows."""

    title: str
    subtitle: str
    summary: str
    length_unit: str
    stations: NDArray[np.float64]
    elevations: NDArray[np.float64]
    #: (name, values, dashed) of the available sight distances, capped at ``cap``
    available: tuple[tuple[str, NDArray[np.float64], bool], ...]
    required_ahead: NDArray[np.float64]
    required_behind: NDArray[np.float64]
    cap: float
    short: tuple[tuple[float, float, str], ...]  # (from, to, what) ranges lacking it
    curves: tuple[CurveBar, ...]
    station_ticks: tuple[tuple[float, str], ...]


def review_chart(solved: SolvedAlignment, rev: Review) -> ReviewChart | None:
    """The chart of a review (None without a profile)."""
    sd, geom = rev.sight, solved.geometry
    if sd is None or geom is None or rev.required is None:
        return None
    lu = solved.document.units.symbol
    st = solved.stationing
    req_a, req_b = rev.required
    cap = float(max(np.nanmax(req_a), np.nanmax(req_b)) * 1.6)
    available = (
        ("stopping, up-station", np.minimum(sd.ahead, cap), False),
        ("stopping, down-station", np.minimum(sd.behind, cap), False),
        ("headlight, up-station", np.minimum(sd.headlight_ahead, cap), True),
        ("headlight, down-station", np.minimum(sd.headlight_behind, cap), True),
    )
    short = tuple(
        (
            d.start,
            d.end,
            f"{d.kind} {'up' if d.direction == 'ahead' else 'down'}-station: "
            f"{d.available_min:.0f} of {d.required:.0f} {lu}",
        )
        for d in rev.deficiencies
    )
    bars = []
    for cr in rev.curves:
        kcheck = next((c for c in cr.checks if c.name.startswith("design K")), None)
        c = cr.curve
        bars.append(
            CurveBar(
                cr.index,
                c.pvi_station,
                st.label(c.pvi_station),
                c.curve_type,
                c.k if c.k is not None and math.isfinite(c.k) else None,
                kcheck.required if kcheck is not None else None,
                cr.failed,
            )
        )
    step = _tick_step(float(sd.stations[-1] - sd.stations[0]))
    first = math.ceil(float(sd.stations[0]) / step) * step
    ticks = tuple(
        (float(s), st.label(float(s)))
        for s in np.arange(first, float(sd.stations[-1]) + 1e-9, step)
    )
    speed = f"{rev.speed:g} {labels.speed_unit_text(rev.speed_unit)}"
    verdict = "FAILS" if rev.failed else "passes"
    return ReviewChart(
        title=f"Design-control review: {solved.alignment.name}",
        subtitle=(
            f"profile {solved.profile.name if solved.profile else ''!r}, design speed {speed}, "
            f"{rev.criteria.name}; stopping sight distance {rev.ssd:g} {lu} on level grade"
        ),
        summary=f"The review {verdict}: {len(short)} station ranges lack sight distance, "
        f"{sum(b.failed for b in bars)} of {len(bars)} vertical curves fail a check, "
        f"{sum(ch.verdict == 'fail' for _, ch in rev.radius_checks)} of "
        f"{len(rev.radius_checks)} horizontal curves are below the minimum radius.",
        length_unit=lu,
        stations=sd.stations,
        elevations=np.asarray(solved.elevation(sd.stations), dtype=float),
        available=available,
        required_ahead=req_a,
        required_behind=req_b,
        cap=cap,
        short=short,
        curves=tuple(bars),
        station_ticks=ticks,
    )


def _tick_step(span: float) -> float:
    """A round station step giving about 6 to 12 ticks."""
    for step in (100.0, 200.0, 500.0, 1000.0, 2000.0, 5000.0, 10000.0, 20000.0, 50000.0):
        if span / step <= 12:
            return step
    return 10.0 ** math.ceil(math.log10(max(span, 1.0) / 10))
