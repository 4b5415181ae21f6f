"""Turn the sympy values of a symbolic System into exact ring ratios, with size guards.

The System's numbers were built from the syntax tree as sympy expressions. Here each becomes a
`Ratio` over one polynomial ring whose generators are the user's symbols (in declaration order)
plus one generator for each opaque sub-expression that is not a rational function (sqrt(2),
tan(theta)), substituted back only when printed. Inputs that would make the algebra explode
(huge powers, very deep nesting) are refused here with `TooComplex` before any work is done.
"""

from __future__ import annotations

from fractions import Fraction
from typing import Any, Iterable

from .algebra import Ratio, RingContext

__all__ = ["TooComplex", "make_context", "to_ratio", "MAX_POWER", "MAX_DEPTH"]

#: The largest whole power of a non-constant expression, and the deepest nesting accepted.
MAX_POWER = 64
MAX_DEPTH = 200
#: The largest exact number (in decimal digits) accepted in a symbolic layout.
MAX_DIGITS = 400


class TooComplex(ValueError):
    """An input expression is beyond the algebra's budget (said in words)."""


def _walk(expr: Any, symbols: list[Any], opaque: list[Any], depth: int = 0) -> None:
    import sympy as sp

    if depth > MAX_DEPTH:
        raise TooComplex(f"an expression is nested more than {MAX_DEPTH} levels deep")
    if expr.is_Rational:
        if max(len(str(abs(expr.p))), len(str(expr.q))) > MAX_DIGITS:
            raise TooComplex(f"a number has more than {MAX_DIGITS} digits")
        return
    if expr.is_Symbol:
        if expr not in symbols:
            symbols.append(expr)
        return
    if expr.is_Add or expr.is_Mul:
        for arg in expr.args:
            _walk(arg, symbols, opaque, depth + 1)
        return
    if expr.is_Pow and expr.exp.is_Integer:
        if abs(int(expr.exp)) > MAX_POWER and not expr.base.is_Rational:
            raise TooComplex(f"a power above {MAX_POWER} of an expression with symbols")
        _walk(expr.base, symbols, opaque, depth + 1)
        return
    if isinstance(expr, sp.Float):
        return
    if expr not in opaque:
        if len(expr.free_symbols) and sp.count_ops(expr) > 500:
            raise TooComplex("an expression is too large to work with exactly")
        opaque.append(expr)


#: Which polynomials to use: "auto" (python-flint when installed, else sympy), "sympy", "flint".
BACKEND = "auto"


def make_context(values: Iterable[Any], declared: list[Any], limit: int | None = None,
                 backend: str | None = None) -> RingContext:
    """One ring for all `values` (sympy expressions or plain numbers).

    Args:
        values: every number of the layout.
        declared: the declared symbols, which become the first generators in this order.
        limit: the term budget of any polynomial during the derivation.
        backend: "auto", "sympy" or "flint" (default: the module's BACKEND).
    """
    import sympy as sp
    from sympy import ZZ
    from sympy.polys.rings import ring

    symbols = list(declared)
    opaque: list[Any] = []
    for value in values:
        if isinstance(value, sp.Basic):
            _walk(value, symbols, opaque)
    generators = symbols + opaque
    names = [f"_g{i}" for i in range(len(generators))] or ["_unused"]
    from . import flintring

    choice = backend or BACKEND
    if choice == "flint" or (choice == "auto" and flintring.available()):
        poly_ring = flintring.FlintRing(names)
        gens = list(poly_ring.gens)
    else:
        poly_ring, *gens = ring(",".join(names), ZZ)
    meaning = dict(zip(gens, generators or [sp.Symbol("_unused")]))
    ctx = RingContext(poly_ring, meaning, limit)
    ctx.by_expr = {expr: gen for gen, expr in meaning.items()}  # type: ignore[attr-defined]
    return ctx


def to_ratio(ctx: RingContext, value: Any) -> Ratio:
    """A sympy expression or Python number as an exact ratio in `ctx`'s ring."""
    import sympy as sp

    if isinstance(value, bool):
        raise TypeError("a truth value is not a number")
    if isinstance(value, int):
        return ctx.constant(value)
    if isinstance(value, float):
        return ctx.constant(Fraction(repr(value)))
    if isinstance(value, Fraction):
        return ctx.constant(value)
    expr = value
    if expr.is_Rational:
        return ctx.constant(Fraction(int(expr.p), int(expr.q)))
    if isinstance(expr, sp.Float):
        return ctx.constant(Fraction(str(expr)))
    if expr.is_Add:
        total = ctx.constant(0)
        for arg in expr.args:
            total = total + to_ratio(ctx, arg)
        return total
    if expr.is_Mul:
        product = ctx.constant(1)
        for arg in expr.args:
            product = product * to_ratio(ctx, arg)
        return product
    if expr.is_Pow and expr.exp.is_Integer:
        return to_ratio(ctx, expr.base) ** int(expr.exp)
    gen = ctx.by_expr.get(expr)  # type: ignore[attr-defined]
    if gen is None:
        raise TooComplex(f"{expr} cannot be used exactly here")
    return Ratio(ctx, gen)
