"""Text of every number gradeline shows to people or writes to tables.

One place for each format: DXF labels, PDF sheets, text reports and CSV/JSON
cells all call these functions, so the same value prints the same everywhere.
"""

from __future__ import annotations

import math
from functools import lru_cache

from gradeline.model.units import Units

__all__ = [
    "DATA_DECIMALS",
    "data_number",
    "elevation_text",
    "grade_text",
    "k_text",
    "length_text",
]

#: The caution printed on sheets, table pages and review reports.
CAUTION = (
    "Computed geometry for review. Verify against the governing agency's standards; "
    "design decisions rest with the responsible licensed engineer."
)

#: Printed in the profile view of a sheet whose alignment has no profile.
NO_PROFILE_NOTE = (
    "NO PROFILE: THE FILE HAS NO FINISHED-GRADE PROFILE (ProfAlign) FOR THIS ALIGNMENT"
)

#: Decimals of numbers in CSV/JSON: far below any survey precision, and enough
#: to make float noise (1e-12) disappear so outputs are stable.
DATA_DECIMALS = 6


def data_number(value: float | None) -> float | None:
    """Round a value for CSV/JSON; None and NaN become None.

    Examples
    --------
    >>> data_number(121.00000000000001), data_number(-0.0000001), data_number(float("nan"))
    (121.0, 0.0, None)
    """
    if value is None or not math.isfinite(value):
        return None
    out = round(float(value), DATA_DECIMALS)
    return 0.0 if out == 0 else out


def length_text(value: float, units: Units) -> str:
    """Lengths and elevations: 2 decimals in feet, 3 in metres (common practice).

    Examples
    --------
    >>> length_text(121.0, Units("foot")), length_text(121.0, Units("meter"))
    ('121.00', '121.000')
    >>> length_text(-1e-12, Units("foot"))  # never "-0.00"
    '0.00'
    """
    text = f"{value:.{3 if units.metric else 2}f}"
    if text.startswith("-") and float(text) == 0.0:
        text = text[1:]
    return text


def elevation_text(value: float, units: Units) -> str:
    """Elevation label text, e.g. ``EL 121.00``-free form ``121.00``."""
    return length_text(value, units)


def grade_text(grade: float) -> str:
    """A grade (ratio) as signed percent with three decimals.

    Examples
    --------
    >>> grade_text(0.0175), grade_text(-0.01), grade_text(0.0)
    ('+1.750%', '-1.000%', '0.000%')
    """
    pct = 100.0 * grade
    if round(pct, 3) == 0:
        return "0.000%"
    return f"{pct:+.3f}%"


def k_text(k: float | None) -> str:
    """K value text with one decimal; a curve without grade change has none.

    Examples
    --------
    >>> k_text(581.8181), k_text(None)
    ('581.8', '-')
    """
    return "-" if k is None else f"{k:.1f}"


def dms_text(angle_rad: float) -> str:
    """An angle as degrees, minutes and seconds, e.g. ``28°00'00.0"``.

    Examples
    --------
    >>> import math
    >>> dms_text(math.radians(28.0)), dms_text(math.radians(12.5125))
    ('28°00\\'00.0"', '12°30\\'45.0"')
    """
    total = round(abs(math.degrees(angle_rad)) * 36000.0)  # tenths of a second
    deg, rest = divmod(total, 36000)
    minutes, tenths = divmod(rest, 600)
    return f"{deg}°{minutes:02d}'{tenths / 10:04.1f}\""


# -- drawing label text: one place for DXF and PDF --------------------------
def point_label(tag: str, station_label: str, elevation: float, units: Units) -> str:
    """Vertical key-point label, e.g. ``PVI 17+50.00  EL 530.15``."""
    return f"{tag} {station_label}  EL {length_text(elevation, units)}"


def curve_label(length: float, k: float | None, units: Units) -> str:
    """Vertical-curve data label, e.g. ``L = 600.00  K = 136.5``."""
    return f"L = {length_text(length, units)}  K = {k_text(k)}"


#: Word that marks an unsymmetrical vertical curve on labels and in tables.
UNSYMMETRICAL = "UNSYM"


def vertical_curve_lines(curve, units: Units) -> list[str]:
    """Curve data under a PVI label: length(s) or radius, K, A and the middle ordinate E.

    An unsymmetrical curve shows both lengths, so EVC = PVI + L2 is visible;
    a circular one its radius.

    Examples
    --------
    >>> from types import SimpleNamespace as C
    >>> from gradeline.model.units import Units
    >>> c = C(kind="unsymmetric", length=800.0, length_in=300.0, length_out=500.0,
    ...       k=174.8, a_pct=-4.5, pvi_offset=-4.2, radius=None)
    >>> vertical_curve_lines(c, Units("foot"))
    ['UNSYM L1 = 300.00  L2 = 500.00', 'K = 174.8  A = -4.500%  E = -4.20']
    """
    a = f"A = {a_pct_text(curve.a_pct)}  E = {length_text(curve.pvi_offset, units)}"
    if curve.kind == "unsymmetric":
        return [
            f"{UNSYMMETRICAL} L1 = {length_text(curve.length_in, units)}  "
            f"L2 = {length_text(curve.length_out, units)}",
            f"K = {k_text(curve.k)}  {a}",
        ]
    if curve.kind == "circular" and curve.radius is not None:
        return [
            f"R = {length_text(curve.radius, units)}  L = {length_text(curve.length, units)}",
            f"K = {k_text(curve.k)}  {a}",
        ]
    return [curve_label(curve.length, curve.k, units), a]


def a_pct_text(a_pct: float) -> str:
    """Algebraic difference of grades, in percent with three decimals: ``-4.396%``."""
    return f"{a_pct:+.3f}%" if a_pct else "0.000%"


def equation_text(back_label: str, ahead_label: str) -> str:
    """A station equation as sheets show it: ``STA EQ 12+00.00 BK = 12+50.00 AH``."""
    return f"STA EQ {back_label} BK = {ahead_label} AH"


def profile_end_tag(end: str) -> str:
    """Tag of the profile's first and last point: ``BEGIN PROFILE`` / ``END PROFILE``."""
    return "BEGIN PROFILE" if end == "start" else "END PROFILE"


#: Legend entries of profile views: what each line means (role -> words).
PROFILE_LEGEND = (
    ("grade", "FINISHED GRADE"),
    ("ground", "EXISTING GROUND"),
    ("tangents", "TANGENT EXTENSION TO PVI"),
)

#: Legend words of a plan-only sheet's line.
PLAN_LEGEND = "ALIGNMENT"

#: Default sheet titles (``[sheet] sheet_title`` replaces them).
SHEET_TITLE_PLAN_PROFILE = "PLAN AND PROFILE"
SHEET_TITLE_PLAN = "PLAN"
SHEET_TITLE_TABLES = "CURVE AND STATION TABLES"
SHEET_TITLE_SUPER = "SUPERELEVATION DIAGRAM"
#: What the SCALES cell of a table page says.
NO_SCALE = "TABLES: NOT TO SCALE"
NO_SCALE_DIAGRAM = "DIAGRAM: NOT TO SCALE"


def sheet_scale_lines(
    scale: float, exaggeration: float | None, asked: float, metric: bool
) -> list[str]:
    """The SCALES cell: horizontal and vertical scale, and why the exaggeration is lower
    than asked when it had to be (it is the same on every sheet of the set).

    Examples
    --------
    >>> for line in sheet_scale_lines(50.0, 5.0, 10.0, False):
    ...     print(line)
    H 1" = 50'  V 1" = 10'
    VERTICAL EXAGGERATION 5x ON ALL SHEETS (10x ASKED DOES NOT FIT)
    """
    if exaggeration is None:
        return [scale_text(scale, 1.0, metric).split("  ")[0]]
    lines = [scale_text(scale, exaggeration, metric)]
    if asked and abs(asked - exaggeration) > 1e-9:
        lines.append(
            f"VERTICAL EXAGGERATION {exaggeration:g}x ON ALL SHEETS ({asked:g}x ASKED DOES NOT FIT)"
        )
    else:
        lines.append(f"VERTICAL EXAGGERATION {exaggeration:g}x")
    return lines


#: Titles of the elevation rows under the profile grid.
STRIP_TITLES = ("FINISHED GRADE", "EXISTING GROUND")


def plan_point_label(tag: str, station_label: str) -> str:
    """Plan key-point label, e.g. ``PC 36+86.43``."""
    return f"{tag} {station_label}"


def angle_text(angle_rad: float, units: Units) -> str:
    """An angle in the file's angular unit: DMS for degrees, gon for grads, else radians.

    Examples
    --------
    >>> import math
    >>> from gradeline.model.units import Units
    >>> print(angle_text(math.radians(28.0), Units("foot")))
    28°00'00.0"
    >>> angle_text(math.pi / 4, Units("meter", angular="grads"))
    '50.0000 gon'
    """
    if units.angular == "grads":
        return f"{abs(angle_rad) * 200.0 / math.pi:.4f} gon"
    if units.angular == "radians":
        return f"{abs(angle_rad):.6f} rad"
    return dms_text(angle_rad)


def bearing_text(heading_rad: float, units: Units) -> str:
    """A tangent's direction for sheets: a quadrant bearing in DMS (degree files) or the
    azimuth from north in gon or radians.

    Examples
    --------
    >>> import math
    >>> from gradeline.model.units import Units
    >>> print(bearing_text(math.radians(30.0), Units("foot")))  # 60 degrees east of north
    N 60°00'00.0" E
    >>> bearing_text(math.radians(-90.0), Units("meter", angular="grads"))
    'AZ 200.0000 gon'
    """
    az = (math.pi / 2 - heading_rad) % (2 * math.pi)  # clockwise from north
    if units.angular in ("grads", "radians"):
        return f"AZ {angle_text(az, units)}"
    ns = "N" if az <= math.pi / 2 or az >= 3 * math.pi / 2 else "S"
    ew = "E" if az <= math.pi else "W"
    q = {("N", "E"): az, ("S", "E"): math.pi - az, ("S", "W"): az - math.pi}.get(
        (ns, ew), 2 * math.pi - az
    )
    return f"{ns} {dms_text(q)} {ew}"


def length_pair_text(a: float, b: float, units: Units, unit: str = "") -> str:
    """Two lengths of a pair (in / out): one when they print alike, else ``a / b``.

    Examples
    --------
    >>> from gradeline.model.units import Units
    >>> length_pair_text(424.69, 424.6901, Units("foot")), length_pair_text(1.0, 2.0, Units("foot"))
    ('424.69', '1.00 / 2.00')
    """
    suffix = f" {unit}" if unit else ""
    first, second = length_text(a, units), length_text(b, units)
    return first + suffix if first == second else f"{first}{suffix} / {second}{suffix}"


def plan_curve_note(curve, units: Units) -> list[str]:
    """Lines of a horizontal curve-data note.

    A simple curve: Δ, R, D (US files, arc definition), T, L, E. A spiralled
    curve states which values belong to the arc: Δ total, Δc of the arc, Δs of
    each spiral, R, Ls, Ts and Es from the PI, and Lc of the arc.
    """
    side = "LT" if curve.delta > 0 else "RT"
    u = units.symbol

    def ln(v: float) -> str:
        return f"{length_text(v, units)} {u}"

    def ang(v: float) -> str:
        return angle_text(v, units)

    n = curve.number
    if not (curve.spiral_in or curve.spiral_out):
        lines = [f"CURVE {n}", f"\u0394 = {ang(curve.delta)} {side}", f"R = {ln(curve.radius)}"]
        if not units.metric:
            lines.append(f"D = {dms_text(math.radians(18000.0 / (math.pi * curve.radius)))}")
        return lines + [
            f"T = {ln(curve.tangent_in)}",
            f"L = {ln(curve.arc_length)}",
            f"E = {ln(curve.external)}",
        ]
    ts = length_pair_text(curve.tangent_in, curve.tangent_out, units, u)
    return [
        f"CURVE {n} (SPIRALS {curve.spiral_type or ''})".replace(" )", ")"),
        f"\u0394 = {ang(curve.delta)} {side} (TOTAL)",
        f"\u0394c = {ang(curve.arc_delta)} (ARC)",
        f"\u0394s = {ang(curve.spiral_in_delta)} / {ang(curve.spiral_out_delta)}",
        f"R = {ln(curve.radius)}",
        f"Ls = {ln(curve.spiral_in)} / {ln(curve.spiral_out)}",
        f"Ts = {ts}",
        f"Es = {ln(curve.external)}",
        f"Lc = {ln(curve.arc_length)} (ARC)",
    ]


def curve_tag(number: int) -> str:
    """Reference tag of horizontal curve ``number`` where its note stands apart, ``C1``."""
    return f"C{number}"


def curve_table_tag(number: int) -> str:
    """Tag of a curve whose note has no room on the sheet: it points to the table."""
    return f"C{number} - SEE CURVE TABLE"


def match_line_text(station_label: str, sheet: int | None) -> str:
    """Match-line label, e.g. ``MATCH LINE STA 24+00.00 - SEE SHEET 2``."""
    return f"MATCH LINE STA {station_label}" + (f" - SEE SHEET {sheet}" if sheet else "")


def turning_point_tag(curve_type: str) -> str:
    """Label tag of a vertical curve's turning point: ``HIGH PT`` on crests, ``LOW PT`` on sags."""
    return "HIGH PT" if curve_type == "crest" else "LOW PT"


def scale_text(scale: float, exaggeration: float, metric: bool) -> str:
    """Horizontal and vertical scale of a sheet.

    Examples
    --------
    >>> print(scale_text(50.0, 10.0, False))
    H 1" = 50'  V 1" = 5'
    >>> print(scale_text(500.0, 10.0, True))
    H 1:500  V 1:50
    """
    if metric:
        return f"H 1:{scale:g}  V 1:{scale / exaggeration:g}"
    return f"H 1\" = {scale:g}'  V 1\" = {scale / exaggeration:g}'"


def profile_mapping_note(alignment: str, datum: float, exaggeration: float, unit: str) -> str:
    """The note that tells a CAD user how profile y maps to elevation."""
    return (
        f"PROFILE {alignment}: X = STATION, Y = (ELEVATION - {datum:g}) x "
        f"{exaggeration:g}; UNITS {unit}"
    )


def grid_station_text(station_label_value: float, units: Units) -> str:
    """Station label under a grid line, without decimals: ``12+00`` / ``1+240``."""
    from gradeline.geometry.stations import format_station

    return format_station(station_label_value, units.station_length, 0)


def grid_elevation_text(elevation: float, step: float) -> str:
    """Elevation label at a grid line, with decimals only when the step needs them.

    Examples
    --------
    >>> grid_elevation_text(520.0, 5.0), grid_elevation_text(86.5, 0.5)
    ('520', '86.5')
    """
    decimals = 0 if step >= 1 else (1 if step >= 0.1 else 2)
    return f"{elevation:.{decimals}f}"


#: Advance widths (per 1000 units of text height) of the Helvetica/Arial family,
#: the metrics of the standard PDF font and of the DXF text style (from memory;
#: tests compare them with reportlab's font metrics).
_WIDTHS = {
    **dict.fromkeys("0123456789", 556),
    " ": 278,
    ".": 278,
    ",": 278,
    ":": 278,
    ";": 278,
    "/": 278,
    "+": 584,
    "=": 584,
    "-": 333,
    "%": 889,
    "(": 333,
    ")": 333,
    "°": 400,
    "'": 191,
    '"': 355,
    "&": 667,
    "A": 667,
    "B": 667,
    "C": 722,
    "D": 722,
    "E": 667,
    "F": 611,
    "G": 778,
    "H": 722,
    "I": 278,
    "J": 500,
    "K": 667,
    "L": 556,
    "M": 833,
    "N": 722,
    "O": 778,
    "P": 667,
    "Q": 778,
    "R": 722,
    "S": 667,
    "T": 611,
    "U": 722,
    "V": 667,
    "W": 944,
    "X": 667,
    "Y": 667,
    "Z": 611,
    "a": 556,
    "b": 556,
    "c": 500,
    "d": 556,
    "e": 556,
    "f": 278,
    "g": 556,
    "h": 556,
    "i": 222,
    "j": 222,
    "k": 500,
    "l": 222,
    "m": 833,
    "n": 556,
    "o": 556,
    "p": 556,
    "q": 556,
    "r": 333,
    "s": 500,
    "t": 278,
    "u": 556,
    "v": 500,
    "w": 722,
    "x": 500,
    "y": 500,
    "z": 500,
}
#: Width of any other character, and the safety margin on every label.
_OTHER_WIDTH = 1000
_MARGIN = 1.04


def text_width(text: str, height: float) -> float:
    """Width of a one-line label in the sans-serif fonts gradeline draws with.

    Examples
    --------
    >>> round(text_width("12+00", 5.0), 2)
    14.6
    """
    return _text_units(text) / 1000.0 * height * _MARGIN


@lru_cache(maxsize=1 << 16)
def _text_units(text: str) -> int:
    # drawings and sheets measure the same label texts again and again: cached
    return sum(_WIDTHS.get(ch, _OTHER_WIDTH) for ch in text)


# -- report headlines: one place for the verdict wording ---------------------
#: How speed units are written in reports and on sheets.
SPEED_UNIT_TEXT = {"mph": "mph", "kmh": "km/h"}


def speed_unit_text(unit: str) -> str:
    """``km/h`` for ``kmh``; other units as given."""
    return SPEED_UNIT_TEXT.get(unit, unit)


def _plural(n: int, word: str, many: str | None = None) -> str:
    return f"{n} {word if n == 1 else (many or word + 's')}"


def review_headline(
    *,
    failed: bool,
    checks: int,
    vertical_curves: int,
    failed_curves: int,
    horizontal_curves: int,
    short_radii: int,
    short_ranges: int,
    profile: bool = True,
    super_failed: int = 0,
) -> str:
    """First line of a review report (``profile`` False: a plan-only review;
    ``super_failed``: horizontal curves whose superelevation fails a control).

    Examples
    --------
    >>> review_headline(failed=False, checks=12, vertical_curves=3, failed_curves=0,
    ...                 horizontal_curves=0, short_radii=0, short_ranges=0)
    'PASS: all 12 checks on 3 vertical curves pass and sight distance is available everywhere'
    """
    sup = (
        f"; {_plural(super_failed, 'horizontal curve')} "
        f"{'fails' if super_failed == 1 else 'fail'} a superelevation control"
        if super_failed
        else ""
    )
    if not profile:
        return (
            f"{'FAIL' if failed else 'PASS'}: {_plural(short_radii, 'horizontal curve')} of "
            f"{horizontal_curves} below the minimum radius{sup}; no profile, so vertical "
            "curves and sight distance were not reviewed"
        )
    if not failed:
        return (
            f"PASS: all {checks} checks on {vertical_curves} vertical curves"
            + (f" and {horizontal_curves} horizontal curves" if horizontal_curves else "")
            + " pass and sight distance is available everywhere"
        )
    return (
        f"FAIL: {failed_curves} of {vertical_curves} vertical curves fail a check; "
        f"{_plural(short_ranges, 'station range')} lack sight distance"
        + (
            f"; {_plural(short_radii, 'horizontal curve')} below the minimum radius"
            if short_radii
            else ""
        )
        + sup
    )


def check_headline(over: int, total: int) -> str:
    """First line of a cross-check report, e.g. ``0 findings over tolerance in 42 checks``.

    A report that compared nothing says so instead of reading like a pass.

    Examples
    --------
    >>> check_headline(0, 42)
    '0 findings over tolerance in 42 checks'
    >>> check_headline(0, 0)
    'NOTHING CHECKED: the file states no value or join that could be compared; this is not a pass'
    """
    if total == 0:
        return (
            "NOTHING CHECKED: the file states no value or join that could be compared; "
            "this is not a pass"
        )
    return f"{_plural(over, 'finding')} over tolerance in {total} checks"


def plain_text(text: str) -> str:
    """``text`` with control and format characters (new lines, bidi overrides) written
    as escapes, so a name from a file can never forge or reorder a report's lines.

    Examples
    --------
    >>> plain_text("Main St\\nFAILED x")
    'Main St\\\\nFAILED x'
    >>> plain_text("abc\\u202edcb")
    'abc\\\\u202edcb'
    """
    import unicodedata

    out = []
    for ch in text:
        if unicodedata.category(ch) in ("Cc", "Cf", "Zl", "Zp"):
            out.append(ch.encode("unicode_escape").decode("ascii"))
        else:
            out.append(ch)
    return "".join(out)
