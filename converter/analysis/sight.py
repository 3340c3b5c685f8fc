"""Exact available sight distance along a finished grade, both directions.

Line of sight (eye and object heights) and headlight beam (height and upward
divergence) over the sampled grade, in chunks of eyes with numpy sliding windows.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import TYPE_CHECKING

import numpy as np
from numpy.lib.stride_tricks import sliding_window_view
from numpy.typing import NDArray

from gradeline.errors import UsageError
from gradeline.geometry import vertical
from gradeline.geometry.vertical import VerticalGeometry

if TYPE_CHECKING:
    from gradeline.analysis.review import Criteria

__all__ = ["SightDistance", "sight_distance"]


# --------------------------------------------------------------------------- sight distance
@dataclass(frozen=True, eq=False)
class SightDistance:
    """Available sight distance at each station, both directions (inf: not limited)."""

    stations: NDArray[np.float64]
    ahead: NDArray[np.float64]  # object visibility, travelling up-station
    behind: NDArray[np.float64]  # travelling down-station
    headlight_ahead: NDArray[np.float64]
    headlight_behind: NDArray[np.float64]
    reach: float  # distances are looked for up to this far


def _line_of_sight(
    z: NDArray[np.float64], eyes: NDArray[np.intp], dx: float, window: int, h1: float, h2: float
) -> NDArray[np.float64]:
    """Distance from each eye sample to the first hidden object position."""
    n = len(z)
    pad = np.concatenate([z, np.full(window + 1, np.nan)])
    out = np.full(len(eyes), np.inf)
    k = np.arange(1, window + 1, dtype=np.float64)
    for lo in range(0, len(eyes), 2048):
        idx = eyes[lo : lo + 2048]
        win = sliding_window_view(pad, window + 1)[idx]  # (m, window + 1); column 0 = eye
        eye = win[:, :1] + h1
        ahead = win[:, 1:]
        slope = (ahead - eye) / (k * dx)
        target = (ahead + h2 - eye) / (k * dx)
        blocker = np.maximum.accumulate(np.where(np.isnan(slope), -np.inf, slope), axis=1)
        prior = np.concatenate([np.full((len(idx), 1), -np.inf), blocker[:, :-1]], axis=1)
        margin = target - prior  # > 0 while the object top is in view
        hidden = (margin <= 0) & ~np.isnan(target)
        first = np.argmax(hidden, axis=1)
        has = hidden[np.arange(len(idx)), first]
        # interpolate the crossing between the last visible and first hidden positions
        j = first[has]
        rows = np.flatnonzero(has)
        m1 = margin[rows, j]
        m0 = np.where(j > 0, margin[rows, np.maximum(j - 1, 0)], np.inf)
        frac = np.where(np.isfinite(m0), m0 / np.where(m0 - m1 != 0, m0 - m1, 1.0), 1.0)
        dist = (j + np.clip(frac, 0.0, 1.0)) * dx
        res = np.full(len(idx), np.inf)
        res[rows] = dist
        # profile end reached before anything hid the object: not limited here
        out[lo : lo + 2048] = res
    _ = n
    return out


def _headlight(
    z: NDArray[np.float64],
    eyes: NDArray[np.intp],
    slopes: NDArray[np.float64],
    dx: float,
    window: int,
    h: float,
    beta: float,
) -> NDArray[np.float64]:
    """Distance to where the top edge of the headlight beam meets the road."""
    pad = np.concatenate([z, np.full(window + 1, np.nan)])
    out = np.full(len(eyes), np.inf)
    k = np.arange(1, window + 1, dtype=np.float64) * dx
    tb = np.tan(np.arctan(slopes) + beta)
    for lo in range(0, len(eyes), 2048):
        idx = eyes[lo : lo + 2048]
        win = sliding_window_view(pad, window + 1)[idx]
        beam = win[:, :1] + h + tb[lo : lo + 2048, None] * k[None, :]
        under = beam - win[:, 1:]  # > 0 while the beam is above the road
        hit = (under <= 0) & ~np.isnan(under)
        first = np.argmax(hit, axis=1)
        has = hit[np.arange(len(idx)), first]
        rows = np.flatnonzero(has)
        j = first[has]
        u1 = under[rows, j]
        u0 = np.where(j > 0, under[rows, np.maximum(j - 1, 0)], h)
        frac = u0 / np.where(u0 - u1 != 0, u0 - u1, 1.0)
        res = np.full(len(idx), np.inf)
        res[rows] = (j + np.clip(frac, 0.0, 1.0)) * dx
        out[lo : lo + 2048] = res
    return out


def sight_distance(
    geom: VerticalGeometry,
    crit: Criteria,
    *,
    step: float,
    reach: float,
    sample: float | None = None,
) -> SightDistance:
    """Available stopping and headlight sight distance every ``step`` along the profile.

    The finished grade is sampled every ``sample`` (default step/10, at most 1 ft
    or 0.3 m) and crossings are interpolated between samples; distances are looked
    for up to ``reach``.
    """
    if not (step > 0 and reach > 0):
        raise UsageError("step and reach must be positive")
    dx = sample or min(step / 10.0, 1.0)
    if (geom.end - geom.start) / dx > 50_000_000:
        raise UsageError(
            f"the profile is {geom.end - geom.start:g} long: too long to sample every "
            f"{dx:g} for sight distance (at most 50,000,000 samples)"
        )
    n = int(math.floor((geom.end - geom.start) / dx)) + 1
    xs = geom.start + dx * np.arange(n)
    z, g = vertical.evaluate(geom, xs)
    every = max(1, int(round(step / dx)))
    eyes = np.arange(0, n, every, dtype=np.intp)
    window = int(math.ceil(reach / dx))
    beta = math.radians(crit.headlight_angle_deg)
    ahead = _line_of_sight(z, eyes, dx, window, crit.eye_height, crit.object_height)
    head_a = _headlight(z, eyes, g[eyes], dx, window, crit.headlight_height, beta)
    zr = z[::-1].copy()
    rev = n - 1 - eyes
    behind = _line_of_sight(zr, rev, dx, window, crit.eye_height, crit.object_height)
    head_b = _headlight(zr, rev, -g[eyes], dx, window, crit.headlight_height, beta)
    return SightDistance(
        xs[eyes].astype(np.float64), np.minimum(ahead, np.inf), behind, head_a, head_b, reach
    )
