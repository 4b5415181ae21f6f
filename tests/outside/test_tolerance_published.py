"""Tolerance analysis against published formulas and statistics.

Sources:
- Lensmaker's equation for a thin lens, 1/f = (n − 1)(1/R1 − 1/R2) (e.g. Hecht 2017, Optics,
  5th ed., §5.2.3), so df/dn = −f/(n − 1).
- Root-sum-square of linear sensitivities: the variance of a linear function of independent
  variables is Σ (∂q/∂x_i)² σ_i² (statistics, common practice); the standard error of a sample
  standard deviation is about σ/√(2N) (common practice).
- Wilson 1927, "Probable inference, the law of succession, and statistical inference",
  J. Am. Stat. Assoc. 22:209 — checked against scipy.stats.binomtest(...).proportion_ci
  (method="wilson"), a reference library.
- The variance of a normal distribution truncated at ±kσ, σ²(1 − 2kφ(k)/(2Φ(k) − 1))
  (Johnson, Kotz & Balakrishnan 1994, Continuous Univariate Distributions, vol. 1, ch. 13),
  checked against scipy.stats.truncnorm.
"""

from __future__ import annotations

import numpy as np
import pytest

from layoutlang import loads
from layoutlang.tolerance.analysis import analyse, wilson_interval
from layoutlang.tolerance.model import NORMAL, ToleranceItem
from layoutlang.tolerance.sampling import draw, batch_generator, standard_deviation

THIN_LENS = """\
medium glass index 1.5
object at infinity
start in air
surface front radius 50 into glass
gap 0
surface back radius -50 into air
stop at front, diameter 10
image at focus
expect focal length = 50 ± 1
"""


def test_thin_lens_focal_shift_per_index_change_is_minus_f_over_n_minus_1():
    program = loads(THIN_LENS + "tolerance index of glass ± 0.0001\n", "thin.lay")
    result = analyse(program, monte=False)
    row = result.rows[0]
    slope = (row.plus[0] - row.minus[0]) / (2 * 0.0001)
    f, n = 50.0, 1.5
    assert slope == pytest.approx(-f / (n - 1), rel=1e-6)


def test_monte_carlo_spread_of_a_linear_quantity_matches_the_root_sum_square():
    """The axial length is exactly linear in the gaps: MC σ = RSS σ within sampling error."""
    text = """\
medium glass index 1.5
object 300 before
start in air
surface a radius 40 into glass
gap 4
surface b radius -40 into air
gap 10
surface c radius 30 into glass
gap 3
surface d radius -60 into air
stop at a, diameter 8
image at focus
expect axial length = 17 ± 1
tolerance gap after a ± 0.06 mm, normal 3 sigma
tolerance gap after b ± 0.1 mm, normal 2 sigma
tolerance gap after c ± 0.04 mm, normal 3 sigma
monte carlo 20000 samples, seed 11
"""
    result = analyse(loads(text, "linear.lay"))
    rss = result.estimate[0]
    expected = np.sqrt(sum(standard_deviation(i) ** 2 for i in result.setup.items))
    assert rss == pytest.approx(expected, rel=1e-9)
    sampled = result.monte_carlo.deviations[0]
    standard_error = rss / np.sqrt(2 * 20000)
    assert abs(sampled - rss) < 4 * standard_error


def test_monte_carlo_spread_of_focal_length_matches_the_estimate_for_small_tolerances():
    text = THIN_LENS + ("tolerance radius of front ± 0.1 %, normal 3 sigma\n"
                        "tolerance index of glass ± 0.0005, normal 3 sigma\n"
                        "monte carlo 20000 samples, seed 5\n")
    result = analyse(loads(text, "thin.lay"))
    rss, sampled = result.estimate[0], result.monte_carlo.deviations[0]
    assert abs(sampled - rss) < 4 * rss / np.sqrt(2 * 20000) + 1e-3 * rss


@pytest.mark.parametrize("successes, trials", [(0, 10), (3, 10), (95, 100), (1000, 1000),
                                               (4321, 5000)])
def test_wilson_interval_against_scipy(successes, trials):
    stats = pytest.importorskip("scipy.stats")
    reference = stats.binomtest(successes, trials).proportion_ci(0.95, method="wilson")
    low, high = wilson_interval(successes, trials)
    assert low == pytest.approx(reference.low, abs=1e-12)
    assert high == pytest.approx(reference.high, abs=1e-12)


@pytest.mark.parametrize("sigmas", [1.0, 2.0, 3.0])
def test_truncated_normal_draws_and_their_standard_deviation(sigmas):
    stats = pytest.importorskip("scipy.stats")
    item = ToleranceItem("gap", "a", 0, 0.3, False, NORMAL, sigmas)
    sigma = 0.3 / sigmas
    reference = stats.truncnorm(-sigmas, sigmas, scale=sigma).std()
    assert standard_deviation(item) == pytest.approx(reference, rel=1e-12)
    values = draw((item,), 40000, batch_generator(7, 0))[0]
    assert np.abs(values).max() <= 0.3
    assert values.std() == pytest.approx(reference, rel=0.02)
