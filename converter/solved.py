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
from gradeline.model import Alignment, Document, Profile, SourceRef, Surface, Units

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
        """First station covered by the plan or the profile, whichever starts first.

        Ends that agree within rounding (see :meth:`Stationing.end_tolerance`)
        are one end, at the profile's station (the one its elevations belong to).
        """
        return self._span[0]

    @property
    def end(self) -> float:
        """Last station covered by the plan or the profile, whichever ends last."""
        return self._span[1]

    @cached_property
    def tolerance(self) -> float:
        """How close to an end a station counts as on it (:meth:`Stationing.end_tolerance`)."""
        parts = [p for p in (self.geometry, self.horizontal) if p is not None]
        assert parts, "a solved alignment has a plan or a profile"
        lo, hi = min(p.start for p in parts), max(p.end for p in parts)
        return self.stationing.end_tolerance(lo, hi)

    @cached_property
    def _span(self) -> tuple[float, float]:
        g, h = self.geometry, self.horizontal
        if g is None or h is None:
            geom = g if g is not None else h
            assert geom is not None, "a solved alignment has a plan or a profile"
            return geom.start, geom.end
        tol = self.tolerance
        lo = g.start if abs(g.start - h.start) <= tol else min(g.start, h.start)
        hi = g.end if abs(g.end - h.end) <= tol else max(g.end, h.end)
        return lo, hi

    @property
    def extents_differ(self) -> bool:
        """True when plan and profile both exist and their ends differ beyond rounding."""
        if self.geometry is None or self.horizontal is None:
            return False
        g, h = self.geometry, self.horizontal
        tol = self.stationing.end_tolerance(min(g.start, h.start), max(g.end, h.end))
        return (
            abs(self.geometry.start - self.horizontal.start) > tol
            or abs(self.geometry.end - self.horizontal.end) > tol
        )

    def on_profile(self, stations: ArrayLike) -> NDArray[np.bool_]:
        """Which internal stations the profile covers (within the end tolerance)."""
        return self._covers(self.geometry, stations)

    def on_plan(self, stations: ArrayLike) -> NDArray[np.bool_]:
        """Which internal stations the plan covers (within the end tolerance)."""
        return self._covers(self.horizontal, stations)

    def _covers(
        self, part: VerticalGeometry | HorizontalGeometry | None, stations: ArrayLike
    ) -> NDArray[np.bool_]:
        s = np.asarray(stations, dtype=np.float64)
        if part is None:
            return np.zeros(s.shape, dtype=bool)
        return (s >= part.start - self.tolerance) & (s <= part.end + self.tolerance)

    @property
    def units(self) -> Units:
        """The document's units."""
        return self.document.units

    # -- computed once -------------------------------------------------------
    @cached_property
    def curves(self) -> tuple[HorizontalCurve, ...]:
        """Curve data of every horizontal curve (empty without plan geometry)."""
        return curve_data(self.horizontal) if self.horizontal is not None else ()

    @cached_property
    def ground_arrays(
        self,
    ) -> tuple[tuple[tuple[NDArray[np.float64], NDArray[np.float64]], ...], ...]:
        """Stations and elevations of each piece of each ground profile, as read-only
        arrays (for drawing every sheet's window without converting them again)."""
        out = []
        for gr in self.alignment.grounds:
            pieces = []
            for piece in gr.pieces:
                s, z = np.array(piece.stations), np.array(piece.elevations)
                s.flags.writeable = z.flags.writeable = False
                pieces.append((s, z))
            out.append(tuple(pieces))
        return tuple(out)

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
        lo, hi = self.start, self.end
        tol = self.tolerance
        for station, tag in self.plan_key_points:  # plan ends within rounding of the span's
            if abs(station - lo) <= tol:
                station = lo
            elif abs(station - hi) <= tol:
                station = hi
            found.append((station, tag))
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
    def _snap(self, stations: ArrayLike, lo: float, hi: float) -> ArrayLike:
        """Stations within the end tolerance of [lo, hi] moved onto the end."""
        s = np.asarray(stations, dtype=np.float64)
        tol = self.tolerance
        near_lo = (s < lo) & (s >= lo - tol)
        near_hi = (s > hi) & (s <= hi + tol)
        if not (near_lo.any() or near_hi.any()):
            return stations
        return np.where(near_lo, lo, np.where(near_hi, hi, s))

    def plan_at(self, stations: ArrayLike) -> tuple[NDArray[np.float64], ...]:
        """(northing, easting, heading) at internal stations; NaN beyond the plan."""
        if self.horizontal is None:
            raise ValueError("the alignment has no plan geometry")
        hz = self.horizontal
        return horizontal.evaluate(hz, self._snap(stations, hz.start, hz.end))

    def _profile_stations(self, stations: ArrayLike) -> ArrayLike:
        if self.geometry is None:
            raise ValueError("the alignment has no profile")
        return self._snap(stations, self.geometry.start, self.geometry.end)

    def profile_at(self, stations: ArrayLike) -> tuple[NDArray[np.float64], NDArray[np.float64]]:
        """(elevation, grade as a ratio) at internal stations; NaN beyond the profile."""
        s = self._profile_stations(stations)
        assert self.geometry is not None
        return vertical.evaluate(self.geometry, s)

    def elevation(self, stations: ArrayLike) -> NDArray[np.float64]:
        """Finished-grade elevation at internal stations (NaN outside the profile)."""
        s = self._profile_stations(stations)
        assert self.geometry is not None
        return vertical.elevation(self.geometry, s)

    def tangent_elevation(self, stations: ArrayLike) -> NDArray[np.float64]:
        """Elevation on the grade lines through the PVIs (curves left out)."""
        s = self._profile_stations(stations)
        assert self.geometry is not None
        return vertical.tangent_elevation(self.geometry, s)

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


def with_surface(
    solved: SolvedAlignment, surface: Surface, index: TriangleIndex | None = None
) -> SolvedAlignment:
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
    if index is None:
        index = gr.TriangleIndex(surface)
    hz = solved.horizontal  # the ground lies along the plan: sample where the plan is
    lo, hi = max(solved.start, hz.start), min(solved.end, hz.end)
    stations, z = gr.sample_alignment(hz, index, lo=lo, hi=hi)
    ground = gr.ground_profile(surface.name, stations, z, surface.source)
    alignment = replace(solved.alignment, grounds=(ground,))
    return replace(solved, alignment=alignment, surface=index)
