"""Image quality against published closed forms.

Sources, beside each check:
- J. W. Goodman, Introduction to Fourier Optics (3rd ed., 2005), §6.3: the diffraction-limited
  OTF of a circular pupil, (2/π)(acos ν − ν sqrt(1 − ν²)), ν = f / (1/(λN)).
- Circle-circle overlap (common practice; E. L. O'Neill, "Transfer function for an annular
  aperture", J. Opt. Soc. Am. 46, 285 (1956) builds the annular OTF from the same overlaps).
- Lord Rayleigh (1881) / M. Born and E. Wolf, Principles of Optics (7th ed.), §8.5.2: Airy
  encircled energy 1 − J0²(v) − J1²(v), v = π r / (λN); first zero v = 3.8317 (r = 1.22 λN),
  83.8 % inside it.
- A. Maréchal (1947) via Born and Wolf §9.1: Strehl ≈ exp(−(2πσ)²) for small σ (waves).
- Defocus: W020 = δz / (8 N²) (e.g. W. J. Smith, Modern Optical Engineering, 2008, ch. 11);
  for W = W020 ρ² the RMS about the mean (piston removed) is W020/√12 (<ρ⁴> − <ρ²>² = 1/12
  over the unit disk) and Noll's Z4 coefficient is W020/(2√3) (ρ² = (1 + Z4/√3)/2).
- W. T. Welford, Aberrations of Optical Systems (1986), §8: W040 = S I / 8.
- Thin lens at the stop, object at infinity (Smith, Modern Optical Engineering, ch. 5/6,
  third-order field curves): sagittal focus −h²(n+1)/(2nf), tangential −h²(3n+1)/(2nf),
  h the image height.
"""

from __future__ import annotations

import math

import numpy as np
import pytest

import layoutlang
from layoutlang.engines import aberrations, firstorder, seidel
from layoutlang.engines import psf as P
from layoutlang.engines import wavefront as W
from layoutlang.engines.quality import ImageQuality
from layoutlang.engines.qualitysettings import QualitySettings

LAMBDA, N_F = 0.00055, 4.0


def _circle(n: int, obscuration: float = 0.0) -> P.PupilFunction:
    u = P.cell_centres(n)
    x, y = np.meshgrid(u, u)
    r2 = x * x + y * y
    amplitude = ((r2 <= 1) & (r2 >= obscuration ** 2)).astype(float)
    na = 1 / (2 * N_F)
    return P.PupilFunction(amplitude, np.zeros_like(amplitude), LAMBDA, na, na)


def _mtf_line(pupil: P.PupilFunction, nus):
    spread = P.psf(pupil)
    along_y, _ = P.line_otfs(spread[None])
    s = P.sampling(pupil)
    k = np.asarray(nus) * s.cutoff_y / s.step_y
    return np.interp(k, np.arange(along_y.shape[-1]), np.abs(along_y[0])) / abs(along_y[0, 0])


def test_circular_pupil_mtf_matches_goodman():
    """Goodman 2005 §6.3: (2/π)(acos ν − ν√(1 − ν²))."""
    nus = np.array([0.05, 0.2, 0.4, 0.6, 0.8, 0.95])
    found = _mtf_line(_circle(128), nus)
    closed = 2 / np.pi * (np.arccos(nus) - nus * np.sqrt(1 - nus ** 2))
    assert found == pytest.approx(closed, abs=1.5e-3)


def _overlap(r1: float, r2: float, d: float) -> float:
    """Area common to two circles of radii r1, r2 whose centres are d apart."""
    if d >= r1 + r2:
        return 0.0
    if d <= abs(r1 - r2):
        return math.pi * min(r1, r2) ** 2
    a = r1 * r1 * math.acos((d * d + r1 * r1 - r2 * r2) / (2 * d * r1))
    b = r2 * r2 * math.acos((d * d + r2 * r2 - r1 * r1) / (2 * d * r2))
    c = 0.5 * math.sqrt((-d + r1 + r2) * (d + r1 - r2) * (d - r1 + r2) * (d + r1 + r2))
    return a + b - c


def test_annular_pupil_mtf_matches_circle_overlaps():
    """O'Neill 1956 (annular OTF from circle overlaps), obscuration 0.5 of the radius."""
    eps = 0.5
    nus = np.array([0.05, 0.15, 0.3, 0.5, 0.7, 0.9])
    found = _mtf_line(_circle(128, eps), nus)
    closed = []
    for nu in nus:
        d = 2 * nu
        area = _overlap(1, 1, d) - 2 * _overlap(1, eps, d) + _overlap(eps, eps, d)
        closed.append(area / (math.pi * (1 - eps * eps)))
    assert found == pytest.approx(np.array(closed), abs=4e-3)


def test_airy_encircled_energy_and_first_zero():
    """Rayleigh / Born and Wolf §8.5.2: EE = 1 − J0² − J1²; 83.8 % at r = 1.22 λN."""
    from scipy.special import j0, j1

    pupil = _circle(96)
    transfer = P.otf(P.psf(pupil))
    radii = np.array([0.3, 0.6, 1.0, 1.2197, 1.8, 2.233]) * LAMBDA * N_F
    v = np.pi * radii / (LAMBDA * N_F)
    closed = 1 - j0(v) ** 2 - j1(v) ** 2
    assert P.encircled_energy(pupil, radii, transfer) == pytest.approx(closed, abs=2e-3)
    assert P.encircled_energy(pupil, 1.2197 * LAMBDA * N_F, transfer)[0] == \
        pytest.approx(0.838, abs=1.5e-3)
    # the first dark ring: where the encircled energy stops growing (dEE/dr ∝ r·PSF = 0)
    r = np.linspace(1.0, 1.45, 181) * LAMBDA * N_F
    growth = np.diff(P.encircled_energy(pupil, r, transfer))
    first_zero = r[np.argmin(growth) + 1] / (LAMBDA * N_F)
    assert first_zero == pytest.approx(1.22, abs=0.01)


@pytest.mark.parametrize("rms", [0.02, 0.04, 0.06])
def test_strehl_follows_marechal_for_small_aberration(rms):
    """Maréchal 1947: Strehl ≈ exp(−(2πσ)²) (good to about 1 % below σ = 0.07 waves)."""
    from layoutlang.engines.zernike import zernike

    base = _circle(96)
    u = P.cell_centres(96)
    x, y = np.meshgrid(u, u)
    rho, theta = np.hypot(x, y), np.arctan2(y, x)
    shape = (zernike(6, rho, theta) + zernike(11, rho, theta)) / math.sqrt(2)
    wave = np.where(base.amplitude > 0, rms * shape, 0.0)
    inside = base.amplitude > 0
    sigma = float(np.sqrt(np.mean((wave[inside] - wave[inside].mean()) ** 2)))
    pupil = P.PupilFunction(base.amplitude, wave, LAMBDA, base.na_x, base.na_y)
    assert P.strehl(pupil) == pytest.approx(P.marechal(sigma), rel=0.012)


_IDEAL = """
units mm
wavelengths 500 nm
object at infinity
start in air
lens l focal length 100
stop at l, f-number {n}
image {plane} after
"""


@pytest.mark.parametrize("shift", [-0.3, -0.1, 0.2])
def test_defocus_wavefront_matches_w020(shift):
    """Smith 2008: W020 = δz/(8N²); RMS (piston removed) W020/√12; Noll Z4 = W020/(2√3).
    δz = focus − plane: the image plane `shift` beyond the focus of a perfect (ideal) lens.
    The formula is paraxial (sin U ≈ tan U); at f/10 that is good to about 0.3 %."""
    number = 10.0
    program = layoutlang.loads(_IDEAL.format(n=number, plane=100 + shift))
    results = firstorder.first_order(program.system)
    s = aberrations.setup(program.system, results)
    wf = W.wavefront(W.bundle(s, 0.0, 96, results["exit pupil position"]))
    w020 = -shift / (8 * number ** 2) / 0.0005  # waves
    assert wf.rms == pytest.approx(abs(w020) / math.sqrt(12), rel=0.006)
    assert wf.zernike.coefficient(4) == pytest.approx(w020 / (2 * math.sqrt(3)), rel=0.006)
    # best focus by wavefront goes back to the lens's focus
    focus, best = W.best_focus(W.bundle(s, 0.0, 48, results["exit pupil position"]))
    assert focus == pytest.approx(-shift, abs=2e-4)
    assert best.rms < 1e-3


_SINGLET = """
units mm
wavelengths 587.6 nm
medium glass index 1.5
object at infinity, field angle {angle} deg
start in air
surface front radius 100 into glass
gap {thickness}
surface back radius -100 into air
stop at front, f-number {n}
image at focus
"""


@pytest.mark.parametrize("number", [16.0, 32.0])
def test_spherical_wavefront_matches_seidel_sum(number):
    """Welford 1986 §8: W040 = S I / 8 as the aperture goes small: the ρ⁴ term of the axial
    wavefront at the paraxial focus. Welford's W is the path of the chief ray minus that of the
    ray (positive for the under-corrected singlet); our OPD is ray minus chief, so −W."""
    program = layoutlang.loads(_SINGLET.format(angle=0, thickness=4, n=number))
    results = firstorder.first_order(program.system)
    s = aberrations.setup(program.system, results)
    wf = W.wavefront(W.bundle(s, 0.0, 64, results["exit pupil position"]))
    u = P.cell_centres(64)
    x, y = np.meshgrid(u, u)
    valid = wf.valid
    r2 = (x * x + y * y)[valid]
    design = np.stack([np.ones_like(r2), r2, r2 * r2], axis=1)
    coefficients, *_ = np.linalg.lstsq(design, wf.opd[valid] * s.wavelength, rcond=None)
    s1 = seidel.seidel(program.system, results).total("spherical")
    assert -coefficients[2] == pytest.approx(s1 / 8, rel=0.005 if number == 16 else 0.002)


def test_field_curves_of_thin_lens_at_stop():
    """Smith: thin lens at the stop, sagittal −h²(n+1)/(2nf), tangential −h²(3n+1)/(2nf)."""
    n, angle = 1.5, 1.0
    program = layoutlang.loads(_SINGLET.format(angle=angle, thickness=0.2, n=20))
    results = firstorder.first_order(program.system)
    f = results["focal length"]
    h = f * math.tan(math.radians(angle))
    quality = ImageQuality(program.system, program.rays, QualitySettings(cells=16), results)
    row = quality.field_row(1.0)
    assert row.sagittal_focus == pytest.approx(-h * h * (n + 1) / (2 * n * f), rel=0.03)
    assert row.tangential_focus == pytest.approx(-h * h * (3 * n + 1) / (2 * n * f), rel=0.03)
