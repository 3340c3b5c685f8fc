"""The pen of each drawing role on a sheet: colour, width and dash from the one style
table (:data:`gradeline.present.roles.ROLE_STYLE`), scaled with the sheet."""

from __future__ import annotations

import functools

from gradeline.present.roles import ROLE_STYLE, Role
from gradeline.sheets import operators

__all__ = ["pen", "style"]


@functools.lru_cache(maxsize=256)
def pen(role: str, f: float) -> tuple[tuple[float, float, float], float, tuple[float, ...]]:
    """(rgb, width, dash) of ``role`` on a sheet ``f`` times full size (never below 0.6)."""
    st = ROLE_STYLE[Role(role)]
    scale = max(f, 0.6)
    return st.rgb, st.width * scale, tuple(d * scale for d in st.dash)


def style(c, role: str, f: float) -> None:
    """Set the canvas ``c`` to draw as ``role``."""
    operators.pen(c, *pen(role, f))
