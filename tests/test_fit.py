"""fit: drafted linework back to PVIs and curves; the LandXML writer round trip."""

from __future__ import annotations

import json

import ezdxf
import numpy as np
import pytest

from gradeline.analysis.fit import FitError, chain, fit_profile
from gradeline.cli import main
from gradeline.deliverables import open_alignment
from gradeline.geometry import vertical
from gradeline.io import landxml, landxml_write
from tests.conftest import METRIC_SAMPLE, US_SAMPLE

# Issue 9 tolerances: PVIs within 0.01 ft / 0.003 m, curve lengths within 0.1 ft / 0.03 m
TOL = {"ft": (0.01, 0.1), "m": (0.003, 0.03)}
SAMPLES = [(US_SAMPLE, "Orrin Vale Bypass", "ft"), (METRIC_SAMPLE, None, "m")]


def _compare(fitted, truth, pvi_tol, len_tol, station_tol=None):
    assert len(fitted.pvis) == len(truth.pvis)
    ft = vertical.solve(fitted).curves
    tt = vertical.solve(truth).curves
    for a, b in zip(fitted.pvis, truth.pvis, strict=True):
        assert a.station == pytest.approx(b.station, abs=station_tol or pvi_tol)
        assert a.elevation == pytest.approx(b.elevation, abs=pvi_tol)
    for a, b in zip(ft, tt, strict=True):
        assert a.length == pytest.approx(b.length, abs=len_tol)


@pytest.mark.parametrize(("path", "name", "unit"), SAMPLES, ids=["bypass-ft", "tarnholm-m"])
@pytest.mark.parametrize("curves", ["spline", "polyline"])
def test_round_trip_through_our_dxf(tmp_path, capsys, path, name, unit, curves):
    dxf = tmp_path / "p.dxf"
    args = ["dxf", str(path), "-o", str(dxf), "--curves", curves]
    if name:
        args += ["--alignment", name]
    assert main(args) == 0
    out = tmp_path / "fit.xml"
    assert main(["fit", str(dxf), "--layer", "PROFILE-GRADE", "-o", str(out), "--json"]) == 0
    report = json.loads(capsys.readouterr().out)
    assert report["max_residual"] < TOL[unit][0]
    fitted = landxml.read(out).alignment().profile()
    _compare(fitted, open_alignment(path, name).profile, *TOL[unit])
    # kinds recovered too (exact linework tells a circle from a parabola)
    assert [p.kind for p in fitted.pvis] == [
        p.kind for p in open_alignment(path, name).profile.pvis
    ]
    # check and fit agree on the same drawing's linework (its labels state the original's
    # station equations, which the fitted file, made from linework alone, does not have)
    assert main(["check", str(out), "--dxf", str(dxf), "--no-labels"]) == 0


@pytest.mark.parametrize(("path", "name", "unit"), SAMPLES, ids=["bypass-ft", "tarnholm-m"])
def test_noisy_polyline_recovers_the_geometry(path, name, unit):
    # 1-ft (0.3-m) chords with vertices rounded to 0.01 ft (0.001 m)
    truth = open_alignment(path, name).profile
    g = vertical.solve(truth)
    step, dec = (1.0, 2) if unit == "ft" else (0.3, 3)
    s = np.arange(g.start, g.end + 1e-9, step)
    pts = np.column_stack([s, vertical.elevation(g, s)]).round(dec)
    fitted = fit_profile(pts, window=80.0 if unit == "ft" else 24.0).profile
    pvi_tol, len_tol = TOL[unit]
    # Elevations meet the tolerance. A PVI's station is known only to about the
    # elevation noise divided by the grade break (0.0029 ft / 4.4 % = 0.07 ft), and
    # the length of a flat curve (K = 322) to about 0.25 ft: that is the information
    # 0.01-ft rounding leaves in the drawing, so those bounds are looser here.
    _compare(
        fitted,
        truth,
        pvi_tol,
        3 * len_tol if unit == "ft" else len_tol,
        station_tol=0.1 if unit == "ft" else 0.01,
    )


def test_no_linework_on_layer(tmp_path, capsys):
    doc = ezdxf.new("R2010")
    doc.modelspace().add_line((0, 0), (10, 1), dxfattribs={"layer": "OTHER"})
    path = tmp_path / "e.dxf"
    doc.saveas(path)
    code = main(
        [
            "fit",
            str(path),
            "--layer",
            "FG",
            "--exaggeration",
            "1",
            "--datum",
            "0",
            "-o",
            str(tmp_path / "o.xml"),
        ]
    )
    assert code == 2
    err = capsys.readouterr().err
    assert "no LINE, LWPOLYLINE, POLYLINE, SPLINE or ARC gradeline can read on layer 'FG'" in err
    assert "OTHER" in err
    assert not (tmp_path / "o.xml").exists()


def test_disconnected_pieces(tmp_path, capsys):
    doc = ezdxf.new("R2010")
    msp = doc.modelspace()
    msp.add_line((0, 0), (100, 2), dxfattribs={"layer": "FG"})
    msp.add_line((105, 2), (200, 0), dxfattribs={"layer": "FG"})
    path = tmp_path / "d.dxf"
    doc.saveas(path)
    code = main(
        [
            "fit",
            str(path),
            "--layer",
            "FG",
            "--exaggeration",
            "1",
            "--datum",
            "0",
            "-o",
            str(tmp_path / "o.xml"),
        ]
    )
    assert code == 2
    assert "the linework is broken: a gap of 5.0000 between x = 100.000" in capsys.readouterr().err


def test_backtracking_linework():
    with pytest.raises(FitError, match="backtracks"):
        chain([np.array([[0.0, 0.0], [100.0, 1.0]]), np.array([[60.0, 1.0], [160.0, 2.0]])], 0.01)
    with pytest.raises(FitError, match="runs back"):
        chain([np.array([[0.0, 0.0], [100.0, 1.0], [50.0, 2.0], [150.0, 3.0]])], 0.01)


def test_mapping_required_for_foreign_drawings(tmp_path, capsys):
    doc = ezdxf.new("R2010")
    doc.modelspace().add_line((0, 0), (10, 1), dxfattribs={"layer": "FG"})
    path = tmp_path / "m.dxf"
    doc.saveas(path)
    assert main(["fit", str(path), "--layer", "FG", "-o", str(tmp_path / "o.xml")]) == 2
    assert "give --exaggeration and --datum" in capsys.readouterr().err


def test_writer_round_trip_is_exact():
    for path in (US_SAMPLE, METRIC_SAMPLE):
        doc = landxml.read(path)
        again = landxml.parse_bytes(landxml_write.write_landxml(doc), "rt.xml")
        for a, b in zip(doc.alignments, again.alignments, strict=True):
            assert a.profiles == b.profiles and a.horizontal == b.horizontal
            assert a.equations == b.equations and a.grounds == b.grounds
        assert landxml_write.write_landxml(doc) == landxml_write.write_landxml(
            again
        )  # stable bytes


def test_writer_element_order_follows_the_schema():
    from lxml import etree

    root = etree.fromstring(landxml_write.write_landxml(landxml.read(METRIC_SAMPLE)))
    top = [etree.QName(c).localname for c in root]
    assert top == ["Units", "Project", "Application", "Alignments"]
    al = root[3][0]
    assert [etree.QName(c).localname for c in al] == ["CoordGeom", "StaEquation", "Profile"]
    prof = al[2]
    assert [etree.QName(c).localname for c in prof] == ["ProfSurf", "ProfAlign"]
    assert root.get("version") == "1.2" and root.get("date") and root.get("time")
