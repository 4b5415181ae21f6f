"""What a symbolic script asks for, kept beside its layout (no sympy import here).

`SymbolicPart` travels in `Program.symbolic`: the layout with sympy values, the declared symbols
with their assumptions and nominal values, and the `derive`, `solve` and `sensitivity` requests
with the spans to point at. `Program.system` itself holds the same layout at the nominal values
(plain floats), so every numeric consumer works unchanged.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Any

from ..errors import LayoutValueError, Span

__all__ = ["SymbolicPart", "DeriveRequest", "SolveRequest", "SensitivityRequest",
           "sensitivity_name", "require_numeric"]


@dataclass(frozen=True)
class DeriveRequest:
    quantities: tuple[str, ...]
    span: Span


@dataclass(frozen=True)
class SolveRequest:
    unknowns: tuple[Any, ...]  # sympy Symbols
    conditions: tuple[tuple[str, Any, Span], ...]  # (quantity, target value, span)
    span: Span


@dataclass(frozen=True)
class SensitivityRequest:
    quantities: tuple[str, ...]
    symbols: tuple[Any, ...]
    span: Span


def sensitivity_name(quantity: str, symbol: Any) -> str:
    """The name an `expect sensitivity` row is checked under."""
    return f"sensitivity of {quantity} to {symbol}"


@dataclass(frozen=True)
class SymbolicPart:
    system: Any  # the System with sympy values
    symbols: tuple[Any, ...]
    assumptions: dict[str, str | None]
    nominal: dict[Any, Any]  # Symbol -> sympy Rational
    declared_at: Span
    derives: tuple[DeriveRequest, ...] = ()
    solves: tuple[SolveRequest, ...] = ()
    sensitivities: tuple[SensitivityRequest, ...] = ()
    expected_sensitivities: dict[str, float] = field(default_factory=dict)

    @property
    def missing(self) -> tuple[str, ...]:
        return tuple(str(s) for s in self.symbols if s not in self.nominal)


def require_numeric(program: Any) -> None:
    """Raise a clear error when a symbolic script has no numbers to be checked with."""
    part = getattr(program, "symbolic", None)
    if part is not None and part.missing:
        names = ", ".join(part.missing)
        raise LayoutValueError(
            f"no nominal value for {names}: a numeric check needs one for every symbol",
            part.declared_at, expected=f"a line such as 'nominal {part.missing[0]} = 50'",
            hint="or ask for the closed forms only with 'layoutlang derive FILE'")
