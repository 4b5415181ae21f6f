"""Gaussian beams through a numeric layout: waists, radii, wavefronts, clipping and coupling.

The beam runs through the one paraxial algorithm: `paraxial.steps_of` gives the layout's
steps, a transfer from the input waist is put in front, `paraxial.matrix` multiplies them, and
`paraxial.gaussian` turns the matrix into beam quantities (the ABCD law of Kogelnik & Li
1966). Every function takes floats or numpy arrays (a leading sample axis: tolerance samples,
sweeps), so N layouts cost one array pass. A beam with beam propagation ratio M² > 1 is the
embedded-Gaussian model of Siegman (1990, "New developments in laser resonators", Proc. SPIE
1224:2) as adopted by ISO 11146-1:2005: it propagates as a Gaussian of wavelength M²·λ with
the real beam's waist, so its radius is M times the embedded Gaussian's everywhere.

Fibre coupling is the overlap of two Gaussian modes in closed form, with lateral offset,
tilt and any mismatch of size and wavefront curvature (the general form of Joyce & DeLoach
1984, "Alignment of Gaussian beams", Appl. Opt. 23:4187; it reduces to the offset, tilt and
gap formulas of Marcuse 1977, "Loss analysis of single-mode fiber splices", Bell Syst. Tech.
J. 56:703). A value that does not exist is an `Unavailable` with the reason in words.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Any

import numpy as np

from ..system import System
from . import paraxial
from .firstorder import LARGEST, Unavailable, first_order
from .paraxial import TRANSFER, Step, gaussian

__all__ = ["BeamPropagation", "AtPlane", "Output", "Coupling", "Aperture", "EnvelopePoint",
           "Place", "power_through_circle", "overlap_efficiency", "propagation", "beam_value"]

Number = Any  # float | numpy.ndarray


@dataclass(frozen=True)
class Place:
    """Where along the layout a beam quantity is taken: at a boundary (just after it), at
    the image plane, or `distance` after the last boundary."""

    kind: str  # 'boundary' | 'image' | 'after'
    boundary: int = -1
    distance: Number = 0.0
    label: str = ""


@dataclass(frozen=True)
class AtPlane:
    """The beam at one plane: its 1/e² radius and its wavefront radius (+ diverging)."""

    radius: Number
    wavefront_radius: Number | Unavailable
    index: Number


@dataclass(frozen=True)
class Output:
    """The beam leaving the layout: its waist (position after the last boundary, + downstream:
    a negative one is virtual), radius, Rayleigh range and far-field half-angle divergence."""

    waist_position: Number
    waist_radius: Number
    rayleigh_range: Number
    divergence: Number


@dataclass(frozen=True)
class Aperture:
    """One clear aperture met by the beam: the fraction of power it passes and its clearance
    (clear diameter over the 1/e² beam diameter there)."""

    boundary: str
    clear_diameter: Number
    beam_radius: Number
    passed: Number
    clearance: Number


@dataclass(frozen=True)
class Coupling:
    """Coupling into the fibre mode: the efficiency and the factors it is made of."""

    efficiency: Number
    mismatch: Number  # size and wavefront curvature alone (no offset, no tilt)
    beam_radius: Number  # at the fibre face
    wavefront_radius: Number | Unavailable
    mode_radius: Number
    face_distance: Number  # fibre face after the last boundary

    @property
    def loss_db(self) -> Number:
        return -10.0 * np.log10(self.efficiency)


@dataclass(frozen=True)
class EnvelopePoint:
    """One sample of the 1/e² envelope: in space `space` (0 before the first boundary, i
    after boundary i), `distance` along the path from that space's start (for space 0, from
    the first vertex, negative upstream)."""

    space: int
    distance: float
    radius: float


def power_through_circle(aperture_radius: Number, beam_radius: Number) -> Number:
    """Fraction of a centred Gaussian beam's power inside a circle: 1 − exp(−2a²/w²)."""
    return 1.0 - np.exp(-2.0 * aperture_radius ** 2 / beam_radius ** 2)


def overlap_efficiency(beam_radius: Number, inverse_wavefront_radius: Number,
                       mode_radius: Number, wavenumber: Number, offset: Number = 0.0,
                       tilt: Number = 0.0) -> Number:
    """Power coupled from a Gaussian beam into a Gaussian mode with a flat phase front.

    The fields are u1 = exp(−x²/w1² − i k x²/(2R)) and u2 = exp(−(x − d)²/w2² + i k sinθ x),
    the offset d and tilt θ in one plane. Their normalised overlap |∫u1 u2*|²/(∫|u1|²∫|u2|²)
    is a Gaussian integral in closed form, per axis: with A = 1/w1² + 1/w2² + i k/(2R),
    η = 4/(w1² w2² |A|²) · exp(2 Re(B²/4A) − 2d²/w2²), B = 2d/w2² − i k sinθ.

    Args:
        beam_radius: 1/e² radius w1 of the beam at the fibre face.
        inverse_wavefront_radius: 1/R of the beam there (0: flat; + diverging).
        mode_radius: 1/e² mode-field radius w2 of the fibre.
        wavenumber: k = 2π n/λ0 in the medium at the face.
        offset, tilt: lateral offset d of the mode's axis and tilt θ of the fibre (radians).
    """
    beta = 1.0 / mode_radius ** 2
    a_term = 1.0 / beam_radius ** 2 + beta + 0.5j * wavenumber * inverse_wavefront_radius
    b_term = 2.0 * beta * offset - 1j * wavenumber * np.sin(tilt)
    scale = 4.0 / (beam_radius ** 2 * mode_radius ** 2 * np.abs(a_term) ** 2)
    return scale * np.exp(2.0 * np.real(b_term ** 2 / (4.0 * a_term)) - 2.0 * beta * offset ** 2)


def _scalar(value: Any) -> bool:
    return np.ndim(value) == 0


class BeamPropagation:
    """The layout's Gaussian beam, computed on demand (floats or arrays alike)."""

    def __init__(self, system: System) -> None:
        beam = system.beam
        if beam is None:
            raise ValueError("the layout has no beam")
        self.system = system
        # the indices at the beam's own wavelength (dispersive media; others are constant)
        self.at_beam = system.at_wavelength(beam.wavelength) if any(
            m.model is not None for m in system.media) else system
        self.indices = self.at_beam.indices()
        self.steps = paraxial.steps_of(self.at_beam)
        self.lead = Step(TRANSFER, beam.waist_distance / self.indices[0])
        self.waist_squared = beam.waist_radius * beam.waist_radius
        self.wavelength = beam.wavelength
        self.effective_wavelength = beam.propagation_ratio * beam.wavelength
        self.confocal = math.pi * self.waist_squared / self.effective_wavelength
        self._output: Output | None = None

    def problem(self) -> Unavailable | None:
        """Why this (numeric, scalar) beam cannot be computed, or None: extreme inputs (a
        waist of 1e-300, a distance of 1e300) overflow double precision, and a report must
        then say so in words rather than print inf or nan. Array-valued layouts (samples)
        are not checked here: one sample out of range must not hide the others."""
        if "_problem" in self.__dict__:
            return self._problem
        found = None
        scalar = _scalar(self.confocal) and _scalar(self.lead.value) and all(
            _scalar(step.value) for step in self.steps) and (
            self.system.fibre is None or all(_scalar(v) for v in (
                self.system.fibre.mode_field_diameter, self.system.fibre.offset,
                self.system.fibre.tilt, self.system.fibre.distance or 0.0)))
        if scalar:
            values: list[Any] = []
            try:
                with np.errstate(all="ignore"):
                    out = self.output()
                    values += [out.waist_position, out.waist_radius, out.rayleigh_range,
                               out.divergence]
                    for i in range(len(self.system.boundaries)):
                        at = self.at_boundary(i)
                        values.append(at.radius)
                        if not isinstance(at.wavefront_radius, Unavailable):
                            values.append(at.wavefront_radius)
                    if self.system.fibre is not None:
                        coupling = self.coupling()
                        if not isinstance(coupling, Unavailable):
                            values += [coupling.efficiency, coupling.beam_radius]
                bad = any(not math.isfinite(float(v)) or abs(float(v)) > LARGEST for v in values)
                bad = bad or not (out.waist_radius > 0 and out.rayleigh_range > 0)
            except (ArithmeticError, ValueError):
                bad = True
            if bad:
                found = Unavailable("out of range: the beam's numbers overflow double precision")
        self._problem = found
        return found

    # --- matrices from the input waist ------------------------------------------------------
    def matrix_to_boundary(self, i: int) -> tuple:
        """Input waist → just after boundary i (its refraction included)."""
        return paraxial.matrix([self.lead] + self.steps[: 2 * i + 1])

    def matrix_after(self, distance: Number) -> tuple:
        """Input waist → `distance` after the last boundary."""
        nk = self.indices[-1]
        return paraxial.matrix([self.lead] + self.steps + [Step(TRANSFER, distance / nk)])

    # --- the beam at a plane ----------------------------------------------------------------
    def _at(self, abcd: tuple, n: Number) -> AtPlane:
        a, b, c, d = abcd
        radius = np.sqrt(gaussian.radius_squared(a, b, c, d, self.waist_squared, self.confocal))
        numerator = gaussian.curvature_numerator(a, b, c, d, self.confocal)
        if _scalar(numerator) and abs(numerator) <= 1e-9 * (abs(b * d) + abs(
                a * c * self.confocal ** 2) + 1e-300):
            wavefront: Any = Unavailable("infinite: the wavefront is flat there (a waist)")
        else:
            with np.errstate(divide="ignore"):
                wavefront = gaussian.wavefront_radius(a, b, c, d, self.confocal, n)
        return AtPlane(_plain(radius), _plain(wavefront), n)

    def at_boundary(self, i: int) -> AtPlane:
        return self._at(self.matrix_to_boundary(i), self.indices[i + 1])

    def after(self, distance: Number) -> AtPlane:
        return self._at(self.matrix_after(distance), self.indices[-1])

    def inverse_wavefront_radius(self, abcd: tuple, n: Number) -> Number:
        a, b, c, d = abcd
        return gaussian.curvature_numerator(a, b, c, d, self.confocal) / (
            n * (b * b + a * a * self.confocal * self.confocal))

    def image_plane(self) -> Number | Unavailable:
        """The image plane's distance after the last boundary (fixed, or the paraxial focus)."""
        if self.system.image.distance is not None:
            return self.system.image.distance
        image = first_order(self.system)["image distance"]
        if isinstance(image, Unavailable):
            return Unavailable(f"no image plane: the paraxial image is {image}")
        return image

    def place_distance(self, place: Place) -> Number | Unavailable:
        if place.kind == "image":
            return self.image_plane()
        return place.distance

    def at_place(self, place: Place) -> AtPlane | Unavailable:
        if place.kind == "boundary":
            return self.at_boundary(place.boundary)
        distance = self.place_distance(place)
        if isinstance(distance, Unavailable):
            return distance
        return self.after(distance)

    # --- the output beam --------------------------------------------------------------------
    def output(self) -> Output:
        if self._output is None:
            a, b, c, d = paraxial.matrix([self.lead] + self.steps)
            nk = self.indices[-1]
            conf = self.confocal
            waist = np.sqrt(gaussian.waist_radius_squared(a, b, c, d, self.waist_squared, conf))
            rayleigh = gaussian.rayleigh_range(a, b, c, d, conf, nk)
            self._output = Output(
                _plain(gaussian.waist_distance(a, b, c, d, conf, nk)), _plain(waist),
                _plain(rayleigh), _plain(waist / rayleigh))
        return self._output

    def waist_in_space(self, i: int) -> Number:
        """Where the beam's waist lies in the space after boundary i (distance after it)."""
        a, b, c, d = self.matrix_to_boundary(i)
        return _plain(gaussian.waist_distance(a, b, c, d, self.confocal, self.indices[i + 1]))

    # --- apertures --------------------------------------------------------------------------
    def apertures(self) -> list[Aperture]:
        """Every boundary with a clear diameter, in the order the beam meets them."""
        found = []
        for i, boundary in enumerate(self.system.boundaries):
            if boundary.clear_diameter is None:
                continue
            radius = self.at_boundary(i).radius
            half = boundary.clear_diameter / 2
            found.append(Aperture(boundary.name, boundary.clear_diameter, radius,
                                  _plain(power_through_circle(half, radius)),
                                  _plain(boundary.clear_diameter / (2 * radius))))
        return found

    def power_passed(self) -> Number:
        """The fraction of power through every clear aperture, each taken on its own (the
        diffraction an aperture adds to the beam downstream is not modelled)."""
        passed: Any = 1.0
        for aperture in self.apertures():
            passed = passed * aperture.passed
        return _plain(passed)

    # --- the fibre --------------------------------------------------------------------------
    def fibre_face(self) -> Number | Unavailable:
        fibre = self.system.fibre
        if fibre.place == "image":
            return self.image_plane()
        if fibre.place == "waist":
            return self.output().waist_position
        return fibre.distance

    def coupling(self) -> Coupling | Unavailable:
        fibre = self.system.fibre
        if fibre is None:
            return Unavailable("none: the layout has no fibre to couple into")
        beam = self.system.beam
        if _scalar(beam.propagation_ratio) and beam.propagation_ratio != 1:
            return Unavailable("none: a beam with a propagation ratio above 1 is not one "
                               "Gaussian mode; its coupling into a single-mode fibre needs its "
                               "mode content")
        face = self.fibre_face()
        if isinstance(face, Unavailable):
            return face
        abcd = self.matrix_after(face)
        n = self.indices[-1]
        at = self._at(abcd, n)
        inverse = self.inverse_wavefront_radius(abcd, n)
        k = 2 * math.pi * n / self.wavelength
        mode = fibre.mode_field_diameter / 2
        efficiency = overlap_efficiency(at.radius, inverse, mode, k, fibre.offset, fibre.tilt)
        mismatch = overlap_efficiency(at.radius, inverse, mode, k)
        return Coupling(_plain(efficiency), _plain(mismatch), at.radius, at.wavefront_radius,
                        mode, face)

    # --- the envelope for drawings ----------------------------------------------------------
    def envelope(self, before: float, after: float, samples: int = 60) -> list[EnvelopePoint]:
        """The 1/e² radius sampled along the path: `before` the first vertex (from the input
        waist, if upstream), through every gap, and `after` the last boundary."""
        points: list[EnvelopePoint] = []
        n0 = self.indices[0]
        for s in np.linspace(-before, 0.0, samples):
            a, b, c, d = paraxial.matrix([Step(TRANSFER, (self.system.beam.waist_distance + s)
                                               / n0)])
            w = math.sqrt(gaussian.radius_squared(a, b, c, d, self.waist_squared, self.confocal))
            points.append(EnvelopePoint(0, float(s), w))
        for i, gap in enumerate(self.system.gaps):
            base = [self.lead] + self.steps[: 2 * i + 1]
            for s in np.linspace(0.0, gap, max(2, samples // 2)):
                a, b, c, d = paraxial.matrix(base + [Step(TRANSFER, s / self.indices[i + 1])])
                w = math.sqrt(gaussian.radius_squared(a, b, c, d, self.waist_squared,
                                                      self.confocal))
                points.append(EnvelopePoint(i + 1, float(s), w))
        last = len(self.system.boundaries)
        for s in np.linspace(0.0, after, samples):
            points.append(EnvelopePoint(last, float(s), float(self.after(s).radius)))
        return points


def _plain(value: Any) -> Any:
    """A 0-d numpy value as a Python float (arrays and reasons pass through)."""
    if isinstance(value, np.ndarray) and value.ndim == 0:
        return float(value)
    if isinstance(value, np.floating):
        return float(value)
    return value


_RECENT: dict[int, tuple[System, BeamPropagation]] = {}


def propagation(system: System) -> BeamPropagation:
    """The shared `BeamPropagation` of a layout (checks and reports of one run reuse it)."""
    found = _RECENT.get(id(system))
    if found is not None and found[0] is system:
        return found[1]
    made = BeamPropagation(system)
    if len(_RECENT) >= 8:
        _RECENT.pop(next(iter(_RECENT)))
    _RECENT[id(system)] = (system, made)
    return made


def beam_value(system: System, name: str, place: Place | None = None) -> Any:
    """A beam quantity of `quantities.BEAM_QUANTITIES` by name: a float (or an array, for
    array-valued layouts) in layout units, radians or a fraction, or an `Unavailable`."""
    if system.beam is None:
        return Unavailable("none: the layout has no beam")
    beam = propagation(system)
    if beam.problem() is not None:
        return beam.problem()
    if name in ("waist position", "waist radius", "rayleigh range", "divergence"):
        return getattr(beam.output(), name.replace(" ", "_"))
    if name in ("beam radius", "wavefront radius"):
        at = beam.at_place(place)
        if isinstance(at, Unavailable):
            return at
        return at.radius if name == "beam radius" else at.wavefront_radius
    if name == "power passed":
        if place is None:
            return beam.power_passed()
        for aperture in beam.apertures():
            if aperture.boundary == system.boundaries[place.boundary].name:
                return aperture.passed
        return Unavailable("none: this boundary has no clear diameter")
    coupling = beam.coupling()
    if isinstance(coupling, Unavailable):
        return coupling
    if _scalar(coupling.efficiency) and coupling.efficiency < 1e-300:
        return Unavailable("none: practically no power couples (below 1e-300)")
    if name == "coupling efficiency":
        return coupling.efficiency
    if name == "coupling loss":
        return _plain(coupling.loss_db)
    raise KeyError(name)
