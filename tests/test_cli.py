"""The command line: outputs, exit codes and one-line errors."""

from __future__ import annotations

import csv
import io
import json
import os
import subprocess
import sys

import pytest

from gradeline.cli import main
from tests.conftest import GRADELINE, METRIC_SAMPLE, ROOT, US_SAMPLE

BYPASS = ["--alignment", "Orrin Vale Bypass"]


def run(capsys, *argv):
    code = main([str(a) for a in argv])
    out, err = capsys.readouterr()
    return code, out, err


def test_table_csv(capsys):
    code, out, err = run(capsys, "table", US_SAMPLE, *BYPASS, "--interval", "100")
    assert code == 0 and err == ""
    rows = list(csv.DictReader(io.StringIO(out)))
    assert list(rows[0]) == [
        "station",
        "station_label",
        "elevation",
        "grade",
        "tangent_elevation",
        "offset",
        "northing",
        "easting",
        "direction",
        "point",
        "super_left",
        "super_right",
    ]
    # the sample states its superelevation: at the SC of the right-hand curve 1 the
    # full 7.0 % is reached, the outside (left) lane up, the inside lane down; on the
    # tangent before it both lanes sit at the 2 % normal crown (common practice)
    sc = next(r for r in rows if "FS" in r["point"].split(";"))
    assert sc["station_label"] == "21+50.00"
    assert (float(sc["super_left"]), float(sc["super_right"])) == (7.0, -7.0)
    assert (float(rows[0]["super_left"]), float(rows[0]["super_right"])) == (-2.0, -2.0)
    bvc = next(r for r in rows if r["point"] == "BVC")
    assert bvc["station_label"] == "14+50.00"
    # 512.40 + 2.366667 % * 450 ft = 523.05 (PVIs of the sample)
    assert float(bvc["elevation"]) == pytest.approx(523.05, abs=1e-6)


def test_table_json_keys_equal_csv_header(capsys):
    code, out, _ = run(
        capsys, "table", US_SAMPLE, *BYPASS, "--at", "15+00,34+50", "--format", "json"
    )
    data = json.loads(out)
    assert code == 0
    assert data["columns"] == list(data["rows"][0])
    assert [r["station_label"] for r in data["rows"]] == ["15+00.00", "34+50.00"]
    assert data["rows"][1]["point"] == "PVI"


def test_curves_to_file(tmp_path, capsys):
    dest = tmp_path / "curves.csv"
    code, out, _ = run(capsys, "curves", METRIC_SAMPLE, "-o", dest)
    assert code == 0 and out == ""
    rows = [r for r in csv.DictReader(dest.open()) if r["kind"] == "vertical"]
    assert [r["type"] for r in rows] == ["crest", "sag", "crest"]
    assert rows[0]["radius"] == "6000.0"
    assert not list(tmp_path.glob(".gradeline-*"))


def test_info_json(capsys):
    code, out, _ = run(capsys, "info", US_SAMPLE, "--json")
    info = json.loads(out)
    assert code == 0
    assert [a["name"] for a in info["alignments"]] == ["Orrin Vale Bypass", "Kettle Lane"]
    assert info["alignments"][0]["profiles"][0]["curves"] == 5


def test_info_text(capsys):
    code, out, _ = run(capsys, "info", METRIC_SAMPLE)
    assert code == 0
    assert "0+000.000 to 2+450.000" in out and "1 station equation" in out


def test_refuses_to_overwrite_input(tmp_path, capsys):
    src = tmp_path / "in.xml"
    src.write_bytes(METRIC_SAMPLE.read_bytes())
    code, _, err = run(capsys, "curves", src, "-o", src)
    assert code == 2 and "never overwritten" in err
    assert src.read_bytes() == METRIC_SAMPLE.read_bytes()


BAD_CASES = {
    "truncated": (b'<LandXML><Alignments><Alignment name="x"', r":1: XML: not well-formed"),
    "not-xml": (b"\x89PNG\r\n\x1a\n\x00\x00garbage", r": XML: not well-formed"),
    "no-alignments": (
        b'<LandXML><Units><Metric linearUnit="meter"/></Units></LandXML>',
        r": Alignments: the file has no alignments",
    ),
    "pvis-decrease": (
        b'<LandXML><Units><Metric linearUnit="meter"/></Units><Alignments>\n'
        b'<Alignment name="a"><Profile><ProfAlign>\n<PVI>0 1</PVI>\n<PVI>50 2</PVI>\n'
        b"<PVI>40 2</PVI>\n</ProfAlign></Profile></Alignment></Alignments></LandXML>",
        r":5: PVI: PVI stations must increase: 40 after 50",
    ),
    "overlap": (
        b'<LandXML><Units><Metric linearUnit="meter"/></Units><Alignments>\n'
        b'<Alignment name="a"><Profile><ProfAlign>\n<PVI>0 1</PVI>\n'
        b'<ParaCurve length="60">50 2</ParaCurve>\n<ParaCurve length="60">90 1</ParaCurve>\n'
        b"<PVI>200 2</PVI>\n</ProfAlign></Profile></Alignment></Alignments></LandXML>",
        r":5: ParaCurve: vertical curves overlap: BVC 0\+060.000 is before the previous "
        r"EVC 0\+080.000",
    ),
    "past-end": (
        b'<LandXML><Units><Metric linearUnit="meter"/></Units><Alignments>\n'
        b'<Alignment name="a"><Profile><ProfAlign>\n<PVI>0 1</PVI>\n'
        b'<ParaCurve length="80">50 2</ParaCurve>\n'
        b"<PVI>80 2</PVI>\n</ProfAlign></Profile></Alignment></Alignments></LandXML>",
        r":4: ParaCurve: vertical curve reaches past the end of the profile",
    ),
    "zero-length": (
        b'<LandXML><Units><Metric linearUnit="meter"/></Units><Alignments>\n'
        b'<Alignment name="a"><Profile><ProfAlign>\n<PVI>0 1</PVI>\n'
        b'<ParaCurve length="0">50 2</ParaCurve>\n'
        b"<PVI>80 2</PVI>\n</ProfAlign></Profile></Alignment></Alignments></LandXML>",
        r":4: ParaCurve: curve length must be positive",
    ),
    "non-numeric": (
        b'<LandXML><Units><Metric linearUnit="meter"/></Units><Alignments>\n'
        b'<Alignment name="a"><Profile><ProfAlign>\n<PVI>0 1</PVI>\n'
        b'<ParaCurve length="ten">50 2</ParaCurve>\n'
        b"<PVI>80 2</PVI>\n</ProfAlign></Profile></Alignment></Alignments></LandXML>",
        r":4: ParaCurve: length 'ten' is not a number",
    ),
    "non-finite": (
        b'<LandXML><Units><Metric linearUnit="meter"/></Units><Alignments>\n'
        b'<Alignment name="a"><Profile><ProfAlign>\n<PVI>0 1</PVI>\n'
        b"<PVI>NaN 2</PVI>\n</ProfAlign></Profile></Alignment></Alignments></LandXML>",
        r":4: PVI: station/elevation value must be a finite number",
    ),
    "curve-on-last": (
        b'<LandXML><Units><Metric linearUnit="meter"/></Units><Alignments>\n'
        b'<Alignment name="a"><Profile><ProfAlign>\n<PVI>0 1</PVI>\n'
        b'<ParaCurve length="10">80 2</ParaCurve>\n</ProfAlign></Profile></Alignment>'
        b"</Alignments></LandXML>",
        r":4: ParaCurve: the last entry of a profile is its end",
    ),
    "empty": (b"", r": LandXML: the file is empty"),
}


@pytest.mark.parametrize("name", sorted(BAD_CASES), ids=sorted(BAD_CASES))
def test_bad_input_exit_2_one_line(tmp_path, capsys, name):
    data, pattern = BAD_CASES[name]
    path = tmp_path / f"{name}.xml"
    path.write_bytes(data)
    code, out, err = run(capsys, "table", path, "--interval", "10")
    assert code == 2
    assert out == ""
    assert err.count("\n") == 1 and "Traceback" not in err
    assert err.startswith(f"gradeline: {path}")
    import re

    assert re.search(pattern, err), err


def test_alignment_not_found_exit_2(capsys):
    code, _, err = run(capsys, "curves", US_SAMPLE, "--alignment", "Nowhere Road")
    assert code == 2
    assert "no alignment named 'Nowhere Road'; alignments: Orrin Vale Bypass, Kettle Lane" in err


def test_station_outside_profile_exit_2(capsys):
    code, _, err = run(capsys, "table", US_SAMPLE, *BYPASS, "--at", "99+00")
    assert code == 2
    assert err == "gradeline: station 99+00 is not on the alignment (10+00.00 to 62+00.00)\n"


def test_interval_and_at_are_exclusive(capsys):
    with pytest.raises(SystemExit) as info:
        main(["table", str(US_SAMPLE), "--interval", "50", "--at", "12+00"])
    assert info.value.code == 2


def test_bad_interval(capsys):
    # refused by the parser: one line naming the option and the range
    with pytest.raises(SystemExit) as exc:
        run(capsys, "table", US_SAMPLE, *BYPASS, "--interval", "-5")
    err = capsys.readouterr().err
    assert exc.value.code == 2
    assert "--interval: -5 is out of range: give more than 0" in err


@pytest.mark.cli
@pytest.mark.parametrize(
    "launcher", [[GRADELINE], [sys.executable, "-m", "gradeline"]], ids=["console", "module"]
)
def test_installed_command(launcher):
    env = dict(os.environ, PYTHONHASHSEED="7")
    done = subprocess.run(
        [*launcher, "curves", str(METRIC_SAMPLE), "--format", "json"],
        capture_output=True,
        text=True,
        cwd=ROOT,
        env=env,
        timeout=60,
    )
    assert done.returncode == 0, done.stderr
    assert len(json.loads(done.stdout)["rows"]) == 5  # 2 horizontal + 3 vertical curves
    version = subprocess.run([*launcher, "--version"], capture_output=True, text=True, timeout=60)
    assert version.stdout.startswith("gradeline ")


@pytest.mark.cli
def test_outputs_are_deterministic_across_processes(tmp_path):
    outs = []
    for seed in ("1", "99"):
        dest = tmp_path / f"t{seed}.csv"
        env = dict(os.environ, PYTHONHASHSEED=seed)
        subprocess.run(
            [GRADELINE, "table", str(US_SAMPLE), *BYPASS, "--interval", "25", "-o", str(dest)],
            check=True,
            env=env,
            timeout=60,
        )
        outs.append(dest.read_bytes())
    assert outs[0] == outs[1]


def test_table_has_horizontal_columns_and_key_points(capsys):
    code, out, err = run(capsys, "table", US_SAMPLE, *BYPASS, "--interval", "100")
    assert code == 0 and err == ""
    rows = list(csv.DictReader(io.StringIO(out)))
    tags = ";".join(r["point"] for r in rows)
    for tag in ("POB", "TS", "SC", "CS", "ST", "PC", "PT", "POE"):
        assert tag in tags
    first = rows[0]
    # POB of the sample: northing 10250, easting 20400, azimuth 68 deg, written
    # counter-clockwise from north: 360 - 68 = 292 (samples/generate.py)
    assert float(first["northing"]) == pytest.approx(10250.0)
    assert float(first["easting"]) == pytest.approx(20400.0)
    assert float(first["direction"]) == pytest.approx(292.0)


def test_curves_has_horizontal_rows(capsys):
    code, out, _ = run(capsys, "curves", METRIC_SAMPLE, "--format", "json")
    rows = json.loads(out)["rows"]
    kinds = [r["kind"] for r in rows]
    assert kinds == ["horizontal", "horizontal", "vertical", "vertical", "vertical"]
    scs = rows[0]
    assert scs["spiral_in"] == 80.0 and scs["spiral_type"] == "clothoid"
    assert scs["delta"] == pytest.approx(40.0, abs=1e-4)  # design deflection of the sample
    assert scs["degree_of_curve"] is None  # metric: no degree of curve


def test_gap_is_a_warning_not_an_error(tmp_path, capsys):
    data = (
        b'<LandXML><Units><Metric linearUnit="meter"/></Units><Alignments>\n'
        b'<Alignment name="a"><CoordGeom>\n<Line><Start>0 0</Start><End>0 100</End></Line>\n'
        b"<Line><Start>0 100.5</Start><End>0 200</End></Line>\n</CoordGeom></Alignment>"
        b"</Alignments></LandXML>"
    )
    path = tmp_path / "gap.xml"
    path.write_bytes(data)
    code, out, err = run(capsys, "table", path, "--interval", "50")
    assert code == 0
    assert f"gradeline: warning: {path}:4: Line: gap of 0.5000 between the end of element 1" in err
    assert out.count("\n") >= 4


def test_library_errors_name_no_option_but_the_command_line_does(capsys):
    """Library messages say what to choose; only the CLI names the option (issue 13)."""
    from gradeline import InputError, read

    doc = read(US_SAMPLE)
    with pytest.raises(InputError) as info:
        doc.alignment(None)
    assert "--" not in str(info.value) and info.value.choice == "alignment"
    assert main(["table", str(US_SAMPLE), "--interval", "100"]) == 2
    err = capsys.readouterr().err
    assert err.count("\n") == 1
    assert "choose one: Orrin Vale Bypass, Kettle Lane (give --alignment NAME)" in err
