"""Fuzz tests: no input may crash layoutlang with anything but a LayoutError, and nothing a
report prints may be NaN or infinite.

Three sources of input: arbitrary text; grammar-shaped text generated from the grammar itself
(hypothesis.extra.lark, with keyword, name and number strategies so tokens are separated);
and whole layouts assembled from valid statements with random numbers, which reach deep into
the interpreter and the engine.
"""

from __future__ import annotations

import json
import re

from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st
from hypothesis.extra.lark import from_lark
from lark import Lark

from layoutlang import loads
from layoutlang.checks import check_program
from layoutlang.engines.firstorder import first_order
from layoutlang.errors import LayoutError
from layoutlang.reports.machine import dumps, program_json
from layoutlang.reports.text import full_report
from layoutlang.syntax.parser import grammar_text, parse, parser

FAST = settings(max_examples=200, deadline=None,
                suppress_health_check=[HealthCheck.too_slow, HealthCheck.filter_too_much])

NOT_FINITE = re.compile(r"\b(nan|inf)\b", re.IGNORECASE)


def evaluate_everything(text: str) -> None:
    """Parse, interpret, evaluate, check and render; only LayoutError may escape."""
    try:
        program = loads(text, "fuzz.lay")
        if getattr(program, "symbolic", None) is not None:  # as the command line does
            from layoutlang.symbolic.program import require_numeric

            require_numeric(program)
    except LayoutError as error:
        str(error)  # the message itself must render
        return
    results = first_order(program.system)
    checked = check_program(program, results)
    report = full_report(program, results, checked)
    assert not NOT_FINITE.search(report), report
    # allow_nan=False in dumps raises ValueError on NaN/inf, which this test would report
    json.loads(dumps(program_json(program, results, checked)))


@FAST
@given(st.text(max_size=200))
def test_arbitrary_text_only_raises_layout_errors(text: str) -> None:
    try:
        parse(text)
    except LayoutError as error:
        assert error.line is not None and str(error)


@FAST
@given(st.lists(st.sampled_from(
    ["surface", "mirror", "lens", "gap", "stop", "at", "before", "after", "radius", "into",
     "air", "glass", "5", "-3", "0", "1e308", ",", "diameter", "expect", "=", "±", "within",
     "%", "mm", "deg", "(", ")", "*", "/", "^", "start in", "\n", "object", "infinity",
     "field angle", "image", "focus", "let", "x", "medium", "index", "use", '"x.lay"', "#"]),
    max_size=30).map(" ".join))
def test_keyword_soup_only_raises_layout_errors(text: str) -> None:
    evaluate_everything(text)


# --- grammar-shaped text ------------------------------------------------------------------


def _explicit() -> dict:
    """Strategies for every terminal, with spaces around words so tokens stay apart."""
    found = {}
    for terminal in parser().terminals:
        pattern = terminal.pattern
        if pattern.type == "str":
            found[terminal.name] = st.just(f" {pattern.value} ")
    found.update({
        "NAME": st.sampled_from([" front ", " back ", " crown ", " air ", " x ", " f ",
                                 " focal ", " length ", " number ", " magnification "]),
        "NUMBER": st.sampled_from([" 0 ", " 1 ", " 2.5 ", " 50 ", " 1e3 ", " .5 ", " 1e-300 ",
                                   " 1e300 ", " 3 "]),
        "UNIT": st.sampled_from([" mm ", " nm ", " deg ", " rad ", " diopters ", " % ", " in "]),
        "STRING": st.sampled_from([' "a" ', ' "no_such_file.lay" ', ' "" ']),
        "_NL": st.just("\n"),
        "MINUS": st.just(" - "), "PLUS": st.just(" + "), "TIMES": st.just(" * "),
        "DIVIDE": st.just(" / "), "CARET": st.just(" ^ "),
        "PLUS_MINUS": st.sampled_from([" ± ", " +/- "]),
        "REFERENCE": st.sampled_from([" air ", " vacuum "]),
    })
    return found


# a fresh, uncached Lark: the shared parser is loaded from lark's cache without its grammar
_GRAMMAR_TEXT = from_lark(Lark(grammar_text(), parser="lalr"), start="start",
                          explicit=_explicit())


# half of the programs follow a valid start, so their statements meet a layout that exists
_PREFIX = "start in air\nlens front focal length 50\ngap 5\nlens back focal length 80\n"


@FAST
@given(st.one_of(_GRAMMAR_TEXT, _GRAMMAR_TEXT.map(lambda text: _PREFIX + text)))
def test_grammar_shaped_text_only_raises_layout_errors(text: str) -> None:
    evaluate_everything(text)


# --- whole layouts with random numbers ---------------------------------------------------------

# mostly ordinary values, sometimes extreme ones (zero, tiny, huge, negative)
extreme = st.sampled_from(["0", "1", "-1", "1e-300", "1e300", "1e-12", "0.0001", "1e12"])
positive = st.one_of(st.floats(0.01, 500).map(lambda v: f"{v:.6g}"), extreme)
numbers = st.one_of(st.floats(-500, 500).map(lambda v: f"{v:.6g}"), extreme)


@st.composite
def layouts(draw) -> str:
    lines = [draw(st.sampled_from(["", "units cm", "units in"])),
             "medium glass index " + draw(st.sampled_from(["1.5", "1.8", "0.5", "1"])),
             draw(st.sampled_from(["object at infinity", "object at infinity, field angle "
                                   + draw(st.floats(-60, 60).map(lambda v: f"{v:.4g}")) + " deg",
                                   f"object {draw(numbers)} before, height {draw(numbers)}"])),
             "start in air"]
    count = draw(st.integers(1, 5))
    for i in range(count):
        kind = draw(st.sampled_from(["surface", "mirror", "lens", "flat"]))
        if kind == "surface":
            lines.append(f"surface s{i} radius {draw(numbers)} into "
                         + draw(st.sampled_from(["glass", "air"])))
        elif kind == "mirror":
            lines.append(f"mirror s{i} radius {draw(numbers)}")
        elif kind == "lens":
            lines.append(f"lens s{i} focal length {draw(numbers)}")
        else:
            lines.append(f"surface s{i} flat into " + draw(st.sampled_from(["glass", "air"])))
        if i < count - 1:
            lines.append(f"gap {draw(positive)}")
    anchor = f"s{draw(st.integers(0, count - 1))}"
    lines.append(draw(st.sampled_from([
        "", f"stop at {anchor}, diameter {draw(positive)}",
        f"stop {draw(positive)} before {anchor}, f-number {draw(positive)}",
        f"stop {draw(positive)} after {anchor}, numerical aperture "
        + draw(st.floats(0.001, 0.99).map(lambda v: f"{v:.3g}")),
    ])))
    lines.append(draw(st.sampled_from(["image at focus", f"image {draw(positive)} after", ""])))
    lines.append(draw(st.sampled_from([
        "expect focal length = 50 ± 1", "expect f-number < 4", "expect image distance > 0",
        "expect magnification = -1 within 5%", "expect lagrange invariant >= 0", ""])))
    return "\n".join(lines) + "\n"


@FAST
@given(layouts())
def test_random_layouts_never_report_nan_or_infinity(text: str) -> None:
    evaluate_everything(text)
