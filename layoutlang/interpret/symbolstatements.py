"""The interpreter's part for symbolic scripts (statements of grammar/symbolic.lark).

Mixed into the interpreter's class. `symbols` switches expression evaluation to exact sympy
values (sympy is imported only then, so a numeric check never pays for it); `nominal` gives the
values a symbolic layout is checked at; `derive`, `solve` and `sensitivity` are recorded with
their spans and carried out by `layoutlang derive` (layoutlang/symbolic/). At the end of the
script `finish_symbolic` puts the layout at its nominal values into `Program.system` and the
symbolic layout into `Program.symbolic`.
"""

from __future__ import annotations

from dataclasses import replace
from typing import Any

from ..errors import LayoutNameError, LayoutValueError
from ..quantities import NUMBER
from ..syntax import tree as t

__all__ = ["SymbolicStatements"]


class SymbolicStatements:
    """`symbols`, `nominal`, `derive`, `solve`, `sensitivity`, `expect sensitivity`."""

    def _symbolic(self) -> dict:
        state = self.__dict__.get("_symbolic_state")
        if state is None:
            state = self.__dict__["_symbolic_state"] = {
                "symbols": {}, "assumptions": {}, "nominal": {}, "declared": None,
                "derives": [], "solves": [], "sensitivities": [], "expects": []}
        return state

    def _require_symbols(self, node: t.Node, word: str) -> dict:
        state = self._symbolic()
        if state["declared"] is None:
            raise LayoutValueError(f"'{word}' needs symbols", self.span(node),
                                   hint="declare them first, e.g. 'symbols R d positive'")
        return state

    def _symbol(self, ident: t.Ident) -> Any:
        import difflib

        symbols = self._symbolic()["symbols"]
        if ident.text in symbols:
            return symbols[ident.text]
        close = difflib.get_close_matches(ident.text, list(symbols), n=1)
        raise LayoutNameError(f"{ident.text!r} is not a declared symbol", self.span(ident),
                              expected="one of " + ", ".join(symbols),
                              hint=f"did you mean {close[0]!r}?" if close else None)

    def statement_Symbols(self, node: t.Symbols) -> None:
        """symbols NAME NAME ... [positive | real]"""
        import sympy as sp

        from ..measure import Measure
        from ..symbolic.backend import SymbolicEvaluator

        state = self._symbolic()
        assumptions = {"positive": {"positive": True}, "real": {"real": True}}.get(
            node.assumption or "", {})
        for ident in node.names:
            if ident.text in self.names or ident.text in state["symbols"]:
                raise LayoutNameError(f"{ident.text!r} is already defined", self.span(ident))
            if ident.text == "pi":
                raise LayoutNameError("'pi' is the number pi, not a free symbol", self.span(ident))
            symbol = sp.Symbol(ident.text, **assumptions)
            state["symbols"][ident.text] = symbol
            state["assumptions"][ident.text] = node.assumption
            self.names[ident.text] = Measure(symbol, bare=True)
        if state["declared"] is None:
            state["declared"] = self.span(node)
            if not isinstance(self.evaluator, SymbolicEvaluator):
                self.evaluator = SymbolicEvaluator(self.names, self.units, self.span)

    def statement_Nominal(self, node: t.Nominal) -> None:
        """nominal NAME = VALUE, NAME = VALUE, ..."""
        state = self._require_symbols(node, "nominal")
        for item in node.values:
            symbol = self._symbol(item.name)
            if symbol in state["nominal"]:
                raise LayoutValueError(f"the nominal value of {item.name.text!r} is given twice",
                                       self.span(item.name))
            value = self.value(item.value).value
            if getattr(value, "free_symbols", None) or not getattr(value, "is_number", True):
                raise LayoutValueError("a nominal value must be a number, not an expression in "
                                       "symbols", self.span(item.value))
            if not value.is_real:
                raise LayoutValueError("a nominal value must be a real number",
                                       self.span(item.value))
            if symbol.is_positive and not value > 0:
                raise LayoutValueError(f"{item.name.text!r} was declared positive",
                                       self.span(item.value))
            state["nominal"][symbol] = value

    def _derivable(self, quantity: t.Quantity, allow_equation: bool = False) -> str:
        from ..symbolic.layout import BEAM_DERIVABLE, DERIVABLE, ROOTED, SEIDEL_DERIVABLE

        if allow_equation and quantity.text in ("conjugate equation", "lensmaker equation"):
            return quantity.text
        info = self.quantity(quantity)
        # beam quantities: `derive` takes all; `solve` and sensitivities the rational ones
        if info.name in BEAM_DERIVABLE and (allow_equation or info.name not in ROOTED):
            if self._beams()["beam node"] is None:
                raise LayoutValueError(f"{info.name} needs a beam", self.span(quantity),
                                       hint="declare it with 'beam waist radius W, waist D "
                                            "before, wavelength L'")
            return info.name
        if info.name not in DERIVABLE and info.name not in SEIDEL_DERIVABLE:
            raise LayoutValueError(f"{info.name} has no closed form here", self.span(quantity),
                                   expected="a first-order quantity such as image distance, "
                                            "or a Seidel sum such as spherical sum")
        return info.name

    def statement_Derive(self, node: t.Derive) -> None:
        """derive QUANTITY, QUANTITY, ... (also: derive conjugate equation)"""
        from ..symbolic.program import DeriveRequest

        state = self._require_symbols(node, "derive")
        names = tuple(self._derivable(q, allow_equation=True) for q in node.quantities)
        state["derives"].append(DeriveRequest(names, self.span(node)))

    def _target(self, name: str, expr: t.Expr) -> Any:
        from ..quantities import lookup

        return self.converter(lookup(name).kind, "the required value")(expr)

    def statement_Solve(self, node: t.Solve) -> None:
        """solve NAME[, NAME] so that QUANTITY = VALUE [and QUANTITY = VALUE ...]"""
        from ..symbolic.program import SolveRequest

        state = self._require_symbols(node, "solve")
        unknowns = tuple(self._symbol(ident) for ident in node.unknowns)
        if len(set(unknowns)) != len(unknowns):
            raise LayoutValueError("a symbol is named twice", self.span(node))
        conditions = []
        for condition in node.conditions:
            name = self._derivable(condition.quantity)
            conditions.append((name, self._target(name, condition.value), self.span(condition)))
        state["solves"].append(SolveRequest(unknowns, tuple(conditions), self.span(node)))

    def statement_Sensitivity(self, node: t.Sensitivity) -> None:
        """sensitivity of QUANTITY[, QUANTITY] to NAME[, NAME]"""
        from ..symbolic.program import SensitivityRequest

        state = self._require_symbols(node, "sensitivity")
        names = tuple(self._derivable(q) for q in node.quantities)
        symbols = tuple(self._symbol(ident) for ident in node.symbols)
        state["sensitivities"].append(SensitivityRequest(names, symbols, self.span(node)))

    def statement_ExpectSensitivity(self, node: t.ExpectSensitivity) -> None:
        """expect sensitivity of QUANTITY to NAME < VALUE (also =, <=, >, >= with ± or within)"""
        self._require_symbols(node, "expect sensitivity")
        self._symbolic()["expects"].append((node, (self.file, self.lines)))

    def symbolic_type_error(self, error: TypeError, node: t.Node | None) -> Exception:
        """The error to raise for a TypeError met while running a statement: in a symbolic
        script, a clear message (a symbol stood where a number had to be compared); otherwise
        the original error, which is a bug to fix, not a user mistake."""
        state = self.__dict__.get("_symbolic_state")
        if state is None or state["declared"] is None:
            return error
        span = self.span(node) if node is not None else state["declared"]
        return LayoutValueError(
            "a symbol stands where a number must be compared here (its sign or size is not "
            "known)", span, hint="use a number here, or give the symbols nominal values and "
            "check the layout numerically")

    # --- end of the script ---------------------------------------------------------------------
    def finish_symbolic(self, program: Any) -> Any:
        """The program with `symbolic` filled in and `system` at the nominal values."""
        state = self.__dict__.get("_symbolic_state")
        if state is None or state["declared"] is None:
            return program
        from ..interpret.interpreter import Expectation
        from ..symbolic.nominal import numeric_system, to_float
        from ..symbolic.program import SymbolicPart, sensitivity_name

        nominal = state["nominal"]
        part = SymbolicPart(
            system=program.system, symbols=tuple(state["symbols"].values()),
            assumptions=dict(state["assumptions"]), nominal=dict(nominal),
            declared_at=state["declared"], derives=tuple(state["derives"]),
            solves=tuple(state["solves"]), sensitivities=tuple(state["sensitivities"]))
        if part.missing:
            return replace(program, symbolic=part)
        system = numeric_system(program.system, nominal, state["declared"])
        expectations = []
        for e in program.expectations:
            expectations.append(replace(
                e, expected=to_float(e.expected, nominal, e.span),
                tolerance=None if e.tolerance is None else to_float(e.tolerance, nominal, e.span)))
        sensitivities = {}
        for node, (self.file, self.lines) in state["expects"]:
            name = self._derivable(node.quantity)
            symbol = self._symbol(node.symbol)
            def convert(expr, nominal=nominal):
                return to_float(self.value(expr).value, nominal, self.span(expr))

            expected = convert(node.value)
            tolerance, relative = self.tolerance(node, convert)
            if relative:
                tolerance = to_float(tolerance, nominal, self.span(node.tolerance.value))
            key = sensitivity_name(name, symbol)
            if key not in sensitivities:
                from ..symbolic.sensitivity import sensitivity_at_nominal

                sensitivities[key] = sensitivity_at_nominal(part, name, symbol, self.span(node))
            span = self.span(node)
            expectations.append(Expectation(key, NUMBER, node.op, expected, tolerance, relative,
                                            span, span.line_text.strip()))
        part = replace(part, expected_sensitivities=sensitivities)
        return replace(program, system=system, expectations=tuple(expectations), symbolic=part)
