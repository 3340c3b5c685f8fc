"""What each sheet shows, decided before anything is drawn.

For every frame of the sheet series: the profile drawing of its window (with
the exaggeration that fits the profile view), and the plan view's rotation,
centre and match-line marks. :mod:`gradeline.sheets.pdf` only draws these;
it never evaluates geometry itself.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, replace

from gradeline.present import drafting
from gradeline.present.items import Drawing
from gradeline.present.layout import DraftingLayout
from gradeline.sheets.layout import Frame, SheetGeometry, model_per_point
from gradeline.solved import SolvedAlignment

__all__ = ["MatchMark", "PlanView", "SheetView", "sheet_view"]


@dataclass(frozen=True, slots=True)
class MatchMark:
    """A match line on the plan: its station, the sheet it leads to, and where it sits."""

    station: float
    other_sheet: int
    easting: float
    northing: float
    heading: float  # radians, math angle


@dataclass(frozen=True, slots=True)
class PlanView:
    """How the plan is turned on one sheet: the chord between the match stations runs
    left to right."""

    start: float  # match stations clamped to the plan
    end: float
    angle: float  # radians: the rotation that makes the chord horizontal
    centre: tuple[float, float]  # model (easting, northing) at the view's centre
    marks: tuple[MatchMark, ...]


@dataclass(frozen=True, slots=True)
class SheetView:
    """Everything one plan-and-profile sheet shows."""

    frame: Frame
    profile: Drawing | None  # None for a plan-only alignment
    layout: DraftingLayout  # with the exaggeration used on this sheet
    plan: PlanView | None


#: Divisors of the asked exaggeration tried in turn when a window's profile is
#: too tall for the profile view (the title block states the one used).
_EXAGGERATION_DIVISORS = (1, 2, 5, 10)


def _profile(
    ctx: SolvedAlignment, lay: DraftingLayout, geo: SheetGeometry, frame: Frame
) -> tuple[Drawing, DraftingLayout]:
    per_pt = model_per_point(lay)
    used = lay
    prof = None
    for divisor in _EXAGGERATION_DIVISORS:
        exag = lay.exaggeration / divisor
        used = replace(lay, exaggeration=exag)
        prof = drafting.profile_drawing(
            ctx, used, window=(frame.view_start, frame.view_end), strip=True
        )
        _, y0, _, y1 = prof.extents
        if (y1 - y0) / per_pt <= geo.profile.h - 2.5 * geo.text or exag <= 1:
            break
    assert prof is not None
    return prof, used


def _plan(ctx: SolvedAlignment, frame: Frame, total_frames: int) -> PlanView | None:
    hz = ctx.horizontal
    if hz is None:
        return None
    a = min(max(frame.match_start, hz.start), hz.end)
    b = min(max(frame.match_end, hz.start), hz.end)
    (na, nb), (ea, eb), _ = ctx.plan_at([a, b])
    angle = math.atan2(nb - na, eb - ea)
    marks = []
    for m, other in ((frame.match_start, frame.number - 1), (frame.match_end, frame.number + 1)):
        if other < 1 or other > total_frames or not (hz.start <= m <= hz.end):
            continue
        n_, e_, hd = (float(v) for v in ctx.plan_at(m))
        marks.append(MatchMark(m, other, e_, n_, hd))
    return PlanView(a, b, angle, ((ea + eb) / 2, (na + nb) / 2), tuple(marks))


def sheet_view(
    ctx: SolvedAlignment, lay: DraftingLayout, geo: SheetGeometry, frame: Frame, total_frames: int
) -> SheetView:
    """The profile drawing and plan view of one sheet."""
    if ctx.geometry is None:
        return SheetView(frame, None, lay, _plan(ctx, frame, total_frames))
    prof, used = _profile(ctx, lay, geo, frame)
    return SheetView(frame, prof, used, _plan(ctx, frame, total_frames))
