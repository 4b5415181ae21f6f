"""The readable alternative to a huge closed form: named intermediate quantities.

The paraxial trace (`paraxial.trace`, the same code as the numeric engine) runs on `Named`
values that record each step as a short equation — reduced powers φ, reduced gaps τ, then the
heights y and reduced angles ν of the two rays that make the system matrix — so a 10-surface
layout reads as a ray-trace table of a few dozen lines instead of 10^5 expanded terms.
"""

from __future__ import annotations

from dataclasses import dataclass, replace
from fractions import Fraction
from typing import Any

from ..engines import paraxial
from ..engines.paraxial import TRANSFER, Step, formulas
from ..system import System

__all__ = ["Structured", "structured_form", "MATRIX_QUANTITIES"]

#: Quantities that are formulas over the system matrix alone (with the object distance).
MATRIX_QUANTITIES = (
    "power", "focal length", "object focal length", "effective focal length",
    "back focal distance", "front focal distance", "front principal point",
    "back principal point", "image distance", "magnification",
)


@dataclass(frozen=True)
class Structured:
    """Definitions in order (symbol, expression), then the quantity over them."""

    definitions: tuple[tuple[Any, Any], ...]
    result: Any


class _Recorder:
    def __init__(self) -> None:
        self.definitions: list[tuple[Any, Any]] = []
        self.counts: dict[tuple[str, str], int] = {}

    def name(self, expr: Any, kind: str, ray: str) -> Any:
        import sympy as sp

        if expr.is_Atom or (expr.is_Mul and len(expr.args) == 2 and expr.args[0].is_Number):
            return expr  # short enough to stay inline
        count = self.counts.get((kind, ray), 0) + 1
        self.counts[(kind, ray)] = count
        symbol = sp.Symbol(f"{kind}{ray}_{count}")
        self.definitions.append((symbol, expr))
        return symbol


class Named:
    """A value of the structured trace: a short sympy expression and where it came from."""

    __slots__ = ("expr", "role", "ray", "recorder")

    def __init__(self, expr: Any, recorder: _Recorder, ray: str = "", role: str = "") -> None:
        self.expr, self.recorder, self.ray, self.role = expr, recorder, ray, role

    def _wrap(self, other: Any) -> "Named":
        if isinstance(other, Named):
            return other
        import sympy as sp

        return Named(sp.Rational(other), self.recorder)

    def __mul__(self, other: Any) -> "Named":
        other = self._wrap(other)
        role = self.role or other.role
        return Named(self.expr * other.expr, self.recorder, self.ray or other.ray, role)

    __rmul__ = __mul__

    def _combine(self, other: Any, sign: int) -> "Named":
        other = self._wrap(other)
        role = self.role or other.role
        ray = self.ray or other.ray
        expr = self.expr + sign * other.expr
        if role:  # one trace step: name its result (y after a transfer, ν after a refraction)
            kind = "y" if role == "tau" else "v"
            return Named(self.recorder.name(expr, kind, ray), self.recorder, ray)
        return Named(expr, self.recorder, ray)

    def __add__(self, other: Any) -> "Named":
        return self._combine(other, 1)

    __radd__ = __add__

    def __sub__(self, other: Any) -> "Named":
        return self._combine(other, -1)

    def __rsub__(self, other: Any) -> "Named":
        return self._wrap(other)._combine(self, -1)

    def __neg__(self) -> "Named":
        return Named(-self.expr, self.recorder, self.ray, self.role)

    def __truediv__(self, other: Any) -> "Named":
        other = self._wrap(other)
        return Named(self.expr / other.expr, self.recorder, self.ray)

    def __rtruediv__(self, other: Any) -> "Named":
        return self._wrap(other) / self


def _exact(value: Any) -> Any:
    import sympy as sp

    if isinstance(value, float):
        return sp.Rational(Fraction(repr(value)).numerator, Fraction(repr(value)).denominator)
    if isinstance(value, int):
        return sp.Integer(value)
    return value


def structured_form(system: System, quantity: str) -> Structured:
    """The quantity as a chain of named intermediates (only `MATRIX_QUANTITIES`)."""
    import sympy as sp

    recorder = _Recorder()
    steps = []
    powers = taus = 0
    for step in paraxial.steps_of(system):
        value = _exact(step.value)
        if step.kind is TRANSFER:
            taus += 1
            symbol = sp.Symbol(f"tau_{taus}")
            role = "tau"
        else:
            powers += 1
            symbol = sp.Symbol(f"phi_{powers}")
            role = "phi"
        recorder.definitions.append((symbol, value))
        steps.append(Step(step.kind, Named(symbol, recorder, role=role)))
    first = [Named(sp.Integer(1), recorder, ray="a"), Named(sp.Integer(0), recorder, ray="a")]
    second = [Named(sp.Integer(0), recorder, ray="b"), Named(sp.Integer(1), recorder, ray="b")]
    a, c = paraxial.trace(first[0], first[1], steps)
    b, d = paraxial.trace(second[0], second[1], steps)
    A, B, C, D = sp.symbols("A B C D")
    for symbol, value in zip((A, B, C, D), (a, b, c, d)):
        recorder.definitions.append((symbol, value.expr))
    n0, nk = (_exact(n) for n in (system.indices()[0], system.indices()[-1]))
    result = _matrix_formula(quantity, (A, B, C, D), n0, nk, system, recorder)
    return Structured(tuple(recorder.definitions), result)


def _matrix_formula(quantity: str, abcd: tuple, n0: Any, nk: Any, system: System,
                    recorder: _Recorder) -> Any:
    import sympy as sp

    a, b, c, d = abcd
    if quantity in ("image distance", "magnification") and system.object.distance is not None:
        tau0 = sp.Symbol("tau_0")
        recorder.definitions.insert(0, (tau0, _exact(system.object.distance) / n0))
        if quantity == "image distance":
            return formulas.image_distance(a, b, c, d, tau0, nk)
        return formulas.magnification(a, b, c, d, tau0)
    if quantity == "image distance":  # object at infinity: the image is at the back focus
        quantity = "back focal distance"
    if quantity not in formulas.CARDINAL:
        raise KeyError(quantity)
    return formulas.cardinal(quantity, a, b, c, d, n0, nk, system.directions()[-1])


def with_exact_values(system: System) -> System:
    """The same layout with every float turned into the exact decimal it was written as."""
    from ..system import Medium

    return replace(
        system,
        media=tuple(Medium(m.name, _exact(m.index)) for m in system.media),
        boundaries=tuple(replace(b, curvature=_exact(b.curvature), power=_exact(b.power))
                         for b in system.boundaries),
        gaps=tuple(_exact(g) for g in system.gaps),
    )
