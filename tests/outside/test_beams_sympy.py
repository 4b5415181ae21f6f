"""Gaussian beams through random layouts against an independent reference library.

Reference: sympy.physics.optics (SymPy 1.14) — `BeamParameter` (q = z + i z_R and the beam
radius, waist and wavefront radius it implies), `waist2rayleigh`, `rayleigh2waist`, the
ray-transfer matrices of `gaussopt` (`FreeSpace`, `ThinLens`, `CurvedRefraction`,
`FlatRefraction`, acting on height and angle, so their q is the physical one in each medium)
and its conjugation helper `conjugate_gauss_beams`. Our engine works in reduced form (q/n,
vacuum wavelength) through the layout's own matrix; the two must agree.
"""

from __future__ import annotations

import math

import numpy as np
import pytest

pytest.importorskip("sympy")

import sympy as sp  # noqa: E402
from sympy.physics.optics import (BeamParameter, CurvedRefraction, FlatRefraction,  # noqa: E402
                                  FreeSpace, ThinLens, conjugate_gauss_beams,
                                  rayleigh2waist, waist2rayleigh)

from layoutlang import loads  # noqa: E402
from layoutlang.engines.beams import BeamPropagation  # noqa: E402

NM = 780.0
LAMBDA = NM * 1e-6  # mm


def _random_layout(seed: int):
    """(script text, the sympy matrices after each boundary, indices of each space, the beam's
    waist radius and distance before the first boundary)."""
    rng = np.random.default_rng(seed)
    w0 = round(float(rng.uniform(0.05, 1.0)), 6)
    before = round(float(rng.uniform(-50, 400)), 6)
    lines = ["units mm", f"beam waist radius {w0:.6f}, waist {abs(before):.6f} "
             f"{'before' if before >= 0 else 'after'}, wavelength {NM} nm",
             "medium glass index 1.62", "start in air"]
    n = 1.0
    matrices = []  # the matrix of each boundary, then of the gap after it
    indices = [1.0]
    count = int(rng.integers(2, 6))
    for i in range(count):
        kind = rng.choice(["lens", "curved", "flat"]) if n == 1.0 else rng.choice(["curved",
                                                                                    "flat"])
        into = 1.62 if n == 1.0 else 1.0
        medium = "glass" if into != 1.0 else "air"
        if kind == "lens":
            f = round(float(rng.choice([-1, 1]) * rng.uniform(30, 300)), 6)
            lines.append(f"lens l{i} focal length {f:.6f}")
            matrices.append(ThinLens(sp.Float(f)))
        elif kind == "curved":
            r = round(float(rng.choice([-1, 1]) * rng.uniform(20, 200)), 6)
            lines.append(f"surface s{i} radius {r:.6f} into {medium}")
            matrices.append(CurvedRefraction(sp.Float(r), sp.Float(n), sp.Float(into)))
            n = into
        else:
            lines.append(f"surface s{i} flat into {medium}")
            matrices.append(FlatRefraction(sp.Float(n), sp.Float(into)))
            n = into
        indices.append(n)
        if i < count - 1:
            gap = round(float(rng.uniform(2, 80)), 6)
            lines.append(f"gap {gap:.6f}")
            matrices.append(FreeSpace(sp.Float(gap)))
    return "\n".join(lines) + "\n", matrices, indices, w0, before


def _q_after_each_boundary(matrices, w0: float, before: float, n0: float):
    """The reference's physical q just after each boundary."""
    z_r = waist2rayleigh(sp.Float(w0), sp.Float(LAMBDA), sp.Float(n0))
    q = sp.Float(before) + sp.I * z_r  # the waist `before` upstream of the first vertex
    found = []
    for i, m in enumerate(matrices):
        a, b, c, d = m
        q = (a * q + b) / (c * q + d)
        if i % 2 == 0:
            found.append(complex(sp.N(q)))
    return found


@pytest.mark.parametrize("seed", range(14))
def test_random_layouts_agree_with_sympy_beam_parameter(seed: int) -> None:
    text, matrices, indices, w0, before = _random_layout(seed)
    program = loads(text)
    w0, before = program.system.beam.waist_radius, program.system.beam.waist_distance
    engine = BeamPropagation(program.system)
    qs = _q_after_each_boundary(matrices, w0, before, indices[0])
    for i, q in enumerate(qs):
        n = indices[i + 1]
        reference = BeamParameter(sp.Float(LAMBDA / n), sp.Float(q.real), z_r=sp.Float(q.imag))
        at = engine.at_boundary(i)
        assert at.radius == pytest.approx(float(reference.w), rel=1e-9), (seed, i)
        radius = float(reference.radius)
        if abs(q.real) > 1e-9 * abs(q.imag):
            assert at.wavefront_radius == pytest.approx(radius, rel=1e-9), (seed, i)
    q = qs[-1]
    out = engine.output()
    n = indices[-1]
    assert out.waist_position == pytest.approx(-q.real, rel=1e-9, abs=1e-9)
    assert out.rayleigh_range == pytest.approx(q.imag, rel=1e-9)
    assert out.waist_radius == pytest.approx(
        float(rayleigh2waist(sp.Float(q.imag), sp.Float(LAMBDA / n))), rel=1e-9)
    reference = BeamParameter(sp.Float(LAMBDA / n), sp.Float(q.real), z_r=sp.Float(q.imag))
    assert out.divergence == pytest.approx(float(reference.divergence), rel=1e-9)


@pytest.mark.parametrize("w_in, w_out, f", [(0.5, 0.02, 50.0), (1.0, 0.03, 200.0),
                                            (0.2, 0.03, 30.0)])
def test_conjugation_helper_places_the_waists_where_the_engine_does(w_in, w_out, f) -> None:
    s_in, s_out, _ = conjugate_gauss_beams(sp.Float(LAMBDA), sp.Float(w_in), sp.Float(w_out),
                                           f=sp.Float(f))
    s_in, s_out = float(s_in), float(s_out)
    program = loads(f"units mm\nbeam waist radius {w_in}, waist {s_in!r} before, wavelength "
                    f"{NM} nm\nstart in air\nlens focal length {f}\n")
    out = BeamPropagation(program.system).output()
    assert out.waist_position == pytest.approx(s_out, rel=1e-9)
    assert out.waist_radius == pytest.approx(w_out, rel=1e-9)


def test_rayleigh_range_of_a_beam_in_glass_uses_the_medium_wavelength() -> None:
    """A waist placed inside glass: zR = π w0² n/λ (waist2rayleigh with n)."""
    program = loads("units mm\nbeam waist radius 0.2, waist 0 before, wavelength 780 nm\n"
                    "medium glass index 1.5\nstart in glass\nsurface exit flat into glass\n")
    out = BeamPropagation(program.system).output()
    expected = float(waist2rayleigh(sp.Float(0.2), sp.Float(LAMBDA), sp.Float(1.5)))
    assert out.rayleigh_range == pytest.approx(expected, rel=1e-12)
    assert math.isclose(out.waist_radius, 0.2, rel_tol=1e-12)
