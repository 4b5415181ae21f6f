"""Tests of the thin-lens achromat: element powers, the secondary spectrum and its wording."""

from __future__ import annotations

import pytest

from layoutlang.materials.achromat import thin_achromat

CROWN = (1.5224, 1.5168, 1.5143)  # indices at F, d, C (an invented crown)
FLINT = (1.6321, 1.6200, 1.6150)


def test_element_powers_meet_power_and_colour_conditions() -> None:
    design = thin_achromat(CROWN, FLINT, 100.0)
    (v1, v2), (f1, f2) = design.abbe, design.element_focal_lengths
    assert 1 / f1 + 1 / f2 == pytest.approx(1 / 100.0, rel=1e-12)
    assert 1 / (f1 * v1) + 1 / (f2 * v2) == pytest.approx(0.0, abs=1e-15)
    assert v1 == pytest.approx(0.5168 / 0.0081) and v2 == pytest.approx(0.62 / 0.0171)


def test_secondary_spectrum_from_partial_dispersions() -> None:
    design = thin_achromat(CROWN, FLINT, 100.0)
    p1, p2 = (0.0025 / 0.0081), (0.005 / 0.0171)
    assert design.partial == pytest.approx((p1, p2))
    assert design.secondary_spectrum == pytest.approx(100.0 * (p1 - p2) / (design.abbe[0]
                                                                           - design.abbe[1]))


def test_equations_read_as_a_derivation() -> None:
    lines = thin_achromat(CROWN, FLINT, 100.0).equations(("crown", "flint"), ("F", "d", "C"),
                                                         "mm")
    assert lines[1:4] == ["power:  φ₁ + φ₂ = φ", "colour: φ₁/ν₁ + φ₂/ν₂ = 0",
                          "so:     φ₁ = φ·ν₁/(ν₁ − ν₂),  φ₂ = −φ·ν₂/(ν₁ − ν₂)"]
    assert "crown element focal length" in lines[5]


@pytest.mark.parametrize("first, second", [(CROWN, CROWN), ((1.5, 1.5, 1.5), FLINT)])
def test_no_achromat_without_two_different_dispersions(first, second) -> None:
    with pytest.raises(ValueError):
        thin_achromat(first, second, 100.0)
