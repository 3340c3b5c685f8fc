"""Drafting layout numbers: scales, text heights, grid steps, layer names.

One place for every number that decides how a drawing looks, used by the DXF
writer and the PDF sheets alike. Model-space lengths are in file units; a
profile's y is ``(elevation - datum) * exaggeration``.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field, replace

from gradeline.errors import UsageError
from gradeline.model.units import Units
from gradeline.present.roles import LAYER_ROLES

__all__ = ["MAX_DRAWN_LINES", "DraftingLayout", "default_layout", "guard_count"]

#: Most grid lines, ticks, sheets or table rows one command will produce: far
#: beyond any real alignment (a 50-mile profile has about 5,300 minor grid lines),
#: and a stop for absurd lengths in broken files before they exhaust memory.
MAX_DRAWN_LINES = 200_000


#: Most PVIs of a profile gradeline drafts (a designed road's profile has hundreds;
#: more is a survey of points read as PVIs, and every sheet would label them all).
MAX_DRAWN_PVIS = 20_000


def guard_count(count: float, what: str, hint: str = "") -> None:
    """Refuse work that would produce more than :data:`MAX_DRAWN_LINES` items."""
    if not count <= MAX_DRAWN_LINES:
        raise UsageError(
            f"{what}: {count:,.0f} would be needed (at most {MAX_DRAWN_LINES:,}); "
            + (hint or "is a length in the file wrong?")
        )


def check_layer_name(role: str, name: object) -> None:
    """Refuse a layer name DXF cannot hold: text of 1 to 255 characters, no control
    characters, none of the characters ezdxf's table-name validator refuses.

    Examples
    --------
    >>> check_layer_name("grade", "C-ROAD-PROF")
    >>> check_layer_name("grade", "A/B")
    Traceback (most recent call last):
    gradeline.errors.UsageError: layer name for grade 'A/B' holds a character DXF does not allow
    """
    from ezdxf.lldxf.validator import is_valid_layer_name

    if not isinstance(name, str):
        raise UsageError(f"layer name for {role} must be text, got {name!r}"[:200])
    if not 1 <= len(name) <= 255 or name != name.strip():
        raise UsageError(
            f"layer name for {role} must be 1 to 255 characters without leading or "
            f"trailing spaces, got {name[:60]!r}"
        )
    if any(ord(ch) < 32 or ord(ch) == 127 for ch in name) or not is_valid_layer_name(name):
        raise UsageError(
            f"layer name for {role} {name[:60]!r} holds a character DXF does not allow"
        )


@dataclass(frozen=True, slots=True)
class DraftingLayout:
    """How a profile and plan are drafted.

    Parameters
    ----------
    scale : float
        Horizontal plot scale as file units per paper unit: 50 means 1" = 50 ft
        (US customary, paper measured in inches); 500 means 1:500 (metric, paper
        measured in metres).
    paper_m : float
        One paper unit in metres (0.0254 for inches, 1.0 for metres).
    exaggeration : float
        Vertical exaggeration of the profile (10 is common practice).
    text_paper : float
        Plotted text height in paper units (0.10 in; 0.0025 m).
    """

    scale: float
    paper_m: float
    exaggeration: float = 10.0
    text_paper: float = 0.10
    station_major: float = 100.0
    station_minor: float = 50.0
    plan_tick: float = 100.0
    chord_tolerance: float = 0.005
    layers: dict[str, str] = field(default_factory=lambda: dict(LAYER_ROLES))

    def __post_init__(self) -> None:
        for name in ("scale", "exaggeration"):
            value = getattr(self, name)
            if not (math.isfinite(value) and value > 0):
                raise UsageError(f"{name} must be a positive number, got {value:g}")

    @property
    def text_height(self) -> float:
        """Text height in model units (file units)."""
        return self.text_paper * self.scale

    def elevation_steps(self) -> tuple[float, float]:
        """(major, minor) elevation grid steps in elevation units.

        Major lines are at least 12.7 mm (0.5 in) apart on paper when
        exaggerated, on a 1-2-5 sequence; minor lines divide a major step in five.
        """
        per_unit_m = self.exaggeration / self.scale * self.paper_m  # paper metres per unit
        want = 0.0127 / per_unit_m
        exp = math.floor(math.log10(want))
        major = next(m * 10**exp for m in (1, 2, 5, 10) if m * 10**exp >= want - 1e-12)
        major = float(round(major, 10))
        return major, major / 5.0

    def layer(self, role: str) -> str:
        """Layer name of a drawing role."""
        return self.layers.get(role, LAYER_ROLES[role])

    def with_layers(self, names: dict[str, str]) -> DraftingLayout:
        """A copy with some layers renamed; unknown roles are refused by name."""
        unknown = sorted(str(k) for k in set(names) - set(LAYER_ROLES))
        if unknown:
            raise UsageError(
                f"unknown layer role {unknown[0]!r}"[:120] + "; roles: " + ", ".join(LAYER_ROLES)
            )
        for role, name in names.items():
            check_layer_name(role, name)
        merged = dict(self.layers)
        merged.update(names)
        seen: dict[str, str] = {}
        for role, name in merged.items():
            other = seen.setdefault(name.casefold(), role)
            if other != role:
                raise UsageError(
                    f"layer name {name!r} is given to both {other} and {role}: each role "
                    "needs its own layer"
                )
        return replace(self, layers=merged)


def default_layout(
    units: Units, scale: float | None = None, exaggeration: float = 10.0
) -> DraftingLayout:
    """Common-practice defaults: 1" = 50' with 100-ft stations, or 1:500 with 20-m ticks.

    Examples
    --------
    >>> lay = default_layout(Units("foot"))
    >>> lay.text_height, lay.elevation_steps()
    (5.0, (5.0, 1.0))
    >>> default_layout(Units("meter")).text_height
    1.25
    """
    sc = scale or units.defaults.plot_scale
    if units.metric:
        return DraftingLayout(
            scale=sc,
            paper_m=1.0,
            exaggeration=exaggeration,
            text_paper=0.0025,
            station_major=20.0 if sc <= 500 else 50.0,
            station_minor=10.0 if sc <= 500 else 25.0,
            plan_tick=20.0,
            chord_tolerance=0.002,
        )
    return DraftingLayout(
        scale=sc,
        paper_m=0.0254,
        exaggeration=exaggeration,
        text_paper=0.10,
        station_major=100.0 if sc >= 40 else 50.0,
        station_minor=50.0 if sc >= 40 else 10.0,
        plan_tick=100.0,
        chord_tolerance=0.005,
    )
