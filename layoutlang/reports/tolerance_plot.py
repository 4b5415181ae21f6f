"""Histograms of the Monte Carlo distribution of each expectation's quantity, with the
expectation's limits drawn (matplotlib, imported only here; deterministic bytes)."""

from __future__ import annotations

import math

__all__ = ["save_histograms", "histogram_figure"]

_BARS = "#5b7fa6"
_LIMIT = "#b5452f"
_NOMINAL = "#2e2e2e"


def _limits(expectation, units: str) -> list[float]:
    from ..checks import to_display

    expected = to_display(expectation.expected, expectation.kind, units)
    if expectation.op != "=":
        return [expected]
    tolerance = expectation.tolerance or 0.0
    allowed = abs(tolerance * expected) if expectation.relative else \
        abs(to_display(tolerance, expectation.kind, units))
    return [expected - allowed, expected + allowed]


def save_histograms(result, units: str, path: str) -> None:
    """Write the histograms to `path` (png, svg or pdf by its suffix)."""
    from pathlib import Path

    from .drawing import figure_bytes

    kind = Path(path).suffix.lower().lstrip(".") or "png"
    Path(path).write_bytes(figure_bytes(lambda: histogram_figure(result, units), kind))


def histogram_figure(result, units: str):
    """One panel per expectation: the units' values, the nominal and the pass limits."""
    import matplotlib.pyplot as plt
    import numpy as np

    from ..checks import display_unit
    from ..testing import format_number

    monte = result.monte_carlo
    expectations = result.expectations
    count = max(1, len(expectations))
    columns = min(3, count)
    rows = math.ceil(count / columns)
    figure, axes = plt.subplots(rows, columns, figsize=(4.2 * columns, 3.0 * rows),
                                squeeze=False)
    for panel, axis in enumerate(axes.flat):
        if panel >= len(expectations):
            axis.set_visible(False)
            continue
        e = expectations[panel]
        values = monte.values[panel]
        values = values[np.isfinite(values)]
        unit = display_unit(e.kind, units)
        low = high = result.nominal[panel]
        if values.size:
            axis.hist(values, bins=40, color=_BARS)
            low, high = float(values.min()), float(values.max())
        span = max(high - low, 1e-12 * max(abs(high), 1.0))
        shown_low, shown_high = low - 0.6 * span, high + 0.6 * span
        far = []
        for limit in _limits(e, units):
            if shown_low - 2 * span <= limit <= shown_high + 2 * span:  # near: widen to show it
                shown_low, shown_high = min(shown_low, limit - 0.1 * span), \
                    max(shown_high, limit + 0.1 * span)
                axis.axvline(limit, color=_LIMIT, linewidth=1.4, linestyle="--")
            else:
                far.append(limit)
        axis.set_xlim(shown_low, shown_high)
        for limit in far:  # a limit far off the distribution: said, not drawn to scale
            left = limit < shown_low
            axis.annotate(f"{'← ' if left else ''}limit {format_number(limit, 4)} {unit}"
                          f"{'' if left else ' →'}".strip(), xy=(0.02 if left else 0.98, 0.92),
                          xycoords="axes fraction", ha="left" if left else "right",
                          fontsize=7, color=_LIMIT)
        axis.axvline(result.nominal[panel], color=_NOMINAL, linewidth=1.0)
        where = f"line {e.span.line}"
        axis.set_title(f"{where}: {e.quantity} — yield "
                       f"{format_number(monte.yields[panel] * 100, 4)} %", fontsize=9)
        axis.set_xlabel(f"{e.quantity} ({unit})" if unit else e.quantity, fontsize=8)
        axis.set_ylabel("units", fontsize=8)
        axis.tick_params(labelsize=7)
        for side in ("top", "right"):
            axis.spines[side].set_visible(False)
    figure.suptitle(f"{monte.samples} built units, seed {monte.seed}: dashed = expectation "
                    f"limits, solid = nominal", fontsize=9)
    figure.tight_layout()
    return figure
