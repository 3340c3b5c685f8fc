"""Reliability: every value a user can type and every criteria or configuration file
ends in exit 0, 1 or 2 with at most one line of error, never a traceback; no build
loses an output to a name collision; failed writes leave no stray file.

These are properties of gradeline's own contract (README, "Hardening"); the inputs
are hostile on purpose, the expectations are exit codes and messages.
"""

from __future__ import annotations

import json
import os
import shutil
import subprocess
import sys
from pathlib import Path

import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from gradeline.cli import main
from tests.conftest import METRIC_SAMPLE, US_SAMPLE, run_cli

BYPASS = ["--alignment", "Orrin Vale Bypass"]


run = run_cli


def _one_line(err: str) -> None:
    lines = [ln for ln in err.splitlines() if ln.strip() and "warning:" not in ln]
    assert len(lines) <= 1, err
    assert "Traceback" not in err


@pytest.fixture(scope="module")
def profile_dxf(tmp_path_factory) -> Path:
    out = tmp_path_factory.mktemp("dxf") / "p.dxf"
    assert main(["dxf", str(US_SAMPLE), *BYPASS, "-o", str(out)]) == 0
    return out


# --------------------------------------------------------------------------- options
BAD_NUMBERS = ["abc", "", "nan", "inf", "-inf", "0", "-5", "1e300", "1e-300"]


def _commands(tmp: Path, dxf: Path) -> dict[str, list[str]]:
    """A command a numeric option belongs to, with the option last but its value."""
    s = str(US_SAMPLE)
    fit = ["fit", str(dxf), "--layer", "PROFILE-GRADE", "-o", str(tmp / "f.xml")]
    chk = ["check", s, *BYPASS, "--dxf", str(dxf)]
    rev = ["review", s, *BYPASS, "--speed", "50"]
    dxf_ = ["dxf", s, *BYPASS, "-o", str(tmp / "a.dxf")]
    sheets = ["sheets", s, *BYPASS, "-o", str(tmp / "s.pdf")]
    return {
        "dxf --exaggeration": [*dxf_, "--exaggeration"],
        "dxf --scale": [*dxf_, "--scale"],
        "table --interval": ["table", s, *BYPASS, "--interval"],
        "sheets --exaggeration": [*sheets, "--exaggeration"],
        "sheets --interval": [*sheets, "--interval"],
        "review --speed": ["review", s, *BYPASS, "--speed"],
        "review --emax": [*rev, "--emax"],
        "review --step": [*rev, "--step"],
        "review --lanes-rotated": [*rev, "--lanes-rotated"],
        "check --datum": [*chk, "--exaggeration", "10", "--datum"],
        "check --exaggeration": [*chk, "--datum", "0", "--exaggeration"],
        "check --tolerance": ["check", s, *BYPASS, "--tolerance"],
        "fit --window": [*fit, "--window"],
        "fit --start-station": [*fit, "--start-station"],
        "design --min-length": ["design", s, *BYPASS, "--speed", "50", "--min-length"],
        "superelevation --emax": ["superelevation", s, "--speed", "50", "--emax"],
        "build --jobs": ["build", s, "-o", str(tmp / "b"), "--jobs"],
    }


@pytest.mark.parametrize("value", BAD_NUMBERS)
@pytest.mark.parametrize(
    "option",
    [
        "dxf --exaggeration",
        "dxf --scale",
        "table --interval",
        "sheets --exaggeration",
        "review --speed",
        "review --emax",
        "review --step",
        "check --exaggeration",
        "fit --window",
        "fit --start-station",
        "build --jobs",
    ],
)
def test_bad_numbers_end_in_one_line(tmp_path, capsys, profile_dxf, option, value):
    args = _commands(tmp_path, profile_dxf)[option]
    code, _, err = run(capsys, *args, value)
    assert code in (0, 1, 2)
    _one_line(err)
    if value in ("abc", "", "nan", "inf", "-inf"):
        assert code == 2 and option.split()[1] in err


@settings(
    max_examples=40,
    deadline=None,
    suppress_health_check=[HealthCheck.function_scoped_fixture, HealthCheck.too_slow],
)
@given(
    option=st.sampled_from(
        [
            "dxf --exaggeration",
            "table --interval",
            "review --speed",
            "review --emax",
            "review --lanes-rotated",
            "check --tolerance",
            "fit --window",
            "design --min-length",
            "superelevation --emax",
        ]
    ),
    value=st.one_of(
        st.floats(allow_nan=True, allow_infinity=True).map(repr),
        st.integers(-(10**30), 10**30).map(str),
        st.text(max_size=12),
    ),
)
def test_any_value_of_a_numeric_option_ends_in_exit_0_1_or_2(
    tmp_path, capsys, profile_dxf, option, value
):
    if value.startswith("-") and value[1:2].isalpha():
        value = " " + value  # argparse would read "-x" as an option, not a value
    code, _, err = run(capsys, *_commands(tmp_path, profile_dxf)[option], value)
    assert code in (0, 1, 2)
    _one_line(err)


# --------------------------------------------------------------------------- criteria
def _criteria_with(tmp_path: Path, old: str, new: str) -> Path:
    from importlib import resources

    text = resources.files("gradeline.criteria").joinpath("aashto-2018.toml").read_text()
    assert old in text
    out = tmp_path / "c.toml"
    out.write_text(text.replace(old, new, 1), encoding="utf-8")
    return out


@pytest.mark.parametrize(
    ("old", "new", "said"),
    [
        ("deceleration = 11.2", "deceleration = 0", "deceleration"),
        ("deceleration = 11.2", "deceleration = -3", "deceleration"),
        ("deceleration = 11.2", "deceleration = inf", "deceleration"),
        ("reaction_time = 2.5", 'reaction_time = "2.5 s"', "reaction_time"),
        ("eye_height = 3.5", "eye_height = [3.5]", "eye_height"),
        ("comfort_divisor = 46.5", "comfort_divisor = " + "9" * 5000, "too long"),
        ("comfort_divisor = 46.5", "comfort_divisor = " + "9" * 400, "comfort_divisor"),
        ("ssd_round_to = 5.0", "ssd_round_to = 0", "ssd_round_to"),
        ("15 = 0.32", "15 = -0.32", "side_friction"),
        ("15 = 0.32", '15 = "high"', "side_friction"),
        ("[us.side_friction]", "[us.side_frictions]", "side_friction"),
        ('speed_unit = "mph"', 'speed_unit = "furlongs"', "speed_unit"),
        ("lane_width = 12.0", "lane_width = 0", "lane_width"),
        ("e_max = 0.08 ", "e_max = 0.9 ", "e_max"),
        ('name = "AASHTO', "x = " + "[" * 3000 + "]" * 3000 + '\nname = "AASHTO', "nested"),
    ],
)
def test_hostile_criteria_end_in_one_line_naming_the_key(tmp_path, capsys, old, new, said):
    crit = _criteria_with(tmp_path, old, new)
    code, _, err = run(capsys, "review", US_SAMPLE, *BYPASS, "--speed", "50", "--criteria", crit)
    assert code == 2, err
    _one_line(err)
    assert said in err and "c.toml" in err


def test_an_unknown_criteria_key_is_said_not_ignored(tmp_path, capsys):
    crit = _criteria_with(tmp_path, "e_max = 0.08 ", "e_max = 0.08\nradius_coeficient = 15 ")
    code, out, err = run(capsys, "review", US_SAMPLE, *BYPASS, "--speed", "50", "--criteria", crit)
    assert code == 0 and err == ""
    assert "radius_coeficient" in out and "typo" in out


# --------------------------------------------------------------------------- config
@pytest.mark.parametrize(
    ("toml", "said"),
    [
        ('[layers]\ngrade = "A/B"\n', "grade"),
        ('[layers]\ngrade = "GRADE"\nground = "grade"\n', "both grade and ground"),
        ("[layers]\ngrade = 5\n", "grade"),
        ('[layers]\ngrade = "A\\nB"\n', "grade"),
        ('[layers]\nnot_a_role = "X"\n', "not_a_role"),
        ('layers = "grade"\n', "layers"),
        ("[sheet]\nscale = " + "9" * 400 + "\n", "scale"),
        ("[sheet]\nscale = -50\n", "scale"),
        ("[sheet]\nexaggeration = nan\n", "exaggeration"),
        ("x = " + "{a = " * 2000 + "1" + "}" * 2000 + "\n", "nested"),
    ],
)
def test_hostile_config_ends_in_one_line(tmp_path, capsys, toml, said):
    cfg = tmp_path / "cfg.toml"
    cfg.write_text(toml, encoding="utf-8")
    for cmd in (
        ["dxf", US_SAMPLE, *BYPASS, "-o", tmp_path / "a.dxf", "--config", cfg],
        ["sheets", US_SAMPLE, *BYPASS, "-o", tmp_path / "a.pdf", "--config", cfg],
    ):
        code, _, err = run(capsys, *cmd)
        if cmd[0] == "dxf" and toml.startswith("[sheet]"):
            assert code == 0  # dxf reads [layers] only
            continue
        if cmd[0] == "sheets" and toml.startswith("[layers]"):
            continue  # sheets take no layer names
        assert code == 2, (cmd[0], err)
        _one_line(err)
        assert said in err


def test_an_unknown_config_table_is_warned(tmp_path, capsys):
    cfg = tmp_path / "cfg.toml"
    cfg.write_text('[layer]\ngrade = "X"\n', encoding="utf-8")
    code, _, err = run(capsys, "dxf", US_SAMPLE, *BYPASS, "-o", tmp_path / "a.dxf", "--config", cfg)
    assert code == 0 and "unknown key 'layer'" in err


# --------------------------------------------------------------------------- build
def _alignment_names(path: Path) -> list[str]:
    from lxml import etree

    return [a.get("name") for a in etree.parse(str(path)).iter("{*}Alignment")]


def test_build_never_lets_two_inputs_share_a_folder(tmp_path, capsys):
    src = tmp_path / "in"
    src.mkdir()
    names = ["Road.xml", "road.xml", "road 1.xml", "road-1.xml"]
    for n in names:
        shutil.copy(METRIC_SAMPLE, src / n)
    if len(list(src.iterdir())) < 4:
        pytest.skip("a case-insensitive file system: Road.xml and road.xml are one file")
    out = tmp_path / "out"
    code, text, _ = run(capsys, "build", src, "-o", out, "--jobs", "1")
    assert code in (0, 1)
    index = json.loads((out / "index.json").read_text())
    folders = {os.path.dirname(os.path.dirname(o)) for it in index["items"] for o in it["outputs"]}
    assert len(index["items"]) == 4 and len(folders) == 4
    for it in index["items"]:
        for o in it["outputs"]:
            assert (out / o).is_file() or Path(o).is_file()
    assert "reduces to the same name" in text


def test_two_alignments_whose_names_reduce_alike_get_two_folders(tmp_path, capsys):
    text = METRIC_SAMPLE.read_text(encoding="utf-8")
    (name,) = _alignment_names(METRIC_SAMPLE)
    start = text.index("<Alignment ")
    end = text.index("</Alignment>") + len("</Alignment>")
    block = text[start:end]
    twin = block.replace(f'name="{name}"', f'name="{name.upper()}"', 1)
    both = tmp_path / "two.xml"
    both.write_text(text[:end] + "\n" + twin + text[end:], encoding="utf-8")
    out = tmp_path / "out"
    code, _, _ = run(capsys, "build", both, "-o", out, "--jobs", "1")
    assert code in (0, 1)
    sub = sorted(p.name for p in (out / "two").iterdir())
    assert len(sub) == 2 and sub[1] == sub[0] + "-2"


# --------------------------------------------------------------------------- output places
def test_an_output_under_a_file_ends_in_one_line(tmp_path, capsys):
    blocker = tmp_path / "file.txt"
    blocker.write_text("not a folder")
    code, _, err = run(
        capsys, "table", US_SAMPLE, *BYPASS, "--interval", "100", "-o", blocker / "t.csv"
    )
    assert code == 2
    _one_line(err)


def test_a_full_disk_leaves_the_previous_output_and_no_part_file(tmp_path, capsys, monkeypatch):
    import errno

    out = tmp_path / "t.csv"
    assert main(["table", str(US_SAMPLE), *BYPASS, "--interval", "100", "-o", str(out)]) == 0
    good = out.read_bytes()

    def full(fd, *a, **k):
        raise OSError(errno.ENOSPC, "No space left on device")

    monkeypatch.setattr(os, "fsync", full)
    code, _, err = run(capsys, "table", US_SAMPLE, *BYPASS, "--interval", "50", "-o", out)
    assert code == 2 and "No space left on device" in err
    _one_line(err)
    assert out.read_bytes() == good
    assert [p.name for p in tmp_path.iterdir()] == ["t.csv"]


def test_an_unusable_home_folder_does_not_stop_a_drawing(tmp_path):
    # ezdxf keeps a font cache under the home folder; where it cannot be made the
    # drawing is still written (exit 0, no traceback)
    blocker = tmp_path / "home-is-a-file"
    blocker.write_text("")
    env = dict(os.environ, HOME=str(blocker / "sub"), XDG_CACHE_HOME=str(blocker / "cache"))
    cmd = ["dxf", str(US_SAMPLE), *BYPASS, "-o", str(tmp_path / "p.dxf")]
    res = subprocess.run(
        [sys.executable, "-m", "gradeline", *cmd],
        capture_output=True,
        text=True,
        env=env,
        check=False,
    )
    assert res.returncode == 0, res.stderr
    assert "Traceback" not in res.stderr
    assert (tmp_path / "p.dxf").stat().st_size > 1000


# --------------------------------------------------------------------------- random TOML
_KEYS = st.sampled_from(
    [
        "deceleration",
        "reaction_time",
        "eye_height",
        "e_max",
        "speed_unit",
        "side_friction",
        "superelevation",
        "grade",
        "ground",
        "scale",
        "exaggeration",
        "size",
        "zzz",
    ]
)


def _toml_float(v: float) -> str:
    if v != v:
        return "nan"
    if v in (float("inf"), float("-inf")):
        return "inf" if v > 0 else "-inf"
    return repr(v)


def _toml_text(t: str) -> str:
    return '"' + "".join(ch for ch in t if ch not in '"\\' and ord(ch) >= 32) + '"'


_VALUES = st.one_of(
    st.floats(allow_nan=True, allow_infinity=True).map(_toml_float),
    st.integers(-(10**20), 10**20).map(str),
    st.text(alphabet=st.characters(codec="utf-8", exclude_categories=["Cs"]), max_size=8).map(
        _toml_text
    ),
    st.just("[1, 2]"),
    st.just("{ a = 1 }"),
    st.just("true"),
)
_TABLES = ["us", "metric", "layers", "sheet", "us.side_friction", "us.superelevation"]


@st.composite
def toml_documents(draw) -> str:
    lines = []
    for table in draw(
        st.lists(
            st.sampled_from(
                ["us", "metric", "layers", "sheet", "us.side_friction", "us.superelevation"]
            ),
            max_size=4,
        )
    ):
        lines.append(f"[{table}]")
        for _ in range(draw(st.integers(0, 5))):
            lines.append(f"{draw(_KEYS)} = {draw(_VALUES)}")
    return "\n".join(lines) + "\n"


@settings(
    max_examples=40,
    deadline=None,
    suppress_health_check=[HealthCheck.function_scoped_fixture, HealthCheck.too_slow],
)
@given(doc=toml_documents())
def test_any_toml_document_ends_in_exit_0_1_or_2(tmp_path, capsys, doc):
    path = tmp_path / "random.toml"
    path.write_text(doc, encoding="utf-8")
    for cmd in (
        ["review", US_SAMPLE, *BYPASS, "--speed", "50", "--criteria", path],
        ["dxf", US_SAMPLE, *BYPASS, "-o", tmp_path / "r.dxf", "--config", path],
    ):
        code, _, err = run(capsys, *cmd)
        assert code in (0, 1, 2), (doc, err)
        _one_line(err)
