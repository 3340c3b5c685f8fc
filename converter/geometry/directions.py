"""Direction conventions of LandXML files and conversion of headings to them.

The schema says 0 = north but not which way angles turn; files differ, so the
convention is detected from the stated ``dir``/``dirStart``/``dirEnd`` values.
"""

from __future__ import annotations

import math
from typing import TYPE_CHECKING

import numpy as np
from numpy.typing import ArrayLike, NDArray

from gradeline.errors import ModelError
from gradeline.geometry.spirals import (
    TWO_PI,
)
from gradeline.model import (
    HIrregular,
    HorizontalAlignment,
)
from gradeline.model.units import angle_from_unit, angle_to_unit

if TYPE_CHECKING:
    from gradeline.geometry.horizontal import ElementGeom

__all__ = ["CONVENTIONS", "better_direction_unit", "direction_value", "wrap_angle"]


def wrap_angle(a: float) -> float:
    """Angle wrapped to [-pi, pi)."""
    return (a + math.pi) % TWO_PI - math.pi


#: Direction conventions a file may use for ``dir``/``dirStart``/``dirEnd``.
CONVENTIONS = {
    "ccw-north": "counter-clockwise from north",
    "cw-north": "clockwise from north (azimuth)",
    "ccw-east": "counter-clockwise from east",
}


def _stated_directions(horizontal: HorizontalAlignment, geoms: list[ElementGeom]):
    """(stated value in file unit, computed math heading) pairs."""
    by_index: dict[int, list[ElementGeom]] = {}
    for g in geoms:
        by_index.setdefault(g.index, []).append(g)
    pairs = []
    for index, el in enumerate(horizontal.elements):
        parts = by_index.get(index)
        if not parts:
            continue
        for name, heading in (
            ("dir", parts[0].heading0),
            ("dirStart", parts[0].heading0),
            ("dirEnd", parts[-1].heading1),
        ):
            value = el.get(name)
            if value is not None and not (isinstance(el, HIrregular) and len(parts) > 1):
                pairs.append((name, value, heading, index))
    return pairs


def direction_value(heading: ArrayLike, convention: str, unit: str) -> NDArray[np.float64]:
    """Math headings (radians) as directions in a file's convention and unit.

    Examples
    --------
    >>> float(direction_value(0.0, "ccw-north", "decimal degrees"))  # due east
    270.0
    >>> float(direction_value(0.0, "cw-north", "grads"))
    100.0
    """
    h = np.asarray(heading, dtype=np.float64)
    if convention == "ccw-north":
        d = h - np.pi / 2
    elif convention == "cw-north":
        d = np.pi / 2 - h
    elif convention == "ccw-east":
        d = h
    else:
        raise ModelError(f"unknown direction convention {convention!r}")
    d = np.mod(d, TWO_PI)
    d = np.where(np.isclose(d, TWO_PI, rtol=0, atol=1e-12), 0.0, d)
    if unit == "radians":
        return d
    return np.vectorize(lambda v: angle_to_unit(float(v), unit), otypes=[float])(d)


def _detect_convention(horizontal, geoms, unit) -> tuple[str, tuple[int, int]]:
    pairs = _stated_directions(horizontal, geoms)
    if not pairs:
        return "ccw-north", (0, 0)
    best, best_count = "ccw-north", -1
    for conv in CONVENTIONS:
        count = 0
        for _, value, heading, _ in pairs:
            computed = float(direction_value(heading, conv, "radians"))
            stated = angle_from_unit(value, unit)
            if abs(wrap_angle(stated - computed)) < 1e-4:
                count += 1
        if count > best_count:
            best, best_count = conv, count
    return best, (best_count, len(pairs))


def better_direction_unit(horizontal, geoms, unit: str) -> tuple[str, int, int] | None:
    """Another angular unit that the stated directions fit clearly better, if any.

    Returns (unit, matches, stated) when some unit other than ``unit`` matches
    at least half of the stated directions and at least two more than ``unit``
    does (in its best convention); None otherwise. A file whose units element
    lacks ``directionUnit`` defaults to radians by the schema, and files in
    degrees or grads then show up here.
    """
    from gradeline.model.units import ANGLE_UNITS

    pairs = _stated_directions(horizontal, geoms)
    if not pairs:
        return None
    _, (own, total) = _detect_convention(horizontal, geoms, unit)
    best: tuple[str, int, int] | None = None
    for other in ANGLE_UNITS:
        if other == unit:
            continue
        _, (count, _) = _detect_convention(horizontal, geoms, other)
        if count >= max(own + 2, (total + 1) // 2) and (best is None or count > best[1]):
            best = (other, count, total)
    return best
