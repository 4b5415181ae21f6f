"""layoutlang: a plain-word scripting language for describing and checking optical layouts.

The public API is a handful of thin functions over the same core the command line uses:

    parse(text)            -> syntax tree
    load(path) / loads(text) -> Program (the System plus the script's expectations)
    evaluate(system)       -> FirstOrder (every first-order property)
    check(program)         -> list of CheckResult (one per expectation)
    derive(program, name)  -> the closed form of a quantity of a script with symbols (sympy)
    format_script(text)    -> the canonical layout of a script
    draw(system, path)     -> writes an svg/png/pdf cross-section (matplotlib)
    report(path, fmt)      -> a md/html/latex design report as text

In a notebook a Program shows its report and `evaluate(...)` a table with units.
"""

from __future__ import annotations

__version__ = "0.1.0"

__all__ = ["__version__", "parse", "load", "loads", "evaluate", "check", "derive",
           "format_script", "draw", "report"]


def parse(text: str, file: str = "<script>"):
    """Parse script text into its syntax tree (raises LayoutSyntaxError)."""
    from .syntax.parser import parse as _parse

    return _parse(text, file)


def load(path):
    """Read and interpret a script file into a Program."""
    from .interpret.interpreter import load_file

    _notebook_display()
    return load_file(path)


def _notebook_display() -> None:
    """In a notebook, a Program shows its report: the display is registered here, by the API
    (a front end), never by the interpreter."""
    import sys

    if "IPython" in sys.modules:
        from .notebook import register_if_in_notebook

        register_if_in_notebook()


def loads(text: str, file: str = "<script>", base=None):
    """Interpret script text into a Program (`base` resolves `use "file"`)."""
    from .interpret.interpreter import interpret

    _notebook_display()
    return interpret(parse(text, file), base=base)


def evaluate(system):
    """All first-order properties of a numeric System (or of a Program's System); the result
    indexes by quantity name and displays itself with units in a notebook."""
    from .engines.firstorder import first_order
    from .notebook import with_units

    system = getattr(system, "system", system)
    return with_units(first_order(system), system.units)


def check(program):
    """Evaluate a Program's expectations."""
    from .checks import check_program

    return check_program(program)


def derive(program, quantity: str):
    """The closed form (a sympy expression) of a first-order quantity of a script that declares
    symbols; `quantity` as in the script ('image distance', 'focal length', an alias, or
    'conjugate equation', which gives a sympy Eq).

    Raises:
        LayoutValueError: the script has no symbols, or the quantity has no closed form here
            (it does not exist for this layout, or is too large to print).
    """
    from .errors import LayoutValueError
    from .quantities import lookup

    part = getattr(program, "symbolic", None)
    if part is None:
        raise LayoutValueError("derive needs a script that declares symbols",
                               hint="add a line such as 'symbols R n positive'")
    from .symbolic.derive import derive as _derive

    info = lookup(quantity)
    name = info.name if info is not None else quantity
    result = _derive(part, name)
    if result.unavailable or result.too_large:
        raise LayoutValueError(f"{name}: {result.unavailable or result.too_large}")
    return result.equation if result.equation is not None else result.expr


def format_script(text: str, file: str = "<script>") -> str:
    """The canonical layout of script text (what `layoutlang format` writes)."""
    from .formatter import format_text

    return format_text(text, file)


def draw(system, path, kind: str | None = None) -> None:
    """Draw the cross-section of a System (or a Program's) to an svg, png or pdf file."""
    from .reports.drawing import save_drawing

    hazards = tuple(getattr(system, "hazards", ()) or ())
    save_drawing(getattr(system, "system", system), path, kind, hazards)


def report(path, fmt: str = "md", output=None) -> str:
    """The design report of a script file as Markdown, HTML or LaTeX text (`output`: where the
    document will go, so the drawing can be written beside it)."""
    from .reports.document import render_document

    return render_document(str(path), fmt, None if output is None else str(output)).text


del annotations  # the future import is not part of the API
