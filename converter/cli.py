"""Command-line interface: parse arguments, call the library, write output.

No geometry lives here. Every :class:`~converter.errors.GradelineError` is
caught once in :func:`main` and printed as one line; exit codes are 0 (ok),
1 (findings, for review/check), 2 (bad input or usage).
"""

from __future__ import annotations

import argparse
import sys
from collections.abc import Sequence
from typing import Any

from converter import __version__, horizontal, landxml, tables
from converter.errors import GradelineError, UsageError
from converter.outputs import csv_text, json_text, refuse_overwrite, write_atomic
from converter.config import read_config
from converter.layout import LAYER_ROLES
from converter.selection import AlignmentContext, select, solve_alignment

__all__ = ["main"]

PROG = "gradeline"


class _Parser(argparse.ArgumentParser):
    def error(self, message: str) -> None:  # one line, exit 2
        self.exit(2, f"{self.prog}: {message} (see --help)\n")


def _emit(text: str, output: str | None, inputs: Sequence[str]) -> None:
    if output is None or output == "-":
        sys.stdout.write(text)
        return
    refuse_overwrite(output, inputs)
    try:
        write_atomic(output, text)
    except OSError as err:
        raise UsageError(f"cannot write {output!r} ({err.strerror})") from None


def _add_common(p: argparse.ArgumentParser, *, profile: bool = True) -> None:
    p.add_argument("file", metavar="FILE", help="LandXML file")
    p.add_argument("--alignment", metavar="NAME", help="alignment (needed when the file has several)")
    if profile:
        p.add_argument("--profile", metavar="NAME", help="finished-grade profile (ProfAlign) name")


def _add_ground(p: argparse.ArgumentParser) -> None:
    p.add_argument("--ground", metavar="FILE",
                   help="LandXML file with the existing-ground TIN (default: FILE itself when "
                        "--surface is given)")
    p.add_argument("--surface", metavar="NAME",
                   help="TIN surface to sample along the alignment (default: the only one)")


def _with_ground(ctx: AlignmentContext, args: argparse.Namespace):
    """Replace the context's ground by the TIN surface the options ask for, if any."""
    if not (getattr(args, "ground", None) or getattr(args, "surface", None)):
        return ctx, None
    from converter.selection import attach_surface

    ctx2, index = attach_surface(ctx, args.ground, args.surface)
    surf = index.s
    if surf.skipped_faces:
        err = GradelineError(f"{surf.skipped_faces} zero-area faces of surface {surf.name!r} "
                             "were ignored", surf.source, "F")
        sys.stderr.write(f"{PROG}: warning: {err}\n")
    return ctx2, index


def _add_output(p: argparse.ArgumentParser) -> None:
    p.add_argument("--format", choices=("csv", "json"), default="csv", help="output format (default csv)")
    p.add_argument("-o", "--output", metavar="PATH", help="write here instead of standard output")


def _warn(ctx: AlignmentContext) -> None:
    """Print horizontal-geometry findings as warnings (they do not stop the table)."""
    if ctx.horizontal is None:
        return
    for f in ctx.horizontal.findings:
        element = next((g.element for g in ctx.horizontal.elements if g.index == f.index), "")
        err = GradelineError(f.message, f.source, element)
        sys.stderr.write(f"{PROG}: warning: {err}\n")


def _payload(ctx: AlignmentContext, columns: Sequence[str], rows: list[dict[str, Any]]) -> dict[str, Any]:
    units = ctx.document.units
    return {
        "file": ctx.document.path,
        "alignment": ctx.alignment.name,
        "profile": ctx.profile.name if ctx.profile else None,
        "linear_unit": units.linear,
        "angular_unit": units.angular,
        "direction_unit": units.direction,
        "direction_convention": ctx.horizontal.convention if ctx.horizontal else None,
        "columns": list(columns),
        "rows": [{c: r.get(c) for c in columns} for r in rows],
    }


def _render(ctx: AlignmentContext, fmt: str, columns: Sequence[str], rows: list[dict[str, Any]]) -> str:
    if fmt == "json":
        return json_text(_payload(ctx, columns, rows))
    return csv_text(rows, columns)


def cmd_table(args: argparse.Namespace) -> int:
    ctx = select(args.file, args.alignment, args.profile)
    ctx, index = _with_ground(ctx, args)
    if args.at is not None:
        texts = [t for t in args.at.split(",") if t.strip()]
        if not texts:
            raise UsageError("--at needs at least one station")
        at = [ctx.stationing.internal_of(t, ctx.start, ctx.end) for t in texts]
        stations, tags = tables.table_stations(ctx, at=at)
    else:
        stations, tags = tables.table_stations(ctx, interval=args.interval)
    rows = tables.station_rows(ctx, stations, tags)
    columns = tables.STATION_COLUMNS
    if index is not None:
        columns = tables.add_ground_columns(ctx, index, stations, rows)
    _warn(ctx)
    inputs = [args.file] + ([args.ground] if args.ground else [])
    _emit(_render(ctx, args.format, columns, rows), args.output, inputs)
    return 0


def cmd_curves(args: argparse.Namespace) -> int:
    ctx = select(args.file, args.alignment, args.profile)
    rows = tables.curve_rows(ctx)
    _warn(ctx)
    _emit(_render(ctx, args.format, tables.CURVE_COLUMNS, rows), args.output, [args.file])
    return 0


def _layer_names(args: argparse.Namespace) -> dict[str, str]:
    names: dict[str, str] = {}
    if getattr(args, "config", None):
        cfg = read_config(args.config)
        names.update(cfg.get("layers", {}))
    for item in getattr(args, "layer", None) or []:
        role, sep, name = item.partition("=")
        if not sep or not name.strip():
            raise UsageError(f"--layer {item!r}: write ROLE=NAME, e.g. grade=MY-GRADE")
        names[role.strip()] = name.strip()
    return names


def cmd_dxf(args: argparse.Namespace) -> int:
    from converter import drafting
    from converter.dxf import write_dxf
    from converter.layout import default_layout

    ctx = select(args.file, args.alignment, args.profile, need_profile=True)
    ctx, _ = _with_ground(ctx, args)
    units = ctx.document.units
    layout = default_layout(units, args.scale, args.exaggeration).with_layers(_layer_names(args))
    drawing = drafting.profile_drawing(ctx, layout, args.curves)
    data = write_dxf(drawing, layout, version=args.dxf_version, curves=args.curves,
                     linear_unit=units.linear)
    outputs = [(args.output, data)]
    if args.plan:
        if ctx.horizontal is None:
            raise UsageError(f"alignment {ctx.alignment.name!r} has no CoordGeom; no plan to draw")
        plan = drafting.plan_drawing(ctx, layout)
        outputs.append((args.plan, write_dxf(plan, layout, version=args.dxf_version,
                                             curves=args.curves, linear_unit=units.linear)))
    if args.plan and args.plan == args.output:
        raise UsageError("--plan and -o name the same file")
    _warn(ctx)
    for path, blob in outputs:
        _write_file(path, blob, [args.file])
    return 0


SHEET_KEYS = {"project", "date", "drawn_by", "size", "scale", "exaggeration", "interval",
              "sheet_prefix"}


def cmd_sheets(args: argparse.Namespace) -> int:
    from sheets.layout import PAPER_SIZES
    from sheets.pdf import SheetOptions, render_sheets

    cfg = read_config(args.config) if args.config else {}
    sheet_cfg = dict(cfg.get("sheet", {}))
    unknown = sorted(set(sheet_cfg) - SHEET_KEYS)
    if unknown:
        raise UsageError(f"{args.config}: unknown [sheet] key {unknown[0]!r}; keys: "
                         + ", ".join(sorted(SHEET_KEYS)))
    ctx = select(args.file, args.alignment, args.profile, need_profile=True)
    ctx, _ = _with_ground(ctx, args)
    size = args.size or sheet_cfg.get("size") or ("iso-a1" if ctx.document.units.metric else "ansi-d")
    if size not in PAPER_SIZES:
        raise UsageError(f"unknown sheet size {size!r}; choose one of " + ", ".join(PAPER_SIZES))

    def num(name: str, default: float | None) -> float | None:
        value = getattr(args, name)
        if value is None:
            value = sheet_cfg.get(name, default)
        if value is not None and not isinstance(value, (int, float)):
            raise UsageError(f"{args.config}: [sheet] {name} must be a number")
        return None if value is None else float(value)

    opts = SheetOptions(
        size=size,
        scale=num("scale", None),
        exaggeration=num("exaggeration", 10.0) or 10.0,
        interval=num("interval", None),
        project=str(sheet_cfg.get("project", "")),
        date=str(sheet_cfg.get("date", "")),
        drawn_by=str(sheet_cfg.get("drawn_by", "")),
        sheet_prefix=str(sheet_cfg.get("sheet_prefix", "")),
    )
    data = render_sheets(ctx, opts)
    _warn(ctx)
    _write_file(args.output, data, [args.file] + ([args.config] if args.config else []))
    return 0


def cmd_review(args: argparse.Namespace) -> int:
    from converter import review
    from converter.reports import review_payload, review_text

    ctx = select(args.file, args.alignment, args.profile, need_profile=True)
    assert ctx.geometry is not None
    metric = ctx.document.units.metric
    crit = review.load_criteria(args.criteria, metric)
    speed = args.speed
    given = args.units or crit.speed_unit
    if given != crit.speed_unit:  # the file's units decide the controls; convert the speed
        speed = speed * review.MPH_TO_KMH if given == "mph" else speed / review.MPH_TO_KMH
    from converter import horizontal as hz_mod

    hcurves = hz_mod.curve_data(ctx.horizontal) if ctx.horizontal is not None else ()
    rev = review.review_profile(ctx.geometry, crit, speed, curbed=args.curbed,
                                passing=args.passing, step=args.step,
                                length_unit=ctx.document.units.symbol,
                                horizontal_curves=hcurves, e_max=args.emax)
    text = json_text(review_payload(ctx, rev)) if args.json else review_text(ctx, rev)
    _emit(text, args.output, [args.file])
    return 1 if rev.failed else 0


def _drawing_mapping(args: argparse.Namespace, stored: dict[str, str]):
    """(exaggeration, datum, how) from the options or the drawing; None when neither says."""
    if (args.exaggeration is None) != (args.datum is None):
        raise UsageError("give both --exaggeration and --datum, or neither")
    if args.exaggeration is not None:
        return args.exaggeration, args.datum, "given"
    if "exaggeration" in stored and "datum" in stored:
        return float(stored["exaggeration"]), float(stored["datum"]), "from the drawing"
    return None


def _add_report(p: argparse.ArgumentParser) -> None:
    p.add_argument("--json", action="store_true", help="write JSON instead of text")
    p.add_argument("-o", "--output", metavar="PATH", help="write the report here instead of "
                   "standard output")


def cmd_check(args: argparse.Namespace) -> int:
    import math

    from converter import check
    from converter.dxf import layer_names, read_drawing, read_linework, read_mapping
    from converter.reports import check_payload, check_text

    doc = landxml.read(args.file)
    if args.tolerance <= 0 or args.angle_tolerance <= 0:
        raise UsageError("tolerances must be positive")
    tol = check.Tolerances(args.tolerance, math.radians(args.angle_tolerance / 3600.0))
    findings = check.check_document(doc, args.alignment, tol)
    if args.ground or args.surface:
        from converter.selection import attach_surface, ground_at

        base = select(doc, args.alignment, args.profile)
        with_tin, index = attach_surface(base, args.ground, args.surface)
        findings += check.check_ground_against_surface(
            base.alignment, lambda s: ground_at(with_tin, index, s), tol,
            with_tin.alignment.grounds[0].name)
    drawing = None
    stationing = None
    layer = args.layer or ""
    if args.dxf:
        ctx = select(doc, args.alignment, args.profile, need_profile=True)
        assert ctx.geometry is not None
        dxf_doc = read_drawing(args.dxf)
        names = layer_names(dxf_doc)
        if not layer:
            layer = next((n for n in names if n.upper() == "PROFILE-GRADE"), "")
            if not layer:
                raise UsageError(f"{args.dxf}: name the profile layer with --layer; layers with "
                                 "linework: " + (", ".join(names) or "none"))
        lines = read_linework(dxf_doc, layer, tol.distance / 20.0)
        if not lines:
            raise UsageError(f"{args.dxf}: no LINE, LWPOLYLINE, POLYLINE, SPLINE or ARC on layer "
                             f"{layer!r}; layers with linework: " + (", ".join(names) or "none"))
        found = _drawing_mapping(args, read_mapping(dxf_doc))
        if found is not None:
            exag, datum, how = found
        else:
            exag, datum = check.fit_mapping(lines, ctx.geometry)
            how = "fitted by least squares"
        drawing = check.check_linework(lines, ctx.geometry, tol.distance, exag, datum, how)
        stationing = ctx.stationing
    if args.json:
        text = json_text(check_payload(doc, findings, drawing, tol, args.dxf or "", layer))
    else:
        text = check_text(doc, findings, drawing, tol, args.dxf or "", layer, stationing)
    _emit(text, args.output, [args.file] + ([args.dxf] if args.dxf else []))
    over = any(f.verdict == "over" for f in findings) or (
        drawing is not None and bool(drawing.over or drawing.uncovered))
    return 1 if over else 0


def cmd_fit(args: argparse.Namespace) -> int:
    import os


    from converter import fit
    from converter.dxf import layer_names, read_drawing, read_linework, read_mapping
    from converter.model import Alignment, Document
    from converter.units import Units

    dxf_doc = read_drawing(args.drawing)
    names = layer_names(dxf_doc)
    lines = read_linework(dxf_doc, args.layer, 0.0005)
    if not lines:
        raise UsageError(f"{args.drawing}: no LINE, LWPOLYLINE, POLYLINE, SPLINE or ARC on layer "
                         f"{args.layer!r}; layers with linework: " + (", ".join(names) or "none"))
    mapping = read_mapping(dxf_doc)
    found = _drawing_mapping(args, mapping)
    if found is None:
        raise UsageError(f"{args.drawing}: the drawing does not say how it maps to elevations; "
                         "give --exaggeration and --datum")
    exag, datum, _ = found
    if exag <= 0:
        raise UsageError("--exaggeration must be positive")
    unit = args.units or ("m" if mapping.get("linear_unit") == "meter" else "ft")
    linear = {"ft": mapping.get("linear_unit") if mapping.get("linear_unit") in
              ("foot", "USSurveyFoot", "internationalFoot") else "foot", "m": "meter"}[unit]
    try:
        pts = fit.chain(lines, gap=0.01 * max(1.0, exag))
    except fit.FitError as err:
        raise UsageError(f"{args.drawing}: layer {args.layer!r}: {err.message}") from None
    if args.start_station is not None:
        pts[:, 0] = pts[:, 0] - pts[0, 0] + args.start_station
    pts[:, 1] = pts[:, 1] / exag + datum
    window = args.window or (24.0 if unit == "m" else 80.0)
    try:
        result = fit.fit_profile(pts, window=window, name=args.profile_name)
    except fit.FitError as err:
        raise UsageError(f"{args.drawing}: layer {args.layer!r}: {err.message}") from None
    name = args.name or os.path.splitext(os.path.basename(args.drawing))[0]
    prof = result.profile
    al = Alignment(name, sta_start=prof.start, length=prof.end - prof.start, profiles=(prof,))
    out_doc = Document(args.output, Units(linear), (al,))
    _write_file(args.output, landxml.write_landxml(out_doc), [args.drawing])
    units = out_doc.units
    stationing = __import__("converter.stations", fromlist=["Stationing"]).Stationing(units)
    rows = []
    for c in result.curves:
        rows.append({"pvi_station": c.pvi_station, "pvi_label": stationing.label(c.pvi_station),
                     "pvi_elevation": c.pvi_elevation, "kind": c.kind, "length_in": c.length_in,
                     "length_out": c.length_out, "length": c.length_in + c.length_out,
                     "radius": c.radius, "rms": c.rms, "max_residual": c.max_residual})
    if args.json:
        text = json_text({"drawing": args.drawing, "layer": args.layer, "output": args.output,
                          "exaggeration": exag, "datum": datum, "points": result.points,
                          "rms": result.rms, "max_residual": result.max_residual,
                          "worst_station": result.worst_station, "curves": rows,
                          "pvis": [{"station": p.station, "elevation": p.elevation, "kind": p.kind}
                                   for p in prof.pvis]})
    else:
        lines_out = [f"fitted {len(prof.pvis)} PVIs and {len(result.curves)} vertical curves to "
                     f"{result.points} points on layer {args.layer!r}; worst residual "
                     f"{result.max_residual:.4f} {units.symbol} at {stationing.label(result.worst_station)}, "
                     f"rms {result.rms:.4f}", f"wrote {args.output}", ""]
        for p in prof.pvis:
            c = next((r for r in rows if abs(r["pvi_station"] - p.station) < 1e-9), None)
            desc = "" if c is None else (
                f"  {c['kind']}  L {c['length']:.3f}" + (f" ({c['length_in']:.3f} + {c['length_out']:.3f})"
                                                      if c["kind"] == "unsymmetric" else "")
                + (f"  R {c['radius']:.1f}" if c["radius"] else "") + f"  residual max {c['max_residual']:.4f}")
            lines_out.append(f"PVI {stationing.label(p.station)}  EL {p.elevation:.4f}{desc}")
        text = "\n".join(lines_out) + "\n"
    sys.stdout.write(text)
    return 0


def _run_build(jobs, outdir: str, workers: int) -> int:
    from converter.build import build, write_index

    files = [j.path for j in jobs]
    for j in jobs:  # the output folder may not be an input file
        refuse_overwrite(outdir, [j.path])
    show = sys.stderr.isatty()
    bar = None
    if show:
        from tqdm import tqdm

        bar = tqdm(total=len(files), unit="file", desc="gradeline build", file=sys.stderr)
    try:
        results = build(jobs, outdir, workers=workers, progress=bar.update if bar else None)
    finally:
        if bar is not None:
            bar.close()
    text, _ = write_index(results, outdir)
    sys.stdout.write(text)
    if any(r.failed for r in results):
        return 2
    if any(r.check_over or r.review_failed for r in results):
        return 1
    return 0


def cmd_build(args: argparse.Namespace) -> int:
    import os

    from converter.build import BuildJob, BuildOptions, collect_inputs

    cfg = read_config(args.config) if args.config else {}
    files = collect_inputs(args.inputs)
    if not files:
        raise UsageError("no LandXML files found in " + ", ".join(args.inputs))
    opts = BuildOptions(speed=args.speed, speed_unit=args.units, ground=args.ground,
                        surface=args.surface, sheet=dict(cfg.get("sheet", {})),
                        layers=dict(cfg.get("layers", {})))
    workers = args.jobs or min(len(files), os.cpu_count() or 1)
    return _run_build([BuildJob(f, opts) for f in files], args.output, workers)


def _samples_dir():
    """The bundled samples: packaged as converter.samples, or the source tree's samples/."""
    from importlib import resources
    from pathlib import Path

    try:
        return resources.files("converter.samples")
    except ModuleNotFoundError:  # running from a source checkout
        return Path(__file__).resolve().parent.parent / "samples"


def cmd_demo(args: argparse.Namespace) -> int:
    from converter.build import BuildJob, BuildOptions

    base = _samples_dir()
    bypass = str(base / "orrin-vale-bypass.xml")
    terrain = str(base / "orrin-vale-terrain.xml")
    link = str(base / "tarnholm-link.xml")
    cfg = read_config(str(base / "sheets.toml"))
    sheet = dict(cfg.get("sheet", {}))
    metric_sheet = {k: v for k, v in sheet.items() if k not in ("size", "scale", "interval")}
    metric_sheet["project"] = "Tarnholm Link Road (invented sample)"
    jobs = [
        BuildJob(bypass, BuildOptions(speed=50.0, speed_unit="mph", ground=terrain, sheet=sheet)),
        BuildJob(link, BuildOptions(speed=80.0, speed_unit="kmh", surface="Survey 2026 west",
                                    sheet=metric_sheet)),
    ]
    return _run_build(jobs, args.output, args.jobs or 1)


def _write_file(path: str, data: bytes, inputs: Sequence[str]) -> None:
    refuse_overwrite(path, inputs)
    try:
        write_atomic(path, data)
    except OSError as err:
        raise UsageError(f"cannot write {path!r} ({err.strerror})") from None


def _info(path: str) -> dict[str, Any]:
    doc = landxml.read(path)
    u = doc.units
    out: dict[str, Any] = {
        "file": path,
        "project": doc.project,
        "units": {
            "linear": u.linear,
            "symbol": u.symbol,
            "station_length": u.station_length,
            "angular": u.angular,
            "direction": u.direction,
        },
        "alignments": [],
    }
    for al in doc.alignments:
        entry: dict[str, Any] = {
            "name": al.name,
            "description": al.description,
            "sta_start": al.sta_start,
            "length": al.length,
            "station_equations": len(al.equations),
            "profiles": [],
            "grounds": [],
        }
        ctx = solve_alignment(doc, al, None, need_profile=False) if al.horizontal else None
        if ctx is not None and ctx.horizontal is not None:
            h = ctx.horizontal
            kinds = [g.kind for g in h.elements]
            entry["horizontal"] = {
                "start": h.start,
                "end": h.end,
                "start_label": ctx.stationing.label(h.start),
                "end_label": ctx.stationing.label(h.end),
                "length": h.end - h.start,
                "lines": kinds.count("line"),
                "curves": kinds.count("arc"),
                "spirals": sum(k in horizontal.SPIRAL_TYPES for k in kinds),
                "direction_convention": h.convention,
                "direction_convention_text": horizontal.CONVENTIONS[h.convention],
                "stated_directions_matched": list(h.convention_matches),
                "findings": len(h.findings),
            }
        for prof in al.profiles:
            ctx = solve_alignment(doc, al, prof)
            assert ctx.geometry is not None
            kinds = [c.curve_type for c in ctx.geometry.curves]
            entry["profiles"].append(
                {
                    "name": prof.name,
                    "start": ctx.geometry.start,
                    "end": ctx.geometry.end,
                    "start_label": ctx.stationing.label(ctx.geometry.start),
                    "end_label": ctx.stationing.label(ctx.geometry.end),
                    "pvis": len(prof.pvis),
                    "curves": len(kinds),
                    "crest": kinds.count("crest"),
                    "sag": kinds.count("sag"),
                }
            )
        for gr in al.grounds:
            pts = [s for p in gr.pieces for s in p.stations]
            entry["grounds"].append(
                {
                    "name": gr.name,
                    "points": len(pts),
                    "pieces": len(gr.pieces),
                    "start": min(pts) if pts else None,
                    "end": max(pts) if pts else None,
                }
            )
        out["alignments"].append(entry)
    return out


def _count(n: int, word: str) -> str:
    return f"{n} {word}" + ("" if n == 1 else "s")


def _info_text(info: dict[str, Any], doc_units_symbol: str) -> str:
    u = info["units"]
    lines = [info["file"]]
    if info["project"]:
        lines.append(f"project: {info['project']}")
    lines.append(
        f"units: {u['linear']} ({u['symbol']}), stations of {u['station_length']:g} "
        f"{u['symbol']}; angles in {u['angular']}, directions in {u['direction']}"
    )
    if not info["alignments"]:
        lines.append("no alignments")
    for al in info["alignments"]:
        length = "" if al["length"] is None else f", length {al['length']:.3f} {u['symbol']}"
        eqs = al["station_equations"]
        lines.append(
            f"alignment {al['name']!r}: staStart {al['sta_start']:.3f}{length}"
            + (f", {eqs} station equation{'s' if eqs != 1 else ''}" if eqs else "")
        )
        hz = al.get("horizontal")
        if hz:
            matched, stated = hz["stated_directions_matched"]
            conv = hz["direction_convention_text"]
            how = (f"{matched} of {stated} stated directions match" if stated
                   else "no stated directions; assumed")
            lines.append(
                f"  horizontal: {hz['start_label']} to {hz['end_label']}, "
                f"{_count(hz['lines'], 'line')}, {_count(hz['curves'], 'curve')}, "
                f"{_count(hz['spirals'], 'spiral')}; directions {conv} in "
                f"{u['direction']} ({how})"
                + (f"; {hz['findings']} geometry findings" if hz["findings"] else "")
            )
        for p in al["profiles"]:
            lines.append(
                f"  profile {p['name']!r}: {p['start_label']} to {p['end_label']}, "
                f"{p['pvis']} PVIs, {_count(p['curves'], 'vertical curve')} "
                f"({p['crest']} crest, {p['sag']} sag)"
            )
        for g in al["grounds"]:
            lines.append(
                f"  ground {g['name']!r}: {g['points']} points in {g['pieces']} "
                f"piece{'s' if g['pieces'] != 1 else ''}"
            )
    return "\n".join(lines) + "\n"


def cmd_info(args: argparse.Namespace) -> int:
    info = _info(args.file)
    text = json_text(info) if args.json else _info_text(info, info["units"]["symbol"])
    sys.stdout.write(text)
    return 0


def build_parser() -> argparse.ArgumentParser:
    """The argument parser of the ``gradeline`` command."""
    parser = _Parser(
        prog=PROG,
        description=(
            "Compute and draft highway vertical geometry from LandXML. Computed "
            "geometry is for review: verify it against the governing agency's "
            "standards; design decisions rest with the responsible licensed engineer."
        ),
    )
    parser.add_argument("--version", action="version", version=f"{PROG} {__version__}")
    sub = parser.add_subparsers(dest="command", metavar="COMMAND", parser_class=_Parser)
    sub.required = True

    p = sub.add_parser("info", help="units, alignments, station ranges, profiles, curve counts")
    p.add_argument("file", metavar="FILE", help="LandXML file")
    p.add_argument("--json", action="store_true", help="write JSON instead of text")
    p.set_defaults(func=cmd_info)

    p = sub.add_parser(
        "table",
        help="finished-grade elevation and grade at regular stations and key points",
        description=(
            "Rows at every multiple of --interval plus every key point (START, BVC, "
            "PVI, HIGH/LOW, EVC, END), or exactly at the --at stations. grade is in "
            "percent; offset is finished grade minus tangent elevation."
        ),
    )
    _add_common(p)
    _add_ground(p)
    group = p.add_mutually_exclusive_group(required=True)
    group.add_argument("--interval", type=float, metavar="D", help="row every D file units of station")
    group.add_argument(
        "--at",
        metavar="STATIONS",
        help="comma-separated stations, e.g. 12+50,13+00 (after a station equation "
        "that repeats labels, add the region: 12+50@2)",
    )
    _add_output(p)
    p.set_defaults(func=cmd_table)

    p = sub.add_parser(
        "dxf",
        help="drafted profile (and plan) linework as DXF",
        description=(
            "Profile in model space at x = station, y = (elevation - datum) x exaggeration "
            "(datum and exaggeration are written into the drawing). Parabolic curves are "
            "exact degree-2 SPLINEs, or polylines within 0.005 ft / 0.002 m of the curve "
            "with --curves polyline (always in R12). Layer roles: "
            + ", ".join(LAYER_ROLES)
        ),
    )
    _add_common(p)
    p.add_argument("-o", "--output", metavar="PATH", required=True, help="profile DXF to write")
    p.add_argument("--plan", metavar="PATH", help="also write the plan linework to this DXF")
    _add_ground(p)
    p.add_argument("--exaggeration", type=float, default=10.0, metavar="E",
                   help="vertical exaggeration (default 10)")
    p.add_argument("--scale", type=float, metavar="S",
                   help="plot scale for text heights: 1\" = S ft (default 50) or 1:S (default 500)")
    p.add_argument("--curves", choices=("spline", "polyline"), default="spline",
                   help="parabolic curves as exact SPLINEs (default) or polylines")
    p.add_argument("--dxf-version", choices=("R2010", "R2000", "R12"), default="R2010",
                   help="DXF version (default R2010)")
    p.add_argument("--layer", action="append", metavar="ROLE=NAME",
                   help="rename a layer, e.g. --layer grade=C-ROAD-PROF (repeatable)")
    p.add_argument("--config", metavar="FILE", help="TOML file; its [layers] table renames layers")
    p.set_defaults(func=cmd_dxf)

    p = sub.add_parser(
        "sheets",
        help="printable PDF plan-and-profile sheets with curve and station tables",
        description=(
            "Plan above, profile below, at true scale on ANSI D/B or ISO A1/A3 sheets split "
            "at match lines; then the horizontal and vertical curve tables and the "
            "station/elevation table. Options override the [sheet] table of --config."
        ),
    )
    _add_common(p)
    p.add_argument("-o", "--output", metavar="PATH", required=True, help="PDF to write")
    _add_ground(p)
    p.add_argument("--size", choices=("ansi-d", "ansi-b", "iso-a1", "iso-a3"),
                   help="sheet size (default ansi-d for feet, iso-a1 for metres)")
    p.add_argument("--scale", type=float, metavar="S",
                   help="horizontal scale: 1\" = S ft (20, 40, 50, 100; default 50) or 1:S "
                        "(250, 500, 1000; default 500)")
    p.add_argument("--exaggeration", type=float, metavar="E",
                   help="vertical exaggeration (default 10; lowered on a sheet whose profile "
                        "would not fit, and the title block says so)")
    p.add_argument("--interval", type=float, metavar="D",
                   help="station table interval (default 50 ft / 20 m)")
    p.add_argument("--config", metavar="FILE", help="TOML file with a [sheet] table (see samples/sheets.toml)")
    p.set_defaults(func=cmd_sheets)

    p = sub.add_parser(
        "review",
        help="design-control review: sight distance, comfort, appearance, drainage (exit 1 on failure)",
        description=(
            "Closed-form checks of every vertical curve for the design speed (crest stopping "
            "sight distance, sag headlight sight distance, comfort, appearance, drainage on "
            "curbed sections, passing sight distance on request) and the exact available "
            "sight distance along the finished grade in both directions. Default controls: "
            "AASHTO 2018 values shipped with gradeline; another agency's with --criteria. "
            "The review does not replace the governing agency's standards or the "
            "responsible engineer's judgment. Exit 0 all pass, 1 something fails, 2 bad input."
        ),
    )
    _add_common(p)
    p.add_argument("--speed", type=float, required=True, metavar="V", help="design speed")
    p.add_argument("--units", choices=("mph", "kmh"),
                   help="unit of --speed (default: mph for files in feet, kmh for metres)")
    p.add_argument("--curbed", action="store_true", help="curbed section: flag drainage on flat curves")
    p.add_argument("--passing", action="store_true", help="also check passing sight distance on crests")
    p.add_argument("--criteria", metavar="FILE", help="TOML design controls (see converter/criteria/)")
    p.add_argument("--emax", type=float, metavar="E",
                   help="maximum superelevation rate for the minimum-radius check (default 0.08)")
    p.add_argument("--step", type=float, metavar="D",
                   help="station step of the sight-distance run (default 10 ft / 5 m)")
    _add_report(p)
    p.set_defaults(func=cmd_review)

    p = sub.add_parser(
        "check",
        help="cross-check stated LandXML values and DXF profile linework (exit 1 on findings)",
        description=(
            "Recompute every stated value of the file from its coordinates (continuity, "
            "tangency, lengths, staStart, chord, delta, radius, directions, spiral values, PI "
            "points, alignment length; PVIs inside the alignment, curve overlaps, CircCurve "
            "lengths, ground profiles inside the alignment) and, with --dxf, compare the "
            "profile linework on a layer with the computed finished grade. Exit 0 when "
            "everything agrees within tolerance, 1 when any finding exceeds it, 2 for bad input."
        ),
    )
    _add_common(p)
    p.add_argument("--dxf", metavar="DRAWING", help="DXF with drafted profile linework")
    _add_ground(p)
    p.add_argument("--layer", metavar="NAME", help="layer of the finished-grade linework "
                   "(default PROFILE-GRADE when present)")
    p.add_argument("--exaggeration", type=float, metavar="E", help="vertical exaggeration of the drawing")
    p.add_argument("--datum", type=float, metavar="D",
                   help="elevation at y = 0 (default: read from a gradeline drawing, else fitted)")
    p.add_argument("--tolerance", type=float, default=0.01, metavar="T",
                   help="distance and elevation tolerance in file units (default 0.01)")
    p.add_argument("--angle-tolerance", type=float, default=2.0, metavar="SEC",
                   help="angle and direction tolerance in seconds of arc (default 2)")
    _add_report(p)
    p.set_defaults(func=cmd_check)

    p = sub.add_parser(
        "fit",
        help="recover PVIs and vertical curves from drafted DXF profile linework; write LandXML",
        description=(
            "Reads the LINE, LWPOLYLINE, POLYLINE, SPLINE and ARC entities on --layer, chains "
            "them in station order (x = station), maps y to elevation (given --exaggeration and "
            "--datum, or read from a gradeline drawing), finds the tangents and fits each bend "
            "as a symmetric or unsymmetrical parabola or a circular curve, and writes LandXML 1.2."
        ),
    )
    p.add_argument("drawing", metavar="DRAWING.dxf", help="DXF with the profile linework")
    p.add_argument("--layer", required=True, metavar="NAME", help="layer of the finished grade")
    p.add_argument("--exaggeration", type=float, metavar="E", help="vertical exaggeration")
    p.add_argument("--datum", type=float, metavar="D", help="elevation at y = 0")
    p.add_argument("--start-station", type=float, metavar="S",
                   help="station of the first point (default: x itself is the station)")
    p.add_argument("--units", choices=("ft", "m"), help="units of the drawing (default: from it, else ft)")
    p.add_argument("--window", type=float, metavar="W",
                   help="length over which bends are detected (default 80 ft / 24 m)")
    p.add_argument("--name", metavar="NAME", help="alignment name in the LandXML (default: file name)")
    p.add_argument("--profile-name", default="Fitted profile", metavar="NAME", help="ProfAlign name")
    p.add_argument("-o", "--output", required=True, metavar="PATH", help="LandXML file to write")
    p.add_argument("--json", action="store_true", help="report as JSON")
    p.set_defaults(func=cmd_fit)

    p = sub.add_parser(
        "build",
        help="every deliverable for every alignment of files or folders, with a summary index",
        description=(
            "For every alignment: profile.dxf, plan.dxf, sheets.pdf, curves.csv, table.csv, "
            "check.txt and, with --speed, review.txt, in OUTDIR/<file>/<alignment>/, plus "
            "OUTDIR/index.txt and index.json. One failing alignment or file does not stop the "
            "others. Exit 0 all built and clean, 1 built with check or review findings, 2 when "
            "anything failed to build."
        ),
    )
    p.add_argument("inputs", nargs="+", metavar="FILE_OR_FOLDER", help="LandXML files or folders")
    p.add_argument("-o", "--output", required=True, metavar="OUTDIR", help="output folder")
    p.add_argument("--speed", type=float, metavar="V", help="design speed for the review")
    p.add_argument("--units", choices=("mph", "kmh"), help="unit of --speed (default: the file's)")
    _add_ground(p)
    p.add_argument("--jobs", type=int, metavar="N", help="parallel processes (default: one a core)")
    p.add_argument("--config", metavar="FILE", help="TOML with [sheet] and [layers] tables")
    p.set_defaults(func=cmd_build)

    p = sub.add_parser("demo", help="build everything from the bundled samples")
    p.add_argument("-o", "--output", default="gradeline-demo", metavar="OUTDIR",
                   help="output folder (default gradeline-demo)")
    p.add_argument("--jobs", type=int, metavar="N", help="parallel processes")
    p.set_defaults(func=cmd_demo)

    p = sub.add_parser("curves", help="one row per vertical curve: PVI, grades, A, L, K, BVC/EVC, high/low point")
    _add_common(p)
    _add_output(p)
    p.set_defaults(func=cmd_curves)
    return parser


def main(argv: Sequence[str] | None = None) -> int:
    """Run the ``gradeline`` command; return its exit code."""
    parser = build_parser()
    args = parser.parse_args(argv)
    try:
        return int(args.func(args))
    except GradelineError as err:
        sys.stderr.write(f"{PROG}: {err}\n")
        return 2
    except BrokenPipeError:
        return 0
    except KeyboardInterrupt:
        sys.stderr.write(f"{PROG}: interrupted\n")
        return 130


if __name__ == "__main__":  # pragma: no cover
    raise SystemExit(main())
