"""Write the bundled sample LandXML files (an invented scenario).

Orrin Vale Bypass and Kettle Lane (US customary, feet) and Tarnholm Link Road
(metric) are made-up roads in a made-up county; every number below is invented
for the demo. Run ``python samples/generate.py`` to rewrite the files.
"""

from __future__ import annotations

import math
from pathlib import Path

HERE = Path(__file__).resolve().parent


def ground(stations, base):
    """A smooth invented ground line following ``base`` with rolling relief."""
    out = []
    for s in stations:
        z = base(s) + 3.1 * math.sin(s / 410.0) + 1.4 * math.sin(s / 97.0 + 0.6)
        out.append((s, z))
    return out


def pvi_line(pvis):
    """Piecewise-linear interpolation through (station, elevation) pairs."""

    def f(s):
        for (s0, z0), (s1, z1) in zip(pvis, pvis[1:], strict=False):
            if s0 <= s <= s1:
                return z0 + (z1 - z0) * (s - s0) / (s1 - s0)
        return pvis[-1][1] if s > pvis[-1][0] else pvis[0][1]

    return f


class PlanBuilder:
    """Walk an alignment forward and write its CoordGeom (an invented design).

    x = easting, y = northing, heading counter-clockwise from east. Directions
    are written counter-clockwise from north in decimal degrees. Clothoid
    coordinates come from composite Simpson integration with 4000 steps.
    """

    def __init__(self, north, east, azimuth_deg, nd):
        self.x, self.y = east, north
        self.h = math.radians(90.0 - azimuth_deg)  # azimuth (cw from north) -> math angle
        self.nd = nd
        self.station = 0.0
        self.out = []

    def p(self, x, y):
        return f"{y:.{self.nd}f} {x:.{self.nd}f}"

    def d(self, h):
        return f"{math.degrees(h - math.pi / 2) % 360.0:.8f}"

    def line(self, length):
        x1 = self.x + length * math.cos(self.h)
        y1 = self.y + length * math.sin(self.h)
        nd = self.nd
        self.out.append(
            f'        <Line staStart="{self.station:.{nd}f}" length="{length:.{nd}f}" '
            f'dir="{self.d(self.h)}"><Start>{self.p(self.x, self.y)}</Start>'
            f"<End>{self.p(x1, y1)}</End></Line>"
        )
        self.x, self.y, self.station = x1, y1, self.station + length

    def arc(self, radius, delta_deg, turn):
        sign = 1.0 if turn == "left" else -1.0
        delta = math.radians(delta_deg)
        cx = self.x - sign * radius * math.sin(self.h)
        cy = self.y + sign * radius * math.cos(self.h)
        h1 = self.h + sign * delta
        x1 = cx + sign * radius * math.sin(h1)
        y1 = cy - sign * radius * math.cos(h1)
        t = radius * math.tan(delta / 2)
        pix, piy = self.x + t * math.cos(self.h), self.y + t * math.sin(self.h)
        length = radius * delta
        chord = 2 * radius * math.sin(delta / 2)
        nd = self.nd
        self.out.append(
            f'        <Curve rot="{"ccw" if sign > 0 else "cw"}" crvType="arc" '
            f'staStart="{self.station:.{nd}f}" length="{length:.{nd}f}" '
            f'radius="{radius:.{nd}f}" chord="{chord:.{nd}f}" delta="{delta_deg:.8f}" '
            f'dirStart="{self.d(self.h)}" dirEnd="{self.d(h1)}">'
            f"<Start>{self.p(self.x, self.y)}</Start><Center>{self.p(cx, cy)}</Center>"
            f"<End>{self.p(x1, y1)}</End><PI>{self.p(pix, piy)}</PI></Curve>"
        )
        self.x, self.y, self.h, self.station = x1, y1, h1, self.station + length

    def spiral(self, length, radius, turn, entering):
        """Clothoid between a tangent and radius (entering) or back (leaving)."""
        sign = 1.0 if turn == "left" else -1.0
        k0, k1 = (0.0, sign / radius) if entering else (sign / radius, 0.0)
        n = 4000
        hs = lambda s: self.h + k0 * s + (k1 - k0) * s * s / (2 * length)  # noqa: E731
        step = length / n
        sx = sy = 0.0
        for i in range(n + 1):
            w = 1 if i in (0, n) else (4 if i % 2 else 2)
            sx += w * math.cos(hs(i * step))
            sy += w * math.sin(hs(i * step))
        dx, dy = sx * step / 3, sy * step / 3
        h1 = hs(length)
        theta = length / (2 * radius)
        # local tangent-frame values (tangent end as origin)
        frame_h = self.h if entering else h1
        ux, uy = math.cos(frame_h), math.sin(frame_h)
        total_x = abs(dx * ux + dy * uy)
        total_y = abs(-dx * uy + dy * ux)
        tan_long = total_x - total_y / math.tan(theta)
        tan_short = total_y / math.sin(theta)
        if entering:
            pix, piy = self.x + tan_long * ux, self.y + tan_long * uy
        else:
            pix = self.x + dx - tan_long * ux
            piy = self.y + dy - tan_long * uy
        nd = self.nd
        r0 = "INF" if entering else f"{radius:.{nd}f}"
        r1 = f"{radius:.{nd}f}" if entering else "INF"
        self.out.append(
            f'        <Spiral rot="{"ccw" if sign > 0 else "cw"}" spiType="clothoid" '
            f'staStart="{self.station:.{nd}f}" length="{length:.{nd}f}" radiusStart="{r0}" '
            f'radiusEnd="{r1}" theta="{math.degrees(theta):.8f}" totalX="{total_x:.{nd}f}" '
            f'totalY="{total_y:.{nd}f}" tanLong="{tan_long:.{nd}f}" '
            f'tanShort="{tan_short:.{nd}f}" dirStart="{self.d(self.h)}" dirEnd="{self.d(h1)}">'
            f"<Start>{self.p(self.x, self.y)}</Start><PI>{self.p(pix, piy)}</PI>"
            f"<End>{self.p(self.x + dx, self.y + dy)}</End></Spiral>"
        )
        self.x, self.y, self.h = self.x + dx, self.y + dy, h1
        self.station += length

    def xml(self, sta_start):
        body = "\n".join(self.out)
        self.out = []
        return f"      <CoordGeom>\n{body}\n      </CoordGeom>\n", self.station


def fmt_pairs(pairs, nd):
    return " ".join(f"{s:.{nd}f} {z:.{nd}f}" for s, z in pairs)


def circ_length(radius, g1, g2):
    return abs(radius) * abs(math.atan(g2) - math.atan(g1))


def us_file():
    bypass = [
        ("PVI", 1000.0, 512.40, {}),
        ("ParaCurve", 1750.0, 530.15, {"length": "600"}),
        ("ParaCurve", 2600.0, 512.90, {"length": "800"}),
        ("UnsymParaCurve", 3450.0, 538.40, {"lengthIn": "300", "lengthOut": "500"}),
        ("ParaCurve", 4300.0, 521.40, {"length": "500"}),
        ("ParaCurve", 5000.0, 526.00, {"length": "400"}),
        ("PVI", 6200.0, 519.00, {}),
    ]
    lane = [
        ("PVI", 0.0, 520.00, {}),
        ("PVI", 300.0, 514.60, {}),
        ("ParaCurve", 700.0, 510.20, {"length": "300"}),
        ("PVI", 1150.0, 518.30, {}),
    ]
    return "Orrin Vale Bypass", bypass, "Kettle Lane", lane


def offset_stations(coord_xml, sta_start, nd):
    """Shift the staStart attributes written from 0 to the alignment's staStart."""
    import re

    return re.sub(
        r'staStart="([0-9.]+)"',
        lambda m: f'staStart="{float(m.group(1)) + sta_start:.{nd}f}"',
        coord_xml,
    )


def alignment_xml(name, desc, sta_start, length, pvis, nd, ground_pts, extra="", after=""):
    rows = []
    for kind, s, z, attrs in pvis:
        a = "".join(f' {k}="{v}"' for k, v in attrs.items())
        rows.append(f"          <{kind}{a}>{s:.{nd}f} {z:.{nd}f}</{kind}>")
    body = "\n".join(rows)
    return f"""    <Alignment name="{name}" desc="{desc}" staStart="{sta_start:.{nd}f}" length="{length:.{nd}f}">
{extra}      <Profile name="{name}">
        <ProfSurf name="Existing ground">
          <PntList2D>{fmt_pairs(ground_pts, nd)}</PntList2D>
        </ProfSurf>
        <ProfAlign name="Finished grade">
{body}
        </ProfAlign>
      </Profile>
{after}    </Alignment>
"""


def superelevation_xml(transitions):
    """``Superelevation`` elements: (NC, LC, FS begin, FS end, LC, NC, full rate %)."""
    tags = ("BeginRunoutSta", "BeginRunoffSta", "FullSuperSta")
    exit_tags = ("RunoffSta", "StartofRunoutSta", "EndofRunoutSta")
    out = []
    for *st, rate in transitions:
        rows = [f"        <{t}>{s:.2f}</{t}>" for t, s in zip(tags, st[:3], strict=True)]
        rows.append(f"        <FullSuperelev>{rate:.1f}</FullSuperelev>")
        rows += [f"        <{t}>{s:.2f}</{t}>" for t, s in zip(exit_tags, st[3:], strict=True)]
        out.append(
            f'      <Superelevation staStart="{st[2]:.2f}" staEnd="{st[3]:.2f}">\n'
            + "\n".join(rows)
            + "\n      </Superelevation>\n"
        )
    return "".join(out)


def header(project, units):
    return f"""<?xml version="1.0" encoding="UTF-8"?>
<LandXML xmlns="http://www.landxml.org/schema/LandXML-1.2" version="1.2" date="2026-11-30" time="09:00:00">
  <Units>
{units}
  </Units>
  <Project name="{project}" desc="Invented sample scenario for gradeline; not a real project"/>
  <Application name="gradeline sample generator" version="1"/>
  <Alignments name="Sample alignments">
"""


def write_us():
    name, pvis, lane_name, lane = us_file()
    base = pvi_line([(s, z) for _, s, z, _ in pvis])
    gpts = ground([1000.0 + 50.0 * i for i in range(105)], lambda s: base(s) - 1.5)
    lbase = pvi_line([(s, z) for _, s, z, _ in lane])
    lpts = ground([25.0 * i for i in range(47)], lambda s: lbase(s) + 0.8)
    units = (
        '    <Imperial areaUnit="squareFoot" linearUnit="USSurveyFoot" volumeUnit="cubicYard"'
        ' temperatureUnit="fahrenheit" pressureUnit="inHG" angularUnit="decimal degrees"'
        ' directionUnit="decimal degrees"/>'
    )
    plan = PlanBuilder(10250.0, 20400.0, 68.0, 6)
    plan.line(900.0)
    plan.spiral(250.0, 1200.0, "right", True)
    plan.arc(1200.0, 28.0 - math.degrees(250.0 / 1200.0), "right")
    plan.spiral(250.0, 1200.0, "right", False)
    plan.line(950.0)
    plan.arc(1500.0, 35.0, "left")
    plan.line(5200.0 - plan.station)
    coord, total = plan.xml(1000.0)
    coord = offset_stations(coord, 1000.0, 6)
    lane_plan = PlanBuilder(10610.0, 21210.0, 158.0, 6)
    lane_plan.line(380.0)
    lane_plan.arc(600.0, 42.0, "left")
    lane_plan.line(1150.0 - lane_plan.station)
    lane_coord, lane_total = lane_plan.xml(0.0)
    text = header("Marrow County Route 9 realignment (invented)", units)
    # the designer's superelevation for 50 mph, e max 8 %: over the spirals of curve 1
    # (7.0 %), two thirds of a 150 ft runoff before the PC of curve 2 (6.2 %)
    supers = superelevation_xml(
        [
            (1828.57, 1900.00, 2150.00, 2486.43, 2736.43, 2807.86, 7.0),
            (3538.04, 3586.43, 3736.43, 4552.73, 4702.73, 4751.12, 6.2),
        ]
    )
    text += alignment_xml(
        name, "Mainline, design speed 50 mph", 1000.0, total, pvis, 2, gpts, coord, supers
    )
    text += alignment_xml(lane_name, "Side road", 0.0, lane_total, lane, 2, lpts, lane_coord)
    text += "  </Alignments>\n</LandXML>\n"
    (HERE / "orrin-vale-bypass.xml").write_text(text, encoding="utf-8")


def write_metric():
    pv = [(0.0, 84.200), (380.0, 92.560), (820.0, 86.400), (1500.0, 98.300), (2400.0, 93.800)]
    g = [(pv[i + 1][1] - pv[i][1]) / (pv[i + 1][0] - pv[i][0]) for i in range(len(pv) - 1)]
    r_crest, r_sag = -6000.0, 4000.0
    pvis = [
        ("PVI", *pv[0], {}),
        (
            "CircCurve",
            *pv[1],
            {"length": f"{circ_length(r_crest, g[0], g[1]):.4f}", "radius": f"{r_crest:.1f}"},
        ),
        (
            "CircCurve",
            *pv[2],
            {"length": f"{circ_length(r_sag, g[1], g[2]):.4f}", "radius": f"{r_sag:.1f}"},
        ),
        ("ParaCurve", *pv[3], {"length": "240"}),
        ("PVI", *pv[4], {}),
    ]
    base = pvi_line(pv)
    gpts = ground([20.0 * i for i in range(121)], lambda s: 0.3048 * 0 + base(s) - 0.6)
    gpts = [(s, z * 1.0 - 0.0) for s, z in gpts]
    units = (
        '    <Metric areaUnit="squareMeter" linearUnit="meter" volumeUnit="cubicMeter"'
        ' temperatureUnit="celsius" pressureUnit="milliBars" angularUnit="decimal degrees"'
        ' directionUnit="decimal degrees"/>'
    )
    eq = '      <StaEquation staBack="1200.000" staAhead="1250.000" staInternal="1200.000" desc="Chainage adjusted at the Tarn bridge"/>\n'
    plan = PlanBuilder(6712400.0, 387150.0, 112.0, 6)
    plan.line(320.0)
    plan.spiral(80.0, 450.0, "left", True)
    plan.arc(450.0, 40.0 - math.degrees(80.0 / 450.0), "left")
    plan.spiral(80.0, 450.0, "left", False)
    plan.line(560.0)
    plan.arc(900.0, 22.0, "right")
    plan.line(2400.0 - plan.station)
    coord, total = plan.xml(0.0)
    text = header("Tarnholm Link Road (invented)", units)
    text += alignment_xml(
        "Tarnholm Link Road",
        "Link road, design speed 80 km/h",
        0.0,
        total,
        pvis,
        3,
        gpts,
        coord + eq,
    )
    text += "  </Alignments>\n"

    def height(x, y):
        return (
            86.0
            + 0.008 * (x - 387150.0)
            + 2.5 * math.sin((y - 6712000.0) / 90.0)
            + 1.2 * math.sin(x / 60.0)
        )

    text += "  <Surfaces>\n"
    text += tin_xml("Survey 2026 west", 387100.0, 388100.0, 6711950.0, 6712450.0, 20.0, height)
    text += "  </Surfaces>\n</LandXML>\n"
    (HERE / "tarnholm-link.xml").write_text(text, encoding="utf-8")


def tin_xml(name, x0, x1, y0, y1, step, height, hole=None, nd=3):
    """A TIN surface on a regular grid (two triangles a cell) as LandXML text.

    ``hole`` = (x, y, r): faces whose centroid lies within r are invisible (i="1").
    """
    xs = [x0 + step * i for i in range(int(round((x1 - x0) / step)) + 1)]
    ys = [y0 + step * j for j in range(int(round((y1 - y0) / step)) + 1)]
    nx = len(xs)
    pts = []
    for j, y in enumerate(ys):
        for i, x in enumerate(xs):
            pts.append(
                f'          <P id="{j * nx + i + 1}">{y:.{nd}f} {x:.{nd}f} {height(x, y):.{nd}f}</P>'
            )
    faces = []
    for j in range(len(ys) - 1):
        for i in range(nx - 1):
            a, b = j * nx + i + 1, j * nx + i + 2
            c, d = (j + 1) * nx + i + 1, (j + 1) * nx + i + 2
            for tri in ((a, b, d), (a, d, c)):
                cx = sum(xs[(k - 1) % nx] for k in tri) / 3
                cy = sum(ys[(k - 1) // nx] for k in tri) / 3
                hidden = hole is not None and math.hypot(cx - hole[0], cy - hole[1]) < hole[2]
                flag = ' i="1"' if hidden else ""
                faces.append(f"          <F{flag}>{tri[0]} {tri[1]} {tri[2]}</F>")
    return (
        f'    <Surface name="{name}" desc="Invented survey surface">\n'
        f'      <Definition surfType="TIN">\n        <Pnts>\n'
        + "\n".join(pts)
        + "\n        </Pnts>\n        <Faces>\n"
        + "\n".join(faces)
        + "\n        </Faces>\n      </Definition>\n    </Surface>\n"
    )


def write_terrain():
    """A separate terrain file for the bypass corridor (US survey feet), with a pond."""

    def height(x, y):
        return (
            516.0
            + 11.0 * math.sin((x - 20400.0) / 900.0)
            + 5.0 * math.cos((y - 10300.0) / 480.0)
            + 1.5 * math.sin(x / 130.0 + y / 170.0)
        )

    units = (
        '    <Imperial areaUnit="squareFoot" linearUnit="USSurveyFoot" volumeUnit="cubicYard"'
        ' temperatureUnit="fahrenheit" pressureUnit="inHG" angularUnit="decimal degrees"'
        ' directionUnit="decimal degrees"/>'
    )
    text = header("Marrow County Route 9 realignment (invented)", units).replace(
        '  <Alignments name="Sample alignments">\n', ""
    )
    text += "  <Surfaces>\n"
    text += tin_xml(
        "Existing ground 2026",
        20300.0,
        25400.0,
        10100.0,
        11700.0,
        50.0,
        height,
        hole=(23950.0, 10820.0, 70.0),
        nd=2,
    )
    text += "  </Surfaces>\n</LandXML>\n"
    (HERE / "orrin-vale-terrain.xml").write_text(text, encoding="utf-8")


if __name__ == "__main__":
    write_us()
    write_metric()
    write_terrain()
