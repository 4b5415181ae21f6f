"""The session's before → after numbers against published formulas and a reference library.

An edit in the session must give the same numbers as the formula for the edited layout: the
thick-lens lensmaker's equation (checked through sympy.physics.optics, a general-purpose
reference library) and the single-surface refraction equation.
"""

from __future__ import annotations

import pytest

from layoutlang.repl.workspace import Workspace
from layoutlang.syntax.parser import parse

LENS = """\
medium glass index 1.5
object at infinity
start in air
surface front radius 10 into glass
gap 2
surface back radius -10 into air
"""


@pytest.mark.parametrize("radius", [12, 20, 50, -40])
def test_changing_a_radius_gives_the_lensmakers_focal_length(radius: float) -> None:
    # Lensmaker's equation for a thick lens in air, 1/f = (n - 1)(1/R1 - 1/R2 + (n - 1) d /
    # (n R1 R2)) (Hecht, 2017, Optics, 5th ed., section 6.2, from memory), here evaluated by
    # sympy.physics.optics.lens_makers_formula(n_lens, n_surr, r1, r2, d).
    from sympy.physics.optics import lens_makers_formula

    workspace = Workspace(parse(LENS).statements)
    before = float(lens_makers_formula(1.5, 1, 10, -10, 2))
    assert workspace.snapshot.results["focal length"] == pytest.approx(before, rel=1e-12)
    out = workspace.run(f"change front radius to {radius}")
    after = float(lens_makers_formula(1.5, 1, radius, -10, 2))
    assert workspace.snapshot.results["focal length"] == pytest.approx(after, rel=1e-12)
    # the before → after line shows both values, as the report prints them
    line = next(x for x in out.splitlines() if x.strip().startswith("focal length"))
    assert f"{before:.6g} mm" in line and f"{after:.6g} mm" in line


def test_moving_the_object_moves_the_image_as_the_single_surface_equation_says() -> None:
    # n1/s + n2/s' = (n2 - n1)/R, refraction at one spherical surface in the paraxial
    # approximation (Hecht, 2017, Optics, 5th ed., eq. 5.8, from memory).
    workspace = Workspace(parse("units cm\nmedium glass index 1.5\nobject 20 before\n"
                                "start in air\nsurface rod_end radius 5 into glass\n").statements)
    assert workspace.snapshot.results["image distance"] == pytest.approx(30.0, rel=1e-12)
    for s in (15, 40, 100):
        workspace.run(f"change object distance to {s}")
        expected = 1.5 / ((1.5 - 1.0) / 5 - 1.0 / s)
        assert workspace.snapshot.results["image distance"] == pytest.approx(expected, rel=1e-12)
    workspace.run("undo")
    workspace.run("undo")
    workspace.run("undo")
    assert workspace.snapshot.results["image distance"] == pytest.approx(30.0, rel=1e-12)


def test_derive_and_solve_in_the_session_follow_the_single_surface_equation() -> None:
    # n1/s + n2/s' = (n2 - n1)/R (Hecht, 2017, Optics, 5th ed., eq. 5.8, from memory) with
    # n1 = 1, n2 = 1.5, s = 100: s' = 150 R / (50 - R); s' = 40 needs R = 200/19.
    workspace = Workspace()
    for line in ("symbols R positive", "nominal R = 20", "medium glass index 1.5",
                 "object 100 before", "start in air", "surface front radius R into glass"):
        assert "error" not in workspace.run(line)
    kept = workspace.statements
    derived = workspace.run("derive image distance")
    assert "150*R/(50 - R)" in derived and "100 mm" in derived
    solved = workspace.run("solve R so that image distance = 40")
    assert "R = 200/19" in solved
    assert workspace.statements == kept  # questions are answered, not kept
