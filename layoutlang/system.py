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
    "Medium", "Boundary", "GroupPlacement", "ObjectSpec", "StopSpec", "ImageSpec", "Wavelength", "System",
    "REFRACT", "MIRROR", "IDEAL", "BeamSpec", "FibreSpec",
]

Number = Any  # float | numpy.ndarray | sympy.Expr

REFRACT, MIRROR, IDEAL = "refract", "mirror", "ideal"


@dataclass(frozen=True)
class Medium:
    """A named medium.

    Attributes:
        name: the script's name for it.
        index: the refractive index at the primary wavelength (what the engines use).
        model: a dispersion model (`layoutlang.materials.dispersion`) giving the index at any
            wavelength, or None for a constant index.
    """

    name: str
    index: Number
    model: Any = None

    def index_at(self, wavelength_um: Number, environment: str = "standard air") -> Number:
        """The index at wavelengths in micrometres (a float or a numpy array), relative to
        the layout's surroundings; a medium without a model has the same index everywhere."""
        if self.model is None:
            return self.index
        from .materials.environment import relative_index

        return relative_index(self.model, wavelength_um, environment)


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
        conic: the conic constant κ (0: a sphere about the vertex curvature).
        even_terms: coefficients A4, A6, … of the even aspheric polynomial (r⁴, r⁶, …).
        q_terms: Forbes Qcon coefficients a_0, a_1, … ; q_radius their normalisation radius.
        obscuration_diameter: a central disc in front of the surface that blocks light.
        hole_diameter: an inner diameter where light passes without meeting the surface.
        placement: a decenter/tilt/fold of this boundary, or None (coaxial).

    Every engine reads the shape through `profile` and the aperture through `aperture`
    (layoutlang/surfaces/): the paraxial engine only ever needs `curvature`, the vertex
    curvature, which is the same for a sphere, a conic and an asphere.
    """

    name: str
    curvature: Number
    medium_after: str
    kind: str = REFRACT
    power: Number = 0
    clear_diameter: Number | None = None
    conic: Number = 0.0
    even_terms: tuple[Number, ...] = ()
    q_terms: tuple[Number, ...] = ()
    q_radius: Number | None = None
    obscuration_diameter: Number | None = None
    hole_diameter: Number | None = None
    placement: Any = None  # surfaces.Placement | None

    @property
    def profile(self):
        """The surface's shape (a `surfaces.Profile`; flat for an ideal lens)."""
        from .surfaces.profile import Profile

        if self.kind == IDEAL:
            return Profile(0.0)
        return Profile(self.curvature, self.conic, self.even_terms, self.q_terms, self.q_radius)

    @property
    def aperture(self):
        """Clear diameter, obscuration and hole (a `surfaces.Aperture`)."""
        from .surfaces.aperture import Aperture

        return Aperture(self.clear_diameter, self.obscuration_diameter, self.hole_diameter)

    @property
    def is_spherical(self) -> bool:
        """A sphere or plane with a plain aperture: the classic closed-form paths apply."""
        return (not self.even_terms and not self.q_terms and self.conic == 0
                and self.obscuration_diameter is None and self.hole_diameter is None)


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
    last boundary along the path; `tilt` (about x, y, z, radians) turns the plane about its
    axis point, in the image-space axis frame (a sensor not square to the axis), or None;
    `at_infinity` when the script states the output is collimated (`image at infinity`,
    checked against the paraxial image)."""

    distance: Number | None = None
    tilt: tuple[Number, Number, Number] | None = None
    at_infinity: bool = False


@dataclass(frozen=True)
class BeamSpec:
    """A Gaussian input beam (grammar/beams.lark): its 1/e² intensity waist radius, where the
    waist lies (distance before the first vertex, negative when after it), its wavelength in
    layout units (relative to the layout's surroundings, like `wavelengths`) and its beam
    propagation ratio M² (1 for a pure Gaussian mode)."""

    waist_radius: Number
    waist_distance: Number
    wavelength: Number
    propagation_ratio: Number = 1.0


@dataclass(frozen=True)
class FibreSpec:
    """A single-mode fibre receiving the beam: its mode-field diameter (1/e² intensity) at the
    beam's wavelength, where its face is ('image': the image plane, 'waist': the beam's output
    waist, 'after': `distance` after the last boundary), and its lateral offset and tilt (in
    one plane, the tilt in radians)."""

    mode_field_diameter: Number
    place: str
    distance: Number | None = None
    offset: Number = 0.0
    tilt: Number = 0.0


@dataclass(frozen=True)
class Wavelength:
    value: Number  # in the layout's length unit
    primary: bool = False


@dataclass(frozen=True)
class GroupPlacement:
    """A placement (surfaces.Placement) applied to boundaries first..last together, about the
    vertex of the first (an element decentred or tilted as one body, or a folded group)."""

    first: int
    last: int
    placement: Any
    name: str = ""


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
    environment: str = "standard air"  # or "vacuum": what indices and wavelengths are relative to
    beam: BeamSpec | None = None  # a Gaussian input beam (engines/beams.py)
    fibre: FibreSpec | None = None  # a fibre mode receiving the beam
    groups: tuple[Any, ...] = ()  # GroupPlacement: a placement applied to a run of boundaries

    @property
    def is_coaxial(self) -> bool:
        """No boundary or group is placed off the axis: the engines' coaxial path applies (a
        zero placement is no placement, so it changes nothing, bit for bit)."""
        return (all(g.placement.is_identity for g in self.groups)
                and all(b.placement is None or b.placement.is_identity for b in self.boundaries))

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

    def indices(self, wavelength: Number | None = None) -> list[Number]:
        """Refractive index (positive, physical) of each space, object space first.

        Args:
            wavelength: None for the primary wavelength; else a wavelength in the layout's
                length unit, or a numpy array of them (each index is then an array, or a plain
                number for a medium without dispersion, which broadcasts).
        """
        if wavelength is None:
            return [self.medium(name).index for name in self.space_media()]
        wavelength_um = self.to_micrometres(wavelength)
        return [self.medium(name).index_at(wavelength_um, self.environment)
                for name in self.space_media()]

    def to_micrometres(self, length: Number) -> Number:
        """A length in the layout's unit, in micrometres (wavelengths for dispersion models)."""
        from .measure import LENGTH_UNITS

        return length * (LENGTH_UNITS[self.units] * 1000.0)

    def at_wavelength(self, wavelength: Number) -> System:
        """The same layout with every medium's index taken at `wavelength` (layout units; a
        numpy array gives array indices, which the paraxial engine traces unchanged)."""
        from dataclasses import replace

        wavelength_um = self.to_micrometres(wavelength)
        media = tuple(replace(m, index=m.index_at(wavelength_um, self.environment))
                      if m.model is not None else m for m in self.media)
        return replace(self, media=media)

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
