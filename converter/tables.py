"""Table rows for ``table`` and ``curves``: plain records, no formatting.

Renderers (CSV/JSON writers, PDF tables) take these rows as they are; the
values are floats in file units, grades in percent, and text labels made by
:mod:`converter.labels` and :mod:`converter.stations`.
"""

from __future__ import annotations

from collections.abc import Sequence
from typing import Any

import numpy as np
from numpy.typing import ArrayLike, NDArray

from converter import vertical
from converter.stations import Stationing
from converter.vertical import VerticalGeometry

__all__ = [
    "CURVE_COLUMNS",
    "STATION_COLUMNS",
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
    "pvi_label",
    "bvc_label",
    "evc_label",
)

Row = dict[str, Any]


def _merge_keys(
    keys: Sequence[vertical.KeyPoint], equations: Sequence[float]
) -> list[vertical.KeyPoint]:
    """Key points plus station-equation points tagged ``EQUATION``."""
    out = list(keys)
    for s in equations:
        near = [i for i, k in enumerate(out) if abs(k.station - s) <= vertical.JOIN_TOLERANCE]
        if near:
            k = out[near[0]]
            out[near[0]] = vertical.KeyPoint(k.station, k.tags + ("EQUATION",))
        else:
            out.append(vertical.KeyPoint(s, ("EQUATION",)))
    return sorted(out, key=lambda k: k.station)


def table_stations(
    geom: VerticalGeometry,
    stationing: Stationing,
    interval: float | None = None,
    at: ArrayLike | None = None,
) -> tuple[NDArray[np.float64], list[str]]:
    """Stations of a station/elevation table and the key-point tag of each.

    With ``interval`` the rows are every labelled multiple of it plus every key
    point (START, BVC, PVI, HIGH/LOW, EVC, END, and EQUATION where a station
    equation sits); with ``at`` they are exactly
    the given internal stations, tagged where they hit a key point.
    """
    keys = _merge_keys(
        vertical.key_points(geom),
        [e.internal for e in stationing.equations if geom.start <= e.internal <= geom.end],
    )
    key_st = np.array([k.station for k in keys])
    if at is not None:
        stations = np.asarray(at, dtype=np.float64).reshape(-1)
    else:
        assert interval is not None
        regular = stationing.round_stations(interval, geom.start, geom.end)
        stations = np.union1d(regular, key_st)
        # drop regular stations that sit on a key point within rounding
        keep = np.ones(len(stations), dtype=bool)
        j = np.searchsorted(key_st, stations)
        for side in (j - 1, j):
            ok = (side >= 0) & (side < len(key_st))
            near = np.zeros(len(stations), dtype=bool)
            near[ok] = np.abs(key_st[side[ok]] - stations[ok]) <= vertical.JOIN_TOLERANCE
            is_key = np.isin(stations, key_st)
            keep &= ~(near & ~is_key)
        stations = stations[keep]
    tags = []
    for s in stations:
        i = int(np.argmin(np.abs(key_st - s)))
        tags.append(keys[i].text if abs(key_st[i] - s) <= vertical.JOIN_TOLERANCE else "")
    return stations, tags


def station_rows(
    geom: VerticalGeometry,
    stationing: Stationing,
    stations: ArrayLike,
    tags: Sequence[str] | None = None,
) -> list[Row]:
    """One row per station with the columns of :data:`STATION_COLUMNS`."""
    s = np.asarray(stations, dtype=np.float64).reshape(-1)
    z, g = vertical.evaluate(geom, s)
    tz = vertical.tangent_elevation(geom, s)
    labels = stationing.labels(s)
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
                "northing": None,
                "easting": None,
                "direction": None,
                "point": tags[i] if tags is not None else "",
            }
        )
    return rows


def curve_rows(geom: VerticalGeometry, stationing: Stationing) -> list[Row]:
    """One row per vertical curve with the columns of :data:`CURVE_COLUMNS`."""
    rows = []
    for c in geom.curves:
        rows.append(
            {
                "kind": "vertical",
                "pvi_station": c.pvi_station,
                "pvi_elevation": c.pvi_elevation,
                "grade_in": 100.0 * c.grade_in,
                "grade_out": 100.0 * c.grade_out,
                "A": c.a_pct,
                "length": c.length,
                "K": c.k,
                "type": c.curve_type,
                "bvc_station": c.bvc_station,
                "bvc_elevation": c.bvc_elevation,
                "evc_station": c.evc_station,
                "evc_elevation": c.evc_elevation,
                "turning_station": c.turning_station,
                "turning_elevation": c.turning_elevation,
                "length_in": c.length_in,
                "length_out": c.length_out,
                "radius": c.radius,
                "middle_ordinate": c.pvi_offset,
                "pvi_label": stationing.label(c.pvi_station),
                "bvc_label": stationing.label(c.bvc_station),
                "evc_label": stationing.label(c.evc_station),
            }
        )
    return rows
