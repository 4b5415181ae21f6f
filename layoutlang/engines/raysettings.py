"""What the exact-ray report samples and how it judges: a small value with no numpy import.

Kept apart from `aberrations` so the interpreter can carry a script's choices without loading
the ray engine (a script that asks for no rays never imports it).
"""

from __future__ import annotations

from dataclasses import dataclass

__all__ = ["RaySettings", "RayRequest"]


@dataclass(frozen=True)
class RaySettings:
    """Pupil fractions (of the stop radius) for the marginal rays, field fractions (of the
    full field) for the chief rays and spots, pupil grid points across for a spot, and an
    optional stated focus tolerance (layout units) replacing the depth of focus."""

    pupils: tuple[float, ...] = (1.0, 0.866, 0.7071, 0.5, 0.25)
    fields: tuple[float, ...] = (0.0, 0.5, 0.7071, 1.0)
    grid: int = 17
    tolerance: float | None = None


@dataclass(frozen=True)
class RayRequest:
    """One ray quantity a `report` names with its qualifiers: the field fraction (None where
    the quantity has no field), the wavelength in layout units (None: the primary) and the
    label as the script wrote it ('rms spot radius at field 3 deg')."""

    name: str
    field: float | None = None
    wavelength: float | None = None
    label: str = ""
