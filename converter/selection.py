"""Pick one alignment (and profile) from a document and solve it.

This is the library's front door for the commands: read a file, choose the
alignment and profile, solve the horizontal and vertical geometry, and attach
the stationing used for labels. Errors keep the file and line of the offending
element.
"""

from __future__ import annotations

import os
from dataclasses import dataclass

from converter import horizontal, landxml, vertical
from converter.errors import InputError, ModelError
from converter.horizontal import HorizontalGeometry
from converter.model import Alignment, Document, Profile
from converter.stations import Stationing
from converter.vertical import VerticalGeometry

__all__ = ["AlignmentContext", "select", "solve_alignment"]


@dataclass(frozen=True, eq=False)
class AlignmentContext:
    """One solved alignment: its horizontal geometry and one profile, if present."""

    document: Document
    alignment: Alignment
    stationing: Stationing
    profile: Profile | None
    geometry: VerticalGeometry | None
    horizontal: HorizontalGeometry | None

    @property
    def start(self) -> float:
        """First station covered (profile if present, else horizontal)."""
        if self.geometry is not None:
            return self.geometry.start
        assert self.horizontal is not None
        return self.horizontal.start

    @property
    def end(self) -> float:
        """Last station covered (profile if present, else horizontal)."""
        if self.geometry is not None:
            return self.geometry.end
        assert self.horizontal is not None
        return self.horizontal.end


def _located(err: ModelError) -> InputError:
    return InputError(err.message, err.source, err.element)


def solve_alignment(
    doc: Document,
    alignment: Alignment,
    profile: Profile | None,
    *,
    need_profile: bool = True,
) -> AlignmentContext:
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
    return AlignmentContext(doc, alignment, stationing, profile, geom, hgeom)


def select(
    source: str | os.PathLike[str] | Document,
    alignment: str | None = None,
    profile: str | None = None,
    *,
    need_profile: bool = False,
) -> AlignmentContext:
    """Read (if needed) and solve one alignment and its profile.

    Parameters
    ----------
    source : path or Document
        LandXML file, or an already read document.
    alignment, profile : str, optional
        Names; required only when there are several.
    need_profile : bool
        Raise when the alignment has no profile (otherwise horizontal-only
        alignments are accepted).
    """
    doc = source if isinstance(source, Document) else landxml.read(source)
    al = doc.alignment(alignment)
    prof = None
    if al.profiles or need_profile or profile is not None:
        prof = al.profile(profile)
    return solve_alignment(doc, al, prof, need_profile=need_profile)
