"""The symbolic arithmetic backend: sympy values built straight from the syntax tree.

Literals become exact rationals from their written text (`0.1` stays 1/10), names resolve to
declared symbols, and no user text ever reaches `sympify`, `parse_expr` or `eval`. Values that
would make later algebra explode (numbers with hundreds of digits, huge powers of symbols) are
refused here, where the error can still point at the expression.
"""

from __future__ import annotations

from typing import Any

import sympy as sp

from ..errors import LayoutError, LayoutValueError
from ..interpret.expressions import ExpressionEvaluator
from ..measure import Measure
from .convert import MAX_DIGITS

__all__ = ["SymbolicBackend", "SymbolicEvaluator", "MAX_DIGITS", "MAX_OPS"]

#: The largest expression (operations) accepted; numbers are bounded by convert.MAX_DIGITS.
MAX_OPS = 2000


class SymbolicBackend:
    """Exact sympy arithmetic for `ExpressionEvaluator`."""

    name = "symbolic"

    @staticmethod
    def number(text: str) -> Any:
        mantissa, _, exponent = text.lower().partition("e")
        if exponent and abs(int(exponent)) > MAX_DIGITS:
            raise ValueError(f"a number with more than {MAX_DIGITS} digits is too large "
                             "to work with exactly")
        return sp.Rational(text)  # a decimal literal's text, read exactly

    @staticmethod
    def constant(name: str) -> Any:
        return sp.pi if name == "pi" else None

    @staticmethod
    def apply(func: str, value: Any) -> Any:
        functions = {
            "sqrt": sp.sqrt, "abs": sp.Abs, "sin": sp.sin, "cos": sp.cos, "tan": sp.tan,
            "asin": sp.asin, "acos": sp.acos, "atan": sp.atan, "exp": sp.exp, "ln": sp.log,
            "log10": lambda v: sp.log(v, 10),
        }
        return functions[func](value)

    @staticmethod
    def is_integer(value: Any) -> bool:
        return bool(getattr(value, "is_Integer", False)) or (
            isinstance(value, (int, float)) and float(value).is_integer())

    @staticmethod
    def check_finite(value: Any) -> bool:
        if not isinstance(value, sp.Basic):
            return True
        if value.has(sp.zoo, sp.oo, -sp.oo, sp.nan):
            return False
        for number in value.atoms(sp.Rational):
            if max(len(str(abs(number.p))), len(str(number.q))) > MAX_DIGITS:
                raise ValueError(f"a number with more than {MAX_DIGITS} digits is too large "
                                 "to work with exactly")
        if value.free_symbols and sp.count_ops(value) > MAX_OPS:
            raise ValueError("the expression is too large to work with exactly")
        for power in value.atoms(sp.Pow):
            if power.base.free_symbols and power.exp.is_Integer and abs(int(power.exp)) > 64:
                raise ValueError("a power above 64 of an expression with symbols is too large "
                                 "to work with exactly")
        return True


class SymbolicEvaluator(ExpressionEvaluator):
    """The expression evaluator of a symbolic script: a budget breach or an expression sympy
    cannot handle becomes one clear error at the expression, never a traceback."""

    def __init__(self, names: dict[str, Measure], script_unit: str, span: Any) -> None:
        super().__init__(names, script_unit, span, SymbolicBackend)

    def evaluate(self, node: Any) -> Measure:
        try:
            return super().evaluate(node)
        except LayoutError:
            raise
        except (ValueError, TypeError, ArithmeticError, RecursionError) as error:
            raise LayoutValueError(f"this expression cannot be used: {error}",
                                   self.span(node)) from None
