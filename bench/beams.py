"""Benchmark: coupling efficiency of many tolerance samples of a fibre coupler in one pass.

The layout of examples/fibre_to_fibre_coupler.lay with its gap, both focal lengths and the
receiving fibre's offset drawn per sample (numpy arrays in the System): the beam engine runs
once over all samples. Reported as a ratio measured in one run: the time per sample of the
same engine called sample by sample (floats, a Python loop) divided by the time per sample of
the array pass. Goal >= 100 (N layouts cost one array pass, not N Python calls).
"""

from __future__ import annotations

import sys
from dataclasses import replace
from pathlib import Path

import numpy as np

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(ROOT))

from _timing import best_of  # noqa: E402  (bench/ is on the path when run as a script)
from layoutlang import load  # noqa: E402
from layoutlang.engines.beams import beam_value  # noqa: E402

SAMPLES, LOOPED, REPEATS = 200_000, 400, 5


def sampled(system, rng, count: int):
    gap = 60 + rng.normal(0, 0.5, count)
    powers = [1 / (11 + rng.normal(0, 0.02, count)) for _ in range(2)]
    offset = rng.normal(0, 0.0005, count)
    boundaries = tuple(replace(b, power=p) for b, p in zip(system.boundaries, powers))
    return replace(system, gaps=(gap,), boundaries=boundaries,
                   fibre=replace(system.fibre, place="after", distance=11.0, offset=offset))


def main() -> float:
    system = load(ROOT / "examples" / "fibre_to_fibre_coupler.lay").system
    rng = np.random.default_rng(3)
    many = sampled(system, rng, SAMPLES)
    few = sampled(system, np.random.default_rng(3), LOOPED)
    singles = [replace(few, gaps=(float(few.gaps[0][i]),),
                       boundaries=tuple(replace(b, power=float(b.power[i]))
                                        for b in few.boundaries),
                       fibre=replace(few.fibre, offset=float(few.fibre.offset[i])))
               for i in range(LOOPED)]
    # the array pass and the loop agree sample by sample
    array = beam_value(few, "coupling efficiency")
    for i in (0, LOOPED // 2, LOOPED - 1):
        assert abs(array[i] - beam_value(singles[i], "coupling efficiency")) < 1e-12

    def in_one_pass():
        beam_value(replace(many), "coupling efficiency")  # a new System: nothing cached

    def sample_by_sample():
        for single in singles:
            beam_value(replace(single), "coupling efficiency")

    pass_time, loop_time = best_of(in_one_pass, sample_by_sample, repeats=REPEATS)
    ratio = (loop_time / LOOPED) / (pass_time / SAMPLES)
    print(f"beam coupling, {SAMPLES:.0e} samples in one pass: {pass_time * 1e3:.0f} ms; "
          f"{loop_time / LOOPED * 1e6:.0f} us per sample one by one; ratio = {ratio:.0f} "
          "(goal >= 100)")
    return ratio


if __name__ == "__main__":
    main()
