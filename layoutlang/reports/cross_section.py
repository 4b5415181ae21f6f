"""The numbers behind a drawing: where each boundary, element, stop and ray sits in the plane.

Pure geometry (no plotting), so it can be tested without matplotlib. Positions are global: z
along the axis (light starts in +z), y up. Each vertex sits where the gaps, walked along the
current sense of travel, put it, so a mirror folds the path back on itself exactly as the light
goes. Rays come in bundles at several fields (the axis, an intermediate field, the full field),
a few rays each across the pupil, exactly traced and aimed at the real stop where the layout
allows, paraxial otherwise; they end on the surface profiles. Apertures without a clear
diameter come from the geometry: an element is drawn out to where its faces meet (a ball lens
is a ball), else to the ray bundles with a margin.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field, replace
from typing import Any

import numpy as np

from ..engines import paraxial
from ..engines.firstorder import FirstOrder, Unavailable, first_order
from ..engines.paraxial import TRANSFER, Step
from ..errors import LayoutError, LayoutValueError
from ..system import IDEAL, MIRROR, REFRACT, System

__all__ = ["Profile", "Element", "RayPath", "BeamEnvelope", "CrossSection", "cross_section",
           "sag", "beam_envelope", "FIELDS", "PUPILS", "FAR_IMAGE"]

#: Extra room beyond the ray bundle when no clear diameter is given (the glass is never cut
#: exactly at the ray): common practice in drawings, the value is ours.
APERTURE_MARGIN = 1.1
#: The field fractions whose bundles are drawn (axis, intermediate, full) and the pupil
#: fractions of each bundle's rays: common practice in layout drawings, the numbers are ours.
FIELDS = (0.0, 0.7, 1.0)
PUPILS = (-1.0, -0.5, 0.0, 0.5, 1.0)
#: An image plane farther than this many times the layout's size is not drawn: the rays are
#: cut short (a near-collimated output must not stretch the drawing to its far focus).
FAR_IMAGE = 25.0
#: Edge thickness below this fraction of the centre thickness counts as faces that meet.
_MEETING = 0.1
#: A lens whose faces meet within this factor of its ray bundles is drawn to its edge.
_CLOSE_TO_BUNDLES = 1.6


def sag(curvature: float, height: np.ndarray, shape: Any = None) -> np.ndarray:
    """The sag at these heights: of `shape` (a `surfaces.Profile`: conic, asphere) when given,
    else of a sphere of this curvature (0 for a plane). Beyond where the surface exists (a
    sphere past its hemisphere, an ellipsoid past its rim) the sag of the rim is given."""
    height = np.asarray(height, dtype=float)
    if shape is not None and not shape.is_sphere:
        limit = shape.domain_radius()
        rho = np.minimum(height * height, limit * limit) if math.isfinite(limit) else height ** 2
        with np.errstate(invalid="ignore", over="ignore"):
            return np.asarray(shape.sag(rho), dtype=float)
    if curvature == 0:
        return np.zeros_like(height)
    root = np.sqrt(np.clip(1 - (curvature * height) ** 2, 0, None))
    return curvature * height ** 2 / (1 + root)


def reach_of(boundary: Any) -> float:
    """How far from the axis a boundary can be drawn: just inside its sphere's hemisphere or
    its conic's rim (inf for a plane, a paraboloid, a hyperboloid)."""
    if boundary.kind == IDEAL:
        return math.inf
    limit = boundary.profile.domain_radius()
    return 0.999 * limit if math.isfinite(limit) else math.inf


@dataclass(frozen=True)
class Profile:
    """One boundary as drawn: its vertex, curvature and the semi-aperture it is drawn to, its
    true shape (`shape`, a `surfaces.Profile`, None for a sphere of `curvature`), and the
    semi-diameters of a central hole and a central obscuration (0 for none)."""

    name: str
    kind: str
    z: float
    curvature: float
    semi_aperture: float
    sense_in: int  # the sense of travel of the light arriving at it
    from_clear_diameter: bool
    power: float = 0.0
    shape: Any = None
    hole: float = 0.0
    obscuration: float = 0.0
    #: a placed layout (placed_section.py): the face as drawn (u, v), the unit direction
    #: behind a mirror in the drawing, and the vertex's v; `z` is then the vertex's u
    outline: tuple[tuple[float, ...], tuple[float, ...]] | None = None
    back: tuple[float, float] | None = None
    vertex_v: float = 0.0

    def sag(self, height: np.ndarray) -> np.ndarray:
        return sag(self.curvature, height, self.shape)

    def points(self, samples: int = 81) -> tuple[np.ndarray, np.ndarray]:
        """(z, y) along the profile from -semi_aperture to +semi_aperture; a hole leaves a gap
        (NaN, which a plotted line skips) between -hole and +hole."""
        if self.outline is not None:
            return np.array(self.outline[0]), np.array(self.outline[1])
        if 0 < self.hole < self.semi_aperture:
            side = np.linspace(self.hole, self.semi_aperture, max(samples // 2, 2))
            y = np.concatenate([-side[::-1], [np.nan], side])
            z = self.z + self.sag(np.nan_to_num(y))
            z[np.isnan(y)] = np.nan
            return z, y
        y = np.linspace(-self.semi_aperture, self.semi_aperture, samples)
        return self.z + self.sag(y), y

    def obscuration_points(self, samples: int = 21) -> tuple[np.ndarray, np.ndarray] | None:
        """(z, y) of the obscuring disc on the profile from -r to +r, with a gap (NaN) over a
        hole, where light passes anyway (None without an obscuration)."""
        if self.obscuration <= 0:
            return None
        if 0 < self.hole < self.obscuration:
            side = np.linspace(self.hole, self.obscuration, max(samples // 2, 2))
            y = np.concatenate([-side[::-1], [np.nan], side])
            z = self.z + self.sag(np.nan_to_num(y))
            z[np.isnan(y)] = np.nan
            return z, y
        y = np.linspace(-self.obscuration, self.obscuration, samples)
        return self.z + self.sag(y), y

    def z_at(self, y: float) -> float:
        """Where the profile is at height y (clamped to the aperture: a flat rim beyond)."""
        limited = max(-self.semi_aperture, min(self.semi_aperture, y))
        return float(self.z + self.sag(np.array(limited)))


@dataclass(frozen=True)
class Element:
    """A piece of material between two boundaries (a lens element or a plate)."""

    first: int
    second: int
    medium: str
    edge: float  # the semi-height of its rim
    polygon: tuple[tuple[float, ...], tuple[float, ...]] | None = None  # placed: as drawn

    def outline(self, profiles: list[Profile], samples: int = 81) -> tuple[np.ndarray, np.ndarray]:
        """A closed outline: down the first face, up the second, with flat rims where one
        face is smaller than the rim."""
        if self.polygon is not None:
            return np.array(self.polygon[0]), np.array(self.polygon[1])
        y = np.linspace(-self.edge, self.edge, samples)
        a, b = profiles[self.first], profiles[self.second]
        za = np.array([a.z_at(v) for v in y])
        zb = np.array([b.z_at(v) for v in y[::-1]])
        return np.concatenate([za, zb, za[:1]]), np.concatenate([y, y[::-1], y[:1]])


@dataclass(frozen=True)
class RayPath:
    """One drawn ray: its role, how it was traced ('exact' or ''), and its (z, y) points.

    The role is 'marginal' (axial bundle, pupil edge), 'chief' (full field, pupil centre) or
    'bundle' (any other ray of a bundle); `field` and `pupil` are the fractions it was
    launched at.
    """

    role: str
    label: str
    z: tuple[float, ...]
    y: tuple[float, ...]
    #: for a virtual image: the backward extension from the last boundary to the image
    virtual_z: tuple[float, ...] = ()
    virtual_y: tuple[float, ...] = ()
    field: float = 0.0
    pupil: float = 0.0


def _role(field: float, pupil: float) -> str:
    if field == 0 and abs(pupil) == 1:
        return "marginal"
    if field == 1 and pupil == 0:
        return "chief"
    return "bundle"


def _bundles(has_field: bool) -> list[tuple[float, float]]:
    """(field, pupil) of every drawn ray; the ray along the axis itself is left out."""
    fields = FIELDS if has_field else (0.0,)
    return [(f, p) for f in fields for p in PUPILS if f or p]


@dataclass(frozen=True)
class BeamEnvelope:
    """The Gaussian beam's 1/e² radius along the path, in global coordinates (a mirror folds
    it back like the rays), and its waists as (z, radius, words)."""

    z: tuple[float, ...]
    radius: tuple[float, ...]
    waists: tuple[tuple[float, float, str], ...] = ()


@dataclass(frozen=True)
class CrossSection:
    """Everything a drawing shows, in global coordinates."""

    title: str
    units: str
    profiles: list[Profile]
    elements: list[Element]
    rays: list[RayPath]
    stop: tuple[float, float] | None  # (z, semi-diameter)
    image: tuple[float, float] | None  # (z, semi-height of the drawn image plane)
    object_plane: tuple[float, float] | None  # (z, height) when the object is drawn
    notes: list[str] = field(default_factory=list)
    #: the field fractions of the drawn bundles (the legend names them)
    fields: tuple[float, ...] = ()
    beam: BeamEnvelope | None = None  # a layout with a Gaussian beam
    placed: Any = None  # placed_section.PlacedView: the folded path as drawn

    def extent(self) -> tuple[float, float, float]:
        """(z min, z max, largest |y|) of everything drawn."""
        if self.placed is not None:
            u0, u1, v0, v1 = self.placed.bounds
            return u0, u1, max(abs(v0), abs(v1))
        zs = [p.z for p in self.profiles]
        ys = [p.semi_aperture for p in self.profiles]
        for ray in self.rays:
            zs.extend(ray.z + ray.virtual_z)
            ys.extend(abs(v) for v in ray.y + ray.virtual_y)
        for item in (self.stop, self.image, self.object_plane):
            if item is not None:
                zs.append(item[0])
                ys.append(abs(item[1]))
        if self.beam is not None:
            zs.extend((min(self.beam.z), max(self.beam.z)))
            ys.append(max(self.beam.radius))
        return min(zs), max(zs), max(ys) if ys else 1.0


def _vertices(system: System) -> list[float]:
    senses = system.directions()
    z = [0.0]
    for i, gap in enumerate(system.gaps):
        z.append(z[-1] + senses[i + 1] * float(gap))
    return z


def _heights(system: System, y0: float, nu0: float) -> list[float]:
    """Paraxial ray height at every vertex, from (y, nu) at the first vertex."""
    heights = []
    y, nu = y0, nu0
    for step in paraxial.steps_of(system):
        if step.kind is TRANSFER:
            y = y + step.value * nu
        else:
            heights.append(y)
            nu = nu - step.value * y
    return heights


def _exit(system: System, y0: float, nu0: float) -> tuple[float, float]:
    return paraxial.trace(y0, nu0, paraxial.steps_of(system))


def _stop_z(system: System, vertices: list[float]) -> float | None:
    stop = system.stop
    if stop is None:
        return None
    if stop.after < 0:
        return vertices[0] + float(stop.offset)
    return vertices[stop.after] + system.directions()[stop.after + 1] * float(stop.offset)


def _rays(system: System, results: FirstOrder) -> tuple[tuple[float, float] | None,
                                                        tuple[float, float] | None, list[str]]:
    """(y, nu) at the first vertex of the marginal and the chief ray (None when undefined)."""
    notes: list[str] = []
    n0 = system.indices()[0]
    obj = system.object
    object_steps = [] if obj.at_infinity else [Step(TRANSFER, float(obj.distance) / n0)]
    if system.stop is None and system.beam is not None:  # the beam is drawn instead
        return None, None, notes
    if system.stop is None:
        first = system.boundaries[0]
        radius = float(first.clear_diameter) / 2 if first.clear_diameter is not None else None
        notes.append("no stop is given: the rays fill the clear diameter of the first boundary"
                     if radius is not None else
                     "no rays are drawn: the layout has no stop and the first boundary no clear "
                     "diameter")
        front: list[Step] = []
    else:
        stop_diameter = results["stop diameter"]
        radius = None if isinstance(stop_diameter, Unavailable) else stop_diameter / 2
        front = paraxial.split_at_stop(system).front
    if radius is None:
        if system.stop is not None:
            notes.append(f"no rays are drawn: the stop diameter is {results['stop diameter']}")
        return None, None, notes
    a1, b1, _, _ = paraxial.matrix(front) if front else (1.0, 0.0, 0.0, 1.0)
    marginal = chief = None
    if obj.at_infinity:
        if a1 != 0:
            marginal = (radius / a1, 0.0)
            nu = -n0 * math.tan(float(obj.field_angle))
            if nu != 0:
                chief = (-b1 * nu / a1, nu)
    else:
        y_unit, _ = paraxial.trace(0.0, 1.0, object_steps + front)
        if y_unit != 0:
            nu = radius / y_unit
            marginal = paraxial.trace(0.0, nu, object_steps)
        ya, _ = paraxial.trace(1.0, 0.0, object_steps + front)
        yb = y_unit
        if yb != 0 and obj.height != 0:
            nu = -ya * float(obj.height) / yb
            chief = paraxial.trace(float(obj.height), nu, object_steps)
    return marginal, chief, notes


def cross_section(system: System, results: FirstOrder | None = None,
                  exact: bool = False) -> CrossSection:
    """Lay out a numeric System in the plane (see `_cross_section`), or raise a
    LayoutValueError saying why this layout cannot be drawn. Rays whose numbers leave the
    range of floating point are left out with a note, never drawn as inf or NaN."""
    try:
        with np.errstate(all="ignore"):
            results = results or first_order(system)
            if system.is_coaxial:
                section = _cross_section(system, results, exact)
            else:  # the folded path: the coaxial section moved into place
                from .placed_section import placed_section

                section = placed_section(system, _cross_section(system, results, False),
                                         results, exact)
    except LayoutError:
        raise
    except (ArithmeticError, ValueError) as error:
        raise LayoutValueError(f"this layout cannot be drawn: {error}") from None
    return _finite(section)


def _finite(section: CrossSection) -> CrossSection:
    """The section without anything that is not a finite number."""
    def finite(*values: float) -> bool:
        return all(math.isfinite(v) for v in values)

    notes = list(section.notes)
    rays = []
    for ray in section.rays:
        if finite(*ray.z, *ray.y, *ray.virtual_z, *ray.virtual_y):
            rays.append(ray)
        else:
            notes.append(f"a {ray.role} ray is not drawn: its positions leave the range of "
                         "numbers a drawing can show")
    for profile in section.profiles:
        if not finite(profile.z, profile.semi_aperture, profile.curvature) or \
                profile.semi_aperture <= 0:
            raise LayoutValueError(f"this layout cannot be drawn: {profile.name} has no finite "
                                   "position or size")
    parts = {}
    for name in ("stop", "image", "object_plane"):
        value = getattr(section, name)
        parts[name] = value if value is None or finite(*value) else None
    beam = section.beam
    if beam is not None and not finite(*beam.z, *beam.radius):
        parts["beam"] = None
        notes.append("the beam is not drawn: its size leaves the range of numbers a drawing "
                     "can show")
    section = replace(section, rays=rays, notes=notes, **parts)
    z_min, z_max, y_max = section.extent()
    span = z_max - z_min
    if finite(z_min, z_max, y_max, span) and 0 < y_max and span <= 1e-6 * y_max:
        raise LayoutValueError("this layout cannot be drawn: everything lies in one plane "
                               "(it has no length along the axis)")
    if not finite(z_min, z_max, y_max, span) or y_max <= 0 or y_max > 1e6 * span \
            or span > 1e6 * y_max:
        raise LayoutValueError("this layout cannot be drawn: its lengths span more than six "
                               "orders of magnitude")
    return section


def _cross_section(system: System, results: FirstOrder | None = None,
                   exact: bool = False) -> CrossSection:
    """Lay out a numeric System in the plane.

    Args:
        system: the layout (numbers, not symbols).
        results: its first-order properties, if already computed.
        exact: trace the drawn rays exactly (where the exact-ray engine is present and the
            layout allows it: a stop, finite pupils); paraxial rays otherwise, with a note.

    Returns:
        The profiles, elements, rays, stop and image plane in global coordinates.
    """
    results = results or first_order(system)
    vertices = _vertices(system)
    senses = system.directions()
    n0 = system.indices()[0]
    marginal, chief, notes = _rays(system, results)
    starts = []  # (field, pupil, (y, nu) at the first vertex): paraxial rays are linear in both
    if marginal is not None:
        for f, p in _bundles(chief is not None):
            start = (p * marginal[0] + (f * chief[0] if f else 0.0),
                     p * marginal[1] + (f * chief[1] if f else 0.0))
            starts.append((f, p, start))
    heights = [_heights(system, *start) for _, _, start in starts]

    # apertures: the clear diameter; else the element's own geometry, else the bundles
    profiles: list[Profile] = []
    span = max(abs(max(vertices) - min(vertices)), 1e-9)
    plane = results["image plane distance"]
    reach = max([span] + [abs(float(v)) for v in (plane, system.object.distance)
                          if v is not None and not isinstance(v, Unavailable)])
    for i, boundary in enumerate(system.boundaries):
        curvature = float(boundary.curvature)
        rim = reach_of(boundary)
        if boundary.clear_diameter is not None:
            semi, given = float(boundary.clear_diameter) / 2, True
            if semi >= rim:  # beyond a hemisphere (or an ellipsoid's rim)
                semi = rim
                shape = "sphere" if boundary.profile.is_sphere else "surface"
                notes.append(f"{boundary.name}: its clear diameter is larger than its {shape}; "
                             "drawn to where the surface ends")
        else:
            given = False
            semi = max((abs(h[i]) for h in heights), default=0.0) * APERTURE_MARGIN
            if semi == 0:  # no rays: a size the shape can have
                semi = 0.1 * reach if not curvature else min(0.1 * reach, 0.6 / abs(curvature))
            semi = min(semi, rim)
        shape = None if boundary.kind == IDEAL or boundary.profile.is_sphere else \
            _float_profile(boundary.profile)
        hole = float(boundary.hole_diameter or 0) / 2
        obscuration = float(boundary.obscuration_diameter or 0) / 2
        if hole or obscuration:
            from ..testing import format_number

            parts = ([f"a central obscuration of {format_number(2 * obscuration)} "
                      f"{system.units} (grey band)"] if obscuration else []) + \
                ([f"a hole of {format_number(2 * hole)} {system.units} (left open)"]
                 if hole else [])
            notes.append(f"{boundary.name}: " + " and ".join(parts))
        profiles.append(Profile(boundary.name, boundary.kind, vertices[i], curvature, semi,
                                senses[i], given, float(boundary.power or 0), shape,
                                min(hole, semi), min(obscuration, semi)))
    profiles = _meeting_faces(system, profiles)

    # elements: material other than the starting medium between two refracting boundaries
    elements = []
    ambient = {system.start_medium, "air", "vacuum"}
    for i in range(len(system.boundaries) - 1):
        boundary, following = system.boundaries[i], system.boundaries[i + 1]
        if boundary.kind in (MIRROR, IDEAL) or following.kind in (MIRROR, IDEAL):
            continue
        if boundary.medium_after in ambient:
            continue
        edge = max(profiles[i].semi_aperture, profiles[i + 1].semi_aperture)
        elements.append(Element(i, i + 1, boundary.medium_after, edge))

    # where the drawing begins and ends along the path
    size = max(span, max(p.semi_aperture for p in profiles))
    far = not isinstance(plane, Unavailable) and abs(float(plane)) > FAR_IMAGE * size
    length_scale = span if isinstance(plane, Unavailable) or far else max(span, abs(float(plane)))
    z_first, z_last = vertices[0], vertices[-1]
    lead = 0.3 * length_scale if length_scale > 1e-6 else 10 * max(
        p.semi_aperture for p in profiles)
    object_plane = None
    # rays from a distant object start upstream of everything the path folds back over
    upstream = z_first - min(vertices)
    if system.object.at_infinity:
        before = lead + upstream
    else:
        distance = float(system.object.distance)
        if 0 < distance <= 1.5 * max(length_scale, lead):  # else the layout gets too small
            before = distance
            object_plane = (z_first - distance, float(system.object.height))
        else:
            before = lead + upstream
            if distance <= 0:
                notes.append("the object is virtual (after the first boundary) and is not drawn")
            else:
                notes.append("the object is far away: the rays are cut short before the layout")
    sense_k = senses[-1]
    if isinstance(plane, Unavailable):
        after = lead
        notes.append(f"the image plane is not drawn: {plane}")
    elif far:
        from ..testing import format_number

        side = "after" if float(plane) > 0 else "before"
        notes.append(f"the image is far away ({format_number(abs(float(plane)))} "
                     f"{system.units} {side} the last boundary): the rays are cut short")
        after = max(lead, 2 * size)
    else:
        after = float(plane)
    nk = system.indices()[-1]

    rays = []
    for (f, p, start), path in zip(starts, heights):
        y0, nu0 = start
        zs = [z_first - before]
        ys = [y0 - nu0 / n0 * before]
        for i, y in enumerate(path):
            zs.append(profiles[i].z_at(y))  # beyond the aperture: at the plane of the rim
            ys.append(y)
        y_end, nu_end = _exit(system, y0, nu0)
        virtual_z: tuple[float, ...] = ()
        virtual_y: tuple[float, ...] = ()
        if after < 0:  # a virtual image: the light goes on; its extension meets the image
            virtual_z = (zs[-1], z_last + sense_k * after)
            virtual_y = (ys[-1], y_end + nu_end / nk * after)
            zs.append(z_last + sense_k * lead)
            ys.append(y_end + nu_end / nk * lead)
        else:
            zs.append(z_last + sense_k * after)
            ys.append(y_end + nu_end / nk * after)
        rays.append(RayPath(_role(f, p), "", tuple(zs), tuple(ys), virtual_z, virtual_y, f, p))
    image = None
    if not isinstance(plane, Unavailable) and not far:
        tips = [abs(r.virtual_y[-1] if r.virtual_y else r.y[-1]) for r in rays]
        height = max(tips + [0.15 * max(p.semi_aperture for p in profiles)])
        image = (z_last + sense_k * after, 1.15 * height)
    if exact and starts:
        traced = _exact_rays(system, results, z_first - before,
                             z_last + sense_k * (after if after >= 0 else lead),
                             chief is not None, virtual=not far)
        if isinstance(traced, str):
            notes.append(f"paraxial rays are drawn (exact rays {traced})")
        else:
            rays, lost = traced
            notes.extend(lost)
    stop = None
    stop_z = _stop_z(system, vertices)
    if stop_z is not None and not isinstance(results["stop diameter"], Unavailable):
        radius = results["stop diameter"] / 2
        if system.stop.after >= 0 and system.stop.offset == 0:  # at a boundary: at its rim
            stop_z = profiles[system.stop.after].z_at(radius)
        stop = (stop_z, radius)
    fields = tuple(sorted({r.field for r in rays}))
    beam = None
    if system.beam is not None:
        # the beam has its own reach (its waists), whatever the rays' image plane does
        beam_scale = span if isinstance(plane, Unavailable) else max(span, abs(float(plane)))
        beam = beam_envelope(system, beam_scale, lead, notes)
    return CrossSection(system.title, system.units, profiles, elements, rays, stop, image,
                        object_plane, list(dict.fromkeys(notes)), fields, beam)


def _float_profile(profile: Any) -> Any:
    """The profile with plain float coefficients (a drawing is numeric)."""
    from ..surfaces.profile import Profile as Shape

    return Shape(float(profile.curvature), float(profile.conic),
                 tuple(float(a) for a in profile.even_terms),
                 tuple(float(a) for a in profile.q_terms),
                 None if profile.q_radius is None else float(profile.q_radius))


def _micro(value: float, units: str) -> str:
    """A beam radius in words: in µm when under a millimetre, else in the layout's units."""
    from ..measure import LENGTH_UNITS
    from ..testing import format_number

    mm = value * LENGTH_UNITS[units]
    if mm < 1:
        return f"{format_number(mm * 1000, 3)} µm"
    return f"{format_number(value, 3)} {units}"


def beam_envelope(system: System, length_scale: float, lead: float,
                  notes: list[str]) -> BeamEnvelope | None:
    """The beam's envelope from its input waist (when near enough upstream) to its output
    waist, the fibre face or the image plane (when near enough downstream), waists marked."""
    from ..engines.beams import BeamPropagation

    beam = BeamPropagation(system)
    if beam.problem() is not None:
        notes.append(f"the beam is not drawn: {beam.problem()}")
        return None
    vertices = _vertices(system)
    senses = system.directions()
    reach = 3 * max(length_scale, lead)
    waist_before = float(system.beam.waist_distance)
    before = waist_before if 0 < waist_before <= reach else lead
    if waist_before > reach:
        notes.append("the beam's input waist is far upstream: the beam is cut short before "
                     "the layout")
    out = beam.output()
    ends = [float(out.waist_position)]
    if system.fibre is not None:
        face = beam.fibre_face()
        if not isinstance(face, Unavailable):
            ends.append(float(face))
    plane = beam.image_plane()
    if not isinstance(plane, Unavailable):
        ends.append(float(plane))
    ends = [e for e in ends if 0 < e <= reach]
    after = 1.15 * max(ends) if ends else lead
    points = beam.envelope(before, after)

    def z_of(space: int, distance: float) -> float:
        if space == 0:
            return vertices[0] + distance
        return vertices[space - 1] + senses[space] * distance

    units = system.units
    waists = []
    if 0 < waist_before <= reach:
        waists.append((z_of(0, -waist_before), float(system.beam.waist_radius),
                       f"input waist {_micro(float(system.beam.waist_radius), units)}"))
    for i, gap in enumerate(system.gaps):
        inside = float(beam.waist_in_space(i))
        if 0 < inside < float(gap):
            a, b, c, d = beam.matrix_to_boundary(i)
            radius = math.sqrt(float(beam.waist_squared) / float(
                paraxial.gaussian.waist_denominator(a, b, c, d, beam.confocal)))
            waists.append((z_of(i + 1, inside), radius, f"waist {_micro(radius, units)}"))
    if 0 < out.waist_position <= after:
        waists.append((z_of(len(system.boundaries), float(out.waist_position)),
                       float(out.waist_radius),
                       f"output waist {_micro(float(out.waist_radius), units)}"))
    elif out.waist_position <= 0:
        notes.append("the output waist is virtual (upstream of the last boundary): not marked")
    else:
        notes.append("the output waist lies beyond the drawing: see the report")
    return BeamEnvelope(tuple(z_of(p.space, p.distance) for p in points),
                        tuple(p.radius for p in points), tuple(waists))


def _meeting_faces(system: System, profiles: list[Profile]) -> list[Profile]:
    """Profiles with each element that has no clear diameter drawn out to where its two faces
    meet (zero edge thickness) or to the hemisphere that comes first: the largest lens the
    prescription describes, so a ball lens is drawn as a ball. An element whose faces do not
    meet (a plate, a meniscus, a negative lens) keeps the apertures of the ray bundles."""
    out = list(profiles)
    ambient = {system.start_medium, "air", "vacuum"}
    for i in range(len(profiles) - 1):
        a, b = profiles[i], profiles[i + 1]
        boundary = system.boundaries[i]
        if (a.from_clear_diameter or b.from_clear_diameter or boundary.medium_after in ambient
                or a.kind != REFRACT or b.kind != REFRACT or b.z <= a.z):
            continue
        limits = [r for r in (reach_of(system.boundaries[i]), reach_of(system.boundaries[i + 1]))
                  if math.isfinite(r)]
        if not limits:
            continue
        top = min(limits)

        def thickness(h: float) -> float:
            return (b.z + float(b.sag(np.array(h)))) - (a.z + float(a.sag(np.array(h))))

        centre = thickness(0.0)
        if thickness(top) > _MEETING * centre:
            continue  # the faces do not meet within the spheres
        if thickness(top) > 0:
            meet = top
        else:  # bisect for zero edge thickness
            low, high = 0.0, top
            for _ in range(60):
                mid = (low + high) / 2
                low, high = (mid, high) if thickness(mid) > 0 else (low, mid)
            meet = low
        bundles = max(a.semi_aperture, b.semi_aperture)
        # a sphere (faces meeting at their hemispheres) is drawn whole; an ordinary lens only
        # when its edge is close to the bundles anyway, so its rim is where the glass ends
        if meet > bundles and (meet == top or meet <= _CLOSE_TO_BUNDLES * bundles):
            out[i] = replace(out[i], semi_aperture=meet)
            out[i + 1] = replace(out[i + 1], semi_aperture=meet)
    return out


def _exact_rays(system: System, results: FirstOrder, z_start: float, z_end: float,
                has_field: bool, virtual: bool = True
                ) -> tuple[list[RayPath], list[str]] | str:
    """The bundles traced exactly (Snell's law at the real surfaces), each ray aimed at its
    point of the real stop, recorded at every boundary and at the stop plane (so the drawn
    rays pass the drawn stop). Returns the ray paths and notes on lost rays, or the reason
    (words) there are none."""
    try:
        from ..engines import aberrations, realrays
    except ImportError:
        return "need the exact-ray engine"
    s = exact_setup(system, results)
    if isinstance(s, str):
        return s
    geo, indices = s.geo, list(s.indices)
    image, where = results["image distance"], results["image position"]
    virtual_image = (float(where) if virtual and not isinstance(image, Unavailable) and image < 0
                     and not isinstance(where, Unavailable) else None)
    obj = system.object
    paths, notes = [], []
    fields = FIELDS if has_field else (0.0,)
    for f in fields:
        pupils = np.array([p for p in PUPILS if f or p])
        start = aberrations.aimed(s, f, np.zeros_like(pupils), pupils)
        zs = [[] for _ in pupils]
        ys = [[] for _ in pupils]
        for k in range(len(pupils)):
            if obj.at_infinity or -float(obj.distance) <= z_start:
                t = (z_start - start.z[k]) / start.kz[k]
                zs[k].append(z_start)
                ys[k].append(float(start.y[k] + t * start.ky[k]))
            else:
                zs[k].append(float(start.z[k]))
                ys[k].append(float(start.y[k]))
        alive = np.ones(len(pupils), dtype=bool)
        lost: dict[tuple[str, str], int] = {}
        rays = start.copy()
        for k, step in enumerate(geo.steps):  # each step continues from the last (linear)
            rays = realrays.trace(rays, geo, indices, geo.steps[k: k + 1])
            for j in range(len(pupils)):
                if not alive[j]:
                    continue
                blocked = rays.status[j] == realrays.BLOCKED
                if blocked:  # stopped by the obscuration: drawn up to the surface
                    zs[j].append(float(rays.z[j]))
                    ys[j].append(float(rays.y[j]))
                if blocked or rays.status[j] in realrays.LOST or \
                        not math.isfinite(float(rays.y[j])):
                    alive[j] = False
                    words = realrays.STATUS_WORDS.get(int(rays.status[j]), "lost")
                    key = (step.name, words)
                    lost[key] = lost.get(key, 0) + 1
                    continue
                zs[j].append(float(rays.z[j]))
                ys[j].append(float(rays.y[j]))
        for (name, words), count in lost.items():
            where_ = "on the axis" if f == 0 else f"at field {f:g}"
            notes.append(f"{count} of the {len(pupils)} exact rays {where_} "
                         f"{'end' if count > 1 else 'ends'} at {name} ({words})")
        for j, p in enumerate(pupils):
            virtual_z: tuple[float, ...] = ()
            virtual_y: tuple[float, ...] = ()
            if alive[j]:
                t = (z_end - rays.z[j]) / rays.kz[j]
                if t > 0:
                    zs[j].append(z_end)
                    ys[j].append(float(rays.y[j] + t * rays.ky[j]))
                if virtual_image is not None:  # where the light seems to come from
                    back = (virtual_image - rays.z[j]) / rays.kz[j]
                    virtual_z = (float(rays.z[j]), virtual_image)
                    virtual_y = (float(rays.y[j]), float(rays.y[j] + back * rays.ky[j]))
            paths.append(RayPath(_role(f, float(p)), "exact", tuple(zs[j]), tuple(ys[j]),
                                 virtual_z, virtual_y, f, float(p)))
    return paths, notes


def exact_setup(system: System, results: FirstOrder):
    """The exact-ray setup a drawing traces from, or why there is none (words)."""
    from ..engines import aberrations

    s = aberrations.setup(system, results)
    if isinstance(s, Unavailable):
        if system.stop is None:
            return "need a stop"
        return "cannot be traced here: " + str(s).removeprefix("none: ")
    return s
