"""The differences `compare` reports against published thick-lens formulas.

Hecht, 2017, Optics, 5th ed., section 6.1 (thick lenses), the lensmaker's equation for a lens
of index n in air, 1/f = (n - 1)[1/R1 - 1/R2 + (n - 1) d / (n R1 R2)], and the back principal
plane h2 = -f (n - 1) d / (n R1) from the last vertex, so the back focal distance is f + h2
(equation and section numbers quoted from memory; editions renumber).
"""

from __future__ import annotations

import pytest

from layoutlang.review.engine import review
from layoutlang.review.revisions import Side

SINGLET = """\
units mm
medium glass index {n}
object at infinity, field angle 1 deg
start in air
surface first radius {r1} into glass
gap {d}
surface second radius {r2} into air
stop at first, diameter 10
"""


def thick_lens(n: float, r1: float, r2: float, d: float) -> tuple[float, float]:
    """(focal length, back focal distance) from Hecht's thick-lens formulas."""
    f = 1 / ((n - 1) * (1 / r1 - 1 / r2 + (n - 1) * d / (n * r1 * r2)))
    return f, f - f * (n - 1) * d / (n * r1)


@pytest.mark.parametrize("old, new", [
    ({"n": 1.5, "r1": 50, "r2": -50, "d": 5}, {"n": 1.5, "r1": 60, "r2": -50, "d": 5}),
    ({"n": 1.5, "r1": 50, "r2": -50, "d": 5}, {"n": 1.5, "r1": 50, "r2": -50, "d": 8}),
    ({"n": 1.5, "r1": 50, "r2": -50, "d": 5}, {"n": 1.6, "r1": 50, "r2": -50, "d": 5}),
])
def test_focal_length_and_back_focus_differences_match_the_thick_lens_formulas(
        tmp_path, old, new) -> None:
    before = Side("old.lay", SINGLET.format(**old), tmp_path).snapshot()
    after = Side("new.lay", SINGLET.format(**new), tmp_path).snapshot()
    found = {c.label: c for c in review(before, after).quantities}
    f0, b0 = thick_lens(**old)
    f1, b1 = thick_lens(**new)
    assert found["focal length"].difference == pytest.approx(f1 - f0, rel=1e-9)
    assert found["back focal distance"].difference == pytest.approx(b1 - b0, rel=1e-9)
    assert found["focal length"].unit == "mm"
