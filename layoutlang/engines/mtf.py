"""Modulation transfer: diffraction MTF (by FFT of the pupil function), polychromatic with
weights, the diffraction limit of the same pupil, the geometric MTF as a fallback, and through
focus.

Orientation (common practice): *tangential* is the spatial frequency along the field direction
(y, in the meridional plane), *sagittal* across it (x). Frequencies are in cycles per layout
unit (cycles/mm for `units mm`).

Polychromatic: each wavelength's PSF is normalised to unit energy and weighted; the OTFs are
added as complex numbers, each with the phase of its PSF's centre relative to the primary's
(so lateral colour lowers the MTF as it does on a sensor) — common practice, e.g. W. J. Smith,
Modern Optical Engineering (2008), ch. 11.

Geometric MTF (named so wherever it is used): the Fourier transform of the spot diagram's ray
density, |mean exp(−2πi f y)|; used when the wavefront is too steep for the pupil grid (more
than `wavefront.STEEP_WAVES` between neighbouring cells), where the FFT would alias.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Sequence

import numpy as np

from .psf import Sampling, line_otfs, psfs, sampling
from .wavefront import STEEP_WAVES, Wavefront, wavefront

__all__ = ["Transfer", "transfer", "transfers", "through_focus", "geometric"]


@dataclass(frozen=True)
class Transfer:
    """MTF against frequency at one field (and the weighted wavelengths).

    Attributes:
        frequencies: cycles per layout unit.
        tangential, sagittal: the MTF at each frequency.
        limit_tangential, limit_sagittal: the same pupil without aberration (diffraction limit).
        method: 'diffraction' or 'geometric'.
        note: why the geometric MTF was used, or ''.
        cutoff: the incoherent cut-off 2 NA / λ of the primary (tangential).
        sampling: how the primary's pupil was sampled.
    """

    field: float
    frequencies: np.ndarray
    tangential: np.ndarray
    sagittal: np.ndarray
    limit_tangential: np.ndarray
    limit_sagittal: np.ndarray
    method: str
    note: str
    cutoff: float
    sampling: Sampling

    def at(self, frequency: float, orientation: str | None) -> float:
        t = float(np.interp(frequency, self.frequencies, self.tangential))
        s = float(np.interp(frequency, self.frequencies, self.sagittal))
        if orientation == "tangential":
            return t
        if orientation == "sagittal":
            return s
        return min(t, s)


def _interp_complex(line: np.ndarray, step: float, f: np.ndarray) -> np.ndarray:
    """Complex OTF along one axis (numpy FFT order, index k at k·step) at frequencies f ≥ 0."""
    m = line.shape[-1]
    k = f / step
    lo = np.floor(k).astype(int)
    frac = k - lo
    half = m // 2
    inside = lo + 1 < half
    lo_c = np.clip(lo, 0, half - 1)
    hi_c = np.clip(lo + 1, 0, half - 1)
    value = line[lo_c] * (1 - frac) + line[hi_c] * frac
    return np.where(inside, value, 0.0)


def geometric(wavefronts: Sequence[Wavefront], weights: Sequence[float], f: np.ndarray
              ) -> tuple[np.ndarray, np.ndarray]:
    """Weighted geometric MTF (tangential, sagittal) from the ray intercepts on the plane."""
    total_t = np.zeros(len(f), dtype=complex)
    total_s = np.zeros(len(f), dtype=complex)
    centre = wavefronts[0].centre
    for wf, w in zip(wavefronts, weights):
        x, y = wf.bundle.on_plane(wf.shift)
        if not len(x):
            continue
        x, y = x - centre[0], y - centre[1]
        total_t += w * np.exp(-2j * np.pi * np.outer(f, y)).mean(axis=1)
        total_s += w * np.exp(-2j * np.pi * np.outer(f, x)).mean(axis=1)
    norm = sum(weights) or 1.0
    return np.abs(total_t) / norm, np.abs(total_s) / norm


def transfers(fields: Sequence[Sequence[Wavefront]], weights: Sequence[float],
              frequencies: Sequence[float], limit: bool = True) -> list[Transfer]:
    """The MTF at several fields, each a list of wavefronts (one per wavelength, primary
    first), with every PSF of the same grid size computed in one batched FFT."""
    f = np.asarray(frequencies, dtype=float)
    pupils = [wf.pupil_function() for group in fields for wf in group]
    perfect = [p.perfect() for p in pupils] if limit else []
    spreads = psfs(pupils + perfect) if pupils else np.zeros((0, 1, 1))
    along_y, along_x = line_otfs(spreads)
    out, index = [], 0
    norm = float(sum(weights)) or 1.0
    for group in fields:
        first = sampling(pupils[index], spreads.shape[-1])
        ref = group[0].pupil_function().centre
        t = np.zeros(len(f), dtype=complex)
        s = np.zeros(len(f), dtype=complex)
        lt = np.zeros(len(f))
        ls = np.zeros(len(f))
        for j, (wf, w) in enumerate(zip(group, weights)):
            p = pupils[index + j]
            samp = sampling(p, spreads.shape[-1])
            cx, cy = p.centre[0] - ref[0], p.centre[1] - ref[1]
            t += w * _interp_complex(along_y[index + j], samp.step_y, f) * np.exp(-2j * np.pi * f * cy)
            s += w * _interp_complex(along_x[index + j], samp.step_x, f) * np.exp(-2j * np.pi * f * cx)
            if limit:
                k = len(pupils) + index + j
                lt += w * np.abs(_interp_complex(along_y[k], samp.step_y, f))
                ls += w * np.abs(_interp_complex(along_x[k], samp.step_x, f))
        method, note = "diffraction", ""
        steep = max(wf.steep for wf in group)
        if steep > STEEP_WAVES:
            method = "geometric"
            note = (f"geometric MTF: the wavefront changes by up to {steep:.3g} waves between "
                    f"neighbouring cells of the {group[0].bundle.cells}-cell grid (more than "
                    f"{STEEP_WAVES}), too steep for the diffraction MTF")
            gt, gs = geometric(group, weights, f)
            t, s = gt * norm, gs * norm
        out.append(Transfer(group[0].bundle.field, f, np.abs(t) / norm, np.abs(s) / norm,
                            lt / norm if limit else np.zeros(len(f)),
                            ls / norm if limit else np.zeros(len(f)), method, note,
                            first.cutoff_y, first))
        index += len(group)
    return out


def transfer(group: Sequence[Wavefront], weights: Sequence[float],
             frequencies: Sequence[float], limit: bool = True) -> Transfer:
    return transfers([group], weights, frequencies, limit)[0]


def through_focus(bundles, weights: Sequence[float], frequency: float,
                  shifts: Sequence[float]) -> tuple[np.ndarray, np.ndarray]:
    """Tangential and sagittal MTF at one frequency against the plane's shift along the path
    (the rays are traced once; only the reference sphere moves)."""
    groups = [[wavefront(b, shift) for b in bundles] for shift in shifts]
    found = transfers(groups, weights, [frequency], limit=False)
    return (np.array([tr.tangential[0] for tr in found]),
            np.array([tr.sagittal[0] for tr in found]))
