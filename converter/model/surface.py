"""Existing ground: profiles along an alignment (``ProfSurf``) and TIN surfaces."""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np
from numpy.typing import NDArray

from gradeline.errors import ModelError
from gradeline.model.base import SourceRef

__all__ = ["GroundPiece", "GroundProfile", "Surface"]


@dataclass(frozen=True, slots=True)
class GroundPiece:
    """A run of existing-ground points (one ``PntList2D``)."""

    stations: tuple[float, ...]
    elevations: tuple[float, ...]
    source: SourceRef | None = field(default=None, compare=False)

    def __post_init__(self) -> None:
        if len(self.stations) != len(self.elevations):
            raise ModelError("stations and elevations differ in count", self.source, "PntList2D")
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


@dataclass(frozen=True, eq=False)
class Surface:
    """A TIN surface: points and faces (indices into the point arrays)."""

    name: str
    ids: NDArray[np.int64]
    x: NDArray[np.float64]
    y: NDArray[np.float64]
    z: NDArray[np.float64]
    faces: NDArray[np.int64]
    hidden: NDArray[np.bool_]
    source: SourceRef | None = field(default=None, compare=False)
    linear_unit: str | None = None
    skipped_faces: int = 0

    @property
    def visible(self) -> NDArray[np.int64]:
        """Faces that carry surface (invisible faces are holes)."""
        return self.faces[~self.hidden]
