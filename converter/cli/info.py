"""``gradeline info``: units, alignments, station ranges, profiles, curve counts."""

from __future__ import annotations

import argparse
import sys
from typing import Any

from gradeline.cli._common import SUMMARIES

NAME = "info"


def add_parser(sub: Any) -> None:
    """Register the command."""
    p = sub.add_parser(NAME, help=SUMMARIES[NAME])
    p.add_argument("file", metavar="FILE", help="LandXML file")
    p.add_argument("--json", action="store_true", help="write JSON instead of text")
    p.set_defaults(func=run)


def describe(path: str) -> dict[str, Any]:
    """What ``info`` reports about a file, as plain data."""
    from gradeline.deliverables import document_warnings, unit_hints
    from gradeline.errors import GradelineError
    from gradeline.geometry.directions import CONVENTIONS
    from gradeline.geometry.spirals import SPIRAL_TYPES
    from gradeline.io import landxml
    from gradeline.solved import solve_alignment

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
        "terrain_only": doc.has_surfaces and not doc.names,
        "notes": [str(w) for w in document_warnings(doc)],
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
        try:
            plan = solve_alignment(doc, al, None, need_profile=False) if al.horizontal else None
        except GradelineError as err:  # one broken plan never hides the rest
            plan = None
            entry["error"] = str(err)
        if plan is not None and plan.horizontal is not None:
            out["notes"] += [str(w) for w in unit_hints(plan)]
            h = plan.horizontal
            kinds = [g.kind for g in h.elements]
            entry["horizontal"] = {
                "start": h.start,
                "end": h.end,
                "start_label": plan.stationing.label(h.start),
                "end_label": plan.stationing.label(h.end),
                "length": h.end - h.start,
                "lines": kinds.count("line"),
                "curves": kinds.count("arc"),
                "spirals": sum(k in SPIRAL_TYPES for k in kinds),
                "direction_convention": h.convention,
                "direction_convention_text": CONVENTIONS[h.convention],
                "stated_directions_matched": list(h.convention_matches),
                "findings": len(h.findings),
            }
        for bad in al.broken_profiles:
            entry["profiles"].append({"name": bad.name, "error": str(bad.error)})
        for prof in al.profiles:
            try:
                solved = solve_alignment(doc, al, prof)
            except GradelineError as err:
                entry["profiles"].append({"name": prof.name, "error": str(err)})
                continue
            assert solved.geometry is not None
            kinds = [c.curve_type for c in solved.geometry.curves]
            entry["profiles"].append(
                {
                    "name": prof.name,
                    "start": solved.geometry.start,
                    "end": solved.geometry.end,
                    "start_label": solved.stationing.label(solved.geometry.start),
                    "end_label": solved.stationing.label(solved.geometry.end),
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
        if al.superelevations:
            st = plan.stationing if plan is not None else None
            entry["superelevation"] = [
                {
                    "rate": r.rate,
                    "first": r.first,
                    "last": r.last,
                    "first_label": st.label(r.first) if st and r.first is not None else None,
                    "last_label": st.label(r.last) if st and r.last is not None else None,
                }
                for r in al.superelevations
            ]
        out["alignments"].append(entry)
    for bad in doc.broken:
        out["alignments"].append({"name": bad.name, "error": str(bad.error)})
    return out


def _count(n: int, word: str) -> str:
    return f"{n} {word}" + ("" if n == 1 else "s")


def describe_text(info: dict[str, Any]) -> str:
    """The text form of :func:`describe`."""
    u = info["units"]
    lines = [info["file"]]
    if info["project"]:
        lines.append(f"project: {info['project']}")
    lines.append(
        f"units: {u['linear']} ({u['symbol']}), stations of {u['station_length']:g} "
        f"{u['symbol']}; angles in {u['angular']}, directions in {u['direction']}"
    )
    for note in info["notes"]:
        lines.append(f"note: {note}")
    if not info["alignments"]:
        lines.append(
            "no alignments"
            + (" (terrain: surfaces or points only)" if info["terrain_only"] else "")
        )
    for al in info["alignments"]:
        if "sta_start" not in al:
            lines.append(f"alignment {al['name']!r}: cannot be read: {al['error']}")
            continue
        length = "" if al["length"] is None else f", length {al['length']:.3f} {u['symbol']}"
        eqs = al["station_equations"]
        lines.append(
            f"alignment {al['name']!r}: staStart {al['sta_start']:.3f}{length}"
            + (f", {eqs} station equation{'s' if eqs != 1 else ''}" if eqs else "")
        )
        if al.get("error"):
            lines.append(f"  plan: cannot be solved: {al['error']}")
        hz = al.get("horizontal")
        if hz:
            matched, stated = hz["stated_directions_matched"]
            conv = hz["direction_convention_text"]
            how = (
                f"{matched} of {stated} stated directions match"
                if stated
                else "no stated directions; assumed"
            )
            lines.append(
                f"  horizontal: {hz['start_label']} to {hz['end_label']}, "
                f"{_count(hz['lines'], 'line')}, {_count(hz['curves'], 'curve')}, "
                f"{_count(hz['spirals'], 'spiral')}; directions {conv} in "
                f"{u['direction']} ({how})"
                + (f"; {hz['findings']} geometry findings" if hz["findings"] else "")
            )
        for p in al["profiles"]:
            if "error" in p:
                lines.append(f"  profile {p['name']!r}: cannot be read: {p['error']}")
                continue
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
        sup = al.get("superelevation")
        if sup:
            rates = [100 * r["rate"] for r in sup]
            spans = ", ".join(
                f"{r['first_label'] or '?'} to {r['last_label'] or '?'} at {100 * r['rate']:.1f} %"
                for r in sup
            )
            lines.append(
                f"  superelevation: {_count(len(sup), 'transition')}, full rates "
                f"{min(rates):.1f} to {max(rates):.1f} % ({spans})"
            )
    return "\n".join(lines) + "\n"


def run(args: argparse.Namespace) -> int:
    """Print the description of the file."""
    from gradeline.render.outputs import json_text

    info = describe(args.file)
    sys.stdout.write(json_text(info) if args.json else describe_text(info))
    return 0
