"""Colour of lenses against the textbook results: the thin singlet's axial colour, the
thin-lens achromat condition and the secondary spectrum it leaves.

Sources: W. J. Smith, "Modern Optical Engineering", 4th ed. (2008), ch. 5 (chromatic
aberration of a thin lens, f/V; the achromat condition φ₁/V₁ + φ₂/V₂ = 0; secondary spectrum
f (P₁ − P₂)/(V₁ − V₂) with P = (nd − nC)/(nF − nC)); E. Hecht, "Optics", 5th ed. (2017),
§6.3.2 (thin achromatic doublets). From memory.
"""

from __future__ import annotations

import numpy as np
import pytest

import layoutlang
from layoutlang.engines import chromatic
from layoutlang.engines.firstorder import first_order
from layoutlang.materials.achromat import thin_achromat

LINES = "wavelengths d primary, F, C\n"
PAIRS = {
    # glasses from nd and νd, by glass code (an ordinary crown and flint)
    "glass": ("medium crown glass code 517642\nmedium flint glass code 620364\n", ""),
    # the plastic achromat of the stdlib: PMMA and polycarbonate
    "plastic": ("", "use materials\n"),
}
NAMES = {"glass": ("crown", "flint"), "plastic": ("pmma", "polycarbonate")}


def doublet(pair: str, r1: float, r2: float, r3: float, t1: float, t2: float):
    media, use = PAIRS[pair]
    first, second = NAMES[pair]
    text = (use + LINES + media + "object at infinity\nstart in air\n"
            f"surface a radius {r1!r} into {first}\ngap {t1!r}\n"
            f"surface b radius {r2!r} into {second}\ngap {t2!r}\n"
            f"surface c radius {r3!r} into air\nimage at focus\n")
    return layoutlang.loads(text).system


def colour(system, quantity: str) -> float:
    d, f, c = (w.value for w in system.wavelengths)
    waves = {"axial colour": ((f, c), ("F", "C")),
             "secondary spectrum": ((f, d, c), ("F", "d", "C"))}[quantity]
    return chromatic.evaluate(chromatic.Request(quantity, *waves), system)


def indices(system, name: str) -> tuple[float, float, float]:
    waves = [w.value for w in system.wavelengths]
    medium = system.medium(name)
    n = medium.index_at(system.to_micrometres(np.array([waves[1], waves[0], waves[2]])),
                        system.environment)
    return tuple(float(x) for x in n)


def thin_design(pair: str, focal: float = 100.0):
    """Thin-lens achromat, equiconvex first element, cemented: radii from the element powers."""
    probe = doublet(pair, 50.0, -50.0, -500.0, 0.0, 0.0)
    first, second = NAMES[pair]
    n1, n2 = indices(probe, first), indices(probe, second)
    design = thin_achromat(n1, n2, focal)
    f1, f2 = design.element_focal_lengths
    r1 = 2 * (n1[1] - 1) * f1
    r3 = 1 / (-1 / r1 - 1 / (f2 * (n2[1] - 1)))
    return design, r1, -r1, r3


def test_thin_singlet_axial_colour_is_minus_f_over_abbe_number() -> None:
    # Smith (2008) ch. 5: a thin lens's focus moves by −f/V between F and C.
    text = ("use materials\n" + LINES + "object at infinity\nstart in air\n"
            "surface a radius 45.8 into fused_silica\ngap 0\n"
            "surface b radius -45.8 into air\nimage at focus\n")
    system = layoutlang.loads(text).system
    f = first_order(system)["focal length"]
    abbe = chromatic.evaluate(chromatic.Request(
        "abbe number", tuple(system.wavelengths[i].value for i in (1, 0, 2)), ("F", "d", "C"),
        medium="fused_silica", model=system.medium("fused_silica").model), system)
    assert colour(system, "axial colour") == pytest.approx(-f / abbe, rel=0.01)


@pytest.mark.parametrize("pair", ["glass", "plastic"])
def test_thin_achromat_has_no_f_to_c_colour_and_the_predicted_secondary_spectrum(pair) -> None:
    design, r1, r2, r3 = thin_design(pair)
    thin = doublet(pair, r1, r2, r3, 0.0, 0.0)
    assert first_order(thin)["focal length"] == pytest.approx(100.0, rel=1e-12)
    assert abs(colour(thin, "axial colour")) < 1e-9
    assert colour(thin, "secondary spectrum") == pytest.approx(design.secondary_spectrum,
                                                               rel=0.01)


@pytest.mark.parametrize("pair", ["glass", "plastic"])
def test_thick_cemented_achromat_keeps_its_secondary_spectrum(pair) -> None:
    """With real thicknesses the thin-lens radii leave some F–C colour; correcting it with the
    last radius (the usual last step) leaves the d focus off by the predicted secondary
    spectrum, and the residual F–C colour vanishes to well within it."""
    design, r1, r2, r3 = thin_design(pair)

    def axial(c3: float) -> float:
        return colour(doublet(pair, r1, r2, 1 / c3, 5.0, 2.5), "axial colour")

    before = axial(1 / r3)
    c0, c1 = 1 / r3, 1.05 / r3
    for _ in range(30):  # secant on the last curvature
        a0, a1 = axial(c0), axial(c1)
        if a1 == a0:
            break
        c0, c1 = c1, c1 - a1 * (c1 - c0) / (a1 - a0)
    corrected = doublet(pair, r1, r2, 1 / c1, 5.0, 2.5)
    f = first_order(corrected)["focal length"]
    spectrum = colour(corrected, "secondary spectrum")
    assert abs(before) > abs(design.secondary_spectrum)  # thickness matters at this level
    assert abs(colour(corrected, "axial colour")) < 1e-3 * abs(spectrum)
    assert spectrum == pytest.approx(design.secondary_spectrum * f / 100.0, rel=0.05)
    # the achromat beats a singlet of the same focal length by far more than tenfold
    assert abs(spectrum) < 0.1 * f / design.abbe[0]
