"""Audit of one drawing: its kind, units and mapping, its linework and its labels.

A profile drawing (x = station, y = (elevation - datum) x exaggeration) has its
grade linework compared with the computed grade
(:func:`gradeline.analysis.drawing_check.check_linework`); a plan drawing has its
centreline compared with the computed alignment
(:func:`gradeline.analysis.plan_audit.audit_plan`). Both have every text read and
compared (:mod:`gradeline.analysis.label_audit`). Drawing units come from
``$INSUNITS``; a drawing in other units than the file is refused unless the user
says how to take it.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field, replace

import numpy as np

from gradeline.analysis import drawing_check, label_audit, plan_audit
from gradeline.errors import GradelineError, UsageError
from gradeline.io.dxf_read import INSUNITS, DrawnPiece, WorldView
from gradeline.present.roles import LAYER_ROLES

__all__ = ["DRAWING_UNITS", "AuditOptions", "DrawingAudit", "audit_world", "parse_transform"]

#: ``--drawing-units`` values: ``auto`` ($INSUNITS), ``as-file``, or a unit (metres each).
DRAWING_UNITS: dict[str, float | None] = {
    "auto": None,
    "as-file": None,
    "foot": 0.3048,
    "us-foot": 1200.0 / 3937.0,
    "metre": 1.0,
    "millimetre": 0.001,
    "centimetre": 0.01,
    "inch": 0.0254,
}


@dataclass(frozen=True, slots=True)
class AuditOptions:
    """How to read a drawing; None means: from the drawing, else detected or fitted."""

    kind: str | None = None  # "profile" or "plan"
    layer: str | None = None  # profile grade layer
    plan_layer: str | None = None
    exaggeration: float | None = None
    datum: float | None = None
    transform: str = "none"  # "none", "fit" or "DX,DY,DEG"
    drawing_units: str = "auto"
    labels: bool = True


@dataclass(frozen=True)
class DrawingAudit:
    """What was found in one drawing."""

    name: str
    kind: str  # "profile" or "plan"
    layer: str
    units_note: str
    profile: drawing_check.DrawingCheck | None = None
    plan: plan_audit.PlanAudit | None = None
    labels: tuple[label_audit.LabelCheck, ...] = ()
    skipped: dict[str, int] = field(default_factory=dict)
    mapping: tuple[float, float, str] | None = None  # profile: exaggeration, datum, how

    def counts(self) -> tuple[int, int]:
        """(over tolerance, comparisons made)."""
        over = total = 0
        if self.profile is not None:
            total += 2
            over += bool(self.profile.over) + bool(self.profile.uncovered)
        if self.plan is not None:
            total += 2 + len(self.plan.pieces)
            over += bool(self.plan.over) + bool(self.plan.uncovered) + len(self.plan.pieces)
        for c in self.labels:
            total += c.verdict in ("ok", "over")
            over += c.verdict == "over"
        return over, total


def parse_transform(text: str) -> plan_audit.Similarity | str:
    """``none``, ``fit`` or ``DX,DY,DEG[,SCALE]`` (shift, rotation in degrees, scale).

    Examples
    --------
    >>> parse_transform("fit")
    'fit'
    >>> t = parse_transform("100,-50,30")
    >>> (t.dx, t.dy, round(math.degrees(t.angle), 9), t.scale, t.how)
    (100.0, -50.0, 30.0, 1.0, 'given')
    """
    t = text.strip().lower()
    if t in ("none", "fit"):
        return t
    parts = t.split(",")
    try:
        values = [float(p) for p in parts]
    except ValueError:
        values = []
    if len(values) not in (3, 4) or not all(math.isfinite(v) for v in values):
        raise UsageError(f"--transform {text!r}: give none, fit, or DX,DY,DEG[,SCALE]")
    scale = values[3] if len(values) == 4 else 1.0
    if scale <= 0:
        raise UsageError(f"--transform {text!r}: the scale must be positive")
    return plan_audit.Similarity(values[0], values[1], math.radians(values[2]), scale, "given")


def _factor(view: WorldView, meters_per_file_unit: float, file_unit: str, how: str, name: str):
    """Drawing units -> file units: (factor, note)."""
    if how == "as-file":
        return 1.0, "coordinates taken in the file's units (--drawing-units as-file)"
    if how != "auto":
        if how not in DRAWING_UNITS:
            raise UsageError(
                f"--drawing-units {how!r}: expected one of " + ", ".join(DRAWING_UNITS)
            )
        m = DRAWING_UNITS[how]
        assert m is not None
        return m / meters_per_file_unit, f"drawing units {how} (given), converted to {file_unit}"
    if view.unit is None:
        return 1.0, "the drawing states no units ($INSUNITS); coordinates taken in file units"
    m = next(v for n, v in INSUNITS.values() if n == view.unit)
    ratio = m / meters_per_file_unit
    if abs(ratio - 1.0) < 1e-5:  # foot and US survey foot: the same numbers, 2 ppm apart
        return 1.0, f"drawing units {view.unit} ($INSUNITS)"
    raise UsageError(
        f"{name}: the drawing's $INSUNITS says {view.unit} but the alignment is in "
        f"{file_unit}; give --drawing-units as-file to take its coordinates as they are, "
        f"or --drawing-units with the unit it is really drawn in to convert"
    )


def _scaled(view: WorldView, k: float) -> WorldView:
    if k == 1.0:
        return view
    pieces = [
        DrawnPiece(
            p.kind,
            p.points * k,
            p.layer,
            p.handle,
            None if p.radius is None else p.radius * k,
            None if p.center is None else (p.center[0] * k, p.center[1] * k),
        )
        for p in view.pieces
    ]
    texts = [replace(t, x=t.x * k, y=t.y * k, height=t.height * k) for t in view.texts]
    return WorldView(pieces, texts, view.skipped, view.unit)


def _on(view: WorldView, layer: str) -> list[DrawnPiece]:
    return [p for p in view.pieces if p.layer.upper() == layer.upper()]


def _kind(view: WorldView, stored: dict[str, str], opts: AuditOptions, solved, name: str) -> str:
    if opts.kind:
        return opts.kind
    if stored.get("kind") in ("profile", "plan"):
        return stored["kind"]
    layers = {n.upper() for n in view.layers()}
    if opts.layer and opts.layer.upper() in layers:
        return "profile"
    if opts.plan_layer and opts.plan_layer.upper() in layers:
        return "plan"
    if LAYER_ROLES["grade"].upper() in layers:
        return "profile"
    if LAYER_ROLES["plan"].upper() in layers:
        return "plan"
    # by place: a plan lies on the alignment's coordinates, a profile at its stations
    if view.pieces and solved.horizontal is not None:
        pts = np.concatenate([p.points for p in view.pieces])
        n, e, _ = solved.plan_at(np.linspace(solved.horizontal.start, solved.horizontal.end, 200))
        lo, hi = np.array([e.min(), n.min()]), np.array([e.max(), n.max()])
        pad = 0.1 * float(np.max(hi - lo)) + 1.0
        inside = np.all((pts >= lo - pad) & (pts <= hi + pad), axis=1).mean()
        if inside > 0.5:
            return "plan"
    if solved.geometry is not None:
        return "profile"
    raise UsageError(f"{name}: cannot tell whether it is a plan or a profile; give --plan-layer")


def _plan_layer(view: WorldView, opts: AuditOptions, solved, transform, name: str) -> str:
    names = view.layers()
    if opts.plan_layer:
        return opts.plan_layer
    default = next((n for n in names if n.upper() == LAYER_ROLES["plan"].upper()), "")
    if default:
        return default
    if transform == "fit":
        raise UsageError(
            f"{name}: name the centreline layer with --plan-layer to fit a transform; layers "
            "with linework: " + (", ".join(names) or "none")
        )
    # the layer whose linework lies nearest the alignment

    t = transform if isinstance(transform, plan_audit.Similarity) else plan_audit.Similarity()
    proj = solved.horizontal.projector
    best, best_d = "", math.inf
    for layer in names:
        pts = np.concatenate([p.points for p in _on(view, layer)])
        if len(pts) > 400:
            pts = pts[np.linspace(0, len(pts) - 1, 400).astype(np.int64)]
        w = t.apply(pts)
        _, off, status = proj(w[:, 1], w[:, 0])
        d = float(np.median(np.where(status == 0, np.abs(off), np.inf)))
        if d < best_d:
            best, best_d = layer, d
    if not best or not math.isfinite(best_d):
        raise UsageError(
            f"{name}: no layer's linework lies on the alignment; name it with --plan-layer "
            "(and --transform fit for a drawing in other coordinates); layers with linework: "
            + (", ".join(names) or "none")
        )
    return best


def audit_world(
    view: WorldView,
    stored: dict[str, str],
    name: str,
    solved,
    tol: float,
    angle_tol_sec: float,
    opts: AuditOptions,
) -> DrawingAudit:
    """Audit one drawing already read (:func:`gradeline.io.dxf_read.read_world`)."""
    units = solved.document.units
    k, units_note = _factor(view, units.meters_per_unit, units.linear, opts.drawing_units, name)
    view = _scaled(view, k)
    kind = _kind(view, stored, opts, solved, name)
    if kind == "profile":
        return _profile(view, stored, name, solved, tol, angle_tol_sec, opts, units_note)
    return _plan(view, name, solved, tol, angle_tol_sec, opts, units_note)


def _profile(view, stored, name, solved, tol, angle_tol_sec, opts, units_note) -> DrawingAudit:
    if solved.geometry is None:
        raise UsageError(f"{name}: a profile drawing, but the alignment has no profile")
    names = view.layers()
    layer = opts.layer or next((n for n in names if n.upper() == LAYER_ROLES["grade"].upper()), "")
    if not layer:
        raise UsageError(
            f"{name}: name the profile layer with --layer; layers with linework: "
            + (", ".join(names) or "none")
        )
    lines = [p.points for p in _on(view, layer)]
    if not lines:
        raise UsageError(
            f"{name}: no LINE, LWPOLYLINE, POLYLINE, SPLINE or ARC on layer "
            f"{layer!r}; layers with linework: " + (", ".join(names) or "none")
        )
    if (opts.exaggeration is None) != (opts.datum is None):
        raise UsageError("give both --exaggeration and --datum, or neither")
    if opts.exaggeration is not None:
        exag, datum, how = opts.exaggeration, opts.datum, "given"
    elif "exaggeration" in stored and "datum" in stored:
        exag, datum, how = float(stored["exaggeration"]), float(stored["datum"]), "from the drawing"
    else:
        exag, datum = drawing_check.fit_mapping(lines, solved.geometry)
        how = "fitted by least squares"
    assert datum is not None
    result = drawing_check.check_linework(lines, solved.geometry, tol, exag, datum, how)
    checks: tuple[label_audit.LabelCheck, ...] = ()
    if opts.labels:
        checks = tuple(
            label_audit.audit_profile_labels(view.texts, solved, exag, datum, tol, angle_tol_sec)
        )
    return DrawingAudit(
        name,
        "profile",
        layer,
        units_note,
        result,
        None,
        checks,
        dict(view.skipped),
        (exag, datum, how),
    )


def _plan(view, name, solved, tol, angle_tol_sec, opts, units_note) -> DrawingAudit:
    if solved.horizontal is None:
        raise UsageError(f"{name}: a plan drawing, but the alignment has no plan geometry")
    transform = parse_transform(opts.transform)
    layer = _plan_layer(view, opts, solved, transform, name)
    pieces = _on(view, layer)
    if not pieces:
        raise UsageError(
            f"{name}: no LINE, LWPOLYLINE, POLYLINE, SPLINE or ARC on layer {layer!r}; layers "
            "with linework: " + (", ".join(view.layers()) or "none")
        )
    rms = None
    if transform == "fit":
        try:
            t, rms = plan_audit.fit_similarity(pieces, solved.horizontal)
        except GradelineError as err:
            raise UsageError(f"{name}: {err}") from None
    elif isinstance(transform, plan_audit.Similarity):
        t = transform
    else:
        t = plan_audit.Similarity()
    result = plan_audit.audit_plan(pieces, solved.horizontal, tol, layer, t, rms)
    checks: tuple[label_audit.LabelCheck, ...] = ()
    if opts.labels:
        checks = tuple(
            label_audit.audit_plan_labels(view.texts, solved, t.apply, tol, angle_tol_sec, t.scale)
        )
    return DrawingAudit(name, "plan", layer, units_note, None, result, checks, dict(view.skipped))
