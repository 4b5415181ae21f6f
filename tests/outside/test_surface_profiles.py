"""Surface profiles against the published sag formulas, evaluated directly with numpy/scipy.

Sources: ISO 10110-12:2019, Optics and photonics — Preparation of drawings for optical elements
and systems — Part 12: Aspheric surfaces (conic + even polynomial sag); G. W. Forbes 2007,
"Shape specification for axially symmetric optical surfaces", Opt. Express 15:5218 (Qcon:
u⁴ Σ a_m P_m^(0,4)(2u² − 1)); Jacobi polynomials from scipy.special.eval_jacobi (reference
library).
"""

from __future__ import annotations

import numpy as np
import pytest
from scipy.special import eval_jacobi

from layoutlang.surfaces.profile import Profile


def iso_sag(c, k, terms, r):
    """ISO 10110-12 sag, written out independently of the engine."""
    z = c * r**2 / (1 + np.sqrt(1 - (1 + k) * c**2 * r**2))
    for i, a in enumerate(terms):
        z = z + a * r ** (2 * i + 4)
    return z


@pytest.mark.parametrize("seed", range(8))
def test_even_asphere_sag_matches_iso_formula_at_random_coefficients(seed):
    rng = np.random.default_rng(seed)
    c = rng.uniform(-0.05, 0.05)
    k = rng.uniform(-3, 1)
    terms = tuple(rng.normal(0, 1e-4) * 10.0 ** (-3 * i) for i in range(4))
    reach = Profile(c, k).domain_radius()
    r = np.linspace(0, min(10.0, 0.95 * reach), 41)
    profile = Profile(c, k, terms)
    assert np.allclose(profile.sag(r * r), iso_sag(c, k, terms, r), rtol=1e-12, atol=1e-15)


@pytest.mark.parametrize("seed", range(4))
def test_qcon_sag_matches_forbes_definition_with_scipy_jacobi(seed):
    rng = np.random.default_rng(100 + seed)
    c, k, norm = rng.uniform(-0.03, 0.03), rng.uniform(-2, 0.5), 8.0
    a = tuple(rng.normal(0, 1e-3, 6))
    r = np.linspace(0, norm, 33)
    u2 = (r / norm) ** 2
    extra = u2**2 * sum(am * eval_jacobi(m, 0, 4, 2 * u2 - 1) for m, am in enumerate(a))
    expected = iso_sag(c, k, (), r) + extra
    assert np.allclose(Profile(c, k, (), a, norm).sag(r * r), expected, rtol=1e-12, atol=1e-15)


def test_slope_is_the_derivative_of_the_sag():
    """Central differences (common practice) for every form."""
    forms = [Profile(1 / 25), Profile(1 / 25, -1.0), Profile(-1 / 40, -2.5, (2e-6, -3e-9)),
             Profile(1 / 60, 0.3, (), (1e-3, -2e-4, 4e-5, 1e-5), 9.0)]
    rho = np.linspace(1.0, 80.0, 9)
    h = 1e-5
    for profile in forms:
        numeric = (profile.sag(rho + h) - profile.sag(rho - h)) / (2 * h)
        assert np.allclose(profile.slope(rho), numeric, rtol=1e-7, atol=1e-12)


def test_paraboloid_is_exactly_r_squared_over_2r():
    """κ = −1: z = r²/(2R) (conic geometry, any standard text)."""
    r = np.linspace(0, 30, 7)
    assert np.allclose(Profile(1 / 50, -1.0).sag(r * r), r * r / 100, rtol=0, atol=1e-14)


def test_domain_of_a_sphere_is_its_radius():
    assert Profile(1 / 20).domain_radius() == pytest.approx(20)
    assert Profile(1 / 20, -1.0).domain_radius() == float("inf")
    assert Profile(1 / 20, -2.0).domain_radius() == float("inf")
