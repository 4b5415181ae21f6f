"""Chromatic properties: every wavelength at once through the one paraxial engine.

The layout is re-indexed with numpy arrays of indices (one entry per wavelength, see
`System.at_wavelength`), and `paraxial.steps_of`/`trace`/`matrix` run on those arrays unchanged:
one trace serves all wavelengths, with no Python loop per wavelength. From the per-wavelength
system matrices come the focal length, the back focal distance and the image distance at each
wavelength, and from those the axial colour, the secondary spectrum and, with the chief ray, the
lateral colour. Properties of a medium (index, Abbe number, partial dispersion) come straight
from its dispersion model.

Conventions (stated in the README):
- axial colour between λ₁ and λ₂ = s'(λ₁) − s'(λ₂), s' the paraxial image distance after the
  last vertex (+ downstream); for an object at infinity s' is the back focal distance.
- secondary spectrum across λ₁, λ₂, λ₃ = ½(s'(λ₁) + s'(λ₃)) − s'(λ₂): for an achromat whose
  λ₁ and λ₃ foci coincide this is the usual distance of the λ₂ focus from their common focus.
- lateral colour between λ₁ and λ₂ = ȳ(λ₁) − ȳ(λ₂), ȳ the paraxial chief ray height on the image
  plane (the fixed one, or the paraxial image plane of the primary wavelength).
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Any

import numpy as np

from ..system import System
from . import paraxial
from .firstorder import RELATIVE_ZERO, FirstOrder, Unavailable, first_order
from .paraxial import TRANSFER

__all__ = [
    "Request", "MEDIUM_QUANTITIES", "LAYOUT_QUANTITIES", "ColourTable", "colour_table",
    "image_distances", "focal_lengths", "chief_heights", "evaluate",
]

#: Quantities of one medium (need `of MEDIUM`).
MEDIUM_QUANTITIES = frozenset({"abbe number", "refractive index", "relative partial dispersion"})
#: Chromatic quantities of the whole layout.
LAYOUT_QUANTITIES = frozenset({"axial colour", "lateral colour", "secondary spectrum"})

@dataclass(frozen=True)
class Request:
    """One chromatic value a script asks for, already resolved by the interpreter.

    Attributes:
        quantity: its name (see quantities.py).
        wavelengths: in the layout's length unit, in the order the quantity needs them.
        labels: how the script named each wavelength ('F', '486.1 nm'), for messages.
        medium: the medium's name, for medium quantities.
        model: the medium's dispersion model (None: a constant index `index`).
        index: the medium's constant index when it has no model.
    """

    quantity: str
    wavelengths: tuple[float, ...] = ()
    labels: tuple[str, ...] = ()
    medium: str | None = None
    model: Any = None
    index: Any = None

    def describe(self) -> str:
        """The request in words, e.g. 'axial colour between F and C'."""
        words = self.quantity
        if self.medium:
            words += f" of {self.medium}"
        labels = self.labels
        if self.quantity in ("axial colour", "lateral colour", "relative partial dispersion"):
            return f"{words} between {labels[0]} and {labels[1]}"
        if self.quantity in ("secondary spectrum", "abbe number"):
            return f"{words} across {labels[0]}, {labels[1]} and {labels[2]}"
        return f"{words} at {labels[0]}" if labels else words


def _indices_of(request: Request, system: System) -> np.ndarray:
    wavelength_um = system.to_micrometres(np.asarray(request.wavelengths, dtype=float))
    if request.model is None:
        return np.full(wavelength_um.shape, float(request.index))
    from ..materials.environment import relative_index

    return np.asarray(relative_index(request.model, wavelength_um, system.environment))


def _vector_system(system: System, wavelengths: Any) -> tuple[System, np.ndarray]:
    values = np.asarray(wavelengths, dtype=float)
    return system.at_wavelength(values), values


def _full(value: Any, shape: tuple[int, ...]) -> np.ndarray:
    return np.broadcast_to(np.asarray(value, dtype=float), shape).copy()


def image_distances(system: System, wavelengths: Any) -> np.ndarray | Unavailable:
    """The paraxial image distance after the last vertex at each wavelength (layout units)."""
    vector, values = _vector_system(system, wavelengths)
    indices = vector.indices()
    n0, nk = indices[0], indices[-1]
    a, b, c, d = paraxial.matrix(paraxial.steps_of(vector))
    shape = values.shape
    a, b, c, d = (_full(x, shape) for x in (a, b, c, d))
    obj = system.object
    if obj.at_infinity:
        scale = sum(abs(s.value) for s in paraxial.steps_of(vector) if s.kind is not TRANSFER)
        if np.any(np.abs(c) <= RELATIVE_ZERO * np.maximum(np.abs(scale), 1e-300)):
            return Unavailable("at infinity (afocal layout)")
        return _full(paraxial.formulas.back_focal_distance(a, b, c, d, nk), shape)
    tau = obj.distance / n0
    denominator = paraxial.formulas.conjugate_denominator(a, b, c, d, tau)
    if np.any(np.abs(denominator) <= RELATIVE_ZERO * (np.abs(c * tau) + np.abs(d))):
        return Unavailable("at infinity: the object is at the front focal point")
    return _full(paraxial.formulas.image_distance(a, b, c, d, tau, nk), shape)


def focal_lengths(system: System, wavelengths: Any) -> np.ndarray | Unavailable:
    """The image-side focal length n'/power at each wavelength."""
    vector, values = _vector_system(system, wavelengths)
    nk = vector.indices()[-1]
    a, b, c, d = paraxial.matrix(paraxial.steps_of(vector))
    c = _full(c, values.shape)
    scale = sum(abs(s.value) for s in paraxial.steps_of(vector) if s.kind is not TRANSFER)
    if np.any(np.abs(c) <= RELATIVE_ZERO * np.maximum(np.abs(scale), 1e-300)):
        return Unavailable("none: the layout is afocal")
    return _full(nk / -c, values.shape)


def chief_heights(system: System, wavelengths: Any,
                  results: FirstOrder | None = None) -> np.ndarray | Unavailable:
    """The paraxial chief ray height on the image plane at each wavelength."""
    if system.stop is None:
        return Unavailable("none: the layout has no stop")
    obj = system.object
    if obj.at_infinity and obj.field_angle == 0 or not obj.at_infinity and obj.height == 0:
        return _full(0.0, np.shape(wavelengths))
    plane = system.image.distance
    if plane is None:
        primary = (results or first_order(system))["image distance"]
        if isinstance(primary, Unavailable):
            return primary
        plane = primary
    vector, values = _vector_system(system, wavelengths)
    shape = values.shape
    indices = vector.indices()
    n0, nk = _full(indices[0], shape), _full(indices[-1], shape)
    split = paraxial.split_at_stop(vector)
    a1, b1, c1, d1 = (_full(x, shape) for x in paraxial.matrix(split.front))
    if obj.at_infinity:
        if np.any(a1 == 0):
            return Unavailable("none: the entrance pupil is at infinity")
        nu = -n0 * math.tan(obj.field_angle)
        y = -b1 * nu / a1
    else:
        tau = obj.distance / n0
        denominator = a1 * tau + b1
        if np.any(denominator == 0):
            return Unavailable("none: the stop lies at the object")
        nu = -a1 * obj.height / denominator
        y = obj.height + tau * nu
    y, nu = paraxial.trace(_full(y, shape), _full(nu, shape), paraxial.steps_of(vector))
    return y + (plane / nk) * nu


@dataclass(frozen=True)
class ColourTable:
    """Per-wavelength values of a layout, for reports.

    Attributes:
        wavelengths: the layout's wavelengths (layout units), in script order.
        focal_length, image_distance, chief_height: arrays (or Unavailable) over them.
        axial_colour, lateral_colour, secondary_spectrum: (Request, value) summary rows.
    """

    wavelengths: tuple[float, ...]
    focal_length: Any
    image_distance: Any
    chief_height: Any
    summary: tuple[tuple[Request, Any], ...]


def colour_table(system: System, results: FirstOrder | None = None) -> ColourTable | None:
    """The colour section of a report: None when the layout has fewer than two wavelengths."""
    waves = tuple(w.value for w in system.wavelengths)
    if len(waves) < 2:
        return None
    results = results or first_order(system)
    summary: list[tuple[Request, Any]] = []
    order = sorted(range(len(waves)), key=lambda i: waves[i])
    short, long = waves[order[0]], waves[order[-1]]
    labels = _labels(system)
    pair = Request("axial colour", (short, long), (labels[order[0]], labels[order[-1]]))
    summary.append((pair, evaluate(pair, system, results)))
    lateral = Request("lateral colour", pair.wavelengths, pair.labels)
    summary.append((lateral, evaluate(lateral, system, results)))
    primary = system.primary_wavelength
    if len(waves) >= 3 and primary is not None and short < primary.value < long:
        middle = waves.index(primary.value)
        spectrum = Request("secondary spectrum", (short, primary.value, long),
                           (pair.labels[0], labels[middle], pair.labels[1]))
        summary.append((spectrum, evaluate(spectrum, system, results)))
    return ColourTable(waves, focal_lengths(system, waves), image_distances(system, waves),
                       chief_heights(system, waves, results), tuple(summary))


def _labels(system: System) -> list[str]:
    from ..materials.lines import line_letter
    from ..measure import to_nanometres

    found = []
    for w in system.wavelengths:
        nm = float(to_nanometres(w.value, system.units))
        found.append(line_letter(nm, system.environment) or f"{nm:g} nm")
    return found


def _difference(values: Any, first: int, second: int) -> Any:
    if isinstance(values, Unavailable):
        return values
    return float(values[first] - values[second])


def evaluate(request: Request, system: System, results: FirstOrder | None = None) -> Any:
    """The value of one request (a float in layout units, or Unavailable with the reason)."""
    q = request.quantity
    if q in MEDIUM_QUANTITIES:
        n = _indices_of(request, system)
        if q == "refractive index":
            return float(n[0])
        if q == "abbe number":
            from ..materials.dispersion import abbe_number

            if n[0] == n[2]:
                return Unavailable(f"none: {request.medium} has no dispersion "
                                   f"between {request.labels[0]} and {request.labels[2]}")
            return float(abbe_number(n[1], n[0], n[2]))
        from ..materials.dispersion import partial_dispersion  # (x, y, F, C)

        if n[2] == n[3]:
            return Unavailable(f"none: {request.medium} has no dispersion between F and C")
        return float(partial_dispersion(n[0], n[1], n[2], n[3]))
    if q == "axial colour":
        return _difference(image_distances(system, request.wavelengths), 0, 1)
    if q == "lateral colour":
        return _difference(chief_heights(system, request.wavelengths, results), 0, 1)
    if q == "secondary spectrum":
        s = image_distances(system, request.wavelengths)
        if isinstance(s, Unavailable):
            return s
        return float(0.5 * (s[0] + s[2]) - s[1])
    # any first-order quantity at one wavelength: the whole first-order evaluation there
    (wavelength,) = request.wavelengths
    value = first_order(system.at_wavelength(wavelength))[q]
    return value if isinstance(value, Unavailable) else float(value)
