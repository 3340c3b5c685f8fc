"""Horizontal geometry against outside references and properties that need no source."""

from __future__ import annotations

import math

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from numpy.testing import assert_allclose
from scipy import integrate
from scipy.special import fresnel

from gradeline.deliverables import open_alignment
from gradeline.errors import InputError, ModelError
from gradeline.geometry import horizontal as H
from gradeline.geometry.curve_data import curve_data
from gradeline.geometry.directions import wrap_angle
from gradeline.geometry.station_offset import station_offset
from gradeline.io import landxml
from gradeline.model import HCurve, HLine, HorizontalAlignment, HSpiral
from tests.conftest import METRIC_SAMPLE, US_SAMPLE

# --- FHWA Bridge Geometry Manual, Appendix B example alignment ----------------------
# FHWA-HIF-22-034 (2022), Appendix B: PIs as (X = easting, Y = northing) and radii.
FHWA_PIS = [(500, 2500), (3340, 660), (4340, 5000), (7600, 4560), (8480, 2010)]
FHWA_R = [1000, 1250, 950]
# Published results (same appendix): PC/PT (X, Y), curve lengths and tangent runs.
FHWA_PC = [(2142.237995, 1436.014820), (4084.115884, 3889.462938), (7019.971367, 4638.286073)]
FHWA_PT = [(3660.446123, 2050.736173), (5469.395067, 4847.566310), (7790.932128, 4006.730765)]
FHWA_LC = [1919.222667, 1848.115835, 1049.119737]
FHWA_TANGENTS = [1956.785654, 1886.905454, 1564.635765, 2112.285084]


def _fhwa_landxml() -> bytes:
    """LandXML of the FHWA alignment built with textbook PI formulas (T = R tan(D/2)).

    Points are written northing first, as LandXML requires.
    """
    pts = [np.array(p, dtype=float) for p in FHWA_PIS]

    def xy(p):  # "northing easting"
        return f"{float(p[1])!r} {float(p[0])!r}"

    parts = []
    prev_end = pts[0]
    for i, r in enumerate(FHWA_R):
        pi = pts[i + 1]
        u_in = (pi - pts[i]) / np.linalg.norm(pi - pts[i])
        u_out = (pts[i + 2] - pi) / np.linalg.norm(pts[i + 2] - pi)
        turn = math.atan2(u_in[0] * u_out[1] - u_in[1] * u_out[0], float(u_in @ u_out))
        t = r * math.tan(abs(turn) / 2)
        pc, pt = pi - t * u_in, pi + t * u_out
        left = np.array([-u_in[1], u_in[0]])
        center = pc + (1 if turn > 0 else -1) * r * left
        rot = "ccw" if turn > 0 else "cw"
        parts.append(f"<Line><Start>{xy(prev_end)}</Start><End>{xy(pc)}</End></Line>")
        parts.append(
            f'<Curve rot="{rot}" radius="{r}"><Start>{xy(pc)}</Start>'
            f"<Center>{xy(center)}</Center><End>{xy(pt)}</End><PI>{xy(pi)}</PI></Curve>"
        )
        prev_end = pt
    parts.append(f"<Line><Start>{xy(prev_end)}</Start><End>{xy(pts[-1])}</End></Line>")
    return (
        '<LandXML><Units><Imperial linearUnit="foot"/></Units><Alignments>'
        '<Alignment name="FHWA B" staStart="0"><CoordGeom>'
        + "".join(parts)
        + "</CoordGeom></Alignment></Alignments></LandXML>"
    ).encode()


@pytest.fixture(scope="module")
def fhwa():
    return open_alignment(landxml.parse_bytes(_fhwa_landxml(), "fhwa.xml"))


def test_fhwa_curve_lengths_and_tangent_runs(fhwa):
    h = fhwa.horizontal
    arcs = [g.length for g in h.elements if g.kind == "arc"]
    lines = [g.length for g in h.elements if g.kind == "line"]
    assert_allclose(arcs, FHWA_LC, atol=1e-4)  # ft, FHWA-HIF-22-034 App. B
    assert_allclose(lines, FHWA_TANGENTS, atol=1e-4)
    assert h.findings == ()  # tangent throughout, no gaps


def test_no_stations_give_empty_coordinates(fhwa):
    # a plan without placeable curves asks for none (found by the plan drawing)
    n, e, hd = H.evaluate(fhwa.horizontal, [])
    assert n.shape == e.shape == hd.shape == (0,)


def test_fhwa_pc_pt_at_computed_stations(fhwa):
    h = fhwa.horizontal
    curves = curve_data(h)
    n, e, _ = H.evaluate(h, [c.start_station for c in curves])
    assert_allclose(np.column_stack([e, n]), FHWA_PC, atol=1e-4)
    n, e, _ = H.evaluate(h, [c.end_station for c in curves])
    assert_allclose(np.column_stack([e, n]), FHWA_PT, atol=1e-4)


def test_fhwa_curve_data_recovers_pis(fhwa):
    curves = curve_data(fhwa.horizontal)
    got = [(c.pi_easting, c.pi_northing) for c in curves]
    assert_allclose(got, FHWA_PIS[1:4], atol=1e-6)
    for c, r, lc in zip(curves, FHWA_R, FHWA_LC, strict=True):
        assert c.radius == pytest.approx(r, abs=1e-9)
        assert abs(c.delta) * r == pytest.approx(lc, abs=1e-4)
        # common practice: T = R tan(D/2), E = R (sec(D/2) - 1), M = R (1 - cos(D/2))
        half = abs(c.delta) / 2
        assert c.tangent_in == pytest.approx(r * math.tan(half), abs=1e-6)
        assert c.external == pytest.approx(r * (1 / math.cos(half) - 1), abs=1e-6)
        assert c.middle_ordinate == pytest.approx(r * (1 - math.cos(half)), abs=1e-9)
        assert c.chord == pytest.approx(2 * r * math.sin(half), abs=1e-6)


# --- clothoid against scipy.special.fresnel -------------------------------------------
def _single_spiral(length, radius, rot, r0=math.inf):
    # starts at the origin heading north (PI due north); End is only checked
    sp = HSpiral((0.0, 0.0), (0.0, 0.0), length, r0, radius, rot, pi=(10.0, 0.0))
    return H.solve(HorizontalAlignment((sp,)))


@pytest.mark.parametrize(
    ("length", "radius"),
    [(250.0, 1200.0), (300.0, 60.0), (80.0, 15.0)],
    ids=["highway", "long-small-radius", "ramp-hairpin"],
)
@pytest.mark.parametrize("rot", ["ccw", "cw"])
def test_clothoid_matches_fresnel(length, radius, rot):
    h = _single_spiral(length, radius, rot)
    s = np.linspace(0, length, 33)
    n, e, heading = H.evaluate(h, s)
    # scipy.special.fresnel: S(z), C(z) = int_0^z sin/cos(pi t^2 / 2) dt; with
    # A^2 = R L the clothoid is x = A sqrt(pi) C(s / (A sqrt(pi))), y likewise with S
    a = math.sqrt(radius * length) * math.sqrt(math.pi)
    fs, fc = fresnel(s / a)
    along, across = a * fc, a * fs
    side = 1.0 if rot == "ccw" else -1.0  # heading north: left is west (-easting)
    assert_allclose(n, along, atol=1e-9 * length)
    assert_allclose(e, -side * across, atol=1e-9 * length)
    assert_allclose(heading - math.pi / 2, side * s**2 / (2 * radius * length), atol=1e-12)


def test_partial_clothoid_matches_quadrature():
    # a spiral between two radii (2000 -> 400): heading and position against scipy quad
    L, r0, r1 = 220.0, 2000.0, 400.0
    h = _single_spiral(L, r1, "ccw", r0)
    k = lambda s: 1 / r0 + (1 / r1 - 1 / r0) * s / L  # noqa: E731
    th = lambda s: math.pi / 2 + integrate.quad(k, 0, s)[0]  # noqa: E731
    for s in (55.0, 130.0, 220.0):
        x = integrate.quad(lambda u: math.cos(th(u)), 0, s, epsabs=1e-12)[0]
        y = integrate.quad(lambda u: math.sin(th(u)), 0, s, epsabs=1e-12)[0]
        n, e, hd = H.evaluate(h, s)
        assert float(e) == pytest.approx(x, abs=1e-8)
        assert float(n) == pytest.approx(y, abs=1e-8)
        assert float(hd) == pytest.approx(th(s), abs=1e-12)


# Curvature laws k(t) = k0 + dk f(t) of the other transitions (from memory):
# Bloss f = 3t^2 - 2t^3; cosine f = (1 - cos(pi t))/2; sinusoid f = t - sin(2 pi t)/(2 pi);
# biquadratic (Schramm) f = 2t^2 up to t = 1/2, then 1 - 2(1 - t)^2.
LAWS = {
    "bloss": lambda t: 3 * t**2 - 2 * t**3,
    "cosine": lambda t: (1 - math.cos(math.pi * t)) / 2,
    "sinusoid": lambda t: t - math.sin(2 * math.pi * t) / (2 * math.pi),
    "biquadratic": lambda t: 2 * t * t if t <= 0.5 else 1 - 2 * (1 - t) ** 2,
    # Viennese bend (Wiener Bogen), pure-curvature form: 35t^4 - 84t^5 + 70t^6 - 20t^7
    # (from memory); scipy quad integrates this law, independently of the closed form
    "weinerBogen": lambda t: 35 * t**4 - 84 * t**5 + 70 * t**6 - 20 * t**7,
}


@pytest.mark.parametrize("kind", sorted(LAWS))
def test_other_spiral_laws_match_quadrature(kind):
    L, R = 150.0, 300.0
    sp = HSpiral((0.0, 0.0), (0.0, 0.0), L, math.inf, R, "cw", kind, pi=(10.0, 0.0))
    h = H.solve(HorizontalAlignment((sp,)))
    f = LAWS[kind]
    k = lambda s: -f(s / L) / R  # noqa: E731  (cw: turning right)
    th = lambda s: math.pi / 2 + integrate.quad(k, 0, s, epsabs=1e-14)[0]  # noqa: E731
    for s in (40.0, 75.0, 150.0):
        x = integrate.quad(lambda u: math.cos(th(u)), 0, s, epsabs=1e-12)[0]
        y = integrate.quad(lambda u: math.sin(th(u)), 0, s, epsabs=1e-12)[0]
        n, e, hd = H.evaluate(h, s)
        assert float(e) == pytest.approx(x, abs=1e-8)
        assert float(n) == pytest.approx(y, abs=1e-8)
        assert float(hd) == pytest.approx(th(s), abs=1e-10)
    assert float(H.curvature(h, L)) == pytest.approx(-1 / R, rel=1e-12)


def test_viennese_bend_joins_line_and_arc_smoothly():
    """Curvature and its first three derivatives are 0 at the start and steady at the
    end (common practice: the reason the Viennese bend is used); checked numerically."""
    L, R = 120.0, 500.0
    sp = HSpiral((0.0, 0.0), (0.0, 0.0), L, math.inf, R, "ccw", "weinerBogen", pi=(10.0, 0.0))
    h = H.solve(HorizontalAlignment((sp,)))
    d = 1e-3
    k = lambda s: float(H.curvature(h, s))  # noqa: E731
    assert k(0.0) == pytest.approx(0.0, abs=1e-15) and k(L) == pytest.approx(1 / R, rel=1e-12)
    for s0 in (0.0, L - 4 * d):
        diffs = [k(s0 + i * d) for i in range(5)]
        first = (diffs[1] - diffs[0]) / d
        assert abs(first) < 1e-8  # flat within the finite-difference noise


@pytest.mark.parametrize("kind", sorted(LAWS))
def test_arc_laws_are_point_symmetric_so_reversed_types_are_the_same_law(kind):
    """f(t) + f(1 - t) = 1 for every law above: travelled from the arc to the tangent,
    the curvature follows the same law, so revBloss etc. are computed as Bloss etc."""
    f = LAWS[kind]
    for t in np.linspace(0, 1, 11):
        assert f(t) + f(1 - t) == pytest.approx(1.0, abs=1e-12)


@pytest.mark.parametrize("base", ["biquadratic", "bloss", "cosine", "sinusoid"])
def test_reversed_spiral_types_from_arc_to_tangent(base):
    """A rev* spiral from R = 300 to a tangent, against scipy quad of the law run from
    k0 = 1/R down to 0: k(s) = (1 - f(s / L)) / R."""
    L, R = 150.0, 300.0
    rev = "rev" + base[0].upper() + base[1:]
    sp = HSpiral((0.0, 0.0), (0.0, 0.0), L, R, math.inf, "ccw", rev, pi=(10.0, 0.0))
    h = H.solve(HorizontalAlignment((sp,)))
    f = LAWS[base]
    th = lambda s: math.pi / 2 + integrate.quad(lambda u: (1 - f(u / L)) / R, 0, s)[0]  # noqa: E731
    for s in (40.0, 150.0):
        x = integrate.quad(lambda u: math.cos(th(u)), 0, s, epsabs=1e-12)[0]
        y = integrate.quad(lambda u: math.sin(th(u)), 0, s, epsabs=1e-12)[0]
        n, e, hd = H.evaluate(h, s)
        assert (float(e), float(n), float(hd)) == pytest.approx((x, y, th(s)), abs=1e-8)


# Forms given by an equation from the tangent (from memory, as commonly published):
# the cubic parabola y = x^3/(6RX) (also the Japanese cubic); the biquadratic parabola
# and the sine half-wave, whose y'' follows the biquadratic and half-wave laws in x; the
# radioid on the abscissa, curvature proportional to x, sin(theta) = x^2/(2RX); the
# cubic spiral, y = s^3/(6RL) along the arc. The reference below uses only scipy quad
# and brentq on these equations: X from the arc length, then x from the station.
SLOPE_LAWS = {
    "cubicParabola": lambda xi: xi,
    "japaneseCubic": lambda xi: xi,
    "biquadraticParabola": lambda xi: 2 * xi * xi if xi <= 0.5 else 1 - 2 * (1 - xi) ** 2,
    "sineHalfWave": lambda xi: (1 - math.cos(math.pi * xi)) / 2,
}


def _reference_tangent_form(kind, R, L, s):
    """(x along the tangent, y towards the curve, theta) at arc length s."""
    from scipy.optimize import brentq

    if kind == "cubic":
        sin_t = lambda u: u * u / (2 * R * L)  # noqa: E731
        x = integrate.quad(lambda u: math.sqrt(1 - sin_t(u) ** 2), 0, s, epsabs=1e-13)[0]
        return x, s**3 / (6 * R * L), math.asin(sin_t(s))
    if kind == "radioid":

        def slope(t, X):
            st = t * t / (2 * R * X)
            return st / math.sqrt(1 - st * st)
    else:
        g = SLOPE_LAWS[kind]

        def slope(t, X):
            return integrate.quad(lambda u: g(u / X) / R, 0, t, epsabs=1e-14, points=[X / 2])[0]

    def arc(x, X):
        return integrate.quad(lambda t: math.sqrt(1 + slope(t, X) ** 2), 0, x, epsabs=1e-13)[0]

    X = brentq(lambda X: arc(X, X) - L, 0.5 * L, L, xtol=1e-13)
    x = brentq(lambda x: arc(x, X) - s, 0.0, X, xtol=1e-13)
    y = integrate.quad(lambda t: slope(t, X), 0, x, epsabs=1e-13)[0]
    return x, y, math.atan(slope(x, X))


@pytest.mark.parametrize("kind", H.TANGENT_FORMS)
@pytest.mark.parametrize("rot", ["ccw", "cw"])
def test_tangent_forms_match_their_equations(kind, rot):
    L, R = 120.0, 250.0
    sp = HSpiral((0.0, 0.0), (0.0, 0.0), L, math.inf, R, rot, kind, pi=(10.0, 0.0))
    h = H.solve(HorizontalAlignment((sp,)))
    side = 1.0 if rot == "ccw" else -1.0  # heading north: left is west (-easting)
    for s in (30.0, 77.0, 120.0):
        x, y, theta = _reference_tangent_form(kind, R, L, s)
        n, e, hd = H.evaluate(h, s)
        assert float(n) == pytest.approx(x, abs=1e-7)
        assert float(e) == pytest.approx(-side * y, abs=1e-7)
        assert float(hd) == pytest.approx(math.pi / 2 + side * theta, abs=1e-9)


def test_cubic_parabola_closed_form_and_end_curvature():
    """y = x^3 / (6 R X) exactly, and the exact curvature at the end is
    (1/R) / (1 + y'^2)^(3/2) with y' = X / (2R): slightly below 1/R."""
    L, R = 100.0, 300.0
    sp = HSpiral((0.0, 0.0), (0.0, 0.0), L, math.inf, R, "ccw", "cubicParabola", pi=(0.0, 10.0))
    h = H.solve(HorizontalAlignment((sp,)))
    g = h.elements[0]
    X = g.x1
    assert g.y1 == pytest.approx(X**3 / (6 * R * X), rel=1e-13)
    arc = integrate.quad(lambda t: math.sqrt(1 + (t * t / (2 * R * X)) ** 2), 0, X)[0]
    assert arc == pytest.approx(L, rel=1e-13)
    assert g.k1 == pytest.approx(1 / R / (1 + (X / (2 * R)) ** 2) ** 1.5, rel=1e-12)


@pytest.mark.parametrize("kind", H.TANGENT_FORMS)
def test_tangent_form_from_arc_to_tangent_is_the_same_curve_backwards(kind):
    L, R = 90.0, 200.0
    fwd = H.solve(
        HorizontalAlignment(
            (HSpiral((0.0, 0.0), (0.0, 0.0), L, math.inf, R, "cw", kind, pi=(10.0, 0.0)),)
        )
    )
    g = fwd.elements[0]
    pi = (g.y1 + math.sin(g.heading1 + math.pi), g.x1 + math.cos(g.heading1 + math.pi))
    back = H.solve(
        HorizontalAlignment(
            (HSpiral((g.y1, g.x1), (0.0, 0.0), L, R, math.inf, "ccw", kind, pi=pi),)
        )
    )
    s = np.linspace(0, L, 7)
    n1, e1, h1 = H.evaluate(fwd, L - s)
    n2, e2, h2 = H.evaluate(back, s)
    assert_allclose(n2, n1, atol=1e-9)
    assert_allclose(e2, e1, atol=1e-9)
    assert_allclose(np.cos(h2 - h1), -1.0, atol=1e-12)
    assert_allclose(H.curvature(back, s), -H.curvature(fwd, L - s), atol=1e-15)


def test_tangent_form_between_two_radii_is_refused():
    sp = HSpiral(
        (0.0, 0.0), (0.0, 100.0), 100.0, 900.0, 300.0, "cw", "cubicParabola", pi=(0.0, 10.0)
    )
    with pytest.raises(ModelError, match="runs between a tangent and an arc"):
        H.solve(HorizontalAlignment((sp,)))


def test_unknown_spiral_type_refused_by_name():
    sp = HSpiral((0.0, 0.0), (0.0, 100.0), 100.0, math.inf, 300.0, "cw", "helix", pi=(0.0, 10.0))
    with pytest.raises(ModelError, match="spiral type 'helix' is not a LandXML 1.2 spiType"):
        H.solve(HorizontalAlignment((sp,)))


# --- samples ----------------------------------------------------------------------------
@pytest.mark.parametrize(
    ("path", "name"),
    [(US_SAMPLE, "Orrin Vale Bypass"), (METRIC_SAMPLE, None), (US_SAMPLE, "Kettle Lane")],
)
def test_samples_are_continuous_and_match_stated_values(path, name):
    ctx = open_alignment(path, name)
    h = ctx.horizontal
    assert h.findings == ()
    assert h.convention == "ccw-north"
    matched, stated = h.convention_matches
    assert matched == stated > 0
    # heading continuous at every join (tangent alignment)
    for a, b in zip(h.elements, h.elements[1:], strict=False):
        assert abs(wrap_angle(b.heading0 - a.heading1)) < 1e-6
        assert math.hypot(b.x0 - a.x1, b.y0 - a.y1) < 1e-5
    # the alignment's stated length agrees with the computed one
    assert h.end - h.start == pytest.approx(ctx.alignment.length, abs=1e-3)


def test_polyline_length_converges_to_stated_length():
    ctx = open_alignment(US_SAMPLE, "Orrin Vale Bypass")
    h = ctx.horizontal
    errors = []
    for n in (100, 400, 1600):
        s = np.linspace(h.start, h.end, n)
        north, east, _ = H.evaluate(h, s)
        errors.append(abs(np.sum(np.hypot(np.diff(north), np.diff(east))) - 5200.0))
    assert errors[0] > errors[1] > errors[2]
    assert errors[2] < 1e-3


def test_station_equation_applies_to_horizontal_labels():
    ctx = open_alignment(METRIC_SAMPLE)
    c = curve_data(ctx.horizontal)[1]
    # the second curve lies after the equation at 1200 (labels +50 m)
    assert c.start_station > 1200
    assert ctx.stationing.label(c.start_station) == f"1+{c.start_station + 50 - 1000:07.3f}"


# --- inverse: station and offset of points --------------------------------------------
@settings(max_examples=60, deadline=None)
@given(st.floats(0.0, 1.0), st.floats(-300.0, 300.0))
def test_inverse_returns_station_and_offset(frac, off):
    ctx = open_alignment(US_SAMPLE, "Orrin Vale Bypass")
    h = ctx.horizontal
    s = h.start + frac * (h.end - h.start)
    n, e, hd = H.evaluate(h, s)
    # offset positive to the right: right of heading (cos, sin) is (sin, -cos)
    pn = float(n) - off * math.cos(float(hd))
    pe = float(e) + off * math.sin(float(hd))
    s2, o2, status = station_offset(h, [pn], [pe])
    if 0 < frac < 1 or abs(off) < 1e-9:
        assert int(status[0]) == 0
        assert float(s2[0]) == pytest.approx(s, abs=1e-6)
        assert float(o2[0]) == pytest.approx(off, abs=1e-6)


def test_points_beyond_the_ends_are_flagged():
    ctx = open_alignment(US_SAMPLE, "Orrin Vale Bypass")
    h = ctx.horizontal
    n0, e0, h0 = (float(v) for v in H.evaluate(h, h.start))
    n1, e1, h1 = (float(v) for v in H.evaluate(h, h.end))
    pts_n = [n0 - 40 * math.sin(h0), n1 + 25 * math.sin(h1)]
    pts_e = [e0 - 40 * math.cos(h0), e1 + 25 * math.cos(h1)]
    s, o, status = station_offset(h, pts_n, pts_e)
    assert status.tolist() == [-1, 1]
    assert_allclose(s, [h.start - 40, h.end + 25], atol=1e-6)
    assert_allclose(o, [0, 0], atol=1e-6)


# --- bad input ----------------------------------------------------------------------------
def test_gap_and_kink_are_findings():
    a = HLine((0.0, 0.0), (0.0, 100.0))
    b = HLine((0.5, 100.0), (10.0, 200.0))
    h = H.solve(HorizontalAlignment((a, b)))
    codes = [f.code for f in h.findings]
    assert codes == ["gap", "angle-point"]
    assert h.findings[0].computed == pytest.approx(0.5)


def test_radius_disagreement_is_a_finding():
    c = HCurve((0.0, 0.0), (100.0, 0.0), (100.0, 100.5), "cw", stated=(("radius", 90.0),))
    h = H.solve(HorizontalAlignment((c,)))
    msgs = [f.message for f in h.findings]
    assert any("do not lie on one circle" in m for m in msgs)
    assert any("stated radius 90.0000 disagrees" in m for m in msgs)


def test_missing_curve_center_is_an_error():
    data = (
        b'<LandXML><Units><Metric linearUnit="meter"/></Units><Alignments>\n'
        b'<Alignment name="a"><CoordGeom>\n<Curve rot="cw"><Start>0 0</Start>'
        b"<End>10 10</End></Curve>\n</CoordGeom></Alignment></Alignments></LandXML>"
    )
    with pytest.raises(InputError, match=r"^m.xml:3: Curve: missing required Center point"):
        landxml.parse_bytes(data, "m.xml").alignment(None)


def test_direction_convention_detected_from_stated_values():
    # a line due east; azimuth files say 90, counter-clockwise-from-north files say 270
    for stated, conv in ((90.0, "cw-north"), (270.0, "ccw-north"), (0.0, "ccw-east")):
        a = HLine((0.0, 0.0), (0.0, 100.0), stated=(("dir", stated),))
        assert H.solve(HorizontalAlignment((a,))).convention == conv


@settings(max_examples=40, deadline=None)
@given(st.integers(1, 400_000), st.integers(0, 2**32 - 1))
def test_chunks_and_lookup_give_the_same_bits(n, seed):
    # property (no outside source): the bucket lookup equals searchsorted, and a
    # station's coordinates do not depend on what else is evaluated in the call
    from bench._common import synthetic_plan

    geom = _BENCH_PLAN.setdefault("g", H.solve(synthetic_plan(12), 0.0))
    rng = np.random.default_rng(seed)
    s = rng.uniform(geom.start - 5, geom.end + 5, n)
    s[: min(n, 50)] = rng.choice(np.concatenate([geom.s0, geom.panel_s]), min(n, 50))
    want = np.maximum(np.searchsorted(geom.s0, s, side="right") - 1, 0)
    assert np.array_equal(geom.element_lookup.find(s), want)
    want = np.maximum(np.searchsorted(geom.panel_s, s, side="right") - 1, 0)
    assert np.array_equal(geom.panel_lookup.find(s), want)
    n_all, e_all, h_all = H.evaluate(geom, s)
    pick = rng.integers(0, n, min(n, 7))
    n_one, e_one, h_one = H.evaluate(geom, s[pick])
    for a, b in ((n_all[pick], n_one), (e_all[pick], e_one), (h_all[pick], h_one)):
        assert np.array_equal(a, b, equal_nan=True)


_BENCH_PLAN: dict = {}
