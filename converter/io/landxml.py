"""LandXML reader: the only module that touches XML.

The parser is strict and safe: no DTD is loaded, no entity is expanded, no
network is used, and a document that declares a DOCTYPE is refused outright
(LandXML needs none). Element names are matched by local name, so LandXML
1.0, 1.1, 1.2 and national extensions that keep the names all read alike.
The encoding the XML declaration names is honoured (the bytes go to lxml).
"""

from __future__ import annotations

import math
import os
from collections.abc import Iterator

from lxml import etree

from gradeline.errors import GradelineError, InputError, ModelError
from gradeline.model import (
    Alignment,
    Broken,
    Document,
    GroundPiece,
    GroundProfile,
    HCurve,
    HElement,
    HIrregular,
    HLine,
    HorizontalAlignment,
    HSpiral,
    Notice,
    PIEntry,
    Profile,
    PVISpec,
    SourceRef,
    StationEquation,
)
from gradeline.model.superelevation import STATION_FIELDS, Superelevation
from gradeline.model.units import ANGLE_UNITS, LINEAR_UNITS, Units

__all__ = ["parse_bytes", "read"]


#: Largest file gradeline reads at all (bytes).
MAX_DOCUMENT_BYTES = 4 * 1024 * 1024 * 1024

#: Files at least this large are parsed streaming, dropping TIN points and faces.
STREAM_FROM = 16 * 1024 * 1024


def _parser() -> etree.XMLParser:
    return etree.XMLParser(
        resolve_entities=False,
        no_network=True,
        load_dtd=False,
        dtd_validation=False,
        huge_tree=False,
        collect_ids=False,
    )


def _local(el: etree._Element) -> str:
    tag = el.tag
    if not isinstance(tag, str):
        return ""
    return tag.rpartition("}")[2]


def _children(el: etree._Element, name: str) -> Iterator[etree._Element]:
    for child in el:
        if _local(child) == name:
            yield child


def _child(el: etree._Element, name: str) -> etree._Element | None:
    return next(_children(el, name), None)


def _unit_key(name: str) -> str:
    """A unit name compared without case or inner spacing ("Decimal  Degrees")."""
    return " ".join(name.split()).lower()


#: Spelling-tolerant lookup of the unit names LandXML lists.
_LINEAR_BY_KEY = {_unit_key(u): u for u in LINEAR_UNITS}
_ANGLE_BY_KEY = {_unit_key(u): u for u in ANGLE_UNITS}

#: The LandXML schema default of ``angularUnit`` and ``directionUnit``
#: (LandXML-1.2.xsd: ``default="radians"``; its Units documentation: "All angular
#: and direction values default to radians unless otherwise noted").
SCHEMA_ANGLE_DEFAULT = "radians"


class _Reader:
    def __init__(self, path: str) -> None:
        self.path = path
        self.notices: list[Notice] = []
        self.root: etree._Element | None = None
        self.cg_points: dict[str, etree._Element] | None = None  # by name, read on first use

    def notice(self, kind: str, el: etree._Element, message: str) -> None:
        self.notices.append(Notice(kind, message, self.src(el), _local(el)))

    def located(self, err: GradelineError, el: etree._Element) -> InputError:
        """An error of one part of the file as an input error that names where it is."""
        if isinstance(err, InputError):
            return err
        return InputError(err.message, err.source or self.src(el), err.element or _local(el))

    def src(self, el: etree._Element) -> SourceRef:
        return SourceRef(self.path, el.sourceline)

    def fail(self, el: etree._Element, message: str) -> InputError:
        return InputError(message, self.src(el), _local(el))

    def number(self, el: etree._Element, text: str, what: str) -> float:
        try:
            value = float(text)
        except ValueError:
            raise self.fail(el, f"{what} {text!r} is not a number") from None
        if not math.isfinite(value):
            raise self.fail(el, f"{what} must be a finite number, got {text!r}")
        if abs(value) > 1e12:
            raise self.fail(el, f"{what} {text!r} is not a plausible survey value")
        return value

    def attr(self, el: etree._Element, name: str, default: float | None = None) -> float | None:
        raw = el.get(name)
        if raw is None or raw.strip() == "":
            return default
        return self.number(el, raw.strip(), name)

    def required(self, el: etree._Element, name: str) -> float:
        value = self.attr(el, name)
        if value is None:
            raise self.fail(el, f"missing required attribute {name!r}")
        return value

    def numbers(self, el: etree._Element, what: str) -> list[float]:
        text = (el.text or "").replace(",", " ")
        return [self.number(el, tok, what) for tok in text.split()]

    # -- document ---------------------------------------------------------
    def document(self, root: etree._Element) -> Document:
        if _local(root) != "LandXML":
            raise self.fail(root, "the root element is not LandXML; is this a LandXML file?")
        self.root = root
        units = self.units(root)
        project_el = _child(root, "Project")
        project = project_el.get("name", "") if project_el is not None else ""
        alignments: list[Alignment] = []
        broken: list[Broken] = []
        seen: dict[str, int] = {}
        for group in _children(root, "Alignments"):
            for al_el in _children(group, "Alignment"):
                name = al_el.get("name") or f"(unnamed, line {al_el.sourceline})"
                if name in seen:  # the first keeps the name; this one is reported
                    err = self.fail(
                        al_el,
                        f"alignment name {name!r} is used twice (first at line "
                        f"{seen[name]}); names must be unique, so this one is not read",
                    )
                    broken.append(Broken(f"{name} (line {al_el.sourceline})", err))
                    continue
                seen[name] = al_el.sourceline or 0
                try:  # one broken alignment never blocks the others
                    alignments.append(self.alignment(al_el))
                except (InputError, ModelError) as err:
                    broken.append(Broken(name, self.located(err, al_el)))
        groups = list(_children(root, "Alignments"))
        where = SourceRef(self.path, (groups[0] if groups else root).sourceline)
        terrain = any(True for _ in _children(root, "Surfaces")) or any(
            True for _ in _children(root, "CgPoints")
        )
        return Document(
            self.path,
            units,
            tuple(alignments),
            project,
            where,
            tuple(broken),
            tuple(self.notices),
            terrain,
        )

    def units(self, root: etree._Element) -> Units:
        units_el = _child(root, "Units")
        if units_el is None:
            raise self.fail(
                root, "no Units element; gradeline cannot tell feet from metres without it"
            )
        system = _child(units_el, "Imperial")
        if system is None:
            system = _child(units_el, "Metric")
        if system is None:
            raise self.fail(units_el, "Units needs an Imperial or a Metric child")
        raw_linear = system.get("linearUnit")
        if raw_linear is None:
            raise self.fail(system, "missing required attribute 'linearUnit'")
        linear = _LINEAR_BY_KEY.get(_unit_key(raw_linear))
        if linear is None:
            raise self.fail(
                system,
                f"linearUnit {raw_linear!r} is not supported; use one of "
                + ", ".join(LINEAR_UNITS),
            )
        if linear != raw_linear:
            self.notice("spelling", system, f"linearUnit {raw_linear!r} read as {linear!r}")
        angles = []
        for name in ("angularUnit", "directionUnit"):
            raw = system.get(name)
            if raw is None:
                self.notice(
                    "default",
                    system,
                    f"no {name}: the LandXML schema default {SCHEMA_ANGLE_DEFAULT!r} applies",
                )
                angles.append(SCHEMA_ANGLE_DEFAULT)
                continue
            value = _ANGLE_BY_KEY.get(_unit_key(raw))
            if value is None:
                raise self.fail(
                    system,
                    f"{name} {raw!r} is not supported; use one of " + ", ".join(ANGLE_UNITS),
                )
            if value != raw:
                self.notice("spelling", system, f"{name} {raw!r} read as {value!r}")
            angles.append(value)
        return Units(linear, angles[0], angles[1])

    def alignment(self, el: etree._Element) -> Alignment:
        name = el.get("name")
        if not name:
            raise self.fail(el, "missing required attribute 'name'")
        sta_start = self.attr(el, "staStart", 0.0)
        length = self.attr(el, "length")
        equations = tuple(
            sorted(
                (
                    StationEquation(
                        back=self.required(eq, "staBack"),
                        ahead=self.required(eq, "staAhead"),
                        internal=self.required(eq, "staInternal"),
                        source=self.src(eq),
                    )
                    for eq in _children(el, "StaEquation")
                ),
                key=lambda e: e.internal,
            )
        )
        coord = _child(el, "CoordGeom")
        horizontal = self.coord_geom(coord) if coord is not None else None
        pis_el = _child(el, "AlignPIs")
        if horizontal is None and pis_el is not None:
            horizontal = self.align_pis(pis_el)
            if horizontal is not None:
                self.notice(
                    "computed",
                    pis_el,
                    f"alignment {name!r}: no CoordGeom; lines, "
                    "arcs and spirals computed from the AlignPIs list",
                )
        profiles: list[Profile] = []
        grounds: list[GroundProfile] = []
        broken: list[Broken] = []
        for prof_el in _children(el, "Profile"):
            prof_name = prof_el.get("name") or name
            for pa in _children(prof_el, "ProfAlign"):
                pa_name = pa.get("name") or prof_name
                try:  # one broken profile never blocks the plan or the others
                    profiles.append(self.prof_align(pa, pa_name))
                except (InputError, ModelError) as err:
                    broken.append(Broken(pa_name, self.located(err, pa)))
            for ps in _children(prof_el, "ProfSurf"):
                try:
                    grounds.append(self.prof_surf(ps, ps.get("name") or prof_name))
                except (InputError, ModelError) as err:
                    self.notice("broken", ps, f"ground profile left out: {self.located(err, ps)}")
        supers: list[Superelevation] = []
        for se in _children(el, "Superelevation"):
            try:  # a broken transition is left out with a notice; the alignment reads on
                supers.append(self.superelevation(se, name))
            except (InputError, ModelError) as err:
                self.notice("broken", se, f"superelevation left out: {self.located(err, se)}")
        supers.sort(key=lambda x: x.first if x.first is not None else math.inf)
        names = [p.name for p in profiles]
        for i, p in enumerate(profiles):
            if p.name in names[:i]:
                profiles[i] = Profile(f"{p.name} ({names[:i].count(p.name) + 1})", p.pvis, p.source)
        return Alignment(
            name=name,
            sta_start=float(sta_start or 0.0),
            length=length,
            description=el.get("desc", ""),
            profiles=tuple(profiles),
            grounds=tuple(grounds),
            equations=equations,
            horizontal=horizontal,
            source=self.src(el),
            broken_profiles=tuple(broken),
            superelevations=tuple(supers),
        )

    def superelevation(self, el: etree._Element, alignment: str) -> Superelevation:
        """One ``Superelevation``: its stations (element text) and full rate (percent)."""
        values: dict[str, float] = {}
        rates: list[float] = []
        adverse = None
        for child in el:
            tag = _local(child)
            if tag == "FullSuperelev":
                rates.append(self.number(child, (child.text or "").strip(), tag))
            elif tag == "AdverseSE":
                adverse = (child.text or "").strip() or None
            elif tag in _SUPER_TAGS:
                if tag in values:
                    self.notice("ignored", child, f"a second {tag} in one Superelevation")
                    continue
                values[_SUPER_TAGS[tag]] = self.number(child, (child.text or "").strip(), tag)
        if not rates:
            raise self.fail(el, "a Superelevation without FullSuperelev")
        rate = max(rates, key=abs)
        if len(rates) > 1:
            self.notice(
                "merged",
                el,
                f"alignment {alignment!r}: {len(rates)} FullSuperelev values; the largest, "
                f"{rate:g} %, is the rate",
            )
        pct = abs(rate)
        if 0 < pct < 1.0:
            # no road is superelevated below 1 %: a ratio written where percent belongs
            self.notice(
                "defaulted",
                el,
                f"alignment {alignment!r}: FullSuperelev {rate:g} read as a ratio "
                f"({100 * pct:g} %); LandXML states it in percent",
            )
            pct *= 100.0
        return Superelevation(
            pct / 100.0,
            **values,
            sta_start=self.attr(el, "staStart"),
            sta_end=self.attr(el, "staEnd"),
            adverse=adverse,
            source=self.src(el),
        )

    # -- horizontal geometry ------------------------------------------------
    _STATED = {
        "Line": ("staStart", "length", "dir"),
        "Curve": (
            "staStart",
            "length",
            "radius",
            "chord",
            "delta",
            "dirStart",
            "dirEnd",
            "external",
            "midOrd",
            "tangent",
        ),
        "Spiral": (
            "staStart",
            "length",
            "radiusStart",
            "radiusEnd",
            "theta",
            "totalX",
            "totalY",
            "tanLong",
            "tanShort",
            "dirStart",
            "dirEnd",
            "constant",
        ),
        "IrregularLine": ("staStart", "length", "dir"),
    }

    def point(self, el: etree._Element, name: str, required: bool = True):
        p = _child(el, name)
        if p is None:
            if required:
                raise self.fail(el, f"missing required {name} point")
            return None
        values = self.referenced(p)
        if values is None:
            values = self.numbers(p, f"{name} coordinate")
        if len(values) not in (2, 3):
            raise self.fail(
                p, f"expected 'northing easting [elevation]', found {len(values)} values"
            )
        return (values[0], values[1])

    def stated(self, el: etree._Element, kind: str) -> tuple[tuple[str, float], ...]:
        out = []
        for name in self._STATED[kind]:
            raw = el.get(name)
            if raw is None or raw.strip() == "":
                continue
            if name in ("radiusStart", "radiusEnd") and raw.strip().upper() in ("INF", "INFINITY"):
                out.append((name, math.inf))
                continue
            out.append((name, self.number(el, raw.strip(), name)))
        return tuple(out)

    def radius_attr(self, el: etree._Element, name: str) -> float:
        raw = el.get(name)
        if raw is None or raw.strip() == "":
            raise self.fail(el, f"missing required attribute {name!r} (use INF for a tangent end)")
        if raw.strip().upper() in ("INF", "INFINITY"):
            return math.inf
        value = self.number(el, raw.strip(), name)
        if value <= 0:
            raise self.fail(el, f"{name} must be positive or INF, got {raw.strip()!r}")
        return value

    def referenced(self, el: etree._Element) -> list[float] | None:
        """The coordinates of the ``CgPoint`` named by ``el``'s pntRef, when its text is empty.

        LandXML points may give their coordinates as text or as ``pntRef``, the
        name of a ``CgPoint`` anywhere in the file.
        """
        ref = (el.get("pntRef") or "").strip()
        if not ref or (el.text or "").strip():
            return None
        if self.cg_points is None:
            assert self.root is not None
            self.cg_points = {}
            for cg in self.root.iter("{*}CgPoint"):
                name = (cg.get("name") or "").strip()
                if name and name not in self.cg_points:
                    self.cg_points[name] = cg
        cg = self.cg_points.get(ref)
        if cg is None:
            raise self.fail(el, f"pntRef {ref!r} names no CgPoint in this file")
        return self.numbers(cg, f"CgPoint {ref!r} coordinate")

    def _pi_point(self, el: etree._Element) -> tuple[float, float]:
        values = self.referenced(el)
        if values is None:
            values = self.numbers(el, "PI coordinate")
        if len(values) < 2:
            raise self.fail(el, "expected 'northing easting' for the PI")
        return values[0], values[1]

    def _pi_part(
        self, el: etree._Element, wrappers: tuple[str, ...], inner: str
    ) -> etree._Element | None:
        """The Curve or Spiral of an AlignPI, written bare or inside its wrapper."""
        for name in wrappers:
            w = _child(el, name)
            if w is not None:
                return _child(w, inner) if _child(w, inner) is not None else w
        return None

    def align_pis(self, el: etree._Element) -> HorizontalAlignment | None:
        """``AlignPIs``: a PI list with curve and spiral data, laid out into elements."""
        entries = []
        for api in _children(el, "AlignPI"):
            pi_el = _child(api, "PI")
            point = self._pi_point(pi_el if pi_el is not None else api)
            curve = self._pi_part(api, ("Curve1", "Curve"), "Curve")
            radius = self.radius_attr(curve, "radius") if curve is not None else None
            spirals, kinds = [], []
            for wrappers in (("InSpiral",), ("OutSpiral",)):
                sp = self._pi_part(api, wrappers, "Spiral")
                kinds.append("clothoid" if sp is None else sp.get("spiType", "clothoid"))
                spirals.append(0.0 if sp is None else self.required(sp, "length"))
            if any(spirals) and radius is None:
                raise self.fail(api, "spirals need the curve's radius (Curve1 radius)")
            stated = self.stated(curve, "Curve") if curve is not None else ()
            entries.append(
                PIEntry(
                    point,
                    radius,
                    spirals[0],
                    spirals[1],
                    stated,
                    self.src(api),
                    (kinds[0], kinds[1]),
                )
            )
        if not entries:
            return None
        return HorizontalAlignment((), self.src(el), tuple(entries))

    def coord_geom(self, el: etree._Element) -> HorizontalAlignment | None:
        elements: list[HElement] = []
        for child in el:
            kind = _local(child)
            src = self.src(child)
            if kind == "Line":
                elements.append(
                    HLine(
                        self.point(child, "Start"),
                        self.point(child, "End"),
                        self.stated(child, kind),
                        src,
                    )
                )
            elif kind == "Curve":
                rot = child.get("rot")
                elements.append(
                    HCurve(
                        self.point(child, "Start"),
                        self.point(child, "Center"),
                        self.point(child, "End"),
                        rot,
                        self.point(child, "PI", required=False),
                        self.stated(child, kind),
                        src,
                    )
                )
            elif kind == "Spiral":
                rot = child.get("rot")
                if rot is None:
                    raise self.fail(child, "missing required attribute 'rot' (cw or ccw)")
                spi_type = child.get("spiType", "clothoid")
                length = self.required(child, "length")
                elements.append(
                    HSpiral(
                        self.point(child, "Start"),
                        self.point(child, "End"),
                        length,
                        self.radius_attr(child, "radiusStart"),
                        self.radius_attr(child, "radiusEnd"),
                        rot,
                        spi_type,
                        self.point(child, "PI", required=False),
                        self.stated(child, kind),
                        src,
                    )
                )
            elif kind == "IrregularLine":
                pl = _child(child, "PntList2D")
                values = self.numbers(pl, "point coordinate") if pl is not None else []
                if len(values) % 2:
                    raise self.fail(pl, "expected northing/easting pairs, found an odd count")
                pts = list(zip(values[0::2], values[1::2], strict=True))
                if not pts:
                    start, end = self.point(child, "Start"), self.point(child, "End")
                    pts = [start, end]
                elements.append(HIrregular(tuple(pts), self.stated(child, kind), src))
        if not elements:
            return None
        return HorizontalAlignment(tuple(elements), self.src(el))

    def prof_align(self, el: etree._Element, name: str) -> Profile:
        specs: list[PVISpec] = []
        for child in el:
            kind_name = _local(child)
            if kind_name not in ("PVI", "ParaCurve", "UnsymParaCurve", "CircCurve"):
                continue
            values = self.numbers(child, "station/elevation value")
            if len(values) != 2:
                raise self.fail(
                    child,
                    f"expected 'station elevation' (two numbers), found {len(values)} values",
                )
            station, elev = values
            src = self.src(child)
            if kind_name == "PVI":
                spec = PVISpec(station, elev, "none", source=src)
            elif kind_name == "ParaCurve":
                length = self.required(child, "length")
                spec = PVISpec(station, elev, "parabolic", length / 2.0, length / 2.0, source=src)
            elif kind_name == "UnsymParaCurve":
                spec = PVISpec(
                    station,
                    elev,
                    "unsymmetric",
                    self.required(child, "lengthIn"),
                    self.required(child, "lengthOut"),
                    source=src,
                )
            else:
                radius = self.attr(child, "radius")
                arc = self.attr(child, "length")
                if radius is None and arc is None:
                    raise self.fail(child, "a CircCurve needs a 'radius' or a 'length' attribute")
                spec = PVISpec(station, elev, "circular", radius=radius, arc_length=arc, source=src)
            prev = specs[-1] if specs else None
            if prev is not None and (prev.station, prev.elevation) == (station, elev):
                # the same point written twice (seen in exported files): keep one
                if spec.kind == "none" or spec == prev:
                    self.notice(
                        "merged",
                        child,
                        f"{kind_name} at station {station:g} "
                        f"elevation {elev:g} repeats the entry before it; merged",
                    )
                    continue
                if prev.kind == "none":
                    self.notice(
                        "merged",
                        child,
                        f"PVI at station {station:g} elevation "
                        f"{elev:g} given twice, the second with a curve; merged",
                    )
                    specs[-1] = spec
                    continue
            specs.append(spec)
        return Profile(name, tuple(specs), self.src(el))

    def prof_surf(self, el: etree._Element, name: str) -> GroundProfile:
        pieces = []
        for pl in _children(el, "PntList2D"):
            values = self.numbers(pl, "ground value")
            if len(values) % 2:
                raise self.fail(pl, "expected station/elevation pairs, found an odd count")
            pairs: list[tuple[float, float]] = []
            for pair in zip(values[0::2], values[1::2], strict=True):
                if pairs and pairs[-1] == pair:  # a point written twice: keep one
                    self.notice(
                        "merged",
                        pl,
                        f"ground point {pair[0]:g} {pair[1]:g} repeats the one before it; merged",
                    )
                    continue
                pairs.append(pair)
            pieces.append(
                GroundPiece(tuple(a for a, _ in pairs), tuple(b for _, b in pairs), self.src(pl))
            )
        return GroundProfile(name, tuple(p for p in pieces if p.stations), self.src(el))


#: LandXML Superelevation station elements and the model's field for each.
_SUPER_TAGS = {tag: name for name, tag in STATION_FIELDS}


def _syntax_error(err: etree.XMLSyntaxError, path: str) -> InputError:
    line = err.lineno if err.lineno else 1
    msg = (err.msg or "not well-formed").splitlines()[0]
    msg = msg.split(", line ")[0]  # libxml2 appends the position; keep the reason only
    return InputError(
        f"not well-formed ({msg}); the file may be truncated or not XML at all",
        SourceRef(path, line),
        "XML",
    )


def _document_from_root(root: etree._Element, path: str) -> Document:
    src = SourceRef(path, None)
    tree = root.getroottree()
    if tree.docinfo.doctype or tree.docinfo.internalDTD is not None:
        raise InputError(
            "DOCTYPE declarations are not accepted (LandXML needs none; they can "
            "hide entity expansion or external file access)",
            SourceRef(path, 1),
            "DOCTYPE",
        )
    reader = _Reader(path)
    try:
        return reader.document(root)
    except InputError:
        raise
    except ModelError as err:
        raise InputError(err.message, err.source or src, err.element) from None


def parse_bytes(data: bytes, path: str = "<input>") -> Document:
    """Parse LandXML from bytes.

    Parameters
    ----------
    data : bytes
        The file's bytes; the XML declaration's encoding is honoured.
    path : str
        Name used in error messages.

    Raises
    ------
    InputError
        Not XML, not LandXML, a DOCTYPE, or values that break the model.
    """
    src = SourceRef(path, 1)
    if not data.strip():
        raise InputError("the file is empty", src, "LandXML")
    try:
        root = etree.fromstring(data, _parser())
    except etree.XMLSyntaxError as err:
        raise _syntax_error(err, path) from None
    except (ValueError, LookupError) as err:  # e.g. unknown encoding names
        raise InputError(f"cannot decode the file: {err}", src, "XML") from None
    return _document_from_root(root, path)


def _parse_streaming(path: str) -> Document:
    """Parse a file with iterparse, dropping TIN points and faces as they are read.

    Alignments are small; surfaces can be hundreds of MB. Clearing every ``P``
    and ``F`` element as soon as it ends keeps the tree small; surfaces are read
    separately by :func:`read_surface`.
    """
    context = etree.iterparse(
        path,
        events=("end",),
        tag=("{*}P", "{*}F"),
        resolve_entities=False,
        no_network=True,
        load_dtd=False,
        huge_tree=False,
        collect_ids=False,
    )
    try:
        for _, el in context:
            el.clear(keep_tail=False)
            parent = el.getparent()
            if parent is not None:
                while el.getprevious() is not None:
                    del parent[0]
        root = context.root
    except etree.XMLSyntaxError as err:
        raise _syntax_error(err, path) from None
    return _document_from_root(root, path)


def read(path: str | os.PathLike[str]) -> Document:
    """Read a LandXML file from disk (or an IFC 4.3 file: :mod:`gradeline.io.ifc_read`).

    Raises
    ------
    InputError
        The file is missing, unreadable, too large or not valid LandXML.
    """
    name = os.fspath(path)
    from gradeline.io.ifc_read import looks_like_ifc

    if looks_like_ifc(name):  # IFC 4.3 alignments read into the same model
        from gradeline.io.ifc_read import read_ifc

        return read_ifc(name)
    src = SourceRef(name, 1)
    try:
        size = os.path.getsize(name)
        if size > MAX_DOCUMENT_BYTES:
            raise InputError(
                f"file is {size / 2**20:.0f} MiB; the document reader takes at most "
                f"{MAX_DOCUMENT_BYTES // 2**20} MiB",
                src,
                "LandXML",
            )
        with open(name, "rb") as fh:
            head = fh.read(STREAM_FROM)
    except IsADirectoryError:
        raise InputError("is a folder, not a LandXML file", src, "LandXML") from None
    except OSError as err:
        raise InputError(f"cannot read the file ({err.strerror})", src, "LandXML") from None
    if size < STREAM_FROM:
        return parse_bytes(head, name)
    try:
        return _parse_streaming(name)
    except OSError as err:
        raise InputError(f"cannot read the file ({err.strerror or err})", src, "LandXML") from None


# --------------------------------------------------------------------------- surfaces
