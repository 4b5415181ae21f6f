"""Monte Carlo tolerance run, batched versus one layout at a time.

10 000 built units of a 10-surface layout (radii, gaps and indices toleranced, the image plane
refocused per unit, three first-order expectations judged): the batched engine (one array
pass per batch of units) against the same work as a Python loop of single-layout evaluations
(perturb, refocus, evaluate, compare). Both are measured in this run; the ratio is the figure.
Goal: batched ≥ 20× the loop.
"""

from __future__ import annotations

import sys
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent))
sys.path.insert(0, str(Path(__file__).resolve().parent.parent))

import numpy as np  # noqa: E402

from _timing import best_of  # noqa: E402
from layoutlang import loads  # noqa: E402
from layoutlang.checks import check_program  # noqa: E402
from layoutlang.tolerance.analysis import monte_carlo  # noqa: E402
from layoutlang.tolerance.perturb import compensated, image_plane, perturbed  # noqa: E402
from layoutlang.tolerance.sampling import batch_generator, draw  # noqa: E402

SAMPLES = 10_000
LOOPED = 1_000  # the loop is timed on fewer units and scaled: it is linear in units


def script() -> str:
    lines = ["layout \"bench: ten surfaces\"", "medium glass index 1.6, abbe number 50",
             "object 500 before, height 10", "start in air"]
    radii = [60, -200, -40, 45, 120, -50, 80, -300, 35, 70]
    for i, r in enumerate(radii):
        into = "glass" if i % 2 == 0 else "air"
        lines.append(f"surface s{i} radius {r} into {into}")
        if i < len(radii) - 1:
            lines.append(f"gap {4 if i % 2 == 0 else 2}")
    lines += ["stop at s4, diameter 10", "image at focus",
              "expect focal length > 1", "expect f-number > 0.6", "expect magnification < 0"]
    for i in range(10):
        lines.append(f"tolerance radius of s{i} ± 0.2%")
    for i in range(9):
        lines.append(f"tolerance gap after s{i} ± 0.02 mm")
    lines += ["tolerance index of glass ± 0.0005", "compensate focus",
              f"monte carlo {SAMPLES} samples, seed 3", "expect yield > 1%"]
    return "\n".join(lines) + "\n"


def main() -> None:
    from dataclasses import replace

    program = loads(script(), "bench.lay")
    setup = program.tolerances
    plane = image_plane(program.system)
    measured = tuple(e for e in program.expectations if e.request is None)

    def batched():
        monte_carlo(program, plane)

    def looped():
        deltas = draw(setup.items, LOOPED, batch_generator(setup.seed, 0))
        for unit in range(LOOPED):
            system = compensated(perturbed(program.system, setup.items, deltas[:, unit]),
                                 setup.compensators, plane, program.system)
            check_program(replace(program, system=system, expectations=measured,
                                  tolerances=None))

    with np.errstate(all="ignore"):
        fast, slow = best_of(batched, looped, repeats=3)
    slow_per_unit = slow / LOOPED
    fast_per_unit = fast / SAMPLES
    print(f"monte carlo, 10 surfaces, refocus, 3 expectations: batched {fast * 1e3:.0f} ms for "
          f"{SAMPLES} units ({SAMPLES / fast:,.0f} units/s); loop {slow_per_unit * 1e6:.0f} µs "
          f"per unit ({1 / slow_per_unit:,.0f} units/s)")
    print(f"batched ÷ loop speed-up: {slow_per_unit / fast_per_unit:.1f}× (goal ≥ 20×)")


if __name__ == "__main__":
    main()
