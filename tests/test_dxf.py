"""DXF output, read back with ezdxf and compared with the computed geometry."""

from __future__ import annotations

import io
import math
import os
import shutil
import subprocess

import ezdxf
import numpy as np
import pytest
from numpy.testing import assert_allclose

from gradeline.cli import main
from gradeline.deliverables import open_alignment
from gradeline.geometry import vertical
from gradeline.geometry.curve_data import curve_data
from gradeline.geometry.station_offset import station_offset
from gradeline.io.dxf_read import read_mapping
from gradeline.present import drafting, items
from gradeline.present.layout import default_layout
from gradeline.present.plan_drawing import plan_drawing
from gradeline.render.dxf import write_dxf
from tests.conftest import GRADELINE, METRIC_SAMPLE, US_SAMPLE

SAMPLES = [(US_SAMPLE, "Orrin Vale Bypass"), (METRIC_SAMPLE, None), (US_SAMPLE, "Kettle Lane")]
IDS = ["bypass-ft", "tarnholm-m", "lane-ft"]
R12_TYPES = {"LINE", "POLYLINE", "VERTEX", "SEQEND", "ARC", "CIRCLE", "TEXT", "POINT"}


def _make(path, name, version="R2010", curves="spline", plan=False):
    ctx = open_alignment(path, name)
    lay = default_layout(ctx.document.units)
    d = plan_drawing(ctx, lay) if plan else drafting.profile_drawing(ctx, lay, curves)
    data = write_dxf(d, lay, version=version, curves=curves, linear_unit=ctx.document.units.linear)
    enc = "utf-8" if version == "R2010" else "cp1252"
    return ctx, lay, ezdxf.read(io.StringIO(data.decode(enc))), data


@pytest.mark.parametrize(("path", "name"), SAMPLES, ids=IDS)
@pytest.mark.parametrize("version", ["R2010", "R2000", "R12"])
@pytest.mark.parametrize("plan", [False, True], ids=["profile", "plan"])
def test_audit_clean(path, name, version, plan):
    _, _, doc, _ = _make(path, name, version, plan=plan)
    auditor = doc.audit()
    assert not auditor.has_errors, [str(e) for e in auditor.errors]
    if version == "R12":
        types = {e.dxftype() for e in doc.entitydb.values() if e.dxf.owner is not None}
        drawn = {e.dxftype() for e in doc.modelspace()}
        assert drawn <= R12_TYPES, drawn - R12_TYPES
        assert "SPLINE" not in types and "LWPOLYLINE" not in types


def _grade_points(doc, mapping):
    """Every vertex and spline point of the grade layer, as (station, elevation)."""
    exag, datum = float(mapping["exaggeration"]), float(mapping["datum"])
    pts = []
    for e in doc.modelspace().query('*[layer=="PROFILE-GRADE"]'):
        t = e.dxftype()
        if t == "LINE":
            pts += [e.dxf.start, e.dxf.end]
        elif t == "LWPOLYLINE":
            pts += [(x, y) for x, y, *_ in e.get_points()]
        elif t == "POLYLINE":
            pts += [v.dxf.location for v in e.vertices]
        elif t == "SPLINE":
            pts += list(e.construction_tool().approximate(40))
        elif t == "ARC":
            pts += list(e.vertices(np.linspace(e.dxf.start_angle, e.dxf.end_angle, 9)))
    arr = np.array([(p[0], p[1]) for p in pts], dtype=float)
    return arr[:, 0], arr[:, 1] / exag + datum


@pytest.mark.parametrize(("path", "name"), SAMPLES, ids=IDS)
@pytest.mark.parametrize(
    ("version", "curves"), [("R2010", "spline"), ("R2010", "polyline"), ("R12", "spline")]
)
def test_profile_reads_back_onto_computed_grade(path, name, version, curves):
    ctx, _, doc, _ = _make(path, name, version, curves)
    mapping = read_mapping(doc)
    s, z = _grade_points(doc, mapping)
    assert len(s) > 20
    # every drawn point lies on the computed finished grade (vertices exactly,
    # spline points to float round-off); 1e-6 file units
    assert_allclose(z, vertical.elevation(ctx.geometry, s), atol=1e-6)
    # the drawing covers the whole profile
    assert s.min() == pytest.approx(ctx.geometry.start) and s.max() == pytest.approx(
        ctx.geometry.end
    )


@pytest.mark.parametrize(("path", "name"), SAMPLES, ids=IDS)
def test_polyline_chords_within_tolerance(path, name):
    ctx, lay, doc, _ = _make(path, name, "R2010", "polyline")
    mapping = read_mapping(doc)
    exag, datum = float(mapping["exaggeration"]), float(mapping["datum"])
    worst = 0.0
    for e in doc.modelspace().query('LWPOLYLINE[layer=="PROFILE-GRADE"]'):
        p = np.array([(x, y / exag + datum) for x, y, *_ in e.get_points()])
        for (s0, z0), (s1, z1) in zip(p, p[1:], strict=False):
            s = np.linspace(s0, s1, 11)
            chord = z0 + (z1 - z0) * (s - s0) / (s1 - s0)
            worst = max(worst, float(np.max(np.abs(chord - vertical.elevation(ctx.geometry, s)))))
    assert 0 < worst <= lay.chord_tolerance


@pytest.mark.parametrize(("path", "name"), SAMPLES, ids=IDS)
def test_plan_reads_back_onto_computed_alignment(path, name):
    ctx, _, doc, _ = _make(path, name, plan=True)
    pts = []
    for e in doc.modelspace().query('*[layer=="PLAN-ALIGNMENT"]'):
        if e.dxftype() == "LINE":
            pts += [e.dxf.start, e.dxf.end]
        elif e.dxftype() == "ARC":
            pts += list(e.vertices(np.linspace(e.dxf.start_angle, e.dxf.end_angle, 7)))
        else:
            pts += [(x, y) for x, y, *_ in e.get_points()]
    arr = np.array([(p[0], p[1]) for p in pts])
    st, off, status = station_offset(ctx.horizontal, arr[:, 1], arr[:, 0])
    assert np.all(status == 0)
    assert np.max(np.abs(off)) < 1e-6  # ft or m: the linework lies on the alignment
    # ARC entities carry the true radius of each curve
    radii = sorted(
        round(e.dxf.radius, 3) for e in doc.modelspace().query("ARC[layer=='PLAN-ALIGNMENT']")
    )
    assert radii == sorted(round(c.radius, 3) for c in curve_data(ctx.horizontal))


def _text_boxes(doc):
    boxes = []
    for e in doc.modelspace().query("TEXT"):
        halign = {0: "left", 1: "center", 2: "right"}[e.dxf.halign]
        valign = {0: "bottom", 1: "bottom", 2: "middle", 3: "top"}[e.dxf.valign]
        p = e.dxf.align_point if (e.dxf.halign or e.dxf.valign) else e.dxf.insert
        t = items.Text("x", e.dxf.text, p[0], p[1], e.dxf.height, e.dxf.rotation, halign, valign)
        boxes.append((e.dxf.text, t.corners()))
    return boxes


@pytest.mark.parametrize(("path", "name"), SAMPLES, ids=IDS)
@pytest.mark.parametrize("plan", [False, True], ids=["profile", "plan"])
def test_labels_do_not_overlap(path, name, plan):
    _, _, doc, _ = _make(path, name, plan=plan)
    boxes = _text_boxes(doc)
    assert len(boxes) > 10
    clashes = [
        (a[0], b[0])
        for i, a in enumerate(boxes)
        for b in boxes[i + 1 :]
        if items.boxes_overlap(a[1], b[1])
    ]
    assert clashes == []


def test_profile_labels_name_every_key_point():
    ctx, _, doc, _ = _make(US_SAMPLE, "Orrin Vale Bypass")
    texts = [e.dxf.text for e in doc.modelspace().query("TEXT")]
    for c in ctx.geometry.curves:
        lab = ctx.stationing.label
        assert any(t.startswith(f"PVI {lab(c.pvi_station)}") for t in texts)
        assert any(t.startswith(f"BVC {lab(c.bvc_station)}") for t in texts)
        assert any(t.startswith(f"EVC {lab(c.evc_station)}") for t in texts)
        assert any(f"K = {c.k:.1f}" in t for t in texts)
    for g in ("+2.367%", "-2.029%", "+3.000%", "-2.000%"):
        assert g in texts


def test_mapping_in_header_custom_properties():
    _, _, doc, _ = _make(METRIC_SAMPLE, None)
    props = dict(doc.header.custom_vars)
    assert props["GRADELINE_EXAGGERATION"] == "10.0"
    assert float(props["GRADELINE_DATUM"]) < 84.2  # below the lowest point
    assert doc.header["$INSUNITS"] == 6  # metres


def test_units_header_us_survey_foot():
    _, _, doc, _ = _make(US_SAMPLE, "Kettle Lane")
    assert doc.header["$INSUNITS"] == 21  # DXF reference: 21 = US survey feet


def test_same_input_same_bytes_across_processes(tmp_path):
    outs = []
    for seed in ("3", "271"):
        out = tmp_path / f"p{seed}.dxf"
        plan = tmp_path / f"q{seed}.dxf"
        env = dict(os.environ, PYTHONHASHSEED=seed)
        subprocess.run(
            [
                GRADELINE,
                "dxf",
                str(US_SAMPLE),
                "--alignment",
                "Orrin Vale Bypass",
                "-o",
                str(out),
                "--plan",
                str(plan),
            ],
            check=True,
            env=env,
            timeout=120,
        )
        outs.append((out.read_bytes(), plan.read_bytes()))
    assert outs[0] == outs[1]


def test_layer_renames(tmp_path, capsys):
    cfg = tmp_path / "layers.toml"
    cfg.write_text('[layers]\nground = "EX-GROUND"\n')
    out = tmp_path / "p.dxf"
    code = main(
        [
            "dxf",
            str(METRIC_SAMPLE),
            "-o",
            str(out),
            "--config",
            str(cfg),
            "--layer",
            "grade=FG-LINE",
        ]
    )
    assert code == 0
    doc = ezdxf.readfile(out)
    assert "FG-LINE" in doc.layers and "EX-GROUND" in doc.layers
    assert len(doc.modelspace().query('*[layer=="FG-LINE"]')) > 0


def test_unknown_layer_role(tmp_path, capsys):
    code = main(["dxf", str(METRIC_SAMPLE), "-o", str(tmp_path / "x.dxf"), "--layer", "roads=X"])
    assert code == 2
    assert "unknown layer role 'roads'" in capsys.readouterr().err


def test_exaggeration_one_gives_arcs_for_circular_curves():
    ctx = open_alignment(METRIC_SAMPLE)
    lay = default_layout(ctx.document.units, exaggeration=1.0)
    d = drafting.profile_drawing(ctx, lay)
    doc = ezdxf.read(io.StringIO(write_dxf(d, lay, linear_unit="meter").decode()))
    arcs = doc.modelspace().query('ARC[layer=="PROFILE-GRADE"]')
    assert sorted(round(a.dxf.radius) for a in arcs) == [4000, 6000]
    for a in arcs:  # arc points lie on the computed grade
        for p in a.vertices(np.linspace(a.dxf.start_angle, a.dxf.end_angle, 5)):
            z = p[1] + float(read_mapping(doc)["datum"])
            assert z == pytest.approx(float(vertical.elevation(ctx.geometry, p[0])), abs=1e-6)
    assert math.isclose(float(read_mapping(doc)["exaggeration"]), 1.0)


def test_rendered_png_is_not_blank(tmp_path):
    pytest.importorskip("matplotlib", reason="matplotlib renders DXF through ezdxf's add-on")
    import matplotlib.image as mpimg

    from docs.make_images import render_dxf

    ctx = open_alignment(US_SAMPLE, "Orrin Vale Bypass")
    lay = default_layout(ctx.document.units)
    data = write_dxf(drafting.profile_drawing(ctx, lay), lay, linear_unit="USSurveyFoot")
    out = tmp_path / "p.png"
    render_dxf(data, (1330.0, 2430.0, -40.0, 360.0), 6.0, out, dpi=80)
    img = mpimg.imread(out)
    ink = (img[:, :, :3].mean(axis=2) < 0.8).mean()
    assert 0.01 < ink < 0.6  # lines and text, on a white background


# -- plan-set polish (issue 15) -------------------------------------------------------------
@pytest.fixture
def both_drawings(tmp_path):
    out = {}
    for key, sample, name in (("ft", US_SAMPLE, "Orrin Vale Bypass"), ("m", METRIC_SAMPLE, None)):
        prof, plan = tmp_path / f"{key}.dxf", tmp_path / f"{key}-plan.dxf"
        argv = ["dxf", str(sample), "-o", str(prof), "--plan", str(plan)]
        assert main(argv + (["--alignment", name] if name else [])) == 0
        out[key] = (prof, plan)
    return out


def test_plan_dxf_has_no_profile_layers_and_profile_dxf_no_plan_layers(both_drawings):
    for prof, plan in both_drawings.values():
        plan_layers = {layer.dxf.name for layer in ezdxf.readfile(plan).layers}
        prof_layers = {layer.dxf.name for layer in ezdxf.readfile(prof).layers}
        assert not any(n.startswith("PROFILE-") for n in plan_layers), plan_layers
        assert not any(n.startswith("PLAN-") for n in prof_layers), prof_layers


def test_begin_and_end_of_profile_are_labelled_in_the_dxf(both_drawings):
    doc = ezdxf.readfile(both_drawings["ft"][0])
    texts = [t.dxf.text for t in doc.modelspace().query("TEXT")]
    ctx = open_alignment(str(US_SAMPLE), "Orrin Vale Bypass")
    st, g = ctx.stationing, ctx.geometry
    assert f"BEGIN PROFILE {st.label(g.start)}  EL 512.40" in texts  # first PVI of the sample
    assert any(t.startswith(f"END PROFILE {st.label(g.end)}") for t in texts)


@pytest.mark.parametrize(("key", "insunits", "mm_per_unit"), [("ft", 21, 1.0), ("m", 6, 1000.0)])
def test_units_and_paper_of_the_drawings(both_drawings, key, insunits, mm_per_unit):
    """$INSUNITS by the DXF reference (21 US survey feet, 6 metres); the empty paper-space
    layout's limits hold one A3 page, in drawing units where a viewer converts them."""
    for path in both_drawings[key]:
        doc = ezdxf.readfile(path)
        assert doc.header["$INSUNITS"] == insunits
        lay = doc.layouts.get("Layout1").dxf_layout.dxf
        assert (lay.limmax.x * mm_per_unit, lay.limmax.y * mm_per_unit) == pytest.approx(
            (420.0, 297.0)
        )
        assert (lay.paper_width, lay.paper_height) == (420.0, 297.0)  # mm, per the reference


@pytest.mark.skipif(
    not (shutil.which("librecad") and shutil.which("xvfb-run")),
    reason="LibreCAD (Debian librecad) and xvfb-run are not installed",
)
def test_librecad_prints_each_drawing_on_an_a3_page(both_drawings, tmp_path):
    """Opened in LibreCAD, a general DXF viewer, every drawing prints on one A3 page
    (420 x 297 mm = 1191 x 842 pt), metric ones too (they printed 1,000x too large)."""
    import pypdf

    for prof, plan in both_drawings.values():
        for path in (prof, plan):
            out = tmp_path / "lc"
            subprocess.run(
                ["xvfb-run", "-a", "librecad", "dxf2pdf", "-t", str(out), str(path)],
                capture_output=True,
                timeout=120,
                check=False,
            )
            pdf = out / (path.stem + ".pdf")
            box = pypdf.PdfReader(pdf).pages[0].mediabox
            assert (float(box.width), float(box.height)) == pytest.approx((1190.55, 841.89), abs=1)


def test_an_output_into_a_new_folder_creates_it(tmp_path):
    target = tmp_path / "new" / "deeper" / "x.dxf"
    assert main(["dxf", str(METRIC_SAMPLE), "-o", str(target)]) == 0
    assert ezdxf.readfile(target).header["$INSUNITS"] == 6
