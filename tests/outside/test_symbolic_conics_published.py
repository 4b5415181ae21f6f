"""Seidel sums with symbolic conic constants (`derive spherical sum`, `solve k so that ...`)
against published closed forms.

Sources:
- a paraboloidal mirror (κ = -1) has no spherical aberration for an object at infinity, and a
  mirror's third-order spherical aberration is proportional to (1 + κ): W040 = (1 + κ) y⁴ /
  (4 |R|³) for the object at infinity, i.e. S_I = 8 W040 (D. J. Schroeder 2000, Astronomical
  Optics, 2nd ed., ch. 2 and 5; the factor 8 between S_I and W040 from W. T. Welford 1986,
  Aberrations of Optical Systems, ch. 8);
- the aplanatic two-mirror (Ritchey–Chrétien) conics K1 = -1 - 2(1 + β)/(m²(m - β)),
  K2 = -((m + 1)/(m - 1))² - 2m(m + 1)/((m - β)(m - 1)³), m the secondary's magnification,
  β the back focus behind the primary over the primary's focal length (Schroeder 2000, ch. 6).
"""

from __future__ import annotations

import pytest
import sympy as sp

from layoutlang import loads
from layoutlang.engines.seidel import seidel
from layoutlang.symbolic.derive import derive
from layoutlang.symbolic.solve import solve_request


def _mirror(radius: int, diameter: int) -> str:
    return f"""\
symbols kappa
nominal kappa = 0
object at infinity
start in air
mirror main radius -{radius}, conic constant kappa, clear diameter {diameter}
stop at main, diameter {diameter}
image at focus
solve kappa so that spherical sum = 0
"""


@pytest.mark.parametrize("radius, diameter", [(200, 40), (1000, 150), (90, 30)])
def test_mirror_spherical_sum_is_one_plus_kappa_and_the_paraboloid_is_free(radius, diameter):
    program = loads(_mirror(radius, diameter))
    part = program.symbolic
    (kappa,) = part.symbols
    expr = derive(part, "spherical sum").expr
    y = sp.Rational(diameter, 2)
    expected = 8 * (1 + kappa) * y ** 4 / (4 * sp.Integer(radius) ** 3)
    assert sp.expand(expr - expected) == 0
    # at the nominal κ = 0 the symbolic sum is the numeric engine's (a sphere)
    assert float(expr.subs(kappa, 0)) == pytest.approx(seidel(program.system).total("spherical"))
    (solution,) = [solve_request(part, r) for r in part.solves]
    (root,) = solution.roots
    assert root.exact and root.physical and root.values[kappa] == -1


def _telescope(f1: sp.Rational, m: sp.Rational, beta: sp.Rational) -> str:
    d = f1 * (m - beta) / (m + 1)  # the secondary where its image lands beta f1 behind
    p = f1 - d  # secondary to the primary's focus
    r2 = 2 * m * p / (m - 1)
    return f"""\
symbols k1 k2
nominal k1 = -1, k2 = -3
object at infinity, field angle 0.2 deg
start in air
mirror primary radius -{2 * f1}, conic constant k1, clear diameter {f1 / 2}
gap {sp.nsimplify(d).p} / {sp.nsimplify(d).q}
mirror secondary radius -{r2.p} / {r2.q}, conic constant k2
stop at primary, diameter {f1 / 2}
image at focus
solve k1, k2 so that spherical sum = 0 and coma sum = 0
"""


@pytest.mark.parametrize("f1, m, beta", [(400, 4, sp.Rational(1, 4)),
                                         (1000, 3, sp.Rational(1, 5)),
                                         (600, 5, sp.Rational(1, 3))])
def test_solved_conics_are_schroeders_ritchey_chretien_pair(f1, m, beta) -> None:
    f1, m = sp.Integer(f1), sp.Integer(m)
    part = loads(_telescope(f1, m, beta)).symbolic
    k1, k2 = part.symbols
    (solution,) = [solve_request(part, r) for r in part.solves]
    (root,) = solution.roots
    assert root.physical
    want1 = -1 - 2 * (1 + beta) / (m ** 2 * (m - beta))
    want2 = -((m + 1) / (m - 1)) ** 2 - 2 * m * (m + 1) / ((m - beta) * (m - 1) ** 3)
    assert float(root.values[k1]) == pytest.approx(float(want1), rel=1e-12)
    assert float(root.values[k2]) == pytest.approx(float(want2), rel=1e-12)
