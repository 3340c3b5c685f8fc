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
        for (s0, z0), (s1, z1) in zip(pvis, pvis[1:]):
            if s0 <= s <= s1:
                return z0 + (z1 - z0) * (s - s0) / (s1 - s0)
        return pvis[-1][1] if s > pvis[-1][0] else pvis[0][1]

    return f


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


def alignment_xml(name, desc, sta_start, length, pvis, nd, ground_pts, extra=""):
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
    </Alignment>
"""


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
    text = header("Marrow County Route 9 realignment (invented)", units)
    text += alignment_xml(name, "Mainline, design speed 50 mph", 1000.0, 5200.0, pvis, 2, gpts)
    text += alignment_xml(lane_name, "Side road", 0.0, 1150.0, lane, 2, lpts)
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
    text = header("Tarnholm Link Road (invented)", units)
    text += alignment_xml(
        "Tarnholm Link Road", "Link road, design speed 80 km/h", 0.0, 2400.0, pvis, 3, gpts, eq
    )
    text += "  </Alignments>\n</LandXML>\n"
    (HERE / "tarnholm-link.xml").write_text(text, encoding="utf-8")


if __name__ == "__main__":
    write_us()
    write_metric()
