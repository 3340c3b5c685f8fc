"""Text of every number gradeline shows to people or writes to tables.

One place for each format: DXF labels, PDF sheets, text reports and CSV/JSON
cells all call these functions, so the same value prints the same everywhere.
"""

from __future__ import annotations

import math

from converter.units import Units

__all__ = [
    "DATA_DECIMALS",
    "data_number",
    "elevation_text",
    "grade_text",
    "k_text",
    "length_text",
]

#: Decimals of numbers in CSV/JSON: far below any survey precision, and enough
#: to make float noise (1e-12) disappear so outputs are stable.
DATA_DECIMALS = 6


def data_number(value: float | None) -> float | None:
    """Round a value for CSV/JSON; None and NaN become None.

    Examples
    --------
    >>> data_number(121.00000000000001), data_number(-0.0000001), data_number(float("nan"))
    (121.0, 0.0, None)
    """
    if value is None or not math.isfinite(value):
        return None
    out = round(float(value), DATA_DECIMALS)
    return 0.0 if out == 0 else out


def length_text(value: float, units: Units) -> str:
    """Lengths and elevations: 2 decimals in feet, 3 in metres (common practice).

    Examples
    --------
    >>> length_text(121.0, Units("foot")), length_text(121.0, Units("meter"))
    ('121.00', '121.000')
    """
    return f"{value:.{3 if units.metric else 2}f}"


def elevation_text(value: float, units: Units) -> str:
    """Elevation label text, e.g. ``EL 121.00``-free form ``121.00``."""
    return length_text(value, units)


def grade_text(grade: float) -> str:
    """A grade (ratio) as signed percent with three decimals.

    Examples
    --------
    >>> grade_text(0.0175), grade_text(-0.01), grade_text(0.0)
    ('+1.750%', '-1.000%', '0.000%')
    """
    pct = 100.0 * grade
    if round(pct, 3) == 0:
        return "0.000%"
    return f"{pct:+.3f}%"


def k_text(k: float | None) -> str:
    """K value text with one decimal; a curve without grade change has none.

    Examples
    --------
    >>> k_text(581.8181), k_text(None)
    ('581.8', '-')
    """
    return "-" if k is None else f"{k:.1f}"
