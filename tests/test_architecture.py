"""The layout the architecture promises: what imports what, and what is computed once."""

from __future__ import annotations

import json
import subprocess
import sys
from importlib import metadata

import pytest

from tests.conftest import METRIC_SAMPLE, US_SAMPLE

#: Computation and renderers: none of them may load lxml (only gradeline.io reads XML).
NO_LXML = [
    "gradeline.model",
    "gradeline.geometry.vertical",
    "gradeline.geometry.horizontal",
    "gradeline.geometry.curve_data",
    "gradeline.geometry.station_offset",
    "gradeline.geometry.ground",
    "gradeline.geometry.stations",
    "gradeline.solved",
    "gradeline.analysis.review",
    "gradeline.analysis.check",
    "gradeline.analysis.fit",
    "gradeline.present.drafting",
    "gradeline.present.tables",
    "gradeline.present.labels",
    "gradeline.render.dxf",
    "gradeline.render.reports",
    "gradeline.render.outputs",
    "gradeline.sheets.pdf",
    "gradeline.sheets.views",
    "gradeline.sheets.tables",
    "gradeline.deliverables",
]


def _modules_after(code: str) -> set[str]:
    out = subprocess.run(
        [sys.executable, "-c", code + "\nimport sys, json\nprint(json.dumps(sorted(sys.modules)))"],
        capture_output=True,
        text=True,
        check=True,
    )
    return set(json.loads(out.stdout.splitlines()[-1]))


@pytest.mark.parametrize("module", NO_LXML)
def test_computation_and_renderers_do_not_import_lxml(module):
    loaded = _modules_after(f"import {module}")
    assert "lxml" not in loaded and "lxml.etree" not in loaded


def test_help_loads_no_heavy_library():
    """`gradeline --help` builds every command's parser without numpy, lxml, ezdxf, reportlab."""
    loaded = _modules_after(
        "from gradeline.cli import build_parser\nbuild_parser().format_help()\nimport gradeline"
    )
    heavy = {m.split(".")[0] for m in loaded} & {"numpy", "lxml", "ezdxf", "reportlab", "scipy"}
    assert heavy == set()


def test_top_level_help_imports_no_command_module():
    """`gradeline --help` lists the commands from their summaries alone; a command's own
    parser (and module) is built only when argv names it."""
    loaded = _modules_after(
        "from gradeline.cli import build_parser\nbuild_parser(['--help']).format_help()"
    )
    assert {m for m in loaded if m.startswith("gradeline.cli.")} == {"gradeline.cli._common"}
    loaded = _modules_after(
        "from gradeline.cli import build_parser\nbuild_parser(['sheets', '-h']).format_help()"
    )
    commands = {m for m in loaded if m.startswith("gradeline.cli.")} - {"gradeline.cli._common"}
    assert commands == {"gradeline.cli.sheets"}


def test_top_level_help_is_the_same_lazy_or_whole():
    from gradeline.cli import build_parser

    assert build_parser(["--help"]).format_help() == build_parser().format_help()
    whole = build_parser()
    for name in ("info", "sheets", "build"):
        lazy = build_parser([name, "x"])
        sub_whole = next(a for a in whole._actions if a.dest == "command").choices[name]
        sub_lazy = next(a for a in lazy._actions if a.dest == "command").choices[name]
        assert sub_lazy.format_help() == sub_whole.format_help()


def test_only_gradeline_is_installed():
    """No top-level `converter` or `sheets` module: the folders install as gradeline."""
    import sysconfig

    site = sysconfig.get_paths()["purelib"]
    dist = next(iter(metadata.distributions(name="gradeline", path=[site])), None)
    if dist is None:
        pytest.skip("gradeline is not installed in this environment's site-packages")
    files = dist.files or []
    if any("__editable__" in str(f) for f in files):
        pytest.skip("editable install: modules are mapped by a path hook")
    tops = {f.parts[0] for f in files if f.suffix == ".py" and ".." not in f.parts}
    assert tops == {"gradeline"}


def test_curve_data_and_solving_happen_once_per_alignment(monkeypatch, tmp_path):
    """Every deliverable of one alignment shares one solution (issue 13)."""
    from gradeline import deliverables as dl
    from gradeline.geometry import curve_data, horizontal, vertical

    calls = {"curve_data": 0, "horizontal": 0, "vertical": 0}

    def counting(name, fn):
        def wrapper(*a, **k):
            calls[name] += 1
            return fn(*a, **k)

        return wrapper

    monkeypatch.setattr(curve_data, "curve_data", counting("curve_data", curve_data.curve_data))
    monkeypatch.setattr("gradeline.solved.curve_data", curve_data.curve_data)
    monkeypatch.setattr(horizontal, "solve", counting("horizontal", horizontal.solve))
    monkeypatch.setattr(vertical, "solve", counting("vertical", vertical.solve))
    solved = dl.open_alignment(US_SAMPLE, "Orrin Vale Bypass")
    drawing = dl.DrawingOptions()
    dl.profile_dxf(solved, drawing)
    dl.plan_dxf(solved, drawing)
    dl.sheets_pdf(solved, dl.sheet_options(solved))
    dl.curve_table(solved)
    dl.station_table(solved, dl.TableOptions(50.0))
    dl.review_report(solved, dl.ReviewOptions(50.0))
    opts = dl.CheckOptions()
    dl.check_findings(solved, opts.tolerances())
    assert calls == {"curve_data": 1, "horizontal": 1, "vertical": 1}


def test_commands_and_build_make_the_same_bytes(tmp_path):
    """A deliverable is the same whether made by its command or by build."""
    from gradeline.cli import main

    out = tmp_path / "b"
    assert main(["build", str(METRIC_SAMPLE), "-o", str(out), "--jobs", "1"]) in (0, 1)
    folder = next(p for p in out.rglob("profile.dxf")).parent
    single = tmp_path / "p.dxf"
    assert (
        main(["dxf", str(METRIC_SAMPLE), "-o", str(single), "--plan", str(tmp_path / "plan.dxf")])
        == 0
    )
    assert single.read_bytes() == (folder / "profile.dxf").read_bytes()
    assert (tmp_path / "plan.dxf").read_bytes() == (folder / "plan.dxf").read_bytes()
    pdf = tmp_path / "s.pdf"
    assert main(["sheets", str(METRIC_SAMPLE), "-o", str(pdf)]) == 0
    assert pdf.read_bytes() == (folder / "sheets.pdf").read_bytes()
    csv = tmp_path / "c.csv"
    assert main(["curves", str(METRIC_SAMPLE), "-o", str(csv)]) == 0
    assert csv.read_bytes() == (folder / "curves.csv").read_bytes()


def test_public_api_matches_all():
    import gradeline

    for name in gradeline.__all__:
        assert getattr(gradeline, name) is not None, name
    with pytest.raises(AttributeError):
        gradeline.nothing_here  # noqa: B018


def test_readme_library_example(tmp_path, monkeypatch):
    """README's library example, run as written in a scratch folder."""
    from pathlib import Path

    root = Path(__file__).resolve().parent.parent
    (tmp_path / "samples").symlink_to(root / "samples")
    monkeypatch.chdir(tmp_path)
    text = (root / "README.md").read_text()
    start = text.index("```python\n", text.index("As a library")) + len("```python\n")
    code = text[start : text.index("```", start)]
    namespace: dict = {}
    exec(compile(code, "README.md", "exec"), namespace)  # noqa: S102
    assert namespace["road"].alignment.name == "Orrin Vale Bypass"
    assert len(namespace["radii"]) == len(namespace["road"].curves) > 0
    assert (tmp_path / "profile.dxf").stat().st_size > 0
    assert (tmp_path / "plan.dxf").stat().st_size > 0
    assert (tmp_path / "sheets.pdf").read_bytes().startswith(b"%PDF")
