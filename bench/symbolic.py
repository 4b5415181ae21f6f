"""Benchmark: closed-form image distance of all-symbolic layouts, ours against the naive route.

Measured side by side in one run. Ours: the layout's numbers become exact ring ratios and the
numeric engine's own paraxial code runs on them (`layoutlang.symbolic.layout`), then the result
is reduced once (`canonical`); conversion to a sympy expression ("printed") is timed apart
because `derive` only does it for forms small enough to read. The naive route: the product of
`sympy.physics.optics` ray-transfer matrices (object gap, refractions, gaps, unknown image gap),
`solve` for the image gap that makes the B element vanish, then `simplify`, each size run in a
child process with a time limit.

Goals (issue 3), radii, gaps, indices and object distance all symbolic: canonical image
distance for 6 surfaces < 50 ms and for 8 surfaces < 0.5 s; the structured (named
intermediates) form for 10 surfaces < 0.1 s; a 10-surface numeric layout with only the object
distance symbolic < 5 ms.

    python bench/symbolic.py [--naive-limit SECONDS] [--naive-sizes 1,2,4,6]
"""

from __future__ import annotations

import argparse
import multiprocessing as mp
import sys
import time
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parents[1]))

import sympy as sp  # noqa: E402
from _timing import best_of  # noqa: E402  (bench/ is on the path when run as a script)

from layoutlang.system import Boundary, Medium, ObjectSpec, System  # noqa: E402
from layoutlang.symbolic import convert, flintring  # noqa: E402
from layoutlang.symbolic.derive import PRINT_TERMS  # noqa: E402
from layoutlang.symbolic.layout import SymbolicLayout  # noqa: E402
from layoutlang.symbolic.structured import structured_form  # noqa: E402

REPEATS = 5


def symbolic_layout(k: int) -> tuple[System, list]:
    """k refracting surfaces, every radius, gap, index and the object distance a symbol."""
    radii = sp.symbols(f"R1:{k + 1}", real=True)
    indices = sp.symbols(f"n0:{k + 1}", positive=True)
    gaps = sp.symbols(f"d1:{k}", positive=True)
    a = sp.Symbol("a", positive=True)
    media = tuple(Medium(f"m{i}", indices[i]) for i in range(k + 1))
    boundaries = tuple(Boundary(f"s{i + 1}", 1 / radii[i], f"m{i + 1}") for i in range(k))
    system = System(media, "m0", boundaries, tuple(gaps), ObjectSpec(a, 0, 0))
    return system, list(indices) + list(radii) + list(gaps) + [a]


def numeric_layout(k: int) -> tuple[System, list]:
    """k surfaces with written numbers (exact decimals), only the object distance symbolic."""
    glass = [sp.Rational("1.5168"), sp.Rational("1.6200"), sp.Rational("1.7174")]
    media = [Medium("air", sp.Integer(1))] + [Medium(f"g{i}", glass[i % 3]) for i in range(3)]
    boundaries = []
    for i in range(k):
        into = "air" if i % 2 else f"g{(i // 2) % 3}"
        radius = sp.Rational(f"{(-1) ** i * (40 + 7.3 * i):.1f}")
        boundaries.append(Boundary(f"s{i + 1}", 1 / radius, into))
    gaps = tuple(sp.Rational(f"{2.5 + 0.4 * i:.1f}") for i in range(k - 1))
    a = sp.Symbol("a", positive=True)
    return System(tuple(media), "air", tuple(boundaries), gaps, ObjectSpec(a, 0, 0)), [a]


def best(function) -> float:
    # no help from sympy's cache between repeats
    return best_of(function, repeats=REPEATS, before=sp.core.cache.clear_cache)[0]


def ours(system: System, symbols: list, backend: str) -> tuple[float, int, object]:
    result = {}

    def run():
        layout = SymbolicLayout(system, symbols, {})
        reduced, _ = layout.quantity("image distance").canonical()
        result["value"] = reduced

    convert.BACKEND = backend
    try:
        seconds = best(run)
    finally:
        convert.BACKEND = "auto"
    return seconds, result["value"].terms(), result["value"]


def naive_child(k: int, queue) -> None:
    """The naive route for k surfaces; puts (seconds, expression) on the queue."""
    from sympy.physics.optics import CurvedRefraction, FreeSpace

    start = time.perf_counter()
    radii = sp.symbols(f"R1:{k + 1}", real=True)
    indices = sp.symbols(f"n0:{k + 1}", positive=True)
    gaps = sp.symbols(f"d1:{k}", positive=True)
    a, x = sp.Symbol("a", positive=True), sp.Symbol("x")
    matrix = FreeSpace(a)
    for i in range(k):
        matrix = CurvedRefraction(radii[i], indices[i], indices[i + 1]) * matrix
        if i < k - 1:
            matrix = FreeSpace(gaps[i]) * matrix
    matrix = FreeSpace(x) * matrix
    roots = sp.solve(sp.Eq(matrix[0, 1], 0), x)
    image = sp.simplify(roots[0])
    queue.put((time.perf_counter() - start, image))


def naive(k: int, limit: float) -> tuple[float | None, object]:
    context = mp.get_context("fork" if sys.platform != "win32" else "spawn")
    queue = context.Queue()
    child = context.Process(target=naive_child, args=(k, queue))
    child.start()
    child.join(limit)
    if child.is_alive():
        child.terminate()
        child.join()
        return None, None
    seconds, expression = queue.get()  # sympy expressions pickle between processes
    return seconds, expression


def main() -> int:
    parser = argparse.ArgumentParser(description=__doc__.split("\n")[0])
    parser.add_argument("--naive-limit", type=float, default=60.0)
    parser.add_argument("--naive-sizes", default="1,2,4,6")
    args = parser.parse_args()
    naive_sizes = [int(s) for s in args.naive_sizes.split(",") if s]

    goals = {6: 0.050, 8: 0.5}
    rows = []
    failed = False
    fast = flintring.available()
    for k in (1, 2, 4, 6, 8):
        system, symbols = symbolic_layout(k)
        plain_seconds, terms, reduced = ours(system, symbols, "sympy")
        seconds = ours(system, symbols, "flint")[0] if fast else plain_seconds
        printed = None
        if terms <= 4 * PRINT_TERMS:
            start = time.perf_counter()
            expression = reduced.to_expr(factor=False)
            printed = time.perf_counter() - start
        naive_seconds, agree = None, ""
        if k in naive_sizes:
            naive_seconds, naive_expr = naive(k, args.naive_limit)
            if naive_expr is not None and printed is not None:
                same = sp.cancel(sp.together(expression - naive_expr)) == 0
                agree = "same" if same else "DIFFERENT"
                failed |= not same
        goal = goals.get(k)
        met = "" if goal is None else ("met" if seconds < goal else "MISSED")
        rows.append([str(k), f"{plain_seconds * 1e3:.1f} ms",
                     f"{seconds * 1e3:.1f} ms" if fast else "not installed", str(terms),
                     "-" if printed is None else f"{printed * 1e3:.0f} ms",
                     "-" if k not in naive_sizes else (
                         f"> {args.naive_limit:g} s" if naive_seconds is None
                         else f"{naive_seconds:.2f} s"),
                     agree, "" if goal is None else f"< {goal * 1e3:g} ms {met}"])

    print("closed-form image distance, all radii, gaps, indices and object distance symbolic")
    head = ["surfaces", "ours, sympy rings", "ours, python-flint", "terms", "ours printed",
            "naive route", "agree", "goal"]
    table = [head] + rows
    widths = [max(len(r[i]) for r in table) for i in range(len(head))]
    for row in table:
        print("  " + "  ".join(c.ljust(w) for c, w in zip(row, widths)).rstrip())

    system, _ = symbolic_layout(10)
    seconds = best(lambda: structured_form(system, "image distance"))
    ok = seconds < 0.1
    print(f"structured form, 10 all-symbolic surfaces: {seconds * 1e3:.1f} ms "
          f"(goal < 100 ms {'met' if ok else 'MISSED'})")
    if not fast:
        print("(python-flint not installed: the goals are judged on sympy's rings)")
    system, symbols = numeric_layout(10)
    seconds = best(lambda: SymbolicLayout(system, symbols, {}).quantity("image distance")
                   .canonical()[0].to_expr())
    ok2 = seconds < 0.005
    print(f"10 numeric surfaces, object distance symbolic, printed: {seconds * 1e3:.2f} ms "
          f"(goal < 5 ms {'met' if ok2 else 'MISSED'})")
    return 1 if failed else 0


if __name__ == "__main__":
    sys.exit(main())
