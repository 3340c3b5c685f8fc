"""``gradeline convert``: LandXML to IFC 4.3 alignments."""

from __future__ import annotations

import argparse
from typing import Any

from gradeline.cli._common import warn, write_file
from gradeline.errors import GradelineError, UsageError

NAME = "convert"


def add_parser(sub: Any) -> None:
    """Register the command."""
    p = sub.add_parser(
        NAME,
        help="write the alignments of a LandXML file as IFC 4.3 (IfcAlignment)",
        description=(
            "Write every alignment of IN (or the one named) as an IFC 4.3 IfcAlignment: "
            "horizontal and vertical business logic (line, circular arc and clothoid; "
            "constant gradient, parabolic and circular vertical curves) with its geometric "
            "representation, the start station and station equations as referents, lengths "
            "in the file's unit. Deterministic output. Exit 0 when every alignment was "
            "written, 1 when some were left out (each named), 2 when none could be."
        ),
    )
    p.add_argument("file", metavar="IN", help="LandXML file")
    p.add_argument("output", metavar="OUT", help="IFC file to write (.ifc)")
    p.add_argument("--alignment", metavar="NAME", help="only this alignment")
    p.set_defaults(func=run)


def run(args: argparse.Namespace) -> int:
    """Convert; exit 1 when an alignment was left out."""
    from gradeline import deliverables as dl
    from gradeline.io import landxml

    if not args.output.lower().endswith(".ifc"):
        raise UsageError(f"{args.output}: the output must be an .ifc file (IFC 4.3)")
    if args.file.lower().endswith(".ifc"):
        raise UsageError(f"{args.file}: reading IFC is not supported yet; give a LandXML file")
    doc = landxml.read(args.file)
    warn(dl.document_warnings(doc))
    data, left_out = dl.ifc_bytes(doc, args.alignment)
    warn([GradelineError(line) for line in left_out])
    write_file(args.output, data, [args.file])
    return 1 if left_out else 0
