"""The interpreter's part for laser beams and fibres (statements of grammar/beams.lark).

Mixed into the interpreter's class: `beam`, `fibre`, `clipping limit`, `clearance limit` and
the beam quantities of `expect`/`report`, with their places (`at NAME`, `at D after`). Values
are read when the statement runs; places and the checks that need the whole layout (boundary
names, the fibre's wavelength against the beam's) wait for the end of the script. numpy and
the beam engine are not imported here: a script without a beam starts as fast as before.
"""

from __future__ import annotations

import difflib
import math
from dataclasses import dataclass, replace
from typing import Any

from ..errors import LayoutNameError, LayoutUnitError, LayoutValueError
from ..quantities import ANGLE, BEAM_PLACED, BEAM_QUANTITIES, DECIBEL, LENGTH, PERCENT, lookup
from ..syntax import tree as t
from ..system import BeamSpec, FibreSpec, System

__all__ = ["BeamStatements", "BeamSettings", "is_beam_quantity"]

_BEAM_OPTIONS = ("waist radius", "waist before", "waist after", "wavelength",
                 "propagation ratio")
_PLACES = ("at image", "at waist", "after")


def is_beam_quantity(words: str) -> bool:
    info = lookup(words)
    return info is not None and info.name in BEAM_QUANTITIES


@dataclass(frozen=True)
class BeamSettings:
    """What a beam script asks beyond its expectations: the warning limits (None: not
    stated) and the `report` requests as (quantity, engines.beams.Place or None)."""

    clipping_limit: float | None = None  # largest share of power lost at one aperture
    clearance_limit: float | None = None  # least clear diameter / 1/e² beam diameter
    reports: tuple[tuple[str, Any], ...] = ()


class BeamStatements:
    """`beam`, `fibre`, `clipping limit`, `clearance limit`, beam `expect` and `report`."""

    def _beams(self) -> dict:
        state = self.__dict__.get("_beam_state")
        if state is None:
            state = self.__dict__["_beam_state"] = {
                "beam": None, "beam node": None, "fibre": None, "fibre node": None,
                "fibre wavelength": None, "clipping": None, "clearance": None,
                "limit nodes": {}, "reports": [], "uses": None}
        return state

    def _options(self, node: t.Node, options, allowed: tuple[str, ...]) -> dict:
        found: dict[str, t.BeamOption] = {}
        for option in options:
            key = "waist position" if option.kind in ("waist before", "waist after") else (
                "place" if option.kind in _PLACES else option.kind)
            if key in found:
                raise LayoutValueError(f"the {key} is given twice", self.span(option))
            found[key] = option
        return found

    # --- statements ---------------------------------------------------------------------------
    def statement_Beam(self, node: t.Beam) -> None:
        """beam waist radius W[, waist D before | after][, wavelength L][, propagation ratio M2]"""
        state = self._beams()
        self.once(state["beam node"], node, "the beam")
        self._fix_units(node)
        found = self._options(node, node.options, _BEAM_OPTIONS)
        if "waist radius" not in found:
            raise LayoutValueError("a beam needs its waist radius", self.span(node),
                                   expected="'waist radius 0.5 mm' (1/e² intensity radius)")
        radius_node = found["waist radius"].value
        radius = self.positive(self.length(radius_node, "a waist radius"), radius_node,
                               "a waist radius")
        distance: Any = 0.0
        if "waist position" in found:
            option = found["waist position"]
            distance = self.length(option.value, "the waist distance")
            if option.kind == "waist after":
                distance = -distance
        wavelength = None
        if "wavelength" in found:
            wave_node = found["wavelength"].value
            measure = self.wavelength_measure(wave_node)  # a line letter, a name or a length
            if measure.bare or measure.dimension != (1, 0):
                raise LayoutUnitError("a wavelength needs a length unit", self.span(wave_node),
                                      expected="a wavelength such as 1064 nm")
            wavelength = self.positive(measure.value, wave_node, "a wavelength")
        ratio: Any = 1.0
        if "propagation ratio" in found:
            ratio_node = found["propagation ratio"].value
            ratio = self.number(ratio_node, "the beam propagation ratio M²")
            try:
                below = bool(ratio < 1)
            except TypeError:  # symbolic: checked at the nominal values
                below = False
            if below:
                raise LayoutValueError("the beam propagation ratio M² is 1 or more (1 for a "
                                       "pure Gaussian beam)", self.span(ratio_node))
        state["beam"] = (radius, distance, wavelength, ratio)
        state["beam node"] = node
        state["beam context"] = (self.file, self.lines)

    def statement_Fibre(self, node: t.Fibre) -> None:
        """fibre mode field diameter D [at L], at image | at waist | D after[, offset X][, tilt A]"""
        state = self._beams()
        self.once(state["fibre node"], node, "the fibre")
        self._fix_units(node)
        found = self._options(node, node.options, ())
        if "mode field diameter" not in found:
            raise LayoutValueError("a fibre needs its mode-field diameter", self.span(node),
                                   expected="'mode field diameter 10.4 um' (1/e² intensity)")
        if "place" not in found:
            raise LayoutValueError("say where the fibre's face is", self.span(node),
                                   expected="'at image', 'at waist' or a distance such as "
                                            "'3 mm after' (after the last boundary)")
        mode = found["mode field diameter"]
        diameter = self.positive(self.length(mode.value, "a mode-field diameter"), mode.value,
                                 "a mode-field diameter")
        if mode.at is not None:
            measure = self.wavelength_measure(mode.at)
            if measure.bare or measure.dimension != (1, 0):
                raise LayoutUnitError("a wavelength needs a length unit", self.span(mode.at),
                                      expected="the wavelength the diameter is given at, such "
                                               "as 1550 nm")
            state["fibre wavelength"] = (measure.value, mode.at, (self.file, self.lines))
        place = found["place"]
        distance = None
        if place.kind == "after":
            distance = self.length(place.value, "the fibre's distance")
        offset: Any = 0.0
        if "offset" in found:
            offset = self.length(found["offset"].value, "a lateral offset")
        tilt: Any = 0.0
        if "tilt" in found:
            tilt_node = found["tilt"].value
            tilt = self.angle(tilt_node, "a tilt")
            if isinstance(tilt, (int, float)) and abs(tilt) >= math.pi / 2:
                raise LayoutValueError("a tilt must be less than 90 deg", self.span(tilt_node))
        kind = {"at image": "image", "at waist": "waist", "after": "after"}[place.kind]
        state["fibre"] = FibreSpec(diameter, kind, distance, offset, tilt)
        state["fibre node"] = node

    def statement_BeamLimit(self, node: t.BeamLimit) -> None:
        """clipping limit P % | clearance limit K beam diameters"""
        state = self._beams()
        self.once(state["limit nodes"].get(node.kind), node, f"the {node.kind} limit")
        state["limit nodes"][node.kind] = node
        if node.kind == "clipping":
            value = self._fraction(node.value, "a clipping limit")
            if not 0 < value < 1:
                raise LayoutValueError("a clipping limit is a share of the power, more than "
                                       "0 % and less than 100 %", self.span(node.value))
        else:
            value = float(self.number(node.value, "a clearance limit"))
            if not value > 0:
                raise LayoutValueError("a clearance limit must be more than zero",
                                       self.span(node.value), expected="e.g. 1.5")
        state[node.kind] = value

    def statement_ExpectAfter(self, node: t.ExpectAfter) -> None:
        """expect QUANTITY at D after < V (and =, <=, >, >= with ± or within)"""
        self.expect_nodes.append((node, (self.file, self.lines)))

    def statement_ReportAfter(self, node: t.ReportAfter) -> None:
        """report QUANTITY at D after"""
        self._beam_info(node.quantity)
        self._beams()["reports"].append((node, (self.file, self.lines)))

    # --- hooks of the core statements -----------------------------------------------------------
    def report_beam(self, node: t.Node) -> bool:
        """A `report` naming beam quantities (plain, or one quantity with `at NAME`): recorded
        here. Returns False when it names none."""
        quantities = getattr(node, "quantities", None)
        if quantities is None:
            quantities = (node.quantity,)
        names = [self.quantity(q).name for q in quantities]
        if not any(n in BEAM_QUANTITIES for n in names):
            return False
        if not all(n in BEAM_QUANTITIES for n in names):
            raise LayoutValueError("a report of beam quantities cannot be mixed with others",
                                   self.span(node), hint="write them on two report lines")
        self._beams()["reports"].append((node, (self.file, self.lines)))
        return True

    def _beam_info(self, quantity: t.Quantity):
        info = self.quantity(quantity)
        if info.name not in BEAM_QUANTITIES:
            raise LayoutValueError(f"{info.name} is not taken at a distance",
                                   self.span(quantity),
                                   expected="a beam quantity such as beam radius")
        return info

    def _fraction(self, expr: t.Expr, what: str) -> float:
        """A share written as '80 %' or a plain 80 (read as percent), kept as a fraction."""
        measure = self.value(expr)
        if measure.relative:
            return float(measure.value)
        if measure.bare or measure.dimension == (0, 0) and measure.value is not None:
            if not measure.bare:
                raise LayoutUnitError(f"{what} is in percent", self.span(expr),
                                      expected="a percentage such as 80 %")
            return float(measure.value) / 100.0
        raise LayoutUnitError(f"{what} is in percent, not {measure.describe()}",
                              self.span(expr), expected="a percentage such as 80 %")

    def _decibels(self, expr: t.Expr, what: str) -> float:
        measure = self.value(expr)
        if measure.dimension == (0, 0) and not measure.relative:
            return measure.value
        raise LayoutUnitError(f"{what} is in decibels, not {measure.describe()}",
                              self.span(expr), expected="a value such as 0.5 dB")

    # --- at the end of the script -------------------------------------------------------------
    def _place(self, node: t.Node, name: str, qualifiers=(), distance: t.Expr | None = None):
        """The engines.beams.Place of a beam quantity, or None for an unplaced one."""
        from ..engines.beams import Place

        if distance is None and not qualifiers:
            if name in BEAM_PLACED and name != "power passed":
                raise LayoutValueError(f"say where the {name} is taken", self.span(node),
                                       expected=f"'{name} at NAME' (a boundary, image, or a "
                                                f"length named with let) or '{name} at 250 mm "
                                                "after'")
            return None
        if name not in BEAM_PLACED:
            where = self.span(qualifiers[0]) if qualifiers else self.span(distance)
            raise LayoutValueError(f"{name} belongs to the whole beam: it is not taken at a "
                                   "place", where)
        if distance is not None:
            value = self.length(distance, "a distance after the last boundary")
            if name == "power passed":
                raise LayoutValueError("power passed is taken at a boundary with a clear "
                                       "diameter", self.span(distance))
            return Place("after", distance=value, label=f"{_number_text(distance)} after the "
                                                        "last boundary")
        if len(qualifiers) != 1 or qualifiers[0].kind != "at":
            raise LayoutValueError(f"{name} takes one place: 'at NAME'", self.span(qualifiers[0]))
        ref = qualifiers[0].wavelengths[0]
        if ref.number is not None:
            value = self.length(ref.number, "a distance after the last boundary")
            label = f"{_number_text(ref.number)} after the last boundary"
            if name == "power passed":
                raise LayoutValueError("power passed is taken at a boundary with a clear "
                                       "diameter", self.span(ref))
            return Place("after", distance=value, label=label)
        names = [b.name for b in self.boundaries]
        if ref.name in names:
            i = names.index(ref.name)
            if name == "power passed" and self.boundaries[i].clear_diameter is None:
                raise LayoutValueError(f"{ref.name!r} has no clear diameter: no power is "
                                       "clipped there", self.span(ref),
                                       hint="give the boundary ', clear diameter D'")
            return Place("boundary", boundary=i, label=ref.name)
        if ref.name == "image" and name != "power passed":
            return Place("image", label="the image plane")
        if ref.name in self.names and name != "power passed":
            measure = self.names[ref.name]
            if not measure.bare and measure.dimension != (1, 0) or measure.relative:
                raise LayoutUnitError(f"{ref.name!r} is {measure.describe()}: a place is a "
                                      "length after the last boundary", self.span(ref))
            return Place("after", distance=measure.value,
                         label=f"{ref.name} after the last boundary")
        close = difflib.get_close_matches(ref.name, names + ["image"], n=1)
        raise LayoutNameError(f"no boundary named {ref.name!r}", self.span(ref),
                              expected="a boundary's name, image, or a length named with let",
                              hint=f"did you mean {close[0]!r}?" if close else None)

    def beam_expectation(self, node: t.Node):
        """An `Expectation` of a beam quantity (core `expect`, `expect ... at NAME`, or
        `expect ... at D after`); None when the quantity is not a beam quantity."""
        if not is_beam_quantity(node.quantity.text):
            if isinstance(node, t.ExpectAfter):
                self._beam_info(node.quantity)
            return None
        from .interpreter import Expectation

        info = self.quantity(node.quantity)
        state = self._beams()
        state["uses"] = state["uses"] or node
        if info.name.startswith("coupling") and state["fibre node"] is None:
            raise LayoutValueError(f"{info.name} needs a fibre", self.span(node.quantity),
                                   hint="declare it with 'fibre mode field diameter D, at "
                                        "image'")
        place = self._place(node, info.name, getattr(node, "qualifiers", ()),
                            getattr(node, "distance", None))
        kind = info.kind
        if kind == PERCENT:
            convert = lambda e: self._fraction(e, f"the expected {info.name}")  # noqa: E731
        elif kind == DECIBEL:
            convert = lambda e: self._decibels(e, f"the expected {info.name}")  # noqa: E731
        elif kind == ANGLE:
            convert = lambda e: self.angle(e, f"the expected {info.name}")  # noqa: E731
        else:
            convert = self.converter(LENGTH, "the expected value")
        expected = convert(node.value)
        tolerance, relative = self.tolerance(node, convert, percent_allowed=kind != PERCENT)
        span = self.span(node)
        return Expectation(info.name, kind, node.op, expected, tolerance, relative, span,
                           span.line_text.strip(), request=place)

    def beam_system(self, system: System) -> System:
        """The System with the beam and fibre attached; the checks that need both."""
        state = self._beams()
        if state["beam"] is None:
            if state["fibre node"] is not None:
                raise LayoutValueError("a fibre needs a beam to couple", self.span(
                    state["fibre node"]), hint="declare the input beam with 'beam waist "
                                               "radius W, waist D before, wavelength L'")
            return system
        radius, distance, wavelength, ratio = state["beam"]
        if wavelength is None:
            primary = system.primary_wavelength
            if primary is None:
                saved, (self.file, self.lines) = (self.file, self.lines), state["beam context"]
                error = LayoutValueError("the beam needs a wavelength", self.span(
                    state["beam node"]), expected="', wavelength 1064 nm' (or a 'wavelengths' "
                                                  "line: the beam takes the primary one)")
                self.file, self.lines = saved
                raise error
            wavelength = primary.value
        fibre = state["fibre"]
        if state["fibre wavelength"] is not None:
            given, where, context = state["fibre wavelength"]
            try:
                differs = bool(abs(given - wavelength) > 1e-9 * abs(wavelength))
            except TypeError:
                differs = False
            if differs:
                saved, (self.file, self.lines) = (self.file, self.lines), context
                error = LayoutValueError(
                    "the mode-field diameter is given at another wavelength than the beam's",
                    self.span(where), hint="give the fibre's mode-field diameter at the beam's "
                                           "wavelength (it changes with wavelength)")
                self.file, self.lines = saved
                raise error
        return replace(system, beam=BeamSpec(radius, distance, wavelength, ratio), fibre=fibre)

    def beam_settings(self, system: System) -> BeamSettings | None:
        """The limits and report requests; errors for beam quantities without a beam."""
        state = self._beams()
        if system.beam is None:
            for kind, node in state["limit nodes"].items():
                raise LayoutValueError(f"a {kind} limit needs a beam", self.span(node))
            if state["uses"] is not None:
                raise LayoutValueError("this quantity needs a beam", self.span(state["uses"]),
                                       hint="declare it with 'beam waist radius W, waist D "
                                            "before, wavelength L'")
        reports = []
        for node, (self.file, self.lines) in state["reports"]:
            if system.beam is None:
                raise LayoutValueError("this quantity needs a beam", self.span(node),
                                       hint="declare it with 'beam waist radius W, waist D "
                                            "before, wavelength L'")
            if isinstance(node, t.Report):
                for quantity in node.quantities:
                    name = self.quantity(quantity).name
                    reports.append((name, self._place(quantity, name)))
            else:
                name = self.quantity(node.quantity).name
                reports.append((name, self._place(node, name, getattr(node, "qualifiers", ()),
                                                  getattr(node, "distance", None))))
        for name, _ in reports:
            if name.startswith("coupling") and system.fibre is None:
                raise LayoutValueError(f"{name} needs a fibre", self.span(state["beam node"]),
                                       hint="declare it with 'fibre mode field diameter D, at "
                                            "image'")
        if system.beam is None:
            return None
        return BeamSettings(state["clipping"], state["clearance"], tuple(reports))

    def beam_hazards(self, hazards: list[str]) -> tuple[str, ...]:
        """The declared hazards, with the laser caution whenever a beam is declared."""
        if self._beams()["beam node"] is not None and "laser" not in hazards:
            return tuple(hazards) + ("laser",)
        return tuple(hazards)


def _number_text(expr: t.Expr) -> str:
    from ..syntax.unparse import expression_text

    return expression_text(expr)
