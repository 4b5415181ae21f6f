"""House rules that keep the pipeline one-way: engines return numbers and states (they import
no formatter or report), the interpreter builds data and renders nothing."""

from __future__ import annotations

import ast
from pathlib import Path

import layoutlang

PACKAGE = Path(layoutlang.__file__).parent


def _imports(path: Path) -> set[str]:
    """Every module a source file imports (relative imports resolved against the package)."""
    tree = ast.parse(path.read_text(encoding="utf-8"))
    parts = path.relative_to(PACKAGE.parent).with_suffix("").parts[:-1]
    found = set()
    for node in ast.walk(tree):
        if isinstance(node, ast.Import):
            found |= {alias.name for alias in node.names}
        elif isinstance(node, ast.ImportFrom):
            base = list(parts[: len(parts) - node.level + 1]) if node.level else []
            module = ".".join(base + ([node.module] if node.module else []))
            found.add(module)
            found |= {f"{module}.{alias.name}" for alias in node.names}
    return found


def test_engines_import_no_formatter_and_no_report() -> None:
    for path in sorted((PACKAGE / "engines").glob("*.py")):
        bad = {m for m in _imports(path)
               if m.startswith(("layoutlang.testing", "layoutlang.reports", "layoutlang.notebook"))}
        assert not bad, f"{path.name} imports {sorted(bad)}"


def test_the_interpreter_renders_nothing() -> None:
    for path in sorted((PACKAGE / "interpret").glob("*.py")):
        bad = {m for m in _imports(path)
               if m.startswith(("layoutlang.notebook", "layoutlang.reports"))}
        assert not bad, f"{path.name} imports {sorted(bad)}"
