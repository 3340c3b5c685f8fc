"""One solved alignment: every computed fact of an alignment, computed once.

:func:`solve` takes a read :class:`~gradeline.model.Document` (no file access
here) and returns a :class:`SolvedAlignment`: the horizontal and vertical
geometry, the stationing used for labels, the ground, and -- computed on first
use and then kept -- the horizontal curve data and the merged key points.
Drafting, tables, sheets, the review and the cross-check all take this object
and ask it for coordinates and elevations; none of them solves geometry or
computes curve data on its own.
"""

from __future__ import annotations

from dataclasses import dataclass, replace
from functools import cached_property
from typing import TYPE_CHECKING

import numpy as np
from numpy.typing import ArrayLike, NDArray

from gradeline.errors import InputError, ModelError
from gradeline.geometry import horizontal, vertical
from gradeline.geometry.curve_data import HorizontalCurve, curve_data
from gradeline.geometry.curve_data import key_points as plan_key_points
from gradeline.geometry.horizontal import HorizontalGeometry
from gradeline.geometry.stations import Stationing
from gradeline.geometry.vertical import JOIN_TOLERANCE, KeyPoint, VerticalGeometry
from gradeline.model import Alignment, Document, Profile, SourceRef, Surface

if TYPE_CHECKING:
    from gradeline.geometry.ground import TriangleIndex

from gradeline.geometry.directions import direction_value

__all__ = ["SolvedAlignment", "solve", "solve_alignment", "with_surface"]

#: Tags of vertical key points (the profile's station wins where plan and
#: profile key points coincide within rounding).
_VERTICAL_TAGS = frozenset({"START", "END", "PVI", "BVC", "EVC", "HIGH", "LOW"})


@dataclass(frozen=True, eq=False)
class SolvedAlignment:
    """An alignment with its geometry solved: the input of every deliverable.

    Attributes
    ----------
    document, alignment, profile
        The model objects it was solved from (``profile`` None when the
        alignment has none, or none was asked for).
    stationing : Stationing
        Station labels and equations.
    geometry : VerticalGeometry or None
        The solved finished-grade profile.
    horizontal : HorizontalGeometry or None
        The solved plan geometry.
    surface : TriangleIndex or None
        The TIN the ground was sampled from, when one was attached
        (:func:`with_surface`); gives the exact ground at any station.
    """

    document: Document
    alignment: Alignment
    stationing: Stationing
    profile: Profile | None
    geometry: VerticalGeometry | None
    horizontal: HorizontalGeometry | None
    surface: TriangleIndex | None = None

    # -- extent --------------------------------------------------------------
    @property
    def start(self) -> float:
        """First station covered (profile if present, else plan)."""
        if self.geometry is not None:
            return self.geometry.start
        assert self.horizontal is not None
        return self.horizontal.start

    @property
    def end(self) -> float:
        """Last station covered (profile if present, else plan)."""
        if self.geometry is not None:
            return self.geometry.end
        assert self.horizontal is not None
        return self.horizontal.end

    @property
    def units(self):  # noqa: ANN201 - Units; kept short for the many callers
        """The document's units."""
        return self.document.units

    # -- computed once -------------------------------------------------------
    @cached_property
    def curves(self) -> tuple[HorizontalCurve, ...]:
        """Curve data of every horizontal curve (empty without plan geometry)."""
        return curve_data(self.horizontal) if self.horizontal is not None else ()

    @cached_property
    def plan_key_points(self) -> tuple[tuple[float, str], ...]:
        """(station, tag) of POB, POE and every PC, PT, TS, SC, CS, ST."""
        if self.horizontal is None:
            return ()
        return tuple(plan_key_points(self.horizontal, self.curves))

    @cached_property
    def vertical_key_points(self) -> tuple[KeyPoint, ...]:
        """START, BVC, PVI, HIGH/LOW, EVC, END of the profile (empty without one)."""
        return vertical.key_points(self.geometry) if self.geometry is not None else ()

    @cached_property
    def key_points(self) -> tuple[KeyPoint, ...]:
        """Every key point of the alignment in station order, tags merged.

        Vertical: START, BVC, PVI, HIGH/LOW, EVC, END. Horizontal: POB, PC, PT,
        TS, SC, CS, ST, POE. Stationing: EQUATION where a station equation sits.
        """
        found: list[tuple[float, str]] = []
        for k in self.vertical_key_points:
            found += [(k.station, tag) for tag in k.tags]
        found += list(self.plan_key_points)
        lo, hi = self.start, self.end
        found += [
            (e.internal, "EQUATION") for e in self.stationing.equations if lo <= e.internal <= hi
        ]
        found = [(s, t) for s, t in found if lo - JOIN_TOLERANCE <= s <= hi + JOIN_TOLERANCE]
        found.sort(key=lambda p: p[0])
        merged: list[KeyPoint] = []
        for station, tag in found:
            if merged and abs(station - merged[-1].station) <= JOIN_TOLERANCE:
                if tag not in merged[-1].tags:
                    keep = merged[-1].station
                    # where plan and profile key points coincide within rounding, the row
                    # takes the profile's station (its elevation is the one tabulated)
                    if tag in _VERTICAL_TAGS and not _VERTICAL_TAGS & set(merged[-1].tags):
                        keep = station
                    merged[-1] = KeyPoint(keep, merged[-1].tags + (tag,))
            else:
                merged.append(KeyPoint(station, (tag,)))
        return tuple(merged)

    # -- evaluation at stations ---------------------------------------------
    def plan_at(self, stations: ArrayLike) -> tuple[NDArray[np.float64], ...]:
        """(northing, easting, heading) at internal stations (needs plan geometry)."""
        if self.horizontal is None:
            raise ValueError("the alignment has no plan geometry")
        return horizontal.evaluate(self.horizontal, stations)

    def profile_at(self, stations: ArrayLike) -> tuple[NDArray[np.float64], NDArray[np.float64]]:
        """(elevation, grade as a ratio) at internal stations (needs a profile)."""
        if self.geometry is None:
            raise ValueError("the alignment has no profile")
        return vertical.evaluate(self.geometry, stations)

    def elevation(self, stations: ArrayLike) -> NDArray[np.float64]:
        """Finished-grade elevation at internal stations (NaN outside the profile)."""
        if self.geometry is None:
            raise ValueError("the alignment has no profile")
        return vertical.elevation(self.geometry, stations)

    def tangent_elevation(self, stations: ArrayLike) -> NDArray[np.float64]:
        """Elevation on the grade lines through the PVIs (curves left out)."""
        if self.geometry is None:
            raise ValueError("the alignment has no profile")
        return vertical.tangent_elevation(self.geometry, stations)

    def direction(self, heading: ArrayLike) -> NDArray[np.float64]:
        """Headings as directions in the file's convention and direction unit."""
        assert self.horizontal is not None
        return direction_value(heading, self.horizontal.convention, self.document.units.direction)

    def ground_at(self, stations: ArrayLike) -> NDArray[np.float64]:
        """Exact TIN ground at internal stations (NaN off the surface; needs a surface)."""
        from gradeline.geometry import ground as gr

        if self.surface is None:
            raise ValueError("no surface attached")
        n, e, _ = self.plan_at(np.asarray(stations, dtype=np.float64))
        return gr.interpolate(self.surface, e, n)


def _located(err: ModelError) -> InputError:
    return InputError(err.message, err.source, err.element)


def solve_alignment(
    doc: Document,
    alignment: Alignment,
    profile: Profile | None,
    *,
    need_profile: bool = True,
) -> SolvedAlignment:
    """Solve ``alignment`` and ``profile``; model errors become input errors."""
    stationing = Stationing(doc.units, alignment.equations)
    geom = None
    if profile is not None:
        try:
            geom = vertical.solve(profile, label=stationing.label)
        except ModelError as err:
            raise _located(err) from None
    hgeom = None
    if alignment.horizontal is not None:
        try:
            hgeom = horizontal.solve(
                alignment.horizontal, alignment.sta_start, direction_unit=doc.units.direction
            )
        except ModelError as err:
            raise _located(err) from None
    if geom is None and (need_profile or hgeom is None):
        alignment.profile(None)  # raises the "no profile" error with its location
    return SolvedAlignment(doc, alignment, stationing, profile, geom, hgeom)


def solve(
    doc: Document,
    alignment: str | None = None,
    profile: str | None = None,
    *,
    need_profile: bool = False,
) -> SolvedAlignment:
    """Choose one alignment (and profile) of a document by name and solve it.

    Parameters
    ----------
    doc : Document
        A read document (:func:`gradeline.read`).
    alignment, profile : str, optional
        Names; needed only when the document (alignment) has several.
    need_profile : bool
        Raise when the alignment has no profile (otherwise plan-only
        alignments are accepted).

    Examples
    --------
    >>> from gradeline.model import Alignment, Document, Profile, PVISpec, Units
    >>> prof = Profile("FG", (PVISpec(0.0, 100.0), PVISpec(500.0, 110.0, "parabolic",
    ...                       200.0, 200.0), PVISpec(1000.0, 105.0)))
    >>> doc = Document("x.xml", Units("foot"), (Alignment("Main", 0.0, 1000.0, profiles=(prof,)),))
    >>> road = solve(doc)
    >>> [k.text for k in road.key_points]
    ['START', 'BVC', 'PVI', 'HIGH', 'EVC', 'END']
    >>> float(road.elevation(500.0))  # 110 - A L / 800 = 110 - 3 * 400 / 800
    108.5
    """
    al = doc.alignment(alignment)
    prof = None
    if al.profiles or need_profile or profile is not None:
        prof = al.profile(profile)
    return solve_alignment(doc, al, prof, need_profile=need_profile)


def with_surface(solved: SolvedAlignment, surface: Surface) -> SolvedAlignment:
    """The same alignment with its ground sampled from a TIN surface.

    The ground profile is exact: the TIN's edge crossings along the alignment
    (see :func:`gradeline.geometry.ground.sample_alignment`).

    Raises
    ------
    InputError
        Units that differ from the alignment's, or no plan geometry to sample along.
    """
    from gradeline.geometry import ground as gr

    units = solved.document.units
    if surface.linear_unit is not None and surface.linear_unit != units.linear:
        src = surface.source or SourceRef(solved.document.path)
        raise InputError(
            f"surface units ({surface.linear_unit}) differ from the alignment's "
            f"({units.linear}); both files must share units and coordinate system",
            SourceRef(src.path),
            "Units",
        )
    if solved.horizontal is None:
        raise InputError(
            f"alignment {solved.alignment.name!r} has no CoordGeom to sample the surface along",
            solved.alignment.source,
            "Alignment",
        )
    index = gr.TriangleIndex(surface)
    stations, z = gr.sample_alignment(solved.horizontal, index, lo=solved.start, hi=solved.end)
    ground = gr.ground_profile(surface.name, stations, z, surface.source)
    alignment = replace(solved.alignment, grounds=(ground,))
    return replace(solved, alignment=alignment, surface=index)
