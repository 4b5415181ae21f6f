"""`solve`: exact and numeric roots, each judged physical, and 'no solution' in words."""

from __future__ import annotations

import sympy as sp

from layoutlang import loads
from layoutlang.engines.firstorder import first_order
from layoutlang.symbolic.solve import solve_request

ONE = """\
symbols n1 n2 R a positive
nominal n1 = 1, n2 = 1.5, R = 20, a = 100
medium outside index n1
medium inside index n2
object a before
start in outside
surface radius R into inside
"""


def _solve(text: str):
    program = loads(text)
    part = program.symbolic
    return part, [solve_request(part, r) for r in part.solves]


def test_radius_for_an_image_distance_is_exact_and_physical() -> None:
    # n1/a + n2/s' = (n2 - n1)/R with s' = 40: R = 0.5/(0.01 + 1.5/40) = 200/19
    # (Hecht, 2017, Optics, 5th ed., eq. 5.8, from memory)
    part, (solution,) = _solve(ONE + "solve R so that image distance = 40\n")
    (root,) = solution.roots
    assert root.exact and root.physical
    assert root.values[part.symbols[2]] == sp.Rational(200, 19)
    n1, n2, R, a = part.symbols
    (general,) = solution.general
    assert sp.cancel(general[R] - 40 * a * (n2 - n1) / (a * n2 + 40 * n1)) == 0


def test_root_against_a_declared_assumption_is_not_physical() -> None:
    # a virtual image 10 mm before the surface needs R < 0 here, but R was declared positive
    part, (solution,) = _solve(ONE + "solve R so that image distance = -10\n")
    (root,) = solution.roots
    assert root.physical is False and "positive" in root.why


def test_no_solution_is_a_message() -> None:
    # a flat-to-flat window has no power: no gap gives it a focal length
    text = ("symbols d positive\nnominal d = 5\nmedium g index 1.5\nobject at infinity\n"
            "start in air\nsurface flat into g\ngap d\nsurface flat into air\n"
            "solve d so that back focal distance = 40\n")
    part, (solution,) = _solve(text)
    assert not solution.roots
    assert solution.message.startswith("no solution")


def test_two_radii_for_focal_length_and_back_focal_distance() -> None:
    text = ("symbols R1 R2 real\nnominal R1 = 50, R2 = -50\nmedium g index 1.5\n"
            "object at infinity\nstart in air\nsurface radius R1 into g\ngap 6\n"
            "surface radius R2 into air\n"
            "solve R1, R2 so that focal length = 60 and back focal distance = 57\n")
    part, (solution,) = _solve(text)
    physical = [r for r in solution.roots if r.physical]
    assert physical
    # the layout at the root has the required numbers (numeric engine, firstorder.py)
    values = {s: float(v) for s, v in physical[0].values.items()}
    check = loads(text.replace("nominal R1 = 50, R2 = -50",
                               f"nominal R1 = {values[part.symbols[0]]!r}, "
                               f"R2 = {values[part.symbols[1]]!r}"))
    results = first_order(check.system)
    assert abs(results["focal length"] - 60) < 1e-6
    assert abs(results["back focal distance"] - 57) < 1e-6


def test_quadratic_gives_two_roots_judged_separately() -> None:
    # two thin lenses f1 = f2 = f: 1/F = 2/f - d/f^2 (Hecht, 2017, Optics, 5th ed., eq. 6.8,
    # from memory); asking F = 40 with d = 10 gives f^2 - 80 f + 400 = 0
    text = ("symbols f real\nnominal f = 50\nobject at infinity\nstart in air\n"
            "lens focal length f\ngap 10\nlens focal length f\n"
            "solve f so that effective focal length = 40\n")
    part, (solution,) = _solve(text)
    roots = sorted(float(r.values[part.symbols[0]]) for r in solution.roots)
    assert len(roots) == 2
    assert abs(roots[0] - (40 - 20 * 3 ** 0.5)) < 1e-9 and abs(roots[1] - (40 + 20 * 3 ** 0.5)) < 1e-9


def test_without_nominal_values_roots_stay_general() -> None:
    text = ONE.replace("nominal n1 = 1, n2 = 1.5, R = 20, a = 100\n", "")
    part, (solution,) = _solve(text + "solve R so that image distance = 40\n")
    assert solution.general and all(r.physical is None for r in solution.roots)


def test_fewer_conditions_than_unknowns_gives_a_family_not_a_crash() -> None:
    # n1/a + n2/s' = (n2 - n1)/R with n1 = 1, n2 = 1.5, s' = 40: R = 40 a / (3 a + 80)
    # (Hecht, 2017, Optics, 5th ed., eq. 5.8, from memory)
    _, (solution,) = _solve(ONE + "solve R, a so that image distance = 40\n")
    (root,) = solution.roots
    R, a = sp.symbols("R a", positive=True)
    assert sp.simplify(root.values[R] - 40 * a / (3 * a + 80)) == 0
    assert root.physical is None and "each value of a" in root.why


def test_the_design_notes_script_without_nominal_values_derives_and_solves() -> None:
    # The one-boundary script of the design notes: no nominal values, so roots stay formulas.
    from layoutlang.symbolic import render

    text = ONE.replace("nominal n1 = 1, n2 = 1.5, R = 20, a = 100\n", "") + (
        "derive image distance\nderive conjugate equation\n"
        "solve R so that image distance = 40\n")
    outcome = render.carry_out(loads(text))
    for write in (render.text, render.latex, render.markdown, render.json_text,
                  render.python_code):
        assert write(outcome).strip()
    assert "n1/a + n2/s' = (n2 - n1)/R" in render.text(outcome)
