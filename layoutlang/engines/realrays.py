"""Exact (finite) ray trace: where real rays go, without the small-angle approximation.

Rays are straight lines between boundaries; at each boundary the exact intersection with the
sphere (or plane) is found and the ray is refracted by the vector form of Snell's law or
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

Rays that cannot go on are flagged, not dropped: `MISSED` (the line does not meet the sphere),
`VIGNETTED` (it meets it outside the clear diameter, or passes the stop plane outside the stop)
and `TOTAL_REFLECTION` (total internal reflection), each with the index of the step where it
first happened. Vignetted rays are still traced on (their path is defined); missed and totally
reflected rays carry NaN from that step on, which callers must mask with `status`.

Formulas: intersection in the stable form t = C / (B + sign(B)·sqrt(B² - cC)) with
B = k_z - c (p·k), C = c |p|² - 2 p_z (p relative to the vertex) — common practice (e.g.
Welford 1986, Aberrations of Optical Systems, ch. 4; Spencer & Murty 1962, JOSA 52, 672).
Refraction: k' = μ k + (sqrt(1 - μ²(1 - cos²I)) - μ cos I) N with μ = n/n' and N the unit
normal oriented along the ray; reflection: k' = k - 2 (k·N) N.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Any, Sequence

import numpy as np

from ..system import IDEAL, MIRROR, System

__all__ = [
    "OK", "MISSED", "VIGNETTED", "TOTAL_REFLECTION", "STATUS_WORDS",
    "Step", "Geometry", "geometry", "Rays", "trace", "CHUNK",
]

OK, MISSED, VIGNETTED, TOTAL_REFLECTION = 0, 1, 2, 3
STATUS_WORDS = {
    OK: "passed",
    MISSED: "missed the surface",
    VIGNETTED: "outside the clear diameter",
    TOTAL_REFLECTION: "totally internally reflected",
}

#: Rays per block: long enough to spread numpy's per-call cost, short enough that the block and
#: its six work arrays (about 3 MB) stay in cache; measured best on the CI machine (bench/).
CHUNK = 32768

_REFRACT, _REFLECT, _IDEAL, _PLANE = 0, 1, 2, 3

Index = Any  # float, or a numpy array with one index per ray (e.g. rays of several wavelengths)


@dataclass(frozen=True)
class Step:
    """One place a ray must pass: a boundary, or the stop plane.

    Attributes:
        name: the boundary's name, or 'stop'.
        z: axial position of the vertex (or plane).
        curvature: 1/radius (0 for a plane).
        action: how the direction changes (refract, reflect, ideal lens, or nothing).
        power: the ideal lens's power (1/length), else 0.
        clear_radius: half the clear diameter, or inf.
        space_before: index of the space the ray arrives from (0 = object space).
        sense_after: +1 or -1, the sense of travel after the step.
        sense_before: +1 or -1, the sense of travel before it.
        boundary: the boundary's position in the layout, or -1 for the stop plane.
    """

    name: str
    z: float
    curvature: float
    action: int
    power: float
    clear_radius: float
    space_before: int
    sense_after: int
    boundary: int
    sense_before: int = 1


@dataclass(frozen=True)
class Geometry:
    """The layout as an ordered list of steps plus where the last boundary sits."""

    steps: tuple[Step, ...]
    vertex_z: tuple[float, ...]  # z of each boundary vertex
    senses: tuple[int, ...]  # sense of travel of each space (object space first)
    stop_step: int | None  # position of the stop plane in `steps`, if any

    def up_to_stop(self) -> tuple[Step, ...]:
        """The steps from the object side up to and including the stop plane."""
        if self.stop_step is None:
            return self.steps
        return self.steps[: self.stop_step + 1]


def geometry(system: System, stop_radius: float | None = None) -> Geometry:
    """Place every boundary (and the stop plane, if `stop_radius` is given) along z.

    Args:
        system: a numeric layout.
        stop_radius: half the stop diameter; the stop plane then vignettes rays beyond it.
    """
    senses = system.directions()
    vertex_z = [0.0]
    for i, gap in enumerate(system.gaps):
        vertex_z.append(vertex_z[-1] + senses[i + 1] * float(gap))
    steps: list[Step] = []
    stop = system.stop
    stop_step = None

    def add_stop() -> None:
        nonlocal stop_step
        after = stop.after
        base = 0.0 if after < 0 else vertex_z[after]
        sense = senses[after + 1]
        radius = np.inf if stop_radius is None else float(stop_radius)
        stop_step = len(steps)
        steps.append(Step("stop", base + sense * float(stop.offset), 0.0, _PLANE, 0.0, radius,
                          after + 1, sense, -1, sense))

    # a stop placed right at a vertex is that boundary's own aperture (on the sphere itself)
    on_boundary = None
    if stop is not None and float(stop.offset) == 0.0:
        on_boundary = max(stop.after, 0)
    elif stop is not None and stop.after < 0:
        add_stop()
    for i, boundary in enumerate(system.boundaries):
        action = {MIRROR: _REFLECT, IDEAL: _IDEAL}.get(boundary.kind, _REFRACT)
        clear = np.inf if boundary.clear_diameter is None else float(boundary.clear_diameter) / 2
        if i == on_boundary:
            stop_step = len(steps)
            if stop_radius is not None:
                clear = min(clear, float(stop_radius))
        curvature = 0.0 if boundary.kind == IDEAL else float(boundary.curvature)
        steps.append(Step(boundary.name, vertex_z[i], curvature, action, float(boundary.power),
                          clear, i, senses[i + 1], i, senses[i]))
        if stop is not None and stop.after == i and on_boundary is None:
            add_stop()
    return Geometry(tuple(steps), tuple(vertex_z), tuple(senses), stop_step)


class Rays:
    """A set of rays: positions, unit directions, optical path lengths and per-ray status.

    The six coordinates live in one (6, N) array so that a block of rays is a single view and
    three-component updates are one numpy call. `x, y, z, kx, ky, kz` are row views.

    Attributes:
        data: rows x, y, z, kx, ky, kz.
        status: OK, MISSED, VIGNETTED or TOTAL_REFLECTION (the first thing that went wrong).
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

    @property
    def ok(self) -> np.ndarray:
        return self.status == OK


def _flag(status: np.ndarray, failed_at: np.ndarray, mask: np.ndarray, code: int,
          where: int) -> None:
    fresh = mask & (status == OK)
    status[fresh] = code
    failed_at[fresh] = where


def _index_chunk(index: Index, lo: int, hi: int):
    return index[lo:hi] if isinstance(index, np.ndarray) and index.ndim else index


def trace(rays: Rays, geo: Geometry, indices: Sequence[Index],
          steps: Sequence[Step] | None = None, chunk: int = CHUNK) -> Rays:
    """Trace rays through the steps, in place; returns the same `Rays`.

    Args:
        rays: starting rays in the space before the first step (updated in place).
        geo: the layout geometry from `geometry`.
        indices: physical refractive index of each space, object space first; each entry a
            float or an array with one value per ray (several wavelengths in one call).
        steps: a leading part of `geo.steps` (e.g. up to the stop); all steps by default.
        chunk: rays per block; blocks that fit in cache are several times faster.
    """
    steps = geo.steps if steps is None else steps
    count = len(rays)
    if not steps or not count:
        return rays
    for lo in range(0, count, chunk):
        hi = min(lo + chunk, count)
        _trace_block(rays, lo, hi, steps, indices)
    return rays


def _trace_block(rays: Rays, lo: int, hi: int, steps: Sequence[Step],
                 indices: Sequence[Index]) -> None:
    """One block of rays through every step.

    Inside the block the direction is kept as the optical direction vector K = n k (so Snell's
    law is K' = K + Γ N with no scaling by n/n'), and z is kept relative to the current vertex
    (shifted between steps), so the vertex-relative position is the stored row itself.
    With |K| = n the intersection solves c n² τ² - 2 B τ + C = 0 for p + τ K, where
    B = K_z - c (p·K) and C = c |p|² - 2 z; the root on the vertex side is
    τ = C / (B + s sqrt(D)), D = B² - c n² C, and there n cos I = K·N = s sqrt(D) exactly
    (s the sense of travel). Refraction: n' cos I' = sqrt(D + n'² - n²),
    Γ = s (n' cos I' - n cos I); reflection: Γ = -2 s sqrt(D).
    """
    data = rays.data[:, lo:hi]
    status, failed_at = rays.status[lo:hi], rays.failed_at[lo:hi]
    opl = rays.opl[lo:hi]
    p, k = data[0:3], data[3:6]
    x, y, z, kx, ky, kz = data
    m = hi - lo
    pk, w, t, b, g, tmp = (np.empty(m) for _ in range(6))
    first, last = steps[0], steps[-1]
    k *= _index_chunk(indices[first.space_before], lo, hi)
    z -= first.z
    with np.errstate(invalid="ignore", divide="ignore", over="ignore"):
        for where, step in enumerate(steps):  # `steps` is a leading part of geo.steps
            if where:
                z -= step.z - steps[where - 1].z
            c = step.curvature
            s = float(step.sense_before)
            n = _index_chunk(indices[step.space_before], lo, hi)
            if c == 0.0:
                np.divide(z, kz, out=t)
                np.negative(t, out=t)
                if not math.isfinite(t.sum()):
                    _flag(status, failed_at, ~np.isfinite(t), MISSED, where)
            else:
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
                if step.action == _REFRACT:
                    n2 = _index_chunk(indices[step.space_before + 1], lo, hi)
                    np.add(t, n2 * n2 - n * n, out=g)  # (n' cos I')² = D + n'² - n²
                np.sqrt(t, out=pk)  # n cos I (its size)
                if s > 0:
                    np.add(b, pk, out=t)
                else:
                    np.subtract(b, pk, out=t)
                np.divide(w, t, out=t)  # τ
                # C / (B + s sqrt(D)) cancels when B and s sqrt(D) have opposite signs (a ray
                # that starts on this surface's own sphere away from its vertex, as inside a
                # ball lens, gives 0/0 there); the same root is then (B - s sqrt(D)) / (c n²).
                unstable = (b * s < 0.0) & np.isfinite(pk)
                if unstable.any():
                    n_here = n[unstable] if np.ndim(n) else n
                    t[unstable] = (b[unstable] - s * pk[unstable]) / (c * n_here * n_here)
                if not math.isfinite(t.sum()):  # D < 0: the ray passes the sphere by
                    _flag(status, failed_at, ~np.isfinite(t), MISSED, where)
            # |K| = n, so the geometric length is n τ and the optical path n² τ
            np.multiply(t, n * n, out=tmp)
            opl += tmp
            np.multiply(kx, t, out=tmp)
            x += tmp
            np.multiply(ky, t, out=tmp)
            y += tmp
            np.multiply(kz, t, out=tmp)
            z += tmp
            if step.clear_radius != math.inf:
                np.multiply(x, x, out=w)
                w += y * y
                limit = step.clear_radius ** 2 * (1 + 1e-12)
                if np.fmax.reduce(w) > limit:  # fmax: a NaN (lost ray) must not hide the rest
                    _flag(status, failed_at, w > limit, VIGNETTED, where)
            if step.action == _PLANE:
                continue
            if step.action == _IDEAL:
                _ideal_lens(x, y, kx, ky, kz, step, n)
                opl -= _ideal_lens_path(x, y, step.power, n)
                continue
            if step.action == _REFLECT:
                if c == 0.0:
                    np.negative(kz, out=kz)
                    continue
                # K' = K - 2 (K·N) N, K·N = s sqrt(D), N = (-c x, -c y, 1 - c z)
                np.multiply(pk, 2.0 * c * s, out=b)
                for pi, ki in ((x, kx), (y, ky), (z, kz)):
                    np.multiply(pi, b, out=tmp)
                    ki += tmp
                np.multiply(pk, 2.0 * s, out=tmp)
                kz -= tmp
                continue
            if c == 0.0:  # flat: only K_z changes, to s n' cos I'
                n2 = _index_chunk(indices[step.space_before + 1], lo, hi)
                np.multiply(kz, kz, out=g)
                g += n2 * n2 - n * n
                np.sqrt(g, out=g)
                if not math.isfinite(g.sum()):
                    _flag(status, failed_at, ~np.isfinite(g), TOTAL_REFLECTION, where)
                if s > 0:
                    kz[...] = g
                else:
                    np.negative(g, out=kz)
                continue
            np.sqrt(g, out=g)
            g -= pk  # n' cos I' - n cos I
            if not math.isfinite(g.sum()):  # a ray that missed (NaN from τ) or cannot refract
                _flag(status, failed_at, ~np.isfinite(t), MISSED, where)
                _flag(status, failed_at, ~np.isfinite(g), TOTAL_REFLECTION, where)
            np.multiply(g, -c * s, out=b)
            for pi, ki in ((x, kx), (y, ky), (z, kz)):  # K' = K + s Γ N
                np.multiply(pi, b, out=tmp)
                ki += tmp
            if s > 0:
                kz += g
            else:
                kz -= g
        z += last.z
        after = last.space_before + (0 if last.action == _PLANE else 1)
        k /= _index_chunk(indices[after], lo, hi)


def _ideal_lens_path(x, y, power, n: Index):
    """The optical path an ideal lens takes away at height r: n (sqrt(r² + f²) - f), so that
    a plane wave leaves it as a spherical wave about the focus (exact for the object at
    infinity; a model, like the lens itself). Written as n r² P / (1 + sqrt(1 + r² P²)) so a
    zero or negative power needs no special case."""
    r2 = x * x + y * y
    return n * r2 * power / (1.0 + np.sqrt(1.0 + r2 * power * power))


def _ideal_lens(x, y, kx, ky, kz, step: Step, n: Index) -> None:
    """Tangent-form ideal lens: slopes along the sense of travel change by -y·power
    (K = n k: the slopes are ratios, so n drops out, and the new K keeps length n)."""
    sense = np.sign(kz)
    along = np.abs(kz)
    tx = kx / along - x * step.power
    ty = ky / along - y * step.power
    norm = np.sqrt(1.0 + tx * tx + ty * ty) / n
    kx[...] = tx / norm
    ky[...] = ty / norm
    kz[...] = sense / norm
