"""Superelevation in words and JSON: the review's section, the proposal's report."""

from __future__ import annotations

import math
from typing import Any

from gradeline.analysis.superelevation import SuperReview, Transition
from gradeline.model.superelevation import Superelevation
from gradeline.solved import SolvedAlignment

__all__ = ["proposal_lines", "proposal_payload", "super_lines", "super_payload"]


def _rate(value: float | None) -> str:
    return "-" if value is None else f"{value:.1f} %"


def _value(v: float | None, unit: str, st) -> str:
    if v is None:
        return "-"
    if unit == "%":
        return f"{v:.1f} %"
    if unit == "station":
        return st.label(v)
    if unit == "share":
        return f"{100 * v:.0f} %"
    return f"{v:.1f} {unit}".rstrip()


def _curve_head(ctx: SolvedAlignment, number: int, c) -> str:
    st = ctx.stationing
    turn = "left" if c.delta > 0 else "right"
    kind = "spiral curve" if c.spiral_in > 0 or c.spiral_out > 0 else "simple curve"
    return (
        f"curve {number}  {kind}, {turn}  R {c.radius:.1f}  "
        f"{st.label(c.start_station)} to {st.label(c.end_station)}"
    )


def super_lines(ctx: SolvedAlignment, rev: SuperReview) -> list[str]:
    """The review's superelevation section, as lines of text."""
    st = ctx.stationing
    method = "open highway distribution" if rev.method == "open" else "low-speed urban street"
    lines = [
        f"superelevation (e max {100 * rev.e_max:g} %, {method}, normal crown "
        f"{100 * rev.normal_crown:g} %):"
    ]
    if not rev.curves:
        lines.append("  no horizontal curves")
    for cs in rev.curves:
        lines.append("  " + _curve_head(ctx, cs.number, cs.curve) + f"  needs {cs.required.label}")
        width = max(len(ch.what) for ch in cs.checks)
        for ch in cs.checks:
            verdict = "pass" if ch.verdict == "pass" else ch.verdict.upper()
            lines.append(
                f"    {ch.what:<{width}}  required {_value(ch.required, ch.unit, st):>12}  "
                f"provided {_value(ch.provided, ch.unit, st):>12}  {verdict}"
                + (f"  ({ch.note})" if ch.note else "")
            )
    for a, b in rev.overlaps:
        lines.append(
            f"  transitions overlap from {st.label(a)} to {st.label(b)} "
            f"({b - a:.1f} {ctx.document.units.symbol}): FAIL"
        )
    for r in rev.unmatched:
        lines.append(
            f"  a superelevation of {_rate(100 * r.rate)} at {_span(r, st)} lies on no "
            "horizontal curve"
        )
    lines.append("")
    return lines


def _span(r: Superelevation, st) -> str:
    a, b = r.first, r.last
    if a is None or b is None:
        return "unknown stations"
    return f"{st.label(a)} to {st.label(b)}"


def super_payload(ctx: SolvedAlignment, rev: SuperReview) -> dict[str, Any]:
    """The review's superelevation section as JSON-ready data."""
    st = ctx.stationing

    def fin(v: float | None) -> float | None:
        return v if v is not None and math.isfinite(v) else None

    return {
        "e_max": rev.e_max,
        "method": rev.method,
        "normal_crown": rev.normal_crown,
        "failed": rev.failed,
        "curves": [
            {
                "number": cs.number,
                "radius": cs.curve.radius,
                "turn": "left" if cs.curve.delta > 0 else "right",
                "start": cs.curve.start_station,
                "end": cs.curve.end_station,
                "start_label": st.label(cs.curve.start_station),
                "required_rate": cs.required.value,
                "required_label": cs.required.label,
                "computed_rate": cs.required.raw,
                "stated_rate": None if cs.record is None else cs.record.rate,
                "failed": cs.failed,
                "checks": [
                    {
                        "name": ch.what,
                        "required": fin(ch.required),
                        "provided": fin(ch.provided),
                        "unit": ch.unit,
                        "verdict": ch.verdict,
                        "note": ch.note,
                    }
                    for ch in cs.checks
                ],
            }
            for cs in rev.curves
        ],
        "overlaps": [{"start": a, "end": b} for a, b in rev.overlaps],
        "unmatched": [{"rate": r.rate, "start": r.first, "end": r.last} for r in rev.unmatched],
        "notes": list(rev.notes),
    }


def proposal_lines(
    ctx: SolvedAlignment, proposal: tuple[Transition, ...], header: str
) -> list[str]:
    """A proposed superelevation, curve by curve: rate, lengths and stations."""
    st = ctx.stationing
    lu = ctx.document.units.symbol
    lines = [header]
    for t in proposal:
        lines.append(_curve_head(ctx, t.number, t.curve) + f"  rate {t.rate.label}")
        if t.record is None:
            lines.append("  normal crown kept")
            continue
        lines.append(f"  runoff {t.runoff:.1f} {lu}, runout {t.runout:.1f} {lu}")
        for tag, s in t.record.stations():
            lines.append(f"    {tag:<17} {st.label(s)}")
        if t.note:
            lines.append(f"  note: {t.note}")
    return lines


def proposal_payload(ctx: SolvedAlignment, proposal: tuple[Transition, ...]) -> list[dict]:
    """The proposal as JSON-ready data."""
    return [
        {
            "number": t.number,
            "radius": t.curve.radius,
            "rate": t.rate.value,
            "label": t.rate.label,
            "computed_rate": t.rate.raw,
            "runoff": t.runoff,
            "runout": t.runout,
            "stations": {} if t.record is None else dict(t.record.stations()),
            "note": t.note,
        }
        for t in proposal
    ]
