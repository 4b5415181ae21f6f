"""Where the small-angle numbers stop holding: real against paraxial focus, image height and spot.

Built on `realrays` (exact trace) and `firstorder` (the paraxial numbers it is compared with).
Rays are launched from the object point through the entrance pupil and aimed at the real stop
(a few vectorized Newton steps, so pupil aberration does not skew the pupil fractions).
Every result is a plain float in the layout's units or an `Unavailable` with the reason;
lost rays are counted and named by surface, never dropped silently, and no NaN leaves here.

Conventions (common practice): pupil fractions are of the stop radius, field fractions of the
object's field angle or height; focus positions are along the path after the last vertex,
positive downstream; the depth of focus is λ/NA² with NA the paraxial image-side numerical
aperture (the real focus is judged against half of it, ±λ/(2NA²) about the paraxial focus);
the Airy radius is 0.61 λ/NA. Spot radii are about the spot's centroid.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from typing import Any, Sequence

import numpy as np

from ..measure import from_nanometres
from ..system import System
from . import paraxial, realrays
from .firstorder import FirstOrder, Unavailable, first_order
from .raysettings import RaySettings
from .realrays import OK, STATUS_WORDS, Geometry, Rays

__all__ = [
    "MarginalRow", "ChiefRow", "SpotRow", "RayAnalysis", "RaySetup",
    "analyse", "setup", "aim", "launch", "spot", "marginal", "chief", "best_focus_shift",
    "DEFAULT_WAVELENGTH_NM", "wavelength_sets",
]

#: Pupil fractions are scaled by this before aiming (see `launch`).
RIM_INSIDE = 1 - 1e-10

DEFAULT_WAVELENGTH_NM = 587.6  # helium d line, used when the script names no wavelength

Value = Any  # float | Unavailable


@dataclass(frozen=True)
class RaySetup:
    """Everything the launches need, from the layout and its first-order properties."""

    system: System
    geo: Geometry
    indices: tuple[Any, ...]
    entrance_z: float
    entrance_radius: float
    stop_radius: float
    image_z: float  # z of the image plane
    image_sense: int
    paraxial_focus: float  # paraxial image distance after the last vertex
    wavelength: float  # in layout units
    numerical_aperture: float


def wavelength_sets(system: System) -> list[tuple[float, tuple[Any, ...]]]:
    """(wavelength in layout units, index of each space) for every wavelength, primary first.

    Media with a dispersion model give their index at each wavelength through
    `System.indices(wavelength)`; media with a constant index are the same at every one.
    """
    nm = from_nanometres(1.0, system.units)
    primary = system.primary_wavelength
    if primary is None:
        return [(DEFAULT_WAVELENGTH_NM * nm, tuple(float(n) for n in system.indices()))]
    ordered = [primary] + [w for w in system.wavelengths if w is not primary]
    return [(float(w.value), tuple(float(n) for n in system.indices(w.value)))
            for w in ordered]


def setup(system: System, results: FirstOrder | None = None,
          indices: Sequence[Any] | None = None, wavelength: float | None = None
          ) -> RaySetup | Unavailable:
    """Prepare real-ray launches, or say why the layout cannot have them."""
    results = results or first_order(system)
    if system.stop is None:
        return Unavailable("none: real rays need a stop to fill the pupil")
    for name in ("entrance pupil position", "entrance pupil diameter", "stop diameter",
                 "image distance", "image plane distance", "numerical aperture"):
        value = results[name]
        if isinstance(value, Unavailable):
            return Unavailable(f"none: the {name} is {value}")
    sets = wavelength_sets(system)
    if indices is None:
        wavelength, indices = sets[0]
    elif wavelength is None:
        wavelength = sets[0][0]
    stop_radius = float(results["stop diameter"]) / 2
    geo = realrays.geometry(system, stop_radius)
    senses = system.directions()
    plane = float(results["image plane distance"])
    image_z = geo.vertex_z[-1] + senses[-1] * plane
    na = float(results["numerical aperture"])
    return RaySetup(system, geo, tuple(indices), float(results["entrance pupil position"]),
                    float(results["entrance pupil diameter"]) / 2, stop_radius, image_z,
                    senses[-1], float(results["image distance"]), float(wavelength), na)


def _object_rays(s: RaySetup, field: float, ex: np.ndarray, ey: np.ndarray) -> Rays:
    """Rays from the object point at `field` (fraction) through entrance-pupil-plane points
    (ex, ey) given in units of the entrance pupil radius."""
    obj = s.system.object
    px, py = ex * s.entrance_radius, ey * s.entrance_radius
    if obj.at_infinity:
        slope = -math.tan(field * float(obj.field_angle))  # downward for a positive angle
        return Rays.start(px, py, s.entrance_z, 0.0, slope, 1.0)
    distance = float(obj.distance)
    height = field * float(obj.height)
    # light travels +z in object space: from a real object towards the pupil, or from the
    # pupil towards a virtual object that lies downstream of it
    sense = 1.0 if s.entrance_z + distance > 0 else -1.0
    return Rays.start(0.0, height, -distance, sense * px, sense * (py - height),
                      sense * (s.entrance_z + distance))


def aim(s: RaySetup, field: float, px: np.ndarray, py: np.ndarray, iterations: int = 6
        ) -> tuple[np.ndarray, np.ndarray]:
    """Entrance-pupil-plane points (in entrance pupil radii) whose rays from the object point
    at `field` pass the real stop at (px, py)·stop radius.

    Starts from the paraxial entrance pupil and corrects each ray with a few Newton steps
    (finite-difference Jacobian, all rays at once). A ray that cannot be aimed keeps its
    paraxial start.
    """
    px = np.atleast_1d(np.asarray(px, dtype=float))
    py = np.atleast_1d(np.asarray(py, dtype=float))
    px, py = np.broadcast_arrays(px, py)
    ex, ey = px.copy(), py.copy()  # the paraxial guess: the same fractions
    if s.geo.stop_step is None:
        return ex, ey
    head = s.geo.up_to_stop()
    tx, ty = px * s.stop_radius, py * s.stop_radius
    scale = max(s.stop_radius, 1e-300)
    h = 1e-6
    for _ in range(iterations):
        base = realrays.trace(_object_rays(s, field, ex, ey), s.geo, s.indices, head)
        fx, fy = base.x - tx, base.y - ty
        if np.all(np.abs(np.nan_to_num(fx, nan=0)) + np.abs(np.nan_to_num(fy, nan=0))
                  < 1e-12 * scale):
            break
        dx = realrays.trace(_object_rays(s, field, ex + h, ey), s.geo, s.indices, head)
        dy = realrays.trace(_object_rays(s, field, ex, ey + h), s.geo, s.indices, head)
        j11, j21 = (dx.x - base.x) / h, (dx.y - base.y) / h
        j12, j22 = (dy.x - base.x) / h, (dy.y - base.y) / h
        with np.errstate(invalid="ignore", divide="ignore"):
            det = j11 * j22 - j12 * j21
            step_x = (j22 * fx - j12 * fy) / det
            step_y = (j11 * fy - j21 * fx) / det
        good = np.isfinite(step_x) & np.isfinite(step_y)
        ex = np.where(good, ex - np.where(good, step_x, 0), ex)
        ey = np.where(good, ey - np.where(good, step_y, 0), ey)
    return ex, ey


def launch(s: RaySetup, field: float, px: np.ndarray, py: np.ndarray) -> Rays:
    """Rays from the object point at `field` through the stop at (px, py)·stop radius, aimed
    at the real stop, traced to the last boundary."""
    # a ray asked for exactly on the rim is aimed a hair inside it (1e-10 of the radius), so
    # the rounding left by the aim never counts a rim ray as vignetted
    px, py = np.asarray(px, dtype=float) * RIM_INSIDE, np.asarray(py, dtype=float) * RIM_INSIDE
    ex, ey = aim(s, field, px, py)
    return realrays.trace(_object_rays(s, field, ex, ey), s.geo, s.indices)


def _to_plane(rays: Rays, z: float) -> tuple[np.ndarray, np.ndarray]:
    with np.errstate(invalid="ignore", divide="ignore"):
        t = (z - rays.z) / rays.kz
        return rays.x + t * rays.kx, rays.y + t * rays.ky


def _on_image(s: RaySetup, rays: Rays) -> tuple[np.ndarray, np.ndarray]:
    """Where rays meet the image plane, in its own x and y: the plane square to the axis, or
    turned by `tilt image plane` about its axis point (engines/frames.rotation)."""
    tilt = s.system.image.tilt
    if tilt is None:
        return _to_plane(rays, s.image_z)
    from .frames import rotation

    axes = rotation(tilt)
    normal = axes[:, 2]
    with np.errstate(invalid="ignore", divide="ignore"):
        dz = s.image_z - rays.z
        t = (-rays.x * normal[0] - rays.y * normal[1] + dz * normal[2]) / \
            (rays.kx * normal[0] + rays.ky * normal[1] + rays.kz * normal[2])
        hit = np.array([rays.x + t * rays.kx, rays.y + t * rays.ky, rays.z + t * rays.kz - s.image_z])
        return axes[:, 0] @ hit, axes[:, 1] @ hit


def _lost_words(rays: Rays, geo: Geometry, mask: np.ndarray | None = None) -> str:
    """'3 outside the clear diameter at back; 1 missed the surface front' or ''."""
    status, where = rays.status, rays.failed_at
    if mask is not None:
        status, where = status[mask], where[mask]
    counts: dict[tuple[int, int], int] = {}
    for code, step in zip(status.tolist(), where.tolist()):
        if code != OK:
            counts[(code, step)] = counts.get((code, step), 0) + 1
    parts = []
    for (code, step), count in sorted(counts.items(), key=lambda item: (item[0][1], item[0][0])):
        parts.append(f"{count} {STATUS_WORDS[code]} at {_step_name(geo, step)}")
    return "; ".join(parts)


def _step_name(geo: Geometry, step: int) -> str:
    name = geo.steps[step].name
    return "the stop" if geo.steps[step].boundary < 0 else f"'{name}'"


@dataclass(frozen=True)
class MarginalRow:
    """One axial ray at a pupil fraction: where it crosses the axis against the paraxial focus."""

    pupil: float
    real_focus: Value  # real axis crossing after the last vertex, along the path
    paraxial_focus: float
    longitudinal: Value  # real - paraxial (longitudinal spherical aberration)
    transverse: Value  # height at the paraxial focus plane (transverse spherical aberration)
    lost: str = ""


@dataclass(frozen=True)
class ChiefRow:
    """One chief ray at a field fraction: real against paraxial height on the image plane."""

    field: float
    real_height: Value
    paraxial_height: float
    difference: Value
    distortion: Value  # (real - paraxial) / paraxial, a fraction
    lost: str = ""


@dataclass(frozen=True)
class SpotRow:
    """The spot of a pupil grid at one field and wavelength on the image plane."""

    field: float
    wavelength: float
    rays: int
    used: int
    rms_radius: Value
    max_radius: Value
    lost: str = ""


def marginal(s: RaySetup, pupils: Sequence[float]) -> list[MarginalRow]:
    """Axial rays in the meridional plane at each pupil fraction (0 is skipped: no crossing)."""
    pupils = [p for p in pupils if p != 0]
    if not pupils:
        return []
    rays = launch(s, 0.0, np.zeros(len(pupils)), np.array(pupils, dtype=float))
    last_z = s.geo.vertex_z[-1]
    focus_z = last_z + s.image_sense * s.paraxial_focus
    _, y_at_focus = _to_plane(rays, focus_z)
    rows = []
    for i, pupil in enumerate(pupils):
        lost = _lost_words(rays, s.geo, np.arange(len(pupils)) == i)
        if rays.status[i] in realrays.LOST:
            why = Unavailable("none: the ray is lost")
            rows.append(MarginalRow(pupil, why, s.paraxial_focus, why, why, lost))
            continue
        if rays.ky[i] == 0:
            why = Unavailable("none: the ray leaves parallel to the axis")
            rows.append(MarginalRow(pupil, why, s.paraxial_focus, why, why, lost))
            continue
        cross_z = rays.z[i] - rays.y[i] * rays.kz[i] / rays.ky[i]
        real = s.image_sense * (cross_z - last_z)
        rows.append(MarginalRow(pupil, float(real), s.paraxial_focus,
                                float(real - s.paraxial_focus), float(y_at_focus[i]), lost))
    return rows


def paraxial_chief_height(s: RaySetup, field: float) -> float:
    """Height of the paraxial chief ray on the image plane at a field fraction."""
    system = s.system
    obj = system.object
    n0 = s.indices[0]
    if obj.at_infinity:
        nu0 = -n0 * math.tan(field * float(obj.field_angle))
        y0 = -s.entrance_z * nu0 / n0
    else:
        distance, height = float(obj.distance), field * float(obj.height)
        slope = -height / (s.entrance_z + distance)
        y0, nu0 = height + distance * slope, n0 * slope
    steps = _paraxial_steps(system, s.indices)
    y, nu = paraxial.trace(y0, nu0, steps)
    plane = s.image_sense * (s.image_z - s.geo.vertex_z[-1])
    return float(y + plane / s.indices[-1] * nu)


def _paraxial_steps(system: System, indices: Sequence[Any]) -> list[paraxial.Step]:
    """Paraxial steps with these indices (the layout's own media give `steps_of(system)`)."""
    from dataclasses import replace

    media = list(system.media)
    # one medium per space with the given index, so each wavelength gets its own steps
    spaces = [replace(media[0], name=f"space {i}", index=float(n)) for i, n in enumerate(indices)]
    boundaries = tuple(replace(b, medium_after=f"space {i + 1}")
                       for i, b in enumerate(system.boundaries))
    shadow = replace(system, media=tuple(spaces), start_medium="space 0", boundaries=boundaries)
    return paraxial.steps_of(shadow)


def chief(s: RaySetup, fields: Sequence[float]) -> list[ChiefRow]:
    """Chief rays (aimed at the real stop centre) at each field fraction."""
    fields = list(fields)
    rows = []
    for value in fields:
        rays = launch(s, value, np.zeros(1), np.zeros(1))
        x, y = _on_image(s, rays)
        para = paraxial_chief_height(s, value)
        lost = _lost_words(rays, s.geo)
        if rays.status[0] in realrays.LOST or not np.isfinite(y[0]):
            why = Unavailable("none: the chief ray is lost")
            rows.append(ChiefRow(value, why, para, why, why, lost))
            continue
        real = float(y[0])
        if para == 0:
            distortion = Unavailable("none on the axis") if value == 0 else \
                Unavailable("none: the paraxial image height is zero")
        else:
            distortion = (real - para) / para
        rows.append(ChiefRow(value, real, para, real - para, distortion, lost))
    return rows


def pupil_grid(points: int) -> tuple[np.ndarray, np.ndarray]:
    """A square grid of pupil fractions inside the unit circle (`points` across)."""
    if points < 2:
        return np.zeros(1), np.zeros(1)
    line = np.linspace(-1.0, 1.0, points)
    px, py = np.meshgrid(line, line)
    inside = px * px + py * py <= 1.0 + 1e-12
    return px[inside], py[inside]


def spot(s: RaySetup, field: float, points: int = 17, z: float | None = None,
         rays: Rays | None = None) -> SpotRow:
    """RMS and largest radius (about the centroid) of the spot of a pupil grid on a plane
    (`rays`: that grid already launched at this field, to trace it only once)."""
    if rays is None:
        rays = launch(s, field, *pupil_grid(points))
    x, y = _on_image(s, rays) if z is None else _to_plane(rays, z)
    used = rays.ok & np.isfinite(x) & np.isfinite(y)
    lost = _lost_words(rays, s.geo)
    if not used.any():
        why = Unavailable("none: every ray is lost")
        return SpotRow(field, s.wavelength, len(rays), 0, why, why, lost)
    dx, dy = x[used] - x[used].mean(), y[used] - y[used].mean()
    r2 = dx * dx + dy * dy
    return SpotRow(field, s.wavelength, len(rays), int(used.sum()), float(math.sqrt(r2.mean())),
                   float(math.sqrt(r2.max())), lost)


def best_focus_shift(s: RaySetup, points: int = 17, rays: Rays | None = None) -> Value:
    """Distance (along the path) from the paraxial focus to the plane of least RMS spot of the
    axial bundle. Closed form: the RMS radius is quadratic in the plane's position.
    (`rays`: the axial pupil grid already launched, to trace it only once.)"""
    if rays is None:
        rays = launch(s, 0.0, *pupil_grid(points))
    used = rays.ok
    if used.sum() < 2:
        return Unavailable("none: too few rays reach the image")
    focus_z = s.geo.vertex_z[-1] + s.image_sense * s.paraxial_focus
    x, y = _to_plane(rays, focus_z)
    x, y = x[used], y[used]
    # position on the plane δ further along z: x + δ·kx/kz
    tx, ty = rays.kx[used] / rays.kz[used], rays.ky[used] / rays.kz[used]
    x, y, tx, ty = x - x.mean(), y - y.mean(), tx - tx.mean(), ty - ty.mean()
    spread = float(np.sum(tx * tx + ty * ty))
    if spread == 0:
        return Unavailable("none: the rays leave parallel")
    shift_z = -float(np.sum(x * tx + y * ty)) / spread
    return s.image_sense * shift_z


@dataclass(frozen=True)
class RayAnalysis:
    """The paraxial validity report and the ray aberrations of one layout."""

    settings: RaySettings
    wavelength: float
    numerical_aperture: Value
    depth_of_focus: Value
    airy_radius: Value
    marginal: tuple[MarginalRow, ...] = ()
    chief: tuple[ChiefRow, ...] = ()
    spots: tuple[SpotRow, ...] = ()
    best_focus_shift: Value = 0.0  # the verdicts in words: reports/verdicts.py
    unavailable: Unavailable | None = None
    setups: tuple[Any, ...] = field(default=(), compare=False, repr=False)

    def marginal_at(self, pupil: float = 1.0) -> MarginalRow | Unavailable:
        for row in self.marginal:
            if abs(row.pupil - pupil) < 1e-12:
                return row
        return Unavailable(f"none: pupil {pupil:g} was not sampled")

    def spot_at(self, field: float, wavelength: int = 0) -> SpotRow | Unavailable:
        """The spot at a field fraction (traced on demand if it was not sampled)."""
        for row in self.spots:
            if abs(row.field - field) < 1e-12 and row.wavelength == self.setups[wavelength].wavelength:
                return row
        if self.unavailable is not None:
            return self.unavailable
        return spot(self.setups[wavelength], field, self.settings.grid)

    def chief_at(self, field: float) -> ChiefRow | Unavailable:
        for row in self.chief:
            if abs(row.field - field) < 1e-12:
                return row
        if self.unavailable is not None:
            return self.unavailable
        return chief(self.setups[0], [field])[0]


def analyse(system: System, settings: RaySettings = RaySettings(),
            results: FirstOrder | None = None) -> RayAnalysis:
    """Trace the marginal, chief and spot rays of a layout and judge the paraxial numbers."""
    results = results or first_order(system)
    sets = wavelength_sets(system)
    setups = []
    for wavelength, indices in sets:
        made = setup(system, results, indices, wavelength)
        if isinstance(made, Unavailable):
            return RayAnalysis(settings, sets[0][0], made, made, made, unavailable=made)
        setups.append(made)
    primary = setups[0]
    na = primary.numerical_aperture
    if na == 0:
        why = Unavailable("none: the image-side beam is collimated")
        dof: Value = why
        airy: Value = why
    else:
        dof = primary.wavelength / (na * na)
        airy = 0.61 * primary.wavelength / na
    obj = system.object
    no_field = (obj.field_angle == 0) if obj.at_infinity else (obj.height == 0)
    fields = (0.0,) if no_field else settings.fields  # every fraction of a zero field is 0
    margins = tuple(marginal(primary, settings.pupils))
    chiefs = tuple(chief(primary, fields))
    axial = launch(primary, 0.0, *pupil_grid(settings.grid))  # one trace for spot and focus
    spots = tuple(spot(s, f, settings.grid, rays=axial if f == 0.0 and s is primary else None)
                  for f in fields for s in setups)
    best = best_focus_shift(primary, settings.grid, rays=axial)
    return RayAnalysis(settings, primary.wavelength, na, dof, airy, margins, chiefs, spots, best,
                       None, tuple(setups))
