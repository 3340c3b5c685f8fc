"""Transitions defined by an equation from their tangent rather than by a curvature law
along the arc: the cubic parabola and its relatives, the radioid and the cubic spiral.

Each form is given in its own frame: origin at the tangent point, x along the
tangent, y towards the curve, parameter ``p`` running from 0 to the extent ``P``
(tangent abscissa x, or arc length s for the cubic spiral), normalised as
xi = p / P, with c = P / R. The forms, as commonly published (from memory; the
LandXML schemas name the types but give no equations):

``cubicParabola``, ``japaneseCubic``
    y = x^3 / (6 R X): the approximate curvature y'' grows linearly with x
    and reaches 1/R at the end. The stated length is, as for every LandXML
    element, the length along the curve, so X follows from it.
``biquadraticParabola``
    y'' follows the two-parabola (biquadratic) law in x: 2 xi^2 up to mid-length,
    1 - 2 (1 - xi)^2 after it.
``sineHalfWave``
    y'' follows the half-wave law in x: (1 - cos(pi xi)) / 2.
``radioid``
    the radioid on the abscissa: the exact curvature is proportional to x,
    so sin(theta) = x^2 / (2 R X).
``cubic``
    the cubic spiral: the offset is cubic in the arc length, y = s^3 / (6 R L),
    so sin(theta) = s^2 / (2 R L).

They run between a tangent and an arc; a file's spiral from the arc to the
tangent is the same curve travelled the other way. Coordinates come from
8-point Gauss-Legendre quadrature on panels (a break at mid-length for the
biquadratic form), so they are exact to round-off; the tests compare them with
the closed forms and with ``scipy.integrate.quad``.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
from numpy.typing import NDArray

__all__ = ["TANGENT_FORMS", "TangentForm", "place"]

#: spiType values computed here.
TANGENT_FORMS = (
    "cubic",
    "cubicParabola",
    "japaneseCubic",
    "biquadraticParabola",
    "sineHalfWave",
    "radioid",
)
_SLOPE_LAW = {"cubicParabola": 0, "japaneseCubic": 0, "biquadraticParabola": 1, "sineHalfWave": 2}
_GL_T, _GL_W = np.polynomial.legendre.leggauss(8)


def _g1(law: int, xi: NDArray[np.float64]) -> NDArray[np.float64]:
    """Integral of the normalised y'' law from 0 to xi (so y' = c * G1)."""
    if law == 0:
        return 0.5 * xi * xi
    if law == 1:
        return np.where(xi <= 0.5, 2.0 * xi**3 / 3.0, xi + 2.0 * (1.0 - xi) ** 3 / 3.0 - 0.5)
    return 0.5 * (xi - np.sin(np.pi * xi) / np.pi)


def _g(law: int, xi: NDArray[np.float64]) -> NDArray[np.float64]:
    """The normalised y'' law (0 at the tangent, 1 at the arc)."""
    if law == 0:
        return xi
    if law == 1:
        return np.where(xi <= 0.5, 2.0 * xi * xi, 1.0 - 2.0 * (1.0 - xi) ** 2)
    return 0.5 * (1.0 - np.cos(np.pi * xi))


def _local(kind: str, c: float, xi: NDArray[np.float64]):
    """Heading theta, the three integrands (dx, dy, ds per d xi over P) and R * curvature."""
    if kind in _SLOPE_LAW:
        law = _SLOPE_LAW[kind]
        slope = c * _g1(law, xi)
        theta = np.arctan(slope)
        sec = np.sqrt(1.0 + slope * slope)
        return theta, np.ones_like(xi), slope, sec, _g(law, xi) / sec**3
    sin_t = 0.5 * c * xi * xi
    cos_t = np.sqrt(1.0 - sin_t * sin_t)
    theta = np.arcsin(sin_t)
    if kind == "radioid":  # parameter x
        return theta, np.ones_like(xi), sin_t / cos_t, 1.0 / cos_t, xi
    return theta, cos_t, sin_t, np.ones_like(xi), xi / cos_t  # cubic: parameter s


def _breaks(kind: str, c: float) -> NDArray[np.float64]:
    n = 2 * max(1, math.ceil(8.0 * c))  # even, so mid-length is a panel break
    return np.linspace(0.0, 1.0, n + 1)


def _integrals(kind: str, c: float, a: NDArray[np.float64], b: NDArray[np.float64]):
    """Integrals of the three integrands over [a, b] (normalised), one panel each."""
    xi = a[:, None] + (b - a)[:, None] * (1.0 + _GL_T[None, :]) / 2.0
    _, fx, fy, fs, _ = _local(kind, c, xi)
    half = (b - a) / 2.0
    return half * (fx @ _GL_W), half * (fy @ _GL_W), half * (fs @ _GL_W)


@dataclass(frozen=True, eq=False)
class TangentForm:
    """One transition of a tangent form, solved and placed in the plan."""

    kind: str
    radius: float
    length: float  # along the curve
    extent: float  # P: tangent abscissa X, or the length for the cubic spiral
    reverse: bool  # travelled from the arc to the tangent
    sign: float  # +1 turning left (ccw), -1 right
    origin: tuple[float, float]  # the tangent point, world x/y
    axis: float  # world math angle of the local x axis
    side: float  # +1 when local y is to the left of the axis
    knots: NDArray[np.float64]  # panel breaks, normalised
    cum: NDArray[np.float64]  # (3, n) x, y, s at the breaks, normalised

    @property
    def c(self) -> float:
        return self.extent / self.radius

    def _at_param(self, xi: NDArray[np.float64]):
        k = np.clip(np.searchsorted(self.knots, xi, side="right") - 1, 0, len(self.knots) - 2)
        a = self.knots[k]
        ix, iy, is_ = _integrals(self.kind, self.c, a, xi)
        theta, _, _, _, kr = _local(self.kind, self.c, xi)
        return (
            self.cum[0, k] + ix,
            self.cum[1, k] + iy,
            self.cum[2, k] + is_,
            theta,
            kr,
        )

    def _param_of(self, u: NDArray[np.float64]) -> NDArray[np.float64]:
        """Normalised parameter at normalised arc length u from the tangent point."""
        if self.kind == "cubic":
            return u
        total = self.cum[2, -1]
        xi = np.clip(u / total, 0.0, 1.0)
        for _ in range(30):
            _, _, s, _, _ = self._at_param(xi)
            _, _, _, fs, _ = _local(self.kind, self.c, xi)
            step = (s - u) / fs
            xi = np.clip(xi - step, 0.0, 1.0)
            if np.all(np.abs(step) < 1e-15):
                break
        return xi

    def state(self, d: NDArray[np.float64]):
        """World x, y, heading and signed curvature at distances d from the element's start."""
        dist = self.length - d if self.reverse else d
        u = dist / self.extent  # normalised arc length
        xi = self._param_of(u)
        lx, ly, _, theta, kr = self._at_param(xi)
        lx, ly = lx * self.extent, ly * self.extent * self.side
        ca, sa = math.cos(self.axis), math.sin(self.axis)
        x = self.origin[0] + lx * ca - ly * sa
        y = self.origin[1] + lx * sa + ly * ca
        heading = self.axis + self.side * theta + (math.pi if self.reverse else 0.0)
        return x, y, heading, self.sign * kr / self.radius


def _extent(kind: str, radius: float, length: float) -> float:
    """P such that the form's arc length from the tangent point is ``length``."""
    if kind == "cubic":
        return length
    p = length
    for _ in range(100):
        c = p / radius
        knots = _breaks(kind, c)
        _, _, s = _integrals(kind, c, knots[:-1], knots[1:])
        new = length / float(s.sum())
        if abs(new - p) <= 1e-15 * length:
            return new
        p = new
    return p


def place(
    kind: str,
    radius: float,
    length: float,
    reverse: bool,
    sign: float,
    start: tuple[float, float],
    heading0: float,
) -> TangentForm:
    """Solve a transition of ``kind`` and place it to start at ``start`` heading ``heading0``.

    Raises ValueError when the form cannot reach that length at that radius.
    """
    limit = 2.0 * radius  # sin(theta) = P / (2R) at the end of the sine forms
    if kind in ("cubic", "radioid") and length >= limit:
        raise ValueError(
            f"a {kind} transition is defined only while it is shorter than twice its "
            f"radius ({length:g} >= {limit:g})"
        )
    extent = _extent(kind, radius, length)
    if kind == "radioid" and extent >= limit:
        raise ValueError(f"a radioid reaches its tangent-normal point before length {length:g}")
    c = extent / radius
    knots = _breaks(kind, c)
    ix, iy, is_ = _integrals(kind, c, knots[:-1], knots[1:])
    cum = np.zeros((3, len(knots)))
    cum[0, 1:], cum[1, 1:], cum[2, 1:] = np.cumsum(ix), np.cumsum(iy), np.cumsum(is_)
    cum.flags.writeable = False
    knots.flags.writeable = False
    if not reverse:
        origin, axis, side = start, heading0, sign
    else:
        side = -sign
        theta_end = float(_local(kind, c, np.array([1.0]))[0][0])
        axis = heading0 - math.pi - side * theta_end
        ex, ey = cum[0, -1] * extent, cum[1, -1] * extent * side
        ca, sa = math.cos(axis), math.sin(axis)
        origin = (start[0] - (ex * ca - ey * sa), start[1] - (ex * sa + ey * ca))
    return TangentForm(kind, radius, length, extent, reverse, sign, origin, axis, side, knots, cum)
