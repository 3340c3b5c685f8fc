"""The plan drawing: alignment linework, station ticks, key points and curve-data notes.

Mapping: ``x = easting``, ``y = northing`` (true coordinates).
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Any

import numpy as np

from gradeline.present import labels
from gradeline.present.items import (
    ArcItem,
    Circle,
    Drawing,
    Path,
    Text,
    boxes_overlap,
)
from gradeline.present.layout import DraftingLayout, guard_count
from gradeline.solved import SolvedAlignment

__all__ = ["CurveNote", "plan_drawing"]


@dataclass(frozen=True, slots=True)
class CurveNote:
    """A horizontal curve's data note, for a renderer that places notes itself (sheets).

    ``pi`` is the point the note's leader points to, ``outward`` the unit
    direction from the curve towards it; ``lines`` the note's text, first line on top.
    """

    number: int
    lines: tuple[str, ...]
    pi: tuple[float, float]
    outward: tuple[float, float]
    station: float  # the curve's middle: the sheet that shows it carries the note
    middle: tuple[float, float] = (0.0, 0.0)  # the curve's middle point


# --------------------------------------------------------------------------- plan
def _readable_flag(angle_deg: float) -> tuple[float, bool]:
    """Text rotation that never reads upside down, and whether it was turned 180 degrees."""
    a = (angle_deg + 180.0) % 360.0 - 180.0
    if a > 90.0:
        return a - 180.0, True
    if a <= -90.0:
        return a + 180.0, True
    return a, False


def plan_drawing(ctx: SolvedAlignment, layout: DraftingLayout) -> Drawing:
    """The plan drawing of ``ctx`` at true coordinates (needs horizontal geometry)."""
    hz = ctx.horizontal
    if hz is None:
        raise ValueError("plan drawing needs horizontal geometry")
    h = layout.text_height
    tol = layout.chord_tolerance
    st = ctx.stationing
    units = ctx.document.units
    items: list[Any] = []
    spans = []  # the stations of each curved element, all evaluated in one call
    for el in hz.elements:
        if el.kind == "line":
            continue
        kmax = max(abs(el.k0), abs(el.k1))
        step = math.sqrt(8.0 * tol / kmax) if kmax > 0 else el.length
        guard_count(el.length / step, "plan polyline vertices")
        n = max(2, math.ceil(el.length / step) + 1)
        spans.append(np.linspace(el.start_station, el.end_station, n))
    if spans:
        north_all, east_all, _ = ctx.plan_at(np.concatenate(spans))
        cuts = np.cumsum([len(v) for v in spans])[:-1]
        traced = iter(zip(np.split(east_all, cuts), np.split(north_all, cuts), strict=True))
    for el in hz.elements:
        if el.kind == "line":
            items.append(Path("plan", ((el.x0, el.y0), (el.x1, el.y1))))
            continue
        east, north = next(traced)
        pts = tuple(zip(east.tolist(), north.tolist(), strict=True))
        if el.kind == "arc":
            assert el.center is not None
            cx, cy = el.center
            a0 = math.degrees(math.atan2(el.y0 - cy, el.x0 - cx))
            a1 = math.degrees(math.atan2(el.y1 - cy, el.x1 - cx))
            start, end = (a0, a1) if el.k0 > 0 else (a1, a0)
            items.append(ArcItem("plan", (cx, cy), 1.0 / abs(el.k0), start, end, pts))
        else:
            items.append(Path("plan", pts))
    taken: list[np.ndarray] = []

    def put(item: Text) -> None:
        items.append(item)
        taken.append(item.corners())

    guard_count((hz.end - hz.start) / layout.plan_tick, "plan station ticks")
    ticks = st.round_stations(layout.plan_tick, hz.start, hz.end)
    north, east, head = ctx.plan_at(ticks)
    for s, n_, e_, hd in zip(
        ticks.tolist(), north.tolist(), east.tolist(), head.tolist(), strict=True
    ):
        nx, ny = -math.sin(hd), math.cos(hd)  # left normal
        items.append(
            Path(
                "plan_ticks",
                ((e_ - 0.6 * h * nx, n_ - 0.6 * h * ny), (e_ + 0.6 * h * nx, n_ + 0.6 * h * ny)),
            )
        )
        rot, flipped = _readable_flag(math.degrees(hd) + 90.0)
        text = labels.grid_station_text(float(st.label_value(s)), units)
        put(
            Text(
                "plan_labels",
                text,
                e_ + 1.0 * h * nx,
                n_ + 1.0 * h * ny,
                h,
                rot,
                "right" if flipped else "left",
                "middle",
            )
        )
    keys = ctx.plan_key_points
    merged: dict[float, list[str]] = {}
    for key_s, tag in keys:
        near = next((k for k in merged if abs(k - key_s) < 1e-6), None)
        merged.setdefault(near if near is not None else key_s, []).append(tag)
    key_rows = sorted(merged.items())
    key_at = ctx.plan_at([k for k, _ in key_rows])
    for (key_s, tags), n_, e_, hd in zip(key_rows, *(v.tolist() for v in key_at), strict=True):
        items.append(Circle("plan_points", (e_, n_), 0.4 * h))
        rx, ry = math.sin(hd), -math.cos(hd)  # right normal
        rot, flipped = _readable_flag(math.degrees(hd) - 90.0)
        text = labels.plan_point_label("/".join(tags), st.label(key_s))
        put(
            Text(
                "plan_labels",
                text,
                e_ + 1.0 * h * rx,
                n_ + 1.0 * h * ry,
                h,
                rot,
                "right" if flipped else "left",
                "middle",
            )
        )
    for eq in st.equations:
        if not hz.start <= eq.internal <= hz.end:
            continue
        n_, e_, hd = (float(v) for v in ctx.plan_at(eq.internal))
        nx, ny = -math.sin(hd), math.cos(hd)  # left normal
        items.append(
            Path(
                "plan_ticks",
                ((e_ - 1.5 * h * nx, n_ - 1.5 * h * ny), (e_ + 1.5 * h * nx, n_ + 1.5 * h * ny)),
            )
        )
        rot, flipped = _readable_flag(math.degrees(hd) - 90.0)
        text = labels.equation_text(*st.equation_labels(eq))
        for reach in (2.0, 6.0, 10.0, 14.0):  # along the right normal until it is clear
            item = Text(
                "plan_labels",
                text,
                e_ - reach * h * nx,
                n_ - reach * h * ny,
                h,
                rot,
                "right" if flipped else "left",
                "middle",
            )
            box = item.corners()
            if not any(boxes_overlap(box, b) for b in taken):
                break
        put(item)
    notes: list[CurveNote] = []
    placed = [c for c in ctx.curves if c.pi_northing is not None and c.pi_easting is not None]
    mids = [(c.start_station + c.end_station) / 2 for c in placed]
    mid_n, mid_e, _ = (v.tolist() for v in ctx.plan_at(mids))
    for c, mid, mn, me in zip(placed, mids, mid_n, mid_e, strict=True):
        assert c.pi_northing is not None and c.pi_easting is not None
        note = labels.plan_curve_note(c, units)
        lines = [note[0], labels.plan_point_label("PI", st.label(c.pi_station))] + note[1:]
        ox, oy = c.pi_easting - me, c.pi_northing - mn
        dist = math.hypot(ox, oy) or 1.0
        ux, uy = ox / dist, oy / dist
        items.append(Circle("plan_points", (c.pi_easting, c.pi_northing), 0.3 * h))
        notes.append(
            CurveNote(
                c.number, tuple(lines), (c.pi_easting, c.pi_northing), (ux, uy), mid, (me, mn)
            )
        )
        block_w = max(labels.text_width(t, h) for t in lines)
        block_h = len(lines) * 1.5 * h
        # corner of the block nearest the curve sits 2h beyond the PI, outward
        bx = c.pi_easting + ux * 2 * h + (0 if ux >= 0 else -block_w)
        by = c.pi_northing + uy * 2 * h + (block_h if uy >= 0 else 0)
        for j, t in enumerate(lines):
            put(
                Text(
                    "plan_notes", t, bx, by - (j + 1) * 1.5 * h + 0.5 * h, h, 0.0, "left", "bottom"
                )
            )
    xs = [
        p[0]
        for i in items
        if isinstance(i, (Path, ArcItem))
        for p in (i.points if isinstance(i, Path) else i.polyline)
    ]
    ys = [
        p[1]
        for i in items
        if isinstance(i, (Path, ArcItem))
        for p in (i.points if isinstance(i, Path) else i.polyline)
    ]
    boxes = np.concatenate(taken) if taken else np.zeros((0, 2))
    ext = (
        min(xs + boxes[:, 0].tolist()),
        min(ys + boxes[:, 1].tolist()),
        max(xs + boxes[:, 0].tolist()),
        max(ys + boxes[:, 1].tolist()),
    )
    meta = {
        "kind": "plan",
        "alignment": ctx.alignment.name,
        "linear_unit": units.linear,
        "notes": tuple(notes),
    }
    return Drawing(tuple(items), ext, meta)
