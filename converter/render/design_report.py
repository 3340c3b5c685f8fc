"""The design report of ``gradeline design``: text and JSON of a :class:`ProfileDesign`."""

from __future__ import annotations

from typing import Any

from gradeline.analysis.design import CurveDesign, ProfileDesign
from gradeline.present import labels

__all__ = ["design_payload", "design_text"]

#: What each status says in the report.
STATUS_TEXT = {
    "designed": "sized for every control",
    "shortened": "shortened to fit, still meets every control",
    "unsymmetrical": "unsymmetrical to fit",
    "short": "DOES NOT FIT: misses controls",
    "no curve": "no grade change",
}


def _station(s: float, label) -> str:
    return label(s) if label is not None else f"{s:.2f}"


def design_text(design: ProfileDesign, station_label=None, source: str = "") -> str:
    """The report as text, one block per PVI."""
    lu = design.length_unit
    speed_unit = labels.speed_unit_text(design.speed_unit)
    out = [
        f"Vertical curve design: profile {design.name!r}" + (f" of {source}" if source else ""),
        f"design speed {design.speed:g} {speed_unit}; controls: {design.criteria}; "
        f"lengths rounded up to {design.step:g} {lu}",
        "",
    ]
    short = [c for c in design.curves if c.status == "short"]
    out.append(
        "Result: every curve meets every control"
        if not short
        else f"Result: {len(short)} curve{'s' if len(short) != 1 else ''} cannot meet "
        "the controls where the PVIs are (see below)"
    )
    out.append("")
    for c in design.curves:
        out += _curve_lines(design, c, station_label)
        out.append("")
    out += [f"Note: {n}" for n in design.notes]
    out.append(labels.CAUTION)
    return "\n".join(out) + "\n"


def _curve_lines(design: ProfileDesign, c: CurveDesign, station_label) -> list[str]:
    lu = design.length_unit
    head = (
        f"PVI {c.index} at {_station(c.station, station_label)}, elevation "
        f"{c.elevation:.2f}: grades {100 * c.grade_in:+.3f} % -> {100 * c.grade_out:+.3f} %, "
        f"A = {c.a_pct:+.3f} % ({c.curve_type})"
    )
    lines = [head]
    if c.status == "no curve":
        lines.append("  no curve (no grade change)")
        return lines
    for ctl in c.controls:
        mark = " <- governs" if ctl.name == c.governing else ""
        if not ctl.at_most and ctl.length <= 0:
            lines.append(f"  {ctl.name}: {ctl.formula} is not positive: needs no length")
            continue
        word = "at most" if ctl.at_most else "at least"
        lines.append(f"  {ctl.name}: {ctl.formula}: L {word} {ctl.length:.2f} {lu}{mark}")
    if c.symmetric:
        chosen = f"L = {c.length:g} {lu}"
    else:
        chosen = f"L1 = {c.length_in:g}, L2 = {c.length_out:g} {lu} (L = {c.length:g})"
    k = f", K = {c.k:.1f}" if c.k is not None else ""
    lines.append(f"  chosen: {chosen}{k} ({STATUS_TEXT[c.status]})")
    if c.was is not None:
        lines.append(f"  the input had L = {c.was:g} {lu}")
    lines += [f"  {n}" for n in c.notes]
    return lines


def design_payload(design: ProfileDesign, station_label=None, source: str = "") -> dict[str, Any]:
    """The report as a JSON-ready dictionary."""

    def r(x: float, nd: int = 4) -> float | None:
        return None if x is None else round(float(x), nd) + 0.0

    return {
        "profile": design.name,
        "source": source,
        "design_speed": design.speed,
        "speed_unit": design.speed_unit,
        "length_unit": design.length_unit,
        "rounding_step": design.step,
        "criteria": design.criteria,
        "complete": design.complete,
        "curves": [
            {
                "pvi": c.index,
                "station": r(c.station),
                "station_label": _station(c.station, station_label),
                "elevation": r(c.elevation),
                "grade_in_pct": r(100 * c.grade_in, 6),
                "grade_out_pct": r(100 * c.grade_out, 6),
                "a_pct": r(c.a_pct, 6),
                "type": c.curve_type,
                "controls": [
                    {
                        "name": ctl.name,
                        "formula": ctl.formula,
                        "length": r(ctl.length),
                        "limit": "maximum" if ctl.at_most else "minimum",
                    }
                    for ctl in c.controls
                ],
                "governing": c.governing or None,
                "required_length": r(c.required),
                "length_in": r(c.length_in),
                "length_out": r(c.length_out),
                "length": r(c.length),
                "k": None if c.k is None else r(c.k, 3),
                "status": c.status,
                "input_length": None if c.was is None else r(c.was),
                "notes": list(c.notes),
            }
            for c in design.curves
        ],
        "notes": list(design.notes) + [labels.CAUTION],
    }
