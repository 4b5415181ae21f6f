"""The matplotlib drawing: every format renders, SVG and PDF bytes are deterministic, the
picture carries names, the stop, the image and a caution where the script declares a hazard."""

from __future__ import annotations

from pathlib import Path

import pytest

pytest.importorskip("matplotlib")

from layoutlang import draw, load, loads  # noqa: E402
from layoutlang.reports.drawing import drawing_bytes  # noqa: E402

EXAMPLES = Path(__file__).parent.parent / "examples"
DOUBLET = """layout "Cemented doublet"
medium crown index 1.517
medium flint index 1.620
object 250 before, height 4
start in air
surface front radius 52.9 into crown
gap 5.2
surface joint radius -38.1 into flint
gap 2.0
surface back radius -150.4 into air
stop at front, diameter 18
image at focus
"""


def test_svg_is_deterministic_and_labelled() -> None:
    system = loads(DOUBLET).system
    first = drawing_bytes(system, "svg")
    assert first == drawing_bytes(system, "svg")
    text = first.decode("utf-8")
    assert text.lstrip().startswith("<?xml") and "<svg" in text
    assert "<dc:date>" not in text  # no date in the metadata
    # text stays text (svg.fonttype none): searchable, and diffs of two drawings read well
    for word in ("Cemented doublet", "front", "joint", "back", "stop", "image", "marginal ray"):
        assert word in text


def test_pdf_is_deterministic() -> None:
    system = loads(DOUBLET).system
    pdf = drawing_bytes(system, "pdf")
    assert pdf.startswith(b"%PDF") and pdf == drawing_bytes(system, "pdf")
    assert b"CreationDate" not in pdf


def test_png_of_each_example(tmp_path: Path) -> None:
    for script in sorted(EXAMPLES.glob("*.lay")):
        out = tmp_path / (script.stem + ".png")
        draw(load(script), out)
        assert out.read_bytes().startswith(b"\x89PNG"), script.name


def test_hazard_caution_is_in_the_picture(tmp_path: Path) -> None:
    import matplotlib

    from layoutlang.reports.drawing import figure

    with matplotlib.rc_context():
        fig = figure(loads(DOUBLET).system, ("laser",))
        texts = [t.get_text() for t in fig.texts]
    assert any("CAUTION (laser)" in t for t in texts)


def test_labels_name_every_surface() -> None:
    from layoutlang.reports.drawing import figure

    fig = figure(loads(DOUBLET).system)
    texts = {t.get_text() for ax in fig.axes for t in ax.texts}
    assert {"front", "joint", "back", "stop", "image"} <= texts


def test_rays_of_each_wavelength_end_on_the_one_image_plane() -> None:
    from layoutlang.reports.drawing import figure

    text = """wavelengths 587.6 nm primary, 486.1 nm, 656.3 nm
medium flint glass code 755276
object at infinity, field angle 4 deg
start in air
surface front radius 30 into flint
gap 6
surface back radius 200 into air
stop at front, diameter 24
image at focus
"""
    system = loads(text).system
    if not any(getattr(m, "model", None) is not None for m in system.media):
        pytest.skip("no dispersion models in this tree")
    fig = figure(system)
    legend = [t.get_text() for t in fig.legends[0].get_texts()]
    assert legend[:3] == ["486.1 nm", "587.6 nm (primary)", "656.3 nm"]  # short to long
    ax = fig.axes[0]
    colours = {h.get_color() for h in fig.legends[0].legend_handles[:3]}
    rays = [line for line in ax.lines if line.get_color() in colours]
    assert len(rays) == 9  # marginal above and below, chief: three colours
    ends = {round(float(line.get_xdata()[-1]), 9) for line in rays}
    assert len(ends) == 1  # every colour stops on the primary's image plane
