"""The public Python API in layoutlang/__init__.py mirrors the language: load a script, get its
System, evaluate quantities, check expectations, derive closed forms, format, draw, report."""

from __future__ import annotations

import subprocess
import sys
from pathlib import Path

import pytest

import layoutlang
from layoutlang.errors import LayoutValueError

# One refracting boundary, n1/s + n2/s' = (n2 - n1)/R (Hecht 2017, Optics, 5th ed., eq. 5.8;
# number from memory):
# n1 = 1, n2 = 1.5, R = 20, s = 100 → s' = 100.
BOUNDARY = """symbols n1 n2 R a positive
nominal n1 = 1, n2 = 1.5, R = 20, a = 100
medium outside index n1
medium inside index n2
object a before, height 1
start in outside
surface front radius R into inside
image at focus
expect image distance = 100 ± 0.001
"""


def test_load_evaluate_check(tmp_path: Path) -> None:
    path = tmp_path / "b.lay"
    path.write_text(BOUNDARY, encoding="utf-8")
    program = layoutlang.load(path)
    assert program.system.boundaries[0].name == "front"
    assert layoutlang.evaluate(program)["image distance"] == pytest.approx(100)
    assert layoutlang.evaluate(program.system)["image distance"] == pytest.approx(100)
    assert [r.passed for r in layoutlang.check(program)] == [True]


def test_derive_gives_the_single_surface_formula() -> None:
    pytest.importorskip("sympy")
    program = layoutlang.loads(BOUNDARY)
    if getattr(program, "symbolic", None) is None:
        pytest.skip("no symbolic engine in this tree")
    import sympy

    n1, n2, R, a = sympy.symbols("n1 n2 R a", positive=True)
    expr = layoutlang.derive(program, "image distance")
    # solve n1/a + n2/s' = (n2 - n1)/R for s' (Hecht 2017, eq. 5.8; number from memory)
    expected = n2 / ((n2 - n1) / R - n1 / a)
    free = {s.name: s for s in expr.free_symbols}
    expr = expr.subs({free[k]: v for k, v in zip(("n1", "n2", "R", "a"), (n1, n2, R, a))})
    assert sympy.simplify(expr - expected) == 0


def test_derive_needs_symbols() -> None:
    with pytest.raises(LayoutValueError, match="declares symbols"):
        layoutlang.derive(layoutlang.loads("start in air\nsurface radius 10 into air\n"),
                          "focal length")


def test_importing_layoutlang_is_cheap() -> None:
    code = ("import sys, layoutlang; print(sorted(m for m in ('lark', 'numpy', 'sympy', "
            "'matplotlib') if m in sys.modules))")
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True,
                         check=True)
    assert out.stdout.strip() == "[]"


def test_results_behave_as_a_read_only_mapping() -> None:
    results = layoutlang.evaluate(layoutlang.loads(BOUNDARY))
    assert "image distance" in results and "efl" in results  # names and aliases
    assert "no such quantity" not in results and 3 not in results
    names = list(results)
    assert names == list(results.keys()) and len(results) == len(names) > 10
    assert "image distance" in names and "efl" not in names  # iteration gives canonical names
    plain = dict(results)
    assert plain["image distance"] == pytest.approx(100)
    assert dict(results.items()) == plain and list(results.values()) == list(plain.values())
    assert results.get("efl") == results["effective focal length"]
    assert results.get("nothing", "absent") == "absent"
    with pytest.raises(KeyError):
        results["nothing"]


def test_rows_is_a_property_and_there_are_no_stray_public_names() -> None:
    results = layoutlang.evaluate(layoutlang.loads(BOUNDARY))
    assert ("image height", "-0.666667 mm") in results.rows
    fresh = subprocess.run([sys.executable, "-c", "import layoutlang; print(sorted(n for n in "
                            "dir(layoutlang) if not n.startswith('_')))"],
                           capture_output=True, text=True, check=True).stdout
    assert eval(fresh) == sorted(n for n in layoutlang.__all__ if not n.startswith("_"))
