"""Interpreter part for the options of grammar/surfaces.lark: conic constant, aspheric
coefficients (even r⁴ … r²⁰ or Forbes Q-type), obscuration and hole diameters.

They become the `Boundary` fields that `surfaces.Profile` and `surfaces.Aperture` read; every
malformed combination is refused at its words (an ideal lens has no surface to shape, Q-type
coefficients need their normalisation radius, a hole or obscuration must fit inside the clear
diameter, …).
"""

from __future__ import annotations

from typing import Any

from ..errors import LayoutValueError
from ..guard import SMALLEST_COEFFICIENT
from ..syntax import tree as t

__all__ = ["SurfaceOptions", "EVEN_POWERS"]

EVEN_POWERS = tuple(range(4, 21, 2))


class SurfaceOptions:
    """Mixin of the interpreter: `surface_fields` turns a boundary's options into fields."""

    def surface_fields(self, node: t.BoundaryStatement, curvature: Any,
                       clear: Any) -> dict[str, Any]:
        """Boundary fields (conic, even_terms, q_terms, q_radius, obscuration_diameter,
        hole_diameter) from the statement's surface options, checked."""
        options = dict(node.surface_options)
        if not options:
            return {}
        first_key, first_value = node.surface_options[0]
        if node.kind == "lens":
            raise LayoutValueError(
                f"an ideal lens has no surface to shape or pierce: '{first_key}' belongs on a "
                "surface or a mirror", self.span(first_value),
                hint="model the element with 'surface' statements and a medium between them")
        fields: dict[str, Any] = {}
        if "conic constant" in options:
            value = options["conic constant"]
            if _is_zero(curvature):
                raise LayoutValueError(
                    "a conic constant on a flat surface changes nothing: the conic needs a "
                    "vertex radius", self.span(value), expected="a radius or curvature")
            fields["conic"] = self.number(value, "a conic constant")
        even = {int(key[1:].split()[0]): value for key, value in options.items()
                if key.endswith(" coefficient")}
        q = {int(key.split()[1][1:]): value for key, value in options.items()
             if key.startswith("q-type a")}
        radius = options.get("q-type normalisation radius")
        if even and (q or radius is not None):
            clash = q[min(q)] if q else radius
            raise LayoutValueError(
                "one surface is either an even asphere (r4, r6, … coefficients) or a Q-type "
                "asphere, not both", self.span(clash))
        if even:
            top = max(even)
            fields["even_terms"] = tuple(
                self.coefficient(even[p], f"the r{p} coefficient") if p in even else 0.0
                for p in EVEN_POWERS if p <= top)
        if q and radius is None:
            raise LayoutValueError(
                "Q-type coefficients need their normalisation radius", self.span(q[min(q)]),
                expected="', q-type normalisation radius 10' (usually the clear semi-diameter)")
        if radius is not None and not q:
            raise LayoutValueError(
                "a Q-type normalisation radius without Q-type coefficients", self.span(radius),
                expected="', q-type a0 1e-3' and further terms")
        if q:
            fields["q_terms"] = tuple(self.coefficient(q[m], f"the q-type a{m} coefficient")
                                      if m in q else 0.0 for m in range(max(q) + 1))
            fields["q_radius"] = self.positive(
                self.length(radius, "a normalisation radius"), radius, "a normalisation radius")
        for key, field in (("obscuration diameter", "obscuration_diameter"),
                           ("hole diameter", "hole_diameter")):
            if key not in options:
                continue
            value = options[key]
            diameter = self.positive(self.length(value, f"the {key}"), value, f"the {key}")
            if clear is not None and _at_least(diameter, clear):
                raise LayoutValueError(
                    f"the {key} must be smaller than the clear diameter "
                    f"({_text(diameter)} is not less than {_text(clear)})", self.span(value))
            fields[field] = diameter
        return fields

    def coefficient(self, node: t.Expr, what: str) -> Any:
        """A plain number that may be as small as aspheric coefficients are."""
        with self.evaluator.small_numbers(SMALLEST_COEFFICIENT):
            return self.number(node, what)


def _is_zero(value: Any) -> bool:
    try:
        return bool(value == 0)
    except TypeError:
        return False


def _at_least(value: Any, other: Any) -> bool:
    try:
        return bool(value >= other)
    except TypeError:  # symbolic: checked at the nominal values
        return False


def _text(value: Any) -> str:
    from ..testing import format_number

    try:
        return format_number(float(value), 6)
    except (TypeError, ValueError):
        return str(value)
