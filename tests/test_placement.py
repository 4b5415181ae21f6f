"""Placements in the language: each error at its words, frames of simple layouts."""

from __future__ import annotations

import math

import numpy as np
import pytest

from layoutlang import loads
from layoutlang.engines.frames import layout3d
from layoutlang.errors import LayoutError

_BASE = """medium glass index 1.5
object at infinity
start in air
surface a radius 20 into glass
gap 3
surface b radius -20 into air
gap 10
surface c flat
"""


@pytest.mark.parametrize("extra, words, message", [
    ("tilt a by 2 about x", "2", "needs a unit"),
    ("tilt a by 90 deg about x", "90 deg", "less than 90 deg"),
    ("tilt a by 200 deg about z", "200 deg", "within ±180 deg"),
    ("decenter a by 1 along z", "decenter a by 1 along z", "shift along z is a change of gap"),
    ("decenter a by 1 deg along x", "1 deg", "must be a length"),
    ("tilt a by 1 deg about x\ntilt a by 2 deg about x", "tilt a by 2 deg about x", "given twice"),
    ("tilt a by 1 deg about x, axis follows\ndecenter a by 1 along y, axis returns",
     "decenter a by 1 along y, axis returns", "both follow and return"),
    ("tilt nowhere by 1 deg about x", "nowhere", "no surface named"),
    ("tilt c through a by 1 deg about x", "a", "comes before"),
    ("tilt a through b by 1 deg about x\ntilt b through c by 1 deg about x",
     "tilt b through c by 1 deg about x", "overlaps"),
    ("tilt image plane by 2 deg about z", "tilt image plane by 2 deg about z", "changes nothing"),
    ("tilt image plane by 95 deg about x", "95 deg", "less than 90 deg"),
    ("tilt image plane by 1 deg about x\ntilt image plane by 2 deg about y",
     "tilt image plane by 2 deg about y", "given twice"),
    ("gap 2\nfold f at 45 deg about z", "fold f at 45 deg about z", "folds nothing"),
    ("gap 2\nfold f at 0 deg about x", "0 deg", "straight back"),
    ("gap 2\nfold f at 95 deg about x", "95 deg", "less than 90 deg"),
    ("gap 2\nfold f at 45 deg about x\ntilt f by 1 deg about y, axis follows",
     "tilt f by 1 deg about y, axis follows", "already turns the axis"),
    ("gap 2\nmirror m flat\ndecenter m by 1 along y, axis follows",
     "decenter m by 1 along y, axis follows", "decentred mirror cannot also carry"),
    ("gap 2\nprism p in glass, apex 60 deg", "prism p in glass, apex 60 deg", "thickness"),
    ("gap 2\nprism p in glass, apex 190 deg, thickness 5", "190 deg", "apex angle"),
    ("gap 2\nprism p in glass, apex 100 deg, thickness 5", "100 deg", "minimum deviation"),
    ("gap 2\nprism p in nothing, apex 30 deg, thickness 5", "nothing", "unknown medium"),
    ("gap 2\nprism p in glass, right angle, size -3", "-3", "more than zero"),
    ("gap 2\nprism p in glass, apex 30 deg, thickness 5, incidence 95 deg", "95 deg",
     "less than 90"),
])
def test_each_placement_error_points_at_its_words(extra: str, words: str, message: str) -> None:
    text = _BASE + extra + "\n"
    with pytest.raises(LayoutError) as caught:
        loads(text)
    error = caught.value
    span = error.span
    assert message in str(error)
    assert span.line_text[span.column - 1:span.end_column - 1] == words, str(error)


def test_symbols_cannot_place_a_surface() -> None:
    with pytest.raises(LayoutError, match="placement needs a number"):
        loads("symbols w positive\nnominal w = 1\n" + _BASE + "decenter a by w along y\n")


def test_coaxial_frames_are_todays_vertices() -> None:
    system = loads(_BASE + "gap 5\nmirror m radius -100\ngap 20\nsurface d flat\n").system
    placed = layout3d(system)
    zs = [float(o[2]) for o, _ in placed.surfaces]
    assert zs == [0.0, 3.0, 13.0, 18.0, -2.0]
    assert all(np.array_equal(r, np.eye(3)) for _, r in placed.surfaces)


def test_a_fold_turns_the_axis_toward_plus_y_and_later_surfaces_stand_on_it() -> None:
    system = loads(_BASE + "gap 5\nfold f at 45 deg about x\ngap 20\nsurface d flat\n").system
    placed = layout3d(system)
    origin, axes = placed.surfaces[-1]
    assert origin == pytest.approx([0.0, 20.0, 18.0])
    travel = placed.senses[-1] * axes[:, 2]
    assert travel == pytest.approx([0.0, 1.0, 0.0])


def test_a_group_tilts_about_its_first_vertex_and_the_axis_returns() -> None:
    system = loads(_BASE + "tilt a through b by 10 deg about x\n").system
    placed = layout3d(system)
    b_origin, b_axes = placed.surfaces[1]
    assert b_origin == pytest.approx([0.0, -3 * math.sin(math.radians(10)),
                                      3 * math.cos(math.radians(10))])
    c_origin, c_axes = placed.surfaces[2]
    assert c_origin == pytest.approx([0.0, 0.0, 13.0]) and np.allclose(c_axes, np.eye(3))


def test_a_refracting_surface_whose_axis_follows_sends_it_along_the_refracted_ray() -> None:
    system = loads(_BASE + "tilt a by 30 deg about x, axis follows\n").system
    placed = layout3d(system)
    _, axes = placed.axes[1]
    inside = math.asin(math.sin(math.radians(30)) / 1.5)
    turn = math.radians(30) - inside
    assert math.acos(axes[2, 2]) == pytest.approx(turn, rel=1e-12)


def test_placements_write_back_as_they_read() -> None:
    from layoutlang.syntax.parser import parse
    from layoutlang.syntax.unparse import unparse

    text = _BASE + ("tilt a through b by 0.5 deg about y, axis follows\n"
                    "decenter c by 0.1 mm along x\ngap 2\nfold f at 30 deg about y\n"
                    "gap 5\nprism p in glass, apex 20 deg, thickness 4, incidence 10 deg\n"
                    "tilt image plane by 2 deg about x\n")
    statements = parse(text, "t.lay").statements
    assert parse(unparse(statements), "t.lay").statements == statements


def test_a_tilted_image_plane_is_where_the_spot_is_taken() -> None:
    from layoutlang.engines.rayquantities import ray_quantities

    text = _BASE.replace("object at infinity", "object at infinity, field angle 3 deg") + \
        "stop at a, diameter 4\nimage at focus\n"
    square, tilted = loads(text), loads(text + "tilt image plane by 20 deg about x\n")
    a = ray_quantities(square.system, square.rays).value("rms spot radius", 1.0)
    b = ray_quantities(tilted.system, tilted.rays).value("rms spot radius", 1.0)
    assert abs(b - a) > 1e-3  # the spot is taken on the tilted plane, not the square one
    assert math.degrees(ray_quantities(tilted.system, tilted.rays).value("image tilt")) == \
        pytest.approx(20.0)
