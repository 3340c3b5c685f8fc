"""Transition curves against published reference coordinates and numerical integration.

Outside references:

* buildingSMART International Railway Room, "IFC Rail Unit Test Reference Code",
  repository ``bSI-RailwayRoom/IFC-Rail-Unit-Test-Reference-Code``, folder
  ``alignment_testset/DomainExpert/HorizontalAlignment`` (commit 27167d13): domain
  experts' coordinates, every metre, of single 100 m transitions starting at (0, 0)
  with direction 0, for each IFC 4.3 horizontal segment type and radius pair; file
  names ``<Type>_100.0_<start radius>_<end radius>_1_Meter.txt`` (positive radius:
  turning left). The points at 25, 50, 75 and 100 m are copied below as printed.
* scipy ``integrate.quad`` of the curvature laws as IFC 4.3 ADD2 defines them
  (the normalised transitions of ``IfcAlignmentCantSegmentTypeEnum``, the same
  shapes as the horizontal types): Bloss (3 - 2x) x^2, cosine (1 - cos(pi x))/2,
  sine x - sin(2 pi x)/(2 pi), Helmert 2x^2 up to x = 1/2 and 1 - 2(1 - x)^2 after.
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from scipy import integrate

from gradeline.geometry import horizontal as H
from gradeline.model import HorizontalAlignment, HSpiral

INF = math.inf

#: (gradeline spiType, IFC type, start radius, end radius): {s: (x, y)} from the
#: buildingSMART Railway Room DomainExpert tables named in the module docstring.
REFERENCE = {
    ("clothoid", "CLOTHOID", INF, 300.0): {
        25: (24.9997287340016, 0.0868048827717645),
        50: (49.9913201421206, 0.6943583325787990),
        75: (74.9341088479006, 2.3422790281810800),
        100: (99.7225792178274, 5.5445423656288000),
    },
    ("bloss", "BLOSSCURVE", 300.0, 1000.0): {
        25: (24.9724158171129, 1.0206018995328500),
        50: (49.8053597780260, 3.8677538356523700),
        75: (74.4500896598304, 8.0555882527958600),
        100: (98.9341998449655, 13.1041208021889000),
    },
    ("cosine", "COSINECURVE", 300.0, 1000.0): {
        25: (24.9722807825435, 1.0227452809749100),
        50: (49.8036538655621, 3.8830677560884300),
        75: (74.4461948057091, 8.0839853191835900),
        100: (98.9298874350011, 13.1346246946288000),
    },
    ("sinusoid", "SINECURVE", 300.0, 1000.0): {
        25: (24.9715612944124, 1.0340104188678000),
        50: (49.7939732141883, 3.9681515234718900),
        75: (74.4241176510229, 8.2423961534398400),
        100: (98.9056108357451, 13.3041082336709000),
    },
    ("biquadratic", "HELMERTCURVE", 300.0, 1000.0): {
        25: (24.9720762332955, 1.0259074040970100),
        50: (49.7998035122387, 3.9160314532925500),
        75: (74.4374026755099, 8.1465658189124100),
        100: (98.9204802175707, 13.2003138962093000),
    },
    ("biquadratic", "HELMERTCURVE", INF, 300.0): {
        25: (24.9999784708560, 0.0217013714462925),
        50: (49.9972443634885, 0.3472043614274750),
        75: (74.9561862441150, 1.7135050402099900),
        100: (99.7517634462451, 4.8510605228736400),
    },
    ("biquadratic", "HELMERTCURVE", -1000.0, -300.0): {
        25: (24.9970815712894, -0.3276712951297830),
        50: (49.9681012468824, -1.4925274707413500),
        75: (74.8366484620874, -4.0073273161435300),
        100: (99.4454089089295, -8.3737888896884500),
    },
}


def _spiral(kind: str, r0: float, r1: float, length: float = 100.0) -> HSpiral:
    """A transition from (0, 0) in direction 0 (east); negative radii turn right."""
    rot = "ccw" if (r1 if math.isfinite(r1) else r0) > 0 else "cw"
    # model points are (northing, easting); a PI on the start tangent gives the direction
    return HSpiral((0.0, 0.0), (0.0, length), length, abs(r0), abs(r1), rot, kind, (0.0, 1.0))


@pytest.mark.parametrize(("case", "points"), REFERENCE.items(), ids=lambda c: str(c))
def test_transitions_match_the_buildingsmart_reference_tables(case, points):
    kind, _, r0, r1 = case
    h = H.solve(HorizontalAlignment((_spiral(kind, r0, r1),)))
    s = np.array(sorted(points), dtype=float)
    n, e, _ = H.evaluate(h, s)
    ref = np.array([points[k] for k in sorted(points)])
    # the tables print 13 decimals; a panel across the Helmert curve's mid-length
    # joint was 3.5e-6 m off at the end of the R 300 -> 1000 case
    assert np.abs(e - ref[:, 0]).max() < 1e-9
    assert np.abs(n - ref[:, 1]).max() < 1e-9


def _single_segment_ifc(path, ifc_type: str, r0: float, r1: float) -> None:
    """An IFC shaped like the Railway Room's original test files: one 100 m horizontal
    segment from (0, 0) in direction 0 and no closing zero-length segment (radius 0 =
    infinite, as IFC writes it)."""
    from tests.ifc_build import write_alignment

    radii = [0.0 if math.isinf(r) else r for r in (r0, r1)]
    write_alignment(path, [(0.0, 0.0, 0.0, *radii, 100.0, ifc_type)])


@pytest.mark.parametrize(("case", "points"), REFERENCE.items(), ids=lambda c: str(c))
def test_ifc_segments_read_to_the_reference_coordinates(tmp_path, case, points):
    from gradeline.io.ifc_read import read_ifc
    from gradeline.solved import solve

    kind, ifc_type, r0, r1 = case
    path = tmp_path / "one.ifc"
    _single_segment_ifc(path, ifc_type, r0, r1)
    doc = read_ifc(path)
    # the missing end segment is said, not refused
    assert [n.element for n in doc.notices] == ["IfcAlignmentHorizontal"]
    ctx = solve(doc, "Spor", None)
    assert ctx.horizontal.elements[0].kind == kind
    s = np.array(sorted(points), dtype=float)
    n, e, _ = ctx.plan_at(s)
    ref = np.array([points[k] for k in sorted(points)])
    assert np.abs(e - ref[:, 0]).max() < 1e-9
    assert np.abs(n - ref[:, 1]).max() < 1e-9


def test_unclosed_ifc_layout_of_a_line_and_an_arc(tmp_path):
    """A line then an arc, the arc last and unclosed: its end is the start turned about
    the centre by L / R (common practice), here R = 300 m left, L = 100 m."""
    from gradeline.io.ifc_read import read_ifc
    from gradeline.solved import solve
    from tests.ifc_build import write_alignment

    path = tmp_path / "arc.ifc"
    write_alignment(
        path,
        [
            (0.0, 0.0, 0.0, 0.0, 0.0, 100.0, "LINE"),
            (100.0, 0.0, 0.0, 300.0, 300.0, 100.0, "CIRCULARARC"),
        ],
    )
    ctx = solve(read_ifc(path), "Spor", None)
    n, e, h = ctx.plan_at(np.array([200.0]))
    a = 100.0 / 300.0
    assert float(e[0]) == pytest.approx(100.0 + 300.0 * math.sin(a), abs=1e-9)
    assert float(n[0]) == pytest.approx(300.0 * (1.0 - math.cos(a)), abs=1e-9)
    assert float(h[0]) == pytest.approx(a, abs=1e-12)


# the laws as IFC 4.3 ADD2 states them (module docstring)
LAWS = {
    "bloss": lambda x: (3 - 2 * x) * x * x,
    "cosine": lambda x: (1 - math.cos(math.pi * x)) / 2,
    "sinusoid": lambda x: x - math.sin(2 * math.pi * x) / (2 * math.pi),
    "biquadratic": lambda x: 2 * x * x if x <= 0.5 else 1 - 2 * (1 - x) ** 2,
    "clothoid": lambda x: x,
}


@pytest.mark.parametrize("kind", sorted(LAWS))
@pytest.mark.parametrize(("r0", "r1", "length"), [(300.0, 1000.0, 137.0), (-900.0, -250.0, 61.0)])
def test_arc_to_arc_transitions_match_quadrature(kind, r0, r1, length):
    """Between two radii (curvature never zero) and at lengths whose panel counts are
    odd, against scipy quad of the law; the tangent-to-arc cases are in
    tests/test_horizontal.py."""
    h = H.solve(HorizontalAlignment((_spiral(kind, r0, r1, length),)))
    k0, k1, f = 1 / r0, 1 / r1, LAWS[kind]
    brk = [length / 2]  # the Helmert curve's joint, harmless to the others

    def heading(s: float) -> float:
        pts = brk if s > length / 2 else None
        k = integrate.quad(lambda u: k0 + (k1 - k0) * f(u / length), 0, s, epsabs=1e-15, points=pts)
        return k[0]

    for s in (0.3 * length, 0.5 * length, 0.77 * length, length):
        pts = brk if s > length / 2 else None
        x = integrate.quad(lambda u: math.cos(heading(u)), 0, s, epsabs=1e-13, points=pts)[0]
        y = integrate.quad(lambda u: math.sin(heading(u)), 0, s, epsabs=1e-13, points=pts)[0]
        n, e, hd = H.evaluate(h, s)
        # within 1e-8 m: one 8-node panel over the 61 m sine case is 1.2e-9 m off
        assert float(e) == pytest.approx(x, abs=1e-8)
        assert float(n) == pytest.approx(y, abs=1e-8)
        assert float(hd) == pytest.approx(heading(s), abs=1e-12)


@pytest.mark.parametrize(
    ("ifc_type", "said"), [("CUBIC", "cubic parabola"), ("VIENNESEBEND", "cant")]
)
def test_types_not_read_are_refused_with_the_reason(tmp_path, ifc_type, said):
    from gradeline.io.ifc_read import read_ifc

    path = tmp_path / "t.ifc"
    _single_segment_ifc(path, ifc_type, 300.0, 1000.0)
    doc = read_ifc(path)
    assert doc.alignments == ()
    (broken,) = doc.broken
    assert broken.name == "Spor"
    assert ifc_type in str(broken.error) and said in str(broken.error)
