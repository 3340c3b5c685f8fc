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

__all__ = ["AlignmentContext", "attach_surface", "ground_at", "select", "solve_alignment"]


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


def attach_surface(ctx: AlignmentContext, ground: str | os.PathLike[str] | None,
                   surface: str | None):
    """Sample a TIN surface along the alignment and make it the context's ground.

    ``ground`` is the terrain file (default: the alignment's own file). Returns
    the new context and the :class:`~converter.ground.TriangleIndex`, which
    gives the exact ground at any station.

    Raises
    ------
    InputError
        Unreadable surface, units that differ from the alignment's, or no plan
        geometry to sample along.
    """
    from dataclasses import replace

    from converter import ground as gr
    from converter.model import SourceRef

    path = os.fspath(ground) if ground is not None else ctx.document.path
    surf = landxml.read_surface(path, surface)
    if surf.linear_unit is not None and surf.linear_unit != ctx.document.units.linear:
        raise InputError(
            f"surface units ({surf.linear_unit}) differ from the alignment's "
            f"({ctx.document.units.linear}); both files must share units and coordinate system",
            SourceRef(path), "Units")
    if ctx.horizontal is None:
        raise InputError(f"alignment {ctx.alignment.name!r} has no CoordGeom to sample the "
                         "surface along", ctx.alignment.source, "Alignment")
    index = gr.TriangleIndex(surf)
    lo, hi = ctx.start, ctx.end
    stations, z = gr.sample_alignment(ctx.horizontal, index, lo=lo, hi=hi)
    profile = gr.ground_profile(surf.name, stations, z, surf.source)
    alignment = replace(ctx.alignment, grounds=(profile,))
    return replace(ctx, alignment=alignment), index


def ground_at(ctx: AlignmentContext, index, stations):
    """Exact TIN ground at internal stations (NaN off the surface)."""
    import numpy as np

    from converter import ground as gr

    s = np.asarray(stations, dtype=np.float64)
    assert ctx.horizontal is not None
    n, e, _ = horizontal.evaluate(ctx.horizontal, s)
    return gr.interpolate(index, e, n)
