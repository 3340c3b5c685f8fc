"""Findings of the cross-check: one record per comparison, and the tolerances."""

from __future__ import annotations

import math
from dataclasses import dataclass, field

from gradeline.geometry.directions import direction_value
from gradeline.model import SourceRef
from gradeline.model.units import angle_from_unit, angle_to_unit

__all__ = [
    "DEFAULT_TOLERANCES",
    "DEFAULT_ANGLE_TOLERANCE_SEC",
    "DEFAULT_TOLERANCE",
    "Collector",
    "Finding",
    "Tolerances",
]


#: Default tolerances: 0.01 file units for distances and elevations, 2 seconds
#: of arc for angles and directions (common practice for exported files).
DEFAULT_TOLERANCE = 0.01
DEFAULT_ANGLE_TOLERANCE_SEC = 2.0


@dataclass(frozen=True, slots=True)
class Tolerances:
    """Distance (file units) and angle (radians) tolerances."""

    distance: float = DEFAULT_TOLERANCE
    angle: float = math.radians(DEFAULT_ANGLE_TOLERANCE_SEC / 3600.0)


#: The default tolerances (see :class:`Tolerances`).
DEFAULT_TOLERANCES = Tolerances()


@dataclass(frozen=True, slots=True)
class Finding:
    """One comparison. ``verdict``: ``ok``, ``over`` (beyond tolerance) or ``info``."""

    alignment: str
    element: str  # e.g. "Curve" or "ParaCurve" or "DXF"
    index: int | None  # 1-based element number within its list
    station: float | None
    quantity: str
    stated: float | None
    computed: float | None
    difference: float | None
    verdict: str
    message: str = ""
    unit: str = ""
    source: SourceRef | None = field(default=None, compare=False)
    miss: bool = False  # ``stated`` is a distance between stated and computed points


class Collector:
    def __init__(self, alignment: str, tol: Tolerances) -> None:
        self.alignment = alignment
        self.tol = tol
        self.items: list[Finding] = []

    def distance(
        self,
        element,
        index,
        station,
        quantity,
        stated,
        computed,
        source,
        unit="",
        message="",
        miss=False,
    ) -> None:
        if stated is None:
            return
        diff = stated - computed
        over = abs(diff) > self.tol.distance
        self.items.append(
            Finding(
                self.alignment,
                element,
                index,
                station,
                quantity,
                stated,
                computed,
                diff,
                "over" if over else "ok",
                message,
                unit,
                source,
                miss,
            )
        )

    def direction(
        self, element, index, station, quantity, stated, heading, source, unit, convention
    ) -> None:
        """A stated direction (file unit and convention) against a computed heading."""
        if stated is None:
            return
        computed = float(direction_value(heading, convention, unit))
        diff = (angle_from_unit(stated, unit) - angle_from_unit(computed, unit) + math.pi) % (
            2 * math.pi
        ) - math.pi
        over = abs(diff) > self.tol.angle
        shown = angle_to_unit(diff, unit) if unit != "decimal dd.mm.ss" else math.degrees(diff)
        self.items.append(
            Finding(
                self.alignment,
                element,
                index,
                station,
                quantity,
                stated,
                computed,
                shown,
                "over" if over else "ok",
                "",
                unit,
                source,
            )
        )

    def angle(
        self,
        element,
        index,
        station,
        quantity,
        stated_rad,
        computed_rad,
        source,
        shown_unit: str,
        message="",
    ) -> None:
        if stated_rad is None:
            return
        diff = (stated_rad - computed_rad + math.pi) % (2 * math.pi) - math.pi
        over = abs(diff) > self.tol.angle
        self.items.append(
            Finding(
                self.alignment,
                element,
                index,
                station,
                quantity,
                angle_to_unit(stated_rad, shown_unit),
                angle_to_unit(computed_rad, shown_unit),
                angle_to_unit(diff, shown_unit)
                if shown_unit != "decimal dd.mm.ss"
                else math.degrees(diff),
                "over" if over else "ok",
                message,
                shown_unit,
                source,
            )
        )

    def note(
        self,
        element,
        index,
        station,
        quantity,
        verdict,
        message,
        source=None,
        stated=None,
        computed=None,
    ) -> None:
        diff = None if stated is None or computed is None else stated - computed
        self.items.append(
            Finding(
                self.alignment,
                element,
                index,
                station,
                quantity,
                stated,
                computed,
                diff,
                verdict,
                message,
                "",
                source,
            )
        )
