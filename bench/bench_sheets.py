"""Benchmark: PDF plan-and-profile sheets of a 50-mile alignment at 1" = 50'.

Run: ``python bench/bench_sheets.py``. Target (issue 5): under 30 s with peak
memory under 1 GB. Prints time, pages, bytes and peak resident memory.
"""

from __future__ import annotations

import resource
import sys
import time
from pathlib import Path

import numpy as np

sys.path.insert(0, str(Path(__file__).resolve().parent.parent))

from bench._common import synthetic_plan, synthetic_profile  # noqa: E402
from gradeline.geometry import horizontal
from gradeline.model import Alignment, Document, GroundPiece, GroundProfile  # noqa: E402
from gradeline.model.units import Units  # noqa: E402
from gradeline.sheets.pdf import SheetOptions, page_plan, render_sheets  # noqa: E402
from gradeline.solved import solve_alignment  # noqa: E402


def main() -> None:
    plan = synthetic_plan(200)
    length = horizontal.solve(plan).end
    n_pvi = 401
    prof = synthetic_profile(n_pvi, spacing=min(660.0, length / (n_pvi - 1)))
    s = np.arange(0.0, prof.end + 1e-9, 10.0)
    z = 1000.0 + 30 * np.sin(s / 3000.0) + 4 * np.sin(s / 170.0)
    ground = GroundProfile("EG", (GroundPiece(tuple(s.tolist()), tuple(z.tolist())),))
    al = Alignment("Fifty-mile test", profiles=(prof,), grounds=(ground,), horizontal=plan)
    doc = Document("bench.xml", Units("foot"), (al,))
    ctx = solve_alignment(doc, al, prof)
    opts = SheetOptions(size="ansi-d", scale=50, project="Benchmark", date="2026-11-30")
    t0 = time.perf_counter()
    pdf = render_sheets(ctx, opts)
    elapsed = time.perf_counter() - t0
    pp = page_plan(ctx, opts)
    peak_mb = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024
    print(
        f"alignment {length:,.0f} ft ({length / 5280:.1f} mi), profile {prof.end:,.0f} ft, "
        f"{n_pvi} PVIs, {len(s):,} ground points"
    )
    print(
        f"{len(pp.frames)} plan-and-profile sheets + {len(pp.table_pages)} table pages = "
        f"{pp.pages} pages, {len(pdf) / 2**20:.1f} MiB"
    )
    print(
        f"time {elapsed:.1f} s ({elapsed / pp.pages * 1000:.0f} ms a page); "
        f"peak resident memory {peak_mb:.0f} MB"
    )


if __name__ == "__main__":
    main()
