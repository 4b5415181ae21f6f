"""Exact rays through conic surfaces against the conics' published geometry.

Sources:
- paraboloid and sphere: a paraboloidal mirror focuses an axial plane wave at F = R/2 with no
  aberration at any aperture, while a sphere of the same vertex radius R sends the ray at height
  h across the axis R/(2 cos θ) from its centre, sin θ = h/R (E. Hecht 2002, Optics, 4th ed.,
  §5.4.3; W. T. Welford 1986, Aberrations of Optical Systems, §2.6);
- ellipsoid: vertex radius R = b²/a and conic constant κ = -e², so a = R/(1 + κ) and the foci
  lie a(1 - e) and a(1 + e) from the vertex, with |PF1| + |PF2| = 2a for every point P
  (D. J. Schroeder 2000, Astronomical Optics, 2nd ed., ch. 2);
- hyperbolic plano-convex lens: a hyperboloid of eccentricity n (κ = -n²) refracts the plane
  wave inside glass of index n to a perfect focus in air, the Cartesian-surface result
  (Hecht 2002, §5.2.1; Born & Wolf 1999, Principles of Optics, 7th ed., §4.2.3).
"""

from __future__ import annotations

import math

import numpy as np
import pytest

from layoutlang.engines import realrays
from layoutlang.system import MIRROR, Boundary, Medium, System

AIR = Medium("air", 1.0)


def _trace(system: System, rays: realrays.Rays) -> realrays.Rays:
    return realrays.trace(rays, realrays.geometry(system), system.indices())


def _mirror_to_plane(radius: float, conic: float, plane: float) -> System:
    """A concave mirror (centre before it: radius < 0) and a flat plane `plane` back from it."""
    return System((AIR,), "air", (Boundary("mirror", 1 / radius, "air", MIRROR, conic=conic),
                                  Boundary("plane", 0.0, "air")), (plane,))


@pytest.mark.parametrize("aperture", [1.0, 10.0, 40.0, 80.0])
def test_a_paraboloid_has_zero_spot_at_every_aperture(aperture):
    radius = -200.0
    system = _mirror_to_plane(radius, -1.0, 100.0)  # focus R/2 before the vertex
    heights = np.linspace(-aperture, aperture, 21)
    rays = _trace(system, realrays.Rays.start(0.0, heights, -30.0, 0.0, 0.0, 1.0))
    assert rays.ok.all()
    np.testing.assert_allclose(rays.y, 0.0, atol=1e-11 * aperture + 1e-13)
    np.testing.assert_allclose(rays.z, -100.0, atol=1e-12)
    # equal optical paths from the plane wavefront to the focus (Fermat)
    np.testing.assert_allclose(rays.opl, rays.opl[10], rtol=1e-13)


def test_a_sphere_of_the_same_vertex_radius_shows_the_textbook_longitudinal_aberration():
    radius = 200.0
    system = _mirror_to_plane(-radius, 0.0, 100.0)
    heights = np.array([10.0, 40.0, 80.0])
    rays = _trace(system, realrays.Rays.start(0.0, heights, -30.0, 0.0, 0.0, 1.0))
    crossing = rays.z - rays.y * rays.kz / rays.ky
    theta = np.arcsin(heights / radius)
    expected = -(radius - radius / (2 * np.cos(theta)))  # from the vertex, before it
    np.testing.assert_allclose(crossing, expected, rtol=1e-12)
    assert crossing[-1] > -100.0 + 1.0  # the zone focuses well inside the paraxial focus


@pytest.mark.parametrize("conic", [-0.2, -0.5, -0.8])
def test_an_ellipsoid_images_one_focus_onto_the_other(conic):
    radius = 100.0
    e = math.sqrt(-conic)
    a = radius / (1 + conic)
    near, far = a * (1 - e), a * (1 + e)
    system = _mirror_to_plane(-radius, conic, far)
    angles = np.radians(np.linspace(-25.0, 25.0, 11))
    rays = realrays.Rays.start(0.0, 0.0, -near, 0.0, np.sin(angles), np.cos(angles))
    rays = _trace(system, rays)
    assert rays.ok.all()
    np.testing.assert_allclose(rays.y, 0.0, atol=1e-10)
    np.testing.assert_allclose(rays.z, -far, atol=1e-10)
    np.testing.assert_allclose(rays.opl, 2 * a, rtol=1e-13)  # |PF1| + |PF2| = 2a


def _plano_convex(n: float, radius: float, thickness: float, hyperbolic_back: bool) -> System:
    """Plane face first and a convex back face (hyperboloid κ = -n²), or turned round."""
    glass = Medium("glass", n)
    if hyperbolic_back:
        faces = (Boundary("plane", 0.0, "glass"),
                 Boundary("asphere", -1 / radius, "air", conic=-n * n))
    else:
        faces = (Boundary("asphere", 1 / radius, "glass", conic=-n * n),
                 Boundary("plane", 0.0, "air"))
    focus = radius / (n - 1) - (0.0 if hyperbolic_back else thickness / n)
    return System((AIR, glass), "air", faces + (Boundary("focus", 0.0, "air"),),
                  (thickness, focus))


def test_a_hyperbolic_plano_convex_lens_focuses_a_plane_wave_without_aberration():
    n, radius = 1.5, 25.0
    system = _plano_convex(n, radius, 6.0, hyperbolic_back=True)
    heights = np.linspace(-12.0, 12.0, 25)
    rays = _trace(system, realrays.Rays.start(0.0, heights, -5.0, 0.0, 0.0, 1.0))
    assert rays.ok.all()
    np.testing.assert_allclose(rays.y, 0.0, atol=1e-10)
    np.testing.assert_allclose(rays.opl, rays.opl[12], rtol=1e-13)


def test_the_same_lens_turned_round_is_not_free_of_aberration():
    n, radius = 1.5, 25.0
    system = _plano_convex(n, radius, 6.0, hyperbolic_back=False)
    heights = np.linspace(-12.0, 12.0, 25)
    rays = _trace(system, realrays.Rays.start(0.0, heights, -5.0, 0.0, 0.0, 1.0))
    assert rays.ok.all()
    assert np.abs(rays.y).max() > 0.05  # a clearly visible spot at the paraxial focus
