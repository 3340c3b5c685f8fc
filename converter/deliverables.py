"""Deliverables: options in, one finished product out (text or bytes).

Each function here makes one deliverable of one solved alignment -- the station
table, the curve table, the profile and plan DXF, the PDF sheets, the review
and the cross-check reports -- from a :class:`~gradeline.solved.SolvedAlignment`
and an options record. The single commands (``gradeline table``, ``dxf`` ...)
and ``gradeline build`` both call these, so a deliverable is the same bytes
whichever way it was made. Nothing here writes files or prints; the callers do.
"""

from __future__ import annotations

import math
import os
from collections.abc import Mapping, Sequence
from dataclasses import dataclass, field
from typing import TYPE_CHECKING, Any

from gradeline.errors import GradelineError, UsageError
from gradeline.model import Document
from gradeline.model.units import UNIT_DEFAULTS
from gradeline.render.outputs import input_name
from gradeline.solved import SolvedAlignment, solve, with_surface

if TYPE_CHECKING:
    from gradeline.analysis.findings import Finding, Tolerances
    from gradeline.present.layout import DraftingLayout
    from gradeline.sheets.pdf import SheetOptions

__all__ = [
    "SHEET_KEYS",
    "CheckOptions",
    "DrawingOptions",
    "ReviewOptions",
    "TableOptions",
    "attach_ground",
    "check_sheet_config",
    "check_findings",
    "check_report",
    "representation_findings",
    "comparison",
    "ifc_bytes",
    "landxml_of",
    "drawing_audit_of",
    "drawing_audits",
    "curve_table",
    "document_warnings",
    "unit_hints",
    "open_alignment",
    "plan_dxf",
    "plan_warnings",
    "profile_dxf",
    "review_report",
    "sheet_options",
    "sheets_pdf",
    "station_table",
]


# --------------------------------------------------------------------------- input
def open_alignment(
    source: str | os.PathLike[str] | Document,
    alignment: str | None = None,
    profile: str | None = None,
    *,
    need_profile: bool = False,
) -> SolvedAlignment:
    """Read a LandXML file (unless given a document) and solve one alignment."""
    from gradeline.io import landxml

    doc = source if isinstance(source, Document) else landxml.read(source)
    return solve(doc, alignment, profile, need_profile=need_profile)


def attach_ground(
    solved: SolvedAlignment, ground: str | os.PathLike[str] | None, surface: str | None
) -> tuple[SolvedAlignment, list[GradelineError]]:
    """Sample a TIN surface of ``ground`` (default: the alignment's own file).

    Returns the alignment with its new ground and the warnings to show (faces
    of zero area that were dropped).
    """
    path = os.fspath(ground) if ground is not None else solved.document.path
    surf, index = loaded_surface(path, surface)
    warnings: list[GradelineError] = []
    if surf.skipped_faces:
        warnings.append(
            GradelineError(
                f"{surf.skipped_faces} zero-area faces of surface {surf.name!r} were ignored",
                surf.source,
                "F",
            )
        )
    return with_surface(solved, surf, index), warnings


#: Surfaces read and indexed in this process, by (file, its size and time, name).
_LOADED: dict[tuple[str, int, int, str | None], tuple[Any, Any]] = {}
_LOADED_MAX = 4


def loaded_surface(path: str | os.PathLike[str], surface: str | None) -> tuple[Any, Any]:
    """A TIN surface and its :class:`~gradeline.geometry.ground.TriangleIndex`, read and
    built once per process: every alignment of a build (and every worker started
    after :func:`preload_surfaces`) shares them. A file changed since is read again."""
    from gradeline.geometry.ground import TriangleIndex
    from gradeline.io.surface_reader import read_surface

    real = os.path.realpath(path)
    try:
        st = os.stat(real)
        key = (real, st.st_mtime_ns, st.st_size, surface)
    except OSError:
        return _index(read_surface(path, surface), TriangleIndex)  # the reader words it
    hit = _LOADED.get(key)
    if hit is None:
        hit = _index(read_surface(path, surface), TriangleIndex)
        while len(_LOADED) >= _LOADED_MAX:
            _LOADED.pop(next(iter(_LOADED)))
        _LOADED[key] = hit
    return hit


def _index(surf: Any, index_type: Any) -> tuple[Any, Any]:
    return surf, index_type(surf)


def preload_surfaces(grounds: Sequence[tuple[str, str | None]]) -> None:
    """Read and index these (file, surface) pairs now (before worker processes fork,
    so they inherit them); one that cannot be read is left for its alignments to report."""
    for path, surface in list(dict.fromkeys(grounds))[:_LOADED_MAX]:
        try:
            loaded_surface(path, surface)
        except GradelineError:
            pass


def document_warnings(doc: Document) -> list[GradelineError]:
    """What the reader tolerated, defaulted or merged, as one-line warnings."""
    return [GradelineError(n.message, n.source, n.element) for n in doc.notices]


def unit_hints(solved: SolvedAlignment) -> list[GradelineError]:
    """A warning when the stated directions fit another angular unit clearly better."""
    from gradeline.geometry.directions import better_direction_unit

    hz = solved.horizontal
    assert hz is not None
    unit = solved.document.units.direction
    hint = better_direction_unit(hz.alignment, list(hz.elements), unit)
    if hint is None:
        return []
    other, count, total = hint
    own = hz.convention_matches[0]
    return [
        GradelineError(
            f"directions are read in {unit}, which fits {own} of {total} stated directions; "
            f"{other} fits {count}: is the file's directionUnit wrong or missing?",
            hz.alignment.source,
            "CoordGeom",
        )
    ]


def plan_warnings(solved: SolvedAlignment) -> list[GradelineError]:
    """Warnings of one alignment: the reader's notices, profiles that could not be read,
    and plan-geometry findings (gaps, kinks). None of them stops a deliverable."""
    out = document_warnings(solved.document)
    for bad in solved.alignment.broken_profiles:
        out.append(GradelineError(f"profile {bad.name!r} left out: {bad.error}"))
    if solved.horizontal is None:
        return out
    out += unit_hints(solved)
    for f in solved.horizontal.findings:
        element = next((g.element for g in solved.horizontal.elements if g.index == f.index), "")
        out.append(GradelineError(f.message, f.source, element))
    return out


# --------------------------------------------------------------------------- tables
@dataclass(frozen=True, slots=True)
class TableOptions:
    """Rows every ``interval`` plus key points, or exactly at the ``at`` station labels."""

    interval: float | None = None
    at: tuple[str, ...] | None = None
    format: str = "csv"


def _payload(
    solved: SolvedAlignment, columns: Sequence[str], rows: list[dict[str, Any]]
) -> dict[str, Any]:
    from gradeline.present.tables import column_units

    units = solved.document.units
    return {
        "file": input_name(solved.document.path),
        "alignment": solved.alignment.name,
        "profile": solved.profile.name if solved.profile else None,
        "linear_unit": units.linear,
        "angular_unit": units.angular,
        "direction_unit": units.direction,
        "direction_convention": solved.horizontal.convention if solved.horizontal else None,
        "columns": list(columns),
        "units": column_units(columns, units),
        "rows": [{c: r.get(c) for c in columns} for r in rows],
    }


def _render(
    solved: SolvedAlignment, fmt: str, columns: Sequence[str], rows: list[dict[str, Any]]
) -> str:
    from gradeline.present.tables import column_decimals
    from gradeline.render.outputs import csv_text, json_text

    decimals = column_decimals(columns, solved.document.units)

    def rounded(value: Any, nd: int | None) -> Any:
        if nd is None or not isinstance(value, float):
            return value
        out = round(value, nd)
        return 0.0 if out == 0 else out  # never -0.0

    rows = [{c: rounded(r.get(c), decimals[c]) for c in columns} for r in rows]
    if fmt == "json":
        return json_text(_payload(solved, columns, rows))
    return csv_text(rows, columns)


def station_table(
    solved: SolvedAlignment, opts: TableOptions, warnings: list[GradelineError] | None = None
) -> str:
    """The station/elevation table (with ground columns when a surface is attached).

    Rows cover the plan and the profile together; where only one of them
    reaches, the other's columns are blank. Asked-for stations off the profile
    (or the plan) are listed in ``warnings``.
    """
    from gradeline.present import tables

    if opts.at is not None:
        texts = [t for t in opts.at if t.strip()]
        if not texts:
            raise UsageError("give at least one station", choice="at")
        at = [solved.stationing.internal_of(t, solved.start, solved.end) for t in texts]
        stations, tags = tables.table_stations(solved, at=at)
        if warnings is not None:
            warnings.extend(_off_parts(solved, texts, at))
    else:
        interval = opts.interval or solved.document.units.defaults.table_interval
        stations, tags = tables.table_stations(solved, interval=interval)
    rows = tables.station_rows(solved, stations, tags)
    columns: tuple[str, ...] = tables.STATION_COLUMNS
    if solved.surface is not None:
        columns = tables.add_ground_columns(solved, stations, rows)
    if solved.alignment.superelevations:
        tables.add_super_columns(solved, stations, rows)
        columns += tables.SUPER_COLUMNS
    return _render(solved, opts.format, columns, rows)


def _off_parts(
    solved: SolvedAlignment, texts: Sequence[str], stations: Sequence[float]
) -> list[GradelineError]:
    out = []
    covered = solved.on_profile(stations) if solved.geometry is not None else None
    g = solved.geometry
    for text, on in zip(texts, covered if covered is not None else [], strict=False):
        if not on and g is not None:
            out.append(
                GradelineError(
                    f"station {text.strip()} lies off the profile "
                    f"({solved.stationing.label(g.start)} to "
                    f"{solved.stationing.label(g.end)}); its "
                    "elevation and grade are blank"
                )
            )
    if solved.horizontal is not None:
        hz = solved.horizontal
        for text, on in zip(texts, solved.on_plan(stations), strict=True):
            if not on:
                out.append(
                    GradelineError(
                        f"station {text.strip()} lies off the plan "
                        f"({solved.stationing.label(hz.start)} to "
                        f"{solved.stationing.label(hz.end)}); its "
                        "coordinates are blank"
                    )
                )
    return out


def curve_table(solved: SolvedAlignment, fmt: str = "csv") -> str:
    """Horizontal then vertical curve data, one row a curve."""
    from gradeline.present import tables

    rows = tables.curve_rows(solved)
    columns: tuple[str, ...] = tables.CURVE_COLUMNS
    if solved.alignment.superelevations:
        tables.add_super_curve_columns(solved, rows)
        columns += tables.SUPER_CURVE_COLUMNS
    return _render(solved, fmt, columns, rows)


# --------------------------------------------------------------------------- drawings
@dataclass(frozen=True)
class DrawingOptions:
    """How the DXF drawings are drafted."""

    scale: float | None = None
    exaggeration: float = 10.0
    curves: str = "spline"
    version: str = "R2010"
    layers: Mapping[str, str] = field(default_factory=dict)

    def layout(self, solved: SolvedAlignment) -> DraftingLayout:
        """The drafting layout for the alignment's units."""
        from gradeline.present.layout import default_layout

        lay = default_layout(solved.document.units, self.scale, self.exaggeration)
        return lay.with_layers(dict(self.layers))


def profile_dxf(solved: SolvedAlignment, opts: DrawingOptions) -> bytes:
    """The profile drawing (needs a profile)."""
    from gradeline.present import drafting

    lay = opts.layout(solved)
    drawing = drafting.profile_drawing(solved, lay, opts.curves)
    return _dxf_bytes(solved, opts, lay, drawing)


def _dxf_bytes(solved: SolvedAlignment, opts: DrawingOptions, lay: Any, drawing: Any) -> bytes:
    """A drafted drawing as DXF, in the options' version and curve form."""
    from gradeline.render.dxf import write_dxf

    return write_dxf(
        drawing,
        lay,
        version=opts.version,
        curves=opts.curves,
        linear_unit=solved.document.units.linear,
    )


def plan_dxf(solved: SolvedAlignment, opts: DrawingOptions) -> bytes:
    """The plan drawing (needs plan geometry)."""
    from gradeline.present.plan_drawing import plan_drawing

    if solved.horizontal is None:
        raise UsageError(f"alignment {solved.alignment.name!r} has no CoordGeom; no plan to draw")
    lay = opts.layout(solved)
    drawing = plan_drawing(solved, lay)
    return _dxf_bytes(solved, opts, lay, drawing)


def superelevation_dxf(solved: SolvedAlignment, opts: DrawingOptions) -> bytes:
    """The superelevation diagram along the alignment (needs a stated superelevation)."""
    from gradeline.present.super_diagram import super_panels, superelevation_drawing

    if not solved.alignment.superelevations:
        raise UsageError(
            f"alignment {solved.alignment.name!r} states no superelevation; nothing to draw"
        )
    lay = opts.layout(solved)
    drawing = superelevation_drawing(solved, super_panels(solved), lay.text_height)
    return _dxf_bytes(solved, opts, lay, drawing)


# --------------------------------------------------------------------------- sheets
#: Keys of the ``[sheet]`` table of a configuration file.
#: Title-block text fields of ``[sheet]`` (each printed as written; blank when absent).
SHEET_TEXT_KEYS = (
    "agency",
    "project",
    "project_number",
    "sheet_title",
    "designed_by",
    "drawn_by",
    "checked_by",
    "date",
    "design_speed",
    "sheet_prefix",
)
SHEET_KEYS = frozenset({"size", "scale", "exaggeration", "interval", "revisions", *SHEET_TEXT_KEYS})


#: The range of each number of ``[sheet]`` (low, high, low excluded), as the options'.
SHEET_RANGES = {
    "scale": (1.0, 100000.0, False),
    "exaggeration": (0.0, 1000.0, True),
    "interval": (0.0, 1e7, True),
}


def check_sheet_config(config: Mapping[str, Any], config_name: str = "config") -> None:
    """Refuse unknown keys in a ``[sheet]`` table (typos would be ignored silently)."""
    unknown = sorted(set(config) - SHEET_KEYS)
    if unknown:
        raise UsageError(
            f"{config_name}: unknown [sheet] key {unknown[0]!r}; keys: "
            + ", ".join(sorted(SHEET_KEYS))
        )


def sheet_options(
    solved: SolvedAlignment,
    config: Mapping[str, Any] | None = None,
    overrides: Mapping[str, Any] | None = None,
    config_name: str = "config",
) -> SheetOptions:
    """Sheet options: ``overrides`` (command-line values, None = not given) over the
    ``[sheet]`` table of a configuration over the unit defaults."""
    from gradeline.sheets.layout import PAPER_SIZES
    from gradeline.sheets.pdf import SheetOptions

    cfg = dict(config or {})
    given = {k: v for k, v in (overrides or {}).items() if v is not None}
    check_sheet_config(cfg, config_name)
    size = given.get("size") or cfg.get("size") or solved.document.units.defaults.sheet_size
    if size not in PAPER_SIZES:
        raise UsageError(f"unknown sheet size {size!r}; choose one of " + ", ".join(PAPER_SIZES))

    def num(name: str, default: float | None) -> float | None:
        value = given.get(name, cfg.get(name, default))
        if value is None:
            return None
        if isinstance(value, bool) or not isinstance(value, (int, float)):
            raise UsageError(f"{config_name}: [sheet] {name} must be a number")
        low, high, strict = SHEET_RANGES[name]
        try:
            v = float(value)
        except OverflowError:
            raise UsageError(f"{config_name}: [sheet] {name} is too large a number") from None
        if not math.isfinite(v) or (v <= low if strict else v < low) or v > high:
            raise UsageError(
                f"{config_name}: [sheet] {name} = {v:g} is out of range: give "
                f"{'more than' if strict else 'at least'} {low:g} and at most {high:g}"
            )
        return v

    return SheetOptions(
        size=size,
        scale=num("scale", None),
        exaggeration=num("exaggeration", 10.0) or 10.0,
        interval=num("interval", None),
        revisions=_revisions(cfg.get("revisions", []), config_name),
        **{key: _text_field(cfg.get(key, ""), key, config_name) for key in SHEET_TEXT_KEYS},
    )


def _text_field(value: Any, key: str, config_name: str) -> str:
    if isinstance(value, bool) or not isinstance(value, (str, int, float)):
        raise UsageError(f"{config_name}: [sheet] {key} must be text")
    text = str(value)
    if len(text) > 200 or any(ch in text for ch in "\r\n\t"):
        raise UsageError(f"{config_name}: [sheet] {key} must be one line of at most 200 characters")
    return text


def _revisions(value: Any, config_name: str) -> tuple[str, ...]:
    """``revisions``: a list of one-line entries, e.g. ``["A  2026-11-30  First issue"]``."""
    if not isinstance(value, list) or len(value) > 20:
        raise UsageError(f"{config_name}: [sheet] revisions must be a list of at most 20 lines")
    return tuple(_text_field(v, "revisions", config_name) for v in value)


def sheets_pdf(solved: SolvedAlignment, opts: SheetOptions) -> bytes:
    """Plan-and-profile sheets, then the curve and station tables (needs a profile)."""
    from gradeline.sheets.pdf import render_sheets

    return render_sheets(solved, opts)


# --------------------------------------------------------------------------- review
@dataclass(frozen=True, slots=True)
class ReviewOptions:
    """Design speed and controls of a review."""

    speed: float
    speed_unit: str | None = None  # default: the criteria's (mph for feet, km/h for metres)
    curbed: bool = False
    passing: bool = False
    criteria: str | None = None
    e_max: float | None = None
    step: float | None = None
    json: bool = False
    super_method: str = "open"  # superelevation: "open" highway or "low-speed" street
    lanes: float | None = None  # lanes rotated (default: the criteria's)


def review_report(solved: SolvedAlignment, opts: ReviewOptions) -> tuple[str, bool]:
    """The review report (text or JSON) and whether anything fails (needs a profile)."""
    from gradeline.render.outputs import json_text
    from gradeline.render.reports import review_payload, review_text

    rev = review_of(solved, opts)
    text = json_text(review_payload(solved, rev)) if opts.json else review_text(solved, rev)
    return text, rev.failed


def criteria_and_speed(
    units: Any, criteria: str | None, speed: float, speed_unit: str | None
) -> tuple[Any, float]:
    """The design controls for the file's units and the speed in their speed unit
    (the file's units decide the controls; a speed given in the other unit is converted)."""
    from gradeline.analysis import review

    crit = review.load_criteria(criteria, units.metric)
    given = speed_unit or crit.speed_unit
    if given != crit.speed_unit:
        speed = speed * review.MPH_TO_KMH if given == "mph" else speed / review.MPH_TO_KMH
    return crit, speed


def review_of(solved: SolvedAlignment, opts: ReviewOptions) -> Any:
    """The review (a :class:`gradeline.analysis.review.Review`) of one alignment."""
    from gradeline.analysis import review

    units = solved.document.units
    crit, speed = criteria_and_speed(units, opts.criteria, opts.speed, opts.speed_unit)
    rev = review.review_profile(
        solved.geometry,
        crit,
        speed,
        curbed=opts.curbed,
        passing=opts.passing,
        step=opts.step,
        length_unit=units.symbol,
        horizontal_curves=solved.curves,
        e_max=opts.e_max,
    )
    if not solved.curves:
        return rev
    from dataclasses import replace

    from gradeline.analysis import superelevation as se

    sc = se.load_super_criteria(opts.criteria, units.metric)
    sup = se.review_superelevation(
        solved.curves,
        solved.alignment.superelevations,
        speed,
        crit.e_max if opts.e_max is None else opts.e_max,
        sc,
        method=opts.super_method,
        lanes=opts.lanes,
        length_unit=units.symbol,
        tolerance=UNIT_DEFAULTS[units.metric].station_tolerance,
    )
    return replace(rev, superelevation=sup)


# --------------------------------------------------------------------------- design
@dataclass(frozen=True, slots=True)
class DesignOptions:
    """Design speed, controls and rounding of ``gradeline design``."""

    speed: float
    speed_unit: str | None = None
    curbed: bool = False
    passing: bool = False
    criteria: str | None = None
    step: float = 50.0
    min_length: float | None = None


def design_input(
    path: str,
    alignment: str | None = None,
    profile: str | None = None,
    length_unit: str | None = None,
    name: str | None = None,
) -> tuple[Document, Any, Any]:
    """(document, alignment, profile) to design: a LandXML profile, or a CSV of PVIs
    (``station,elevation`` rows; stations as numbers or ``12+34.56``; a header
    row and ``#`` comments are skipped)."""
    if not path.lower().endswith(".csv"):
        from gradeline.io import landxml

        if length_unit is not None or name is not None:
            raise UsageError("--length-unit and --name are for CSV input")
        doc = landxml.read(path)
        al = doc.alignment(alignment)
        return doc, al, al.profile(profile)
    return _csv_input(path, length_unit or "foot", name)


def _csv_input(path: str, length_unit: str, name: str | None) -> tuple[Document, Any, Any]:
    import csv
    import math

    from gradeline.errors import InputError
    from gradeline.geometry.stations import parse_station
    from gradeline.model import Alignment, Profile, PVISpec, SourceRef
    from gradeline.model.units import Units

    units = Units(length_unit)
    station_length = 1000.0 if units.metric else 100.0
    pvis: list[PVISpec] = []
    try:
        with open(path, newline="", encoding="utf-8-sig") as fh:
            rows = list(csv.reader(fh))
    except (OSError, UnicodeDecodeError) as err:
        raise InputError(f"cannot read the file ({err})", SourceRef(path), "CSV") from None
    for line, row in enumerate(rows, start=1):
        cells = [c.strip() for c in row]
        if not cells or not any(cells) or cells[0].startswith("#"):
            continue
        if len(cells) < 2:
            raise InputError("a row needs station and elevation", SourceRef(path, line), "CSV")
        try:
            s = parse_station(cells[0], station_length)
            z = float(cells[1])
        except (UsageError, ValueError):
            if not pvis and line == next(i for i, r in enumerate(rows, 1) if any(r)):
                continue  # the header
            raise InputError(
                f"not a station and elevation: {','.join(cells[:2])!r}",
                SourceRef(path, line),
                "CSV",
            ) from None
        if not (math.isfinite(s) and math.isfinite(z)):
            raise InputError("station and elevation must be finite", SourceRef(path, line), "CSV")
        pvis.append(PVISpec(s, z, source=SourceRef(path, line)))
    if len(pvis) < 2:
        raise InputError("a profile needs at least two PVIs", SourceRef(path), "CSV")
    label = name or os.path.splitext(os.path.basename(path))[0]
    prof = Profile("Design", tuple(pvis), SourceRef(path))
    al = Alignment(label, pvis[0].station, pvis[-1].station - pvis[0].station, profiles=(prof,))
    return Document(path, units, (al,)), al, prof


def design(doc: Document, al: Any, prof: Any, opts: DesignOptions) -> tuple[Any, Document]:
    """The design of ``prof`` and a copy of ``doc`` with the designed profile in its place."""
    from dataclasses import replace

    from gradeline.analysis import design as des

    crit, speed = criteria_and_speed(doc.units, opts.criteria, opts.speed, opts.speed_unit)
    result = des.design_profile(
        prof,
        crit,
        speed,
        step=opts.step,
        passing=opts.passing,
        curbed=opts.curbed,
        min_length=opts.min_length,
        length_unit=doc.units.symbol,
    )
    profiles = tuple(result.profile if p is prof else p for p in al.profiles)
    new_al = replace(al, profiles=profiles)
    alignments = tuple(new_al if a is al else a for a in doc.alignments)
    return result, replace(doc, alignments=alignments)


def design_report(
    result: Any, doc: Document, alignment: str, source: str, as_json: bool = False
) -> str:
    """The design report, text or JSON; stations labelled as the alignment labels them."""
    from gradeline.geometry.stations import Stationing
    from gradeline.render.design_report import design_payload, design_text
    from gradeline.render.outputs import json_text

    label = Stationing(doc.units, doc.alignment(alignment).equations).label
    if as_json:
        return json_text(design_payload(result, label, source))
    return design_text(result, label, source)


# --------------------------------------------------------------------------- superelevation
@dataclass(frozen=True, slots=True)
class SuperOptions:
    """Design speed and controls of a superelevation proposal."""

    speed: float
    speed_unit: str | None = None
    criteria: str | None = None
    e_max: float | None = None
    method: str = "open"
    lanes: float | None = None


def superelevation_proposal(solved: SolvedAlignment, opts: SuperOptions) -> tuple:
    """(transitions proposed for every horizontal curve, e max used)."""
    from gradeline.analysis import superelevation as se

    units = solved.document.units
    crit, speed = criteria_and_speed(units, opts.criteria, opts.speed, opts.speed_unit)
    sc = se.load_super_criteria(opts.criteria, units.metric)
    e_max = crit.e_max if opts.e_max is None else opts.e_max
    return se.propose(solved.curves, speed, e_max, sc, opts.method, opts.lanes), e_max


def with_superelevation(doc: Document, proposals: Mapping[str, Sequence[Any]]) -> Document:
    """``doc`` with each named alignment given the proposed superelevation records."""
    from dataclasses import replace

    als = tuple(
        replace(al, superelevations=tuple(t.record for t in proposals[al.name] if t.record))
        if al.name in proposals
        else al
        for al in doc.alignments
    )
    return replace(doc, alignments=als)


def landxml_bytes(doc: Document) -> bytes:
    """``doc`` as LandXML 1.2."""
    from gradeline.io.landxml_write import write_landxml

    return write_landxml(doc)


def review_outputs(solved: SolvedAlignment, opts: ReviewOptions) -> tuple[str, bool, bytes | None]:
    """The review report, whether anything fails, and the review as a one-page PDF
    picture (None without a profile), from one review."""
    from gradeline.present.review_chart import review_chart
    from gradeline.render.outputs import json_text
    from gradeline.render.reports import review_payload, review_text
    from gradeline.sheets.review_page import review_pdf

    rev = review_of(solved, opts)
    text = json_text(review_payload(solved, rev)) if opts.json else review_text(solved, rev)
    chart = review_chart(solved, rev)
    return text, rev.failed, None if chart is None else review_pdf(chart)


# --------------------------------------------------------------------------- check
@dataclass(frozen=True, slots=True)
class CheckOptions:
    """Tolerances of the cross-check: file units, and seconds of arc."""

    tolerance: float = 0.01
    angle_tolerance_sec: float = 2.0
    json: bool = False

    def tolerances(self) -> Tolerances:
        """The tolerances as the check module takes them."""
        import math

        from gradeline.analysis.findings import Tolerances

        if self.tolerance <= 0 or self.angle_tolerance_sec <= 0:
            raise UsageError("tolerances must be positive")
        return Tolerances(self.tolerance, math.radians(self.angle_tolerance_sec / 3600.0))


def check_findings(
    target: SolvedAlignment | Document, tol: Tolerances, alignment: str | None = None
) -> list[Finding]:
    """Findings of one solved alignment, or of a document's chosen (or every) alignment."""
    from gradeline.analysis import check

    if isinstance(target, SolvedAlignment):
        return check.check_alignment(target, tol)
    return check.check_document(target, alignment, tol)


def drawing_audits(
    solved: SolvedAlignment,
    paths: Sequence[str],
    tol: Tolerances,
    opts: Any = None,
    shown: Sequence[str] | None = None,
) -> list[Any]:
    """Audit each drawing (linework and labels) against ``solved``; see
    :mod:`gradeline.analysis.drawing_audit` (``opts``: its ``AuditOptions``). Reports
    name each drawing by ``shown`` (default: its path as given)."""
    import math

    from gradeline.analysis.drawing_audit import AuditOptions, audit_world
    from gradeline.io.dxf_read import read_drawing, read_mapping, read_world

    opts = opts or AuditOptions()
    out = []
    for i, path in enumerate(paths):
        dxf_doc = read_drawing(path)
        view = read_world(dxf_doc, tol.distance / 20.0)
        out.append(
            audit_world(
                view,
                read_mapping(dxf_doc),
                shown[i] if shown is not None else str(path),
                solved,
                tol.distance,
                math.degrees(tol.angle) * 3600.0,
                opts,
            )
        )
    return out


def drawing_audit_of(solved: SolvedAlignment, data: bytes, shown: str, tol: Tolerances) -> Any:
    """The audit of a drawing held in memory (as ``build`` makes it), named ``shown``."""
    import tempfile

    with tempfile.TemporaryDirectory(prefix="gradeline-audit-") as tmp:
        path = os.path.join(tmp, "drawing.dxf")
        with open(path, "wb") as fh:
            fh.write(data)
        return drawing_audits(solved, [path], tol, shown=[shown])[0]


def ifc_bytes(doc: Document, alignment: str | None = None) -> tuple[bytes, list[str], list[str]]:
    """IFC 4.3 of the document's alignments (or the one named), the one-line reason of
    each alignment left out (broken, or holding what the writer does not write), and a
    line for each part of a written alignment IFC does not carry."""
    from gradeline.io.ifc_write import segment_types, write_ifc

    names = [alignment] if alignment is not None else doc.names
    solved, left_out, dropped = [], [], []
    for name in names:
        try:
            one = solve(doc, name, None)
            segment_types(one)  # refuses what the writer cannot write
        except GradelineError as err:
            if alignment is not None:
                raise
            left_out.append(f"alignment {name!r} left out: {err}")
            continue
        solved.append(one)
        if one.alignment.superelevations:
            dropped.append(
                f"alignment {name!r}: its superelevation is not written (IFC 4.3's "
                "IfcAlignmentCant is rail cant; a road's superelevation lies in its cross "
                "sections, which gradeline does not write)"
            )
    if not solved:
        raise UsageError("no alignment could be written to IFC: " + "; ".join(left_out))
    return write_ifc(solved, input_name(doc.path)), left_out, dropped


def landxml_of(doc: Document, alignment: str | None = None) -> tuple[bytes, list[str]]:
    """LandXML 1.2 of a document read from elsewhere (IFC): its alignments (or the one
    named), and the one-line reason of each broken one left out."""
    from dataclasses import replace

    if alignment is not None:
        doc = replace(doc, alignments=(doc.alignment(alignment),), broken=())
    left_out = [f"alignment {b.name!r} left out: {b.error}" for b in doc.broken]
    if not doc.alignments:
        raise UsageError("no alignment could be read: " + "; ".join(left_out))
    return landxml_bytes(doc), left_out


def comparison(
    doc: Document, alignment: str | None, profile: str | None, other_path: str, tol: Tolerances
) -> list[Finding]:
    """Findings of the same alignment (by name, else the other file's only one) as
    ``other_path`` describes it, against ``doc``'s."""
    from gradeline.analysis.compare import compare_alignments
    from gradeline.io import landxml

    mine = solve(doc, alignment, profile)
    other = landxml.read(other_path)
    name = mine.alignment.name
    if name not in other.names:
        if len(other.names) != 1:
            raise UsageError(
                f"{other_path}: no alignment named {name!r}; it has "
                + (", ".join(repr(n) for n in other.names) or "none")
            )
        name = other.names[0]
    theirs = solve(other, name, None)
    return compare_alignments(mine, theirs, tol, input_name(other_path))


def representation_findings(
    doc: Document, path: str, tol: Tolerances, alignment: str | None = None
) -> list[Finding]:
    """For an IFC file: each alignment's geometric representation (as ifcopenshell's
    kernel evaluates it) against the alignment solved from its business logic."""
    from gradeline.analysis.compare import compare_representation
    from gradeline.io.ifc_read import representation_points

    curves = representation_points(path)
    out: list[Finding] = []
    for al in doc.alignments:
        if alignment is not None and al.name != alignment:
            continue
        plan, curve3d = curves.get(al.name, (None, None))
        out += compare_representation(solve(doc, al.name, None), plan, curve3d, tol)
    return out


def check_report(
    doc: Document,
    findings: list[Finding],
    tol: Tolerances,
    opts: CheckOptions,
    drawings: Sequence[Any] = (),
    stationing: Any = None,
) -> tuple[str, bool]:
    """The cross-check report (text or JSON) and whether anything is over tolerance."""
    from gradeline.render.outputs import json_text
    from gradeline.render.reports import check_counts, check_payload, check_text

    if opts.json:
        text = json_text(check_payload(doc, findings, drawings, tol))
    else:
        text = check_text(doc, findings, drawings, tol, stationing)
    over, total = check_counts(findings, drawings)
    return text, bool(over) or total == 0  # nothing compared is never a pass
