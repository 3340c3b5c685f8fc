"""Benchmark: cross-check a 50-mile alignment (1,000 plan elements, 400 PVIs) and a
250,000-vertex DXF profile. Run: ``python bench/bench_check.py``. Target (issue 7):
under 10 s in all. The plan elements carry no stated attributes here, so the
LandXML part times the recomputation and the join checks. The DXF read is shown
beside a bare ``ezdxf.readfile`` of the same file (the baseline, same run). The
drawing is made by giving ezdxf the polyline's vertex array whole (adding 250,000
vertices through ``add_lwpolyline`` copies the array at every vertex and takes
minutes); its time is printed apart and is not the product's.
"""

from __future__ import annotations

import sys
import tempfile
import time
from pathlib import Path

import numpy as np

sys.path.insert(0, str(Path(__file__).resolve().parent.parent))

from bench._common import synthetic_plan, synthetic_profile  # noqa: E402
from gradeline.analysis import check, drawing_check
from gradeline.geometry import horizontal, vertical
from gradeline.io.dxf_read import read_drawing, read_linework  # noqa: E402
from gradeline.model import Alignment, Document  # noqa: E402
from gradeline.model.units import Units  # noqa: E402


def main() -> None:
    import ezdxf

    plan = synthetic_plan(250)
    length = horizontal.solve(plan).end
    prof = synthetic_profile(401, spacing=length / 400)
    al = Alignment("Fifty-mile test", length=length, profiles=(prof,), horizontal=plan)
    doc = Document("bench.xml", Units("foot"), (al,))
    geom = vertical.solve(prof)
    s = np.linspace(geom.start, geom.end, 250_000)
    with tempfile.TemporaryDirectory() as tmp:
        path = Path(tmp) / "profile.dxf"
        from ezdxf.entities.lwpolyline import LWPolylinePoints

        t0 = time.perf_counter()
        dxf = ezdxf.new("R2010")
        pline = dxf.modelspace().add_lwpolyline([], dxfattribs={"layer": "FG"})
        y = (vertical.elevation(geom, s) - 900.0) * 10.0
        zero = np.zeros_like(s)
        pline.lwpoints = LWPolylinePoints(np.column_stack([s, y, zero, zero, zero]).tolist())
        dxf.saveas(path)
        t_setup = time.perf_counter() - t0
        t0 = time.perf_counter()
        ezdxf.readfile(path)
        t_bare = time.perf_counter() - t0
        t0 = time.perf_counter()
        findings = check.check_document(doc)
        t_xml = time.perf_counter() - t0
        t0 = time.perf_counter()
        lines = read_linework(read_drawing(str(path)), "FG", 0.0005)
        t_read = time.perf_counter() - t0
        t0 = time.perf_counter()
        result = drawing_check.check_linework(lines, geom, 0.01, 10.0, 900.0, "given")
        t_cmp = time.perf_counter() - t0
    print(
        f"{len(plan.elements)} plan elements, {len(prof.pvis)} PVIs, {length:,.0f} ft; "
        f"{len(findings)} LandXML checks in {t_xml:.2f} s"
    )
    print(f"(drawing written for the benchmark in {t_setup:.2f} s, not timed below)")
    print(
        f"DXF: {sum(len(x) for x in lines):,} vertices read in {t_read:.2f} s "
        f"(bare ezdxf.readfile {t_bare:.2f} s, {t_read / t_bare:.2f}x), "
        f"{result.samples:,} samples compared in {t_cmp:.2f} s "
        f"(max deviation {result.max_deviation:.4f} ft)"
    )
    print(f"total {t_xml + t_read + t_cmp:.2f} s")


if __name__ == "__main__":
    main()
