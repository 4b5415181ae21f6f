"""The symbolic statements in scripts: declarations, nominal values, requests and their errors."""

from __future__ import annotations

import subprocess
import sys
import textwrap

import pytest
import sympy as sp

from layoutlang import loads
from layoutlang.checks import check_program
from layoutlang.errors import LayoutError, LayoutNameError, LayoutValueError
from layoutlang.symbolic.program import require_numeric

ONE = """\
symbols n1 n2 R a positive
nominal n1 = 1, n2 = 1.5, R = 20 mm, a = 100
medium outside index n1
medium inside index n2
object a before
start in outside
surface radius R into inside
"""


def test_symbols_become_sympy_symbols_with_assumptions() -> None:
    program = loads(ONE)
    part = program.symbolic
    assert [str(s) for s in part.symbols] == ["n1", "n2", "R", "a"]
    assert all(s.is_positive for s in part.symbols)
    assert part.nominal[part.symbols[1]] == sp.Rational(3, 2)  # 1.5 read exactly
    # the layout itself keeps the symbols; Program.system is the layout at nominal values
    assert part.system.boundaries[0].curvature == 1 / part.symbols[2]
    assert program.system.boundaries[0].curvature == pytest.approx(1 / 20)
    assert program.system.object.distance == pytest.approx(100)


def test_expectations_are_checked_at_nominal_values() -> None:
    # n1/a + n2/s' = (n2 - n1)/R gives s' = 100 mm at these nominal values
    program = loads(ONE + "expect image distance = 100 ± 0.001\n")
    (result,) = check_program(program)
    assert result.passed


def test_expect_sensitivity_is_checked() -> None:
    # differentiating n1/a + n2/s' = (n2 - n1)/R (Hecht, 2017, Optics, 5th ed., eq. 5.8, from
    # memory): ds'/da = -(n1/n2) (s'/a)^2 = -2/3 at a = 100, s' = 100
    program = loads(ONE + "expect sensitivity of image distance to a = -0.6666666667 ± 1e-9\n"
                    "expect sensitivity of image distance to a > 0\n")
    first, second = check_program(program)
    assert first.passed
    assert not second.passed and "-0.666667" in second.outcome.message


def test_numbers_are_exact_in_symbolic_scripts() -> None:
    program = loads("symbols d positive\nnominal d = 2\nmedium g index 1.1\nobject 0.1 before\n"
                    "start in air\nsurface radius 10 into g\ngap d\nsurface flat into air\n")
    assert program.symbolic.system.object.distance == sp.Rational(1, 10)


def test_missing_nominal_values_stop_a_numeric_check_with_a_clear_error() -> None:
    program = loads("symbols R\nobject 100 before\nstart in air\nsurface radius R into air\n")
    with pytest.raises(LayoutValueError) as caught:
        require_numeric(program)
    assert "no nominal value for R" in str(caught.value) and ":1:1:" in str(caught.value)


@pytest.mark.parametrize("text, message", [
    ("derive image distance\n", "'derive' needs symbols"),
    ("symbols R\nnominal Q = 3\n", "'Q' is not a declared symbol"),
    ("symbols R\nnominal R = 3, R = 4\n", "given twice"),
    ("symbols R positive\nnominal R = -3\n", "declared positive"),
    ("symbols R S\nnominal R = S\n", "must be a number"),
    ("symbols R\nsymbols R\n", "already defined"),
    ("let R = 3\nsymbols R\n", "already defined"),
    ("symbols R\nsolve Q so that focal length = 3\n", "not a declared symbol"),
    ("symbols R\nderive focal lenght\n", "unknown quantity"),
    ("symbols R\nsolve R so that axial length = 3\nstart in air\nsurface radius R into air\n",
     None),
])
def test_statement_errors(text: str, message: str | None) -> None:
    if message is None:
        loads(text)
        return
    with pytest.raises(LayoutError) as caught:
        loads(text + "start in air\nsurface radius 5 into air\n")
    assert message in str(caught.value)
    assert "^" in str(caught.value)  # a caret under the offending words


@pytest.mark.parametrize("expression", ["R^100", "(R + 1)^65", "1e500", "10^300 * 10^300"])
def test_inputs_that_would_explode_are_refused(expression: str) -> None:
    with pytest.raises(LayoutValueError) as caught:
        loads(f"symbols R\nlet big = {expression}\n")
    assert "too large" in str(caught.value)


def test_a_numeric_check_does_not_import_sympy(tmp_path) -> None:
    script = tmp_path / "plain.lay"
    script.write_text("object 100 before\nstart in air\nlens focal length 50\n"
                      "expect image distance = 100 ± 0.01\n")
    code = textwrap.dedent(f"""
        import sys
        from layoutlang.cli import main
        status = main(["check", {str(script)!r}])
        assert status == 0, status
        assert "sympy" not in sys.modules, "sympy was imported"
    """)
    result = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True)
    assert result.returncode == 0, result.stderr


def test_unknown_names_in_symbolic_expressions_point_at_them() -> None:
    with pytest.raises(LayoutNameError) as caught:
        loads("symbols R\nobject 100 before\nstart in air\nsurface radius Q into air\n")
    assert ":4:" in str(caught.value)


def test_a_symbol_where_a_comparison_is_needed_is_a_clear_error() -> None:
    # placing the stop needs to know the stop offset is inside the gap
    with pytest.raises(LayoutValueError) as caught:
        loads("symbols s positive\nobject 100 before\nstart in air\n"
              "surface front radius 20 into air\ngap 10\nsurface back radius -20 into air\n"
              "stop s after front, diameter 5\n")
    assert "a symbol stands where a number must be compared" in str(caught.value)


def test_a_negative_gap_at_nominal_names_the_surface_it_follows() -> None:
    with pytest.raises(LayoutValueError) as caught:
        loads("symbols d real\nnominal d = -2\nstart in air\nsurface front radius 10 into air\n"
              "gap d\nsurface back flat into air\n")
    assert "the gap after 'front' is negative" in caught.value.message
