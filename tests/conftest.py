"""Shared hand-built cases and sample paths (STYLE.md section 8)."""

from __future__ import annotations

import shutil
import sys
from pathlib import Path

import pytest

from gradeline.model import Profile, PVISpec

ROOT = Path(__file__).resolve().parent.parent
SAMPLES = ROOT / "samples"
US_SAMPLE = SAMPLES / "orrin-vale-bypass.xml"
METRIC_SAMPLE = SAMPLES / "tarnholm-link.xml"

#: The installed console command: beside this interpreter (a virtual environment
#: need not be on PATH), else wherever PATH finds it.
_BESIDE = Path(sys.executable).with_name("gradeline")
GRADELINE = str(_BESIDE) if _BESIDE.exists() else (shutil.which("gradeline") or "gradeline")


def profile_of(*entries: tuple) -> Profile:
    """Build a profile from (station, elevation[, kind, a, b]) tuples."""
    specs = []
    for e in entries:
        s, z = e[0], e[1]
        if len(e) == 2:
            specs.append(PVISpec(s, z))
        elif e[2] == "parabolic":
            specs.append(PVISpec(s, z, "parabolic", e[3] / 2, e[3] / 2))
        elif e[2] == "unsymmetric":
            specs.append(PVISpec(s, z, "unsymmetric", e[3], e[4]))
        else:
            specs.append(PVISpec(s, z, "circular", radius=e[3]))
    return Profile("test", tuple(specs))


CASES = {
    "tangent-only": profile_of((0.0, 100.0), (1000.0, 110.0)),
    "crest": profile_of((0.0, 100.0), (500.0, 110.0, "parabolic", 400.0), (1000.0, 105.0)),
    "sag": profile_of((0.0, 100.0), (500.0, 90.0, "parabolic", 300.0), (1000.0, 96.0)),
    "unsym-crest": profile_of(
        (0.0, 100.0), (400.0, 112.0, "unsymmetric", 150.0, 350.0), (1000.0, 100.0)
    ),
    "circular-sag-metric": profile_of(
        (0.0, 50.0), (300.0, 44.0, "circular", 3000.0), (700.0, 50.0)
    ),
    "back-to-back": profile_of(
        (0.0, 100.0),
        (400.0, 108.0, "parabolic", 400.0),
        (800.0, 100.0, "parabolic", 400.0),
        (1200.0, 104.0),
    ),
}


@pytest.fixture(params=sorted(CASES), ids=sorted(CASES))
def case(request: pytest.FixtureRequest) -> Profile:
    """Every hand-built profile, one test each."""
    return CASES[request.param]


def run_cli(capsys, *args) -> tuple[int, str, str]:
    """``gradeline`` in-process as the shell sees it: exit code (argparse's too),
    standard output and standard error."""
    from gradeline.cli import main

    try:
        code = main([str(a) for a in args])
    except SystemExit as exc:
        code = int(exc.code or 0)
    out, err = capsys.readouterr()
    return code, out, err
