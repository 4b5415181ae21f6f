"""The pytest plugin: one item per expectation, failures that show the line and both values,
syntax errors as failing items, opt-in folder collection, JUnit XML and pytest-xdist."""

from __future__ import annotations

import subprocess
import sys
import xml.etree.ElementTree as ET

import pytest

pytest_plugins = ["pytester"]

# A single thin lens, 1/s + 1/s' = 1/f (Hecht 2017, Optics, 5th ed., eq. 5.17; number from
# memory): f = 50 and an
# object 150 before give s' = 75 and magnification -s'/s = -0.5.
GOOD = """\
layout "one thin lens"
object 150 before, height 2
start in air
lens thin focal length 50
stop at thin, diameter 10
image at focus
expect image distance = 75 ± 0.001
expect magnification = -0.5 within 0.1%
"""

# The same lens with one wrong expectation (line 8).
BAD = GOOD.replace("expect magnification = -0.5 within 0.1%", "expect magnification = -0.4 ± 0.01")

BROKEN = "layout \"oops\"\nsurface radius into glass\n"


def test_one_item_per_expectation_named_after_line_and_quantity(pytester: pytest.Pytester) -> None:
    pytester.makefile(".lay", lens=GOOD)
    result = pytester.runpytest("lens.lay", "-v")
    result.assert_outcomes(passed=2)
    result.stdout.fnmatch_lines(["*lens.lay::line7?image distance? PASSED*",
                                 "*lens.lay::line8?magnification? PASSED*"])


def test_failure_shows_line_expected_actual_tolerance(pytester: pytest.Pytester) -> None:
    pytester.makefile(".lay", lens=BAD)
    result = pytester.runpytest("lens.lay")
    result.assert_outcomes(passed=1, failed=1)
    result.stdout.fnmatch_lines([
        "*lens.lay:8:1: expectation does not hold",
        "*expect magnification = -0.4 ± 0.01",
        "*magnification = -0.5, expected -0.4 ± 0.01; off by -0.1*",
    ])
    assert "Traceback" not in result.stdout.str()


def test_syntax_error_is_a_failing_item_and_the_session_goes_on(pytester: pytest.Pytester) -> None:
    pytester.makefile(".lay", broken=BROKEN, lens=GOOD)
    result = pytester.runpytest("--layoutlang")
    result.assert_outcomes(passed=2, failed=1)
    result.stdout.fnmatch_lines(["*broken.lay:2:*error*", "*surface radius into glass*",
                                 "*^^^^*"])
    assert result.ret == 1  # tests failed; not 2 (interrupted) or 3 (internal error)


def test_folders_are_opt_in(pytester: pytest.Pytester) -> None:
    pytester.makefile(".lay", lens=GOOD, broken=BROKEN)
    pytester.makepyfile(test_plain="def test_ok():\n    assert True\n")
    result = pytester.runpytest()
    result.assert_outcomes(passed=1)  # only the Python test: .lay files are left alone
    result = pytester.runpytest("--layoutlang")
    result.assert_outcomes(passed=3, failed=1)


def test_ini_pattern_turns_collection_on_and_selects_files(pytester: pytest.Pytester) -> None:
    pytester.makeini("[pytest]\nlayoutlang_files = *.layout\n")
    pytester.makefile(".layout", lens=GOOD)
    pytester.makefile(".lay", broken=BROKEN)  # not matched by the pattern
    result = pytester.runpytest()
    result.assert_outcomes(passed=2)


def test_junit_xml_has_one_case_per_expectation(pytester: pytest.Pytester) -> None:
    pytester.makefile(".lay", lens=BAD)
    result = pytester.runpytest("lens.lay", "--junitxml=out.xml")
    result.assert_outcomes(passed=1, failed=1)
    root = ET.parse(pytester.path / "out.xml").getroot()
    cases = root.findall(".//testcase")
    assert [c.get("name") for c in cases] == ["line7[image distance]", "line8[magnification]"]
    failure = cases[1].find("failure")
    assert failure is not None and "expected -0.4 ± 0.01" in failure.get("message", "") + (
        failure.text or "")


def test_xdist_loadfile(pytester: pytest.Pytester) -> None:
    pytest.importorskip("xdist")
    pytester.makefile(".lay", one=GOOD, two=BAD, three=BROKEN)
    result = pytester.runpytest_subprocess("--layoutlang", "-n", "2", "--dist", "loadfile",
                                           "-p", "no:cacheprovider")
    result.assert_outcomes(passed=3, failed=2)


def test_importing_the_plugin_is_cheap() -> None:
    # The plugin loads in every pytest run: importing it must not pull in the parser,
    # numpy or sympy (they load when a script is collected).
    code = ("import sys, layoutlang.pytest_plugin; print(sorted(m for m in "
            "('lark', 'numpy', 'sympy', 'matplotlib') if m in sys.modules))")
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True)
    assert out.stdout.strip() == "[]"


def test_symbolic_script_without_nominal_values_is_one_failing_item(
        pytester: pytest.Pytester) -> None:
    pytester.makefile(".lay", sym="""symbols R positive
medium glass index 1.5
object 100 before
start in air
surface front radius R into glass
image at focus
expect image distance > 0
""")
    result = pytester.runpytest("sym.lay")
    result.assert_outcomes(failed=1)
    result.stdout.fnmatch_lines(["*no nominal value for R*"])
