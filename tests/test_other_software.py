"""Small synthetic files for each class of real-world input (issue 14), written here.

Each test names what it stands for: a habit of some exporter that gradeline
must tolerate (with a warning), default (as the schema does) or refuse (only
when the geometry is truly broken, with one line naming file, line, element).
"""

from __future__ import annotations

import json
import math
import re

import pytest

from gradeline.cli import main

HEAD = """<?xml version="1.0" encoding="UTF-8"?>
<LandXML xmlns="http://www.landxml.org/schema/LandXML-1.2" version="1.2">
  <Units><Imperial linearUnit="foot"{units}/></Units>
  <Alignments>
"""
TAIL = """  </Alignments>
</LandXML>
"""
DEG = ' angularUnit="decimal degrees" directionUnit="decimal degrees"'
PLAN = """      <CoordGeom>
        <Line><Start>5000 1000</Start><End>5000 2000</End></Line>
      </CoordGeom>
"""


def alignment(name, *, plan=True, profile=None, start=0.0, length: float | None = 1000.0):
    """An east-running alignment from easting 1000 (station ``start``), with a profile."""
    geom = PLAN.replace("1000</Start>", f"{1000 + start:g}</Start>") if plan else ""
    prof = ""
    if profile is not None:
        prof = (
            f'      <Profile name="{name}"><ProfAlign name="FG">{profile}</ProfAlign></Profile>\n'
        )
    size = "" if length is None else f' length="{length:g}"'
    return (
        f'    <Alignment name="{name}" staStart="{start:g}"{size}>\n{geom}{prof}    </Alignment>\n'
    )


GOOD = '<PVI>0 100</PVI><ParaCurve length="400">500 110</ParaCurve><PVI>1000 105</PVI>'


def write(tmp_path, body, units=DEG, name="f.xml"):
    path = tmp_path / name
    path.write_text(HEAD.format(units=units) + body + TAIL)
    return str(path)


def run(capsys, *argv):
    code = main([str(a) for a in argv])
    out, err = capsys.readouterr()
    return code, out, err


# -- 1. per-alignment loading ---------------------------------------------------------
def test_one_broken_alignment_never_blocks_the_others(tmp_path, capsys):
    bad = "<PVI>0 100</PVI><PVI>600 110</PVI><PVI>400 105</PVI>"  # stations go back
    path = write(tmp_path, alignment("Good", profile=GOOD) + alignment("Bad", profile=bad))
    code, out, _ = run(capsys, "info", path)
    assert code == 0
    assert "alignment 'Good'" in out
    assert re.search(r"profile 'FG': cannot be read: \S+:\d+: PVI: PVI stations must increase", out)
    code, out, _ = run(capsys, "table", path, "--alignment", "Good", "--interval", "500")
    assert code == 0 and out.count("\n") >= 4
    code, _, err = run(capsys, "table", path, "--alignment", "Bad", "--interval", "500")
    assert code == 0 and "profile 'FG' left out" in err  # the plan of 'Bad' still tabulates
    code, out, _ = run(capsys, "check", path)
    assert code == 1 and "profile 'FG' readable" in out
    out_dir = tmp_path / "b"
    assert run(capsys, "build", path, "-o", out_dir)[0] == 1
    index = json.loads((out_dir / "index.json").read_text())
    assert sorted(i["alignment"] for i in index["items"]) == ["Bad", "Good"]


def test_an_unreadable_alignment_is_listed_with_its_reason(tmp_path, capsys):
    broken = (
        '    <Alignment name="Broken"><CoordGeom><Curve rot="cw"><Start>0 0</Start>'
        "<End>10 10</End></Curve></CoordGeom></Alignment>\n"
    )
    path = write(tmp_path, alignment("Good", profile=GOOD) + broken)
    code, out, _ = run(capsys, "info", path)
    assert code == 0 and "alignment 'Broken': cannot be read: " in out
    assert ": Curve: missing required Center point" in out
    code, _, err = run(capsys, "table", path, "--alignment", "Broken", "--interval", "10")
    assert code == 2 and err.count("\n") == 1 and "Curve: missing required Center" in err


# -- 2. exact duplicates ---------------------------------------------------------------
def test_a_pvi_written_twice_is_merged_with_a_warning(tmp_path, capsys):
    twice = (
        '<PVI>0 100</PVI><PVI>0 100</PVI><ParaCurve length="400">500 110</ParaCurve>'
        "<PVI>1000 105</PVI><PVI>1000 105</PVI>"
    )
    path = write(tmp_path, alignment("A", profile=twice))
    code, out, err = run(capsys, "curves", path)
    assert code == 0 and err.count("repeats the entry before it; merged") == 2
    assert ":9: PVI" in err  # file and line of the dropped entry


def test_different_elevations_at_one_station_stay_an_error(tmp_path, capsys):
    clash = "<PVI>0 100</PVI><PVI>0 101</PVI><PVI>1000 105</PVI>"
    path = write(tmp_path, alignment("A", plan=False, profile=clash))
    code, _, err = run(capsys, "table", path, "--interval", "100")
    assert code == 2 and "PVI stations must increase" in err


# -- 3. extents ------------------------------------------------------------------------
def test_profile_shorter_than_the_plan(tmp_path, capsys):
    short = "<PVI>100 100</PVI><PVI>600 105</PVI>"
    path = write(tmp_path, alignment("A", profile=short))
    code, out, err = run(capsys, "table", path, "--interval", "250")
    rows = out.splitlines()[1:]
    assert code == 0 and "RuntimeWarning" not in err
    assert rows[0].startswith("0.0,0+00.00,,") and rows[0].endswith("POB")
    assert rows[-1].startswith("1000.0,10+00.00,,") and rows[-1].endswith("POE")
    code, out, _ = run(capsys, "check", path)
    assert code == 1 and "profile start against plan start" in out and "plan 0+00.00" in out


def test_profile_longer_than_the_plan_and_ground_past_it(tmp_path, capsys):
    long = "<PVI>0 100</PVI><PVI>1500 110</PVI>"
    body = alignment("A", profile=long).replace(
        "</Profile>",
        '<ProfSurf name="EG"><PntList2D>0 99 1500 108</PntList2D></ProfSurf></Profile>',
    )
    path = write(tmp_path, body)
    code, out, err = run(capsys, "table", path, "--interval", "500")
    assert code == 0 and "Warning" not in err
    assert out.splitlines()[-1].startswith("1500.0,15+00.00,110.0,")
    assert ",,,," in out.splitlines()[-1]  # no coordinates past the plan


# -- 4. plan only, profile only --------------------------------------------------------
def test_plan_only_alignment_gets_its_deliverables(tmp_path, capsys):
    path = write(tmp_path, alignment("A"))
    code, _, err = run(capsys, "dxf", path, "-o", tmp_path / "a.dxf")
    assert code == 0 and "has no profile: wrote its plan drawing" in err
    assert run(capsys, "sheets", path, "-o", tmp_path / "a.pdf")[0] == 0
    code, out, _ = run(capsys, "review", path, "--speed", "30")
    assert code == 0 and "no profile, so vertical curves and sight distance were not" in out


def test_profile_only_alignment_gets_the_profile_deliverables(tmp_path, capsys):
    path = write(tmp_path, alignment("A", plan=False, profile=GOOD))
    code, _, err = run(capsys, "dxf", path, "-o", tmp_path / "a.dxf", "--plan", tmp_path / "p.dxf")
    assert code == 0 and "no CoordGeom: no plan drawing" in err
    assert not (tmp_path / "p.dxf").exists()
    assert run(capsys, "sheets", path, "-o", tmp_path / "a.pdf")[0] == 0


# -- 5. units --------------------------------------------------------------------------
def test_missing_units_take_the_schema_default_and_a_misfit_is_flagged(tmp_path, capsys):
    two = (
        '<Line dir="90.0"><Start>5000 1000</Start><End>5000 1500</End></Line>'
        '<Line dir="90.0"><Start>5000 1500</Start><End>5000 2000</End></Line>'
    )
    body = alignment("A").replace("<Line><Start>5000 1000</Start><End>5000 2000</End></Line>", two)
    path = write(tmp_path, body, units="")
    code, out, _ = run(capsys, "info", path)
    assert code == 0 and "angles in radians, directions in radians" in out
    assert "no directionUnit: the LandXML schema default 'radians' applies" in out
    assert "which fits 0 of 2 stated directions; decimal degrees fits 2" in out


def test_unit_spellings_are_tolerated(tmp_path, capsys):
    units = ' angularUnit="Decimal  Degrees" directionUnit="decimal degrees"'
    path = write(tmp_path, alignment("A", profile=GOOD), units=units).replace("", "")
    text = open(path).read().replace('linearUnit="foot"', 'linearUnit="Foot"')
    open(path, "w").write(text)
    code, out, _ = run(capsys, "info", path)
    assert code == 0 and "read as 'decimal degrees'" in out and "read as 'foot'" in out


# -- 7. several profiles, 8. terrain files ----------------------------------------------
def test_build_makes_every_profile_and_lists_terrain(tmp_path, capsys):
    two = alignment("A", profile=GOOD).replace(
        "</Profile>",
        '<ProfAlign name="Alt">' + GOOD.replace("110", "111") + "</ProfAlign></Profile>",
    )
    write(tmp_path, two, name="road.xml")
    (tmp_path / "ground.xml").write_text(
        HEAD.format(units=DEG).replace("  <Alignments>\n", "")
        + '  <Surfaces><Surface name="EG"><Definition surfType="TIN">'
        '<Pnts><P id="1">4000 0 90</P><P id="2">6000 0 90</P>'
        '<P id="3">5000 3000 95</P></Pnts><Faces><F>1 2 3</F>'
        "</Faces></Definition></Surface></Surfaces>\n</LandXML>\n"
    )
    out = tmp_path / "out"
    code, text, _ = run(capsys, "build", tmp_path, "-o", out, "--ground", "auto", "--jobs", "1")
    assert code == 0, text
    assert "terrain " in text and "FAILED" not in text
    assert (out / "road" / "a" / "fg" / "profile.dxf").exists()
    assert (out / "road" / "a" / "alt" / "profile.dxf").exists()
    code, text, _ = run(
        capsys, "build", tmp_path / "road.xml", "-o", tmp_path / "o2", "--profile", "Alt"
    )
    assert code == 0 and (tmp_path / "o2" / "road" / "a" / "profile.dxf").exists()


# -- 6. a check that compares nothing ---------------------------------------------------
def test_a_check_of_nothing_never_reads_as_a_pass(tmp_path, capsys):
    path = write(tmp_path, alignment("A", length=None))  # one line, no stated values
    code, out, _ = run(capsys, "check", path)
    assert code == 1
    assert out.startswith("NOTHING CHECKED") and "this is not a pass" in out


# -- 11. review robustness ---------------------------------------------------------------
def test_steep_close_pvis_do_not_abort_the_review(tmp_path, capsys):
    steep = (
        '<PVI>0 100</PVI><ParaCurve length="20">30 110</ParaCurve>'
        '<ParaCurve length="20">55 101</ParaCurve><PVI>1000 105</PVI>'
    )
    path = write(tmp_path, alignment("A", plan=False, profile=steep))
    code, out, err = run(capsys, "review", path, "--speed", "40")
    assert code == 1 and err == "" and "lie beyond the range of the grade-corrected" in out


@pytest.mark.parametrize("shortfall", [0.0, 0.0004])
def test_equal_after_rounding_passes(shortfall):
    """K required 151, provided 151 (less a rounding hair) passes; 0.2 % short fails
    (pass_tolerance 0.1 % in the criteria file)."""
    from gradeline.analysis.review import _meets, load_criteria

    crit = load_criteria(None, metric=False)
    assert _meets(151.0 * (1 - shortfall), 151.0, crit)
    assert not _meets(151.0 * (1 - 0.002), 151.0, crit)


# -- 6. alignments given as a PI list -----------------------------------------------------
PI_LIST = """    <Alignment name="Old" staStart="0">
      <AlignPIs>
        <AlignPI><PI>5000 1000</PI></AlignPI>
        <AlignPI><PI>5000 3000</PI><Curve1><Curve radius="1000"/></Curve1></AlignPI>
        <AlignPI><PI>6500 4500</PI><InSpiral><Spiral length="200" spiType="clothoid"/></InSpiral>
          <Curve1><Curve radius="800"/></Curve1>
          <OutSpiral><Spiral length="150"/></OutSpiral></AlignPI>
        <AlignPI>6500 7000</AlignPI>
      </AlignPIs>
    </Alignment>
"""


def test_a_pi_list_is_laid_out_into_lines_arcs_and_spirals(tmp_path, capsys):
    """The laid-out elements join without gap or kink, and the PI recomputed from each
    curve's own tangents is the PI the file gives (independent of the layout formulas:
    T = R tan(Δ/2) for a simple curve, common practice; the unequal-spiral tangents)."""
    from gradeline import read, solve

    path = write(tmp_path, PI_LIST)
    road = solve(read(path))
    assert road.horizontal.findings == ()  # continuous and tangent at every join
    c1, c2 = road.curves
    assert c1.radius == pytest.approx(1000.0) and c1.tangent_in == pytest.approx(
        1000.0 * math.tan(math.radians(22.5)), abs=1e-6
    )
    assert (c1.pi_northing, c1.pi_easting) == pytest.approx((5000.0, 3000.0), abs=1e-6)
    assert (c2.pi_northing, c2.pi_easting) == pytest.approx((6500.0, 4500.0), abs=1e-6)
    assert (c2.spiral_in, c2.spiral_out, c2.radius) == pytest.approx((200.0, 150.0, 800.0))
    assert math.degrees(c2.delta) == pytest.approx(-45.0, abs=1e-9)  # turning right
    # the alignment ends on the last PI
    n, e, _ = road.plan_at([road.horizontal.end])
    assert (float(n[0]), float(e[0])) == pytest.approx((6500.0, 7000.0), abs=1e-6)
    code, out, err = run(capsys, "check", path)
    assert code == 0 and "computed from the AlignPIs list" in err


@pytest.mark.parametrize(
    ("kind_in", "kind_out"), [("bloss", "cubicParabola"), ("radioid", "revCosine")]
)
def test_a_pi_list_lays_out_spirals_of_any_type(tmp_path, capsys, kind_in, kind_out):
    """The same PI list with other spiral types: still continuous and tangent at every
    join, and each curve's own tangents still meet at the file's PI."""
    from gradeline import read, solve

    body = PI_LIST.replace('spiType="clothoid"', f'spiType="{kind_in}"').replace(
        '<Spiral length="150"/>', f'<Spiral length="150" spiType="{kind_out}"/>'
    )
    road = solve(read(write(tmp_path, body)))
    assert road.horizontal.findings == ()
    c2 = road.curves[1]
    assert (c2.pi_northing, c2.pi_easting) == pytest.approx((6500.0, 4500.0), abs=1e-6)
    assert [g.kind for g in road.horizontal.elements[3:6]] == [kind_in, "arc", kind_out]
    assert (c2.spiral_in, c2.spiral_out) == pytest.approx((200.0, 150.0))


POINTS = """  <CgPoints>
    <CgPoint name="P1">5000 1000</CgPoint><CgPoint name="P2">5000 3000</CgPoint>
    <CgPoint name="P3">6500 4500 12.5</CgPoint><CgPoint name="P4">6500 7000</CgPoint>
  </CgPoints>
"""


def test_points_given_by_reference_to_cgpoints(tmp_path, capsys):
    """LandXML points may name a CgPoint (pntRef) instead of giving coordinates."""
    from gradeline import read, solve

    body = PI_LIST.replace("<PI>5000 1000</PI>", '<PI pntRef="P1"/>')
    body = body.replace("<PI>6500 4500</PI>", '<PI pntRef="P3"></PI>')
    plain = solve(read(write(tmp_path, PI_LIST, name="plain.xml")))
    path = tmp_path / "ref.xml"
    path.write_text(
        HEAD.format(units=DEG).replace("  <Alignments>", POINTS + "  <Alignments>") + body + TAIL
    )
    road = solve(read(path))
    assert road.horizontal.elements == plain.horizontal.elements
    line = PLAN.replace("<Start>5000 1000</Start>", '<Start pntRef="P1"/>')
    path.write_text(
        HEAD.format(units=DEG).replace("  <Alignments>", POINTS + "  <Alignments>")
        + '    <Alignment name="L" staStart="0">\n'
        + line
        + "    </Alignment>\n"
        + TAIL
    )
    (g,) = solve(read(path)).horizontal.elements
    assert (g.x0, g.y0, g.length) == (1000.0, 5000.0, 1000.0)
    path.write_text(path.read_text().replace('pntRef="P1"', 'pntRef="P9"'))
    code, out, err = run(capsys, "info", path)
    assert code == 0 and "pntRef 'P9' names no CgPoint in this file" in out


def test_a_curve_that_does_not_fit_its_tangents_is_named(tmp_path, capsys):
    path = write(tmp_path, PI_LIST.replace('radius="1000"', 'radius="9000"'))
    code, out, _ = run(capsys, "info", path)
    assert code == 0 and "AlignPI: the tangents are too short for the curve of radius 9000" in out


# -- 9. every LandXML 1.2 spiral type -----------------------------------------------------
def _meet(g):
    """(x, y) where the tangents at the two ends of element ``g`` intersect."""
    c0, s0, c1, s1 = (
        math.cos(g.heading0),
        math.sin(g.heading0),
        math.cos(g.heading1),
        math.sin(g.heading1),
    )
    t = ((g.x1 - g.x0) * s1 - (g.y1 - g.y0) * c1) / (c0 * s1 - s0 * c1)
    return g.x0 + t * c0, g.y0 + t * s0


def _spiral_road(kind):
    """Line - spiral in - arc - spiral out - line, the spirals of ``kind``; every Start,
    End, Center and PI written from the geometry, so a check must find nothing."""
    from gradeline.geometry import horizontal as H
    from gradeline.model import HorizontalAlignment, HSpiral

    R, Ls, sweep = 800.0, 200.0, math.radians(12.0)
    x0, y0 = 1500.0, 5000.0  # spiral start (easting, northing), heading east
    sp = HSpiral((y0, x0), (0.0, 0.0), Ls, math.inf, R, "ccw", kind, pi=(y0, x0 + 10.0))
    g = H.solve(HorizontalAlignment((sp,))).elements[0]
    xc, yc = g.x1 - R * math.sin(g.heading1), g.y1 + R * math.cos(g.heading1)
    a1 = math.atan2(g.y1 - yc, g.x1 - xc)
    xa, ya = xc + R * math.cos(a1 + sweep), yc + R * math.sin(a1 + sweep)
    h2 = g.heading1 + sweep
    pi2 = (ya + math.sin(h2), xa + math.cos(h2))
    out = H.solve(
        HorizontalAlignment((HSpiral((ya, xa), (0, 0), Ls, R, math.inf, "ccw", kind, pi=pi2),))
    ).elements[0]
    xe, ye = out.x1 + 500.0 * math.cos(out.heading1), out.y1 + 500.0 * math.sin(out.heading1)
    pi1, pi2 = _meet(g), _meet(out)  # the PI is where the two tangents meet
    end = 500.0 + 2 * Ls + R * sweep + 500.0
    return f"""    <Alignment name="{kind}" staStart="0">
      <CoordGeom>
        <Line><Start>{y0} 1000</Start><End>{y0} {x0}</End></Line>
        <Spiral length="{Ls}" radiusStart="INF" radiusEnd="{R}" rot="ccw" spiType="{kind}">
          <Start>{y0} {x0}</Start><PI>{pi1[1]!r} {pi1[0]!r}</PI>
          <End>{g.y1!r} {g.x1!r}</End></Spiral>
        <Curve rot="ccw" radius="{R}"><Start>{g.y1!r} {g.x1!r}</Start>
          <Center>{yc!r} {xc!r}</Center><End>{ya!r} {xa!r}</End></Curve>
        <Spiral length="{Ls}" radiusStart="{R}" radiusEnd="INF" rot="ccw" spiType="{kind}">
          <Start>{ya!r} {xa!r}</Start><PI>{pi2[1]!r} {pi2[0]!r}</PI>
          <End>{out.y1!r} {out.x1!r}</End></Spiral>
        <Line><Start>{out.y1!r} {out.x1!r}</Start><End>{ye!r} {xe!r}</End></Line>
      </CoordGeom>
      <Profile name="{kind}"><ProfAlign name="FG"><PVI>0 100</PVI>
        <ParaCurve length="400">700 110</ParaCurve><PVI>{end!r} 105</PVI></ProfAlign></Profile>
    </Alignment>
"""


def test_every_landxml_spiral_type_gets_every_deliverable(tmp_path, capsys):
    from gradeline import read, solve
    from gradeline.geometry.spirals import SPIRAL_TYPES

    path = write(tmp_path, "".join(_spiral_road(k) for k in SPIRAL_TYPES))
    for kind in SPIRAL_TYPES:
        road = solve(read(path), kind)
        assert road.horizontal.findings == (), kind  # no gap, kink or missed End
        (c,) = road.curves
        assert (c.spiral_in, c.spiral_out, c.radius) == pytest.approx((200.0, 200.0, 800.0))
        assert c.spiral_type == kind
    assert run(capsys, "info", path)[0] == 0
    for kind in ("cubicParabola", "radioid", "revBloss", "weinerBogen"):
        for argv in (
            ("table", path, "--alignment", kind, "--interval", "100"),
            ("curves", path, "--alignment", kind),
            ("check", path, "--alignment", kind),
            (
                "dxf",
                path,
                "--alignment",
                kind,
                "--plan",
                tmp_path / f"{kind}-plan.dxf",
                "-o",
                tmp_path / f"{kind}.dxf",
            ),
            ("sheets", path, "--alignment", kind, "-o", tmp_path / f"{kind}.pdf"),
        ):
            code, out, err = run(capsys, *argv)
            assert code == 0, (argv, out, err)
        code, _, err = run(capsys, "review", path, "--alignment", kind, "--speed", "50")
        assert code in (0, 1) and "Traceback" not in err


# -- 10. names in any script --------------------------------------------------------------
NAMES = ["Кольцевая дорога", "東京環状道路 Øresund", "Ærøskøbing Å"]


@pytest.mark.parametrize("name", NAMES)
def test_names_in_any_script_survive_every_output(tmp_path, capsys, name):
    import ezdxf
    import pypdf

    from gradeline.sheets.fonts import runs, wide_font_path
    from tests.conftest import METRIC_SAMPLE

    text = METRIC_SAMPLE.read_text(encoding="utf-8").replace('Tarnholm Link Road"', f'{name}"', 1)
    path = tmp_path / "u.xml"
    path.write_text(text, encoding="utf-8")
    assert main(["sheets", str(path), "-o", str(tmp_path / "u.pdf"), "--size", "iso-a3"]) == 0
    pdf = (tmp_path / "u.pdf").read_bytes()
    first = pypdf.PdfReader(tmp_path / "u.pdf").pages[0].extract_text()
    assert all(word in first for word in name.split())
    needs_own_font = any(font not in ("Helvetica", "Helvetica-Bold") for font, _ in runs(name))
    if needs_own_font and wide_font_path() is not None:
        assert b"/FontFile2" in pdf  # the TrueType font travels inside the PDF
    for version in ("R2010", "R12"):
        out = tmp_path / f"u-{version}.dxf"
        assert main(["dxf", str(path), "-o", str(out), "--dxf-version", version]) == 0
        texts = [t.dxf.text for t in ezdxf.readfile(out).modelspace().query("TEXT")]
        note = next(t for t in texts if t.startswith("PROFILE "))
        if version == "R2010":
            assert name in note  # UTF-8 in R2007 and later
        else:
            assert name in note or "\\U+" in note  # escaped for older versions
    assert main(["curves", str(path), "--format", "json", "-o", str(tmp_path / "c.json")]) == 0
    assert json.loads((tmp_path / "c.json").read_text(encoding="utf-8"))["alignment"] == name
    capsys.readouterr()
