"""The shape of one boundary: the one description of a surface that every engine reads.

A `Profile` answers three questions, for floats, numpy arrays (rays, or a leading sample axis
of tolerance/optimisation samples) and sympy expressions alike:

- `curvature`: the vertex curvature — all the paraxial engine ever needs (a conic or an
  asphere has, by definition, the paraxial behaviour of its vertex sphere);
- `sag(rho)`: the height z of the surface above its vertex plane at rho = x² + y²;
- `slope(rho)`: dz/d(rho), so the (unnormalised) surface normal at (x, y) is
  (-2 x slope, -2 y slope, 1) — the exact-ray engine, edge thickness and drawings use these.

Forms (the surface is a sphere unless the script says more):

- conic: z = c rho / (1 + sqrt(1 - (1 + κ) c² rho)), κ the conic constant (0 sphere, -1
  paraboloid, < -1 hyperboloid, between -1 and 0 prolate ellipsoid, > 0 oblate ellipsoid) —
  the standard form of ISO 10110-12:2019 (Optics and photonics — Preparation of drawings for
  optical elements and systems — Part 12: Aspheric surfaces);
- even asphere: the conic plus sum_i A_{2i} r^{2i} for i = 2, 3, …  (`even_terms` holds A4,
  A6, … in layout units: A4 in 1/length³ and so on);
- Forbes Q-type "Qcon": the conic plus u⁴ sum_m a_m Q_m^con(u²), u = r / r_norm, where
  Q_m^con(x) = P_m^(0,4)(2x - 1) are Jacobi polynomials (G. W. Forbes 2007, "Shape
  specification for axially symmetric optical surfaces", Opt. Express 15:5218; also
  ISO 10110-12). `q_terms` holds a_0, a_1, … in layout length units, `q_radius` is r_norm.

Where the square root's argument turns negative the sag does not exist (a sphere used past its
hemisphere, an ellipsoid past its rim): `sag` and `slope` then give NaN for arrays and raise
`ValueError` for plain floats; `domain_radius()` says how far from the axis the surface exists.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Any

__all__ = ["Profile", "SPHERE_FORM", "CONIC_FORM", "EVEN_FORM", "QCON_FORM", "sqrt_of"]

Number = Any  # float | numpy.ndarray | sympy.Expr

SPHERE_FORM, CONIC_FORM, EVEN_FORM, QCON_FORM = "sphere", "conic", "even asphere", "Q-type asphere"


def sqrt_of(value: Number) -> Number:
    """The square root for whatever kind of number arrives (float, numpy array, sympy)."""
    module = type(value).__module__
    if module.startswith("numpy"):
        import numpy as np

        with np.errstate(invalid="ignore"):
            return np.sqrt(value)
    if isinstance(value, (int, float)):
        return math.sqrt(value)  # ValueError below zero: the caller says where
    import sympy

    return sympy.sqrt(value)


@dataclass(frozen=True)
class Profile:
    """A rotationally symmetric surface profile about its own local z axis.

    Attributes:
        curvature: vertex curvature 1/R (0 for flat), positive with the centre in +z.
        conic: the conic constant κ (0 for a sphere).
        even_terms: A4, A6, A8, … of the even polynomial (empty for none).
        q_terms: a_0, a_1, … of the Forbes Qcon polynomial (empty for none).
        q_radius: its normalisation radius (required with `q_terms`).
    """

    curvature: Number = 0.0
    conic: Number = 0.0
    even_terms: tuple[Number, ...] = ()
    q_terms: tuple[Number, ...] = ()
    q_radius: Number | None = None

    @property
    def form(self) -> str:
        if self.q_terms:
            return QCON_FORM
        if self.even_terms:
            return EVEN_FORM
        if _nonzero(self.conic):
            return CONIC_FORM
        return SPHERE_FORM

    @property
    def is_sphere(self) -> bool:
        """A sphere or plane: the engines may use their closed-form intersection."""
        return self.form == SPHERE_FORM

    @property
    def is_flat(self) -> bool:
        return self.is_sphere and not _nonzero(self.curvature)

    def base_sag(self, rho: Number) -> Number:
        """The conic (or sphere) part of the sag at rho = r²."""
        c, k = self.curvature, self.conic
        return c * rho / (1 + sqrt_of(1 - (1 + k) * c * c * rho))

    def base_slope(self, rho: Number) -> Number:
        """d(base sag)/d(rho) = c / (2 sqrt(1 - (1 + κ) c² rho))."""
        c, k = self.curvature, self.conic
        return c / (2 * sqrt_of(1 - (1 + k) * c * c * rho))

    def sag(self, rho: Number) -> Number:
        """Height of the surface above the vertex plane at rho = x² + y²."""
        z = self.base_sag(rho)
        if self.even_terms:
            z = z + _even_polynomial(self.even_terms, rho)[0]
        if self.q_terms:
            z = z + self._qcon(rho)[0]
        return z

    def polynomial(self, rho: Number) -> tuple[Number, Number]:
        """The part of the sag beyond the conic and its rho-derivative, (P, dP/drho): zero
        for a sphere or conic. The exact-ray engine intersects the conic c ρ + c (1 + κ) w² = 2 w
        in w = z - P(ρ), which needs no square root."""
        value, derivative = 0, 0
        if self.even_terms:
            value, derivative = _even_polynomial(self.even_terms, rho)
        if self.q_terms:
            q_value, q_derivative = self._qcon(rho)
            value, derivative = value + q_value, derivative + q_derivative
        return value, derivative

    def slope(self, rho: Number) -> Number:
        """dz/d(rho): the normal at (x, y) is proportional to (-2x·slope, -2y·slope, 1)."""
        s = self.base_slope(rho)
        if self.even_terms:
            s = s + _even_polynomial(self.even_terms, rho)[1]
        if self.q_terms:
            s = s + self._qcon(rho)[1]
        return s

    def fourth_order(self) -> Number:
        """The r⁴ coefficient of the sag beyond the vertex sphere's c³/8: κ c³/8 + A4, plus the
        Q-type terms' r⁴ part Σ a_m Q_m(0) / r_norm⁴ with Q_m(0) = P_m^(0,4)(-1) =
        (-1)^m C(m + 4, 4) (A&S 1964, 22.4.1). It is all the third-order (Seidel) sums see
        of a conic or an asphere. Works over floats and sympy."""
        c = self.curvature
        value = self.conic * c * c * c / 8
        if self.even_terms:
            value = value + self.even_terms[0]
        if self.q_terms:
            scale = self.q_radius ** 4
            for m, a in enumerate(self.q_terms):
                value = value + a * (-1) ** m * math.comb(m + 4, 4) / scale
        return value

    def sag_at_height(self, height: Number) -> Number:
        return self.sag(height * height)

    def domain_radius(self) -> float:
        """How far from the axis the surface exists (inf when it exists everywhere): the
        conic's square root needs (1 + κ) c² r² ≤ 1. Floats only (a checking aid)."""
        c, k = float(self.curvature), float(self.conic)
        reach = (1 + k) * c * c
        return math.inf if reach <= 0 else 1 / math.sqrt(reach)

    def _qcon(self, rho: Number) -> tuple[Number, Number]:
        """Forbes Qcon term and its rho-derivative: u⁴ Σ a_m Q_m(u²), u² = rho / r_norm²."""
        scale = 1 / (self.q_radius * self.q_radius)
        x = rho * scale
        total, total_slope = _jacobi_0_4_series(self.q_terms, x)
        value = x * x * total
        derivative = (2 * x * total + x * x * total_slope) * scale
        return value, derivative


def _nonzero(value: Number) -> bool:
    """True unless the value is exactly zero (arrays: any element non-zero; sympy: not 0)."""
    try:
        return bool(value != 0)
    except (TypeError, ValueError):  # an array: ambiguous truth value
        return bool((value != 0).any())


def _even_polynomial(terms: tuple[Number, ...], rho: Number) -> tuple[Number, Number]:
    """sum_i A_{2i} rho^i (i from 2) and its rho-derivative sum_i i A_{2i} rho^(i-1), by
    Horner's rule (terms[j] is the coefficient of r^(2j+4))."""
    inner, inner_slope = 0, 0
    for j in range(len(terms) - 1, -1, -1):
        inner = inner * rho + terms[j]
        inner_slope = inner_slope * rho + (j + 2) * terms[j]
    return inner * rho * rho, inner_slope * rho


def _jacobi_0_4_series(coefficients: tuple[Number, ...], x: Number) -> tuple[Number, Number]:
    """sum_m a_m P_m^(0,4)(2x - 1) and its x-derivative by the three-term recurrence
    (Abramowitz & Stegun 1964, Handbook of Mathematical Functions, 22.7.1), α = 0, β = 4."""
    t = 2 * x - 1
    alpha, beta = 0, 4
    previous, previous_slope = 1, 0  # P_0 and dP_0/dt
    total = coefficients[0] * previous
    total_slope = 0
    if len(coefficients) == 1:
        return total, total_slope
    current = (alpha + 1) + (alpha + beta + 2) * (t - 1) / 2
    current_slope = (alpha + beta + 2) / 2
    total = total + coefficients[1] * current
    total_slope = total_slope + coefficients[1] * current_slope
    for n in range(2, len(coefficients)):
        s = 2 * n + alpha + beta
        denominator = 2 * n * (n + alpha + beta) * (s - 2)
        a = (s - 1) * s * (s - 2) / denominator
        b = (s - 1) * (alpha * alpha - beta * beta) / denominator
        c = 2 * (n + alpha - 1) * (n + beta - 1) * s / denominator
        following = (a * t + b) * current - c * previous
        following_slope = a * current + (a * t + b) * current_slope - c * previous_slope
        previous, previous_slope, current, current_slope = (
            current, current_slope, following, following_slope)
        total = total + coefficients[n] * current
        total_slope = total_slope + coefficients[n] * current_slope
    return total, 2 * total_slope  # dt/dx = 2
