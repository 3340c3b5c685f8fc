"""Text and JSON reports of the review (and later the cross-check).

Renderers only: they format records computed by :mod:`converter.review`;
numbers are formatted by :mod:`converter.labels`.
"""

from __future__ import annotations

import math
from typing import Any

from converter import labels
from converter.review import Review
from converter.selection import AlignmentContext

__all__ = ["review_payload", "review_text"]


_SPEED = {"mph": "mph", "kmh": "km/h"}


def _num(value: float, decimals: int = 2) -> str:
    if value is None or (isinstance(value, float) and math.isinf(value)):
        return "-"
    return f"{value:.{decimals}f}"


def review_summary(rev: Review) -> str:
    """The first line: what failed, out of how much."""
    failed_curves = sum(c.failed for c in rev.curves)
    ranges = len(rev.deficiencies)
    checks = sum(len(c.checks) for c in rev.curves)
    if not rev.failed:
        return (f"PASS: all {checks} checks on {len(rev.curves)} vertical curves pass and sight "
                "distance is available everywhere")
    return (f"FAIL: {failed_curves} of {len(rev.curves)} vertical curves fail a check; "
            f"{ranges} station range{'s' if ranges != 1 else ''} lack sight distance")


def review_text(ctx: AlignmentContext, rev: Review) -> str:
    """A readable review: summary first, one table per curve, then failing ranges."""
    units = ctx.document.units
    lu = units.symbol
    st = ctx.stationing
    lines = [
        review_summary(rev),
        f"file {ctx.document.path}, alignment {ctx.alignment.name!r}, profile "
        f"{ctx.profile.name if ctx.profile else '-'!r}",
        f"design speed {rev.speed:g} {_SPEED.get(rev.speed_unit, rev.speed_unit)}; controls: {rev.criteria.name}; "
        f"stopping sight distance {rev.ssd:g} {lu} on level grade "
        f"(eye {rev.criteria.eye_height:g} {lu}, object {rev.criteria.object_height:g} {lu})",
        "",
    ]
    for cr in rev.curves:
        c = cr.curve
        lines.append(
            f"curve {cr.index}  {c.curve_type}  PVI {st.label(c.pvi_station)}  "
            f"A {labels.grade_text(c.grade_change)}  L {labels.length_text(c.length, units)} {lu}  "
            f"K {labels.k_text(c.k)}" + ("" if c.kind == "parabolic" else f"  ({c.kind})")
        )
        width = max(len(ch.name) for ch in cr.checks) if cr.checks else 10
        lines.append(f"  {'check':<{width}}  {'required':>10}  {'provided':>10}  {'margin':>10}  verdict")
        for ch in cr.checks:
            margin = ch.margin
            m = "-" if not math.isfinite(margin) else f"{margin:+.2f}"
            lines.append(f"  {ch.name:<{width}}  {_num(ch.required):>10}  {_num(ch.provided):>10}  "
                         f"{m:>10}  {ch.verdict.upper() if ch.verdict != 'pass' else 'pass'}"
                         + (f"  ({ch.note})" if ch.note else ""))
        lines.append("")
    step = rev.sight.stations[1] - rev.sight.stations[0] if len(rev.sight.stations) > 1 else 0
    lines.append(f"sight distance along the finished grade (every {step:g} {lu}, both directions):")
    if not rev.deficiencies:
        lines.append("  available everywhere")
    for d in rev.deficiencies:
        what = "stopping" if d.kind == "stopping" else "headlight"
        lines.append(
            f"  {what:<9} travelling {d.direction:<6} {st.label(d.start)} to {st.label(d.end)}: "
            f"available down to {d.available_min:.1f} {lu}, required {d.required:g} {lu}"
        )
    lines.append("")
    lines.extend(f"note: {n}" for n in rev.notes)
    lines.append(f"CAUTION: {labels.CAUTION}")
    return "\n".join(lines) + "\n"


def review_payload(ctx: AlignmentContext, rev: Review) -> dict[str, Any]:
    """The review as JSON-ready data (same content as the text)."""
    st = ctx.stationing

    def fin(v: float) -> float | None:
        return v if v is not None and math.isfinite(v) else None

    return {
        "summary": review_summary(rev),
        "failed": rev.failed,
        "file": ctx.document.path,
        "alignment": ctx.alignment.name,
        "profile": ctx.profile.name if ctx.profile else None,
        "design_speed": rev.speed,
        "speed_unit": rev.speed_unit,
        "criteria": rev.criteria.name,
        "stopping_sight_distance": rev.ssd,
        "curves": [
            {
                "number": cr.index,
                "pvi_station": cr.curve.pvi_station,
                "pvi_label": st.label(cr.curve.pvi_station),
                "type": cr.curve.curve_type,
                "kind": cr.curve.kind,
                "A": cr.curve.a_pct,
                "length": cr.curve.length,
                "K": cr.curve.k,
                "failed": cr.failed,
                "checks": [
                    {"name": ch.name, "required": fin(ch.required), "provided": fin(ch.provided),
                     "margin": fin(ch.margin), "unit": ch.unit, "verdict": ch.verdict,
                     "note": ch.note}
                    for ch in cr.checks
                ],
            }
            for cr in rev.curves
        ],
        "sight_distance_deficiencies": [
            {"kind": d.kind, "direction": d.direction, "start": d.start, "end": d.end,
             "start_label": st.label(d.start), "end_label": st.label(d.end),
             "available_min": d.available_min, "required": d.required}
            for d in rev.deficiencies
        ],
        "notes": list(rev.notes),
        "caution": labels.CAUTION,
    }
