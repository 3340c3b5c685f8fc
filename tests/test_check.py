"""Cross-check: injected errors are caught and named; clean files and drawings pass."""

from __future__ import annotations

import io
import json

import ezdxf
import numpy as np
import pytest
from lxml import etree

from gradeline.analysis import check
from gradeline.cli import main
from gradeline.deliverables import open_alignment
from gradeline.geometry import vertical
from gradeline.io import landxml
from gradeline.present import drafting
from gradeline.present.layout import default_layout
from gradeline.render.dxf import write_dxf
from tests.conftest import METRIC_SAMPLE, US_SAMPLE

NS = "{http://www.landxml.org/schema/LandXML-1.2}"


def _edit(src, fn) -> bytes:
    tree = etree.parse(str(src))
    fn(tree.getroot())
    return etree.tostring(tree, xml_declaration=True, encoding="UTF-8")


def _elements(root, alignment="Orrin Vale Bypass"):
    al = next(a for a in root.iter(f"{NS}Alignment") if a.get("name") == alignment)
    return al, list(al.find(f"{NS}CoordGeom"))


def _over(data: bytes, alignment="Orrin Vale Bypass"):
    doc = landxml.parse_bytes(data, "edited.xml")
    return [f for f in check.check_document(doc, alignment) if f.verdict == "over"]


@pytest.mark.parametrize(("path", "name"), [(US_SAMPLE, None), (METRIC_SAMPLE, None)])
def test_clean_samples_pass(path, name):
    doc = landxml.read(path)
    findings = check.check_document(doc, name)
    assert len(findings) > 40
    assert [f for f in findings if f.verdict == "over"] == []


def _shift_point(el, tag, dn=0.0, de=0.0):
    p = el.find(f"{NS}{tag}")
    n, e = (float(v) for v in p.text.split()[:2])
    p.text = f"{n + dn!r} {e + de!r}"


def test_moved_center_is_named():
    def fn(root):
        _, els = _elements(root)
        _shift_point(els[5], "Center", dn=0.5)  # Curve 6 (the simple curve)

    over = _over(_edit(US_SAMPLE, fn))
    assert {(f.element, f.index) for f in over} >= {("Curve", 6)}
    assert any(f.quantity.startswith("radius") or "End" in f.quantity for f in over)
    assert all(f.index in (6, 7) or f.element == "Alignment" for f in over)


def test_wrong_chord_is_named():
    def fn(root):
        _, els = _elements(root)
        els[5].set("chord", f"{float(els[5].get('chord')) + 0.25}")

    over = _over(_edit(US_SAMPLE, fn))
    assert [(f.element, f.index, f.quantity) for f in over] == [("Curve", 6, "chord")]
    assert over[0].difference == pytest.approx(0.25, abs=1e-6)


def test_wrong_sta_start_is_named():
    def fn(root):
        _, els = _elements(root)
        els[4].set("staStart", f"{float(els[4].get('staStart')) + 1.0}")

    over = _over(_edit(US_SAMPLE, fn))
    assert [(f.element, f.index, f.quantity) for f in over] == [("Line", 5, "staStart")]
    assert over[0].difference == pytest.approx(1.0, abs=1e-6)


def test_gap_between_elements_is_named():
    def fn(root):
        _, els = _elements(root)
        _shift_point(els[6], "Start", dn=0.3)  # Line 7 starts 0.3 ft off the end of Curve 6

    over = _over(_edit(US_SAMPLE, fn))
    gaps = [f for f in over if f.quantity.startswith("gap")]
    assert [(f.element, f.index) for f in gaps] == [("Line", 7)]
    assert gaps[0].stated == pytest.approx(0.3, abs=1e-6)


def test_kinked_join_is_named():
    def fn(root):
        _, els = _elements(root)
        _shift_point(els[6], "End", de=20.0)  # turns the last line about its start

    over = _over(_edit(US_SAMPLE, fn))
    kinds = {(f.element, f.index, f.quantity) for f in over}
    assert ("Line", 7, "tangency at join") in kinds
    assert ("Line", 7, "dir") in kinds


def test_angle_point_between_lines_is_reported_as_such():
    data = (
        b'<LandXML><Units><Metric linearUnit="meter"/></Units><Alignments>'
        b'<Alignment name="a" length="200"><CoordGeom>'
        b"<Line><Start>0 0</Start><End>0 100</End></Line>"
        b"<Line><Start>0 100</Start><End>10 199.4987</End></Line>"
        b"</CoordGeom></Alignment></Alignments></LandXML>"
    )
    findings = check.check_document(landxml.parse_bytes(data))
    info = [f for f in findings if f.verdict == "info"]
    assert info and "deliberate angle point" in info[0].message


def test_wrong_curve_length_is_named():
    def fn(root):
        _, els = _elements(root)
        els[2].set("length", f"{float(els[2].get('length')) - 0.5}")  # Curve 3 (between spirals)

    over = _over(_edit(US_SAMPLE, fn))
    assert [(f.element, f.index, f.quantity) for f in over] == [("Curve", 3, "length")]


def test_wrong_alignment_length_is_named():
    def fn(root):
        al, _ = _elements(root)
        al.set("length", "5210.0")

    over = _over(_edit(US_SAMPLE, fn))
    assert [(f.element, f.quantity) for f in over] == [("Alignment", "length")]
    assert over[0].difference == pytest.approx(10.0, abs=1e-6)


def test_wrong_spiral_value_is_named():
    def fn(root):
        _, els = _elements(root)
        els[1].set("totalY", f"{float(els[1].get('totalY')) + 0.05}")

    over = _over(_edit(US_SAMPLE, fn))
    assert [(f.element, f.index, f.quantity) for f in over] == [("Spiral", 2, "totalY")]


def test_wrong_circ_curve_length_is_named():
    def fn(root):
        for c in root.iter(f"{NS}CircCurve"):
            c.set("length", f"{float(c.get('length')) + 1.0}")
            break

    over = _over(_edit(METRIC_SAMPLE, fn), None)
    assert [(f.element, f.quantity.split(" ")[0]) for f in over] == [("CircCurve", "length")]


def test_pvi_outside_alignment_is_named():
    def fn(root):
        pvis = list(root.iter(f"{NS}PVI"))
        pvis[-1].text = "2600.000 93.800"  # past the alignment's end (2400)

    over = _over(_edit(METRIC_SAMPLE, fn), None)
    assert any(f.quantity == "PVI inside the alignment" for f in over)


# --- DXF linework ---------------------------------------------------------------------
def _our_dxf(curves="spline", path=US_SAMPLE, name="Orrin Vale Bypass"):
    ctx = open_alignment(path, name)
    lay = default_layout(ctx.document.units)
    return ctx, write_dxf(
        drafting.profile_drawing(ctx, lay, curves),
        lay,
        curves=curves,
        linear_unit=ctx.document.units.linear,
    )


@pytest.mark.parametrize("curves", ["spline", "polyline"])
def test_our_own_dxf_checks_clean(tmp_path, capsys, curves):
    _, data = _our_dxf(curves)
    out = tmp_path / "p.dxf"
    out.write_bytes(data)
    code = main(
        ["check", str(US_SAMPLE), "--alignment", "Orrin Vale Bypass", "--dxf", str(out), "--json"]
    )
    report = json.loads(capsys.readouterr().out)
    assert code == 0, report["summary"]
    d = report["drawings"][0]["linework"]
    assert d["mapping"] == "from the drawing" and d["max_deviation"] < 0.006
    assert d["over_tolerance"] == [] and d["not_covered"] == []


def test_moved_vertex_is_flagged_at_its_station(tmp_path, capsys):
    ctx, data = _our_dxf("polyline")
    doc = ezdxf.read(io.StringIO(data.decode()))
    exag = 10.0
    lines = doc.modelspace().query('LINE[layer=="PROFILE-GRADE"]')
    target = max(lines, key=lambda e: abs(e.dxf.end[0] - e.dxf.start[0]))
    x = target.dxf.end[0]
    target.dxf.end = (x, target.dxf.end[1] + 0.1 * exag)  # 0.1 ft higher
    out = tmp_path / "moved.dxf"
    doc.saveas(out)
    code = main(
        ["check", str(US_SAMPLE), "--alignment", "Orrin Vale Bypass", "--dxf", str(out), "--json"]
    )
    d = json.loads(capsys.readouterr().out)["drawings"][0]["linework"]
    assert code == 1
    assert d["max_deviation"] == pytest.approx(0.1, abs=1e-6)
    assert d["worst_station"] == pytest.approx(x, abs=1e-6)
    assert all(
        r["start"] <= x + 1e-6 and r["end"] >= target.dxf.start[0] - 1e-6
        for r in d["over_tolerance"]
    )


def test_coarse_chords_flagged_only_where_the_chord_error_is_large(tmp_path, capsys):
    ctx = open_alignment(US_SAMPLE, "Orrin Vale Bypass")
    g = ctx.geometry
    s = np.arange(g.start, g.end + 1e-9, 50.0)  # 50-ft chords
    z = vertical.elevation(g, s)
    doc = ezdxf.new("R2010")
    doc.header["$INSUNITS"] = 2  # drawn in feet, as the file
    doc.layers.add("FG")
    doc.modelspace().add_lwpolyline(
        np.column_stack([s, (z - 500.0) * 5.0]).tolist(), dxfattribs={"layer": "FG"}
    )
    out = tmp_path / "coarse.dxf"
    doc.saveas(out)
    code = main(
        [
            "check",
            str(US_SAMPLE),
            "--alignment",
            "Orrin Vale Bypass",
            "--dxf",
            str(out),
            "--layer",
            "FG",
            "--exaggeration",
            "5",
            "--datum",
            "500",
            "--json",
        ]
    )
    d = json.loads(capsys.readouterr().out)["drawings"][0]["linework"]
    assert code == 1
    # a parabola y = c x^2 deviates from a chord of length h by c h^2 / 4 at its middle
    worst_curve = float(np.max(np.abs(g.c))) * 50.0**2 / 4
    assert d["max_deviation"] <= worst_curve + 1e-9
    assert d["max_deviation"] == pytest.approx(worst_curve, rel=0.1)
    for r in d["over_tolerance"]:  # every flagged range lies on a vertical curve
        assert any(
            c.bvc_station - 50 <= r["start"] and r["end"] <= c.evc_station + 50 for c in g.curves
        )
    tangents = [
        (c.evc_station + 60, n.bvc_station - 60)
        for c, n in zip(g.curves, g.curves[1:], strict=False)
    ]
    for a, b in tangents:
        assert not any(r["start"] < b and r["end"] > a for r in d["over_tolerance"] if b > a)


def test_fitted_mapping_when_not_given(tmp_path, capsys):
    ctx = open_alignment(METRIC_SAMPLE)
    g = ctx.geometry
    s = np.arange(g.start, g.end + 1e-9, 0.5)
    doc = ezdxf.new("R2010")
    doc.modelspace().add_lwpolyline(
        np.column_stack([s, (vertical.elevation(g, s) - 70.0) * 4.0]).tolist(),
        dxfattribs={"layer": "GRADE"},
    )
    out = tmp_path / "other.dxf"
    doc.saveas(out)
    code = main(["check", str(METRIC_SAMPLE), "--dxf", str(out), "--layer", "GRADE", "--json"])
    d = json.loads(capsys.readouterr().out)["drawings"][0]["linework"]
    assert code == 0
    assert d["mapping"] == "fitted by least squares"
    assert d["exaggeration"] == pytest.approx(4.0, rel=1e-6)
    assert d["datum"] == pytest.approx(70.0, abs=1e-4)


def test_partial_drawing_reports_uncovered(tmp_path, capsys):
    ctx = open_alignment(METRIC_SAMPLE)
    g = ctx.geometry
    s = np.arange(g.start, 1000.0, 1.0)
    doc = ezdxf.new("R2010")
    doc.modelspace().add_lwpolyline(
        np.column_stack([s, vertical.elevation(g, s) - 70]).tolist(), dxfattribs={"layer": "GRADE"}
    )
    out = tmp_path / "part.dxf"
    doc.saveas(out)
    code = main(
        [
            "check",
            str(METRIC_SAMPLE),
            "--dxf",
            str(out),
            "--layer",
            "GRADE",
            "--exaggeration",
            "1",
            "--datum",
            "70",
            "--json",
        ]
    )
    d = json.loads(capsys.readouterr().out)["drawings"][0]["linework"]
    assert code == 1
    assert d["not_covered"][0]["start"] == pytest.approx(999.0, abs=1.0)
    assert d["not_covered"][0]["end"] == pytest.approx(g.end)


def test_bad_dxf_and_missing_layer(tmp_path, capsys):
    bad = tmp_path / "bad.dxf"
    bad.write_text("this is not a drawing")
    assert main(["check", str(METRIC_SAMPLE), "--dxf", str(bad), "--layer", "X"]) == 2
    assert "gradeline: " + str(bad) in capsys.readouterr().err
    _, data = _our_dxf(path=METRIC_SAMPLE, name=None)
    good = tmp_path / "g.dxf"
    good.write_bytes(data)
    assert main(["check", str(METRIC_SAMPLE), "--dxf", str(good), "--layer", "NOPE"]) == 2
    err = capsys.readouterr().err
    assert "no LINE, LWPOLYLINE, POLYLINE, SPLINE or ARC on layer 'NOPE'" in err
    assert "PROFILE-GRADE" in err


def test_text_report_summary_first(capsys):
    assert main(["check", str(METRIC_SAMPLE)]) == 0
    out = capsys.readouterr().out
    assert out.splitlines()[0].startswith("0 findings over tolerance in ")
    assert "CAUTION" in out
