"""From drafted profile linework back to geometry: tangents, PVIs and vertical curves.

Steps: chain the pieces in station order (refusing gaps and back-tracking),
find where the line bends with a windowed quadratic fit (curvature well above
the noise the fit measures), fit each tangent by least squares, intersect
neighbouring tangents for the PVIs, then fit every bend as a symmetric
parabola, an unsymmetrical parabola and a circular arc tangent to both grades
(scipy.optimize), and keep the simplest model whose residual is within 5 % of
the best. Every fitted piece reports its residual.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
from numpy.typing import NDArray

from gradeline.errors import GradelineError, ModelError
from gradeline.geometry import vertical
from gradeline.model import Profile, PVISpec

__all__ = ["FitResult", "FittedCurve", "chain", "fit_profile"]


class FitError(GradelineError):
    """The linework cannot be turned into a profile."""


@dataclass(frozen=True, slots=True)
class FittedCurve:
    """One recovered vertical curve (or a plain PVI when ``kind`` is ``none``)."""

    pvi_station: float
    pvi_elevation: float
    kind: str
    length_in: float
    length_out: float
    radius: float | None
    rms: float
    max_residual: float
    alternatives: tuple[tuple[str, float], ...]  # (kind, rms) of every model tried


@dataclass(frozen=True, eq=False)
class FitResult:
    """A recovered profile and how well it fits the linework."""

    profile: Profile
    curves: tuple[FittedCurve, ...]
    tangent_rms: tuple[float, ...]
    rms: float
    max_residual: float
    worst_station: float
    points: int


def chain(lines: list[NDArray[np.float64]], gap: float) -> NDArray[np.float64]:
    """Join pieces into one station-ordered polyline.

    Raises
    ------
    FitError
        A gap larger than ``gap`` between pieces, or linework that runs back.
    """
    if not lines:
        raise FitError("no linework to fit")
    pieces = []
    for p in lines:
        p = np.asarray(p, dtype=np.float64)
        if p[-1, 0] < p[0, 0]:
            p = p[::-1]
        if np.any(np.diff(p[:, 0]) < -gap):
            i = int(np.argmax(np.diff(p[:, 0]) < -gap))
            raise FitError(
                f"the linework runs back near x = {p[i, 0]:.3f}; a profile must advance in station"
            )
        pieces.append(p)
    pieces.sort(key=lambda p: p[0, 0])
    out = [pieces[0]]
    for p in pieces[1:]:
        last = out[-1][-1]
        d = math.hypot(p[0, 0] - last[0], p[0, 1] - last[1])
        if p[0, 0] < last[0] - gap:
            raise FitError(
                f"pieces overlap in station near x = {p[0, 0]:.3f} (one starts "
                f"before the previous ends at {last[0]:.3f}); the linework backtracks"
            )
        if d > gap:
            raise FitError(
                f"the linework is broken: a gap of {d:.4f} between x = {last[0]:.3f} "
                f"and x = {p[0, 0]:.3f}"
            )
        out.append(p[1:] if d <= gap else p)
    pts = np.concatenate(out)
    keep = np.concatenate([[True], np.diff(pts[:, 0]) > 1e-9])
    return pts[keep]


#: Most points the linework is resampled into (a window too small for its length
#: would ask for terabytes).
MAX_FIT_SAMPLES = 2_000_000


def _bends(s: NDArray[np.float64], z: NDArray[np.float64], window: float):
    """Spans where the line bends: |d2z/ds2| above the noise of a windowed fit."""
    n = len(s)
    k = np.zeros(n)
    resid = np.zeros(n)
    lo = np.searchsorted(s, s - window / 2)
    hi = np.searchsorted(s, s + window / 2, side="right")
    for i in range(n):
        a, b = lo[i], hi[i]
        if b - a < 4:
            continue
        t = s[a:b] - s[i]
        coef, res, *_ = np.linalg.lstsq(
            np.column_stack([np.ones_like(t), t, t * t]), z[a:b], rcond=None
        )
        k[i] = 2 * coef[2]
        resid[i] = math.sqrt(res[0] / (b - a)) if len(res) else 0.0
    count = np.maximum(hi - lo, 1)
    sigma = max(float(np.median(resid)), 1e-9)
    _bends.noise = sigma  # type: ignore[attr-defined]
    sigma_k = 2 * np.sqrt(180.0 / count) * sigma / window**2
    bent = np.abs(k) > np.maximum(6 * sigma_k, 1e-9)
    spans = []
    i = 0
    while i < n:
        if not bent[i]:
            i += 1
            continue
        j = i
        while j + 1 < n and bent[j + 1] and np.sign(k[j + 1]) == np.sign(k[i]):
            j += 1
        spans.append((i, j, float(np.sign(k[i]))))
        i = j + 1
    # a bend drawn with chords flickers: join same-sign pieces closer than a window
    merged: list[tuple[int, int, float]] = []
    for a, b, sg in spans:
        if merged and merged[-1][2] == sg and s[a] - s[merged[-1][1]] < 2 * window:
            merged[-1] = (merged[-1][0], b, sg)
        else:
            merged.append((a, b, sg))
    return [m for m in merged if s[m[1]] - s[m[0]] >= window / 4 or m[1] - m[0] > 2]


def _line(s, z):
    a = np.column_stack([s, np.ones_like(s)])
    (g, c), *_ = np.linalg.lstsq(a, z, rcond=None)
    r = z - (g * s + c)
    return float(g), float(c), float(np.sqrt(np.mean(r * r))) if len(r) else 0.0


def _model_z(kind, params, s, pvi_s, pvi_z, g1, g2):
    specs = None
    if kind == "parabolic":
        half = params[0] / 2
        specs = PVISpec(pvi_s, pvi_z, "parabolic", half, half)
    elif kind == "unsymmetric":
        specs = PVISpec(pvi_s, pvi_z, "unsymmetric", params[0], params[1])
    else:
        specs = PVISpec(pvi_s, pvi_z, "circular", radius=params[0])
    left = pvi_s - 1e6
    right = pvi_s + 1e6
    prof = Profile(
        "fit", (PVISpec(left, pvi_z - g1 * 1e6), specs, PVISpec(right, pvi_z + g2 * 1e6))
    )
    return vertical.elevation(vertical.solve(prof), s)


def _fit_curve(s, z, pvi_s, pvi_z, g1, g2, room_in, room_out, noise):
    from scipy.optimize import minimize, minimize_scalar

    def rms(kind, params):
        try:
            if any(p <= 0 for p in params):
                return 1e9
            return float(
                np.sqrt(np.mean((_model_z(kind, params, s, pvi_s, pvi_z, g1, g2) - z) ** 2))
            )
        except (ModelError, ValueError, FloatingPointError):
            return 1e9

    results = {}
    span = min(room_in, room_out) * 2
    r = minimize_scalar(
        lambda L: rms("parabolic", (L,)),
        bounds=(1e-3, max(span, 1e-2)),
        method="bounded",
        options={"xatol": 1e-6},
    )
    results["parabolic"] = (r.fun, (float(r.x),))
    l0 = float(r.x) / 2
    m = minimize(
        lambda p: rms("unsymmetric", tuple(p)),
        x0=[l0, l0 * 1.01],
        method="Nelder-Mead",
        options={"xatol": 1e-6, "fatol": 1e-12, "maxiter": 4000},
    )
    results["unsymmetric"] = (m.fun, (float(m.x[0]), float(m.x[1])))
    dth = abs(math.atan(g2) - math.atan(g1))
    if dth > 0:
        r_guess = float(r.x) / dth
        c = minimize_scalar(
            lambda R: rms("circular", (R,)),
            bounds=(r_guess / 4, r_guess * 4),
            method="bounded",
            options={"xatol": 1e-6},
        )
        results["circular"] = (c.fun, (float(c.x),))
    best = min(v[0] for v in results.values())
    if best >= 1e9:
        raise FitError(f"no curve model fits the bend at station {pvi_s:.3f}")
    # the simplest model that is as good as the best, within 5 % or a fifth of the noise
    slack = max(0.05 * best, 0.2 * noise, 1e-7)
    for kind in ("parabolic", "circular", "unsymmetric"):
        if kind in results and results[kind][0] <= best + slack:
            return kind, results[kind][1], results
    raise FitError(f"no curve model fits the bend at station {pvi_s:.3f}")


def _pack(specs: list[PVISpec]) -> list[float]:
    x = [specs[0].elevation]
    for p in specs[1:-1]:
        x += [p.station, p.elevation]
        if p.kind == "parabolic":
            x.append(p.length_in + p.length_out)
        elif p.kind == "unsymmetric":
            x += [p.length_in, p.length_out]
        else:
            x.append(float(p.radius or 0.0))
    x.append(specs[-1].elevation)
    return x


def _unpack(x, template: list[PVISpec]) -> list[PVISpec]:
    out = [PVISpec(template[0].station, x[0])]
    i = 1
    for p in template[1:-1]:
        st, el = x[i], x[i + 1]
        i += 2
        if p.kind == "parabolic":
            out.append(PVISpec(st, el, "parabolic", x[i] / 2, x[i] / 2))
            i += 1
        elif p.kind == "unsymmetric":
            out.append(PVISpec(st, el, "unsymmetric", x[i], x[i + 1]))
            i += 2
        else:
            out.append(PVISpec(st, el, "circular", radius=x[i]))
            i += 1
    out.append(PVISpec(template[-1].station, x[i]))
    return out


def _refine_joint(specs: list[PVISpec], s, z) -> list[PVISpec]:
    """Least-squares refinement of every PVI, elevation and curve size at once.

    The tangent-by-tangent estimate uses only the points between curves; this
    step lets the points on the curves pull on the PVIs too, which matters when
    the drawing carries rounding noise.
    """
    from scipy.optimize import least_squares

    x0 = np.array(_pack(specs), dtype=np.float64)
    big = np.full(len(s), 1e3)

    def fun(x):
        try:
            geom = vertical.solve(Profile("fit", tuple(_unpack(x, specs))))
        except (ModelError, ValueError):
            return big
        return vertical.elevation(geom, s) - z

    try:
        r = least_squares(fun, x0, method="lm", x_scale="jac", max_nfev=200 * len(x0))
    except (ValueError, np.linalg.LinAlgError):
        return specs
    if not np.all(np.isfinite(r.x)) or np.sum(fun(r.x) ** 2) > np.sum(fun(x0) ** 2):
        return specs
    try:
        return _unpack(r.x, specs)
    except ModelError:
        return specs


def fit_profile(
    points: NDArray[np.float64], *, window: float, name: str = "Fitted profile", iterations: int = 3
) -> FitResult:
    """Recover PVIs and vertical curves from station/elevation points.

    Parameters
    ----------
    points : (n, 2) array
        Station, elevation of the chained linework.
    window : float
        Length over which curvature is estimated (40 ft / 12 m works for
        drafted profiles); tangents shorter than this between two curves merge.
    """
    if len(points) < 2:
        raise FitError("the linework has fewer than two points")
    # resample the drawn line evenly (it is straight between its vertices), so the
    # curvature estimate sees the same density on tangents and on curves
    s0, z0 = points[:, 0], points[:, 1]
    if not (np.isfinite(points).all() and math.isfinite(window) and window > 0):
        raise FitError("the linework or the window is not finite (or the window is not positive)")
    step = window / 20.0
    count = (s0[-1] - s0[0]) / step
    if not count <= MAX_FIT_SAMPLES:
        raise FitError(
            f"a window of {window:g} resamples {s0[-1] - s0[0]:,.0f} units of linework into "
            f"{count:,.0f} points (at most {MAX_FIT_SAMPLES:,}); choose a larger window"
        )
    s = np.union1d(np.arange(s0[0], s0[-1], step), s0)
    z = np.interp(s, s0, z0)
    spans = _bends(s, z, window)
    noise = getattr(_bends, "noise", 0.0)
    # fit on the drawn vertices (chords of a drawn curve lie to one side of it,
    # their vertices on it), plus points along long straight segments: those are
    # drawn tangents, exact wherever sampled
    seg = np.diff(s0)
    long = np.flatnonzero(seg > window)
    extra = [np.arange(s0[i] + step, s0[i + 1], step) for i in long]
    s = np.union1d(s0, np.concatenate(extra)) if extra else s0
    z = np.interp(s, s0, z0)
    margin = window / 4
    curve_zone = [
        (s_rs, s_re)
        for s_rs, s_re in (
            (float(sv[a]) - margin, float(sv[b]) + margin)
            for a, b, _ in spans
            for sv in [np.union1d(np.arange(s0[0], s0[-1], step), s0)]
        )
    ]
    for _ in range(iterations):
        tangents = []
        for k in range(len(curve_zone) + 1):
            lo = s[0] if k == 0 else curve_zone[k - 1][1]
            hi = s[-1] if k == len(curve_zone) else curve_zone[k][0]
            sel = (s >= lo) & (s <= hi)
            if sel.sum() < 3:
                # a short tangent between two curves: use what lies between them
                lo2 = s[0] if k == 0 else curve_zone[k - 1][1] - margin
                hi2 = s[-1] if k == len(curve_zone) else curve_zone[k][0] + margin
                sel = (s >= min(lo2, hi2)) & (s <= max(lo2, hi2))
            if sel.sum() < 2:
                mid = (lo + hi) / 2
                idx = np.argsort(np.abs(s - mid))[:2]
                sel = np.zeros(len(s), bool)
                sel[idx] = True
            tangents.append(_line(s[sel], z[sel]))
        pvis: list[tuple[float, float]] = []
        fitted: list[FittedCurve] = []
        new_zone = []
        for k in range(len(curve_zone)):
            g1, c1, _ = tangents[k]
            g2, c2, _ = tangents[k + 1]
            if abs(g2 - g1) < 1e-12:
                continue
            ps = (c2 - c1) / (g1 - g2)
            pz = g1 * ps + c1
            left = curve_zone[k - 1][1] if k else s[0]
            right = curve_zone[k + 1][0] if k + 1 < len(curve_zone) else s[-1]
            sel = (s >= max(left, curve_zone[k][0] - window)) & (
                s <= min(right, curve_zone[k][1] + window)
            )
            kind, params, results = _fit_curve(
                s[sel], z[sel], ps, pz, g1, g2, ps - left, right - ps, noise
            )
            model = _model_z(kind, params, s[sel], ps, pz, g1, g2)
            res = model - z[sel]
            if kind == "parabolic":
                l1 = l2 = params[0] / 2
                radius = None
            elif kind == "unsymmetric":
                l1, l2 = params
                radius = None
            else:
                radius = params[0]
                t = radius * math.tan(abs(math.atan(g2) - math.atan(g1)) / 2)
                l1, l2 = t * math.cos(math.atan(g1)), t * math.cos(math.atan(g2))
            fitted.append(
                FittedCurve(
                    ps,
                    pz,
                    kind,
                    l1,
                    l2,
                    radius,
                    float(np.sqrt(np.mean(res * res))),
                    float(np.max(np.abs(res))),
                    tuple((kk, float(v[0])) for kk, v in results.items()),
                )
            )
            pvis.append((ps, pz))
            new_zone.append((ps - l1, ps + l2))
        if len(new_zone) == len(curve_zone):
            curve_zone = new_zone
    g0, c0, _ = tangents[0]
    gn, cn, _ = tangents[-1]
    specs = [PVISpec(float(s[0]), g0 * s[0] + c0)]
    for f in fitted:
        if f.kind == "parabolic":
            specs.append(
                PVISpec(f.pvi_station, f.pvi_elevation, "parabolic", f.length_in, f.length_out)
            )
        elif f.kind == "unsymmetric":
            specs.append(
                PVISpec(f.pvi_station, f.pvi_elevation, "unsymmetric", f.length_in, f.length_out)
            )
        else:
            specs.append(PVISpec(f.pvi_station, f.pvi_elevation, "circular", radius=f.radius))
    specs.append(PVISpec(float(s[-1]), gn * s[-1] + cn))
    specs = _refine_joint(specs, s, z)
    try:
        prof = Profile(name, tuple(specs))
        geom = vertical.solve(prof)
    except ModelError as err:
        raise FitError(
            f"the recovered geometry is not a valid profile ({err.message}); "
            "try a different window",
            choice="window",
        ) from None
    # circular curves: state the arc length and the radius sign as LandXML files do
    # (positive on a sag, negative on a crest)
    by_station = {c.pvi_station: c for c in geom.curves}
    out = []
    for p in specs:
        c = by_station.get(p.station)
        if p.kind == "circular" and c is not None:
            r = abs(p.radius or 0.0) * (1 if c.curve_type == "sag" else -1)
            out.append(
                PVISpec(p.station, p.elevation, "circular", radius=r, arc_length=c.arc_length)
            )
        else:
            out.append(p)
    specs = out
    prof = Profile(name, tuple(specs))
    geom = vertical.solve(prof)
    res = vertical.elevation(geom, s0) - z0
    worst = int(np.argmax(np.abs(res)))
    return FitResult(
        prof,
        tuple(fitted),
        tuple(t[2] for t in tangents),
        float(np.sqrt(np.mean(res * res))),
        float(np.abs(res[worst])),
        float(s0[worst]),
        len(s0),
    )
