"""A symbolic layout at its nominal values: the plain-float System every numeric check uses."""

from __future__ import annotations

import math
from dataclasses import fields, is_dataclass, replace
from typing import Any

from ..errors import LayoutValueError, Span
from ..system import System

__all__ = ["numeric_system", "to_float"]


def to_float(value: Any, nominal: dict[Any, Any], span: Span) -> Any:
    """A number of the layout at the nominal values (None and plain numbers pass through)."""
    if value is None or isinstance(value, (int, float)):
        return value
    import sympy as sp

    if not isinstance(value, sp.Basic):
        return value
    number = value.xreplace(nominal) if value.free_symbols else value
    try:
        result = float(sp.N(number, 17))
    except (TypeError, ValueError):
        raise LayoutValueError("this value has no number at the nominal values", span) from None
    if not math.isfinite(result):
        raise LayoutValueError("this value is not finite at the nominal values", span)
    return result


def _numeric(item: Any, nominal: dict[Any, Any], span: Span) -> Any:
    if isinstance(item, tuple):
        return tuple(_numeric(i, nominal, span) for i in item)
    if is_dataclass(item) and not isinstance(item, type):
        changes = {f.name: _numeric(getattr(item, f.name), nominal, span) for f in fields(item)
                   if f.init}
        return replace(item, **changes)
    return to_float(item, nominal, span)


def numeric_system(system: System, nominal: dict[Any, Any], span: Span) -> System:
    """The same layout with every symbol at its nominal value, checked like a written one."""
    numeric = _numeric(system, nominal, span)
    for i, gap in enumerate(numeric.gaps):
        if gap < 0:
            raise LayoutValueError(
                f"the gap after {numeric.boundaries[i].name!r} is negative at the nominal "
                "values", span, hint="the nominal values are those of the 'nominal' line")
    for medium in numeric.media:
        if medium.index <= 0:
            raise LayoutValueError(f"the index of {medium.name!r} is not positive at the "
                                   "nominal values", span)
    return numeric
