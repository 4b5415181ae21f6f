"""Image quality of a layout by name: wavefront, Strehl ratio, MTF, encircled energy, Zernike
terms, field curves, chief-ray angle and relative illumination.

One object per (layout, sampling) traces each field and wavelength once, on first use, and
answers every `QualityRequest` as a float (layout units, waves, degrees or a plain fraction)
or an `Unavailable` with the reason in words. Front ends turn these into text.

Field analyses (methods named, as reports say them):
- tangential and sagittal focus: where a pair of close rays about the chief ray (±1 % of the
  stop radius, in the meridional and in the sagittal plane) meet, minus the image plane,
  along the axis (close ray pairs, not the Coddington equations);
- chief-ray angle: the chief ray's angle to the axis in image space, positive when it heads
  away from the axis;
- relative illumination: the projected solid angle of the pupil seen from the image point —
  the area the arriving rays fill in image-space optical direction cosines — relative to the
  axis (Lambertian object, no transmission losses). It contains the cos⁴ law for a small
  distant pupil, pupil distortion and vignetting; `cos4_illumination` gives the plain cos⁴ of
  the chief-ray angle beside it.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Any

import numpy as np

from ..system import System
from . import aberrations, realrays
from .firstorder import FirstOrder, Unavailable, first_order
from .mtf import Transfer, transfers
from .psf import encircled_energy, ensquared_energy, marechal, otf, psf, radius_for_energy
from .psf import strehl
from .qualitysettings import QualityRequest, QualitySettings
from .raysettings import RaySettings
from .wavefront import Bundle, Wavefront, best_focus, bundle, safe_wavefront

__all__ = ["ImageQuality", "image_quality", "FieldRow", "PAIR"]

Value = Any  # float | Unavailable

#: close ray pairs: half their separation, as a fraction of the stop radius
PAIR = 0.01


@dataclass(frozen=True)
class FieldRow:
    """Field analyses at one field fraction (layout units; angles in degrees)."""

    field: float
    image_height: Value
    tangential_focus: Value
    sagittal_focus: Value
    distortion: Value
    lateral_colour: Value
    chief_ray_angle: Value
    illumination: Value
    cos4_illumination: Value


class ImageQuality:
    """Lazily traced bundles and wavefronts of one layout, and its quality quantities."""

    def __init__(self, system: System, rays: RaySettings, settings: QualitySettings,
                 results: FirstOrder | None = None) -> None:
        self.system = system
        self.rays = rays
        self.settings = settings
        self.results = results or first_order(system)
        self._setups: list | Unavailable | None = None
        self._bundles: dict[tuple[float, int], Bundle | Unavailable] = {}
        self._waves: dict[tuple[float, int, float], Wavefront | Unavailable] = {}
        self._transfers: dict[tuple, Transfer] = {}
        self._fields: dict[float, FieldRow] = {}

    # --- set-up -------------------------------------------------------------------------------
    @property
    def setups(self) -> list | Unavailable:
        """One ray setup per wavelength, primary first (or why rays cannot be launched)."""
        if self._setups is None:
            made = []
            for wavelength, indices in aberrations.wavelength_sets(self.system):
                s = aberrations.setup(self.system, self.results, indices, wavelength)
                if isinstance(s, Unavailable):
                    self._setups = s
                    return s
                made.append(s)
            self._setups = made
        return self._setups

    def weights(self) -> list[float]:
        """Weights of the setups (primary first), from `wavelength weights` in script order."""
        setups = self.setups
        if isinstance(setups, Unavailable):
            return []
        given = self.settings.weights
        if given is None or not self.system.wavelengths:
            return [1.0] * len(setups)
        by_value = {float(w.value): weight for w, weight in zip(self.system.wavelengths, given)}
        return [by_value.get(s.wavelength, 1.0) for s in setups]

    def _setup_index(self, wavelength: float | None) -> int | Unavailable:
        setups = self.setups
        if isinstance(setups, Unavailable):
            return setups
        if wavelength is None:
            return 0
        for i, s in enumerate(setups):
            if abs(s.wavelength - wavelength) <= 1e-9 * wavelength:
                return i
        made = aberrations.setup(self.system, self.results, self.system.indices(wavelength),
                                 wavelength)
        if isinstance(made, Unavailable):
            return made
        setups.append(made)
        return len(setups) - 1

    def bundle(self, field: float, index: int = 0) -> Bundle | Unavailable:
        key = (field, index)
        if key not in self._bundles:
            setups = self.setups
            if isinstance(setups, Unavailable):
                return setups
            self._bundles[key] = bundle(setups[index], field, self.settings.cells,
                                        self.results["exit pupil position"])
        return self._bundles[key]

    def wavefront(self, field: float, index: int = 0, shift: float = 0.0
                  ) -> Wavefront | Unavailable:
        key = (field, index, shift)
        if key not in self._waves:
            self._waves[key] = safe_wavefront(self.bundle(field, index), shift)
        return self._waves[key]

    def group(self, field: float, wavelength: float | None = None
              ) -> tuple[list[Wavefront], list[float]] | Unavailable:
        """The wavefronts of every weighted wavelength (or the one asked for) at a field."""
        if wavelength is not None:
            index = self._setup_index(wavelength)
            if isinstance(index, Unavailable):
                return index
            indices, weights = [index], [1.0]
        else:
            setups = self.setups
            if isinstance(setups, Unavailable):
                return setups
            weights = self.weights()
            indices = [i for i, w in enumerate(weights) if w > 0]
            weights = [weights[i] for i in indices]
        found = [self.wavefront(field, i) for i in indices]
        for wf in found:
            if isinstance(wf, Unavailable):
                return wf
        return found, weights

    # --- fields in the sensor's terms ---------------------------------------------------------
    def field_for_height(self, height: float) -> float | Unavailable:
        """The field fraction whose real chief ray meets the image plane at this height."""
        if height == 0:
            return 0.0
        setups = self.setups
        if isinstance(setups, Unavailable):
            return setups
        s = setups[0]

        def reach(fraction: float) -> float:
            row = aberrations.chief(s, [fraction])[0]
            return math.nan if isinstance(row.real_height, Unavailable) else abs(row.real_height)

        full = reach(1.0)
        if not math.isfinite(full):
            return Unavailable("none: the chief ray at the full field is lost")
        if height > full * (1 + 1e-9):
            return Unavailable(f"none: an image height of {height:.6g} lies beyond the full "
                               f"field, whose chief ray reaches {full:.6g}")
        lo, hi = 0.0, 1.0
        for _ in range(60):  # the image height grows with the field over the layout's field
            mid = 0.5 * (lo + hi)
            if reach(mid) < height:
                lo = mid
            else:
                hi = mid
            if hi - lo < 1e-12:
                break
        return 0.5 * (lo + hi)

    def image_circle_radius(self) -> Value:
        setups = self.setups
        if isinstance(setups, Unavailable):
            return setups
        row = aberrations.chief(setups[0], [1.0])[0]
        if isinstance(row.real_height, Unavailable):
            return row.real_height
        return abs(float(row.real_height))

    # --- the quantities ----------------------------------------------------------------------
    def transfer(self, field: float, frequencies: tuple[float, ...],
                 wavelength: float | None = None, limit: bool = True) -> Transfer | Unavailable:
        key = (field, frequencies, wavelength, limit)
        if key not in self._transfers:
            found = self.group(field, wavelength)
            if isinstance(found, Unavailable):
                return found
            group, weights = found
            self._transfers[key] = transfers([group], weights, frequencies, limit)[0]
        return self._transfers[key]

    def value(self, request: QualityRequest) -> Value:
        """The quantity a request names."""
        field = request.field
        if request.image_height is not None:
            field = self.field_for_height(request.image_height)
            if isinstance(field, Unavailable):
                return field
        name = request.name
        if name == "image circle margin":
            radius = self.image_circle_radius()
            if isinstance(radius, Unavailable) or self.settings.sensor is None:
                return radius if isinstance(radius, Unavailable) else \
                    Unavailable("none: the layout has no sensor")
            return radius - self.settings.sensor.half_diagonal
        if name in ("tangential focus", "sagittal focus", "chief-ray angle", "illumination",
                    "cos4 illumination"):
            row = self.field_row(field)
            value = getattr(row, name.replace(" ", "_").replace("-", "_"))
            if name == "chief-ray angle" and not isinstance(value, Unavailable):
                return math.radians(value)  # expectations keep angles in radians
            return value
        if name == "mtf":
            tr = self.transfer(field, (request.frequency,), request.wavelength, limit=False)
            if isinstance(tr, Unavailable):
                return tr
            return tr.at(request.frequency, request.orientation)
        index = self._setup_index(request.wavelength)
        if isinstance(index, Unavailable):
            return index
        if name == "wavefront focus shift":
            b = self.bundle(field, index)
            if isinstance(b, Unavailable):
                return b
            return best_focus(b)[0]
        wf = self.wavefront(field, index)
        if isinstance(wf, Unavailable):
            return wf
        if name == "wavefront error rms":
            return wf.rms
        if name == "wavefront error peak-to-valley":
            return wf.peak_to_valley
        if name == "zernike":
            return wf.zernike.coefficient(request.term)
        pupil = wf.pupil_function()
        if name == "strehl ratio":
            return strehl(pupil)
        if name == "marechal strehl":
            return marechal(wf.rms)
        transfer = otf(psf(pupil))
        if name == "encircled energy":
            return float(encircled_energy(pupil, request.size, transfer)[0])
        if name == "ensquared energy":
            return float(ensquared_energy(pupil, request.size / 2, transfer)[0])
        if name == "encircled energy radius":
            found = radius_for_energy(pupil, request.size, transfer)
            if found is None:
                return Unavailable(f"none: the point spread is wider than the "
                                   f"{self.settings.cells}-cell grid's window")
            return found
        raise KeyError(name)

    # --- field analyses -----------------------------------------------------------------------
    def field_row(self, field: float) -> FieldRow:
        if field not in self._fields:
            self._fields[field] = self._field_row(field)
        return self._fields[field]

    def _field_row(self, field: float) -> FieldRow:
        setups = self.setups
        if isinstance(setups, Unavailable):
            return FieldRow(field, *([setups] * 8))
        s = setups[0]
        chief = aberrations.chief(s, [field])[0]
        tangential = _pair_focus(s, field, "y")
        sagittal = _pair_focus(s, field, "x")
        colour: Value = Unavailable("none: the layout has one wavelength")
        if len(setups) > 1:
            by_length = sorted(setups, key=lambda made: made.wavelength)
            short = aberrations.chief(by_length[0], [field])[0].real_height
            long = aberrations.chief(by_length[-1], [field])[0].real_height
            if isinstance(short, Unavailable) or isinstance(long, Unavailable):
                colour = Unavailable("none: a chief ray is lost")
            else:
                colour = float(short - long)
        rays = aberrations.launch(s, field, np.zeros(1), np.zeros(1))
        angle: Value
        if rays.status[0] in (realrays.MISSED, realrays.TOTAL_REFLECTION):
            angle = Unavailable("none: the chief ray is lost")
        else:
            kx, ky, kz = float(rays.kx[0]), float(rays.ky[0]), float(rays.kz[0])
            across = math.hypot(kx, ky)
            angle = math.degrees(math.atan2(across, abs(kz)))
            height = float(rays.y[0] + (s.image_z - rays.z[0]) * ky / kz)
            if ky * height < 0:
                angle = -angle
        illumination = self._illumination(field)
        cos4: Value = angle if isinstance(angle, Unavailable) else \
            math.cos(math.radians(angle)) ** 4
        distortion = chief.distortion
        return FieldRow(field, chief.real_height, tangential, sagittal, distortion, colour,
                        angle, illumination, cos4)

    def _illumination(self, field: float) -> Value:
        here, axis = self.bundle(field), self.bundle(0.0)
        for b in (here, axis):
            if isinstance(b, Unavailable):
                return b

        def solid(b: Bundle) -> float:
            wf = safe_wavefront(b)
            if isinstance(wf, Unavailable):
                return 0.0
            return wf.na_x * wf.na_y * int(b.arrived.sum())

        reference = solid(axis)
        if reference == 0:
            return Unavailable("none: no ray reaches the image on the axis")
        return solid(here) / reference


def _pair_focus(s, field: float, plane: str) -> Value:
    """Close-ray-pair focus (tangential: pair in y; sagittal: pair in x) minus the image plane,
    along the axis (positive downstream)."""
    if plane == "y":
        px, py = np.zeros(2), np.array([-PAIR, PAIR])
    else:
        px, py = np.array([-PAIR, PAIR]), np.zeros(2)
    rays = aberrations.launch(s, field, px, py)
    if (rays.status != realrays.OK).any() or not np.isfinite(rays.data).all():
        return Unavailable("none: a ray of the close pair is lost")
    pos = rays.y if plane == "y" else rays.x
    slope = (rays.ky if plane == "y" else rays.kx) / rays.kz
    z0 = rays.z
    # bring both to a common z, then find where the two lines meet
    ref = float(z0[0])
    p = pos + (ref - z0) * slope
    if abs(slope[0] - slope[1]) < 1e-15:
        return Unavailable("none: the close rays leave parallel (focus at infinity)")
    cross = ref - (p[0] - p[1]) / (slope[0] - slope[1])
    return float(s.image_sense * (cross - s.image_z))


_RECENT: dict[tuple[int, RaySettings, QualitySettings], tuple[System, ImageQuality]] = {}


def image_quality(system: System, rays: RaySettings, settings: QualitySettings,
                  results: FirstOrder | None = None) -> ImageQuality:
    """The shared `ImageQuality` of a layout (checks, reports and drawings of one run reuse the
    same traces; a few recent layouts are kept, keyed by identity)."""
    key = (id(system), rays, settings)
    found = _RECENT.get(key)
    if found is not None and found[0] is system:
        return found[1]
    made = ImageQuality(system, rays, settings, results)
    if len(_RECENT) >= 8:
        _RECENT.pop(next(iter(_RECENT)))
    _RECENT[key] = (system, made)
    return made
