"""Cross-check: recompute every stated value of a LandXML file, and compare
drafted profile linework with the computed finished grade.

Each comparison is a :class:`Finding` -- stated value, computed value,
difference and verdict -- so a reviewer sees exactly which element and which
value disagrees. Nothing here prints; :mod:`gradeline.render.reports` renders.
"""

from __future__ import annotations

from dataclasses import replace

import numpy as np

from gradeline.analysis.check_plan import check_plan
from gradeline.analysis.findings import (
    DEFAULT_ANGLE_TOLERANCE_SEC,
    DEFAULT_TOLERANCE,
    DEFAULT_TOLERANCES,
    Collector,
    Finding,
    Tolerances,
)
from gradeline.errors import GradelineError
from gradeline.geometry import vertical
from gradeline.geometry.horizontal import HorizontalGeometry
from gradeline.geometry.stations import Stationing
from gradeline.geometry.vertical import VerticalGeometry
from gradeline.model import Alignment, Document
from gradeline.solved import SolvedAlignment, solve_alignment

__all__ = [
    "DEFAULT_ANGLE_TOLERANCE_SEC",
    "DEFAULT_TOLERANCE",
    "Finding",
    "Tolerances",
    "check_alignment",
    "check_document",
    "check_ground_against_surface",
]


# --------------------------------------------------------------------------- profile
def _check_profile(
    c: Collector,
    al: Alignment,
    doc: Document,
    hz: HorizontalGeometry | None,
    known: dict[int, VerticalGeometry | None],
) -> None:
    for bad in al.broken_profiles:  # a profile that could not be read is a finding
        c.items.append(
            _unreadable(al.name, "ProfAlign", f"profile {bad.name!r} readable", bad.error)
        )
    units = doc.units
    st = Stationing(units, al.equations)
    lo = hz.start if hz is not None else al.sta_start
    hi = hz.end if hz is not None else (al.sta_start + al.length if al.length else None)
    for prof in al.profiles:
        for i, p in enumerate(prof.pvis, start=1):
            if hi is not None and not (lo - c.tol.distance <= p.station <= hi + c.tol.distance):
                c.note(
                    p.element,
                    i,
                    p.station,
                    "PVI inside the alignment",
                    "over",
                    f"PVI {st.label(p.station)} lies outside the alignment ({st.label(lo)} "
                    f"to {st.label(hi)})",
                    p.source,
                )
        try:
            geom = known.get(id(prof)) or vertical.solve(prof, label=st.label)
        except GradelineError as err:
            c.note(
                err.element or "ProfAlign",
                None,
                None,
                "profile geometry",
                "over",
                err.message,
                err.source,
            )
            continue
        c.note(
            "ProfAlign",
            None,
            None,
            f"profile {prof.name!r} solved",
            "ok",
            f"{len(geom.curves)} vertical curves, none overlapping or past an end",
            prof.source,
        )
        for curve in geom.curves:
            spec = prof.pvis[curve.index]
            if spec.kind != "circular":
                continue
            if spec.arc_length is not None and curve.arc_length is not None:
                c.distance(
                    "CircCurve",
                    curve.index + 1,
                    curve.pvi_station,
                    "length (arc R x change of grade angle)",
                    spec.arc_length,
                    curve.arc_length,
                    spec.source,
                    units.symbol,
                    ""
                    if abs(spec.arc_length - curve.arc_length) <= c.tol.distance
                    else (
                        f"the stated length matches the horizontal length {curve.length:.4f}"
                        if abs(spec.arc_length - curve.length) <= c.tol.distance
                        else ""
                    ),
                )
            if spec.radius is not None:
                sign_ok = (spec.radius > 0) == (curve.curve_type == "sag")
                c.note(
                    "CircCurve",
                    curve.index + 1,
                    curve.pvi_station,
                    "radius sign",
                    "ok" if sign_ok else "info",
                    "positive radius on a sag, negative on a crest"
                    if sign_ok
                    else f"radius {spec.radius:g} on a {curve.curve_type}: the sign differs from "
                    "the "
                    "usual convention (positive sag, negative crest)",
                    spec.source,
                )
    for gr in al.grounds:
        for piece in gr.pieces:
            if hi is None or not piece.stations:
                continue
            if piece.stations[0] < lo - c.tol.distance or piece.stations[-1] > hi + c.tol.distance:
                c.note(
                    "ProfSurf",
                    None,
                    piece.stations[0],
                    "ground profile inside the alignment",
                    "over",
                    f"ground {gr.name!r} runs {st.label(piece.stations[0])} to "
                    f"{st.label(piece.stations[-1])}, beyond the alignment ({st.label(lo)} to "
                    f"{st.label(hi)})",
                    piece.source,
                )


def _unreadable(alignment: str, element: str, quantity: str, error: Exception) -> Finding:
    source = getattr(error, "source", None)
    message = str(error)  # names file, line and element
    return Finding(
        alignment, element, None, None, quantity, None, None, None, "over", message, "", source
    )


def _check_extents(c: Collector, solved: SolvedAlignment) -> None:
    """The profile's ends against the plan's: a profile that stops short leaves road
    without elevations; one that runs on has no coordinates there."""
    g, hz, st = solved.geometry, solved.horizontal, solved.stationing
    assert g is not None and hz is not None
    both = (
        f"profile {st.label(g.start)} to {st.label(g.end)}, plan {st.label(hz.start)} "
        f"to {st.label(hz.end)}"
    )
    unit = solved.document.units.symbol
    src = solved.profile.source if solved.profile is not None else None
    c.distance(
        "ProfAlign",
        None,
        g.start,
        "profile start against plan start (POB)",
        g.start,
        hz.start,
        src,
        unit,
        both,
    )
    c.distance(
        "ProfAlign",
        None,
        g.end,
        "profile end against plan end (POE)",
        g.end,
        hz.end,
        src,
        unit,
        both,
    )


def check_alignment(solved: SolvedAlignment, tol: Tolerances = DEFAULT_TOLERANCES) -> list[Finding]:
    """Every self-consistency finding of one solved alignment.

    The plan and the solved profile are taken from ``solved``; the alignment's
    other profiles are solved here (a profile that does not solve is a finding).
    """
    al, doc = solved.alignment, solved.document
    c = Collector(al.name, tol)
    hz = solved.horizontal
    if hz is not None:
        check_plan(c, al, hz, doc)
    if solved.geometry is not None and hz is not None:
        _check_extents(c, solved)
    known = {id(solved.profile): solved.geometry} if solved.profile is not None else {}
    _check_profile(c, al, doc, hz, known)
    return c.items


def check_document(
    doc: Document, alignment: str | None = None, tol: Tolerances = DEFAULT_TOLERANCES
) -> list[Finding]:
    """Every self-consistency finding of the chosen alignment (or all of them)."""
    broken = {b.name: b for b in doc.broken}
    if alignment is not None:
        chosen = [] if alignment in broken else [doc.alignment(alignment)]
    else:
        if not doc.names:
            doc.alignment(None)  # raises "no alignments"
        chosen = list(doc.alignments)
    out: list[Finding] = []
    for bad in doc.broken:  # an alignment that could not be read is a finding, not a stop
        if alignment is None or alignment == bad.name:
            out.append(_unreadable(bad.name, "Alignment", "alignment readable", bad.error))
    for al in chosen:
        if al.horizontal is not None:
            try:
                solved = solve_alignment(doc, al, None, need_profile=False)
            except GradelineError as err:  # a plan that does not solve is reported
                out.append(_unreadable(al.name, "CoordGeom", "plan geometry solves", err))
                continue
            if al.profiles:  # the first profile, for its ends against the plan's
                try:
                    geom = vertical.solve(al.profiles[0], label=solved.stationing.label)
                    solved = replace(solved, profile=al.profiles[0], geometry=geom)
                except GradelineError:
                    pass  # the profile checks report it
            out.extend(check_alignment(solved, tol))
        else:
            c = Collector(al.name, tol)
            _check_profile(c, al, doc, None, {})
            out.extend(c.items)
    return out


def check_ground_against_surface(
    alignment: Alignment, tin_at, tol: Tolerances, surface: str
) -> list[Finding]:
    """Stated ``ProfSurf`` points against the TIN surface at the same stations.

    ``tin_at`` maps an array of internal stations to TIN elevations (NaN off the
    surface). One finding per ground profile, at its worst point.
    """
    c = Collector(alignment.name, tol)
    for gp in alignment.grounds:
        s = np.array([x for p in gp.pieces for x in p.stations])
        z = np.array([v for p in gp.pieces for v in p.elevations])
        if not len(s):
            continue
        tin = np.asarray(tin_at(s))
        on = np.isfinite(tin)
        if not on.any():
            c.note(
                "ProfSurf",
                None,
                None,
                f"ground {gp.name!r} against surface {surface!r}",
                "info",
                "no point of the ground profile lies on the surface",
                gp.source,
            )
            continue
        d = z[on] - tin[on]
        worst = int(np.argmax(np.abs(d)))
        over = int((np.abs(d) > tol.distance).sum())
        c.distance(
            "ProfSurf",
            None,
            float(s[on][worst]),
            f"ground {gp.name!r} against surface {surface!r} (worst point)",
            float(z[on][worst]),
            float(tin[on][worst]),
            gp.source,
            message=f"{over} of {int(on.sum())} points differ by more than {tol.distance:g}"
            + (f"; {int((~on).sum())} points off the surface" if (~on).any() else ""),
        )
    return c.items
