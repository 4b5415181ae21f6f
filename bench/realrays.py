"""Benchmark: exact ray trace of 1e6 rays through 10 spherical surfaces.

Reported as a ratio measured in one run: exact ray-surface intersections per second (each with
its refraction by Snell's law) divided by elements per second of a numpy `a*x+b` streaming pass
over arrays of the same size (1e6). Equivalently: the time of ten `a*x+b` passes over 1e6
elements divided by the time of the trace. Goal >= 0.04.
"""

from __future__ import annotations

import sys
from pathlib import Path

import numpy as np

sys.path.insert(0, str(Path(__file__).resolve().parents[1]))

from _timing import best_of  # noqa: E402  (bench/ is on the path when run as a script)
from layoutlang.engines import realrays  # noqa: E402
from layoutlang.system import Boundary, Medium, System  # noqa: E402

RAYS, SURFACES, REPEATS = 1_000_000, 10, 9


def layout() -> System:
    """Five invented singlets in air: ten spherical surfaces, no clear-diameter limits."""
    radii = [60.0, -250.0, 45.0, 300.0, -80.0, 40.0, 120.0, -90.0, 70.0, -200.0]
    boundaries = tuple(
        Boundary(f"s{i + 1}", 1 / r, "glass" if i % 2 == 0 else "air")
        for i, r in enumerate(radii))
    gaps = tuple(4.0 if i % 2 == 0 else 2.0 for i in range(SURFACES - 1))
    return System((Medium("air", 1.0), Medium("glass", 1.5168)), "air", boundaries, gaps)


def main() -> float:
    system = layout()
    geo = realrays.geometry(system)
    indices = system.indices()
    rng = np.random.default_rng(1)
    radius = rng.uniform(0, 8.0, RAYS) ** 0.5 * 8.0 ** 0.5
    angle = rng.uniform(0, 2 * np.pi, RAYS)
    x0, y0 = radius * np.cos(angle), radius * np.sin(angle)
    start = (x0, y0, np.full(RAYS, -5.0), rng.uniform(-0.02, 0.02, RAYS),
             rng.uniform(-0.02, 0.02, RAYS), np.ones(RAYS))
    fresh = realrays.Rays.start(*start)
    a, x, b = 1.0001, x0, y0

    def streaming():
        for _ in range(SURFACES):
            a * x + b

    def traced():
        realrays.trace(fresh.copy(), geo, indices)

    def copying():
        fresh.copy()

    rays = realrays.trace(fresh.copy(), geo, indices)
    lost = int((rays.status != realrays.OK).sum())
    assert lost == 0, f"{lost} rays lost in the benchmark layout"
    # one ray by the per-ray reference (a single-ray trace) gives the same answer
    one = realrays.trace(realrays.Rays.start(*(np.array([s[7]]) for s in start)), geo, indices)
    assert abs(one.y[0] - rays.y[7]) < 1e-12 and abs(one.ky[0] - rays.ky[7]) < 1e-15
    stream_time, trace_time, copy_time = best_of(streaming, traced, copying, repeats=REPEATS)
    trace_time -= copy_time  # the copy only restores the starting rays
    ratio = stream_time / trace_time
    rate = RAYS * SURFACES / trace_time
    print(f"exact ray trace, {RAYS:.0e} rays x {SURFACES} surfaces: {rate:.3g} "
          f"intersections/s; ratio to a*x+b streaming = {ratio:.3f} (goal >= 0.04)")
    return ratio


if __name__ == "__main__":
    main()
