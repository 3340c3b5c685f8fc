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


@pytest.mark.parametrize(
    "kind", ["cubicParabola", "japaneseCubic", "radioid", "revBloss", "sineHalfWave"]
)
def test_unsupported_spiral_refused_by_name(kind):
    sp = HSpiral((0.0, 0.0), (0.0, 100.0), 100.0, math.inf, 300.0, "cw", kind, pi=(0.0, 10.0))
    with pytest.raises(ModelError, match=f"spiral type '{kind}' is not supported"):
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
