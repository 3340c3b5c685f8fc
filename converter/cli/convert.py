"""``gradeline convert``: LandXML to IFC 4.3 alignments, and IFC 4.3 to LandXML 1.2."""

from __future__ import annotations

import argparse
from typing import Any

from gradeline.cli._common import SUMMARIES, inputs_of, warn, write_file
from gradeline.errors import GradelineError, UsageError

NAME = "convert"


def add_parser(sub: Any) -> None:
    """Register the command."""
    p = sub.add_parser(
        NAME,
        help=SUMMARIES[NAME],
        description=(
            "With OUT ending .ifc, write every alignment of the LandXML file IN (or the one "
            "named) as an IFC 4.3 IfcAlignment: "
            "horizontal and vertical business logic (line, circular arc and clothoid; "
            "constant gradient, parabolic and circular vertical curves) with its geometric "
            "representation, the start station and station equations as referents, lengths "
            "in the file's unit. With IN an IFC file and OUT ending .xml, write its "
            "alignments' business logic as LandXML 1.2 (CoordGeom and ProfAlign). "
            "Deterministic output. Exit 0 when every alignment was "
            "written, 1 when some were left out (each named), 2 when none could be."
        ),
    )
    p.add_argument("file", metavar="IN", help="LandXML or IFC 4.3 file")
    p.add_argument("output", metavar="OUT", help="file to write: .ifc (IFC 4.3) or .xml (LandXML)")
    p.add_argument("--alignment", metavar="NAME", help="only this alignment")
    p.set_defaults(func=run)


def run(args: argparse.Namespace) -> int:
    """Convert; exit 1 when an alignment was left out."""
    from gradeline import deliverables as dl
    from gradeline.io import landxml
    from gradeline.io.ifc_read import looks_like_ifc

    to_ifc = args.output.lower().endswith(".ifc")
    if not to_ifc and not args.output.lower().endswith(".xml"):
        raise UsageError(f"{args.output}: the output must end .ifc (IFC 4.3) or .xml (LandXML)")
    from_ifc = looks_like_ifc(args.file)
    if from_ifc == to_ifc:
        raise UsageError(
            f"{args.file} to {args.output}: convert goes from LandXML to .ifc or from IFC to .xml"
        )
    doc = landxml.read(args.file)
    warn(dl.document_warnings(doc))
    dropped: list[str] = []
    if to_ifc:
        data, left_out, dropped = dl.ifc_bytes(doc, args.alignment)
    else:
        data, left_out = dl.landxml_of(doc, args.alignment)
    warn([GradelineError(line) for line in left_out + dropped])
    write_file(args.output, data, inputs_of(args))
    return 1 if left_out else 0
