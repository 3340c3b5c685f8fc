"""Station labels and station equations."""

from __future__ import annotations

import numpy as np
import pytest
from hypothesis import given
from hypothesis import strategies as st

from gradeline.errors import UsageError
from gradeline.geometry.stations import Stationing, format_station, parse_station
from gradeline.model import StationEquation
from gradeline.model.units import Units

FT = Units("foot")
M = Units("meter")


@pytest.mark.parametrize(
    ("value", "text"),
    [
        # common practice: 100-ft stations, two decimals
        (0.0, "0+00.00"),
        (1234.56, "12+34.56"),
        (1299.996, "13+00.00"),  # rounds up across the station: never 12+100.00
        (1299.994, "12+99.99"),
        (99.999, "1+00.00"),
        (-50.0, "-0+50.00"),
        (-0.001, "0+00.00"),  # rounds to zero: no minus sign
        (-1250.0, "-12+50.00"),
    ],
)
def test_format_us(value, text):
    assert format_station(value) == text


@pytest.mark.parametrize(
    ("value", "text"),
    [
        # common practice: 1000-m stations, three decimals
        (1234.567, "1+234.567"),
        (999.9996, "1+000.000"),
        (40.5, "0+040.500"),
    ],
)
def test_format_metric(value, text):
    assert format_station(value, 1000.0, 3) == text


@given(st.floats(min_value=-1e6, max_value=1e6, allow_nan=False))
def test_format_never_overflows_the_station(value):
    text = format_station(value)
    rest = text.split("+")[1]
    assert float(rest) < 100.0
    assert parse_station(text) == pytest.approx(round(value, 2), abs=0.0051)


@pytest.mark.parametrize(
    ("text", "value"),
    [("12+34.56", 1234.56), ("-0+50", -50.0), ("0+00", 0.0), ("1234.5", 1234.5), ("12+50", 1250.0)],
)
def test_parse_us(text, value):
    assert parse_station(text) == pytest.approx(value)


def test_parse_metric():
    assert parse_station("1+234.567", 1000.0) == pytest.approx(1234.567)


@pytest.mark.parametrize("text", ["12+5", "12+345", "abc", "", "nan", "1e400"])
def test_parse_rejects(text):
    with pytest.raises(UsageError):
        parse_station(text)


def test_equation_gap_labels():
    # equation at internal 1500: labels jump back by 100 (overlap region)
    eq = StationEquation(back=1500.0, ahead=1400.0, internal=1500.0)
    sta = Stationing(FT, (eq,))
    assert sta.labels([1000.0, 1499.0, 1500.0, 1600.0]) == [
        "10+00.00",
        "14+99.00",
        "14+00.00",
        "15+00.00",
    ]
    assert sta.region([1000.0, 1600.0]).tolist() == [1, 2]


def test_equation_overlap_is_ambiguous():
    eq = StationEquation(back=1500.0, ahead=1400.0, internal=1500.0)
    sta = Stationing(FT, (eq,))
    with pytest.raises(UsageError, match="occurs 2 times"):
        sta.internal_of("14+50", 0.0, 3000.0)
    assert sta.internal_of("14+50@1", 0.0, 3000.0) == pytest.approx(1450.0)
    assert sta.internal_of("14+50@2", 0.0, 3000.0) == pytest.approx(1550.0)


def test_equation_ahead_gap_has_no_station():
    eq = StationEquation(back=1200.0, ahead=1250.0, internal=1200.0)
    sta = Stationing(M, (eq,))
    with pytest.raises(
        UsageError,
        match=r"falls in the gap of the station equation "
        r"back 1\+200.000 = ahead 1\+250.000",
    ):
        sta.internal_of("1+220", 0.0, 2400.0)
    assert sta.internal_of("1+300", 0.0, 2400.0) == pytest.approx(1250.0)
    assert sta.label(2400.0) == "2+450.000"


def test_round_stations_follow_labels_across_equation():
    eq = StationEquation(back=1200.0, ahead=1250.0, internal=1200.0)
    sta = Stationing(M, (eq,))
    internal = sta.round_stations(100.0, 1000.0, 1500.0)
    labels = sta.label_value(internal)
    # labels 1000, 1100, (1200 = equation back, shown as 1250 ahead), 1300, ... 1500
    assert labels.tolist() == pytest.approx([1000.0, 1100.0, 1300.0, 1400.0, 1500.0])
    assert np.all(np.diff(internal) > 0)


def test_outside_range_message():
    sta = Stationing(FT)
    with pytest.raises(UsageError, match=r"not on the alignment \(10\+00.00 to 20\+00.00\)"):
        sta.internal_of("25+00", 1000.0, 2000.0)
