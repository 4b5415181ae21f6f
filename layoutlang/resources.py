"""Locate the top-level `grammar/` and `stdlib/` folders, in a source tree or in a wheel.

In the source tree (and an editable install) they sit beside the package; a built wheel copies
them to `layoutlang/_data/`. The marker file decides, so an unrelated folder of the same name
on the path is never picked up.
"""

from __future__ import annotations

from functools import cache
from pathlib import Path

__all__ = ["grammar_file", "stdlib_dir"]

_PACKAGE = Path(__file__).resolve().parent


def _find(folder: str, marker: str) -> Path:
    for base in (_PACKAGE.parent, _PACKAGE / "_data"):
        candidate = base / folder
        if (candidate / marker).is_file():
            return candidate
    raise FileNotFoundError(f"layoutlang is installed without its {folder}/ folder")


@cache
def grammar_file() -> Path:
    """The path of the grammar (`grammar/layoutlang.lark`)."""
    return _find("grammar", "layoutlang.lark") / "layoutlang.lark"


@cache
def stdlib_dir() -> Path:
    """The folder of the standard library scripts loaded with `use NAME`."""
    return _find("stdlib", "README.md")
