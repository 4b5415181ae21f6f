"""The interpreter's part for image quality (statements of grammar/quality.lark).

Mixed into the interpreter's class: each `statement_<Class>` says in its docstring the syntax it
handles. Expectations and reports are resolved at the end of the script, when the object (for
fields), the wavelengths (for weights) and the sensor (for Nyquist and sensor places) are known.
Nothing here imports numpy: the engines are loaded only when a value is computed.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Any

from ..engines.qualitysettings import DEFAULT_CELLS, QualityRequest, QualitySettings, Sensor
from ..errors import LayoutNameError, LayoutUnitError, LayoutValueError
from ..measure import LENGTH_UNITS
from ..quantities import DEGREES, LENGTH, NUMBER
from ..syntax import tree as t

__all__ = ["QualityStatements", "QualityPlan", "WAVES", "DEGREES", "QUALITY_KINDS"]

WAVES = "waves"

#: grammar kind (and measure) → (engine quantity name, kind of value)
QUALITY_KINDS = {
    "mtf": ("mtf", NUMBER),
    "wavefront error": ("wavefront error", WAVES),
    "wavefront focus shift": ("wavefront focus shift", LENGTH),
    "strehl ratio": ("strehl ratio", NUMBER),
    "encircled energy": ("encircled energy", NUMBER),
    "encircled energy radius": ("encircled energy radius", LENGTH),
    "ensquared energy": ("ensquared energy", NUMBER),
    "zernike": ("zernike", WAVES),
    "focus": ("focus", LENGTH),
    "chief-ray angle": ("chief-ray angle", DEGREES),
    "illumination": ("illumination", NUMBER),
}

_FIELD_WORDS = "fields go with 'at field F' (a fraction, an angle or an object height) or " \
               "'at sensor corner | edge | top | centre'"


@dataclass(frozen=True)
class QualityPlan:
    """What a script asks of the image-quality engines: sampling, weights, sensor, reports."""

    settings: QualitySettings = QualitySettings()
    reports: tuple[QualityRequest, ...] = ()
    whole: bool = False  # `report quality`: the whole section

    @property
    def asked(self) -> bool:
        return self.whole or bool(self.reports)


class QualityStatements:
    """`sensor`, `wavefront grid`, `wavelength weights`, image-quality `expect` and `report`."""

    def _quality(self) -> dict:
        state = self.__dict__.get("_quality_state")
        if state is None:
            state = self.__dict__["_quality_state"] = {
                "sensor": None, "grid": None, "weights": None, "reports": [], "whole": False,
                "plan": None}
        return state

    def statement_Sensor(self, node: t.Sensor) -> None:
        """sensor W by H, pixel pitch P"""
        state = self._quality()
        if state["sensor"] is not None:
            raise LayoutValueError("the sensor is given twice", self.span(node))
        width = self.positive(self.length(node.width, "the sensor width"), node.width,
                              "the sensor width")
        height = self.positive(self.length(node.height, "the sensor height"), node.height,
                               "the sensor height")
        pitch = self.positive(self.length(node.pitch, "the pixel pitch"), node.pitch,
                              "the pixel pitch")
        if pitch > min(width, height):
            raise LayoutValueError("the pixel pitch is larger than the sensor",
                                   self.span(node.pitch))
        state["sensor"] = Sensor(float(width), float(height), float(pitch))

    def statement_WavefrontGrid(self, node: t.WavefrontGrid) -> None:
        """wavefront grid N"""
        state = self._quality()
        if state["grid"] is not None:
            raise LayoutValueError("the wavefront grid is given twice", self.span(node))
        value = self.number(node.value, "the wavefront grid")
        if value != int(value) or not 8 <= value <= 512:
            raise LayoutValueError("the wavefront grid takes a whole number of cells across, "
                                   "from 8 to 512", self.span(node.value),
                                   expected="e.g. 'wavefront grid 64'")
        state["grid"] = int(value)
        state["grid_node"] = (node, (self.file, self.lines))

    def statement_WavelengthWeights(self, node: t.WavelengthWeights) -> None:
        """wavelength weights W, W, ... (in the order of `wavelengths`)"""
        state = self._quality()
        if state["weights"] is not None:
            raise LayoutValueError("the wavelength weights are given twice", self.span(node))
        values = []
        for expr in node.values:
            value = float(self.number(expr, "a wavelength weight"))
            if not math.isfinite(value) or value < 0:
                raise LayoutValueError("a wavelength weight must be zero or more",
                                       self.span(expr))
            values.append(value)
        if not any(values):
            raise LayoutValueError("at least one wavelength weight must be more than zero",
                                   self.span(node))
        state["weights"] = (tuple(values), node, (self.file, self.lines))

    def statement_QualityExpect(self, node: t.QualityExpect) -> None:
        """expect QUALITY < V [waves] (also =, <=, >, >= and a tolerance)"""
        self.expect_nodes.append((node, (self.file, self.lines)))

    def statement_ExpectCoverage(self, node: t.ExpectCoverage) -> None:
        """expect sensor covered by image circle"""
        self.expect_nodes.append((node, (self.file, self.lines)))

    def statement_QualityReport(self, node: t.QualityReport) -> None:
        """report quality | report QUALITY"""
        state = self._quality()
        if node.quality is None:
            state["whole"] = True
        else:
            state["reports"].append((node, (self.file, self.lines)))

    # --- at the end of the script -------------------------------------------------------------
    def quality_reads_fields(self) -> bool:
        """Whether `report quality` reads the `sample fields` (its rows)."""
        return self._quality()["whole"]

    def refuse_unused_quality_settings(self, expectations) -> None:
        """`wavefront grid` or `wavelength weights` that no image-quality value reads is an
        error at its words, not a setting silently ignored."""
        state = self._quality()
        used = state["whole"] or state["reports"] or any(
            isinstance(e.request, QualityRequest) for e in expectations)
        if used:
            return
        for key, words in (("grid_node", "wavefront grid"), ("weights", "wavelength weights")):
            found = state.get(key)
            if found is None:
                continue
            node, (self.file, self.lines) = found[-2], found[-1]
            raise LayoutValueError(f"'{words}' has no effect: nothing in this script reads it",
                                   self.span(node), hint="it is used by image-quality "
                                   "expectations and 'report quality'; add one or remove "
                                   "this line")

    def quality_plan(self, system) -> QualityPlan:
        """The script's sampling, weights and sensor, and its quality reports resolved."""
        state = self._quality()
        weights = None
        if state["weights"] is not None:
            values, node, context = state["weights"]
            count = len(system.wavelengths)
            if len(values) != count:
                saved, (self.file, self.lines) = (self.file, self.lines), context
                try:
                    raise LayoutValueError(
                        f"{len(values)} wavelength weight(s) for {count} wavelength(s)",
                        self.span(node), expected="one weight per wavelength of the "
                                                  "'wavelengths' statement, in its order")
                finally:
                    self.file, self.lines = saved
            weights = values
        settings = QualitySettings(state["grid"] or DEFAULT_CELLS, weights, state["sensor"])
        state["plan"] = settings
        reports = []
        for node, context in state["reports"]:
            saved, (self.file, self.lines) = (self.file, self.lines), context
            try:
                reports.append(self.quality_request(node.quality, node))
            finally:
                self.file, self.lines = saved
        return QualityPlan(settings, tuple(reports), state["whole"])

    def quality_expectation(self, node: Any):
        """An `Expectation` for an image-quality quantity or the sensor's coverage."""
        from .interpreter import Expectation

        span = self.span(node)
        if isinstance(node, t.ExpectCoverage):
            if self._quality()["sensor"] is None:
                raise LayoutValueError("the sensor's coverage needs a 'sensor' statement",
                                       span, expected="e.g. 'sensor 7.07 mm by 5.3 mm, pixel "
                                                      "pitch 3.45 um'")
            request = QualityRequest("image circle margin", label="image circle radius minus "
                                                                  "the sensor's half diagonal")
            return Expectation("image circle margin", LENGTH, ">=", 0.0, None, False, span,
                               span.line_text.strip(), request=request)
        request = self.quality_request(node.quality, node)
        _, kind = QUALITY_KINDS[node.quality.kind]
        if node.waves and kind != WAVES:
            raise LayoutUnitError(f"{request.describe()} is not measured in waves",
                                  self.span(node.value), hint="only wavefront errors and "
                                                              "Zernike terms are in waves")
        convert = self._quality_converter(kind)
        expected = convert(node.value)
        tolerance, relative = self.tolerance(node, convert, percent_allowed=kind != NUMBER)
        return Expectation(request.name, kind, node.op, expected, tolerance, relative, span,
                           span.line_text.strip(), field=request.field, request=request)

    def _quality_converter(self, kind: str):
        if kind == WAVES:
            return lambda e: self._quality_plain(e, "a wavefront error in waves")
        if kind == DEGREES:
            return lambda e: self.angle(e, "a chief-ray angle")  # radians, shown in degrees
        if kind == NUMBER:
            return self._quality_fraction
        return lambda e: self.length(e, "the expected value")

    def _quality_plain(self, expr: t.Expr, what: str) -> float:
        measure = self.value(expr)
        if measure.bare or measure.dimension == (0, 0) and not measure.relative:
            return float(measure.value)
        raise LayoutUnitError(f"{what} is a plain number, not {measure.describe()}",
                              self.span(expr), expected="a number such as 0.07")

    def _quality_fraction(self, expr: t.Expr) -> float:
        """A modulation, ratio or energy fraction: a plain number (0.8) or a percentage (80%)."""
        measure = self.value(expr)
        if measure.relative or measure.bare or measure.dimension == (0, 0):
            return float(measure.value)
        raise LayoutUnitError(f"a fraction is a plain number or a percentage, not "
                              f"{measure.describe()}", self.span(expr),
                              expected="e.g. 0.3 or 30%")

    def quality_request(self, q: t.Quality, statement: t.Node) -> QualityRequest:
        """The quantity `q` with its qualifiers checked and in layout units."""
        name, _ = QUALITY_KINDS[q.kind]
        words = _words(q)
        field: float | None = 0.0
        height = None
        wavelength = None
        orientation = None
        seen: dict[str, t.QualityPlace] = {}
        for place in q.places:
            group = "field" if place.kind in ("field", "sensor") else place.kind
            if group in seen:
                raise LayoutValueError(f"the {group} is given twice", self.span(place))
            seen[group] = place
            if place.kind == "field":
                field = self.field_fraction(place.value)
            elif place.kind == "sensor":
                sensor = self._sensor_for(place)
                height = sensor.place(place.word)
                field = None if height else 0.0
                height = height or None
            elif place.kind == "wavelength":
                wavelength, _ = self._resolve_ref(place.wavelength)
            else:
                if q.kind != "mtf":
                    raise LayoutValueError(f"{words} has no orientation", self.span(place),
                                           hint="'tangential' and 'sagittal' go with mtf; "
                                                "for field curves write 'tangential focus'")
                orientation = place.word
        if q.kind == "focus":
            name = f"{q.measure} focus"
        if q.kind == "wavefront error":
            name = f"wavefront error {q.measure}"
        frequency = size = term = None
        if q.kind == "mtf":
            frequency = self._quality_frequency(q)
        elif q.kind in ("encircled energy", "ensquared energy"):
            size = float(self.positive(self.length(q.value, f"the {q.kind} size"), q.value,
                                       f"the {q.kind} size"))
        elif q.kind == "encircled energy radius":
            size = self._quality_fraction(q.value)
            if not 0 < size < 1:
                raise LayoutValueError("the energy fraction must lie between 0 and 1 (or 0% "
                                       "and 100%)", self.span(q.value), expected="e.g. 80%")
        elif q.kind == "zernike":
            term = self._zernike_term(q)
        label = words
        return QualityRequest(name, field, height, wavelength, frequency, orientation, size,
                              term, label)

    def _sensor_for(self, node: t.Node) -> Sensor:
        sensor = self._quality()["sensor"]
        if sensor is None:
            raise LayoutValueError("a place on the sensor needs a 'sensor' statement",
                                   self.span(node), expected="e.g. 'sensor 7.07 mm by 5.3 mm, "
                                                             "pixel pitch 3.45 um'")
        return sensor

    def _quality_frequency(self, q: t.Quality) -> float:
        if q.frequency == "value":
            unit = q.per.text
            if unit not in LENGTH_UNITS:
                raise LayoutUnitError(f"unknown length unit {unit!r} in a spatial frequency",
                                      self.span(q.per), expected="cycles per mm (or um, cm, m, "
                                                                 "in)")
            value = self.value(q.value)
            if not (value.bare or value.dimension == (0, 0)) or value.relative:
                raise LayoutUnitError("a spatial frequency is a plain number of cycles per "
                                      "length", self.span(q.value),
                                      expected="e.g. 'mtf at 50 cycles per mm'")
            cycles = float(value.value)
            if not cycles > 0 or not math.isfinite(cycles):
                raise LayoutValueError("a spatial frequency must be more than zero",
                                       self.span(q.value))
            return cycles * LENGTH_UNITS[self.units] / LENGTH_UNITS[unit]
        sensor = self._sensor_for(q)
        return sensor.nyquist / (2.0 if q.frequency == "half nyquist" else 1.0)

    def _zernike_term(self, q: t.Quality) -> int:
        from ..engines.zernike import TERM_COUNT, TERM_NAMES, lookup_term

        if q.term is not None:
            value = self.number(q.term, "a Zernike term number")
            if value != int(value) or not 1 <= value <= TERM_COUNT:
                raise LayoutValueError(f"a Zernike term is numbered 1 to {TERM_COUNT} (Noll)",
                                       self.span(q.term))
            return int(value)
        found = lookup_term(" ".join(q.words))
        if found is None:
            raise LayoutNameError(f"unknown Zernike term {' '.join(q.words)!r}", self.span(q),
                                  expected="a Noll number 1 to 22 or a name such as "
                                           + ", ".join(TERM_NAMES[j] for j in (4, 6, 7, 11)))
        return found


def _words(q: t.Quality) -> str:
    from ..syntax.unparse import _quality

    return _quality(q)
