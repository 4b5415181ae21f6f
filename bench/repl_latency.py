"""Benchmark: latency of one edit in the interactive session on a 50-surface layout.

Measures `Workspace.run("change sNN radius to R")`: the edit, re-interpretation of the whole
layout (written back as text and parsed again), first-order evaluation, the expectations and
the before → after text — everything between pressing Enter and the report. Also `undo`.
Prints the median and the worst of many edits. Goal: median < 50 ms.
"""

from __future__ import annotations

import statistics
import sys
import time
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent.parent))

from layoutlang.repl.workspace import Workspace  # noqa: E402
from layoutlang.syntax.parser import parse  # noqa: E402

SURFACES = 50
EDITS = 60
GOAL_MS = 50.0


def layout_text(surfaces: int = SURFACES) -> str:
    """An invented 50-surface numeric relay (25 thin-ish elements), for timing only."""
    lines = ['layout "fifty-surface latency layout"', "medium crown index 1.52",
             "medium flint index 1.62", "object 500 before, height 10", "start in air"]
    for i in range(surfaces):
        into = ("crown" if i % 4 == 0 else "flint") if i % 2 == 0 else "air"
        lines.append(f"surface s{i} radius {(-1) ** i * (60 + 2 * i)} into {into}")
        if i < surfaces - 1:
            lines.append(f"gap {1.5 + i % 3}")
    lines += ["stop at s10, diameter 8", "image at focus",
              "expect focal length > -100000", "expect f-number < 1000"]
    return "\n".join(lines) + "\n"


def main() -> int:
    workspace = Workspace(parse(layout_text()).statements)
    workspace.run("change s1 radius to -61")  # warm caches (parser, imports)
    edit_ms, undo_ms = [], []
    for k in range(EDITS):
        command = f"change s{k % SURFACES} radius to {(-1) ** k * (70 + k)}"
        start = time.perf_counter()
        out = workspace.run(command)
        edit_ms.append((time.perf_counter() - start) * 1000)
        assert "error" not in out, out
        start = time.perf_counter()
        workspace.run("undo")
        undo_ms.append((time.perf_counter() - start) * 1000)
    median = statistics.median(edit_ms)
    print(f"repl edit -> updated report, {SURFACES} surfaces: median {median:.1f} ms, "
          f"worst {max(edit_ms):.1f} ms over {EDITS} edits (goal < {GOAL_MS:.0f} ms)")
    print(f"undo: median {statistics.median(undo_ms):.2f} ms")
    return 0 if median < GOAL_MS else 1


if __name__ == "__main__":
    sys.exit(main())
