"""Render the README pictures from the bundled samples.

Draws ``gradeline dxf`` output with ezdxf's drawing add-on and matplotlib
(the ``docs`` extra), cropped to a window so labels stay legible:

    python docs/make_images.py
"""

from __future__ import annotations

import io
import sys
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
sys.path.insert(0, str(ROOT))


def render_dxf(
    dxf_bytes: bytes,
    window: tuple[float, float, float, float],
    width_in: float,
    out: Path,
    dpi: int = 110,
) -> None:
    """Render a DXF to PNG, showing only ``window`` = (x0, x1, y0, y1) in model units."""
    import ezdxf
    import matplotlib

    matplotlib.use("Agg")
    import matplotlib.pyplot as plt
    from ezdxf.addons.drawing import Frontend, RenderContext
    from ezdxf.addons.drawing.config import BackgroundPolicy, ColorPolicy, Configuration
    from ezdxf.addons.drawing.matplotlib import MatplotlibBackend

    doc = ezdxf.read(io.StringIO(dxf_bytes.decode("utf-8")))
    x0, x1, y0, y1 = window
    fig = plt.figure(figsize=(width_in, width_in * (y1 - y0) / (x1 - x0)), dpi=dpi)
    ax = fig.add_axes([0, 0, 1, 1])
    cfg = Configuration(
        background_policy=BackgroundPolicy.WHITE,
        color_policy=ColorPolicy.COLOR,
        lineweight_scaling=2.0,
    )
    Frontend(RenderContext(doc), MatplotlibBackend(ax), config=cfg).draw_layout(
        doc.modelspace(), finalize=False
    )
    ax.set_aspect("equal")
    ax.set_xlim(x0, x1)
    ax.set_ylim(y0, y1)
    ax.set_axis_off()
    fig.savefig(out, dpi=dpi)
    plt.close(fig)


def main() -> None:
    from gradeline.deliverables import open_alignment as select
    from gradeline.present import drafting
    from gradeline.present.layout import default_layout
    from gradeline.present.plan_drawing import plan_drawing
    from gradeline.render.dxf import write_dxf

    ctx = select(ROOT / "samples" / "orrin-vale-bypass.xml", "Orrin Vale Bypass")
    lay = default_layout(ctx.document.units)
    prof = write_dxf(drafting.profile_drawing(ctx, lay), lay, linear_unit="USSurveyFoot")
    render_dxf(prof, (1330.0, 2430.0, -40.0, 360.0), 12.0, ROOT / "docs" / "profile.png", dpi=150)
    plan = write_dxf(plan_drawing(ctx, lay), lay, linear_unit="USSurveyFoot")
    render_dxf(
        plan, (21250.0, 22450.0, 10430.0, 10830.0), 12.0, ROOT / "docs" / "plan.png", dpi=150
    )


def _pdf_png(pdf: Path, page: int, out: Path, dpi: int, crop=None) -> None:
    """One page of ``pdf`` as PNG; ``crop`` = (x, y, w, h) in inches from the top left."""
    import subprocess

    args = ["pdftoppm", "-r", str(dpi), "-f", str(page), "-l", str(page), "-png", "-singlefile"]
    if crop is not None:
        x, y, w, h = (round(v * dpi) for v in crop)
        args += ["-x", str(x), "-y", str(y), "-W", str(w), "-H", str(h)]
    subprocess.run([*args, str(pdf), str(out.with_suffix(""))], check=True)


def sheet_pages() -> None:
    """The sheet pictures (needs pdftoppm): a whole sheet with a spiral curve note, the
    profile of an unsymmetrical curve, and a station equation on plan and profile."""
    import tempfile

    from gradeline.deliverables import open_alignment as select
    from gradeline.deliverables import sheet_options
    from gradeline.io.config import read_config
    from gradeline.sheets.pdf import render_sheets

    cfg = read_config(str(ROOT / "samples" / "sheets.toml"))["sheet"]
    docs = ROOT / "docs"
    with tempfile.TemporaryDirectory() as tmp:
        bypass = select(ROOT / "samples" / "orrin-vale-bypass.xml", "Orrin Vale Bypass")
        pdf = Path(tmp) / "s.pdf"
        pdf.write_bytes(render_sheets(bypass, sheet_options(bypass, cfg)))
        _pdf_png(pdf, 1, docs / "sheet.png", 60)
        _pdf_png(pdf, 1, docs / "sheet-spiral-note.png", 110, (25.0, 0.7, 8.0, 3.4))
        _pdf_png(pdf, 2, docs / "sheet-unsym.png", 110, (19.5, 8.0, 8.5, 6.5))
        tarn = select(ROOT / "samples" / "tarnholm-link.xml", None)
        pdf2 = Path(tmp) / "t.pdf"
        metric = {k: v for k, v in cfg.items() if k not in ("scale", "interval", "design_speed")}
        metric.update(size="iso-a1", project="Tarnholm Link Road (invented)")
        pdf2.write_bytes(render_sheets(tarn, sheet_options(tarn, metric)))
        _pdf_png(pdf2, 4, docs / "sheet-equation.png", 80, (13.5, 2.5, 7.0, 13.5))


def review_page() -> None:
    """The review picture: the sample bypass reviewed at 60 mph, above its design
    speed, so that some ranges lack sight distance (needs pdftoppm)."""
    import tempfile

    from gradeline.deliverables import ReviewOptions, review_outputs
    from gradeline.deliverables import open_alignment as select

    bypass = select(ROOT / "samples" / "orrin-vale-bypass.xml", "Orrin Vale Bypass")
    _, _, pdf_bytes = review_outputs(bypass, ReviewOptions(60.0))
    assert pdf_bytes is not None
    with tempfile.TemporaryDirectory() as tmp:
        pdf = Path(tmp) / "r.pdf"
        pdf.write_bytes(pdf_bytes)
        _pdf_png(pdf, 1, ROOT / "docs" / "review.png", 80)


if __name__ == "__main__":
    main()
    sheet_pages()
    review_page()
