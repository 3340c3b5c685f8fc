"""Write a large synthetic TIN surface as LandXML (smooth terrain with a hole).

    python bench/make_surface.py OUT.xml [--side 1000] [--spacing 60]

A side x side grid of points (1,000,000 by default) triangulated into
2 (side - 1)^2 faces (about 2,000,000), covering the benchmark alignment of
bench/bench_ground.py; faces inside a round pond are invisible (i="1").
"""

from __future__ import annotations

import argparse
import sys

import numpy as np

X0, Y0 = 495000.0, 3995000.0


def write(
    path: str,
    side: int = 1000,
    spacing: float = 60.0,
    hole: tuple[float, float] | None = None,
    *,
    rows: int | None = None,
    origin: tuple[float, float] = (X0, Y0),
) -> tuple[int, int]:
    """Write the surface; ``side`` points across (east) and ``rows`` (default
    ``side``) up (north) from ``origin``. Returns (points, faces)."""
    rows = side if rows is None else rows
    gx, gy = np.meshgrid(
        origin[0] + np.arange(side) * spacing, origin[1] + np.arange(rows) * spacing
    )
    x, y = gx.ravel(), gy.ravel()
    z = 800 + 40 * np.sin(x / 5000.0) + 25 * np.cos(y / 3700.0) + 3 * np.sin((x + y) / 420.0)
    ids = np.arange(1, x.size + 1)
    a = (np.arange(side - 1)[None, :] + side * np.arange(rows - 1)[:, None]).ravel() + 1
    b, c, d = a + 1, a + side, a + side + 1
    faces = np.concatenate([np.column_stack([a, b, d]), np.column_stack([a, d, c])])
    cx = (x[faces[:, 0] - 1] + x[faces[:, 1] - 1] + x[faces[:, 2] - 1]) / 3
    cy = (y[faces[:, 0] - 1] + y[faces[:, 1] - 1] + y[faces[:, 2] - 1]) / 3
    hx, hy = hole if hole is not None else (X0 + 25000, Y0 + 8000)
    hole = np.hypot(cx - hx, cy - hy) < 600
    with open(path, "w", encoding="utf-8") as fh:
        fh.write(
            '<?xml version="1.0" encoding="UTF-8"?>\n'
            '<LandXML xmlns="http://www.landxml.org/schema/LandXML-1.2" version="1.2">\n'
            '  <Units><Imperial linearUnit="foot"/></Units>\n  <Surfaces>\n'
            '    <Surface name="Benchmark terrain"><Definition surfType="TIN"><Pnts>\n'
        )
        for lo in range(0, x.size, 200_000):
            sl = slice(lo, lo + 200_000)
            fh.write(
                "".join(
                    f'<P id="{k}">{n:.3f} {e:.3f} {h:.3f}</P>\n'
                    for k, n, e, h in zip(ids[sl], y[sl], x[sl], z[sl], strict=True)
                )
            )
        fh.write("</Pnts><Faces>\n")
        for lo in range(0, len(faces), 400_000):
            sl = slice(lo, lo + 400_000)
            fh.write(
                "".join(
                    ('<F i="1">' if hid else "<F>") + f"{p} {q} {r}</F>\n"
                    for (p, q, r), hid in zip(faces[sl].tolist(), hole[sl].tolist(), strict=True)
                )
            )
        fh.write("</Faces></Definition></Surface>\n  </Surfaces>\n</LandXML>\n")
    return x.size, len(faces)


def main(argv: list[str] | None = None) -> None:
    p = argparse.ArgumentParser(description=__doc__)
    p.add_argument("out")
    p.add_argument("--side", type=int, default=1000)
    p.add_argument("--spacing", type=float, default=60.0)
    a = p.parse_args(argv)
    n, f = write(a.out, a.side, a.spacing)
    print(f"wrote {a.out}: {n:,} points, {f:,} faces", file=sys.stderr)


if __name__ == "__main__":
    main()
