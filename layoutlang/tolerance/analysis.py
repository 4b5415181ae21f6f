"""Will the built lens still meet its expectations? Sensitivity, the root-sum-square
estimate and the Monte Carlo yield of a script's own `expect` lines.

- Sensitivity: each tolerance alone at +limit and −limit (compensators adjusted), the change
  of every expectation's quantity; rows sorted by the largest share of an expectation's margin
  used (margin: the ± tolerance of an '=' line, or the distance from the nominal to a bound).
- Estimate: the standard deviation of each quantity as the root-sum-square of the linear
  sensitivities times each tolerance's standard deviation (statistics, common practice).
- Monte Carlo: N units drawn batch by batch (sampling.py: reproducible for a seed whatever
  runs the batches), each compensated and judged by every expectation; the yield (fraction of
  units meeting all of them) with its 95 % Wilson score interval (Wilson 1927, J. Am. Stat.
  Assoc. 22:209), per-expectation yields, percentiles, and the worst units.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from typing import Any, Callable, Iterable

import numpy as np

from .evaluate import Measured, measure, measured_expectations
from .model import ToleranceItem, ToleranceSetup
from .perturb import colour_perturbed, compensated, image_plane, perturbed
from .sampling import BATCH, batch_generator, batch_sizes, draw, standard_deviation

__all__ = ["SensitivityRow", "MonteCarlo", "ToleranceResult", "analyse", "sensitivity",
           "monte_carlo", "run_batch", "wilson_interval", "margin", "WORST_KEPT", "PERCENTILES"]

WORST_KEPT = 3
PERCENTILES = (1.0, 5.0, 50.0, 95.0, 99.0)
_Z95 = 1.959963984540054  # the two-sided 95 % point of the standard normal


@dataclass(frozen=True)
class SensitivityRow:
    """One tolerance alone at its limits: the change of each expectation's quantity."""

    item: ToleranceItem
    plus: tuple[float, ...]  # value at +limit minus nominal, per expectation (NaN: not computable)
    minus: tuple[float, ...]
    share: float  # the largest |change| as a fraction of that expectation's margin


@dataclass(frozen=True)
class MonteCarlo:
    samples: int  # units judged
    requested: int
    seed: int
    passed_all: int
    yields: tuple[float, ...]  # per expectation
    interval: tuple[float, float]  # Wilson 95 % interval of the overall yield
    percentiles: tuple[tuple[float, ...], ...]  # per expectation, at PERCENTILES
    means: tuple[float, ...]
    deviations: tuple[float, ...]
    not_computed: tuple[int, ...]  # per expectation, units where it could not be computed
    worst: tuple[tuple[int, tuple[float, ...], int], ...]  # (unit, perturbations, failures)
    values: Any = field(default=None, compare=False, repr=False)  # (E, N) for histograms
    passed: Any = field(default=None, compare=False, repr=False)  # (E, N)

    def joint_yield(self, rows: list[int]) -> float:
        """The fraction of units meeting all of these expectations together."""
        if not self.samples:
            return math.nan
        return float(self.passed[rows].all(axis=0).mean())

    @property
    def partial(self) -> bool:
        return self.samples < self.requested

    @property
    def yield_all(self) -> float:
        return self.passed_all / self.samples if self.samples else math.nan


@dataclass(frozen=True)
class ToleranceResult:
    setup: ToleranceSetup
    expectations: tuple[Any, ...]  # those a unit is judged by (not the yields)
    nominal: tuple[float, ...]  # each expectation's value on the nominal layout
    margins: tuple[float, ...]
    rows: tuple[SensitivityRow, ...]  # worst first
    estimate: tuple[float, ...]  # RSS standard deviation per expectation
    monte_carlo: MonteCarlo | None
    one_by_one: tuple[str, ...]  # expectations evaluated unit by unit (not batched)


def wilson_interval(successes: int, trials: int, z: float = _Z95) -> tuple[float, float]:
    """The Wilson score interval for a binomial proportion (Wilson 1927)."""
    if trials == 0:
        return (0.0, 1.0)
    p = successes / trials
    z2 = z * z / trials
    centre = (p + z2 / 2) / (1 + z2)
    half = z / (1 + z2) * math.sqrt(p * (1 - p) / trials + z * z / (4 * trials * trials))
    return (max(0.0, centre - half), min(1.0, centre + half))


def margin(expectation, nominal: float, units: str) -> float:
    """How far an expectation's quantity may still move before it fails (display units): the
    room left inside an '=' line's tolerance, or the distance from the nominal to a bound."""
    from ..checks import to_display

    expected = to_display(expectation.expected, expectation.kind, units)
    if not math.isfinite(nominal):
        return math.nan
    if expectation.op == "=":
        tolerance = expectation.tolerance or 0.0
        allowed = abs(tolerance * expected) if expectation.relative else \
            abs(to_display(tolerance, expectation.kind, units))
        return max(allowed - abs(nominal - expected), 0.0)
    return abs(nominal - expected)


class _Units:
    """The built units of one set of perturbations: one batch System and each unit alone."""

    def __init__(self, program, deltas: np.ndarray, plane) -> None:
        self.program = program
        self.deltas = deltas
        self.plane = plane
        setup = program.tolerances
        nominal = program.system
        with np.errstate(all="ignore"):
            self.batch = compensated(perturbed(nominal, setup.items, deltas),
                                     setup.compensators, plane, nominal)

    def unit(self, index: int):
        setup = self.program.tolerances
        nominal = self.program.system
        with np.errstate(all="ignore"):
            return compensated(perturbed(nominal, setup.items, self.deltas[:, index]),
                               setup.compensators, self.plane, nominal)

    def measure(self) -> Measured:
        return measure(self.program, self.batch, self.unit, self.deltas.shape[1])


def _nominal_values(program, plane) -> np.ndarray:
    zero = np.zeros((len(program.tolerances.items), 1))
    return _Units(program, zero, plane).measure().values[:, 0]


def sensitivity(program, plane, nominal: np.ndarray) -> tuple[tuple[SensitivityRow, ...],
                                                               tuple[float, ...]]:
    """Each tolerance alone at ± its limit (one batch of 2 × items units) and the RSS estimate."""
    items = program.tolerances.items
    expectations = measured_expectations(program)
    m = len(items)
    deltas = np.zeros((m, 2 * m))
    for j, item in enumerate(items):
        deltas[j, 2 * j], deltas[j, 2 * j + 1] = item.limit, -item.limit
    values = _Units(program, deltas, plane).measure().values
    units = program.system.units
    margins = [margin(e, float(v), units) for e, v in zip(expectations, nominal)]
    rows = []
    variance = np.zeros(len(expectations))
    for j, item in enumerate(items):
        plus = _change(values[:, 2 * j], nominal)
        minus = _change(values[:, 2 * j + 1], nominal)
        with np.errstate(all="ignore"):
            shares = np.fmax(np.abs(plus), np.abs(minus)) / np.asarray(margins)
            shares = np.where(np.fmax(np.abs(plus), np.abs(minus)) == 0, 0.0, shares)
            slope = (plus - minus) / (2 * item.limit)
        variance += np.nan_to_num(slope * standard_deviation(item)) ** 2
        share = float(np.nanmax(shares)) if np.isfinite(shares).any() else math.inf
        rows.append(SensitivityRow(item, tuple(map(float, plus)), tuple(map(float, minus)),
                                   share))
    rows.sort(key=lambda r: (-r.share if math.isfinite(r.share) else -math.inf, r.item.line))
    return tuple(rows), tuple(map(float, np.sqrt(variance)))


def _change(values: np.ndarray, nominal: np.ndarray) -> np.ndarray:
    """values − nominal, with rounding noise (below 1e-10 of the value) shown as no change."""
    change = values - nominal
    return np.where(np.abs(change) <= 1e-10 * np.fmax(np.abs(nominal), 1.0), 0.0, change)


def run_batch(program, index: int, size: int, plane) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Batch `index` of a Monte Carlo run: (perturbations (items, size), values (E, size),
    passed (E, size)) — a pure function of the program, its seed and the batch index."""
    setup = program.tolerances
    deltas = draw(setup.items, size, batch_generator(setup.seed, index))
    found = _Units(program, deltas, plane).measure()
    return deltas, found.values, found.passed


def monte_carlo(program, plane, samples: int | None = None, seed: int | None = None,
                runner: Callable[[Iterable[tuple[int, int]]], Iterable] | None = None,
                progress: Callable[[int, int], None] | None = None) -> MonteCarlo:
    """Judge `samples` built units (default: the script's), batch by batch; Ctrl-C stops with
    the units judged so far (the result then says it is partial)."""
    from dataclasses import replace

    setup = program.tolerances
    if samples is not None or seed is not None:
        setup = replace(setup, samples=samples or setup.samples,
                        seed=setup.seed if seed is None else seed)
        program = replace(program, tolerances=setup)
    sizes = batch_sizes(setup.samples)
    jobs = list(enumerate(sizes))
    if runner is None:
        runner = lambda jobs: (run_batch(program, i, n, plane) for i, n in jobs)  # noqa: E731
    parts = []
    try:
        for done, part in enumerate(runner(jobs), 1):
            parts.append(part)
            if progress is not None:
                progress(done, len(jobs))
    except KeyboardInterrupt:
        pass
    return _summary(program, setup, parts)


def _summary(program, setup: ToleranceSetup, parts) -> MonteCarlo:
    expectations = measured_expectations(program)
    count = len(expectations)
    if parts:
        deltas = np.concatenate([p[0] for p in parts], axis=1)
        values = np.concatenate([p[1] for p in parts], axis=1)
        passed = np.concatenate([p[2] for p in parts], axis=1)
    else:
        deltas = np.zeros((len(setup.items), 0))
        values = np.zeros((count, 0))
        passed = np.zeros((count, 0), bool)
    n = values.shape[1]
    all_pass = passed.all(axis=0) if count else np.ones(n, bool)
    failures = (~passed).sum(axis=0)
    order = np.lexsort((np.arange(n), -failures))[:WORST_KEPT] if n else []
    worst = tuple((int(u), tuple(map(float, deltas[:, u])), int(failures[u]))
                  for u in order if failures[u] > 0)
    with np.errstate(all="ignore"):
        percentiles = tuple(
            tuple(map(float, np.nanpercentile(row, PERCENTILES))) if np.isfinite(row).any()
            else tuple([math.nan] * len(PERCENTILES)) for row in values)
        means = tuple(float(np.nanmean(r)) if np.isfinite(r).any() else math.nan for r in values)
        deviations = tuple(_spread(r) for r in values)
    passed_all = int(all_pass.sum())
    return MonteCarlo(
        samples=n, requested=setup.samples, seed=setup.seed, passed_all=passed_all,
        yields=tuple(float(p.mean()) if n else math.nan for p in passed),
        interval=wilson_interval(passed_all, n), percentiles=percentiles, means=means,
        deviations=deviations, not_computed=tuple(int((~np.isfinite(r)).sum()) for r in values),
        worst=worst, values=values, passed=passed)


def _spread(values: np.ndarray) -> float:
    """The standard deviation of the computable values; rounding noise (below 1e-10 of the
    mean) is no spread at all."""
    if not np.isfinite(values).any():
        return math.nan
    spread = float(np.nanstd(values))
    return 0.0 if spread <= 1e-10 * max(abs(float(np.nanmean(values))), 1.0) else spread


def analyse(program, monte: bool = True, samples: int | None = None, seed: int | None = None,
            runner=None, progress=None) -> ToleranceResult:
    """Sensitivity, estimate and (with `monte`) the Monte Carlo run of a program."""
    from .evaluate import batched

    setup = program.tolerances
    expectations = measured_expectations(program)
    plane = image_plane(program.system)
    nominal = _nominal_values(program, plane)
    rows, estimate = sensitivity(program, plane, nominal)
    margins = tuple(margin(e, float(v), program.system.units)
                    for e, v in zip(expectations, nominal))
    result = monte_carlo(program, plane, samples, seed, runner, progress) if monte else None
    one_by_one = tuple(e.text for e in expectations if not batched(program, e))
    return ToleranceResult(setup, tuple(expectations), tuple(map(float, nominal)), margins,
                           rows, estimate, result, one_by_one)
