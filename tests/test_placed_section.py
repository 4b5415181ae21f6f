"""The drawing of a placed layout: the folded path in true geometry (reports/placed_section.py)."""

from __future__ import annotations

import math
from pathlib import Path

import numpy as np
import pytest

from layoutlang import load, loads
from layoutlang.reports.cross_section import cross_section

EXAMPLES = Path(__file__).resolve().parent.parent / "examples"


def _distance_to_outline(point: np.ndarray, u: np.ndarray, v: np.ndarray) -> float:
    polyline = np.stack([u, v], axis=1)
    best = math.inf
    for a, b in zip(polyline[:-1], polyline[1:]):
        t = float(np.clip((point - a) @ (b - a) / max((b - a) @ (b - a), 1e-300), 0, 1))
        best = min(best, float(np.linalg.norm(point - (a + t * (b - a)))))
    return best


@pytest.mark.parametrize("name", ["folded_camera_module", "prism_spectrometer",
                                  "decentred_doublet"])
def test_exact_rays_meet_the_faces_where_they_are_drawn(name: str) -> None:
    system = load(EXAMPLES / f"{name}.lay").system
    section = cross_section(system, exact=True)
    assert section.placed is not None and section.rays
    assert all(ray.label == "exact" for ray in section.rays)
    for ray in section.rays:
        # every recorded point between the start and the image lies on a drawn face or the
        # stop plane: the rays are drawn through the placed surfaces, not the coaxial ones
        for point in list(zip(ray.z, ray.y))[1:-1]:
            near = min(_distance_to_outline(np.array(point), *p.points())
                       for p in section.profiles)
            near_stop = min((_distance_to_outline(np.array(point), np.array([a[0], b[0]]),
                                                  np.array([a[1], b[1]]))
                             for a, b in section.placed.stop_marks), default=math.inf)
            # (the drawn faces are polylines of 81 points: their chords are within 3e-4;
            # a ray drawn on the coaxial faces would miss the decentred ones by ~0.05)
            assert min(near, near_stop) < 3e-4 or abs(point[0]) < 1e-9


def test_the_fold_mirror_turns_the_drawn_path_by_ninety_degrees() -> None:
    """A 45° fold sends the light along the drawing's y: the image plane lies across y, its
    centre on the folded axis (common practice: a 45° mirror turns a beam by 90°)."""
    section = cross_section(load(EXAMPLES / "folded_camera_module.lay").system, exact=True)
    mirror = next(p for p in section.profiles if p.name == "turn")
    u, v = mirror.points()
    assert math.degrees(math.atan2(v[-1] - v[0], u[-1] - u[0])) == pytest.approx(45, abs=1e-9)
    axis_u, axis_v = section.placed.axis
    # after the mirror the axis goes straight along +y at the mirror's z
    assert axis_u[-1] == pytest.approx(mirror.z, abs=1e-9)
    assert axis_v[-1] > 5
    (a, b) = section.placed.image_line
    # the sensor is tilted by 1 deg: its drawn line is 1 deg off the global z
    assert math.degrees(math.atan2(abs(b[1] - a[1]), abs(b[0] - a[0]))) == \
        pytest.approx(1.0, abs=1e-6)
    # the rays end on the image plane
    for ray in section.rays:
        end = np.array([ray.z[-1], ray.y[-1]])
        assert _distance_to_outline(end, np.array([a[0], b[0]]),
                                    np.array([a[1], b[1]])) < 1e-6 or abs(end[1]) > 100


def test_a_prism_is_drawn_with_its_apex_angle() -> None:
    """The two drawn faces of a 60° prism meet at 60° (the outline is the real one)."""
    section = cross_section(load(EXAMPLES / "prism_spectrometer.lay").system, exact=False)
    faces = [p for p in section.profiles if p.name.startswith("disperser")]
    directions = []
    for face in faces:
        u, v = face.points()
        directions.append(np.array([u[-1] - u[0], v[-1] - v[0]]))
    a, b = (d / np.linalg.norm(d) for d in directions)
    angle = math.degrees(math.acos(abs(float(a @ b))))
    assert angle == pytest.approx(60, abs=1e-9)
    prism = section.elements[0]
    assert prism.polygon is not None and len(prism.polygon[0]) > 4
    # paraxial rays asked for: drawn about the folded axis, said so
    assert all(ray.label == "" for ray in section.rays)


def test_a_zero_placement_draws_exactly_the_coaxial_section() -> None:
    text = """units mm
object at infinity, field angle 2 deg
start in air
medium glass index 1.5
surface a radius 40 into glass
gap 4
surface b radius -40 into air
stop at a, diameter 8
image at focus
"""
    plain = cross_section(loads(text).system, exact=True)
    zero = cross_section(loads(text + "tilt a by 0 deg about x\ndecenter b by 0 mm along y\n"
                               ).system, exact=True)
    assert zero == plain and zero.placed is None


def test_an_out_of_plane_placement_is_projected_and_said() -> None:
    text = """units mm
object at infinity, field angle 2 deg
start in air
medium glass index 1.5
surface a radius 40 into glass
gap 4
surface b radius -40 into air
gap 20
fold turn at 45 deg about x
gap 10
surface c flat
stop at a, diameter 8
image at focus
decenter a by 0.5 mm along x
"""
    section = cross_section(loads(text).system, exact=True)
    assert any("projected" in note for note in section.notes)
