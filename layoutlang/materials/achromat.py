"""The thin-lens achromat condition, derived once and stated as equations with numbers.

Two thin lenses in contact, powers φ₁ and φ₂, indices n(λ) across three wavelengths
λ₁ < λ₂ < λ₃ (F, d, C by default). With ν = (n₂ − 1)/(n₁ − n₃) and the power of each lens
proportional to n − 1, the total power at λ is φ(λ) = Σ φᵢ (nᵢ(λ) − 1)/(nᵢ₂ − 1), so

    φ(λ₁) − φ(λ₃) = φ₁/ν₁ + φ₂/ν₂        (colour: set to zero)
    φ₁ + φ₂ = φ                           (power)
    ⇒ φ₁ = φ ν₁/(ν₁ − ν₂),   φ₂ = −φ ν₂/(ν₁ − ν₂)

and the λ₂ focus is then left behind the common λ₁/λ₃ focus by the secondary spectrum

    s'(λ₁,λ₃) − s'(λ₂) ≈ f (P₁ − P₂)/(ν₁ − ν₂),   P = (n₂ − n₃)/(n₁ − n₃)

(Smith, Modern Optical Engineering, 4th ed. 2008, ch. 5 on secondary spectrum: the usual
thin-lens result, here derived as above; P is the partial dispersion of the middle-to-long pair).
"""

from __future__ import annotations

from dataclasses import dataclass

__all__ = ["ThinAchromat", "thin_achromat"]


@dataclass(frozen=True)
class ThinAchromat:
    """The thin achromat of two media for one focal length (lengths in the caller's unit)."""

    abbe: tuple[float, float]
    partial: tuple[float, float]
    focal_length: float
    element_focal_lengths: tuple[float, float]
    secondary_spectrum: float

    def equations(self, names: tuple[str, str], labels: tuple[str, str, str],
                  unit: str) -> list[str]:
        """The derivation as report lines (plain text, no symbols package needed)."""
        (v1, v2), (p1, p2) = self.abbe, self.partial
        f1, f2 = self.element_focal_lengths
        a, b, c = labels
        return [
            f"thin lenses in contact, Abbe numbers ν = (n_{b} − 1)/(n_{a} − n_{c})",
            "power:  φ₁ + φ₂ = φ",
            "colour: φ₁/ν₁ + φ₂/ν₂ = 0",
            "so:     φ₁ = φ·ν₁/(ν₁ − ν₂),  φ₂ = −φ·ν₂/(ν₁ − ν₂)",
            f"with ν₁ = {v1:.4g} ({names[0]}), ν₂ = {v2:.4g} ({names[1]}) and focal length "
            f"{self.focal_length:.6g} {unit}:",
            f"  {names[0]} element focal length {f1:.6g} {unit}, {names[1]} element focal "
            f"length {f2:.6g} {unit}",
            f"secondary spectrum left (the {b} focus from the common {a}/{c} focus): "
            f"f·(P₁ − P₂)/(ν₁ − ν₂) = {self.secondary_spectrum:.4g} {unit}, "
            f"with P = (n_{b} − n_{c})/(n_{a} − n_{c}) = {p1:.4f}, {p2:.4f}",
        ]


def thin_achromat(first: tuple[float, float, float], second: tuple[float, float, float],
                  focal_length: float) -> ThinAchromat:
    """The thin achromat from each medium's indices at (λ₁, λ₂, λ₃).

    Raises:
        ValueError: when the two media have the same Abbe number (no achromat exists) or a
            medium has no dispersion across the wavelengths.
    """
    abbe, partial = [], []
    for n1, n2, n3 in (first, second):
        if n1 == n3:
            raise ValueError("a medium without dispersion cannot correct colour")
        abbe.append((n2 - 1.0) / (n1 - n3))
        partial.append((n2 - n3) / (n1 - n3))
    v1, v2 = abbe
    if abs(v1 - v2) <= 1e-9 * max(abs(v1), abs(v2)):
        raise ValueError("the two media have the same Abbe number: no achromat exists")
    power = 1.0 / focal_length
    phi1 = power * v1 / (v1 - v2)
    phi2 = -power * v2 / (v1 - v2)
    spectrum = focal_length * (partial[0] - partial[1]) / (v1 - v2)
    return ThinAchromat((v1, v2), (partial[0], partial[1]), focal_length,
                        (1.0 / phi1, 1.0 / phi2), spectrum)
