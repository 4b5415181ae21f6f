"""A review in words: the session's before → after lines, and `compare`'s text, Markdown and
JSON. Every format says the same things (the engine decides what changed; this only writes)."""

from __future__ import annotations

from typing import Any

from ..testing import with_unit
from .engine import ExpectationChange, QuantityChange, Review

__all__ = ["session_lines", "summary", "text", "markdown", "markdown_document", "as_json",
           "difference_text"]


def _word(passed: bool) -> str:
    return "holds" if passed else "FAILS"


def difference_text(change: QuantityChange) -> str:
    """'+0.8 mm', '-1.1 mm' (empty when the two values cannot be subtracted)."""
    delta = change.difference
    if delta is None:
        return ""
    sign = "+" if delta > 0 else ""
    return sign + with_unit(delta, change.unit)


def _aligned(rows: list[list[str]], indent: str) -> list[str]:
    from ..reports.text import aligned

    return aligned(rows, indent) if rows else []


def _quantity_rows(changes: list[QuantityChange], indent: str) -> list[str]:
    rows = []
    for change in changes:
        delta = difference_text(change)
        rows.append([change.label, change.old_text, "→", change.new_text,
                     f"({delta})" if delta else ""])
    return _aligned(rows, indent)


def _expectation_line(change: ExpectationChange) -> str:
    if change.kind == "new":
        return f"new     {_word(change.new.passed)}: {change.text}  —  {change.new.message}"
    if change.kind == "now":
        return (f"now     {_word(change.new.passed)} (was {_word(change.old.passed)}): "
                f"{change.text}  —  {change.new.message}")
    return f"no longer checked: {change.text}"


def session_lines(found: Review, after_readings=()) -> list[str]:
    """What an edit changed, as the session prints it under the edit (indented lines)."""
    if found.after_incomplete:
        return [f"  (layout not complete yet: {found.after_incomplete})"]
    expectations = ["  " + _expectation_line(c) for c in found.expectations]
    if found.before_incomplete:
        lines = ["  the layout is complete; first-order results:"]
        lines += [f"    {r.label}: {r.text}" for r in after_readings
                  if r.group == "first order" and r.number is not None]
        return lines + expectations
    changed = found.changed_quantities
    lines = _quantity_rows(changed, "  ") if changed else ["  no shown quantity changed"]
    return lines + expectations


def _count(n: int, one: str, many: str | None = None) -> str:
    return f"{n} {one if n == 1 else (many or one + 's')}"


def summary(found: Review) -> str:
    """One line: how much changed, and whether an expectation got worse."""
    parts = []
    if found.statements:
        parts.append(_count(len(found.statements), "statement") + " changed")
    changed = found.changed_quantities
    if changed:
        parts.append(_count(len(changed), "quantity", "quantities") + " changed")
    worse = [c for c in found.expectations if c.worse]
    better = [c for c in found.expectations if c.kind == "now" and c.new.passed]
    added = [c for c in found.expectations if c.kind == "new" and c.new.passed]
    gone = [c for c in found.expectations if c.kind == "gone"]
    if worse:
        parts.append(_count(len(worse), "expectation") + " got worse")
    if better:
        parts.append(_count(len(better), "expectation") + " now holds" if len(better) == 1
                     else _count(len(better), "expectation") + " now hold")
    if added:
        parts.append(_count(len(added), "new expectation") + (" holds" if len(added) == 1
                                                                else " hold"))
    if gone:
        parts.append(_count(len(gone), "expectation") + " no longer checked")
    if not parts:
        return "no change in the prescription or in what it computes"
    held, total = found.held
    return "; ".join(parts) + f" ({held} of {total} expectations hold now)"


def _side_words(label: str, found: Review, old: bool) -> str:
    incomplete = found.before_incomplete if old else found.after_incomplete
    return f"{label} (not complete: {incomplete})" if incomplete else label


def _statement_rows(found: Review, indent: str) -> list[str]:
    rows = []
    for change in found.statements:
        if change.kind == "inserted":
            detail = [change.new, f"({change.where})" if change.where else ""]
        elif change.kind == "removed":
            detail = [change.old, ""]
        elif change.kind == "renamed":
            detail = [f"{change.old}  →  {change.new}", f"(was {change.where})"]
        else:
            detail = [f"{change.old}  →  {change.new}", ""]
        rows.append([change.kind, change.what] + detail)
    return _aligned(rows, indent)


def _groups(changes: list[QuantityChange]) -> list[tuple[str, list[QuantityChange]]]:
    found: dict[str, list[QuantityChange]] = {}
    for change in changes:
        found.setdefault(change.group, []).append(change)
    return list(found.items())


def text(found: Review, old_label: str, new_label: str) -> str:
    """The plain-text review `layoutlang compare` prints."""
    lines = [f"compare {_side_words(old_label, found, True)} → "
             f"{_side_words(new_label, found, False)}", f"  {summary(found)}"]
    if found.statements:
        lines += ["", "prescription"] + _statement_rows(found, "  ")
    if found.quantities:
        lines += ["", "quantities (before → after, difference)"]
        for group, changes in _groups(found.quantities):
            lines += [f"  {group}"] + _quantity_rows(changes, "    ")
    if found.expectations:
        lines += ["", "expectations"]
        lines += [f"  {_line_words(c)}: {_expectation_line(c)}" for c in found.expectations]
    return "\n".join(lines) + "\n"


def _line_words(change: ExpectationChange) -> str:
    """The line an expectation is on (the old file's line when it went away)."""
    if change.new is None:
        return f"line {change.old.line} before"
    return f"line {change.new.line}"


def _cell(value: str) -> str:
    return value.replace("|", "\\|").replace("\n", " ") if value else ""


def _code(value: str | None) -> str:
    return f"`{_cell(value)}`" if value else ""


def markdown(found: Review, old_label: str, new_label: str) -> str:
    """A pull-request comment: the summary line first, then one table per part."""
    flag = "**expectation got worse**" if found.worse else "no expectation got worse"
    lines = [f"**{_cell(new_label)}** against {_cell(old_label)}: {flag}. "
             f"{_cell(summary(found))}.", ""]
    for side, incomplete in (("before", found.before_incomplete),
                             ("after", found.after_incomplete)):
        if incomplete:
            lines += [f"The layout {side} is not complete: {_cell(incomplete)}.", ""]
    if found.statements:
        lines += ["#### Prescription", "", "| change | statement | before | after |",
                  "| --- | --- | --- | --- |"]
        for c in found.statements:
            what = c.what + (f" (was {c.where})" if c.kind == "renamed" else
                             f" ({c.where})" if c.kind == "inserted" and c.where else "")
            lines.append(f"| {c.kind} | {_cell(what)} | {_code(c.old)} | {_code(c.new)} |")
        lines.append("")
    if found.quantities:
        lines += ["#### Optics", "", "| part | quantity | before | after | difference |",
                  "| --- | --- | ---: | ---: | ---: |"]
        for c in found.quantities:
            lines.append(f"| {_cell(c.group)} | {_cell(c.label)} | {_cell(c.old_text)} | "
                         f"{_cell(c.new_text)} | {_cell(difference_text(c))} |")
        lines.append("")
    if found.expectations:
        lines += ["#### Expectations", "", "| state | where | expectation | detail |",
                  "| --- | --- | --- | --- |"]
        for c in found.expectations:
            state = {"new": f"new, {_word(c.new.passed) if c.new else ''}",
                     "now": f"now {_word(c.new.passed) if c.new else ''} "
                            f"(was {_word(c.old.passed) if c.old else ''})",
                     "gone": "no longer checked"}[c.kind]
            detail = (c.new or c.old).message if c.kind != "gone" else ""
            lines.append(f"| {state} | {_line_words(c)} | {_code(c.text)} | "
                         f"{_cell(detail)} |")
        lines.append("")
    return "\n".join(lines).rstrip("\n") + "\n"


def _reading_json(reading) -> dict | None:
    from ..reports.machine import round12

    if reading is None:
        return None
    if reading.words:
        return {"value": None, "text": str(reading.value)}
    if reading.number is None:
        return {"value": None, "unit": reading.unit, "why": str(reading.value)}
    return {"value": round12(reading.number), "unit": reading.unit, "shown": reading.text}


def as_json(found: Review, old_label: str, new_label: str) -> dict[str, Any]:
    """The review as plain data (12 significant digits; a missing value says why)."""
    from ..reports.machine import round12

    def state(s):
        return None if s is None else {"statement": s.text, "line": s.line,
                                       "passed": s.passed, "message": s.message}

    return {
        "before": old_label,
        "after": new_label,
        "summary": summary(found),
        "worse": found.worse,
        "before_incomplete": found.before_incomplete,
        "after_incomplete": found.after_incomplete,
        "statements": [{"change": c.kind, "what": c.what, "before": c.old, "after": c.new,
                        "before_line": c.old_line, "after_line": c.new_line,
                        **({"where": c.where} if c.where else {})} for c in found.statements],
        "quantities": [{"part": c.group, "quantity": c.label, "changed": c.changed,
                        "before": _reading_json(c.old), "after": _reading_json(c.new),
                        "difference": None if c.difference is None else round12(c.difference),
                        } for c in found.quantities],
        "expectations": [{"change": c.kind, "worse": c.worse, "before": state(c.old),
                          "after": state(c.new)} for c in found.expectations],
    }


def markdown_document(reviews: list[tuple[str, Review | None, str]], revision: str) -> str:
    """`check --against REV --markdown OUT`: one comment for every file checked, the files
    where an expectation got worse first in the opening line."""
    worse = [path for path, found, _ in reviews if found is not None and found.worse]
    changed = [path for path, found, _ in reviews if found is not None and not found.empty]
    head = (f"**Layout review against {_cell(revision)}**: "
            + (f"an expectation got worse in {', '.join(_cell(p) for p in worse)}" if worse
               else "no expectation got worse")
            + f"; {_count(len(changed), 'file')} of {len(reviews)} changed.")
    lines = [head, ""]
    for path, found, said in reviews:
        lines += [f"### {_cell(path)}", ""]
        if found is None or found.empty:
            lines += [_cell(said) + ".", ""]
        else:
            lines += [markdown(found, f"{revision}:{path}", path), ""]
    return "\n".join(lines).rstrip("\n") + "\n"
