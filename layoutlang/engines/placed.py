"""What placements do to a layout: where the image lands and faces, how far the beam turns,
prism deviation per wavelength, and first-order numbers about the real axial ray.

Built on `frames` (where the surfaces are) and `realrays` (the exact trace in local frames).
The *real axial ray* is the ray of the central field through the centre of the real stop
(aimed as for every ray analysis), or, without a stop, the ray along the object-space axis.
For a decentred or tilted layout the paraxial numbers of `firstorder` describe the nominal,
coaxial layout; the parabasal numbers here are the first-order properties about the real axial
ray (neighbouring rays 1e-4 of the entrance pupil radius, or 1e-6 of the layout's size,
away: finite differences of exact rays, common practice).

Angles are in radians; lengths in layout units; every result is a float or `Unavailable`.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Any, Sequence

import numpy as np

from ..system import System
from . import realrays
from .firstorder import FirstOrder, Unavailable, first_order
from .frames import layout3d, rotation

__all__ = ["ImagePlacement", "image_placement", "axis_turn", "prism_deviation",
           "parabasal", "Parabasal", "axial_ray", "beam_deviation"]

Value = Any


def axis_turn(system: System) -> float:
    """Angle between the light's direction along the object-space axis and along the
    image-space axis (the folds), radians."""
    placed = layout3d(system)
    _, axes = placed.axes[-1]
    travel = placed.senses[-1] * axes[:, 2]
    return float(math.acos(max(-1.0, min(1.0, float(travel[2])))))


def _start(system: System, results: FirstOrder, indices):
    """The real axial ray as one `Rays` in object space, or Unavailable."""
    from .aberrations import _object_rays, aim, setup

    if system.stop is not None:
        s = setup(system, results, indices) if indices is not None else setup(system, results)
        if not isinstance(s, Unavailable):
            ex, ey = aim(s, 0.0, np.array([0.0]), np.array([0.0]))
            return _object_rays(s, 0.0, ex, ey), s
    obj = system.object
    z0 = -1.0 if obj.at_infinity else -float(obj.distance)
    return realrays.Rays.start(0.0, 0.0, z0, 0.0, 0.0, 1.0), None


def axial_ray(system: System, indices: Sequence[float] | None = None,
              results: FirstOrder | None = None):
    """(points (n + 1, 3), directions (n + 1, 3)) of the real axial ray in the global frame:
    the start in object space, then after each boundary; or Unavailable when it is lost."""
    results = results or first_order(system)
    start, _ = _start(system, results, indices)
    if isinstance(start, Unavailable):
        return start
    geo = realrays.geometry(system)
    indices = tuple(float(n) for n in (system.indices() if indices is None else indices))
    points, directions = [start.data[0:3, 0].copy()], [start.data[3:6, 0].copy()]
    boundary_steps = [k for k, step in enumerate(geo.steps) if step.boundary >= 0]
    for k in boundary_steps:
        rays = realrays.trace(start.copy(), geo, indices, geo.steps[: k + 1],
                              coordinates="global")
        if not rays.ok[0] and rays.status[0] != realrays.VIGNETTED:
            return Unavailable(f"none: the axial ray {realrays.STATUS_WORDS[int(rays.status[0])]}"
                               f" at '{geo.steps[k].name}'")
        points.append(_global(geo, rays, k, system)[0])
        directions.append(_global(geo, rays, k, system)[1])
    return np.array(points), np.array(directions)


def _global(geo, rays, k, system):
    """A ray of a (possibly coaxial) partial trace in the global frame."""
    return rays.data[0:3, 0].copy(), rays.data[3:6, 0].copy()


def beam_deviation(system: System, indices=None, results=None) -> Value:
    """Angle between the real axial ray entering the layout and leaving it (radians)."""
    found = axial_ray(system, indices, results)
    if isinstance(found, Unavailable):
        return found
    _, directions = found
    return _angle(directions[0], directions[-1])


def prism_deviation(system: System, first: int, last: int, indices=None,
                    results=None) -> Value:
    """Angle the real axial ray turns by from before face `first` to after face `last`."""
    found = axial_ray(system, indices, results)
    if isinstance(found, Unavailable):
        return found
    _, directions = found
    return _angle(directions[first], directions[last + 1])


def _angle(a: np.ndarray, b: np.ndarray) -> float:
    a, b = a / np.linalg.norm(a), b / np.linalg.norm(b)
    return float(math.atan2(np.linalg.norm(np.cross(a, b)), float(a @ b)))


@dataclass(frozen=True)
class ImagePlacement:
    """The image in the global frame.

    Attributes:
        point: where the image plane meets the image-space axis (x, y, z).
        ray_point: where the real axial ray meets the image plane (or Unavailable).
        shift: distance between the two, in the image plane.
        travel: unit direction of the light along the image-space axis.
        normal: the image plane's normal (along the light).
        up, right: where the object's +y and +x land on the image (inversion included).
        reversed: the image is a mirror image of the object (an odd number of reflections).
        turn: axis turn (radians) between object-space and image-space axes.
        tilt: the image plane's tilt from square to the axis (radians).
    """

    point: tuple[float, float, float]
    ray_point: Any
    shift: Value
    travel: tuple[float, float, float]
    normal: tuple[float, float, float]
    up: tuple[float, float, float]
    right: tuple[float, float, float]
    reversed: bool
    turn: float
    tilt: float


def image_plane(system: System, results: FirstOrder):
    """(origin, rotation) of the image plane in the global frame, or Unavailable."""
    plane = results["image plane distance"]
    if isinstance(plane, Unavailable):
        return plane
    placed = layout3d(system)
    origin, axes = placed.axis_point(len(system.boundaries), float(plane))
    if system.image.tilt is not None:
        axes = axes @ rotation(system.image.tilt)
    return origin, axes


def image_placement(system: System, results: FirstOrder | None = None) -> ImagePlacement | Unavailable:
    """Position and orientation of the image in the global frame."""
    results = results or first_order(system)
    found = image_plane(system, results)
    if isinstance(found, Unavailable):
        return Unavailable(f"none: the image plane is {found}")
    origin, axes = found
    placed = layout3d(system)
    _, axis_axes = placed.axes[-1]
    sense = placed.senses[-1]
    travel = sense * axis_axes[:, 2]
    magnification = results["magnification"]
    sign = -1.0  # an object at infinity: the image of a distant scene is inverted by a lens
    if not isinstance(magnification, Unavailable):
        sign = 1.0 if float(magnification) > 0 else -1.0
    elif not isinstance(results["focal length"], Unavailable):
        sign = -1.0 if float(results["focal length"]) > 0 else 1.0
    up, right = sign * axis_axes[:, 1], sign * axis_axes[:, 0]
    handed = float(np.linalg.det(np.column_stack([right, up, travel])))
    ray = axial_ray(system, results=results)
    ray_point: Any = Unavailable("none: the axial ray is lost")
    shift: Value = ray_point
    if not isinstance(ray, Unavailable):
        point, direction = ray[0][-1], ray[1][-1]
        normal = axes[:, 2]
        denominator = float(direction @ normal)
        if abs(denominator) > 1e-15:
            t = float((origin - point) @ normal) / denominator
            hit = point + t * direction
            ray_point = tuple(float(v) for v in hit)
            shift = float(np.linalg.norm(hit - origin))
    tilt = _angle(axes[:, 2], axis_axes[:, 2])
    return ImagePlacement(tuple(float(v) for v in origin), ray_point, shift,
                          tuple(float(v) for v in travel),
                          tuple(float(v) for v in sense * axes[:, 2]),
                          tuple(float(v) for v in up), tuple(float(v) for v in right),
                          handed < 0, axis_turn(system), tilt)


@dataclass(frozen=True)
class Parabasal:
    """First-order numbers about the real axial ray (y: in the plane of the local y axis)."""

    focal_length_y: Value
    focal_length_x: Value
    back_focal_distance: Value  # last boundary (along the axial ray) to the parabasal focus


def parabasal(system: System, results: FirstOrder | None = None) -> Parabasal:
    """Focal lengths and back focal distance from rays parallel to the real axial ray in
    object space, h away in y and in x, read in a frame about the exit axial ray."""
    results = results or first_order(system)
    start, s = _start(system, results, None)
    none = Unavailable("none: the real axial ray is lost")
    if isinstance(start, Unavailable):
        return Parabasal(start, start, start)
    geo = realrays.geometry(system)
    indices = tuple(float(n) for n in system.indices())
    scale = max((abs(z) for z in geo.vertex_z), default=1.0) or 1.0
    h = (s.entrance_radius * 1e-4) if s is not None and s.entrance_radius > 0 else scale * 1e-6
    p0, k0 = start.data[0:3, 0], start.data[3:6, 0]
    e_y = np.array([0.0, 1.0, 0.0]) - k0[1] * k0
    e_y /= np.linalg.norm(e_y)
    e_x = np.cross(e_y, k0)
    offsets = [p0, p0 + h * e_y, p0 + h * e_x]
    rays = realrays.Rays.start(*(np.array([o[i] for o in offsets]) for i in range(3)),
                               *(np.full(3, k0[i]) for i in range(3)))
    realrays.trace(rays, geo, indices)
    if not np.all(np.isfinite(rays.data)):
        return Parabasal(none, none, none)
    a = rays.data[3:6, 0]
    a = a / np.linalg.norm(a)
    base = rays.data[0:3, 0]
    out_y = np.array([0.0, 1.0, 0.0]) - a[1] * a
    out_y /= np.linalg.norm(out_y)
    out_x = np.cross(out_y, a)
    found = []
    crossings = []
    for ray, axis in ((1, out_y), (2, out_x)):
        k = rays.data[3:6, ray]
        slope = float(k @ axis) / float(k @ a)
        d = rays.data[0:3, ray] - base
        if abs(slope) < 1e-15:
            found.append(Unavailable("none: the layout is afocal about the axial ray"))
            continue
        found.append(-h / slope)
        crossings.append(float(d @ a) - float(d @ axis) / slope)
    bfd: Value = crossings[0] if crossings else Unavailable("none: afocal about the axial ray")
    return Parabasal(found[0], found[1], bfd)
