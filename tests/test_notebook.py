"""Notebook display: a Program shows its report as HTML, evaluate() results a table with units
(HTML) and aligned equations (LaTeX), and they still index by quantity name."""

from __future__ import annotations

import pytest

import layoutlang
from layoutlang.engines.firstorder import FirstOrder

# f = 50, s = 150 → s' = 75 (Hecht 2017, Optics, 5th ed., eq. 5.17; number from memory).
SCRIPT = """layout "Relay"
object 150 before, height 2
start in air
lens relay focal length 50
stop at relay, diameter 10
image at focus
expect image distance = 75 ± 0.01
"""


def test_first_order_results_display_with_units() -> None:
    results = layoutlang.evaluate(layoutlang.loads(SCRIPT))
    assert isinstance(results, FirstOrder)
    assert results["image distance"] == pytest.approx(75)
    html = results._repr_html_()
    assert "<td>image distance</td><td>75 mm  (real image, downstream)</td>" in html
    latex = results._repr_latex_()
    assert latex.startswith(r"$\begin{aligned}")
    assert r"\text{image distance} &= 75\ \mathrm{mm}" in latex


def test_program_shows_its_report() -> None:
    pytest.importorskip("matplotlib")
    from layoutlang.notebook import program_html

    html = program_html(layoutlang.loads(SCRIPT))
    assert "<h1>Relay</h1>" in html and "<svg" in html and "holds" in html


class _Formatter:
    def __init__(self) -> None:
        self.shown = {}

    def for_type(self, kind, function) -> None:
        self.shown[kind] = function


class _Shell:
    def __init__(self) -> None:
        self.display_formatter = type("DisplayFormatter", (), {})()
        self.display_formatter.formatters = {"text/html": _Formatter()}


def test_the_notebook_front_end_registers_how_a_program_shows() -> None:
    from layoutlang.interpret.interpreter import Program
    from layoutlang.notebook import load_ipython_extension, program_html, register

    assert not hasattr(Program, "_repr_html_")  # the interpreter renders nothing
    shell = _Shell()
    load_ipython_extension(shell)
    assert shell.display_formatter.formatters["text/html"].shown[Program] is program_html
    assert register(object()) is False  # a shell without an HTML formatter


def test_interpreting_does_not_import_the_notebook_renderer() -> None:
    import subprocess
    import sys

    code = ("import sys, layoutlang; layoutlang.loads('start in air\\nlens a focal length 5\\n');"
            "print('layoutlang.notebook' in sys.modules, 'layoutlang.reports.document' in "
            "sys.modules)")
    done = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True)
    assert done.stdout.split() == ["False", "False"], done.stderr


def test_api_format_and_report(tmp_path) -> None:
    assert layoutlang.format_script("gap  5") == "gap 5\n"
    path = tmp_path / "relay.lay"
    path.write_text(SCRIPT, encoding="utf-8")
    assert layoutlang.report(path, "md", tmp_path / "r.md").startswith("# Relay")
