"""gradeline: independent road geometry, drawings, sheets, review and cross-check from LandXML.

The pipeline, one subpackage a stage::

    gradeline.io        read LandXML (the only lxml user), TIN surfaces, DXF, TOML
    gradeline.model     immutable model objects
    gradeline.geometry  exact vertical and horizontal geometry, stations, ground
    gradeline.solved    SolvedAlignment: an alignment with everything computed once
    gradeline.analysis  design-control review, cross-check, fit of drawn profiles
    gradeline.present   label text, drawing roles, drafting records, table rows
    gradeline.render    DXF writer, CSV/JSON, text reports
    gradeline.sheets    PDF plan-and-profile sheets
    gradeline.deliverables  options in, one deliverable out (commands and build)
    gradeline.cli       the command line

The names below are the library's public interface; they load their modules
on first use, so ``import gradeline`` stays light.

Examples
--------
>>> import gradeline
>>> from gradeline.model import Alignment, Document, Profile, PVISpec, Units
>>> prof = Profile("FG", (PVISpec(0.0, 100.0), PVISpec(500.0, 110.0, "parabolic", 200.0, 200.0),
...                       PVISpec(1000.0, 105.0)))
>>> road = gradeline.solve(Document("x.xml", Units("foot"), (Alignment("Main", 0.0, 1000.0,
...                                 profiles=(prof,)),)))
>>> c = road.geometry.curves[0]
>>> round(c.k, 1), c.bvc_station, c.evc_station   # K = L / |A| = 400 / 3
(133.3, 300.0, 700.0)
"""

from __future__ import annotations

import importlib
from typing import TYPE_CHECKING, Any

from gradeline.errors import GradelineError, InputError, ModelError, UsageError

__version__ = "0.1.0"

if TYPE_CHECKING:
    from gradeline.deliverables import (
        CheckOptions,
        DrawingOptions,
        ReviewOptions,
        TableOptions,
        attach_ground,
        curve_table,
        open_alignment,
        station_table,
    )
    from gradeline.io.landxml import read
    from gradeline.io.landxml_write import write_landxml
    from gradeline.io.surface_reader import read_surface
    from gradeline.sheets.pdf import SheetOptions
    from gradeline.solved import SolvedAlignment, solve, with_surface

__all__ = [
    "CheckOptions",
    "DrawingOptions",
    "GradelineError",
    "InputError",
    "ModelError",
    "ReviewOptions",
    "SheetOptions",
    "SolvedAlignment",
    "TableOptions",
    "UsageError",
    "__version__",
    "attach_ground",
    "check",
    "curve_table",
    "open_alignment",
    "read",
    "read_surface",
    "review",
    "solve",
    "station_table",
    "with_surface",
    "write_dxf",
    "write_landxml",
    "write_sheets",
]

#: Public name -> module it lives in (loaded on first use).
_LAZY = {
    "read": "gradeline.io.landxml",
    "read_surface": "gradeline.io.surface_reader",
    "write_landxml": "gradeline.io.landxml_write",
    "SolvedAlignment": "gradeline.solved",
    "solve": "gradeline.solved",
    "with_surface": "gradeline.solved",
    "open_alignment": "gradeline.deliverables",
    "attach_ground": "gradeline.deliverables",
    "station_table": "gradeline.deliverables",
    "curve_table": "gradeline.deliverables",
    "TableOptions": "gradeline.deliverables",
    "DrawingOptions": "gradeline.deliverables",
    "ReviewOptions": "gradeline.deliverables",
    "CheckOptions": "gradeline.deliverables",
    "SheetOptions": "gradeline.sheets.pdf",
}


def __getattr__(name: str) -> Any:
    if name in _LAZY:
        value = getattr(importlib.import_module(_LAZY[name]), name)
        globals()[name] = value
        return value
    raise AttributeError(f"module 'gradeline' has no attribute {name!r}")


def write_dxf(
    solved: SolvedAlignment,
    path: str,
    *,
    plan: str | None = None,
    options: DrawingOptions | None = None,
) -> None:
    """Write the profile drawing of ``solved`` to ``path`` (and the plan to ``plan``).

    Both files are written atomically; nothing is written when either cannot be made.
    """
    from gradeline import deliverables as dl
    from gradeline.render.outputs import write_atomic

    opts = options or dl.DrawingOptions()
    blobs = [(path, dl.profile_dxf(solved, opts))]
    if plan is not None:
        blobs.append((plan, dl.plan_dxf(solved, opts)))
    for out, data in blobs:
        write_atomic(out, data)


def write_sheets(solved: SolvedAlignment, path: str, options: SheetOptions | None = None) -> None:
    """Write the PDF plan-and-profile sheets and tables of ``solved`` to ``path``."""
    from gradeline import deliverables as dl
    from gradeline.render.outputs import write_atomic

    opts = options or dl.sheet_options(solved)
    write_atomic(path, dl.sheets_pdf(solved, opts))


def review(solved: SolvedAlignment, speed: float, **options: Any):  # noqa: ANN201
    """Design-control review of the profile (and the superelevation of the horizontal
    curves) for a design speed.

    ``options``: ``curbed``, ``passing``, ``step``, ``e_max``, ``criteria`` (a TOML
    file), ``super_method`` ("open" or "low-speed") and ``lanes`` (lanes rotated);
    the speed is in the criteria's unit (mph for files in feet, km/h for metres).
    Returns a :class:`gradeline.analysis.review.Review`.
    """
    from gradeline import deliverables as dl

    return dl.review_of(solved, dl.ReviewOptions(speed, **options))


def check(solved: SolvedAlignment, tolerance: float = 0.01, angle_tolerance_sec: float = 2.0):  # noqa: ANN201
    """Cross-check findings of one solved alignment (stated values against computed ones).

    Returns a list of :class:`gradeline.analysis.findings.Finding`; those with
    ``verdict == "over"`` exceed the tolerance.
    """
    from gradeline import deliverables as dl

    tol = dl.CheckOptions(tolerance, angle_tolerance_sec).tolerances()
    return dl.check_findings(solved, tol)
