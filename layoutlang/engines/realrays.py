"""Exact (finite) ray trace: where real rays go, without the small-angle approximation.

Rays are straight lines between boundaries; at each boundary the exact intersection with its
profile (layoutlang/surfaces: sphere, plane, conic, even or Q-type asphere) is found and the ray is refracted by the vector form of Snell's law or
reflected by the law of reflection. Everything is vectorized with numpy over rays (one Python
loop over boundaries, none per ray) and streamed through cache-sized chunks.

Coordinates: z along the axis (light starts in +z), x and y across; each vertex sits on the
axis at the z reached by walking the gaps along the current sense of travel. Directions are
unit vectors in these global coordinates, so after a mirror k_z is negative. Indices here are
physical (positive); the sign trick of the paraxial engine is not needed in vector form.

The ideal `lens` boundary is treated as an ideal paraxial lens: at its (flat) plane the slope of
the ray along the sense of travel changes by -y·power (tangent form, tan u' = tan u - y/f),
which images every object point perfectly at its paraxial image. That is a model, not glass.

Each ray also carries its optical path length (`Rays.opl`: n × signed geometric length, summed
over the steps), which the wavefront and OPD engines read.

Rays that cannot go on are flagged, not dropped: `MISSED` (the line does not meet the surface,
or meets it only where its profile does not exist, or the asphere iteration did not settle),
`VIGNETTED` (it meets it outside the clear diameter, or passes the stop plane outside the stop),
`TOTAL_REFLECTION` (total internal reflection), `BLOCKED` (it meets the surface inside a central
obscuration) and `THROUGH_HOLE` (inside a hole: it goes on straight, neither refracted nor
reflected), each with the index of the step where it first happened. Vignetted and blocked rays
are still traced on (their path is defined); missed and totally reflected rays carry NaN from
that step on, and rays through a hole no longer follow the layout's sequence: callers mask with
`status` (`LOST` lists the codes after which a ray's numbers mean nothing).

Surfaces: a sphere or plane keeps the closed-form intersection below, unchanged. A conic uses
the same closed form for its quadric c(x² + y² + (1 + κ) z²) - 2z = 0 (Spencer & Murty 1962);
an asphere (conic plus an even or Q-type polynomial P(ρ), ρ = x² + y²) starts there (or at the
vertex plane where the conic is missed) and takes vectorized Newton steps on
G = c ρ + c (1 + κ) w² - 2 w with w = z - P(ρ), which is zero on the surface with no square
root to evaluate (the vertex branch is the one with 1 - c (1 + κ) w > 0). Each step works in
the surface's local frame (vertex at the origin, axis z: `_surface_step`), so a placed surface
is a change of frame around it.

Batches: every number of a `Step` (vertex z, curvature, conic, coefficients, clear and inner
radii) and every index may be an array with one value per ray, so N layouts of S rays each are
one trace of N·S rays; `batch` builds that from a list of layouts (or one layout whose numbers
are arrays), `Batch.per_layout` folds the results back to (N, S).

Formulas: intersection in the stable form t = C / (B + sign(B)·sqrt(B² - cC)) with
B = k_z - c (p·k), C = c |p|² - 2 p_z (p relative to the vertex) — common practice (e.g.
Welford 1986, Aberrations of Optical Systems, ch. 4; Spencer & Murty 1962, JOSA 52, 672).
Refraction: k' = μ k + (sqrt(1 - μ²(1 - cos²I)) - μ cos I) N with μ = n/n' and N the unit
normal oriented along the ray; reflection: k' = k - 2 (k·N) N.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, replace
from typing import Any, Sequence

import numpy as np

from ..surfaces.profile import Profile
from ..system import IDEAL, MIRROR, System

__all__ = [
    "OK", "MISSED", "VIGNETTED", "TOTAL_REFLECTION", "BLOCKED", "THROUGH_HOLE", "LOST",
    "STATUS_WORDS", "Step", "Geometry", "geometry", "Rays", "trace", "trace_step", "CHUNK",
    "Batch", "batch", "NEWTON_LIMIT",
]

OK, MISSED, VIGNETTED, TOTAL_REFLECTION, BLOCKED, THROUGH_HOLE = 0, 1, 2, 3, 4, 5
STATUS_WORDS = {
    OK: "passed",
    MISSED: "missed the surface",
    VIGNETTED: "outside the clear diameter",
    TOTAL_REFLECTION: "totally internally reflected",
    BLOCKED: "blocked by the central obscuration",
    THROUGH_HOLE: "passed through the hole",
}
#: Codes after which a ray's coordinates no longer describe a path through the layout.
LOST = (MISSED, TOTAL_REFLECTION, THROUGH_HOLE)

#: Rays per block: long enough to spread numpy's per-call cost, short enough that the block and
#: its six work arrays (about 3 MB) stay in cache; measured best on the CI machine (bench/).
CHUNK = 32768

#: Most Newton steps on an asphere before a ray that has not settled is called missed.
NEWTON_LIMIT = 30

_REFRACT, _REFLECT, _IDEAL, _PLANE = 0, 1, 2, 3

Index = Any  # float, or a numpy array with one index per ray (e.g. rays of several wavelengths)
Number = Any  # float, or a numpy array with one value per ray (a batch of layouts)


@dataclass(frozen=True)
class Step:
    """One place a ray must pass: a boundary, or the stop plane.

    Every number may be a float or an array with one value per ray (a batch).

    Attributes:
        name: the boundary's name, or 'stop'.
        z: axial position of the vertex (or plane).
        curvature: vertex curvature 1/radius (0 for a plane).
        action: how the direction changes (refract, reflect, ideal lens, or nothing).
        power: the ideal lens's power (1/length), else 0.
        clear_radius: half the clear diameter, or inf.
        space_before: index of the space the ray arrives from (0 = object space).
        sense_after: +1 or -1, the sense of travel after the step.
        boundary: the boundary's position in the layout, or -1 for the stop plane.
        sense_before: +1 or -1, the sense of travel before it.
        conic: the conic constant κ.
        even_terms: A4, A6, … of the even aspheric polynomial.
        q_terms, q_radius: Forbes Qcon coefficients and their normalisation radius.
        obscuration_radius: half the central obscuration's diameter (0 for none).
        hole_radius: half the hole's diameter (0 for none).
    """

    name: str
    z: Number
    curvature: Number
    action: int
    power: Number
    clear_radius: Number
    space_before: int
    sense_after: int
    boundary: int
    sense_before: int = 1
    conic: Number = 0.0
    even_terms: tuple[Number, ...] = ()
    q_terms: tuple[Number, ...] = ()
    q_radius: Number | None = None
    obscuration_radius: Number = 0.0
    hole_radius: Number = 0.0

    @property
    def profile(self) -> Profile:
        return Profile(self.curvature, self.conic, self.even_terms, self.q_terms, self.q_radius)

    @property
    def form(self) -> str:
        """'sphere' (closed form, planes too), 'conic' (closed form) or 'asphere' (Newton)."""
        if self.even_terms or self.q_terms:
            return "asphere"
        return "sphere" if _all_zero(self.conic) else "conic"


@dataclass(frozen=True)
class Geometry:
    """The layout as an ordered list of steps plus where the last boundary sits."""

    steps: tuple[Step, ...]
    vertex_z: tuple[Number, ...]  # z of each boundary vertex
    senses: tuple[int, ...]  # sense of travel of each space (object space first)
    stop_step: int | None  # position of the stop plane in `steps`, if any
    # placed (non-coaxial) layouts only: (origin, rotation) of each step's local frame in the
    # global frame, the steps with their vertex at the local origin, and the image-space axis
    frames: tuple | None = None
    local_steps: tuple[Step, ...] = ()
    exit_frame: tuple | None = None
    problem: str = ""  # why a placed layout cannot be traced, or ""

    def up_to_stop(self) -> tuple[Step, ...]:
        """The steps from the object side up to and including the stop plane."""
        if self.stop_step is None:
            return self.steps
        return self.steps[: self.stop_step + 1]


def _number(value: Any, repeat: int = 1) -> Number:
    """A float, or (for an array of per-layout values) a float array with each value repeated
    `repeat` times: one value per ray of a batch."""
    if isinstance(value, np.ndarray) and value.ndim:
        return np.repeat(value.astype(float), repeat)
    return float(value)


def _radius(diameter: Any, absent: float, repeat: int = 1) -> Number:
    return absent if diameter is None else _number(diameter, repeat) / 2


def geometry(system: System, stop_radius: Number | None = None, repeat: int = 1) -> Geometry:
    """Place every boundary (and the stop plane, if `stop_radius` is given) along z.

    Args:
        system: a numeric layout (its numbers may be arrays of per-layout values: see `batch`).
        stop_radius: half the stop diameter; the stop plane then vignettes rays beyond it.
        repeat: rays per layout when the numbers are arrays (each value is repeated so there
            is one per ray).
    """
    senses = system.directions()
    vertex_z: list[Number] = [0.0]
    for i, gap in enumerate(system.gaps):
        vertex_z.append(vertex_z[-1] + senses[i + 1] * _number(gap, repeat))
    steps: list[Step] = []
    stop = system.stop
    stop_step = None

    def add_stop() -> None:
        nonlocal stop_step
        after = stop.after
        base = 0.0 if after < 0 else vertex_z[after]
        sense = senses[after + 1]
        radius = np.inf if stop_radius is None else _number(stop_radius, repeat)
        stop_step = len(steps)
        steps.append(Step("stop", base + sense * _number(stop.offset, repeat), 0.0, _PLANE, 0.0,
                          radius, after + 1, sense, -1, sense))

    # a stop placed right at a vertex is that boundary's own aperture (on the surface itself)
    on_boundary = None
    if stop is not None and _all_zero(np.asarray(stop.offset)):
        on_boundary = max(stop.after, 0)
    elif stop is not None and stop.after < 0:
        add_stop()
    for i, boundary in enumerate(system.boundaries):
        action = {MIRROR: _REFLECT, IDEAL: _IDEAL}.get(boundary.kind, _REFRACT)
        clear = _radius(boundary.clear_diameter, np.inf, repeat)
        if i == on_boundary:
            stop_step = len(steps)
            if stop_radius is not None:
                clear = np.minimum(clear, _number(stop_radius, repeat))
                clear = float(clear) if np.ndim(clear) == 0 else clear
        profile = boundary.profile
        ideal = boundary.kind == IDEAL
        steps.append(Step(
            boundary.name, vertex_z[i], 0.0 if ideal else _number(profile.curvature, repeat),
            action, _number(boundary.power, repeat), clear, i, senses[i + 1], i, senses[i],
            conic=0.0 if ideal else _number(profile.conic, repeat),
            even_terms=tuple(_number(a, repeat) for a in profile.even_terms),
            q_terms=tuple(_number(a, repeat) for a in profile.q_terms),
            q_radius=None if profile.q_radius is None else _number(profile.q_radius, repeat),
            obscuration_radius=_radius(boundary.obscuration_diameter, 0.0, repeat),
            hole_radius=_radius(boundary.hole_diameter, 0.0, repeat)))
        if stop is not None and stop.after == i and on_boundary is None:
            add_stop()
    if system.is_coaxial:
        return Geometry(tuple(steps), tuple(vertex_z), tuple(senses), stop_step)
    return _placed(system, Geometry(tuple(steps), tuple(vertex_z), tuple(senses), stop_step))


def _placed(system: System, geo: Geometry) -> Geometry:
    """The same steps, each with its local frame in the global frame (engines/frames.py)."""
    from dataclasses import replace

    from .frames import layout3d

    placed = layout3d(system)
    frames = []
    for step in geo.steps:
        if step.boundary >= 0:
            frames.append(placed.surfaces[step.boundary])
        else:  # the stop plane, on the axis of its space
            stop = system.stop
            frames.append(placed.axis_point(stop.after + 1, float(stop.offset)))
    local = tuple(replace(step, z=0.0) for step in geo.steps)
    return replace(geo, frames=tuple(frames), local_steps=local, exit_frame=placed.axes[-1],
                   problem=placed.problem)


class Rays:
    """A set of rays: positions, unit directions, optical path lengths and per-ray status.

    The six coordinates live in one (6, N) array so that a block of rays is a single view and
    three-component updates are one numpy call. `x, y, z, kx, ky, kz` are row views.

    Attributes:
        data: rows x, y, z, kx, ky, kz.
        status: OK, MISSED, VIGNETTED, TOTAL_REFLECTION, BLOCKED or THROUGH_HOLE (the first
            thing that went wrong).
        failed_at: index into `Geometry.steps` where the status was set, -1 while OK.
        opl: optical path length travelled so far, sum of n × signed geometric length per
            step (a segment run backwards to reach a virtual intersection counts negative),
            in layout units; zero at `start`. Wavefront and OPD work read it.
    """

    def __init__(self, data: np.ndarray, status: np.ndarray, failed_at: np.ndarray,
                 opl: np.ndarray | None = None) -> None:
        self.data = data
        self.status = status
        self.failed_at = failed_at
        self.opl = np.zeros(data.shape[1]) if opl is None else opl

    @classmethod
    def start(cls, x, y, z, kx, ky, kz) -> "Rays":
        """Rays from positions and (not necessarily unit) directions; copies every array."""
        arrays = np.broadcast_arrays(*(np.atleast_1d(np.asarray(a, dtype=float))
                                       for a in (x, y, z, kx, ky, kz)))
        data = np.array(arrays, dtype=float)
        norm = np.sqrt(data[3] ** 2 + data[4] ** 2 + data[5] ** 2)
        data[3:] /= norm
        count = data.shape[1]
        return cls(data, np.zeros(count, np.int8), np.full(count, -1, np.int16))

    x = property(lambda self: self.data[0])
    y = property(lambda self: self.data[1])
    z = property(lambda self: self.data[2])
    kx = property(lambda self: self.data[3])
    ky = property(lambda self: self.data[4])
    kz = property(lambda self: self.data[5])

    def __len__(self) -> int:
        return self.data.shape[1]

    def __repr__(self) -> str:
        return f"Rays({len(self)} rays, {int((self.status != OK).sum())} lost)"

    def copy(self) -> "Rays":
        return Rays(self.data.copy(), self.status.copy(), self.failed_at.copy(), self.opl.copy())

    def tile(self, count: int) -> "Rays":
        """These rays repeated for `count` layouts, layout after layout (for a `Batch`)."""
        return Rays(np.tile(self.data, (1, count)), np.tile(self.status, count),
                    np.tile(self.failed_at, count), np.tile(self.opl, count))

    @property
    def ok(self) -> np.ndarray:
        return self.status == OK


def _all_zero(value: Number) -> bool:
    if isinstance(value, np.ndarray):
        return not value.any()
    return value == 0.0


def _per_ray(value: Any, lo: int, hi: int):
    """This block's share of a per-ray array; a plain number as it is."""
    return value[lo:hi] if isinstance(value, np.ndarray) and value.ndim else value


def _masked(value: Any, mask: np.ndarray):
    return value[mask] if isinstance(value, np.ndarray) and value.ndim else value


def trace(rays: Rays, geo: Geometry, indices: Sequence[Index],
          steps: Sequence[Step] | None = None, chunk: int = CHUNK, workers: int = 1,
          coordinates: str = "path") -> Rays:
    """Trace rays through the steps, in place; returns the same `Rays`.

    A coaxial layout is traced in its one global frame. A placed layout (`geo.frames`) is
    traced step by step in each surface's local frame; the rays come back in *path*
    coordinates — those of the image-space axis after a whole trace, of the last step's own
    frame after a leading part (so aiming at a decentred stop aims at its real centre) —
    shifted so that the coaxial z of that place is kept, which lets every caller read them as
    it reads a coaxial trace; `coordinates="global"` gives the global frame instead (drawings).

    Blocks are independent (each writes only its own slice), so `workers` > 1 traces them on
    that many threads: numpy releases the GIL inside its array loops. The result is the same
    bit for bit whatever the number of workers.

    Args:
        rays: starting rays in the space before the first step (updated in place).
        geo: the layout geometry from `geometry`.
        indices: physical refractive index of each space, object space first; each entry a
            float or an array with one value per ray (several wavelengths in one call).
        steps: a leading part of `geo.steps` (e.g. up to the stop); all steps by default.
        chunk: rays per block; blocks that fit in cache are several times faster.
        workers: threads over the blocks (1: in this thread).
        coordinates: "path" or "global" (placed layouts; a coaxial one has only one frame).
    """
    steps = geo.steps if steps is None else steps
    count = len(rays)
    if not steps or not count:
        return rays
    bounds = [(lo, min(lo + chunk, count)) for lo in range(0, count, chunk)]
    if geo.frames is not None:
        for lo, hi in bounds:
            _trace_placed(_Block(rays, lo, hi), geo, indices, len(steps), coordinates)
        return rays
    if workers <= 1 or len(bounds) == 1:
        for lo, hi in bounds:
            _trace_block(_Block(rays, lo, hi), steps, indices)
        return rays
    from concurrent.futures import ThreadPoolExecutor

    with ThreadPoolExecutor(max_workers=workers) as pool:
        for done in [pool.submit(_trace_block, _Block(rays, lo, hi), steps, indices)
                     for lo, hi in bounds]:
            done.result()
    return rays


class _Block:
    """One cache-sized block of rays (views into `Rays`) with its scratch arrays."""

    def __init__(self, rays: Rays, lo: int, hi: int) -> None:
        self.lo, self.hi = lo, hi
        self.data = rays.data[:, lo:hi]
        self.status, self.failed_at = rays.status[lo:hi], rays.failed_at[lo:hi]
        self.opl = rays.opl[lo:hi]
        m = hi - lo
        self.pk, self.w, self.t, self.b, self.g, self.tmp = (np.empty(m) for _ in range(6))

    def flag(self, mask: np.ndarray, code: int, where: int) -> None:
        fresh = mask & (self.status == OK)
        self.status[fresh] = code
        self.failed_at[fresh] = where

    def share(self, value: Any):
        return _per_ray(value, self.lo, self.hi)


def _trace_block(block: _Block, steps: Sequence[Step], indices: Sequence[Index]) -> None:
    """One block of rays through every step.

    Inside the block the direction is kept as the optical direction vector K = n k (so Snell's
    law is K' = K + Γ N with no scaling by n/n'), and z is kept relative to the current vertex
    (shifted between steps), so the vertex-relative position is the stored row itself: each
    step's own work (`_surface_step`) is done in its surface's local frame.
    """
    data = block.data
    k, z = data[3:6], data[2]
    first, last = steps[0], steps[-1]
    k *= block.share(indices[first.space_before])
    z -= block.share(first.z)
    with np.errstate(invalid="ignore", divide="ignore", over="ignore"):
        for where, step in enumerate(steps):  # `steps` is a leading part of geo.steps
            if where:
                z -= block.share(step.z) - block.share(steps[where - 1].z)
            n = block.share(indices[step.space_before])
            n2 = n if step.action in (_PLANE, _IDEAL, _REFLECT) else \
                block.share(indices[step.space_before + 1])
            _surface_step(block, where, step, n, n2)
        z += block.share(last.z)
        after = last.space_before + (0 if last.action == _PLANE else 1)
        k /= block.share(indices[after])


def trace_step(rays: Rays, geo: Geometry, indices: Sequence[Index], where: int) -> Rays:
    """Step `where` of a placed layout alone, on rays in the global frame and back to it, in
    place: drawings record the rays at every surface of a folded path."""
    for lo in range(0, len(rays), CHUNK):
        _trace_placed(_Block(rays, lo, min(lo + CHUNK, len(rays))), geo, indices, where + 1,
                      "global", first=where)
    return rays


def _trace_placed(block: _Block, geo: Geometry, indices: Sequence[Index], count: int,
                  coordinates: str, first: int = 0) -> None:
    """A placed layout: each step in its surface's local frame (global ↔ local around the
    one-step `_trace_block`), per-ray status kept with the step's own number."""
    p, k = block.data[0:3], block.data[3:6]
    with np.errstate(invalid="ignore"):
        for where in range(first, count):
            origin, axes = geo.frames[where]
            p -= origin[:, None]
            p[...] = axes.T @ p
            k[...] = axes.T @ k
            was_ok = block.status == OK
            _trace_block(block, geo.local_steps[where:where + 1], indices)
            block.failed_at[was_ok & (block.status != OK)] = where
            p[...] = axes @ p
            p += origin[:, None]
            k[...] = axes @ k
        if coordinates == "path":
            if count == len(geo.steps):
                frame, z = geo.exit_frame, geo.vertex_z[-1]
            else:
                frame, z = geo.frames[count - 1], geo.steps[count - 1].z
            origin, axes = frame
            p -= origin[:, None]
            p[...] = axes.T @ p
            p[2] += z
            k[...] = axes.T @ k


def _surface_step(block: _Block, where: int, step: Step, n: Index, n2: Index) -> None:
    """One step in the surface's local frame (vertex at the origin, axis z): meet the surface,
    judge the aperture, then refract, reflect or pass. K = n k on entry, n2 k' on exit."""
    x, y, z, kx, ky, kz = block.data
    form = step.form
    if form == "sphere":
        _meet_sphere(block, where, step, n)
    else:
        _meet_profile(block, where, step, n, form)
    t, tmp, w = block.t, block.tmp, block.w
    # |K| = n, so the geometric length is n τ and the optical path n² τ
    np.multiply(t, n * n, out=tmp)
    block.opl += tmp
    np.multiply(kx, t, out=tmp)
    x += tmp
    np.multiply(ky, t, out=tmp)
    y += tmp
    np.multiply(kz, t, out=tmp)
    z += tmp
    clear = block.share(step.clear_radius)
    inner = not (_all_zero(step.obscuration_radius) and _all_zero(step.hole_radius))
    if inner or np.any(clear != math.inf):
        np.multiply(x, x, out=w)
        w += y * y
        limit = clear * clear * (1 + 1e-12)
        if np.any(clear != math.inf) and np.fmax.reduce(w - limit) > 0:
            # fmax: a NaN (lost ray) must not hide the rest
            block.flag(w > limit, VIGNETTED, where)
    through = None
    if inner:
        hole = block.share(step.hole_radius)
        obscured = block.share(step.obscuration_radius)
        block.flag(w < obscured * obscured, BLOCKED, where)
        through = w < hole * hole
        block.flag(through, THROUGH_HOLE, where)
        if through.any():
            saved = block.data[3:6, through].copy()
    if step.action == _PLANE:
        pass
    elif step.action == _IDEAL:
        power = block.share(step.power)
        _ideal_lens(x, y, kx, ky, kz, power, n)
        block.opl -= _ideal_lens_path(x, y, power, n)
    elif form == "sphere":
        _turn_sphere(block, where, step, n, n2)
    else:
        _turn_profile(block, where, step, n, n2)
    if through is not None and through.any():
        # through the hole: the direction is unchanged, K rescaled to the index after
        scale = _masked(n2, through) / _masked(n, through)
        block.data[3:6, through] = saved * scale


def _meet_sphere(block: _Block, where: int, step: Step, n: Index) -> None:
    """Closed-form intersection with the vertex sphere (or plane): τ in `block.t`, and for a
    sphere n cos I = s sqrt(D) in `block.pk`, B in `block.b` and (n' cos I')² in `block.g`.

    With |K| = n the intersection solves c n² τ² - 2 B τ + C = 0 for p + τ K, where
    B = K_z - c (p·K) and C = c |p|² - 2 z; the root on the vertex side is
    τ = C / (B + s sqrt(D)), D = B² - c n² C, and there n cos I = K·N = s sqrt(D) exactly
    (s the sense of travel).
    """
    data = block.data
    p, k = data[0:3], data[3:6]
    z, kz = data[2], data[5]
    pk, w, t, b, tmp = block.pk, block.w, block.t, block.b, block.tmp
    c = block.share(step.curvature)
    s = float(step.sense_before)
    if _all_zero(c):
        np.divide(z, kz, out=t)
        np.negative(t, out=t)
        if not math.isfinite(t.sum()):
            block.flag(~np.isfinite(t), MISSED, where)
        return
    np.einsum("ij,ij->j", p, k, out=pk)
    np.einsum("ij,ij->j", p, p, out=w)
    w *= c
    w -= z
    w -= z  # C = c |p|² - 2 z
    np.multiply(pk, -c, out=b)
    b += kz  # B = K_z - c p·K
    np.multiply(b, b, out=t)
    np.multiply(w, c * n * n, out=tmp)
    t -= tmp  # D = B² - c n² C
    np.copyto(block.g, t)  # kept for the refraction: (n' cos I')² = D + n'² - n²
    np.sqrt(t, out=pk)  # n cos I (its size)
    if s > 0:
        np.add(b, pk, out=t)
    else:
        np.subtract(b, pk, out=t)
    np.divide(w, t, out=t)  # τ
    # C / (B + s sqrt(D)) cancels when B and s sqrt(D) have opposite signs (a ray that starts
    # on this surface's own sphere away from its vertex, as inside a ball lens, gives 0/0
    # there); the same root is then (B - s sqrt(D)) / (c n²).
    unstable = (b * s < 0.0) & np.isfinite(pk)
    if unstable.any():
        n_here, c_here = _masked(n, unstable), _masked(c, unstable)
        t[unstable] = (b[unstable] - s * pk[unstable]) / (c_here * n_here * n_here)
    if not math.isfinite(t.sum()):  # D < 0: the ray passes the sphere by
        block.flag(~np.isfinite(t), MISSED, where)


def _turn_sphere(block: _Block, where: int, step: Step, n: Index, n2: Index) -> None:
    """Refraction or reflection at the sphere just met. Refraction: n' cos I' =
    sqrt(D + n'² - n²), Γ = s (n' cos I' - n cos I); reflection: Γ = -2 s sqrt(D)."""
    x, y, z, kx, ky, kz = block.data
    pk, t, b, g, tmp = block.pk, block.t, block.b, block.g, block.tmp
    c = block.share(step.curvature)
    s = float(step.sense_before)
    if step.action == _REFLECT:
        if _all_zero(c):
            np.negative(kz, out=kz)
            return
        # K' = K - 2 (K·N) N, K·N = s sqrt(D), N = (-c x, -c y, 1 - c z)
        np.multiply(pk, 2.0 * c * s, out=b)
        for pi, ki in ((x, kx), (y, ky), (z, kz)):
            np.multiply(pi, b, out=tmp)
            ki += tmp
        np.multiply(pk, 2.0 * s, out=tmp)
        kz -= tmp
        return
    if _all_zero(c):  # flat: only K_z changes, to s n' cos I'
        np.multiply(kz, kz, out=g)
        g += n2 * n2 - n * n
        np.sqrt(g, out=g)
        if not math.isfinite(g.sum()):
            block.flag(~np.isfinite(g), TOTAL_REFLECTION, where)
        if s > 0:
            kz[...] = g
        else:
            np.negative(g, out=kz)
        return
    g += n2 * n2 - n * n  # (n' cos I')² = D + n'² - n²
    np.sqrt(g, out=g)
    g -= pk  # n' cos I' - n cos I
    if not math.isfinite(g.sum()):  # a ray that missed (NaN from τ) or cannot refract
        block.flag(~np.isfinite(t), MISSED, where)
        block.flag(~np.isfinite(g), TOTAL_REFLECTION, where)
    np.multiply(g, -c * s, out=b)
    for pi, ki in ((x, kx), (y, ky), (z, kz)):  # K' = K + s Γ N
        np.multiply(pi, b, out=tmp)
        ki += tmp
    if s > 0:
        kz += g
    else:
        kz -= g


def _polynomial(step: Step, block: _Block):
    """The profile's part beyond the conic, P(ρ) and dP/dρ, for this block's rays (or None)."""
    if not (step.even_terms or step.q_terms):
        return None
    share = block.share
    if step.even_terms and not step.q_terms:
        terms = tuple(share(a) for a in step.even_terms)
        return lambda rho: _even_in_place(terms, rho)
    profile = Profile(0.0, 0.0, tuple(share(a) for a in step.even_terms),
                      tuple(share(a) for a in step.q_terms),
                      None if step.q_radius is None else share(step.q_radius))
    return profile.polynomial


def _even_in_place(terms: tuple, rho: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Σ A_2i ρ^i (i from 2) and its ρ-derivative by Horner's rule in two arrays, updated in
    place (the same sums as `Profile.polynomial`, without a temporary per term)."""
    last = len(terms) - 1
    value, slope = np.empty_like(rho), np.empty_like(rho)
    value[...] = terms[last]
    slope[...] = (last + 2) * terms[last]
    for j in range(last - 1, -1, -1):
        value *= rho
        value += terms[j]
        slope *= rho
        slope += (j + 2) * terms[j]
    value *= rho
    value *= rho
    slope *= rho
    return value, slope


def _meet_profile(block: _Block, where: int, step: Step, n: Index, form: str) -> None:
    """Intersection with a conic (closed form) or an asphere (Newton from the conic): τ in
    `block.t`; for an asphere, P and dP/dρ at the intersection in `block.b`, `block.g`.
    Rays on no real intersection, on the far sheet or branch of the profile, or whose
    iteration has not settled after NEWTON_LIMIT steps are flagged MISSED."""
    x, y, z, kx, ky, kz = block.data
    t = block.t
    c = block.share(step.curvature)
    q = 1.0 + block.share(step.conic)
    s = float(step.sense_before)
    cq = c * q
    # the conic c (x² + y² + q z²) - 2 z = 0 along p + τ K: a τ² - 2 B τ + C = 0
    beta = x * kx + y * ky
    gamma = kx * kx + ky * ky
    rho0 = x * x + y * y
    a = c * gamma + cq * kz * kz
    b = kz - c * beta - cq * z * kz
    C = c * rho0 + cq * z * z - 2.0 * z
    root = np.sqrt(b * b - a * C)
    np.divide(C, b + s * root, out=t)
    unstable = (b * s < 0.0) & np.isfinite(root)
    if unstable.any():
        t[unstable] = (b[unstable] - s * root[unstable]) / _masked(a, unstable)
    polynomial = _polynomial(step, block)
    if polynomial is None:
        w = z + t * kz
    else:
        guess = ~np.isfinite(t)
        if guess.any():  # the conic is missed: start from the vertex plane
            t[guess] = -z[guess] / kz[guess]
        value, slope = _newton(block, c, cq, polynomial, n, rho0, beta, gamma)
        np.copyto(block.b, value)
        np.copyto(block.g, slope)
        w = z + t * kz - value
    wrong_branch = ~(1.0 - cq * w > 0.0)  # NaN too
    if wrong_branch.any():
        block.flag(wrong_branch, MISSED, where)
        t[wrong_branch] = np.nan


def _newton(block: _Block, c, cq, polynomial, n, rho0, beta, gamma):
    """Newton steps on G(τ) = c ρ + c q w² - 2 w, w = z + τ K_z - P(ρ), from `block.t`;
    returns P and dP/dρ at the final τ.

    ρ(τ) = ρ0 + 2 β τ + γ τ² is kept as a quadratic in τ, so a step costs the polynomial and a
    few products. Stopping: Newton's error falls quadratically, e_(k+1) ≈ M e_k², and the step
    d_k estimates e_k, so after two steps the error left is about d_k³ / d_(k-1)² (the usual
    estimate of M from successive steps, e.g. C. T. Kelley 1995, Iterative Methods for Linear
    and Nonlinear Equations, ch. 5); once that, or the step itself, is below 1e-9 of the path
    for every ray the iteration stops — started from the conic this is two steps for the
    usual small aspheric departures. P and dP/dρ at the last τ come from the last evaluation,
    moved by dP/dρ · Δρ and by the secant of the last two slopes · Δρ (what is neglected is
    of order Δρ², far below rounding there), so no evaluation is spent on checking. Rays
    still moving after NEWTON_LIMIT steps get τ = NaN (flagged missed by the caller).
    """
    z, kz = block.data[2], block.data[5]
    t = block.t
    size = float(np.max(np.abs(n))) if np.ndim(n) else abs(n)
    finite = np.isfinite(t)
    reach = float(np.max(np.abs(t[finite]), initial=0.0)) * size
    tolerance = 1e-9 * (1.0 + reach) / size
    previous = before = None
    delta = big = None
    c_rho0 = c * rho0
    for _ in range(NEWTON_LIMIT):
        span = beta + gamma * t
        span2 = span + beta  # ρ = ρ0 + τ (2β + γτ)
        rho = span2 * t
        rho += rho0
        value, slope = polynomial(rho)
        w = kz * t
        w += z
        w -= value
        dw = slope * span
        dw *= -2.0
        dw += kz
        big = cq * w
        g = big - 2.0
        g *= w
        span2 *= t
        span2 *= c
        g += span2
        g += c_rho0
        big -= 1.0
        big *= dw
        span *= c
        big += span
        big *= 2.0  # dG/dτ
        delta = np.divide(g, big, out=g)
        t -= delta
        size_now = np.abs(delta)
        largest = np.fmax.reduce(size_now)  # NaN rays do not hold the rest
        if not largest > tolerance:
            break
        if previous is not None:
            with np.errstate(divide="ignore", invalid="ignore"):
                left = size_now * size_now
                left *= size_now
                left /= previous * previous
            if not np.fmax.reduce(left) > tolerance:  # 0/0 (a ray already exact) is NaN
                break
        previous = size_now
        before = (rho, slope)
    else:
        t[np.abs(delta) > tolerance] = np.nan
    if before is None:  # settled at the first step: evaluate where it ended
        return polynomial(rho0 + t * (2.0 * beta + gamma * t))
    # moved = ρ(τ + δ) - ρ(τ) = δ (2 β + γ (2 τ + δ)), τ the new value: P by its slope, the
    # slope by the secant through the last two evaluations (P'' Δρ), both far below rounding
    moved = gamma * (2.0 * t + delta)
    moved += 2.0 * beta
    moved *= delta
    rho_before, slope_before = before
    with np.errstate(divide="ignore", invalid="ignore"):
        curve = np.divide(slope - slope_before, rho - rho_before)
    curve[~np.isfinite(curve)] = 0.0
    value = value - slope * moved
    slope = slope - curve * moved
    return value, slope


def _turn_profile(block: _Block, where: int, step: Step, n: Index, n2: Index) -> None:
    """Refraction or reflection at a conic or asphere. With w = z - P(ρ) and h = 1 - c q w
    (= sqrt(1 - q c² ρ) on the vertex branch) the normal along +z is
    N ∝ (-x g, -y g, h), g = c + 2 h P'(ρ) (the gradient of G above)."""
    x, y, z, kx, ky, kz = block.data
    c = block.share(step.curvature)
    cq = c * (1.0 + block.share(step.conic))
    rho = x * x + y * y
    if step.even_terms or step.q_terms:
        h = 1.0 - cq * (z - block.b)  # P and P' at the intersection from `_meet_profile`
        g = c + 2.0 * h * block.g
    else:
        h = 1.0 - cq * z
        g = c
    norm = np.sqrt(rho * g * g + h * h)
    nx, ny, nz = -x * g / norm, -y * g / norm, h / norm
    kn = kx * nx + ky * ny + kz * nz  # n cos I, signed with the sense of travel
    if step.action == _REFLECT:
        gain = -2.0 * kn
    else:
        s = float(step.sense_before)
        root = np.sqrt(kn * kn + n2 * n2 - n * n)
        if not math.isfinite(root.sum()):
            block.flag(~np.isfinite(block.t), MISSED, where)
            block.flag(~np.isfinite(root), TOTAL_REFLECTION, where)
        gain = s * root - kn
    kx += gain * nx
    ky += gain * ny
    kz += gain * nz


def _ideal_lens_path(x, y, power, n: Index):
    """The optical path an ideal lens takes away at height r: n (sqrt(r² + f²) - f), so that
    a plane wave leaves it as a spherical wave about the focus (exact for the object at
    infinity; a model, like the lens itself). Written as n r² P / (1 + sqrt(1 + r² P²)) so a
    zero or negative power needs no special case."""
    r2 = x * x + y * y
    return n * r2 * power / (1.0 + np.sqrt(1.0 + r2 * power * power))


def _ideal_lens(x, y, kx, ky, kz, power: Number, n: Index) -> None:
    """Tangent-form ideal lens: slopes along the sense of travel change by -y·power
    (K = n k: the slopes are ratios, so n drops out, and the new K keeps length n)."""
    sense = np.sign(kz)
    along = np.abs(kz)
    tx = kx / along - x * power
    ty = ky / along - y * power
    norm = np.sqrt(1.0 + tx * tx + ty * ty) / n
    kx[...] = tx / norm
    ky[...] = ty / norm
    kz[...] = sense / norm


# --- batches of layouts --------------------------------------------------------------------


@dataclass(frozen=True)
class Batch:
    """N layouts of one structure, traced as one set of N·S rays (S rays per layout).

    Every per-layout number becomes a per-ray array (numbers the layouts share stay plain,
    so a batch that only moves gaps keeps the closed-form sphere path). Rays are laid out
    layout after layout: ray j of layout i is ray i·S + j.

    Attributes:
        geometry: the steps, with per-ray arrays where the layouts differ.
        indices: the index of each space, per ray where the layouts differ.
        layouts: N.
        rays_per_layout: S.
    """

    geometry: Geometry
    indices: tuple[Index, ...]
    layouts: int
    rays_per_layout: int

    def trace(self, rays: Rays, steps: Sequence[Step] | None = None) -> Rays:
        """The same S starting rays through every layout (a new `Rays` of N·S rays)."""
        if len(rays) != self.rays_per_layout:
            raise ValueError(f"the batch was built for {self.rays_per_layout} rays per layout, "
                             f"not {len(rays)}")
        return trace(rays.tile(self.layouts), self.geometry, self.indices, steps)

    def per_layout(self, values: np.ndarray) -> np.ndarray:
        """A per-ray result folded to (layouts, rays per layout)."""
        return np.asarray(values).reshape(self.layouts, self.rays_per_layout)


def batch(layouts: System | Sequence[System], rays_per_layout: int,
          stop_radius: Number | Sequence[float] | None = None,
          wavelength: Number | None = None) -> Batch:
    """A `Batch` from a list of layouts of the same structure, or from one layout whose
    numbers (gaps, curvatures, conic constants, coefficients, diameters, indices) are arrays
    with one value per layout.

    Args:
        layouts: the layouts (same boundaries in the same order, same kinds, same mirrors).
        rays_per_layout: S, the rays each layout will be traced with.
        stop_radius: half the stop diameter, one number or one per layout.
        wavelength: for `System.indices` (None: the primary wavelength).

    Raises:
        ValueError: when the layouts differ in structure (their steps cannot be stacked).
    """
    repeat = int(rays_per_layout)
    if isinstance(layouts, System):
        sizes = {np.size(v) for v in _layout_numbers(layouts) if np.ndim(v)}
        if len(sizes) > 1:
            raise ValueError(f"the layout's arrays have different lengths: {sorted(sizes)}")
        count = sizes.pop() if sizes else 1
        radius = None if stop_radius is None else np.asarray(stop_radius, float)
        if radius is not None and radius.ndim == 0:
            radius = float(radius)
        geo = geometry(layouts, radius, repeat)
        indices = tuple(_number(np.asarray(v, float) if np.ndim(v) else v, repeat)
                        for v in layouts.indices(wavelength))
        return Batch(geo, indices, count, repeat)
    layouts = list(layouts)
    if not layouts:
        raise ValueError("a batch needs at least one layout")
    radii = [stop_radius] * len(layouts) if stop_radius is None or np.ndim(stop_radius) == 0 \
        else list(stop_radius)
    geos = [geometry(system, radius) for system, radius in zip(layouts, radii)]
    first = geos[0]
    if any(len(g.steps) != len(first.steps) or g.senses != first.senses
           or g.stop_step != first.stop_step for g in geos):
        raise ValueError("the layouts differ in structure: they cannot share one trace")
    steps = tuple(_stacked_step([g.steps[i] for g in geos], repeat)
                  for i in range(len(first.steps)))
    vertex_z = tuple(_stacked([g.vertex_z[i] for g in geos], repeat)
                     for i in range(len(first.vertex_z)))
    spaces = [system.indices(wavelength) for system in layouts]
    indices = tuple(_stacked([space[i] for space in spaces], repeat)
                    for i in range(len(spaces[0])))
    return Batch(Geometry(steps, vertex_z, first.senses, first.stop_step), indices,
                 len(layouts), repeat)


def _layout_numbers(system: System) -> list[Any]:
    numbers: list[Any] = list(system.gaps)
    for b in system.boundaries:
        numbers += [b.curvature, b.conic, b.power, *b.even_terms, *b.q_terms]
        numbers += [v for v in (b.q_radius, b.clear_diameter, b.obscuration_diameter,
                                b.hole_diameter) if v is not None]
    numbers += [m.index for m in system.media]
    return numbers


def _stacked(values: list[Any], repeat: int) -> Number:
    """One number per layout → a plain float if they agree, else one value per ray."""
    flat = [float(v) for v in values]
    if all(v == flat[0] for v in flat):
        return flat[0]
    return np.repeat(np.array(flat), repeat)


def _stacked_step(steps: list[Step], repeat: int) -> Step:
    first = steps[0]
    for other in steps[1:]:
        if (other.name, other.action, other.space_before, other.sense_after, other.boundary,
                other.sense_before) != (first.name, first.action, first.space_before,
                                        first.sense_after, first.boundary, first.sense_before):
            raise ValueError(f"the layouts differ at '{first.name}': they cannot share one "
                             "trace")
        if (other.q_radius is None) != (first.q_radius is None):
            raise ValueError(f"the layouts differ in the form of '{first.name}'")

    def terms(name: str) -> tuple[Number, ...]:
        longest = max(len(getattr(s, name)) for s in steps)
        padded = [tuple(getattr(s, name)) + (0.0,) * (longest - len(getattr(s, name)))
                  for s in steps]
        return tuple(_stacked([p[i] for p in padded], repeat) for i in range(longest))

    def stack(name: str) -> Number:
        return _stacked([getattr(s, name) for s in steps], repeat)

    return replace(
        first, z=stack("z"), curvature=stack("curvature"), power=stack("power"),
        clear_radius=stack("clear_radius"), conic=stack("conic"),
        even_terms=terms("even_terms"), q_terms=terms("q_terms"),
        q_radius=None if first.q_radius is None else stack("q_radius"),
        obscuration_radius=stack("obscuration_radius"), hole_radius=stack("hole_radius"))
