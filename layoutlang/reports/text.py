"""Plain-text reports: the layout table, the first-order properties and the expectations.

Aligned columns, a unit on every number, the sign convention stated at the top, and nothing
that varies between runs (same script, same bytes).
"""

from __future__ import annotations

import math

from ..checks import CheckResult, display_unit, to_display
from ..measure import to_nanometres
from ..engines.firstorder import FirstOrder, Unavailable
from ..interpret.interpreter import Program
from ..quantities import QUANTITIES, RAY_QUANTITIES, REPORT_ORDER
from ..system import IDEAL, MIRROR, System
from ..guard import finite_or_unavailable, guarded
from ..testing import format_number, with_unit

__all__ = [
    "aligned",
    "image_plane_words",
    "setting_lines",
    "SIGN_CONVENTION",
    "NOTHING_CHECKED",
    "LAYOUT_HEADINGS",
    "layout_rows",
    "layout_table",
    "first_order_rows",
    "first_order_table",
    "expectation_lines",
    "full_report",
    "requested_blocks",
    "describe_value",
]

#: What a script without `expect` lines is told (report, check, session): it checked nothing.
NOTHING_CHECKED = "none: this script states no expectations, so nothing was checked"

SIGN_CONVENTION = (
    "signs: light starts travelling in +z; distances are measured along the path and are "
    "positive downstream; a radius is positive when its centre lies in +z of the vertex"
)


def aligned(rows: list[list[str]], indent: str = "  ") -> list[str]:
    """Rows of cells as text lines with aligned columns (every report's tables)."""
    widths = [max(len(row[i]) for row in rows) for i in range(len(rows[0]))]
    return [indent + "  ".join(cell.ljust(w) for cell, w in zip(row, widths)).rstrip()
            for row in rows]


def _length(value, units: str) -> str:
    value = finite_or_unavailable(value)
    if isinstance(value, Unavailable):
        return str(value)
    return f"{format_number(value)} {units}"


LAYOUT_HEADINGS = ["#", "boundary", "shape", "light then in", "index", "then gap",
                   "clear diameter"]


def layout_rows(system: System) -> list[list[str]]:
    """One row per boundary, in the order the light meets them (under LAYOUT_HEADINGS)."""
    units = system.units
    indices = system.indices()
    rows = []
    for i, boundary in enumerate(system.boundaries):
        if boundary.kind == IDEAL:
            shape = f"thin lens, focal length {_length(1 / boundary.power, units)}" \
                if boundary.power else "thin lens, no power"
        else:
            shape = "flat" if boundary.curvature == 0 else \
                f"radius {_length(1 / boundary.curvature, units)}"
            form = conic_name(boundary.conic)
            if form != "sphere" and boundary.curvature != 0:
                shape += f", {form}"
            if boundary.even_terms or boundary.q_terms:
                shape += ", aspheric"
            if boundary.kind == MIRROR:
                shape = "mirror, " + shape
        gap = _length(system.gaps[i], units) if i < len(system.gaps) else "-"
        clear = "-" if boundary.clear_diameter is None else _length(boundary.clear_diameter, units)
        rows.append([str(i + 1), boundary.name, shape, boundary.medium_after,
                     format_number(indices[i + 1]), gap, clear])
    return rows


def layout_table(system: System) -> list[str]:
    """The boundaries as an aligned text table, after the starting medium, then the shapes
    and apertures beyond the sphere and the clear diameter (if any)."""
    start = format_number(system.indices()[0])
    lines = [f"  light starts in {system.start_medium} (index {start})"]
    return lines + aligned([LAYOUT_HEADINGS] + layout_rows(system)) + surface_lines(system)


def conic_name(conic) -> str:
    """The conic's name from its constant κ (the trade's names: ISO 10110-12)."""
    k = float(conic)
    if k == 0:
        return "sphere"
    if k == -1:
        return "paraboloid"
    if k < -1:
        return "hyperboloid"
    return "prolate ellipsoid" if k < 0 else "oblate ellipsoid"


def surface_lines(system: System) -> list[str]:
    """Conic constants, aspheric coefficients, obscurations and holes in words, with the
    obscuration ratio (linear and by area); nothing for a layout of plain spheres."""
    units = system.units
    lines: list[str] = []
    for boundary in system.boundaries:
        parts = []
        if boundary.conic != 0:
            parts.append(f"conic constant {format_number(boundary.conic)}")
        for j, a in enumerate(boundary.even_terms):
            if a != 0:
                parts.append(f"r{2 * j + 4} coefficient {format_number(a)}")
        if boundary.q_terms:
            terms = ", ".join(f"a{m} {format_number(a)}" for m, a in enumerate(boundary.q_terms))
            parts.append(f"Q-type terms {terms} over normalisation radius "
                         f"{_length(boundary.q_radius, units)}")
        for label, value in (("obscuration diameter", boundary.obscuration_diameter),
                             ("hole diameter", boundary.hole_diameter)):
            if value is not None:
                parts.append(f"{label} {_length(value, units)}")
        ratio = boundary.aperture.obscuration_ratio
        if ratio is not None:
            parts.append(f"obscuration ratio {format_number(ratio, 4)} across, "
                         f"{format_number(ratio * ratio, 4)} by area")
        if parts:
            lines.append(f"  {boundary.name}: " + "; ".join(parts))
    return (["  surfaces beyond the sphere and apertures beyond the clear diameter"] + [
        "  " + line for line in lines]) if lines else []


def setting_lines(system: System) -> list[str]:
    """The object, stop, image plane and wavelengths in words, indented for the report."""
    units = system.units
    obj = system.object
    if obj.at_infinity:
        angle = math.degrees(obj.field_angle)
        where = f"at infinity, field angle {format_number(angle)} deg"
    else:
        side = "before" if obj.distance >= 0 else "after (a virtual object)"
        where = (f"{_length(abs(obj.distance), units)} {side} the first boundary, "
                 f"height {_length(obj.height, units)}")
    lines = [f"  object: {where}"]
    stop = system.stop
    if stop is None:
        lines.append("  stop: none given (pupils and f-number are not computed)")
    else:
        size = {"diameter": f"diameter {_length(stop.size, units)}",
                "f-number": f"sized for f-number {format_number(stop.size)}",
                "numerical aperture":
                    f"sized for object numerical aperture {format_number(stop.size)}"}[
            stop.size_kind]
        if stop.after < 0:
            place = f"{_length(-stop.offset, units)} before the first boundary"
        elif stop.offset == 0:
            place = f"at {system.boundaries[stop.after].name}"
        else:
            place = f"{_length(stop.offset, units)} after {system.boundaries[stop.after].name}"
        lines.append(f"  stop: {place}, {size}")
    lines.append("  image plane: " + image_plane_words(system))
    if system.wavelengths:
        words = ", ".join(
            f"{format_number(to_nanometres(w.value, units))} nm" + (" (primary)" if w.primary else "")
            for w in system.wavelengths)
        lines.append(f"  wavelengths: {words}")
    return lines


def image_plane_words(system: System) -> str:
    """Where the image plane is, in words (no sign leaks into 'after')."""
    distance = system.image.distance
    if distance is None:
        return "at the paraxial focus"
    side = "after" if distance >= 0 else "before"
    return f"{_length(abs(distance), system.units)} {side} the last boundary"


#: Positions along the path and the vertex they are measured from (positive downstream).
POSITION_FROM = {
    "front principal point": "the first vertex", "front nodal point": "the first vertex",
    "entrance pupil position": "the first vertex", "image position": "the first vertex",
    "back principal point": "the last vertex", "back nodal point": "the last vertex",
    "exit pupil position": "the last vertex",
}
#: Distances to a focal point: (the point, the vertex, the sign that means "after").
_FOCAL_DISTANCES = {"back focal distance": ("back focal point", "the last vertex", 1),
                    "front focal distance": ("front focal point", "the first vertex", -1)}


def _where(value: float, vertex: str, units: str, point: str = "") -> str:
    """'11.1 mm after the first vertex' (or before, or at) for a signed position."""
    lead = f"{point} " if point else ""
    if value == 0:
        return f"{lead}at {vertex}"
    side = "after" if value > 0 else "before"
    return f"{lead}{_length(abs(value), units)} {side} {vertex}"


def afocal_words(magnification: float) -> str:
    """An afocal layout's angular magnification as the trade states it: a beam expander by
    how many times wider the beam leaves, a telescope by how many times larger angles get."""
    size = abs(magnification)
    turn = "inverted" if magnification < 0 else "upright"
    if abs(size - 1) < 5e-7:
        return f"unit magnification, {turn}"
    if size < 1:
        times = format_number(1 / size, 4)
        return (f"a {times}× beam expander: the beam leaves {times} times wider and "
                f"{times} times less divergent; {turn}")
    times = format_number(size, 4)
    return f"a {times}× telescope: angles leave {times} times larger, the beam narrower; {turn}"


def describe_value(name: str, value, units: str) -> str:
    """A quantity's value with its unit, or the reason it has none; a position also says
    from where it is measured (`11.147 mm after the first vertex`)."""
    value = finite_or_unavailable(value)
    if isinstance(value, Unavailable):
        return str(value)
    kind = QUANTITIES[name].kind
    text = with_unit(to_display(value, kind, units), display_unit(kind, units))
    if name in POSITION_FROM:
        where = _where(value, POSITION_FROM[name], units)
        return where if value > 0 else f"{text}  ({where})"
    if name in _FOCAL_DISTANCES:
        point, vertex, sense = _FOCAL_DISTANCES[name]
        if value > 0:  # the usual side: the number says how far
            return f"{text}  ({point} {'after' if sense > 0 else 'before'} {vertex})"
        return f"{text}  ({_where(sense * value, vertex, units, point)})"
    if name == "image distance":
        text += "  (real image, downstream)" if value >= 0 else \
            f"  (virtual image, {_length(-value, units)} upstream of the last boundary)"
    elif name == "afocal angular magnification" and value != 0:
        text += "  (" + afocal_words(value) + ")"
    elif name == "magnification" and value != 0:
        text += "  (inverted)" if value < 0 else "  (upright)"
    return text


def first_order_rows(results: FirstOrder, units: str,
                     names: list[str] | None = None) -> list[list[str]]:
    """[quantity, value with unit or why there is none] for the named quantities, or for the
    whole first-order report (the afocal magnification only for afocal layouts)."""
    return [[name, describe_value(name, results[name], units)] for name in names or REPORT_ORDER
            if names or name != "afocal angular magnification" or results.afocal]


def first_order_table(results: FirstOrder, units: str, names: list[str] | None = None) -> list[str]:
    return aligned(first_order_rows(results, units, names))


def expectation_lines(checked: list[CheckResult]) -> list[str]:
    rows = []
    for result in checked:
        e = result.expectation
        rows.append(["holds" if result.passed else "FAILS", f"line {e.span.line}",
                     result.outcome.message])
    return aligned(rows) if rows else ["  " + NOTHING_CHECKED]


def requested_blocks(program: Program, results: FirstOrder, colour: bool | None = None) -> list:
    """The sections a script asks for beyond the layout and its first-order properties, in
    report order: `report` lines, ray requests, exact rays and Seidel sums, colour, the
    Gaussian beam. The text
    report and the documents both print exactly these.

    Args:
        program, results: the evaluated script.
        colour: whether the colour sections apply (default: decided here).
    """
    from .blocks import Heading, Table

    system = program.system
    if colour is None:
        colour = program.colour is not None or program.warnings
        if colour:
            from .chromatic import has_colour

            colour = has_colour(program)
    out: list = []
    for names in program.reports:
        if names:
            out.append(Heading("requested: " + ", ".join(names)))
            plain = [name for name in names if name not in RAY_QUANTITIES]
            if plain:
                out.append(Table(first_order_rows(results, system.units, plain), header=False))
            if len(plain) < len(names):  # exact-ray and Seidel quantities (reports/rays.py)
                from .rays import requested_ray_rows

                rows = requested_ray_rows(program, results, names)
                if rows:
                    out.append(Table(rows, header=False))
    if getattr(program, "surface_requests", ()):  # `report edge thickness of NAME`
        from ..checks import surface_value

        requests = program.surface_requests
        out.append(Heading("requested: " + ", ".join(r.describe() for r in requests)))
        out.append(Table([[r.describe(), describe_value(r.name, surface_value(
            r, system, results), system.units)] for r in requests], header=False))
    if program.ray_requests:  # `report Q at field F` (reports/rays.py)
        from .rays import ray_request_blocks

        out += ray_request_blocks(program, results)
    if program.ray_reports:
        from .rays import ray_section_blocks

        out += ray_section_blocks(program, results)
    if colour:  # per-wavelength values, colour requests, achromats, warnings
        from .chromatic import colour_blocks

        out += colour_blocks(program, results)
    if system.beam is not None:  # the Gaussian beam (reports/beams.py)
        from .beams import beam_blocks

        out += beam_blocks(program)
    return out


@guarded
def full_report(program: Program, results: FirstOrder, checked: list[CheckResult]) -> str:
    system = program.system
    title = system.title or program.file
    lines = [f"layout: {title}", f"  file: {program.file}; units: {system.units}",
             f"  {SIGN_CONVENTION}"]
    if program.hazards:
        from ..hazards import CAUTIONS, GENERAL

        lines += [""] + [CAUTIONS[kind] for kind in program.hazards] + [GENERAL]
    lines += ["", "boundaries"]
    lines += layout_table(system)
    lines += ["", "setting"] + setting_lines(system)
    colour = program.colour is not None or program.warnings
    if colour:  # surroundings and dispersive media (reports/chromatic.py)
        from .chromatic import has_colour, setting_lines as material_lines

        colour = has_colour(program)
        lines += material_lines(program) if colour else []
    lines += ["", "first-order properties"] + first_order_table(results, system.units)
    for note in results.notes:
        lines.append(f"  note: {note}")
    from .blocks import to_text

    lines += to_text(requested_blocks(program, results, colour))
    lines += ["", "expectations"] + expectation_lines(checked)
    return "\n".join(lines) + "\n"
