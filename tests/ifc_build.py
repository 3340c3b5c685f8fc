"""IFC 4.3 business logic built with ifcopenshell for tests: an alignment whose
horizontal and vertical segments are given as their attribute tuples, written
as they are (no closing segment unless given, no representation)."""

from __future__ import annotations

import pytest

pytest.importorskip("ifcopenshell")

import ifcopenshell  # noqa: E402
import ifcopenshell.api  # noqa: E402
import ifcopenshell.guid  # noqa: E402


def write_alignment(path, horizontal, vertical=(), name="Spor") -> None:
    """``horizontal``: (x, y, direction, start radius, end radius, length, type), radius
    0 for infinite; ``vertical``: (start distance, horizontal length, start height,
    start gradient, end gradient, radius or None, type); metres and radians."""
    f = ifcopenshell.api.run("project.create_file", version="IFC4X3_ADD2")
    ifcopenshell.api.run("root.create_entity", f, ifc_class="IfcProject", name="reference")
    units = [
        f.createIfcSIUnit(None, "LENGTHUNIT", None, "METRE"),
        f.createIfcSIUnit(None, "PLANEANGLEUNIT", None, "RADIAN"),
    ]
    ifcopenshell.api.run("unit.assign_unit", f, units=units)

    def nest(parent, children) -> None:
        f.createIfcRelNests(ifcopenshell.guid.new(), None, None, None, parent, tuple(children))

    def part(params):
        return f.createIfcAlignmentSegment(
            ifcopenshell.guid.new(), None, None, None, None, None, None, params
        )

    al = f.createIfcAlignment(ifcopenshell.guid.new(), None, name)
    layouts = [f.createIfcAlignmentHorizontal(ifcopenshell.guid.new())]
    if vertical:
        layouts.append(f.createIfcAlignmentVertical(ifcopenshell.guid.new()))
    nest(al, layouts)
    nest(
        layouts[0],
        [
            part(
                f.createIfcAlignmentHorizontalSegment(
                    None, None, f.createIfcCartesianPoint((x, y)), d, r0, r1, length, None, kind
                )
            )
            for x, y, d, r0, r1, length, kind in horizontal
        ],
    )
    if vertical:
        nest(
            layouts[1],
            [part(f.createIfcAlignmentVerticalSegment(None, None, *v)) for v in vertical],
        )
    f.write(str(path))
