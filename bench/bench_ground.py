"""Benchmark: reading TIN surfaces of 0.25 to 2 million faces, and sampling the
largest along a 10-mile alignment at every edge crossing and every foot.

Every figure stands beside a baseline measured in the same run:

* parse: our reader against the raw byte-scan floor -- the whole file read at
  once, the ``Pnts``/``Faces`` blocks cut out, their tags blanked with
  ``bytes.replace`` and the numbers converted by ``np.fromstring``, with no
  check of any kind (no reader can turn the bytes into arrays with less work) --
  and against the iterparse path (every ``P``/``F`` element through lxml, what
  the reader did before and still does for files the byte path does not take)
  and a bare lxml ``iterparse`` pass that only visits the elements;
* memory: the reader's peak of traced allocations (tracemalloc: numpy arrays,
  bytes) against the size of the arrays it returns;
* sampling: our index + interpolation against matplotlib's
  ``LinearTriInterpolator`` on the same points.

Targets (issue 16): parse at most 1.2x the floor, peak memory at most 2x the
final arrays. Run: ``python bench/bench_ground.py`` (writes the surfaces to a
temporary folder first; about two minutes).
"""

from __future__ import annotations

import os
import resource
import sys
import tempfile
import time
import tracemalloc
from pathlib import Path

import numpy as np

sys.path.insert(0, str(Path(__file__).resolve().parent.parent))

from bench._common import synthetic_plan  # noqa: E402
from bench.make_surface import write  # noqa: E402
from gradeline.geometry import ground, horizontal
from gradeline.io import surface_reader


def byte_floor(path: str) -> tuple[np.ndarray, np.ndarray]:
    """The least work from bytes to arrays: no checks, no ids mapped, no flags."""
    with open(path, "rb") as fh:
        data = fh.read()
    p0, p1 = data.index(b"<Pnts>") + 6, data.index(b"</Pnts>")
    f0, f1 = data.index(b"<Faces>") + 7, data.index(b"</Faces>")
    pts = data[p0:p1].replace(b'<P id="', b" ").replace(b'">', b" ").replace(b"</P>", b" ")
    faces = data[f0:f1].replace(b'<F i="1">', b" ").replace(b"<F>", b" ").replace(b"</F>", b" ")
    del data
    return (
        np.fromstring(pts, dtype=np.float64, sep=" ").reshape(-1, 4),
        np.fromstring(faces, dtype=np.int64, sep=" ").reshape(-1, 3),
    )


def bare_pass(path: str) -> int:
    from lxml import etree

    n = 0
    for _, el in etree.iterparse(path, events=("end",)):
        n += 1
        el.clear(keep_tail=False)
        parent = el.getparent()
        if parent is not None:
            while el.getprevious() is not None:
                del parent[0]
    return n


def iterparse_path(path: str) -> None:
    list(surface_reader._iter_surfaces(path, None, False))


def best(fn, repeat: int = 3) -> float:
    t_best = float("inf")
    for _ in range(repeat):
        t0 = time.perf_counter()
        fn()
        t_best = min(t_best, time.perf_counter() - t0)
    return t_best


def traced_peak(fn) -> tuple[object, int]:
    tracemalloc.start()
    try:
        got = fn()
        return got, tracemalloc.get_traced_memory()[1]
    finally:
        tracemalloc.stop()


def main() -> None:
    hz = horizontal.solve(synthetic_plan(39), 0.0)
    pn, pe, _ = horizontal.evaluate(hz, 20000.0)  # the pond sits on the alignment
    rows = []
    with tempfile.TemporaryDirectory() as tmp:
        for side in (355, 501, 708, 1000):
            path = os.path.join(tmp, f"terrain-{side}.xml")
            n_pts, n_faces = write(path, side=side, hole=(float(pe), float(pn)))
            size = os.path.getsize(path) / 2**20
            t_floor = best(lambda path=path: byte_floor(path))
            t_ours = best(lambda path=path: surface_reader.read_surface(path))
            surf, peak = traced_peak(lambda path=path: surface_reader.read_surface(path))
            final = sum(
                a.nbytes for a in (surf.ids, surf.x, surf.y, surf.z, surf.faces, surf.hidden)
            )
            t_iter = best(lambda path=path: iterparse_path(path), repeat=1)
            t_bare = best(lambda path=path: bare_pass(path), repeat=1)
            rows.append(
                (n_faces, size, t_ours, t_floor, t_iter, t_bare, peak / 2**20, final / 2**20)
            )
            print(
                f"{n_faces:>9,} faces {size:5.0f} MiB: ours {t_ours:.2f} s, byte floor "
                f"{t_floor:.2f} s ({t_ours / t_floor:.2f}x), iterparse path {t_iter:.2f} s "
                f"({t_iter / t_ours:.1f}x ours), bare iterparse {t_bare:.2f} s; peak "
                f"{peak / 2**20:.0f} MiB for {final / 2**20:.0f} MiB of arrays "
                f"({peak / final:.2f}x)",
                flush=True,
            )
    print()
    print(
        "| faces | MiB | ours | byte floor | ratio | iterparse path | bare iterparse "
        "| peak / arrays |"
    )
    print("| --- | --- | --- | --- | --- | --- | --- | --- |")
    for n_faces, size, t_ours, t_floor, t_iter, t_bare, peak, final in rows:
        print(
            f"| {n_faces:,} | {size:.0f} | {t_ours:.2f} s | {t_floor:.2f} s | "
            f"{t_ours / t_floor:.2f}x | {t_iter:.2f} s | {t_bare:.2f} s | "
            f"{peak:.0f} / {final:.0f} MiB = {peak / final:.2f}x |"
        )
    print()
    # the largest surface: index, sampling, and matplotlib as the reference
    t0 = time.perf_counter()
    index = ground.TriangleIndex(surf)
    t_index = time.perf_counter() - t0
    t0 = time.perf_counter()
    s, z = ground.sample_alignment(hz, index, step=1.0)
    t_sample = time.perf_counter() - t0
    n, e, _ = horizontal.evaluate(hz, s)
    t0 = time.perf_counter()
    z2 = ground.interpolate(index, e, n)
    t_interp = time.perf_counter() - t0
    peak_rss = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024  # before matplotlib
    import matplotlib.tri as mtri

    t0 = time.perf_counter()
    tri = mtri.Triangulation(surf.x, surf.y, triangles=surf.visible)
    ref = mtri.LinearTriInterpolator(tri, surf.z)
    zr = np.ma.filled(ref(e, n), np.nan)
    t_mpl = time.perf_counter() - t0
    ok = np.isfinite(zr) & np.isfinite(z2)
    assert np.allclose(z2[ok], zr[ok], rtol=1e-9)
    print(
        f"alignment {hz.end - hz.start:,.0f} ft: {len(s):,} stations (every foot and every edge "
        f"crossing), {int(np.isnan(z).sum()):,} off the surface or in the hole"
    )
    print(
        f"index {t_index:.2f} s + sampling {t_sample:.2f} s; interpolation at the same "
        f"{len(s):,} points {t_interp:.3f} s vs matplotlib (triangulation + interpolator) "
        f"{t_mpl:.2f} s = {t_mpl / (t_index + t_interp):.1f}x"
    )
    print(
        f"total for the largest (parse + index + sampling) {t_ours + t_index + t_sample:.2f} s; "
        f"peak resident memory of this process {peak_rss:.0f} MB"
    )


if __name__ == "__main__":
    main()
