"""Report sections for materials and colour: surroundings, media, per-wavelength values,
colour requests, the thin-lens achromat and warnings — as text lines and as JSON data.

Only called when a script has something to say about them, so reports of constant-index
layouts are unchanged and numpy is not imported for them.
"""

from __future__ import annotations

from typing import Any

from ..engines.firstorder import FirstOrder, Unavailable
from ..interpret.interpreter import Program
from ..measure import to_nanometres
from ..testing import format_number
from .blocks import Block, Heading, Line, Table, to_text

__all__ = ["has_colour", "setting_lines", "colour_lines", "colour_blocks", "colour_json"]


def has_colour(program: Program) -> bool:
    """Whether the report needs any of these sections."""
    colour = program.colour
    return bool(program.warnings or len(program.system.wavelengths) >= 2 or colour is not None
                and (colour.uses_dispersion or colour.reports or colour.achromats))


def _nm(system, value: float) -> str:
    return f"{format_number(to_nanometres(value, system.units))} nm"


def _value(value: Any, unit: str) -> str:
    if isinstance(value, Unavailable):
        return str(value)
    return f"{format_number(value)} {unit}".rstrip()


def setting_lines(program: Program) -> list[str]:
    """How indices are meant and what each dispersive medium is (for the setting section)."""
    from ..materials.environment import describe_environment

    system = program.system
    if not any(m.model is not None for m in system.media):
        return []
    lines = [f"  surroundings: {describe_environment(system.environment)}"]
    for medium in system.media:
        if medium.model is not None and medium.name not in ("air", "vacuum"):
            valid = getattr(medium.model, "valid_um", None)
            where = (f", data valid {format_number(valid[0] * 1000)}–"
                     f"{format_number(valid[1] * 1000)} nm" if valid else "")
            lines.append(f"  medium {medium.name}: {medium.model.describe()}{where}")
    return lines


def colour_blocks(program: Program, results: FirstOrder) -> list[Block]:
    """The colour section: per-wavelength values, summary, requests, achromats, warnings."""
    from ..engines.chromatic import colour_table, evaluate

    system = program.system
    units = system.units
    out: list[Block] = []
    table = colour_table(system, results)
    if table is not None:
        out.append(Heading("colour (paraxial, per wavelength)"))
        rows = [["wavelength", "focal length", "image distance", "chief ray on image plane"]]
        for i, w in enumerate(table.wavelengths):
            cells = [_nm(system, w) + (" (primary)" if system.wavelengths[i].primary else "")]
            for values in (table.focal_length, table.image_distance, table.chief_height):
                cells.append(str(values) if isinstance(values, Unavailable)
                             else _value(float(values[i]), units))
            rows.append(cells)
        out.append(Table(rows))
        out.append(Table([[request.describe(), _value(value, units)]
                          for request, value in table.summary], header=False))
        if not any(m.model is not None for m in system.media):
            out.append(Line("note: every medium here has a constant index, so no colour shows; "
                            "give media a dispersion model (see `use materials`)"))
    colour = program.colour
    if colour is not None and colour.reports:
        out.append(Heading("requested (colour)"))
        rows = []
        for request in colour.reports:
            from ..checks import display_unit, to_display
            from ..quantities import QUANTITIES

            kind = QUANTITIES[request.quantity].kind
            value = to_display(evaluate(request, system, results), kind, units)
            rows.append([request.describe(), _value(value, display_unit(kind, units))])
        out.append(Table(rows, header=False))
    for achromat in () if colour is None else colour.achromats:
        out.append(Heading(f"achromat from {achromat.first} and {achromat.second}"))
        out += [Line(line) for line in _achromat_lines(achromat, results, units)]
    if program.warnings:
        out.append(Heading("warnings"))
        out += [Line(w) for w in program.warnings]
    return out


def colour_lines(program: Program, results: FirstOrder) -> list[str]:
    """`colour_blocks` as lines of the text report."""
    return to_text(colour_blocks(program, results))


def _achromat_lines(achromat, results: FirstOrder, units: str) -> list[str]:
    from ..materials.achromat import thin_achromat

    focal = achromat.focal_length
    if focal is None:
        focal = results["focal length"]
        if isinstance(focal, Unavailable):
            return [f"no focal length to design for: {focal}"]
    try:
        design = thin_achromat(achromat.first_indices, achromat.second_indices, focal)
    except ValueError as error:
        return [str(error)]
    return design.equations((achromat.first, achromat.second), achromat.labels, units)


def colour_json(program: Program, results: FirstOrder) -> dict:
    """The same content for machines (12 significant digits, stable keys)."""
    from ..engines.chromatic import colour_table, evaluate
    from ..materials.environment import describe_environment
    from .machine import round12

    def number(value):
        if isinstance(value, Unavailable):
            return {"value": None, "why": value.reason}
        return {"value": round12(float(value))}

    system = program.system
    data: dict[str, Any] = {}
    if any(m.model is not None for m in system.media):
        data["surroundings"] = system.environment
        data["surroundings_meaning"] = describe_environment(system.environment)
        data["media"] = {m.name: m.model.describe() for m in system.media
                         if m.model is not None and m.name not in ("air", "vacuum")}
    table = colour_table(system, results)
    if table is not None:
        data["per_wavelength"] = [{
            "wavelength_nm": round12(to_nanometres(w, system.units)),
            "focal_length": number(table.focal_length if isinstance(table.focal_length,
                                                                    Unavailable)
                                   else table.focal_length[i]),
            "image_distance": number(table.image_distance if isinstance(table.image_distance,
                                                                        Unavailable)
                                     else table.image_distance[i]),
        } for i, w in enumerate(table.wavelengths)]
        data["summary"] = {request.describe(): number(value) for request, value in table.summary}
    colour = program.colour
    if colour is not None and colour.reports:
        data["requested"] = {r.describe(): number(evaluate(r, system, results))
                             for r in colour.reports}
    if program.warnings:
        data["warnings"] = list(program.warnings)
    return data
