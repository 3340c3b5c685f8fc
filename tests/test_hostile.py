"""Hostile and broken input: exit 2, one line naming file, line and element; no leaks, no hangs."""

from __future__ import annotations

import json
import os
import re
import resource
import subprocess
import sys
from pathlib import Path

import pytest

from tests.hostile.make_corpus import SECRET, xxe_files

HOSTILE = Path(__file__).resolve().parent / "hostile"
CORPUS = sorted(p for p in HOSTILE.glob("*.xml"))
#: Files whose only fault lies inside one alignment: `info` lists that alignment
#: with its reason and `check` reports it as a finding, instead of refusing the file.
ALIGNMENT_LEVEL = {
    "duplicate-alignments.xml",
    "missing-length.xml",
    "missing-name.xml",
    "number-huge.xml",
    "number-inf.xml",
    "number-nan.xml",
    "number-overflow.xml",
}
LINE = re.compile(r"^gradeline: (?P<file>.+?):(?P<line>\d+): (?P<element>[A-Za-z][\w-]*): \S.*\n$")


def _limits():  # bounded memory for the child: 2 GiB of address space
    resource.setrlimit(resource.RLIMIT_AS, (2 * 2**30, 2 * 2**30))


def run(*args, timeout=60):
    return subprocess.run(
        [sys.executable, "-m", "gradeline", *map(str, args)],
        capture_output=True,
        text=True,
        timeout=timeout,
        preexec_fn=_limits,
        env=dict(os.environ, PYTHONHASHSEED="1"),
    )


@pytest.fixture(scope="module")
def canary(tmp_path_factory):
    folder = tmp_path_factory.mktemp("xxe")
    secret = folder / "secret.txt"
    secret.write_text(SECRET + "\n")
    paths = []
    for name, data in xxe_files(secret).items():
        (folder / name).write_bytes(data)
        paths.append(folder / name)
    return paths


def _assert_one_line(done, path):
    assert done.returncode == 2, done.stderr
    assert done.stdout == ""
    assert "Traceback" not in done.stderr
    m = LINE.match(done.stderr)
    assert m, done.stderr
    assert m["file"] == str(path)
    assert SECRET not in done.stderr


def test_corpus_is_complete():
    names = {p.name for p in CORPUS}
    for want in (
        "external-dtd.xml",
        "billion-laughs.xml",
        "quadratic-blowup.xml",
        "deep-nesting.xml",
        "empty.xml",
        "binary-garbage.xml",
        "wrong-encoding.xml",
        "number-nan.xml",
        "number-huge.xml",
        "missing-name.xml",
        "duplicate-alignments.xml",
        "truncated-1.xml",
    ):
        assert want in names


@pytest.mark.parametrize("path", CORPUS, ids=[p.name for p in CORPUS])
@pytest.mark.parametrize(
    "command", [["info"], ["table", "--interval", "50"], ["check"]], ids=["info", "table", "check"]
)
def test_hostile_file(path, command):
    done = run(command[0], path, *command[1:])
    if path.name in ALIGNMENT_LEVEL and command[0] in ("info", "check"):
        # the file reads; its one broken alignment is reported in place (issue 14)
        assert done.returncode == (0 if command[0] == "info" else 1), done.stderr
        assert "Traceback" not in done.stderr and SECRET not in done.stdout
        assert re.search(rf"{re.escape(str(path))}:\d+: [A-Za-z]\w*: \S", done.stdout)
        return
    _assert_one_line(done, path)


def test_external_entities_are_never_read(canary):
    for path in canary:
        done = run("table", path, "--interval", "10")
        _assert_one_line(done, path)


def test_build_survives_a_folder_of_hostile_files(tmp_path, canary):
    out = tmp_path / "out"
    done = run("build", HOSTILE, canary[0].parent, "-o", out, "--jobs", "2", timeout=300)
    assert done.returncode == 2
    assert "Traceback" not in done.stderr
    index = json.loads((out / "index.json").read_text())
    # every item fails, except the first of two alignments sharing a name (issue 14:
    # it reads; the second is the failed item)
    built = [i for i in index["items"] if not i["failed"]]
    assert [Path(i["file"]).name for i in built] == ["duplicate-alignments.xml"]
    assert len(index["items"]) > len(built)
    assert SECRET not in (out / "index.txt").read_text()
    assert not [
        p
        for p in out.rglob("*")
        if p.is_file()
        and p.name not in ("index.txt", "index.json")
        and "duplicate-alignments" not in str(p)
    ]


def test_one_bad_file_does_not_stop_the_others(tmp_path):
    good = Path(__file__).resolve().parent.parent / "samples" / "tarnholm-link.xml"
    out = tmp_path / "out"
    done = run("build", good, HOSTILE / "truncated-2.xml", "-o", out, timeout=300)
    assert done.returncode == 2
    index = json.loads((out / "index.json").read_text())
    ok = [i for i in index["items"] if not i["failed"]]
    bad = [i for i in index["items"] if i["failed"]]
    assert len(ok) == 1 and len(bad) == 1
    assert "truncated-2.xml:15: XML: not well-formed" in bad[0]["error"]
    for rel in ok[0]["outputs"]:
        assert (out / rel).stat().st_size > 0


def test_spiral_of_absurd_length_is_refused_quickly(tmp_path):
    """Regression (issue 10 fuzzing): a 1e9-ft spiral made `check` run for minutes."""
    text = (
        Path(__file__).resolve().parent.parent / "samples" / "orrin-vale-bypass.xml"
    ).read_text()
    path = tmp_path / "spiral.xml"
    path.write_text(
        text.replace(
            'length="250.000000" radiusStart="1200.000000"',
            'length="1e9" radiusStart="1200.000000"',
            1,
        )
    )
    done = run("check", path, timeout=30)
    assert done.returncode == 1  # reported as a finding of that alignment (issue 14)
    assert "spiral turns through" in done.stdout
    done = run("table", path, "--alignment", "Orrin Vale Bypass", "--interval", "100", timeout=30)
    _assert_one_line(done, path)
    assert "spiral turns through" in done.stderr


@pytest.mark.parametrize(
    "command",
    [
        ["table", "--interval", "100"],
        ["dxf", "-o", "x.dxf"],
        ["sheets", "-o", "x.pdf"],
        ["review", "--speed", "50"],
    ],
    ids=["table", "dxf", "sheets", "review"],
)
def test_absurd_profile_length_is_refused_quickly(tmp_path, command):
    path = tmp_path / "long.xml"
    path.write_text(
        '<LandXML><Units><Imperial linearUnit="foot"/></Units><Alignments>'
        '<Alignment name="L"><Profile><ProfAlign><PVI>0 100</PVI><PVI>1000000000 101'
        "</PVI></ProfAlign></Profile></Alignment></Alignments></LandXML>"
    )
    args = [a if a not in ("x.dxf", "x.pdf") else tmp_path / a for a in command[1:]]
    done = run(command[0], path, *args, timeout=30)
    assert done.returncode == 2 and done.stderr.count("\n") == 1
    assert "Traceback" not in done.stderr and "at most" in done.stderr
    assert not (tmp_path / "x.dxf").exists() and not (tmp_path / "x.pdf").exists()
