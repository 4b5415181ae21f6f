"""`derive`: closed forms of first-order quantities, the conjugate equation, and their sizes.

Each quantity comes out of `SymbolicLayout` as a ring ratio, is reduced once (`canonical`), and
is turned into a sympy expression only if it is small enough to be read; past `PRINT_TERMS`
terms the derivation says so and offers the structured form (named intermediates) instead, and
past `WORK_TERMS` it stops expanding at all, so no layout makes `derive` hang.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Any

from ..engines.firstorder import Unavailable
from ..quantities import lookup
from ..errors import LayoutValueError
from .algebra import Ratio, TooLarge
from .convert import TooComplex
from .layout import ROOTED, SymbolicLayout
from .program import SymbolicPart
from .structured import MATRIX_QUANTITIES, Structured, structured_form, with_exact_values

__all__ = ["Derived", "derive", "layout_for", "PRINT_TERMS", "WORK_TERMS", "IMAGE_SYMBOL",
           "conjugate_equation"]

#: Past this many terms an expanded closed form is not printed (the structured form is).
PRINT_TERMS = 4000
#: Past this many terms in any intermediate polynomial the expansion stops.
WORK_TERMS = 60000

_LAYOUTS: dict[int, tuple[SymbolicPart, SymbolicLayout]] = {}


def layout_for(part: SymbolicPart) -> SymbolicLayout:
    """One SymbolicLayout per symbolic program (its matrix is shared by every request); the
    few most recent are kept, keyed by identity and checked against the part itself."""
    cached = _LAYOUTS.get(id(part))
    if cached is None or cached[0] is not part:
        try:
            layout = SymbolicLayout(part.system, list(part.symbols), part.nominal,
                                    limit=WORK_TERMS)
        except (TooComplex, ZeroDivisionError) as error:
            raise LayoutValueError(f"this layout cannot be derived exactly: {error}",
                                   part.declared_at) from None
        cached = (part, layout)
        if len(_LAYOUTS) >= 8:  # a session makes a new part per question: keep a few recent
            _LAYOUTS.pop(next(iter(_LAYOUTS)))
        _LAYOUTS[id(part)] = cached
    return cached[1]


def IMAGE_SYMBOL() -> Any:  # noqa: N802 — a constant that needs sympy, made on demand
    import sympy as sp

    return sp.Symbol("s'")


@dataclass
class Derived:
    """One derived quantity, ready for every output format."""

    quantity: str
    kind: str
    expr: Any = None  # the sympy closed form, when small enough to print
    ratio: Ratio | None = None
    unavailable: str | None = None
    terms: int = 0
    reduced: bool = True  # numerator and denominator proven coprime
    too_large: str | None = None
    structured: Structured | None = None
    nominal_value: float | None = None
    equation: Any = None  # a sympy Eq (conjugate equation)
    notes: list[str] = field(default_factory=list)


def _nominal_value(layout: SymbolicLayout, ratio: Ratio) -> float | None:
    point = layout.nominal_point()
    if point is None:
        return None
    try:
        return float(ratio.evaluate(point))
    except ZeroDivisionError:
        return None


def _structured(part: SymbolicPart, name: str) -> Structured | None:
    if name not in MATRIX_QUANTITIES:
        return None
    return structured_form(with_exact_values(part.system), name)


def derive(part: SymbolicPart, name: str, print_terms: int = PRINT_TERMS) -> Derived:
    """The closed form of one quantity (a name of `layout.DERIVABLE`, or 'conjugate
    equation' / 'lensmaker equation')."""
    if name == "conjugate equation":
        return conjugate_equation(part, name)
    if name == "lensmaker equation":
        return lensmaker_equation(part)
    kind = lookup(name).kind
    layout = layout_for(part)
    result = Derived(name, kind)
    seen = len(layout.notes)
    try:
        value = layout.quantity(name)
    except TooLarge as error:
        result.too_large = (f"the expanded form has more than {WORK_TERMS} terms "
                            f"(stopped at {error.terms}); shown with named intermediates instead")
        result.structured = _structured(part, name)
        return result
    if isinstance(value, Unavailable):
        result.unavailable = value.reason
        return result
    reduced, proven = value.canonical()
    result.ratio, result.reduced, result.terms = reduced, proven, reduced.terms()
    result.nominal_value = _nominal_value(layout, reduced)
    result.notes = list(layout.notes[seen:])
    if name in ROOTED:  # the ring holds the square (a beam's waist radius)
        return _rooted(result, print_terms)
    if result.terms > print_terms:
        result.too_large = (f"the expanded form has {result.terms} terms, too many to read; "
                            "shown with named intermediates instead")
        result.structured = _structured(part, name)
        return result
    result.expr = reduced.to_expr()
    return result


def _rooted(result: Derived, print_terms: int) -> Derived:
    """The closed form of a quantity the ring holds squared: the square root of the ratio
    (the ratio itself stays the square, for sizes and the numpy code of its square)."""
    import sympy as sp

    if result.nominal_value is not None:
        result.nominal_value = result.nominal_value ** 0.5
    result.notes.append("the closed form is the square root of a rational function of the "
                        "layout's values (the beam radius is)")
    if result.terms > print_terms:
        result.too_large = (f"the expanded form has {result.terms} terms under the root, too "
                            "many to read")
        return result
    result.expr = sp.sqrt(result.ratio.to_expr())
    return result


def lensmaker_equation(part: SymbolicPart) -> Derived:
    """1/f = power, f the effective focal length: for a lens in air the lensmaker's (thick
    lens) equation, factored."""
    import sympy as sp

    power = derive(part, "power")
    result = Derived("lensmaker equation", "equation", unavailable=power.unavailable)
    if power.expr is None:
        result.unavailable = power.unavailable or power.too_large
        return result
    published = _published_lensmaker(part.system, power.expr)
    result.equation = sp.Eq(1 / sp.Symbol("f"), published if published is not None
                            else sp.factor(power.expr), evaluate=False)
    result.expr = result.equation
    result.nominal_value = None
    result.notes = ["f is the effective focal length 1/power (the focal length in air)"]
    if published is not None:
        result.notes.append("in the published thick-lens form (Hecht, 2017, Optics, 5th ed., "
                            "§6.2), checked equal to the traced power")
    return result


def _published_lensmaker(system, power):
    """(n − 1)[1/R1 − 1/R2 + (n − 1) d / (n R1 R2)] for one lens in air, built term by term so
    it prints in the order the textbooks give; None for any other layout, or if it would not
    equal the traced power exactly."""
    import sympy as sp

    from ..system import REFRACT

    first, *rest = system.boundaries
    if (len(rest) != 1 or {first.kind, rest[0].kind} != {REFRACT} or system.start_medium
            != rest[0].medium_after or first.medium_after == system.start_medium):
        return None
    if sp.nsimplify(system.medium(system.start_medium).index) != 1:
        return None
    n = system.medium(first.medium_after).index
    c1, c2, d = first.curvature, rest[0].curvature, system.gaps[0]
    less_one = sp.Add(n, -1, evaluate=False)
    bracket = sp.Add(c1, -c2, sp.Mul(less_one, d, c1, c2, 1 / n, evaluate=False),
                     evaluate=False)
    published = sp.Mul(less_one, bracket, evaluate=False)
    return published if sp.cancel(sp.together(published - power)) == 0 else None


def conjugate_equation(part: SymbolicPart, name: str = "conjugate equation") -> Derived:
    """n0/(a + p) + nk/(s' - p') = Φ: object and image distances measured from the principal
    points (p after the first vertex, p' after the last); p = p' = 0 gives the one-boundary,
    thin-lens and mirror forms."""
    import sympy as sp

    result = Derived(name, "equation")
    obj = part.system.object
    if obj.distance is None:
        result.unavailable = "none: the object is at infinity (see back focal distance)"
        return result
    parts = {}
    for quantity in ("power", "front principal point", "back principal point"):
        derived = derive(part, quantity)
        if derived.unavailable or derived.expr is None:
            result.unavailable = derived.unavailable or derived.too_large
            return result
        parts[quantity] = derived.expr
    indices = part.system.indices()
    n0, nk = (sp.nsimplify(n) if isinstance(n, float) else n for n in (indices[0], indices[-1]))
    a = obj.distance
    image = IMAGE_SYMBOL()
    front, back = parts["front principal point"], parts["back principal point"]
    left = sp.Add(n0 / (a + front), nk / (image - back), evaluate=False)
    power = parts["power"]
    result.equation = sp.Eq(left, power, evaluate=False)
    result.expr = result.equation
    result.notes = [] if front == 0 and back == 0 else [
        "distances from the principal points: object a + p before the front principal point, "
        "image s' - p' after the back principal point"]
    return result
