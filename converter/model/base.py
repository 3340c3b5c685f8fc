"""Where model objects came from, and the guard on every number they hold."""

from __future__ import annotations

import math
from dataclasses import dataclass

from gradeline.errors import ModelError

__all__ = ["MAX_MAGNITUDE", "Broken", "Notice", "SourceRef"]


@dataclass(frozen=True, slots=True)
class SourceRef:
    """Where a model object came from: file path and 1-based line."""

    path: str
    line: int | None = None


@dataclass(frozen=True, slots=True)
class Notice:
    """Something the reader tolerated, defaulted or merged: shown as a warning.

    ``kind`` groups notices for reports: ``default`` (a schema default was
    applied), ``merged`` (an exact duplicate was dropped), ``spelling`` (a unit
    name written another way), ``units`` (stated values fit another unit).
    """

    kind: str
    message: str
    source: SourceRef | None = None
    element: str = ""


@dataclass(frozen=True, slots=True)
class Broken:
    """A part of the file (an alignment or a profile) that could not be read.

    The rest of the file reads on; asking for this part raises ``error``.
    """

    name: str
    error: Exception


#: Largest magnitude accepted for any coordinate, station or elevation: far
#: beyond any survey (1e12 m is seven times the distance to the Sun), small
#: enough that squares and products stay finite.
MAX_MAGNITUDE = 1e12


def _finite(value: float, what: str, source: SourceRef | None, element: str) -> None:
    if not math.isfinite(value):
        raise ModelError(f"{what} must be a finite number, got {value!r}", source, element)
    if abs(value) > MAX_MAGNITUDE:
        raise ModelError(
            f"{what} {value:g} is not a plausible survey value (at most {MAX_MAGNITUDE:g} in size)",
            source,
            element,
        )
