"""Vertical geometry against outside references and properties that need no source."""

from __future__ import annotations

import math
import random
from fractions import Fraction

import numpy as np
import pytest
import sympy
from hypothesis import given, settings
from hypothesis import strategies as st
from numpy.testing import assert_allclose
from scipy import integrate

from gradeline.errors import ModelError
from gradeline.geometry import vertical
from gradeline.model import Profile, PVISpec
from tests.conftest import CASES, profile_of

# Tolerances: 1e-6 file units is far below survey precision (0.001 ft / 0.001 m)
# and far above float64 round-off on stations of a few miles.
ATOL = 1e-6


# --- FHWA Bridge Geometry Manual ----------------------------------------------
# FHWA-HIF-22-034 (2022), Appendix B, example vertical profile: PVIs
# (station, elevation, curve length) and the published VPC/VPT pairs.
FHWA_PVIS = [
    (0, 100, None),
    (2000, 135, 1600),
    (5000, 105, 1200),
    (7400, 153, 2000),
    (9800, 105, 800),
    (12800, 90, None),
]
FHWA_VPC_VPT = [
    ((1200, 121), (2800, 127)),
    ((4400, 111), (5600, 117)),
    ((6400, 133), (8400, 133)),
    ((9400, 113), (10200, 103)),
]


def fhwa_profile() -> Profile:
    specs = []
    for s, z, L in FHWA_PVIS:
        if L is None:
            specs.append(PVISpec(float(s), float(z)))
        else:
            specs.append(PVISpec(float(s), float(z), "parabolic", L / 2, L / 2))
    return Profile("FHWA Appendix B", tuple(specs))


def test_fhwa_appendix_b_vpc_vpt():
    geom = vertical.solve(fhwa_profile())
    got = [
        ((c.bvc_station, c.bvc_elevation), (c.evc_station, c.evc_elevation)) for c in geom.curves
    ]
    assert_allclose(np.array(got, dtype=float), np.array(FHWA_VPC_VPT, dtype=float), atol=ATOL)
    # the evaluated profile passes through the same published points
    for (s1, z1), (s2, z2) in FHWA_VPC_VPT:
        assert_allclose(vertical.elevation(geom, [s1, s2]), [z1, z2], atol=ATOL)


def test_fhwa_appendix_b_grades():
    # grades follow from the published PVIs: 35/2000 = 1.75 %, -30/3000 = -1 %,
    # 48/2400 = 2 %, -48/2400 = -2 %, -15/3000 = -0.5 %
    geom = vertical.solve(fhwa_profile())
    assert_allclose(geom.grades * 100, [1.75, -1.0, 2.0, -2.0, -0.5], atol=1e-12)


# --- common practice ------------------------------------------------------------
def test_offset_formula_common_practice():
    # common practice (no source): offset from the tangent y = A x^2 / (200 L), A in %
    geom = vertical.solve(CASES["crest"])
    c = geom.curves[0]
    x = np.linspace(0, c.length, 9)
    s = c.bvc_station + x
    expected = c.a_pct * x**2 / (200 * c.length)
    tangent_in = c.bvc_elevation + c.grade_in * x
    assert_allclose(vertical.elevation(geom, s) - tangent_in, expected, atol=ATOL)


def test_middle_ordinate_common_practice():
    # common practice: e = A L / 800 at the PVI station
    for name in ("crest", "sag"):
        geom = vertical.solve(CASES[name])
        c = geom.curves[0]
        assert c.pvi_offset == pytest.approx(c.a_pct * c.length / 800, abs=ATOL)
        z = float(vertical.elevation(geom, c.pvi_station))
        assert z - c.pvi_elevation == pytest.approx(c.a_pct * c.length / 800, abs=ATOL)


def test_high_point_common_practice():
    # common practice: high/low point at x = -g1 L / A from the BVC
    geom = vertical.solve(CASES["crest"])
    c = geom.curves[0]
    x = -c.grade_in * c.length / c.grade_change
    assert c.turning_station == pytest.approx(c.bvc_station + x, abs=ATOL)
    assert c.curve_type == "crest"
    assert c.k == pytest.approx(c.length / abs(c.a_pct))


def test_unsymmetric_mid_offset_common_practice():
    # common practice: unsymmetrical curve offset at the PVI e = l1 l2 (g2 - g1) / (2 (l1 + l2))
    geom = vertical.solve(CASES["unsym-crest"])
    c = geom.curves[0]
    e = 150 * 350 * (c.grade_out - c.grade_in) / (2 * 500)
    assert c.pvi_offset == pytest.approx(e, abs=ATOL)
    assert float(vertical.elevation(geom, 400.0)) == pytest.approx(112.0 + e, abs=ATOL)


# --- sympy: exact rational arithmetic ---------------------------------------------
def _exact_curve(s0, z0, s1, z1, s2, z2, l1, l2):
    """Solve the defining conditions of the curve exactly with sympy.

    Unknowns: two quadratics a_k + b_k d + c_k d^2. Conditions: leave the incoming
    tangent at BVC with its value and slope, meet the outgoing tangent at EVC with
    its value and slope, and join each other with a common value and slope under
    the PVI. (For a symmetric curve the same six conditions hold with l1 = l2.)
    """
    g1 = (z1 - z0) / (s1 - s0)
    g2 = (z2 - z1) / (s2 - s1)
    a1, b1, c1, a2, b2, c2 = sympy.symbols("a1 b1 c1 a2 b2 c2")
    bvc, evc = s1 - l1, s1 + l2
    eqs = [
        sympy.Eq(a1, z1 - g1 * l1),
        sympy.Eq(b1, g1),
        sympy.Eq(a2 + b2 * l2 + c2 * l2**2, z1 + g2 * l2),
        sympy.Eq(b2 + 2 * c2 * l2, g2),
        sympy.Eq(a1 + b1 * l1 + c1 * l1**2, a2),
        sympy.Eq(b1 + 2 * c1 * l1, b2),
    ]
    sol = sympy.solve(eqs, [a1, b1, c1, a2, b2, c2], dict=True)[0]

    def at(s):
        if s <= bvc:
            return z0 + g1 * (s - s0)
        if s <= s1:
            d = s - bvc
            return sol[a1] + sol[b1] * d + sol[c1] * d**2
        if s <= evc:
            d = s - s1
            return sol[a2] + sol[b2] * d + sol[c2] * d**2
        return z1 + g2 * (s - s1)

    return at


@pytest.mark.parametrize("seed", range(12))
def test_random_parabolas_match_exact_rationals(seed):
    rng = random.Random(seed)
    s0 = Fraction(rng.randint(0, 500))
    s1 = s0 + rng.randint(400, 1500)
    s2 = s1 + rng.randint(400, 1500)
    z0 = Fraction(rng.randint(10000, 60000), 100)
    z1 = z0 + Fraction(rng.randint(-6000, 6000), 100)
    z2 = z1 + Fraction(rng.randint(-6000, 6000), 100)
    symmetric = seed % 2 == 0
    room = min(s1 - s0, s2 - s1)
    l1 = Fraction(rng.randint(50, int(room) - 10))
    l2 = l1 if symmetric else Fraction(rng.randint(50, int(room) - 10))
    exact = _exact_curve(s0, z0, s1, z1, s2, z2, l1, l2)
    kind = "parabolic" if symmetric else "unsymmetric"
    prof = Profile(
        "r",
        (
            PVISpec(float(s0), float(z0)),
            PVISpec(float(s1), float(z1), kind, float(l1), float(l2)),
            PVISpec(float(s2), float(z2)),
        ),
    )
    geom = vertical.solve(prof)
    probes = [s0 + (s2 - s0) * Fraction(k, 37) for k in range(38)]
    probes += [s1 - l1, s1, s1 + l2]
    want = np.array([float(exact(p)) for p in probes])
    got = vertical.elevation(geom, [float(p) for p in probes])
    assert_allclose(got, want, rtol=0, atol=1e-9 * float(max(abs(z0), 1)))


# --- circular curves: checked with scipy quadrature and finite differences ---------
def test_circular_curve_is_a_circle_of_the_stated_radius():
    geom = vertical.solve(CASES["circular-sag-metric"])
    c = geom.curves[0]
    assert c.kind == "circular" and c.curve_type == "sag"
    s = np.linspace(c.bvc_station + 1, c.evc_station - 1, 41)
    h = 1e-2
    z = vertical.elevation(geom, s)
    zp = (vertical.elevation(geom, s + h) - vertical.elevation(geom, s - h)) / (2 * h)
    zpp = (vertical.elevation(geom, s + h) - 2 * z + vertical.elevation(geom, s - h)) / h**2
    curvature = zpp / (1 + zp**2) ** 1.5
    assert_allclose(curvature, 1 / 3000.0, rtol=1e-4)


def test_circular_arc_length_is_radius_times_angle():
    # LandXML CircCurve length = arc length = R * (change of inclination angle);
    # integrate sqrt(1 + z'^2) with scipy.integrate.quad as the reference
    geom = vertical.solve(CASES["circular-sag-metric"])
    c = geom.curves[0]
    arc, _ = integrate.quad(
        lambda x: math.sqrt(1 + float(vertical.grade(geom, x)) ** 2),
        c.bvc_station,
        c.evc_station,
        epsabs=1e-10,
    )
    dtheta = math.atan(c.grade_out) - math.atan(c.grade_in)
    assert arc == pytest.approx(3000.0 * dtheta, rel=1e-9)
    assert c.arc_length == pytest.approx(arc, rel=1e-9)


def test_circular_crest_from_length_only():
    prof = Profile(
        "c",
        (
            PVISpec(0.0, 50.0),
            PVISpec(300.0, 56.0, "circular", arc_length=120.0),
            PVISpec(700.0, 52.0),
        ),
    )
    c = vertical.solve(prof).curves[0]
    dtheta = abs(math.atan(-0.01) - math.atan(0.02))
    assert c.radius == pytest.approx(120.0 / dtheta)
    assert c.curve_type == "crest"
    assert c.turning_elevation < 56.0


def test_circular_curve_sign_of_radius_does_not_change_shape():
    base = [(0.0, 50.0), (300.0, 44.0), (700.0, 50.0)]
    a = profile_of(base[0], (*base[1], "circular", 3000.0), base[2])
    b = profile_of(base[0], (*base[1], "circular", -3000.0), base[2])
    s = np.linspace(0, 700, 71)
    assert_allclose(
        vertical.elevation(vertical.solve(a), s), vertical.elevation(vertical.solve(b), s), atol=0
    )


# --- properties (no source needed) ---------------------------------------------------
@st.composite
def profiles(draw):
    n = draw(st.integers(3, 7))
    gaps = draw(st.lists(st.floats(200, 2000), min_size=n - 1, max_size=n - 1))
    stations = np.concatenate([[0.0], np.cumsum(gaps)])
    grades = draw(st.lists(st.floats(-0.08, 0.08), min_size=n - 1, max_size=n - 1))
    elevs = np.concatenate([[500.0], 500.0 + np.cumsum(np.array(grades) * gaps)])
    specs = [PVISpec(float(stations[0]), float(elevs[0]))]
    for i in range(1, n - 1):
        room_in = (stations[i] - stations[i - 1]) / 2
        room_out = (stations[i + 1] - stations[i]) / 2
        kind = draw(st.sampled_from(["none", "parabolic", "unsymmetric", "circular"]))
        if kind == "parabolic":
            half = draw(st.floats(10, min(room_in, room_out)))
            specs.append(PVISpec(float(stations[i]), float(elevs[i]), kind, half, half))
        elif kind == "unsymmetric":
            l1 = draw(st.floats(10, room_in))
            l2 = draw(st.floats(10, room_out))
            specs.append(PVISpec(float(stations[i]), float(elevs[i]), kind, l1, l2))
        elif kind == "circular":
            g1, g2 = grades[i - 1], grades[i]
            dth = abs(math.atan(g2) - math.atan(g1))
            if dth < 1e-4:
                specs.append(PVISpec(float(stations[i]), float(elevs[i])))
                continue
            # radius small enough that the tangent length fits in half the room
            rmax = min(room_in, room_out) * 0.9 / math.tan(dth / 2)
            r = draw(st.floats(min(50.0, rmax), rmax))
            specs.append(PVISpec(float(stations[i]), float(elevs[i]), kind, radius=r))
        else:
            specs.append(PVISpec(float(stations[i]), float(elevs[i])))
    specs.append(PVISpec(float(stations[-1]), float(elevs[-1])))
    return Profile("h", tuple(specs))


@settings(max_examples=150, deadline=None)
@given(profiles())
def test_continuous_at_every_bvc_and_evc(prof):
    geom = vertical.solve(prof)
    eps = 1e-7
    for c in geom.curves:
        for s, z_expected, g_expected in (
            (c.bvc_station, c.bvc_elevation, c.grade_in),
            (c.evc_station, c.evc_elevation, c.grade_out),
        ):
            z, g = vertical.evaluate(geom, [s - eps, s, s + eps])
            assert_allclose(z, z_expected, atol=1e-6)
            assert_allclose(g, g_expected, atol=1e-5)


@settings(max_examples=150, deadline=None)
@given(profiles())
def test_turning_point_has_zero_grade(prof):
    geom = vertical.solve(prof)
    for c in geom.curves:
        if c.turning_station is not None:
            z, g = vertical.evaluate(geom, c.turning_station)
            assert abs(float(g)) < 1e-9
            assert float(z) == pytest.approx(c.turning_elevation, abs=1e-9)
            assert c.bvc_station - 1e-9 <= c.turning_station <= c.evc_station + 1e-9


@settings(max_examples=100, deadline=None)
@given(profiles())
def test_grade_changes_linearly_on_parabolas(prof):
    geom = vertical.solve(prof)
    for c in geom.curves:
        if c.kind != "parabolic":
            continue
        s = np.linspace(c.bvc_station, c.evc_station, 11)
        g = vertical.grade(geom, s)
        expected = c.grade_in + (c.grade_out - c.grade_in) * (s - c.bvc_station) / c.length
        assert_allclose(g, expected, atol=1e-12)
        assert c.pvi_offset == pytest.approx(c.a_pct * c.length / 800, abs=1e-9)


@settings(max_examples=100, deadline=None)
@given(profiles())
def test_k_is_length_over_a(prof):
    for c in vertical.solve(prof).curves:
        if c.k is not None:
            assert c.k * abs(c.a_pct) == pytest.approx(c.length, rel=1e-12)


# --- edge cases, one test each --------------------------------------------------------
def test_station_exactly_at_bvc_pvi_evc():
    geom = vertical.solve(CASES["crest"])
    c = geom.curves[0]
    z = vertical.elevation(geom, [c.bvc_station, c.pvi_station, c.evc_station])
    assert_allclose(
        z, [c.bvc_elevation, c.pvi_elevation + c.pvi_offset, c.evc_elevation], atol=1e-12
    )


def test_outside_profile_is_nan():
    geom = vertical.solve(CASES["crest"])
    z, g = vertical.evaluate(geom, [-1.0, 1000.5])
    assert np.isnan(z).all() and np.isnan(g).all()
    assert np.isnan(vertical.tangent_elevation(geom, [-1.0])).all()


def test_equal_grades_parabola_is_flat_curve():
    prof = profile_of((0.0, 100.0), (500.0, 105.0, "parabolic", 200.0), (1000.0, 110.0))
    c = vertical.solve(prof).curves[0]
    assert c.curve_type == "flat" and c.k is None and c.turning_station is None
    assert float(vertical.elevation(vertical.solve(prof), 500.0)) == pytest.approx(105.0)


def test_back_to_back_curves_touch():
    geom = vertical.solve(CASES["back-to-back"])
    a, b = geom.curves
    assert a.evc_station == b.bvc_station == 600.0


@pytest.mark.parametrize(
    ("shape", "kind"),
    [((), float), ((1,), np.ndarray), ((2,), np.ndarray), ((3, 2), np.ndarray)],
    ids=["scalar", "1", "2", "3x2"],
)
def test_input_shapes(shape, kind):
    geom = vertical.solve(CASES["sag"])
    s = np.full(shape, 500.0) if shape else 500.0
    z = vertical.elevation(geom, s)
    assert np.shape(z) == shape
    assert_allclose(z, float(vertical.elevation(geom, 500.0)))


def test_caller_array_untouched():
    geom = vertical.solve(CASES["sag"])
    s = np.array([0.0, 500.0, 2000.0])
    before = s.copy()
    vertical.evaluate(geom, s)
    assert_allclose(s, before)


def test_overlap_names_the_element():
    prof = profile_of(
        (0.0, 100.0),
        (400.0, 108.0, "parabolic", 500.0),
        (800.0, 100.0, "parabolic", 400.0),
        (1200.0, 104.0),
    )
    with pytest.raises(
        ModelError,
        match=r"vertical curves overlap: BVC 600.000 is before "
        r"the previous EVC 650.000",
    ):
        vertical.solve(prof)


def test_curve_past_profile_start():
    prof = profile_of((0.0, 100.0), (100.0, 108.0, "parabolic", 300.0), (800.0, 100.0))
    with pytest.raises(ModelError, match="reaches past the start of the profile"):
        vertical.solve(prof)


def test_curve_past_profile_end():
    prof = profile_of((0.0, 100.0), (700.0, 108.0, "parabolic", 300.0), (800.0, 100.0))
    with pytest.raises(ModelError, match="reaches past the end of the profile"):
        vertical.solve(prof)


def test_curve_past_plain_pvi():
    prof = profile_of(
        (0.0, 100.0), (300.0, 108.0), (400.0, 104.0, "parabolic", 300.0), (900.0, 100.0)
    )
    with pytest.raises(ModelError, match="starts before the previous PVI"):
        vertical.solve(prof)


def test_key_points_merge_shared_stations():
    keys = vertical.key_points(vertical.solve(CASES["back-to-back"]))
    tags = {round(k.station, 6): k.text for k in keys}
    assert tags[600.0] == "EVC;BVC"
    assert tags[0.0] == "START" and tags[1200.0] == "END"
    # high point of the crest at x = -g1 L / A = -2 * 400 / -4 = 200 ft past the BVC, i.e.
    # on the PVI; low point of the sag at 2 * 400 / 3 = 266.67 ft past its BVC at 600
    # (common practice: the turning point of a parabola lies where the grade is zero)
    assert set(tags[400.0].split(";")) == {"PVI", "HIGH"}
    assert tags[round(600.0 + 800.0 / 3.0, 6)] == "LOW"
