"""The numbers behind a drawing: where each boundary, element, stop and ray sits in the plane.

Pure geometry (no plotting), so it can be tested without matplotlib. Positions are global: z
along the axis (light starts in +z), y up. Each vertex sits where the gaps, walked along the
current sense of travel, put it, so a mirror folds the path back on itself exactly as the light
goes. Rays are the paraxial marginal ray (axial object point to the edge of the stop) and chief
ray (edge of the field through the centre of the stop), drawn ending on the surface profiles.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field, replace

import numpy as np

from ..engines import paraxial
from ..engines.firstorder import FirstOrder, Unavailable, first_order
from ..engines.paraxial import TRANSFER, Step
from ..errors import LayoutError, LayoutValueError
from ..system import IDEAL, MIRROR, System

__all__ = ["Profile", "Element", "RayPath", "BeamEnvelope", "CrossSection", "cross_section",
           "sag", "beam_envelope"]

#: Extra room beyond the ray bundle when no clear diameter is given (the glass is never cut
#: exactly at the ray): common practice in drawings, the value is ours.
APERTURE_MARGIN = 1.1


def sag(curvature: float, height: np.ndarray) -> np.ndarray:
    """The sag of a sphere of this curvature at these heights (0 for a plane)."""
    height = np.asarray(height, dtype=float)
    if curvature == 0:
        return np.zeros_like(height)
    root = np.sqrt(np.clip(1 - (curvature * height) ** 2, 0, None))
    return curvature * height ** 2 / (1 + root)


@dataclass(frozen=True)
class Profile:
    """One boundary as drawn: its vertex, curvature and the semi-aperture it is drawn to."""

    name: str
    kind: str
    z: float
    curvature: float
    semi_aperture: float
    sense_in: int  # the sense of travel of the light arriving at it
    from_clear_diameter: bool
    power: float = 0.0

    def points(self, samples: int = 41) -> tuple[np.ndarray, np.ndarray]:
        """(z, y) along the profile from -semi_aperture to +semi_aperture."""
        y = np.linspace(-self.semi_aperture, self.semi_aperture, samples)
        return self.z + sag(self.curvature, y), y

    def z_at(self, y: float) -> float:
        """Where the profile is at height y (clamped to the aperture: a flat rim beyond)."""
        limited = max(-self.semi_aperture, min(self.semi_aperture, y))
        return float(self.z + sag(self.curvature, np.array(limited)))


@dataclass(frozen=True)
class Element:
    """A piece of material between two boundaries (a lens element or a plate)."""

    first: int
    second: int
    medium: str
    edge: float  # the semi-height of its rim

    def outline(self, profiles: list[Profile], samples: int = 41) -> tuple[np.ndarray, np.ndarray]:
        """A closed outline: down the first face, up the second, with flat rims where one
        face is smaller than the rim."""
        y = np.linspace(-self.edge, self.edge, samples)
        a, b = profiles[self.first], profiles[self.second]
        za = np.array([a.z_at(v) for v in y])
        zb = np.array([b.z_at(v) for v in y[::-1]])
        return np.concatenate([za, zb, za[:1]]), np.concatenate([y, y[::-1], y[:1]])


@dataclass(frozen=True)
class RayPath:
    """One drawn ray: its role (marginal or chief), wavelength label and (z, y) points."""

    role: str
    label: str
    z: tuple[float, ...]
    y: tuple[float, ...]
    #: for a virtual image: the backward extension from the last boundary to the image
    virtual_z: tuple[float, ...] = ()
    virtual_y: tuple[float, ...] = ()


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
    beam: BeamEnvelope | None = None  # a layout with a Gaussian beam

    def extent(self) -> tuple[float, float, float]:
        """(z min, z max, largest |y|) of everything drawn."""
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
        notes.append("no stop given: the rays are drawn through the edge of the first boundary")
        first = system.boundaries[0]
        radius = float(first.clear_diameter) / 2 if first.clear_diameter is not None else None
        front: list[Step] = []
    else:
        stop_diameter = results["stop diameter"]
        radius = None if isinstance(stop_diameter, Unavailable) else stop_diameter / 2
        front = paraxial.split_at_stop(system).front
    if radius is None:
        if system.stop is not None:
            notes.append(f"marginal ray not drawn: {results['stop diameter']}")
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
            section = _cross_section(system, results, exact)
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
    starts = [("marginal", marginal), ("marginal", _flip(marginal)), ("chief", chief)]
    starts = [(role, start) for role, start in starts if start is not None]
    heights = {id(start): _heights(system, *start) for _, start in starts}

    # apertures: the clear diameter, else the ray bundle at that boundary plus a margin
    profiles: list[Profile] = []
    plane = results["image plane distance"]
    length_scale = max(abs(max(vertices) - min(vertices)),
                       0 if isinstance(plane, Unavailable) else abs(float(plane)), 1e-9)
    for i, boundary in enumerate(system.boundaries):
        if boundary.clear_diameter is not None:
            semi, given = float(boundary.clear_diameter) / 2, True
        else:
            m = abs(_heights_at(heights, marginal, i))
            c = abs(_heights_at(heights, chief, i))
            semi, given = (m + c) * APERTURE_MARGIN, False
            if semi == 0:
                semi = 0.1 * length_scale
        curvature = float(boundary.curvature)
        if curvature and semi * abs(curvature) >= 1:  # beyond a hemisphere: draw the hemisphere
            semi = 0.999 / abs(curvature)
            notes.append(f"{boundary.name}: drawn to a hemisphere (the aperture exceeds it)")
        profiles.append(Profile(boundary.name, boundary.kind, vertices[i], curvature, semi,
                                senses[i], given, float(boundary.power or 0)))

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
                notes.append("the object is virtual (after the first boundary): not drawn")
            else:
                notes.append("the object is far away: the rays are cut short before the layout")
    image = None
    sense_k = senses[-1]
    if isinstance(plane, Unavailable):
        after = lead
        notes.append(f"image plane not drawn: {plane}")
    else:
        after = float(plane)
    nk = system.indices()[-1]

    rays = []
    for role, start in starts:
        y0, nu0 = start
        zs = [z_first - before]
        ys = [y0 - nu0 / n0 * before]
        for i, y in enumerate(heights[id(start)]):
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
        rays.append(RayPath(role, "", tuple(zs), tuple(ys), virtual_z, virtual_y))
    if not isinstance(plane, Unavailable):
        tips = [abs(r.virtual_y[-1] if r.virtual_y else r.y[-1]) for r in rays]
        height = max(tips + [0.15 * max(p.semi_aperture for p in profiles)])
        image = (z_last + sense_k * after, 1.15 * height)
    if exact and (starts or system.beam is None):  # a beam without a stop: no rays
        traced = _exact_rays(system, results, z_first - before,
                             z_last + sense_k * (after if after >= 0 else lead))
        if isinstance(traced, str):
            notes.append(f"paraxial rays drawn: exact rays {traced}")
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
    beam = None
    if system.beam is not None:
        beam = beam_envelope(system, length_scale, lead, notes)
    return CrossSection(system.title, system.units, profiles, elements, rays, stop, image,
                        object_plane, notes, beam)


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


def _flip(start):
    return None if start is None else (-start[0], -start[1])


def _heights_at(heights: dict, start, i: int) -> float:
    return 0.0 if start is None else heights[id(start)][i]


def _exact_rays(system: System, results: FirstOrder, z_start: float, z_end: float
                ) -> tuple[list[RayPath], list[str]] | str:
    """The marginal and chief rays traced exactly (Snell's law at the real spheres), launched
    from the object point toward the paraxial entrance pupil (edge or centre). Returns the
    ray paths and notes on lost rays, or the reason (words) there are none."""
    try:
        from ..engines import realrays
    except ImportError:
        return "need the exact-ray engine"
    if system.stop is None:
        return "need a stop"
    pupil_z, pupil_d = results["entrance pupil position"], results["entrance pupil diameter"]
    for value in (pupil_z, pupil_d):
        if isinstance(value, Unavailable):
            return f"need a finite entrance pupil ({value})"
    pupil_z, radius = float(pupil_z), float(pupil_d) / 2
    obj = system.object
    launches = [("marginal", 0.0, radius), ("marginal", 0.0, -radius)]
    if obj.at_infinity:
        slope = -math.tan(float(obj.field_angle))
        if slope:
            launches.append(("chief", slope, 0.0))
    elif float(obj.height):
        launches.append(("chief", 1.0, 0.0))
    geo = realrays.geometry(system)
    indices = [float(n) for n in system.indices()]
    boundary_steps = [k for k, step in enumerate(geo.steps) if step.boundary >= 0]
    image, where = results["image distance"], results["image position"]
    virtual_image = (float(where) if not isinstance(image, Unavailable) and image < 0
                     and not isinstance(where, Unavailable) else None)
    paths, notes = [], []
    for role, field_, pupil_y in launches:
        if obj.at_infinity:  # parallel rays, through the pupil point at the pupil plane
            y_start = pupil_y + field_ * (z_start - pupil_z)
            start = realrays.Rays.start(0.0, y_start, z_start, 0.0, field_, 1.0)
        else:
            distance, height = float(obj.distance), float(obj.height) * field_
            start = realrays.Rays.start(0.0, height, -distance, 0.0, pupil_y - height,
                                        pupil_z + distance)
        zs, ys = [], []
        if obj.at_infinity or -float(obj.distance) <= z_start:
            t = (z_start - start.z[0]) / start.kz[0]
            zs.append(z_start)
            ys.append(float(start.y[0] + t * start.ky[0]))
        else:
            zs.append(float(start.z[0]))
            ys.append(float(start.y[0]))
        lost = None
        rays = start.copy()
        done = 0  # steps traced so far: each boundary continues from the last (linear, not
        for k in boundary_steps:  # a trace from the start per boundary)
            rays = realrays.trace(rays, geo, indices, geo.steps[done: k + 1])
            done = k + 1
            if rays.status[0] in realrays.LOST or \
                    not math.isfinite(float(rays.y[0])):
                lost = f"an exact {role} ray is {realrays.STATUS_WORDS[int(rays.status[0])]} at " \
                       f"{geo.steps[k].name}"
                break
            zs.append(float(rays.z[0]))
            ys.append(float(rays.y[0]))
        virtual_z: tuple[float, ...] = ()
        virtual_y: tuple[float, ...] = ()
        if lost:
            notes.append(lost)
        else:
            t = (z_end - rays.z[0]) / rays.kz[0]
            if t > 0:
                zs.append(z_end)
                ys.append(float(rays.y[0] + t * rays.ky[0]))
            if virtual_image is not None:  # where the light seems to come from
                back = (virtual_image - rays.z[0]) / rays.kz[0]
                virtual_z = (float(rays.z[0]), virtual_image)
                virtual_y = (float(rays.y[0]), float(rays.y[0] + back * rays.ky[0]))
        paths.append(RayPath(role, "exact", tuple(zs), tuple(ys), virtual_z, virtual_y))
    return paths, notes
