"""Tests of the paraxial engine: one algorithm over floats, numpy arrays and sympy symbols."""

from __future__ import annotations

from dataclasses import replace

import numpy as np
import pytest

from layoutlang.engines import paraxial
from layoutlang.engines.paraxial import REFRACTION, TRANSFER, Step, formulas, matrix, trace
from layoutlang.system import IDEAL, MIRROR, Boundary, Medium, StopSpec, System


def lens_system(r1=50.0, r2=-50.0, thickness=5.0, n=1.5, gap=20.0, r3=30.0) -> System:
    """A thick lens, an air gap and a mirror: every kind of step (invented numbers)."""
    return System(
        media=(Medium("air", 1.0), Medium("glass", n)),
        start_medium="air",
        boundaries=(Boundary("a", 1 / r1, "glass"), Boundary("b", 1 / r2, "air"),
                    Boundary("m", 1 / r3, "air", MIRROR), Boundary("l", 0.0, "air", IDEAL, 0.01)),
        gaps=(thickness, gap, 15.0),
    )


def test_single_surface_matrix() -> None:
    # refraction matrix [[1, 0], [-(n'-n)/R, 1]] in reduced angles (common practice)
    system = System((Medium("air", 1.0), Medium("g", 1.5)), "air", (Boundary("s", 0.1, "g"),), ())
    assert matrix(paraxial.steps_of(system)) == (1, 0, pytest.approx(-0.05), 1)


def test_transfer_is_reduced_by_the_index() -> None:
    system = System((Medium("air", 1.0), Medium("g", 1.5)), "air",
                    (Boundary("s", 0.0, "g"), Boundary("t", 0.0, "air")), (3.0,))
    assert paraxial.reduced_gaps(system) == [2.0]
    assert matrix(paraxial.steps_of(system)) == (1, pytest.approx(2.0), 0, 1)


def test_mirror_power_and_directions() -> None:
    system = lens_system()
    assert system.directions() == [1, 1, 1, -1, -1]
    # after the mirror the signed index is -1: a mirror of curvature c in air has power -2c
    assert paraxial.signed_indices(system) == [1.0, 1.5, 1.0, -1.0, -1.0]
    powers = paraxial.surface_powers(system)
    assert powers[2] == pytest.approx(-2 / 30.0)
    # an ideal lens after the mirror keeps its converging power (reduced by the physical index)
    assert powers[3] == pytest.approx(0.01)
    # gaps stay positive lengths; the reduced gap divides by the physical index
    assert paraxial.reduced_gaps(system) == pytest.approx([5 / 1.5, 20.0, 15.0])


@pytest.mark.parametrize("seed", range(5))
def test_system_matrix_has_unit_determinant(seed: int) -> None:
    rng = np.random.default_rng(seed)
    system = lens_system(*rng.uniform([20, -80, 1, 1.4, 5, 20], [80, -20, 10, 1.9, 50, 90]))
    a, b, c, d = matrix(paraxial.steps_of(system))
    assert a * d - b * c == pytest.approx(1.0, abs=1e-12)


def test_trace_equals_the_matrix() -> None:
    steps = paraxial.steps_of(lens_system())
    a, b, c, d = matrix(steps)
    y, nu = trace(2.0, 0.03, steps)
    assert (y, nu) == (pytest.approx(a * 2 + b * 0.03), pytest.approx(c * 2 + d * 0.03))


# --- floats and numpy arrays give the same numbers -----------------------------------------


def _samples(count: int = 400) -> dict[str, np.ndarray]:
    rng = np.random.default_rng(7)
    return {"r1": rng.uniform(20, 80, count), "r2": rng.uniform(-80, -20, count),
            "thickness": rng.uniform(1, 10, count), "n": rng.uniform(1.4, 1.9, count),
            "gap": rng.uniform(5, 50, count), "r3": rng.uniform(20, 90, count)}


def test_matrix_vectorized_over_samples_equals_scalar_loop() -> None:
    samples = _samples()
    vector = matrix(paraxial.steps_of(lens_system(**samples)))
    for i in range(len(samples["n"])):
        scalar = matrix(paraxial.steps_of(lens_system(**{k: float(v[i]) for k, v in
                                                         samples.items()})))
        for element_array, element in zip(vector, scalar):
            assert element_array[i] == pytest.approx(element, rel=1e-14, abs=1e-15)


def test_formulas_vectorized_equal_scalar() -> None:
    samples = _samples(50)
    a, b, c, d = matrix(paraxial.steps_of(lens_system(**samples)))
    bfd = formulas.back_focal_distance(a, b, c, d, 1.0)
    image = formulas.image_distance(a, b, c, d, 300.0, 1.0)
    for i in range(50):
        s = matrix(paraxial.steps_of(lens_system(**{k: float(v[i]) for k, v in samples.items()})))
        assert bfd[i] == pytest.approx(formulas.back_focal_distance(*s, 1.0), rel=1e-13)
        assert image[i] == pytest.approx(formulas.image_distance(*s, 300.0, 1.0), rel=1e-12)


def test_trace_over_ray_arrays_equals_scalar_rays() -> None:
    steps = paraxial.steps_of(lens_system())
    heights = np.linspace(-5, 5, 101)
    angles = np.linspace(-0.1, 0.1, 101)
    y, nu = trace(heights.copy(), angles.copy(), steps)
    for i in range(101):
        assert (y[i], nu[i]) == (pytest.approx(trace(float(heights[i]), float(angles[i]),
                                                     steps)[0]),
                                 pytest.approx(trace(float(heights[i]), float(angles[i]),
                                                     steps)[1]))


def test_trace_updates_numpy_arrays_in_place() -> None:
    y, nu = np.ones(3), np.zeros(3)
    out_y, out_nu = trace(y, nu, [Step(REFRACTION, 0.5), Step(TRANSFER, 2.0)])
    assert out_y is y and out_nu is nu
    assert y.tolist() == [0.0, 0.0, 0.0] and nu.tolist() == [-0.5, -0.5, -0.5]


@pytest.mark.parametrize("chunk", [1, 7, 64, 10_000])
def test_trace_samples_in_chunks_equals_trace(chunk: int) -> None:
    samples = _samples(97)
    steps = paraxial.steps_of(lens_system(**samples))  # one layout per sample
    y0 = np.linspace(0, 3, 97)
    nu0 = np.full(97, 0.01)
    y, nu = paraxial.trace_samples(y0, nu0, steps, chunk=chunk)
    expected_y, expected_nu = trace(y0.copy(), nu0.copy(), steps)
    np.testing.assert_allclose(y, expected_y, rtol=1e-14)
    np.testing.assert_allclose(nu, expected_nu, rtol=1e-14)
    assert y0[0] == 0 and nu0[0] == 0.01  # inputs kept


# --- the stop splits the layout without changing it ------------------------------------------


def _product(front, back):
    a1, b1, c1, d1 = matrix(front)
    a2, b2, c2, d2 = matrix(back)
    return (a2 * a1 + b2 * c1, a2 * b1 + b2 * d1, c2 * a1 + d2 * c1, c2 * b1 + d2 * d1)


@pytest.mark.parametrize("stop", [
    StopSpec(-1, -12.0, "diameter", 5.0),  # in object space
    StopSpec(0, 0.0, "diameter", 5.0),  # at the first vertex
    StopSpec(0, 2.0, "diameter", 5.0),  # inside the glass
    StopSpec(1, 7.0, "diameter", 5.0),  # inside the air gap
    StopSpec(2, 3.0, "diameter", 5.0),  # after the mirror
    StopSpec(3, 40.0, "diameter", 5.0),  # in image space
])
def test_split_at_stop_multiplies_back_to_the_whole(stop: StopSpec) -> None:
    system = replace(lens_system(), stop=stop)
    split = paraxial.split_at_stop(system)
    whole = matrix(paraxial.steps_of(system))
    assert _product(split.front, split.back) == pytest.approx(whole, abs=1e-12)


def test_split_puts_the_stop_at_its_distance() -> None:
    system = replace(lens_system(), stop=StopSpec(1, 7.0, "diameter", 5.0))
    front = paraxial.split_at_stop(system).front
    # a ray along the axis direction from the first vertex reaches the stop after
    # 5/1.5 + 7 reduced units
    assert matrix(front)[1] == pytest.approx(
        matrix(paraxial.steps_of(replace(lens_system(gap=7.0)))[:4])[1])


# --- the same algorithm on sympy symbols ------------------------------------------------------


def test_matrix_on_sympy_symbols_gives_the_single_surface_equation() -> None:
    sp = pytest.importorskip("sympy")
    n1, n2, radius, s = sp.symbols("n1 n2 R s", positive=True)
    system = System((Medium("one", n1), Medium("two", n2)), "one",
                    (Boundary("s", 1 / radius, "two"),), ())
    a, b, c, d = matrix(paraxial.steps_of(system))
    image = formulas.image_distance(a, b, c, d, s / n1, n2)
    # n1/s + n2/s' = (n2 - n1)/R (paraxial refraction at one spherical boundary,
    # e.g. Hecht, 2017, Optics, 5th ed., eq. 5.8)
    assert sp.simplify(n1 / s + n2 / image - (n2 - n1) / radius) == 0
