"""Sensitivities: exact partial derivatives of a quantity, evaluated at the nominal values.

The derivative is taken on the ring ratio itself (quotient rule over the factored denominator),
so it is exact and cheap even where the closed form is too large to print; the table gives the
change of the quantity per unit change of each symbol at the nominal layout.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any

from ..engines.firstorder import Unavailable
from ..errors import LayoutValueError, Span
from .algebra import TooLarge
from .derive import PRINT_TERMS, layout_for
from .program import SensitivityRequest, SymbolicPart

__all__ = ["Row", "sensitivity_rows", "sensitivity_at_nominal", "symbol_role"]


@dataclass
class Row:
    quantity: str
    symbol: Any
    expr: Any  # the exact partial derivative (None when too large to print)
    value: float | None  # at the nominal values (None without them)
    unit: str
    note: str = ""


def symbol_role(part: SymbolicPart, symbol: Any) -> str:
    """'index' when the symbol only enters through refractive indices, 'conic' when only
    through conic constants (plain numbers), else 'length'."""
    def has(value: Any) -> bool:
        return value is not None and symbol in getattr(value, "free_symbols", set())

    s = part.system
    in_index = any(has(m.index) for m in s.media)
    in_conic = any(has(b.conic) for b in s.boundaries)
    others = []
    for b in s.boundaries:
        others += [b.curvature, b.power, *b.even_terms, *b.q_terms, b.q_radius]
    others += list(s.gaps) + [s.object.distance, s.object.height]
    in_other = any(has(v) for v in others)
    if in_other:
        return "length"
    if in_index and not in_conic:
        return "index"
    return "conic" if in_conic and not in_index else "length"


def _unit(part: SymbolicPart, quantity: str, symbol: Any) -> str:
    from ..quantities import lookup

    units = part.system.units
    top = {"length": units, "power": f"1/{units}", "number": "1"}[lookup(quantity).kind]
    role = symbol_role(part, symbol)
    bottom = {"index": "unit of index", "conic": "unit of conic constant"}.get(role, units)
    return f"{top} per {bottom}"


def _derivative(part: SymbolicPart, quantity: str, symbol: Any, span: Span | None):
    layout = layout_for(part)
    try:
        value = layout.quantity(quantity)
    except TooLarge:
        raise LayoutValueError(f"{quantity} is too large to differentiate exactly", span) from None
    if isinstance(value, Unavailable):
        raise LayoutValueError(f"{quantity} is {value.reason}: it has no sensitivity", span)
    return layout, value.derivative(layout.gen_of(symbol))


def sensitivity_at_nominal(part: SymbolicPart, quantity: str, symbol: Any,
                           span: Span | None = None) -> float:
    """∂quantity/∂symbol at the nominal values (every symbol needs one)."""
    layout, derivative = _derivative(part, quantity, symbol, span)
    point = layout.nominal_point()
    if point is None:
        raise LayoutValueError("a sensitivity at nominal needs a nominal value for every symbol",
                               span)
    try:
        return float(derivative.evaluate(point))
    except ZeroDivisionError:
        raise LayoutValueError(f"{quantity} has no derivative at the nominal values", span) \
            from None


def sensitivity_rows(part: SymbolicPart, request: SensitivityRequest) -> list[Row]:
    """One row per (quantity, symbol) of a `sensitivity` statement."""
    rows = []
    for quantity in request.quantities:
        for symbol in request.symbols:
            layout, derivative = _derivative(part, quantity, symbol, request.span)
            reduced, _ = derivative.canonical()
            expr = reduced.to_expr() if reduced.terms() <= PRINT_TERMS // 4 else None
            point = layout.nominal_point()
            value, note = None, ""
            if point is not None:
                try:
                    value = float(reduced.evaluate(point))
                except ZeroDivisionError:
                    note = "no derivative at the nominal values"
            rows.append(Row(quantity, symbol, expr, value, _unit(part, quantity, symbol), note))
    return rows
