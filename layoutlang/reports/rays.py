"""Text sections for exact rays, aberrations and Seidel sums, printed when a script asks.

Same habits as `text.py`: aligned columns, a unit on every number, every lost ray counted and
named by surface, and the reason in words wherever a value does not exist (never NaN).
"""

from __future__ import annotations

import math

from ..engines.firstorder import FirstOrder, Unavailable
from ..interpret.interpreter import Program
from ..quantities import QUANTITIES, RAY_QUANTITIES, FIELD_DEFAULTS
from ..guard import finite_or_unavailable
from ..testing import format_number
from .blocks import Block, Heading, Line, Table, to_text
from .text import aligned
from .verdicts import focus_verdict, height_verdict

#: Indent of the rows under a sub-heading of the exact-ray section.
_ROWS = "    "

__all__ = ["ray_sections", "ray_section_blocks", "exact_ray_lines", "exact_ray_blocks",
           "seidel_lines", "seidel_blocks", "requested_ray_lines", "requested_ray_rows",
           "ray_request_lines", "ray_request_blocks", "rays_json", "ray_requests_json"]


def _len(value, units: str) -> str:
    value = finite_or_unavailable(value)
    if isinstance(value, Unavailable):
        return str(value)
    return f"{format_number(value, 5)} {units}"


def _pct(value) -> str:
    value = finite_or_unavailable(value)
    if isinstance(value, Unavailable):
        return str(value)
    return f"{format_number(value * 100, 4)} %"


def _field_words(system, fraction: float) -> str:
    obj = system.object
    if obj.at_infinity:
        angle = math.degrees(fraction * float(obj.field_angle))
        return f"{format_number(fraction, 4)} ({format_number(angle, 4)} deg)"
    return f"{format_number(fraction, 4)} ({format_number(fraction * float(obj.height), 4)} " \
           f"{system.units})"


def _nm(system, wavelength: float) -> str:
    from ..measure import to_nanometres

    return f"{format_number(to_nanometres(wavelength, system.units), 5)} nm"


def _has_ideal(system) -> bool:
    return any(b.kind == "ideal" for b in system.boundaries)


def exact_ray_blocks(program: Program, results: FirstOrder) -> list[Block]:
    """The paraxial validity report and the ray aberrations."""
    from ..engines.rayquantities import ray_quantities

    system = program.system
    units = system.units
    a = ray_quantities(system, program.rays, results).analysis
    out: list[Block] = [Heading("exact rays against the paraxial numbers")]
    if a.unavailable is not None:
        return out + [Line(f"not traced: {a.unavailable}")]
    na = a.numerical_aperture
    out.append(Line(f"wavelength {_nm(system, a.wavelength)} (primary); paraxial image-side "
                    f"numerical aperture {format_number(na, 4)}; depth of focus λ/NA² "
                    f"{_len(a.depth_of_focus, units)}"))
    out.append(Line("rays are aimed at the real stop" + (
        "; each ideal 'lens' acts as a perfect paraxial lens" if _has_ideal(system) else "")))
    out.append(Line("axial rays: where each crosses the axis after the last boundary"))
    rows = [["pupil", "real focus", "paraxial focus", "real - paraxial",
             "height on the paraxial focal plane"]]
    lost = []
    for r in a.marginal:
        rows.append([format_number(r.pupil, 4), _len(r.real_focus, units),
                     _len(r.paraxial_focus, units), _len(r.longitudinal, units),
                     _len(r.transverse, units)])
        if r.lost:
            lost.append(f"pupil {format_number(r.pupil, 4)}: {r.lost}")
    out.append(Table(rows, indent=_ROWS) if a.marginal else Line("(no pupil sampled)", _ROWS))
    out += [Line(f"lost: {words}", _ROWS) for words in lost]
    out.append(Line(f"verdict: {focus_verdict(a, units)}"))
    out.append(Line("chief rays: height on the image plane"))
    rows = [["field", "real height", "paraxial height", "real - paraxial", "distortion"]]
    lost = []
    for r in a.chief:
        rows.append([_field_words(system, r.field), _len(r.real_height, units),
                     _len(r.paraxial_height, units), _len(r.difference, units),
                     _pct(r.distortion)])
        if r.lost:
            lost.append(f"field {format_number(r.field, 4)}: {r.lost}")
    out.append(Table(rows, indent=_ROWS))
    out += [Line(f"lost: {words}", _ROWS) for words in lost]
    out.append(Line(f"verdict: {height_verdict(a, units)}"))
    out.append(Line(f"spots on the image plane: pupil grid {program.rays.grid} across, radii "
                    f"about the centroid"))
    rows = [["field", "wavelength", "rays reaching", "rms radius", "largest radius"]]
    lost = []
    for r in a.spots:
        rows.append([_field_words(system, r.field), _nm(system, r.wavelength),
                     f"{r.used} of {r.rays}", _len(r.rms_radius, units),
                     _len(r.max_radius, units)])
        if r.lost:
            lost.append(f"field {format_number(r.field, 4)}, {_nm(system, r.wavelength)}: "
                        f"{r.lost}")
    out.append(Table(rows, indent=_ROWS))
    out += [Line(f"lost: {words}", _ROWS) for words in lost]
    out.append(Line(f"best focus (least RMS spot, axial bundle): "
                    f"{_len(a.best_focus_shift, units)} from the paraxial focus along the path"))
    return out


def exact_ray_lines(program: Program, results: FirstOrder) -> list[str]:
    """`exact_ray_blocks` as lines of the text report."""
    return to_text(exact_ray_blocks(program, results))


def seidel_blocks(program: Program, results: FirstOrder) -> list[Block]:
    """Per-surface third-order contributions, totals, Petzval sum and radius."""
    from ..engines.rayquantities import ray_quantities

    system = program.system
    units = system.units
    sums = ray_quantities(system, program.rays, results).seidel
    out: list[Block] = [Heading(f"third-order (Seidel) sums at full aperture and field, in "
                                f"{units} (surface formulas of Welford 1986)")]
    if isinstance(sums, Unavailable):
        return out + [Line(f"not computed: {sums}")]
    names = ["spherical", "coma", "astigmatism", "field_curvature", "distortion",
             "axial_colour", "lateral_colour"]
    rows = [["boundary", "S I spherical", "S II coma", "S III astigmatism",
             "S IV field curvature", "S V distortion", "C I axial colour",
             "C II lateral colour"]]
    for s in sums.surfaces:
        rows.append([s.name] + [format_number(getattr(s, n), 4) for n in names])
    rows.append(["total"] + [format_number(sums.total(n), 4) for n in names])
    out.append(Table(rows))
    radius = sums.petzval_radius
    where = "" if isinstance(radius, Unavailable) else (
        "  (centre downstream)" if radius > 0 else "  (centre upstream)")
    out.append(Line(f"Petzval sum {format_number(sums.petzval_sum, 5)} per {units}; Petzval "
                    f"radius {_len(radius, units)}{where}"))
    if len(system.wavelengths) < 2:
        out.append(Line("chromatic sums need two or more wavelengths; they are zero here"))
    else:
        from ..engines.seidel import colour_ends

        blue, red = colour_ends(system)
        out.append(Line(f"C I and C II take δn between {_nm(system, blue)} and "
                        f"{_nm(system, red)} (F and C when listed, else the shortest and "
                        "longest); zero for media with a constant index"))
    if _has_ideal(system):
        out.append(Line("an ideal 'lens' images perfectly and contributes nothing"))
    return out


def seidel_lines(program: Program, results: FirstOrder) -> list[str]:
    """`seidel_blocks` as lines of the text report."""
    return to_text(seidel_blocks(program, results))


def requested_ray_rows(program: Program, results: FirstOrder, names: tuple[str, ...]
                       ) -> list[list[str]]:
    """[label, value] for the ray quantities named in a `report` statement."""
    from ..engines.rayquantities import ray_quantities

    system = program.system
    units = system.units
    rays = ray_quantities(system, program.rays, results)
    rows = []
    for name in names:
        if name not in RAY_QUANTITIES:
            continue
        field = FIELD_DEFAULTS.get(name)
        value = rays.value(name, field)
        label = name if field is None else f"{name} at field {format_number(field, 4)}"
        text = _pct(value) if QUANTITIES[name].kind == "percent" else _len(value, units)
        rows.append([label, text])
    return rows


def requested_ray_lines(program: Program, results: FirstOrder, names: tuple[str, ...]
                        ) -> list[str]:
    """Rows for ray quantities named in a `report` statement, aligned."""
    rows = requested_ray_rows(program, results, names)
    return aligned(rows, "  ") if rows else []


def ray_request_blocks(program: Program, results: FirstOrder) -> list[Block]:
    """The `report Q at field F [at wavelength W]` lines: one row each, labelled as written."""
    if not program.ray_requests:
        return []
    from ..engines.rayquantities import ray_quantities

    units = program.system.units
    rays = ray_quantities(program.system, program.rays, results)
    rows = []
    for request in program.ray_requests:
        value = rays.value(request.name, request.field, "", request.wavelength)
        text = _pct(value) if QUANTITIES[request.name].kind == "percent" else _len(value, units)
        rows.append([request.label, text])
    return [Heading("requested: " + ", ".join(r.label for r in program.ray_requests)),
            Table(rows, header=False)]


def ray_request_lines(program: Program, results: FirstOrder) -> list[str]:
    """`ray_request_blocks` as lines of the text report."""
    return to_text(ray_request_blocks(program, results))


def ray_section_blocks(program: Program, results: FirstOrder) -> list[Block]:
    """Everything the script asked of the ray engine (nothing when it asked nothing)."""
    out: list[Block] = []
    if "exact rays" in program.ray_reports:
        out += exact_ray_blocks(program, results)
    if "seidel sums" in program.ray_reports:
        out += seidel_blocks(program, results)
    return out


def ray_sections(program: Program, results: FirstOrder) -> list[str]:
    """`ray_section_blocks` as lines of the text report."""
    return to_text(ray_section_blocks(program, results))


def _json_value(value):
    if isinstance(value, Unavailable):
        return {"value": None, "why": value.reason}
    from .machine import round12

    return round12(value)


def rays_json(program: Program, results: FirstOrder) -> dict:
    """The requested exact-ray and Seidel sections as plain data (12 significant digits;
    a value that does not exist is {"value": null, "why": ...})."""
    from ..engines.rayquantities import SEIDEL_FIELDS, ray_quantities

    rays = ray_quantities(program.system, program.rays, results)
    found: dict = {}
    if "exact rays" in program.ray_reports:
        a = rays.analysis
        if a.unavailable is not None:
            found["exact_rays"] = {"why": a.unavailable.reason}
        else:
            v = _json_value
            units = program.system.units
            found["exact_rays"] = {
                "wavelength": v(a.wavelength),
                "numerical_aperture": v(a.numerical_aperture),
                "depth_of_focus": v(a.depth_of_focus),
                "marginal": [{"pupil": r.pupil, "real_focus": v(r.real_focus),
                              "paraxial_focus": v(r.paraxial_focus),
                              "longitudinal": v(r.longitudinal), "transverse": v(r.transverse),
                              "lost": r.lost} for r in a.marginal],
                "focus_verdict": focus_verdict(a, units),
                "chief": [{"field": r.field, "real_height": v(r.real_height),
                           "paraxial_height": v(r.paraxial_height),
                           "distortion_percent": v(r.distortion * 100)
                           if not isinstance(r.distortion, Unavailable) else v(r.distortion),
                           "lost": r.lost} for r in a.chief],
                "height_verdict": height_verdict(a, units),
                "spots": [{"field": r.field, "wavelength": v(r.wavelength), "rays": r.rays,
                           "reaching": r.used, "rms_radius": v(r.rms_radius),
                           "largest_radius": v(r.max_radius), "lost": r.lost} for r in a.spots],
                "best_focus_shift": v(a.best_focus_shift),
            }
    if "seidel sums" in program.ray_reports:
        sums = rays.seidel
        if isinstance(sums, Unavailable):
            found["seidel"] = {"why": sums.reason}
        else:
            names = list(SEIDEL_FIELDS.values())
            found["seidel"] = {
                "surfaces": [{"name": s.name, **{n: _json_value(getattr(s, n)) for n in names}}
                             for s in sums.surfaces],
                "total": {n: _json_value(sums.total(n)) for n in names},
                "petzval_sum": _json_value(sums.petzval_sum),
                "petzval_radius": _json_value(sums.petzval_radius),
            }
    return found


def ray_requests_json(program: Program, results: FirstOrder) -> list[dict]:
    """The `report Q at field F` requests as plain data, labelled as written."""
    from ..engines.rayquantities import ray_quantities

    rays = ray_quantities(program.system, program.rays, results)
    found = []
    for request in program.ray_requests:
        value = rays.value(request.name, request.field, "", request.wavelength)
        percent = QUANTITIES[request.name].kind == "percent"
        if percent and not isinstance(value, Unavailable):
            value = value * 100
        field = None if request.field is None else _json_value(request.field)
        found.append({"quantity": request.name, "label": request.label, "field": field,
                      "value": _json_value(value),
                      "unit": "%" if percent else program.system.units})
    return found
