"""Third-order (Seidel) aberration sums: which surface contributes which aberration.

Surface contributions from the paraxial marginal ray (y, u) and chief ray (ȳ, ū), as in
W. T. Welford, 1986, Aberrations of Optical Systems, ch. 8 (sign convention of his book: the
refraction n'u' - nu = -y c (n' - n), which is the paraxial engine's nu' = nu - y·phi):

    A = n i = n (y c + u)          Ā = n ī = n (ȳ c + ū)          H = n (ū y - u ȳ)
    S_I   = -A² y Δ(u/n)           S_II  = -A Ā y Δ(u/n)          S_III = -Ā² y Δ(u/n)
    S_IV  = -H² c Δ(1/n)           S_V   = (Ā/A) (S_III + S_IV)
    C_I   =  A y Δ(δn/n)           C_II  =  Ā y Δ(δn/n)

Δ(x) is x after the surface minus x before it. S_V is evaluated in the equivalent form
-Ā³ y Δ(1/n²) + Ā ȳ c Δ(1/n) (Ā y + H), which needs no division by A (A = 0 at a surface
concentric with the axial image point). The Petzval sum is P = Σ c (n' - n)/(n n') and the
Petzval surface has radius -1/(n_k P) in image space (a positive thin lens in air: -n f).

A conic or asphere adds the contributions of its r⁴ deformation b beyond the vertex sphere
(b = κ c³/8 + A4, `Profile.fourth_order`), with Δn = n' - n (Welford 1986, ch. 8, the aspheric
surface terms; also H. H. Hopkins 1950, Wave Theory of Aberrations):

    δS_I = 8 b Δn y⁴   δS_II = 8 b Δn y³ ȳ   δS_III = 8 b Δn y² ȳ²   δS_IV = 0   δS_V = 8 b Δn y ȳ³

Mirrors use the usual trick (index changes sign after reflection). An ideal `lens` images
every point perfectly (see `realrays`), so it contributes nothing. δn is the index at the
blue end minus that at the red end (F and C when listed, else the shortest and longest listed
wavelengths); with constant indices it is zero and so are the chromatic sums.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Any, Sequence

from ..system import IDEAL, System
from .firstorder import FirstOrder, Unavailable, first_order
from .paraxial import thin_lens_power

__all__ = ["SurfaceSums", "SeidelSums", "seidel", "seidel_from_rays"]

Value = Any


@dataclass(frozen=True)
class SurfaceSums:
    """The third-order contributions of one boundary (lengths in layout units)."""

    name: str
    spherical: float  # S I
    coma: float  # S II
    astigmatism: float  # S III
    field_curvature: float  # S IV (Petzval)
    distortion: float  # S V
    axial_colour: float  # C I
    lateral_colour: float  # C II
    petzval: float  # this surface's term of the Petzval sum (1/length)


@dataclass(frozen=True)
class SeidelSums:
    """Per-surface contributions and their totals."""

    surfaces: tuple[SurfaceSums, ...]
    lagrange_invariant: float
    image_index: float  # signed: carries the sense of travel in image space

    def total(self, name: str) -> float:
        """The sum over the surfaces (a float, or an exact ratio from the symbolic engine)."""
        values = [getattr(s, name) for s in self.surfaces]
        total = values[0] if values else 0.0
        for value in values[1:]:
            total = total + value
        return float(total) if isinstance(total, (int, float)) else total

    @property
    def petzval_sum(self) -> float:
        return self.total("petzval")

    @property
    def petzval_radius(self) -> Value:
        total = self.petzval_sum
        if total == 0:
            return Unavailable("flat: the Petzval sum is zero")
        return -1.0 / (self.image_index * total)


def seidel_from_rays(system: System, y: float, nu: float, y_bar: float, nu_bar: float,
                     indices: Sequence[Any] | None = None,
                     dispersions: Sequence[Any] | None = None,
                     number: Any = float) -> SeidelSums:
    """Seidel sums from the marginal (y, nu) and chief (ȳ, ν̄) rays at the first vertex.

    Args:
        system: the layout.
        y, nu: marginal ray height and reduced angle n·u at the first vertex.
        y_bar, nu_bar: the same for the chief ray.
        indices: physical index of each space (the layout's own by default).
        dispersions: δn of each space (short minus long wavelength); zeros by default.
        number: how a layout number is read: `float` for the numeric engine; the symbolic
            engine passes its exact ratios through unchanged (the sums are then rational
            functions of the symbols, polynomial in conic constants and coefficients).
    """
    indices = list(system.indices() if indices is None else indices)
    dispersions = list(dispersions) if dispersions is not None else [0.0] * len(indices)
    senses = system.directions()
    signed = [s * number(n) for s, n in zip(senses, indices)]
    signed_dn = [s * number(d) for s, d in zip(senses, dispersions)]
    lagrange = nu_bar * y - nu * y_bar  # H = n (ū y - u ȳ)
    rows = []
    for i, boundary in enumerate(system.boundaries):
        n, n2 = signed[i], signed[i + 1]
        c = number(boundary.curvature)
        b = 0.0 if boundary.kind == IDEAL or (number is float and boundary.is_spherical) else \
            number(boundary.profile.fourth_order())
        if boundary.kind == IDEAL:
            phi = thin_lens_power(n, senses[i], number(boundary.power))
            nu2, nu_bar2 = nu - y * phi, nu_bar - y_bar * phi
            rows.append(SurfaceSums(boundary.name, 0.0, 0.0, 0.0, 0.0, 0.0, 0.0, 0.0, 0.0))
        else:
            phi = c * (n2 - n)
            nu2, nu_bar2 = nu - y * phi, nu_bar - y_bar * phi
            a = n * y * c + nu
            a_bar = n * y_bar * c + nu_bar
            d_u_n = nu2 / (n2 * n2) - nu / (n * n)
            d_1_n = 1 / n2 - 1 / n
            d_1_n2 = 1 / (n2 * n2) - 1 / (n * n)
            d_dn_n = signed_dn[i + 1] / n2 - signed_dn[i] / n
            e = 8 * b * (n2 - n)  # the aspheric factor 8 b Δn
            rows.append(SurfaceSums(
                boundary.name,
                spherical=-a * a * y * d_u_n + e * y ** 4,
                coma=-a * a_bar * y * d_u_n + e * y ** 3 * y_bar,
                astigmatism=-a_bar * a_bar * y * d_u_n + e * y * y * y_bar * y_bar,
                field_curvature=-lagrange * lagrange * c * d_1_n,
                distortion=-a_bar ** 3 * y * d_1_n2 + a_bar * y_bar * c * d_1_n * (
                    a_bar * y + lagrange) + e * y * y_bar ** 3,
                axial_colour=a * y * d_dn_n,
                lateral_colour=a_bar * y * d_dn_n,
                petzval=-c * d_1_n,
            ))
        nu, nu_bar = nu2, nu_bar2
        if i < len(system.gaps):
            tau = number(system.gaps[i]) / number(indices[i + 1])
            y, y_bar = y + tau * nu, y_bar + tau * nu_bar
    return SeidelSums(tuple(rows), number(lagrange), signed[-1])


def seidel(system: System, results: FirstOrder | None = None,
           indices: Sequence[Any] | None = None,
           dispersions: Sequence[Any] | None = None) -> SeidelSums | Unavailable:
    """Seidel sums of a layout for its full aperture and full field (needs a stop)."""
    results = results or first_order(system)
    for name in ("entrance pupil position", "entrance pupil diameter"):
        if isinstance(results[name], Unavailable):
            return Unavailable(f"none: the {name} is {results[name]}")
    indices = list(system.indices() if indices is None else indices)
    if dispersions is None:
        dispersions = _dispersions(system)
    n0 = float(indices[0])
    entrance = float(results["entrance pupil position"])
    radius = float(results["entrance pupil diameter"]) / 2
    obj = system.object
    if obj.at_infinity:
        y, nu = radius, 0.0
        nu_bar = -n0 * math.tan(float(obj.field_angle))
        y_bar = -entrance * nu_bar / n0
    else:
        distance, height = float(obj.distance), float(obj.height)
        if entrance + distance == 0:
            return Unavailable("none: the entrance pupil lies at the object")
        slope = radius / (entrance + distance)
        y, nu = distance * slope, n0 * slope
        slope_bar = -height / (entrance + distance)
        y_bar, nu_bar = height + distance * slope_bar, n0 * slope_bar
    return seidel_from_rays(system, y, nu, y_bar, nu_bar, indices, dispersions)


def colour_ends(system: System) -> tuple[float, float] | None:
    """The blue and red wavelengths (layout units) of the chromatic sums: F and C (or F' and
    C') when listed, else the shortest and longest listed; None with fewer than two."""
    from ..materials.lines import colour_pair
    from ..measure import from_nanometres, to_nanometres

    pair = colour_pair((to_nanometres(float(w.value), system.units) for w in system.wavelengths),
                       system.environment)
    if pair is None:
        return None
    return from_nanometres(pair[1], system.units), from_nanometres(pair[2], system.units)


def _dispersions(system: System) -> list[float]:
    """δn per space between the blue and red ends of `colour_ends` (zeros with fewer than
    two wavelengths; media without dispersion give zero by themselves)."""
    ends = colour_ends(system)
    if ends is None:
        return [0.0] * (len(system.boundaries) + 1)
    short, long = system.indices(ends[0]), system.indices(ends[1])
    return [float(a) - float(b) for a, b in zip(short, long)]
