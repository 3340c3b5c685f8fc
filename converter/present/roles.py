"""Drawing roles: one table of how each kind of linework and text looks.

Every drawing item carries a :class:`Role`. :data:`ROLE_STYLE` gives, for each
role, the default DXF layer name with its colour (ACI), linetype and
lineweight, and the PDF colour, line width and dash pattern used on sheets --
one row per role, so the DXF and the PDF can never disagree about which roles
exist. Layer names are our own plain words; the CLI can rename them.

This module imports nothing heavy: the command line reads the role names from it.
"""

from __future__ import annotations

from dataclasses import dataclass
from enum import StrEnum

__all__ = ["LAYER_ROLES", "ROLE_STYLE", "Role", "RoleStyle"]


class Role(StrEnum):
    """What a drawing item is (its value is the name users rename layers by)."""

    GRADE = "grade"
    GROUND = "ground"
    GRID = "grid"
    GRID_MAJOR = "grid_major"
    LABELS = "labels"
    PVI = "pvi"
    TANGENTS = "tangents"
    INFO = "info"
    PLAN = "plan"
    PLAN_TICKS = "plan_ticks"
    PLAN_LABELS = "plan_labels"
    PLAN_POINTS = "plan_points"
    PLAN_NOTES = "plan_notes"
    MATCH = "match"  # sheets only
    FRAME = "frame"  # sheets only
    SUPER_LEFT = "super_left"
    SUPER_RIGHT = "super_right"
    SUPER_AXIS = "super_axis"
    SUPER_GRID = "super_grid"
    SUPER_LABELS = "super_labels"


@dataclass(frozen=True, slots=True)
class RoleStyle:
    """How one role is drawn.

    ``layer`` is None for sheet furniture that never goes to DXF. ``aci`` is the
    AutoCAD colour index, ``lineweight`` in 1/100 mm; ``rgb`` is 0-1, ``width``
    in points on a full-size sheet and ``dash`` in points (empty for solid).
    """

    layer: str | None
    aci: int
    linetype: str
    lineweight: int
    rgb: tuple[float, float, float]
    width: float
    dash: tuple[float, ...] = ()


_BLUE = (0.05, 0.15, 0.75)
_PURPLE = (0.60, 0.10, 0.55)
_BLACK = (0.0, 0.0, 0.0)

ROLE_STYLE: dict[Role, RoleStyle] = {
    # DXF colour 1 (red) and 30 (orange) read on dark and light CAD backgrounds alike;
    # blue (5) all but disappears on black
    Role.GRADE: RoleStyle("PROFILE-GRADE", 1, "Continuous", 50, _BLUE, 1.4),
    Role.GROUND: RoleStyle(
        "PROFILE-GROUND", 32, "GL_DASHED", 25, (0.55, 0.33, 0.12), 0.8, (5.0, 3.0)
    ),
    Role.GRID: RoleStyle("PROFILE-GRID", 253, "Continuous", 9, (0.78, 0.80, 0.84), 0.25),
    Role.GRID_MAJOR: RoleStyle(
        "PROFILE-GRID-MAJOR", 251, "Continuous", 18, (0.55, 0.58, 0.64), 0.5
    ),
    Role.LABELS: RoleStyle("PROFILE-LABELS", 7, "Continuous", 18, _BLACK, 0.4),
    Role.PVI: RoleStyle("PROFILE-PVI", 6, "Continuous", 25, _PURPLE, 0.6),
    Role.TANGENTS: RoleStyle("PROFILE-TANGENTS", 6, "GL_DASHED", 13, _PURPLE, 0.4, (4.0, 2.5)),
    Role.INFO: RoleStyle("PROFILE-INFO", 8, "Continuous", 13, (0.35, 0.35, 0.35), 0.4),
    Role.PLAN: RoleStyle("PLAN-ALIGNMENT", 1, "Continuous", 50, _BLUE, 1.4),
    Role.PLAN_TICKS: RoleStyle("PLAN-TICKS", 7, "Continuous", 18, _BLACK, 0.5),
    Role.PLAN_LABELS: RoleStyle("PLAN-LABELS", 7, "Continuous", 18, _BLACK, 0.4),
    Role.PLAN_POINTS: RoleStyle("PLAN-POINTS", 6, "Continuous", 25, _PURPLE, 0.6),
    Role.PLAN_NOTES: RoleStyle("PLAN-CURVE-DATA", 7, "Continuous", 18, _BLACK, 0.4),
    Role.MATCH: RoleStyle(None, 1, "Continuous", 35, (0.80, 0.10, 0.10), 0.9, (9.0, 3.0, 2.0, 3.0)),
    Role.FRAME: RoleStyle(None, 7, "Continuous", 35, _BLACK, 1.0),
    # the superelevation diagram: left lane solid red, right lane dashed blue-green
    Role.SUPER_LEFT: RoleStyle("SUPER-LEFT-LANE", 1, "Continuous", 35, (0.80, 0.10, 0.10), 1.1),
    Role.SUPER_RIGHT: RoleStyle(
        "SUPER-RIGHT-LANE", 4, "GL_DASHED", 35, (0.0, 0.45, 0.55), 1.1, (6.0, 3.0)
    ),
    Role.SUPER_AXIS: RoleStyle("SUPER-AXIS", 251, "Continuous", 18, (0.35, 0.37, 0.42), 0.6),
    Role.SUPER_GRID: RoleStyle("SUPER-GRID", 253, "Continuous", 9, (0.78, 0.80, 0.84), 0.25),
    Role.SUPER_LABELS: RoleStyle("SUPER-LABELS", 7, "Continuous", 18, _BLACK, 0.4),
}

#: Roles that become DXF layers, and the default layer name of each.
LAYER_ROLES: dict[str, str] = {
    role.value: style.layer for role, style in ROLE_STYLE.items() if style.layer is not None
}
