"""Benchmark: vectorized paraxial trace of 1e6 samples through 10 surfaces.

Reported as a ratio measured in one run: the time of ten numpy `a*x+b` passes over arrays of
1e6 elements (one streaming pass per surface) divided by the time of the trace. Goal >= 0.5.
"""

from __future__ import annotations

import sys
from pathlib import Path

import numpy as np

sys.path.insert(0, str(Path(__file__).resolve().parents[1]))

from _timing import best_of  # noqa: E402  (bench/ is on the path when run as a script)
from layoutlang.engines import paraxial  # noqa: E402
from layoutlang.engines.paraxial import REFRACTION, TRANSFER, Step  # noqa: E402

SAMPLES, SURFACES, REPEATS = 1_000_000, 10, 7


def main() -> float:
    rng = np.random.default_rng(1)
    y0 = rng.uniform(-5, 5, SAMPLES)
    nu0 = rng.uniform(-0.1, 0.1, SAMPLES)
    steps = []
    for i in range(SURFACES):
        steps.append(Step(REFRACTION, 0.01 * (-1) ** i))
        if i < SURFACES - 1:
            steps.append(Step(TRANSFER, 3.0 + i))
    a, x, b = 1.0001, y0, nu0

    def streaming():
        for _ in range(SURFACES):
            a * x + b

    def traced():
        paraxial.trace_samples(y0, nu0, steps)

    # same answer as the scalar algorithm on a few samples
    y, nu = paraxial.trace_samples(y0, nu0, steps)
    for i in (0, SAMPLES // 2, SAMPLES - 1):
        ys, nus = paraxial.trace(float(y0[i]), float(nu0[i]), steps)
        assert abs(ys - y[i]) < 1e-9 and abs(nus - nu[i]) < 1e-12
    stream_time, trace_time = best_of(streaming, traced, repeats=REPEATS)
    ratio = stream_time / trace_time
    print(f"paraxial trace, {SAMPLES:.0e} samples x {SURFACES} surfaces: "
          f"ratio to a*x+b streaming = {ratio:.2f} (goal >= 0.5)")
    return ratio


if __name__ == "__main__":
    main()
