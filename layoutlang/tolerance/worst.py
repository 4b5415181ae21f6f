"""The worst built units as scripts a user can open: the original text with each toleranced
number replaced by the unit's value at its own token (every other byte kept), and a comment
block at the top saying which unit it is and how it was moved."""

from __future__ import annotations

from pathlib import Path

from ..syntax import tree as t
from ..syntax.parser import parse
from ..testing import format_number
from .model import PLACED

__all__ = ["unit_script", "write_worst"]


def _number_nodes(script: t.Script) -> dict[tuple[str, str], t.Expr]:
    """The expression written for each toleranceable number of the script's own file:
    ('radius'|'curvature', surface), ('gap', surface before it), ('index', medium)."""
    found: dict[tuple[str, str], t.Expr] = {}
    last_surface = None
    for statement in script.statements:
        if isinstance(statement, t.BoundaryStatement):
            last_surface = statement.name.text if statement.name else None
            if statement.shape is not None and statement.shape.kind in ("radius", "curvature"):
                if last_surface:
                    found[(statement.shape.kind, last_surface)] = statement.shape.value
            if statement.clear_diameter is not None and last_surface:
                found[("clear diameter", last_surface)] = statement.clear_diameter
        elif isinstance(statement, t.Gap) and last_surface:
            found[("gap", last_surface)] = statement.length
        elif isinstance(statement, t.MediumIndex):
            found[("index", statement.name.text)] = statement.index
        elif isinstance(statement, t.MediumModel) and statement.kind == "model glass":
            found[("index", statement.name.text)] = statement.values[0]
            found[("abbe number", statement.name.text)] = statement.values[1]
    return found


def _value(program, item, delta: float) -> tuple[float, str]:
    """The unit's value of an item in the units the script writes it in."""
    system = program.system
    if item.target == "gap":
        nominal = float(system.gaps[item.position])
    elif item.target == "radius":
        nominal = 1.0 / float(system.boundaries[item.position].curvature)
    elif item.target == "curvature":
        nominal = float(system.boundaries[item.position].curvature)
    elif item.target == "clear diameter":
        nominal = float(system.boundaries[item.position].clear_diameter)
    elif item.target == "index":
        nominal = float(system.medium(item.name).index)
    elif item.target == "abbe number":
        nominal = float(system.medium(item.name).model.vd)
    else:
        nominal = float(system.boundaries[item.position].conic)
    value = nominal * (1 + delta) if item.relative else nominal + delta
    return value, format(value, ".10g")


def unit_script(program, text: str, deltas, unit: int, failures: int) -> tuple[str, list[str]]:
    """The script of one unit and the items that could not be written at a plain number."""
    from ..reports.tolerance import perturbation_words

    script = parse(text, program.file)
    nodes = _number_nodes(script)
    lines = text.split("\n")
    edits = []
    skipped = []
    appended = []
    for item, delta in zip(program.tolerances.items, deltas):
        if item.target in PLACED:  # a placement statement of its own, at the end
            appended.append(_placement_line(item, float(delta), program.system.units))
            continue
        node = nodes.get((item.target, item.name))
        value, written = _value(program, item, float(delta))
        number = node.operand if isinstance(node, t.Negate) else node
        plain = isinstance(number, t.Number) and number.unit in (None, program.system.units) \
            and node.pos.line == node.pos.end_line
        if not plain:
            skipped.append(f"{item.label} = {written}")
            continue
        edits.append((node.pos.line, node.pos.column, node.pos.end_column, written))
    for line, start, end, written in sorted(edits, reverse=True):
        row = lines[line - 1]
        lines[line - 1] = row[: start - 1] + written + row[end - 1:]
    units = program.system.units
    header = [f"# built unit {unit + 1} of a Monte Carlo run (seed {program.tolerances.seed}): "
              f"fails {failures} expectation{'s' if failures != 1 else ''}",
              "# moved: " + ", ".join(perturbation_words(item, float(d), units)
                                      for item, d in zip(program.tolerances.items, deltas))]
    if skipped:
        header.append("# not written as plain numbers (set them by hand): " + ", ".join(skipped))
    if appended:
        while lines and not lines[-1].strip():
            lines.pop()
        lines += ["# where this unit's surfaces sit (its decenter and tilt tolerances)"] + \
            appended + [""]
    return "\n".join(header + lines), skipped


def _placement_line(item, delta: float, units: str) -> str:
    """A decenter or tilt of one unit as the script writes it: about the element (or the one
    surface, as an element of one) with the axis returning, so the surfaces after stay."""
    import math

    last = item.through or item.name
    if item.target == "decenter":
        return (f"decenter {item.name} through {last} by {format(delta, '.10g')} {units} "
                f"along {item.axis}, axis returns")
    return (f"tilt {item.name} through {last} by {format(math.degrees(delta), '.10g')} deg "
            f"about {item.axis}, axis returns")


def write_worst(program, result, text: str, folder: Path) -> list[Path]:
    """Write the run's worst units as `<script>-unit-<n>.lay` into `folder`."""
    monte = result.monte_carlo
    if monte is None or not monte.worst:
        return []
    folder.mkdir(parents=True, exist_ok=True)
    stem = Path(program.file).stem
    written = []
    for unit, deltas, failures in monte.worst:
        body, _ = unit_script(program, text, deltas, unit, failures)
        path = folder / f"{stem}-unit-{unit + 1}.lay"
        path.write_text(body, encoding="utf-8")
        written.append(path)
    return written
