"""A drawing's geometry for a placed layout: the folded path in true geometry.

The coaxial cross-section (`cross_section._cross_section`) still decides what is drawn and how
large (apertures, elements, the stop, the image plane); this module moves every part to where
`engines/frames.py` puts it in the global frame and projects it on the plane of the fold (the
plane the axis turns in; the y-z plane when nothing folds), with equal scales. Faces are drawn
in their own frames, so a tilted mirror is a tilted line and a prism its real outline; exact
rays are traced in the global frame surface by surface (`realrays.trace_step`). Parts off the
plane are projected on it and the drawing says so.

Drawn coordinates: u along the global z (light starts toward +u), v across it in the plane.
"""

from __future__ import annotations

from dataclasses import dataclass, replace

import numpy as np

from ..engines.firstorder import FirstOrder, Unavailable
from ..engines.frames import Layout3D, layout3d
from ..system import System
from .cross_section import FIELDS, PUPILS, CrossSection, RayPath, _role, exact_setup

__all__ = ["PlacedView", "placed_section", "drawing_plane"]

Points = tuple[tuple[float, ...], tuple[float, ...]]


@dataclass(frozen=True)
class PlacedView:
    """What a placed drawing adds to a cross-section, in drawn coordinates (u, v).

    Attributes:
        axis: the folded axis as a polyline.
        stop_marks: the stop's two bars, each a segment ((u, v), (u, v)).
        image_line: the image plane as a segment, or None.
        bounds: (u min, u max, v min, v max) of everything drawn.
        plane: words naming the plane of the drawing.
    """

    axis: Points
    stop_marks: tuple[tuple[tuple[float, float], tuple[float, float]], ...]
    image_line: tuple[tuple[float, float], tuple[float, float]] | None
    bounds: tuple[float, float, float, float]
    plane: str


def drawing_plane(placed: Layout3D) -> tuple[np.ndarray, np.ndarray, np.ndarray, str]:
    """(e_u, e_v, normal, words): the plane the axis turns in; else the plane of the largest
    displacement (y-z unless the layout moves mostly in x)."""
    e_u = np.array([0.0, 0.0, 1.0])
    normal = None
    for _, axes in placed.axes[1:]:
        turn = np.cross(e_u, axes[:, 2])
        if np.linalg.norm(turn) > 1e-9:
            normal = turn / np.linalg.norm(turn)
            break
    if normal is None:
        spread_x = max(abs(o[0]) for o, _ in placed.surfaces)
        spread_y = max(abs(o[1]) for o, _ in placed.surfaces)
        normal = np.array([0.0, 1.0, 0.0]) if spread_x > spread_y else np.array([1.0, 0.0, 0.0])
    e_v = np.cross(e_u, normal)
    if e_v[1] < -1e-12 or (abs(e_v[1]) <= 1e-12 and e_v[0] < 0):
        e_v, normal = -e_v, -normal
    if abs(normal[0]) > 1 - 1e-12:
        words = "the y-z plane"
    elif abs(normal[1]) > 1 - 1e-12:
        words = "the x-z plane"
    else:
        words = "the plane of the fold"
    return e_u, e_v, normal, words


def placed_section(system: System, base: CrossSection, results: FirstOrder,
                   exact: bool) -> CrossSection:
    """`base` (the coaxial section of the same layout) moved onto the folded path."""
    placed = layout3d(system)
    if placed.problem:
        raise _problem(placed.problem)
    e_u, e_v, normal, words = drawing_plane(placed)
    scale = max(1.0, *(float(np.linalg.norm(o)) for o, _ in placed.surfaces))
    off_plane = [False]

    def project(points: np.ndarray) -> Points:
        """Global points (3, N) → drawn (u, v)."""
        if np.any(np.abs(normal @ points) > 1e-9 * scale):
            off_plane[0] = True
        return tuple(float(v) for v in e_u @ points), tuple(float(v) for v in e_v @ points)

    def on_face(i: int, heights: np.ndarray) -> np.ndarray:
        """Points of face i at these heights along its local in-plane direction (3, N)."""
        origin, axes = placed.surfaces[i]
        across = _in_plane(axes, normal)
        profile = base.profiles[i]
        limited = np.clip(heights, -profile.semi_aperture, profile.semi_aperture)
        local_z = profile.sag(limited)
        return origin[:, None] + np.outer(across, heights) + np.outer(axes[:, 2], local_z)

    profiles = []
    for i, profile in enumerate(base.profiles):
        heights = np.linspace(-profile.semi_aperture, profile.semi_aperture, 81)
        outline = project(on_face(i, heights))
        origin, axes = placed.surfaces[i]
        arriving = placed.senses[i] * placed.axes[i][1][:, 2]
        back = np.array([e_u @ arriving, e_v @ arriving])
        back = back / (np.linalg.norm(back) or 1.0)
        u, v = project(origin[:, None])
        profiles.append(replace(profile, z=u[0], outline=outline,
                                back=(float(back[0]), float(back[1])), vertex_v=v[0]))
    elements = []
    for element in base.elements:
        heights = np.linspace(-element.edge, element.edge, 81)
        a = on_face(element.first, heights)
        b = on_face(element.second, heights[::-1])
        ring = np.concatenate([a, b, a[:, :1]], axis=1)
        elements.append(replace(element, polygon=project(ring)))

    notes = [n for n in base.notes if not n.startswith("paraxial rays are drawn")]
    image_frame = _image_frame(system, results)
    rays = None
    if exact:
        traced = _exact(system, results, placed, image_frame, base, project)
        if isinstance(traced, str):
            notes.append(f"paraxial rays are drawn about the folded axis (exact rays {traced})")
        else:
            rays, lost = traced
            notes.extend(lost)
    if rays is None:
        rays = [_mapped(ray, placed, base, system) for ray in base.rays]
        rays = [replace(ray, z=project(np.array(points))[0], y=project(np.array(points))[1])
                for ray, points in zip(base.rays, rays)]

    axis_points = [np.array([0.0, 0.0, min(base.extent()[0], placed.path_z[0])])]
    axis_points += [origin for origin, _ in placed.axes[1:]]
    image_line = None
    if image_frame is not None and base.image is not None:
        origin, axes = image_frame
        axis_points.append(origin)
        across = _in_plane(axes, normal)
        h = base.image[1]
        ends = project(np.column_stack([origin - h * across, origin + h * across]))
        image_line = ((ends[0][0], ends[1][0]), (ends[0][1], ends[1][1]))
    else:
        origin, axes = placed.axes[-1]
        axis_points.append(origin + placed.senses[-1] * axes[:, 2] * 0.3 * scale)
    axis = project(np.column_stack(axis_points))

    stop_marks = ()
    if base.stop is not None and system.stop is not None:
        stop = system.stop
        if stop.after >= 0 and stop.offset == 0:
            origin, axes = placed.surfaces[stop.after]
            lift = float(base.profiles[stop.after].sag(np.array(base.stop[1])))
        else:
            origin, axes = placed.axis_point(stop.after + 1, float(stop.offset))
            lift = 0.0
        across = _in_plane(axes, normal)
        r = base.stop[1]
        bar = max(0.22 * r, 0.04 * max(p.semi_aperture for p in base.profiles))
        marks = []
        for sign in (1, -1):
            ends = project(np.column_stack([origin + sign * r * across + lift * axes[:, 2],
                                            origin + sign * (r + bar) * across
                                            + lift * axes[:, 2]]))
            marks.append(((ends[0][0], ends[1][0]), (ends[0][1], ends[1][1])))
        stop_marks = tuple(marks)
    if off_plane[0]:
        notes.append(f"drawn in {words}: parts off it are projected on it")
    us = list(axis[0])
    vs = list(axis[1])
    for profile in profiles:
        us.extend(profile.outline[0])
        vs.extend(profile.outline[1])
    for ray in rays:
        us.extend(ray.z)
        vs.extend(ray.y)
    for segment in ((image_line,) if image_line else ()) + stop_marks:
        for point in segment:
            us.append(point[0])
            vs.append(point[1])
    if base.object_plane is not None:
        us.append(base.object_plane[0])
        vs.extend((0.0, base.object_plane[1]))
    bounds = (min(us), max(us), min(vs), max(vs))
    view = PlacedView(axis, stop_marks, image_line, bounds, words)
    return replace(base, profiles=profiles, elements=elements, rays=rays, notes=notes,
                   placed=view, fields=tuple(sorted({r.field for r in rays})))


def _problem(words: str):
    from ..errors import LayoutValueError

    return LayoutValueError(f"this layout cannot be drawn: {words}")


def _in_plane(axes: np.ndarray, normal: np.ndarray) -> np.ndarray:
    """The direction across a face that lies in the drawing plane (its local y for a face
    standing in the y-z plane)."""
    across = np.cross(normal, axes[:, 2])
    size = float(np.linalg.norm(across))
    if size < 1e-9:  # the face lies in the drawing plane: its own y
        return axes[:, 1]
    across /= size
    return across if across @ axes[:, 1] >= 0 or abs(across @ axes[:, 1]) < 1e-12 and \
        across @ axes[:, 0] >= 0 else -across


def _image_frame(system: System, results: FirstOrder):
    from ..engines.placed import image_plane

    found = image_plane(system, results)
    return None if isinstance(found, Unavailable) else found


def _mapped(ray: RayPath, placed: Layout3D, base: CrossSection, system: System) -> np.ndarray:
    """A paraxial ray of the coaxial section (path coordinates) on the folded path: its start
    in object space, each point at a boundary on that boundary's frame, its end on the
    image-space axis (3, N)."""
    points = []
    count = len(placed.surfaces)
    for k, (z, y) in enumerate(zip(ray.z, ray.y)):
        if k == 0:
            origin, axes, z0 = placed.axes[0][0], placed.axes[0][1], 0.0
        elif k <= count:
            (origin, axes), z0 = placed.surfaces[k - 1], placed.path_z[k - 1]
        else:
            (origin, axes), z0 = placed.axes[-1], placed.path_z[-1]
        points.append(origin + axes @ np.array([0.0, y, z - z0]))
    return np.array(points).T


def _exact(system: System, results: FirstOrder, placed: Layout3D, image_frame, base, project):
    """The bundles traced exactly in the global frame, recorded at every step (so rays pass
    the drawn stop and turn at the drawn mirrors), ended on the image plane."""
    from ..engines import aberrations, realrays

    s = exact_setup(system, results)
    if isinstance(s, str):
        return s
    geo, indices = s.geo, list(s.indices)
    if geo.problem:
        return "cannot be traced here: " + geo.problem
    z_start = base.extent()[0] if base.object_plane is None else base.object_plane[0]
    obj = system.object
    has_field = any(r.field for r in base.rays) or bool(obj.field_angle if obj.at_infinity
                                                         else obj.height)
    fields = FIELDS if has_field else (0.0,)
    length = max(1.0, base.extent()[1] - base.extent()[0])
    paths, notes = [], []
    for f in fields:
        pupils = np.array([p for p in PUPILS if f or p])
        rays = aberrations.aimed(s, f, np.zeros_like(pupils), pupils)
        if obj.at_infinity or -float(obj.distance) <= z_start:
            t = (z_start - rays.z) / rays.kz
            first = np.array([rays.x + t * rays.kx, rays.y + t * rays.ky,
                              np.full(len(pupils), z_start)])
        else:
            first = np.array([rays.x, rays.y, rays.z])
        points = [[first[:, j]] for j in range(len(pupils))]
        alive = np.ones(len(pupils), dtype=bool)
        lost: dict[tuple[str, str], int] = {}
        for k, step in enumerate(geo.steps):
            realrays.trace_step(rays, geo, indices, k)
            for j in range(len(pupils)):
                if not alive[j]:
                    continue
                here = rays.data[0:3, j]
                if rays.status[j] in realrays.LOST or not np.all(np.isfinite(here)):
                    alive[j] = False
                    key = (step.name, realrays.STATUS_WORDS.get(int(rays.status[j]), "lost"))
                    lost[key] = lost.get(key, 0) + 1
                    continue
                points[j].append(here.copy())
        for (name, words), count in lost.items():
            where = "on the axis" if f == 0 else f"at field {f:g}"
            notes.append(f"{count} of the {len(pupils)} exact rays {where} "
                         f"{'end' if count > 1 else 'ends'} at {name} ({words})")
        for j, p in enumerate(pupils):
            if alive[j]:
                here, k = rays.data[0:3, j], rays.data[3:6, j]
                k = k / np.linalg.norm(k)
                t = 0.3 * length
                if image_frame is not None and base.image is not None:
                    origin, axes = image_frame
                    denominator = float(k @ axes[:, 2])
                    if abs(denominator) > 1e-12:
                        t = float((origin - here) @ axes[:, 2]) / denominator
                if t > 0:
                    points[j].append(here + t * k)
            u, v = project(np.array(points[j]).T)
            paths.append(RayPath(_role(f, float(p)), "exact", u, v, (), (), f, float(p)))
    return paths, notes
