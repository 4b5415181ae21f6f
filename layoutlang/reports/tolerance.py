"""The tolerance analysis in words (text section) and as data (JSON), for `run`, `report`
and `layoutlang tolerance`."""

from __future__ import annotations

import math

from ..testing import format_number

__all__ = ["tolerance_lines", "tolerance_blocks", "tolerance_json", "limit_words", "perturbation_words"]


def _num(value: float, signed: bool = False) -> str:
    if value is None or not math.isfinite(value):
        return "cannot be computed"
    text = format_number(value, 4)
    return ("+" + text if signed and value > 0 else text)


def _percent(value: float) -> str:
    if not math.isfinite(value):
        return "cannot be computed"
    return f"{format_number(value * 100, 4)} %"


def limit_words(item, units: str) -> str:
    if item.relative:
        return f"± {format_number(item.limit * 100)} %"
    if item.target == "tilt":
        return f"± {format_number(math.degrees(item.limit) * 60)} arcmin"
    unit = {"radius": units, "gap": units, "clear diameter": units, "decenter": units,
            "curvature": f"1/{units}"}.get(item.target, "")
    return f"± {format_number(item.limit)} {unit}".rstrip()


def perturbation_words(item, delta: float, units: str) -> str:
    if item.relative:
        return f"{item.label} {_num(delta * 100, True)} %"
    if item.target == "tilt":
        return f"{item.label} {_num(math.degrees(delta) * 60, True)} arcmin"
    unit = {"radius": units, "gap": units, "clear diameter": units,
            "decenter": units}.get(item.target, "")
    return f"{item.label} {_num(delta, True)} {unit}".rstrip()


def _unit(expectation, units: str) -> str:
    from ..checks import display_unit

    return display_unit(expectation.kind, units)


def _label(expectation, file: str = "") -> str:
    """'line 12: focal length', or 'other.lay:12: …' for a line of a used file."""
    from pathlib import Path

    span = expectation.span
    where = f"line {span.line}" if not file or span.file == file else \
        f"{Path(span.file).name}:{span.line}"
    return f"{where}: {expectation.quantity}"


def tolerance_lines(result, units: str, file: str = "") -> list[str]:
    """The section as text lines (what `layoutlang tolerance` prints)."""
    from .blocks import to_text

    return to_text(tolerance_blocks(result, units, file))


def tolerance_blocks(result, units: str, file: str = "") -> list:
    """The section as report blocks (the text report and the documents print the same);
    `file`: the script's own file, so that expectations from used files are named by theirs."""
    from .blocks import Heading, Line, Table

    setup = result.setup
    count = len(setup.items)
    out = [Heading("tolerances")]
    adjusted = ", ".join(c.label for c in setup.compensators) or "nothing (no compensator)"
    out.append(Line(f"{count} toleranced number{'s' if count != 1 else ''}; adjusted on every "
                    f"unit: {adjusted}"))
    if setup.compensators:
        out.append(Line("compensation is paraxial: the image plane to each unit's paraxial "
                        "focus, or a gap until the unit's paraxial image lands on the image "
                        "plane"))
    expectations = result.expectations
    if not expectations:
        out.append(Line("the script states no expectation to judge a built unit by"))
        return out
    out.append(Heading("tolerance sensitivity: each tolerance alone at + and − its limit, "
                       "worst first (share: of the expectation's margin)"))
    header = ["tolerance", "limit", "share"] + [
        f"{_label(e, file)} ({_unit(e, units)})".replace(" ()", "") for e in expectations]
    rows = [header]
    for row in result.rows:
        cells = [row.item.label, limit_words(row.item, units), _percent(row.share)]
        for plus, minus in zip(row.plus, row.minus):
            cells.append(f"{_num(plus, True)} / {_num(minus, True)}")
        rows.append(cells)
    out.append(Table(rows))
    out.append(Heading("tolerance estimate: standard deviation as the root-sum-square of the "
                       "linear sensitivities"))
    rows = [["expectation", "nominal", "std dev", "margin"]]
    for e, nominal, sigma, room in zip(expectations, result.nominal, result.estimate,
                                       result.margins):
        unit = _unit(e, units)
        rows.append([_label(e, file), f"{_num(nominal)} {unit}".rstrip(), _num(sigma),
                     _num(room)])
    out.append(Table(rows))
    monte = result.monte_carlo
    if monte is None:
        return out
    state = (f"PARTIAL: stopped after {monte.samples} of {monte.requested} units"
             if monte.partial else f"{monte.samples} units")
    out.append(Heading(f"monte carlo: {state}, seed {monte.seed} (each batch of units seeded "
                       f"on its own: the same numbers on any number of workers)"))
    low, high = monte.interval
    out.append(Line(f"yield (every expectation met): {_percent(monte.yield_all)} "
                    f"({monte.passed_all} of {monte.samples}; 95 % Wilson interval "
                    f"{_percent(low)} to {_percent(high)})"))
    rows = [["expectation", "yield", "mean", "std dev", "1 %", "5 %", "50 %", "95 %", "99 %"]]
    for i, e in enumerate(expectations):
        rows.append([_label(e, file), _percent(monte.yields[i]), _num(monte.means[i]),
                     _num(monte.deviations[i])] + [_num(p) for p in monte.percentiles[i]])
    out.append(Table(rows))
    for i, e in enumerate(expectations):
        if monte.not_computed[i]:
            out.append(Line(f"note: {_label(e, file)} could not be computed for "
                            f"{monte.not_computed[i]} units (counted as failing)"))
    if result.one_by_one:
        out.append(Line("note: taken unit by unit (not in the batched paraxial pass): "
                        + "; ".join(result.one_by_one)))
    if monte.worst:
        out.append(Line("worst units:"))
        for unit, deltas, failures in monte.worst:
            moved = ", ".join(perturbation_words(item, d, units)
                              for item, d in zip(setup.items, deltas))
            out.append(Line(f"unit {unit + 1}: fails {failures} expectation"
                            f"{'s' if failures != 1 else ''}; {moved}", "    "))
    return out


def tolerance_json(result) -> dict:
    """The analysis as data (numbers rounded to 12 significant digits, none non-finite)."""
    from .machine import round12

    def number(value):
        return round12(value) if value is not None and math.isfinite(value) else None

    setup = result.setup
    data = {
        "tolerances": [{"on": item.label, "limit": number(item.limit),
                        "relative": item.relative, "distribution": item.distribution,
                        "sigmas": number(item.sigmas) if item.distribution == "normal" else None,
                        "line": item.line} for item in setup.items],
        "compensators": [c.label for c in setup.compensators],
        "expectations": [{"line": e.span.line, "quantity": e.quantity, "text": e.text,
                          "nominal": number(n), "estimated_std_dev": number(s),
                          "margin": number(m)}
                         for e, n, s, m in zip(result.expectations, result.nominal,
                                               result.estimate, result.margins)],
        "sensitivity": [{"on": row.item.label, "share_of_margin": number(row.share),
                         "plus": [number(v) for v in row.plus],
                         "minus": [number(v) for v in row.minus]} for row in result.rows],
    }
    monte = result.monte_carlo
    if monte is not None:
        data["monte_carlo"] = {
            "samples": monte.samples, "requested": monte.requested, "partial": monte.partial,
            "seed": monte.seed, "yield": number(monte.yield_all),
            "wilson_95": [number(v) for v in monte.interval],
            "per_expectation": [{"line": e.span.line, "yield": number(monte.yields[i]),
                                 "mean": number(monte.means[i]),
                                 "std_dev": number(monte.deviations[i]),
                                 "percentiles": dict(zip(("1", "5", "50", "95", "99"),
                                                         map(number, monte.percentiles[i]))),
                                 "not_computed": monte.not_computed[i]}
                                for i, e in enumerate(result.expectations)],
            "worst_units": [{"unit": u + 1, "failures": f,
                             "perturbations": {item.label: number(d)
                                               for item, d in zip(setup.items, deltas)}}
                            for u, deltas, f in monte.worst],
        }
    return data
