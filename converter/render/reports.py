"""Text and JSON reports of the review (and later the cross-check).

Renderers only: they format records computed by :mod:`gradeline.analysis.review`;
numbers are formatted by :mod:`gradeline.present.labels`.
"""

from __future__ import annotations

import math
from typing import Any

from gradeline.analysis.review import Review
from gradeline.present import labels
from gradeline.render.outputs import input_name
from gradeline.solved import SolvedAlignment

__all__ = ["review_payload", "review_text"]


def _num(value: float, decimals: int = 2) -> str:
    if value is None or (isinstance(value, float) and math.isinf(value)):
        return "-"
    return f"{value:.{decimals}f}"


def _signed(value: float, decimals: int) -> str:
    """``+1.25`` / ``-0.40``; a value that rounds to zero prints ``+0.00``, never ``-0.00``."""
    text = f"{value:+.{decimals}f}"
    return "+" + text[1:] if float(text) == 0 else text


def _elements(ctx: SolvedAlignment, start: float, end: float) -> str:
    """The CoordGeom elements (numbered as the check numbers them) from ``start`` to ``end``."""
    hz = ctx.horizontal
    if hz is None:
        return ""
    nums = sorted(
        {g.index + 1 for g in hz.elements if start - 1e-6 <= g.start_station < end - 1e-6}
    )
    if not nums:
        return ""
    return f"element {nums[0]}" if len(nums) == 1 else f"elements {nums[0]} to {nums[-1]}"


#: What the two cases of the sight-distance formulas mean, printed under the review's header.
SIGHT_CASES = (
    "S < L: the sight line ends on the curve (L = A S^2 / C); S > L: it reaches past the "
    "curve onto the tangents (L = 2 S - C / A). A check whose formula gives no length "
    "(small A) is met by the grades alone and shows 'none'."
)


def review_summary(rev: Review) -> str:
    """The first line: what failed, out of how much."""
    sup = rev.superelevation
    sup_checks = sum(ch.verdict != "n/a" for cs in sup.curves for ch in cs.checks) if sup else 0
    return labels.review_headline(
        failed=rev.failed,
        checks=sum(len(c.checks) for c in rev.curves) + len(rev.radius_checks) + sup_checks,
        vertical_curves=len(rev.curves),
        failed_curves=sum(c.failed for c in rev.curves),
        horizontal_curves=len(rev.radius_checks),
        short_radii=sum(ch.verdict == "fail" for _, ch in rev.radius_checks),
        short_ranges=len(rev.deficiencies),
        profile=rev.sight is not None,
        super_failed=sum(cs.failed for cs in sup.curves) + len(sup.overlaps) if sup else 0,
    )


def review_text(ctx: SolvedAlignment, rev: Review) -> str:
    """A readable review: summary first, one table per curve, then failing ranges."""
    units = ctx.document.units
    lu = units.symbol
    st = ctx.stationing
    lines = [
        review_summary(rev),
        f"file {input_name(ctx.document.path)}, alignment {ctx.alignment.name!r}, profile "
        f"{ctx.profile.name if ctx.profile else '-'!r}",
        f"design speed {rev.speed:g} {labels.speed_unit_text(rev.speed_unit)}; "
        f"controls: {rev.criteria.name}; "
        f"stopping sight distance {rev.ssd:g} {lu} on level grade "
        f"(eye {rev.criteria.eye_height:g} {lu}, object {rev.criteria.object_height:g} {lu})",
        SIGHT_CASES,
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
        lines.append(
            f"  {'check':<{width}}  {'required':>10}  {'provided':>10}  {'margin':>10}  verdict"
        )
        for ch in cr.checks:
            margin = ch.margin
            m = "-" if not math.isfinite(margin) else _signed(margin, 2)
            required = _num(ch.required)
            if not ch.at_most and ch.required <= 0:
                required, m = "none", "-"
            lines.append(
                f"  {ch.name:<{width}}  {required:>10}  {_num(ch.provided):>10}  "
                f"{m:>10}  {ch.verdict.upper() if ch.verdict != 'pass' else 'pass'}"
                + (f"  ({ch.note})" if ch.note else "")
            )
        lines.append("")
    if rev.radius_checks:
        lines.append("horizontal curves:")
        ends = {c.start_station: c.end_station for c in ctx.curves}
        for i, (station, ch) in enumerate(rev.radius_checks, start=1):
            span = _elements(ctx, station, ends.get(station, station + 1e-3))
            lines.append(
                f"  curve {i}{f' (CoordGeom {span})' if span else ''} at {st.label(station)}: "
                f"{ch.name}: required R {ch.required:.1f} "
                f"{lu}, provided {ch.provided:.1f} {lu}, margin {_signed(ch.margin, 1)}  "
                f"{'pass' if ch.verdict == 'pass' else ch.verdict.upper()}"
            )
        lines.append("")
    if rev.superelevation is not None:
        from gradeline.render.super_report import super_lines

        lines.extend(super_lines(ctx, rev.superelevation))
    if rev.sight is None:
        lines.append("sight distance: not reviewed (no profile)")
    else:
        sd = rev.sight.stations
        step = sd[1] - sd[0] if len(sd) > 1 else 0
        lines.append(
            f"sight distance along the finished grade (every {step:g} {lu}, both directions):"
        )
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
    if rev.superelevation is not None:
        lines.extend(f"note: {n}" for n in rev.superelevation.notes)
    lines.append(f"CAUTION: {labels.CAUTION}")
    return "\n".join(lines) + "\n"


def review_payload(ctx: SolvedAlignment, rev: Review) -> dict[str, Any]:
    """The review as JSON-ready data (same content as the text)."""
    st = ctx.stationing

    def fin(v: float) -> float | None:
        return v if v is not None and math.isfinite(v) else None

    return {
        "summary": review_summary(rev),
        "failed": rev.failed,
        "file": input_name(ctx.document.path),
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
                    {
                        "name": ch.name,
                        "required": fin(ch.required),
                        "provided": fin(ch.provided),
                        "margin": fin(ch.margin),
                        "unit": ch.unit,
                        "verdict": ch.verdict,
                        "note": ch.note,
                    }
                    for ch in cr.checks
                ],
            }
            for cr in rev.curves
        ],
        "sight_distance_deficiencies": [
            {
                "kind": d.kind,
                "direction": d.direction,
                "start": d.start,
                "end": d.end,
                "start_label": st.label(d.start),
                "end_label": st.label(d.end),
                "available_min": d.available_min,
                "required": d.required,
            }
            for d in rev.deficiencies
        ],
        "horizontal_curves": [
            {
                "number": i,
                "coordgeom_elements": _elements(
                    ctx, s, {c.start_station: c.end_station for c in ctx.curves}.get(s, s + 1e-3)
                ),
                "pc_station": s,
                "pc_label": st.label(s),
                "name": ch.name,
                "required_radius": ch.required,
                "radius": ch.provided,
                "margin": ch.margin,
                "verdict": ch.verdict,
            }
            for i, (s, ch) in enumerate(rev.radius_checks, start=1)
        ],
        "superelevation": None if rev.superelevation is None else _super(ctx, rev),
        "notes": list(rev.notes),
        "caution": labels.CAUTION,
    }


def _super(ctx: SolvedAlignment, rev: Review) -> dict[str, Any]:
    from gradeline.render.super_report import super_payload

    return super_payload(ctx, rev.superelevation)


# --------------------------------------------------------------------------- check
def _val(v: float | None, unit: str = "") -> str:
    if v is None:
        return "-"
    return f"{v:.4f}" if unit not in ("decimal dd.mm.ss",) else f"{v:.6f}"


def check_summary(findings, drawings=()) -> str:
    """The first line: findings over tolerance out of all checks."""
    over, total = check_counts(findings, drawings)
    return labels.check_headline(over, total)


def check_counts(findings, drawings=()) -> tuple[int, int]:
    """(over tolerance, comparisons made): notes that compare nothing are not checks."""
    over = sum(f.verdict == "over" for f in findings)
    total = sum(f.verdict in ("ok", "over") for f in findings)
    for d in drawings:
        o, t = d.counts()
        over += o
        total += t
    return over, total


def check_text(doc, findings, drawings, tol, drawing_stationing=None) -> str:
    """Readable cross-check report grouped by alignment and element; summary first.

    ``drawing_stationing`` labels the stations of the drawing audits (the checked
    alignment's, with its equations).
    """
    units = doc.units
    lines = [
        check_summary(findings, drawings),
        f"file {input_name(doc.path)}; tolerances: {tol.distance:g} {units.symbol} for distances, "
        f'{math.degrees(tol.angle) * 3600:g}" for angles',
        "",
    ]
    from gradeline.geometry.stations import Stationing

    current = None
    stationing = Stationing(units)
    for f in findings:
        if f.alignment != current:
            current = f.alignment
            al = next((a for a in doc.alignments if a.name == current), None)
            stationing = Stationing(units, al.equations if al else ())
            lines.append(f"alignment {current!r}")
        where = f.element + (f" {f.index}" if f.index is not None else "")
        if f.station is not None:
            where += f" at {stationing.label(f.station)}"
        if f.source is not None and f.source.line is not None:
            where += f" (line {f.source.line})"
        verdict = {"over": "OVER", "ok": "ok", "info": "info"}[f.verdict]
        if f.miss:
            body = f"{f.quantity}: off by {f.stated:.4f}" + (f" {f.unit}" if f.unit else "")
        elif f.stated is not None and f.computed is not None:
            body = (
                f"{f.quantity}: stated {_val(f.stated, f.unit)}, "
                f"computed {_val(f.computed, f.unit)}, "
                f"difference {_signed(f.difference, 4)}" + (f" {f.unit}" if f.unit else "")
            )
        else:
            body = f"{f.quantity}: {f.message}"
        note = (
            f" ({f.message})"
            if f.message and f.stated is not None and f.computed is not None and not f.miss
            else ""
        )
        lines.append(f"  {verdict:<4}  {where}: {body}{note}")
    for d in drawings:
        lines += _drawing_lines(d, tol, units, drawing_stationing or stationing)
    lines += ["", f"CAUTION: {labels.CAUTION}"]
    return "\n".join(lines) + "\n"


def check_payload(doc, findings, drawings, tol) -> dict[str, Any]:
    """The cross-check as JSON-ready data."""
    out: dict[str, Any] = {
        "summary": check_summary(findings, drawings),
        "file": input_name(doc.path),
        "tolerance": tol.distance,
        "angle_tolerance_seconds": math.degrees(tol.angle) * 3600,
        "findings": [
            {
                "alignment": f.alignment,
                "element": f.element,
                "index": f.index,
                "station": f.station,
                "quantity": f.quantity,
                "stated": f.stated,
                "computed": f.computed,
                "difference": f.difference,
                "unit": f.unit,
                "verdict": f.verdict,
                "message": f.message,
                "measures": "distance between stated and computed"
                if f.miss
                else "stated - computed",
                "line": f.source.line if f.source else None,
            }
            for f in findings
        ],
        "caution": labels.CAUTION,
    }
    out["drawings"] = [_drawing_payload(d) for d in drawings]
    return out


def _drawing_lines(d, tol, units, stationing) -> list[str]:
    """The text report of one drawing audit."""
    u = units.symbol
    lab = stationing.label if stationing is not None else (lambda s: f"{s:.3f}")
    lines = ["", f"drawing {d.name} ({d.kind}): {d.units_note}"]
    if d.profile is not None:
        p = d.profile
        lines += [
            f"  profile linework, layer {d.layer!r}: x = station, y = (elevation - "
            f"{p.datum:.4f}) x {p.exaggeration:.6g} ({p.mapping_from})",
        ]
        lines += _deviation_lines(p, "deviation from the computed grade", tol, u, lab, False)
    if d.plan is not None:
        p = d.plan
        fit = f", RMS {p.rms_fit:.4f} {u}" if p.rms_fit is not None else ""
        lines += [
            f"  plan linework, layer {d.layer!r}: {p.transform.text()}{fit}",
        ]
        lines += _deviation_lines(
            p, "lateral deviation from the computed alignment", tol, u, lab, True
        )
        for f in p.pieces:
            what = (
                f"arc drawn with R {f.drawn:.4f}, computed {f.computed:.4f} {u}"
                if f.what == "radius"
                else f"{f.what} (drawn R {f.drawn:.4f} {u})"
            )
            lines.append(f"  OVER  {f.element}, {lab(f.start)} to {lab(f.end)}: {what}")
        if p.beyond:
            lines.append(f"  note  {p.beyond} samples lie beyond the alignment's ends")
    for reason, n in sorted(d.skipped.items()):
        lines.append(f"  note  {n} skipped: {reason}")
    lines += _label_lines(d.labels, lab)
    return lines


def _deviation_lines(p, what: str, tol, u: str, lab, sided: bool) -> list[str]:
    """Samples, worst and mean deviation, ranges over tolerance and gaps of a linework check."""
    lines = [
        f"  {p.samples} samples; {what}: max {p.max_deviation:.4f} {u} at "
        f"{lab(p.worst_station)}, mean {p.mean_deviation:.4f} {u}"
    ]
    if not p.over:
        lines.append(f"  ok    within {tol.distance:g} {u} everywhere it is drawn")
    for a, b, w in p.over:
        side = (" (right)" if w > 0 else " (left)") if sided else ""
        lines.append(f"  OVER  {lab(a)} to {lab(b)}: off by up to {_signed(w, 4)} {u}{side}")
    for a, b in p.uncovered:
        lines.append(f"  OVER  {lab(a)} to {lab(b)}: not covered by the drawing")
    return lines


def _linework_payload(p) -> dict[str, Any]:
    """The fields profile and plan linework checks share, for JSON."""
    return {
        "samples": p.samples,
        "max_deviation": p.max_deviation,
        "mean_deviation": p.mean_deviation,
        "worst_station": p.worst_station,
        "over_tolerance": [{"start": a, "end": b, "worst": w} for a, b, w in p.over],
        "not_covered": [{"start": a, "end": b} for a, b in p.uncovered],
    }


def _label_lines(checks, lab) -> list[str]:
    if not checks:
        return ["  labels: no text states a value"]
    ok = sum(c.verdict == "ok" for c in checks)
    over = [c for c in checks if c.verdict == "over"]
    other = [c for c in checks if c.verdict in ("unread", "untied")]
    lines = [
        f"  labels: {ok + len(over)} stated values compared, {ok} agree, {len(over)} OVER; "
        f"{len(other)} not read or not tied"
    ]
    for c in over:
        where = f" at {lab(c.station)}" if c.station is not None else ""
        unit = f" {c.unit}" if c.unit else ""
        if c.stated is None:
            body = c.note
        else:
            body = (
                f"stated {c.stated:.6g}, computed {c.computed:.6g}, difference "
                f"{_signed(c.difference, 4)}{unit}" + (f" ({c.note})" if c.note else "")
            )
        lines.append(
            f"  OVER  {c.quantity} of {c.feature}{where}: {body}  [{c.text!r} at "
            f"{c.x:.2f}, {c.y:.2f}, layer {c.layer}]"
        )
    for c in other:
        lines.append(f"  {c.verdict:<6} {c.text!r} at {c.x:.2f}, {c.y:.2f}: {c.note}")
    return lines


def _drawing_payload(d) -> dict[str, Any]:
    out: dict[str, Any] = {"file": d.name, "kind": d.kind, "layer": d.layer, "units": d.units_note}
    if d.profile is not None:
        p = d.profile
        out["linework"] = {
            "exaggeration": p.exaggeration,
            "datum": p.datum,
            "mapping": p.mapping_from,
            **_linework_payload(p),
        }
    if d.plan is not None:
        p = d.plan
        t = p.transform
        out["linework"] = {
            "transform": {
                "dx": t.dx,
                "dy": t.dy,
                "rotation_degrees": math.degrees(t.angle),
                "scale": t.scale,
                "how": t.how,
                "rms": p.rms_fit,
            },
            **_linework_payload(p),
            "beyond_ends": p.beyond,
            "pieces": [
                {
                    "start": f.start,
                    "end": f.end,
                    "finding": f.what,
                    "drawn_radius": f.drawn,
                    "computed_radius": f.computed,
                    "element": f.element,
                    "handle": f.handle,
                }
                for f in p.pieces
            ],
        }
    out["skipped"] = dict(d.skipped)
    out["labels"] = [
        {
            "text": c.text,
            "x": c.x,
            "y": c.y,
            "layer": c.layer,
            "handle": c.handle,
            "quantity": c.quantity,
            "feature": c.feature,
            "station": c.station,
            "stated": c.stated,
            "computed": c.computed,
            "difference": c.difference,
            "unit": c.unit,
            "verdict": c.verdict,
            "note": c.note,
        }
        for c in d.labels
    ]
    return out
