"""Where every surface of a layout sits in space: one `Frame` per boundary, in a global frame.

The global frame is the object-space axis: the first vertex at the origin, light starting in
+z. A coaxial layout (no placements) gives exactly today's vertex positions, (0, 0, z) with z
reached by walking the gaps along the sense of travel, and identity rotations — also after a
mirror: a surface's local z stays the direction in which a positive radius has its centre, so
the README's sign convention holds in every local frame.

How the frames are found. Walk the layout unfolded, as if coaxial ("path coordinates": the
nominal frame of boundary i is (0, 0, z_i) with identity rotation). Each placement is a rigid
motion X ↦ Q X + t of those coordinates, covering a run of *slots* (slot 2i is boundary i,
slot 2i + 1 the axis in the space after it):

- a boundary's own placement (decenter D, then tilt T about the decentred vertex) covers its
  own slot;
- axis returns (a perturbation): nothing else moves;
- axis follows, after a mirror: the axis after it is the incoming axis reflected in the
  placed mirror. With H = I − 2 n nᵀ (n the mirror's normal, T e_z) the axes after are
  H · R · diag(1, 1, −1): x and y are the mirror images of the incoming ones and z is the
  reverse of the mirrored z (a proper rotation, and the identity for an untilted mirror, as in
  the coaxial case). So the sense of travel still flips at every mirror exactly as in
  `System.directions()`, and in the local coordinates after a fold a ray has the same numbers
  as after an untilted flat mirror — a pure fold changes no first-order quantity, no spot and
  no image, only where they are and which way they face in the global frame;
- axis follows, after a refracting surface: the axis after is the axis ray refracted at the
  placed vertex (Snell's law on the tilted normal, primary wavelength), turned by the smallest
  rotation from the old direction; it starts from the placed vertex. This is the one
  adjustment to `surfaces/placement.py`'s first reading ("turned with the surface"): a prism
  face or a tilted window sends the light along the refracted axis, and the surfaces after
  must stand on it;
- a group (an element moved as one body about its first vertex) covers its boundaries and the
  axes between them; with axis follows, everything after it too.

A slot's actual frame is its nominal frame moved by every motion covering it, the motion of
the earliest pivot outermost (a later placement is said in the frame the earlier ones left).

Engines read `Layout3D`: `surfaces[i]` the frame of boundary i, `axes[i]` the axis frame of
space i (object space first; origin where the axis leaves the vertex before it), both as
numpy arrays, plus the `Frame` values of the model.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Sequence

import numpy as np

from ..surfaces.placement import FOLLOWS, IDENTITY, Frame, Placement
from ..system import MIRROR, System

__all__ = ["Layout3D", "Motion", "layout3d", "rotation", "frame_of", "coaxial_z"]


@dataclass(frozen=True)
class Motion:
    """A rigid motion X ↦ Q X + t."""

    q: np.ndarray
    t: np.ndarray

    def then_inside(self, inner: "Motion") -> "Motion":
        """self ∘ inner: `inner` first, then self."""
        return Motion(self.q @ inner.q, self.q @ inner.t + self.t)

    def apply(self, origin: np.ndarray, axes: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        return self.q @ origin + self.t, self.q @ axes


_STILL = None  # the identity motion, built lazily


def _identity() -> Motion:
    return Motion(np.eye(3), np.zeros(3))


def rotation(tilt: Sequence[float]) -> np.ndarray:
    """Right-handed rotation of local axes by (about x, about y, about z) radians, applied in
    that order about the fixed axes of the frame it is said in: Rz · Ry · Rx."""
    ax, ay, az = (float(a) for a in tilt)
    cx, sx, cy, sy, cz, sz = math.cos(ax), math.sin(ax), math.cos(ay), math.sin(ay), \
        math.cos(az), math.sin(az)
    rx = np.array([[1.0, 0.0, 0.0], [0.0, cx, -sx], [0.0, sx, cx]])
    ry = np.array([[cy, 0.0, sy], [0.0, 1.0, 0.0], [-sy, 0.0, cy]])
    rz = np.array([[cz, -sz, 0.0], [sz, cz, 0.0], [0.0, 0.0, 1.0]])
    return rz @ ry @ rx


def _own_motion(placement: Placement, pivot: np.ndarray) -> Motion:
    """Decenter, then tilt about the decentred vertex (path coordinates: nominal axes = I)."""
    q = rotation(placement.tilt)
    shift = np.array([float(placement.decenter[0]), float(placement.decenter[1]), 0.0])
    moved = pivot + shift
    return Motion(q, moved - q @ pivot)


def _smallest_turn(a: np.ndarray, b: np.ndarray) -> np.ndarray:
    """The smallest rotation taking unit vector a to unit vector b (Rodrigues)."""
    v = np.cross(a, b)
    c = float(a @ b)
    s = float(np.linalg.norm(v))
    if s < 1e-15:
        return np.eye(3)
    k = v / s
    kx = np.array([[0.0, -k[2], k[1]], [k[2], 0.0, -k[0]], [-k[1], k[0], 0.0]])
    return np.eye(3) + s * kx + (1 - c) * (kx @ kx)


def _refracted(d: np.ndarray, normal: np.ndarray, n1: float, n2: float) -> np.ndarray | None:
    """Snell's law in vector form; None past the critical angle."""
    cos_i = float(d @ normal)
    if cos_i < 0:
        normal, cos_i = -normal, -cos_i
    mu = n1 / n2
    root = 1 - mu * mu * (1 - cos_i * cos_i)
    if root < 0:
        return None
    out = mu * d + (math.sqrt(root) - mu * cos_i) * normal
    return out / np.linalg.norm(out)


def _follow_motion(system: System, i: int, placement: Placement, pivot: np.ndarray,
                   sense: int, indices: Sequence[float]) -> Motion | str:
    """The motion of everything after boundary i when its axis follows (path coordinates)."""
    boundary = system.boundaries[i]
    q = rotation(placement.tilt)
    normal = q[:, 2]
    vertex = pivot + np.array([float(placement.decenter[0]), float(placement.decenter[1]), 0.0])
    if boundary.kind == MIRROR:
        mirror = np.eye(3) - 2.0 * np.outer(normal, normal)
        turn = mirror @ np.diag([1.0, 1.0, -1.0])
    else:
        d = np.array([0.0, 0.0, float(sense)])
        out = _refracted(d, normal, float(indices[i]), float(indices[i + 1]))
        if out is None:
            return f"the axis is totally internally reflected at {boundary.name!r}"
        turn = _smallest_turn(d, out)
    return Motion(turn, vertex - turn @ pivot)


def coaxial_z(system: System) -> list[float]:
    """Vertex positions along z of the unplaced layout (path coordinates)."""
    senses = system.directions()
    z = [0.0]
    for i, gap in enumerate(system.gaps):
        z.append(z[-1] + senses[i + 1] * float(gap))
    return z


@dataclass(frozen=True)
class Layout3D:
    """Frames of a whole layout in the global frame.

    Attributes:
        surfaces: (origin, rotation) of each boundary (rotation columns: local x, y, z).
        axes: (origin, rotation) of the axis in each space, object space first; origin at the
            vertex that starts the space (object space: the first vertex's nominal place).
        path_z: nominal (coaxial) z of each vertex.
        senses: sense of travel along the local z of each space (as `System.directions`).
        problem: why the layout cannot be placed, or "".
    """

    surfaces: tuple[tuple[np.ndarray, np.ndarray], ...]
    axes: tuple[tuple[np.ndarray, np.ndarray], ...]
    path_z: tuple[float, ...]
    senses: tuple[int, ...]
    problem: str = ""

    def surface_frame(self, i: int) -> Frame:
        return frame_of(*self.surfaces[i])

    def axis_point(self, space: int, along: float) -> tuple[np.ndarray, np.ndarray]:
        """The axis frame moved `along` the axis of `space` (in the sense of travel) from
        the vertex that starts it (object space: from the first vertex)."""
        origin, axes = self.axes[space]
        return origin + axes[:, 2] * (self.senses[space] * float(along)), axes

    def to_path(self, frame: tuple[np.ndarray, np.ndarray], z: float,
                positions: np.ndarray, directions: np.ndarray) -> None:
        """Global → coordinates of `frame` shifted to path position z, in place ((3, N))."""
        origin, axes = frame
        positions -= origin[:, None]
        positions[...] = axes.T @ positions
        positions[2] += z
        directions[...] = axes.T @ directions


def frame_of(origin: np.ndarray, axes: np.ndarray) -> Frame:
    """The model's `Frame` value (plain tuples) of an (origin, rotation) pair."""
    rows = tuple(tuple(float(v) for v in row) for row in axes)
    if np.array_equal(axes, np.eye(3)):
        rows = IDENTITY
    return Frame(tuple(float(v) for v in origin), rows)


def layout3d(system: System, indices: Sequence[float] | None = None) -> Layout3D:
    """Every boundary's frame and every space's axis in the global frame.

    Args:
        system: a numeric layout.
        indices: physical index of each space (object space first) for the refracted axes of
            refracting surfaces whose axis follows; the primary wavelength's by default.
    """
    count = len(system.boundaries)
    z = coaxial_z(system)
    senses = tuple(system.directions())
    indices = [float(n) for n in (system.indices() if indices is None else indices)]
    last_slot = 2 * count - 1
    # (pivot order, first slot, last slot, motion)
    motions: list[tuple[tuple[int, int], int, int, Motion]] = []
    problem = ""
    for group in system.groups:
        pivot = np.array([0.0, 0.0, z[group.first]])
        end = last_slot if group.placement.axis == FOLLOWS else 2 * group.last
        motions.append(((2 * group.first, 0), 2 * group.first, end,
                        _own_motion(group.placement, pivot)))
    for i, boundary in enumerate(system.boundaries):
        placement = boundary.placement
        if placement is None:
            continue
        pivot = np.array([0.0, 0.0, z[i]])
        motions.append(((2 * i, 1), 2 * i, 2 * i, _own_motion(placement, pivot)))
        if placement.axis == FOLLOWS:
            follow = _follow_motion(system, i, placement, pivot, senses[i], indices)
            if isinstance(follow, str):
                problem = problem or follow
                continue
            motions.append(((2 * i + 1, 0), 2 * i + 1, last_slot, follow))
    motions.sort(key=lambda item: item[0])

    def moved(slot: int, origin: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        total = _identity()
        for _, first, last, motion in motions:
            if first <= slot <= last:
                total = total.then_inside(motion)
        return total.apply(origin, np.eye(3))

    surfaces = tuple(moved(2 * i, np.array([0.0, 0.0, z[i]])) for i in range(count))
    axes = [(np.array([0.0, 0.0, 0.0]), np.eye(3))]
    axes += [moved(2 * i + 1, np.array([0.0, 0.0, z[i]])) for i in range(count)]
    return Layout3D(surfaces, tuple(axes), tuple(z), senses, problem)
