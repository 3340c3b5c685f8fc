"""Files written by other software (issue 14): every command on every alignment works.

The public files in ``../shared/realworld/`` (attribution in its SOURCES.md) are
read where they are; the tests skip with a reason when the folder is absent.
Values are checked against what the files themselves state (coordinates,
lengths, directions), which gradeline recomputes independently.
"""

from __future__ import annotations

import json
from pathlib import Path

import pytest

from gradeline.cli import main

REALWORLD = Path(__file__).resolve().parents[2] / "shared" / "realworld"
pytestmark = pytest.mark.skipif(not REALWORLD.is_dir(), reason=f"{REALWORLD} is absent")

ALIGNMENT_FILES = [
    "im_m3_rs_cl.xml",
    "im_y10_rs_cl.xml",
    "im_y11_rs_cl.xml",
    "lx2gltf_subdivision_v20.xml",
]


def _alignments(name):
    from gradeline import read

    return read(REALWORLD / name).names


CASES = [(f, a) for f in ALIGNMENT_FILES if REALWORLD.is_dir() for a in _alignments(f)]


@pytest.mark.parametrize(("name", "alignment"), CASES, ids=[f"{f}:{a}" for f, a in CASES])
def test_every_command_on_every_alignment(tmp_path, capsys, name, alignment):
    path = str(REALWORLD / name)
    al = ["--alignment", alignment]
    runs = [
        (["table", path, *al, "--interval", "20", "-o", str(tmp_path / "t.csv")], (0,)),
        (["curves", path, *al, "-o", str(tmp_path / "c.csv")], (0,)),
        (
            ["dxf", path, *al, "-o", str(tmp_path / "p.dxf"), "--plan", str(tmp_path / "q.dxf")],
            (0,),
        ),
        (["sheets", path, *al, "-o", str(tmp_path / "s.pdf"), "--size", "ansi-b"], (0,)),
        (["review", path, *al, "--speed", "40", "-o", str(tmp_path / "r.txt")], (0, 1)),
        (["check", path, *al, "-o", str(tmp_path / "k.txt")], (0, 1)),
    ]
    for argv, codes in runs:
        code = main(argv)
        err = capsys.readouterr().err
        assert code in codes, (argv[0], err)
        assert "Traceback" not in err and "RuntimeWarning" not in err
    assert (tmp_path / "s.pdf").read_bytes().startswith(b"%PDF")
    assert (tmp_path / "q.dxf").stat().st_size > 0  # every file here has a plan


def test_stated_values_agree_with_the_computed_geometry(capsys):
    """Every stated length, direction, staStart and point of the InfraModel files is
    reproduced within 0.01 m and 2 seconds (the files' own values are the reference).
    The one finding over tolerance is real: the Y11 ramp's profile starts 18 mm after
    its plan (SOURCES.md says so)."""
    over = {}
    for name in ("im_m3_rs_cl.xml", "im_y10_rs_cl.xml", "im_y11_rs_cl.xml"):
        assert main(["check", str(REALWORLD / name), "--json"]) in (0, 1)
        data = json.loads(capsys.readouterr().out)
        rows = data["findings"]
        assert sum(f["verdict"] == "ok" for f in rows) >= 20
        over[name] = [f["quantity"] for f in rows if f["verdict"] == "over"]
    assert over == {
        "im_m3_rs_cl.xml": [],
        "im_y10_rs_cl.xml": [],
        "im_y11_rs_cl.xml": ["profile start against plan start (POB)"],
    }


def test_profile_that_stops_short_leaves_blank_rows_not_a_refusal(capsys):
    """Y11: profile 0+000.018 to 0+048.601, plan 0+000.000 to 0+048.602 (issue 14 item 3)."""
    path = str(REALWORLD / "im_y11_rs_cl.xml")
    assert main(["table", path, "--interval", "10"]) == 0
    out, err = capsys.readouterr()
    lines = out.splitlines()
    assert lines[1].startswith("0.0,0+000.000,,") and lines[1].endswith(",POB")
    assert lines[2].endswith(",START")
    # the plan's end, 48.601865 m in the file, exported to 4 decimals (README)
    assert lines[-1].startswith("48.6019,0+048.602,,") and lines[-1].endswith(",POE")
    assert err.count("warning") == 0
    assert main(["table", path, "--at", "0+000.000"]) == 0
    out, err = capsys.readouterr()
    assert "lies off the profile (0+000.018 to 0+048.601)" in err


def test_ends_within_rounding_are_one_end(capsys):
    """M3: the profile ends 0.07 mm before the plan: one END;POE row, and the end info
    prints is accepted by --at."""
    path = str(REALWORLD / "im_m3_rs_cl.xml")
    assert main(["info", path]) == 0
    assert "to 1+266.246" in capsys.readouterr().out
    assert main(["table", path, "--at", "1+266.246"]) == 0
    row = capsys.readouterr().out.splitlines()[1]
    assert row.startswith("1266.2462,1+266.246,") and row.endswith("END;POE")  # 4 decimals


def test_build_the_folder_with_its_terrain(tmp_path, capsys):
    out = tmp_path / "b"
    code = main(["build", str(REALWORLD), "-o", str(out), "--ground", "auto", "--jobs", "1"])
    assert code in (0, 1)
    index = json.loads((out / "index.json").read_text())
    terrain = [i for i in index["items"] if i["terrain"]]
    assert [Path(i["file"]).name for i in terrain] == ["im_m3_terrain.xml"]
    assert not any(i["failed"] for i in index["items"])
    m3 = next(i for i in index["items"] if i["alignment"] == "M3_RS - CL")
    assert any("im_m3_terrain.xml" in n for n in m3["notes"])
    header = (out / "im-m3-rs-cl" / "m3-rs-cl" / "table.csv").read_text().splitlines()[0]
    assert header.endswith(",ground,cut_fill")
    loop = next(i for i in index["items"] if i["alignment"] == "loop")
    assert "loop/plan.dxf" in " ".join(loop["outputs"]) and not any(
        o.endswith("profile.dxf") for o in loop["outputs"]
    )
    assert any("no profile in the file" in n for n in loop["notes"])
