"""``gradeline superelevation``: propose the superelevation of the horizontal curves."""

from __future__ import annotations

import argparse
import json
from typing import Any

from gradeline.cli._common import (
    E_MAX,
    SPEED,
    SUMMARIES,
    add_superelevation,
    distinct_outputs,
    emit,
    inputs_of,
    write_file,
)
from gradeline.errors import UsageError

NAME = "superelevation"


def add_parser(sub: Any) -> None:
    """Register the command."""
    p = sub.add_parser(
        NAME,
        help=SUMMARIES[NAME],
        description=(
            "For a design speed and e max, the rate each horizontal curve needs (the "
            "open-highway distribution of e and f, or low-speed urban streets), the runoff "
            "from the maximum relative gradient and the lanes rotated, the tangent runout "
            "from the normal crown, and the stations: over the spirals of a spiral curve, "
            "two thirds of the runoff before the PC of a simple one. With -o, a LandXML 1.2 "
            "file of the alignments as gradeline reads them, each without superelevation "
            "given the proposal (alignments that state one keep theirs). Default controls: "
            "AASHTO 2018 values from memory, shipped with gradeline; the proposal does not "
            "replace the governing agency's standards or the responsible engineer's "
            "judgment. Exit 0 every curve gets a rate within e max, 1 a radius needs more "
            "than e max, 2 bad input."
        ),
    )
    p.add_argument("file", metavar="FILE", help="LandXML or IFC file")
    p.add_argument("--alignment", metavar="NAME", help="only this alignment")
    p.add_argument("--speed", type=SPEED, required=True, metavar="V", help="design speed")
    p.add_argument(
        "--units",
        choices=("mph", "kmh"),
        help="unit of --speed (default: mph for files in feet, kmh for metres)",
    )
    p.add_argument("--criteria", metavar="FILE", help="TOML design controls")
    p.add_argument("--emax", type=E_MAX, metavar="E", help="maximum rate (default 0.08)")
    add_superelevation(p)
    p.add_argument("-o", "--output", metavar="OUT.xml", help="write LandXML 1.2 with the proposal")
    p.add_argument("--report", metavar="PATH", help="write the report here (default: stdout)")
    p.add_argument("--json", action="store_true", help="report in JSON")
    p.set_defaults(func=run)


def run(args: argparse.Namespace) -> int:
    """Propose, report, and write what was asked."""
    from gradeline import deliverables as dl
    from gradeline.io import landxml
    from gradeline.present import labels
    from gradeline.render.super_report import proposal_lines, proposal_payload

    doc = landxml.read(args.file)
    names = [args.alignment] if args.alignment else list(doc.names)
    if not names:
        raise UsageError(f"{args.file}: no alignment")
    opts = dl.SuperOptions(
        args.speed, args.units, args.criteria, args.emax, args.super_method, args.lanes_rotated
    )
    proposals: dict[str, Any] = {}
    lines: list[str] = []
    payload: list[dict] = []
    beyond = False
    for name in names:
        solved = dl.open_alignment(doc, name, None)
        if not solved.curves:
            lines += [f"alignment {name!r}: no horizontal curves", ""]
            continue
        prop, e_max = dl.superelevation_proposal(solved, opts)
        beyond |= any(t.rate.beyond for t in prop)
        kept = bool(solved.alignment.superelevations)
        head = f"alignment {name!r}: design speed {args.speed:g}, e max {100 * e_max:g} %" + (
            "; the file states its own superelevation, kept in -o" if kept else ""
        )
        lines += [*proposal_lines(solved, prop, head), ""]
        payload.append({"alignment": name, "kept": kept, "curves": proposal_payload(solved, prop)})
        if not kept:
            proposals[name] = prop
    lines.append(f"CAUTION: {labels.CAUTION}")
    text = (
        json.dumps({"alignments": payload, "caution": labels.CAUTION}, indent=2) + "\n"
        if args.json
        else "\n".join(lines) + "\n"
    )
    distinct_outputs(args.report, args.output)
    emit(text, args.report, inputs_of(args))
    if args.output:
        write_file(
            args.output, dl.landxml_bytes(dl.with_superelevation(doc, proposals)), inputs_of(args)
        )
    return 1 if beyond else 0
