"""LandXML 1.2 writer (the sequence order of the schema; stable bytes)."""

from __future__ import annotations

import math

from lxml import etree

from gradeline.model import (
    Document,
    HCurve,
    HLine,
    HSpiral,
)

__all__ = ["write_landxml"]


LANDXML_NS = "http://www.landxml.org/schema/LandXML-1.2"

_UNIT_ATTRS = {
    "Imperial": {
        "areaUnit": "squareFoot",
        "volumeUnit": "cubicYard",
        "temperatureUnit": "fahrenheit",
        "pressureUnit": "inHG",
    },
    "Metric": {
        "areaUnit": "squareMeter",
        "volumeUnit": "cubicMeter",
        "temperatureUnit": "celsius",
        "pressureUnit": "milliBars",
    },
}


def _num(v: float) -> str:
    text = f"{v:.10f}".rstrip("0").rstrip(".")
    return "0" if text in ("-0", "") else text


def write_landxml(
    doc: Document,
    *,
    date: str = "2000-01-01",
    time: str = "00:00:00",
    application: str = "gradeline",
) -> bytes:
    """A LandXML 1.2 document for ``doc`` (alignments, stationing, plan, profiles).

    Elements are written in the order of the LandXML 1.2 schema's sequences:
    Units, Project, Application, Alignments; in an Alignment, CoordGeom,
    StaEquation, Profile, Superelevation; in a Profile, ProfSurf then ProfAlign. The same input
    gives the same bytes (``date`` and ``time`` are fixed unless given).
    """
    nsmap = {None: LANDXML_NS}
    root = etree.Element(
        f"{{{LANDXML_NS}}}LandXML",
        nsmap=nsmap,
        attrib={"version": "1.2", "date": date, "time": time},
    )

    def sub(parent, tag, attrib=None, text=None):
        el = etree.SubElement(
            parent,
            f"{{{LANDXML_NS}}}{tag}",
            attrib={k: v for k, v in (attrib or {}).items() if v is not None},
        )
        if text is not None:
            el.text = text
        return el

    units = sub(root, "Units")
    system = "Metric" if doc.units.metric else "Imperial"
    sub(
        units,
        system,
        {
            **_UNIT_ATTRS[system],
            "linearUnit": doc.units.linear,
            "angularUnit": doc.units.angular,
            "directionUnit": doc.units.direction,
        },
    )
    if doc.project:
        sub(root, "Project", {"name": doc.project})
    sub(root, "Application", {"name": application, "manufacturer": "gradeline", "version": "1"})
    als = sub(root, "Alignments")

    def pt(p) -> str:
        return f"{_num(p[0])} {_num(p[1])}"

    for al in doc.alignments:
        length = al.length
        if length is None and al.profiles:
            length = al.profiles[0].end - al.sta_start
        a = sub(
            als,
            "Alignment",
            {
                "name": al.name,
                "length": _num(length or 0.0),
                "staStart": _num(al.sta_start),
                "desc": al.description or None,
            },
        )
        if al.horizontal is not None:
            cg = sub(a, "CoordGeom")
            for el in al.horizontal.elements:
                attrs = {k: _num(v) if v != math.inf else "INF" for k, v in el.stated}
                if isinstance(el, HLine):
                    x = sub(cg, "Line", attrs)
                    sub(x, "Start", text=pt(el.start))
                    sub(x, "End", text=pt(el.end))
                elif isinstance(el, HCurve):
                    x = sub(cg, "Curve", {"rot": el.rot, **attrs})
                    sub(x, "Start", text=pt(el.start))
                    sub(x, "Center", text=pt(el.center))
                    sub(x, "End", text=pt(el.end))
                    if el.pi is not None:
                        sub(x, "PI", text=pt(el.pi))
                elif isinstance(el, HSpiral):
                    attrs.update(
                        length=_num(el.length),
                        rot=el.rot,
                        spiType=el.spi_type,
                        radiusStart="INF" if math.isinf(el.radius_start) else _num(el.radius_start),
                        radiusEnd="INF" if math.isinf(el.radius_end) else _num(el.radius_end),
                    )
                    x = sub(cg, "Spiral", attrs)
                    sub(x, "Start", text=pt(el.start))
                    if el.pi is not None:
                        sub(x, "PI", text=pt(el.pi))
                    sub(x, "End", text=pt(el.end))
                else:
                    x = sub(cg, "IrregularLine", attrs)
                    sub(x, "Start", text=pt(el.points[0]))
                    sub(x, "End", text=pt(el.points[-1]))
                    sub(x, "PntList2D", text=" ".join(pt(p) for p in el.points))
        for eq in al.equations:
            sub(
                a,
                "StaEquation",
                {
                    "staBack": _num(eq.back),
                    "staAhead": _num(eq.ahead),
                    "staInternal": _num(eq.internal),
                },
            )
        if al.profiles or al.grounds:
            prof_el = sub(a, "Profile", {"name": al.name})
            for g in al.grounds:
                ps = sub(prof_el, "ProfSurf", {"name": g.name})
                for piece in g.pieces:
                    sub(
                        ps,
                        "PntList2D",
                        text=" ".join(
                            f"{_num(s)} {_num(z)}"
                            for s, z in zip(piece.stations, piece.elevations, strict=True)
                        ),
                    )
            for prof in al.profiles:
                pa = sub(prof_el, "ProfAlign", {"name": prof.name})
                for p in prof.pvis:
                    text = f"{_num(p.station)} {_num(p.elevation)}"
                    if p.kind == "none":
                        sub(pa, "PVI", text=text)
                    elif p.kind == "parabolic":
                        sub(pa, "ParaCurve", {"length": _num(p.length)}, text)
                    elif p.kind == "unsymmetric":
                        sub(
                            pa,
                            "UnsymParaCurve",
                            {"lengthIn": _num(p.length_in), "lengthOut": _num(p.length_out)},
                            text,
                        )
                    else:
                        sub(
                            pa,
                            "CircCurve",
                            {
                                "length": None if p.arc_length is None else _num(p.arc_length),
                                "radius": None if p.radius is None else _num(p.radius),
                            },
                            text,
                        )
        for se in al.superelevations:
            x = sub(
                a,
                "Superelevation",
                {
                    "staStart": None if se.sta_start is None else _num(se.sta_start),
                    "staEnd": None if se.sta_end is None else _num(se.sta_end),
                },
            )
            entry = ("BeginRunoutSta", "BeginRunoffSta", "FullSuperSta")
            for tag, station in se.stations():
                if tag in entry:
                    sub(x, tag, text=_num(station))
            sub(x, "FullSuperelev", text=_num(100 * se.rate))  # percent, as LandXML states it
            for tag, station in se.stations():
                if tag not in entry:
                    sub(x, tag, text=_num(station))
            if se.adverse is not None:
                sub(x, "AdverseSE", text=se.adverse)
    return etree.tostring(root, xml_declaration=True, encoding="UTF-8", pretty_print=True)
