"""Integrity: no input or device is replaced, no verdict comes from non-finite data,
work stays bounded, names from files cannot forge a report, and builds clean up
after themselves (README, "Hardening"). Hostile inputs on purpose; the checks are
gradeline's own promises.
"""

from __future__ import annotations

import os
import signal
import stat
import subprocess
import sys
import time
from pathlib import Path

import pytest

from gradeline.cli import main
from gradeline.errors import UsageError
from tests.conftest import METRIC_SAMPLE, US_SAMPLE, run_cli

BYPASS = ["--alignment", "Orrin Vale Bypass"]


run = run_cli


# --------------------------------------------------------------------------- devices
def test_a_character_device_is_written_to_never_replaced(capsys):
    if not os.path.exists("/dev/null"):
        pytest.skip("no /dev/null")
    code, _, _ = run(capsys, "table", US_SAMPLE, *BYPASS, "--interval", "100", "-o", "/dev/null")
    assert code == 0
    assert stat.S_ISCHR(os.stat("/dev/null").st_mode)


def test_a_fifo_is_refused_not_replaced(tmp_path, capsys):
    if not hasattr(os, "mkfifo"):
        pytest.skip("no FIFOs here")
    fifo = tmp_path / "pipe"
    os.mkfifo(fifo)
    code, _, err = run(capsys, "table", US_SAMPLE, *BYPASS, "--interval", "100", "-o", fifo)
    assert code == 2 and "FIFO" in err
    assert stat.S_ISFIFO(os.stat(fifo).st_mode)


# --------------------------------------------------------------------------- inputs
def test_no_input_of_a_command_is_overwritten(tmp_path, capsys):
    terrain = tmp_path / "terrain.xml"
    terrain.write_bytes((US_SAMPLE.parent / "orrin-vale-terrain.xml").read_bytes())
    crit = tmp_path / "c.toml"
    crit.write_bytes(b"# criteria\n")
    cfg = tmp_path / "cfg.toml"
    cfg.write_bytes(b"[layers]\n")
    before = {p: p.read_bytes() for p in (terrain, crit, cfg)}
    cases = [
        ["dxf", US_SAMPLE, *BYPASS, "--ground", terrain, "-o", terrain],
        [
            "dxf",
            US_SAMPLE,
            *BYPASS,
            "--ground",
            terrain,
            "-o",
            tmp_path / "p.dxf",
            "--plan",
            terrain,
        ],
        ["table", US_SAMPLE, *BYPASS, "--ground", terrain, "--interval", "100", "-o", terrain],
        ["review", US_SAMPLE, *BYPASS, "--speed", "50", "--criteria", crit, "-o", crit],
        ["dxf", US_SAMPLE, *BYPASS, "--config", cfg, "-o", cfg],
    ]
    for args in cases:
        code, _, err = run(capsys, *args)
        assert code == 2, (args, err)
    assert {p: p.read_bytes() for p in before} == before


def test_two_outputs_of_one_run_never_share_a_file(tmp_path, capsys):
    out = tmp_path / "p.dxf"
    code, _, err = run(
        capsys, "dxf", US_SAMPLE, *BYPASS, "-o", out, "--plan", f"{tmp_path}/./p.dxf"
    )
    assert code == 2 and "same output file" in err
    assert not out.exists()


# --------------------------------------------------------------------------- non-finite
def test_a_drawing_that_states_a_non_finite_mapping_is_refused():
    import argparse

    from gradeline.cli._common import drawing_mapping

    args = argparse.Namespace(exaggeration=None, datum=None)
    for stored in ({"exaggeration": "nan", "datum": "0"}, {"exaggeration": "0", "datum": "5"}):
        with pytest.raises(UsageError, match="cannot map it"):
            drawing_mapping(args, stored)
    assert drawing_mapping(args, {"exaggeration": "10", "datum": "500"}) == (
        10.0,
        500.0,
        "from the drawing",
    )


# --------------------------------------------------------------------------- bounded work
def test_a_tiny_file_of_huge_elevations_is_refused_at_once(tmp_path, capsys):
    tall = tmp_path / "tall.xml"
    tall.write_text(
        '<?xml version="1.0"?><LandXML xmlns="http://www.landxml.org/schema/LandXML-1.2" '
        'version="1.2"><Units><Imperial linearUnit="foot" areaUnit="squareFoot" '
        'volumeUnit="cubicYard" angularUnit="decimal degrees" directionUnit="decimal '
        'degrees"/></Units><Alignments><Alignment name="T" staStart="0" length="1000">'
        '<Profile name="T"><ProfAlign name="G"><PVI>0 0</PVI><PVI>500 900000</PVI>'
        "<PVI>1000 1</PVI></ProfAlign></Profile></Alignment></Alignments></LandXML>",
        encoding="utf-8",
    )
    t0 = time.perf_counter()
    code, _, err = run(capsys, "dxf", tall, "-o", tmp_path / "t.dxf")
    assert code == 2 and "elevation grid lines" in err
    assert time.perf_counter() - t0 < 30
    assert not (tmp_path / "t.dxf").exists()


# --------------------------------------------------------------------------- names
def _with_name(tmp_path: Path, name: str) -> Path:
    from lxml import etree

    tree = etree.parse(str(METRIC_SAMPLE))
    al = next(tree.iter("{*}Alignment"))
    al.set("name", name)
    out = tmp_path / "named.xml"
    tree.write(str(out), xml_declaration=True, encoding="UTF-8")
    return out


def test_a_name_cannot_forge_a_line_of_the_index(tmp_path, capsys):
    src = _with_name(tmp_path, "Road\nFAILED    forged.xml / X: made up\u202e")
    out = tmp_path / "out"
    code, _, _ = run(capsys, "build", src, "-o", out, "--jobs", "1")
    assert code in (0, 1)
    lines = (out / "index.txt").read_text(encoding="utf-8").splitlines()
    assert not any(ln.startswith("FAILED") for ln in lines)
    assert any("\\nFAILED" in ln and "\\u202e" in ln for ln in lines)


@pytest.mark.parametrize("name", ["x" * 300, "CON", "nul"])
def test_long_and_reserved_names_build(tmp_path, capsys, name):
    src = _with_name(tmp_path, name)
    out = tmp_path / "out"
    code, _, _ = run(capsys, "build", src, "-o", out, "--jobs", "1")
    assert code in (0, 1)
    (folder,) = (out / "named").iterdir()
    assert len(folder.name) <= 80 and folder.name not in ("con", "nul")
    assert (folder / "table.csv").is_file()


# --------------------------------------------------------------------------- builds
def test_a_build_removes_stale_parts_and_never_follows_a_link_out(tmp_path, capsys):
    out = tmp_path / "out"
    (out / "old").mkdir(parents=True)
    stale = out / "old" / ".gradeline-abc123.part"
    stale.write_bytes(b"left by a killed run")
    elsewhere = tmp_path / "elsewhere"
    elsewhere.mkdir()
    (out / "tarnholm-link").symlink_to(elsewhere, target_is_directory=True)
    code, _, _ = run(capsys, "build", METRIC_SAMPLE, "-o", out, "--jobs", "1")
    assert code == 2  # the one alignment could not be built
    assert not stale.exists()
    assert list(elsewhere.iterdir()) == []
    assert "leads outside" in (out / "index.txt").read_text()


def test_an_alignment_gets_all_its_outputs_or_none(tmp_path, capsys, monkeypatch):
    import gradeline.build as b

    real = b.write_atomic
    calls = {"n": 0}

    def fail_on_third(path, data):
        calls["n"] += 1
        if calls["n"] == 3:
            raise OSError(28, "No space left on device")
        real(path, data)

    monkeypatch.setattr(b, "write_atomic", fail_on_third)
    out = tmp_path / "out"
    code, _, _ = run(capsys, "build", METRIC_SAMPLE, "-o", out, "--jobs", "1")
    assert code == 2
    folder = out / "tarnholm-link" / "tarnholm-link-road"
    assert not folder.exists()  # rolled back, its emptied folder too
    assert "No space left on device" in (out / "index.txt").read_text()


@pytest.mark.skipif(not sys.platform.startswith("linux"), reason="parent-death signal is Linux")
def test_workers_end_with_a_killed_build(tmp_path):
    cmd = [sys.executable, "-m", "gradeline", "build", str(US_SAMPLE), str(METRIC_SAMPLE)]
    p = subprocess.Popen(
        [*cmd, "-o", str(tmp_path / "out"), "--jobs", "2"],
        stdout=subprocess.DEVNULL,
        stderr=subprocess.DEVNULL,
    )
    kids: list[int] = []
    for _ in range(400):
        res = subprocess.run(["pgrep", "-P", str(p.pid)], capture_output=True, text=True)
        kids = [int(x) for x in res.stdout.split()]
        if len(kids) >= 2 or p.poll() is not None:
            break
        time.sleep(0.025)
    if p.poll() is not None or len(kids) < 2:
        pytest.skip("the build ended before its workers could be seen")
    os.kill(p.pid, signal.SIGKILL)
    p.wait()
    deadline = time.time() + 15
    alive = kids
    while alive and time.time() < deadline:
        alive = [
            k
            for k in kids
            if os.path.exists(f"/proc/{k}")
            and open(f"/proc/{k}/stat").read().split()[2] not in ("Z", "X")
        ]
        time.sleep(0.1)
    assert alive == []


def _started(out: Path, p: subprocess.Popen, limit: float = 60.0) -> None:
    """Wait until the build has made its output folder (its stop handlers are set)."""
    deadline = time.time() + limit
    while not out.exists() and p.poll() is None and time.time() < deadline:
        time.sleep(0.02)


@pytest.mark.parametrize(
    ("signum", "jobs"), [(signal.SIGTERM, "1"), (signal.SIGINT, "1"), (signal.SIGINT, "2")]
)
def test_a_stopped_build_writes_its_index_and_rolls_back(tmp_path, signum, jobs):
    out = tmp_path / "out"
    cmd = [sys.executable, "-m", "gradeline", "build", str(US_SAMPLE), str(METRIC_SAMPLE)]
    p = subprocess.Popen(
        [*cmd, "-o", str(out), "--jobs", jobs], stdout=subprocess.PIPE, stderr=subprocess.PIPE
    )
    _started(out, p)
    p.send_signal(signum)
    _, err = p.communicate(timeout=120)
    assert p.returncode in (0, 2), err.decode()  # 0: it was done before the signal
    index = (out / "index.txt").read_text()
    assert not list(out.rglob(".gradeline-*.part"))
    for folder in (d for d in out.glob("*/*") if d.is_dir()):
        names = {f.name for f in folder.iterdir()}
        assert names == set() or {"table.csv", "curves.csv", "check.txt"} <= names, names
    if p.returncode == 2:
        assert "the build was stopped" in index


def test_a_stop_inside_code_run_by_exec_still_exits_2(tmp_path):
    # CPython remembers a bare KeyboardInterrupt leaving code run by exec of a string
    # (scipy imports that way) and ends a ``python -m`` process by SIGINT even when it
    # was caught (found by CI: exit -2 instead of 2); the build's stop is a subclass
    (tmp_path / "stopper.py").write_text(
        "import os, signal\n"
        "from gradeline.cli.build import _catch_stops\n"
        "_catch_stops()\n"
        "try:\n"
        "    exec('os.kill(os.getpid(), signal.SIGTERM)\\nfor i in range(10**7): pass')\n"
        "except KeyboardInterrupt:\n"
        "    raise SystemExit(2)\n"
        "raise SystemExit(3)\n"
    )
    p = subprocess.run([sys.executable, "-m", "stopper"], cwd=tmp_path, capture_output=True)
    assert p.returncode == 2, p.stderr.decode()


def test_a_review_step_longer_than_the_profile_is_refused(capsys):
    code, _, err = run(capsys, "review", US_SAMPLE, *BYPASS, "--speed", "50", "--step", "9000")
    assert code == 2 and "no longer than the profile" in err


def test_fit_says_what_it_left_out(tmp_path, capsys, monkeypatch):
    import ezdxf

    drawn = tmp_path / "p.dxf"
    assert main(["dxf", str(US_SAMPLE), *BYPASS, "-o", str(drawn)]) == 0
    doc = ezdxf.readfile(str(drawn))
    msp = doc.modelspace()
    msp.add_lwpolyline(
        [(0, 0), (100, float("nan")), (200, 5)], dxfattribs={"layer": "PROFILE-GRADE"}
    )
    nan = tmp_path / "nan.dxf"
    doc.saveas(str(nan))
    code, _, err = run(capsys, "fit", nan, "--layer", "PROFILE-GRADE", "-o", tmp_path / "f.xml")
    assert code == 0 and "1 LWPOLYLINE with non-finite coordinates" in err
    bad = ezdxf.new()
    spline = bad.modelspace().add_spline(dxfattribs={"layer": "G"})
    spline.dxf.degree = 3
    spline.knots = [0, 0, 0, 0, 1, 1, 1, 1]  # knots, and no control point to evaluate
    path = tmp_path / "spline.dxf"
    bad.saveas(str(path))
    args = ["fit", path, "--layer", "G", "--exaggeration", "10", "--datum", "0"]
    code, _, err = run(capsys, *args, "-o", tmp_path / "g.xml")
    assert code == 2 and "1 SPLINE ezdxf cannot evaluate left out" in err


def test_a_profile_of_a_survey_of_points_is_refused_for_drafting(tmp_path, capsys):
    pvis = "".join(f"<PVI>{10.0 * i:.1f} {100 + (i % 7) * 0.1:.2f}</PVI>" for i in range(25000))
    many = tmp_path / "many.xml"
    many.write_text(
        '<?xml version="1.0"?><LandXML xmlns="http://www.landxml.org/schema/LandXML-1.2" '
        'version="1.2"><Units><Imperial linearUnit="foot" areaUnit="squareFoot" '
        'volumeUnit="cubicYard" angularUnit="decimal degrees" directionUnit="decimal '
        'degrees"/></Units><Alignments><Alignment name="T" staStart="0"><Profile name="T">'
        f'<ProfAlign name="G">{pvis}</ProfAlign></Profile></Alignment></Alignments></LandXML>',
        encoding="utf-8",
    )
    t0 = time.perf_counter()
    for cmd in (
        ["sheets", many, "-o", tmp_path / "m.pdf"],
        ["dxf", many, "-o", tmp_path / "m.dxf"],
    ):
        code, _, err = run(capsys, *cmd)
        assert code == 2 and "25,000 PVIs" in err
    assert time.perf_counter() - t0 < 60
