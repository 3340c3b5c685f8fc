"""Plan linework from a drawing against the computed horizontal alignment.

The drawn pieces (world coordinates, in file units) are mapped by a similarity
transform -- none, given, or fitted by iterated closest points -- sampled along
their length and projected on the alignment
(:func:`gradeline.geometry.station_offset.station_offset`). The lateral offset of
every sample is the deviation; stations no sample reaches are gaps in coverage.
Circular arcs keep their exact radius and are compared with the element they lie
on: an arc drawn with another radius, or one arc standing in for a spiral, is a
finding even where the offsets stay small.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
from numpy.typing import NDArray

from gradeline.errors import GradelineError
from gradeline.geometry import horizontal
from gradeline.geometry._runs import true_runs
from gradeline.geometry.horizontal import HorizontalGeometry
from gradeline.geometry.station_offset import Projector
from gradeline.io.dxf_read import DrawnPiece

__all__ = ["PieceFinding", "PlanAudit", "Similarity", "audit_plan", "fit_similarity"]

#: Most samples a plan audit takes (the step grows on very long linework).
MAX_SAMPLES = 2_000_000


@dataclass(frozen=True, slots=True)
class Similarity:
    """Drawing -> file coordinates: ``world = scale * R(angle) * drawn + (dx, dy)``."""

    dx: float = 0.0
    dy: float = 0.0
    angle: float = 0.0  # radians, counter-clockwise
    scale: float = 1.0
    how: str = "none"  # "none", "given" or "fitted"

    def apply(self, pts: NDArray[np.float64]) -> NDArray[np.float64]:
        """Map (n, 2) drawing points x, y to file x (easting), y (northing)."""
        c, s = math.cos(self.angle), math.sin(self.angle)
        x, y = pts[:, 0], pts[:, 1]
        return np.column_stack(
            [self.dx + self.scale * (c * x - s * y), self.dy + self.scale * (s * x + c * y)]
        )

    @property
    def identity(self) -> bool:
        """True for no transform at all."""
        return (self.dx, self.dy, self.angle, self.scale) == (0.0, 0.0, 0.0, 1.0)

    def text(self) -> str:
        """One line for reports."""
        if self.identity:
            return "drawing coordinates taken as they are"
        return (
            f"shift {self.dx:+.4f}, {self.dy:+.4f}; rotation {math.degrees(self.angle):+.6f} deg; "
            f"scale {self.scale:.8f} ({self.how})"
        )


@dataclass(frozen=True, slots=True)
class PieceFinding:
    """A drawn arc that disagrees with the element it lies on."""

    start: float  # station range of the drawn piece
    end: float
    what: str  # "radius", "spiral drawn as an arc", "arc where a line belongs"
    drawn: float | None  # drawn radius
    computed: float | None  # computed radius (None on lines and spirals)
    element: str  # e.g. "Curve 3" (LandXML element and its number among all)
    handle: str


@dataclass(frozen=True, slots=True)
class PlanAudit:
    """Lateral deviation of the drawn centreline from the computed alignment."""

    layer: str
    transform: Similarity
    samples: int
    max_deviation: float
    mean_deviation: float
    worst_station: float
    over: tuple[tuple[float, float, float], ...]  # (start, end, worst signed offset)
    uncovered: tuple[tuple[float, float], ...]
    beyond: int  # samples beyond the alignment's ends
    pieces: tuple[PieceFinding, ...]
    rms_fit: float | None = None  # root-mean-square offset of the fit, when fitted


def _sample(pieces: list[DrawnPiece], step: float) -> NDArray[np.float64]:
    """Points along every piece: its vertices and points every ``step`` between them."""
    out = []
    for p in pieces:
        pts = p.points
        seg = np.diff(pts, axis=0)
        n = np.maximum(1, np.ceil(np.hypot(seg[:, 0], seg[:, 1]) / step)).astype(np.int64)
        owner = np.repeat(np.arange(len(seg)), n)
        k = np.arange(int(n.sum())) - np.repeat(np.cumsum(n) - n, n)
        t = (k / n[owner])[:, None]
        part = np.vstack([pts[owner] + t * seg[owner], pts[-1:]])
        if p.kind == "arc" and p.center is not None and p.radius:  # on the circle itself
            rel = part - np.asarray(p.center)
            dist = np.hypot(rel[:, 0], rel[:, 1])
            part = np.asarray(p.center) + rel * (p.radius / np.where(dist > 0, dist, 1.0))[:, None]
        out.append(part)
    return np.concatenate(out) if out else np.zeros((0, 2))


def _length(pieces: list[DrawnPiece]) -> float:
    return float(sum(np.hypot(*np.diff(p.points, axis=0).T).sum() for p in pieces))


def _step(pieces: list[DrawnPiece], hz: HorizontalGeometry) -> float:
    total = max(_length(pieces), 1e-9)
    span = hz.end - hz.start
    step = max(span / 20_000.0, 0.5 if span > 1000 else span / 2000.0)
    return max(step, total / MAX_SAMPLES)


def _feet(proj: Projector, world: NDArray[np.float64]):
    """Foot point (x, y), unit normal and status of each world point on the alignment."""
    hz = proj.geom
    st, _, status = proj(world[:, 1], world[:, 0])
    s = np.clip(st, hz.start, hz.end)
    n, e, h = horizontal.evaluate(hz, s)
    return np.column_stack([e, n]), np.column_stack([-np.sin(h), np.cos(h)]), status


def fit_similarity(
    pieces: list[DrawnPiece], hz: HorizontalGeometry, scale: float = 1.0
) -> tuple[Similarity, float]:
    """The rotation and shift that lay the drawn linework on the alignment, and its RMS
    distance; ``scale`` is given, never fitted (a free scale would shrink the drawing
    onto one point of the alignment).

    Gauss-Newton on the point-to-line distances (iterated closest points with the
    alignment's normal at each foot point; points beyond an end pull towards that
    end in both directions), from a few starts: as drawn, and the drawing's centroid
    and main direction laid on the alignment's, both ways round. Pairs farther than
    three times the median distance are left out of each step, so other linework on
    the layer does not pull the fit.
    """
    if not pieces:
        raise GradelineError("no linework to fit a transform to", choice="transform")
    proj = hz.projector
    drawn = _sample(pieces, _step(pieces, hz))
    if len(drawn) > 4000:
        drawn = drawn[np.linspace(0, len(drawn) - 1, 4000).astype(np.int64)]
    drawn = drawn * scale
    rn, re_, _ = horizontal.evaluate(hz, np.linspace(hz.start, hz.end, 2000))
    ref = np.column_stack([re_, rn])
    size = max(1.0, float(np.abs(ref).max()))

    def axis(pts):
        mu = pts.mean(axis=0)
        _, _, vt = np.linalg.svd(pts - mu, full_matrices=False)
        return mu, math.atan2(vt[0, 1], vt[0, 0])

    mu_d, a_d = axis(drawn)
    mu_r, a_r = axis(ref)
    starts = [(0.0, 0.0, 0.0)]
    for flip in (0.0, math.pi):
        ang = a_r - a_d + flip
        c, s = math.cos(ang), math.sin(ang)
        starts.append(
            (mu_r[0] - (c * mu_d[0] - s * mu_d[1]), mu_r[1] - (s * mu_d[0] + c * mu_d[1]), ang)
        )
    best: tuple[float, Similarity] | None = None
    for dx, dy, ang in starts:
        t = Similarity(dx, dy, ang, 1.0, "fitted")
        for _ in range(100):
            world = t.apply(drawn)
            foot, normal, status = _feet(proj, world)
            d = world - foot
            dist = np.hypot(d[:, 0], d[:, 1])
            keep = dist <= 3.0 * float(np.median(dist)) + 1e-9 * size
            if keep.sum() < 3:
                break
            # rows: along the normal where the foot is on the alignment, x and y beyond it
            w, f, nrm, end = world[keep], foot[keep], normal[keep], status[keep] != 0
            ctr = w.mean(axis=0)
            perp = np.column_stack([-(w[:, 1] - ctr[1]), w[:, 0] - ctr[0]])
            rows = [np.column_stack([(nrm * perp).sum(1), nrm[:, 0], nrm[:, 1]])[~end]]
            rhs = [-((w - f) * nrm).sum(1)[~end]]
            if end.any():
                rows += [np.column_stack([perp[end, 0], np.ones(end.sum()), np.zeros(end.sum())])]
                rows += [np.column_stack([perp[end, 1], np.zeros(end.sum()), np.ones(end.sum())])]
                rhs += [-(w - f)[end, 0], -(w - f)[end, 1]]
            (da, ddx, ddy), *_ = np.linalg.lstsq(np.vstack(rows), np.concatenate(rhs), rcond=None)
            # rotate about ctr by da, then shift
            c, s = math.cos(da), math.sin(da)
            ndx = c * (t.dx - ctr[0]) - s * (t.dy - ctr[1]) + ctr[0] + ddx
            ndy = s * (t.dx - ctr[0]) + c * (t.dy - ctr[1]) + ctr[1] + ddy
            t = Similarity(float(ndx), float(ndy), t.angle + float(da), 1.0, "fitted")
            if abs(da) * size + math.hypot(ddx, ddy) < 1e-10 * size:
                break
        world = t.apply(drawn)
        foot, _, _ = _feet(proj, world)
        rms = float(np.sqrt(np.mean(np.sum((world - foot) ** 2, axis=1))))
        if best is None or rms < best[0]:
            best = (rms, t)
        if rms < 1e-4 * (hz.end - hz.start):
            break  # laid on the alignment: the other starts cannot do better in a way that matters
    assert best is not None
    rms, t = best
    angle = (t.angle + math.pi) % (2 * math.pi) - math.pi
    return Similarity(t.dx, t.dy, angle, scale, "fitted"), rms


def _element_at(hz: HorizontalGeometry, s: float) -> int:
    starts = np.array([g.start_station for g in hz.elements])
    return int(np.clip(np.searchsorted(starts, s, side="right") - 1, 0, len(starts) - 1))


def _piece_findings(
    pieces: list[DrawnPiece], proj: Projector, t: Similarity, tol: float
) -> list[PieceFinding]:
    hz = proj.geom
    arcs = [p for p in pieces if p.kind == "arc" and p.radius is not None]
    if not arcs:
        return []
    world = t.apply(np.concatenate([p.points for p in arcs]))
    st_all, off_all, status_all = proj(world[:, 1], world[:, 0])  # all arcs in one call
    cuts = np.cumsum([len(p.points) for p in arcs])[:-1]
    out = []
    for p, st, off, status in zip(
        arcs,
        np.split(st_all, cuts),
        np.split(off_all, cuts),
        np.split(status_all, cuts),
        strict=True,
    ):
        assert p.radius is not None
        if (status != 0).all() or np.abs(off).max() > max(50 * tol, 0.02 * p.radius * t.scale):
            continue  # not on the alignment: other linework, reported by the offsets if at all
        a, b = float(st.min()), float(st.max())
        mid = _element_at(hz, 0.5 * (a + b))
        g = hz.elements[mid]
        inside = max(0.0, min(b, g.end_station) - max(a, g.start_station)) / max(b - a, 1e-12)
        if inside < 0.9:
            continue  # an arc across a joint: the offsets tell
        r = p.radius * t.scale
        name = f"{g.element} {g.index + 1}"
        if g.kind == "arc":
            computed = 1.0 / abs(g.k0)
            if abs(r - computed) > tol:
                out.append(PieceFinding(a, b, "radius", r, computed, name, p.handle))
        elif g.kind == "line":
            out.append(PieceFinding(a, b, "arc where a line belongs", r, None, name, p.handle))
        elif (b - a) >= 0.5 * g.length:
            out.append(PieceFinding(a, b, "spiral drawn as an arc", r, None, name, p.handle))
    return out


def audit_plan(
    pieces: list[DrawnPiece],
    hz: HorizontalGeometry,
    tol: float,
    layer: str,
    transform: Similarity | None = None,
    rms_fit: float | None = None,
) -> PlanAudit:
    """Deviation of ``pieces`` (drawing coordinates) from ``hz`` after ``transform``."""
    t = transform or Similarity()
    step = _step(pieces, hz)
    world = t.apply(_sample(pieces, step))
    proj = hz.projector
    st, off, status = proj(world[:, 1], world[:, 0])
    on = status == 0
    s, o = st[on], off[on]
    order = np.argsort(s, kind="stable")
    s, o = s[order], o[order]
    absd = np.abs(o)
    # runs over tolerance; pieces meeting at a joint interleave their samples there, so
    # runs closer than a few steps are one stretch
    runs: list[list[int]] = []
    for i, j in true_runs(absd > tol):
        if runs and s[i] - s[runs[-1][1]] <= 3.0 * step:
            runs[-1][1] = j
        else:
            runs.append([i, j])
    over = [
        (float(s[i]), float(s[j]), float(o[i + int(np.argmax(absd[i : j + 1]))])) for i, j in runs
    ]
    # coverage: where consecutive samples are farther apart than a few steps
    uncovered = []
    reach = 3.0 * step + tol
    edges = np.concatenate([[hz.start], s, [hz.end]])
    gaps = np.flatnonzero(np.diff(edges) > reach)
    uncovered = [(float(edges[i]), float(edges[i + 1])) for i in gaps]
    worst = int(np.argmax(absd)) if len(absd) else 0
    return PlanAudit(
        layer,
        t,
        int(len(s)),
        float(absd.max()) if len(absd) else math.nan,
        float(absd.mean()) if len(absd) else math.nan,
        float(s[worst]) if len(s) else math.nan,
        tuple(over),
        tuple(uncovered),
        int((~on).sum()),
        tuple(_piece_findings(pieces, proj, t, tol)),
        rms_fit,
    )
