"""Gaussian beams and fibre coupling against published formulas and direct integration.

Sources, each named beside its checks:
- Self, S. A. (1983), "Focusing of spherical Gaussian beams", Appl. Opt. 22:658 — the
  thin-lens waist transformation (his eqs. 9 and 10b).
- Siegman, A. E. (1990), "New developments in laser resonators", Proc. SPIE 1224:2, and ISO
  11146-1:2005 — the embedded Gaussian: a beam of propagation ratio M² has Rayleigh range
  π W0²/(M² λ) and far-field half-angle M² λ/(π W0).
- Marcuse, D. (1977), "Loss analysis of single-mode fiber splices", Bell Syst. Tech. J.
  56:703 — coupling with lateral offset, tilt (different spot sizes) and a gap (equal spots).
- The overlap integral itself, by direct numerical quadrature on a grid (numpy), for offset,
  tilt and defocus: the definition, not a formula.
- Power of a Gaussian beam through a centred circle, 1 − exp(−2a²/w²), checked by radial
  quadrature of the intensity 2/(π w²) exp(−2r²/w²) (common practice).
"""

from __future__ import annotations

import math

import numpy as np
import pytest

from layoutlang import loads
from layoutlang.checks import check_program
from layoutlang.engines.beams import BeamPropagation, overlap_efficiency, power_through_circle

WAVELENGTH_NM = 1064.0
LAMBDA = WAVELENGTH_NM * 1e-6  # mm


def _thin_lens(s: float, f: float, w0: float, extra: str = "") -> BeamPropagation:
    program = loads(f"units mm\nbeam waist radius {w0}, waist {s} before, wavelength "
                    f"{WAVELENGTH_NM} nm{extra}\nstart in air\nlens focal length {f}\n")
    return BeamPropagation(program.system)


# --- Self 1983: s''/f = 1 + (s/f − 1)/((s/f − 1)² + (zR/f)²); m = 1/sqrt((1 − s/f)² + (zR/f)²)
@pytest.mark.parametrize("s", [0.0, 40.0, 100.0, 180.0, 400.0, 2000.0])
@pytest.mark.parametrize("w0", [0.05, 0.3])
def test_thin_lens_waist_transformation_of_self_1983(s: float, w0: float) -> None:
    f = 100.0
    z_r = math.pi * w0 ** 2 / LAMBDA
    x = s / f - 1
    image = f * (1 + x / (x * x + (z_r / f) ** 2))
    magnification = 1 / math.sqrt(x * x + (z_r / f) ** 2)
    out = _thin_lens(s, f, w0).output()
    assert out.waist_position == pytest.approx(image, rel=1e-10, abs=1e-10)
    assert out.waist_radius == pytest.approx(magnification * w0, rel=1e-10)
    assert out.rayleigh_range == pytest.approx(magnification ** 2 * z_r, rel=1e-10)


@pytest.mark.parametrize("s", [50.0, 150.0, 600.0])
def test_self_1983_with_an_embedded_gaussian_of_siegman_1990(s: float) -> None:
    """Self's eq. with zR = π W0²/(M² λ); the output divergence is M² λ/(π W0')."""
    f, w0, m2 = 80.0, 0.4, 1.7
    z_r = math.pi * w0 ** 2 / (m2 * LAMBDA)
    x = s / f - 1
    image = f * (1 + x / (x * x + (z_r / f) ** 2))
    out = _thin_lens(s, f, w0, f", propagation ratio {m2}").output()
    assert out.waist_position == pytest.approx(image, rel=1e-10)
    assert out.waist_radius == pytest.approx(w0 / math.sqrt(x * x + (z_r / f) ** 2), rel=1e-10)
    assert out.divergence == pytest.approx(m2 * LAMBDA / (math.pi * out.waist_radius), rel=1e-10)


# --- Marcuse 1977 --------------------------------------------------------------------------
def _mode_factor(w1: float, w2: float) -> float:
    return (2 * w1 * w2 / (w1 ** 2 + w2 ** 2)) ** 2


@pytest.mark.parametrize("w1, w2, d", [(5.0e-3, 5.0e-3, 2.0e-3), (4.0e-3, 6.0e-3, 3.0e-3),
                                       (5.2e-3, 5.2e-3, 0.0)])
def test_lateral_offset_of_marcuse_1977(w1: float, w2: float, d: float) -> None:
    k = 2 * math.pi / 1.55e-3
    expected = _mode_factor(w1, w2) * math.exp(-2 * d ** 2 / (w1 ** 2 + w2 ** 2))
    assert overlap_efficiency(w1, 0.0, w2, k, offset=d) == pytest.approx(expected, rel=1e-12)


@pytest.mark.parametrize("w1, w2, theta", [(5.0e-3, 5.0e-3, 0.01), (4.0e-3, 6.0e-3, 0.02)])
def test_tilt_of_marcuse_1977(w1: float, w2: float, theta: float) -> None:
    n, wavelength = 1.0, 1.55e-3
    k = 2 * math.pi * n / wavelength
    # Marcuse writes the tilt for small angles; the engine takes the transverse wavenumber
    # k·sinθ, so sinθ stands for θ here
    s = math.sin(theta)
    expected = _mode_factor(w1, w2) * math.exp(
        -2 * math.pi ** 2 * n ** 2 * s ** 2 * w1 ** 2 * w2 ** 2
        / (wavelength ** 2 * (w1 ** 2 + w2 ** 2)))
    assert overlap_efficiency(w1, 0.0, w2, k, tilt=theta) == pytest.approx(expected, rel=1e-12)


@pytest.mark.parametrize("gap", [0.02, 0.1, 0.5])
def test_gap_between_equal_modes_of_marcuse_1977(gap: float) -> None:
    """Two equal modes a gap D apart couple 1/(1 + Z²), Z = λ D/(2π n w²), through the whole
    pipeline: a beam leaving its waist in air and a fibre face D further on."""
    w, nm = 0.005, 1550.0
    wavelength = nm * 1e-6
    program = loads(f"units mm\nbeam waist radius {w}, waist 0 before, wavelength {nm} nm\n"
                    f"start in air\nsurface window flat\nfibre mode field diameter {2 * w}, "
                    f"{gap} after\n")
    z = wavelength * gap / (2 * math.pi * w ** 2)
    coupling = BeamPropagation(program.system).coupling()
    assert coupling.efficiency == pytest.approx(1 / (1 + z * z), rel=1e-10)


# --- the overlap integral by quadrature -----------------------------------------------------
def _quadrature(w1: float, inverse_r: float, w2: float, k: float, d: float, theta: float
                ) -> float:
    half = 6 * max(w1, w2) + abs(d)
    x = np.linspace(-half, half, 801)
    xx, yy = np.meshgrid(x, x, indexing="ij")
    r2 = xx ** 2 + yy ** 2
    beam = np.exp(-r2 / w1 ** 2 - 0.5j * k * inverse_r * r2)
    mode = np.exp(-((xx - d) ** 2 + yy ** 2) / w2 ** 2 + 1j * k * math.sin(theta) * xx)
    cell = (x[1] - x[0]) ** 2
    overlap = np.sum(beam * np.conj(mode)) * cell
    norms = np.sum(np.abs(beam) ** 2) * cell * np.sum(np.abs(mode) ** 2) * cell
    return float(abs(overlap) ** 2 / norms)


@pytest.mark.parametrize("w1, inverse_r, w2, d, theta", [
    (5.0e-3, 0.0, 5.0e-3, 3.0e-3, 0.0),        # offset
    (5.0e-3, 0.0, 4.0e-3, 0.0, 0.03),          # tilt
    (5.0e-3, 1 / 2.0, 5.0e-3, 0.0, 0.0),       # defocus: a curved wavefront on the face
    (6.0e-3, -1 / 3.0, 4.5e-3, 2.0e-3, 0.02),  # all at once
])
def test_overlap_closed_form_equals_direct_quadrature(w1, inverse_r, w2, d, theta) -> None:
    k = 2 * math.pi / 1.064e-3
    expected = _quadrature(w1, inverse_r, w2, k, d, theta)
    assert overlap_efficiency(w1, inverse_r, w2, k, d, theta) == pytest.approx(expected,
                                                                              rel=1e-6)


def test_a_defocused_fibre_couples_as_the_quadrature_of_the_propagated_beam() -> None:
    """The whole pipeline: a lens focuses the beam, the fibre sits 0.3 mm past the waist
    with an offset and a tilt; the beam there (radius and wavefront from the ABCD law) is
    integrated on a grid against the fibre mode."""
    text = ("units mm\nbeam waist radius 0.5, waist 20 before, wavelength 1064 nm\n"
            "start in air\nlens focusing focal length 40\n"
            "fibre mode field diameter 0.06, 40.3 after, offset 0.004, tilt 0.3 deg\n")
    program = loads(text)
    beam = BeamPropagation(program.system)
    coupling = beam.coupling()
    abcd = beam.matrix_after(40.3)
    inverse_r = beam.inverse_wavefront_radius(abcd, 1.0)
    k = 2 * math.pi / 1.064e-3
    expected = _quadrature(coupling.beam_radius, inverse_r, 0.03, k, 0.004, math.radians(0.3))
    assert coupling.efficiency == pytest.approx(expected, rel=1e-6)


# --- power through a circular aperture ------------------------------------------------------
@pytest.mark.parametrize("a_over_w", [0.3, 0.7, 1.0, 1.5])
def test_power_through_a_circle_equals_radial_quadrature(a_over_w: float) -> None:
    w = 2.0
    a = a_over_w * w
    r = np.linspace(0.0, a, 20001)
    intensity = 2 / (math.pi * w ** 2) * np.exp(-2 * r ** 2 / w ** 2) * 2 * math.pi * r
    expected = float(np.sum((intensity[1:] + intensity[:-1]) / 2 * np.diff(r)))
    assert power_through_circle(a, w) == pytest.approx(expected, rel=1e-8)


def test_a_clear_aperture_of_one_beam_diameter_passes_86_percent() -> None:
    """a = w: 1 − e⁻² = 86.47 % (common practice: the 1/e² diameter holds 86.5 % of the power)."""
    program = loads("units mm\nbeam waist radius 1, wavelength 633 nm\nstart in air\n"
                    "surface window flat, clear diameter 2\n"
                    "expect power passed at window = 86.4665 % ± 0.0001 %\n")
    assert all(r.passed for r in check_program(program))


def test_derived_waist_position_and_radius_are_self_1983_in_closed_form() -> None:
    """`derive waist position` / `derive waist radius` on a symbolic thin lens equal Self's
    eqs. (9) and (10b) as rational functions of f, s and w0 (the wavelength a number)."""
    sp = pytest.importorskip("sympy")
    from layoutlang.symbolic.derive import derive

    program = loads("symbols f s w positive\nnominal f = 100, s = 150, w = 0.3\nunits mm\n"
                    "beam waist radius w, waist s before, wavelength 1064 nm\nstart in air\n"
                    "lens focusing focal length f\nderive waist position, waist radius\n")
    part = program.symbolic
    f, s, w = part.symbols
    z_r = sp.pi * w ** 2 / sp.Rational(1064, 10 ** 6)
    x = s / f - 1
    image = f * (1 + x / (x ** 2 + (z_r / f) ** 2))
    radius_squared = w ** 2 / (x ** 2 + (z_r / f) ** 2)
    position = derive(part, "waist position")
    assert sp.cancel(sp.together(position.expr - image)) == 0
    radius = derive(part, "waist radius")
    assert sp.cancel(sp.together(radius.expr ** 2 - radius_squared)) == 0
    numeric = BeamPropagation(program.system).output()
    assert position.nominal_value == pytest.approx(numeric.waist_position, rel=1e-12)
    assert radius.nominal_value == pytest.approx(numeric.waist_radius, rel=1e-12)
