"""Exact refraction of skew rays against a general-purpose reference library.

Reference: sympy.physics.optics.refraction_angle (SymPy 1.14), the vector form of Snell's law
for a ray and a surface normal (it returns 0 for total internal reflection). The normal it
expects points back towards the incoming light.
"""

from __future__ import annotations

import numpy as np
import pytest

pytest.importorskip("sympy")

from sympy import Matrix  # noqa: E402
from sympy.physics.optics import refraction_angle  # noqa: E402

from layoutlang import loads  # noqa: E402
from layoutlang.engines import realrays  # noqa: E402


@pytest.mark.parametrize("radius, n1, n2", [(25.0, 1.0, 1.7), (-30.0, 1.0, 1.5),
                                            (40.0, 1.6, 1.0)])
def test_skew_rays_refract_as_the_reference_library_says(radius, n1, n2):
    system = loads(f"medium a index {n1}\nmedium b index {n2}\nstart in a\n"
                   f"surface s radius {radius} into b").system
    rng = np.random.default_rng(7)
    count = 40
    x0, y0 = rng.uniform(-6, 6, count), rng.uniform(-6, 6, count)
    kx, ky = rng.uniform(-0.25, 0.25, count), rng.uniform(-0.25, 0.25, count)
    rays = realrays.Rays.start(x0, y0, -3.0, kx, ky, 1.0)
    before = np.stack([rays.kx.copy(), rays.ky.copy(), rays.kz.copy()])
    realrays.trace(rays, realrays.geometry(system), system.indices())
    c = 1 / radius
    for i in range(count):
        normal = np.array([-c * rays.x[i], -c * rays.y[i], 1 - c * rays.z[i]])
        expected = refraction_angle(Matrix(before[:, i]), n1, n2, normal=Matrix(-normal))
        if expected == 0:  # total internal reflection in the reference
            assert rays.status[i] == realrays.TOTAL_REFLECTION
            continue
        assert rays.status[i] == realrays.OK
        found = np.array([rays.kx[i], rays.ky[i], rays.kz[i]])
        assert found == pytest.approx(np.array(expected, dtype=float).ravel(), abs=1e-12)


def test_total_internal_reflection_agrees_with_the_reference_library():
    system = loads("medium glass index 1.5\nstart in glass\nsurface s flat into air").system
    angles = np.radians([30.0, 41.0, 42.0, 60.0])
    rays = realrays.Rays.start(0.0, 0.0, -1.0, 0.0, np.sin(angles), np.cos(angles))
    realrays.trace(rays, realrays.geometry(system), system.indices())
    for i, angle in enumerate(angles):
        expected = refraction_angle(Matrix([0, np.sin(angle), np.cos(angle)]), 1.5, 1.0,
                                    normal=Matrix([0, 0, -1]))
        lost = rays.status[i] == realrays.TOTAL_REFLECTION
        assert lost == (expected == 0)
