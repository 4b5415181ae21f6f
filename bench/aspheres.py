"""Benchmark: exact rays through 10 aspheric surfaces against 10 spheres, and the spherical
trace on both cores.

Two ratios, each measured in one run (interleaved best-of, bench/_timing.py):

1. intersections per second through 10 aspheres (conic plus r⁴ … r¹⁰ terms: the Newton path)
   divided by the same through the 10 spheres of the same vertex radii (the closed form).
   Goal >= 0.5.
2. the spherical trace with two threads over its blocks (`trace(workers=2)`) as intersections
   per second divided by elements per second of the single-core numpy `a*x+b` streaming pass
   (as bench/realrays.py). Goal >= 0.08.
"""

from __future__ import annotations

import os
import sys
from dataclasses import replace
from pathlib import Path

import numpy as np

sys.path.insert(0, str(Path(__file__).resolve().parents[1]))

from _timing import best_of  # noqa: E402  (bench/ is on the path when run as a script)
from layoutlang.engines import realrays  # noqa: E402
from realrays import layout  # noqa: E402  (the ten-sphere layout of bench/realrays.py)

RAYS, SURFACES, REPEATS = 1_000_000, 10, 7
WORKERS = 2


def aspheric(system):
    """The same layout with every surface a conic plus invented r⁴ … r¹⁰ terms."""
    boundaries = tuple(
        replace(b, conic=-0.5 + 0.1 * i, even_terms=(1e-6, -2e-9, 3e-12, -1e-15))
        for i, b in enumerate(system.boundaries))
    return replace(system, boundaries=boundaries)


def main() -> tuple[float, float]:
    spheres = layout()
    aspheres = aspheric(spheres)
    rng = np.random.default_rng(1)
    radius = rng.uniform(0, 8.0, RAYS) ** 0.5 * 8.0 ** 0.5
    angle = rng.uniform(0, 2 * np.pi, RAYS)
    x0, y0 = radius * np.cos(angle), radius * np.sin(angle)
    start = (x0, y0, np.full(RAYS, -5.0), rng.uniform(-0.02, 0.02, RAYS),
             rng.uniform(-0.02, 0.02, RAYS), np.ones(RAYS))
    fresh = realrays.Rays.start(*start)
    geo_s, geo_a = realrays.geometry(spheres), realrays.geometry(aspheres)
    indices = spheres.indices()
    for geo in (geo_s, geo_a):
        lost = int((realrays.trace(fresh.copy(), geo, indices).status != realrays.OK).sum())
        assert lost == 0, f"{lost} rays lost in the benchmark layout"
    one = realrays.trace(fresh.copy(), geo_s, indices)
    two = realrays.trace(fresh.copy(), geo_s, indices, workers=WORKERS)
    assert np.array_equal(one.data, two.data), "threads changed the result"
    a, x, b = 1.0001, x0, y0

    def streaming():
        for _ in range(SURFACES):
            a * x + b

    def sphere_trace():
        realrays.trace(fresh.copy(), geo_s, indices)

    def asphere_trace():
        realrays.trace(fresh.copy(), geo_a, indices)

    def threaded_trace():
        realrays.trace(fresh.copy(), geo_s, indices, workers=WORKERS)

    def copying():
        fresh.copy()

    stream, sphere, asphere, threaded, copy = best_of(
        streaming, sphere_trace, asphere_trace, threaded_trace, copying, repeats=REPEATS)
    sphere, asphere, threaded = sphere - copy, asphere - copy, threaded - copy
    ratio = sphere / asphere
    both = stream / threaded
    cores = os.cpu_count()
    print(f"aspheric trace, {RAYS:.0e} rays x {SURFACES} surfaces: {RAYS * SURFACES / asphere:.3g}"
          f" intersections/s; ratio to spheres ({RAYS * SURFACES / sphere:.3g}/s) = {ratio:.3f}"
          f" (goal >= 0.5)")
    print(f"spherical trace on {WORKERS} threads ({cores} cores): "
          f"{RAYS * SURFACES / threaded:.3g} intersections/s; ratio to single-core a*x+b "
          f"streaming = {both:.3f} (goal >= 0.08; one thread: {stream / sphere:.3f})")
    return ratio, both


if __name__ == "__main__":
    main()
