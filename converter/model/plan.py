"""Plan geometry as the file states it: ``CoordGeom`` lines, curves, spirals."""

from __future__ import annotations

import math
from dataclasses import dataclass, field

from gradeline.errors import ModelError
from gradeline.model.base import SourceRef

__all__ = [
    "HCurve",
    "HElement",
    "HIrregular",
    "HLine",
    "HSpiral",
    "HorizontalAlignment",
    "PIEntry",
    "Point",
    "Stated",
]


Point = tuple[float, float]
"""A plan point as (northing, easting), the order LandXML writes."""

Stated = tuple[tuple[str, float], ...]
"""Stated attribute values of an element, kept to be checked, never trusted."""


def _stated_get(stated: Stated, name: str) -> float | None:
    for key, value in stated:
        if key == name:
            return value
    return None


def _check_point(p: Point | None, what: str, source: SourceRef | None, el: str) -> None:
    if p is None:
        return
    if len(p) != 2 or not all(math.isfinite(v) for v in p):
        raise ModelError(f"{what} must be two finite numbers (northing easting)", source, el)


@dataclass(frozen=True, slots=True)
class HLine:
    """A ``Line``: straight from ``start`` to ``end``."""

    start: Point
    end: Point
    stated: Stated = ()
    source: SourceRef | None = field(default=None, compare=False)

    element = "Line"

    def __post_init__(self) -> None:
        _check_point(self.start, "Start", self.source, "Line")
        _check_point(self.end, "End", self.source, "Line")

    def get(self, name: str) -> float | None:
        """A stated attribute value, or None."""
        return _stated_get(self.stated, name)


@dataclass(frozen=True, slots=True)
class HCurve:
    """A circular ``Curve`` from ``start`` to ``end`` about ``center``.

    ``rot`` is ``cw`` or ``ccw`` as written; ``None`` when the file omits it
    (the geometry then takes the shorter arc).
    """

    start: Point
    center: Point
    end: Point
    rot: str | None = None
    pi: Point | None = None
    stated: Stated = ()
    source: SourceRef | None = field(default=None, compare=False)

    element = "Curve"

    def __post_init__(self) -> None:
        for p, what in (
            (self.start, "Start"),
            (self.center, "Center"),
            (self.end, "End"),
            (self.pi, "PI"),
        ):
            _check_point(p, what, self.source, "Curve")
        if self.rot not in (None, "cw", "ccw"):
            raise ModelError(f"rot must be 'cw' or 'ccw', got {self.rot!r}", self.source, "Curve")

    def get(self, name: str) -> float | None:
        """A stated attribute value, or None."""
        return _stated_get(self.stated, name)


@dataclass(frozen=True, slots=True)
class HSpiral:
    """A transition ``Spiral``; ``radius_start``/``radius_end`` are ``inf`` at a tangent."""

    start: Point
    end: Point
    length: float
    radius_start: float
    radius_end: float
    rot: str
    spi_type: str = "clothoid"
    pi: Point | None = None
    stated: Stated = ()
    source: SourceRef | None = field(default=None, compare=False)

    element = "Spiral"

    def __post_init__(self) -> None:
        for p, what in ((self.start, "Start"), (self.end, "End"), (self.pi, "PI")):
            _check_point(p, what, self.source, "Spiral")
        if not (math.isfinite(self.length) and self.length > 0):
            raise ModelError(
                f"spiral length must be positive, got {self.length:g}", self.source, "Spiral"
            )
        for r, what in ((self.radius_start, "radiusStart"), (self.radius_end, "radiusEnd")):
            if math.isnan(r) or r <= 0:
                raise ModelError(
                    f"{what} must be positive or INF, got {r:g}", self.source, "Spiral"
                )
        if math.isinf(self.radius_start) and math.isinf(self.radius_end):
            raise ModelError("a spiral needs at least one finite radius", self.source, "Spiral")
        if self.rot not in ("cw", "ccw"):
            raise ModelError(f"rot must be 'cw' or 'ccw', got {self.rot!r}", self.source, "Spiral")

    def get(self, name: str) -> float | None:
        """A stated attribute value, or None."""
        return _stated_get(self.stated, name)


@dataclass(frozen=True, slots=True)
class HIrregular:
    """An ``IrregularLine``: straight pieces through ``points``."""

    points: tuple[Point, ...]
    stated: Stated = ()
    source: SourceRef | None = field(default=None, compare=False)

    element = "IrregularLine"

    def __post_init__(self) -> None:
        if len(self.points) < 2:
            raise ModelError(
                "an IrregularLine needs at least two points", self.source, "IrregularLine"
            )
        for p in self.points:
            _check_point(p, "point", self.source, "IrregularLine")

    def get(self, name: str) -> float | None:
        """A stated attribute value, or None."""
        return _stated_get(self.stated, name)


HElement = HLine | HCurve | HSpiral | HIrregular


@dataclass(frozen=True, slots=True)
class PIEntry:
    """One ``AlignPI``: the PI (northing, easting) and the curve on it, if any.

    ``radius`` None is an angle point; ``spiral_in``/``spiral_out`` are spiral
    lengths (0 for none), of the LandXML types ``spiral_types`` (in, out).
    """

    point: Point
    radius: float | None = None
    spiral_in: float = 0.0
    spiral_out: float = 0.0
    curve_stated: Stated = ()
    source: SourceRef | None = field(default=None, compare=False)
    spiral_types: tuple[str, str] = ("clothoid", "clothoid")


@dataclass(frozen=True, slots=True)
class HorizontalAlignment:
    """The ``CoordGeom`` of an alignment: its elements in order.

    An alignment given as a PI list (``AlignPIs``) has ``pis`` and no elements;
    the solver lays the elements out (:mod:`gradeline.geometry.pi_list`).
    """

    elements: tuple[HElement, ...]
    source: SourceRef | None = field(default=None, compare=False)
    pis: tuple[PIEntry, ...] = ()

    def __post_init__(self) -> None:
        if not self.elements and not self.pis:
            raise ModelError(
                "CoordGeom has no Line, Curve, Spiral or IrregularLine", self.source, "CoordGeom"
            )
