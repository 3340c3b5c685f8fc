"""Linear and angular units named in a LandXML ``Units`` element.

Internally gradeline keeps lengths in the file's own linear unit and angles in
radians. This module converts at the edges.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from gradeline.errors import ModelError

__all__ = [
    "ANGLE_UNITS",
    "LINEAR_UNITS",
    "UNIT_DEFAULTS",
    "UnitDefaults",
    "Units",
    "angle_from_unit",
    "angle_to_unit",
]

#: metres per unit (common practice; US survey foot = 1200/3937 m by its 1893
#: definition, international foot = 0.3048 m exactly by the 1959 agreement).
LINEAR_UNITS: dict[str, float] = {
    "foot": 0.3048,
    "internationalFoot": 0.3048,
    "USSurveyFoot": 1200.0 / 3937.0,
    "meter": 1.0,
}

#: Angular units LandXML 1.2 lists for ``angularUnit`` and ``directionUnit``.
ANGLE_UNITS = ("radians", "grads", "decimal degrees", "decimal dd.mm.ss")

_METRIC = {"meter"}


def _dms_to_degrees(value: float) -> float:
    """Convert a packed ``dd.mmss`` number to decimal degrees."""
    sign = -1.0 if value < 0 else 1.0
    v = abs(value)
    deg = math.floor(v + 1e-12)
    rest = (v - deg) * 100.0
    minutes = math.floor(rest + 1e-9)
    seconds = (rest - minutes) * 100.0
    return sign * (deg + minutes / 60.0 + seconds / 3600.0)


def _degrees_to_dms(value: float) -> float:
    """Convert decimal degrees to a packed ``dd.mmss`` number."""
    sign = -1.0 if value < 0 else 1.0
    v = abs(value)
    deg = math.floor(v)
    minutes_f = (v - deg) * 60.0
    minutes = math.floor(minutes_f + 1e-12)
    seconds = (minutes_f - minutes) * 60.0
    return sign * (deg + minutes / 100.0 + seconds / 10000.0)


def angle_from_unit(value: float, unit: str) -> float:
    """Convert an angle written in ``unit`` to radians.

    Examples
    --------
    >>> round(angle_from_unit(100.0, "grads"), 12) == round(math.pi / 2, 12)
    True
    >>> round(math.degrees(angle_from_unit(12.3045, "decimal dd.mm.ss")), 6)
    12.5125
    """
    if unit == "radians":
        return value
    if unit == "grads":
        return value * math.pi / 200.0
    if unit == "decimal degrees":
        return math.radians(value)
    if unit == "decimal dd.mm.ss":
        return math.radians(_dms_to_degrees(value))
    raise ModelError(f"unknown angular unit {unit!r}; expected one of {', '.join(ANGLE_UNITS)}")


def angle_to_unit(value_rad: float, unit: str) -> float:
    """Convert an angle in radians to ``unit``.

    Examples
    --------
    >>> angle_to_unit(math.pi, "grads")
    200.0
    """
    if unit == "radians":
        return value_rad
    if unit == "grads":
        return value_rad * 200.0 / math.pi
    if unit == "decimal degrees":
        return math.degrees(value_rad)
    if unit == "decimal dd.mm.ss":
        return _degrees_to_dms(math.degrees(value_rad))
    raise ModelError(f"unknown angular unit {unit!r}; expected one of {', '.join(ANGLE_UNITS)}")


@dataclass(frozen=True, slots=True)
class Units:
    """Units of one LandXML document.

    Parameters
    ----------
    linear : str
        ``foot``, ``USSurveyFoot``, ``internationalFoot`` or ``meter``.
    angular : str
        Unit of angles such as ``delta`` (see :data:`ANGLE_UNITS`).
    direction : str
        Unit of directions such as ``dir``.
    """

    linear: str = "meter"
    angular: str = "decimal degrees"
    direction: str = "decimal degrees"

    def __post_init__(self) -> None:
        if self.linear not in LINEAR_UNITS:
            raise ModelError(
                f"unsupported linear unit {self.linear!r}; expected one of "
                + ", ".join(LINEAR_UNITS)
            )
        for unit in (self.angular, self.direction):
            if unit not in ANGLE_UNITS:
                raise ModelError(
                    f"unsupported angular unit {unit!r}; expected one of " + ", ".join(ANGLE_UNITS)
                )

    @property
    def metric(self) -> bool:
        """True for metric files (1000-m stations), False for US customary."""
        return self.linear in _METRIC

    @property
    def meters_per_unit(self) -> float:
        """Length of one file unit in metres."""
        return LINEAR_UNITS[self.linear]

    @property
    def symbol(self) -> str:
        """Short unit symbol used in labels: ``ft`` or ``m``."""
        return "m" if self.metric else "ft"

    @property
    def station_length(self) -> float:
        """Length of one full station: 100 ft or 1000 m (common practice)."""
        return 1000.0 if self.metric else 100.0

    @property
    def defaults(self) -> UnitDefaults:
        """The unit-dependent defaults of every command (:data:`UNIT_DEFAULTS`)."""
        return UNIT_DEFAULTS[self.metric]


@dataclass(frozen=True, slots=True)
class UnitDefaults:
    """Defaults that depend on whether a file is in feet or metres (common practice).

    The one table every command takes its unit-dependent defaults from.
    """

    sheet_size: str  # paper of the PDF sheets
    plot_scale: float  # 1" = S ft, or 1:S
    table_interval: float  # station table rows on sheets and in build
    sight_step: float  # station step of the sight-distance run
    fit_window: float  # length over which fit detects bends
    speed_unit: str  # unit of a design speed given without one
    symbol: str  # short length unit
    station_tolerance: float = 0.01  # stations this close count as one (superelevation)


#: ``UNIT_DEFAULTS[metric]``: US customary (False) and metric (True).
UNIT_DEFAULTS: dict[bool, UnitDefaults] = {
    False: UnitDefaults("ansi-d", 50.0, 50.0, 10.0, 80.0, "mph", "ft"),
    True: UnitDefaults("iso-a1", 500.0, 20.0, 5.0, 24.0, "kmh", "m", 0.005),
}
