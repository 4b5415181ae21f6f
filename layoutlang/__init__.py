"""layoutlang: a plain-word scripting language for describing and checking optical layouts.

The public API is a handful of thin functions over the same core the command line uses:

    parse(text)            -> syntax tree
    load(path) / loads(text) -> Program (the System plus the script's expectations)
    evaluate(system)       -> FirstOrder (every first-order property)
    check(program)         -> list of CheckResult (one per expectation)
"""

from __future__ import annotations

__version__ = "0.1.0"

__all__ = ["__version__", "parse", "load", "loads", "evaluate", "check"]


def parse(text: str, file: str = "<script>"):
    """Parse script text into its syntax tree (raises LayoutSyntaxError)."""
    from .syntax.parser import parse as _parse

    return _parse(text, file)


def load(path):
    """Read and interpret a script file into a Program."""
    from .interpret.interpreter import load_file

    return load_file(path)


def loads(text: str, file: str = "<script>", base=None):
    """Interpret script text into a Program (`base` resolves `use "file"`)."""
    from .interpret.interpreter import interpret

    return interpret(parse(text, file), base=base)


def evaluate(system):
    """All first-order properties of a numeric System."""
    from .engines.firstorder import first_order

    return first_order(system)


def check(program):
    """Evaluate a Program's expectations."""
    from .checks import check_program

    return check_program(program)
