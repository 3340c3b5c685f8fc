"""Spiral curvature laws k(t) = k0 + (k1 - k0) * f(t), their exact heading integrals and
Gauss-Legendre quadrature of the coordinates.
"""

from __future__ import annotations

import math

import numpy as np
from numpy.typing import NDArray

from gradeline.geometry.tangent_forms import TANGENT_FORMS

__all__ = ["ARC_LAWS", "REVERSED", "SPIRAL_TYPES", "TANGENT_LAW", "TWO_PI"]

TWO_PI = 2.0 * math.pi


#: Curvature laws k(t) = k0 + (k1 - k0) * f(t), t = s / L, of the spiral types
#: defined along the arc (laws as commonly published for these transitions; from
#: memory). ``weinerBogen`` (Viennese bend) is the seventh-degree law
#: f = 35t^4 - 84t^5 + 70t^6 - 20t^7, whose curvature and its first three
#: derivatives are continuous with the line and the arc (the pure-curvature
#: form, without the cant-dependent term). The ``rev*`` types name the same
#: transition travelled from the arc to the tangent: every one of these laws is
#: point-symmetric about mid-length, f(t) + f(1 - t) = 1, so the curvature
#: running from k0 to k1 is the same law either way. The forms defined from the
#: tangent (cubic parabola and its relatives) are in
#: :mod:`gradeline.geometry.tangent_forms`.
ARC_LAWS = ("clothoid", "bloss", "cosine", "sinusoid", "biquadratic", "weinerBogen")
REVERSED = {
    "revBiquadratic": "biquadratic",
    "revBloss": "bloss",
    "revCosine": "cosine",
    "revSinusoid": "sinusoid",
}
#: Every LandXML 1.2 spiType gradeline computes.
SPIRAL_TYPES = ARC_LAWS + tuple(REVERSED) + TANGENT_FORMS
#: Law code of the tangent forms, which :mod:`tangent_forms` evaluates.
TANGENT_LAW = 7
_LAW = {
    "line": 0,
    "arc": 0,
    "clothoid": 1,
    "bloss": 2,
    "cosine": 3,
    "sinusoid": 4,
    "biquadratic": 5,
    "weinerBogen": 6,
    **{rev: ARC_LAWS.index(base) + 1 for rev, base in REVERSED.items()},
    **dict.fromkeys(TANGENT_FORMS, TANGENT_LAW),
}

_GL_T, _GL_W = np.polynomial.legendre.leggauss(8)
_PANEL_TURN = 0.25  # radians of turning per quadrature panel


def _shape(
    law: NDArray[np.intp], t: NDArray[np.float64], present: frozenset[int] | None = None
) -> NDArray[np.float64]:
    """f(t): normalised curvature change of each law (0 at t=0, 1 at t=1); only the
    laws in ``present`` (all when None) are looked for."""
    out = t.copy()  # clothoid, and lines/arcs where dk = 0 anyway
    m = law == 2 if present is None or 2 in present else None
    if m is not None and m.any():
        tt = t[m]
        out[m] = tt * tt * (3.0 - 2.0 * tt)
    m = law == 3 if present is None or 3 in present else None
    if m is not None and m.any():
        out[m] = 0.5 * (1.0 - np.cos(np.pi * t[m]))
    m = law == 4 if present is None or 4 in present else None
    if m is not None and m.any():
        tt = t[m]
        out[m] = tt - np.sin(TWO_PI * tt) / TWO_PI
    m = law == 5 if present is None or 5 in present else None
    if m is not None and m.any():
        tt = t[m]
        out[m] = np.where(tt <= 0.5, 2.0 * tt * tt, 1.0 - 2.0 * (1.0 - tt) ** 2)
    m = law == 6 if present is None or 6 in present else None
    if m is not None and m.any():
        tt = t[m]
        out[m] = tt**4 * (35.0 - 84.0 * tt + 70.0 * tt * tt - 20.0 * tt**3)
    return out


def _shape_integral(
    law: NDArray[np.intp], t: NDArray[np.float64], present: frozenset[int] | None = None
) -> NDArray[np.float64]:
    """F(t) = integral of f from 0 to t, in closed form for each law (only those in
    ``present``, all when None)."""
    out = 0.5 * t * t
    m = law == 2 if present is None or 2 in present else None
    if m is not None and m.any():
        tt = t[m]
        out[m] = tt**3 - 0.5 * tt**4
    m = law == 3 if present is None or 3 in present else None
    if m is not None and m.any():
        tt = t[m]
        out[m] = 0.5 * (tt - np.sin(np.pi * tt) / np.pi)
    m = law == 4 if present is None or 4 in present else None
    if m is not None and m.any():
        tt = t[m]
        out[m] = 0.5 * tt * tt - (1.0 - np.cos(TWO_PI * tt)) / (4.0 * np.pi**2)
    m = law == 5 if present is None or 5 in present else None
    if m is not None and m.any():
        tt = t[m]
        out[m] = np.where(tt <= 0.5, 2.0 * tt**3 / 3.0, tt + 2.0 * (1.0 - tt) ** 3 / 3.0 - 0.5)
    m = law == 6 if present is None or 6 in present else None
    if m is not None and m.any():
        tt = t[m]
        out[m] = tt**5 * (7.0 - 14.0 * tt + 10.0 * tt * tt - 2.5 * tt**3)
    return out


def _integrate_spiral(
    law: int, length: float, h0: float, k0: float, dk: float, a: float, b: float
) -> tuple[float, float]:
    """(dx, dy) along a spiral from local distance a to b (scalar quadrature)."""
    u = a + (b - a) * (1.0 + _GL_T) / 2.0
    t = u / length
    lw = np.full(u.shape, law, dtype=np.intp)
    th = h0 + k0 * u + dk * length * _shape_integral(lw, t)
    half = (b - a) / 2.0
    return float(half * np.dot(_GL_W, np.cos(th))), float(half * np.dot(_GL_W, np.sin(th)))


def _panels(law: int, length: float, k0: float, dk: float) -> int:
    """Quadrature panels of equal length over a spiral: one per quarter radian of
    turning, and an even count for the biquadratic law, whose curvature changes its
    formula at mid-length: a panel across that joint would integrate a kinked
    curvature with a rule made for smooth ones (3.5 micrometres off at the end of
    a 100 m transition from R 300 to R 1000, against the buildingSMART reference
    table in tests/test_spiral_laws.py)."""
    turn = (abs(k0) + abs(dk)) * length
    n = max(1, math.ceil(turn / _PANEL_TURN))
    return n + n % 2 if law == _LAW["biquadratic"] else n
