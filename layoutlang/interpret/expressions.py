"""Evaluate expression nodes to `Measure`s, checking units on the way.

Arithmetic goes through a small backend (`NumericBackend` here; a symbolic one builds sympy
expressions straight from the syntax tree, never from text), so the same evaluator serves
numeric and symbolic scripts.
"""

from __future__ import annotations

import difflib
import math
from typing import Any, Callable

from ..errors import LayoutError, LayoutNameError, LayoutUnitError, LayoutValueError, Span
from ..guard import LARGEST, SMALLEST, admissible
from ..measure import Measure, unit_scale
from ..syntax import tree as t

__all__ = ["NumericBackend", "ExpressionEvaluator", "FUNCTIONS", "MAX_NUMBER_CHARACTERS"]

#: The longest number literal read (a double holds 17 significant digits; exact symbolic
#: arithmetic on longer ones only grows).
MAX_NUMBER_CHARACTERS = 40

#: Function name → (kind of argument, kind of result), kinds: 'angle', 'number', 'any'.
FUNCTIONS = {
    "sqrt": ("any", "sqrt"),
    "abs": ("any", "same"),
    "sin": ("angle", "number"),
    "cos": ("angle", "number"),
    "tan": ("angle", "number"),
    "asin": ("number", "angle"),
    "acos": ("number", "angle"),
    "atan": ("number", "angle"),
    "exp": ("number", "number"),
    "ln": ("number", "number"),
    "log10": ("number", "number"),
}


class NumericBackend:
    """Plain floats; every operation that would give inf or NaN becomes an error instead."""

    name = "numeric"

    @staticmethod
    def number(text: str) -> float:
        return float(text)

    @staticmethod
    def constant(name: str) -> Any:
        return math.pi if name == "pi" else None

    @staticmethod
    def apply(func: str, value: float) -> float:
        if func == "ln":
            return math.log(value)
        if func == "abs":
            return abs(value)
        return getattr(math, func)(value)

    @staticmethod
    def is_integer(value: Any) -> bool:
        return isinstance(value, (int, float)) and float(value).is_integer()

    @staticmethod
    def check_finite(value: Any) -> bool:
        try:
            return math.isfinite(value)
        except TypeError:
            return True


class ExpressionEvaluator:
    """Evaluates expressions against named constants.

    Args:
        names: constant name → Measure (grows as `let` statements run).
        script_unit: the script's length unit, for converting written units.
        span: maps a node to its Span, for error messages.
        backend: the arithmetic backend.
    """

    def __init__(
        self,
        names: dict[str, Measure],
        script_unit: str,
        span: Callable[[t.Node], Span],
        backend: Any = NumericBackend,
    ) -> None:
        self.names = names
        self.script_unit = script_unit
        self.span = span
        self.backend = backend
        self._depth = 0
        self.smallest = SMALLEST  # raised for aspheric coefficients (`small_numbers`)

    def small_numbers(self, smallest: float):
        """A context in which magnitudes down to `smallest` are admitted (aspheric
        coefficients: guard.SMALLEST_COEFFICIENT)."""
        from contextlib import contextmanager

        @contextmanager
        def allowing():
            before, self.smallest = self.smallest, smallest
            try:
                yield
            finally:
                self.smallest = before

        return allowing()

    def evaluate(self, node: t.Expr) -> Measure:
        """The value of an expression; the whole expression's value must pass the numeric
        guard (`guard.admissible`), its parts need only be finite."""
        self._depth += 1
        try:
            result = self._evaluate(node)
        finally:
            self._depth -= 1
        if self._depth == 0:
            why = admissible(result.value, self.smallest)
            if why:
                raise LayoutValueError(why, self.span(node),
                                       expected=f"a magnitude between {self.smallest:g} and "
                                                f"{LARGEST:g}, or 0")
        return result

    def _evaluate(self, node: t.Expr) -> Measure:
        try:
            result = getattr(self, "_" + type(node).__name__.lower())(node)
        except LayoutError:
            raise
        except OverflowError:
            raise LayoutValueError("this expression's value is too large", self.span(node)) from None
        except (ZeroDivisionError, ValueError, ArithmeticError) as error:
            raise LayoutValueError(
                f"this expression cannot be evaluated: {_plain(error)}", self.span(node)
            ) from None
        if not self.backend.check_finite(result.value):
            raise LayoutValueError("this expression has no finite value", self.span(node))
        return result

    # 1.5, 20 mm, 5 deg, 2 diopters, 1 %
    def _number(self, node: t.Number) -> Measure:
        if len(node.text) > MAX_NUMBER_CHARACTERS:
            raise LayoutValueError(
                f"this number has more than {MAX_NUMBER_CHARACTERS} characters",
                self.span(node), expected="a number such as 12.5 or 1.5e-3")
        value = self.backend.number(node.text)
        why = admissible(value, self.smallest)
        if why:
            raise LayoutValueError(why, self.span(node),
                                   expected=f"a magnitude between {self.smallest:g} and {LARGEST:g}, "
                                            "or 0")
        if node.unit is None:
            return Measure(value)
        factor, length, angle, relative = unit_scale(node.unit, self.script_unit)
        scaled = value * factor if factor != 1.0 else value
        return Measure(scaled, length, angle, bare=False, relative=relative)

    # focal_goal, pi
    def _name(self, node: t.Name) -> Measure:
        if node.id in self.names:
            return self.names[node.id]
        constant = self.backend.constant(node.id)
        if constant is not None:
            return Measure(constant, bare=True)
        close = difflib.get_close_matches(node.id, list(self.names) + ["pi"], n=1)
        raise LayoutNameError(
            f"unknown name {node.id!r}",
            self.span(node),
            expected="a number or a name defined earlier with 'let'",
            hint=f"did you mean {close[0]!r}?" if close else None,
        )

    # -x
    def _negate(self, node: t.Negate) -> Measure:
        inner = self.evaluate(node.operand)
        return Measure(-inner.value, inner.length, inner.angle, inner.bare, inner.relative,
                       inner.free)

    # a + b, a - b, a * b, a / b, a ^ b
    def _binary(self, node: t.Binary) -> Measure:
        left, right = self.evaluate(node.left), self.evaluate(node.right)
        op = node.op
        relative = left.relative or right.relative
        if op in "+-":
            dims = self._common_dimension(left, right, node)
            value = left.value + right.value if op == "+" else left.value - right.value
            bare = left.bare and right.bare
            free = max(left.free, right.free, key=abs) if bare else 0
            return Measure(value, *dims, bare=bare, relative=relative, free=free)
        # a product stays bare (its dimension still open) while every factor is bare or a
        # plain number with no dimension: 2 * sep * tan(0.25 deg) is a length like sep
        bare = (left.bare or right.bare) and left.dimension == right.dimension == (0, 0)
        if op == "*":
            return Measure(
                left.value * right.value, left.length + right.length, left.angle + right.angle,
                bare, relative, left.free + right.free if bare else 0,
            )
        if op == "/":
            if _is_zero(right.value):
                raise LayoutValueError("division by zero", self.span(node.right))
            return Measure(
                left.value / right.value, left.length - right.length, left.angle - right.angle,
                bare, relative, left.free - right.free if bare else 0,
            )
        # power: the exponent is a plain number; a dimensioned base needs a whole exponent
        if right.dimension != (0, 0):
            raise LayoutUnitError(
                "an exponent must be a plain number", self.span(node.right),
                expected="a number without a unit",
            )
        if left.dimension != (0, 0) and not self.backend.is_integer(right.value):
            raise LayoutUnitError(
                "a quantity with a unit can only be raised to a whole power", self.span(node.right)
            )
        if _is_zero(left.value) and _is_negative(right.value):
            raise LayoutValueError("zero cannot be raised to a negative power", self.span(node))
        if _is_negative(left.value) and not self.backend.is_integer(right.value):
            raise LayoutValueError(
                "a negative number cannot be raised to a fractional power", self.span(node)
            )
        if abs_float(right.value) > 1e3:
            raise LayoutValueError("this exponent is too large", self.span(node.right))
        exponent = int(right.value) if self.backend.is_integer(right.value) else 1
        return Measure(
            left.value ** right.value, left.length * exponent, left.angle * exponent,
            left.bare, relative, left.free * exponent if left.bare else 0,
        )

    # sqrt(x), sin(30 deg), atan(0.1)
    def _call(self, node: t.Call) -> Measure:
        if node.func not in FUNCTIONS:
            close = difflib.get_close_matches(node.func, list(FUNCTIONS), n=1)
            raise LayoutNameError(
                f"unknown function {node.func!r}", self.span(node),
                expected=", ".join(sorted(FUNCTIONS)),
                hint=f"did you mean {close[0]!r}?" if close else None,
            )
        if len(node.args) != 1:
            raise LayoutValueError(f"{node.func} takes one argument", self.span(node))
        argument = self.evaluate(node.args[0])
        takes, gives = FUNCTIONS[node.func]
        if takes == "angle" and argument.dimension not in ((0, 1), (0, 0)):
            raise LayoutUnitError(
                f"{node.func} needs an angle, not {argument.describe()}", self.span(node.args[0]),
                expected="an angle such as 30 deg or 0.5 rad",
            )
        if takes == "number" and argument.dimension != (0, 0):
            raise LayoutUnitError(
                f"{node.func} needs a plain number, not {argument.describe()}",
                self.span(node.args[0]),
            )
        if node.func == "sqrt":
            if argument.length % 2 or argument.angle % 2:
                raise LayoutUnitError("the square root of this unit is not a unit", self.span(node))
            if _is_negative(argument.value):
                raise LayoutValueError("square root of a negative number", self.span(node))
            return Measure(
                self.backend.apply("sqrt", argument.value), argument.length // 2,
                argument.angle // 2, argument.bare, argument.relative, argument.free // 2,
            )
        value = self.backend.apply(node.func, argument.value)
        if gives == "same":
            return Measure(value, argument.length, argument.angle, argument.bare,
                           free=argument.free)
        if gives == "angle":
            return Measure(value, 0, 1, bare=False)
        return Measure(value, bare=argument.bare and argument.dimension == (0, 0))

    def _common_dimension(self, left: Measure, right: Measure, node: t.Node) -> tuple[int, int]:
        if left.bare:
            return right.dimension
        if right.bare or left.dimension == right.dimension:
            return left.dimension
        raise LayoutUnitError(
            f"cannot combine {left.describe()} with {right.describe()}", self.span(node)
        )


def _is_zero(value: Any) -> bool:
    try:
        return bool(value == 0)
    except (TypeError, ValueError):
        return False


def _is_negative(value: Any) -> bool:
    try:
        return bool(value < 0)
    except (TypeError, ValueError):
        return False


def abs_float(value: Any) -> float:
    try:
        return abs(float(value))
    except (TypeError, ValueError):
        return 0.0


def _plain(error: Exception) -> str:
    text = str(error)
    return {"math domain error": "the value is outside the function's domain"}.get(text, text)
