"""Station and curve table rows."""

from __future__ import annotations

import numpy as np
import pytest

from gradeline.deliverables import open_alignment
from gradeline.model import Alignment, Document
from gradeline.model.units import Units
from gradeline.present import tables
from gradeline.solved import solve_alignment
from tests.conftest import CASES, METRIC_SAMPLE, US_SAMPLE


def context(profile, units=Units("foot")):  # noqa: B008 - Units is frozen
    al = Alignment("test", profiles=(profile,))
    return solve_alignment(Document("t.xml", units, (al,)), al, profile)


def test_interval_rows_include_every_key_point():
    ctx = context(CASES["crest"])
    geom = ctx.geometry
    stations, tags = tables.table_stations(ctx, interval=100.0)
    c = geom.curves[0]
    for s in (0.0, c.bvc_station, c.pvi_station, c.turning_station, c.evc_station, 1000.0):
        assert np.min(np.abs(stations - s)) < 1e-9
    assert tags[0] == "START" and tags[-1] == "END"
    assert "HIGH" in tags
    assert np.all(np.diff(stations) > 0)


def test_offset_is_grade_minus_tangent():
    ctx = context(CASES["sag"])
    geom = ctx.geometry
    rows = tables.station_rows(ctx, [350.0, 500.0, 650.0])
    # middle ordinate at the PVI: A L / 800 (common practice)
    c = geom.curves[0]
    assert rows[1]["offset"] == pytest.approx(c.a_pct * c.length / 800)
    for r in rows:
        assert r["elevation"] == pytest.approx(r["tangent_elevation"] + r["offset"])
    assert rows[0]["offset"] == pytest.approx(0.0, abs=1e-12)


def test_rows_have_exact_columns():
    ctx = context(CASES["crest"])
    rows = tables.station_rows(ctx, [100.0])
    assert tuple(rows[0]) == tables.STATION_COLUMNS
    crow = tables.curve_rows(ctx)[0]
    assert tuple(crow) == tables.CURVE_COLUMNS


def test_curve_rows_us_sample():
    ctx = open_alignment(US_SAMPLE, "Orrin Vale Bypass")
    rows = tables.vertical_curve_rows(ctx)
    assert [r["type"] for r in rows] == ["crest", "sag", "crest", "sag", "crest"]
    unsym = rows[2]
    assert unsym["length_in"] == 300.0 and unsym["length_out"] == 500.0
    assert unsym["K"] == pytest.approx(800.0 / 5.0)
    assert unsym["pvi_label"] == "34+50.00"


def test_metric_table_tags_the_equation():
    ctx = open_alignment(METRIC_SAMPLE)
    stations, tags = tables.table_stations(ctx, interval=100.0)
    i = tags.index("EQUATION")
    assert stations[i] == 1200.0
    labels = ctx.stationing.labels(stations)
    assert "2+450.000" == labels[-1]


def test_json_tables_carry_a_units_block_and_csv_headers_stay(tmp_path):
    """CSV headers are unchanged; JSON names the unit of every column (None for text)."""
    import csv
    import json

    from gradeline.cli import main

    out = tmp_path / "t.json"
    assert (
        main(["table", str(METRIC_SAMPLE), "--interval", "500", "--format", "json", "-o", str(out)])
        == 0
    )
    data = json.loads(out.read_text())
    assert set(data["units"]) == set(data["columns"])
    assert data["units"]["elevation"] == "meter" and data["units"]["grade"] == "percent"
    assert data["units"]["point"] is None and data["units"]["direction"] == "decimal degrees"
    csv_out = tmp_path / "t.csv"
    assert main(["table", str(METRIC_SAMPLE), "--interval", "500", "-o", str(csv_out)]) == 0
    header = next(csv.reader(csv_out.open()))
    assert header == data["columns"]
