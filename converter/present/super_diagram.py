"""The superelevation diagram: the cross slope of the left and right lanes along the
station through each transition, as records the sheets draw (one panel a curve)
and as a drawing in station / percent for DXF.

Nothing is computed here that :mod:`gradeline.analysis.superelevation` does not
give: the slopes are its :func:`cross_slopes` at the transition's own stations.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from gradeline.analysis.superelevation import cross_slopes, curve_of_records
from gradeline.present import labels
from gradeline.present.items import Drawing, Path, Text
from gradeline.present.roles import Role
from gradeline.present.tables import SUPER_TAGS, normal_crown
from gradeline.solved import SolvedAlignment

__all__ = ["SuperPanel", "super_panels", "superelevation_drawing"]


@dataclass(frozen=True, slots=True)
class SuperPanel:
    """One transition's diagram: stations (internal) and the cross slopes (percent,
    outward from the centreline) of both lanes at them, with the marks to label."""

    number: int
    title: str
    first: float  # the window drawn
    last: float
    stations: tuple[float, ...]
    left: tuple[float, ...]
    right: tuple[float, ...]
    marks: tuple[tuple[float, str], ...]  # (station, label), e.g. "LC 19+00.00"
    rate_text: str
    rate_station: float
    top: float  # the slope axis runs from -top to +top percent
    normal: float  # percent


def super_panels(ctx: SolvedAlignment) -> tuple[SuperPanel, ...]:
    """A panel for every stated superelevation, in station order."""
    records = [r for r in ctx.alignment.superelevations if r.first is not None]
    if not records:
        return ()
    normal = normal_crown(ctx)
    owners = curve_of_records(ctx.curves, records)
    st = ctx.stationing
    out = []
    for n, (r, owner) in enumerate(zip(records, owners, strict=True), start=1):
        pts = r.stations()
        xs = sorted({s for _, s in pts})
        first, last = xs[0], xs[-1]
        span = max(last - first, 1e-6)
        margin = 0.08 * span
        # the slopes are piecewise linear: their own breakpoints are exact
        grid = np.unique(np.concatenate([np.linspace(first, last, 65), xs]))
        grid = np.concatenate([[first - margin], grid, [last + margin]])
        left, right = cross_slopes(records, ctx.curves, normal, grid)
        marks: dict[float, list[str]] = {}
        for tag, s in pts:
            marks.setdefault(s, [])
            if SUPER_TAGS[tag] not in marks[s]:
                marks[s].append(SUPER_TAGS[tag])
        if owner is not None:
            i, c = owner
            turn = "LEFT" if c.delta > 0 else "RIGHT"
            title = (
                f"CURVE {i}  R {labels.length_text(c.radius, ctx.document.units)}  "
                f"{turn}  e {100 * r.rate:.1f} %"
            )
        else:
            title = f"TRANSITION {n}  e {100 * r.rate:.1f} %  (on no curve)"
        mid = (
            (r.full_super + r.end_full) / 2
            if r.full_super is not None and r.end_full is not None
            else (first + last) / 2
        )
        top = max(2.0, math.ceil(100 * max(r.rate, normal) / 2.0 + 1e-9) * 2.0)
        out.append(
            SuperPanel(
                n,
                title,
                first - margin,
                last + margin,
                tuple(float(x) for x in grid),
                tuple(100 * float(v) for v in left),
                tuple(100 * float(v) for v in right),
                tuple((s, f"{'/'.join(t)} {st.label(s)}") for s, t in sorted(marks.items())),
                f"{100 * r.rate:.1f} %",
                float(mid),
                top,
                100 * normal,
            )
        )
    return tuple(out)


def superelevation_drawing(
    ctx: SolvedAlignment, panels: tuple[SuperPanel, ...], text_height: float
) -> Drawing:
    """The diagram along the whole alignment for DXF: x the internal station, y the
    cross slope at ``2 * text_height`` drawing units a percent; left lane solid,
    right lane dashed, a tick and a label at every stated station."""
    h = text_height
    k = 2.0 * h  # drawing units per percent
    items: list = []
    if not panels:
        return Drawing((), (0.0, 0.0, 1.0, 1.0), {"kind": "superelevation"})
    top = max(p.top for p in panels)
    normal = panels[0].normal
    x0, x1 = ctx.start, ctx.end
    for v in np.arange(-top, top + 1e-9, 2.0):
        items.append(Path(Role.SUPER_GRID if v else Role.SUPER_AXIS, ((x0, v * k), (x1, v * k))))
        items.append(
            Text(
                Role.SUPER_LABELS,
                f"{v:+.0f} %" if v else "0 %",
                x0 - h,
                v * k,
                h,
                0.0,
                "right",
                "middle",
            )
        )
    # the lanes between transitions sit at normal crown; through them, the panels
    xs = [x0]
    left = [-normal]
    right = [-normal]
    for p in panels:
        xs += list(p.stations)
        left += list(p.left)
        right += list(p.right)
    xs.append(x1)
    left.append(-normal)
    right.append(-normal)
    order = np.argsort(np.array(xs), kind="stable")
    pts_l = tuple((float(xs[i]), float(left[i]) * k) for i in order)
    pts_r = tuple((float(xs[i]), float(right[i]) * k) for i in order)
    items.append(Path(Role.SUPER_LEFT, pts_l))
    items.append(Path(Role.SUPER_RIGHT, pts_r))
    for p in panels:
        for s, text in p.marks:
            items.append(Path(Role.SUPER_GRID, ((s, -top * k), (s, top * k))))
            items.append(
                Text(Role.SUPER_LABELS, text, s, -top * k - 0.5 * h, h, 90.0, "right", "middle")
            )
        items.append(
            Text(Role.SUPER_LABELS, p.title, p.first, top * k + h, h, 0.0, "left", "bottom")
        )
    label_room = 14 * h
    ext = (x0 - 6 * h, -top * k - label_room, x1 + h, top * k + 3 * h)
    meta = {
        "kind": "superelevation",
        "x_is": "internal station",
        "y_is": f"cross slope, {k:g} drawing units a percent",
        "alignment": ctx.alignment.name,
        "linear_unit": ctx.document.units.linear,
    }
    return Drawing(tuple(items), ext, meta)
