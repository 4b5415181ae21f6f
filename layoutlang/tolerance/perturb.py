"""Built units as layouts: the nominal System with its toleranced numbers moved, and each
unit's compensators adjusted.

`perturbed` takes perturbations of shape (items,) for one unit or (items, S) for a batch of
S units; a batch is one System whose perturbed numbers are numpy arrays, which the paraxial
engine traces in one pass. A perturbed dispersion model (index or Abbe number of a real
material) exists per unit only: in a batch its medium carries the per-unit primary index and
a model that refuses other wavelengths (`BatchOnlyModel`), so nothing can silently use the
nominal dispersion; units are evaluated one by one for colour.
"""

from __future__ import annotations

from dataclasses import dataclass, replace
from typing import Any

import numpy as np

from ..engines.firstorder import Unavailable, first_order
from ..materials.dispersion import Dispersion
from ..surfaces.placement import RETURNS, Placement
from ..system import GroupPlacement, ImageSpec, System
from .model import PLACED, Compensator, ToleranceItem

__all__ = ["perturbed", "compensated", "image_plane", "ShiftedModel", "BatchOnlyModel",
           "colour_perturbed"]


@dataclass(frozen=True)
class ShiftedModel(Dispersion):
    """A material whose index is off by a constant at every wavelength (a melt's index
    tolerance: common practice)."""

    base: Any = None
    offset: float = 0.0

    def __post_init__(self) -> None:
        object.__setattr__(self, "reference", self.base.reference)
        object.__setattr__(self, "valid_um", self.base.valid_um)

    def index(self, wavelength_um):
        return self.base.index(wavelength_um) + self.offset

    def describe(self) -> str:
        return f"{self.base.describe()}, index {self.offset:+.3g}"


@dataclass(frozen=True)
class BatchOnlyModel(Dispersion):
    """Stands for per-unit dispersion inside a batch: only the primary index exists."""

    base: Any = None

    def __post_init__(self) -> None:
        object.__setattr__(self, "reference", self.base.reference)
        object.__setattr__(self, "valid_um", self.base.valid_um)

    def index(self, wavelength_um):
        raise RuntimeError("a batch of built units has no dispersion: evaluate units one by one")

    def describe(self) -> str:
        return self.base.describe()


def colour_perturbed(items: tuple[ToleranceItem, ...]) -> bool:
    """Whether any item perturbs a dispersion model (units must then be taken one by one for
    anything but primary-wavelength first-order quantities)."""
    return any(item.target in ("index", "abbe number") for item in items)


def perturbed(nominal: System, items: tuple[ToleranceItem, ...], deltas: np.ndarray) -> System:
    """The nominal layout with each item moved by its row of `deltas` ((items,) or (items, S))."""
    boundaries = list(nominal.boundaries)
    gaps = list(nominal.gaps)
    groups = list(nominal.groups)
    media = {m.name: m for m in nominal.media}
    batch = deltas.ndim == 2
    primary = nominal.primary_wavelength
    for item, delta in zip(items, deltas):
        if item.target == "gap":
            gaps[item.position] = _moved(gaps[item.position], delta, item.relative)
        elif item.target in ("index", "abbe number"):
            media[item.name] = _moved_medium(media[item.name], item, delta, batch, primary,
                                             nominal)
        elif item.target in PLACED:
            groups.append(_placed(item, delta))
        else:
            b = boundaries[item.position]
            if item.target == "radius":
                b = replace(b, curvature=1.0 / _moved(1.0 / b.curvature, delta, item.relative))
            elif item.target == "curvature":
                b = replace(b, curvature=_moved(b.curvature, delta, item.relative))
            elif item.target == "conic constant":
                b = replace(b, conic=_moved(b.conic, delta, item.relative))
            elif item.target == "clear diameter":
                b = replace(b, clear_diameter=_moved(b.clear_diameter, delta, item.relative))
            boundaries[item.position] = b
    return replace(nominal, boundaries=tuple(boundaries), gaps=tuple(gaps),
                   media=tuple(media[m.name] for m in nominal.media), groups=tuple(groups))


def _placed(item: ToleranceItem, delta) -> GroupPlacement:
    """A decenter or tilt tolerance as a placement of the surface or element about its first
    vertex whose axis returns: the surfaces after (the sensor) stay where the design put them,
    also after a fold mirror (its own placement still carries the axis). Applied after every
    placement the script wrote before it (the frame they left), as a mounting error is."""
    zero = 0.0 * delta
    letters = "xyz"
    if item.target == "decenter":
        shift = tuple(delta if letters[k] == item.axis else zero for k in range(2))
        placement = Placement(decenter=shift, tilt=(zero, zero, zero), axis=RETURNS)
    else:
        turn = tuple(delta if letters[k] == item.axis else zero for k in range(3))
        placement = Placement(decenter=(zero, zero), tilt=turn, axis=RETURNS)
    return GroupPlacement(item.position, item.last, placement, name=item.label)


def _moved(value, delta, relative: bool):
    return value * (1.0 + delta) if relative else value + delta


def _moved_medium(medium, item: ToleranceItem, delta, batch: bool, primary, nominal: System):
    model = medium.model
    if item.target == "index":
        if model is None:
            return replace(medium, index=_moved(medium.index, delta, item.relative))
        offset = medium.index * delta if item.relative else delta
        if batch:
            return replace(medium, index=medium.index + offset, model=BatchOnlyModel(model))
        moved = replace(medium, model=ShiftedModel(model, float(offset)))
        return replace(moved, index=medium.index + float(offset))
    # Abbe number of a glass known by nd and νd (checked by the interpreter)
    wavelength_um = nominal.to_micrometres(primary.value) if primary is not None else 0.5875618
    values = np.atleast_1d(_moved(model.vd, delta, item.relative))
    models = [replace(model, vd=float(v)) for v in values]
    indices = np.array([_index(m, wavelength_um, nominal) for m in models])
    if batch:
        return replace(medium, index=indices, model=BatchOnlyModel(model))
    return replace(medium, index=float(indices[0]), model=models[0])


def _index(model, wavelength_um, nominal: System):
    from ..materials.environment import relative_index

    return float(relative_index(model, wavelength_um, nominal.environment))


def image_plane(nominal: System) -> Any:
    """Where the built units' image plane sits: the nominal image plane (a sensor is mounted
    where the design put it), or None when the design has no finite image plane."""
    if nominal.image.distance is not None:
        return nominal.image.distance
    value = first_order(nominal)["image distance"]
    return None if isinstance(value, Unavailable) else float(value)


def compensated(unit: System, compensators: tuple[Compensator, ...], plane: Any,
                nominal: System) -> System:
    """The unit with the image plane fixed where the design put it and each compensator
    adjusted (paraxially: the image plane to the unit's focus, or a gap until the unit's
    paraxial image lands on the image plane; each within its limit)."""
    if plane is None:
        return unit
    unit = replace(unit, image=ImageSpec(plane))
    for compensator in compensators:
        if compensator.kind == "focus":
            focus = first_order(replace(unit, image=ImageSpec(None)))["image distance"]
            if isinstance(focus, Unavailable):
                continue
            if compensator.limit is not None:
                focus = np.clip(focus, plane - compensator.limit, plane + compensator.limit)
            unit = replace(unit, image=ImageSpec(focus))
        else:
            unit = _refocus_by_gap(unit, compensator, plane, nominal)
    return unit


def _refocus_by_gap(unit: System, compensator: Compensator, plane, nominal: System) -> System:
    """Move one gap until the paraxial image lands on the image plane.

    The image distance is a bilinear (Möbius) function of any one gap, v(g) = (a g + b) /
    (c g + 1) (the gap enters the system matrix linearly; common practice), so three traced
    values fix it and the gap that gives v = plane follows in closed form, for a whole batch
    at once.
    """
    p = compensator.position
    g0 = unit.gaps[p]
    step = np.maximum(np.abs(nominal.gaps[p]) * 1e-2, 1e-2)
    trials = [g0 - step, g0, g0 + step]
    values = []
    for g in trials:
        gaps = list(unit.gaps)
        gaps[p] = g
        v = first_order(replace(unit, gaps=tuple(gaps), image=ImageSpec(None)))["image distance"]
        if isinstance(v, Unavailable):
            return unit
        values.append(np.asarray(v, dtype=float))
    # a g + b - c g v = v at the three trials, solved per unit (Cramer's rule on 3×3)
    g = [np.broadcast_to(np.asarray(t, dtype=float), values[0].shape) for t in trials]
    v = values
    rows = np.stack([np.stack([g[i], np.ones_like(g[i]), -g[i] * v[i]], axis=-1)
                     for i in range(3)], axis=-2)
    rhs = np.stack(v, axis=-1)
    with np.errstate(all="ignore"):
        try:
            a, b, c = np.moveaxis(np.linalg.solve(rows, rhs[..., None])[..., 0], -1, 0)
        except np.linalg.LinAlgError:
            return unit
        gap = (plane - b) / (a - c * plane)
    if compensator.limit is not None:
        gap = np.clip(gap, nominal.gaps[p] - compensator.limit, nominal.gaps[p] + compensator.limit)
    gap = np.where(np.isfinite(gap) & (gap >= 0), gap, g0)
    gaps = list(unit.gaps)
    gaps[p] = float(gap) if np.ndim(gap) == 0 else gap
    return replace(unit, gaps=tuple(gaps))
