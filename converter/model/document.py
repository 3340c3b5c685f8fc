"""Documents, alignments and station equations."""

from __future__ import annotations

from dataclasses import dataclass, field

from gradeline.errors import InputError, ModelError
from gradeline.model.base import Broken, Notice, SourceRef, _finite
from gradeline.model.plan import HorizontalAlignment
from gradeline.model.profile import Profile
from gradeline.model.superelevation import Superelevation
from gradeline.model.surface import GroundProfile
from gradeline.model.units import Units

__all__ = ["Alignment", "Document", "StationEquation"]


@dataclass(frozen=True, slots=True)
class StationEquation:
    """A station equation (``StaEquation``).

    Parameters
    ----------
    back : float
        Labelled station back (before the equation).
    ahead : float
        Labelled station ahead (from the equation on).
    internal : float
        Internal (continuous) station where the equation sits.
    """

    back: float
    ahead: float
    internal: float
    source: SourceRef | None = field(default=None, compare=False)

    def __post_init__(self) -> None:
        for value, what in ((self.back, "staBack"), (self.ahead, "staAhead")):
            _finite(value, what, self.source, "StaEquation")
        _finite(self.internal, "staInternal", self.source, "StaEquation")


@dataclass(frozen=True, slots=True)
class Alignment:
    """One ``Alignment``: stationing, profiles and ground profiles.

    ``horizontal`` is filled by the horizontal-geometry reader when the file
    has ``CoordGeom``; it is ``None`` otherwise.
    """

    name: str
    sta_start: float = 0.0
    length: float | None = None
    description: str = ""
    profiles: tuple[Profile, ...] = ()
    grounds: tuple[GroundProfile, ...] = ()
    equations: tuple[StationEquation, ...] = ()
    horizontal: HorizontalAlignment | None = None
    source: SourceRef | None = field(default=None, compare=False)
    #: ProfAlign elements that could not be read (the others read on).
    broken_profiles: tuple[Broken, ...] = field(default=(), compare=False)
    #: superelevation transitions, in station order
    superelevations: tuple[Superelevation, ...] = ()

    def __post_init__(self) -> None:
        _finite(self.sta_start, "staStart", self.source, "Alignment")
        internals = [eq.internal for eq in self.equations]
        if internals != sorted(internals) or len(set(internals)) != len(internals):
            bad = next(
                eq
                for eq, prev in zip(self.equations[1:], self.equations, strict=False)
                if not eq.internal > prev.internal
            )
            raise ModelError(
                "station equations must be in increasing staInternal order",
                bad.source,
                "StaEquation",
            )

    def profile(self, name: str | None = None) -> Profile:
        """Return the profile called ``name``, or the only one when ``name`` is None.

        Raises
        ------
        InputError
            No profile, several without a name given, or no such name.
        """
        for bad in self.broken_profiles:
            if name == bad.name or (
                name is None and not self.profiles and len(self.broken_profiles) == 1
            ):
                raise bad.error
        if not self.profiles:
            raise InputError(
                f"alignment {self.name!r} has no finished-grade profile (ProfAlign)",
                self.source,
                "Alignment",
            )
        if name is None:
            if len(self.profiles) > 1:
                raise InputError(
                    f"alignment {self.name!r} has {len(self.profiles)} profiles; choose "
                    "one: " + ", ".join(p.name for p in self.profiles),
                    self.source,
                    "Alignment",
                    choice="profile",
                )
            return self.profiles[0]
        for prof in self.profiles:
            if prof.name == name:
                return prof
        raise InputError(
            f"no profile named {name!r} in alignment {self.name!r}; profiles: "
            + ", ".join(p.name for p in self.profiles),
            self.source,
            "Alignment",
        )


@dataclass(frozen=True, slots=True)
class Document:
    """A whole LandXML document as far as gradeline reads it."""

    path: str
    units: Units
    alignments: tuple[Alignment, ...]
    project: str = ""
    source: SourceRef | None = field(default=None, compare=False)
    #: Alignments that could not be read, each with its error (the others read on).
    broken: tuple[Broken, ...] = field(default=(), compare=False)
    #: What the reader tolerated, defaulted or merged (shown as warnings).
    notices: tuple[Notice, ...] = field(default=(), compare=False)
    #: True when the file holds TIN surfaces (or points) but no alignment at all.
    has_surfaces: bool = field(default=False, compare=False)

    @property
    def names(self) -> list[str]:
        """Names of every alignment in file order, readable or not."""
        return [a.name for a in self.alignments] + [b.name for b in self.broken]

    def alignment(self, name: str | None = None) -> Alignment:
        """Return the alignment called ``name``, or the only one when ``name`` is None.

        Raises
        ------
        InputError
            No alignment, several without a name given, or no such name.
        """
        src = self.source or SourceRef(self.path, 1)
        names = self.names
        if not names:
            what = " (it holds terrain only)" if self.has_surfaces else ""
            raise InputError(f"the file has no alignments{what}", src, "Alignments")
        if name is None:
            if len(names) > 1:
                raise InputError(
                    f"the file has {len(names)} alignments; choose one: " + ", ".join(names),
                    src,
                    "Alignments",
                    choice="alignment",
                )
            name = names[0]
        for al in self.alignments:
            if al.name == name:
                return al
        for bad in self.broken:
            if bad.name == name:
                raise bad.error
        raise InputError(
            f"no alignment named {name!r}; alignments: " + ", ".join(names),
            src,
            "Alignments",
        )
