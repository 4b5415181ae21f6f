"""Text and JSON sections for a layout's Gaussian beam: waists, the beam along the layout,
clipping at each clear aperture, fibre coupling, requested quantities and limit warnings.

Printed only for scripts that declare a beam (the engine, engines/beams.py, needs numpy).
"""

from __future__ import annotations

import math
from typing import Any

from ..checks import beam_label, display_unit, to_display
from ..engines.firstorder import Unavailable
from ..interpret.interpreter import Program
from ..measure import to_nanometres
from ..quantities import QUANTITIES
from ..testing import format_number

__all__ = ["beam_blocks", "beam_lines", "beam_json", "beam_warnings"]


def _len(value: Any, units: str) -> str:
    if isinstance(value, Unavailable):
        return str(value)
    return f"{format_number(value, 6)} {units}"


def _pct(value: Any) -> str:
    if isinstance(value, Unavailable):
        return str(value)
    return f"{format_number(value * 100, 6)} %"


def _value_text(name: str, value: Any, units: str) -> str:
    if isinstance(value, Unavailable):
        return str(value)
    kind = QUANTITIES[name].kind
    text = f"{format_number(to_display(value, kind, units))} {display_unit(kind, units)}"
    return text.rstrip()


def _where(distance: Any, units: str) -> str:
    if isinstance(distance, Unavailable):
        return str(distance)
    if distance >= 0:
        return f"{_len(distance, units)} after the last boundary (real)"
    return f"{_len(-distance, units)} before the last boundary (virtual)"


def _input_words(program: Program) -> str:
    system = program.system
    beam = system.beam
    units = system.units
    if beam.waist_distance > 0:
        where = f"{_len(beam.waist_distance, units)} before the first boundary"
    elif beam.waist_distance < 0:
        where = f"{_len(-beam.waist_distance, units)} after the first boundary (converging)"
    else:
        where = "at the first boundary"
    nm = format_number(to_nanometres(beam.wavelength, units))
    return (f"waist radius {_len(beam.waist_radius, units)} (1/e²), {where}, wavelength "
            f"{nm} nm, beam propagation ratio M² {format_number(beam.propagation_ratio)}")


def _clipping_rows(program: Program, beam) -> list[list[str]]:
    system = program.system
    units = system.units
    rows = [["boundary", "beam radius", "wavefront radius (after it)", "clear diameter",
             "power passed", "clear / beam diameter"]]
    apertures = {a.boundary: a for a in beam.apertures()}
    for i, boundary in enumerate(system.boundaries):
        at = beam.at_boundary(i)
        aperture = apertures.get(boundary.name)
        if aperture is None:
            clear, passed, ratio = "-", "-", "-"
        else:
            clear = _len(aperture.clear_diameter, units)
            passed = _pct(aperture.passed)
            ratio = format_number(aperture.clearance, 4)
        rows.append([boundary.name, _len(at.radius, units), _len(at.wavefront_radius, units),
                     clear, passed, ratio])
    return rows


def beam_blocks(program: Program) -> list:
    """The beam section as report blocks (the text report and the documents alike)."""
    from ..engines.beams import beam_value, propagation
    from .blocks import Heading, Line, Table

    system = program.system
    units = system.units
    beam = propagation(system)
    if beam.problem() is not None:
        return [Heading("laser beam (Gaussian)"), Line(f"input: {_input_words(program)}"),
                Line(f"not computed: {beam.problem()}")]
    out = beam.output()
    source = ("; embedded Gaussian for M² > 1, Siegman 1990 / ISO 11146"
              if system.beam.propagation_ratio != 1 else "")
    blocks: list = [
        Heading(f"laser beam (Gaussian; ABCD law of Kogelnik & Li 1966{source})"),
        Line(f"input: {_input_words(program)}"),
        Line(f"output waist: {_where(out.waist_position, units)}, radius "
             f"{_len(out.waist_radius, units)}"),
        Line(f"rayleigh range {_len(out.rayleigh_range, units)}; far-field divergence "
             f"{format_number(out.divergence * 1000)} mrad (half-angle, 1/e²)"),
        Line("the beam at each boundary:"),
        Table(_clipping_rows(program, beam), indent="    "),
    ]
    if beam.apertures():
        blocks.append(Line(f"power passed by every clear aperture: {_pct(beam.power_passed())} "
                           "(each aperture on its own; diffraction at the edges is not "
                           "modelled)"))
    if system.fibre is not None:
        blocks += [Line(text, indent) for indent, text in _fibre_lines(program, beam)]
    settings = program.beams
    if settings is not None and settings.reports:
        rows = [[beam_label(name, place), _value_text(name, beam_value(system, name, place),
                                                      units)]
                for name, place in settings.reports]
        blocks += [Line("requested:"), Table(rows, header=False, indent="    ")]
    blocks += [Line(warning) for warning in beam_warnings(program)]
    return blocks


def beam_lines(program: Program) -> list[str]:
    """The beam section of the text report."""
    from .blocks import to_text

    return to_text(beam_blocks(program))


def _fibre_lines(program: Program, beam) -> list[tuple[str, str]]:
    """(indent, text) lines about the fibre and the coupling."""
    system = program.system
    units = system.units
    fibre = system.fibre
    coupling = beam.coupling()
    place = {"image": "at the image plane", "waist": "at the output waist",
             "after": "at a fixed distance"}[fibre.place]
    lines = [("  ", f"fibre: mode-field diameter {_len(fibre.mode_field_diameter, units)}, face "
                    f"{place}"
              + ("" if isinstance(coupling, Unavailable) else
                 f", {_where(coupling.face_distance, units).replace(' (real)', '')}"))]
    if fibre.offset or fibre.tilt:
        lines.append(("    ", f"lateral offset {_len(fibre.offset, units)}, tilt "
                               f"{format_number(math.degrees(fibre.tilt))} deg (in one plane)"))
    if isinstance(coupling, Unavailable):
        return lines + [("  ", f"coupling efficiency: {coupling}")]
    lines.append(("    ", f"beam radius at the face {_len(coupling.beam_radius, units)}, "
                           f"wavefront radius {_len(coupling.wavefront_radius, units)}"))
    if coupling.efficiency < 1e-300:
        return lines + [("  ", "coupling efficiency: practically none (below 1e-300)")]
    lines.append(("  ", f"coupling efficiency {_pct(coupling.efficiency)} "
                        f"({format_number(-coupling.loss_db)} dB); size and curvature mismatch "
                        f"alone {_pct(coupling.mismatch)} (Gaussian mode overlap, Joyce & "
                        "DeLoach 1984)"))
    return lines


def beam_warnings(program: Program) -> list[str]:
    """A warning for each clear aperture past a stated clipping or clearance limit."""
    settings = program.beams
    if settings is None or program.system.beam is None or (
            settings.clipping_limit is None and settings.clearance_limit is None):
        return []
    from ..engines.beams import propagation

    beam = propagation(program.system)
    if beam.problem() is not None:
        return []
    found = []
    for aperture in beam.apertures():
        lost = 1 - aperture.passed
        if settings.clipping_limit is not None and lost > settings.clipping_limit:
            found.append(f"warning: {aperture.boundary} clips {_pct(lost)} of the beam's "
                         f"power (limit {_pct(settings.clipping_limit)})")
        if settings.clearance_limit is not None and aperture.clearance < settings.clearance_limit:
            found.append(f"warning: {aperture.boundary}'s clear diameter is only "
                         f"{format_number(aperture.clearance, 4)} beam diameters (limit "
                         f"{format_number(settings.clearance_limit, 4)})")
    return found


def _json(value: Any) -> Any:
    if isinstance(value, Unavailable):
        return {"value": None, "why": value.reason}
    from .machine import round12

    return round12(float(value))


def beam_json(program: Program) -> dict:
    """The beam section as plain data (12 significant digits; a value that does not exist is
    {"value": null, "why": ...})."""
    from ..engines.beams import beam_value, propagation

    system = program.system
    units = system.units
    beam = propagation(system)
    spec = system.beam
    if beam.problem() is not None:
        return {"why": beam.problem().reason}
    out = beam.output()
    found: dict = {
        "input": {"waist_radius": _json(spec.waist_radius),
                  "waist_before_first_boundary": _json(spec.waist_distance),
                  "wavelength_nm": _json(to_nanometres(spec.wavelength, units)),
                  "propagation_ratio": _json(spec.propagation_ratio)},
        "output": {"waist_position": _json(out.waist_position),
                   "waist_radius": _json(out.waist_radius),
                   "rayleigh_range": _json(out.rayleigh_range),
                   "divergence_mrad": _json(out.divergence * 1000)},
        "boundaries": [],
        "warnings": beam_warnings(program),
    }
    apertures = {a.boundary: a for a in beam.apertures()}
    for i, boundary in enumerate(system.boundaries):
        at = beam.at_boundary(i)
        row = {"name": boundary.name, "beam_radius": _json(at.radius),
               "wavefront_radius": _json(at.wavefront_radius)}
        aperture = apertures.get(boundary.name)
        if aperture is not None:
            row["power_passed_percent"] = _json(aperture.passed * 100)
            row["clearance"] = _json(aperture.clearance)
        found["boundaries"].append(row)
    if apertures:
        found["power_passed_percent"] = _json(beam.power_passed() * 100)
    if system.fibre is not None:
        coupling = beam.coupling()
        if isinstance(coupling, Unavailable):
            found["coupling"] = _json(coupling)
        elif coupling.efficiency < 1e-300:
            found["coupling"] = {"value": None, "why": "practically none (below 1e-300)"}
        else:
            found["coupling"] = {"efficiency_percent": _json(coupling.efficiency * 100),
                                 "efficiency_db": _json(-coupling.loss_db),
                                 "mismatch_percent": _json(coupling.mismatch * 100),
                                 "face_after_last_boundary": _json(coupling.face_distance)}
    settings = program.beams
    if settings is not None and settings.reports:
        found["requested"] = [
            {"quantity": beam_label(name, place), "unit": display_unit(QUANTITIES[name].kind,
                                                                       units),
             "value": _json(to_display(beam_value(system, name, place),
                                       QUANTITIES[name].kind, units))
             if not isinstance(beam_value(system, name, place), Unavailable)
             else _json(beam_value(system, name, place))}
            for name, place in settings.reports]
    return found
