"""pytest plugin: layout scripts as test files, one test item per `expect` line.

Loaded by pytest in every run of an environment where layoutlang is installed (the `pytest11`
entry point), so this module imports nothing of layoutlang at import time: the parser,
interpreter and engines load only when a script is actually collected.

Collection is opt-in, so a project's own `.lay` fixtures (deliberately broken scripts, say) are
never run by surprise:

- a script named on the command line (`pytest examples/relay.lay`) is always collected;
- scripts found while walking folders are collected when `--layoutlang` is given or the ini
  option `layoutlang_files` (glob patterns, default `*.lay` when `--layoutlang` is given) is set
  in the project's configuration.

Each expectation is one item named `line<N>[<quantity>]`; a script that does not parse or
interpret becomes one failing item named `script`, and the session goes on.
"""

from __future__ import annotations

import fnmatch
from pathlib import Path
from typing import Any, Iterator

import pytest

__all__ = ["LayoutScript", "ExpectationItem", "ScriptErrorItem"]

_DEFAULT_PATTERNS = ["*.lay"]


def pytest_addoption(parser: pytest.Parser) -> None:
    group = parser.getgroup("layoutlang", "layout scripts (layoutlang)")
    group.addoption(
        "--layoutlang", action="store_true", default=False,
        help="collect layout scripts found in folders (by default only scripts named on the "
             "command line, unless the ini option layoutlang_files is set)")
    parser.addini(
        "layoutlang_files", type="linelist", default=[],
        help="glob patterns of layout scripts to collect as tests (e.g. *.lay); setting it "
             "turns collection on for folders")


def _patterns(config: pytest.Config) -> list[str]:
    return list(config.getini("layoutlang_files")) or _DEFAULT_PATTERNS


def _enabled(config: pytest.Config) -> bool:
    return bool(config.getoption("layoutlang") or config.getini("layoutlang_files"))


def pytest_collect_file(file_path: Path, parent: pytest.Collector) -> pytest.Collector | None:
    patterns = _patterns(parent.config)
    if not any(fnmatch.fnmatch(file_path.name, pattern) for pattern in patterns):
        return None
    if parent.session.isinitpath(file_path) or _enabled(parent.config):
        return LayoutScript.from_parent(parent, path=file_path)
    return None


class LayoutScript(pytest.File):
    """One layout script; its expectations are checked once and shared by its items."""

    _results: list | None = None

    def collect(self) -> Iterator[pytest.Item]:
        from .errors import LayoutError
        from .interpret.interpreter import load_file

        try:
            program = load_file(self.path)
            if getattr(program, "symbolic", None) is not None:
                from .symbolic.program import require_numeric

                require_numeric(program)  # checked at the nominal values, as `check` does
        except LayoutError as error:
            yield ScriptErrorItem.from_parent(self, name="script", error=error)
            return
        self.program = program
        seen: dict[str, int] = {}
        for index, expectation in enumerate(program.expectations):
            span = expectation.span
            where = f"line{span.line}"
            if Path(span.file).resolve() != self.path.resolve():  # from a `use "file"`
                where = f"{Path(span.file).name}:line{span.line}"
            name = f"{where}[{expectation.quantity}]"
            seen[name] = seen.get(name, 0) + 1
            if seen[name] > 1:  # one line that states several expectations: keep ids unique
                name = f"{where}[{expectation.quantity}-{seen[name]}]"
            yield ExpectationItem.from_parent(self, name=name, index=index)

    def results(self) -> list:
        """The check results of every expectation, computed on first use."""
        if self._results is None:
            from .checks import check_program

            self._results = check_program(self.program)
        return self._results


class ExpectationFailed(Exception):
    """An expectation does not hold (carries the check result for the report)."""

    def __init__(self, result: Any) -> None:
        super().__init__(result.outcome.message)
        self.result = result


class ExpectationItem(pytest.Item):
    """One `expect` line of a script."""

    def __init__(self, *, index: int, **kwargs: Any) -> None:
        super().__init__(**kwargs)
        self.index = index
        expectation = self.parent.program.expectations[index]
        self.expectation_line = expectation.span.line
        self.expectation_file = expectation.span.file
        self.user_properties.append(("quantity", expectation.quantity))

    def runtest(self) -> None:
        from .errors import LayoutError

        try:
            result = self.parent.results()[self.index]
        except LayoutError as error:  # the layout cannot be evaluated at all
            raise _ScriptError(error) from None
        if not result.passed:
            raise ExpectationFailed(result)

    def repr_failure(self, excinfo: pytest.ExceptionInfo[BaseException], style=None) -> str:
        if isinstance(excinfo.value, ExpectationFailed):
            return failure_text(excinfo.value.result)
        if isinstance(excinfo.value, _ScriptError):
            return str(excinfo.value.error)
        return super().repr_failure(excinfo)

    def reportinfo(self) -> tuple[Path, int, str]:
        return self.path, self.expectation_line - 1, \
            f"{Path(self.expectation_file).name}:{self.expectation_line}: {self.name}"


class _ScriptError(Exception):
    def __init__(self, error: Exception) -> None:
        super().__init__(str(error))
        self.error = error


class ScriptErrorItem(pytest.Item):
    """A script that cannot be read, parsed or interpreted: one failing item, not an aborted
    session."""

    def __init__(self, *, error: Exception, **kwargs: Any) -> None:
        super().__init__(**kwargs)
        self.error = error

    def runtest(self) -> None:
        raise _ScriptError(self.error)

    def repr_failure(self, excinfo: pytest.ExceptionInfo[BaseException], style=None) -> str:
        if isinstance(excinfo.value, _ScriptError):
            return str(excinfo.value.error)
        return super().repr_failure(excinfo)

    def reportinfo(self) -> tuple[Path, int, str]:
        line = getattr(self.error, "line", None) or 1
        return self.path, line - 1, f"{self.path.name}: {self.name}"


def failure_text(result: Any) -> str:
    """The failure of one expectation as pytest shows it: where, the line as written (with a
    caret under it), then expected, actual and tolerance in one sentence."""
    expectation = result.expectation
    span = expectation.span
    return (f"{span.file}:{span.line}:{span.column}: expectation does not hold\n"
            f"{span.caret()}\n"
            f"  {result.outcome.message}")
