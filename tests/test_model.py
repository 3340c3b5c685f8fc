"""Model invariants and immutability."""

from __future__ import annotations

import dataclasses
import math

import pytest

from gradeline.errors import ModelError
from gradeline.model import Profile, PVISpec, StationEquation
from gradeline.model.units import Units


def test_pvi_is_frozen():
    p = PVISpec(0.0, 100.0)
    with pytest.raises(dataclasses.FrozenInstanceError):
        p.station = 5.0  # type: ignore[misc]


def test_profile_is_frozen_and_replace_makes_a_copy():
    prof = Profile("a", (PVISpec(0.0, 1.0), PVISpec(10.0, 2.0)))
    other = dataclasses.replace(prof, name="b")
    assert prof.name == "a" and other.name == "b"
    with pytest.raises(dataclasses.FrozenInstanceError):
        prof.name = "c"  # type: ignore[misc]


def test_stations_must_increase():
    with pytest.raises(ModelError, match="PVI stations must increase: 50 after 100"):
        Profile("a", (PVISpec(0.0, 1.0), PVISpec(100.0, 2.0), PVISpec(50.0, 2.0)))


def test_equal_stations_refused():
    with pytest.raises(ModelError, match="must increase"):
        Profile("a", (PVISpec(0.0, 1.0), PVISpec(0.0, 2.0)))


def test_curve_on_first_entry_refused():
    with pytest.raises(ModelError, match="first entry of a profile"):
        Profile("a", (PVISpec(0.0, 1.0, "parabolic", 5, 5), PVISpec(100.0, 2.0)))


def test_curve_on_last_entry_refused():
    with pytest.raises(ModelError, match="last entry of a profile"):
        Profile("a", (PVISpec(0.0, 1.0), PVISpec(100.0, 2.0, "parabolic", 5, 5)))


@pytest.mark.parametrize("length", [0.0, -10.0])
def test_nonpositive_curve_length_refused(length):
    with pytest.raises(ModelError, match="curve length must be positive"):
        PVISpec(10.0, 1.0, "parabolic", length / 2, length / 2)


def test_non_finite_refused():
    with pytest.raises(ModelError, match="finite"):
        PVISpec(math.nan, 1.0)
    with pytest.raises(ModelError, match="finite"):
        PVISpec(1.0, math.inf)


def test_zero_radius_refused():
    with pytest.raises(ModelError, match="radius must not be zero"):
        PVISpec(10.0, 1.0, "circular", radius=0.0)


def test_single_pvi_refused():
    with pytest.raises(ModelError, match="at least two PVIs"):
        Profile("a", (PVISpec(0.0, 1.0),))


def test_units_unknown_refused():
    with pytest.raises(ModelError, match="unsupported linear unit 'furlong'"):
        Units("furlong")


def test_us_survey_foot_length():
    # US survey foot = 1200/3937 m (NIST, definition of 1893); international foot
    # = 0.3048 m exactly (1959 agreement)
    assert Units("USSurveyFoot").meters_per_unit == pytest.approx(0.3048006096012192, abs=1e-15)
    assert Units("internationalFoot").meters_per_unit == 0.3048
    assert Units("foot").station_length == 100.0
    assert Units("meter").station_length == 1000.0


def test_equation_is_value_object():
    a = StationEquation(1500.0, 1400.0, 1500.0)
    assert a == StationEquation(1500.0, 1400.0, 1500.0)
