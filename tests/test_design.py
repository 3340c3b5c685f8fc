"""Vertical curve design from PVIs: published controls, properties, and a round trip
through the review."""

from __future__ import annotations

import json
import math
from dataclasses import replace

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from gradeline.analysis import design as D
from gradeline.analysis import review as R
from gradeline.cli import main
from gradeline.io import landxml
from gradeline.io.landxml_write import write_landxml
from gradeline.model import Profile, PVISpec
from tests.conftest import METRIC_SAMPLE, US_SAMPLE

US = R.load_criteria(None, metric=False)
SI = R.load_criteria(None, metric=True)

# AASHTO, A Policy on Geometric Design of Highways and Streets, 7th ed. (2018),
# Tables 3-34 (crest K) and 3-37 (sag K) for stopping sight distance on level
# grade; values recalled from memory, as in tests/test_review.py.
CREST_K = {30: 19, 40: 44, 50: 84, 60: 151, 70: 247}
SAG_K = {30: 37, 40: 64, 50: 96, 60: 136, 70: 181}


def _profile(points):
    return Profile("P", tuple(PVISpec(s, z) for s, z in points))


def _one(a_pct, speed=50.0, crit=US, step=50.0, **kw):
    # one PVI between two long tangents of grades -A/2 and +A/2: below 3 % each
    # for |A| < 6 %, so the stopping distance is the level one (no grade correction)
    g1, g2 = -a_pct / 200.0, a_pct / 200.0
    prof = _profile([(0.0, 100.0), (5000.0, 100.0 + 5000 * g1), (10000.0, 100 + 5000 * (g1 + g2))])
    return D.design_profile(prof, crit, speed, step=step, **kw).curves[0]


def _control(curve, start):
    return next(c for c in curve.controls if c.name.startswith(start))


@pytest.mark.parametrize("speed", sorted(CREST_K))
def test_design_k_governs_large_crests(speed):
    # a crest of A = 5.8 %: the control L = K A with the table's K (Table 3-34)
    c = _one(-5.8, speed)
    assert _control(c, "design K, crest").length == pytest.approx(CREST_K[speed] * 5.8)
    assert c.length >= CREST_K[speed] * 5.8 and c.k >= CREST_K[speed]


@pytest.mark.parametrize("speed", sorted(SAG_K))
def test_design_k_governs_large_sags(speed):
    c = _one(5.8, speed)
    assert _control(c, "design K, sag").length == pytest.approx(SAG_K[speed] * 5.8)
    assert c.length >= SAG_K[speed] * 5.8 and c.k >= SAG_K[speed]


def test_closed_forms_for_both_cases():
    # AASHTO 2018 eq. 3-41/3-42 (crest, from memory): S < L: L = A S^2 / 2158,
    # S > L: L = 2 S - 2158 / A, with 2158 = 200 (sqrt 3.5 + sqrt 2)^2. Grades of
    # at most 2.9 % keep S at its level value (no correction below 3 %).
    c_const = 200 * (math.sqrt(3.5) + math.sqrt(2.0)) ** 2
    long = _one(-5.8, 50.0)
    s = 425.0  # Table 3-1, 50 mph (from memory)
    assert _control(long, "stopping").length == pytest.approx(5.8 * s * s / c_const)
    assert "(S < L)" in _control(long, "stopping").name
    short = _one(-3.0, 50.0)
    assert _control(short, "stopping").length == pytest.approx(2 * s - c_const / 3.0)
    assert "(S > L)" in _control(short, "stopping").name
    # sag headlight, AASHTO 2018 eq. 3-49/3-50 (from memory): S < L: A S^2 / (400 + 3.5 S)
    sag = _one(5.8, 50.0)
    assert _control(sag, "headlight").length == pytest.approx(5.8 * s * s / (400 + 3.5 * s))
    sag_short = _one(1.0, 50.0)
    assert _control(sag_short, "headlight").length == pytest.approx(
        max(0.0, 2 * s - (400 + 3.5 * s) / 1.0)
    )


def test_comfort_and_appearance():
    # comfort on sags L = A V^2 / 46.5 (US) and A V^2 / 395 (metric), AASHTO 2018
    # eq. 3-51 (from memory); appearance L = 3 V (0.6 V metric), common practice
    c = _one(5.8, 50.0)
    assert _control(c, "comfort").length == pytest.approx(5.8 * 2500 / 46.5)
    assert _control(c, "appearance").length == pytest.approx(150.0)
    m = _one(5.8, 80.0, SI, step=10.0)
    assert _control(m, "comfort").length == pytest.approx(5.8 * 6400 / 395)


def test_passing_and_minimum_length_and_drainage():
    # passing sight distance on crests, 800 ft at 50 mph (AASHTO 2018 Table 3-4,
    # from memory), C = 200 (sqrt 3.5 + sqrt 3.5)^2 = 2800
    c = _one(-5.0, 50.0, passing=True, min_length=700.0, curbed=True)
    psd = _control(c, "passing")
    assert psd.length == pytest.approx(5.0 * 800**2 / 2800.0)  # S < L
    assert c.governing.startswith("passing") and c.length == 1150.0
    assert _control(c, "minimum length").length == 700.0
    assert any("drainage attention" in n for n in c.notes)  # K 230 > 167


@settings(max_examples=60, deadline=None)
@given(
    st.lists(st.tuples(st.floats(150, 1500), st.floats(-0.07, 0.07)), min_size=2, max_size=9),
    st.sampled_from([30.0, 45.0, 60.0, 70.0]),
    st.sampled_from([10.0, 25.0, 50.0, 100.0]),
)
def test_properties(tangents, speed, step):
    # property (no outside source): lengths never round down, every curve that is
    # not reported short meets every control, and no two curves overlap
    s, z, pts = 0.0, 500.0, [(0.0, 500.0)]
    for d, g in tangents:
        s, z = s + d, z + g * d
        pts.append((s, z))
    res = D.design_profile(_profile(pts), US, speed, step=step)
    for c in res.curves:
        if c.status == "no curve":
            continue
        if c.status == "designed":
            assert c.length >= c.required - 1e-9
            assert c.length == pytest.approx(math.ceil(c.required / step - 1e-9) * step)
        if c.status != "short":
            assert not c.shortfalls()
            assert c.length >= c.required - 1e-6
        assert c.length_in <= c.room_in + 1e-6 and c.length_out <= c.room_out + 1e-6
    ends = [(c.station - c.length_in, c.station + c.length_out) for c in res.curves]
    assert ends[0][0] >= -1e-6 and ends[-1][1] <= s + 1e-6
    for (_, e1), (b2, _) in zip(ends, ends[1:], strict=False):
        assert e1 <= b2 + 1e-6


def _pvi_only(path, tmp_path, name):
    doc = landxml.read(path)
    als = []
    for al in doc.alignments:
        profs = tuple(
            Profile(p.name, tuple(PVISpec(v.station, v.elevation) for v in p.pvis))
            for p in al.profiles
        )
        als.append(replace(al, profiles=profs))
    out = tmp_path / name
    out.write_bytes(write_landxml(replace(doc, alignments=tuple(als))))
    return out, doc


@pytest.mark.parametrize(("sample", "speed"), [(US_SAMPLE, "50"), (METRIC_SAMPLE, "80")])
def test_round_trip_design_then_review(tmp_path, capsys, sample, speed):
    # the done-when of issue 17: PVI-only samples designed, then reviewed at the
    # same speed: every vertical check and the exact sight distance pass
    src, doc = _pvi_only(sample, tmp_path, "pvi-only.xml")
    for al in doc.alignments:
        out = tmp_path / f"{al.name}.xml"
        code = main(["design", str(src), "--alignment", al.name, "--speed", speed, "-o", str(out)])
        capsys.readouterr()
        assert code == 0
        main(["review", str(out), "--alignment", al.name, "--speed", speed, "--json"])
        rev = json.loads(capsys.readouterr().out)
        assert rev["curves"], al.name
        for curve in rev["curves"]:
            assert all(ch["verdict"] != "fail" for ch in curve["checks"]), (al.name, curve)
        assert rev["sight_distance_deficiencies"] == [], al.name


def test_csv_input_report_and_exit_codes(tmp_path, capsys):
    csv_path = tmp_path / "pvis.csv"
    csv_path.write_text("station,elevation\n0+00,500\n10+00,520\n20+00,505\n30+00,515\n")
    out = tmp_path / "designed.xml"
    code = main(["design", str(csv_path), "--speed", "45", "--round", "station", "-o", str(out)])
    text = capsys.readouterr().out
    assert code == 0 and "every curve meets every control" in text
    doc = landxml.read(out)
    prof = doc.alignments[0].profiles[0]
    lengths = [p.length for p in prof.pvis[1:-1]]
    assert lengths and all(length % 100 == 0 for length in lengths)
    # PVIs too close for the curves they need: exit 1 and what is missed, in JSON
    tight = tmp_path / "tight.csv"
    tight.write_text("0,500\n300,512\n400,500\n700,512\n")
    code = main(["design", str(tight), "--speed", "60", "--json"])
    got = json.loads(capsys.readouterr().out)
    assert code == 1 and not got["complete"]
    assert any(c["status"] == "short" for c in got["curves"])
    assert any("misses" in n for c in got["curves"] for n in c["notes"])


def test_bad_inputs_are_one_line(tmp_path, capsys):
    bad = tmp_path / "bad.csv"
    bad.write_text("station,elevation\n0,500\nabc,510\n")
    assert main(["design", str(bad), "--speed", "50"]) == 2
    err = capsys.readouterr().err
    assert err.count("\n") == 1 and "bad.csv:3" in err
    assert main(["design", str(US_SAMPLE), "--speed", "50", "--round", "-5"]) == 2
    assert main(["design", str(US_SAMPLE), "--speed", "50", "--build", str(tmp_path)]) == 2


def test_review_picture_in_build(tmp_path, capsys):
    # the review page of a build: one page, its three panels, the verdict, every
    # glyph on the page (read back with pdfplumber)
    pdfplumber = pytest.importorskip("pdfplumber")
    out = tmp_path / "b"
    assert main(["build", str(US_SAMPLE), "-o", str(out), "--speed", "50", "--jobs", "1"]) == 1
    capsys.readouterr()
    path = out / "orrin-vale-bypass" / "kettle-lane" / "review.pdf"
    with pdfplumber.open(path) as pdf:
        assert len(pdf.pages) == 1
        page = pdf.pages[0]
        text = page.extract_text()
        for title in ("Finished grade", "Available sight distance", "K provided"):
            assert title in text
        assert "The review FAILS" in text and "1 of 1 horizontal curves" in text
        for ch in page.chars:
            assert 0 <= ch["x0"] < ch["x1"] <= page.width
            assert 0 <= ch["top"] < ch["bottom"] <= page.height
