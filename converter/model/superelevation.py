"""Superelevation transitions (LandXML ``Superelevation``), as stated in a file."""

from __future__ import annotations

from dataclasses import dataclass, field

from gradeline.errors import ModelError
from gradeline.model.base import SourceRef, _finite

__all__ = ["STATION_FIELDS", "Superelevation"]

#: The stations of a transition in travel order, with their LandXML element names.
STATION_FIELDS = (
    ("begin_runout", "BeginRunoutSta"),
    ("begin_runoff", "BeginRunoffSta"),
    ("full_super", "FullSuperSta"),
    ("end_full", "RunoffSta"),
    ("end_runoff", "StartofRunoutSta"),
    ("end_runout", "EndofRunoutSta"),
)


@dataclass(frozen=True, slots=True)
class Superelevation:
    """One curve's superelevation: where it changes and the full rate.

    Stations are internal stations, in travel order: the normal crown starts to
    rotate (``begin_runout``), the outside lane is level (``begin_runoff``), the
    full rate is reached (``full_super``) and held to ``end_full``, then the exit
    mirrors it (``end_runoff``: outside lane level again, ``end_runout``: normal
    crown back). Any may be missing (None). ``rate`` is the full rate as a ratio
    (0.06 for 6 %), unsigned: it banks toward the inside of the curve it lies on.
    ``sta_start``/``sta_end`` are the element's own attributes (None if absent).
    """

    rate: float
    begin_runout: float | None = None
    begin_runoff: float | None = None
    full_super: float | None = None
    end_full: float | None = None
    end_runoff: float | None = None
    end_runout: float | None = None
    sta_start: float | None = None
    sta_end: float | None = None
    adverse: str | None = None
    source: SourceRef | None = field(default=None, compare=False)

    def __post_init__(self) -> None:
        _finite(self.rate, "FullSuperelev", self.source, "Superelevation")
        if not 0.0 <= self.rate < 1.0:
            raise ModelError(
                f"a full superelevation rate of {100 * self.rate:g} % is not a road's",
                self.source,
                "Superelevation",
            )
        known = [(name, getattr(self, name)) for name, _ in STATION_FIELDS]
        for name, value in known:
            if value is not None:
                _finite(value, name, self.source, "Superelevation")
        given = [(n, v) for n, v in known if v is not None]
        for (n0, v0), (n1, v1) in zip(given, given[1:], strict=False):
            if v1 < v0:
                tag0 = dict(STATION_FIELDS)[n0]
                tag1 = dict(STATION_FIELDS)[n1]
                raise ModelError(
                    f"{tag1} {v1:g} lies before {tag0} {v0:g}: the stations of a "
                    "superelevation run in travel order",
                    self.source,
                    "Superelevation",
                )

    def stations(self) -> tuple[tuple[str, float], ...]:
        """(LandXML element name, station) of every station given, in travel order."""
        return tuple(
            (tag, v) for name, tag in STATION_FIELDS if (v := getattr(self, name)) is not None
        )

    @property
    def first(self) -> float | None:
        """The first station the transition touches."""
        s = self.stations()
        return s[0][1] if s else self.sta_start

    @property
    def last(self) -> float | None:
        """The last station the transition touches."""
        s = self.stations()
        return s[-1][1] if s else self.sta_end
