"""Where model objects came from, and the guard on every number they hold."""

from __future__ import annotations

import math
from dataclasses import dataclass

from gradeline.errors import ModelError

__all__ = ["MAX_MAGNITUDE", "SourceRef"]


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
        raise ModelError(
            f"{what} {value:g} is not a plausible survey value (at most {MAX_MAGNITUDE:g} in size)",
            source,
            element,
        )
