"""Plan-set tables as text: the same rows as ``gradeline curves`` and ``table``.

Values come from :mod:`gradeline.present.tables` and are formatted by
:mod:`gradeline.present.labels` to the printed precision; the PDF only lays them out.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from gradeline.present import labels
from gradeline.present import tables as rows
from gradeline.solved import SolvedAlignment

__all__ = [
    "TextTable",
    "horizontal_curve_table",
    "station_table",
    "superelevation_table",
    "tangent_table",
    "vertical_curve_table",
]


@dataclass(frozen=True, slots=True)
class TextTable:
    """A titled table of text cells; ``widths`` are relative column widths."""

    title: str
    header: tuple[str, ...]
    rows: tuple[tuple[str, ...], ...]
    widths: tuple[float, ...]


def _len(value: float | None, ctx: SolvedAlignment) -> str:
    return (
        ""
        if value is None or not math.isfinite(value)
        else labels.length_text(value, ctx.document.units)
    )


def _sta(value: float | None, ctx: SolvedAlignment) -> str:
    return "" if value is None else ctx.stationing.label(value)


def _pct(value: float | None) -> str:
    return "" if value is None else labels.grade_text(value / 100.0)


def vertical_curve_table(ctx: SolvedAlignment) -> TextTable:
    """Vertical curve data: PVI, grades, A, L, K, BVC/EVC, high/low point."""
    out = []
    assert ctx.geometry is not None
    curves = ctx.geometry.curves
    for i, (c, r) in enumerate(zip(curves, rows.vertical_curve_rows(ctx), strict=True), start=1):
        turn = "HIGH" if r["type"] == "crest" else "LOW"
        kind = r["type"].upper()
        length = _len(r["length"], ctx)
        if c.kind == "unsymmetric":
            kind += f" {labels.UNSYMMETRICAL}"
            length = f"{_len(c.length_in, ctx)} + {_len(c.length_out, ctx)}"
        elif c.kind == "circular" and c.radius is not None:
            kind += f" R {_len(c.radius, ctx)}"
        out.append(
            (
                str(i),
                _sta(r["pvi_station"], ctx),
                _len(r["pvi_elevation"], ctx),
                _pct(r["grade_in"]),
                _pct(r["grade_out"]),
                _pct(r["A"]),
                length,
                labels.k_text(r["K"]),
                kind,
                _sta(r["bvc_station"], ctx),
                _len(r["bvc_elevation"], ctx),
                _sta(r["evc_station"], ctx),
                _len(r["evc_elevation"], ctx),
                (f"{turn} " + _sta(r["turning_station"], ctx))
                if r["turning_station"] is not None
                else "",
                _len(r["turning_elevation"], ctx),
            )
        )
    u = ctx.document.units.symbol
    return TextTable(
        f"VERTICAL CURVE DATA - {ctx.alignment.name}",
        (
            "NO.",
            "PVI STA",
            "PVI EL",
            "G1",
            "G2",
            "A",
            f"L OR L1 + L2 ({u})",
            "K",
            "TYPE",
            "BVC STA",
            "BVC EL",
            "EVC STA",
            "EVC EL",
            "HIGH/LOW PT",
            "EL",
        ),
        tuple(out),
        (0.5, 1.3, 1.0, 1.0, 1.0, 1.0, 1.0, 0.8, 0.8, 1.3, 1.0, 1.3, 1.0, 1.8, 1.0),
    )


def horizontal_curve_table(ctx: SolvedAlignment) -> TextTable:
    """Horizontal curve data: PI, R, D, Δ (total, arc, spirals), Ls, T or Ts, E or Es,
    L or Lc of the arc, chord and M of the arc, PC/PT or TS/SC/CS/ST."""
    units = ctx.document.units
    us = not units.metric
    out = []
    for c, r in zip(ctx.curves, rows.horizontal_curve_rows(ctx), strict=True):
        spirals = c.spiral_in > 0 or c.spiral_out > 0
        ang = labels.angle_text
        cells = [
            str(c.number),
            _sta(r["pi_station"], ctx),
            _len(r["pi_northing"], ctx),
            _len(r["pi_easting"], ctx),
            _len(r["radius"], ctx),
        ]
        if us:
            cells.append(labels.dms_text(math.radians(r["degree_of_curve"])))
        cells += [
            ang(c.delta, units) + (" LT" if c.delta > 0 else " RT"),
            ang(c.arc_delta, units) if spirals else "",
            f"{ang(c.spiral_in_delta, units)} / {ang(c.spiral_out_delta, units)}"
            if spirals
            else "",
            f"{_len(c.spiral_in, ctx)} / {_len(c.spiral_out, ctx)}" if spirals else "",
            ("Ts " if spirals else "")
            + labels.length_pair_text(c.tangent_in, c.tangent_out, units),
            _len(r["external"], ctx),
            _len(r["length"], ctx),
            _len(r["chord"], ctx),
            _len(r["middle_ordinate"], ctx),
            ("TS " if spirals and c.spiral_in else "PC ") + _sta(r["pc_station"], ctx),
            _sta(r["sc_station"], ctx),
            _sta(r["cs_station"], ctx),
            ("ST " if spirals and c.spiral_out else "PT ") + _sta(r["pt_station"], ctx),
        ]
        out.append(tuple(cells))
    u = units.symbol
    unit = {"grads": "GON", "radians": "RAD"}.get(units.angular, "DMS")
    header = ["NO.", "PI STA", "PI NORTHING", "PI EASTING", f"R ({u})"]
    if us:
        header.append("D (ARC)")
    header += [
        f"\u0394 TOTAL ({unit})",
        "\u0394c ARC",
        "\u0394s IN / OUT",
        "LS IN / OUT",
        "T OR Ts",
        "E OR Es",
        "L OR Lc (ARC)",
        "CHORD (ARC)",
        "M (ARC)",
        "PC / TS",
        "SC",
        "CS",
        "PT / ST",
    ]
    return TextTable(
        f"HORIZONTAL CURVE DATA - {ctx.alignment.name}",
        tuple(header),
        tuple(out),
        tuple(1.0 for _ in header),
    )


def tangent_table(ctx: SolvedAlignment) -> TextTable:
    """The tangents between curves: from and to (POB, PT/ST, PC/TS, POE), length and
    bearing, and the coordinates of the POB and the POE."""
    hz = ctx.horizontal
    assert hz is not None
    units = ctx.document.units
    ends = [(hz.start, "POB")]
    for c in ctx.curves:
        ends += [
            (c.start_station, "TS" if c.spiral_in else "PC"),
            (c.end_station, "ST" if c.spiral_out else "PT"),
        ]
    ends.append((hz.end, "POE"))
    out = []
    for (a, ta), (b, tb) in zip(ends[0::2], ends[1::2], strict=True):
        if b - a <= 1e-9:
            continue
        (na, nb), (ea, eb), (h, _) = ctx.plan_at([a, b])
        out.append(
            (
                f"{ta} {_sta(a, ctx)}",
                f"{_len(float(na), ctx)} / {_len(float(ea), ctx)}" if ta == "POB" else "",
                f"{tb} {_sta(b, ctx)}",
                f"{_len(float(nb), ctx)} / {_len(float(eb), ctx)}" if tb == "POE" else "",
                _len(b - a, ctx),
                labels.bearing_text(float(h), units),
            )
        )
    return TextTable(
        f"TANGENT DATA - {ctx.alignment.name}",
        ("FROM", "N / E", "TO", "N / E", f"LENGTH ({units.symbol})", "BEARING"),
        tuple(out),
        (1.0, 1.0, 1.0, 1.0, 1.0, 1.0),
    )


def superelevation_table(ctx: SolvedAlignment) -> TextTable:
    """The stated superelevation: each transition's curve, radius, full rate and the
    stations where it changes (NC normal crown, LC outside lane level, FS full)."""
    from gradeline.analysis.superelevation import curve_of_records

    records = list(ctx.alignment.superelevations)
    out = []
    for r, owner in zip(records, curve_of_records(ctx.curves, records), strict=True):
        i, c = owner if owner is not None else (None, None)
        out.append(
            (
                "" if i is None else str(i),
                "" if c is None else _len(c.radius, ctx),
                "" if c is None else ("L" if c.delta > 0 else "R"),
                f"{100 * r.rate:.1f} %",
                _sta(r.begin_runout, ctx),
                _sta(r.begin_runoff, ctx),
                _sta(r.full_super, ctx),
                _sta(r.end_full, ctx),
                _sta(r.end_runoff, ctx),
                _sta(r.end_runout, ctx),
            )
        )
    units = ctx.document.units
    return TextTable(
        f"SUPERELEVATION DATA - {ctx.alignment.name}",
        (
            "CURVE",
            f"R ({units.symbol})",
            "TURN",
            "FULL RATE",
            "NC",
            "LC",
            "FS BEGIN",
            "FS END",
            "LC",
            "NC",
        ),
        tuple(out),
        (0.6, 1.0, 0.5, 0.9, 1.0, 1.0, 1.0, 1.0, 1.0, 1.0),
    )


def station_table(ctx: SolvedAlignment, interval: float) -> TextTable:
    """Station/elevation table at ``interval`` plus key points (tangent, offset, grade)."""
    stations, tags = rows.table_stations(ctx, interval=interval)
    data = rows.station_rows(ctx, stations, tags)
    ground = _ground_at(ctx, np.asarray(stations))
    st = ctx.stationing
    equations = {eq.internal: labels.equation_text(*st.equation_labels(eq)) for eq in st.equations}
    out = []
    for s, r, eg in zip(stations, data, ground, strict=True):
        if not math.isfinite(r["elevation"]):
            continue
        eq_text = equations.get(float(s))
        if eq_text is not None:
            r = dict(r, point=r["point"].replace("EQUATION", eq_text))
        out.append(
            (
                r["station_label"],
                _len(r["tangent_elevation"], ctx),
                _len(r["offset"], ctx),
                _len(r["elevation"], ctx),
                _pct(r["grade"]),
                _len(eg, ctx),
                _len(r["elevation"] - eg, ctx) if math.isfinite(eg) else "",
                r["point"],
            )
        )
    return TextTable(
        f"FINISHED GRADE AT {labels.length_text(interval, ctx.document.units)} "
        f"{ctx.document.units.symbol} STATIONS - {ctx.alignment.name}",
        (
            "STATION",
            "TANGENT EL",
            "CURVE OFFSET",
            "FINISHED GRADE",
            "GRADE",
            "EXISTING GROUND",
            "FILL (+) / CUT (-)",
            "POINT",
        ),
        tuple(out),
        (1.3, 1.2, 1.2, 1.3, 1.0, 1.3, 1.3, 1.6),
    )


def plan_station_table(ctx: SolvedAlignment, interval: float) -> TextTable:
    """Coordinates and direction at ``interval`` plus key points (a plan-only alignment)."""
    stations, tags = rows.table_stations(ctx, interval=interval)
    data = rows.station_rows(ctx, stations, tags)
    out = [
        (
            r["station_label"],
            _len(r["northing"], ctx),
            _len(r["easting"], ctx),
            f"{r['direction']:.4f}" if math.isfinite(r["direction"]) else "",
            r["point"],
        )
        for r in data
        if math.isfinite(r["northing"])
    ]
    unit = ctx.document.units
    return TextTable(
        f"ALIGNMENT COORDINATES AT {labels.length_text(interval, unit)} {unit.symbol} STATIONS"
        f" - {ctx.alignment.name} (NO PROFILE IN THE FILE)",
        ("STATION", "NORTHING", "EASTING", f"DIRECTION ({unit.direction.upper()})", "POINT"),
        tuple(out),
        (1.3, 1.6, 1.6, 1.4, 1.6),
    )


def _ground_at(ctx: SolvedAlignment, stations: np.ndarray) -> np.ndarray:
    out = np.full(len(stations), np.nan)
    for pieces in ctx.ground_arrays[:1]:
        for s, z in pieces:
            inside = (stations >= s[0]) & (stations <= s[-1])
            out[inside] = np.interp(stations[inside], s, z)
    return out
