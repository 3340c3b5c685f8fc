"""Pick one alignment and profile from a document and solve it.

This is the library's front door for the commands: read a file, choose the
alignment and profile, solve the vertical geometry, and attach the stationing
used for labels. Errors keep the file and line of the offending element.
"""

from __future__ import annotations

import os
from dataclasses import dataclass

from converter import landxml, vertical
from converter.errors import InputError, ModelError
from converter.model import Alignment, Document, Profile
from converter.stations import Stationing
from converter.vertical import VerticalGeometry

__all__ = ["ProfileContext", "select", "solve_profile"]


@dataclass(frozen=True, eq=False)
class ProfileContext:
    """One solved profile with everything needed to label it."""

    document: Document
    alignment: Alignment
    profile: Profile
    geometry: VerticalGeometry
    stationing: Stationing


def solve_profile(doc: Document, alignment: Alignment, profile: Profile) -> ProfileContext:
    """Solve ``profile`` of ``alignment``; model errors become input errors."""
    stationing = Stationing(doc.units, alignment.equations)
    try:
        geom = vertical.solve(profile, label=stationing.label)
    except ModelError as err:
        raise InputError(err.message, err.source, err.element) from None
    return ProfileContext(doc, alignment, profile, geom, stationing)


def select(
    source: str | os.PathLike[str] | Document,
    alignment: str | None = None,
    profile: str | None = None,
) -> ProfileContext:
    """Read (if needed) and solve one profile.

    Parameters
    ----------
    source : path or Document
        LandXML file, or an already read document.
    alignment, profile : str, optional
        Names; required only when there are several.
    """
    doc = source if isinstance(source, Document) else landxml.read(source)
    al = doc.alignment(alignment)
    return solve_profile(doc, al, al.profile(profile))
