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
    for word in ("Cemented doublet", "front", "joint", "back", "stop", "image", "on axis"):
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
    # the axial bundle (4 rays) in three colours, the primary's 0.7 and full-field bundles
    assert len(rays) == 3 * 4 + 2 * 5
    ends = {round(float(line.get_xdata()[-1]), 9) for line in rays}
    assert len(ends) == 1  # every colour stops on the primary's image plane


def test_the_legend_lists_only_what_is_drawn() -> None:
    from layoutlang.reports.drawing import figure

    no_rays = figure(loads("""object 100 before, height 2
start in air
lens thin focal length 50
image at focus
""").system)
    assert not no_rays.legends
    axis_only = figure(loads("""object at infinity
start in air
lens thin focal length 50
stop at thin, diameter 10
image at focus
""").system)
    labels = [t.get_text() for t in axis_only.legends[0].get_texts()]
    assert labels[0] == "on axis" and not any("field" in t for t in labels)
    fields = figure(loads(DOUBLET).system)
    labels = [t.get_text() for t in fields.legends[0].get_texts()]
    assert [t.split(" (")[0] for t in labels[:3]] == ["on axis", "0.7 field", "full field"]


def test_surface_names_never_overlap() -> None:
    from layoutlang.reports.cross_section import cross_section
    from layoutlang.reports.drawing import _label_levels

    lines = ["medium glass index 1.5", "object at infinity", "start in air"]
    for i in range(12):  # twelve thin plates 0.5 mm apart with long names
        lines += [f"surface plate_number_{i} flat into {'glass' if i % 2 == 0 else 'air'}",
                  "gap 0.5"]
    lines += ["surface last_face flat into air", "stop at plate_number_0, diameter 4",
              "image 10 after"]
    section = cross_section(loads("\n".join(lines) + "\n").system)
    char = 0.3
    levels = _label_levels(section, char)
    placed = [(p.z - char * (len(p.name) + 1.5) / 2, p.z + char * (len(p.name) + 1.5) / 2, lv)
              for p, lv in zip(section.profiles, levels) if lv is not None]
    for i, (a, b, lv) in enumerate(placed):
        for c, d, other in placed[i + 1:]:
            assert lv != other or b <= c or d <= a
    assert None in levels  # thinned past the last level (and said in the drawing's notes)


def test_png_size_from_dpi_or_width(tmp_path) -> None:
    import matplotlib.image

    from layoutlang.cli import main

    script = tmp_path / "d.lay"
    script.write_text(DOUBLET, encoding="utf-8")
    out = tmp_path / "d.png"
    assert main(["draw", str(script), "-o", str(out), "--width", "1800"]) == 0
    assert matplotlib.image.imread(str(out)).shape[1] == 1800
    assert main(["draw", str(script), "-o", str(out), "--dpi", "50"]) == 0
    assert matplotlib.image.imread(str(out)).shape[1] == 450
    assert main(["draw", str(script), "-o", str(tmp_path / "d.svg"), "--dpi", "300"]) == 2
