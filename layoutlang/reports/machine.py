"""JSON output for machines: the same content as the text report, with stable key order."""

from __future__ import annotations

import json

from ..checks import CheckResult, display_unit, to_display
from ..engines.firstorder import FirstOrder, Unavailable
from ..interpret.interpreter import Program
from ..quantities import QUANTITIES, REPORT_ORDER
from .text import SIGN_CONVENTION
from ..guard import guarded

__all__ = ["round12", "program_json", "check_json", "dumps"]


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
        } for i, b in enumerate(system.boundaries)],
        "first_order": {name: _quantity(name, results[name], units) for name in REPORT_ORDER},
        "notes": list(results.notes),
        "expectations": _checks(checked),
        **_colour(program, results),
        **_rays(program, results),
    }


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
