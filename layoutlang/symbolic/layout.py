"""First-order quantities of a symbolic layout as exact rational functions of its symbols.

The numbers of the System are turned into `Ratio`s and then the *same* code as the numeric
engine runs on them: `paraxial.steps_of`, `paraxial.matrix`, `paraxial.split_at_stop`,
`paraxial.trace` and the formulas of `paraxial.formulas`. Only the handling of zero
denominators and of absolute values differs from `firstorder.py`, because a symbolic value has
no single sign: an absolute value takes the sign the expression has at the nominal values (and
says so in a note), or is left as written when there are none.
"""

from __future__ import annotations

from dataclasses import dataclass, replace
from typing import Any, Callable

from ..engines import paraxial
from ..engines.firstorder import Unavailable
from ..engines.paraxial import TRANSFER, Step, formulas, gaussian
from ..system import Medium, ObjectSpec, StopSpec, System
from .algebra import Ratio, RingContext, TooLarge
from .convert import make_context, to_ratio

__all__ = ["SymbolicLayout", "DERIVABLE", "BEAM_DERIVABLE", "SEIDEL_DERIVABLE", "ROOTED"]

#: Every quantity `derive` knows, in report order (the names of `quantities.py`).
DERIVABLE = (
    "power", "focal length", "object focal length", "effective focal length",
    "back focal distance", "front focal distance", "front principal point",
    "back principal point", "front nodal point", "back nodal point", "image distance",
    "image position", "image height", "magnification", "angular magnification",
    "longitudinal magnification", "entrance pupil position", "entrance pupil diameter",
    "exit pupil position", "exit pupil diameter", "stop diameter", "f-number",
    "numerical aperture", "object numerical aperture", "lagrange invariant", "axial length",
    "total length", "image plane distance", "defocus",
)


#: The Gaussian-beam quantities `derive` knows (a script with a `beam`): rational functions
#: of the matrix from the input waist and the confocal parameter b = π w0²/(M² λ).
BEAM_DERIVABLE = ("waist position", "waist radius", "rayleigh range")

#: The third-order sums `derive` and `solve` know (engines/seidel.py run on exact ratios):
#: polynomial in conic constants and aspheric coefficients, rational in the rest.
SEIDEL_DERIVABLE = ("spherical sum", "coma sum", "astigmatism sum", "field curvature sum",
                    "distortion sum")

#: Quantities the ring holds squared (their closed form is the square root of the ratio).
ROOTED = frozenset({"waist radius"})


def _system_values(system: System) -> list[Any]:
    values: list[Any] = [m.index for m in system.media]
    for b in system.boundaries:
        values += [b.curvature, b.power, b.conic, *b.even_terms, *b.q_terms, b.q_radius]
    values += list(system.gaps)
    obj = system.object
    values += [obj.distance, obj.height, obj.field_angle]
    if system.stop is not None:
        values += [system.stop.offset, system.stop.size]
    if system.image.distance is not None:
        values.append(system.image.distance)
    if system.beam is not None:
        import sympy as sp

        beam = system.beam
        values += [beam.waist_radius, beam.waist_distance, beam.wavelength,
                   beam.propagation_ratio, sp.pi]
    return [v for v in values if v is not None]


@dataclass
class SymbolicLayout:
    """A symbolic System with its quantities computed lazily, one ring for all of them.

    Args:
        system: a System whose numbers may be sympy expressions.
        symbols: the declared symbols, in declaration order.
        nominal: symbol → exact nominal value, where given.
        limit: term budget of every polynomial (None: no budget).
    """

    system: System
    symbols: list[Any]
    nominal: dict[Any, Any]
    limit: int | None = None

    def __post_init__(self) -> None:
        import sympy as sp

        angle = self.system.object.field_angle
        values = _system_values(self.system) + ([sp.tan(angle)] if angle else [])
        self.ctx: RingContext = make_context(values, self.symbols, self.limit)
        self.notes: list[str] = []
        self._cache: dict[str, Any] = {}
        r = lambda v: to_ratio(self.ctx, v)  # noqa: E731 — one conversion for every field
        s = self.system
        obj = s.object
        self.field_tangent = r(sp.tan(obj.field_angle)) if obj.field_angle else r(0)
        self.ring_system = replace(
            s,
            media=tuple(Medium(m.name, r(m.index)) for m in s.media),
            boundaries=tuple(replace(
                b, curvature=r(b.curvature), power=r(b.power), clear_diameter=None,
                conic=r(b.conic), even_terms=tuple(r(a) for a in b.even_terms),
                q_terms=tuple(r(a) for a in b.q_terms),
                q_radius=None if b.q_radius is None else r(b.q_radius),
                obscuration_diameter=None, hole_diameter=None) for b in s.boundaries),
            gaps=tuple(r(g) for g in s.gaps),
            object=ObjectSpec(None if obj.distance is None else r(obj.distance), r(obj.height), 0),
            stop=None if s.stop is None else replace(s.stop, offset=r(s.stop.offset),
                                                     size=r(s.stop.size)),
            image=replace(s.image, distance=None if s.image.distance is None
                          else r(s.image.distance)),
            beam=None if s.beam is None else replace(
                s.beam, waist_radius=r(s.beam.waist_radius),
                waist_distance=r(s.beam.waist_distance), wavelength=r(s.beam.wavelength),
                propagation_ratio=r(s.beam.propagation_ratio)),
            fibre=None,
        )
        if s.beam is not None:  # b = π w0²/(M² λ), the reduced confocal parameter
            beam = self.ring_system.beam
            self.waist_squared = beam.waist_radius * beam.waist_radius
            self.confocal = r(sp.pi) * self.waist_squared / (beam.propagation_ratio
                                                             * beam.wavelength)

    # --- the matrix, once ------------------------------------------------------------------
    def _matrix(self) -> tuple[Ratio, Ratio, Ratio, Ratio]:
        if "abcd" not in self._cache:
            steps = paraxial.steps_of(self.ring_system)
            self._cache["steps"] = steps
            self._cache["abcd"] = self._as_ratios(paraxial.matrix(steps))
        return self._cache["abcd"]

    def _as_ratios(self, values: tuple) -> tuple:
        """Ratios for every entry (an empty step list leaves plain 1 and 0)."""
        return tuple(v if isinstance(v, Ratio) else to_ratio(self.ctx, v) for v in values)

    @property
    def n0(self) -> Ratio:
        return self.ring_system.indices()[0]

    @property
    def nk(self) -> Ratio:
        return self.ring_system.indices()[-1]

    @property
    def sense_k(self) -> int:
        return self.system.directions()[-1]

    def gen_of(self, symbol: Any) -> Any:
        return self.ctx.by_expr[symbol]  # type: ignore[attr-defined]

    def nominal_point(self) -> dict[Any, Any] | None:
        """Generator → nominal value (Fractions where exact), or None if some is missing."""
        from fractions import Fraction

        import sympy as sp

        point = {}
        for gen, expr in self.ctx.meaning.items():
            if expr in self.nominal:
                value = self.nominal[expr]
                point[gen] = Fraction(int(value.p), int(value.q)) if value.is_Rational \
                    else float(value)
            elif expr.is_Symbol:
                if str(expr) == "_unused":
                    point[gen] = 0
                    continue
                return None
            else:
                value = expr.subs(self.nominal)
                if value.free_symbols:
                    return None
                point[gen] = float(sp.N(value, 20))
        return point

    def _sign(self, value: Ratio, what: str) -> int:
        """The sign of `value` at the nominal values (+1 when unknown, with a note)."""
        point = self.nominal_point()
        if point is not None:
            try:
                number = value.evaluate(point)
            except ZeroDivisionError:
                number = 1
            if number < 0:
                self._note(f"{what}: taken with the sign it has at the nominal values")
                return -1
            return 1
        self._note(f"{what}: an absolute value is taken as the expression itself "
                   "(no nominal values to decide its sign)")
        return 1

    def _note(self, text: str) -> None:
        if text not in self.notes:
            self.notes.append(text)

    # --- quantities -------------------------------------------------------------------------
    def quantity(self, name: str) -> Ratio | Unavailable:
        """One first-order quantity (a name of `DERIVABLE`)."""
        if "too large" in self._cache:  # every quantity shares the trace that overflowed
            raise self._cache["too large"]
        if name not in self._cache:
            try:
                self._cache[name] = self._compute(name)
            except TooLarge as error:
                self._cache["too large"] = error
                raise
        return self._cache[name]

    def _compute(self, name: str) -> Ratio | Unavailable:
        method: Callable[[], Any] = _METHODS[name]
        return method(self)

    def _focal(self, name: str) -> Ratio | Unavailable:
        a, b, c, d = self._matrix()
        if c.is_zero():
            return Unavailable("none: the layout is afocal")
        return formulas.cardinal(name, a, b, c, d, self.n0, self.nk, self.sense_k)

    def _object_tau(self) -> Ratio | None:
        distance = self.ring_system.object.distance
        return None if distance is None else distance / self.n0

    def _object_ray(self) -> tuple[Ratio, Ratio]:
        """Height and reduced angle at the last vertex of the ray from the axial object point
        (the second column of the object-to-last-vertex matrix): half the work of the whole
        matrix, which is what makes the image distance of a big layout fast."""
        if "object ray" not in self._cache:
            steps = [Step(TRANSFER, self._object_tau())] + paraxial.steps_of(self.ring_system)
            zero, one = to_ratio(self.ctx, 0), to_ratio(self.ctx, 1)
            self._cache["object ray"] = paraxial.trace(zero, one, steps)
        return self._cache["object ray"]

    def _conjugate(self, name: str) -> Ratio | Unavailable:
        nk, n0 = self.nk, self.n0
        tau = self._object_tau()
        if tau is not None:
            # with the object transfer folded into the steps the object sits at the first
            # step (object_tau = 0), so the formulas need only the object ray's column
            y, nu = self._object_ray()
            zero = to_ratio(self.ctx, 0)
            a, b, c, d, tau = zero, y, zero, nu, zero
        else:
            a, b, c, d = self._matrix()
        if tau is None:
            if name == "angular magnification" and c.is_zero():  # as firstorder.py: afocal
                return n0 * d / nk
            if name in ("magnification", "longitudinal magnification", "angular magnification"):
                return Unavailable("none: the object is at infinity")
            if c.is_zero():
                return Unavailable("at infinity (afocal layout)")
            if name == "image distance":
                return formulas.back_focal_distance(a, b, c, d, nk)
            return -n0 * self.field_tangent / formulas.power(a, b, c, d)  # image height
        if formulas.conjugate_denominator(a, b, c, d, tau).is_zero():
            return Unavailable("at infinity: the object is at the front focal point")
        magnification = formulas.magnification(a, b, c, d, tau)
        table = {
            "image distance": lambda: formulas.image_distance(a, b, c, d, tau, nk),
            "magnification": lambda: magnification,
            "image height": lambda: magnification * self.ring_system.object.height,
            "longitudinal magnification": lambda: (nk / n0) * magnification * magnification,
            "angular magnification": lambda: n0 / (nk * magnification),
        }
        return table[name]()

    def _along(self, name: str) -> Ratio | Unavailable:
        s = self.ring_system
        axial = sum(s.gaps, to_ratio(self.ctx, 0))
        if name == "axial length":
            return axial
        image = self.quantity("image distance")
        if name == "image position":
            if isinstance(image, Unavailable):
                return image
            senses = s.directions()
            last = sum((sense * gap for sense, gap in zip(senses[1:], s.gaps)),
                       to_ratio(self.ctx, 0))
            return last + senses[-1] * image
        plane = s.image.distance if s.image.distance is not None else image
        if name == "image plane distance":
            return plane
        if name == "defocus":
            if isinstance(image, Unavailable):
                return image
            return image - plane if s.image.distance is not None else to_ratio(self.ctx, 0)
        if isinstance(plane, Unavailable):
            return plane
        return axial + plane  # total length

    def _pupils(self, name: str) -> Ratio | Unavailable:
        s = self.ring_system
        if s.stop is None:
            return Unavailable("none: the layout has no stop")
        split = paraxial.split_at_stop(s)
        a1, b1, c1, d1 = self._as_ratios(paraxial.matrix(split.front))
        a2, b2, c2, d2 = self._as_ratios(paraxial.matrix(split.back))
        n0, nk = self.n0, self.nk
        if name == "exit pupil position":
            if d2.is_zero():
                return Unavailable("at infinity (telecentric in image space)")
            return -b2 / d2 * nk
        if name == "entrance pupil position":
            if a1.is_zero():
                return Unavailable("at infinity (telecentric in object space)")
            return n0 * b1 / a1
        marginal = self._marginal(s.stop, split.front, (a1, b1, c1, d1))
        if isinstance(marginal, Unavailable):
            return marginal
        y0, nu0, stop_diameter = marginal
        if name == "stop diameter":
            return stop_diameter
        if name == "entrance pupil diameter":
            if a1.is_zero():
                return Unavailable("at infinity (telecentric in object space)")
            return stop_diameter / (a1 * self._sign(a1, "entrance pupil diameter"))
        if name == "exit pupil diameter":
            if d2.is_zero():
                return Unavailable("at infinity (telecentric in image space)")
            return stop_diameter / (d2 * self._sign(d2, "exit pupil diameter"))
        if name == "object numerical aperture":
            if s.object.distance is None:
                return to_ratio(self.ctx, 0)
            return nu0 * self._sign(nu0, "object numerical aperture")
        steps = paraxial.steps_of(s)
        y_last, nu_last = paraxial.trace(y0, nu0, steps)
        if name in ("numerical aperture", "f-number"):
            if nu_last.is_zero():
                return Unavailable("none: the beam leaves collimated")
            na = nu_last * self._sign(nu_last, name)
            return na if name == "numerical aperture" else 1 / (2 * na)
        # lagrange invariant: the chief ray from the edge of the field through the stop centre
        if s.object.distance is None:
            nu_chief = -n0 * self.field_tangent
            if a1.is_zero():
                return Unavailable("none: the entrance pupil is at infinity")
            y_chief = -b1 * nu_chief / a1
        else:
            tau = self._object_tau()
            denominator = a1 * tau + b1
            if denominator.is_zero():
                return Unavailable("none: the stop lies at the object")
            height = s.object.height
            nu_start = -a1 * height / denominator
            y_chief, nu_chief = paraxial.trace(height, nu_start, [Step(TRANSFER, tau)])
        return nu0 * y_chief - nu_chief * y0

    def _marginal(self, stop: StopSpec, front: list[Step], first: tuple):
        """(y, nu) of the marginal ray at the first vertex and the stop diameter."""
        s = self.ring_system
        a1 = first[0]
        zero = to_ratio(self.ctx, 0)
        if s.object.distance is None:
            if stop.size_kind == "numerical aperture":
                return Unavailable("none: a numerical aperture needs an object at a finite distance")
            if stop.size_kind == "diameter":
                if a1.is_zero():
                    return Unavailable("none: the entrance pupil is at infinity")
                entrance = stop.size / (a1 * self._sign(a1, "entrance pupil"))
            else:
                focal = self.quantity("effective focal length")  # as firstorder.py
                if isinstance(focal, Unavailable):
                    return Unavailable("none: an afocal layout has no f-number to size the stop")
                entrance = focal * self._sign(focal, "effective focal length") / stop.size
            y_stop = a1 * entrance / 2
            return entrance / 2, zero, 2 * y_stop * self._sign(y_stop, "stop height")
        object_steps = [Step(TRANSFER, self._object_tau())]
        if stop.size_kind == "diameter":
            y_unit, _ = paraxial.trace(zero, to_ratio(self.ctx, 1), object_steps + front)
            if y_unit.is_zero():
                return Unavailable("none: the stop is imaged onto the object point")
            nu0 = (stop.size / 2) / (y_unit * self._sign(y_unit, "marginal ray"))
        elif stop.size_kind == "numerical aperture":
            nu0 = stop.size
        else:
            nu0 = 1 / (2 * stop.size)
        y_vertex, nu_vertex = paraxial.trace(zero, nu0, object_steps)
        y_stop, _ = paraxial.trace(y_vertex, nu_vertex, front)
        return y_vertex, nu_vertex, 2 * y_stop * self._sign(y_stop, "stop height")


    def _seidel(self, name: str) -> Ratio | Unavailable:
        """A third-order sum for the full aperture and field, by `engines.seidel` on the ring's
        numbers (the marginal and chief rays at the first vertex as `seidel.seidel` starts
        them; constant indices, so no chromatic terms)."""
        from ..engines.seidel import seidel_from_rays

        if "seidel" not in self._cache:
            entrance = self.quantity("entrance pupil position")
            diameter = self.quantity("entrance pupil diameter")
            for what, value in (("entrance pupil position", entrance),
                                ("entrance pupil diameter", diameter)):
                if isinstance(value, Unavailable):
                    return Unavailable(f"none: the {what} is {value}")
            s, n0 = self.ring_system, self.n0
            radius = diameter / 2
            if s.object.distance is None:
                y, nu = radius, to_ratio(self.ctx, 0)
                nu_bar = -n0 * self.field_tangent
                y_bar = -entrance * nu_bar / n0
            else:
                distance, height = s.object.distance, s.object.height
                if (entrance + distance).is_zero():
                    return Unavailable("none: the entrance pupil lies at the object")
                slope = radius / (entrance + distance)
                y, nu = distance * slope, n0 * slope
                slope_bar = -height / (entrance + distance)
                y_bar, nu_bar = height + distance * slope_bar, n0 * slope_bar
            indices = s.indices()
            zeros = [to_ratio(self.ctx, 0)] * len(indices)
            self._cache["seidel"] = seidel_from_rays(s, y, nu, y_bar, nu_bar, indices, zeros,
                                                     number=lambda v: v)
        attribute = name.removesuffix(" sum").replace(" ", "_")
        return self._cache["seidel"].total(attribute)

    def _beam(self, name: str) -> Ratio | Unavailable:
        """A beam quantity through the same matrix as the numeric engine (engines/beams.py):
        the input waist's transfer, then the layout's steps, then `paraxial.gaussian`."""
        s = self.ring_system
        if s.beam is None:
            return Unavailable("none: the layout has no beam")
        if "beam abcd" not in self._cache:
            lead = Step(TRANSFER, s.beam.waist_distance / self.n0)
            steps = [lead] + paraxial.steps_of(s)
            self._cache["beam abcd"] = self._as_ratios(paraxial.matrix(steps))
        a, b, c, d = self._cache["beam abcd"]
        conf, nk = self.confocal, self.nk
        if name == "waist position":
            return gaussian.waist_distance(a, b, c, d, conf, nk)
        if name == "rayleigh range":
            return gaussian.rayleigh_range(a, b, c, d, conf, nk)
        return gaussian.waist_radius_squared(a, b, c, d, self.waist_squared, conf)  # ROOTED


_METHODS: dict[str, Callable[[SymbolicLayout], Any]] = {}
for _name in SEIDEL_DERIVABLE:
    _METHODS[_name] = lambda self, n=_name: self._seidel(n)
for _name in BEAM_DERIVABLE:
    _METHODS[_name] = lambda self, n=_name: self._beam(n)
for _name in ("power", "focal length", "object focal length", "effective focal length",
              "back focal distance", "front focal distance", "front principal point",
              "back principal point", "front nodal point", "back nodal point"):
    _METHODS[_name] = lambda self, n=_name: self._focal(n)
for _name in ("image distance", "image height", "magnification", "angular magnification",
              "longitudinal magnification"):
    _METHODS[_name] = lambda self, n=_name: self._conjugate(n)
for _name in ("image position", "axial length", "total length", "image plane distance",
              "defocus"):
    _METHODS[_name] = lambda self, n=_name: self._along(n)
for _name in ("entrance pupil position", "entrance pupil diameter", "exit pupil position",
              "exit pupil diameter", "stop diameter", "f-number", "numerical aperture",
              "object numerical aperture", "lagrange invariant"):
    _METHODS[_name] = lambda self, n=_name: self._pupils(n)
