"""Where light may meet a boundary: its clear diameter, a central obscuration, a hole.

- clear diameter: rays meeting the surface farther out are vignetted (stopped);
- obscuration: a central disc in front of the surface that blocks light (a secondary
  mirror's shadow, a spider hub): rays nearer the axis than its radius are blocked there;
- hole: an inner diameter through which light passes without meeting the surface (the
  central hole of a primary mirror): rays nearer the axis go straight on, unrefracted and
  unreflected.

Diameters are in layout units; None means "none". The engines classify every ray with
`classify` and record the outcome per ray, never dropping a ray silently.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any

__all__ = ["Aperture", "MEETS", "OUTSIDE", "BLOCKED", "THROUGH_HOLE"]

Number = Any

MEETS, OUTSIDE, BLOCKED, THROUGH_HOLE = 0, 1, 2, 3


@dataclass(frozen=True)
class Aperture:
    """The aperture of one boundary (all diameters optional)."""

    clear_diameter: Number | None = None
    obscuration_diameter: Number | None = None
    hole_diameter: Number | None = None

    @property
    def is_open(self) -> bool:
        """No limit at all: every ray that reaches the surface meets it."""
        return (self.clear_diameter is None and self.obscuration_diameter is None
                and self.hole_diameter is None)

    @property
    def obscuration_ratio(self) -> float | None:
        """Linear obscuration ratio (obscuration or hole diameter over clear diameter)."""
        inner = self.obscuration_diameter or self.hole_diameter
        if inner is None or self.clear_diameter is None:
            return None
        return float(inner) / float(self.clear_diameter)

    def classify(self, rho):
        """MEETS / OUTSIDE / BLOCKED / THROUGH_HOLE for each rho = x² + y² (numpy array)."""
        import numpy as np

        rho = np.asarray(rho)
        found = np.full(rho.shape, MEETS, np.int8)
        if self.clear_diameter is not None:
            found[rho > (self.clear_diameter / 2) ** 2 * (1 + 1e-12)] = OUTSIDE
        if self.hole_diameter is not None:
            found[rho < (self.hole_diameter / 2) ** 2] = THROUGH_HOLE
        if self.obscuration_diameter is not None:
            found[rho < (self.obscuration_diameter / 2) ** 2] = BLOCKED
        return found
