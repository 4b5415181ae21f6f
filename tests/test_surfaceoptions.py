"""Tests of the surface words (grammar/surfaces.lark): conic constants, aspheric coefficients,
Q-type terms, obscurations and holes become the Boundary fields the engines read, reports say
them in words, and every malformed combination is one located error."""

from __future__ import annotations

import json

import pytest

from layoutlang import loads
from layoutlang.errors import LayoutError, LayoutSyntaxError, LayoutUnitError, LayoutValueError
from layoutlang.reports.text import surface_lines

SCOPE = """units mm
start in air
mirror primary radius -1600, conic constant -1, clear diameter 300, obscuration diameter 90, hole diameter 60
gap 600
mirror secondary radius -700, conic constant -4.5, r4 coefficient 1e-11, r8 coefficient 2e-19
gap 700
surface focus flat
"""


def test_the_words_become_the_boundary_fields():
    primary, secondary, _ = loads(SCOPE).system.boundaries
    assert primary.conic == -1 and primary.obscuration_diameter == 90
    assert primary.hole_diameter == 60 and primary.aperture.obscuration_ratio == 0.3
    assert secondary.even_terms == (1e-11, 0.0, 2e-19)  # r4, r6 (not given), r8
    assert not secondary.is_spherical and secondary.profile.form == "even asphere"


def test_aspheric_coefficients_may_be_as_small_as_they_are_in_practice():
    # an r10 term of a mirror in mm is of order 1e-20: below the guard's 1e-15 for other numbers
    boundary = loads("start in air\nmirror m radius -800, r4 coefficient 1e-12, "
                     "r10 coefficient -2.5e-21\n").system.boundaries[0]
    assert boundary.even_terms[-1] == -2.5e-21
    with pytest.raises(LayoutValueError, match="too small"):
        loads("start in air\nmirror m radius -800, conic constant 1e-19\n")


def test_q_type_terms_fill_the_missing_indices_with_zero():
    boundary = loads("start in air\nmedium g index 1.5\nsurface s radius 20 into g, "
                     "q-type a0 1e-3, q-type a2 -2e-4, q-type normalisation radius 8\n"
                     ).system.boundaries[0]
    assert boundary.q_terms == (1e-3, 0.0, -2e-4) and boundary.q_radius == 8
    assert boundary.profile.form == "Q-type asphere"


def test_reports_name_the_conic_and_state_the_obscuration_ratio():
    system = loads(SCOPE).system
    lines = "\n".join(surface_lines(system))
    assert "conic constant -1" in lines and "obscuration ratio 0.3 across, 0.09 by area" in lines
    assert "r8 coefficient 2e-19" in lines
    assert surface_lines(loads("start in air\nsurface s radius 5\n").system) == []


def test_the_json_report_carries_the_shape_and_the_ratio(tmp_path, capsys):
    from layoutlang.cli import main

    script = tmp_path / "scope.lay"
    script.write_text(SCOPE)
    main(["run", "--json", str(script)])
    data = json.loads(capsys.readouterr().out)
    primary = data["boundaries"][0]
    assert primary["conic_constant"] == -1 and primary["hole_diameter"] == 60
    assert primary["obscuration_ratio"] == {"linear": 0.3, "area": 0.09}
    assert data["boundaries"][1]["even_coefficients"] == {"r4": 1e-11, "r6": 0.0, "r8": 2e-19}


BAD = [
    ("start in air\nlens a focal length 50, conic constant -1\n", LayoutValueError, 2, 40,
     "an ideal lens has no surface"),
    ("start in air\nlens a focal length 50, r4 coefficient 1e-5\n", LayoutValueError, 2, 40,
     "an ideal lens has no surface"),
    ("start in air\nsurface a flat, conic constant -1\n", LayoutValueError, 2, 32,
     "changes nothing"),
    ("start in air\nmirror a radius -40, q-type a0 1e-3\n", LayoutValueError, 2, 32,
     "need their normalisation radius"),
    ("start in air\nmirror a radius -40, q-type normalisation radius 3\n", LayoutValueError, 2,
     50, "without Q-type coefficients"),
    ("start in air\nmirror a radius -40, r4 coefficient 1e-5, q-type a0 1e-3, "
     "q-type normalisation radius 3\n", LayoutValueError, 2, 53, "not both"),
    ("start in air\nmirror a radius -40, clear diameter 10, hole diameter 12\n",
     LayoutValueError, 2, 55, "hole diameter must be smaller than the clear diameter"),
    ("start in air\nmirror a radius -40, clear diameter 10, obscuration diameter 10\n",
     LayoutValueError, 2, 62, "obscuration diameter must be smaller"),
    ("start in air\nmirror a radius -40, hole diameter -2\n", LayoutValueError, 2, 36,
     "more than zero"),
    ("start in air\nmirror a radius -40, r4 coefficient 1e-5 mm\n", LayoutUnitError, 2, 37,
     "plain number"),
    ("start in air\nmirror a radius -40, conic constant 2 mm\n", LayoutUnitError, 2, 37,
     "plain number"),
    ("start in air\nmirror a radius -40, r4 coefficient 1, r4 coefficient 2\n", LayoutSyntaxError,
     2, 55, "given twice"),
    ("r4 coefficient 1e-5\n", LayoutSyntaxError, 1, 1, "belong to a surface or mirror"),
    ("q-type a0 1e-3\n", LayoutSyntaxError, 1, 1, "belong to a surface or mirror"),
]


@pytest.mark.parametrize("text, kind, line, column, words", BAD)
def test_every_malformed_surface_is_one_located_error(text, kind, line, column, words):
    with pytest.raises(kind) as info:
        loads(text, "t.lay")
    error = info.value
    assert isinstance(error, LayoutError)
    assert (error.span.line, error.span.column) == (line, column)
    assert words in str(error)
