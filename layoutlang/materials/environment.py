"""Whether a layout is in standard air or in vacuum, and what that does to every index.

Glass data are usually relative to air and measured with wavelengths in air; some formulas
(standard air itself) are absolute, with vacuum wavelengths. A layout states once what it is
in; every model's index is then converted to be relative to that:

- layout in standard air (the default): indices relative to standard air, wavelengths in air;
  `air` has index 1 exactly. An absolute model: n = n_abs(λ·n_air) / n_air.
- layout in vacuum: absolute indices, vacuum wavelengths; `vacuum` has index 1 exactly and
  `air` is standard air (about 1.00028). A model relative to air: n = n_rel(λ/n_air)·n_air.

Standard air is Ciddor (1996) at 15 °C, 101 325 Pa (see `dispersion.StandardAir`); glass data
at 20 °C differ from it by about 1e-5 in the air index, below what the models hold anyway.
"""

from __future__ import annotations

from typing import Any

from .dispersion import AIR, VACUUM, Constant, Dispersion, StandardAir

__all__ = ["STANDARD_AIR", "IN_VACUUM", "ENVIRONMENTS", "STANDARD_AIR_MODEL", "relative_index",
           "describe_environment", "predefined_models"]

#: The two settings a layout can be in.
STANDARD_AIR, IN_VACUUM = "standard air", "vacuum"
ENVIRONMENTS = (STANDARD_AIR, IN_VACUUM)

STANDARD_AIR_MODEL = StandardAir()


def predefined_models() -> dict[str, Dispersion]:
    """The media every script knows: `air` (standard air) and `vacuum` (index 1, absolute)."""
    return {"air": STANDARD_AIR_MODEL, "vacuum": Constant(1.0, reference=VACUUM)}


def relative_index(model: Dispersion, wavelength_um: Any, environment: str) -> Any:
    """The model's index relative to the layout's surroundings.

    Args:
        model: a dispersion model.
        wavelength_um: wavelengths as the layout states them (in air or in vacuum), in µm;
            a float or a numpy array.
        environment: STANDARD_AIR or IN_VACUUM.
    """
    reference = model.reference
    if reference is None or environment == STANDARD_AIR and reference == AIR or (
            environment == IN_VACUUM and reference == VACUUM):
        return model.index(wavelength_um)
    if environment == STANDARD_AIR:  # an absolute model in a layout in air
        if isinstance(model, StandardAir):
            return model.index(wavelength_um) * 0 + 1.0  # air relative to itself, exactly
        n_air = STANDARD_AIR_MODEL.index(wavelength_um)
        return model.index(wavelength_um * n_air) / n_air
    n_air = STANDARD_AIR_MODEL.index(wavelength_um)  # a model relative to air, in vacuum
    return model.index(wavelength_um / n_air) * n_air


def describe_environment(environment: str) -> str:
    """One line for reports saying what the indices and wavelengths are relative to."""
    if environment == IN_VACUUM:
        return ("in vacuum: indices are absolute and wavelengths are vacuum wavelengths; "
                "air is standard air (Ciddor 1996, 15 °C, 101 325 Pa)")
    return ("in standard air (15 °C, 101 325 Pa, Ciddor 1996): indices are relative to air "
            "and wavelengths are measured in air")
