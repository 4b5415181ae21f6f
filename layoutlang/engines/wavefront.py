"""Wavefront (optical path difference) of a layout at one field and wavelength, from exact rays.

A square grid of pupil points (cell centres, in fractions of the stop radius, inside the unit
circle) is aimed at the real stop and traced exactly; each ray carries its optical path length
(`Rays.opl`). For an object at infinity the rays start on a plane wavefront: the path from the
plane through the origin normal to the incoming direction, n·(p·k), is added at the start.

Reference sphere (common practice, e.g. H. H. Hopkins, Wave Theory of Aberrations, 1950;
W. T. Welford, Aberrations of Optical Systems, 1986, ch. 9): centred on the image point — by
default where the chief ray meets the image plane, or that point moved along the path for a
through-focus or best-focus plane — and passing through the point where the chief ray crosses
the paraxial exit pupil plane. Each ray is carried on to that sphere in image space, and

    OPD = [optical path of the ray to the sphere] − [optical path of the chief ray to it]

in waves of the wavelength, positive where the ray's path is longer. So a focus lying δz beyond
the reference point (downstream) gives +δz/(8N²)·ρ² (plus piston) for working f-number N.
The RMS and peak-to-valley are taken with piston and tilt removed (a least-squares plane over
the rays that arrive), as the trade quotes them; the Zernike fit (Noll) keeps every term.

Rays that are lost (missed a surface, blocked by a clear diameter, the stop or an obscuration,
totally reflected) are counted and named by surface; the pupil function is zero there, so an
annular or vignetted pupil is what the FFT sees.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from typing import Any

import numpy as np

from . import realrays
from .aberrations import RaySetup, _lost_words, _object_rays, aim
from .firstorder import Unavailable
from .psf import PupilFunction, cell_centres
from .zernike import TERM_COUNT, ZernikeFit, fit

__all__ = ["Bundle", "Wavefront", "bundle", "wavefront", "best_focus", "TERMS",
           "STEEP_WAVES"]

#: Zernike terms fitted (Noll 1..22: through secondary spherical)
TERMS = TERM_COUNT
#: a wavefront that changes by more than this (waves) between neighbouring grid cells is too
#: steep for the grid: its diffraction MTF would alias, so the geometric MTF is used instead
STEEP_WAVES = 0.5


@dataclass(frozen=True)
class Bundle:
    """Rays of one field and wavelength in image space, ready to be referred to any sphere.

    Attributes:
        setup: the launch setup (one wavelength).
        field: field fraction.
        cells: grid cells across the pupil.
        inside: (cells, cells) mask of the cells inside the unit circle (launched).
        p, k: positions and unit directions after the last boundary, (3, count) for the
            launched cells in row-major order.
        opl: optical path of each ray to its position p.
        arrived: rays that passed every surface and aperture.
        chief_p, chief_k, chief_opl: the chief ray likewise.
        pupil_point, pupil_opl: where the chief ray crosses the exit pupil plane, and its path.
        image_index: refractive index of image space.
        lost: rays launched but lost; lost_words: what happened to them, by surface.
    """

    setup: RaySetup
    field: float
    cells: int
    inside: np.ndarray
    p: np.ndarray
    k: np.ndarray
    opl: np.ndarray
    arrived: np.ndarray
    chief_p: np.ndarray
    chief_k: np.ndarray
    chief_opl: float
    pupil_point: np.ndarray
    pupil_opl: float
    image_index: float
    lost: int
    lost_words: str

    def image_point(self, shift: float = 0.0) -> np.ndarray:
        """Where the chief ray meets the image plane moved `shift` along the path."""
        z = self.setup.image_z + self.setup.image_sense * shift
        t = (z - self.chief_p[2]) / self.chief_k[2]
        return self.chief_p + t * self.chief_k

    def on_plane(self, shift: float = 0.0) -> tuple[np.ndarray, np.ndarray]:
        """(x, y) of the arriving rays on the image plane moved `shift` along the path."""
        z = self.setup.image_z + self.setup.image_sense * shift
        p, k = self.p[:, self.arrived], self.k[:, self.arrived]
        t = (z - p[2]) / k[2]
        return p[0] + t * k[0], p[1] + t * k[1]


def _traced(s: RaySetup, field: float, px: np.ndarray, py: np.ndarray) -> tuple[realrays.Rays,
                                                                                   np.ndarray]:
    """Rays aimed at the real stop and traced to the last boundary, with their optical path
    from a common wavefront in object space."""
    ex, ey = aim(s, field, px, py)
    rays = _object_rays(s, field, ex, ey)
    start = np.zeros(len(rays))
    if s.system.object.at_infinity:  # from the plane through the origin normal to k
        start = s.indices[0] * (rays.x * rays.kx + rays.y * rays.ky + rays.z * rays.kz)
    realrays.trace(rays, s.geo, s.indices)
    return rays, start + rays.opl


def bundle(s: RaySetup, field: float, cells: int, exit_pupil: float | Unavailable
           ) -> Bundle | Unavailable:
    """Trace a pupil grid of `cells` across at a field fraction, with its chief ray.

    Args:
        s: the launch setup of one wavelength.
        field: field fraction.
        cells: grid cells across the stop diameter.
        exit_pupil: paraxial exit pupil position after the last vertex (first-order result).
    """
    if isinstance(exit_pupil, Unavailable):
        return Unavailable(f"none: the reference sphere needs an exit pupil, and the exit pupil "
                           f"position is {exit_pupil}")
    chief, chief_opl = _traced(s, field, np.zeros(1), np.zeros(1))
    if chief.status[0] != realrays.OK or not np.isfinite(chief.data[:, 0]).all():
        words = _lost_words(chief, s.geo) or "lost"
        return Unavailable(f"none: the chief ray at field {field:g} does not reach the image "
                           f"({words})")
    u = cell_centres(cells)
    gx, gy = np.meshgrid(u, u)
    inside = gx * gx + gy * gy <= 1.0
    rays, opl = _traced(s, field, gx[inside], gy[inside])
    arrived = (rays.status == realrays.OK) & np.isfinite(rays.data).all(axis=0) & np.isfinite(opl)
    n_image = float(s.indices[-1])
    cp, ck = chief.data[:3, 0].copy(), chief.data[3:, 0].copy()
    pupil_z = s.geo.vertex_z[-1] + s.image_sense * float(exit_pupil)
    if abs(ck[2]) < 1e-12:
        return Unavailable("none: the chief ray leaves parallel to the image plane")
    t = (pupil_z - cp[2]) / ck[2]
    lost = int((~arrived).sum())
    return Bundle(s, field, cells, inside, rays.data[:3].copy(), rays.data[3:].copy(), opl,
                  arrived, cp, ck, float(chief_opl[0]), cp + t * ck,
                  float(chief_opl[0]) + n_image * t, n_image, lost,
                  _lost_words(rays, s.geo, ~arrived) if lost else "")


@dataclass(frozen=True)
class Wavefront:
    """The OPD of one bundle against one reference sphere.

    Attributes:
        bundle: the rays.
        shift: the reference point's distance along the path from the chief ray's intercept
            with the image plane (through focus).
        centre: the reference point (x, y, z).
        opd: (cells, cells) in waves; NaN outside the pupil and where rays are lost.
        clean: the same with piston and tilt removed.
        rms, peak_to_valley: of `clean`, in waves.
        tilt: (x, y) coefficients of the removed plane, waves per unit pupil fraction.
        zernike: Noll coefficients (waves) of `opd`.
        na_x, na_y: half-widths of the pupil in image-space optical direction cosines.
        steep: largest change between neighbouring cells (waves).
    """

    bundle: Bundle
    shift: float
    centre: np.ndarray
    opd: np.ndarray
    clean: np.ndarray
    rms: float
    peak_to_valley: float
    tilt: tuple[float, float]
    zernike: ZernikeFit
    na_x: float
    na_y: float
    steep: float
    extra: dict = field(default_factory=dict, compare=False)

    @property
    def wavelength(self) -> float:
        return self.bundle.setup.wavelength

    @property
    def valid(self) -> np.ndarray:
        return np.isfinite(self.opd)

    def best_point(self) -> tuple[float, float]:
        """(x, y) of the diffraction focus on this plane: the reference point moved so the
        tilt vanishes (first order in the tilt: Δ = tilt·λ/NA, see `_tilt_shift`)."""
        dx, dy = _tilt_shift(self.tilt, self.wavelength, self.na_x, self.na_y)
        return float(self.centre[0] + dx), float(self.centre[1] + dy)

    def pupil_function(self, weight: float = 1.0) -> PupilFunction:
        """The pupil function with piston and tilt removed, centred on `best_point`."""
        valid = self.valid
        return PupilFunction(valid.astype(float), np.where(valid, self.clean, 0.0),
                             self.wavelength, self.na_x, self.na_y, self.best_point(), weight)


def _tilt_shift(tilt: tuple[float, float], wavelength: float, na_x: float, na_y: float
                ) -> tuple[float, float]:
    # OPD = ray − chief changes by −NA·Δ/λ waves per unit pupil fraction when the reference
    # point moves Δ towards that side, so a tilt t (waves per unit fraction) goes with Δ = t λ/NA
    return tilt[0] * wavelength / na_x, tilt[1] * wavelength / na_y


def wavefront(b: Bundle, shift: float = 0.0, centre: np.ndarray | None = None) -> Wavefront:
    """The OPD of a bundle on the reference sphere centred on the image point (moved `shift`
    along the path, or at `centre`) through the chief ray's exit-pupil point."""
    s = b.setup
    point = b.image_point(shift) if centre is None else np.asarray(centre, dtype=float)
    radius = float(np.linalg.norm(point - b.pupil_point))
    side = float(np.dot(b.pupil_point - point, b.chief_k))
    d = b.p - point[:, None]
    half = np.einsum("ij,ij->j", b.k, d)
    c = np.einsum("ij,ij->j", d, d) - radius * radius
    with np.errstate(invalid="ignore"):
        root = np.sqrt(half * half - c)
    s_plus, s_minus = -half + root, -half - root
    q_plus = (d + b.k * s_plus).T @ b.chief_k
    along = np.where(np.sign(q_plus) == np.sign(side), s_plus, s_minus)
    path = b.opl + b.image_index * along
    chief_to_sphere = b.pupil_opl  # the chief ray meets the sphere at the exit-pupil point
    waves = (path - chief_to_sphere) / s.wavelength
    good = b.arrived & np.isfinite(waves)
    opd = np.full(b.inside.shape, np.nan)
    flat = np.full(int(b.inside.sum()), np.nan)
    flat[good] = waves[good]
    opd[b.inside] = flat
    u = _grid_coordinates(b.cells)
    gx, gy = np.meshgrid(u, u)
    valid = np.isfinite(opd)
    if valid.sum() < 3:
        raise _TooFewRays(valid.sum())
    x, y, w = gx[valid], gy[valid], opd[valid]
    design = np.stack([np.ones_like(x), x, y], axis=1)
    plane, *_ = np.linalg.lstsq(design, w, rcond=None)
    clean = np.full_like(opd, np.nan)
    clean[valid] = w - design @ plane
    left = clean[valid]
    rms = float(np.sqrt(np.mean(left * left)))
    pv = float(left.max() - left.min())
    zern = fit(x, y, w, TERMS, full_circle=b.lost == 0)
    # pupil extent in direction cosines: slope of n·k against the pupil fraction
    n = b.image_index
    kx = np.full(b.inside.shape, np.nan)
    ky = np.full(b.inside.shape, np.nan)
    kx[b.inside] = np.where(good, b.k[0], np.nan)
    ky[b.inside] = np.where(good, b.k[1], np.nan)
    ax = n * (kx[valid] - b.chief_k[0])
    ay = n * (ky[valid] - b.chief_k[1])
    na_x = abs(float(np.sum(x * ax) / np.sum(x * x)))
    na_y = abs(float(np.sum(y * ay) / np.sum(y * y)))
    steep = _steepest(opd)
    return Wavefront(b, shift, point, opd, clean, rms, pv, (float(plane[1]), float(plane[2])),
                     zern, na_x, na_y, steep)


class _TooFewRays(ValueError):
    pass


def _grid_coordinates(cells: int) -> np.ndarray:
    return cell_centres(cells)


def _steepest(opd: np.ndarray) -> float:
    with np.errstate(invalid="ignore"):
        across = np.abs(np.diff(opd, axis=1))
        down = np.abs(np.diff(opd, axis=0))
    values = np.concatenate([across[np.isfinite(across)], down[np.isfinite(down)]])
    return float(values.max()) if values.size else 0.0


def safe_wavefront(b: Bundle | Unavailable, shift: float = 0.0) -> Wavefront | Unavailable:
    """`wavefront`, or the reason in words when it cannot be formed."""
    if isinstance(b, Unavailable):
        return b
    try:
        return wavefront(b, shift)
    except _TooFewRays as error:
        return Unavailable(f"none: only {error.args[0]} ray(s) reach the image "
                           f"({b.lost_words or 'lost'})")


def best_focus(b: Bundle) -> tuple[float, Wavefront]:
    """The plane (shift along the path) of least RMS wavefront error, piston and tilt removed.

    Starts where the Zernike defocus term vanishes (a shift δ along the path changes the
    defocus W020 = 2√3·Z4 by −δ NA²/(2λ) waves, from W020 = δz/(8N²) with N = 1/(2 NA)), then
    moves to the vertex of a parabola through three planes about it, twice; the RMS² is
    nearly quadratic in the shift (common practice).
    """
    s = b.setup
    first = wavefront(b)
    na = max(first.na_y, first.na_x, 1e-9)
    per_length = na * na / (2 * s.wavelength)  # waves of W020 per unit shift
    centre = 2 * math.sqrt(3) * first.zernike.coefficient(4) / per_length
    step = 0.25 / per_length  # a quarter wave of W020
    for _ in range(3):
        values = [wavefront(b, centre + d).rms ** 2 for d in (-step, 0.0, step)]
        curvature = values[0] - 2 * values[1] + values[2]
        if curvature <= 0:
            break
        move = 0.5 * step * (values[0] - values[2]) / curvature
        centre += max(-4 * step, min(4 * step, move))
        if abs(move) < 1e-4 * step:
            break
        step *= 0.5
    return centre, wavefront(b, centre)


def describe_lost(b: Bundle) -> str:
    total = int(b.inside.sum())
    if not b.lost:
        return f"all {total} rays of the pupil grid arrive"
    return f"{b.lost} of {total} rays lost: {b.lost_words}"


Value = Any
