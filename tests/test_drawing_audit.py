"""Drawing audit: plan linework and the labels of drawings made by other programs.

The drawings here are built with ezdxf directly, in styles of their own (layer and
text style names, TEXT, MTEXT with formatting codes, rotated text, blocks with
attributes, nested block references, a dimension with a text override, polylines
with bulges), from the values the LandXML files themselves state: the real-world
road ``im_m3_rs_cl.xml`` (buildingSMART Finland, CC BY 4.0; see
``../shared/realworld/SOURCES.md``) -- its Line and Curve Start/End/Center points,
radii, lengths and directions (grads), its PVIs and CircCurve radii and lengths --
read with lxml, not with gradeline. Errors are injected into copies; each must be
found and named, and the clean drawings must pass.
"""

from __future__ import annotations

import json
import math
from pathlib import Path

import ezdxf
import numpy as np
import pytest
from ezdxf.enums import TextEntityAlignment
from lxml import etree

from gradeline.analysis.label_audit import read_statements
from gradeline.cli import main
from gradeline.geometry import vertical
from gradeline.io import landxml
from tests.conftest import US_SAMPLE

REALWORLD = Path(__file__).resolve().parents[2] / "shared" / "realworld"
ROAD = REALWORLD / "im_m3_rs_cl.xml"
needs_road = pytest.mark.skipif(not ROAD.is_file(), reason=f"{ROAD} is absent")

GRAD = math.pi / 200.0


# --------------------------------------------------------------------------- the file's values
def _file_values(path: Path):
    """Lines, curves and PVIs as the file states them (lxml, namespace-agnostic)."""
    root = etree.parse(str(path)).getroot()

    def local(el):
        return etree.QName(el).localname

    def pt(el):  # LandXML points are "northing easting [z]"
        n, e = (float(v) for v in el.text.split()[:2])
        return e, n

    elements = []
    for el in root.iter():
        if not isinstance(el.tag, str) or local(el) not in ("Line", "Curve"):
            continue
        kids = {local(k): k for k in el if isinstance(k.tag, str)}
        item = {
            "kind": local(el),
            "sta": float(el.get("staStart")),
            "length": float(el.get("length")),
            "start": pt(kids["Start"]),
            "end": pt(kids["End"]),
        }
        if item["kind"] == "Curve":
            item.update(
                center=pt(kids["Center"]),
                radius=float(el.get("radius")),
                rot=el.get("rot"),
                delta_deg=abs(float(el.get("dirEnd")) - float(el.get("dirStart"))) * 0.9,
            )
        elements.append(item)
    pvis = []
    for el in root.iter():
        if isinstance(el.tag, str) and local(el) in ("PVI", "CircCurve"):
            s, z = (float(v) for v in el.text.split()[:2])
            pvis.append(
                {
                    "s": s,
                    "z": z,
                    "length": float(el.get("length", 0) or 0),
                    "radius": float(el.get("radius", 0) or 0),
                }
            )
    return elements, pvis


def _point_at(elements, s: float) -> tuple[float, float, float]:
    """(x, y, heading) at station ``s`` from the file's points alone (lines and arcs)."""
    el = next(e for e in elements if e["sta"] <= s <= e["sta"] + e["length"] + 1e-9)
    d = s - el["sta"]
    (x0, y0), (x1, y1) = el["start"], el["end"]
    if el["kind"] == "Line":
        h = math.atan2(y1 - y0, x1 - x0)
        return x0 + d * math.cos(h), y0 + d * math.sin(h), h
    cx, cy = el["center"]
    sign = 1.0 if el["rot"] == "ccw" else -1.0
    a = math.atan2(y0 - cy, x0 - cx) + sign * d / el["radius"]
    r = el["radius"]
    return cx + r * math.cos(a), cy + r * math.sin(a), a + sign * math.pi / 2


def _pi(el) -> tuple[float, float, float]:
    """PI point and station of a curve: the tangents' intersection (T = R tan(delta / 2))."""
    t = el["radius"] * math.tan(math.radians(el["delta_deg"]) / 2)
    x0, y0 = el["start"]
    cx, cy = el["center"]
    sign = 1.0 if el["rot"] == "ccw" else -1.0
    a0 = math.atan2(y0 - cy, x0 - cx) + sign * math.pi / 2
    return x0 + t * math.cos(a0), y0 + t * math.sin(a0), el["sta"] + t


def _sta(value: float) -> str:  # metric station label (common practice: 1+234.567)
    return f"{int(value // 1000)}+{value % 1000:07.3f}"


# --------------------------------------------------------------------------- drawings
def _plan_drawing(
    path: Path,
    out: Path,
    *,
    shift_line: int | None = None,
    old_radius: int | None = None,
    wrong_arc: int | None = None,
    move=None,
    nested: bool = False,
) -> Path:
    """A plan drawn from the file's points: LINEs and ARCs on layer AXIS-MAIN, station
    ticks as rotated TEXT, curve notes as formatted MTEXT, PI tags as blocks with
    attributes, a dimension with a text override."""
    elements, _ = _file_values(path)
    doc = ezdxf.new("R2010")
    doc.header["$INSUNITS"] = 6
    doc.styles.add("NOTES-NARROW", font="DejaVuSans.ttf")
    msp = doc.modelspace()
    if nested:  # the centreline inside a block inside a block, each shifted back
        ox, oy = elements[0]["start"]
        inner = doc.blocks.new("AXIS-PART")
        outer = doc.blocks.new("AXIS-ALL")
        outer.add_blockref("AXIS-PART", (1000.0, -500.0), dxfattribs={"layer": "0"})
        msp.add_blockref("AXIS-ALL", (ox - 1000.0, oy + 500.0), dxfattribs={"layer": "AXIS-MAIN"})
        target, base = inner, (ox, oy)
    else:
        target, base = msp, (0.0, 0.0)

    def local(p):
        return (p[0] - base[0], p[1] - base[1])

    layer = "0" if nested else "AXIS-MAIN"
    curve_no = 0
    line_no = 0
    for el in elements:
        if el["kind"] == "Line":
            line_no += 1
            a, b = el["start"], el["end"]
            if shift_line == line_no:  # drawn 0.05 m to the left of where it belongs
                h = math.atan2(b[1] - a[1], b[0] - a[0])
                off = (-0.05 * math.sin(h), 0.05 * math.cos(h))
                a, b = (a[0] + off[0], a[1] + off[1]), (b[0] + off[0], b[1] + off[1])
            target.add_line(local(a), local(b), dxfattribs={"layer": layer})
            continue
        curve_no += 1
        cx, cy = el["center"]
        r = el["radius"]
        (x0, y0), (x1, y1) = el["start"], el["end"]
        a0 = math.degrees(math.atan2(y0 - cy, x0 - cx))
        a1 = math.degrees(math.atan2(y1 - cy, x1 - cx))
        if el["rot"] == "cw":
            a0, a1 = a1, a0
        if wrong_arc == curve_no:  # the same ends, another radius (as after a redesign)
            r2 = r + 5.0
            mx, my = (x0 + x1) / 2, (y0 + y1) / 2
            half = math.hypot(x1 - x0, y1 - y0) / 2
            ux, uy = (
                (cx - mx) / math.hypot(cx - mx, cy - my),
                (cy - my) / math.hypot(cx - mx, cy - my),
            )
            k = math.sqrt(r2**2 - half**2)
            cx, cy, r = mx + k * ux, my + k * uy, r2
            a0 = math.degrees(
                math.atan2(
                    (y1 if el["rot"] == "cw" else y0) - cy, (x1 if el["rot"] == "cw" else x0) - cx
                )
            )
            a1 = math.degrees(
                math.atan2(
                    (y0 if el["rot"] == "cw" else y1) - cy, (x0 if el["rot"] == "cw" else x1) - cx
                )
            )
        target.add_arc(local((cx, cy)), r, a0, a1, dxfattribs={"layer": layer})
    # station ticks every 100 m, rotated along the road, 3 m to the left
    end = elements[-1]["sta"] + elements[-1]["length"]
    for s in np.arange(0.0, end, 100.0):
        x, y, h = _point_at(elements, float(s))
        txt = msp.add_text(
            _sta(float(s))[:5],
            height=2.5,
            rotation=math.degrees(h),
            dxfattribs={"layer": "TICK-TEXT", "style": "NOTES-NARROW"},
        )
        txt.set_placement(
            (x - 3.0 * math.sin(h), y + 3.0 * math.cos(h)), align=TextEntityAlignment.BOTTOM_CENTER
        )
    # curve notes: MTEXT with formatting codes, 15 m outside each PI
    tag = doc.blocks.new("PI-TAG")
    tag.add_circle((0, 0), 1.0)
    tag.add_attdef("PISTA", (2.0, 0.5), dxfattribs={"height": 2.0})
    curve_no = 0
    for el in elements:
        if el["kind"] != "Curve":
            continue
        curve_no += 1
        px, py, ps = _pi(el)
        cx, cy = el["center"]
        d = math.hypot(px - cx, py - cy)
        nx, ny = px + 15 * (px - cx) / d, py + 15 * (py - cy) / d
        radius = el["radius"] - 10 if old_radius == curve_no else el["radius"]
        side = "RT" if el["rot"] == "cw" else "LT"
        deg = el["delta_deg"]
        dd, rest = int(deg), (deg - int(deg)) * 60
        mm, ss = int(rest), (rest - int(rest)) * 60
        msp.add_mtext(
            rf"{{\fDejaVu Sans|b1|i0;CURVE {curve_no}}}\P{{\H0.8x;R={radius:.3f}}}\P"
            rf"DELTA = {dd}%%d{mm:02d}'{ss:04.1f}" + '"' + rf" {side}\PL = {el['length']:.3f} m",
            dxfattribs={"insert": (nx, ny), "char_height": 2.0, "layer": "CURVE-NOTES"},
        )
        ref = msp.add_blockref("PI-TAG", (px, py), dxfattribs={"layer": "PI-MARKS"})
        ref.add_attrib(
            "PISTA", f"PI STA {_sta(ps)}", (px + 2.0, py + 0.5), dxfattribs={"height": 2.0}
        )
    # a dimension whose text is overridden with the first curve's radius
    first = next(e for e in elements if e["kind"] == "Curve")
    fx, fy, _ = _pi(first)
    dim = msp.add_linear_dim(
        base=(fx + 30, fy + 30),
        p1=(fx + 20, fy + 20),
        p2=(fx + 40, fy + 20),
        text=f"R {first['radius']:.0f}",
        dxfattribs={"layer": "DIMS"},
    )
    dim.render()
    if move is not None:  # the whole drawing turned and shifted (a local grid)
        m = ezdxf.math.Matrix44.chain(
            ezdxf.math.Matrix44.z_rotate(math.radians(move[2])),
            ezdxf.math.Matrix44.translate(move[0], move[1], 0),
        )
        for e in msp:
            e.transform(m)
    doc.saveas(out)
    return out


def _profile_drawing(
    path: Path,
    out: Path,
    *,
    stale_el: int | None = None,
    wrong_k: int | None = None,
    stale_grade: int | None = None,
) -> Path:
    """A profile at x = station, y = (z - 10) x 10: the grade (LWPOLYLINE on FG-LINE) and
    labels in several styles, with values from the file's PVIs."""
    _, pvis = _file_values(path)
    ctx_geom = vertical.solve(landxml.read(str(path)).alignment().profile())
    doc = ezdxf.new("R2010")
    doc.header["$INSUNITS"] = 6
    msp = doc.modelspace()
    s = np.append(np.arange(ctx_geom.start, ctx_geom.end, 0.5), ctx_geom.end)
    z = vertical.elevation(ctx_geom, s)
    msp.add_lwpolyline(
        np.column_stack([s, (z - 10.0) * 10.0]).tolist(), dxfattribs={"layer": "FG-LINE"}
    )
    for i, p in enumerate(pvis[1:-1], start=1):
        if not p["length"]:
            continue  # a PVI without a curve: only the grades tell of it
        zl = p["z"] + (0.20 if stale_el == i else 0.0)
        y = (p["z"] - 10.0) * 10.0 + 20.0
        g_in = (p["z"] - pvis[i - 1]["z"]) / (p["s"] - pvis[i - 1]["s"]) * 100
        g_out = (pvis[i + 1]["z"] - p["z"]) / (pvis[i + 1]["s"] - p["s"]) * 100
        length = p["length"] - (10.0 if wrong_k == i else 0.0)
        k = length / abs(g_out - g_in)  # K = L / A (AASHTO 2018, 3.4.6)
        style = i % 3
        if style == 0:  # stacked TEXT lines, vertical
            for j, line in enumerate(
                [
                    f"PVI STA {_sta(p['s'])}",
                    f"EL. {zl:.3f}",
                    f"R = {abs(p['radius']):.0f}  K = {k:.1f}",
                ]
            ):
                t = msp.add_text(line, height=2.0, rotation=90.0, dxfattribs={"layer": "VC-DATA"})
                t.set_placement((p["s"] - 2.0 + 3.0 * j, y), align=TextEntityAlignment.LEFT)
        elif style == 1:  # one MTEXT with formatting
            msp.add_mtext(
                rf"{{\fDejaVu Sans|b1;VPI}} {_sta(p['s'])}\PELEV = {zl:.3f}\PL = {length:.3f}"
                rf"\PK = {k:.1f}",
                dxfattribs={
                    "insert": (p["s"] + 2.0, y + 12.0),
                    "char_height": 2.0,
                    "layer": "VC-DATA",
                },
            )
        else:  # station and elevation on one line, in a block attribute
            blk_name = f"PVI-LABEL-{i}"
            blk = doc.blocks.new(blk_name)
            blk.add_attdef("LBL", (0, 0), dxfattribs={"height": 2.0})
            ref = msp.add_blockref(blk_name, (p["s"] + 2.0, y), dxfattribs={"layer": "VC-DATA"})
            ref.add_attrib(
                "LBL", f"{_sta(p['s'])} EL {zl:.3f}", (p["s"] + 2.0, y), dxfattribs={"height": 2.0}
            )
    for i in range(len(pvis) - 1):  # grade labels above the middle of each tangent
        a, b = pvis[i], pvis[i + 1]
        g = (b["z"] - a["z"]) / (b["s"] - a["s"]) * 100 + (0.5 if stale_grade == i else 0.0)
        mid = (a["s"] + b["s"]) / 2
        zm = float(vertical.elevation(ctx_geom, np.array([mid]))[0])
        msp.add_text(
            f"{g:+.3f}%",
            height=2.0,
            dxfattribs={"layer": "GRADES", "insert": (mid, (zm - 10) * 10 + 8)},
        )
    doc.saveas(out)
    return out


def _audit(args: list[str], capsys) -> tuple[int, dict]:
    code = main(["check", *args, "--json"])
    return code, json.loads(capsys.readouterr().out)


def _profile_args(dxf: Path) -> list[str]:
    """The check of a profile drawn as :func:`_profile_drawing` draws it."""
    return [
        str(ROAD),
        "--dxf",
        str(dxf),
        "--layer",
        "FG-LINE",
        "--exaggeration",
        "10",
        "--datum",
        "10",
    ]


def _labels(report: dict, verdict: str) -> list[dict]:
    return [c for d in report["drawings"] for c in d["labels"] if c["verdict"] == verdict]


# --------------------------------------------------------------------------- label forms
@pytest.mark.parametrize(
    ("text", "expected"),
    [
        ("STA 12+34.56", [("station", None, 1234.56)]),
        ("EL. 852.70", [("elevation", None, 852.70)]),
        ("ELEV = 852.70", [("elevation", None, 852.70)]),
        ("12+34.56 EL 852.70", [("station", None, 1234.56), ("elevation", None, 852.70)]),
        ("R=1800'", [("R", None, 1800.0)]),
        ("Δ = 28°00'00\"", [("delta", None, 28.0)]),
        ("-1.850%", [("grade", None, -1.85)]),
        ("PVI STA 12+34.56", [("station", "PVI", 1234.56)]),
        ("VPI 0+077.652", [("station", "PVI", 77.652)]),
        ("PVC 10+00", [("station", "BVC", 1000.0)]),
        ("L = 400.00  K = 136.5", [("L", None, 400.0), ("K", None, 136.5)]),
        ("400' VC", [("L", None, 400.0)]),
        ("DELTA = 28%%d30'00.0\" RT", [("delta", None, 28.5)]),
        ("Δ = 28-30-00 LT", [("delta", None, 28.5)]),
        ("T = 472.95 ft", [("T", None, 472.95)]),
        ("E = 72.79 ft", [("E", None, 72.79)]),
        ("STA EQ 1+200.000 BK = 1+250.000 AH", [("equation", None, 1200.0)]),
        ("A = +5.029%  E = 5.03", [("A", None, 5.029), ("E", None, 5.03)]),
        ("PC 36+86.43", [("station", "PC", 3686.43)]),
        ("G = +2.0 %", [("grade", None, 2.0)]),
        ("GRADE 1.5%", [("grade", None, 1.5)]),
        ("ELEVATION: 852.70'", [("elevation", None, 852.70)]),
        ("RADIUS = 1800.00 ft", [("R", None, 1800.0)]),
        ("12+00 BACK = 12+50 AHEAD", [("equation", None, 1200.0)]),
        ("STA. 12+34.56", [("station", None, 1234.56)]),
        ("LVC = 400", [("L", None, 400.0)]),
        (
            "HIGH POINT 17+73.02 EL 526.87",
            [("station", "HIGH PT", 1773.02), ("elevation", None, 526.87)],
        ),
        ("BVCE 14+50.00", [("station", "BVC", 1450.0)]),
        ("D = 3°49'11.0\"", [("D", None, 3 + 49 / 60 + 11 / 3600)]),
        ("CURVE 3", []),
        ("C3", []),
        ("SHEET 2 OF 9", []),
    ],
)
def test_label_forms(text, expected):
    # forms from the issue and common practice; values as printed
    got, rest = read_statements(text)
    assert [(s.quantity, s.tag, pytest.approx(s.value)) for s in got] == expected
    assert not any(ch.isdigit() for ch in rest), rest


def test_formatting_codes_and_units_are_read():
    got, _ = read_statements("R = 1200.00 ft")
    assert (got[0].quantity, got[0].value, got[0].decimals) == ("R", 1200.0, 2)
    st = read_statements("Δs = 5°58'05.9\" / 5°58'05.9\"")[0][0]
    assert st.quantity == "delta_s" and st.second == pytest.approx(st.value)


# --------------------------------------------------------------------------- plan
@needs_road
def test_clean_plan_drawing_passes(tmp_path, capsys):
    dxf = _plan_drawing(ROAD, tmp_path / "plan.dxf")
    code, rep = _audit([str(ROAD), "--dxf", str(dxf), "--plan-layer", "AXIS-MAIN"], capsys)
    d = rep["drawings"][0]
    assert d["kind"] == "plan"
    assert code == 0, rep["summary"]
    assert d["linework"]["max_deviation"] < 1e-4  # lines and arcs drawn from the file's points
    assert not d["linework"]["not_covered"]
    ok = [c for c in d["labels"] if c["verdict"] == "ok"]
    # 7 curves x (R, delta, L, PI station) + ticks + the dimension override
    assert sum(c["quantity"] == "radius R" for c in ok) == 8
    assert sum(c["quantity"] == "PI station" for c in ok) == 7
    assert sum(c["quantity"] == "station tick label" for c in ok) == 13
    assert not _labels(rep, "over")


@needs_road
def test_plan_layer_found_without_naming_it(tmp_path, capsys):
    dxf = _plan_drawing(ROAD, tmp_path / "plan.dxf")
    code, rep = _audit([str(ROAD), "--dxf", str(dxf)], capsys)
    assert rep["drawings"][0]["layer"] == "AXIS-MAIN"
    assert code == 0


@needs_road
def test_shifted_stretch_of_centreline_is_found(tmp_path, capsys):
    elements, _ = _file_values(ROAD)
    line3 = [e for e in elements if e["kind"] == "Line"][2]
    dxf = _plan_drawing(ROAD, tmp_path / "plan.dxf", shift_line=3)
    code, rep = _audit([str(ROAD), "--dxf", str(dxf)], capsys)
    lw = rep["drawings"][0]["linework"]
    assert code == 1
    assert len(lw["over_tolerance"]) == 1
    r = lw["over_tolerance"][0]
    # the stretch is the third Line's station range; 0.05 m to the left is -0.05
    assert r["start"] == pytest.approx(line3["sta"], abs=0.5)
    assert r["end"] == pytest.approx(line3["sta"] + line3["length"], abs=0.5)
    assert r["worst"] == pytest.approx(-0.05, abs=1e-6)


@needs_road
def test_curve_note_with_the_old_radius_is_found(tmp_path, capsys):
    elements, _ = _file_values(ROAD)
    curve2 = [e for e in elements if e["kind"] == "Curve"][1]
    dxf = _plan_drawing(ROAD, tmp_path / "plan.dxf", old_radius=2)
    code, rep = _audit([str(ROAD), "--dxf", str(dxf)], capsys)
    over = _labels(rep, "over")
    assert code == 1
    assert len(over) == 1
    (c,) = over
    assert c["quantity"] == "radius R" and c["feature"] == "curve 2"
    assert c["stated"] == pytest.approx(curve2["radius"] - 10)
    assert c["computed"] == pytest.approx(curve2["radius"])
    assert c["station"] == pytest.approx(_pi(curve2)[2], abs=1e-3)


@needs_road
def test_arc_drawn_with_another_radius_is_named(tmp_path, capsys):
    elements, _ = _file_values(ROAD)
    curve3 = [e for e in elements if e["kind"] == "Curve"][2]
    dxf = _plan_drawing(ROAD, tmp_path / "plan.dxf", wrong_arc=3)
    code, rep = _audit([str(ROAD), "--dxf", str(dxf)], capsys)
    pieces = rep["drawings"][0]["linework"]["pieces"]
    assert code == 1
    assert len(pieces) == 1
    (p,) = pieces
    assert p["finding"] == "radius"
    assert p["drawn_radius"] == pytest.approx(curve3["radius"] + 5, abs=1e-6)
    assert p["computed_radius"] == pytest.approx(curve3["radius"], abs=1e-6)
    assert p["start"] == pytest.approx(curve3["sta"], abs=0.5)


@needs_road
def test_turned_and_shifted_drawing_fitted(tmp_path, capsys):
    move = (-6_782_000.0, -21_530_000.0, 17.5)  # a local grid: shifted and turned 17.5 deg
    dxf = _plan_drawing(ROAD, tmp_path / "plan.dxf", move=move)
    code, rep = _audit(
        [str(ROAD), "--dxf", str(dxf), "--plan-layer", "AXIS-MAIN", "--transform", "fit"], capsys
    )
    t = rep["drawings"][0]["linework"]["transform"]
    assert code == 0, rep["summary"]
    assert t["how"] == "fitted"
    assert t["rotation_degrees"] == pytest.approx(-17.5, abs=1e-7)
    # the inverse of "turn by 17.5 deg about the origin, then shift"
    c, s = math.cos(math.radians(-17.5)), math.sin(math.radians(-17.5))
    # (to a millimetre at 22 million metres from the origin: 5e-11 relative)
    assert t["dx"] == pytest.approx(-(c * move[0] - s * move[1]), abs=2e-3)
    assert t["dy"] == pytest.approx(-(s * move[0] + c * move[1]), abs=2e-3)
    assert not _labels(rep, "over")  # labels are read through the same transform


@needs_road
def test_given_transform_and_nested_blocks(tmp_path, capsys):
    move = (-6_782_000.0, -21_530_000.0, 0.0)
    dxf = _plan_drawing(ROAD, tmp_path / "plan.dxf", move=move, nested=True)
    code, rep = _audit(
        [
            str(ROAD),
            "--dxf",
            str(dxf),
            "--plan-layer",
            "AXIS-MAIN",
            "--transform",
            "6782000,21530000,0",
        ],
        capsys,
    )
    assert code == 0, rep["summary"]
    assert rep["drawings"][0]["linework"]["max_deviation"] < 1e-4


# --------------------------------------------------------------------------- profile
@needs_road
def test_clean_profile_drawing_passes(tmp_path, capsys):
    dxf = _profile_drawing(ROAD, tmp_path / "prof.dxf")
    code, rep = _audit(
        _profile_args(dxf),
        capsys,
    )
    d = rep["drawings"][0]
    assert d["kind"] == "profile"
    assert code == 0, rep["summary"]
    ok = [c for c in d["labels"] if c["verdict"] == "ok"]
    assert sum(c["quantity"] == "elevation" for c in ok) == 9  # every curved PVI
    assert sum(c["quantity"] == "grade" for c in ok) == 12
    assert not _labels(rep, "untied")


@needs_road
@pytest.mark.parametrize("pvi", [3, 4, 5])  # stacked TEXT, MTEXT, a block attribute
def test_stale_elevation_label_is_found(tmp_path, capsys, pvi):
    _, pvis = _file_values(ROAD)
    dxf = _profile_drawing(ROAD, tmp_path / "prof.dxf", stale_el=pvi)
    code, rep = _audit(
        _profile_args(dxf),
        capsys,
    )
    over = _labels(rep, "over")
    assert code == 1
    assert [c["quantity"] for c in over] == ["elevation"]
    assert over[0]["stated"] == pytest.approx(round(pvis[pvi]["z"] + 0.2, 3))
    assert over[0]["computed"] == pytest.approx(pvis[pvi]["z"], abs=1e-6)
    assert over[0]["station"] == pytest.approx(pvis[pvi]["s"], abs=1e-6)


@needs_road
def test_wrong_k_and_stale_grade_are_found(tmp_path, capsys):
    _, pvis = _file_values(ROAD)
    dxf = _profile_drawing(ROAD, tmp_path / "prof.dxf", wrong_k=3, stale_grade=6)
    code, rep = _audit(
        _profile_args(dxf),
        capsys,
    )
    over = {c["quantity"]: c for c in _labels(rep, "over")}
    assert code == 1
    assert set(over) == {"K", "grade"}
    a = (
        abs(
            (pvis[4]["z"] - pvis[3]["z"]) / (pvis[4]["s"] - pvis[3]["s"])
            - (pvis[3]["z"] - pvis[2]["z"]) / (pvis[3]["s"] - pvis[2]["s"])
        )
        * 100
    )
    assert over["K"]["stated"] == pytest.approx(round((pvis[3]["length"] - 10) / a, 1))
    g6 = (pvis[7]["z"] - pvis[6]["z"]) / (pvis[7]["s"] - pvis[6]["s"]) * 100
    assert over["grade"]["computed"] == pytest.approx(g6, abs=1e-6)  # JSON has 6 decimals
    assert over["grade"]["difference"] == pytest.approx(0.5, abs=6e-4)


# --------------------------------------------------------------------------- units, own output
def test_metre_drawing_with_a_feet_file_is_refused(tmp_path, capsys):
    doc = ezdxf.new("R2010")
    doc.header["$INSUNITS"] = 6  # metres
    doc.modelspace().add_line((0, 0), (100, 0), dxfattribs={"layer": "AXIS"})
    out = tmp_path / "m.dxf"
    doc.saveas(out)
    code = main(
        [
            "check",
            str(US_SAMPLE),
            "--alignment",
            "Orrin Vale Bypass",
            "--dxf",
            str(out),
            "--plan-layer",
            "AXIS",
        ]
    )
    err = capsys.readouterr().err.strip().splitlines()
    assert code == 2
    assert len(err) == 1
    assert str(out) in err[0] and "$INSUNITS says metre" in err[0] and "--drawing-units" in err[0]


@pytest.mark.parametrize("curves", ["spline", "polyline"])
def test_our_own_drawings_pass_their_own_audit(tmp_path, capsys, curves):
    prof, plan = tmp_path / "p.dxf", tmp_path / "pl.dxf"
    base = [str(US_SAMPLE), "--alignment", "Orrin Vale Bypass"]
    assert main(["dxf", *base, "-o", str(prof), "--plan", str(plan), "--curves", curves]) == 0
    code, rep = _audit([*base, "--dxf", str(prof), "--dxf", str(plan)], capsys)
    assert code == 0, rep["summary"]
    assert [d["kind"] for d in rep["drawings"]] == ["profile", "plan"]
    for d in rep["drawings"]:
        assert d["labels"] and all(c["verdict"] == "ok" for c in d["labels"])


def test_spiral_drawn_as_an_arc_is_named(tmp_path, capsys):
    # our plan drawing with the first spiral (TS 19+00.00 to SC 21+50.00 in the sample)
    # replaced by one circular arc through its ends
    base = [str(US_SAMPLE), "--alignment", "Orrin Vale Bypass"]
    plan = tmp_path / "pl.dxf"
    assert main(["dxf", *base, "-o", str(tmp_path / "p.dxf"), "--plan", str(plan)]) == 0
    doc = ezdxf.readfile(plan)
    msp = doc.modelspace()
    spiral = next(e for e in msp.query("LWPOLYLINE[layer=='PLAN-ALIGNMENT']") if len(e) > 10)
    pts = [(x, y) for x, y in spiral.get_points("xy")]
    (x0, y0), (x1, y1) = pts[0], pts[-1]
    xm, ym = pts[len(pts) // 2]
    # the circle through both ends and the middle vertex
    d = 2 * (x0 * (ym - y1) + xm * (y1 - y0) + x1 * (y0 - ym))
    ux = (
        (x0**2 + y0**2) * (ym - y1) + (xm**2 + ym**2) * (y1 - y0) + (x1**2 + y1**2) * (y0 - ym)
    ) / d
    uy = (
        (x0**2 + y0**2) * (x1 - xm) + (xm**2 + ym**2) * (x0 - x1) + (x1**2 + y1**2) * (xm - x0)
    ) / d
    r = math.hypot(x0 - ux, y0 - uy)
    a0, a1 = (math.degrees(math.atan2(y - uy, x - ux)) for x, y in ((x0, y0), (x1, y1)))
    # the middle vertex left of the chord: the arc runs clockwise from the first end
    left = (x1 - x0) * (ym - y0) - (y1 - y0) * (xm - x0) > 0
    if left:
        a0, a1 = a1, a0
    msp.delete_entity(spiral)
    msp.add_arc((ux, uy), r, a0, a1, dxfattribs={"layer": "PLAN-ALIGNMENT"})
    doc.saveas(plan)
    code, rep = _audit([*base, "--dxf", str(plan)], capsys)
    pieces = rep["drawings"][0]["linework"]["pieces"]
    assert code == 1
    assert [p["finding"] for p in pieces] == ["spiral drawn as an arc"]
    assert pieces[0]["start"] == pytest.approx(1900.0, abs=1.0)
    assert pieces[0]["end"] == pytest.approx(2150.0, abs=1.0)


def test_unreadable_labels_are_listed(tmp_path, capsys):
    base = [str(US_SAMPLE), "--alignment", "Orrin Vale Bypass"]
    plan = tmp_path / "pl.dxf"
    assert main(["dxf", *base, "-o", str(tmp_path / "p.dxf"), "--plan", str(plan)]) == 0
    doc = ezdxf.readfile(plan)
    doc.modelspace().add_text("BRIDGE 12 OVER CREEK 3B", height=5.0, dxfattribs={"insert": (0, 0)})
    doc.saveas(plan)
    code, rep = _audit([*base, "--dxf", str(plan)], capsys)
    unread = _labels(rep, "unread")
    assert code == 0  # listed, not a failure
    assert [c["text"] for c in unread] == ["BRIDGE 12 OVER CREEK 3B"]


def test_build_checks_its_own_drawings(tmp_path):
    assert main(["build", str(US_SAMPLE), "-o", str(tmp_path), "--jobs", "1"]) == 0
    text = (tmp_path / "orrin-vale-bypass" / "orrin-vale-bypass" / "check.txt").read_text()
    assert "drawing profile.dxf (profile)" in text
    assert "drawing plan.dxf (plan)" in text
    assert "0 OVER" in text and " OVER  " not in text


@pytest.mark.skipif(not REALWORLD.is_dir(), reason=f"{REALWORLD} is absent")
@pytest.mark.parametrize(
    ("name", "alignment"),
    [
        ("im_m3_rs_cl.xml", None),
        ("im_y10_rs_cl.xml", None),
        ("im_y11_rs_cl.xml", None),
        ("lx2gltf_subdivision_v20.xml", "1stave"),
    ],
)
def test_our_drawings_of_the_real_world_files_pass(tmp_path, capsys, name, alignment):
    # other people's files (grads, large coordinates, a plan without profile): every
    # label of our own drawings is read and agrees
    path = str(REALWORLD / name)
    base = [path] + (["--alignment", alignment] if alignment else [])
    prof, plan = tmp_path / "p.dxf", tmp_path / "pl.dxf"
    main(["dxf", *base, "-o", str(prof), "--plan", str(plan)])
    dxfs = [p for p in (prof, plan) if p.exists()]
    capsys.readouterr()
    _, rep = _audit([*base] + [a for p in dxfs for a in ("--dxf", str(p))], capsys)
    assert len(rep["drawings"]) == len(dxfs) >= 1
    for d in rep["drawings"]:
        assert d["labels"]
        assert {c["verdict"] for c in d["labels"]} == {"ok"}, d["file"]
        assert not d["linework"]["over_tolerance"] and not d["linework"]["not_covered"]


def test_hostile_texts_are_listed_quickly(tmp_path, capsys):
    # a 100,000-digit text and a text of non-finite height: listed, in bounded time
    base = [str(US_SAMPLE), "--alignment", "Orrin Vale Bypass"]
    plan = tmp_path / "pl.dxf"
    assert main(["dxf", *base, "-o", str(tmp_path / "p.dxf"), "--plan", str(plan)]) == 0
    doc = ezdxf.readfile(plan)
    msp = doc.modelspace()
    msp.add_text("7" * 100_000, height=5.0, dxfattribs={"insert": (0, 0)})
    msp.add_text("EL 999.99", height=float("nan"), dxfattribs={"insert": (10, 10)})
    doc.saveas(plan)
    code, rep = _audit([*base, "--dxf", str(plan)], capsys)
    notes = [c["note"] for c in _labels(rep, "unread") + _labels(rep, "untied")]
    assert "longer than 1000 characters: not read" in notes
    assert code == 0


def test_hostile_text_in_a_profile_is_listed(tmp_path, capsys):
    base = [str(US_SAMPLE), "--alignment", "Orrin Vale Bypass"]
    prof = tmp_path / "p.dxf"
    assert main(["dxf", *base, "-o", str(prof)]) == 0
    doc = ezdxf.readfile(prof)
    doc.modelspace().add_text("1." * 50_000, height=5.0, dxfattribs={"insert": (2000, 50)})
    doc.saveas(prof)
    code, rep = _audit([*base, "--dxf", str(prof)], capsys)
    assert [c["note"] for c in _labels(rep, "unread")] == ["longer than 1000 characters: not read"]
    assert code == 0


#: Words and values of labels, the patterns' literal parts among them.
_WORDS = (
    "STA|STA.|STATION|PVI|BVC|EVC|HIGH PT|LOW POINT|PC|PT|TS|SC|CS|ST|PI|EL|EL.|ELEV|"
    "ELEVATION|A|G|GRADE|S|L1|L2|LS|Ts|LC|ES|LVC|VCL|LENGTH|L|VC|V.C.|K|E|R|RADIUS|T|"
    "TANGENT|Δ|DELTA|I|IC|D|DC|CURVE|CRV|C|NO.|SHEET|OF|BK|BACK|AHEAD|AHD|EQ|X|=|:|%|'|FT|"
    "M|US FT|°|LT|RT|/|-|+|12+34.56|1+00|852.70|-1.850|400|3|28°00'00\"|5-58-05.9|12.5°|"
    "0.75|%%d|lt|sta"
).split("|")


def test_skipped_patterns_could_not_have_matched():
    # a pattern is skipped when none of its literal parts is in the text; the reading
    # must be the same as trying every pattern on every text: every pair of words
    # (with and without a space), 4,000 random runs of three to six, the sample's labels
    import random

    from gradeline.analysis import label_audit

    labels = [  # a label of each pattern, as drawings state them (common practice)
        "A = 1.25%",
        "A: 0.75",
        "I = 28°00'00\" RT",
        "Δ = 12.5°",
        "DELTA = 5-58-05.9 LT",
        "IC = 5°58'05.9\"",
        "L1 = 400'",
        "L2 = 300",
        "LS = 250 FT / 250 FT",
        "TS = 1200.00'",
        "LC = 800.00",
        "ES = 20.5",
        "K = 150",
        "E = 1.25'",
        "T = 400.00'",
        "R = 1800'",
        "RADIUS 950 FT",
        "D = 3°49'11.0\"",
        "DC: 2-00-00",
        "EL. 852.70",
        "ELEV: 610.2 M",
        "STA 12+34.56",
        "PVI STA 12+34.56 EL 852.70",
        "-1.850%",
        "G = +2.0 %",
        "400' VC",
        "LVC = 400",
        "12+00 BK = 12+50 AH",
        "STA EQ 10+00 BACK = 10+20 AHEAD",
        "X = STATION",
        "SHEET 2 OF 9",
        "CURVE NO. 3",
        "C3",
        "852.70",
    ]
    texts = labels + [a + sep + b for a in _WORDS for b in _WORDS for sep in ("", " ")]
    rng = random.Random(16)
    texts += [" ".join(rng.choices(_WORDS, k=rng.randint(3, 6))) for _ in range(4000)]
    saved = label_audit._NEEDS
    fast = [read_statements(t) for t in texts]
    try:
        label_audit._NEEDS = {}
        slow = [read_statements(t) for t in texts]
    finally:
        label_audit._NEEDS = saved
    differ = [t for t, a, b in zip(texts, fast, slow, strict=True) if a != b]
    assert differ == []
    assert sum(bool(b[0]) for b in slow) > 1000  # many texts state something
