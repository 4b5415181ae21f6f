"""Rich display in notebooks: a Program shows its report, first-order results a table.

Jupyter calls `_repr_html_` / `_repr_latex_` on the last value of a cell. A Program (a plain
value of the interpreter, which renders nothing) gets its display from here: `register` adds
`program_html` to IPython's HTML formatter; the API (`layoutlang.load`/`loads`) calls it when
IPython is running, and `%load_ext layoutlang.notebook` does it by hand. `evaluate()` returns a
`FirstOrderResults`, a FirstOrder that also knows the layout's units so it can show every value
with its unit.
"""

from __future__ import annotations

import html
from dataclasses import dataclass

from .engines.firstorder import FirstOrder, Unavailable
from .quantities import QUANTITIES, REPORT_ORDER

__all__ = ["FirstOrderResults", "program_html", "with_units", "register",
           "register_if_in_notebook", "load_ipython_extension"]


def register(shell) -> bool:
    """Show every Program as its report in this IPython shell; False if it has no HTML
    formatter (a plain terminal shell)."""
    from .interpret.interpreter import Program

    formatters = getattr(getattr(shell, "display_formatter", None), "formatters", {})
    html_formatter = formatters.get("text/html") if hasattr(formatters, "get") else None
    if html_formatter is None:
        return False
    html_formatter.for_type(Program, program_html)
    return True


def register_if_in_notebook() -> None:
    """`register` with the running IPython shell, if any (costs nothing outside IPython)."""
    import sys

    ipython = sys.modules.get("IPython")
    shell = ipython.get_ipython() if ipython is not None else None
    if shell is not None:
        register(shell)


def load_ipython_extension(shell) -> None:
    """`%load_ext layoutlang.notebook`."""
    register(shell)


def program_html(program) -> str:
    """The program's report (drawing, layout, first-order, expectations) as an HTML fragment."""
    from .checks import evaluate_program
    from .errors import LayoutError
    from .reports.document import gather, html_fragment

    results, checked = evaluate_program(program)
    sections = gather(program, results, checked)
    svg = None
    try:
        from .reports.drawing import drawing_bytes

        text = drawing_bytes(program.system, "svg").decode("utf-8")
        svg = text[text.index("<svg"):]
    except (ImportError, LayoutError):  # no matplotlib here, or nothing drawable: tables only
        svg = None
    return html_fragment(sections, svg)


@dataclass(frozen=True)
class FirstOrderResults(FirstOrder):
    """First-order results that know their units, for display."""

    units: str = "mm"

    @property
    def rows(self) -> list[tuple[str, str]]:
        """(quantity, value with unit or the reason there is none), in report order."""
        from .reports.text import first_order_rows

        return [(name, value) for name, value in first_order_rows(self, self.units)]

    def _repr_html_(self) -> str:
        body = "".join(f"<tr><td>{html.escape(n)}</td><td>{html.escape(v)}</td></tr>"
                       for n, v in self.rows)
        return f"<table><tr><th>quantity</th><th>value</th></tr>{body}</table>"

    def _repr_latex_(self) -> str:
        from .checks import display_unit, to_display
        from .testing import format_number

        lines = []
        for name in REPORT_ORDER:
            value = self.table.get(name)
            if value is None or isinstance(value, Unavailable):
                continue
            kind = QUANTITIES[name].kind
            unit = display_unit(kind, self.units)
            shown = format_number(to_display(value, kind, self.units))
            unit_tex = rf"\ \mathrm{{{unit}}}" if unit else ""
            lines.append(rf"\text{{{name}}} &= {shown}{unit_tex}")
        return r"$\begin{aligned}" + r"\\ ".join(lines) + r"\end{aligned}$"


def with_units(results: FirstOrder, units: str) -> FirstOrderResults:
    """The same results, able to show themselves with units."""
    from dataclasses import fields

    return FirstOrderResults(**{f.name: getattr(results, f.name) for f in fields(results)
                                if f.init and f.name != "units"}, units=units)
