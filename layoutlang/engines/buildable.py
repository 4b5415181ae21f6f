"""Whether a layout can be made: sags, edge thicknesses and apertures against the geometry.

Every shape is read through the boundary's profile (`Boundary.profile.sag`), so a conic or an
asphere is judged by its true surface. The semi-aperture of a boundary is its clear diameter's
half, else the drawn one: the paraxial marginal plus chief ray height there with a 10% margin
(as the drawing does). Returns numbers and states (`Problem`s); the interpreter words them.

Checks (common practice in lens drawings and first-order design):
- a surface's aperture lies beyond where the surface exists (a sphere: a clear diameter above
  2|R|);
- the edge thickness of an element (or the spacing of an air gap) is negative at the edge,
  or the two surfaces cross inside their common aperture;
- the paraxial numerical aperture is at least the index of its space, or the f-number is
  below 0.5: no real bundle is that fast;
- a clear diameter smaller than the axial bundle the stop admits, so that surface (not the
  stop) limits the aperture.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from typing import Any

from ..system import IDEAL, System
from . import paraxial
from .firstorder import FirstOrder, Unavailable
from .paraxial import TRANSFER, Step

__all__ = ["Problem", "SurfaceRequest", "semi_apertures", "sag_at", "thickness_at",
           "edge_thickness", "surface_sag", "problems", "APERTURE_MARGIN"]

#: Room beyond the ray bundle when no clear diameter is given (as drawings use; ours).
APERTURE_MARGIN = 1.1
#: Heights sampled across the common aperture of two surfaces to find a crossing.
_SAMPLES = 12


@dataclass(frozen=True)
class Problem:
    """One reason the layout cannot be made, or is absurd, as written.

    kind: 'beyond surface' | 'edge thickness' | 'surfaces cross' | 'too fast' | 'limits aperture'
    surfaces: the boundary indices concerned; severe: an error (else a warning);
    values: the numbers behind it (layout units).
    """

    kind: str
    surfaces: tuple[int, ...]
    severe: bool
    values: dict = field(default_factory=dict)


@dataclass(frozen=True)
class SurfaceRequest:
    """`edge thickness of NAME` or `sag of NAME`, as an expectation or report asks it."""

    name: str  # 'edge thickness' | 'sag'
    surface: str

    def describe(self) -> str:
        return f"{self.name} of {self.surface}"


def _number(value: Any) -> float | None:
    try:
        number = float(value)
    except (TypeError, ValueError):
        return None
    return number if math.isfinite(number) else None


def _marginal_and_chief(system: System, results: FirstOrder):
    """(y, nu) at the first vertex of the paraxial marginal and chief rays, None where the
    layout has none (no stop, pupils at infinity)."""
    if system.stop is None:
        return None, None
    radius = results["stop diameter"]
    if isinstance(radius, Unavailable):
        return None, None
    radius = float(radius) / 2
    n0 = float(system.indices()[0])
    obj = system.object
    front = paraxial.split_at_stop(system).front
    a1, b1, _, _ = paraxial.matrix(front) if front else (1.0, 0.0, 0.0, 1.0)
    marginal = chief = None
    if obj.at_infinity:
        if a1 != 0:
            marginal = (radius / a1, 0.0)
            nu = -n0 * math.tan(float(obj.field_angle))
            chief = (-b1 * nu / a1, nu) if nu != 0 else None
    else:
        steps = [Step(TRANSFER, float(obj.distance) / n0)]
        y_unit, _ = paraxial.trace(0.0, 1.0, steps + list(front))
        if y_unit != 0:
            marginal = paraxial.trace(0.0, radius / y_unit, steps)
        ya, _ = paraxial.trace(1.0, 0.0, steps + list(front))
        if y_unit != 0 and obj.height != 0:
            chief = paraxial.trace(float(obj.height), -ya * float(obj.height) / y_unit, steps)
    return marginal, chief


def _heights(system: System, start) -> list[float]:
    if start is None:
        return [0.0] * len(system.boundaries)
    y, nu = start
    heights = []
    for step in paraxial.steps_of(system):
        if step.kind is TRANSFER:
            y = y + step.value * nu
        else:
            heights.append(float(y))
            nu = nu - step.value * y
    return heights


def marginal_heights(system: System, results: FirstOrder) -> list[float] | None:
    """The paraxial marginal ray's height at each boundary (None without a stop)."""
    marginal, _ = _marginal_and_chief(system, results)
    return None if marginal is None else _heights(system, marginal)


def semi_apertures(system: System, results: FirstOrder) -> list[tuple[float | None, bool]]:
    """(semi-aperture, from a clear diameter) per boundary; None where nothing sets one."""
    marginal, chief = _marginal_and_chief(system, results)
    m, c = _heights(system, marginal), _heights(system, chief)
    found = []
    for i, boundary in enumerate(system.boundaries):
        clear = _number(boundary.clear_diameter)
        if clear is not None:
            found.append((clear / 2, True))
        elif marginal is not None:
            drawn = _number((abs(m[i]) + abs(c[i])) * APERTURE_MARGIN)
            found.append((drawn if drawn else None, False))  # no finite bundle: no aperture
        else:
            found.append((None, False))
    return found


def _finite_problem(problem: Problem) -> bool:
    """Only problems whose numbers are finite are worth words (huge or tiny layouts overflow
    and say so elsewhere)."""
    return all(_number(v) is not None for v in problem.values.values()
               if isinstance(v, (int, float)) and not isinstance(v, bool))


def sag_at(system: System, i: int, height: float) -> float | None:
    """The sag of boundary i at this height (its profile; None where the surface does not
    exist that far from the axis)."""
    boundary = system.boundaries[i]
    if boundary.kind == IDEAL:
        return 0.0
    try:
        value = float(boundary.profile.sag(height * height))
    except (ValueError, ZeroDivisionError, OverflowError):
        return None
    return value if math.isfinite(value) else None


def thickness_at(system: System, i: int, height: float, semis) -> float | None:
    """Distance along the path from boundary i to boundary i+1 at this height; each surface
    keeps a flat rim beyond its own semi-aperture (as it is ground and drawn)."""
    sense = system.directions()[i + 1]
    first = sag_at(system, i, min(height, semis[i]))
    second = sag_at(system, i + 1, min(height, semis[i + 1]))
    gap = _number(system.gaps[i])
    if first is None or second is None or gap is None:
        return None
    return gap + sense * (second - first)


def edge_thickness(system: System, results: FirstOrder, i: int) -> Any:
    """The thickness from boundary i to the next at the element's edge (the larger of the two
    semi-apertures), or `Unavailable` with the reason."""
    if i >= len(system.boundaries) - 1:
        return Unavailable("none: no boundary follows this one")
    apertures = semi_apertures(system, results)
    semis = [a for a, _ in apertures]
    if semis[i] is None or semis[i + 1] is None:
        return Unavailable("none: no clear diameter and no stop to size the aperture")
    value = thickness_at(system, i, max(semis[i], semis[i + 1]), semis)
    if value is None:
        return Unavailable("none: the aperture lies beyond the surface itself")
    return value


def surface_sag(system: System, results: FirstOrder, i: int) -> Any:
    """The sag of boundary i at its semi-aperture, or `Unavailable`."""
    semi, _ = semi_apertures(system, results)[i]
    if semi is None:
        return Unavailable("none: no clear diameter and no stop to size the aperture")
    value = sag_at(system, i, semi)
    if value is None:
        return Unavailable("none: the aperture lies beyond the surface itself")
    return value


def problems(system: System, results: FirstOrder) -> list[Problem]:
    """Everything that makes the layout impossible or absurd (numeric layouts only)."""
    found: list[Problem] = []
    boundaries = system.boundaries
    apertures = semi_apertures(system, results)
    semis = [a for a, _ in apertures]
    for i, (semi, given) in enumerate(apertures):
        if semi is None or boundaries[i].kind == IDEAL:
            continue
        reach = boundaries[i].profile.domain_radius()
        if semi > reach * (1 + 1e-12):
            found.append(Problem("beyond surface", (i,), given,
                                 {"semi": semi, "reach": reach, "given": given}))
            semis[i] = None  # no edge to judge on a surface that does not exist there
    for i in range(len(boundaries) - 1):
        if semis[i] is None or semis[i + 1] is None:
            continue
        if IDEAL in (boundaries[i].kind, boundaries[i + 1].kind):
            continue
        given = apertures[i][1] and apertures[i + 1][1]
        edge = max(semis[i], semis[i + 1])
        at_edge = thickness_at(system, i, edge, semis)
        common = min(semis[i], semis[i + 1])
        inside = [thickness_at(system, i, common * k / _SAMPLES, semis)
                  for k in range(1, _SAMPLES + 1)]
        inside = [v for v in inside if v is not None]
        if at_edge is not None and at_edge < 0:
            found.append(Problem("edge thickness", (i, i + 1), given,
                                 {"thickness": at_edge, "height": edge, "given": given}))
        elif inside and min(inside) < 0:
            found.append(Problem("surfaces cross", (i, i + 1), given,
                                 {"thickness": min(inside), "height": common, "given": given}))
    indices = [float(n) for n in system.indices()]
    for name, index, space in (("numerical aperture", indices[-1], len(boundaries)),
                               ("object numerical aperture", indices[0], 0)):
        value = results.get(name)
        if isinstance(value, float) and value >= index:
            found.append(Problem("too fast", (space,), False,
                                 {"quantity": name, "value": value, "index": index}))
    f_number = results.get("f-number")
    if isinstance(f_number, float) and f_number < 0.5 and not any(
            p.kind == "too fast" and p.values["quantity"] == "numerical aperture" for p in found):
        found.append(Problem("too fast", (len(boundaries),), False,
                             {"quantity": "f-number", "value": f_number, "index": indices[-1]}))
    heights = marginal_heights(system, results)
    if heights is not None:
        ratios = []
        for i, boundary in enumerate(boundaries):
            clear = _number(boundary.clear_diameter)
            if clear is not None and heights[i] != 0 and math.isfinite(heights[i]):
                ratios.append((clear / 2 / abs(heights[i]), i))
        if ratios:
            ratio, i = min(ratios)
            if ratio < 1 - 1e-9:  # a ray exactly on the rim still passes
                found.append(Problem("limits aperture", (i,), False,
                                     {"passing": ratio * ratio, "height": abs(heights[i]),
                                      "semi": _number(boundaries[i].clear_diameter) / 2}))
    return [p for p in found if _finite_problem(p)]
