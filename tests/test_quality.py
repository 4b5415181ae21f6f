"""Tests of image quality: the statements of grammar/quality.lark (interpretation, one clear
error each), the Zernike terms, the wavefront's conventions (tilt, lost rays, annular and
vignetted pupils), the MTF (weights, geometric fallback, through focus) and `expect`.

Expected values are the engines' own identities (Noll's terms are orthonormal, moving the
reference point tilts the wavefront by NA·Δ/λ, a perfect lens's pupil is a full circle);
published checks are in tests/outside/test_image_quality_published.py.
"""

from __future__ import annotations

import math

import numpy as np
import pytest

from layoutlang import loads
from layoutlang.checks import check_program
from layoutlang.errors import LayoutError
from layoutlang.engines import aberrations, firstorder
from layoutlang.engines import psf as P
from layoutlang.engines import wavefront as W
from layoutlang.engines.mtf import transfer, through_focus
from layoutlang.engines.quality import ImageQuality
from layoutlang.engines.zernike import fit, lookup_term, noll_to_nm, term_name, zernike

DOUBLET = """
units mm
medium crown index 1.5168
medium flint index 1.6200
wavelengths 587.6 nm primary
object at infinity, field angle 1.8 deg
start in air
surface front radius 60.53 into crown, clear diameter 20
gap 6.0
surface joint radius -38.52 into flint
gap 2.5
surface back radius -146.7 into air, clear diameter 20
stop 2 before front, f-number 6
image at focus
sensor 4.8 mm by 3.6 mm, pixel pitch 6 um
"""


def _setup(text: str):
    program = loads(text)
    results = firstorder.first_order(program.system)
    return program, results, aberrations.setup(program.system, results)


# --- Zernike ---------------------------------------------------------------------------------
def test_noll_indices_and_names():
    assert [noll_to_nm(j) for j in (1, 2, 3, 4, 5, 6, 7, 8, 11, 22)] == [
        (0, 0), (1, 1), (1, -1), (2, 0), (2, -2), (2, 2), (3, -1), (3, 1), (4, 0), (6, 0)]
    assert term_name(4) == "defocus" and term_name(11) == "spherical"
    assert term_name(7) == "vertical coma" and term_name(22) == "secondary spherical"
    assert lookup_term("primary  spherical") == 11 and lookup_term("nothing") is None


def test_zernike_terms_are_orthonormal_over_the_disk_and_fit_back():
    u = P.cell_centres(200)
    x, y = np.meshgrid(u, u)
    inside = x * x + y * y <= 1
    rho, theta = np.hypot(x, y)[inside], np.arctan2(y, x)[inside]
    terms = np.stack([zernike(j, rho, theta) for j in range(1, 16)])
    gram = terms @ terms.T / inside.sum()
    assert gram == pytest.approx(np.eye(15), abs=0.02)
    wave = 0.3 * zernike(4, rho, theta) - 0.1 * zernike(8, rho, theta)
    found = fit(x[inside], y[inside], wave)
    assert found.coefficient(4) == pytest.approx(0.3) and found.coefficient(8) == \
        pytest.approx(-0.1) and found.residual_rms < 1e-12


# --- wavefront -------------------------------------------------------------------------------
def test_moving_the_reference_point_tilts_the_wavefront_by_na_over_lambda():
    program, results, s = _setup(DOUBLET)
    b = W.bundle(s, 1.0, 32, results["exit pupil position"])
    here = W.wavefront(b)
    moved = W.wavefront(b, centre=here.centre + np.array([0.0, 0.001, 0.0]))
    change = moved.tilt[1] - here.tilt[1]
    assert change == pytest.approx(-here.na_y * 0.001 / s.wavelength, rel=0.01)
    point = np.array(here.best_point() + (here.centre[2],))
    assert abs(W.wavefront(b, centre=point).tilt[1]) < 0.02 * abs(here.tilt[1]) + 1e-3


def test_vignetted_rays_are_counted_and_named_never_dropped():
    text = DOUBLET.replace("surface back radius -146.7 into air, clear diameter 20",
                           "surface back radius -146.7 into air, clear diameter 13")
    program, results, s = _setup(text)
    b = W.bundle(s, 1.0, 32, results["exit pupil position"])
    assert b.lost > 0 and "outside the clear diameter at 'back'" in b.lost_words
    wf = W.wavefront(b)
    assert int(wf.valid.sum()) == int(b.inside.sum()) - b.lost
    assert not wf.zernike.full_circle
    assert "lost" in W.describe_lost(b)


def test_annular_pupil_lowers_the_middle_frequencies_as_an_obscuration_does():
    u = P.cell_centres(64)
    x, y = np.meshgrid(u, u)
    r2 = x * x + y * y
    full = P.PupilFunction((r2 <= 1).astype(float), np.zeros((64, 64)), 0.0005, 0.1, 0.1)
    ring = P.PupilFunction(((r2 <= 1) & (r2 >= 0.25)).astype(float), np.zeros((64, 64)),
                           0.0005, 0.1, 0.1)
    t_full, _ = P.line_otfs(P.psf(full)[None])
    t_ring, _ = P.line_otfs(P.psf(ring)[None])
    middle = 100  # cycles/mm, cut-off 400
    step = P.sampling(full).step_y
    assert abs(t_ring[0, int(middle / step)]) < abs(t_full[0, int(middle / step)])
    assert P.encircled_energy(ring, 0.0005 * 1.22 * 5)[0] < \
        P.encircled_energy(full, 0.0005 * 1.22 * 5)[0]


# --- MTF -------------------------------------------------------------------------------------
def test_mtf_weights_geometric_fallback_and_through_focus():
    program, results, s = _setup(DOUBLET)
    b = W.bundle(s, 0.0, 32, results["exit pupil position"])
    wf = W.wavefront(b)
    tr = transfer([wf], [1.0], [0.0, 50.0, 100.0])
    assert tr.method == "diffraction" and tr.tangential[0] == pytest.approx(1.0)
    assert np.all(tr.tangential <= tr.limit_tangential + 1e-9)
    same = transfer([wf, wf], [1.0, 3.0], [50.0])
    assert same.tangential[0] == pytest.approx(tr.tangential[1])
    far = W.wavefront(b, shift=1.5)  # many waves of defocus: too steep for 32 cells
    assert far.steep > W.STEEP_WAVES
    fallback = transfer([far], [1.0], [50.0])
    assert fallback.method == "geometric" and "geometric MTF" in fallback.note
    tangential, _ = through_focus([b], [1.0], 50.0, [-0.2, 0.0, 0.2])
    assert tangential[1] > tangential[0] and tangential[1] > tangential[2]


# --- the language ----------------------------------------------------------------------------
def test_quality_expectations_are_checked_with_units():
    program = loads(DOUBLET + """wavefront grid 32
expect mtf at half nyquist at field 0 > 0.5
expect mtf at 500 cycles per mm > 0.1
expect wavefront error rms at field 0 < 0.05 waves
expect strehl ratio > 0.9
expect encircled energy within 5 um > 80%
expect chief-ray angle at sensor corner < 3 deg
expect sensor covered by image circle
""")
    checked = check_program(program)
    assert [c.passed for c in checked] == [True, False, True, True, True, True, True]
    assert "waves" in checked[2].outcome.message and "deg" in checked[5].outcome.message


def test_sensor_places_are_solved_on_the_real_chief_ray():
    program = loads(DOUBLET)
    quality = ImageQuality(program.system, program.rays, program.quality.settings)
    fraction = quality.field_for_height(3.0)
    row = quality.field_row(fraction)
    assert abs(row.image_height) == pytest.approx(3.0, rel=1e-9)


@pytest.mark.parametrize("line, words", [
    ("sensor 4 mm by 3 mm, pixel pitch 5 mm", "larger than the sensor"),
    ("sensor 4 mm by 3 mm, pixel pitch 5 um\nsensor 4 mm by 3 mm, pixel pitch 5 um",
     "given twice"),
    ("sensor 4 deg by 3 mm, pixel pitch 5 um", "must be a length"),
    ("wavefront grid 4", "from 8 to 512"),
    ("wavefront grid 32", "has no effect"),
    ("wavelength weights 1, 2", "2 wavelength weight(s) for 1 wavelength(s)"),
    ("wavelength weights 0", "more than zero"),
    ("expect mtf at 50 cycles per parsec > 0.3", "unknown length unit"),
    ("expect mtf at 50 mm cycles per mm > 0.3", "plain number of cycles"),
    ("expect mtf at 50 cycles per mm at field 1 at field 0 > 0.3", "given twice"),
    ("expect strehl ratio tangential > 0.3", "has no orientation"),
    ("expect strehl ratio > 0.3 waves", "not measured in waves"),
    ("expect zernike 40 < 0.1", "numbered 1 to 22"),
    ("expect zernike purple coma < 0.1", "unknown Zernike term"),
    ("expect encircled energy radius for 120% < 5 um", "between 0 and 1"),
    ("expect chief-ray angle < 5", "needs a unit"),
    ("expect wavefront error rms < 1 mm", "plain number"),
    ("expect mtf at 50 cycles per mm > 3 mm", "fraction"),
    ("expect mtf at 50 cycles per mm at field 2 > 0.3", "within the full field"),
])
def test_bad_quality_statements_give_one_clear_error_with_a_caret(line, words):
    base = DOUBLET.replace("sensor 4.8 mm by 3.6 mm, pixel pitch 6 um\n", "")
    base = base.replace("wavefront grid 32\n", "")
    with pytest.raises(LayoutError) as caught:
        loads(base + line + "\n")
    text = str(caught.value)
    assert words in text
    assert "^" in text and ":" in text.splitlines()[0]


@pytest.mark.parametrize("line, words", [
    ("expect mtf at nyquist > 0.3", "needs a 'sensor' statement"),
    ("expect strehl ratio at sensor corner > 0.3", "needs a 'sensor' statement"),
    ("expect sensor covered by image circle", "needs a 'sensor' statement"),
])
def test_sensor_words_need_a_sensor(line, words):
    text = DOUBLET.replace("sensor 4.8 mm by 3.6 mm, pixel pitch 6 um\n", "")
    with pytest.raises(LayoutError) as caught:
        loads(text + line + "\n")
    assert words in str(caught.value) and "^" in str(caught.value)


def test_a_sensor_beyond_the_field_is_said_in_words():
    program = loads(DOUBLET.replace("field angle 1.8 deg", "field angle 1 deg")
                    + "expect mtf at nyquist at sensor corner > 0.1\n"
                      "expect sensor covered by image circle\n")
    checked = check_program(program)
    assert not checked[0].passed and "beyond the full field" in checked[0].outcome.message
    assert not checked[1].passed


def test_draw_what_writes_each_quality_picture_with_the_same_bytes(tmp_path):
    from layoutlang.cli import main

    script = tmp_path / "camera.lay"
    script.write_text(DOUBLET + "wavefront grid 16\nexpect strehl ratio > 0.5\n",
                      encoding="utf-8")
    for what in ("spots", "fans", "mtf"):
        first, second = tmp_path / f"{what}1.svg", tmp_path / f"{what}2.svg"
        assert main(["draw", str(script), "--what", what, "-o", str(first)]) == 0
        assert main(["draw", str(script), "--what", what, "-o", str(second)]) == 0
        assert first.read_bytes() == second.read_bytes() and b"<svg" in first.read_bytes()
