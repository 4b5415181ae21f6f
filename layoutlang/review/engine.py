"""Before → after: what a change did to the shown quantities and to the expectations.

One engine for the session (one edit) and for `compare` (two revisions of a file). Only what
a reader would see change is listed: a quantity whose shown value (six significant digits, with
its unit) differs, and an expectation whose state (holds / FAILS) differs or that appeared or
went away. Engines give numbers and states; `render.py` turns them into words.
"""

from __future__ import annotations

from collections import Counter
from dataclasses import dataclass, field

from .readings import Reading
from .snapshot import Snapshot
from .statements import StatementChange, expectation_key, statement_changes

__all__ = ["QuantityChange", "ExpectationState", "ExpectationChange", "Review", "review",
           "NOT_SHOWN"]

#: What a side says for a quantity it does not show at all.
NOT_SHOWN = "not shown"


@dataclass(frozen=True)
class QuantityChange:
    """A quantity on both sides (or on one: the other is None)."""

    group: str
    label: str
    old: Reading | None
    new: Reading | None

    @property
    def old_text(self) -> str:
        return self.old.text if self.old is not None else NOT_SHOWN

    @property
    def new_text(self) -> str:
        return self.new.text if self.new is not None else NOT_SHOWN

    @property
    def changed(self) -> bool:
        return self.old_text != self.new_text

    @property
    def unit(self) -> str:
        return (self.new or self.old).unit

    @property
    def difference(self) -> float | None:
        """new - old in the shown unit, when both are numbers in the same unit."""
        if self.old is None or self.new is None or self.old.unit != self.new.unit:
            return None
        if self.old.number is None or self.new.number is None:
            return None
        return self.new.number - self.old.number


@dataclass(frozen=True)
class ExpectationState:
    text: str  # the statement as written
    passed: bool
    message: str
    line: int


@dataclass(frozen=True)
class ExpectationChange:
    """An expectation that appeared, went away, or changed state."""

    kind: str  # 'new' | 'now' (state changed) | 'gone'
    old: ExpectationState | None
    new: ExpectationState | None

    @property
    def worse(self) -> bool:
        """It fails now, and held before or did not exist."""
        return self.new is not None and not self.new.passed and (
            self.old is None or self.old.passed)

    @property
    def text(self) -> str:
        return (self.new or self.old).text


@dataclass(frozen=True)
class Review:
    """Everything that changed from one layout to another (empty lists: nothing did)."""

    statements: list[StatementChange] = field(default_factory=list)
    quantities: list[QuantityChange] = field(default_factory=list)  # changed ones, or all
    expectations: list[ExpectationChange] = field(default_factory=list)
    before_incomplete: str | None = None
    after_incomplete: str | None = None
    held: tuple[int, int] = (0, 0)  # after: expectations that hold, of how many

    @property
    def worse(self) -> bool:
        """Whether some expectation got worse (fails now and held, or is new and fails)."""
        return any(change.worse for change in self.expectations)

    @property
    def changed_quantities(self) -> list[QuantityChange]:
        return [q for q in self.quantities if q.changed]

    @property
    def empty(self) -> bool:
        return not (self.statements or self.changed_quantities or self.expectations
                    or self.before_incomplete != self.after_incomplete)


def _quantity_changes(before: Snapshot, after: Snapshot, every: bool) -> list[QuantityChange]:
    old = {r.label: r for r in before.readings}
    new = {r.label: r for r in after.readings}
    rows = [QuantityChange(r.group, label, old.get(label), r) for label, r in new.items()]
    rows += [QuantityChange(r.group, label, r, None) for label, r in old.items()
             if label not in new]
    return rows if every else [row for row in rows if row.changed]


def _states(snapshot: Snapshot) -> dict[tuple[str, int], ExpectationState]:
    """Expectation (the quantity it checks, which occurrence) → its state."""
    seen: Counter = Counter()
    found = {}
    for result in snapshot.checked:
        e = result.expectation
        key = expectation_key(e.text)
        seen[key] += 1
        found[(key, seen[key])] = ExpectationState(
            " ".join(e.text.split("#", 1)[0].split()), result.passed, result.outcome.message,
            e.span.line)
    return found


def _expectation_changes(before: Snapshot, after: Snapshot) -> list[ExpectationChange]:
    old, new = _states(before), _states(after)
    changes = []
    for key, state in new.items():
        if key not in old:
            changes.append(ExpectationChange("new", None, state))
        elif old[key].passed != state.passed:
            changes.append(ExpectationChange("now", old[key], state))
    changes += [ExpectationChange("gone", state, None) for key, state in old.items()
                if key not in new]
    return changes


def review(before: Snapshot, after: Snapshot, *, every: bool = False,
           statements: bool = True) -> Review:
    """What changed from `before` to `after`.

    Args:
        before, after: the two layouts, evaluated.
        every: list every shown quantity, changed or not.
        statements: compare the statements too (the session knows its own edit already).
    """
    changed = statement_changes(before.statements, after.statements) if statements else []
    held = (sum(r.passed for r in after.checked), len(after.checked))
    return Review(changed, _quantity_changes(before, after, every),
                  _expectation_changes(before, after), before.incomplete, after.incomplete,
                  held)
