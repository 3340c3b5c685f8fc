"""Benchmark: the drawing audit of a 49-mile alignment's own profile and plan DXF.

Run: ``python bench/bench_audit.py``. The alignment is the synthetic one of the
other benchmarks (250 plan groups of line, spiral, arc, spiral; 401 PVIs); its
drawings are written by gradeline, so every label agrees and the audit's answer
is known (0 over). Each product figure is printed beside a baseline measured in
the same run:

* reading: ``read_world`` (linework and texts in world coordinates) against a bare
  ``ezdxf.readfile`` of the same file;
* plan linework: ``audit_plan`` against projecting the same sample points on the
  alignment once (``station_offset``: the least the audit must do);
* labels: the audit of every text, per label.
"""

from __future__ import annotations

import sys
import tempfile
import time
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent.parent))

from bench._common import synthetic_plan, synthetic_profile  # noqa: E402
from gradeline import deliverables as dl  # noqa: E402
from gradeline.analysis import label_audit, plan_audit  # noqa: E402
from gradeline.geometry import horizontal  # noqa: E402
from gradeline.geometry.station_offset import station_offset  # noqa: E402
from gradeline.io.dxf_read import read_mapping, read_world  # noqa: E402
from gradeline.model import Alignment, Document  # noqa: E402
from gradeline.model.units import Units  # noqa: E402
from gradeline.solved import solve_alignment  # noqa: E402


def _timed(fn):
    t0 = time.perf_counter()
    out = fn()
    return out, time.perf_counter() - t0


def main() -> None:
    import ezdxf

    plan = synthetic_plan(250)
    length = horizontal.solve(plan).end
    prof = synthetic_profile(401, spacing=length / 400)
    al = Alignment("Audit test", length=length, profiles=(prof,), horizontal=plan)
    doc = Document("bench.xml", Units("foot"), (al,))
    ctx = solve_alignment(doc, al, prof)
    opts = dl.DrawingOptions(50.0, 10.0)
    print(f"alignment {length / 5280:.1f} miles")
    with tempfile.TemporaryDirectory() as tmp:
        paths = {}
        for kind, make in (("profile", dl.profile_dxf), ("plan", dl.plan_dxf)):
            paths[kind] = Path(tmp) / f"{kind}.dxf"
            paths[kind].write_bytes(make(ctx, opts))
        views = {}
        for kind, path in paths.items():
            dxf, bare = _timed(lambda p=path: ezdxf.readfile(p))
            views[kind], ours = _timed(lambda d=dxf: read_world(d, 0.0005))
            v = views[kind]
            print(
                f"{kind:>7} DXF: {len(v.pieces)} pieces, {len(v.texts)} texts; read_world "
                f"{ours:.2f} s after a bare ezdxf.readfile of {bare:.2f} s "
                f"(read and view together {(bare + ours) / bare:.2f}x the bare read)"
            )
        pieces = [p for p in views["plan"].pieces if p.layer == "PLAN-ALIGNMENT"]
        hz = ctx.horizontal
        assert hz is not None
        step = plan_audit._step(pieces, hz)
        pts = plan_audit._sample(pieces, step)
        _, floor = _timed(lambda: station_offset(hz, pts[:, 1], pts[:, 0]))
        audit, t_plan = _timed(lambda: plan_audit.audit_plan(pieces, hz, 0.01, "PLAN-ALIGNMENT"))
        assert not audit.over and not audit.uncovered and not audit.pieces
        print(
            f"   plan linework: {audit.samples} samples, audit {t_plan:.2f} s; projecting "
            f"them once {floor:.2f} s (baseline); {t_plan / floor:.2f}x; max deviation "
            f"{audit.max_deviation:.4f} ft"
        )
        stored = read_mapping(ezdxf.readfile(paths["profile"]))
        exag, datum = float(stored["exaggeration"]), float(stored["datum"])
        for kind in ("profile", "plan"):
            texts = views[kind].texts
            if kind == "profile":
                checks, t = _timed(
                    lambda tx=texts: label_audit.audit_profile_labels(tx, ctx, exag, datum, 0.01)
                )
            else:
                checks, t = _timed(
                    lambda tx=texts: label_audit.audit_plan_labels(tx, ctx, lambda p: p, 0.01)
                )
            over = sum(c.verdict == "over" for c in checks)
            other = sum(c.verdict in ("unread", "untied") for c in checks)
            assert over == 0 and other == 0, (kind, over, other)
            print(
                f"{kind:>7} labels: {len(texts)} texts, {len(checks)} values compared in "
                f"{t:.2f} s ({1e6 * t / max(len(texts), 1):.0f} us a text), 0 over"
            )


if __name__ == "__main__":
    main()
