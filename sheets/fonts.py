"""Fonts for sheet text in any script (with :mod:`gradeline.sheets.pdf`, the only
reportlab users).

Text that the standard PDF font can encode (cp1252: English and the Western
European accents, Nordic letters included) stays in Helvetica, so ordinary
sheets are unchanged. Japanese, Chinese and Korean text uses reportlab's CID
font Droid Sans Fallback, embedded, where it is installed (Debian
``fonts-droid-fallback``), else reportlab's CID fonts (the PDF viewer then
supplies the glyphs; not every viewer has them); anything else -- Cyrillic, Greek,
Eastern European letters -- uses DejaVu Sans, a TrueType font of wide coverage,
embedded in the PDF (subset). DejaVu is looked for in ``GRADELINE_FONT``, the
usual system folders (Debian ``fonts-dejavu-core``) and matplotlib's copy; when
none is found, Helvetica is used and such letters may not show.
"""

from __future__ import annotations

import os
from functools import cache, lru_cache
from pathlib import Path

from reportlab.pdfbase import pdfmetrics
from reportlab.pdfbase.cidfonts import UnicodeCIDFont
from reportlab.pdfbase.ttfonts import TTFont

from gradeline.sheets import operators

__all__ = ["BASE", "BASE_BOLD", "draw", "draw_turned", "runs", "text_width", "wide_font_path"]

BASE = "Helvetica"
BASE_BOLD = "Helvetica-Bold"
_WIDE = "GradelineWide"
_WIDE_BOLD = "GradelineWide-Bold"

#: reportlab's CID fonts, by script (their glyphs come with every PDF viewer).
_CID_JAPANESE = "HeiseiKakuGo-W5"
_CID_KOREAN = "HYGothic-Medium"

_CANDIDATES = (
    "/usr/share/fonts/truetype/dejavu/DejaVuSans{}.ttf",
    "/usr/share/fonts/TTF/DejaVuSans{}.ttf",
    "/usr/share/fonts/dejavu/DejaVuSans{}.ttf",
    "/Library/Fonts/DejaVuSans{}.ttf",
)


def _matplotlib_fonts() -> Path | None:
    try:
        import matplotlib  # noqa: PLC0415 - only to find its bundled DejaVu
    except ImportError:
        return None
    return Path(matplotlib.get_data_path()) / "fonts" / "ttf"


@cache
def wide_font_path(bold: bool = False) -> str | None:
    """The DejaVu Sans file used for scripts Helvetica cannot show (None: not found)."""
    suffix = "-Bold" if bold else ""
    given = os.environ.get("GRADELINE_FONT")
    if given and not bold and Path(given).is_file():
        return given
    for pattern in _CANDIDATES:
        if Path(pattern.format(suffix)).is_file():
            return pattern.format(suffix)
    mpl = _matplotlib_fonts()
    if mpl is not None and (mpl / f"DejaVuSans{suffix}.ttf").is_file():
        return str(mpl / f"DejaVuSans{suffix}.ttf")
    return None


_CJK_CANDIDATES = (
    "/usr/share/fonts/truetype/droid/DroidSansFallbackFull.ttf",
    "/usr/share/fonts-droid-fallback/truetype/DroidSansFallback.ttf",
)
_CJK_TTF = "GradelineCJK"


@cache
def _register_cjk_ttf() -> str | None:
    path = next((p for p in _CJK_CANDIDATES if Path(p).is_file()), None)
    if path is None:
        return None
    pdfmetrics.registerFont(TTFont(_CJK_TTF, path))
    return _CJK_TTF


def _cjk(ch: str) -> str | None:
    o = ord(ch)
    if 0xAC00 <= o <= 0xD7AF or 0x1100 <= o <= 0x11FF or 0x3130 <= o <= 0x318F:
        return _CID_KOREAN
    if (
        0x3000 <= o <= 0x30FF
        or 0x3400 <= o <= 0x4DBF
        or 0x4E00 <= o <= 0x9FFF
        or 0xF900 <= o <= 0xFAFF
        or 0xFF00 <= o <= 0xFFEF
    ):
        return _CID_JAPANESE
    return None


@cache
def _register_cid(name: str) -> str:
    pdfmetrics.registerFont(UnicodeCIDFont(name))
    return name


@cache
def _register_wide(bold: bool) -> str | None:
    path = wide_font_path(bold) or (wide_font_path(False) if bold else None)
    if path is None:
        return None
    name = _WIDE_BOLD if bold else _WIDE
    pdfmetrics.registerFont(TTFont(name, path))
    return name


def _char_font(ch: str, bold: bool) -> str:
    try:
        ch.encode("cp1252")
        return BASE_BOLD if bold else BASE
    except UnicodeEncodeError:
        pass
    cid = _cjk(ch)
    if cid is not None:
        return _register_cjk_ttf() or _register_cid(cid)
    return _register_wide(bold) or (BASE_BOLD if bold else BASE)


def runs(text: str, bold: bool = False) -> list[tuple[str, str]]:
    """``text`` split into (font, piece) runs, each drawable in one font.

    Mixed text ("東京環状道路 Øresund") needs several fonts: the CJK font has no
    Latin letters. Spaces stay with the run they are in.

    Examples
    --------
    >>> runs("Main St"), runs("Tarnholm Ø", bold=True)
    ([('Helvetica', 'Main St')], [('Helvetica-Bold', 'Tarnholm Ø')])
    >>> runs("東京環状")[0][0] in (_CJK_TTF, _CID_JAPANESE)
    True
    >>> [piece for _, piece in runs("東京 Øresund")]
    ['東京 ', 'Øresund']
    """
    return list(_runs(text, bold))


@lru_cache(maxsize=1 << 16)
def _runs(text: str, bold: bool) -> tuple[tuple[str, str], ...]:
    # sheets repeat their texts (grid numbers, stations, table headings): cached
    try:
        text.encode("cp1252")
        return ((BASE_BOLD if bold else BASE, text),)
    except UnicodeEncodeError:
        pass
    out: list[tuple[str, str]] = []
    for ch in text:
        font = out[-1][0] if (ch == " " and out) else _char_font(ch, bold)
        if out and out[-1][0] == font:
            out[-1] = (font, out[-1][1] + ch)
        else:
            out.append((font, ch))
    return tuple(out)


@lru_cache(maxsize=1 << 16)
def text_width(text: str, size: float, bold: bool = False) -> float:
    """Width of ``text`` in points, each run in its own font."""
    pieces = _runs(text, bold)
    if len(pieces) == 1:  # the common case, without the sum's generator
        font, piece = pieces[0]
        return pdfmetrics.getFont(font).stringWidth(piece, size)
    return sum(pdfmetrics.stringWidth(piece, font, size) for font, piece in pieces)


def _placed(
    x: float, y: float, text: str, size: float, bold: bool, align: str
) -> list[tuple[str, float, float, float, str]]:
    """(font, size, x, y, piece) of each run of ``text`` aligned at (x, y)."""
    if align != "left":
        w = text_width(text, size, bold)
        x -= w / 2 if align == "center" else w
    pieces = _runs(text, bold)
    last = len(pieces) - 1
    out = []
    for i, (font, piece) in enumerate(pieces):
        out.append((font, size, x, y, piece))
        if i < last:
            x += pdfmetrics.stringWidth(piece, font, size)
    return out


def draw(
    canvas: object,
    x: float,
    y: float,
    text: str,
    size: float,
    bold: bool = False,
    align: str = "left",
) -> None:
    """Draw ``text`` at (x, y) run by run; ``align`` left, center or right."""
    direct = operators.ready(canvas)
    for font, size_, px, py, piece in _placed(x, y, text, size, bold, align):
        operators.text(canvas, font, size_, px, py, piece, direct)


def draw_turned(
    canvas: object,
    origin: tuple[float, float],
    angle: float,
    x: float,
    y: float,
    text: str,
    size: float,
    bold: bool = False,
    align: str = "left",
) -> None:
    """Draw ``text`` at (x, y) of a frame moved to ``origin`` and turned ``angle``
    degrees counter-clockwise, the canvas state kept (save, translate, rotate, draw,
    restore)."""
    operators.turned_text(canvas, origin, angle, _placed(x, y, text, size, bold, align))
