"""Random perturbations, drawn reproducibly batch by batch.

A run of N samples is split into batches of `BATCH` samples; batch b draws from its own
generator, child b of `numpy.random.SeedSequence(seed)`. A batch is therefore a pure function
of (layout, seed, batch index): one process, two threads or a cluster of machines give the
same numbers for the same seed, whatever order the batches finish in.
"""

from __future__ import annotations

import math

import numpy as np

from .model import END_POINTS, NORMAL, UNIFORM, ToleranceItem

__all__ = ["BATCH", "batch_sizes", "batch_generator", "draw", "standard_deviation"]

#: Samples per batch: large enough that the array pass dominates, small enough for memory.
BATCH = 1024


def batch_sizes(samples: int) -> list[int]:
    """The sizes of the batches a run of `samples` is split into (the last may be short)."""
    full, rest = divmod(samples, BATCH)
    return [BATCH] * full + ([rest] if rest else [])


def batch_generator(seed: int, index: int) -> np.random.Generator:
    """Batch `index`'s own generator: child `index` of SeedSequence(seed)."""
    return np.random.Generator(np.random.PCG64(np.random.SeedSequence(seed, spawn_key=(index,))))


def draw(items: tuple[ToleranceItem, ...], count: int, rng: np.random.Generator) -> np.ndarray:
    """Perturbations, shape (len(items), count), in each item's own terms (a length, an index
    step, or a fraction of the nominal value for relative items)."""
    found = np.empty((len(items), count))
    for row, item in enumerate(items):
        if item.distribution == UNIFORM:
            found[row] = rng.uniform(-1.0, 1.0, count) * item.limit
        elif item.distribution == END_POINTS:
            found[row] = np.where(rng.random(count) < 0.5, -1.0, 1.0) * item.limit
        elif item.distribution == NORMAL:
            found[row] = _truncated_normal(rng, count, item.sigmas) * (item.limit / item.sigmas)
        else:  # the interpreter allows only the three
            raise ValueError(item.distribution)
    return found


def _truncated_normal(rng: np.random.Generator, count: int, sigmas: float) -> np.ndarray:
    """Standard normal numbers within ± sigmas, by redrawing those outside (deterministic for
    a given generator state)."""
    values = rng.standard_normal(count)
    outside = np.abs(values) > sigmas
    while outside.any():
        values[outside] = rng.standard_normal(int(outside.sum()))
        outside = np.abs(values) > sigmas
    return values


def standard_deviation(item: ToleranceItem) -> float:
    """The standard deviation of an item's distribution: L/√3 uniform, L end points, and for a
    normal truncated at k σ: σ·sqrt(1 − 2kφ(k)/(2Φ(k) − 1)) with σ = L/k (the truncated normal's
    variance; e.g. Johnson, Kotz & Balakrishnan 1994, Continuous Univariate Distributions)."""
    if item.distribution == UNIFORM:
        return item.limit / math.sqrt(3.0)
    if item.distribution == END_POINTS:
        return item.limit
    k = item.sigmas
    density = math.exp(-k * k / 2) / math.sqrt(2 * math.pi)
    inside = math.erf(k / math.sqrt(2))  # 2Φ(k) − 1
    return item.limit / k * math.sqrt(1 - 2 * k * density / inside)
