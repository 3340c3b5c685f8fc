"""Write every deliverable of the bundled samples and print a SHA-256 per file.

Run before and after a change that must not alter outputs, then compare the two
listings (``diff``). The command module is an argument so the same script can
drive an older layout: ``python scripts/sample_outputs.py OUTDIR [MODULE]``.
Run from the repository root: reports name inputs by the path given.
"""

from __future__ import annotations

import hashlib
import os
import subprocess
import sys
from pathlib import Path

BYPASS = "samples/orrin-vale-bypass.xml"
MAIN = ["--alignment", "Orrin Vale Bypass"]
LANE = ["--alignment", "Kettle Lane"]
TERRAIN = "samples/orrin-vale-terrain.xml"
LINK = "samples/tarnholm-link.xml"
CONFIG = "samples/sheets.toml"


def runs(out: Path) -> list[tuple[str, list[str]]]:
    o = str(out)
    return [
        ("info.txt", ["info", BYPASS]),
        ("info-link.json", ["info", LINK, "--json"]),
        ("table.csv", ["table", BYPASS, *MAIN, "--interval", "50"]),
        (
            "table-ground.json",
            ["table", BYPASS, *MAIN, "--interval", "100", "--ground", TERRAIN, "--format", "json"],
        ),
        ("table-link.csv", ["table", LINK, "--interval", "20", "--surface", "Survey 2026 west"]),
        ("table-at.csv", ["table", BYPASS, *MAIN, "--at", "15+00,17+50"]),
        ("curves.csv", ["curves", BYPASS, *MAIN]),
        ("curves-lane.csv", ["curves", BYPASS, *LANE]),
        ("table-lane.csv", ["table", BYPASS, *LANE, "--interval", "25"]),
        ("-", ["sheets", BYPASS, *LANE, "-o", f"{o}/sheets-lane.pdf"]),
        ("-", ["dxf", BYPASS, *LANE, "-o", f"{o}/lane.dxf", "--plan", f"{o}/lane-plan.dxf"]),
        ("curves-link.json", ["curves", LINK, "--format", "json"]),
        ("review.txt", ["review", BYPASS, *MAIN, "--speed", "50"]),
        ("review-link.json", ["review", LINK, "--speed", "80", "--json"]),
        ("check.txt", ["check", BYPASS]),
        ("check-link.json", ["check", LINK, "--json"]),
        (
            "-",
            [
                "dxf",
                BYPASS,
                *MAIN,
                "-o",
                f"{o}/profile.dxf",
                "--plan",
                f"{o}/plan.dxf",
                "--ground",
                TERRAIN,
            ],
        ),
        (
            "-",
            [
                "dxf",
                LINK,
                "-o",
                f"{o}/link-r12.dxf",
                "--dxf-version",
                "R12",
                "--curves",
                "polyline",
            ],
        ),
        (
            "-",
            [
                "dxf",
                LINK,
                "-o",
                f"{o}/link.dxf",
                "--plan",
                f"{o}/link-plan.dxf",
                "--config",
                CONFIG,
            ],
        ),
        ("check-dxf.txt", ["check", BYPASS, *MAIN, "--dxf", f"{o}/profile.dxf"]),
        ("-", ["fit", f"{o}/profile.dxf", "--layer", "PROFILE-GRADE", "-o", f"{o}/fitted.xml"]),
        (
            "-",
            [
                "sheets",
                BYPASS,
                *MAIN,
                "-o",
                f"{o}/sheets.pdf",
                "--config",
                CONFIG,
                "--ground",
                TERRAIN,
            ],
        ),
        (
            "-",
            [
                "sheets",
                BYPASS,
                *MAIN,
                "-o",
                f"{o}/sheets-b.pdf",
                "--size",
                "ansi-b",
                "--scale",
                "100",
            ],
        ),
        ("-", ["sheets", LINK, "-o", f"{o}/sheets-link.pdf", "--size", "iso-a3"]),
        ("demo.txt", ["demo", "-o", f"{o}/demo"]),
        ("build.txt", ["build", "samples", "-o", f"{o}/build", "--speed", "50", "--jobs", "1"]),
    ]


def main() -> int:
    out = Path(sys.argv[1])
    module = sys.argv[2] if len(sys.argv) > 2 else "gradeline"
    out.mkdir(parents=True, exist_ok=True)
    env = dict(os.environ, PYTHONHASHSEED="0")
    for name, argv in runs(out):
        proc = subprocess.run(
            [sys.executable, "-m", module, *argv], capture_output=True, env=env, check=False
        )
        text = proc.stdout.decode().replace(str(out), "OUT")
        if name != "-":
            (out / name).write_text(text)
        print(f"exit {proc.returncode} {' '.join(argv[:2])}", proc.stderr.decode().strip()[:200])
    for path in sorted(p for p in out.rglob("*") if p.is_file()):
        data = path.read_bytes().replace(str(out).encode(), b"OUT")
        print(hashlib.sha256(data).hexdigest()[:16], path.relative_to(out))
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
