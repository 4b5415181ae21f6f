"""First-order (paraxial) properties of a numeric layout, each with a reason when undefined.

Builds on `paraxial`: the system matrix, the marginal ray (axial object point to the edge of
the entrance pupil) and the chief ray (edge of the field through the centre of the stop).
Results are plain floats in the layout's units; a quantity that does not exist for this layout
(image at infinity, afocal system, no stop) is an `Unavailable` carrying the reason in words,
so no report ever prints inf or NaN.
"""

from __future__ import annotations

import math
from collections.abc import Iterator, Mapping
from dataclasses import dataclass
from typing import Any

from ..system import System
from . import paraxial
from .paraxial import Step, TRANSFER, formulas
from ..guard import guarded

__all__ = ["Unavailable", "FirstOrder", "first_order", "RELATIVE_ZERO", "AFOCAL_RELATIVE"]

#: A denominator smaller than this fraction of its terms counts as zero (rounding noise).
RELATIVE_ZERO = 1e-12

#: A layout counts as afocal when its power is below this fraction of the sum of its surfaces'
#: powers: a telescope whose spacing is written to 4 decimals keeps a rounding remainder of
#: ~1e-8 of its parts (a "focal length" of 1e8 mm), which is no focus anyone can use. A real
#: weak lens has a power of the order of its surfaces' powers, far above this.
AFOCAL_RELATIVE = 1e-6

#: Larger magnitudes count as overflowed: unit conversions for display (a power per nm shown in
#: diopters is 1e9 times larger) must still stay finite.
LARGEST = 1e290


@dataclass(frozen=True)
class Unavailable:
    """A quantity this layout does not have, and why (e.g. 'at infinity')."""

    reason: str

    def __str__(self) -> str:
        return self.reason


Value = Any  # float | Unavailable


def _is_zero(value: float, scale: float) -> bool:
    return abs(value) <= RELATIVE_ZERO * scale


@dataclass(frozen=True)
class FirstOrder(Mapping):
    """Every first-order property of one layout (see `quantities.py` for the names).

    A read-only mapping from quantity name to value (a number, or `Unavailable` with the
    reason): `"focal length" in results`, `results["efl"]` (aliases too), `list(results)`,
    `dict(results)`, `len(results)`, `keys()`, `items()`, `values()`, `get(name)`. Iterating
    gives the canonical names the engine computed.
    """

    table: dict[str, Value]
    afocal: bool
    notes: tuple[str, ...] = ()

    def _canonical(self, name: str) -> str | None:
        if name in self.table:
            return name
        from ..quantities import ALIASES

        alias = ALIASES.get(name)
        return alias if alias in self.table else None

    def __getitem__(self, name: str) -> Value:
        found = self._canonical(name) if isinstance(name, str) else None
        if found is not None:
            return self.table[found]
        from ..errors import LayoutNameError  # the error path only
        from ..quantities import suggestion

        close = suggestion(name) if isinstance(name, str) else None
        raise LayoutNameError(
            f"{name!r} is not a first-order quantity",
            hint=(f"did you mean {close!r}? " if close and close in self.table else "")
            + "exact-ray, Seidel and colour quantities are evaluated by a script's 'expect' "
              "and 'report' lines (layoutlang.check, layoutlang run)")

    def __contains__(self, name: object) -> bool:
        return isinstance(name, str) and self._canonical(name) is not None

    def __iter__(self) -> Iterator[str]:
        return iter(self.table)

    def __len__(self) -> int:
        return len(self.table)

    def get(self, name: str, default: Value | None = None) -> Value | None:
        found = self._canonical(name) if isinstance(name, str) else None
        return default if found is None else self.table[found]


def _finite(values: dict[str, Value]) -> dict[str, Value]:
    """The values with overflowed numbers (inf, NaN) turned into reasons, and -0.0 into 0.0.

    Extreme inputs (radii near 1e-300, gaps near 1e300) overflow double precision inside the
    matrix products; a report must then say so in words rather than print inf or nan.
    """
    found: dict[str, Value] = {}
    for name, value in values.items():
        if isinstance(value, (int, float)) and not isinstance(value, bool):
            if not math.isfinite(value) or abs(value) > LARGEST:
                value = Unavailable("out of range: the layout's numbers overflow double precision")
            else:
                value = value + 0.0  # -0.0 prints as 0 and serializes the same as 0.0
        found[name] = value
    return found


@guarded
def first_order(system: System) -> FirstOrder:
    """Evaluate all first-order properties of a numeric layout."""
    return _Evaluation(system).run()


class _Evaluation:
    def __init__(self, system: System) -> None:
        self.system = system
        self.values: dict[str, Value] = {}
        self.notes: list[str] = []
        indices = system.indices()
        self.n0, self.nk = indices[0], indices[-1]
        self.sense_k = system.directions()[-1]
        self.steps = paraxial.steps_of(system)
        self.abcd = paraxial.matrix(self.steps)
        phis = [s.value for s in self.steps if s.kind is not TRANSFER]
        self.power_scale = sum(abs(p) for p in phis)
        a, b, c, d = self.abcd
        self.afocal = abs(c) <= AFOCAL_RELATIVE * self.power_scale or self.power_scale == 0

    def run(self) -> FirstOrder:
        self._cardinal_points()
        self._conjugates()
        self._pupils_and_rays()
        self._lengths()
        return FirstOrder(_finite(self.values), self.afocal, tuple(self.notes))

    # focal lengths, focal, principal and nodal points
    def _cardinal_points(self) -> None:
        a, b, c, d = self.abcd
        v = self.values
        n0, nk = self.n0, self.nk
        if self.afocal:
            why = Unavailable("none: the layout is afocal")
            for name in (
                "power", "focal length", "object focal length", "effective focal length",
                "back focal distance", "front focal distance", "front principal point",
                "back principal point", "front nodal point", "back nodal point",
            ):
                v[name] = why
            v["power"] = 0.0
            v["afocal angular magnification"] = n0 * d / nk
            self.notes.append("afocal layout: no focal points; see the angular magnification")
            return
        for name in formulas.CARDINAL:
            v[name] = formulas.cardinal(name, a, b, c, d, n0, nk, self.sense_k)
        v["afocal angular magnification"] = Unavailable("none: the layout has optical power")

    # where the image is and how large
    def _conjugates(self) -> None:
        a, b, c, d = self.abcd
        v = self.values
        obj = self.system.object
        n0, nk = self.n0, self.nk
        if obj.at_infinity:
            v["magnification"] = Unavailable("none: the object is at infinity")
            v["longitudinal magnification"] = Unavailable("none: the object is at infinity")
            if self.afocal:
                v["image distance"] = Unavailable("at infinity (afocal layout)")
                v["image height"] = Unavailable("at infinity (afocal layout)")
                v["angular magnification"] = v["afocal angular magnification"]
            else:
                v["image distance"] = v["back focal distance"]
                v["image height"] = -n0 * math.tan(obj.field_angle) / v["power"]
                v["angular magnification"] = Unavailable("none: the object is at infinity")
            return
        tau = obj.distance / n0
        denominator = formulas.conjugate_denominator(a, b, c, d, tau)
        magnification = formulas.magnification(a, b, c, d, tau) if not _is_zero(
            denominator, abs(c * tau) + abs(d)) else None
        if magnification is None:
            at_infinity = Unavailable("at infinity: the object is at the front focal point")
            v["image distance"] = at_infinity
            v["image height"] = at_infinity
            v["magnification"] = at_infinity
            v["longitudinal magnification"] = at_infinity
            v["angular magnification"] = 0.0
            self.notes.append("the object is at the front focal point: the image is at infinity")
            return
        v["image distance"] = formulas.image_distance(a, b, c, d, tau, nk)
        v["magnification"] = magnification
        v["image height"] = magnification * obj.height
        v["longitudinal magnification"] = (nk / n0) * magnification * magnification
        v["angular magnification"] = (
            n0 / (nk * magnification) if magnification != 0 else Unavailable("none")
        )

    # stop, pupils, marginal and chief rays
    def _pupils_and_rays(self) -> None:
        v = self.values
        names = (
            "entrance pupil position", "entrance pupil diameter", "exit pupil position",
            "exit pupil diameter", "stop diameter", "f-number", "numerical aperture",
            "object numerical aperture", "lagrange invariant",
        )
        system = self.system
        if system.stop is None:
            for name in names:
                v[name] = Unavailable("none: the layout has no stop")
            return
        split = paraxial.split_at_stop(system)
        a1, b1, c1, d1 = paraxial.matrix(split.front)
        a2, b2, c2, d2 = paraxial.matrix(split.back)
        n0, nk = self.n0, self.nk
        stop = system.stop
        obj = system.object
        object_steps: list[Step] = []
        if not obj.at_infinity:
            object_steps = [Step(TRANSFER, obj.distance / n0)]

        # exit pupil: the stop imaged by everything after it
        if _is_zero(d2, abs(c2) + abs(d2) + abs(b2)):
            v["exit pupil position"] = Unavailable("at infinity (telecentric in image space)")
            exit_pupil_at_infinity = True
        else:
            v["exit pupil position"] = -b2 / d2 * nk
            exit_pupil_at_infinity = False
        entrance_at_infinity = _is_zero(a1, abs(a1) + abs(b1) * self.power_scale + 1e-300)
        if entrance_at_infinity:
            v["entrance pupil position"] = Unavailable("at infinity (telecentric in object space)")
        else:
            v["entrance pupil position"] = n0 * b1 / a1

        # the marginal ray: starting height and reduced angle at the first vertex
        marginal = self._marginal_start(stop, object_steps, split.front, (a1, b1, c1, d1),
                                        entrance_at_infinity)
        if isinstance(marginal, Unavailable):
            for name in names:
                if name not in v:
                    v[name] = marginal
            return
        y0, nu0, stop_diameter = marginal
        v["stop diameter"] = stop_diameter
        v["entrance pupil diameter"] = (
            Unavailable("at infinity (telecentric in object space)") if entrance_at_infinity
            else stop_diameter / abs(a1)
        )
        v["exit pupil diameter"] = (
            Unavailable("at infinity (telecentric in image space)") if exit_pupil_at_infinity
            else stop_diameter / abs(d2)
        )
        y_last, nu_last = paraxial.trace(y0, nu0, self.steps)
        v["object numerical aperture"] = 0.0 if obj.at_infinity else abs(nu0)
        if nu_last == 0 or _is_zero(nu_last, abs(y_last) * self.power_scale):
            v["numerical aperture"] = 0.0
            v["f-number"] = Unavailable("none: the beam leaves collimated")
        else:
            v["numerical aperture"] = abs(nu_last)
            v["f-number"] = 1 / (2 * abs(nu_last))

        # the chief ray: edge of the field through the centre of the stop
        chief = self._chief_start(object_steps, (a1, b1, c1, d1))
        if isinstance(chief, Unavailable):
            v["lagrange invariant"] = chief
        else:
            y_chief, nu_chief = chief
            v["lagrange invariant"] = nu0 * y_chief - nu_chief * y0

    def _marginal_start(self, stop, object_steps, front_steps, front, entrance_at_infinity):
        """(y, nu) of the marginal ray at the first vertex and the stop diameter it implies."""
        obj = self.system.object
        a1, b1, c1, d1 = front
        if obj.at_infinity:
            if stop.size_kind == "numerical aperture":
                return Unavailable("none: a numerical aperture needs an object at a finite distance")
            if stop.size_kind == "diameter":
                if entrance_at_infinity:
                    return Unavailable("none: the entrance pupil is at infinity")
                entrance = stop.size / abs(a1)
            else:  # f-number: the entrance pupil that gives it
                if self.afocal:
                    return Unavailable("none: an afocal layout has no f-number to size the stop")
                # the working f-number 1/(2 n' u') of a collimated beam of diameter D is
                # 1/(power D) = EFL/D; the image-side focal length n'/power would be off by n'
                entrance = abs(self.values["effective focal length"]) / stop.size
            y_stop = a1 * entrance / 2
            return entrance / 2, 0.0, 2 * abs(y_stop)
        # finite object: a ray from the axial object point
        if stop.size_kind == "diameter":
            y_unit, _ = paraxial.trace(0.0, 1.0, object_steps + front_steps)
            if y_unit == 0:
                return Unavailable("none: the stop is imaged onto the object point")
            nu0 = (stop.size / 2) / abs(y_unit)
        elif stop.size_kind == "numerical aperture":
            nu0 = stop.size
        else:
            nu0 = 1 / (2 * stop.size)
        y_vertex, nu_vertex = paraxial.trace(0.0, nu0, object_steps)
        y_stop, _ = paraxial.trace(y_vertex, nu_vertex, front_steps)
        return y_vertex, nu_vertex, 2 * abs(y_stop)

    def _chief_start(self, object_steps, front):
        """(y, nu) of the chief ray at the first vertex, or why there is none."""
        obj = self.system.object
        a1, b1, c1, d1 = front
        if obj.at_infinity:
            nu0 = -self.n0 * math.tan(obj.field_angle)
            if a1 == 0:
                return Unavailable("none: the entrance pupil is at infinity")
            return -b1 * nu0 / a1, nu0
        tau = obj.distance / self.n0
        denominator = a1 * tau + b1
        if denominator == 0:
            return Unavailable("none: the stop lies at the object")
        nu0 = -a1 * obj.height / denominator
        return paraxial.trace(obj.height, nu0, object_steps)

    # along the axis
    def _lengths(self) -> None:
        v = self.values
        system = self.system
        axial = sum(system.gaps) if system.gaps else 0.0
        v["axial length"] = axial
        image = v["image distance"]
        if system.image.distance is not None:
            plane = system.image.distance
            v["image plane distance"] = plane
            v["defocus"] = image - plane if not isinstance(image, Unavailable) else image
        else:
            plane = image
            v["image plane distance"] = image
            v["defocus"] = 0.0 if not isinstance(image, Unavailable) else image
        v["total length"] = axial + plane if not isinstance(plane, Unavailable) else plane
        senses = system.directions()
        last_vertex = sum(sense * gap for sense, gap in zip(senses[1:], system.gaps))
        v["image position"] = (
            last_vertex + senses[-1] * image if not isinstance(image, Unavailable) else image
        )

