"""The numeric guard (layoutlang/guard.py): numbers entering a script, values leaving a report,
and unexpected exceptions turned into one message with exit status 2."""

from __future__ import annotations

import json
import math

import pytest

from layoutlang import loads
from layoutlang.cli import main
from layoutlang.errors import LayoutError, LayoutSyntaxError, LayoutValueError
from layoutlang.guard import (LARGEST, SMALLEST, admissible, as_arithmetic_error, guarded,
                              json_safe, unexpected_error)
from layoutlang.testing import compare, format_number

GOOD = "start in air\nlens a focal length 50\nstop at a, diameter 10\nobject 200 before, height 1\n"


# --- entry: what numbers a script may hold ------------------------------------------------

@pytest.mark.parametrize("value,words", [
    (math.inf, "too large"), (-math.inf, "too large"), (math.nan, "not defined"),
    (LARGEST * 10, "too large"), (SMALLEST / 10, "too small"), (10**400, "too large"),
])
def test_inadmissible_numbers_say_why(value, words) -> None:
    assert words in admissible(value)


@pytest.mark.parametrize("value", [0, 0.0, 1, -2.5, LARGEST, -SMALLEST, 5.876e-4])
def test_ordinary_numbers_are_admissible(value) -> None:
    assert admissible(value) is None


def test_exact_symbolic_numbers_are_judged_by_their_magnitude() -> None:
    import sympy as sp

    assert "too large" in admissible(sp.exp(1000))
    assert "too small" in admissible(sp.Rational(1, 10**40))
    assert admissible(sp.Symbol("R") * 10**40) is None  # judged at its nominal value


@pytest.mark.parametrize("text,line,column,words", [
    ("let x = 1e400\n", 1, 9, "too large"),
    ("let x = 1e308 * 10\n", 1, 9, "too large"),
    ("let x = 1e-320\n", 1, 9, "too small"),
    ("let x = 10^308\n", 1, 9, "too large"),
    ("let x = exp(709.8)\n", 1, 9, "too large"),
    ("let x = 1" + "0" * 60 + "\n", 1, 9, "more than 40 characters"),
    ("start in air\nsurface a radius -1e309 into air\n", 2, 19, "too large"),
    ("start in air\nlens a focal length 50\nexpect focal length = 50 within 1.7e308%\n",
     3, 33, "too large"),
])
def test_hostile_numbers_are_refused_where_they_are_written(text, line, column, words) -> None:
    with pytest.raises(LayoutValueError) as caught:
        loads(text, "t.lay")
    assert (caught.value.line, caught.value.column) == (line, column)
    assert words in caught.value.message


@pytest.mark.parametrize("text,line,column", [
    ("symbols R positive\nnominal R = 20\nstart in air\nsurface a radius -1e309 into air\n",
     4, 19),
    ("symbols R positive\nnominal R = 1e309\nstart in air\nsurface a radius R into air\n", 2, 13),
    ("symbols R positive\nnominal R = exp(1000)\nstart in air\nsurface a radius R into air\n",
     2, 13),
])
def test_symbolic_scripts_pass_the_same_guard(text, line, column) -> None:
    with pytest.raises(LayoutValueError) as caught:
        loads(text, "t.lay")
    assert (caught.value.line, caught.value.column) == (line, column)
    assert "too large" in caught.value.message


def test_inf_is_not_a_number_word() -> None:
    with pytest.raises(LayoutError) as caught:
        loads("start in air\nsurface a radius -inf mm into air\n", "t.lay")
    assert caught.value.line == 2


@pytest.mark.parametrize("digit", ["\u0665", "\uff15", "\u0967"])  # Arabic-Indic, full-width, Devanagari
def test_only_ascii_digits_make_numbers(digit) -> None:
    with pytest.raises(LayoutSyntaxError) as caught:
        loads(f"start in air\nlens a focal length {digit}0\n", "t.lay")
    assert caught.value.line == 2


# --- exit: nothing that is not finite is printed ----------------------------------------

def test_format_number_says_cannot_be_computed_in_words() -> None:
    for value in (math.nan, math.inf, -math.inf):
        assert format_number(value) == "(cannot be computed)"
    assert format_number(2.5) == "2.5"


def test_a_comparison_with_a_value_that_is_not_finite_fails_in_words() -> None:
    outcome = compare(math.nan, "<", 1.0, unit="mm", quantity="focal length")
    assert not outcome.passed
    assert "cannot be computed" in outcome.message and "nan" not in outcome.message


def test_json_never_holds_nan_or_infinity() -> None:
    from layoutlang.reports.machine import dumps

    data = json.loads(dumps({"rows": [{"value": math.nan, "unit": "mm"}, {"value": 1.0}],
                             "x": math.inf}))
    assert data["rows"][0] == {"value": None, "unit": "mm",
                               "why": "cannot be computed: not a finite number"}
    assert data["rows"][1] == {"value": 1.0} and data["x"] is None
    assert json_safe({"why": "kept", "v": math.nan}) == {"why": "kept", "v": None}


# --- between: arithmetic failures and internal errors ---------------------------------------

def test_arithmetic_failures_become_layout_errors_naming_the_place() -> None:
    @guarded
    def seidel_like(program):
        return 1.0 / 0.0

    class Program:
        file = "t.lay"

    with pytest.raises(LayoutValueError) as caught:
        seidel_like(Program())
    assert "cannot be computed" in str(caught.value) and str(caught.value).startswith("t.lay: ")
    assert as_arithmetic_error(TypeError("x")) is None


def test_python_digit_limit_wording_never_reaches_a_user() -> None:
    try:
        str(10 ** 5000)
    except ValueError as error:
        message = str(as_arithmetic_error(error, "t.lay"))
    assert "too many digits" in message and "set_int_max_str_digits" not in message


def test_an_internal_error_is_one_message_not_a_traceback() -> None:
    message = str(unexpected_error(TypeError("bad operand"), "t.lay", "run"))
    assert message.startswith("error: internal error while running 'run' on t.lay: TypeError")
    assert "please report it" in message


def _crash_on(monkeypatch, name: str) -> None:
    """Make the engine raise an unexpected TypeError for the script called `name`."""
    import layoutlang.checks as checks

    real = checks.evaluate_program

    def evaluate(program):
        if program.file.endswith(name):
            raise TypeError("an engine bug")
        return real(program)

    monkeypatch.setattr(checks, "evaluate_program", evaluate)


def test_check_goes_on_with_the_next_file_after_a_crash(tmp_path, capsys, monkeypatch) -> None:
    for name in ("a.lay", "b.lay", "c.lay"):
        (tmp_path / name).write_text(GOOD + "expect focal length = 50 ± 0.1\n")
    _crash_on(monkeypatch, "b.lay")
    status = main(["check", *(str(tmp_path / n) for n in ("a.lay", "b.lay", "c.lay"))])
    out, err = capsys.readouterr()
    assert status == 2
    assert "a.lay: 1 expectation holds" in out and "c.lay: 1 expectation holds" in out
    assert "internal error while running 'check'" in err and "TypeError" in err
    assert "Traceback" not in err


def test_run_reports_a_crash_as_an_internal_error_with_exit_2(tmp_path, capsys,
                                                              monkeypatch) -> None:
    (tmp_path / "a.lay").write_text(GOOD)
    _crash_on(monkeypatch, "a.lay")
    assert main(["run", str(tmp_path / "a.lay")]) == 2
    assert "internal error" in capsys.readouterr().err


def test_numpy_warnings_never_reach_stderr(tmp_path, capsys, monkeypatch) -> None:
    import warnings

    import numpy as np

    import layoutlang.checks as checks

    real = checks.evaluate_program

    def overflowing(program):
        np.float64(1e308) * np.float64(10)  # RuntimeWarning: overflow encountered
        return real(program)

    monkeypatch.setattr(checks, "evaluate_program", overflowing)
    (tmp_path / "a.lay").write_text(GOOD)
    with warnings.catch_warnings(record=True) as seen:
        warnings.simplefilter("always")
        assert main(["run", str(tmp_path / "a.lay")]) == 0
    assert not [w for w in seen if issubclass(w.category, RuntimeWarning)]
    assert "Warning" not in capsys.readouterr().err


def test_the_session_survives_an_unexpected_exception_and_keeps_the_edits(monkeypatch) -> None:
    from layoutlang.repl import workspace as ws

    space = ws.Workspace()
    space.run("start in air")
    space.run("lens a focal length 50")
    kept = space.statements
    monkeypatch.setattr(ws, "evaluate", lambda *a, **k: (_ for _ in ()).throw(
        ZeroDivisionError("float division by zero")))
    said = space.run("gap 5")
    assert "cannot be computed" in said and space.statements == kept
    monkeypatch.setattr(ws, "evaluate", lambda *a, **k: (_ for _ in ()).throw(KeyError("x")))
    said = space.run("gap 5")
    assert "internal error" in said and space.statements == kept and space.unsaved


def test_a_thousand_term_sum_is_computed_and_formatted(tmp_path, capsys) -> None:
    script = tmp_path / "sum.lay"
    script.write_text("let x = " + " + ".join(["1"] * 1000) + "\nstart in air\n"
                      "lens a focal length x\nexpect focal length = 1000 ± 0.001\n")
    assert main(["check", str(script)]) == 0
    assert main(["format", "--check", str(script)]) == 0
    assert "Traceback" not in capsys.readouterr().err


def test_check_of_a_directory_checks_every_script_below_it(tmp_path, capsys) -> None:
    (tmp_path / "deep" / "er").mkdir(parents=True)
    for name in ("a.lay", "deep/b.lay", "deep/er/c.lay"):
        (tmp_path / name).write_text(GOOD + "expect focal length = 50 ± 0.1\n")
    (tmp_path / "notes.txt").write_text("not a script")
    assert main(["check", str(tmp_path)]) == 0
    out = capsys.readouterr().out
    assert [line.split(":")[0] for line in out.splitlines()] == [
        str(tmp_path / n) for n in ("a.lay", "deep/b.lay", "deep/er/c.lay")]
    assert main(["format", "--check", str(tmp_path)]) == 0
    (tmp_path / "empty").mkdir()
    assert main(["check", str(tmp_path / "empty")]) == 2
    assert "no .lay script below" in capsys.readouterr().err


# --- size limits ----------------------------------------------------------------------------

def test_an_endless_file_is_refused_not_read_forever(capsys) -> None:
    assert main(["check", "/dev/zero"]) == 2
    err = capsys.readouterr().err
    assert "larger than 2,000,000 bytes" in err and "Traceback" not in err


def test_too_many_statements_is_an_error_at_the_first_one_beyond(tmp_path) -> None:
    from layoutlang.guard import MAX_STATEMENTS

    text = "".join(f"let x{i} = {i}\n" for i in range(MAX_STATEMENTS + 1))
    with pytest.raises(LayoutValueError) as caught:
        loads(text, "t.lay")
    assert caught.value.line == MAX_STATEMENTS + 1 and "at most 20,000 statements" in str(
        caught.value)


def test_too_many_surfaces_is_an_error_at_the_first_one_beyond() -> None:
    from layoutlang.guard import MAX_SURFACES

    text = "start in air\n"
    text += "".join(f"lens l{i} focal length 1000\ngap 1\n" for i in range(MAX_SURFACES))
    text += "lens last focal length 1000\n"
    with pytest.raises(LayoutValueError) as caught:
        loads(text, "t.lay")
    assert "at most 5,000 surfaces" in caught.value.message
    assert caught.value.line == 2 + 2 * MAX_SURFACES
