"""Horizontal curve data (PI, R, delta, T, L, chord, E, M, PC/PT, TS/SC/CS/ST), key points."""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass, field

import numpy as np

from gradeline.geometry.directions import wrap_angle
from gradeline.geometry.horizontal import (
    HorizontalGeometry,
)
from gradeline.geometry.spirals import SPIRAL_TYPES
from gradeline.geometry.station_offset import foot_points
from gradeline.model import (
    SourceRef,
)

__all__ = ["HorizontalCurve", "curve_data", "key_points", "tangent_intersection"]


@dataclass(frozen=True, slots=True)
class HorizontalCurve:
    """Curve data of one horizontal curve (a Curve with or without spirals)."""

    number: int
    radius: float
    delta: float  # total deflection, radians, positive turning left
    arc_length: float
    tangent_in: float
    tangent_out: float
    chord: float
    external: float
    middle_ordinate: float
    pi_station: float
    pi_northing: float | None
    pi_easting: float | None
    start_station: float  # PC or TS
    end_station: float  # PT or ST
    sc_station: float | None
    cs_station: float | None
    spiral_in: float
    spiral_out: float
    spiral_type: str | None
    source: SourceRef | None = field(default=None, compare=False)
    arc_delta: float = 0.0  # the circular arc's own deflection, radians, unsigned
    spiral_in_delta: float = 0.0  # turning of the spirals, radians, unsigned
    spiral_out_delta: float = 0.0

    @property
    def has_spirals(self) -> bool:
        """True when spirals lead in or out."""
        return self.spiral_in > 0 or self.spiral_out > 0

    @property
    def direction(self) -> str:
        """``left`` or ``right``."""
        return "left" if self.delta > 0 else "right"


def tangent_intersection(
    p: tuple[float, float], h1: float, q: tuple[float, float], h2: float
) -> tuple[float, float] | None:
    """Where the line through ``p`` at heading ``h1`` meets the one through ``q`` at ``h2``.

    None when the two are parallel (within 1e-12).

    Examples
    --------
    >>> import math
    >>> tangent_intersection((0.0, 0.0), 0.0, (10.0, -5.0), math.pi / 2)
    (10.0, 0.0)
    """
    d1 = (math.cos(h1), math.sin(h1))
    d2 = (math.cos(h2), math.sin(h2))
    den = d1[0] * d2[1] - d1[1] * d2[0]
    if abs(den) < 1e-12:
        return None
    t = ((q[0] - p[0]) * d2[1] - (q[1] - p[1]) * d2[0]) / den
    return p[0] + t * d1[0], p[1] + t * d1[1]


def curve_data(geom: HorizontalGeometry) -> tuple[HorizontalCurve, ...]:
    """Curve data for every circular curve, with its spirals when they touch a tangent.

    PI is the intersection of the tangents at the curve's start (PC/TS) and end
    (PT/ST); the PI station is the start station plus the back tangent T (trade
    convention). E is the distance from the PI to the alignment; M and the chord
    belong to the circular arc.
    """
    els = geom.elements
    out: list[HorizontalCurve] = []
    for i, g in enumerate(els):
        if g.kind != "arc":
            continue
        first, last = g, g
        sp_in = sp_out = 0.0
        sp_type = None
        if i > 0 and els[i - 1].kind in SPIRAL_TYPES and els[i - 1].k0 == 0.0:
            first = els[i - 1]
            sp_in, sp_type = first.length, first.kind
        if i + 1 < len(els) and els[i + 1].kind in SPIRAL_TYPES and els[i + 1].k1 == 0.0:
            last = els[i + 1]
            sp_out, sp_type = last.length, sp_type or last.kind
        radius = 1.0 / abs(g.k0)
        delta = wrap_angle(last.heading1 - first.heading0)
        pi = tangent_intersection(
            (first.x0, first.y0), first.heading0, (last.x1, last.y1), last.heading1
        )
        if pi is not None:
            t_in = math.hypot(pi[0] - first.x0, pi[1] - first.y0)
            t_out = math.hypot(last.x1 - pi[0], last.y1 - pi[1])
            mid = np.array([(first.start_station + last.end_station) / 2.0])
            _, _, _, dist = foot_points(geom, np.array([pi[0]]), np.array([pi[1]]), mid)
            external = float(dist[0])
        else:
            t_in = t_out = external = math.nan
        sweep = g.length / radius
        out.append(
            HorizontalCurve(
                number=len(out) + 1,
                radius=radius,
                delta=delta,
                arc_length=g.length,
                tangent_in=t_in,
                tangent_out=t_out,
                chord=math.hypot(g.x1 - g.x0, g.y1 - g.y0),
                external=external,
                middle_ordinate=radius * (1.0 - math.cos(sweep / 2.0)),
                pi_station=first.start_station + t_in,
                pi_northing=pi[1] if pi else None,
                pi_easting=pi[0] if pi else None,
                start_station=first.start_station,
                end_station=last.end_station,
                sc_station=g.start_station if sp_in else None,
                cs_station=g.end_station if sp_out else None,
                spiral_in=sp_in,
                spiral_out=sp_out,
                spiral_type=sp_type,
                source=g.source,
                arc_delta=sweep,
                spiral_in_delta=abs(first.heading1 - first.heading0) if sp_in else 0.0,
                spiral_out_delta=abs(last.heading1 - last.heading0) if sp_out else 0.0,
            )
        )
    return tuple(out)


def key_points(
    geom: HorizontalGeometry, curves: Sequence[HorizontalCurve] | None = None
) -> list[tuple[float, str]]:
    """(station, tag) of POB, POE and every PC, PT, TS, SC, CS and ST.

    ``curves`` is the curve data of ``geom`` when the caller already has it.
    """
    pts: list[tuple[float, str]] = [(geom.start, "POB")]
    for c in curve_data(geom) if curves is None else curves:
        if c.spiral_in and c.sc_station is not None:
            pts += [(c.start_station, "TS"), (c.sc_station, "SC")]
        else:
            pts.append((c.start_station, "PC"))
        if c.spiral_out and c.cs_station is not None:
            pts += [(c.cs_station, "CS"), (c.end_station, "ST")]
        else:
            pts.append((c.end_station, "PT"))
    pts.append((geom.end, "POE"))
    return pts
