"""Every quantity a layout shows, as (group, label, value, unit) rows: what a review compares.

Data-driven: the rows come from what the program itself reports and expects, not from a list
kept here. The first-order report (always printed), each `report` request, the colour and
exact-ray sections the script asks for, any other section of the machine-readable report
(`reports/machine.program_json`, so a section added there later is compared with no change
here), what a symbolic script's `derive`, `solve` and `sensitivity` print, and every
expectation's value as `checks.read_quantity` computed it (so any quantity
that can be expected is compared). A label names a quantity with its qualifiers; two revisions
are compared label by label.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Any, Callable, Iterable, Sequence

from ..checks import CheckResult, read_quantity
from ..engines.firstorder import FirstOrder, Unavailable
from ..interpret.interpreter import Program
from ..quantities import FIELD_DEFAULTS, QUANTITIES, RAY_QUANTITIES, REPORT_ORDER
from ..testing import format_number, with_unit

__all__ = ["Reading", "readings", "READERS", "SEIDEL_REPORT", "EXACT_RAY_REPORT"]


@dataclass(frozen=True)
class Reading:
    """One shown quantity: `value` is a number in `unit`, or the reason there is none."""

    group: str  # 'first order', 'requested', 'colour', 'exact rays', 'third order', 'expected', …
    label: str  # the quantity with its qualifiers, e.g. 'axial colour between F and C'
    value: Any  # float | str (why there is none, or the text itself when `words`)
    unit: str = ""
    words: bool = False  # the value is text by nature (a closed form), not a missing number

    @property
    def number(self) -> float | None:
        return self.value if isinstance(self.value, float) else None

    @property
    def text(self) -> str:
        """The value as reports print it (six significant digits, with its unit)."""
        if self.number is None:
            return str(self.value)
        return with_unit(self.value, self.unit)


def _reading(group: str, label: str, value: Any, unit: str) -> Reading:
    """Numbers become floats; an Unavailable (or anything not finite) its reason in words."""
    if isinstance(value, bool) or value is None:
        return Reading(group, label, "not computed", unit)
    if isinstance(value, Unavailable):
        return Reading(group, label, value.reason, unit)
    try:
        number = float(value)
    except (TypeError, ValueError):
        return Reading(group, label, str(value), unit)
    if not math.isfinite(number):
        return Reading(group, label, "not a finite number", unit)
    return Reading(group, label, number, unit)


def _quantity(group: str, program: Program, results: FirstOrder, name: str, **qualifiers
              ) -> Reading:
    found = read_quantity(program, results, name, **qualifiers)
    return _reading(group, found.label, found.value, found.unit)


# --- the readers, one per part of the report ------------------------------------------------

def first_order_readings(program: Program, results: FirstOrder, checked) -> Iterable[Reading]:
    """The first-order report, printed for every layout."""
    for name in REPORT_ORDER:
        if name != "afocal angular magnification" or results.afocal:
            yield _quantity("first order", program, results, name)


def _field_of(name: str) -> float | None:
    return FIELD_DEFAULTS.get(name)


def requested_readings(program: Program, results: FirstOrder, checked) -> Iterable[Reading]:
    """Quantities named in `report` statements (colour ones are under 'colour')."""
    for names in program.reports:
        for name in names:
            yield _quantity("requested", program, results, name,
                            field=_field_of(name) if name in RAY_QUANTITIES else None)
    for request in getattr(program, "ray_requests", ()):  # `report Q at field F …`
        yield _quantity("requested", program, results, request.name, field=request.field,
                        wavelength=request.wavelength, label=request.label)


def colour_readings(program: Program, results: FirstOrder, checked) -> Iterable[Reading]:
    """Per-wavelength focal length and image distance, the colour summary and colour requests."""
    system = program.system
    if len(system.wavelengths) >= 2:
        from ..engines.chromatic import colour_table
        from ..measure import to_nanometres

        table = colour_table(system, results)
        for i, w in enumerate(table.wavelengths):
            at = f"at {format_number(to_nanometres(w, system.units))} nm"
            for name, values in (("focal length", table.focal_length),
                                 ("image distance", table.image_distance),
                                 ("chief ray height on the image plane", table.chief_height)):
                value = values if isinstance(values, Unavailable) else values[i]
                yield _reading("colour", f"{name} {at}", value, system.units)
        for request, _ in table.summary:
            yield _quantity("colour", program, results, request.quantity, request=request)
    colour = program.colour
    for request in () if colour is None else colour.reports:
        yield _quantity("colour", program, results, request.quantity, request=request)


#: The quantities each ray section of the report shows (quantities.py names them).
SEIDEL_REPORT = ("spherical sum", "coma sum", "astigmatism sum", "field curvature sum",
                 "distortion sum", "axial colour sum", "lateral colour sum", "petzval radius")
EXACT_RAY_REPORT = tuple(name for name in QUANTITIES
                         if name in RAY_QUANTITIES and name not in SEIDEL_REPORT)


def ray_readings(program: Program, results: FirstOrder, checked) -> Iterable[Reading]:
    """`report exact rays` (field-dependent ones at every sampled field) and `report seidel
    sums`."""
    if "exact rays" in program.ray_reports:
        for name in EXACT_RAY_REPORT:
            fields = program.rays.fields if name in FIELD_DEFAULTS else (None,)
            for field in fields:
                yield _quantity("exact rays", program, results, name, field=field)
    if "seidel sums" in program.ray_reports:
        for name in SEIDEL_REPORT:
            yield _quantity("third order", program, results, name)


#: Sections of the machine-readable report that the readers above cover, or that hold the
#: prescription itself (boundaries, setting: the statement changes say those) or no
#: quantities; every other section is read generically.
_COVERED = frozenset({"file", "title", "units", "sign_convention", "cautions", "boundaries",
                      "setting",
                      "first_order", "notes", "expectations", "colour", "rays",
                      "requested_rays"})

#: Keys whose numbers say which row a list item is (not quantities themselves).
_ROW_KEYS = ("name", "field", "wavelength_nm", "wavelength", "pupil", "frequency", "sample",
             "on", "quantity")

_SUFFIX_UNITS = {"_percent": "%", "_nm": "nm", "_um": "µm", "_mm": "mm", "_deg": "deg"}


def _words(key: str) -> str:
    return str(key).replace("_", " ")


def _key_words(key: str) -> tuple[str, str]:
    """A report key as words, and the unit its suffix names: 'coupling_percent' → ('coupling',
    '%')."""
    for suffix, unit in _SUFFIX_UNITS.items():
        if str(key).endswith(suffix) and len(str(key)) > len(suffix):
            return _words(str(key)[: -len(suffix)]), unit
    return _words(key), ""


def _row_label(item: Any, index: int) -> str:
    if isinstance(item, dict):
        for key in _ROW_KEYS:
            if key in item and isinstance(item[key], (str, int, float)) \
                    and not isinstance(item[key], bool):
                shown = item[key] if isinstance(item[key], str) else format_number(item[key])
                return shown if key == "quantity" else f"{_words(key)} {shown}"
    return f"#{index + 1}"


def _walk(group: str, path: list[str], node: Any, unit: str) -> Iterable[Reading]:
    label = " ".join(path)
    if isinstance(node, dict):
        if "value" in node and set(node) <= {"value", "unit", "why"}:  # one quantity
            value = node.get("value")
            shown = node.get("unit") if isinstance(node.get("unit"), str) else unit
            yield _reading(group, label, value if value is not None else node.get("why"), shown)
            return
        for key, value in node.items():
            words, named = _key_words(key)
            yield from _walk(group, path + [words], value, named)
    elif isinstance(node, list):
        for i, item in enumerate(node):
            if isinstance(item, dict):
                row = _row_label(item, i)
                item = {k: v for k, v in item.items() if k not in _ROW_KEYS}
            else:
                row = f"#{i + 1}"
            if isinstance(item, (dict, list, int, float)) and not isinstance(item, bool):
                yield from _walk(group, path + [row], item, unit)
    elif isinstance(node, (int, float)) and not isinstance(node, bool):
        yield _reading(group, label, node, unit)


def other_section_readings(program: Program, results: FirstOrder, checked) -> Iterable[Reading]:
    """Every numeric value of report sections no reader above knows (e.g. ones added later to
    `program_json`), labelled by its place in the report."""
    from ..reports.machine import program_json

    document = program_json(program, results, list(checked))
    for section, content in document.items():
        if section not in _COVERED:
            yield from _walk(_words(section), [_words(section)], content, "")


def closed_form_readings(program: Program, results: FirstOrder, checked
                         ) -> Iterable[Reading]:
    """What a symbolic script's `derive`, `solve` and `sensitivity` statements give: each
    closed form and each solution as `layoutlang derive` prints it (numbers at nominal are
    compared elsewhere), and each sensitivity at the nominal values."""
    part = program.symbolic
    if part is None or not (part.derives or part.solves or part.sensitivities):
        return
    from ..errors import LayoutError
    from ..symbolic import render

    try:
        outcome = render.carry_out(program)
        printed = render.text(outcome)
    except LayoutError as error:
        yield Reading("closed forms", "design equations", error.message)
        return
    for block in printed.split("\n\n")[1:]:  # after the heading (file, symbols, signs)
        lines = [line.strip() for line in block.strip("\n").splitlines() if line.strip()]
        if len(lines) < 2 or lines[0].startswith("sensitivities"):
            continue
        kept = [line for line in lines[1:] if not line.startswith(("at nominal:", "note:"))]
        yield Reading("closed forms", lines[0], "; ".join(kept or lines[1:]), words=True)
    for rows in outcome.sensitivities:
        for row in rows:
            value = row.value if row.value is not None else (row.note or "not computed")
            yield _reading("sensitivities", f"sensitivity of {row.quantity} to {row.symbol}",
                           value, row.unit)


def expected_readings(program: Program, results: FirstOrder, checked) -> Iterable[Reading]:
    """The value behind every expectation, as the check computed it."""
    for result in checked:
        label = result.label or result.expectation.quantity
        yield _reading("expected", label, result.outcome.actual, result.unit)


Reader = Callable[[Program, FirstOrder, Sequence[CheckResult]], Iterable[Reading]]

#: The readers, in the order their rows are shown.
READERS: list[Reader] = [first_order_readings, requested_readings, colour_readings,
                         ray_readings, other_section_readings, closed_form_readings,
                         expected_readings]


def readings(program: Program, results: FirstOrder, checked: Sequence[CheckResult]
             ) -> tuple[Reading, ...]:
    """Every quantity the program shows, each label once (the first reader to name it wins)."""
    found: dict[str, Reading] = {}
    for reader in READERS:
        for reading in reader(program, results, checked):
            found.setdefault(reading.label, reading)
    return tuple(found.values())
