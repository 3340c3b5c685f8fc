"""Drawing items: the records every renderer draws (paths, curves, arcs, circles, text).

Model units; text boxes come from :func:`gradeline.present.labels.text_width`.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from typing import Any, TypeAlias

import numpy as np

from gradeline.present import labels

__all__ = [
    "XY",
    "ArcItem",
    "Circle",
    "Drawing",
    "Item",
    "Path",
    "QuadCurve",
    "Text",
    "boxes_overlap",
]


XY = tuple[float, float]


@dataclass(frozen=True, slots=True)
class Path:
    """A straight line (two points) or a polyline."""

    role: str
    points: tuple[XY, ...]


@dataclass(frozen=True, slots=True)
class QuadCurve:
    """An exact quadratic Bezier curve (a parabola) and its polyline within tolerance."""

    role: str
    control: tuple[XY, XY, XY]
    polyline: tuple[XY, ...]


@dataclass(frozen=True, slots=True)
class ArcItem:
    """A circular arc, counter-clockwise from ``start_deg`` to ``end_deg``, and its polyline."""

    role: str
    center: XY
    radius: float
    start_deg: float
    end_deg: float
    polyline: tuple[XY, ...]


@dataclass(frozen=True, slots=True)
class Circle:
    """A marker circle."""

    role: str
    center: XY
    radius: float


@dataclass(frozen=True, slots=True)
class Text:
    """One line of text; ``halign`` left/center/right, ``valign`` bottom/middle/top."""

    role: str
    text: str
    x: float
    y: float
    height: float
    rotation: float = 0.0  # degrees, counter-clockwise
    halign: str = "left"
    valign: str = "bottom"

    @property
    def width(self) -> float:
        """Estimated text width (see :func:`gradeline.present.labels.text_width`)."""
        return labels.text_width(self.text, self.height)

    def corner_points(self) -> list[tuple[float, float]]:
        """The four corners of the text box in model coordinates, counter-clockwise."""
        w, h = self.width, self.height
        dx = {"left": 0.0, "center": -w / 2, "right": -w}[self.halign]
        dy = {"bottom": 0.0, "middle": -h / 2, "top": -h}[self.valign]
        a = math.radians(self.rotation)
        c, s = math.cos(a), math.sin(a)
        x, y = self.x, self.y
        return [
            (px * c - py * s + x, px * s + py * c + y)
            for px, py in ((dx, dy), (dx + w, dy), (dx + w, dy + h), (dx, dy + h))
        ]

    def bounds(self) -> tuple[float, float, float, float]:
        """Axis-aligned extent of the text box: x0, y0, x1, y1."""
        pts = self.corner_points()
        xs, ys = [p[0] for p in pts], [p[1] for p in pts]
        return min(xs), min(ys), max(xs), max(ys)

    def corners(self) -> np.ndarray:
        """The four corners of the text box in model coordinates, shape (4, 2)."""
        return np.array(self.corner_points())


def boxes_overlap(a: np.ndarray, b: np.ndarray, gap: float = 0.0) -> bool:
    """Separating-axis test of two convex quadrilaterals (corner arrays)."""
    for poly in (a, b):
        for i in range(4):
            edge = poly[(i + 1) % 4] - poly[i]
            axis = np.array([-edge[1], edge[0]])
            norm = math.hypot(*axis)
            if norm == 0:
                continue
            axis /= norm
            pa, pb = a @ axis, b @ axis
            if pa.max() + gap <= pb.min() or pb.max() + gap <= pa.min():
                return False
    return True


class _BoxIndex:
    """Text boxes taken so far, with a bounding-box prefilter before the exact test."""

    def __init__(self, boxes: list[np.ndarray]) -> None:
        self.boxes = list(boxes)
        if self.boxes:
            stack = np.array(self.boxes)  # (n, 4, 2)
            self.bb = np.hstack([stack.min(axis=1), stack.max(axis=1)])
        else:
            self.bb = np.zeros((0, 4))

    def hits(self, box: np.ndarray, gap: float = 0.0) -> bool:
        x0, y0 = box.min(axis=0) - gap
        x1, y1 = box.max(axis=0) + gap
        bb = self.bb
        near = np.flatnonzero(
            (bb[:, 0] <= x1) & (bb[:, 2] >= x0) & (bb[:, 1] <= y1) & (bb[:, 3] >= y0)
        )
        return any(boxes_overlap(box, self.boxes[i], gap) for i in near)

    def add(self, box: np.ndarray) -> None:
        self.boxes.append(box)
        row = [[box[:, 0].min(), box[:, 1].min(), box[:, 0].max(), box[:, 1].max()]]
        self.bb = np.vstack([self.bb, row])


#: Every drawable record is one of these (renderers match on the type).
Item: TypeAlias = Path | QuadCurve | ArcItem | Circle | Text


@dataclass(frozen=True, eq=False)
class Drawing:
    """Everything a renderer needs: items in drawing order, extents and metadata."""

    items: tuple[Item, ...]
    extents: tuple[float, float, float, float]
    meta: dict[str, Any] = field(default_factory=dict)

    def texts(self) -> list[Text]:
        """All text items."""
        return [i for i in self.items if isinstance(i, Text)]
