"""JSON output for machines: the same content as the text report, with stable key order."""

from __future__ import annotations

import json

from ..checks import CheckResult, display_unit, to_display
from ..engines.firstorder import FirstOrder, Unavailable
from ..interpret.interpreter import Program
from ..quantities import QUANTITIES, REPORT_ORDER
from .text import SIGN_CONVENTION
from ..guard import guarded

__all__ = ["round12", "program_json", "setting_json", "check_json", "dumps"]


def round12(value: float) -> float:
    """Twelve significant digits: enough for any optics, stable across platforms (a value
    that is not finite stays so, for `dumps` to replace)."""
    return float(f"{float(value):.12g}")


def _quantity(name: str, value, units: str) -> dict:
    kind = QUANTITIES[name].kind
    if isinstance(value, Unavailable):
        return {"value": None, "unit": display_unit(kind, units), "why": value.reason}
    return {"value": round12(to_display(value, kind, units)), "unit": display_unit(kind, units)}


def _checks(checked: list[CheckResult]) -> list[dict]:
    return [{
        "line": r.expectation.span.line,
        "quantity": r.expectation.quantity,
        "statement": r.expectation.text,
        "passed": r.passed,
        "message": r.outcome.message,
    } for r in checked]


def _cautions(program: Program) -> list[str]:
    if not program.hazards:
        return []
    from ..hazards import CAUTIONS, GENERAL

    return [CAUTIONS[kind] for kind in program.hazards] + [GENERAL]


def setting_json(system) -> dict:
    """The object, stop, image plane and wavelengths as data, with the report's words beside
    them (`words`), so a reader of the JSON knows the conditions the numbers hold for."""
    import math

    from ..measure import to_nanometres
    from .text import image_plane_words, setting_lines

    obj = system.object
    if obj.at_infinity:
        where = {"at_infinity": True, "field_angle_deg": round12(math.degrees(obj.field_angle))}
    else:
        where = {"at_infinity": False, "distance_before_first_vertex": round12(obj.distance),
                 "height": round12(obj.height)}
    stop = system.stop
    stop_data = None
    if stop is not None:
        stop_data = {
            "after_boundary": None if stop.after < 0 else system.boundaries[stop.after].name,
            "offset": round12(stop.offset),  # from that vertex (from the first when None)
            "size_kind": stop.size_kind, "size": round12(stop.size)}
    image = system.image
    words = [line.strip() for line in setting_lines(system)]
    return {
        "object": where,
        "stop": stop_data,
        "image_plane": {"at_focus": image.distance is None,
                        "distance_after_last_vertex": None if image.distance is None
                        else round12(image.distance),
                        "words": image_plane_words(system)},
        "wavelengths_nm": [{"value": round12(to_nanometres(w.value, system.units)),
                            "primary": w.primary} for w in system.wavelengths],
        "words": words,
    }


def _surface_json(b) -> dict:
    """Shape and aperture beyond the sphere and the clear diameter (only what is given)."""
    found: dict = {}
    if b.conic != 0:
        found["conic_constant"] = round12(b.conic)
    if b.even_terms:
        found["even_coefficients"] = {f"r{2 * j + 4}": round12(a)
                                      for j, a in enumerate(b.even_terms)}
    if b.q_terms:
        found["q_type_coefficients"] = [round12(a) for a in b.q_terms]
        found["q_type_normalisation_radius"] = round12(b.q_radius)
    if b.obscuration_diameter is not None:
        found["obscuration_diameter"] = round12(b.obscuration_diameter)
    if b.hole_diameter is not None:
        found["hole_diameter"] = round12(b.hole_diameter)
    ratio = b.aperture.obscuration_ratio
    if ratio is not None:
        found["obscuration_ratio"] = {"linear": round12(ratio), "area": round12(ratio * ratio)}
    return found


@guarded
def program_json(program: Program, results: FirstOrder, checked: list[CheckResult]) -> dict:
    system = program.system
    units = system.units
    return {
        "file": program.file,
        "title": system.title,
        "units": units,
        "sign_convention": SIGN_CONVENTION,
        "cautions": _cautions(program),
        "boundaries": [{
            "name": b.name, "kind": b.kind,
            "radius": None if b.curvature == 0 else round12(1 / b.curvature),
            "focal_length": round12(1 / b.power) if b.power else None,
            "medium_after": b.medium_after,
            "gap_after": round12(system.gaps[i]) if i < len(system.gaps) else None,
            "clear_diameter": None if b.clear_diameter is None else round12(b.clear_diameter),
            **_surface_json(b),
        } for i, b in enumerate(system.boundaries)],
        "setting": setting_json(system),
        "first_order": {name: _quantity(name, results[name], units) for name in REPORT_ORDER},
        "notes": list(results.notes),
        "expectations": _checks(checked),
        **_colour(program, results),
        **_rays(program, results),
        **_beam(program),
    }


def _beam(program: Program) -> dict:
    """The Gaussian beam section, when the script declares a beam (reports/beams.py)."""
    if program.system.beam is None:
        return {}
    from .beams import beam_json

    return {"beam": beam_json(program)}


def _rays(program: Program, results: FirstOrder) -> dict:
    """The exact-ray and Seidel sections, when the script asks for them (reports/rays.py)."""
    found = {}
    if getattr(program, "ray_requests", ()):
        from .rays import ray_requests_json

        found["requested_rays"] = ray_requests_json(program, results)
    if getattr(program, "ray_reports", ()):
        from .rays import rays_json

        found["rays"] = rays_json(program, results)
    return found


def _colour(program: Program, results: FirstOrder) -> dict:
    """Surroundings, per-wavelength values and colour requests (reports/chromatic.py)."""
    if program.colour is None and not program.warnings:
        return {}
    from .chromatic import colour_json, has_colour

    return {"colour": colour_json(program, results)} if has_colour(program) else {}


@guarded
def check_json(program: Program, checked: list[CheckResult]) -> dict:
    return {
        "file": program.file,
        "passed": sum(r.passed for r in checked),
        "failed": sum(not r.passed for r in checked),
        "expectations": _checks(checked),
    }


def dumps(data) -> str:
    """JSON text; a value that is not finite is written as null with the reason beside it
    (`guard.json_safe`), never as NaN or Infinity."""
    from ..guard import json_safe

    return json.dumps(json_safe(data), indent=2, sort_keys=False, ensure_ascii=False, allow_nan=False) + "\n"
