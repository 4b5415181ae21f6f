"""The optical layout as a plain immutable value, independent of how it was written.

A `System` holds media, boundaries, the gaps between them, the stop, the object, the image
plane and the wavelengths. Edits (REPL, sweeps, tolerance samples) make a new System with
`dataclasses.replace`; nothing mutates one in place. Numbers are floats for a numeric layout and
may be numpy arrays or sympy expressions; lengths are in the layout's units.

Direction of travel: light starts in +z. A mirror reverses it; gaps are still positive lengths
along the path, and `directions()` tells which way each space runs.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Any

__all__ = [
    "Medium", "Boundary", "ObjectSpec", "StopSpec", "ImageSpec", "Wavelength", "System",
    "REFRACT", "MIRROR", "IDEAL",
]

Number = Any  # float | numpy.ndarray | sympy.Expr

REFRACT, MIRROR, IDEAL = "refract", "mirror", "ideal"


@dataclass(frozen=True)
class Medium:
    """A named medium with a constant refractive index."""

    name: str
    index: Number


@dataclass(frozen=True)
class Boundary:
    """One surface the light meets.

    Attributes:
        name: the user's name, or `surface 3` style when none was given.
        curvature: 1/radius (0 for flat); positive when the centre lies after the vertex.
        medium_after: the medium the light is in after this boundary.
        kind: REFRACT, MIRROR, or IDEAL (a thin lens of given power, no medium change).
        power: for IDEAL boundaries, the optical power (1/length) in the surrounding medium.
        clear_diameter: optional clear aperture diameter.
    """

    name: str
    curvature: Number
    medium_after: str
    kind: str = REFRACT
    power: Number = 0
    clear_diameter: Number | None = None


@dataclass(frozen=True)
class ObjectSpec:
    """The object: at infinity (distance None) with a field angle, or a distance before the
    first boundary with a height. Distances are positive before the first vertex."""

    distance: Number | None = None
    height: Number = 0
    field_angle: Number = 0

    @property
    def at_infinity(self) -> bool:
        return self.distance is None


@dataclass(frozen=True)
class StopSpec:
    """The aperture stop, placed `offset` after the vertex of boundary `after` along the path
    (after = -1: in object space, offset measured from the first vertex and negative before it).
    Its size is a diameter, an object-side f-number or an object-side numerical aperture."""

    after: int
    offset: Number
    size_kind: str  # 'diameter' | 'f-number' | 'numerical aperture'
    size: Number
    anchor: str = ""  # the boundary name the script used, for reports


@dataclass(frozen=True)
class ImageSpec:
    """The image plane: at the paraxial focus (distance None) or a fixed distance after the
    last boundary along the path."""

    distance: Number | None = None


@dataclass(frozen=True)
class Wavelength:
    value: Number  # in the layout's length unit
    primary: bool = False


@dataclass(frozen=True)
class System:
    """A whole optical layout."""

    media: tuple[Medium, ...]
    start_medium: str
    boundaries: tuple[Boundary, ...]
    gaps: tuple[Number, ...]  # gaps[i] follows boundaries[i]; len = len(boundaries) - 1
    object: ObjectSpec = field(default_factory=ObjectSpec)
    stop: StopSpec | None = None
    image: ImageSpec = field(default_factory=ImageSpec)
    wavelengths: tuple[Wavelength, ...] = ()
    title: str = ""
    units: str = "mm"

    def medium(self, name: str) -> Medium:
        for medium in self.media:
            if medium.name == name:
                return medium
        raise KeyError(name)

    def space_media(self) -> list[str]:
        """The medium of each space: before the first boundary, then after each one."""
        names = [self.start_medium]
        for boundary in self.boundaries:
            names.append(boundary.medium_after)
        return names

    def indices(self) -> list[Number]:
        """Refractive index (positive, physical) of each space, object space first."""
        return [self.medium(name).index for name in self.space_media()]

    def directions(self) -> list[int]:
        """+1 or -1 for each space: the sense of travel along z after each mirror."""
        sense, found = 1, [1]
        for boundary in self.boundaries:
            if boundary.kind == MIRROR:
                sense = -sense
            found.append(sense)
        return found

    def boundary_index(self, name: str) -> int:
        for i, boundary in enumerate(self.boundaries):
            if boundary.name == name:
                return i
        raise KeyError(name)

    @property
    def primary_wavelength(self) -> Wavelength | None:
        for wavelength in self.wavelengths:
            if wavelength.primary:
                return wavelength
        return self.wavelengths[0] if self.wavelengths else None
