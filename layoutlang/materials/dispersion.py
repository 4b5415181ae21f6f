"""Dispersion models: how a material's refractive index depends on the wavelength.

Every model is a small frozen dataclass with `index(wavelength_um)` that takes a float or a
numpy array of wavelengths in micrometres and returns the index in the same shape, computed with
numpy array arithmetic (no Python loop per wavelength). A model knows its validity range and
what its indices are relative to (standard air, as glass data usually are, or vacuum).

The formulas, with λ in micrometres:

- constant:          n = n0
- Sellmeier:         n² = A + Σ Bᵢ λ² / (λ² − Cᵢ)     (Cᵢ in µm², the "λ² − C" form)
                     n² = A + Σ Bᵢ λ² / (λ² − λᵢ²)    (λᵢ resonance wavelengths in µm; Cᵢ = λᵢ²)
                     A is 1 in the usual form.
- Cauchy:            n = A₀ + A₁/λ² + A₂/λ⁴ + ...
- glass from nd and νd: a three-term Cauchy formula fitted to nd, the Abbe number νd and
                     the partial dispersion of the normal line, P(g,F) = 0.6438 − 0.001682 νd
                     (the "normal glass" line, from memory), so two such glasses have a
                     realistic secondary spectrum. From nd and νd or the six-digit glass code.
- table:             rows of (λ, n), linear in 1/λ² between neighbouring rows (exact at rows).
- standard air:      Ciddor (1996), Appl. Opt. 35, 1566: dry air, 15 °C, 101 325 Pa,
                     450 ppm CO2: n − 1 = 0.05792105/(238.0185 − σ²) + 0.00167917/(57.362 − σ²),
                     σ = 1/λ in µm⁻¹ (vacuum wavelength), valid 0.23–1.69 µm.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Any

import numpy as np

from .lines import SPECTRAL_LINES

__all__ = [
    "DispersionError", "Dispersion", "Constant", "Sellmeier", "Cauchy", "GlassFromNdVd", "ModelGlass",
    "Table", "StandardAir", "glass_code", "parse_glass_code", "abbe_number",
    "partial_dispersion", "outside_range", "range_warning", "AIR", "VACUUM", "NORMAL_LINE",
]

Wavelengths = Any  # float | numpy.ndarray, in micrometres

#: What a model's indices are relative to.
AIR, VACUUM = "air", "vacuum"

#: The normal line of partial dispersion P(g,F) = a + b·νd (from memory; the line through
#: ordinary crown and flint glasses used in glass makers' technical notes).
NORMAL_LINE = (0.6438, -0.001682)

_D, _F, _C, _G = (SPECTRAL_LINES[k] / 1000.0 for k in ("d", "F", "C", "g"))


class DispersionError(ValueError):
    """A model cannot be built as written, or gives no real index at some wavelength."""


def _array(wavelength_um: Wavelengths) -> np.ndarray:
    return np.asarray(wavelength_um, dtype=float)


def _finish(values: np.ndarray, like: Wavelengths, name: str) -> Any:
    """Check every index is finite and ≥ ~0; return a float for a float argument."""
    if not np.all(np.isfinite(values)) or np.any(values <= 0):
        raise DispersionError(f"{name} gives no real refractive index at some wavelength "
                              "(too close to one of its resonances)")
    return float(values) if np.ndim(like) == 0 else values


@dataclass(frozen=True)
class Dispersion:
    """Common fields of every model.

    Attributes:
        valid_um: (shortest, longest) wavelength in µm where the data hold, or None (anywhere).
        reference: AIR or VACUUM: what the indices are relative to (and the medium in which
            the formula's wavelengths are measured); None for a plain number, which is taken
            to be relative to whatever the layout is in.
        source: who published the formula (for reports).
    """

    def index(self, wavelength_um: Wavelengths) -> Any:  # pragma: no cover - abstract
        raise NotImplementedError

    @property
    def dispersive(self) -> bool:
        return True

    def describe(self) -> str:  # pragma: no cover - abstract
        raise NotImplementedError


@dataclass(frozen=True)
class Constant(Dispersion):
    """n = n0 at every wavelength."""

    n0: float
    valid_um: tuple[float, float] | None = None
    reference: str | None = None
    source: str = ""

    def index(self, wavelength_um: Wavelengths) -> Any:
        if np.ndim(wavelength_um) == 0:
            return self.n0
        return np.full(np.shape(wavelength_um), self.n0, dtype=float)

    @property
    def dispersive(self) -> bool:
        return False

    def describe(self) -> str:
        return f"constant index {self.n0:g}"


@dataclass(frozen=True)
class Sellmeier(Dispersion):
    """n² = constant + Σ Bᵢ λ²/(λ² − Cᵢ), Cᵢ in µm² (see `from_resonances` for λᵢ).

    Attributes:
        strengths: the Bᵢ.
        squares: the Cᵢ in µm² (for the resonance form, λᵢ²).
        constant: A, 1 in the usual form.
        form: 'squares' or 'resonances', how the data were written (for reports).
    """

    strengths: tuple[float, ...]
    squares: tuple[float, ...]
    constant: float = 1.0
    form: str = "squares"
    valid_um: tuple[float, float] | None = None
    reference: str | None = AIR
    source: str = ""

    def __post_init__(self) -> None:
        if len(self.strengths) != len(self.squares) or not self.strengths:
            raise DispersionError("a Sellmeier formula needs one or more (B, C) terms")
        if any(c < 0 for c in self.squares):
            raise DispersionError("a Sellmeier C (a squared wavelength) cannot be negative")

    @classmethod
    def from_resonances(cls, strengths, resonances_um, **options) -> Sellmeier:
        """The λ² − λᵢ² form: resonance wavelengths λᵢ in µm, squared here once."""
        return cls(tuple(strengths), tuple(w * w for w in resonances_um),
                   form="resonances", **options)

    def index(self, wavelength_um: Wavelengths) -> Any:
        lam2 = _array(wavelength_um) ** 2
        n2 = np.full(lam2.shape, self.constant, dtype=float)
        with np.errstate(divide="ignore", invalid="ignore"):
            for b, c in zip(self.strengths, self.squares):  # a loop over terms, not wavelengths
                n2 = n2 + b * lam2 / (lam2 - c)
            n = np.sqrt(np.where(n2 > 0, n2, np.nan))
        return _finish(n, wavelength_um, "this Sellmeier formula")

    def describe(self) -> str:
        terms = len(self.strengths)
        return f"Sellmeier formula, {terms} term{'s' if terms > 1 else ''}"


@dataclass(frozen=True)
class Cauchy(Dispersion):
    """n = A₀ + A₁/λ² + A₂/λ⁴ + ... (λ in µm)."""

    coefficients: tuple[float, ...]
    valid_um: tuple[float, float] | None = None
    reference: str | None = AIR
    source: str = ""

    def __post_init__(self) -> None:
        if not self.coefficients:
            raise DispersionError("a Cauchy formula needs at least one coefficient")

    def index(self, wavelength_um: Wavelengths) -> Any:
        inverse2 = 1.0 / _array(wavelength_um) ** 2
        n = np.zeros(inverse2.shape)
        for coefficient in reversed(self.coefficients):  # Horner in 1/λ²
            n = n * inverse2 + coefficient
        return _finish(n, wavelength_um, "this Cauchy formula")

    def describe(self) -> str:
        return f"Cauchy formula, {len(self.coefficients)} coefficients"


@dataclass(frozen=True)
class GlassFromNdVd(Dispersion):
    """A glass known only by nd and νd, with a normal-line partial dispersion.

    The index follows n = A₀ + A₁/λ² + A₂/λ⁴, solved so that n(d) = nd, n(F) − n(C) =
    (nd − 1)/νd and n(g) − n(F) = P(g,F)·(n(F) − n(C)) with P(g,F) on the normal line.
    """

    nd: float
    vd: float
    valid_um: tuple[float, float] | None = (0.365, 1.014)
    reference: str | None = AIR
    source: str = "glass from nd and νd"
    code: str = ""

    def __post_init__(self) -> None:
        if not (self.nd > 1.0 and math.isfinite(self.nd)):
            raise DispersionError("a glass from nd and νd needs a refractive index above 1")
        if not (self.vd > 0 and math.isfinite(self.vd)):
            raise DispersionError("a glass from nd and νd needs a positive Abbe number")

    @property
    def coefficients(self) -> tuple[float, float, float]:
        p_gf = NORMAL_LINE[0] + NORMAL_LINE[1] * self.vd
        dispersion = (self.nd - 1.0) / self.vd
        rows = [[1.0, _D ** -2, _D ** -4], [0.0, _F ** -2 - _C ** -2, _F ** -4 - _C ** -4],
                [0.0, _G ** -2 - _F ** -2, _G ** -4 - _F ** -4]]
        a0, a1, a2 = np.linalg.solve(np.array(rows), np.array([self.nd, dispersion,
                                                               p_gf * dispersion]))
        return float(a0), float(a1), float(a2)

    def index(self, wavelength_um: Wavelengths) -> Any:
        a0, a1, a2 = self.coefficients
        inverse2 = 1.0 / _array(wavelength_um) ** 2
        return _finish(a0 + inverse2 * (a1 + inverse2 * a2), wavelength_um, "this glass from nd and νd")

    @classmethod
    def from_code(cls, code: str, **options) -> GlassFromNdVd:
        nd, vd = parse_glass_code(code)
        return cls(nd, vd, code=code.split(".")[0], **options)

    def describe(self) -> str:
        code = f"glass code {self.code}: " if self.code else ""
        return f"{code}glass from nd {self.nd:g} and Abbe number {self.vd:g}"


ModelGlass = GlassFromNdVd  # the former name, for code written against it


@dataclass(frozen=True)
class Table(Dispersion):
    """Measured (λ µm, n) rows; linear in 1/λ² between neighbours, the end rows extended."""

    wavelengths_um: tuple[float, ...]
    indices: tuple[float, ...]
    valid_um: tuple[float, float] | None = None
    reference: str | None = AIR
    source: str = ""

    def __post_init__(self) -> None:
        if len(self.wavelengths_um) < 2 or len(self.wavelengths_um) != len(self.indices):
            raise DispersionError("a table needs two or more (wavelength, index) rows")
        if any(b <= a for a, b in zip(self.wavelengths_um, self.wavelengths_um[1:])):
            raise DispersionError("the rows of a table must go from short to long wavelengths")
        if any(w <= 0 for w in self.wavelengths_um) or any(n <= 0 for n in self.indices):
            raise DispersionError("wavelengths and indices in a table must be positive")
        if self.valid_um is None:
            object.__setattr__(self, "valid_um",
                               (self.wavelengths_um[0], self.wavelengths_um[-1]))

    def index(self, wavelength_um: Wavelengths) -> Any:
        # np.interp needs increasing x: 1/λ² falls with λ, so reverse the rows.
        x = 1.0 / np.asarray(self.wavelengths_um[::-1]) ** 2
        y = np.asarray(self.indices[::-1], dtype=float)
        u = 1.0 / _array(wavelength_um) ** 2
        n = np.interp(u, x, y)
        # np.interp holds the end values; continue the end segments' slopes instead.
        low = (y[1] - y[0]) / (x[1] - x[0])
        high = (y[-1] - y[-2]) / (x[-1] - x[-2])
        n = np.where(u < x[0], y[0] + (u - x[0]) * low, n)
        n = np.where(u > x[-1], y[-1] + (u - x[-1]) * high, n)
        return _finish(n, wavelength_um, "this table")

    def describe(self) -> str:
        return f"table of {len(self.indices)} measured indices"


@dataclass(frozen=True)
class StandardAir(Dispersion):
    """Standard dry air, 15 °C, 101 325 Pa, 450 ppm CO2: Ciddor (1996), Appl. Opt. 35, 1566.

    Takes vacuum wavelengths; indices are absolute (relative to vacuum).
    """

    valid_um: tuple[float, float] | None = (0.23, 1.69)
    reference: str | None = VACUUM
    source: str = "Ciddor 1996, Applied Optics 35, 1566"

    def index(self, wavelength_um: Wavelengths) -> Any:
        sigma2 = 1.0 / _array(wavelength_um) ** 2
        n = 1.0 + 0.05792105 / (238.0185 - sigma2) + 0.00167917 / (57.362 - sigma2)
        return _finish(n, wavelength_um, "the standard air formula")

    def describe(self) -> str:
        return "standard air (Ciddor 1996)"


def parse_glass_code(code: str) -> tuple[float, float]:
    """(nd, νd) of a six-digit glass code such as '517642' (international convention: the
    first three digits are (nd − 1)·1000, the last three νd·10); an optional '.ddd' density
    suffix (g/cm³ × 100) is allowed and ignored."""
    digits = code.split(".")[0]
    if len(digits) != 6 or not digits.isdigit() or (
            "." in code and not code.split(".", 1)[1].isdigit()):
        raise DispersionError(f"{code!r} is not a six-digit glass code")
    nd = 1.0 + int(digits[:3]) / 1000.0
    vd = int(digits[3:]) / 10.0
    if vd <= 0 or nd <= 1.0:
        raise DispersionError(f"glass code {digits} gives no glass (index or Abbe number zero)")
    return nd, vd


def glass_code(nd: float, vd: float) -> str:
    """The six-digit glass code of nd and νd (rounded half up, as codes are written)."""
    first = math.floor((nd - 1.0) * 1000.0 + 0.5)
    last = math.floor(vd * 10.0 + 0.5)
    if not (0 < first < 1000 and 0 < last < 1000):
        raise DispersionError("nd and νd outside what a six-digit glass code can hold")
    return f"{first:03d}{last:03d}"


def abbe_number(n_middle: Any, n_short: Any, n_long: Any) -> Any:
    """ν = (n_middle − 1)/(n_short − n_long); with the d, F and C indices this is νd."""
    return (n_middle - 1.0) / (n_short - n_long)


def partial_dispersion(n_x: Any, n_y: Any, n_f: Any, n_c: Any) -> Any:
    """Relative partial dispersion P(x,y) = (n_x − n_y)/(n_F − n_C)."""
    return (n_x - n_y) / (n_f - n_c)


def outside_range(model: Dispersion, wavelength_um: Wavelengths) -> list[float]:
    """The wavelengths (µm) outside the model's validity range, in the order given."""
    valid = getattr(model, "valid_um", None)
    if valid is None:
        return []
    low, high = valid
    values = np.atleast_1d(_array(wavelength_um))
    # a hair of slack so the range's own end points (as written) count as inside
    return [float(w) for w in values if w < low * (1 - 1e-9) or w > high * (1 + 1e-9)]


def range_warning(name: str, model: Dispersion, wavelength_um: Wavelengths) -> str | None:
    """A warning naming the material and its range, or None when all wavelengths are inside."""
    outside = outside_range(model, wavelength_um)
    if not outside:
        return None
    low, high = model.valid_um
    shown = ", ".join(f"{w * 1000:g} nm" for w in outside)
    return (f"{name}: the dispersion data hold from {low * 1000:g} nm to {high * 1000:g} nm; "
            f"{shown} lies outside, the index there is an extrapolation")
