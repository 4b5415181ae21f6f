"""Tolerances: the statements and their errors, batched units against one-by-one units,
compensators, reproducible Monte Carlo runs (any runner, any worker count), the command."""

from __future__ import annotations

import json
from dataclasses import replace
from pathlib import Path

import numpy as np
import pytest

from layoutlang import loads
from layoutlang.cli import main
from layoutlang.engines.firstorder import first_order
from layoutlang.errors import LayoutError
from layoutlang.tolerance.analysis import analyse, monte_carlo, run_batch
from layoutlang.tolerance.command import local_runner
from layoutlang.tolerance.perturb import compensated, image_plane, perturbed
from layoutlang.tolerance.sampling import BATCH, batch_sizes, draw, batch_generator

TRIPLET = """\
layout "tolerance test triplet"
medium crown index 1.62, abbe number 60.3
medium flint index 1.60, abbe number 38.0
object 800 before, height 60
start in air
surface front radius 21.48 into crown
gap 3.26
surface rear_crown radius -174.5 into air
gap 4.1
surface flint_front radius -20.2 into flint
gap 1.0
surface flint_back radius 19.7 into air
gap 4.0
surface last_front radius 78.6 into crown
gap 3.0
surface last_back radius -16.85 into air
stop 1.2 before flint_front, diameter 7.5
image 41.1 after
expect focal length = 43.5 ± 0.5
expect magnification = -0.0566 within 2%
expect f-number < 5.6
"""

TOLERANCES = """\
tolerance radius of front ± 0.3 %
tolerance radius of last_back ± 0.05 mm, normal 2 sigma
tolerance gap after front ± 0.05 mm, end points
tolerance index of crown ± 0.001
tolerance abbe number of flint ± 0.5 %
compensate gap after rear_crown within 1 mm
monte carlo 1500 samples, seed 4
expect yield > 50 %
"""


def program(extra: str = TOLERANCES, base: str = TRIPLET):
    return loads(base + extra, "triplet.lay")


def test_statements_build_the_setup():
    setup = program().tolerances
    assert [i.label for i in setup.items] == [
        "radius of front", "radius of last_back", "gap after front", "index of crown",
        "abbe number of flint"]
    radius = setup.items[0]
    assert radius.relative and radius.limit == pytest.approx(0.003)
    assert setup.items[1].distribution == "normal" and setup.items[1].sigmas == 2
    assert setup.items[2].distribution == "end points"
    assert setup.compensators[0].position == 1 and setup.compensators[0].limit == 1
    assert (setup.samples, setup.seed) == (1500, 4)


@pytest.mark.parametrize("line, words", [
    ("tolerance radius of nowhere ± 1 mm", "no surface named 'nowhere'"),
    ("tolerance gap after last_back ± 1 mm", "no gap follows 'last_back'"),
    ("tolerance index of glass ± 0.001", "no medium named 'glass'"),
    ("tolerance abbe number of air ± 1", "needs a medium given by its index and Abbe number"),
    ("tolerance radius of front ± 1 deg", "a radius tolerance"),
    ("tolerance radius of front ± 0 mm", "a tolerance limit is a positive number"),
    ("tolerance radius of front ± 150 %", "less than 100 %"),
    ("tolerance radius of front ± 0.1 mm, normal 9 sigma", "0.5 to 6 sigma"),
    ("tolerance radius of front ± 0.1 mm\ntolerance radius of front ± 0.2 mm",
     "toleranced twice"),
    ("monte carlo 5 samples", "from 10 to"),
    ("monte carlo 100.5 samples", "whole number"),
    ("tolerance radius of front ± 0.1 mm\nexpect yield > 95", "a yield is a percentage"),
    ("tolerance radius of front ± 0.1 mm\nexpect yield = 95 %", "a yield is a bound"),
    ("expect yield > 95 %", "a yield needs tolerances"),
    ("compensate focus", "a compensator without tolerances"),
    ("tolerance radius of front ± 0.1 mm\ncompensate focus\ncompensate focus", "twice"),
])
def test_errors_point_at_the_words(line, words):
    with pytest.raises(LayoutError) as raised:
        program(line + "\n")
    message = str(raised.value)
    assert words in message
    assert "triplet.lay:" in message and "^" in message


def test_a_flat_surface_has_no_radius_to_tolerance():
    base = TRIPLET.replace("surface flint_back radius 19.7", "surface flint_back flat")
    with pytest.raises(LayoutError, match="tolerance its curvature instead"):
        program("tolerance radius of flint_back ± 1 mm\n", base)


def test_batch_equals_one_unit_at_a_time():
    """One array pass over S units gives each unit's own first-order numbers."""
    p = program()
    setup = p.tolerances
    deltas = draw(setup.items, 7, batch_generator(9, 0))
    plane = image_plane(p.system)
    batch = compensated(perturbed(p.system, setup.items, deltas), setup.compensators, plane,
                        p.system)
    together = first_order(batch)
    for unit in range(7):
        alone = first_order(compensated(perturbed(p.system, setup.items, deltas[:, unit]),
                                        setup.compensators, plane, p.system))
        for name in ("focal length", "image distance", "f-number", "magnification", "defocus"):
            assert np.asarray(together[name])[unit] == pytest.approx(alone[name], rel=1e-12,
                                                                       abs=1e-12)


def test_zero_perturbation_is_the_nominal_layout():
    p = program()
    zero = np.zeros(len(p.tolerances.items))
    unit = perturbed(p.system, p.tolerances.items, zero)
    assert dict(first_order(unit)) == dict(first_order(p.system))


def test_gap_compensator_brings_each_unit_to_focus_on_the_image_plane():
    p = program()
    setup = p.tolerances
    deltas = draw(setup.items, 50, batch_generator(2, 0))
    batch = compensated(perturbed(p.system, setup.items, deltas), setup.compensators, 41.1,
                        p.system)
    moved = np.asarray(batch.gaps[1]) - p.system.gaps[1]
    inside = np.abs(moved) < 1 - 1e-9
    defocus = np.asarray(first_order(batch)["defocus"])
    assert inside.any()
    assert np.allclose(defocus[inside], 0, atol=1e-9)


def test_focus_compensator_puts_the_image_plane_at_each_units_focus():
    p = program(TOLERANCES.replace("compensate gap after rear_crown within 1 mm",
                                   "compensate focus"))
    setup = p.tolerances
    deltas = draw(setup.items, 20, batch_generator(3, 0))
    batch = compensated(perturbed(p.system, setup.items, deltas), setup.compensators, 41.1,
                        p.system)
    results = first_order(batch)
    assert np.allclose(results["defocus"], 0, atol=1e-12)
    assert np.ptp(np.asarray(results["image plane distance"])) > 0


def test_focus_compensator_stops_at_its_limit():
    p = program(TOLERANCES.replace("compensate gap after rear_crown within 1 mm",
                                   "compensate focus within 0.01 mm"))
    setup = p.tolerances
    deltas = draw(setup.items, 200, batch_generator(3, 0))
    batch = compensated(perturbed(p.system, setup.items, deltas), setup.compensators, 41.1,
                        p.system)
    plane = np.asarray(batch.image.distance)
    assert np.all(np.abs(plane - 41.1) <= 0.01 + 1e-12)
    assert np.abs(np.asarray(first_order(batch)["defocus"])).max() > 0.01


def test_the_same_seed_gives_the_same_run_and_batches_are_independent():
    p = program()
    plane = image_plane(p.system)
    first = monte_carlo(p, plane)
    again = monte_carlo(p, plane)
    assert first == again
    # batch 1 alone is the same whatever ran before it
    deltas, values, _ = run_batch(p, 1, 100, plane)
    assert np.array_equal(deltas, draw(p.tolerances.items, 100, batch_generator(4, 1)))
    other = monte_carlo(p, plane, seed=5)
    assert other.yields != first.yields or other.means != first.means


def test_threads_give_the_same_numbers_as_one_process():
    p = program()
    text = TRIPLET + TOLERANCES
    plane = image_plane(p.system)
    serial = monte_carlo(p, plane)
    threaded = monte_carlo(p, plane, runner=local_runner(text, "triplet.lay", ".", 1500, 4,
                                                         workers=2))
    assert serial == threaded


def test_batches_split_the_samples():
    assert batch_sizes(2 * BATCH + 5) == [BATCH, BATCH, 5]
    assert sum(batch_sizes(1500)) == 1500


def test_unit_by_unit_quantities_are_named():
    p = program(TOLERANCES + "expect axial colour between F and C < 1\n")
    result = analyse(p, samples=20)
    assert result.one_by_one == ("expect axial colour between F and C < 1",)
    assert result.monte_carlo.samples == 20


def test_sensitivity_is_sorted_by_share_of_margin():
    result = analyse(program(), monte=False)
    shares = [row.share for row in result.rows]
    assert shares == sorted(shares, reverse=True)
    assert result.monte_carlo is None


def test_expect_yield_fails_check_when_tolerances_are_loose(tmp_path):
    loose = TOLERANCES.replace("± 0.3 %", "± 3 %").replace("expect yield > 50 %",
                                                           "expect yield > 99 %")
    path = tmp_path / "loose.lay"
    path.write_text(TRIPLET + loose, encoding="utf-8")
    assert main(["check", str(path)]) == 1


def test_tolerance_command_text_json_worst_and_histograms(tmp_path, capsys):
    path = tmp_path / "triplet.lay"
    path.write_text(TRIPLET + TOLERANCES.replace("± 0.3 %", "± 2 %"), encoding="utf-8")
    status = main(["tolerance", str(path), "--samples", "300", "--worst", str(tmp_path / "w"),
                   "--histograms", str(tmp_path / "h.png")])
    out = capsys.readouterr().out
    assert status in (0, 1)
    assert "sensitivity: each tolerance alone" in out and "monte carlo: 300 units" in out
    assert "95 % Wilson interval" in out
    written = sorted((tmp_path / "w").glob("*.lay"))
    assert written and (tmp_path / "h.png").read_bytes()[:4] == b"\x89PNG"
    # a worst unit is a script that loads, with the front radius moved at its own token
    unit = loads(written[0].read_text(encoding="utf-8"), str(written[0]))
    assert unit.system.boundaries[0].curvature != program().system.boundaries[0].curvature
    status = main(["tolerance", str(path), "--samples", "300", "--json"])
    data = json.loads(capsys.readouterr().out)
    assert data["monte_carlo"]["samples"] == 300
    assert data["sensitivity"][0]["share_of_margin"] is not None


def test_tolerance_command_on_a_script_without_tolerances(tmp_path, capsys):
    path = tmp_path / "plain.lay"
    path.write_text(TRIPLET, encoding="utf-8")
    assert main(["tolerance", str(path)]) == 2
    assert "has no tolerances" in capsys.readouterr().err


def test_report_tolerances_adds_the_section_to_run(tmp_path, capsys):
    path = tmp_path / "triplet.lay"
    path.write_text(TRIPLET + TOLERANCES + "report tolerances\n", encoding="utf-8")
    main(["run", str(path)])
    out = capsys.readouterr().out
    assert "\ntolerances\n" in out and "yield (every expectation met)" in out
    main(["run", str(path), "--json"])
    assert "monte_carlo" in json.loads(capsys.readouterr().out)["tolerances"]


def test_output_is_deterministic(tmp_path, capsys):
    path = tmp_path / "triplet.lay"
    path.write_text(TRIPLET + TOLERANCES, encoding="utf-8")
    main(["tolerance", str(path), "--json"])
    first = capsys.readouterr().out
    main(["tolerance", str(path), "--json"])
    assert capsys.readouterr().out == first
