"""Superelevation: rates, transition lengths, the review of stated transitions, the
proposal and its LandXML, the table, the sheets.

Outside references:

* AASHTO, A Policy on Geometric Design of Highways and Streets, 7th ed. (2018),
  Chapter 3 (from memory, as the shipped criteria file says): runoff
  L_r = w n1 e b_w / Delta with the maximum relative gradients (0.50 % at 50 mph,
  0.45 % at 60 mph, 0.50 % at 80 km/h) and the adjustment factors (0.75 for two
  lanes rotated); tangent runout L_t = e_NC / e L_r; the minimum-runoff figures
  192 ft (50 mph, 8 %, one lane), 288 ft (two lanes) and 213 ft (60 mph, 8 %);
  minimum radius 758 ft at 50 mph with e max 8 % and f 0.14.
* sympy: the distribution of side friction as the unsymmetrical parabola that
  touches both legs at their ends and is smooth where they meet, solved
  symbolically and compared with gradeline's closed form.
"""

from __future__ import annotations

import json
from pathlib import Path

import numpy as np
import pytest
from lxml import etree

from gradeline.analysis import superelevation as se
from gradeline.cli import main
from gradeline.deliverables import open_alignment
from gradeline.io import landxml
from tests.conftest import US_SAMPLE

SC = se.load_super_criteria(None, metric=False)
SCM = se.load_super_criteria(None, metric=True)
NS = "{http://www.landxml.org/schema/LandXML-1.2}"


# --------------------------------------------------------------------------- lengths
@pytest.mark.parametrize(
    ("rate", "speed", "lanes", "expected", "sc"),
    [
        (0.08, 50, 1, 192.0, SC),  # 12 x 0.08 / 0.0050
        (0.08, 50, 2, 288.0, SC),  # x 2 lanes x 0.75
        (0.08, 60, 1, 213.3, SC),  # 12 x 0.08 / 0.0045
        (0.06, 50, 1, 144.0, SC),
        (0.08, 80, 1, 57.6, SCM),  # 3.6 m x 0.08 / 0.0050
    ],
)
def test_runoff_length_from_the_maximum_relative_gradient(rate, speed, lanes, expected, sc):
    assert se.runoff_length(rate, speed, sc, lanes) == pytest.approx(expected, abs=0.05)


def test_runout_keeps_the_runoff_gradient():
    # L_t = e_NC / e L_r: 0.02 / 0.08 x 192 = 48 ft (AASHTO's tangent runout)
    assert se.runout_length(0.08, 192.0, SC) == pytest.approx(48.0)
    assert se.runout_length(0.0, 192.0, SC) == 0.0


# --------------------------------------------------------------------------- rates
def test_distribution_parabola_is_the_symbolic_solution():
    sympy = pytest.importorskip("sympy")
    x, a1, a2 = sympy.symbols("x a1 a2")
    speed, e_max = 50.0, 0.08
    c, f_max, vr = 15.0, SC.f_max(speed), SC.running(speed)
    x_max = c * (e_max + f_max) / speed**2
    x_pi = c * e_max / vr**2
    h = speed**2 * x_pi / c - e_max
    s1, s2 = h / x_pi, (f_max - h) / (x_max - x_pi)
    leg2 = h + s2 * (x - x_pi)
    p1 = a1 * x**2 + s1 * x  # through the origin, along leg 1 there
    p2 = leg2 + a2 * (x_max - x) ** 2  # reaches f max along leg 2 at the minimum radius
    sol = sympy.solve(
        [(p1 - p2).subs(x, x_pi), sympy.diff(p1 - p2, x).subs(x, x_pi)], [a1, a2], dict=True
    )[0]
    for frac in (0.1, 0.3, 0.5, 0.8, 0.95):
        xv = frac * x_max
        want = float((p1 if xv <= x_pi else p2).subs(sol).subs(x, xv))
        assert se.distribution_friction(xv, speed, e_max, SC) == pytest.approx(want, rel=1e-12)


def test_rates_run_from_normal_crown_to_e_max_at_the_minimum_radius():
    speed, e_max = 50.0, 0.08
    r_min = speed**2 / (15 * (e_max + 0.14))  # 757.6 ft, AASHTO's 758
    assert round(r_min) == 758
    top = se.design_rate(r_min, speed, e_max, SC)
    assert top.value == pytest.approx(0.08) and top.raw == pytest.approx(0.08, abs=1e-12)
    assert not top.beyond
    assert se.design_rate(600.0, speed, e_max, SC).beyond  # tighter than the minimum
    radii = np.geomspace(r_min, 60000.0, 200)
    raw = [se.design_rate(r, speed, e_max, SC).raw for r in radii]
    assert all(a >= b - 1e-12 for a, b in zip(raw, raw[1:], strict=False))  # flatter, less
    assert se.design_rate(60000.0, speed, e_max, SC).label == "NC"
    # rounded up, never down, to 0.1 %; RC between the NC limit and the normal slope
    for r in radii:
        rate = se.design_rate(float(r), speed, e_max, SC)
        if rate.label == "RC":
            assert SC.nc_below <= rate.raw <= SC.normal_crown and rate.value == 0.02
        elif rate.label != "NC":
            assert rate.value >= rate.raw - 1e-12 and rate.value - rate.raw < 0.001 + 1e-12


@pytest.mark.parametrize(
    ("e_max", "speed", "table_radius", "sc"),
    [  # AASHTO 2018 minimum radii (its Table 3-7, from memory), ft and m
        (0.04, 30, 250, SC),
        (0.04, 50, 926, SC),
        (0.06, 30, 231, SC),
        (0.06, 60, 1330, SC),
        (0.08, 50, 758, SC),
        (0.08, 70, 1810, SC),
        (0.10, 60, 1090, SC),
        (0.08, 80, 229, SCM),
        (0.08, 100, 394, SCM),
    ],
)
def test_each_e_max_is_reached_at_the_published_minimum_radius(e_max, speed, table_radius, sc):
    c = sc.radius_coefficient
    r_min = speed**2 / (c * (e_max + sc.f_max(speed)))
    assert r_min == pytest.approx(table_radius, abs=5.0)  # the table rounds to 1 or 10
    rate = se.design_rate(r_min, speed, e_max, sc)
    assert rate.value == pytest.approx(e_max) and not rate.beyond
    flatter = se.design_rate(2 * r_min, speed, e_max, sc)
    assert 0 < flatter.raw < e_max


def test_low_speed_streets_take_friction_first():
    # e = V^2 / (15 R) - f: at 30 mph f 0.23 (the criteria's low-speed table)
    assert se.design_rate(300.0, 30, 0.06, SC, "low-speed").label == "NC"  # 0.20 < 0.23
    rate = se.design_rate(200.0, 30, 0.08, SC, "low-speed")
    assert rate.raw == pytest.approx(900 / 3000 - 0.23) and rate.label == "7.0 %"


# --------------------------------------------------------------------------- review
def _sample_with(tmp_path: Path, edit) -> Path:
    """The US sample with its superelevation edited by ``edit(transitions)``."""
    tree = etree.parse(str(US_SAMPLE))
    al = next(a for a in tree.iter(f"{NS}Alignment") if a.get("name") == "Orrin Vale Bypass")
    edit(al.findall(f"{NS}Superelevation"))
    out = tmp_path / "edited.xml"
    tree.write(str(out), xml_declaration=True, encoding="UTF-8")
    return out


def _review(path: Path, capsys) -> tuple[int, dict]:
    code = main(
        ["review", str(path), "--alignment", "Orrin Vale Bypass", "--speed", "50", "--json"]
    )
    return code, json.loads(capsys.readouterr().out)["superelevation"]


def _check(sup: dict, curve: int, name: str) -> dict:
    c = next(c for c in sup["curves"] if c["number"] == curve)
    return next(ch for ch in c["checks"] if ch["name"] == name)


def test_the_sample_superelevation_passes(capsys):
    code, sup = _review(US_SAMPLE, capsys)
    assert code == 0 and not sup["failed"]
    assert [c["required_label"] for c in sup["curves"]] == ["7.0 %", "6.2 %"]


def test_an_injected_wrong_rate_is_flagged(tmp_path, capsys):
    def edit(sups):
        sups[0].find(f"{NS}FullSuperelev").text = "5.0"

    code, sup = _review(_sample_with(tmp_path, edit), capsys)
    ch = _check(sup, 1, "full rate")
    assert code == 1 and ch["verdict"] == "fail"
    assert (ch["required"], ch["provided"]) == (pytest.approx(7.0), pytest.approx(5.0))


def test_an_injected_short_runoff_is_flagged(tmp_path, capsys):
    # curve 2's runoff shortened to 100 ft: L_r for 6.2 % at 50 mph is 148.8 ft
    def edit(sups):
        sups[1].find(f"{NS}BeginRunoffSta").text = "3636.43"

    code, sup = _review(_sample_with(tmp_path, edit), capsys)
    ch = _check(sup, 2, "runoff in")
    assert code == 1 and ch["verdict"] == "fail"
    assert ch["required"] == pytest.approx(148.8) and ch["provided"] == pytest.approx(100.0)
    assert _check(sup, 2, "runoff before the PC")["verdict"] == "fail"  # 100 % before it


def test_overlapping_transitions_are_flagged(tmp_path, capsys):
    def edit(sups):  # curve 1's exit runout pushed past curve 2's start
        sups[0].find(f"{NS}EndofRunoutSta").text = "3600.00"

    code, sup = _review(_sample_with(tmp_path, edit), capsys)
    assert code == 1
    assert sup["overlaps"] == [{"start": pytest.approx(3538.04), "end": pytest.approx(3600.0)}]


def test_a_file_without_superelevation_lists_what_each_curve_needs(capsys):
    code = main(["review", str(US_SAMPLE), "--alignment", "Kettle Lane", "--speed", "30"])
    text = capsys.readouterr().out
    assert "the file states no superelevation" in text
    assert code in (0, 1)


# --------------------------------------------------------------------------- reading
def test_reader_tolerates_a_ratio_and_leaves_broken_transitions_out(tmp_path):
    def edit(sups):
        sups[0].find(f"{NS}FullSuperelev").text = "0.07"  # a ratio where percent belongs
        sups[1].find(f"{NS}FullSuperSta").text = "3400.00"  # before its BeginRunoffSta

    doc = landxml.read(str(_sample_with(tmp_path, edit)))
    al = doc.alignment("Orrin Vale Bypass")
    assert [r.rate for r in al.superelevations] == [pytest.approx(0.07)]
    said = " ".join(n.message for n in doc.notices)
    assert "read as a ratio" in said and "superelevation left out" in said


def test_cross_slopes_rotate_about_the_centreline():
    # curve 1 of the sample turns right: its outside lane is the left one; the inside
    # lane starts to turn where the outside one reaches +2 % (common practice)
    ctx = open_alignment(US_SAMPLE, "Orrin Vale Bypass")
    s = np.array([1800.0, 1828.57, 1900.0, 1900.0 + 250 * 2 / 7, 2150.0, 2300.0])
    left, right = se.cross_slopes(ctx.alignment.superelevations, ctx.curves, 0.02, s)
    assert np.allclose(left, [-0.02, -0.02, 0.0, 0.02, 0.07, 0.07], atol=1e-9)
    assert np.allclose(right, [-0.02, -0.02, -0.02, -0.02, -0.07, -0.07], atol=1e-9)


# --------------------------------------------------------------------------- proposal
def test_proposal_written_into_landxml_passes_its_own_review(tmp_path, capsys):
    src = tmp_path / "bare.xml"
    tree = etree.parse(str(US_SAMPLE))
    for el in list(tree.iter(f"{NS}Superelevation")):
        el.getparent().remove(el)
    tree.write(str(src), xml_declaration=True, encoding="UTF-8")
    out = tmp_path / "with.xml"
    args = ["superelevation", str(src), "--alignment", "Orrin Vale Bypass", "--speed", "50"]
    assert main([*args, "-o", str(out), "--json"]) == 0
    report = json.loads(capsys.readouterr().out)
    curves = report["alignments"][0]["curves"]
    assert [c["label"] for c in curves] == ["7.0 %", "6.2 %"]
    # the spiral curve's runoff is its spiral; the simple curve's two thirds before the PC
    assert curves[0]["runoff"] == pytest.approx(250.0)
    assert curves[1]["stations"]["BeginRunoffSta"] == pytest.approx(
        3686.43 - 2 / 3 * 148.8, abs=0.5
    )
    al = landxml.read(str(out)).alignment("Orrin Vale Bypass")
    assert [round(r.rate, 4) for r in al.superelevations] == [0.07, 0.062]
    code, sup = _review(out, capsys)
    assert code == 0 and not sup["failed"]


# --------------------------------------------------------------------------- sheets
def test_sheets_carry_the_table_and_the_diagram(tmp_path, capsys):
    pdfplumber = pytest.importorskip("pdfplumber")
    out = tmp_path / "s.pdf"
    assert main(["sheets", str(US_SAMPLE), "--alignment", "Orrin Vale Bypass", "-o", str(out)]) == 0
    capsys.readouterr()
    with pdfplumber.open(str(out)) as pdf:
        texts = [p.extract_text() or "" for p in pdf.pages]
        assert any("SUPERELEVATION DATA" in t for t in texts)
        page = next(
            p for p, t in zip(pdf.pages, texts, strict=True) if "SUPERELEVATION DIAGRAM" in t
        )
        # the station labels are turned a quarter: rebuild each from its characters,
        # one column of glyphs a label, read upward
        columns: dict[float, list] = {}
        for ch in page.chars:
            if not ch["upright"]:
                columns.setdefault(round(ch["x0"], 1), []).append(ch)
        marks = {
            x: "".join(c["text"] for c in sorted(cs, key=lambda c: c["y0"]))
            for x, cs in columns.items()
        }
        assert "FS 21+50.00" in marks.values() and "NC 47+51.12" in marks.values()
        # no two labels share a column (their boxes never overlap)
        spans = sorted(
            (min(c["x0"] for c in cs), max(c["x1"] for c in cs)) for cs in columns.values()
        )
        assert all(b0 >= a1 - 1e-6 for (_, a1), (b0, _) in zip(spans, spans[1:], strict=False))
        from gradeline.sheets.layout import sheet_geometry
        from gradeline.sheets.super_page import panel_boxes

        boxes = panel_boxes(sheet_geometry("ansi-d"))[:2]
        h = float(page.height)
        for ch in page.chars:  # every glyph of a panel lies inside one panel's box
            x, y = (ch["x0"] + ch["x1"]) / 2, h - (ch["top"] + ch["bottom"]) / 2
            if y > boxes[0].y - 5:
                assert any(
                    bx.x - 0.5 <= ch["x0"]
                    and ch["x1"] <= bx.x + bx.w + 0.5
                    and bx.y - 0.5 <= h - ch["bottom"]
                    and h - ch["top"] <= bx.y + bx.h + 0.5
                    for bx in boxes
                ), (ch["text"], x, y)
