"""Label audit: what the texts of a drawing state, against the computed geometry.

Texts are read in world coordinates (:func:`gradeline.io.dxf_read.read_world`),
stacked lines are joined into label blocks, and each block is read into
statements (:func:`read_statements`): stations with their point tag (PVI, BVC,
PC, ...), elevations, grades, L, K, A, E, R, delta, D, T and the spiral values,
station equations. A block is split into clauses at each tagged station; the
clause's values belong to the feature that station names. Each clause is tied to
the nearest computed feature of its kind -- by the text's position (profile: x is
the station; plan: the station and offset of the text) or by the station it
states, whichever is closer -- and every value is compared.

A value agrees when it differs from the computed one by no more than the
tolerance or half a unit of its last printed digit, whichever is larger (a label
rounded to the precision it shows is right). Blocks with digits that read as no
statement, and statements with nothing to tie to, are listed, never dropped.
"""

from __future__ import annotations

import math
import re
from collections.abc import Callable, Iterable
from dataclasses import dataclass, field

import numpy as np

from gradeline.io.dxf_read import DrawnText, plain_codes

__all__ = [
    "LabelCheck",
    "Statement",
    "audit_plan_labels",
    "audit_profile_labels",
    "label_blocks",
    "read_statements",
]


# --------------------------------------------------------------------------- reading
@dataclass(frozen=True, slots=True)
class Statement:
    """One value a label states.

    ``quantity``: ``station`` (``tag`` names the point, e.g. ``PVI``), ``elevation``,
    ``grade`` (percent), ``A`` (percent), ``L``, ``L1``, ``L2``, ``K``, ``E``, ``R``,
    ``T``, ``Ts``, ``Ls``, ``Lc``, ``Es``, ``delta``, ``delta_c``, ``delta_s``, ``D``
    (angles in degrees), ``equation`` (``value`` back, ``second`` ahead) or ``number``
    (a bare number: a grid label). ``decimals`` is the printed precision.
    """

    quantity: str
    value: float
    decimals: int
    raw: str
    tag: str | None = None
    second: float | None = None
    side: str | None = None  # LT or RT after a delta


_NUM = r"[+-]?(?:\d+(?:\.\d*)?|\.\d+)"
_STA = r"[+-]?\d+\+\d+(?:\.\d+)?"
_UNIT = r"(?:\s*(?:'|FT\b|M\b|US\s*FT\b))?"
_ANGLE = (
    r"(?:(?P<{p}d>\d+)\s*°\s*(?P<{p}m>\d+)\s*'\s*(?P<{p}s>\d+(?:\.\d+)?)\s*\"?"
    r"|(?P<{p}d2>\d+)-(?P<{p}m2>\d+)-(?P<{p}s2>\d+(?:\.\d+)?)"
    r"|(?P<{p}dd>\d+(?:\.\d+)?)\s*°)"
)
#: Point tags and the words other programs use for them.
TAGS = {
    "BEGIN PROFILE": "BEGIN PROFILE",
    "END PROFILE": "END PROFILE",
    "HIGH POINT": "HIGH PT",
    "HIGH PT": "HIGH PT",
    "LOW POINT": "LOW PT",
    "LOW PT": "LOW PT",
    "PVI": "PVI",
    "VPI": "PVI",
    "PVC": "BVC",
    "PVT": "EVC",
    "BVC": "BVC",
    "EVC": "EVC",
    "BVCE": "BVC",
    "EVCE": "EVC",
    "POB": "POB",
    "POE": "POE",
    "PI": "PI",
    "PC": "PC",
    "PT": "PT",
    "TS": "TS",
    "SC": "SC",
    "CS": "CS",
    "ST": "ST",
}
_TAG_RE = "|".join(sorted((re.escape(t) for t in TAGS), key=len, reverse=True))

# (name, pattern): tried in this order; what a pattern matched is not read again
_PATTERNS: list[tuple[str, re.Pattern[str]]] = [
    ("mapping", re.compile(r"^.*\bX\s*=\s*STATION.*$")),
    (
        "equation",
        re.compile(
            rf"(?:STA(?:TION)?\.?\s*EQ(?:UATION)?\.?\s*)?(?P<back>{_STA})\s*(?:BK|BACK)\.?\s*="
            rf"\s*(?P<ahead>{_STA})\s*(?:AHEAD|AHD|AH)\.?"
        ),
    ),
    ("curve_name", re.compile(r"\b(?:CURVE|CRV\.?|C)\s*(?:NO\.?\s*)?\d+\b(?!\s*[=+.])")),
    ("sheet", re.compile(r"\bSHEETS?\s+\d+(?:\s+OF\s+\d+)?")),
    (
        "station",
        re.compile(
            rf"(?:\b(?P<tag>{_TAG_RE})\b\.?\s*(?:STA(?:TION)?\.?)?\s*[:=]?\s*"
            rf"|\bSTA(?:TION)?\.?\s*[:=]?\s*)?(?P<v>{_STA})"
        ),
    ),
    ("elevation", re.compile(rf"\b(?:ELEVATION|ELEV|EL)\.?\s*[:=]?\s*(?P<v>{_NUM}){_UNIT}")),
    ("A", re.compile(rf"\bA\s*[:=]\s*(?P<v>{_NUM})\s*%?")),
    ("grade", re.compile(rf"(?:\b(?:GRADE|G|S)\s*[:=]?\s*)?(?P<v>{_NUM})\s*%")),
    ("L1", re.compile(rf"\bL1\s*[:=]\s*(?P<v>{_NUM}){_UNIT}")),
    ("L2", re.compile(rf"\bL2\s*[:=]\s*(?P<v>{_NUM}){_UNIT}")),
    ("Ls", re.compile(rf"\bLS\s*[:=]\s*(?P<v>{_NUM}){_UNIT}(?:\s*/\s*(?P<w>{_NUM}){_UNIT})?")),
    ("Ts", re.compile(rf"\bTS\s*[:=]\s*(?P<v>{_NUM}){_UNIT}(?:\s*/\s*(?P<w>{_NUM}){_UNIT})?")),
    ("Lc", re.compile(rf"\bLC\s*[:=]\s*(?P<v>{_NUM}){_UNIT}")),
    ("Es", re.compile(rf"\bES\s*[:=]\s*(?P<v>{_NUM}){_UNIT}")),
    (
        "L",
        re.compile(
            rf"(?:\b(?:LVC|VCL|LENGTH|L)\s*[:=]\s*(?P<v>{_NUM}){_UNIT}"
            rf"|(?P<v2>{_NUM})\s*'?\s*V\.?C\.?\b)"
        ),
    ),
    ("K", re.compile(rf"\bK\s*[:=]\s*(?P<v>{_NUM})")),
    ("E", re.compile(rf"\bE\s*[:=]\s*(?P<v>{_NUM}){_UNIT}")),
    ("R", re.compile(rf"\b(?:RADIUS|R)\s*[:=]?\s*(?P<v>\d+(?:\.\d*)?){_UNIT}")),
    ("T", re.compile(rf"\b(?:TANGENT|T)\s*[:=]\s*(?P<v>{_NUM}){_UNIT}")),
    (
        "delta",
        re.compile(
            r"(?:Δ|\bDELTA|\bI)\s*(?P<sub>C|S)?\s*[:=]\s*"
            + _ANGLE.format(p="a")
            + r"(?:\s*/\s*"
            + _ANGLE.format(p="b")
            + r")?\s*(?P<side>LT|RT|LEFT|RIGHT)?"
        ),
    ),
    ("D", re.compile(r"\bD(?:C)?\s*[:=]\s*" + _ANGLE.format(p="a"))),
    ("number", re.compile(rf"^\s*(?P<v>{_NUM})\s*$")),
]


#: For each pattern, strings one of which a text must hold for it to match (each
#: pattern's literal parts; upper case, as :func:`normalize` leaves a text): a pattern
#: none of whose strings is in the text is not tried. A test holds every pattern to it.
_NEEDS: dict[str, tuple[str, ...]] = {
    "mapping": ("STATION",),
    "equation": ("+",),
    "curve_name": ("C",),
    "sheet": ("SHEET",),
    "station": ("+",),
    "elevation": ("EL",),
    "A": ("A",),
    "grade": ("%",),
    "L1": ("L1",),
    "L2": ("L2",),
    "Ls": ("LS",),
    "Ts": ("TS",),
    "Lc": ("LC",),
    "Es": ("ES",),
    "L": ("L", "V"),
    "K": ("K",),
    "E": ("E",),
    "R": ("R",),
    "T": ("T",),
    "delta": ("Δ", "I", "DELTA"),
    "D": ("D",),
}


def _decimals(text: str) -> int:
    return len(text.split(".", 1)[1]) if "." in text else 0


def normalize(text: str) -> str:
    """Upper case, one kind of minus, quote and degree sign, single spaces.

    Examples
    --------
    >>> normalize("el.\\u00a0852.70  \\u2212 1.5\\u2032")
    "EL. 852.70 - 1.5'"
    """
    table = {
        "\u2212": "-",
        "\u2013": "-",
        "\u2032": "'",
        "\u2019": "'",
        "\u2033": '"',
        "\u201d": '"',
        "\u00ba": "°",
        "\u00a0": " ",
        "\u2206": "Δ",
    }
    out = "".join(table.get(ch, ch) for ch in text).replace("''", '"')
    out = plain_codes(out)  # TEXT special codes a typed label may still carry (%%d, ...)
    return re.sub(r"\s+", " ", out.upper()).strip()


def _station_value(text: str) -> float:
    sign = -1.0 if text.strip().startswith("-") else 1.0
    head, _, tail = text.strip().lstrip("+-").partition("+")
    return sign * float(head + tail) if tail else sign * float(head)


def _angle(m: re.Match[str], p: str) -> tuple[float, int] | None:
    """(degrees, printed decimals of its last unit, counted in seconds) from an angle."""
    g = m.groupdict()
    if g.get(p + "d") is not None:
        s = g[p + "s"]
        return int(g[p + "d"]) + int(g[p + "m"]) / 60 + float(s) / 3600, _decimals(s)
    if g.get(p + "d2") is not None:
        s = g[p + "s2"]
        return int(g[p + "d2"]) + int(g[p + "m2"]) / 60 + float(s) / 3600, _decimals(s)
    if g.get(p + "dd") is not None:
        d = g[p + "dd"]
        return float(d), _decimals(d) - 10  # decimal degrees: see _allowed
    return None


#: Longest label text read; a longer one (no label is) is listed unread, which also keeps
#: the patterns' work bounded on hostile drawings.
MAX_LABEL_CHARS = 1000


def read_statements(text: str) -> tuple[list[Statement], str]:
    """The statements of one label text, and what of it was read as none.

    Examples
    --------
    >>> st, rest = read_statements("PVI STA 12+34.56  EL. 852.70")
    >>> [(s.quantity, s.tag, s.value, s.decimals) for s in st], rest
    ([('station', 'PVI', 1234.56, 2), ('elevation', None, 852.7, 2)], '')
    >>> [(s.quantity, s.value) for s in read_statements("R=1800'  Δ = 28°00'00\\" RT")[0]]
    [('R', 1800.0), ('delta', 28.0)]
    >>> read_statements("-1.850%")[0][0].quantity
    'grade'
    """
    if len(text) > MAX_LABEL_CHARS:
        return [], text
    work = normalize(text)
    found: list[tuple[int, Statement]] = []
    for name, pat in _PATTERNS:
        needs = _NEEDS.get(name)
        if needs is not None and not any(n in work for n in needs):
            continue
        for m in list(pat.finditer(work)):
            if not m.group(0).strip():
                continue
            st = _statement(name, m)
            if st is not None:
                found.append((m.start(), st))
            work = work[: m.start()] + " " * (m.end() - m.start()) + work[m.end() :]
    found.sort(key=lambda p: p[0])
    rest = re.sub(r"\s+", " ", work).strip()
    return [s for _, s in found], rest


def _statement(name: str, m: re.Match[str]) -> Statement | None:
    raw = m.group(0).strip()
    g = m.groupdict()
    if name in ("mapping", "curve_name", "sheet"):
        return None  # read, nothing to check
    if name == "equation":
        back, ahead = g["back"], g["ahead"]
        return Statement(
            "equation", _station_value(back), _decimals(back), raw, second=_station_value(ahead)
        )
    if name == "station":
        tag = TAGS.get(g["tag"]) if g.get("tag") else None
        return Statement("station", _station_value(g["v"]), _decimals(g["v"]), raw, tag)
    if name in ("delta", "D"):
        a = _angle(m, "a")
        if a is None:
            return None
        b = _angle(m, "b") if name == "delta" else None
        qty = (
            "D"
            if name == "D"
            else {"C": "delta_c", "S": "delta_s"}.get(g.get("sub") or "", "delta")
        )
        side = g.get("side")
        side = {"LEFT": "LT", "RIGHT": "RT"}.get(side, side) if side else None
        return Statement(qty, a[0], a[1], raw, second=b[0] if b else None, side=side)
    v = g.get("v") if g.get("v") is not None else g.get("v2")
    if v is None:
        return None
    w = g.get("w")
    return Statement(name, float(v), _decimals(v), raw, second=float(w) if w else None)


# --------------------------------------------------------------------------- blocks
@dataclass(frozen=True, slots=True)
class Block:
    """Stacked text lines read as one label, top line first."""

    texts: tuple[DrawnText, ...]

    @property
    def text(self) -> str:
        return " / ".join(t.text.replace("\n", " / ") for t in self.texts)

    @property
    def first(self) -> DrawnText:
        return self.texts[0]


_BARE = re.compile(rf"^\s*(?:{_NUM}|{_STA})\s*$")


def label_blocks(texts: Iterable[DrawnText]) -> list[Block]:
    """Join single-line texts stacked as one label: same layer, rotation and height, one
    below the other (in the text's own direction) within 2.2 heights, starting within
    0.75 height of each other. Bare numbers (grid labels) stay alone."""
    singles: list[DrawnText] = []
    out: list[Block] = []
    for t in texts:
        if t.lines > 1 or _BARE.match(t.text) or t.height <= 0:
            out.append(Block((t,)))
        else:
            singles.append(t)
    groups: dict[tuple, list[tuple[float, float, DrawnText]]] = {}
    for t in singles:
        a = math.radians(t.rotation)
        u = t.x * math.cos(a) + t.y * math.sin(a)
        v = -t.x * math.sin(a) + t.y * math.cos(a)
        key = (t.layer, round(t.rotation % 360.0, 1), round(math.log(t.height), 1))
        groups.setdefault(key, []).append((u, v, t))
    for items in groups.values():
        items.sort(key=lambda it: (-it[1], it[0]))
        out.extend(_collect(items, items[0][2].height))
    return out


def _collect(items, h) -> list[Block]:
    """Chain lines (sorted top down) onto the first block whose last line sits just
    above. The lines come top down, so a block whose last line is more than 2.2
    heights above the current one never takes another: it is no longer looked at."""
    blocks: list[list[tuple[float, float, DrawnText]]] = []
    live: list[int] = []  # blocks that may still take a line, in the order made
    for u, v, t in items:
        found = None
        still = []
        for i in live:
            bu, bv, _ = blocks[i][-1]
            if bv - v > 2.2 * h:
                continue  # closed for good
            still.append(i)
            if found is None and abs(u - bu) <= 0.75 * h and 0 < bv - v <= 2.2 * h:
                found = i
        if found is not None:
            blocks[found].append((u, v, t))
        else:
            still.append(len(blocks))
            blocks.append([(u, v, t)])
        live = still
    return [Block(tuple(x[2] for x in b)) for b in blocks]


# --------------------------------------------------------------------------- checks
@dataclass(frozen=True, slots=True)
class LabelCheck:
    """One stated value against its computed one (or a text that could not be read/tied).

    ``verdict``: ``ok``, ``over``, ``unread`` (digits that read as no statement) or
    ``untied`` (a statement with no feature to compare it with).
    """

    text: str
    x: float
    y: float
    layer: str
    handle: str
    quantity: str
    feature: str
    station: float | None
    stated: float | None
    computed: float | None
    difference: float | None
    unit: str
    verdict: str
    note: str = ""


def _allowed(decimals: int, tol: float, kind: str) -> float:
    """What a printed value may differ by: the tolerance or half its last digit."""
    if kind == "angle":  # seconds; decimal degrees are marked by decimals - 10
        half = 0.5 * 10.0 ** -(decimals + 10) * 3600 if decimals < -5 else 0.5 * 10.0**-decimals
        return max(tol, half) / 3600.0 * (1 + 1e-9)
    return max(tol, 0.5 * 10.0**-decimals) * (1 + 1e-9) + 1e-12


@dataclass
class _Audit:
    """Shared bookkeeping of one drawing's label audit."""

    tol: float
    angle_tol_sec: float
    unit: str
    checks: list[LabelCheck] = field(default_factory=list)

    def compare(
        self,
        blk: Block,
        st: Statement,
        quantity: str,
        feature: str,
        station: float | None,
        computed: float,
        kind: str = "distance",
        unit: str | None = None,
        note: str = "",
        allowed: float | None = None,
    ) -> None:
        """Record ``st`` against ``computed``; ``allowed`` (a value read from a text's
        place) replaces the tolerance, the printed rounding still counting."""
        stated = st.value
        if allowed is not None:
            allowed = max(allowed, _allowed(st.decimals, 0.0, "distance"))
        elif kind == "angle":
            allowed = _allowed(st.decimals, self.angle_tol_sec, "angle")
        elif kind == "ratio":  # grades, A and K: the rounding of what is printed
            allowed = _allowed(st.decimals, 0.0, "distance")
        else:
            allowed = _allowed(st.decimals, self.tol, "distance")
        diff = stated - computed
        t = blk.first
        self.checks.append(
            LabelCheck(
                blk.text,
                t.x,
                t.y,
                t.layer,
                t.handle,
                quantity,
                feature,
                station,
                stated,
                computed,
                diff,
                self.unit if unit is None else unit,
                "over" if not abs(diff) <= allowed else "ok",
                note,
            )
        )

    def listed(self, blk: Block, verdict: str, what: str, quantity: str = "") -> None:
        t = blk.first
        self.checks.append(
            LabelCheck(
                blk.text,
                t.x,
                t.y,
                t.layer,
                t.handle,
                quantity,
                "",
                None,
                None,
                None,
                None,
                "",
                verdict,
                what,
            )
        )


def _unread(audit: _Audit, blk: Block, rest: str) -> None:
    """List a block that states nothing, if it holds digits (a text without is a word)."""
    if len(blk.text) > MAX_LABEL_CHARS:
        audit.listed(blk, "unread", f"longer than {MAX_LABEL_CHARS} characters: not read")
    elif re.search(r"\d", rest):
        audit.listed(blk, "unread", "digits that read as no statement")


def _clauses(
    statements: list[Statement], untagged: bool = False
) -> list[tuple[Statement | None, list[Statement]]]:
    """Split at each tagged station (and, with ``untagged``, at every station): (that
    station or None, the values that follow)."""
    out: list[tuple[Statement | None, list[Statement]]] = [(None, [])]
    for st in statements:
        if st.quantity == "station" and (st.tag is not None or untagged):
            out.append((st, []))
        else:
            out[-1][1].append(st)
    return [c for c in out if c[0] is not None or c[1]]


def _nearest(cands, key_stations: list[float]) -> int:
    """Index of the candidate (station first) nearest any of ``key_stations``: the
    first of the nearest; 0 when none has a distance (no candidate, no finite key,
    every station NaN)."""
    keys = [k for k in key_stations if k is not None and math.isfinite(k)]
    if not keys or not len(cands):
        return 0
    s = np.fromiter((c[0] for c in cands), dtype=float, count=len(cands))
    d = np.abs(s - keys[0])
    for k in keys[1:]:
        np.minimum(d, np.abs(s - k), out=d)
    d[np.isnan(d)] = math.inf
    return int(np.argmin(d))


# --------------------------------------------------------------------------- profile
def audit_profile_labels(
    texts: list[DrawnText],
    ctx,
    exaggeration: float,
    datum: float,
    tol: float,
    angle_tol_sec: float = 2.0,
) -> list[LabelCheck]:
    """Every statement of a profile drawing's texts (x = station, y = (z - datum) * E)."""
    from gradeline.present import labels as lab

    g = ctx.geometry
    stationing = ctx.stationing
    audit = _Audit(tol, angle_tol_sec, ctx.document.units.symbol)
    label = stationing.label_value
    curves = {c.index: c for c in g.curves}
    pvi_s, pvi_z = g.pvi_stations.tolist(), g.pvi_elevations.tolist()
    points: dict[str, list[tuple[float, float, str, object]]] = {
        "BEGIN PROFILE": [(pvi_s[0], pvi_z[0], "begin of profile", None)],
        "END PROFILE": [(pvi_s[-1], pvi_z[-1], "end of profile", None)],
        "PVI": [
            (s, z, f"PVI {i + 1}", curves.get(i))
            for i, (s, z) in enumerate(zip(pvi_s, pvi_z, strict=True))
        ],
        "BVC": [
            (c.bvc_station, c.bvc_elevation, f"BVC of curve at PVI {c.index + 1}", c)
            for c in g.curves
        ],
        "EVC": [
            (c.evc_station, c.evc_elevation, f"EVC of curve at PVI {c.index + 1}", c)
            for c in g.curves
        ],
    }
    for c in g.curves:
        if c.turning_station is not None:
            tag = lab.turning_point_tag(c.curve_type)
            points.setdefault(tag, []).append(
                (c.turning_station, c.turning_elevation, f"{tag} of curve at PVI {c.index + 1}", c)
            )
    every = [p for ps in points.values() for p in ps]
    grades = g.grades.tolist() if hasattr(g.grades, "tolist") else list(g.grades)

    def internal(st: Statement) -> float:
        return _internal(stationing, st.value, g.start, g.end)

    for blk in label_blocks(texts):
        statements, rest = read_statements(blk.text)
        x = blk.first.x
        if not statements:
            _unread(audit, blk, rest)
            continue
        for head, values in _clauses(statements, untagged=True):
            feature = None
            if head is not None and head.tag is None:
                feature = _untagged(audit, blk, head, every, g, ctx, x, internal(head))
                if feature is None:
                    continue
            elif head is not None:
                cands = points.get(head.tag or "", [])
                if not cands:
                    audit.listed(blk, "untied", f"{head.tag} is not a profile point", "station")
                    continue
                i = _nearest(cands, [x, internal(head)])
                feature = cands[i]
                s, z, name, curve = feature
                audit.compare(blk, head, f"{head.tag} station", name, s, float(label(s)), unit="")
            for st in values:
                _profile_value(
                    audit,
                    blk,
                    st,
                    feature,
                    every,
                    curves,
                    g,
                    ctx,
                    x,
                    grades,
                    exaggeration,
                    datum,
                )
    return audit.checks


def _untagged(audit, blk, head, every, g, ctx, x, s_in):
    """The feature of a station stated without a tag, or None (its check made or listed).

    A bare station is a grid label, checked against its place; one at a key point
    (within its rounding) is that point; any other names a spot on the finished grade.
    """
    from gradeline.geometry import vertical

    label = ctx.stationing.label_value
    t = blk.first
    if _BARE.match(blk.text):
        reach = (0.3 * len(t.text) + 1.0) * t.height
        audit.compare(
            blk,
            head,
            "grid station",
            "grid line",
            x,
            float(label(x)),
            unit="",
            note=f"read from the text's place; allowed {reach:.3g}",
            allowed=reach,
        )
        return None
    near = every[_nearest(every, [s_in])] if every else None
    if near is not None and abs(near[0] - s_in) <= max(audit.tol, 0.5 * 10.0**-head.decimals):
        audit.compare(blk, head, "station", near[2], near[0], float(label(near[0])), unit="")
        return near
    if g.start - 1e-9 <= s_in <= g.end + 1e-9:
        z = float(vertical.elevation(g, np.array([s_in]))[0])
        return (s_in, z, "finished grade", None)
    audit.listed(blk, "untied", "a station beyond the profile", "station")
    return None


def _internal(stationing, labelled: float, lo: float, hi: float) -> float:
    found = stationing.regions_of_label(labelled, lo - 1e6, hi + 1e6)
    return found[0][1] if found else labelled


def _curve_near(curves: dict, x: float):
    if not curves:
        return None
    inside = [c for c in curves.values() if c.bvc_station <= x <= c.evc_station]
    pool = inside or list(curves.values())
    return min(pool, key=lambda c: abs(c.pvi_station - x))


def _profile_value(
    audit, blk, st, feature, every, curves, g, ctx, x, grades, exaggeration, datum
) -> None:
    from gradeline.geometry import vertical

    q = st.quantity
    if q == "elevation":
        if feature is not None:
            s, z, name, _ = feature
            note = ""
            if name.startswith("PVI"):  # a PVI's elevation is off the curve: say both
                zg = float(vertical.elevation(g, np.array([s]))[0])
                note = f"the finished grade at that station is {zg:.4f}"
            audit.compare(blk, st, "elevation", name, s, z, note=note)
            return
        i = _nearest(every, [x])
        if every and abs(every[i][0] - x) <= 6 * max(blk.first.height, 1e-9):
            s, z, name, _ = every[i]
            audit.compare(blk, st, "elevation", name, s, z, note="tied by position")
            return
        audit.listed(blk, "untied", "an elevation with no station or point near it", q)
        return
    if q in ("L", "L1", "L2", "K", "A", "E", "R"):
        curve = (
            feature[3] if feature is not None and feature[3] is not None else _curve_near(curves, x)
        )
        if curve is None:
            audit.listed(blk, "untied", f"{q} with no vertical curve", q)
            return
        name = f"vertical curve at PVI {curve.index + 1}"
        if q == "L":
            # a circular curve's L may be its horizontal length or its arc length
            length, note = curve.length, ""
            arc = curve.arc_length
            if arc is not None and abs(st.value - arc) < abs(st.value - length):
                length, note = arc, "the arc length of a circular curve"
            audit.compare(blk, st, "curve length L", name, curve.pvi_station, length, note=note)
        elif q == "L1":
            audit.compare(blk, st, "curve length L1", name, curve.pvi_station, curve.length_in)
        elif q == "L2":
            audit.compare(blk, st, "curve length L2", name, curve.pvi_station, curve.length_out)
        elif q == "K":
            if curve.k is None:
                audit.listed(blk, "untied", "K of a curve without grade change", q)
            else:
                audit.compare(blk, st, "K", name, curve.pvi_station, curve.k, "ratio", unit="")
        elif q == "A":
            audit.compare(
                blk, st, "A (grade change)", name, curve.pvi_station, curve.a_pct, "ratio", unit="%"
            )
        elif q == "E":
            audit.compare(blk, st, "middle ordinate E", name, curve.pvi_station, curve.pvi_offset)
        elif q == "R":
            if curve.radius is None:
                audit.listed(blk, "untied", "R of a parabolic vertical curve", q)
            else:
                audit.compare(blk, st, "radius R", name, curve.pvi_station, curve.radius)
        return
    if q == "grade":
        k = _tangent_at(g, x)
        if k is None:
            audit.listed(blk, "untied", "a grade beyond the profile", q)
            return
        s0, s1 = float(g.pvi_stations[k]), float(g.pvi_stations[k + 1])
        audit.compare(
            blk,
            st,
            "grade",
            f"tangent PVI {k + 1} to {k + 2}",
            0.5 * (s0 + s1),
            100.0 * grades[k],
            "ratio",
            unit="%",
        )
        return
    if q == "equation":
        _equation(audit, blk, st, ctx)
        return
    if q == "number":
        # a grid label: an elevation read from its height on the drawing
        z_at = blk.first.y / exaggeration + datum
        room = max(0.75 * blk.first.height / exaggeration, 0.5 * 10.0**-st.decimals)
        if abs(st.value - z_at) <= 20 * room + audit.tol:
            audit.compare(
                blk,
                st,
                "grid elevation",
                "grid line",
                None,
                z_at,
                note=f"read from the text's height; allowed {room:.3g}",
                allowed=room,
            )
        else:
            audit.listed(blk, "unread", "a bare number that is no grid elevation here", q)
        return
    audit.listed(blk, "untied", f"{q} is not a profile value", q)


def _tangent_at(g, x: float) -> int | None:
    s = g.pvi_stations
    if not (s[0] <= x <= s[-1]):
        return None
    i = int(np.clip(np.searchsorted(s, x, side="right") - 1, 0, len(s) - 2))
    return i


def _equation(audit, blk, st, ctx) -> None:
    eqs = ctx.alignment.equations
    if not eqs:
        audit.listed(blk, "untied", "a station equation; the alignment has none", "equation")
        return
    eq = min(eqs, key=lambda e: abs(e.ahead - (st.second or 0.0)) + abs(e.back - st.value))
    audit.compare(
        blk, st, "equation back station", "station equation", eq.internal, eq.back, unit=""
    )
    if st.second is not None:
        ahead = Statement("equation", st.second, st.decimals, st.raw)
        audit.compare(
            blk, ahead, "equation ahead station", "station equation", eq.internal, eq.ahead, unit=""
        )


# --------------------------------------------------------------------------- plan
def audit_plan_labels(
    texts: list[DrawnText],
    ctx,
    to_world: Callable[[np.ndarray], np.ndarray],
    tol: float,
    angle_tol_sec: float = 2.0,
    text_scale: float = 1.0,
) -> list[LabelCheck]:
    """Every statement of a plan drawing's texts; positions mapped by ``to_world``."""
    from gradeline.geometry.curve_data import curve_data, key_points

    hz = ctx.horizontal
    stationing = ctx.stationing
    label = stationing.label_value
    audit = _Audit(tol, angle_tol_sec, ctx.document.units.symbol)
    curves = curve_data(hz)
    proj = hz.projector
    blocks = label_blocks(texts)
    if not blocks:
        return []
    pos = to_world(np.array([[b.first.x, b.first.y] for b in blocks], float))
    s_text, _, _ = proj(pos[:, 1], pos[:, 0])
    points: dict[str, list[tuple[float, str, object]]] = {}
    for s, tag in key_points(hz, curves):
        c = _owner(curves, tag, s)
        points.setdefault(tag, []).append((s, f"{tag} of curve {c.number}" if c else tag, c))
    for c in curves:
        points.setdefault("PI", []).append((c.pi_station, f"PI of curve {c.number}", c))
    pis = np.array(
        [[c.pi_easting or math.nan, c.pi_northing or math.nan] for c in curves], float
    ).reshape(-1, 2)
    metric = ctx.document.units.metric
    for b, blk in enumerate(blocks):
        statements, rest = read_statements(blk.text)
        if not statements:
            _unread(audit, blk, rest)
            continue
        st_here = float(s_text[b])
        for head, values in _clauses(statements):
            curve = None
            if head is not None:
                cands = points.get(head.tag or "", [])
                if not cands:
                    audit.listed(blk, "untied", f"{head.tag} is not a plan point", "station")
                    continue
                stated_in = _internal(stationing, head.value, hz.start, hz.end)
                i = _nearest(cands, [st_here, stated_in])
                s, name, curve = cands[i]
                audit.compare(blk, head, f"{head.tag} station", name, s, float(label(s)), unit="")
            if curve is None and any(v.quantity not in ("station", "equation") for v in values):
                if len(pis) and np.isfinite(pis).all(axis=1).any():
                    d = np.hypot(pis[:, 0] - pos[b, 0], pis[:, 1] - pos[b, 1])
                    curve = curves[int(np.nanargmin(d))]
            for st in values:
                _plan_value(
                    audit,
                    blk,
                    st,
                    curve,
                    st_here,
                    ctx,
                    metric,
                    text_scale,
                )
    return audit.checks


def _owner(curves, tag: str, s: float):
    """The horizontal curve a key point belongs to (values after "PC 12+00" tie to it)."""
    for c in curves:
        if tag in ("PC", "TS") and abs(c.start_station - s) < 1e-6:
            return c
        if tag in ("PT", "ST") and abs(c.end_station - s) < 1e-6:
            return c
        if tag in ("SC", "CS") and c.start_station - 1e-6 <= s <= c.end_station + 1e-6:
            return c
    return None


def _plan_value(audit, blk, st, curve, s_here, ctx, metric, text_scale) -> None:
    q = st.quantity
    if q == "equation":
        _equation(audit, blk, st, ctx)
        return
    if q == "station":  # a bare station: a tick label beside its station
        t = blk.first
        reach = (0.6 * len(t.text) + 2.0) * t.height * text_scale
        s = ctx.stationing.label_value(s_here)
        audit.compare(
            blk,
            st,
            "station tick label",
            "alignment",
            s_here,
            float(s),
            unit="",
            note=f"read from the text's place; allowed {reach:.3g}",
            allowed=reach,
        )
        return
    if curve is None:
        audit.listed(blk, "untied", f"{q} with no horizontal curve", q)
        return
    name = f"curve {curve.number}"
    pi = curve.pi_station
    spiral = curve.has_spirals
    if q == "R":
        audit.compare(blk, st, "radius R", name, pi, curve.radius)
    elif q in ("delta", "delta_c", "delta_s"):
        values = {
            "delta": abs(math.degrees(curve.delta)),
            "delta_c": math.degrees(curve.arc_delta) if spiral else abs(math.degrees(curve.delta)),
            "delta_s": math.degrees(curve.spiral_in_delta),
        }
        what = {"delta": "deflection Δ", "delta_c": "arc deflection Δc", "delta_s": "spiral Δs"}[q]
        audit.compare(blk, st, what, name, pi, values[q], "angle", unit="deg")
        if q == "delta_s" and st.second is not None:
            out = Statement(q, st.second, st.decimals, st.raw)
            audit.compare(
                blk,
                out,
                "spiral Δs out",
                name,
                pi,
                math.degrees(curve.spiral_out_delta),
                "angle",
                unit="deg",
            )
        if q == "delta" and st.side is not None:
            side = "LT" if curve.delta > 0 else "RT"
            if st.side != side:
                t = blk.first
                audit.checks.append(
                    LabelCheck(
                        blk.text,
                        t.x,
                        t.y,
                        t.layer,
                        t.handle,
                        "turning direction",
                        name,
                        pi,
                        None,
                        None,
                        None,
                        "",
                        "over",
                        f"stated {st.side}, computed {side}",
                    )
                )
    elif q == "D":
        if metric:
            audit.listed(blk, "untied", "degree of curve in a metric file", q)
        else:
            d = 18000.0 / (math.pi * curve.radius)  # arc definition, 100-ft station
            audit.compare(blk, st, "degree of curve D (arc)", name, pi, d, "angle", unit="deg")
    elif q in ("T", "Ts"):
        audit.compare(
            blk, st, "tangent T" if q == "T" else "tangent Ts", name, pi, curve.tangent_in
        )
        if st.second is not None:
            out = Statement(q, st.second, st.decimals, st.raw)
            audit.compare(blk, out, "tangent out", name, pi, curve.tangent_out)
    elif q in ("L", "Lc"):
        audit.compare(
            blk, st, "arc length L" if q == "L" else "arc length Lc", name, pi, curve.arc_length
        )
    elif q == "Ls":
        audit.compare(blk, st, "spiral length Ls", name, pi, curve.spiral_in)
        if st.second is not None:
            out = Statement(q, st.second, st.decimals, st.raw)
            audit.compare(blk, out, "spiral length Ls out", name, pi, curve.spiral_out)
    elif q in ("E", "Es"):
        audit.compare(
            blk, st, "external E" if q == "E" else "external Es", name, pi, curve.external
        )
    else:
        audit.listed(blk, "untied", f"{q} is not a plan value", q)
