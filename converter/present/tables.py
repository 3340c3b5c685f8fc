"""Table rows for ``table`` and ``curves``: plain records, no formatting.

Renderers (CSV/JSON writers, PDF tables) take these rows as they are; values
are floats in file units, grades in percent, angles in the file's units, and
text labels made by :mod:`gradeline.present.labels` and :mod:`gradeline.geometry.stations`.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from typing import Any

import numpy as np
from numpy.typing import ArrayLike, NDArray

from gradeline.geometry.vertical import JOIN_TOLERANCE
from gradeline.model.units import angle_to_unit
from gradeline.solved import SolvedAlignment

__all__ = [
    "CURVE_COLUMNS",
    "STATION_COLUMNS",
    "SUPER_COLUMNS",
    "SUPER_CURVE_COLUMNS",
    "curve_rows",
    "station_rows",
    "table_stations",
]

STATION_COLUMNS = (
    "station",
    "station_label",
    "elevation",
    "grade",
    "tangent_elevation",
    "offset",
    "northing",
    "easting",
    "direction",
    "point",
)

CURVE_COLUMNS = (
    "kind",
    # vertical curves
    "pvi_station",
    "pvi_elevation",
    "grade_in",
    "grade_out",
    "A",
    "length",
    "K",
    "type",
    "bvc_station",
    "bvc_elevation",
    "evc_station",
    "evc_elevation",
    "turning_station",
    "turning_elevation",
    "length_in",
    "length_out",
    "radius",
    "middle_ordinate",
    # horizontal curves
    "pi_station",
    "pi_northing",
    "pi_easting",
    "delta",
    "tangent",
    "tangent_out",
    "chord",
    "external",
    "degree_of_curve",
    "turn",
    "pc_station",
    "pt_station",
    "sc_station",
    "cs_station",
    "spiral_in",
    "spiral_out",
    "spiral_type",
    # labels
    "pvi_label",
    "bvc_label",
    "evc_label",
    "pi_label",
    "pc_label",
    "pt_label",
)

Row = dict[str, Any]

_TEXT_COLUMNS = frozenset({"kind", "type", "turn", "spiral_type", "point", "surface"})
_PERCENT_COLUMNS = frozenset(
    {"grade", "grade_in", "grade_out", "A", "super_left", "super_right", "super_rate"}
)

#: Cross slopes of the station table where the alignment states superelevation:
#: percent, each lane measured outward from the centreline (negative falls away).
SUPER_COLUMNS = ("super_left", "super_right")
#: Superelevation of each horizontal curve in the curve table (rate in percent).
SUPER_CURVE_COLUMNS = ("super_rate", "runout_in", "runoff_in", "runoff_out", "runout_out")
#: The point tag of each superelevation station in the station table: normal crown,
#: level outside lane, full superelevation (common abbreviations of the trade).
SUPER_TAGS = {
    "BeginRunoutSta": "NC",
    "BeginRunoffSta": "LC",
    "FullSuperSta": "FS",
    "RunoffSta": "FS",
    "StartofRunoutSta": "LC",
    "EndofRunoutSta": "NC",
}


def column_units(columns: Sequence[str], units) -> dict[str, str | None]:
    """The unit of each column, for the JSON ``units`` block (None for text columns).

    Examples
    --------
    >>> from gradeline.model.units import Units
    >>> column_units(["station", "grade", "K", "point"], Units("foot"))
    {'station': 'foot', 'grade': 'percent', 'K': 'foot per percent', 'point': None}
    """
    out: dict[str, str | None] = {}
    for c in columns:
        if c in _TEXT_COLUMNS or c.endswith("_label"):
            out[c] = None
        elif c in _PERCENT_COLUMNS:
            out[c] = "percent"
        elif c == "K":
            out[c] = f"{units.linear} per percent"
        elif c == "delta":
            out[c] = units.angular
        elif c == "direction":
            out[c] = units.direction
        elif c == "degree_of_curve":
            out[c] = "decimal degrees per 100 foot of arc"
        else:
            out[c] = units.linear
    return out


#: Decimals of exported numbers (CSV and JSON tables), by quantity: lengths,
#: stations, elevations and coordinates 4 (0.0001 ft or m); grades in percent 6;
#: K 3; angles and directions 6 (decimal degrees: 0.004"). Documented in README.
DECIMALS = {"length": 4, "percent": 6, "K": 3, "angle": 6}


def column_decimals(columns: Sequence[str], units) -> dict[str, int | None]:
    """Decimals each column is rounded to on export (None for text columns).

    Examples
    --------
    >>> from gradeline.model.units import Units
    >>> column_decimals(["station", "grade", "K", "delta", "point"], Units("foot"))
    {'station': 4, 'grade': 6, 'K': 3, 'delta': 6, 'point': None}
    """
    out: dict[str, int | None] = {}
    for c, unit in column_units(columns, units).items():
        if unit is None:
            out[c] = None
        elif unit == "percent":
            out[c] = DECIMALS["percent"]
        elif c == "K":
            out[c] = DECIMALS["K"]
        elif c in ("delta", "direction", "degree_of_curve"):
            out[c] = DECIMALS["angle"]
        else:
            out[c] = DECIMALS["length"]
    return out


def table_stations(
    ctx: SolvedAlignment,
    interval: float | None = None,
    at: ArrayLike | None = None,
) -> tuple[NDArray[np.float64], list[str]]:
    """Stations of a station table and the key-point tags of each.

    With ``interval`` the rows are every labelled multiple of it plus every key
    point; with ``at`` they are exactly the given internal stations, tagged
    where they hit a key point.
    """
    keys = [(k.station, k.text) for k in ctx.key_points]
    if at is None and ctx.alignment.superelevations:
        # the stations a stated superelevation names are rows too (tags joined
        # where one meets a key point)
        for s, t in zip(*super_stations(ctx), strict=True):
            hit = next((i for i, (k, _) in enumerate(keys) if abs(k - s) <= JOIN_TOLERANCE), None)
            if hit is None:
                keys.append((s, t))
            elif t not in keys[hit][1].split(";"):
                keys[hit] = (keys[hit][0], f"{keys[hit][1]};{t}" if keys[hit][1] else t)
        keys.sort()
    key_st = np.array([k for k, _ in keys])
    if at is not None:
        stations = np.asarray(at, dtype=np.float64).reshape(-1)
    else:
        assert interval is not None
        regular = ctx.stationing.round_stations(interval, ctx.start, ctx.end)
        # a regular station within rounding of a key point gives way to it
        if len(key_st):
            j = np.clip(np.searchsorted(key_st, regular), 1, len(key_st)) - 1
            near = np.minimum(
                np.abs(key_st[j] - regular),
                np.abs(key_st[np.minimum(j + 1, len(key_st) - 1)] - regular),
            )
            regular = regular[near > JOIN_TOLERANCE]
        stations = np.union1d(regular, key_st)
    tags = []
    for s in stations:
        if len(key_st):
            i = int(np.argmin(np.abs(key_st - s)))
            tags.append(keys[i][1] if abs(key_st[i] - s) <= JOIN_TOLERANCE else "")
        else:
            tags.append("")
    return stations, tags


def station_rows(
    ctx: SolvedAlignment,
    stations: ArrayLike,
    tags: Sequence[str] | None = None,
) -> list[Row]:
    """One row per station with the columns of :data:`STATION_COLUMNS`."""
    s = np.asarray(stations, dtype=np.float64).reshape(-1)
    nan = np.full(len(s), np.nan)
    if ctx.geometry is not None:
        z, g = ctx.profile_at(s)
        tz = ctx.tangent_elevation(s)
    else:
        z, g, tz = nan, nan, nan
    if ctx.horizontal is not None:
        n, e, h = ctx.plan_at(s)
        d = ctx.direction(h)
    else:
        n, e, d = nan, nan, nan
    labels = ctx.stationing.labels(s)
    rows = []
    for i in range(len(s)):
        rows.append(
            {
                "station": float(s[i]),
                "station_label": labels[i],
                "elevation": float(z[i]),
                "grade": 100.0 * float(g[i]),
                "tangent_elevation": float(tz[i]),
                "offset": float(z[i] - tz[i]),
                "northing": float(n[i]),
                "easting": float(e[i]),
                "direction": float(d[i]),
                "point": tags[i] if tags is not None else "",
            }
        )
    return rows


def vertical_curve_rows(ctx: SolvedAlignment) -> list[Row]:
    """One row per vertical curve."""
    rows: list[Row] = []
    if ctx.geometry is None:
        return rows
    label = ctx.stationing.label
    for c in ctx.geometry.curves:
        row: Row = dict.fromkeys(CURVE_COLUMNS)
        row.update(
            kind="vertical",
            pvi_station=c.pvi_station,
            pvi_elevation=c.pvi_elevation,
            grade_in=100.0 * c.grade_in,
            grade_out=100.0 * c.grade_out,
            A=c.a_pct,
            length=c.length,
            K=c.k,
            type=c.curve_type,
            bvc_station=c.bvc_station,
            bvc_elevation=c.bvc_elevation,
            evc_station=c.evc_station,
            evc_elevation=c.evc_elevation,
            turning_station=c.turning_station,
            turning_elevation=c.turning_elevation,
            length_in=c.length_in,
            length_out=c.length_out,
            radius=c.radius,
            middle_ordinate=c.pvi_offset,
            pvi_label=label(c.pvi_station),
            bvc_label=label(c.bvc_station),
            evc_label=label(c.evc_station),
        )
        rows.append(row)
    return rows


def horizontal_curve_rows(ctx: SolvedAlignment) -> list[Row]:
    """One row per horizontal curve (a Curve with its spirals)."""
    rows: list[Row] = []
    if ctx.horizontal is None:
        return rows
    units = ctx.document.units
    label = ctx.stationing.label
    for c in ctx.curves:
        row: Row = dict.fromkeys(CURVE_COLUMNS)
        row.update(
            kind="horizontal",
            radius=c.radius,
            delta=angle_to_unit(abs(c.delta), units.angular),
            length=c.arc_length,
            tangent=c.tangent_in,
            tangent_out=c.tangent_out,
            chord=c.chord,
            external=c.external,
            middle_ordinate=c.middle_ordinate,
            # arc definition, per 100 ft (US customary only): D = 100 * 180 / (pi R)
            degree_of_curve=None if units.metric else 18000.0 / (math.pi * c.radius),
            turn=c.direction,
            pi_station=c.pi_station,
            pi_northing=c.pi_northing,
            pi_easting=c.pi_easting,
            pc_station=c.start_station,
            pt_station=c.end_station,
            sc_station=c.sc_station,
            cs_station=c.cs_station,
            spiral_in=c.spiral_in,
            spiral_out=c.spiral_out,
            spiral_type=c.spiral_type,
            pi_label=label(c.pi_station),
            pc_label=label(c.start_station),
            pt_label=label(c.end_station),
        )
        rows.append(row)
    return rows


def curve_rows(ctx: SolvedAlignment) -> list[Row]:
    """Horizontal curve rows, then vertical curve rows, all with :data:`CURVE_COLUMNS`."""
    return horizontal_curve_rows(ctx) + vertical_curve_rows(ctx)


def normal_crown(ctx: SolvedAlignment) -> float:
    """The normal cross slope of the shipped criteria for the file's units."""
    from gradeline.analysis.superelevation import load_super_criteria

    return load_super_criteria(None, ctx.document.units.metric).normal_crown


def super_stations(ctx: SolvedAlignment) -> tuple[list[float], list[str]]:
    """Every station a stated superelevation names, with its point tag."""
    out = sorted(
        {(s, SUPER_TAGS[tag]) for r in ctx.alignment.superelevations for tag, s in r.stations()}
    )
    return [s for s, _ in out], [t for _, t in out]


def add_super_columns(ctx: SolvedAlignment, stations: ArrayLike, rows: list[Row]) -> None:
    """Add the left and right cross slopes (percent) of the stated superelevation."""
    from gradeline.analysis.superelevation import cross_slopes

    left, right = cross_slopes(
        ctx.alignment.superelevations, ctx.curves, normal_crown(ctx), stations
    )
    for row, lv, rv in zip(rows, left, right, strict=True):
        row["super_left"], row["super_right"] = 100 * float(lv), 100 * float(rv)


def add_super_curve_columns(ctx: SolvedAlignment, rows: list[Row]) -> None:
    """Add each horizontal curve's stated rate (percent) and transition lengths."""
    from gradeline.analysis.superelevation import match_records

    records = match_records(ctx.curves, ctx.alignment.superelevations)
    horizontal = [r for r in rows if r["kind"] == "horizontal"]
    for row in rows:
        row.update(dict.fromkeys(SUPER_CURVE_COLUMNS))
    for row, rec in zip(horizontal, records, strict=False):
        if rec is None:
            continue

        def span(a: float | None, b: float | None) -> float | None:
            return None if a is None or b is None else b - a

        row.update(
            super_rate=100 * rec.rate,
            runout_in=span(rec.begin_runout, rec.begin_runoff),
            runoff_in=span(rec.begin_runoff, rec.full_super),
            runoff_out=span(rec.end_full, rec.end_runoff),
            runout_out=span(rec.end_runoff, rec.end_runout),
        )


def add_ground_columns(
    ctx: SolvedAlignment, stations: ArrayLike, rows: list[Row]
) -> tuple[str, ...]:
    """Add ``ground`` and ``cut_fill`` (finished grade minus ground) from the attached TIN.

    Returns the column names of the widened table.
    """
    for row, z in zip(rows, ctx.ground_at(stations), strict=True):
        row["ground"] = float(z)
        row["cut_fill"] = row["elevation"] - float(z)
    return STATION_COLUMNS + ("ground", "cut_fill")
