"""The ray and Seidel quantities of a layout by name, for `expect` and `report`.

One object per (layout, sampling) computes the ray analysis and the Seidel sums once, on first
use, and answers each quantity of `quantities.RAY_QUANTITIES` as a float in layout units (a
fraction for distortion) or an `Unavailable` with the reason in words.
"""

from __future__ import annotations

from typing import TYPE_CHECKING, Any

from ..system import System
from .firstorder import FirstOrder, Unavailable, first_order
from .raysettings import RaySettings
from .seidel import SeidelSums, seidel

if TYPE_CHECKING:  # the ray analysis needs numpy: imported where rays are traced
    from .aberrations import RayAnalysis

__all__ = ["RayQuantities", "ray_quantities", "SEIDEL_FIELDS"]

#: quantity name → SurfaceSums attribute
SEIDEL_FIELDS = {
    "spherical sum": "spherical",
    "coma sum": "coma",
    "astigmatism sum": "astigmatism",
    "field curvature sum": "field_curvature",
    "distortion sum": "distortion",
    "axial colour sum": "axial_colour",
    "lateral colour sum": "lateral_colour",
}

Value = Any  # float | Unavailable


class RayQuantities:
    """Lazily computed ray analysis and Seidel sums of one layout."""

    def __init__(self, system: System, settings: RaySettings,
                 results: FirstOrder | None = None) -> None:
        self.system = system
        self.settings = settings
        self._results = results
        self._analysis: RayAnalysis | None = None
        self._seidel: SeidelSums | Unavailable | None = None

    @property
    def results(self) -> FirstOrder:
        if self._results is None:
            self._results = first_order(self.system)
        return self._results

    @property
    def analysis(self) -> RayAnalysis:
        if self._analysis is None:
            from .aberrations import analyse

            self._analysis = analyse(self.system, self.settings, self.results)
        return self._analysis

    @property
    def seidel(self) -> SeidelSums | Unavailable:
        if self._seidel is None:
            self._seidel = seidel(self.system, self.results)
        return self._seidel

    def _spot(self, field: float, wavelength: float | None):
        """The spot row at a field fraction and wavelength (primary when None)."""
        from .aberrations import setup, spot

        a = self.analysis
        if wavelength is None:
            return a.spot_at(field)
        for made in a.setups:
            if abs(made.wavelength - wavelength) <= 1e-9 * wavelength:
                break
        else:  # a wavelength the layout does not list: its own indices, the same image plane
            made = setup(self.system, self.results, self.system.indices(wavelength), wavelength)
            if isinstance(made, Unavailable):
                return made
        for row in a.spots:
            if abs(row.field - field) < 1e-12 and row.wavelength == made.wavelength:
                return row
        return spot(made, field, self.settings.grid)

    def value(self, name: str, field: float | None = None, scale: str = "",
              wavelength: float | None = None) -> Value:
        """The quantity `name` (at a field fraction where it depends on the field).

        With scale 'depth of focus' the size of the marginal focus shift is divided by the
        depth of focus λ/NA². Spot radii take a wavelength (layout units; primary if None).
        """
        if name in SEIDEL_FIELDS or name == "petzval radius":
            sums = self.seidel
            if isinstance(sums, Unavailable):
                return sums
            if name == "petzval radius":
                return sums.petzval_radius
            return sums.total(SEIDEL_FIELDS[name])
        if name in _PLACED:
            return self._placed(name, wavelength)
        a = self.analysis
        if a.unavailable is not None:
            return a.unavailable
        if name == "depth of focus":
            return a.depth_of_focus
        if name == "best focus shift":
            return a.best_focus_shift
        if name in ("marginal focus shift", "transverse spherical aberration"):
            row = a.marginal_at(1.0)
            if isinstance(row, Unavailable):
                row = _first(a.marginal)
            if isinstance(row, Unavailable):
                return row
            value = row.longitudinal if name == "marginal focus shift" else row.transverse
            if scale and not isinstance(value, Unavailable):
                if isinstance(a.depth_of_focus, Unavailable):
                    return a.depth_of_focus
                return abs(value) / a.depth_of_focus
            return value
        if name in ("rms spot radius", "largest spot radius"):
            row = self._spot(field, wavelength)
            if isinstance(row, Unavailable):
                return row
            return row.rms_radius if name == "rms spot radius" else row.max_radius
        if name in ("real image height", "distortion"):
            row = a.chief_at(field)
            if isinstance(row, Unavailable):
                return row
            return row.real_height if name == "real image height" else row.distortion
        raise KeyError(name)


    def _placed(self, name: str, wavelength: float | None) -> Value:
        """Quantities of surfaces placed in space (engines/placed.py)."""
        from . import placed

        system = self.system
        if name == "axis turn":
            return placed.axis_turn(system)
        if name == "image tilt":
            found = placed.image_placement(system, self.results)
            return found if isinstance(found, Unavailable) else found.tilt
        if name == "image shift":
            found = placed.image_placement(system, self.results)
            return found if isinstance(found, Unavailable) else found.shift
        if name.startswith("parabasal"):
            found = placed.parabasal(system, self.results)
            return found.focal_length_y if name == "parabasal focal length" \
                else found.back_focal_distance
        indices = None if wavelength is None else system.indices(wavelength)
        if name == "beam deviation":
            return placed.beam_deviation(system, indices, self.results)
        prisms = [g for g in system.groups if g.name.startswith("prism ")]
        if not prisms:
            return Unavailable("none: the layout has no prism")
        return placed.prism_deviation(system, prisms[0].first, prisms[0].last, indices,
                                      self.results)


_PLACED = frozenset({"axis turn", "beam deviation", "prism deviation", "image tilt",
                     "image shift", "parabasal focal length", "parabasal back focal distance"})


def _first(rows) -> Any:
    return rows[0] if rows else Unavailable("none: no marginal ray was sampled")


_RECENT: dict[tuple[int, RaySettings], tuple[System, RayQuantities]] = {}


def ray_quantities(system: System, settings: RaySettings,
                   results: FirstOrder | None = None) -> RayQuantities:
    """The shared `RayQuantities` of a layout: checks and reports of one run reuse the same
    traces (a few recent layouts are kept, keyed by identity, since a System may hold
    unhashable material models)."""
    key = (id(system), settings)
    found = _RECENT.get(key)
    if found is not None and found[0] is system:
        return found[1]
    made = RayQuantities(system, settings, results)
    if len(_RECENT) >= 8:
        _RECENT.pop(next(iter(_RECENT)))
    _RECENT[key] = (system, made)
    return made
