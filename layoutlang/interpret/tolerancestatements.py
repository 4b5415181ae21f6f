"""The interpreter's part for tolerances (statements of grammar/tolerances.lark).

Mixed into the interpreter's class. Targets are named surfaces, gaps (by the surface they
follow) and media; every name and unit is checked here, at the words, so the tolerance engine
never meets a number it cannot perturb.
"""

from __future__ import annotations

import difflib
import math

from ..errors import LayoutNameError, LayoutUnitError, LayoutValueError
from ..quantities import PERCENT
from ..syntax import tree as t
from ..system import IDEAL
from ..tolerance.model import (DEFAULT_SAMPLES, DEFAULT_SEED, DEFAULT_SIGMAS,
                               NORMAL, PLACED, UNIFORM, Compensator, ToleranceItem, ToleranceSetup,
                               YieldRequest)

__all__ = ["ToleranceStatements", "MAX_SAMPLES"]

#: More samples than this belong on a cluster run (`layoutlang tolerance --samples`).
MAX_SAMPLES = 10_000_000

_LENGTH_TARGETS = {"radius", "gap", "clear diameter", "decenter"}


class ToleranceStatements:
    """`tolerance`, `compensate`, `monte carlo`, `report tolerances`, `expect yield`."""

    def _tolerance_state(self) -> dict:
        state = self.__dict__.get("_tolerance_state_")
        if state is None:
            state = self.__dict__["_tolerance_state_"] = {
                "items": [], "compensators": [], "monte": None, "report": False,
                "yields": []}
        return state

    def statement_ToleranceOn(self, node: t.ToleranceOn) -> None:
        """tolerance radius|curvature|conic constant|clear diameter of SURFACE ± L[, dist]
        tolerance index|abbe number of MEDIUM ± L[, dist] | tolerance gap after SURFACE ± L"""
        self._tolerance_state()["items"].append((node, (self.file, self.lines)))

    def statement_Compensate(self, node: t.Compensate) -> None:
        """compensate focus [within D] | compensate gap after SURFACE [within D]"""
        state = self._tolerance_state()
        for other, _ in state["compensators"]:
            if other.what == node.what and getattr(other.name, "text", None) == \
                    getattr(node.name, "text", None):
                raise LayoutValueError("this compensator is given twice", self.span(node))
        if node.what == "focus" and any(o.what == "focus" for o, _ in state["compensators"]):
            raise LayoutValueError("focus is compensated twice", self.span(node))
        state["compensators"].append((node, (self.file, self.lines)))

    def statement_MonteCarlo(self, node: t.MonteCarlo) -> None:
        """monte carlo N samples[, seed S]"""
        state = self._tolerance_state()
        if state["monte"] is not None:
            raise LayoutValueError("the Monte Carlo settings are given twice", self.span(node))
        samples = self.number(node.samples, "the number of samples")
        if samples != int(samples) or not 10 <= samples <= MAX_SAMPLES:
            raise LayoutValueError(
                f"the number of samples is a whole number from 10 to {MAX_SAMPLES:,}",
                self.span(node.samples), expected="e.g. 'monte carlo 2000 samples'")
        seed = DEFAULT_SEED
        if node.seed is not None:
            seed = self.number(node.seed, "the seed")
            if seed != int(seed) or not 0 <= seed < 2**63:
                raise LayoutValueError("a seed is a whole number, 0 or more",
                                       self.span(node.seed))
        state["monte"] = (int(samples), int(seed))

    def statement_ReportTolerances(self, node: t.ReportTolerances) -> None:
        """report tolerances"""
        self._tolerance_state()["report"] = True

    def statement_ExpectYield(self, node: t.ExpectYield) -> None:
        """expect yield > 95 % | expect yield of QUANTITY >= 99 %"""
        self.expect_nodes.append((node, (self.file, self.lines)))

    # --- at the end of the script -------------------------------------------------------------
    def yield_expectation(self, node: t.ExpectYield):
        """The Expectation of `expect yield`: a fraction, compared as the others are."""
        from .interpreter import Expectation

        of = None
        if node.quantity is not None:
            info = self.quantity(node.quantity)
            of = info.name
        if not self._tolerance_state()["items"]:
            raise LayoutValueError("a yield needs tolerances", self.span(node),
                                   hint="add lines such as 'tolerance radius of front ± 0.1 mm'")
        if node.op == "=":
            raise LayoutValueError("a yield is a bound, not a target", self.span(node),
                                   expected="'>' or '>=', e.g. 'expect yield > 95 %'")
        measure = self.value(node.value)
        if not measure.relative:
            raise LayoutUnitError("a yield is a percentage", self.span(node.value),
                                  expected="e.g. 'expect yield > 95 %'")
        fraction = float(measure.value)
        if not 0 <= fraction <= 1:
            raise LayoutValueError("a yield is between 0 % and 100 %", self.span(node.value))
        span = self.span(node)
        label = "yield" if of is None else f"yield of {of}"
        return Expectation(label, PERCENT, node.op, fraction, None, False, span,
                           span.line_text.strip(), request=YieldRequest(of))

    def tolerance_setup(self, system) -> ToleranceSetup | None:
        """The script's tolerances against the finished layout, or None without any."""
        state = self._tolerance_state()
        if not state["items"]:
            for node, (self.file, self.lines) in state["compensators"]:
                raise LayoutValueError("a compensator without tolerances", self.span(node),
                                       hint="add lines such as 'tolerance gap after front ± 0.05 mm'")
            if state["report"]:
                raise LayoutValueError("'report tolerances' needs tolerances",
                                       hint="add lines such as 'tolerance radius of front ± 0.1 mm'")
            return None
        items = []
        for node, (self.file, self.lines) in state["items"]:
            items.append(self._tolerance_item(node, system))
        seen = {}
        for item, (node, _) in zip(items, state["items"]):
            key = (item.target, item.name, item.through, item.axis)
            if key in seen:
                raise LayoutValueError(f"{item.label} is toleranced twice "
                                       f"(also on line {seen[key]})", self.span(node))
            seen[key] = item.line
        compensators = []
        for node, (self.file, self.lines) in state["compensators"]:
            compensators.append(self._compensator(node, system))
        samples, seed = state["monte"] or (DEFAULT_SAMPLES, DEFAULT_SEED)
        return ToleranceSetup(tuple(items), tuple(compensators), samples, seed, state["report"])

    def _tolerance_item(self, node: t.ToleranceOn, system) -> ToleranceItem:
        target, name = node.target, node.name.text
        span = self.span(node)
        measure = self.value(node.limit)
        relative = bool(measure.relative)
        if target not in PLACED and (node.through is not None or node.axis is not None):
            extra = node.through if node.through is not None else node
            raise LayoutValueError(f"'through' and a direction belong to a decenter or tilt "
                                   f"tolerance, not to a {target}", self.span(extra))
        if target in PLACED and relative:
            raise LayoutUnitError(f"a {target} tolerance is a {'length' if target == 'decenter' else 'angle'}, "
                                  "not a percentage", self.span(node.limit))
        if target == "tilt":
            limit = self.angle(node.limit, "a tilt tolerance")
            if not 0 < float(limit) < math.radians(10):
                raise LayoutValueError("a tilt tolerance is a small angle, above 0 and below "
                                       "10 deg", self.span(node.limit))
        elif relative:
            limit = float(measure.value)
        elif target in _LENGTH_TARGETS:
            limit = self.length(node.limit, f"a {target} tolerance")
        elif target == "curvature":
            if not (measure.bare or measure.dimension == (-1, 0)):
                raise LayoutUnitError(f"a curvature tolerance is 1/length or %, not "
                                      f"{measure.describe()}", self.span(node.limit))
            limit = measure.value
        else:
            limit = self.number(node.limit, f"a tolerance on the {target}")
        limit = float(limit)
        if not math.isfinite(limit) or limit <= 0:
            raise LayoutValueError("a tolerance limit is a positive number", self.span(node.limit))
        if relative and limit >= 1:
            raise LayoutValueError("a relative tolerance must be less than 100 %",
                                   self.span(node.limit))
        distribution, sigmas = UNIFORM, DEFAULT_SIGMAS
        if node.distribution is not None:
            distribution = node.distribution.kind
            if distribution == NORMAL and node.distribution.sigmas is not None:
                sigmas = float(self.number(node.distribution.sigmas, "the number of sigmas"))
                if not 0.5 <= sigmas <= 6:
                    raise LayoutValueError("the limit of a normal tolerance is 0.5 to 6 sigma",
                                           self.span(node.distribution.sigmas))
        position = -1
        if target in ("index", "abbe number"):
            medium = self._tolerance_medium(node.name, system)
            if target == "abbe number":
                from ..materials.dispersion import ModelGlass

                if not isinstance(medium.model, ModelGlass):
                    raise LayoutValueError(
                        f"an Abbe number tolerance needs a medium given by its index and Abbe "
                        f"number (or glass code); {name!r} is not", self.span(node.name))
        else:
            position = self._tolerance_boundary(node.name, system)
            boundary = system.boundaries[position]
            if target == "gap":
                if position >= len(system.gaps):
                    raise LayoutValueError(f"no gap follows {name!r}: it is the last surface",
                                           self.span(node.name))
            elif target in PLACED:
                pass  # every surface, mirror or ideal lens can sit off its place
            elif boundary.kind == IDEAL and target != "clear diameter":
                raise LayoutValueError(f"{name!r} is an ideal lens: it has no {target}",
                                       self.span(node.name),
                                       hint="tolerance the gaps around it instead")
            elif target == "radius" and boundary.curvature == 0:
                raise LayoutValueError(
                    f"{name!r} is flat: it has no radius to tolerance", self.span(node.name),
                    hint=f"tolerance its curvature instead, e.g. 'tolerance curvature of {name} "
                         f"± 0.0001'")
            elif target == "clear diameter" and boundary.clear_diameter is None:
                raise LayoutValueError(f"{name!r} has no clear diameter to tolerance",
                                       self.span(node.name))
            if relative and target == "conic constant" and boundary.conic == 0:
                raise LayoutValueError("a relative tolerance of a zero conic constant is zero",
                                       self.span(node.limit), hint="give an absolute limit")
        last, through, axis = -1, "", ""
        if target in PLACED:
            last = position
            if node.through is not None:
                last = self._tolerance_boundary(node.through, system)
                through = node.through.text
                if last < position:
                    raise LayoutValueError(f"{through!r} comes before {name!r}: an element runs "
                                           "from its first surface to its last",
                                           self.span(node.through))
            axis = node.axis or ("y" if target == "decenter" else "x")
            if target == "decenter" and axis == "z":
                raise LayoutValueError("a decenter is across the axis (x or y); along z it is "
                                       "a gap", self.span(node),
                                       hint=f"tolerance the gap after the surface before {name!r}")
        return ToleranceItem(target, name, position, limit, relative, distribution, sigmas,
                             span.line_text.strip(), span.line, last, through, axis)

    def _tolerance_boundary(self, ident: t.Ident, system) -> int:
        try:
            return system.boundary_index(ident.text)
        except KeyError:
            names = [b.name for b in system.boundaries]
            close = difflib.get_close_matches(ident.text, names, n=1)
            raise LayoutNameError(f"no surface named {ident.text!r}", self.span(ident),
                                  expected="the name of a surface, mirror or lens",
                                  hint=f"did you mean {close[0]!r}?" if close else None) from None

    def _tolerance_medium(self, ident: t.Ident, system):
        try:
            return system.medium(ident.text)
        except KeyError:
            names = [m.name for m in system.media]
            close = difflib.get_close_matches(ident.text, names, n=1)
            raise LayoutNameError(f"no medium named {ident.text!r} in this layout",
                                  self.span(ident), expected="a medium the light passes through",
                                  hint=f"did you mean {close[0]!r}?" if close else None) from None

    def _compensator(self, node: t.Compensate, system) -> Compensator:
        limit = None
        if node.limit is not None:
            limit = float(self.positive(self.length(node.limit, "a compensator's range"),
                                        node.limit, "a compensator's range"))
        if node.what == "focus":
            return Compensator("focus", limit=limit, units=system.units)
        position = self._tolerance_boundary(node.name, system)
        if position >= len(system.gaps):
            raise LayoutValueError(f"no gap follows {node.name.text!r}: it is the last surface",
                                   self.span(node.name))
        return Compensator("gap", node.name.text, position, limit, system.units)
