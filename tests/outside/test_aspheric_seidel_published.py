"""Third-order sums of conic and aspheric surfaces against published closed forms.

Sources:
- the aspheric surface terms δS_I..V = 8 b Δn (y⁴, y³ȳ, y²ȳ², 0, yȳ³), b the r⁴ deformation
  beyond the vertex sphere (W. T. Welford 1986, Aberrations of Optical Systems, ch. 8);
- transverse ray aberration at the paraxial focus from S_I: δη' = S_I / (2 n' u') at third
  order (Welford 1986, ch. 8 — the relation of the sums to ray aberrations);
- two-mirror telescopes: with m the secondary's magnification and β the back focal distance
  behind the primary over the primary focal length, the aplanatic (Ritchey–Chrétien) conics
  K1 = -1 - 2(1 + β)/(m²(m - β)), K2 = -((m + 1)/(m - 1))² - 2m(m + 1)/((m - β)(m - 1)³), and
  the classical Cassegrain K1 = -1, K2 = -((m + 1)/(m - 1))² (D. J. Schroeder 2000,
  Astronomical Optics, 2nd ed., ch. 6);
- a paraboloidal mirror has no spherical aberration for an object at infinity (Schroeder 2000,
  ch. 2).
"""

from __future__ import annotations

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from layoutlang import loads
from layoutlang.engines import realrays
from layoutlang.engines.firstorder import first_order
from layoutlang.engines.seidel import seidel


def _telescope(m: float, beta: float, k1: float, k2: float, f1: float = 1000.0) -> str:
    k = (1 + beta) / (1 + m)  # ray height at the secondary over that at the primary
    gap = f1 * (1 - k)
    secondary = 2 * k * f1 * m / (m - 1)  # convex: its centre lies beyond it, along -z
    return (f"units mm\nobject at infinity, field angle 0.2 deg\nstart in air\n"
            f"mirror primary radius {-2 * f1!r}, conic constant {k1!r}\ngap {gap!r}\n"
            f"mirror secondary radius {-secondary!r}, conic constant {k2!r}\n"
            f"gap {gap + beta * f1!r}\nsurface focus flat\nstop at primary, diameter 400\n")


def _sums(text: str):
    system = loads(text).system
    results = first_order(system)
    return system, results, seidel(system, results)


@pytest.mark.parametrize("m, beta", [(4.0, 0.25), (3.0, 0.1), (8.0, 0.4)])
def test_a_ritchey_chretien_pair_from_schroeders_closed_forms_is_aplanatic(m, beta):
    k1 = -1 - 2 * (1 + beta) / (m * m * (m - beta))
    k2 = -((m + 1) / (m - 1)) ** 2 - 2 * m * (m + 1) / ((m - beta) * (m - 1) ** 3)
    system, results, sums = _sums(_telescope(m, beta, k1, k2))
    assert float(results["focal length"]) == pytest.approx(m * 1000.0, rel=1e-12)
    scale = abs(sums.surfaces[0].spherical)  # one mirror's share, for a scale
    assert abs(sums.total("spherical")) < 1e-12 * scale
    assert abs(sums.total("coma")) < 1e-12 * abs(sums.surfaces[0].coma)
    assert abs(sums.total("astigmatism")) > 0  # an aplanat is not an anastigmat


def test_a_classical_cassegrain_corrects_spherical_aberration_but_not_coma():
    m, beta = 4.0, 0.25
    _, _, sums = _sums(_telescope(m, beta, -1.0, -((m + 1) / (m - 1)) ** 2))
    _, _, spheres = _sums(_telescope(m, beta, 0.0, 0.0))
    # each mirror is corrected by itself: compare with the spherical pair's primary
    assert abs(sums.total("spherical")) < 1e-12 * abs(spheres.surfaces[0].spherical)
    assert abs(sums.total("coma")) > 1e-6


def test_a_paraboloid_has_no_third_order_spherical_aberration_and_a_sphere_has():
    text = ("units mm\nobject at infinity\nstart in air\nmirror m radius -400{}\ngap 200\n"
            "surface focus flat\nstop at m, diameter 100\n")
    _, _, parabola = _sums(text.format(", conic constant -1"))
    _, _, sphere = _sums(text.format(""))
    assert abs(parabola.total("spherical")) < 1e-15
    # the sphere's S I = -2 c³ y⁴ (from Welford's A² y Δ(u/n) for a mirror at infinity)
    assert sphere.total("spherical") == pytest.approx(-2 * (-1 / 400) ** 3 * 50 ** 4, rel=1e-12)


def _transverse(kappa: float, a4: float, height: float):
    text = (f"units mm\nobject at infinity\nmedium glass index 1.6\nstart in air\n"
            f"surface front radius 50 into glass, conic constant {kappa!r}, "
            f"r4 coefficient {a4!r}\ngap 5\nsurface back flat into air\n"
            f"stop at front, diameter {2 * height!r}\n")
    system = loads(text).system
    results = first_order(system)
    geo = realrays.geometry(system)
    rays = realrays.trace(realrays.Rays.start(0.0, [height], -1.0, 0.0, 0.0, 1.0), geo,
                          system.indices())
    focus = geo.vertex_z[-1] + float(results["image distance"])
    y = rays.y[0] + (focus - rays.z[0]) * rays.ky[0] / rays.kz[0]
    slope = -height / float(results["focal length"])  # paraxial marginal angle, in air
    return y, seidel(system, results).total("spherical"), slope


@settings(max_examples=25, deadline=None)
@given(kappa=st.floats(-3.0, 2.0).filter(lambda k: k == 0 or abs(k) > 1e-6),
       a4=st.one_of(st.just(0.0), st.floats(1e-9, 2e-5), st.floats(-2e-5, -1e-9)))
def test_the_conic_and_r4_contribution_matches_the_exact_trace_as_the_aperture_closes(kappa, a4):
    ratios = []
    for height in (0.4, 0.1):
        y_sphere, s_sphere, u = _transverse(0.0, 0.0, height)
        y_conic, s_conic, _ = _transverse(kappa, a4, height)
        predicted = (s_conic - s_sphere) / (2 * u)
        if abs(predicted) < 1e-14:
            return  # no deformation to speak of at third order
        ratios.append((y_conic - y_sphere) / predicted)
    # the ratio tends to 1 like the aperture squared
    assert abs(ratios[1] - 1) < 2e-3
    assert abs(ratios[1] - 1) <= abs(ratios[0] - 1) + 1e-6
