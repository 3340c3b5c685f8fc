"""Finished-grade profiles: PVIs and the vertical curves on them (``ProfAlign``)."""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Literal

from gradeline.errors import ModelError
from gradeline.model.base import SourceRef, _finite

__all__ = ["CurveKind", "PVISpec", "Profile"]


CurveKind = Literal["none", "parabolic", "unsymmetric", "circular"]
_KINDS = ("none", "parabolic", "unsymmetric", "circular")


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
