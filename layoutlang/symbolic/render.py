"""What `layoutlang derive` prints: plain text, LaTeX, Python/numpy code, JSON, Markdown.

Everything a symbolic script asks for (`derive`, `solve`, `sensitivity`) is carried out once by
`carry_out` and written by one small function per format, so the formats always agree. Text
uses the script's own operators (`^` for powers); code comes from `sympy.lambdify` with common
subexpressions eliminated; the output is deterministic.
"""

from __future__ import annotations

import inspect
import json
import re
from dataclasses import dataclass, field
from typing import Any

from ..checks import display_unit
from ..testing import format_number
from .derive import Derived, derive
from .program import SymbolicPart
from .sensitivity import Row, sensitivity_rows
from .solve import Solution, solve_request

__all__ = ["Outcome", "carry_out", "text", "latex", "python_code", "json_text", "markdown",
           "equation_rows", "DEFAULT_QUANTITIES"]

#: What `layoutlang derive` shows for a script that has no `derive` statement.
DEFAULT_QUANTITIES = ("power", "focal length", "back focal distance", "image distance")


@dataclass
class Outcome:
    """Every result of one symbolic script."""

    part: SymbolicPart
    file: str
    derived: list[Derived] = field(default_factory=list)
    solutions: list[Solution] = field(default_factory=list)
    sensitivities: list[list[Row]] = field(default_factory=list)


def carry_out(program: Any) -> Outcome:
    """Carry out the `derive`, `solve` and `sensitivity` statements of a symbolic program."""
    part: SymbolicPart = program.symbolic
    outcome = Outcome(part, program.file)
    names: list[str] = []
    for request in part.derives:
        names += [n for n in request.quantities if n not in names]
    if not names and not part.solves and not part.sensitivities:
        names = list(DEFAULT_QUANTITIES)
    outcome.derived = [derive(part, name) for name in names]
    outcome.solutions = [solve_request(part, request) for request in part.solves]
    outcome.sensitivities = [sensitivity_rows(part, request) for request in part.sensitivities]
    return outcome


# --- pieces ----------------------------------------------------------------------------------

def _plain(expr: Any, as_built: bool = False) -> str:
    """Text of an expression; an equation's right side `as_built` keeps the published order
    ((n2 - n1)/R) instead of sympy's."""
    import sympy as sp

    if isinstance(expr, sp.Equality):
        right = _plain_side(expr.rhs) if as_built else _plain(expr.rhs)
        return f"{_plain_side(expr.lhs)} = {right}"
    return sp.sstr(expr).replace("**", "^")


def _decimal(expr: Any) -> str | None:
    """A decimal reading of a form whose exact coefficients are long (numbers written as
    decimals in the layout give fractions with many digits): the denominator made monic,
    six significant digits; None when the exact form is short enough to read."""
    import sympy as sp

    numbers = [n for n in expr.atoms(sp.Rational)]
    if not numbers or max(max(len(str(abs(n.p))), len(str(n.q))) for n in numbers) <= 8:
        return None
    numerator, denominator = sp.fraction(sp.together(expr))
    symbols = sorted(expr.free_symbols, key=str)
    if symbols and not denominator.is_number:
        lead = sp.Poly(denominator, *symbols).LC()
        numerator, denominator = sp.expand(numerator / lead), sp.expand(denominator / lead)
    return _plain((numerator / denominator).evalf(6))


def _plain_side(expr: Any) -> str:
    import sympy as sp

    return sp.sstr(expr, order="none").replace("**", "^")


def _tex(expr: Any, as_built: bool = False) -> str:
    import sympy as sp

    if isinstance(expr, sp.Equality):  # the left side as built (n1/a before n2/s')
        order = "none" if as_built else None
        return f"{sp.latex(expr.lhs, order='none')} = {sp.latex(expr.rhs, order=order)}"
    return sp.latex(expr)


def _unit(part: SymbolicPart, d: Derived) -> str:
    units = part.system.units
    if d.kind == "power":
        return f"1/{units}"
    return display_unit(d.kind, units)


def _value(value: float | None, unit: str) -> str:
    return "-" if value is None else f"{format_number(value)} {unit}".rstrip()


def _symbol_line(part: SymbolicPart) -> str:
    groups: dict[str | None, list[str]] = {}
    for symbol in part.symbols:
        groups.setdefault(part.assumptions.get(str(symbol)), []).append(str(symbol))
    words = [" ".join(names) + (f" ({assumption})" if assumption else "")
             for assumption, names in groups.items()]
    line = "symbols: " + "; ".join(words)
    if part.nominal:
        line += "; nominal " + ", ".join(f"{s} = {format_number(float(v))}"
                                          for s, v in part.nominal.items())
    return line


def _built(d: Derived) -> bool:
    """Whether the equation was built term by term in its published order (print it so)."""
    return d.quantity == "conjugate equation" or (
        d.quantity == "lensmaker equation" and any("published" in note for note in d.notes))


def _left(d: Derived) -> str:
    return "s'" if d.quantity == "image distance" else d.quantity


def _root_text(solution: Solution) -> list[str]:
    lines = []
    unknowns = ", ".join(map(str, solution.request.unknowns))
    conditions = " and ".join(f"{name} = {_number_or_expr(value)}"
                              for name, value, _ in solution.request.conditions)
    lines.append(f"solve {unknowns} so that {conditions}")
    for general in solution.general:
        lines.append("  in general: " + ", ".join(f"{s} = {_plain(v)}" for s, v in general.items()))
    for root in solution.roots:
        values = ", ".join(f"{s} = {_plain(v)}" + _approx_suffix(v, root.exact)
                           for s, v in root.values.items())
        verdict = {True: "physical", False: "not physical", None: "not judged"}[root.physical]
        exactness = "exact" if root.exact else "numeric"
        lines.append(f"  {values}   ({exactness}; {verdict}{': ' + root.why if root.why else ''})")
    if solution.message:
        lines.append(f"  {solution.message}")
    return lines


def _approx_suffix(value: Any, exact: bool) -> str:
    """' ≈ 12.5' after an exact root that is a number but not a whole one; nothing after a
    numeric root, a whole number, or a root that still holds symbols (a general formula)."""
    if not exact or getattr(value, "is_Integer", False) or getattr(value, "free_symbols", None):
        return ""
    return f" ≈ {_approx(value)}"


def _approx(value: Any) -> str:
    try:
        return format_number(float(value))
    except (TypeError, ValueError):
        number = complex(value)
        return f"{format_number(number.real)} {'+' if number.imag >= 0 else '-'} " \
               f"{format_number(abs(number.imag))}i"


def _number_or_expr(value: Any) -> str:
    try:
        return format_number(float(value))
    except (TypeError, ValueError):
        return _plain(value)


def _structured_lines(d: Derived, indent: str = "    ") -> list[str]:
    if d.structured is None:
        return [indent + "(no structured form for this quantity: ask for fewer symbols)"]
    lines = [indent + f"{_plain(s)} = {_plain(v)}" for s, v in d.structured.definitions]
    lines.append(indent + f"{_left(d)} = {_plain(d.structured.result)}")
    return lines


# --- text ------------------------------------------------------------------------------------

def text(outcome: Outcome) -> str:
    from ..reports.text import SIGN_CONVENTION

    part = outcome.part
    lines = [f"design equations: {outcome.file}", "  " + _symbol_line(part),
             "  " + SIGN_CONVENTION, ""]
    for d in outcome.derived:
        lines.append(d.quantity)
        if d.unavailable:
            lines.append(f"  {d.unavailable}")
        elif d.too_large:
            lines.append(f"  {d.too_large}:")
            lines += _structured_lines(d)
        elif d.equation is not None:
            lines.append(f"  {_plain(d.equation, _built(d))}")
        else:
            lines.append(f"  {_left(d)} = {_plain(d.expr)}")
            decimal = _decimal(d.expr)
            if decimal is not None:
                lines.append(f"  {' ' * len(_left(d))} ≈ {decimal}")
        if d.nominal_value is not None:
            lines.append(f"  at nominal: {_value(d.nominal_value, _unit(part, d))}")
        for note in d.notes:
            lines.append(f"  note: {note}")
        lines.append("")
    for solution in outcome.solutions:
        lines += _root_text(solution) + [""]
    for rows in outcome.sensitivities:
        if not rows:
            continue
        lines.append("sensitivities (change per unit change of the symbol, at nominal)")
        table = [["quantity", "symbol", "at nominal", "unit", "exact derivative"]]
        for row in rows:
            table.append([row.quantity, str(row.symbol), "-" if row.value is None else
                          format_number(row.value), row.unit,
                          row.note or ("(too large to print)" if row.expr is None
                                       else _plain(row.expr))])
        widths = [max(len(r[i]) for r in table) for i in range(len(table[0]))]
        lines += ["  " + "  ".join(c.ljust(w) for c, w in zip(r, widths)).rstrip() for r in table]
        lines.append("")
    return "\n".join(lines).rstrip() + "\n"


# --- LaTeX -----------------------------------------------------------------------------------

def _tex_name(name: str) -> str:
    return r"\text{" + name + "}"


def latex(outcome: Outcome) -> str:
    """A LaTeX fragment (a section with the equations, the solutions and the table)."""
    part = outcome.part
    out = [r"\section*{Design equations}", ""]
    for d in outcome.derived:
        left = "s'" if d.quantity == "image distance" else _tex_name(d.quantity)
        if d.unavailable:
            out.append(f"{_tex_name(d.quantity)}: {d.unavailable}\n")
            continue
        if d.too_large:
            out.append(f"{_tex_name(d.quantity)}: {d.too_large}.")
            if d.structured is not None:
                out.append(r"\begin{align*}")
                out += [f"{_tex(s)} &= {_tex(v)} \\\\" for s, v in d.structured.definitions]
                out.append(f"{left} &= {_tex(d.structured.result)}")
                out.append(r"\end{align*}")
            out.append("")
            continue
        body = _tex(d.equation, _built(d)) if d.equation is not None else \
            f"{left} = {_tex(d.expr)}"
        if d.nominal_value is not None:
            unit = _unit(part, d)
            body += rf" \quad (= {format_number(d.nominal_value)}\,\mathrm{{{unit}}})" if unit \
                else rf" \quad (= {format_number(d.nominal_value)})"
        out += [r"\begin{equation*}", body, r"\end{equation*}", ""]
    for solution in outcome.solutions:
        for line in _root_text(solution):
            out.append(r"\noindent\texttt{" + _tex_escape(line) + r"}\\")
        out.append("")
    for rows in outcome.sensitivities:
        out.append(r"\begin{tabular}{llrl}")
        out.append(r"quantity & symbol & at nominal & unit \\ \hline")
        for row in rows:
            value = "-" if row.value is None else format_number(row.value)
            out.append(f"{row.quantity} & ${_tex(row.symbol)}$ & {value} & {row.unit} \\\\")
        out += [r"\end{tabular}", ""]
    return "\n".join(out).rstrip() + "\n"


#: Characters pdflatex cannot take literally in text, and what to write instead.
_TEX_TEXT = {"\\": r"\textbackslash{}", "^": r"\^{}", "~": r"\~{}", "≈": r"$\approx$",
             "±": r"$\pm$", "→": r"$\rightarrow$", "′": "'", "≤": r"$\leq$", "≥": r"$\geq$"}


def _tex_escape(text: str) -> str:
    return re.sub(r"([&%$#_{}^~\\≈±→′≤≥])",
                  lambda m: _TEX_TEXT.get(m[1], "\\" + m[1]), text)


# --- Python ----------------------------------------------------------------------------------

def _function_name(quantity: str) -> str:
    return re.sub(r"\W", "_", quantity).strip("_")


def python_code(outcome: Outcome) -> str:
    """numpy functions, one per derived closed form (lambdify with cse)."""
    import sympy as sp

    part = outcome.part
    chunks = [f'"""Closed forms derived from {outcome.file} by layoutlang."""', "",
              "import numpy", "from numpy import *  # noqa: F401,F403 — names used by the code",
              ""]
    for d in outcome.derived:
        if d.structured is not None:
            chunks.append(f"# {d.quantity} in {_unit(part, d) or 'plain numbers'}: "
                          "named intermediates (the expanded form is too large)")
            chunks.append(_structured_code(part, d) + "\n")
            continue
        if d.expr is None or d.equation is not None:
            chunks.append(f"# {d.quantity}: " + (d.unavailable or d.too_large or
                                                 "an equation, not a function") + "\n")
            continue
        args = [s for s in part.symbols if s in d.expr.free_symbols]
        others = sorted((s for s in d.expr.free_symbols if s not in args), key=str)
        function = sp.lambdify(args + others, d.expr, modules="numpy", cse=True)
        source = inspect.getsource(function).replace("_lambdifygenerated",
                                                     _function_name(d.quantity))
        chunks.append(f"# {d.quantity} in {_unit(part, d) or 'plain numbers'}")
        chunks.append(source.rstrip() + "\n")
    return "\n".join(chunks).rstrip() + "\n"


def _structured_code(part: SymbolicPart, d: Derived) -> str:
    """A numpy function that computes the quantity step by step through its intermediates."""
    from sympy.printing.numpy import NumPyPrinter

    printer = NumPyPrinter({"fully_qualified_modules": False})
    defined = {symbol for symbol, _ in d.structured.definitions}
    used = set()
    for _, value in d.structured.definitions:
        used |= getattr(value, "free_symbols", set())
    args = [s for s in part.symbols if s in used and s not in defined]
    lines = [f"def {_function_name(d.quantity)}({', '.join(map(str, args))}):"]
    for symbol, value in d.structured.definitions:
        lines.append(f"    {symbol} = {printer.doprint(value)}")
    lines.append(f"    return {printer.doprint(d.structured.result)}")
    return "\n".join(lines)


# --- JSON ------------------------------------------------------------------------------------

def _round(value: float | None) -> float | None:
    from ..reports.machine import round12

    return None if value is None else round12(value)


def json_text(outcome: Outcome) -> str:
    part = outcome.part
    document: dict[str, Any] = {
        "file": outcome.file,
        "symbols": [{"name": str(s), "assumption": part.assumptions.get(str(s)),
                     "nominal": None if s not in part.nominal else _round(float(part.nominal[s]))}
                    for s in part.symbols],
        "derived": [],
        "solutions": [],
        "sensitivities": [],
    }
    for d in outcome.derived:
        entry: dict[str, Any] = {"quantity": d.quantity, "unit": _unit(part, d)}
        if d.unavailable:
            entry["why"] = d.unavailable
        elif d.too_large:
            entry["too_large"] = d.too_large
            if d.structured is not None:
                entry["structured"] = [[_plain(s), _plain(v)] for s, v in d.structured.definitions]
                entry["structured_result"] = _plain(d.structured.result)
        else:
            entry["text"] = _plain(d.equation if d.equation is not None else d.expr, _built(d))
            entry["latex"] = _tex(d.equation if d.equation is not None else d.expr, _built(d))
            entry["terms"] = d.terms
        entry["at_nominal"] = _round(d.nominal_value)
        document["derived"].append(entry)
    for solution in outcome.solutions:
        document["solutions"].append({
            "unknowns": [str(s) for s in solution.request.unknowns],
            "general": [{str(s): _plain(v) for s, v in g.items()} for g in solution.general],
            "roots": [{"values": {str(s): _plain(v) for s, v in r.values.items()},
                       "approx": {k: (_round(v) if isinstance(v, float) else str(v))
                                  for k, v in r.numbers().items()} if r.physical is not None
                       or all(not getattr(v, "free_symbols", None) for v in r.values.values())
                       else None,
                       "exact": r.exact, "physical": r.physical, "why": r.why}
                      for r in solution.roots],
            "message": solution.message,
        })
    for rows in outcome.sensitivities:
        for row in rows:
            document["sensitivities"].append({
                "quantity": row.quantity, "symbol": str(row.symbol), "unit": row.unit,
                "at_nominal": _round(row.value),
                "derivative": None if row.expr is None else _plain(row.expr)})
    return json.dumps(document, indent=2, ensure_ascii=False) + "\n"


# --- Markdown and the design report ----------------------------------------------------------

def equation_rows(program: Any) -> list[tuple[str, str, str]]:
    """(quantity, plain text, LaTeX) for the design-report documents, values at nominal
    included; empty for a numeric script."""
    if getattr(program, "symbolic", None) is None:
        return []
    outcome = carry_out(program)
    rows = []
    for d in outcome.derived:
        if d.unavailable or d.too_large:
            continue
        expr = d.equation if d.equation is not None else d.expr
        plain = _plain(expr, _built(d)) if d.equation is not None else \
            f"{_left(d)} = {_plain(expr)}"
        tex = _tex(expr, _built(d)) if d.equation is not None else \
            ("s' = " if d.quantity == "image distance" else "") + _tex(expr)
        if d.nominal_value is not None:
            unit = _unit(outcome.part, d)
            plain += f"  (= {_value(d.nominal_value, unit)} at nominal)"
        rows.append((d.quantity, plain, tex))
    return rows


def markdown(outcome: Outcome) -> str:
    part = outcome.part
    out = ["## Design equations", "", _symbol_line(part), ""]
    for d in outcome.derived:
        out.append(f"**{d.quantity}**")
        out.append("")
        if d.unavailable:
            out += [d.unavailable, ""]
            continue
        if d.too_large:
            out += [d.too_large + ":", "", "```"] + _structured_lines(d, "") + ["```", ""]
            continue
        body = _tex(d.equation, _built(d)) if d.equation is not None else \
            ("s' = " if d.quantity == "image distance" else "") + _tex(d.expr)
        out += ["$$", body, "$$", ""]
        if d.nominal_value is not None:
            out += [f"At nominal: {_value(d.nominal_value, _unit(part, d))}.", ""]
    for solution in outcome.solutions:
        out += ["```"] + _root_text(solution) + ["```", ""]
    for rows in outcome.sensitivities:
        out += ["| quantity | symbol | at nominal | unit |", "| --- | --- | ---: | --- |"]
        for row in rows:
            value = "-" if row.value is None else format_number(row.value)
            out.append(f"| {row.quantity} | {row.symbol} | {value} | {row.unit} |")
        out.append("")
    return "\n".join(out).rstrip() + "\n"
