"""Benchmark: ``gradeline build`` of a 50-mile alignment on a 2-million-face TIN.

The alignment is the 200-group plan of the sheet benchmark (49 miles of line,
spiral, arc, spiral) with a 401-PVI profile; the TIN is a 590 x 1,700 grid of
points (1,003,000 points, 1,999,998 faces, about 100 MiB) covering it. Each run
is a fresh ``gradeline build`` process (every deliverable: profile and plan
DXF, PDF sheets at the default scale, curve and station tables, check report);
peak memory is the largest resident set of that process or of any of its
workers (``ru_maxrss`` of the process and of its children).

Printed beside each other, all measured in the same run:

* the build without ``--ground`` (the baseline: the same deliverables without
  the TIN), and with ``--ground``: the difference is what the surface costs;
* the same file holding the alignment twice (two alignments, one TIN): with the
  surface read and indexed once per process, the second alignment adds its
  deliverables and its sampling, never a second parse;
* the build with one process a core (the default): the deliverables of the
  alignment are rendered side by side in forked processes; run three times, the
  median printed (this machine's speed drifts by a tenth or more within an hour,
  which the baseline row of the same run shows).

Targets (issue 16): the build with the TIN under 15 s and 500 MB on the
development machine. Run: ``python bench/bench_build.py`` (a few minutes).
"""

from __future__ import annotations

import os
import subprocess
import sys
import tempfile
import time
from dataclasses import replace
from pathlib import Path

import numpy as np

sys.path.insert(0, str(Path(__file__).resolve().parent.parent))

from bench._common import synthetic_plan, synthetic_profile  # noqa: E402
from bench.make_surface import write as write_surface  # noqa: E402
from gradeline.geometry import horizontal  # noqa: E402
from gradeline.io.landxml_write import write_landxml  # noqa: E402
from gradeline.model import Alignment, Document  # noqa: E402
from gradeline.model.units import Units  # noqa: E402


def road(path: str, copies: int = 1) -> tuple[float, tuple[float, float, float, float]]:
    """The 49-mile alignment (``copies`` times, under different names); its bounds."""
    plan = synthetic_plan(200)
    hz = horizontal.solve(plan)
    n_pvi = 401
    prof = synthetic_profile(n_pvi, spacing=hz.end / (n_pvi - 1))
    al = Alignment("Benchmark", profiles=(prof,), horizontal=plan)
    als = tuple(replace(al, name=f"Benchmark {k + 1}") for k in range(copies))
    Path(path).write_bytes(write_landxml(Document(path, Units("foot"), als)))
    s = np.linspace(hz.start, hz.end, 50_000)
    n, e, _ = horizontal.evaluate(hz, s)
    return hz.end, (float(e.min()), float(e.max()), float(n.min()), float(n.max()))


_WRAP = (
    "import atexit, resource, sys\n"
    "atexit.register(lambda: sys.stderr.write("
    "'peak-kb %d\\n' % max(resource.getrusage(resource.RUSAGE_SELF).ru_maxrss,"
    " resource.getrusage(resource.RUSAGE_CHILDREN).ru_maxrss)))\n"
    "from gradeline.cli import main\n"
    "sys.exit(main(sys.argv[1:]))\n"
)


def run(args: list[str]) -> tuple[float, float]:
    """Wall time (s) and peak resident memory (MB) of one fresh ``gradeline`` process."""
    t0 = time.perf_counter()
    done = subprocess.run(
        [sys.executable, "-c", _WRAP, *args], check=False, capture_output=True, text=True
    )
    wall = time.perf_counter() - t0
    peak = [ln for ln in done.stderr.splitlines() if ln.startswith("peak-kb ")]
    if done.returncode not in (0, 1) or not peak:
        raise SystemExit(f"build failed ({done.returncode}): {done.stderr[-2000:]}")
    return wall, int(peak[-1].split()[1]) / 1024


def main() -> None:
    with tempfile.TemporaryDirectory() as tmp:
        one, two = os.path.join(tmp, "road.xml"), os.path.join(tmp, "road2.xml")
        length, (e0, e1, n0, n1) = road(one)
        road(two, copies=2)
        spacing = 128.0
        side = int((e1 - e0 + 2000) / spacing) + 2
        rows = int((n1 - n0 + 2000) / spacing) + 2
        tin = os.path.join(tmp, "terrain.xml")
        n_pts, n_faces = write_surface(tin, side, spacing, rows=rows, origin=(e0 - 1000, n0 - 1000))
        mib = os.path.getsize(tin) / 2**20
        print(
            f"alignment {length / 5280:.1f} miles; TIN {n_pts:,} points, {n_faces:,} faces, "
            f"{mib:.0f} MiB",
            flush=True,
        )
        rows_out = []
        cores = os.cpu_count() or 1
        for label, argv in (
            ("build --jobs 1, no ground (baseline)", [one, "--jobs", "1"]),
            ("build --jobs 1 --ground", [one, "--ground", tin, "--jobs", "1"]),
            ("build --jobs 1 --ground, two alignments", [two, "--ground", tin, "--jobs", "1"]),
            (f"build --ground ({cores} processes)", [one, "--ground", tin]),
        ):
            out = os.path.join(tmp, f"out{len(rows_out)}")
            # the target's run three times (the median), the others once
            times, peaks = [], []
            for k in range(3 if "--jobs" not in argv else 1):
                wall, peak = run(["build", *argv, "-o", f"{out}-{k}"])
                times.append(wall)
                peaks.append(peak)
            wall, peak = float(np.median(times)), max(peaks)
            index = Path(f"{out}-0", "index.txt").read_text().splitlines()[0]
            rows_out.append((label, wall, peak, index))
            spread = f" (median of {len(times)}: {min(times):.1f}-{max(times):.1f})"
            spread = spread if len(times) > 1 else ""
            print(f"{label}: {wall:.1f} s{spread}, peak {peak:.0f} MB ({index})", flush=True)
    base = rows_out[0][1]
    print()
    print("| run | time | peak memory | vs no ground |")
    print("| --- | --- | --- | --- |")
    for label, wall, peak, _ in rows_out:
        print(f"| {label} | {wall:.1f} s | {peak:.0f} MB | {wall / base:.2f}x |")


if __name__ == "__main__":
    main()
