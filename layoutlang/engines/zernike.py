"""Zernike polynomials in Noll's indexing, and the least-squares fit of a wavefront to them.

Indexing and normalisation follow R. J. Noll, "Zernike polynomials and atmospheric turbulence",
J. Opt. Soc. Am. 66, 207 (1976): j = 1, 2, 3, ... ordered by radial degree n, then by |m|;
even j carries cos(mθ), odd j sin(mθ); each term is normalised to unit RMS over the unit disk,

    Z_j = sqrt(n + 1) R_n^m(ρ)                 m = 0
    Z_j = sqrt(2 (n + 1)) R_n^m(ρ) cos(m θ)     m ≠ 0, j even
    Z_j = sqrt(2 (n + 1)) R_n^m(ρ) sin(m θ)     m ≠ 0, j odd

with θ measured from the x axis towards y, so a coefficient is the RMS (in waves) that term
contributes over a full circular pupil. On an annular or vignetted pupil the terms are no longer
orthogonal; the fit is still the least-squares one over the rays that arrive, and says so.

Names: the meridional plane is y-z, so a field along y gives 'vertical' coma (sin θ) and
'vertical' astigmatism (cos 2θ: lines along x and y; 'oblique' is sin 2θ, at ±45°), as the
trade says; terms of three or more lobes are named by their function ('cosine trefoil').
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Sequence

from typing import TYPE_CHECKING

if TYPE_CHECKING:  # numpy is imported where polynomials are evaluated: the names need none
    import numpy as np

__all__ = ["noll_to_nm", "zernike", "term_name", "TERM_NAMES", "TERM_COUNT", "lookup_term",
           "ZernikeFit", "fit"]


def noll_to_nm(j: int) -> tuple[int, int]:
    """(n, m) of Noll's term j; m is signed: negative for the sin terms (odd j)."""
    if j < 1:
        raise ValueError("Noll indices start at 1")
    n = int((math.isqrt(8 * j - 7) - 1) // 2)
    k = j - n * (n + 1) // 2 - 1  # position within the row of degree n
    m = 2 * ((k + 1) // 2) if n % 2 == 0 else 2 * (k // 2) + 1
    return n, (-m if (m and j % 2) else m)


def _radial(n: int, m: int, rho: np.ndarray) -> np.ndarray:
    import numpy as np

    m = abs(m)
    total = np.zeros_like(rho)
    for s in range((n - m) // 2 + 1):
        c = ((-1) ** s * math.factorial(n - s)
             / (math.factorial(s) * math.factorial((n + m) // 2 - s)
                * math.factorial((n - m) // 2 - s)))
        total = total + c * rho ** (n - 2 * s)
    return total


def zernike(j: int, rho: np.ndarray, theta: np.ndarray) -> np.ndarray:
    """Noll's normalised term j at polar pupil coordinates (ρ ≤ 1, θ from x towards y)."""
    import numpy as np

    n, m = noll_to_nm(j)
    radial = _radial(n, m, np.asarray(rho, dtype=float))
    if m == 0:
        return math.sqrt(n + 1) * radial
    angular = np.cos(m * theta) if m > 0 else np.sin(-m * theta)
    return math.sqrt(2 * (n + 1)) * radial * angular


_ROUND = {0: "", 1: "", 2: "secondary ", 3: "tertiary "}
_M_WORDS = {1: "coma", 2: "astigmatism", 3: "trefoil", 4: "quadrafoil", 5: "pentafoil"}


def term_name(j: int) -> str:
    """The plain name of Noll term j ('defocus', 'vertical coma', 'secondary spherical')."""
    n, m = noll_to_nm(j)
    if m == 0:
        base = {0: "piston", 2: "defocus", 4: "spherical"}.get(n)
        if base is not None:
            return base
        return f"{_ROUND.get(n // 2 - 1, f'order {n} ')}spherical".strip()
    am = abs(m)
    if am == 1 and n == 1:
        return "tilt x" if m > 0 else "tilt y"
    word = _M_WORDS.get(am, f"{am}-fold")
    first = {1: 3, 2: 2, 3: 3, 4: 4, 5: 5}.get(am, am)
    order = (n - first) // 2
    prefix = _ROUND.get(order + 1 if order else 0, f"order {n} ")
    if am == 1:
        side = "horizontal" if m > 0 else "vertical"
    elif am == 2:
        side = "vertical" if m > 0 else "oblique"
    else:
        side = "cosine" if m > 0 else "sine"
    return f"{prefix}{side} {word}"


#: terms the wavefront fit keeps (Noll 1..22: through secondary spherical)
TERM_COUNT = 22
#: Names of those terms, index → name.
TERM_NAMES = {j: term_name(j) for j in range(1, TERM_COUNT + 1)}
_BY_NAME = {name: j for j, name in TERM_NAMES.items()}
_BY_NAME.update({"primary spherical": 11, "x tilt": 2, "y tilt": 3, "focus": 4})


def lookup_term(words: str) -> int | None:
    """Noll index of a term name (or None)."""
    return _BY_NAME.get(" ".join(words.lower().split()))


@dataclass(frozen=True)
class ZernikeFit:
    """Coefficients (waves, RMS-normalised) of terms 1..len, and the RMS of what is left."""

    coefficients: tuple[float, ...]
    residual_rms: float
    points: int
    full_circle: bool  # False on an annular or vignetted pupil: terms not orthogonal there

    def coefficient(self, j: int) -> float:
        return self.coefficients[j - 1]

    def named(self) -> list[tuple[int, str, float]]:
        return [(j, term_name(j), c) for j, c in enumerate(self.coefficients, start=1)]


def fit(x: np.ndarray, y: np.ndarray, w: np.ndarray, terms: int = 22,
        full_circle: bool = True) -> ZernikeFit:
    """Least-squares Zernike coefficients of values `w` at pupil points (x, y), |(x, y)| ≤ 1.

    Solved with numpy's SVD-based `lstsq`, so a term the sampled points cannot tell apart from
    others (too few points) gets the minimum-norm share instead of a huge number.
    """
    import numpy as np

    x, y, w = (np.asarray(a, dtype=float).ravel() for a in (x, y, w))
    rho = np.hypot(x, y)
    theta = np.arctan2(y, x)
    basis = np.stack([zernike(j, rho, theta) for j in range(1, terms + 1)], axis=1)
    coefficients, *_ = np.linalg.lstsq(basis, w, rcond=None)
    left = w - basis @ coefficients
    residual = float(np.sqrt(np.mean(left * left))) if len(w) else 0.0
    return ZernikeFit(tuple(float(c) for c in coefficients), residual, len(w), full_circle)


def names(terms: Sequence[int]) -> list[str]:
    return [term_name(j) for j in terms]
