"""The sheets' direct text and pen operators write what reportlab's own calls write.

The reference is reportlab itself: every case draws the same thing once through
:mod:`gradeline.sheets.operators`' direct path and once through reportlab's public
canvas methods (``setFont``, ``drawString``, ``saveState``, ``translate``,
``rotate``, ``restoreState``, the colour, width and dash setters, ``beginPath``,
``drawPath``), and the two PDFs must be the same bytes.
"""

from __future__ import annotations

import io

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from reportlab.pdfgen import canvas as rl_canvas

from gradeline.deliverables import open_alignment
from gradeline.sheets import fonts, operators
from gradeline.sheets.pdf import SheetOptions, render_sheets
from tests.conftest import METRIC_SAMPLE, US_SAMPLE


def _canvas():
    return rl_canvas.Canvas(io.BytesIO(), pagesize=(600, 400), invariant=1, pageCompression=0)


def _both_ways(draw) -> bool:
    """Whether ``draw`` makes the same PDF on the direct path (forced, whatever the
    start-up check says) and through reportlab's public calls."""
    with pytest.MonkeyPatch.context() as mp:
        mp.setattr(operators, "_verified", lambda: True)
        direct = draw(_canvas())
        mp.setattr(operators, "_verified", lambda: False)
        return draw(_canvas()) == direct


def _pdf(c) -> bytes:
    c.showPage()
    c.save()
    return c._filename.getvalue()


@pytest.fixture
def public(monkeypatch):
    """Make every canvas take reportlab's public methods."""

    def use_public() -> None:
        monkeypatch.setattr(operators, "_verified", lambda: False)

    return use_public


def test_the_check_passes_with_the_installed_reportlab():
    # if this fails, reportlab writes something differently now: the sheets still
    # come out right (through the public calls), only slower
    assert operators._verified()
    assert operators.ready(_canvas())


def test_a_canvas_subclass_gets_the_public_calls():
    class Recording(rl_canvas.Canvas):
        pass

    c = Recording(io.BytesIO())
    assert not operators.ready(c)


# cp1252 letters (the plain font), PDF-escaped characters, and letters of other
# scripts, which go to the embedded fonts through reportlab's public calls
_TEXT = st.text(
    alphabet=st.sampled_from(list("0123456789+-.,:;= ()\\%'\"ABCKLRSTVxyzØéß°±Δ≥Жλ東\t")),
    max_size=24,
)
_NUMBER = st.floats(min_value=-5000, max_value=5000, allow_nan=False) | st.sampled_from(
    [0.0, -0.0, 1e-7, -3.3333333, 12.5]
)


@settings(max_examples=150, deadline=None)
@given(
    st.lists(
        st.tuples(
            _TEXT,
            st.floats(min_value=1.0, max_value=40.0),
            _NUMBER,
            _NUMBER,
            _NUMBER,
            st.booleans(),
            st.sampled_from(["left", "center", "right"]),
        ),
        min_size=1,
        max_size=6,
    )
)
def test_text_is_byte_for_byte_reportlabs(cases):
    def draw(c) -> bytes:
        for text, size, x, y, angle, bold, align in cases:
            fonts.draw(c, x, y, text, size, bold, align)
            fonts.draw_turned(c, (x, y), angle, 0.0, -0.36 * size, text, size, bold, align)
        return _pdf(c)

    assert _both_ways(draw)


@settings(max_examples=100, deadline=None)
@given(
    st.lists(
        st.tuples(
            st.tuples(*(st.floats(min_value=0.0, max_value=1.0),) * 3),
            st.floats(min_value=0.0, max_value=20.0),
            st.lists(st.floats(min_value=0.1, max_value=30.0), max_size=4).map(tuple),
            st.lists(st.tuples(_NUMBER, _NUMBER), min_size=1, max_size=12),
        ),
        min_size=1,
        max_size=5,
    )
)
def test_pens_and_polylines_are_byte_for_byte_reportlabs(cases):
    def draw(c) -> bytes:
        for rgb, width, dash, points in cases:
            operators.pen(c, rgb, width, dash)
            operators.polyline(c, points)
        return _pdf(c)

    assert _both_ways(draw)


@pytest.mark.parametrize(
    ("path", "name", "size"),
    [(US_SAMPLE, "Orrin Vale Bypass", "ansi-d"), (METRIC_SAMPLE, None, "iso-a3")],
    ids=["bypass-ansi-d", "tarnholm-iso-a3"],
)
def test_sample_sheets_are_the_same_either_way(path, name, size, public):
    ctx = open_alignment(path, name)
    opts = SheetOptions(size=size, project="Test project", date="2026-11-30")
    direct = render_sheets(ctx, opts)
    public()
    assert render_sheets(open_alignment(path, name), opts) == direct
