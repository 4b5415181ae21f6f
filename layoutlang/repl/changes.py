"""Before → after for one edit of the session: the shared review engine (`layoutlang.review`)
compares the two snapshots, its session renderer writes the lines."""

from __future__ import annotations

from ..review.engine import review
from ..review.render import session_lines
from .evaluate import Snapshot

<<<<<<< HEAD
__all__ = ["describe_changes"]


def describe_changes(before: Snapshot, after: Snapshot) -> list[str]:
    """Lines saying what changed from `before` to `after` (the session has said the edit
    itself, so statements are not listed again)."""
    return session_lines(review(before, after, statements=False), after.readings)
=======
__all__ = ["describe_changes", "show_value"]


def show_value(name: str, value, units: str) -> str:
    """A value with its unit, or the reason it has none."""
    if value is None:
        return "(not computed)"
    if isinstance(value, Unavailable):
        return str(value)
    kind = QUANTITIES[name].kind
    return f"{format_number(to_display(value, kind, units))} {display_unit(kind, units)}".rstrip()


def _difference(name: str, old, new, units: str) -> str:
    if not all(isinstance(v, (int, float)) for v in (old, new)):
        return ""
    kind = QUANTITIES[name].kind
    delta = to_display(new, kind, units) - to_display(old, kind, units)
    sign = "+" if delta > 0 else ""
    amount = f"{sign}{format_number(delta)} {display_unit(kind, units)}".rstrip()
    return f"  ({amount})"


def _quantity_lines(before: Snapshot, after: Snapshot) -> list[str]:
    units = after.program.system.units
    rows = []
    for name in REPORT_ORDER:
        old = before.results.get(name)
        new = after.results.get(name)
        old_text = show_value(name, old, before.program.system.units)
        new_text = show_value(name, new, units)
        if old_text != new_text:
            rows.append((name, old_text, new_text, _difference(name, old, new, units)))
    if not rows:
        return ["  no first-order quantity changed"]
    width = max(len(r[0]) for r in rows)
    left = max(len(r[1]) for r in rows)
    right = max(len(r[2]) for r in rows)
    return [f"  {name.ljust(width)}  {old.ljust(left)}  →  {new.ljust(right)}{delta}".rstrip()
            for name, old, new, delta in rows]


def _states(snapshot: Snapshot) -> dict[tuple[str, int], tuple[bool, str]]:
    """Expectation (its text, which occurrence) → (holds?, message)."""
    seen: Counter = Counter()
    found = {}
    for result in snapshot.checked:
        text = result.expectation.text
        seen[text] += 1
        found[(text, seen[text])] = (result.passed, result.outcome.message)
    return found


def _word(passed: bool) -> str:
    return "holds" if passed else "FAILS"


def _expectation_lines(before: Snapshot, after: Snapshot) -> list[str]:
    old, new = _states(before), _states(after)
    lines = []
    for key, (passed, message) in new.items():
        if key not in old:
            lines.append(f"  new     {_word(passed)}: {key[0]}  —  {message}")
        elif old[key][0] != passed:
            lines.append(f"  now     {_word(passed)} (was {_word(old[key][0])}): {key[0]}  —  "
                         f"{message}")
    for key in old:
        if key not in new:
            lines.append(f"  no longer checked: {key[0]}")
    return lines


def describe_changes(before: Snapshot, after: Snapshot) -> list[str]:
    """Lines saying what changed from `before` to `after` (empty when nothing visible did)."""
    if not after.complete:
        return [f"  (layout not complete yet: {after.incomplete})"]
    if not before.complete:
        lines = ["  the layout is complete; first-order results:"]
        for name in REPORT_ORDER:
            value = after.results.get(name)
            if not isinstance(value, Unavailable):
                lines.append(f"    {name}: {show_value(name, value, after.program.system.units)}")
        return lines + _expectation_lines(before, after)
    return _quantity_lines(before, after) + _expectation_lines(before, after)
>>>>>>> main
