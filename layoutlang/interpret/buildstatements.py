"""The interpreter's part for whether the layout can be made (engines/buildable.py).

Mixed into the interpreter's class. At the end of a script the layout is judged: a problem
the script's own clear diameters make certain (a clear diameter beyond the sphere, a negative
edge thickness, surfaces that cross) is an error at the first surface concerned; one that rests
on the drawn aperture, or an absurdly fast paraxial bundle, is a warning naming the surfaces.
`edge thickness of NAME` and `sag of NAME` are answered for `expect` and `report`.
"""

from __future__ import annotations

from dataclasses import replace
from typing import Any

from ..errors import LayoutNameError, LayoutValueError
from ..syntax import tree as t

__all__ = ["BuildStatements", "SURFACE_QUANTITIES"]

#: Quantities of one surface, taken `of NAME`.
SURFACE_QUANTITIES = frozenset({"edge thickness", "sag"})


def _fmt(value: float) -> str:
    from ..testing import format_number

    return format_number(value, 4)


class BuildStatements:
    """Spans of the boundary statements, the buildability check, surface quantities."""

    def _build_state(self) -> dict:
        state = self.__dict__.get("_build")
        if state is None:
            state = self.__dict__["_build"] = {"spans": [], "reports": []}
        return state

    def remember_boundary(self, node: t.Node) -> None:
        self._build_state()["spans"].append(self.span(node))

    # --- surface quantities -------------------------------------------------------------------
    def surface_request(self, name: str, qualifiers, node: t.Node, system):
        """The `SurfaceRequest` of `edge thickness of NAME` / `sag of NAME`."""
        from ..engines.buildable import SurfaceRequest

        found = [q for q in qualifiers if q.kind == "of"]
        other = [q for q in qualifiers if q.kind != "of"]
        if other:
            raise LayoutValueError(f"the {name} is not taken '{other[0].kind} ...'",
                                   self.span(other[0]), expected=f"'{name} of NAME'")
        if len(found) != 1:
            raise LayoutValueError(f"say which surface: '{name} of front'", self.span(node))
        surface = found[0].medium.text
        if not any(b.name == surface for b in system.boundaries):
            import difflib

            close = difflib.get_close_matches(surface, [b.name for b in system.boundaries], n=1)
            raise LayoutNameError(f"no surface named {surface!r}", self.span(found[0].medium),
                                  expected="the name of a surface or mirror",
                                  hint=f"did you mean {close[0]!r}?" if close else None)
        return SurfaceRequest(name, surface)

    def report_surface(self, node: t.QualifiedReport) -> bool:
        if self.quantity(node.quantity).name not in SURFACE_QUANTITIES:
            return False
        self._build_state()["reports"].append((node, (self.file, self.lines)))
        return True

    def surface_reports(self, system) -> tuple:
        found = []
        saved = (self.file, self.lines)
        for node, (self.file, self.lines) in self._build_state()["reports"]:
            found.append(self.surface_request(self.quantity(node.quantity).name,
                                              node.qualifiers, node, system))
        self.file, self.lines = saved
        return tuple(found)

    # --- the judgement ------------------------------------------------------------------------
    def check_buildable(self, program: Any) -> Any:
        """The program, with warnings added; raises for a layout that cannot be made."""
        system = program.system
        try:
            if program.symbolic is not None and program.symbolic.missing:
                return program
            numbers = [float(b.curvature) for b in system.boundaries] + \
                [float(g) for g in system.gaps]
        except (TypeError, ValueError):
            return program  # symbols without nominal values: judged once they have numbers
        del numbers
        from ..engines.buildable import problems
        from ..engines.firstorder import first_order

        try:
            found = problems(system, first_order(system))
        except (ValueError, ZeroDivisionError, OverflowError, TypeError):
            return program  # a layout the first-order engine cannot evaluate says so itself
        spans = self._build_state()["spans"]
        names = [b.name for b in system.boundaries]
        warnings = []
        for problem in found:
            words = self._problem_words(problem, names, system.units)
            if problem.severe:
                first = problem.surfaces[0]
                span = spans[first] if first < len(spans) else None
                raise LayoutValueError(words, span, hint=self._problem_hint(problem, names))
            where = spans[problem.surfaces[0]] if problem.surfaces[0] < len(spans) else None
            prefix = f"{where.file}:{where.line}: " if where is not None else ""
            warnings.append(f"{prefix}warning: {words}")
        if not warnings:
            return program
        return replace(program, warnings=tuple(program.warnings) + tuple(warnings))

    def _problem_words(self, problem, names: list[str], units: str) -> str:
        v = problem.values
        named = [f"'{names[i]}'" for i in problem.surfaces if i < len(names)]
        aperture = ("clear diameter" if v.get("given") else
                    "drawn aperture (no clear diameter: the ray bundle plus 10%)")
        if problem.kind == "beyond surface":
            return (f"the {aperture} of {named[0]}, {_fmt(2 * v['semi'])} {units}, is larger "
                    f"than the surface itself: it exists only to a diameter of "
                    f"{_fmt(2 * v['reach'])} {units} (a sphere: 2|R|)")
        if problem.kind == "edge thickness":
            return (f"the edge thickness from {named[0]} to {named[1]} is "
                    f"{_fmt(v['thickness'])} {units} at the {aperture} (diameter "
                    f"{_fmt(2 * v['height'])} {units}): the surfaces cross before the edge")
        if problem.kind == "surfaces cross":
            return (f"{named[0]} and {named[1]} cross inside their common aperture (diameter "
                    f"{_fmt(2 * v['height'])} {units}): the spacing there is "
                    f"{_fmt(v['thickness'])} {units}")
        if problem.kind == "too fast":
            space = "image" if v["quantity"] != "object numerical aperture" else "object"
            return (f"the paraxial {v['quantity']} is {_fmt(v['value'])}, "
                    + ("below 0.5" if v["quantity"] == "f-number" else
                       f"not less than the index {_fmt(v['index'])} of {space} space")
                    + ": no real bundle is that fast, so the paraxial numbers describe no "
                      "real layout")
        return (f"{named[0]} limits the aperture, not the stop: its clear diameter "
                f"{_fmt(2 * v['semi'])} {units} is smaller than the axial bundle there "
                f"({_fmt(2 * v['height'])} {units}), so only {_fmt(100 * v['passing'])}% of "
                "the stop's rays pass it")

    def _problem_hint(self, problem, names: list[str]) -> str | None:
        if problem.kind == "beyond surface":
            return "make the clear diameter smaller, or the radius larger"
        if problem.kind in ("edge thickness", "surfaces cross"):
            return "make the gap longer, the radii weaker, or the clear diameters smaller"
        if problem.kind == "limits aperture":
            return (f"make the stop smaller, or give '{names[problem.surfaces[0]]}' a larger "
                    "clear diameter")
        return None
