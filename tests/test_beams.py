"""Tests of laser beams and fibres in scripts: the statements, their errors, the quantities
through `expect`/`report`, array-valued layouts, reports and the laser caution."""

from __future__ import annotations

import json
import math
from dataclasses import replace

import numpy as np
import pytest

import layoutlang
from layoutlang.checks import check_program, evaluate_program
from layoutlang.engines.beams import BeamPropagation, beam_value
from layoutlang.errors import LayoutError
from layoutlang.hazards import CAUTIONS

HEAD = "units mm\nbeam waist radius 0.5, waist 100 before, wavelength 1064 nm\n"
LAYOUT = "start in air\nlens head focal length 100, clear diameter 3\nimage at focus\n"
FIBRE = "fibre mode field diameter 0.135473, at waist\n"


def load(text: str):
    return layoutlang.loads(text)


def outcomes(text: str) -> list[tuple[bool, str]]:
    return [(r.passed, r.outcome.message) for r in check_program(load(text))]


def test_a_beam_through_a_lens_at_its_focal_distance_has_its_waist_at_the_back_focus() -> None:
    program = load(HEAD + LAYOUT + "expect waist position = 100 ± 1e-9\n"
                   "expect waist radius = 0.0677363 ± 1e-7\n"
                   "expect divergence = 5 mrad ± 1e-6 mrad\n"
                   "expect rayleigh range = 13.5473 ± 1e-4\n")
    assert all(passed for passed, _ in outcomes_of(program))


def outcomes_of(program) -> list[tuple[bool, str]]:
    return [(r.passed, r.outcome.message) for r in check_program(program)]


def test_coupling_efficiency_in_percent_and_decibels() -> None:
    text = HEAD + LAYOUT + "fibre mode field diameter 0.1354727, at waist\n" \
        "expect coupling efficiency > 99.99 %\nexpect coupling loss < 0.001 dB\n"
    assert all(passed for passed, _ in outcomes(text))
    failing = outcomes(HEAD + LAYOUT + "fibre mode field diameter 0.05, at waist\n"
                                       "expect coupling efficiency > 80 %\n")
    assert failing[0][0] is False and "coupling efficiency = " in failing[0][1]


def test_offset_and_tilt_reduce_the_coupling() -> None:
    base = HEAD + LAYOUT
    aligned = beam_value(load(base + "fibre mode field diameter 0.135473, at waist\n").system,
                         "coupling efficiency")
    offset = beam_value(load(base + "fibre mode field diameter 0.135473, at waist, offset 5 um\n"
                             ).system, "coupling efficiency")
    tilted = beam_value(load(base + "fibre mode field diameter 0.135473, at waist, tilt 0.3 deg\n"
                             ).system, "coupling efficiency")
    assert aligned > offset and aligned > tilted
    # the offset alone: Marcuse's factor exp(−2d²/(w1²+w2²)) for equal modes
    assert offset / aligned == pytest.approx(math.exp(-2 * 0.005 ** 2 / (2 * 0.0677363 ** 2)),
                                             rel=1e-5)


def test_beam_radius_and_wavefront_radius_at_places() -> None:
    text = HEAD + "let screen = 300\n" + LAYOUT + (
        "expect beam radius at head = 0.504567 ± 1e-6\n"
        "expect beam radius at image = 0.0677363 ± 1e-7\n"
        "expect beam radius at 0.1 m after = 0.0677363 ± 1e-7\n"
        "expect beam radius at 300 after > 1\n"
        "expect beam radius at screen > 1\n"
        "expect wavefront radius at head = -101.835 ± 0.001\n")
    results = outcomes(text)
    assert all(passed for passed, _ in results), results


def test_a_flat_wavefront_is_said_in_words() -> None:
    program = load(HEAD + LAYOUT + "report wavefront radius at image\n")
    from layoutlang.reports.text import full_report

    results, checked = evaluate_program(program)
    text = full_report(program, results, checked)
    assert "wavefront radius at the image plane  infinite: the wavefront is flat" in text


def test_power_passed_at_apertures_and_the_limits_warn() -> None:
    text = ("units mm\nbeam waist radius 1, wavelength 633 nm\nstart in air\n"
            "surface window flat, clear diameter 2.5\ngap 10\nsurface exit flat, clear diameter 4\n"
            "clipping limit 0.1 %\nclearance limit 1.5 beam diameters\n"
            "expect power passed at window = 95.606 % ± 0.001 %\n"
            "expect power passed > 95 %\n")
    program = load(text)
    assert all(r.passed for r in check_program(program))
    from layoutlang.reports.beams import beam_warnings

    warnings = beam_warnings(program)
    assert any("window clips 4.39" in w for w in warnings)
    assert any("window's clear diameter is only 1.25 beam diameters" in w for w in warnings)
    assert not any("exit" in w for w in warnings)


def test_the_laser_caution_comes_with_every_beam() -> None:
    program = load(HEAD + LAYOUT)
    assert "laser" in program.hazards
    from layoutlang.reports.text import full_report

    results, checked = evaluate_program(program)
    assert CAUTIONS["laser"] in full_report(program, results, checked)
    from layoutlang.reports.machine import program_json

    data = program_json(program, results, checked)
    assert CAUTIONS["laser"] in data["cautions"]
    assert data["beam"]["output"]["waist_position"] == pytest.approx(100)
    json.dumps(data, allow_nan=False)


def test_a_beam_at_a_wavelength_of_the_layout_and_in_a_dispersive_medium() -> None:
    text = ("units mm\nwavelengths d primary, C\nbeam waist radius 0.3, waist 50 before\n"
            "medium glass glass code 517642\nstart in air\nsurface radius 50 into glass\ngap 4\n"
            "surface radius -50 into air\n")
    at_primary = load(text)
    assert at_primary.system.beam.wavelength == pytest.approx(587.5618e-6)
    at_c = load(text.replace("waist 50 before", "waist 50 before, wavelength C"))
    # the glass has less index at C, so the waist lands further away
    assert beam_value(at_c.system, "waist position") > beam_value(at_primary.system,
                                                                   "waist position")


def test_array_valued_layouts_give_array_quantities() -> None:
    """Tolerance samples: a gap and a focal length as arrays, one pass through the engine."""
    program = load(HEAD + "start in air\nlens one focal length 100\ngap 20\n"
                          "lens two focal length 50\n" + FIBRE.replace("at waist", "30 after"))
    system = program.system
    gaps = np.array([20.0, 20.5, 19.5, 21.0])
    sampled = replace(system, gaps=(gaps,))
    efficiency = beam_value(sampled, "coupling efficiency")
    assert isinstance(efficiency, np.ndarray) and efficiency.shape == (4,)
    for i, gap in enumerate(gaps):
        one = replace(system, gaps=(float(gap),))
        assert efficiency[i] == pytest.approx(beam_value(one, "coupling efficiency"), rel=1e-12)
        assert beam_value(sampled, "waist position")[i] == pytest.approx(
            beam_value(one, "waist position"), rel=1e-12)
    loss = beam_value(sampled, "coupling loss")
    assert np.allclose(loss, -10 * np.log10(efficiency))


def test_the_envelope_passes_through_the_waists() -> None:
    beam = BeamPropagation(load(HEAD + LAYOUT).system)
    points = beam.envelope(100.0, 200.0, samples=201)
    first = min(points[:201], key=lambda p: p.radius)
    assert first.distance == pytest.approx(-100.0) and first.radius == pytest.approx(0.5)
    after = [p for p in points if p.space == 1]
    smallest = min(after, key=lambda p: p.radius)
    assert smallest.distance == pytest.approx(100.0, abs=1.0)


def test_statements_round_trip_and_report_sections() -> None:
    from layoutlang.syntax.unparse import unparse

    text = HEAD + LAYOUT + FIBRE + "report beam radius at head\nreport coupling efficiency\n"
    program = load(text)
    assert program.beams.reports[0][1].label == "head"
    assert layoutlang.parse(unparse(layoutlang.parse(text).statements)).statements == \
        layoutlang.parse(text).statements


@pytest.mark.parametrize("text, words", [
    ("units mm\nbeam waist 10 before, wavelength 1 um\n" + LAYOUT, "needs its waist radius"),
    ("units mm\nbeam waist radius 0\n" + LAYOUT, "must be more than zero"),
    ("units mm\nbeam waist radius 1, waist radius 2\n" + LAYOUT, "given twice"),
    ("units mm\nbeam waist radius 1, wavelength 500\n" + LAYOUT, "needs a length unit"),
    ("units mm\nbeam waist radius 1, wavelength 1 um, propagation ratio 0.8\n" + LAYOUT,
     "1 or more"),
    ("units mm\nbeam waist radius 1\n" + LAYOUT, "the beam needs a wavelength"),
    (HEAD + HEAD.split("\n")[1] + "\n" + LAYOUT, "the beam is given twice"),
    (HEAD + LAYOUT + "fibre at image\n", "needs its mode-field diameter"),
    (HEAD + LAYOUT + "fibre mode field diameter 0.01\n", "say where the fibre's face is"),
    (HEAD + LAYOUT + "fibre mode field diameter 0.01 at 1550 nm, at image\n",
     "given at another wavelength"),
    (HEAD + LAYOUT + "fibre mode field diameter 0.01, at image, tilt 2\n", "needs a unit"),
    (HEAD + LAYOUT + "fibre mode field diameter 0.01, at image, tilt 95 deg\n", "less than 90"),
    ("units mm\n" + LAYOUT + "fibre mode field diameter 0.01, at image\n", "needs a beam"),
    ("units mm\n" + LAYOUT + "expect waist radius < 1\n", "needs a beam"),
    ("units mm\n" + LAYOUT + "clipping limit 1 %\n", "needs a beam"),
    ("units mm\n" + LAYOUT + "report beam radius at head\n", "needs a beam"),
    (HEAD + LAYOUT + "expect coupling efficiency > 80 %\n", "needs a fibre"),
    (HEAD + LAYOUT + "report coupling loss\n", "needs a fibre"),
    (HEAD + LAYOUT + "expect beam radius < 1\n", "say where the beam radius is taken"),
    (HEAD + LAYOUT + "expect waist radius at head < 1\n", "not taken at a place"),
    (HEAD + LAYOUT + "expect beam radius at hed < 1\n", "did you mean 'head'"),
    (HEAD + LAYOUT + "expect focal length at 3 after < 1\n", "not taken at a distance"),
    (HEAD + LAYOUT + "expect power passed at 3 after > 1 %\n", "taken at a boundary"),
    (HEAD + "start in air\nlens head focal length 100\nexpect power passed at head > 1 %\n",
     "has no clear diameter"),
    (HEAD + LAYOUT + "clipping limit 120 %\n", "less than 100 %"),
    (HEAD + LAYOUT + "clearance limit 0 beam diameters\n", "more than zero"),
    (HEAD + LAYOUT + "clipping limit 1 %\nclipping limit 2 %\n", "given twice"),
    (HEAD + LAYOUT + "expect divergence < 5\n", "needs a unit"),
    (HEAD + LAYOUT + "expect coupling loss < 5 mm\n" + FIBRE, "in decibels"),
    (HEAD + LAYOUT + "report waist radius, focal length\n", "cannot be mixed"),
    (HEAD + LAYOUT + "let tilt = 2 deg\nexpect beam radius at tilt < 1\n",
     "a place is a length"),
])
def test_each_mistake_gets_one_clear_located_error(text: str, words: str) -> None:
    with pytest.raises(LayoutError) as caught:
        check_program(load(text))
    message = str(caught.value)
    assert words in message, message
    assert "<script>:" in message and "^" in message


def test_a_beam_with_propagation_ratio_above_one_has_no_single_mode_coupling() -> None:
    text = (HEAD.replace("1064 nm", "1064 nm, propagation ratio 1.3") + LAYOUT + FIBRE
            + "expect coupling efficiency > 10 %\n")
    passed, message = outcomes(text)[0]
    assert not passed and "not one Gaussian mode" in message


def test_derived_beam_quantities_equal_the_numeric_engine_through_glass() -> None:
    from layoutlang.symbolic.derive import derive

    program = load("symbols R d positive\nnominal R = 40, d = 6\nunits mm\n"
                   "beam waist radius 0.8, waist 60 before, wavelength 633 nm\n"
                   "medium glass index 1.515\nstart in air\nsurface front radius R into glass\n"
                   "gap d\nsurface back radius -R into air\n"
                   "derive waist position, waist radius, rayleigh range\n")
    numeric = BeamPropagation(program.system).output()
    for name, expected in (("waist position", numeric.waist_position),
                           ("waist radius", numeric.waist_radius),
                           ("rayleigh range", numeric.rayleigh_range)):
        derived = derive(program.symbolic, name)
        assert derived.expr is not None and derived.nominal_value == pytest.approx(expected,
                                                                                   rel=1e-10)


@pytest.mark.parametrize("line, words", [
    ("derive waist radius\n", "needs a beam"),
    ("sensitivity of waist radius to R\n", "has no closed form here"),
])
def test_beam_derivations_refuse_what_they_cannot_do(line: str, words: str) -> None:
    text = "symbols R positive\nnominal R = 40\nstart in air\nsurface radius R into air\n"
    if "sensitivity" in line:
        text = "units mm\nbeam waist radius 1, wavelength 1 um\n" + text
    with pytest.raises(LayoutError) as caught:
        load(text + line)
    assert words in str(caught.value)


def test_the_drawing_carries_the_envelope_with_its_waists() -> None:
    from layoutlang.reports.cross_section import cross_section
    from layoutlang.reports.drawing import drawing_bytes

    system = load(HEAD + LAYOUT).system
    section = cross_section(system)
    assert section.beam is not None and not section.rays  # no stop: the beam, not rays
    words = [w for _, _, w in section.beam.waists]
    assert words == ["input waist 500 µm", "output waist 67.7 µm"]
    z_min, z_max, _ = section.extent()
    assert z_min <= -100 and z_max >= 100
    first = drawing_bytes(system, "svg", ("laser",))
    assert first == drawing_bytes(system, "svg", ("laser",)) and b"output waist" in first


def test_a_waist_inside_a_gap_is_marked() -> None:
    from layoutlang.reports.cross_section import cross_section

    system = load(HEAD + "start in air\nlens one focal length 50\ngap 200\n"
                         "lens two focal length 100\n").system
    words = [w for _, _, w in cross_section(system).beam.waists]
    assert any(w.startswith("waist ") for w in words)


@pytest.mark.parametrize("beam", ["beam waist radius 1e-300, wavelength 1 um",
                                  "beam waist radius 1, waist 1e300 before, wavelength 1 um",
                                  "beam waist radius 1, wavelength 1e-200 nm"])
def test_extreme_beams_are_said_in_words_never_inf_or_nan(beam: str) -> None:
    from layoutlang.reports.machine import dumps, program_json
    from layoutlang.reports.text import full_report

    from layoutlang.errors import LayoutValueError

    try:
        program = load(f"units mm\n{beam}\n" + LAYOUT + FIBRE + "expect waist radius < 1\n")
    except LayoutValueError as error:  # the numeric guard refuses the number where written
        assert error.line == 2 and ("too small" in error.message or "too large" in error.message)
        return
    results, checked = evaluate_program(program)
    text = full_report(program, results, checked)
    assert "not computed: out of range" in text
    import re

    assert not re.search(r"\b(nan|inf)\b", text), text
    dumps(program_json(program, results, checked))  # allow_nan=False: raises on nan/inf
    assert not checked[0].passed and "out of range" in checked[0].outcome.message


def test_solve_and_sensitivity_of_the_waist_position() -> None:
    from layoutlang.symbolic.sensitivity import sensitivity_at_nominal
    from layoutlang.symbolic.solve import solve_request

    program = load("symbols f positive\nnominal f = 100\nunits mm\n"
                   "beam waist radius 0.3, waist 150 before, wavelength 1064 nm\nstart in air\n"
                   "lens focusing focal length f\nsolve f so that waist position = 120\n")
    solution = solve_request(program.symbolic, program.symbolic.solves[0])
    roots = sorted(float(s[program.symbolic.symbols[0]]) for s in solution.general)
    for f in roots:  # each focal length puts the waist 120 mm after the lens
        check = load(f"units mm\nbeam waist radius 0.3, waist 150 before, wavelength 1064 nm\n"
                     f"start in air\nlens focal length {f!r}\n")
        assert beam_value(check.system, "waist position") == pytest.approx(120, rel=1e-9)
    slope = sensitivity_at_nominal(program.symbolic, "waist position",
                                   program.symbolic.symbols[0])
    step = 1e-4
    ahead, behind = (beam_value(load(f"units mm\nbeam waist radius 0.3, waist 150 before, "
                                     f"wavelength 1064 nm\nstart in air\nlens focal length "
                                     f"{100 + d}\n").system, "waist position")
                     for d in (step, -step))
    assert slope == pytest.approx((ahead - behind) / (2 * step), rel=1e-6)
