"""Where a boundary (or a group of boundaries, an element) sits in space.

A layout with no placements is coaxial: every vertex lies on the z axis at the distance
reached by walking the gaps, and the engines take the coaxial path exactly as before (bit for
bit). A `Placement` moves a boundary or a group away from that axis:

- `decenter`: (dx, dy) in layout units, across the axis, applied first;
- `tilt`: (about x, about y, about z) in radians, applied in that order about the (decentred)
  vertex — a right-handed rotation of the surface's local axes;
- `axis`: what the surfaces after it follow —
    RETURNS: a perturbation (a tolerance, a mis-mounted element): the surfaces after keep the
      axis they had before (for a group, after its last surface);
    FOLLOWS: a fold: the axis after follows the placed surface (after a tilted mirror the axis
      is the incoming axis reflected in the mirror; after a tilted refracting surface the axis
      ray refracted at the placed vertex — adjusted from "turned with it", because a prism face
      or a tilted window sends the light along the refracted ray and the surfaces after must
      stand on it; after a group, the axis moved with it). engines/frames.py has the rules.

`Frame` is the result every engine reads: the vertex position in the global frame and the
rotation from the surface's local axes to global axes (columns are the local x, y, z). The
exact-ray engine traces each step in its surface's local frame; drawings project frames on the
plane of the fold; the first-order engine uses the axis along the frames (parabasal about the
real axial ray when a placement is not a pure fold).
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any

import numpy as np

__all__ = ["Placement", "Frame", "RETURNS", "FOLLOWS", "IDENTITY"]

Number = Any

RETURNS, FOLLOWS = "returns", "follows"

IDENTITY = ((1.0, 0.0, 0.0), (0.0, 1.0, 0.0), (0.0, 0.0, 1.0))


@dataclass(frozen=True)
class Placement:
    """How one boundary or group is moved from the coaxial position."""

    decenter: tuple[Number, Number] = (0.0, 0.0)
    tilt: tuple[Number, Number, Number] = (0.0, 0.0, 0.0)
    axis: str = RETURNS

    @property
    def is_identity(self) -> bool:
        """No decenter and no tilt (a zero placement must change nothing, bit for bit)."""
        return all(bool(np.all(np.asarray(v) == 0)) for v in self.decenter + self.tilt)


@dataclass(frozen=True)
class Frame:
    """A surface's local frame in global coordinates.

    Attributes:
        origin: the vertex (x, y, z).
        rotation: 3×3 rows of the matrix taking local components to global ones (its columns
            are the local x, y and z axes); IDENTITY for a coaxial surface.
    """

    origin: tuple[float, float, float]
    rotation: tuple[tuple[float, float, float], ...] = IDENTITY

    @property
    def is_coaxial(self) -> bool:
        return self.rotation == IDENTITY and self.origin[0] == 0 and self.origin[1] == 0
