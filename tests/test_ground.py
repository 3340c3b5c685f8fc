"""TIN ground: reading, point location and sampling, against matplotlib's interpolator."""

from __future__ import annotations

import csv
import io
import math

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from gradeline.cli import main
from gradeline.deliverables import attach_ground, open_alignment
from gradeline.errors import InputError
from gradeline.geometry import ground as G
from gradeline.geometry import horizontal
from gradeline.io import surface_reader
from gradeline.model import HLine, HorizontalAlignment
from tests.conftest import METRIC_SAMPLE, SAMPLES, US_SAMPLE

TERRAIN = SAMPLES / "orrin-vale-terrain.xml"


def _tin_xml(points, faces, name="S", unit="meter", hidden=()):
    p = "".join(
        f'<P id="{i}">{float(n)!r} {float(e)!r} {float(z)!r}</P>' for i, (n, e, z) in points.items()
    )
    flag = ' i="1"'
    f = "".join(
        f"<F{flag if k in hidden else ''}>{a} {b} {c}</F>" for k, (a, b, c) in enumerate(faces)
    )
    return (
        f'<LandXML><Units><Metric linearUnit="{unit}"/></Units><Surfaces>'
        f'<Surface name="{name}"><Definition surfType="TIN"><Pnts>{p}</Pnts>'
        f"<Faces>{f}</Faces></Definition></Surface></Surfaces></LandXML>"
    )


@pytest.fixture(scope="module")
def bypass_tin():
    surf = surface_reader.read_surface(TERRAIN)
    return surf, G.TriangleIndex(surf)


def test_reads_sample_terrain(bypass_tin):
    surf, _ = bypass_tin
    assert surf.name == "Existing ground 2026" and surf.linear_unit == "USSurveyFoot"
    assert len(surf.x) == 103 * 33 and len(surf.faces) == 2 * 102 * 32
    assert surf.hidden.sum() == 13  # the invented pond


def test_matches_matplotlib_linear_interpolator(bypass_tin):
    # reference: matplotlib.tri.LinearTriInterpolator on the same (visible) triangles
    tri_mod = pytest.importorskip("matplotlib.tri")
    surf, index = bypass_tin
    tri = tri_mod.Triangulation(surf.x, surf.y, triangles=surf.visible)
    ref = tri_mod.LinearTriInterpolator(tri, surf.z)
    rng = np.random.default_rng(11)
    px = rng.uniform(surf.x.min(), surf.x.max(), 20000)
    py = rng.uniform(surf.y.min(), surf.y.max(), 20000)
    want = np.ma.filled(ref(px, py), np.nan)
    got = G.interpolate(index, px, py)
    both = np.isfinite(want) & np.isfinite(got)
    assert both.sum() > 19000
    np.testing.assert_allclose(got[both], want[both], rtol=1e-9)
    assert np.array_equal(np.isnan(got), np.isnan(want))  # same holes


def test_vertex_on_the_alignment_gives_its_elevation():
    # a straight alignment along a grid line through TIN vertices (property, no source)
    xs = np.arange(0.0, 101.0, 10.0)
    pts, idx = {}, {}
    k = 1
    for j, y in enumerate((0.0, 10.0, 20.0)):
        for i, x in enumerate(xs):
            pts[k] = (y, x, 50 + 0.3 * x + 2 * math.sin(x / 7) + y / 4)
            idx[(i, j)] = k
            k += 1
    faces = []
    for j in range(2):
        for i in range(len(xs) - 1):
            a, b, c, d = idx[(i, j)], idx[(i + 1, j)], idx[(i, j + 1)], idx[(i + 1, j + 1)]
            faces += [(a, b, d), (a, d, c)]
    import tempfile
    from pathlib import Path

    with tempfile.TemporaryDirectory() as tmp:
        path = Path(tmp) / "t.xml"
        path.write_text(_tin_xml(pts, faces))
        surf = surface_reader.read_surface(path)
    index = G.TriangleIndex(surf)
    hz = horizontal.solve(HorizontalAlignment((HLine((10.0, 0.0), (10.0, 100.0)),)))
    s, z = G.sample_alignment(hz, index)
    for i, x in enumerate(xs):
        row = np.flatnonzero(np.isclose(s, x))
        assert row.size == 1
        assert z[row[0]] == pytest.approx(pts[idx[(i, 1)]][2], abs=1e-9)
    # between consecutive breakpoints the ground is a straight line
    mid = (s[:-1] + s[1:]) / 2
    n, e, _ = horizontal.evaluate(hz, mid)
    np.testing.assert_allclose(G.interpolate(index, e, n), (z[:-1] + z[1:]) / 2, atol=1e-9)


@settings(max_examples=25, deadline=None)
@given(st.floats(0.05, 0.95))
def test_ground_linear_between_breakpoints_on_sample(frac):
    surf = surface_reader.read_surface(TERRAIN)
    index = G.TriangleIndex(surf)
    ctx = open_alignment(US_SAMPLE, "Orrin Vale Bypass")
    # the last tangent: straight, so the ground is exactly linear between crossings
    line = ctx.horizontal.elements[-1]
    s, z = G.sample_alignment(ctx.horizontal, index, lo=line.start_station, hi=line.end_station)
    ok = np.isfinite(z[:-1]) & np.isfinite(z[1:])
    i = np.flatnonzero(ok)
    q = s[i] + frac * (s[i + 1] - s[i])
    n, e, _ = horizontal.evaluate(ctx.horizontal, q)
    np.testing.assert_allclose(
        G.interpolate(index, e, n), z[i] + frac * (z[i + 1] - z[i]), atol=1e-9
    )


def test_hole_gives_a_gap(bypass_tin):
    ctx = open_alignment(US_SAMPLE, "Orrin Vale Bypass")
    with_tin, _ = attach_ground(ctx, TERRAIN, None)
    pieces = with_tin.alignment.grounds[0].pieces
    assert len(pieces) == 2  # split by the pond
    gap = (pieces[0].stations[-1], pieces[1].stations[0])
    assert 4600 < gap[0] < gap[1] < 4800
    assert math.isnan(float(with_tin.ground_at([(gap[0] + gap[1]) / 2])[0]))


def test_alignment_leaving_the_surface(tmp_path):
    ctx = open_alignment(METRIC_SAMPLE)
    with_tin, _ = attach_ground(ctx, None, "Survey 2026 west")
    g = with_tin.alignment.grounds[0]
    assert g.pieces[-1].stations[-1] < 1100  # the surface covers the west part only
    assert math.isnan(float(with_tin.ground_at([2000.0])[0]))


@pytest.mark.parametrize(
    ("faces", "points", "pattern"),
    [
        (
            [(1, 2, 9)],
            {1: (0, 0, 1), 2: (0, 10, 1), 3: (10, 0, 1)},
            "names point id 9, which does not exist",
        ),
        ([(1, 2, 3)], {1: (0, 0, 1), 2: (0, 10, 1), 3: (10, 0, 1), 4: (5, 5, 1)}, None),
    ],
)
def test_bad_faces(tmp_path, faces, points, pattern):
    path = tmp_path / "s.xml"
    path.write_text(_tin_xml(points, faces))
    if pattern:
        with pytest.raises(InputError, match=pattern):
            surface_reader.read_surface(path)
    else:
        assert len(surface_reader.read_surface(path).faces) == 1


def test_duplicate_point_ids(tmp_path):
    path = tmp_path / "d.xml"
    path.write_text(
        _tin_xml({1: (0, 0, 1), 2: (0, 10, 1), 3: (10, 0, 1)}, [(1, 2, 3)]).replace(
            '<P id="3">', '<P id="2">'
        )
    )
    with pytest.raises(InputError, match="point id 2 is used twice"):
        surface_reader.read_surface(path)


def test_degenerate_faces_are_dropped_and_counted(tmp_path):
    pts = {1: (0, 0, 1), 2: (0, 10, 1), 3: (10, 0, 1), 4: (0, 20, 1)}
    path = tmp_path / "g.xml"
    path.write_text(_tin_xml(pts, [(1, 2, 3), (1, 2, 4)]))  # 1, 2, 4 are collinear
    surf = surface_reader.read_surface(path)
    assert len(surf.faces) == 1 and surf.skipped_faces == 1


def test_unknown_and_ambiguous_surface_names(tmp_path):
    with pytest.raises(InputError, match="no surface named 'Nope'; surfaces: Existing ground 2026"):
        surface_reader.read_surface(TERRAIN, "Nope")
    two = _tin_xml({1: (0, 0, 1), 2: (0, 10, 1), 3: (10, 0, 1)}, [(1, 2, 3)], "A")
    two = two.replace(
        "</Surfaces>",
        '<Surface name="B"><Definition><Pnts/><Faces/></Definition></Surface></Surfaces>',
    )
    path = tmp_path / "two.xml"
    path.write_text(two)
    with pytest.raises(InputError, match="2 surfaces; choose one: A, B"):
        surface_reader.read_surface(path)


def test_units_must_match(tmp_path, capsys):
    path = tmp_path / "m.xml"
    path.write_text(_tin_xml({1: (0, 0, 1), 2: (0, 10, 1), 3: (10, 0, 1)}, [(1, 2, 3)]))
    code = main(
        [
            "table",
            str(US_SAMPLE),
            "--alignment",
            "Kettle Lane",
            "--ground",
            str(path),
            "--interval",
            "100",
        ]
    )
    assert code == 2
    assert (
        "surface units (meter) differ from the alignment's (USSurveyFoot)"
        in capsys.readouterr().err
    )


def test_table_gains_ground_and_cut_fill(capsys):
    code = main(
        [
            "table",
            str(US_SAMPLE),
            "--alignment",
            "Orrin Vale Bypass",
            "--ground",
            str(TERRAIN),
            "--interval",
            "100",
        ]
    )
    rows = list(csv.DictReader(io.StringIO(capsys.readouterr().out)))
    assert code == 0
    assert list(rows[0])[-4:] == ["ground", "cut_fill", "super_left", "super_right"]
    for r in rows:
        if r["ground"]:
            # each column is exported to 4 decimals (README): within two roundings
            assert float(r["cut_fill"]) == pytest.approx(
                float(r["elevation"]) - float(r["ground"]), abs=1.5e-4
            )
    assert any(r["ground"] == "" for r in rows)  # the pond


def test_dxf_draws_the_tin_ground(tmp_path):
    import ezdxf

    out = tmp_path / "p.dxf"
    assert (
        main(
            [
                "dxf",
                str(US_SAMPLE),
                "--alignment",
                "Orrin Vale Bypass",
                "--ground",
                str(TERRAIN),
                "-o",
                str(out),
            ]
        )
        == 0
    )
    doc = ezdxf.readfile(out)
    lines = doc.modelspace().query('LWPOLYLINE[layer=="PROFILE-GROUND"]')
    assert len(lines) == 2  # two pieces around the pond
    ctx = open_alignment(US_SAMPLE, "Orrin Vale Bypass")
    with_tin, _ = attach_ground(ctx, TERRAIN, None)
    from gradeline.io.dxf_read import read_mapping

    m = read_mapping(doc)
    for lw in lines:
        pts = np.array([(x, y) for x, y, *_ in lw.get_points()])
        z = pts[:, 1] / float(m["exaggeration"]) + float(m["datum"])
        np.testing.assert_allclose(z, with_tin.ground_at(pts[:, 0]), atol=1e-6)


def test_check_compares_ground_profile_with_tin(capsys):
    code = main(
        [
            "check",
            str(US_SAMPLE),
            "--alignment",
            "Orrin Vale Bypass",
            "--ground",
            str(TERRAIN),
            "--json",
        ]
    )
    import json

    data = json.loads(capsys.readouterr().out)
    ground = [f for f in data["findings"] if f["element"] == "ProfSurf"]
    assert code == 1 and ground and ground[0]["verdict"] == "over"  # invented data differ


def test_degenerate_faces_warn_on_the_command_line(tmp_path, capsys):
    text = TERRAIN.read_text()
    # turn the first face into a sliver with a repeated point
    first = text.index("<F>") + 3
    end = text.index("</F>", first)
    a = text[first:end].split()[0]
    bad = text[:first] + f"{a} {a} {a}" + text[end:]
    path = tmp_path / "t.xml"
    path.write_text(bad)
    code = main(
        [
            "table",
            str(US_SAMPLE),
            "--alignment",
            "Orrin Vale Bypass",
            "--ground",
            str(path),
            "--at",
            "20+00",
        ]
    )
    err = capsys.readouterr().err
    assert code == 0
    assert "gradeline: warning: " in err and "1 zero-area faces of surface" in err
