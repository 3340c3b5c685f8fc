"""build and demo: every deliverable, an index, determinism, no input overwritten."""

from __future__ import annotations

import json
import os
import subprocess
import sys

import pytest

from gradeline.cli import main
from tests.conftest import GRADELINE, METRIC_SAMPLE, SAMPLES, US_SAMPLE


def _tree(root):
    return {
        str(p.relative_to(root)): p.read_bytes() for p in sorted(root.rglob("*")) if p.is_file()
    }


def test_demo_builds_everything(tmp_path, capsys):
    out = tmp_path / "demo"
    code = main(["demo", "-o", str(out), "--jobs", "1"])
    text = capsys.readouterr().out
    assert code == 0  # everything was built; the samples' findings are on purpose
    assert text.startswith("3 alignments built, 0 failed")
    assert "fails some checks on purpose" in text
    assert {
        ln.split()[0] for ln in text.splitlines() if ln and not ln.startswith((" ", "3 ", "Every"))
    } <= {"built", "FINDINGS"}
    index = json.loads((out / "index.json").read_text())
    for item in index["items"]:
        names = {os.path.basename(o) for o in item["outputs"]}
        # the bypass states its superelevation: its diagram is drawn too
        extra = {"superelevation.dxf"} if item["alignment"] == "Orrin Vale Bypass" else set()
        assert (
            names
            == {
                "profile.dxf",
                "plan.dxf",
                "sheets.pdf",
                "curves.csv",
                "table.csv",
                "check.txt",
                "review.txt",
                "review.pdf",
            }
            | extra
        )
    table = (out / "orrin-vale-bypass" / "orrin-vale-bypass" / "table.csv").read_text()
    assert table.splitlines()[0].endswith(",ground,cut_fill,super_left,super_right")


def test_build_twice_gives_identical_bytes(tmp_path):
    trees = []
    for k, seed in enumerate(("2", "97")):
        out = tmp_path / f"b{k}"
        subprocess.run(
            [
                sys.executable,
                "-m",
                "gradeline",
                "build",
                str(US_SAMPLE),
                str(METRIC_SAMPLE),
                "-o",
                str(out),
                "--speed",
                "50",
                "--jobs",
                "2",
            ],
            check=False,
            env=dict(os.environ, PYTHONHASHSEED=seed),
            timeout=300,
            capture_output=True,
        )
        trees.append(_tree(out))
    assert trees[0].keys() == trees[1].keys() and len(trees[0]) > 10
    assert trees[0] == trees[1]


def test_folder_input(tmp_path, capsys):
    folder = tmp_path / "in"
    folder.mkdir()
    (folder / "a.xml").write_bytes(METRIC_SAMPLE.read_bytes())
    (folder / "notes.txt").write_text("not LandXML")
    out = tmp_path / "out"
    code = main(["build", str(folder), "-o", str(out), "--jobs", "1"])
    assert code in (0, 1)
    assert (out / "a" / "tarnholm-link-road" / "profile.dxf").exists()
    assert "1 alignment built, 0 failed" in capsys.readouterr().out


def test_output_folder_may_not_be_an_input(tmp_path, capsys):
    src = tmp_path / "x.xml"
    src.write_bytes(METRIC_SAMPLE.read_bytes())
    code = main(["build", str(src), "-o", str(src)])
    assert code == 2
    assert "never overwritten" in capsys.readouterr().err
    assert src.read_bytes() == METRIC_SAMPLE.read_bytes()


def test_review_findings_give_exit_1(tmp_path, capsys):
    code = main(["build", str(US_SAMPLE), "-o", str(tmp_path / "o"), "--speed", "70"])
    assert code == 1
    assert "review: fails" in capsys.readouterr().out


@pytest.mark.cli
def test_demo_from_console(tmp_path):
    done = subprocess.run(
        [GRADELINE, "demo", "-o", str(tmp_path / "d")],
        capture_output=True,
        text=True,
        timeout=300,
    )
    assert done.returncode in (0, 1), done.stderr
    assert (tmp_path / "d" / "index.txt").exists()
    assert SAMPLES.exists()


def test_deliverables_side_by_side_give_the_same_bytes(tmp_path):
    # one file, two processes: the alignment's deliverables are rendered in forked
    # workers; every file must equal the one-process build (and the index too)
    trees = []
    for jobs in ("1", "2"):
        out = tmp_path / f"j{jobs}"
        code = main(
            [
                "build",
                str(US_SAMPLE),
                "-o",
                str(out),
                "--speed",
                "50",
                "--jobs",
                jobs,
                "--ground",
                str(SAMPLES / "orrin-vale-terrain.xml"),
            ]
        )
        assert code in (0, 1)
        trees.append(_tree(out))
    assert len(trees[0]) >= 8 and trees[0] == trees[1]


def test_builds_in_different_folders_are_byte_identical(tmp_path, capsys):
    # issue 17: deliverables name inputs by file name, so the same samples built from
    # two different folders into two different folders give the same bytes
    import shutil

    trees = []
    for k in range(2):
        src = tmp_path / f"copy{k}" / ("deep" * (k + 1))
        src.mkdir(parents=True)
        shutil.copy(US_SAMPLE, src / US_SAMPLE.name)
        out = tmp_path / f"out{k}" / ("x" * (k + 1))
        assert main(["build", str(src / US_SAMPLE.name), "-o", str(out), "--jobs", "1"]) in (0, 1)
        capsys.readouterr()
        trees.append(_tree(out))
    assert trees[0] == trees[1] and len(trees[0]) > 8
