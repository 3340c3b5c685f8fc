"""Drawable data for profile and plan drawings: computed once, drawn by any renderer.

The functions here turn solved geometry into plain records -- paths, exact
quadratic curves, arcs, circles and text with their boxes -- in model units.
:mod:`gradeline.render.dxf` writes them to DXF and :mod:`gradeline.sheets.pdf` to PDF; neither
recomputes geometry or invents label text (that comes from
:mod:`gradeline.present.labels`).

Profile mapping: ``x = station`` (internal, continuous), ``y = (elevation -
datum) * exaggeration``; the datum is a round elevation below the lowest drawn
point. Plan mapping: ``x = easting``, ``y = northing``.
"""

from __future__ import annotations

import math
from typing import Any

import numpy as np

from gradeline.errors import UsageError
from gradeline.present import labels
from gradeline.present.items import (
    ArcItem,
    Circle,
    Drawing,
    Path,
    QuadCurve,
    Text,
    _BoxIndex,
    boxes_overlap,
)
from gradeline.present.layout import MAX_DRAWN_PVIS, DraftingLayout, guard_count
from gradeline.solved import SolvedAlignment

__all__ = [
    "ArcItem",
    "Circle",
    "Drawing",
    "Path",
    "ProfileDraft",
    "QuadCurve",
    "Text",
    "boxes_overlap",
    "profile_drawing",
]


# --------------------------------------------------------------------------- profile
def _poly_samples(x0: float, x1: float, c: float, tol: float) -> np.ndarray:
    """Stations splitting [x0, x1] so a parabola with coefficient c deviates < tol."""
    if c == 0:
        return np.array([x0, x1])
    h = math.sqrt(4.0 * tol / abs(c))
    n = max(2, math.ceil((x1 - x0) / h) + 1)
    return np.linspace(x0, x1, n)


def _circle_samples(x0: float, x1: float, r: float, tol: float) -> np.ndarray:
    h = math.sqrt(8.0 * r * tol)
    n = max(2, math.ceil((x1 - x0) / h) + 1)
    return np.linspace(x0, x1, n)


class ProfileDraft:
    """Builds a profile :class:`Drawing` step by step, for the whole profile or a window.

    :meth:`prepare` decides the height (datum, key-point labels, grid top), so a
    caller choosing an exaggeration can measure before :meth:`finish` drafts the rest.
    """

    def __init__(
        self,
        ctx: SolvedAlignment,
        layout: DraftingLayout,
        curves: str,
        window: tuple[float, float] | None,
        strip: bool,
        memo: dict[str, Any] | None = None,
    ) -> None:
        if ctx.geometry is None:
            raise ValueError("profile drawing needs a profile")
        self.ctx = ctx
        self.geom = ctx.geometry
        self.lay = layout
        self.units = ctx.document.units
        self.curves = curves
        self.h = layout.text_height
        self.strip = strip
        self.items: list[Any] = []
        # what does not depend on the exaggeration, kept by a caller that drafts the
        # same window at several (see gradeline.sheets.views.series_exaggeration)
        self.memo: dict[str, Any] = {} if memo is None else memo
        g = self.geom
        if window is None:
            self.x0 = math.floor(g.start / layout.station_minor) * layout.station_minor
            self.x1 = math.ceil(g.end / layout.station_minor) * layout.station_minor
        else:
            self.x0, self.x1 = float(window[0]), float(window[1])
        # the part of the profile that is drawn; the grid ends where it ends
        self.s0, self.s1 = max(g.start, self.x0), min(g.end, self.x1)
        self.gx0, self.gx1 = (self.s0, self.s1) if self.s1 > self.s0 else (self.x0, self.x1)
        guard_count((self.x1 - self.x0) / layout.station_minor, "profile grid lines")
        if len(g.pvi_stations) > MAX_DRAWN_PVIS:
            raise UsageError(
                f"a profile of {len(g.pvi_stations):,} PVIs is more than gradeline drafts "
                f"({MAX_DRAWN_PVIS:,}); is it a survey of points rather than a design?"
            )

    def y(self, z):
        return (np.asarray(z, dtype=float) - self.datum) * self.lay.exaggeration

    def build(self) -> Drawing:
        self.prepare()
        return self.finish()

    def prepare(self) -> None:
        """Datum, key-point labels and grid top: all that decides the drawing's height."""
        lay = self.lay
        major_z, _ = lay.elevation_steps()
        if "zs" not in self.memo:
            self.memo.update(self._samples())
        self.grounds, dense = self.memo["grounds"], self.memo["dense"]
        zmin, zmax = self.memo["zmin"], self.memo["zmax"]
        self.drawn = drawn = self.s1 > self.s0
        self.datum = math.floor(zmin / major_z) * major_z - major_z
        # the labels come after the grade and ground lines in the drawing; they are
        # placed now (they set the grid top) and kept aside until finish()
        self.items = []
        label_top = self._point_labels(dense) if drawn else 0.0
        self.point_labels, self.items = self.items, []
        top_y = max(label_top + self.h, float(self.y(zmax)) + 4 * self.h)
        top = self.datum + top_y / lay.exaggeration
        self.top = math.ceil(top / major_z) * major_z

    def _samples(self) -> dict[str, Any]:
        """Ground pieces in the window, dense stations, lowest and highest elevation."""
        g = self.geom
        grounds = []
        for pieces in self.ctx.ground_arrays:
            for s, z in pieces:
                keep = (s > self.x0) & (s < self.x1)
                lo, hi = max(self.x0, s[0]), min(self.x1, s[-1])
                if hi <= lo:
                    continue
                s2 = np.concatenate([[lo], s[keep], [hi]])
                z2 = np.interp(s2, s, z)
                grounds.append((s2, z2))
        if self.s1 > self.s0:
            # sample the lines labels must clear at least every text height
            n = max(501, math.ceil((self.s1 - self.s0) / self.h) + 1)
            dense = np.linspace(self.s0, self.s1, n)
            zs = [self.ctx.elevation(dense)]
            inside = (g.pvi_stations >= self.x0) & (g.pvi_stations <= self.x1)
            zs.append(g.pvi_elevations[inside])
        else:
            dense = np.empty(0)
            zs = []
        zs += [z for _, z in grounds]
        zs = [z for z in zs if len(z)]
        if not zs:
            zs = [np.array([float(g.pvi_elevations[0])])]
        return {
            "grounds": grounds,
            "dense": dense,
            "zs": zs,
            "zmin": min(float(np.nanmin(z)) for z in zs),
            "zmax": max(float(np.nanmax(z)) for z in zs),
        }

    def height(self) -> float:
        """Height of the finished drawing's extents (after :meth:`prepare`)."""
        bottom = self._strip_bottom() - 0.4 * self.h if self.strip else -4 * self.h
        return float(self.y(self.top)) + self.h - (bottom - self.h)

    def finish(self) -> Drawing:
        """The drawing, after :meth:`prepare`."""
        lay = self.lay
        major_z, minor_z = lay.elevation_steps()
        self.items = []
        if self.drawn:
            self._grade_line()
        self._ground()
        self.items += self.point_labels
        self._grid(major_z, minor_z)
        bottom = -4 * self.h
        if self.strip:
            bottom = self._strip()
        if self.drawn:
            self._grade_labels()
        bottom = self._info(bottom)
        ymax = float(self.y(self.top))
        ext = (self.x0 - 8 * self.h, bottom - self.h, self.x1 + 8 * self.h, ymax + self.h)
        meta = {
            "kind": "profile",
            "exaggeration": lay.exaggeration,
            "datum": self.datum,
            "x_is": "internal station",
            "alignment": self.ctx.alignment.name,
            "profile": self.ctx.profile.name if self.ctx.profile else "",
            "linear_unit": self.units.linear,
            "curves": self.curves,
        }
        return Drawing(tuple(self.items), ext, meta)

    # finished grade ---------------------------------------------------------
    def _grade_line(self) -> None:
        g, tol = self.geom, self.lay.chord_tolerance
        ends = np.append(g.starts[1:], g.end)
        # only the pieces that can reach the window (starts and ends run in order)
        first = int(np.searchsorted(ends, self.s0, side="right"))
        last = int(np.searchsorted(g.starts, self.s1, side="left"))
        for i in range(first, max(first, last)):
            a, b = max(float(g.starts[i]), self.s0), min(float(ends[i]), self.s1)
            if b <= a:
                continue
            if g.circular[i]:
                s = _circle_samples(a, b, float(g.r[i]), tol)
                pts = tuple(zip(s.tolist(), self.y(self.ctx.elevation(s)).tolist(), strict=True))
                cx, cy, r = float(g.cx[i]), float(g.cy[i]), float(g.r[i])
                ang = [
                    math.degrees(math.atan2(float(z) - cy, x - cx))
                    for x, z in ((a, self.ctx.elevation(a)), (b, self.ctx.elevation(b)))
                ]
                start, end = (ang[0], ang[1]) if g.sign[i] > 0 else (ang[1], ang[0])
                self.items.append(ArcItem("grade", (cx, float(self.y(cy))), r, start, end, pts))
            elif g.c[i] != 0.0:
                (z0, z1), (g0, _) = self.ctx.profile_at([a, b])
                # the control point of a parabola over [a, b] is where its end tangents meet
                zc = float(z0) + float(g0) * (b - a) / 2.0
                ctrl = (
                    (a, float(self.y(z0))),
                    ((a + b) / 2, float(self.y(zc))),
                    (b, float(self.y(z1))),
                )
                s = _poly_samples(a, b, float(g.c[i]), tol)
                pts = tuple(zip(s.tolist(), self.y(self.ctx.elevation(s)).tolist(), strict=True))
                self.items.append(QuadCurve("grade", ctrl, pts))
            else:
                z0, z1 = self.ctx.elevation([a, b])
                self.items.append(Path("grade", ((a, float(self.y(z0))), (b, float(self.y(z1))))))
        r = 0.35 * self.h
        for c in g.curves:
            if not (self.x0 <= c.pvi_station <= self.x1):
                continue
            pvi = (c.pvi_station, float(self.y(c.pvi_elevation)))
            for s_end, z_end in (
                (c.bvc_station, c.bvc_elevation),
                (c.evc_station, c.evc_elevation),
            ):
                s_c = min(max(s_end, self.x0), self.x1)
                z_c = c.pvi_elevation + (z_end - c.pvi_elevation) * (s_c - c.pvi_station) / (
                    s_end - c.pvi_station
                )
                self.items.append(Path("tangents", ((s_c, float(self.y(z_c))), pvi)))
        for s, z in zip(g.pvi_stations[1:-1], g.pvi_elevations[1:-1], strict=True):
            if self.x0 <= s <= self.x1:
                self.items.append(Circle("pvi", (float(s), float(self.y(z))), r))

    def _ground(self) -> None:
        for s, z in self.grounds:
            self.items.append(
                Path("ground", tuple(zip(s.tolist(), self.y(z).tolist(), strict=True)))
            )

    # key-point labels: vertical text in columns, spread so they never touch ----
    def _point_labels(self, dense: np.ndarray) -> float:
        if "labels" not in self.memo:
            self.memo["labels"] = self._label_plan(dense)
        h, pitch = self.h, 1.6 * self.h
        highest = 0.0
        for s, z, lines, x, zwin in self.memo["labels"]:
            base = float(self.y(z if zwin is None else zwin)) + 2.0 * h
            anchor = (s, float(self.y(z)))
            self.items.append(Path("labels", (anchor, (x, base - 0.4 * h))))
            for j, text in enumerate(lines):
                # columns sit just left of the leader, so no station line runs through them
                cx = x - 0.75 * h - (len(lines) - 1 - j) * pitch
                item = Text("labels", text, cx, base, h, 90.0, "left", "middle")
                self.items.append(item)
                highest = max(highest, base + item.width)
        return highest

    def _label_plan(self, dense: np.ndarray) -> list[tuple[float, float, list[str], float, Any]]:
        """The key-point labels without the exaggeration: for each, its station and
        elevation, its lines, the station of its column block and the highest line
        (grade, tangent or ground) it must clear, or None."""
        g, st, units, h = self.geom, self.ctx.stationing, self.units, self.h
        wanted = []  # (station, elevation, lines)
        curve_at = {c.index: c for c in g.curves}
        # only PVIs whose curve can reach the window: a sheet formats its own labels
        reach = max((c.length for c in g.curves), default=0.0)
        first = max(1, int(np.searchsorted(g.pvi_stations, self.x0 - reach, side="left")))
        last = min(len(g.pvi_stations) - 1, int(np.searchsorted(g.pvi_stations, self.x1 + reach)))
        for i in range(first, last):
            s, z = float(g.pvi_stations[i]), float(g.pvi_elevations[i])
            c = curve_at.get(i)
            lines = [labels.point_label("PVI", st.label(s), z, units)]
            if c is not None:
                lines += labels.vertical_curve_lines(c, units)
                wanted.append(
                    (
                        c.bvc_station,
                        c.bvc_elevation,
                        [
                            labels.point_label(
                                "BVC", st.label(c.bvc_station), c.bvc_elevation, units
                            )
                        ],
                    )
                )
                wanted.append(
                    (
                        c.evc_station,
                        c.evc_elevation,
                        [
                            labels.point_label(
                                "EVC", st.label(c.evc_station), c.evc_elevation, units
                            )
                        ],
                    )
                )
                if c.turning_station is not None and c.turning_elevation is not None:
                    tag = labels.turning_point_tag(c.curve_type)
                    wanted.append(
                        (
                            c.turning_station,
                            c.turning_elevation,
                            [
                                labels.point_label(
                                    tag, st.label(c.turning_station), c.turning_elevation, units
                                )
                            ],
                        )
                    )
            wanted.append((s, z, lines))
        for eq in st.equations:
            if g.start <= eq.internal <= g.end:
                back, ahead = st.equation_labels(eq)
                z = float(self.ctx.elevation(eq.internal))
                wanted.append((eq.internal, z, [labels.equation_text(back, ahead)]))
        for end, i in (("start", 0), ("end", -1)):
            s, z = float(g.pvi_stations[i]), float(g.pvi_elevations[i])
            wanted.append(
                (s, z, [labels.point_label(labels.profile_end_tag(end), st.label(s), z, units)])
            )
        wanted = sorted(w for w in wanted if self.x0 <= w[0] <= self.x1)
        if not wanted:
            return []
        pitch = 1.6 * h
        widths = [len(w[2]) * pitch for w in wanted]
        xs = [w[0] for w in wanted]
        # block i reaches from pos - widths[i] + 0.6h (its left column) to pos - 0.25h,
        # so two blocks keep a 0.6h gap when pos[i] >= pos[i - 1] + widths[i]; a
        # forward pass pushes right, a backward pass pulls left inside the grid
        pos: list[float] = []
        for i, x in enumerate(xs):
            pos.append(max(x, self.gx0 + widths[i]) if not pos else max(x, pos[-1] + widths[i]))
        pos[-1] = min(pos[-1], self.gx1)
        for i in range(len(pos) - 2, -1, -1):
            pos[i] = min(pos[i], pos[i + 1] - widths[i + 1])
        # lines that labels must clear: finished grade, tangents, ground
        zs = self.ctx.elevation(dense)
        tz = self.ctx.tangent_elevation(dense)
        top_curve = np.fmax(zs, tz)
        for gs, gz in self.grounds:
            top_curve = np.fmax(top_curve, np.interp(dense, gs, gz, left=np.nan, right=np.nan))
        out = []
        for (s, z, lines), x, w in zip(wanted, pos, widths, strict=True):
            lo, hi = min(s, x) - w, max(s, x) + w
            win = (dense >= lo) & (dense <= hi)
            # the highest line under the block: the exaggeration keeps the order
            out.append((s, z, lines, x, np.nanmax(top_curve[win]) if win.any() else None))
        return out

    # grid, elevation and station labels ---------------------------------------
    def _majors(self) -> np.ndarray:
        return self.ctx.stationing.round_stations(self.lay.station_major, self.gx0, self.gx1)

    def _grid(self, major_z: float, minor_z: float) -> None:
        lay, st, h, units = self.lay, self.ctx.stationing, self.h, self.units
        y_top = float(self.y(self.top))
        gx0, gx1 = self.gx0, self.gx1
        minor = st.round_stations(lay.station_minor, gx0, gx1)
        major = self._majors()
        is_major = np.isin(minor, major)
        for x, m in zip(minor.tolist(), is_major.tolist(), strict=True):
            self.items.append(Path("grid_major" if m else "grid", ((x, 0.0), (x, y_top))))
        for x in (gx0, gx1):
            if not np.any(np.isclose(minor, x)):
                self.items.append(Path("grid_major", ((x, 0.0), (x, y_top))))
        for x in major.tolist():
            text = labels.grid_station_text(float(st.label_value(x)), units)
            self.items.append(Text("labels", text, x, -1.2 * h, h, 0.0, "center", "top"))
        n = round((self.top - self.datum) / minor_z)
        guard_count(
            n + 1,
            "profile elevation grid lines",
            f"the profile spans {self.top - self.datum:,.0f} in elevation; is an elevation "
            "in the file wrong?",
        )
        for k in range(n + 1):
            z = self.datum + k * minor_z
            is_maj = abs(z / major_z - round(z / major_z)) < 1e-9
            y = float(self.y(z))
            self.items.append(Path("grid_major" if is_maj else "grid", ((gx0, y), (gx1, y))))
            if is_maj:
                text = labels.grid_elevation_text(z, major_z)
                self.items.append(Text("labels", text, gx0 - 0.8 * h, y, h, 0.0, "right", "middle"))
                self.items.append(Text("labels", text, gx1 + 0.8 * h, y, h, 0.0, "left", "middle"))

    def _strip_width(self) -> float:
        return labels.text_width("0" * 7, self.h)

    def _strip_bottom(self) -> float:
        """Foot of the elevation strip's text (its last line is 0.4 h lower)."""
        return -3.4 * self.h - 2 * self._strip_width()

    def _strip(self) -> float:
        """Existing-ground and finished-grade elevations at each labelled station."""
        h, units = self.h, self.units
        major = self._majors()
        fg = self.ctx.elevation(major)
        eg = np.full(len(major), np.nan)
        for s, z in self.grounds:
            inside = (major >= s[0]) & (major <= s[-1])
            eg[inside] = np.interp(major[inside], s, z)
        width = self._strip_width()
        rows = [
            (labels.STRIP_TITLES[0], fg, -2.6 * h),
            (labels.STRIP_TITLES[1], eg, -3.4 * h - width),
        ]
        for title, values, top in rows:
            # the row's title reads in the first gap between its values wide enough for it
            need = labels.text_width(title, h) + 2.5 * h
            edges = [self.gx0 - h] + major.tolist() + [self.gx1]
            gap = next(
                (a for a, b in zip(edges[:-1], edges[1:], strict=True) if b - a >= need), None
            )
            if gap is not None:
                item = Text(
                    "labels", title, gap + 1.8 * h, top - width / 2, h, 0.0, "left", "middle"
                )
            else:
                item = Text(
                    "labels", title, self.gx0 - 0.8 * h, top - width / 2, h, 0.0, "right", "middle"
                )
            self.items.append(item)
            for x, z in zip(major.tolist(), values.tolist(), strict=True):
                if math.isfinite(z):
                    self.items.append(
                        Text(
                            "labels",
                            labels.elevation_text(z, units),
                            x + 0.5 * h,
                            top,
                            h,
                            90.0,
                            "right",
                            "middle",
                        )
                    )
        bottom = self._strip_bottom()
        self.items.append(Path("grid", ((self.gx0, -2.2 * h), (self.gx1, -2.2 * h))))
        self.items.append(
            Path("grid", ((self.gx0, -3.0 * h - width), (self.gx1, -3.0 * h - width)))
        )
        self.items.append(
            Path("grid", ((self.gx0, bottom - 0.4 * h), (self.gx1, bottom - 0.4 * h)))
        )
        return bottom - 0.4 * h

    def _grade_labels(self) -> None:
        g, h, exag = self.geom, self.h, self.lay.exaggeration
        taken = _BoxIndex([t.corners() for t in self.items if isinstance(t, Text)])
        curve_at = {c.index: c for c in g.curves}
        # only the grades between PVIs that can reach the window (a grade's straight
        # part lies between its two PVIs)
        first = max(int(np.searchsorted(g.pvi_stations, self.x0, side="right")) - 1, 0)
        last = min(
            int(np.searchsorted(g.pvi_stations, self.x1, side="left")), len(g.pvi_stations) - 1
        )
        for i in range(first, max(first, last)):
            s0, s1 = float(g.pvi_stations[i]), float(g.pvi_stations[i + 1])
            z0, z1 = float(g.pvi_elevations[i]), float(g.pvi_elevations[i + 1])
            grade = (z1 - z0) / (s1 - s0)
            # the straight part of the grade, between the curves at its two PVIs
            back, ahead = curve_at.get(i), curve_at.get(i + 1)
            t0 = back.evc_station if back is not None else s0
            t1 = ahead.bvc_station if ahead is not None else s1
            v0, v1 = max(t0, self.x0), min(t1, self.x1)  # visible part
            if v1 <= v0:
                continue
            angle = math.degrees(math.atan(grade * exag))
            text = labels.grade_text(grade)
            for frac, side in (
                (0.5, 1),
                (0.35, 1),
                (0.65, 1),
                (0.5, -1),
                (0.25, 1),
                (0.75, 1),
                (0.35, -1),
                (0.65, -1),
            ):
                s = v0 + frac * (v1 - v0)
                z = z0 + grade * (s - s0)
                a = math.radians(angle)
                off = side * 0.6 * h
                x, y = s - off * math.sin(a), float(self.y(z)) + off * math.cos(a)
                item = Text(
                    "labels", text, x, y, h, angle, "center", "bottom" if side > 0 else "top"
                )
                box = item.corners()
                if box[:, 0].min() < v0 or box[:, 0].max() > v1:
                    continue
                if not taken.hits(box, 0.2 * h):
                    self.items.append(item)
                    taken.add(box)
                    break

    def _info(self, bottom: float) -> float:
        """The note mapping drawing y to elevation, for CAD users (not on sheets)."""
        if self.strip:
            return bottom
        lay, h = self.lay, self.h
        u = self.units.symbol
        text = labels.profile_mapping_note(self.ctx.alignment.name, self.datum, lay.exaggeration, u)
        y = bottom + 0.8 * h if not self.strip else bottom - 0.6 * h
        self.items.append(Text("info", text, self.x0, y, 0.8 * h, 0.0, "left", "top"))
        return y - 0.8 * h


def profile_drawing(
    ctx: SolvedAlignment,
    layout: DraftingLayout,
    curves: str = "spline",
    *,
    window: tuple[float, float] | None = None,
    strip: bool = False,
) -> Drawing:
    """The profile drawing of ``ctx`` (needs a profile).

    Parameters
    ----------
    curves : {"spline", "polyline"}
        Renderers draw parabolas as exact quadratic curves (``spline``) or as the
        polylines within ``layout.chord_tolerance`` that every item carries.
    window : (float, float), optional
        Draw only these stations, with a datum and grid of their own (a sheet).
    strip : bool
        Add the strip of finished-grade and existing-ground elevations under the
        grid at every labelled station (plan-and-profile sheets).
    """
    return ProfileDraft(ctx, layout, curves, window, strip).build()
