"""Point spread and transfer function of a sampled pupil function, by FFT.

The pupil function P = A·exp(2πi W) (A the amplitude, W the wavefront in waves) is sampled on a
square grid of N cells across the pupil; the grid is zero-padded to M ≥ 2N (scipy's
`next_fast_len`) so the autocorrelation that is the OTF is not aliased. The pupil is described
in image-space optical direction cosines (n·cos of the angle to x, y), which makes the Fourier
relation to image-plane coordinates exact in Hopkins's sense; with the pupil's half-widths
NAx, NAy (its extent in those direction cosines) the sampling is

    PSF sample spacing   Δx = λ N / (2 NAx M)           (Δy likewise with NAy)
    OTF frequency step   δf = 2 NAx / (λ N)             cut-off 2 NAx / λ = N δf

— common practice (J. W. Goodman, Introduction to Fourier Optics, ch. 6: the OTF is the
normalised autocorrelation of the pupil function). The PSF and OTF here are normalised to unit
energy and unit zero-frequency response.

Strehl ratio: |Σ A e^{2πiW}|² / (Σ A)², the PSF at the centre of the wavefront over the same
pupil without aberration (exact Fourier value, no sampling of the peak); pass the wavefront with
piston and tilt removed to get it at the diffraction focus. The Maréchal estimate
exp(−(2πσ)²) from the RMS σ in waves is given beside it.

Encircled and ensquared energy are integrated from the 2-D OTF (exact for the sampled,
band-limited PSF): EE(r) = ∫∫ OTF(f) r J₁(2π r |f|)/|f| d²f and
ES(a) = ∫∫ OTF(f) 2a sinc(2a fx) 2a sinc(2a fy) d²f for a square of half-width a.

scipy.fft (used with `workers`) is imported here only, when a point spread is first computed.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from typing import Sequence

import numpy as np

__all__ = ["PupilFunction", "Sampling", "fft_size", "sampling", "psf", "psfs", "otf",
           "line_otfs", "strehl", "marechal", "encircled_energy", "ensquared_energy",
           "radius_for_energy", "cell_centres", "WORKERS"]

#: threads for scipy.fft (the machine has two cores)
WORKERS = 2


def cell_centres(n: int) -> np.ndarray:
    """Normalised pupil coordinates (−1..1) of the centres of n cells across."""
    return (np.arange(n) + 0.5) * (2.0 / n) - 1.0


@dataclass(frozen=True)
class PupilFunction:
    """A pupil sampled on n × n cells: rows along y, columns along x.

    Attributes:
        amplitude: A, zero outside the pupil and where rays are lost.
        wavefront: W in waves (ignored where A is zero).
        wavelength: in layout units.
        na_x, na_y: half-widths of the pupil in image-space optical direction cosines.
        centre: (x, y) on the image plane the pupil's wavefront is referred to (layout units).
    """

    amplitude: np.ndarray
    wavefront: np.ndarray
    wavelength: float
    na_x: float
    na_y: float
    centre: tuple[float, float] = (0.0, 0.0)
    weight: float = 1.0
    label: str = field(default="", compare=False)

    @property
    def n(self) -> int:
        return self.amplitude.shape[0]

    def field_values(self) -> np.ndarray:
        return self.amplitude * np.exp(2j * np.pi * self.wavefront)

    def perfect(self) -> "PupilFunction":
        """The same pupil without aberration (its diffraction limit)."""
        return PupilFunction(self.amplitude, np.zeros_like(self.wavefront), self.wavelength,
                             self.na_x, self.na_y, self.centre, self.weight, self.label)


@dataclass(frozen=True)
class Sampling:
    """How a pupil is sampled, in words and numbers (layout units)."""

    cells: int  # N across the pupil
    size: int  # M, FFT size
    spacing_x: float  # PSF sample spacing
    spacing_y: float
    step_x: float  # OTF frequency step (cycles per layout unit)
    step_y: float
    cutoff_x: float  # 2 NA / λ
    cutoff_y: float


def fft_size(n: int) -> int:
    from scipy.fft import next_fast_len

    return next_fast_len(2 * n)


def sampling(pupil: PupilFunction, size: int | None = None) -> Sampling:
    n = pupil.n
    m = size or fft_size(n)
    lam = pupil.wavelength
    return Sampling(n, m, lam * n / (2 * pupil.na_x * m), lam * n / (2 * pupil.na_y * m),
                    2 * pupil.na_x / (lam * n), 2 * pupil.na_y / (lam * n),
                    2 * pupil.na_x / lam, 2 * pupil.na_y / lam)


def psfs(pupils: Sequence[PupilFunction], size: int | None = None) -> np.ndarray:
    """Point spreads of several pupils of the same grid size in one batched FFT:
    an array (len, M, M), each normalised to unit sum, the centre of the wavefront at [0, 0]
    (cyclic; `numpy.fft.fftshift` puts it in the middle)."""
    from scipy import fft

    n = pupils[0].n
    m = size or fft_size(n)
    stack = np.zeros((len(pupils), m, m), dtype=complex)
    for i, p in enumerate(pupils):
        stack[i, :n, :n] = p.field_values()
    # where the pupil sits in the padded grid changes only the phase of the field, not the PSF
    fields = fft.fft2(stack, axes=(-2, -1), workers=WORKERS, overwrite_x=True)
    power = fields.real ** 2 + fields.imag ** 2
    total = power.sum(axis=(-2, -1), keepdims=True)
    total[total == 0] = 1.0
    return power / total


def psf(pupil: PupilFunction, size: int | None = None) -> np.ndarray:
    return psfs([pupil], size)[0]


def otf(spread: np.ndarray) -> np.ndarray:
    """The 2-D OTF of a normalised PSF (zero frequency at [0, 0], numpy's FFT order)."""
    from scipy import fft

    return fft.fft2(spread, workers=WORKERS)


def line_otfs(spreads: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """The OTF along the y axis (tangential) and along x (sagittal) of PSFs (…, M, M),
    through their line spread functions (1-D FFTs): index k is k·step."""
    from scipy import fft

    along_y = fft.fft(spreads.sum(axis=-1), axis=-1, workers=WORKERS)
    along_x = fft.fft(spreads.sum(axis=-2), axis=-1, workers=WORKERS)
    return along_y, along_x


def strehl(pupil: PupilFunction) -> float:
    """|Σ A e^{2πiW}|² / (Σ A)²: the PSF at the wavefront's centre relative to no aberration."""
    a = pupil.amplitude
    total = float(a.sum())
    if total == 0:
        return 0.0
    value = np.sum(a * np.exp(2j * np.pi * pupil.wavefront))
    return float(abs(value) ** 2 / total ** 2)


def marechal(rms_waves: float) -> float:
    """The Maréchal estimate exp(−(2πσ)²) of the Strehl ratio (σ the RMS in waves)."""
    return math.exp(-(2 * math.pi * rms_waves) ** 2)


def _frequencies(pupil: PupilFunction, m: int) -> tuple[np.ndarray, np.ndarray, float]:
    s = sampling(pupil, m)
    fx = np.fft.fftfreq(m, d=s.spacing_x)
    fy = np.fft.fftfreq(m, d=s.spacing_y)
    return fx, fy, (fx[1] - fx[0]) * (fy[1] - fy[0])


def encircled_energy(pupil: PupilFunction, radii: Sequence[float] | float,
                     transfer: np.ndarray | None = None) -> np.ndarray:
    """Fraction of the energy within each radius (layout units) of the wavefront's centre."""
    from scipy.special import j1

    if transfer is None:
        transfer = otf(psf(pupil))
    m = transfer.shape[0]
    fx, fy, area = _frequencies(pupil, m)
    f = np.hypot(fx[None, :], fy[:, None])
    keep = np.abs(transfer) > 1e-12
    values, freq = transfer[keep].real, f[keep]
    out = []
    for r in np.atleast_1d(np.asarray(radii, dtype=float)):
        with np.errstate(invalid="ignore", divide="ignore"):
            kernel = np.where(freq > 0, r * j1(2 * np.pi * r * freq) / freq, np.pi * r * r)
        out.append(float(np.sum(values * kernel) * area))
    return np.clip(np.array(out), 0.0, 1.0)


def ensquared_energy(pupil: PupilFunction, half_widths: Sequence[float] | float,
                     transfer: np.ndarray | None = None) -> np.ndarray:
    """Fraction of the energy within squares of these half-widths about the centre."""
    if transfer is None:
        transfer = otf(psf(pupil))
    m = transfer.shape[0]
    fx, fy, area = _frequencies(pupil, m)
    out = []
    for a in np.atleast_1d(np.asarray(half_widths, dtype=float)):
        kx = 2 * a * np.sinc(2 * a * fx)
        ky = 2 * a * np.sinc(2 * a * fy)
        out.append(float(np.real(ky @ transfer @ kx) * area))
    return np.clip(np.array(out), 0.0, 1.0)


def radius_for_energy(pupil: PupilFunction, fraction: float,
                      transfer: np.ndarray | None = None) -> float | None:
    """The radius holding `fraction` of the energy (bisection on the encircled energy), or
    None when the grid's window cannot hold that much."""
    if transfer is None:
        transfer = otf(psf(pupil))
    s = sampling(pupil, transfer.shape[0])
    far = 0.45 * s.size * min(s.spacing_x, s.spacing_y)  # inside the periodic window
    if encircled_energy(pupil, far, transfer)[0] < fraction:
        return None
    lo, hi = 0.0, far
    for _ in range(48):
        mid = 0.5 * (lo + hi)
        if encircled_energy(pupil, mid, transfer)[0] < fraction:
            lo = mid
        else:
            hi = mid
        if hi - lo < 1e-6 * far:
            break
    return 0.5 * (lo + hi)
