"""Immutable model of a LandXML road design.

The reader (:mod:`converter.landxml`) builds these objects; everything else reads
them. Lengths are in the file's linear unit, grades are ratios (rise/run) and
angles are radians. Every object may carry a :class:`SourceRef` so that errors
found later can still name the file and line.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from typing import Literal

from converter.errors import InputError, ModelError
from converter.units import Units

__all__ = [
    "Alignment",
    "CurveKind",
    "Document",
    "HCurve",
    "HElement",
    "HIrregular",
    "HLine",
    "HSpiral",
    "HorizontalAlignment",
    "GroundPiece",
    "GroundProfile",
    "PVISpec",
    "Profile",
    "SourceRef",
    "StationEquation",
]

CurveKind = Literal["none", "parabolic", "unsymmetric", "circular"]
_KINDS = ("none", "parabolic", "unsymmetric", "circular")


@dataclass(frozen=True, slots=True)
class SourceRef:
    """Where a model object came from: file path and 1-based line."""

    path: str
    line: int | None = None


#: Largest magnitude accepted for any coordinate, station or elevation: far
#: beyond any survey (1e12 m is seven times the distance to the Sun), small
#: enough that squares and products stay finite.
MAX_MAGNITUDE = 1e12


def _finite(value: float, what: str, source: SourceRef | None, element: str) -> None:
    if not math.isfinite(value):
        raise ModelError(f"{what} must be a finite number, got {value!r}", source, element)
    if abs(value) > MAX_MAGNITUDE:
        raise ModelError(f"{what} {value:g} is not a plausible survey value (at most "
                         f"{MAX_MAGNITUDE:g} in size)", source, element)


@dataclass(frozen=True, slots=True)
class PVISpec:
    """One entry of a ``ProfAlign``: a PVI and the vertical curve on it, if any.

    Parameters
    ----------
    station : float
        Internal (continuous) station of the PVI.
    elevation : float
        PVI elevation.
    kind : {"none", "parabolic", "unsymmetric", "circular"}
        ``PVI``, ``ParaCurve``, ``UnsymParaCurve`` or ``CircCurve``.
    length_in, length_out : float
        Horizontal lengths before and after the PVI (parabolic curves; a
        symmetric curve has both equal to L/2).
    radius : float, optional
        Stated radius of a circular curve, sign as written in the file.
    arc_length : float, optional
        Stated ``length`` of a circular curve (an arc length).
    """

    station: float
    elevation: float
    kind: CurveKind = "none"
    length_in: float = 0.0
    length_out: float = 0.0
    radius: float | None = None
    arc_length: float | None = None
    source: SourceRef | None = field(default=None, compare=False)

    @property
    def element(self) -> str:
        """LandXML element name of this entry."""
        return {
            "none": "PVI",
            "parabolic": "ParaCurve",
            "unsymmetric": "UnsymParaCurve",
            "circular": "CircCurve",
        }[self.kind]

    @property
    def length(self) -> float:
        """Stated horizontal length of a parabolic curve (L = lengthIn + lengthOut)."""
        return self.length_in + self.length_out

    def __post_init__(self) -> None:
        el = self.element if self.kind in _KINDS else "PVI"
        if self.kind not in _KINDS:
            raise ModelError(f"unknown curve kind {self.kind!r}", self.source, el)
        _finite(self.station, "station", self.source, el)
        _finite(self.elevation, "elevation", self.source, el)
        _finite(self.length_in, "length", self.source, el)
        _finite(self.length_out, "length", self.source, el)
        if self.kind in ("parabolic", "unsymmetric"):
            if self.length_in <= 0 or self.length_out <= 0:
                raise ModelError(
                    "curve length must be positive, got "
                    f"{self.length_in + self.length_out:g}"
                    + (
                        f" (lengthIn {self.length_in:g}, lengthOut {self.length_out:g})"
                        if self.kind == "unsymmetric"
                        else ""
                    )
                    + "; write a PVI element for a grade break without a curve",
                    self.source,
                    el,
                )
        elif self.kind == "circular":
            if self.radius is None and self.arc_length is None:
                raise ModelError("a CircCurve needs a radius or a length", self.source, el)
            if self.radius is not None:
                _finite(self.radius, "radius", self.source, el)
                if self.radius == 0:
                    raise ModelError("radius must not be zero", self.source, el)
            if self.arc_length is not None:
                _finite(self.arc_length, "length", self.source, el)
                if self.arc_length <= 0:
                    raise ModelError(
                        f"curve length must be positive, got {self.arc_length:g}",
                        self.source,
                        el,
                    )
        elif self.length_in or self.length_out:
            raise ModelError("a PVI without a curve has no length", self.source, el)


@dataclass(frozen=True, slots=True)
class Profile:
    """A finished-grade profile (``ProfAlign``): PVIs in station order.

    The first and last entries are the profile's ends and carry no curve.
    """

    name: str
    pvis: tuple[PVISpec, ...]
    source: SourceRef | None = field(default=None, compare=False)

    def __post_init__(self) -> None:
        if len(self.pvis) < 2:
            raise ModelError(
                f"profile {self.name!r} needs at least two PVIs, found {len(self.pvis)}",
                self.source,
                "ProfAlign",
            )
        for end in (self.pvis[0], self.pvis[-1]):
            if end.kind != "none":
                which = "first" if end is self.pvis[0] else "last"
                raise ModelError(
                    f"the {which} entry of a profile is its end and cannot carry a "
                    f"curve; write it as a PVI",
                    end.source,
                    end.element,
                )
        for prev, cur in zip(self.pvis, self.pvis[1:], strict=False):
            if not cur.station > prev.station:
                raise ModelError(
                    f"PVI stations must increase: {cur.station:g} after {prev.station:g}",
                    cur.source,
                    cur.element,
                )

    @property
    def start(self) -> float:
        """Station of the first PVI."""
        return self.pvis[0].station

    @property
    def end(self) -> float:
        """Station of the last PVI."""
        return self.pvis[-1].station


@dataclass(frozen=True, slots=True)
class GroundPiece:
    """A run of existing-ground points (one ``PntList2D``)."""

    stations: tuple[float, ...]
    elevations: tuple[float, ...]
    source: SourceRef | None = field(default=None, compare=False)

    def __post_init__(self) -> None:
        if len(self.stations) != len(self.elevations):
            raise ModelError(
                "stations and elevations differ in count", self.source, "PntList2D"
            )
        for a, b in zip(self.stations, self.stations[1:], strict=False):
            if not b > a:
                raise ModelError(
                    f"ground stations must increase: {b:g} after {a:g}",
                    self.source,
                    "PntList2D",
                )


@dataclass(frozen=True, slots=True)
class GroundProfile:
    """An existing-ground profile (``ProfSurf``); pieces are separated by gaps."""

    name: str
    pieces: tuple[GroundPiece, ...]
    source: SourceRef | None = field(default=None, compare=False)


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
        for p, what in ((self.start, "Start"), (self.center, "Center"), (self.end, "End"),
                        (self.pi, "PI")):
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
            raise ModelError(f"spiral length must be positive, got {self.length:g}",
                             self.source, "Spiral")
        for r, what in ((self.radius_start, "radiusStart"), (self.radius_end, "radiusEnd")):
            if math.isnan(r) or r <= 0:
                raise ModelError(f"{what} must be positive or INF, got {r:g}", self.source, "Spiral")
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
            raise ModelError("an IrregularLine needs at least two points", self.source,
                             "IrregularLine")
        for p in self.points:
            _check_point(p, "point", self.source, "IrregularLine")

    def get(self, name: str) -> float | None:
        """A stated attribute value, or None."""
        return _stated_get(self.stated, name)


HElement = HLine | HCurve | HSpiral | HIrregular


@dataclass(frozen=True, slots=True)
class HorizontalAlignment:
    """The ``CoordGeom`` of an alignment: its elements in order."""

    elements: tuple[HElement, ...]
    source: SourceRef | None = field(default=None, compare=False)

    def __post_init__(self) -> None:
        if not self.elements:
            raise ModelError("CoordGeom has no Line, Curve, Spiral or IrregularLine",
                             self.source, "CoordGeom")


@dataclass(frozen=True, slots=True)
class StationEquation:
    """A station equation (``StaEquation``).

    Parameters
    ----------
    back : float
        Labelled station back (before the equation).
    ahead : float
        Labelled station ahead (from the equation on).
    internal : float
        Internal (continuous) station where the equation sits.
    """

    back: float
    ahead: float
    internal: float
    source: SourceRef | None = field(default=None, compare=False)

    def __post_init__(self) -> None:
        for value, what in ((self.back, "staBack"), (self.ahead, "staAhead")):
            _finite(value, what, self.source, "StaEquation")
        _finite(self.internal, "staInternal", self.source, "StaEquation")


@dataclass(frozen=True, slots=True)
class Alignment:
    """One ``Alignment``: stationing, profiles and ground profiles.

    ``horizontal`` is filled by the horizontal-geometry reader when the file
    has ``CoordGeom``; it is ``None`` otherwise.
    """

    name: str
    sta_start: float = 0.0
    length: float | None = None
    description: str = ""
    profiles: tuple[Profile, ...] = ()
    grounds: tuple[GroundProfile, ...] = ()
    equations: tuple[StationEquation, ...] = ()
    horizontal: HorizontalAlignment | None = None
    source: SourceRef | None = field(default=None, compare=False)

    def __post_init__(self) -> None:
        _finite(self.sta_start, "staStart", self.source, "Alignment")
        internals = [eq.internal for eq in self.equations]
        if internals != sorted(internals) or len(set(internals)) != len(internals):
            bad = next(
                eq
                for eq, prev in zip(self.equations[1:], self.equations, strict=False)
                if not eq.internal > prev.internal
            )
            raise ModelError(
                "station equations must be in increasing staInternal order",
                bad.source,
                "StaEquation",
            )

    def profile(self, name: str | None = None) -> Profile:
        """Return the profile called ``name``, or the only one when ``name`` is None.

        Raises
        ------
        InputError
            No profile, several without a name given, or no such name.
        """
        if not self.profiles:
            raise InputError(
                f"alignment {self.name!r} has no finished-grade profile (ProfAlign)",
                self.source,
                "Alignment",
            )
        if name is None:
            if len(self.profiles) > 1:
                raise InputError(
                    f"alignment {self.name!r} has {len(self.profiles)} profiles; choose "
                    "one with --profile: " + ", ".join(p.name for p in self.profiles),
                    self.source,
                    "Alignment",
                )
            return self.profiles[0]
        for prof in self.profiles:
            if prof.name == name:
                return prof
        raise InputError(
            f"no profile named {name!r} in alignment {self.name!r}; profiles: "
            + ", ".join(p.name for p in self.profiles),
            self.source,
            "Alignment",
        )


@dataclass(frozen=True, slots=True)
class Document:
    """A whole LandXML document as far as gradeline reads it."""

    path: str
    units: Units
    alignments: tuple[Alignment, ...]
    project: str = ""
    source: SourceRef | None = field(default=None, compare=False)

    def alignment(self, name: str | None = None) -> Alignment:
        """Return the alignment called ``name``, or the only one when ``name`` is None.

        Raises
        ------
        InputError
            No alignment, several without a name given, or no such name.
        """
        src = self.source or SourceRef(self.path, 1)
        if not self.alignments:
            raise InputError("the file has no alignments", src, "Alignments")
        if name is None:
            if len(self.alignments) > 1:
                raise InputError(
                    f"the file has {len(self.alignments)} alignments; choose one with "
                    "--alignment: " + ", ".join(a.name for a in self.alignments),
                    src,
                    "Alignments",
                )
            return self.alignments[0]
        for al in self.alignments:
            if al.name == name:
                return al
        raise InputError(
            f"no alignment named {name!r}; alignments: "
            + ", ".join(a.name for a in self.alignments),
            src,
            "Alignments",
        )
