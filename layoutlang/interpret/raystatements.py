"""The interpreter's part for exact rays and aberrations (statements of grammar/rays.lark).

Mixed into the interpreter's class: each `statement_<Class>` says in its docstring the syntax it
handles. Fields written with a unit (an angle for an object at infinity, a height for a near
object) become fractions of the full field once the object is known, at the end of the script.
"""

from __future__ import annotations

import math
from typing import Any

from ..engines.raysettings import RayRequest, RaySettings
from ..errors import LayoutUnitError, LayoutValueError
from ..quantities import DEGREES, FIELD_DEFAULTS, PERCENT, RAY_QUANTITIES, WAVELENGTH_PLACED, lookup
from ..syntax import tree as t

__all__ = ["RayStatements"]


class RayStatements:
    """`sample`, `focus tolerance`, `report exact rays | seidel sums`, ray `expect` forms."""

    def _rays(self) -> dict:
        state = self.__dict__.get("_ray_state")
        if state is None:
            state = self.__dict__["_ray_state"] = {
                "pupils": None, "fields": None, "grid": None, "tolerance": None, "reports": [],
                "system": None, "requests": []}
        return state

    def statement_Sample(self, node: t.Sample) -> None:
        """sample pupils P, P, ... | sample fields F, F, ... | sample grid N"""
        state = self._rays()
        if state[node.what] is not None:
            raise LayoutValueError(f"the sampled {node.what} are given twice", self.span(node))
        state.setdefault("written", {})[node.what] = (node, (self.file, self.lines))
        if node.what == "pupils":
            values = []
            for expr in node.values:
                value = self.number(expr, "a pupil fraction")
                if not 0 < value <= 1:
                    raise LayoutValueError("a pupil fraction must be more than 0 and at most 1",
                                           self.span(expr), expected="e.g. 1, 0.7, 0.5")
                values.append(float(value))
            state["pupils"] = tuple(values)
        elif node.what == "grid":
            value = self.number(node.values[0], "the pupil grid size")
            if value != int(value) or not 3 <= value <= 201:
                raise LayoutValueError("the pupil grid takes a whole number of points across, "
                                       "from 3 to 201", self.span(node.values[0]))
            state["grid"] = int(value)
        else:
            # converted once the object is known, in this statement's file
            state["fields"] = (tuple(node.values), (self.file, self.lines))

    def statement_FocusTolerance(self, node: t.FocusTolerance) -> None:
        """focus tolerance D"""
        state = self._rays()
        if state["tolerance"] is not None:
            raise LayoutValueError("the focus tolerance is given twice", self.span(node))
        state.setdefault("written", {})["tolerance"] = (node, (self.file, self.lines))
        value = self.length(node.value, "a focus tolerance")
        state["tolerance"] = float(self.positive(value, node.value, "a focus tolerance"))

    def statement_ReportRays(self, node: t.ReportRays) -> None:
        """report exact rays | report seidel sums"""
        reports = self._rays()["reports"]
        if node.what not in reports:
            reports.append(node.what)

    def statement_ReportAtField(self, node: t.ReportAtField) -> None:
        """report QUANTITY at field F [at wavelength W]"""
        self.quantity(node.quantity)  # an unknown name fails here, where it is written
        self._rays()["requests"].append((node, (self.file, self.lines)))

    def report_ray_qualified(self, node: t.QualifiedReport) -> bool:
        """`report rms spot radius at wavelength F`: a ray quantity with qualifiers is a ray
        request (resolved at the end); False for any other quantity."""
        if not is_ray_quantity(node.quantity.text):
            return False
        self._rays()["requests"].append((node, (self.file, self.lines)))
        return True

    def statement_ExpectRays(self, node: t.ExpectRays) -> None:
        """expect QUANTITY at field F < V (and = ± T, >, ...) | expect QUANTITY < V depth of focus"""
        self.expect_nodes.append((node, (self.file, self.lines)))

    # --- at the end of the script -------------------------------------------------------------
    def ray_settings(self, system) -> RaySettings:
        """The sampling the script chose (defaults elsewhere); keeps the system for fields."""
        state = self._rays()
        state["system"] = system
        default = RaySettings()
        fields = default.fields
        if state["fields"] is not None:
            nodes, context = state["fields"]
            saved, (self.file, self.lines) = (self.file, self.lines), context
            fields = tuple(self.field_fraction(expr) for expr in nodes)
            self.file, self.lines = saved
        return RaySettings(state["pupils"] or default.pupils, fields,
                           state["grid"] or default.grid, state["tolerance"])

    def refuse_unused_ray_settings(self, expectations, requests) -> None:
        """A `sample ...` or `focus tolerance` that nothing in the script reads is an error
        at its words, not a setting silently ignored."""
        state = self._rays()
        written = state.get("written", {})
        if not written or "exact rays" in state["reports"]:
            return
        names = {e.quantity for e in expectations} | {r.name for r in requests}
        names |= {n for names in self.reports for n in names}
        uses_grid = bool(names & {"rms spot radius", "largest spot radius", "best focus shift"})
        for what, (node, (self.file, self.lines)) in written.items():
            if what == "grid" and uses_grid:
                continue
            words = "'focus tolerance'" if what == "tolerance" else f"'sample {what}'"
            needs = ("'report exact rays', or a spot radius or best focus shift to expect or "
                     "report" if what == "grid" else "'report exact rays'")
            raise LayoutValueError(
                f"{words} has no effect: nothing in this script reads it", self.span(node),
                hint=f"it is used by {needs}; add that or remove this line")

    def ray_reports(self) -> tuple[str, ...]:
        return tuple(self._rays()["reports"])

    def ray_requests(self) -> tuple[RayRequest, ...]:
        """The `report` lines naming a ray quantity with a field or a wavelength."""
        found = []
        saved = (self.file, self.lines)
        for node, (self.file, self.lines) in self._rays()["requests"]:
            name, fraction, wavelength, label = self._ray_target(node)
            found.append(RayRequest(name, fraction, wavelength, label))
        self.file, self.lines = saved
        return tuple(found)

    def _ray_target(self, node: Any) -> tuple[str, float | None, float | None, str]:
        """(quantity name, field fraction, wavelength, label as written) of an `expect` or
        `report` of a ray quantity, whichever form it was written in: `at field F [at
        wavelength W]`, `at wavelength W` alone, or neither."""
        from ..syntax.unparse import expression_text

        info = self.quantity(node.quantity)
        if info.name not in RAY_QUANTITIES:
            raise LayoutValueError(
                f"{info.name} is a first-order quantity: it has no field and no depth of focus",
                self.span(node.quantity), hint=f"write 'expect {info.name} {node.op} ...'"
                if hasattr(node, "op") else f"write 'report {info.name}'")
        field = getattr(node, "field", None)
        ref = getattr(node, "wavelength", None)
        for qualifier in getattr(node, "qualifiers", ()):
            if qualifier.kind != "at" or ref is not None:
                raise LayoutValueError(
                    f"{info.name} is not taken '{qualifier.kind} ...'", self.span(qualifier),
                    expected="'at field F' and then 'at wavelength W'")
            ref = qualifier.wavelengths[0]
        label = info.name
        fraction = None
        if info.name in FIELD_DEFAULTS:
            fraction = FIELD_DEFAULTS[info.name] if field is None else self.field_fraction(field)
            shown = expression_text(field) if field is not None else f"{fraction:g}"
            label = f"{label} at field {shown}"
        elif field is not None:
            raise LayoutValueError(f"{info.name} does not depend on the field",
                                   self.span(field),
                                   hint="fields go with spot radii, real image height and "
                                        "distortion")
        wavelength = None
        if ref is not None:
            if info.name not in ("rms spot radius", "largest spot radius") \
                    and info.name not in WAVELENGTH_PLACED:
                raise LayoutValueError(f"{info.name} is taken at the primary wavelength only",
                                       self.span(ref), hint="spot radii and deviations take "
                                       "'at wavelength W'")
            wavelength, written = self._resolve_ref(ref)  # materials statements: lines, nm
            label = f"{label} at wavelength {written}"
        return info.name, fraction, wavelength, label

    def field_fraction(self, expr: t.Expr) -> float:
        """A field as a fraction of the full field: a plain number is the fraction itself; an
        angle or a height with its unit is divided by the object's field angle or height."""
        system = self._rays()["system"]
        measure = self.value(expr)
        obj = system.object
        if measure.bare or measure.dimension == (0, 0):
            value = float(measure.value)
        elif measure.dimension == (0, 1):
            if not obj.at_infinity or obj.field_angle == 0:
                raise LayoutUnitError("a field given as an angle needs an object at infinity "
                                      "with a field angle", self.span(expr),
                                      expected="a fraction of the full field such as 0.7")
            value = float(measure.value) / float(obj.field_angle)
        elif measure.dimension == (1, 0):
            if obj.at_infinity or obj.height == 0:
                raise LayoutUnitError("a field given as a height needs an object at a finite "
                                      "distance with a height", self.span(expr),
                                      expected="a fraction of the full field such as 0.7")
            value = float(measure.value) / float(obj.height)
        else:
            raise LayoutUnitError(f"a field is a fraction, an angle or a height, not "
                                  f"{measure.describe()}", self.span(expr))
        if not math.isfinite(value) or abs(value) > 1 + 1e-12:
            raise LayoutValueError("a field must lie within the full field (fraction -1 to 1)",
                                   self.span(expr))
        return value

    def ray_expectation(self, node: Any):
        """An `Expectation` for a ray or Seidel quantity (core `expect` or `ExpectRays`)."""
        from .interpreter import Expectation

        name, fraction, wavelength, label = self._ray_target(node)
        info = lookup(name)
        scale = getattr(node, "scale", "")
        if scale and info.name != "marginal focus shift":
            raise LayoutValueError("only the marginal focus shift is compared with the depth "
                                   "of focus", self.span(node.quantity))
        if scale:
            kind = "number"
            convert = lambda e: self.number(e, "a fraction of the depth of focus")  # noqa: E731
            limit = convert
        elif info.kind == PERCENT:
            kind = PERCENT
            convert = limit = self._percent
        elif info.kind == DEGREES:
            kind = DEGREES
            convert = lambda e: self.angle(e, "the expected angle")  # noqa: E731
            limit = lambda e: self.angle(e, "the tolerance")  # noqa: E731
        else:
            kind = info.kind
            convert = lambda e: self.length(e, "the expected value")  # noqa: E731
            limit = lambda e: self.length(e, "the tolerance")  # noqa: E731
        expected = convert(node.value)
        tolerance, relative = self.tolerance(node, limit, percent_allowed=kind != PERCENT)
        span = self.span(node)
        return Expectation(info.name, kind, node.op, expected, tolerance, relative, span,
                           span.line_text.strip(), field=fraction, scale=scale,
                           wavelength=wavelength, label=label)

    def _percent(self, expr: t.Expr) -> float:
        """A distortion limit: '1 %' or a plain 1 (read as percent), kept as a fraction."""
        measure = self.value(expr)
        if measure.relative:
            return float(measure.value)
        if measure.bare or measure.dimension == (0, 0):
            return float(measure.value) / 100.0
        raise LayoutUnitError(f"a distortion is in percent, not {measure.describe()}",
                              self.span(expr), expected="a percentage such as 1 %")


def is_ray_quantity(words: str) -> bool:
    info = lookup(words)
    return info is not None and info.name in RAY_QUANTITIES
