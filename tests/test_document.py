"""Design reports: Markdown, HTML and LaTeX say the same things (layout, first-order values,
expectations with status, cautions) and embed or reference the drawing."""

from __future__ import annotations

from html.parser import HTMLParser
from pathlib import Path

import pytest

pytest.importorskip("matplotlib")

from layoutlang.reports.document import render_document, tex_escape  # noqa: E402

# One thin lens, 1/s + 1/s' = 1/f (Hecht 2017, Optics, 5th ed., eq. 5.17; number from memory):
# f = 50, s = 150
# → s' = 75 and magnification -0.5. The third expectation is deliberately wrong.
SCRIPT = """layout "Relay lens, 50 mm"
hazard laser
object 150 before, height 2
start in air
lens relay focal length 50
stop at relay, diameter 10
image at focus
expect image distance = 75 ± 0.01
expect magnification = -0.5 within 0.1%
expect f-number > 20
"""


@pytest.fixture()
def script(tmp_path: Path) -> Path:
    path = tmp_path / "relay.lay"
    path.write_text(SCRIPT, encoding="utf-8")
    return path


def test_markdown_with_drawing_beside_it(script: Path, tmp_path: Path) -> None:
    out = tmp_path / "report.md"
    document = render_document(str(script), "md", str(out))
    text = document.text
    assert not document.all_hold  # f-number > 20 fails
    assert text.startswith("# Relay lens, 50 mm\n")
    assert "![cross-section of Relay lens, 50 mm](report-drawing.svg)" in text
    assert (tmp_path / "report-drawing.svg").read_bytes().lstrip().startswith(b"<?xml")
    assert "| image distance | 75 mm  (real image, downstream) |" in text
    assert "| holds | 8 | expect image distance = 75 ± 0.01 |" in text
    assert "| FAILS | 10 | expect f-number > 20 |" in text
    assert "CAUTION: this layout focuses or relays laser light" in text
    assert render_document(str(script), "md", str(out)).text == text  # deterministic


def test_markdown_to_stdout_embeds_the_drawing(script: Path) -> None:
    text = render_document(str(script), "md").text
    assert "](data:image/svg+xml;base64," in text


class _Collect(HTMLParser):
    def __init__(self) -> None:
        super().__init__()
        self.tags: list[str] = []
        self.text: list[str] = []

    def handle_starttag(self, tag, attrs) -> None:
        self.tags.append(tag)

    def handle_data(self, data) -> None:
        self.text.append(data)


def test_html_is_self_contained(script: Path) -> None:
    text = render_document(str(script), "html").text
    parsed = _Collect()
    parsed.feed(text)
    assert {"html", "table", "svg", "h2"} <= set(parsed.tags)
    words = " ".join(parsed.text)
    assert "First-order properties" in words and "FAILS" in words and "CAUTION" in words
    assert "<?xml" not in text  # the SVG is inline, without its own prolog


def test_latex_document_and_escaping(script: Path, tmp_path: Path) -> None:
    out = tmp_path / "report.tex"
    text = render_document(str(script), "latex", str(out)).text
    assert text.startswith(r"\documentclass{article}") and text.rstrip().endswith(r"\end{document}")
    assert r"\includegraphics[width=\linewidth]{report-drawing.pdf}" in text
    assert (tmp_path / "report-drawing.pdf").read_bytes().startswith(b"%PDF")
    assert r"75 $\pm$ 0.01" in text
    assert text.count(r"\begin{longtable}") == text.count(r"\end{longtable}") == 3
    assert tex_escape("a_b 50% #1 & {x}") == r"a\_b 50\% \#1 \& \{x\}"
    assert tex_escape("5° → ∂") == r"5$^\circ$ $\to$ [U+2202]"


def test_derived_equations_are_in_every_format(tmp_path: Path) -> None:
    render = pytest.importorskip("layoutlang.symbolic.render")
    if not hasattr(render, "equation_rows"):
        pytest.skip("the symbolic engine has no report rows here")
    # One refracting boundary, n1/s + n2/s' = (n2 - n1)/R (Hecht 2017, Optics, 5th ed.,
    # eq. 5.8; number from memory): n1 = 1, n2 = 1.5, R = 20, s = 100 → s' = 100.
    path = tmp_path / "boundary.lay"
    path.write_text("""layout "One boundary"
symbols n1 n2 R a positive
nominal n1 = 1, n2 = 1.5, R = 20, a = 100
medium outside index n1
medium inside index n2
object a before, height 1
start in outside
surface front radius R into inside
stop at front, diameter 5
image at focus
derive image distance
expect image distance = 100 ± 0.001
""", encoding="utf-8")
    md = render_document(str(path), "md", str(tmp_path / "r.md"))
    assert md.all_hold
    assert "## Derived equations" in md.text and r"\frac{R a n_{2}}" in md.text
    latex = render_document(str(path), "latex").text
    assert r"\subsection*{Derived equations}" in latex and r"\begin{equation*}" in latex
    html = render_document(str(path), "html").text
    assert "<h2>Derived equations</h2>" in html


def test_latex_compiles_where_a_tex_system_is_installed(script: Path, tmp_path: Path) -> None:
    import shutil
    import subprocess

    if shutil.which("pdflatex") is None:
        pytest.skip("no pdflatex on this machine")
    out = tmp_path / "report.tex"
    out.write_text(render_document(str(script), "latex", str(out)).text, encoding="utf-8")
    run = subprocess.run(["pdflatex", "-interaction=nonstopmode", "-halt-on-error", out.name],
                         cwd=tmp_path, capture_output=True, text=True, timeout=120)
    assert run.returncode == 0, run.stdout[-2000:]
    assert (tmp_path / "report.pdf").read_bytes().startswith(b"%PDF")


def test_a_layout_that_cannot_be_drawn_still_gets_its_report(tmp_path: Path) -> None:
    path = tmp_path / "flat.lay"
    path.write_text("object 0 before, height 3\nstart in air\nsurface s0 flat into air\n"
                    "stop at s0, diameter 3\n", encoding="utf-8")
    text = render_document(str(path), "md", str(tmp_path / "r.md")).text
    assert "## Drawing" not in text and "Note: no drawing: this layout cannot be drawn" in text
    assert not (tmp_path / "r-drawing.svg").exists()


# --- everything `run` prints, a summary at the top, the format from the file name -------------

ROOT = Path(__file__).resolve().parent.parent


def _requested(example: str):
    from layoutlang.checks import evaluate_program
    from layoutlang.interpret.interpreter import load_file
    from layoutlang.reports.text import requested_blocks

    program = load_file(ROOT / "examples" / example)
    results, _ = evaluate_program(program)
    return requested_blocks(program, results)


@pytest.mark.parametrize("example", ["label_reader_objective.lay", "cemented_achromat.lay"])
def test_documents_carry_every_section_the_text_report_prints(example: str) -> None:
    import html as html_module

    from layoutlang.cli import main  # noqa: F401  (the same core as `run`)
    from layoutlang.reports.blocks import Heading, Line, Table

    blocks = _requested(example)
    kinds = {type(b) for b in blocks}
    assert {Heading, Line, Table} <= kinds  # exact rays / Seidel / colour sections exist
    path = str(ROOT / "examples" / example)
    md = render_document(path, "md").text
    page = render_document(path, "html").text
    tex = render_document(path, "latex").text
    for block in blocks:
        if isinstance(block, (Heading, Line)):
            assert block.text in md
            assert html_module.escape(block.text) in page
            assert tex_escape(block.text) in tex
        else:  # every row of every table is a row of a real table in each document
            for row in block.rows:
                assert "| " + " | ".join(c.replace("|", "\\|") for c in row) + " |" in md
                assert "<tr>" + "".join(
                    f"<{'th' if block.header and row is block.rows[0] else 'td'}>"
                    f"{html_module.escape(c)}</{'th' if block.header and row is block.rows[0] else 'td'}>"
                    for c in row) + "</tr>" in page
                cells = [r"\textbf{" + tex_escape(c) + "}" if block.header and row is block.rows[0]
                         else tex_escape(c) for c in row]
                assert " & ".join(cells) + r" \\" in tex


def test_the_seidel_and_colour_tables_are_tables_in_the_documents() -> None:
    path = str(ROOT / "examples" / "label_reader_objective.lay")
    md = render_document(path, "md").text
    assert "| boundary | S I spherical | S II coma |" in md and "| total |" in md
    page = render_document(str(ROOT / "examples" / "cemented_achromat.lay"), "html").text
    assert "<th>wavelength</th><th>focal length</th>" in page


def test_a_pass_or_fail_summary_opens_every_document(script: Path) -> None:
    md = render_document(str(script), "md").text.splitlines()
    assert md[2] == "**1 of 3 expectations FAIL (line 10).**"
    page = render_document(str(script), "html").text
    assert page.index("1 of 3 expectations FAIL") < page.index("<h2>")
    tex = render_document(str(script), "latex").text
    assert tex.index("1 of 3 expectations FAIL") < tex.index(r"\subsection*")
    good = render_document(str(ROOT / "examples" / "label_reader_objective.lay"), "md").text
    assert good.splitlines()[2] == "**All 10 expectations hold.**"


@pytest.mark.parametrize("name, marker", [("out.html", "<!DOCTYPE html>"),
                                          ("out.htm", "<!DOCTYPE html>"),
                                          ("out.tex", r"\documentclass"),
                                          ("out.md", "# Relay lens")])
def test_the_format_comes_from_the_output_extension(script: Path, tmp_path: Path, name: str,
                                                    marker: str) -> None:
    from layoutlang.cli import main

    out = tmp_path / name
    assert main(["report", str(script), "-o", str(out)]) == 1  # one expectation fails
    assert out.read_text(encoding="utf-8").startswith(marker)


def test_an_unknown_output_extension_without_format_is_an_error(script: Path, tmp_path: Path,
                                                                 capsys) -> None:
    from layoutlang.cli import main

    assert main(["report", str(script), "-o", str(tmp_path / "out.txt")]) == 2
    err = capsys.readouterr().err
    assert "cannot tell the document format" in err and ".tex" in err
    # --format still wins over the extension
    assert main(["report", str(script), "--format", "html", "-o",
                 str(tmp_path / "out.txt")]) == 1
    assert (tmp_path / "out.txt").read_text(encoding="utf-8").startswith("<!DOCTYPE html>")


def test_latex_keeps_negative_numbers_whole_and_never_hyphenates() -> None:
    assert tex_escape("-38.52 mm") == r"\mbox{$-$38.52} mm"
    assert tex_escape("radius -0.5 mm") == r"radius \mbox{$-$0.5} mm"
    assert tex_escape("real - paraxial") == "real - paraxial"  # an operator, not a sign
    assert tex_escape("3.633e-5") == "3.633e-5"  # inside a number
    assert tex_escape("f-number") == "f-number"
    tex = render_document(str(ROOT / "examples" / "label_reader_objective.lay"), "latex").text
    assert r"\hyphenpenalty=10000 \exhyphenpenalty=10000" in tex
    assert r"\mbox{$-$38.52} mm" in tex  # the layout table's radius
    assert "p{0.3\\linewidth}" in tex and r"\raggedright" in tex


def test_positions_say_from_where() -> None:
    from layoutlang.reports.text import describe_value

    assert describe_value("front principal point", 11.147, "mm") == \
        "11.147 mm after the first vertex"
    assert describe_value("back principal point", -4.298, "mm") == \
        "-4.298 mm  (4.298 mm before the last vertex)"
    assert describe_value("entrance pupil position", 0.0, "mm") == "0 mm  (at the first vertex)"
    assert describe_value("back focal distance", 95.7, "mm") == \
        "95.7 mm  (back focal point after the last vertex)"
    assert describe_value("front focal distance", -2.0, "mm") == \
        "-2 mm  (front focal point 2 mm after the first vertex)"
    md = render_document(str(ROOT / "examples" / "label_reader_objective.lay"), "md").text
    assert "| front principal point | 1.2719 mm after the first vertex |" in md
