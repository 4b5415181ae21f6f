"""`solve`: the values of symbols that meet first-order requirements, each judged physical.

Each condition `quantity = value` becomes one polynomial equation (numerator − value ×
denominator = 0, the denominator must not vanish). Exact roots come from sympy's `solve` under a
time budget: in general form (in the other symbols) when small, and at the nominal values of the
other symbols; when sympy finds no closed form the roots are found numerically. Every root is
then checked against the layout at that value: real, meeting the declared assumption, gaps not
negative, indices positive, and the quantity really equal to the requirement.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Any

from ..engines.firstorder import Unavailable
from .algebra import Ratio, TooLarge
from .budget import SOLVE_SECONDS, OverBudget, time_budget
from .derive import layout_for
from .program import SolveRequest, SymbolicPart

__all__ = ["Root", "Solution", "solve_request", "EXACT_TERMS"]

#: Equations with more terms than this are not given to sympy's exact solver.
EXACT_TERMS = 400


@dataclass
class Root:
    values: dict[Any, Any]  # symbol -> exact sympy value or float
    exact: bool
    physical: bool | None  # None: cannot be judged (no nominal values)
    why: str = ""

    def numbers(self) -> dict[str, complex | float]:
        out = {}
        for symbol, value in self.values.items():
            number = complex(value)
            out[str(symbol)] = number.real if abs(number.imag) <= 1e-12 * max(1, abs(number)) \
                else number
        return out


@dataclass
class Solution:
    request: SolveRequest
    general: list[dict[Any, Any]] = field(default_factory=list)  # roots in the other symbols
    roots: list[Root] = field(default_factory=list)
    message: str = ""  # 'no solution ...' or why the roots are numeric


def _equation(ratio: Ratio, target: Any) -> Any:
    import sympy as sp

    numerator = Ratio(ratio.ctx, ratio.num).to_expr(factor=False)
    denominator = Ratio(ratio.ctx, ratio.ctx.ring.one, ratio.den)
    return sp.expand(numerator - target / denominator.to_expr(factor=False))


def solve_request(part: SymbolicPart, request: SolveRequest) -> Solution:
    """Carry out one `solve` statement."""
    import sympy as sp

    solution = Solution(request)
    layout = layout_for(part)
    equations, ratios = [], []
    for name, target, _ in request.conditions:
        try:
            value = layout.quantity(name)
        except TooLarge:
            solution.message = f"no solution attempted: {name} is too large to solve exactly"
            return solution
        if isinstance(value, Unavailable):
            solution.message = f"no solution: {name} is {value.reason}"
            return solution
        reduced, _ = value.canonical()
        ratios.append((name, reduced, target))
        target_expr = sp.nsimplify(target) if isinstance(target, float) else target
        equations.append(_equation(reduced, target_expr))
    unknowns = list(request.unknowns)
    if any(eq == 0 for eq in equations):
        solution.message = "no single solution: the requirement holds for every value"
        return solution
    size = sum(len(sp.Add.make_args(eq)) for eq in equations)
    others = {s: v for s, v in part.nominal.items() if s not in unknowns}
    if size <= EXACT_TERMS:
        try:
            with time_budget(SOLVE_SECONDS):
                general = sp.solve(equations, unknowns, dict=True)
            solution.general = general
        except (OverBudget, NotImplementedError, ValueError, TypeError, RecursionError):
            solution.general = []
    free_others = [s for s in part.symbols if s not in unknowns and s not in others]
    if free_others and not solution.general:
        solution.message = ("no closed-form solution found; give nominal values for "
                            + ", ".join(map(str, free_others)) + " to solve numerically")
        return solution
    if free_others:
        solution.roots = [Root(g, True, None, "no nominal values to judge it") for g in
                          solution.general]
        return solution
    candidates = _candidates_at_nominal(solution, equations, unknowns, others)
    for values, exact in candidates:
        solution.roots.append(_judge(part, layout, ratios, values, exact))
    if not solution.roots:
        solution.message = "no solution: no value of " + ", ".join(map(str, unknowns)) + \
            " meets " + " and ".join(f"{n} = {_show(t)}" for n, _, t in ratios)
    return solution


def _show(value: Any) -> str:
    try:
        return f"{float(value):.6g}"
    except (TypeError, ValueError):
        return str(value)


def _candidates_at_nominal(solution: Solution, equations: list, unknowns: list,
                           others: dict) -> list[tuple[dict, bool]]:
    import sympy as sp

    if solution.general:
        found = []
        for general in solution.general:
            values = {s: v.xreplace(others) for s, v in general.items()}
            if all(not v.free_symbols for v in values.values()):
                found.append((values, True))
        if found:
            return found
    at_nominal = [sp.expand(eq.xreplace(others)) for eq in equations]
    if any(eq == 0 for eq in at_nominal):
        return []
    size = sum(len(sp.Add.make_args(eq)) for eq in at_nominal)
    if size <= EXACT_TERMS:
        try:
            with time_budget(SOLVE_SECONDS):
                exact = sp.solve(at_nominal, unknowns, dict=True)
            if exact:
                return [(values, True) for values in exact]
        except (OverBudget, NotImplementedError, ValueError, TypeError, RecursionError):
            pass
    solution.message = "sympy found no closed form; the roots are numeric"
    if len(unknowns) == 1:
        try:
            poly = sp.Poly(at_nominal[0], unknowns[0])
            with time_budget(SOLVE_SECONDS):
                return [({unknowns[0]: root}, False) for root in poly.nroots(n=15)]
        except (sp.PolificationFailed, OverBudget, sp.polys.polyerrors.PolynomialError):
            pass
    start = [1.0] * len(unknowns)
    try:
        with time_budget(SOLVE_SECONDS):
            root = sp.nsolve(at_nominal[: len(unknowns)], unknowns, start)
        return [({u: root[i] for i, u in enumerate(unknowns)}, False)]
    except (ValueError, ZeroDivisionError, OverBudget, TypeError):
        return []


def _judge(part: SymbolicPart, layout, ratios: list, values: dict, exact: bool) -> Root:
    """Whether a root gives a layout that exists and meets the requirements."""
    import sympy as sp

    from ..errors import LayoutError
    from .nominal import numeric_system

    reasons = []
    numbers = {}
    free = set().union(*(getattr(v, "free_symbols", set()) for v in values.values()))
    if free:  # fewer conditions than unknowns: a family of roots, not one layout
        names = ", ".join(sorted(map(str, free)))
        return Root(values, exact, None, f"one root for each value of {names}: add a condition "
                                         "per unknown to fix it")
    for symbol, value in values.items():
        number = complex(sp.N(value, 20))
        if abs(number.imag) > 1e-9 * max(1.0, abs(number)):
            return Root(values, exact, False, f"{symbol} is not a real number")
        numbers[symbol] = number.real
        if symbol.is_positive and number.real <= 0:
            reasons.append(f"{symbol} must be positive (declared so)")
    if reasons:
        return Root(values, exact, False, "; ".join(reasons))
    point_nominal = dict(part.nominal)
    for symbol, number in numbers.items():
        point_nominal[symbol] = values[symbol] if exact else sp.Float(number, 17)
    try:
        numeric_system(part.system, {s: v for s, v in point_nominal.items()}, part.declared_at)
    except LayoutError as error:
        return Root(values, exact, False, error.message.replace(" at the nominal values", ""))
    from fractions import Fraction

    point = {}
    for gen, expr in layout.ctx.meaning.items():
        if expr in numbers:
            point[gen] = numbers[expr]
        elif expr in part.nominal:
            value = part.nominal[expr]
            point[gen] = Fraction(int(value.p), int(value.q)) if value.is_Rational else float(value)
        else:
            point[gen] = float(sp.N(expr.xreplace({**part.nominal, **numbers}), 20)) \
                if not str(expr) == "_unused" else 0.0
    for name, ratio, target in ratios:
        try:
            got = float(ratio.evaluate(point))
        except ZeroDivisionError:
            return Root(values, exact, False, f"{name} does not exist there (a denominator "
                        "vanishes)")
        want = float(sp.N(target.xreplace(point_nominal))) if hasattr(target, "xreplace") \
            else float(target)
        if abs(got - want) > 1e-7 * max(1.0, abs(want)):
            return Root(values, exact, False, f"{name} would be {got:.6g}, not {want:.6g}")
    return Root(values, exact, True, "")
