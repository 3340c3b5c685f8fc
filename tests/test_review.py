"""Design-control review against AASHTO values and closed-form sight distance."""

from __future__ import annotations

import json
import math

import pytest

from gradeline.analysis import review as R
from gradeline.cli import main
from gradeline.geometry import vertical
from tests.conftest import METRIC_SAMPLE, US_SAMPLE, profile_of

US = R.load_criteria(None, metric=False)
SI = R.load_criteria(None, metric=True)

# AASHTO, A Policy on Geometric Design of Highways and Streets, 7th ed. (2018),
# Tables 3-1 (SSD), 3-34 (crest K), 3-37 (sag K); values recalled from memory.
US_TABLE = {
    30: (200, 19, 37),
    40: (305, 44, 64),
    50: (425, 84, 96),
    60: (570, 151, 136),
    70: (730, 247, 181),
    75: (820, 312, 206),
    80: (910, 384, 231),
}
SI_TABLE = {50: (65, 7, 13), 80: (130, 26, 30), 100: (185, 52, 45), 120: (250, 95, 63)}


@pytest.mark.parametrize("speed", sorted(US_TABLE))
def test_us_design_values(speed):
    ssd, kc, ks = US_TABLE[speed]
    s = R.design_ssd(US, speed)
    assert s == ssd
    assert R.design_k_crest(US, s) == kc
    assert R.design_k_sag(US, s) == ks


@pytest.mark.parametrize("speed", sorted(SI_TABLE))
def test_metric_design_values(speed):
    ssd, kc, ks = SI_TABLE[speed]
    s = R.design_ssd(SI, speed)
    assert s == ssd
    assert R.design_k_crest(SI, s) == kc
    assert R.design_k_sag(SI, s) == ks


def test_formula_constants():
    # AASHTO 2018 (from memory): 2158 = 200 (sqrt 3.5 + sqrt 2.0)^2; metric 658
    assert US.crest_constant == pytest.approx(2158, abs=0.5)
    assert SI.crest_constant == pytest.approx(658, abs=0.5)
    # SSD = 1.47 V t + 1.075 V^2 / a, t = 2.5 s, a = 11.2 ft/s^2
    assert R.stopping_distance(US, 60) == pytest.approx(1.47 * 60 * 2.5 + 1.075 * 3600 / 11.2)
    assert R.stopping_distance(SI, 100) == pytest.approx(0.278 * 100 * 2.5 + 0.039 * 1e4 / 3.4)


def test_grade_correction_lengthens_downgrade_ssd():
    # AASHTO 2018 eq. 3-3 (from memory): d = 1.47 V t + V^2 / (30 (a/32.2 - G))
    level = R.stopping_distance(US, 60)
    down = R.stopping_distance(US, 60, downgrade=0.06)
    assert down == pytest.approx(1.47 * 60 * 2.5 + 3600 / (30 * (11.2 / 32.2 - 0.06)))
    assert down > level
    assert R.stopping_distance(US, 60, downgrade=0.02) == level  # below 3 %: no correction


def _single(a_pct: float, length: float, metric=False):
    g1 = -a_pct / 200.0  # symmetric: g1 = -A/2, g2 = +A/2
    half = 3000.0
    return vertical.solve(
        profile_of((0.0, 100.0), (half, 100.0 + g1 * half, "parabolic", length), (2 * half, 100.0))
    )


def test_exact_sight_distance_matches_crest_formula_s_less_than_l():
    # a long crest: eye and object both on the curve give S = sqrt(2158 L / A)
    geom = _single(-6.0, 1500.0)
    sd = R.sight_distance(geom, US, step=5.0, reach=1600.0, sample=0.5)
    closed = math.sqrt(US.crest_constant * 1500.0 / 6.0)
    assert closed < 1500.0  # S < L
    assert min(sd.ahead.min(), sd.behind.min()) == pytest.approx(closed, rel=0.01)


def test_exact_sight_distance_matches_crest_formula_s_greater_than_l():
    # a short crest: S = (L + 2158 / A) / 2
    geom = _single(-4.0, 300.0)
    sd = R.sight_distance(geom, US, step=2.0, reach=1600.0, sample=0.5)
    closed = (300.0 + US.crest_constant / 4.0) / 2.0
    assert closed > 300.0
    assert sd.ahead.min() == pytest.approx(closed, rel=0.01)


def test_exact_headlight_distance_matches_sag_formula():
    # long sag, S < L: L = A S^2 / (400 + 3.5 S) solved for S
    geom = _single(6.0, 1500.0)
    sd = R.sight_distance(geom, US, step=5.0, reach=2000.0, sample=0.5)
    a, length = 6.0, 1500.0
    s = (length * 3.5 + math.sqrt((length * 3.5) ** 2 + 4 * a * length * 400)) / (2 * a)
    assert s < length
    assert min(sd.headlight_ahead.min(), sd.headlight_behind.min()) == pytest.approx(s, rel=0.01)


def test_tangent_is_not_limited():
    geom = vertical.solve(profile_of((0.0, 100.0), (2000.0, 140.0)))
    sd = R.sight_distance(geom, US, step=50.0, reach=800.0)
    assert math.isinf(sd.ahead.max()) and math.isinf(sd.headlight_ahead.min())


def test_failing_curves_and_ranges():
    geom = vertical.solve(
        profile_of(
            (0.0, 100.0),
            (1000.0, 140.0, "parabolic", 300.0),
            (2000.0, 100.0, "parabolic", 200.0),
            (3000.0, 130.0),
        )
    )
    rev = R.review_profile(geom, US, 60.0)
    assert rev.failed
    crest, sag = rev.curves
    names = {c.name.split(" (")[0]: c for c in crest.checks}
    assert names["stopping sight distance 570 ft"].verdict == "fail"
    # A S^2 / 2158 = 8 * 570^2 / 2158 = 1204 > S, so the S < L case governs
    assert names["stopping sight distance 570 ft"].required == pytest.approx(
        8 * 570**2 / 2158, abs=1
    )
    kinds = {(d.kind, d.direction) for d in rev.deficiencies}
    assert ("stopping", "ahead") in kinds and ("headlight", "ahead") in kinds
    stop = next(d for d in rev.deficiencies if d.kind == "stopping" and d.direction == "ahead")
    assert stop.available_min == pytest.approx((300 + 2158 / 8) / 2, rel=0.01)


def test_drainage_flag_is_a_check_not_a_failure():
    geom = vertical.solve(
        profile_of((0.0, 100.0), (1000.0, 101.0, "parabolic", 800.0), (2000.0, 100.0))
    )
    rev = R.review_profile(geom, US, 40.0, curbed=True)
    drain = [c for c in rev.curves[0].checks if c.name.startswith("drainage")][0]
    assert rev.curves[0].curve.k > 167
    assert drain.verdict == "check" and drain.margin < 0
    assert not rev.curves[0].failed


def test_criteria_file_overrides(tmp_path):
    text = (R.resources.files("gradeline.criteria") / "aashto-2018.toml").read_text()
    custom = tmp_path / "agency.toml"
    custom.write_text(text.replace("eye_height = 3.5", "eye_height = 3.0"))
    crit = R.load_criteria(str(custom), metric=False)
    assert crit.eye_height == 3.0
    assert crit.crest_constant < US.crest_constant


def test_criteria_file_missing_value(tmp_path, capsys):
    bad = tmp_path / "bad.toml"
    bad.write_text("[us]\neye_height = 3.5\n")
    code = main(
        [
            "review",
            str(US_SAMPLE),
            "--alignment",
            "Kettle Lane",
            "--speed",
            "30",
            "--criteria",
            str(bad),
        ]
    )
    assert code == 2
    assert "lacks" in capsys.readouterr().err


def test_cli_exit_codes_and_json(capsys):
    assert main(["review", str(METRIC_SAMPLE), "--speed", "80"]) == 0
    out = capsys.readouterr().out
    assert out.startswith("PASS") and "CAUTION" in out
    code = main(
        ["review", str(US_SAMPLE), "--alignment", "Orrin Vale Bypass", "--speed", "70", "--json"]
    )
    data = json.loads(capsys.readouterr().out)
    assert code == 1 and data["failed"] is True
    assert data["stopping_sight_distance"] == 730
    assert len(data["curves"]) == 5
    assert "governing agency" in data["caution"]


def test_speed_unit_conversion(capsys):
    # 50 mph given for a metric file is reviewed as 80.47 km/h
    main(["review", str(METRIC_SAMPLE), "--speed", "50", "--units", "mph", "--json"])
    data = json.loads(capsys.readouterr().out)
    assert data["design_speed"] == pytest.approx(50 * 1.609344)
    assert data["speed_unit"] == "kmh"


@pytest.mark.parametrize(
    ("crit", "speed", "radius"),
    [
        # AASHTO 2018 Table 3-7, e max = 8 % (values recalled from memory): R = V^2 / (15 (e + f))
        (US, 50, 758),
        (US, 60, 1200),
        # metric: R = V^2 / (127 (e + f))
        (SI, 80, 229),
        (SI, 100, 394),
    ],
    ids=["50mph", "60mph", "80kmh", "100kmh"],
)
def test_minimum_radius(crit, speed, radius):
    assert round(crit.min_radius(speed)) == radius


def test_radius_check_flags_a_tight_curve(capsys):
    code = main(
        ["review", str(US_SAMPLE), "--alignment", "Orrin Vale Bypass", "--speed", "65", "--json"]
    )
    data = json.loads(capsys.readouterr().out)
    assert code == 1
    radii = data["horizontal_curves"]
    # 65 mph: R = 65^2 / (15 (0.08 + 0.11)) = 1482 ft; the sample curves are 1200 and 1500 ft
    assert [r["verdict"] for r in radii] == ["fail", "pass"]
    assert radii[0]["required_radius"] == pytest.approx(65**2 / (15 * 0.19))


def test_report_wording_no_negative_zero_and_none_for_no_length(capsys):
    # issue 17: a check whose formula gives no length prints "none", not 0.00;
    # no "-0.00" in reports; horizontal curves named by the CoordGeom elements the
    # check report numbers (common practice of cross-referencing, no outside source)
    assert (
        main(["review", str(US_SAMPLE), "--alignment", "Orrin Vale Bypass", "--speed", "50"]) == 0
    )
    text = capsys.readouterr().out
    assert "S < L: the sight line ends on the curve" in text
    curve5 = text.split("curve 5")[1].split("\n\n")[0]
    assert "none" in curve5 and " 0.00 " not in curve5
    assert "curve 1 (CoordGeom elements 2 to 4) at 19+00.00" in text
    main(["check", str(US_SAMPLE), "--alignment", "Orrin Vale Bypass"])
    check = capsys.readouterr().out
    assert "Spiral 2 at 19+00.00" in check and "Curve 3 at 21+50.00" in check
    for report in (text, check):
        assert "-0.00" not in report
