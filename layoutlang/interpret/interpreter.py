"""Run a script's statements and build the `System`, its expectations and report requests.

One method per statement class (`statement_<class>`), dispatched through a table built once;
each says in its docstring the syntax it handles. All semantic checks live here and raise
errors that point at the offending words.
"""

from __future__ import annotations

import difflib
import math
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

from ..errors import LayoutFileError, LayoutNameError, LayoutUnitError
from ..errors import LayoutError, LayoutValueError, Span
from ..guard import MAX_SURFACES, as_arithmetic_error, guarded
from ..measure import LENGTH_UNITS, Measure
from ..quantities import LENGTH, NUMBER, POWER, lookup, suggestion
from ..syntax import tree as t
from ..syntax.parser import parse
from ..system import IDEAL, MIRROR, REFRACT, Boundary, ImageSpec, Medium, ObjectSpec
from ..system import StopSpec, System, Wavelength
from .expressions import ExpressionEvaluator, NumericBackend
from .beamstatements import BeamStatements
from .raystatements import RayStatements, is_ray_quantity
from .qualitystatements import QualityStatements
from .surfaceoptions import SurfaceOptions
from .materialstatements import MaterialStatements
from .placestatements import PlaceStatements
from .symbolstatements import SymbolicStatements
from .tolerancestatements import ToleranceStatements
from .buildstatements import SURFACE_QUANTITIES, BuildStatements
from ..engines.raysettings import RaySettings

__all__ = ["Expectation", "Program", "interpret", "check_statements", "load_file",
           "PREDEFINED_MEDIA"]

#: Media every script knows without defining them.
PREDEFINED_MEDIA = {"air": 1.0, "vacuum": 1.0}

#: What interpreting a layout with no boundary at all says (the session calls it unfinished).
NO_SURFACES = "the layout has no surfaces"


@dataclass(frozen=True)
class Expectation:
    """One `expect` statement, with its values already in the layout's units."""

    quantity: str
    kind: str
    op: str
    expected: float
    tolerance: float | None
    relative: bool
    span: Span
    text: str  # the statement as written, for reports
    field: float | None = None  # ray quantities: the field fraction it is taken at
    request: Any = None  # colour quantities and `at wavelength`: engines.chromatic.Request
    scale: str = ""  # 'depth of focus' when the value is in depths of focus
    wavelength: float | None = None  # ray quantities: the wavelength (layout units), else primary
    label: str = ""  # ray quantities: the quantity with its field and wavelength as written


@dataclass(frozen=True)
class Program:
    """A script after interpretation: the layout plus what the script asks of it."""

    file: str
    system: System
    expectations: tuple[Expectation, ...] = ()
    reports: tuple[tuple[str, ...], ...] = ()  # each `report`: quantity names (empty: all)
    hazards: tuple[str, ...] = ()  # declared with `hazard`, in script order
    names: dict[str, Measure] = field(default_factory=dict, compare=False)
    rays: RaySettings = RaySettings()  # what `report exact rays` samples (raystatements.py)
    ray_reports: tuple[str, ...] = ()  # 'exact rays', 'seidel sums', in script order
    ray_requests: tuple = ()  # raysettings.RayRequest: `report Q at field F [at wavelength W]`
    surface_requests: tuple = ()  # buildable.SurfaceRequest: `report edge thickness of NAME`
    warnings: tuple[str, ...] = ()  # e.g. a wavelength outside a material's valid range
    colour: Any = None  # materialstatements.ColourRequests: colour reports and achromats
    symbolic: Any = None  # a symbolic script's SymbolicPart (symbolic/program.py), else None
    tolerances: Any = None  # tolerance.model.ToleranceSetup, or None without tolerances
    quality: Any = None  # qualitystatements.QualityPlan: image-quality sampling and reports
    beams: Any = None  # a beam script's BeamSettings (interpret/beamstatements.py), else None
    # no display methods here: the notebook front end registers how a Program shows
    # (layoutlang.notebook.register), so interpreting never pulls in a renderer


def load_file(path: str | Path) -> Program:
    """Read, parse and interpret a script file."""
    from ..guard import read_script

    path = Path(path)
    text = read_script(path)
    return interpret(parse(text, str(path)), base=path.parent)


@guarded
def interpret(script: t.Script, base: Path | None = None) -> Program:
    """Build the Program of a parsed script (`base` resolves `use "file"`)."""
    return _Interpreter(script, base or Path.cwd()).run()


def check_statements(script: t.Script, base: Path | None = None) -> None:
    """Run a script's statements for their errors only, as for a layout still being built
    (no surface yet, a gap waiting for its surface): the whole-layout checks are skipped."""
    _Interpreter(script, base or Path.cwd()).run_statements()


class _Interpreter(RayStatements, SymbolicStatements, MaterialStatements, BeamStatements,
                   BuildStatements, PlaceStatements, SurfaceOptions, QualityStatements,
                   ToleranceStatements):
    def __init__(self, script: t.Script, base: Path) -> None:
        self.script = script
        self.base = base
        self.file = script.file
        self.lines = script.text.split("\n")
        self.names: dict[str, Measure] = {}
        self.units = "mm"
        self.units_fixed_by: t.Node | None = None
        self.title = ""
        self.media: dict[str, Medium] = {k: Medium(k, v) for k, v in PREDEFINED_MEDIA.items()}
        self.media_defined: dict[str, t.Node] = {}
        self.start: str | None = None
        self.boundaries: list[Boundary] = []
        self.gaps: list[Any] = []
        self.pending_gap: t.Gap | None = None
        self.current_medium: str | None = None
        self.object: ObjectSpec | None = None
        self.object_node: t.Node | None = None
        self.stop_node: t.Stop | None = None
        self.image: ImageSpec | None = None
        self.image_node: t.Node | None = None
        self.wavelengths: tuple[Wavelength, ...] = ()
        self.expect_nodes: list[tuple[t.Expect, tuple]] = []
        self.stop_context: tuple = ()
        self.reports: list[tuple[str, ...]] = []
        self.hazards: list[str] = []
        main = Path(script.file)
        # the chain of files being used right now (a cycle check), and every file used once
        self.using: tuple[Path, ...] = (main.resolve(),) if main.is_file() else ()
        self.used: set[Path] = set()
        self.evaluator = ExpressionEvaluator(self.names, self.units, self.span, NumericBackend)

    # --- helpers -----------------------------------------------------------------------------
    def span(self, node: t.Node) -> Span:
        pos = node.pos
        text = self.lines[pos.line - 1] if 0 < pos.line <= len(self.lines) else ""
        end = pos.end_column if pos.end_line == pos.line else len(text) + 1
        return Span(self.file, pos.line, pos.column, max(end, pos.column + 1), text)

    def value(self, node: t.Expr) -> Measure:
        return self.evaluator.evaluate(node)

    def length(self, node: t.Expr, what: str) -> Any:
        measure = self.value(node)
        if measure.bare and measure.free >= 2:
            raise LayoutUnitError(
                f"{what} must be a length, but this multiplies {measure.free} constants "
                "written without a unit: if each is a length, the product is not one",
                self.span(node), expected="a length",
                hint="give the constants their units ('let D = 25 mm'), so the dimensions "
                     "are checked; a plain factor may stay without one ('let ratio = 0.5' "
                     "times a length with a unit)")
        if measure.bare or measure.dimension == (1, 0):
            return measure.value
        raise LayoutUnitError(
            f"{what} must be a length, not {measure.describe()}", self.span(node),
            expected=f"a length such as 5 or 5 {self.units}",
        )

    def number(self, node: t.Expr, what: str) -> Any:
        measure = self.value(node)
        if measure.dimension == (0, 0):
            return measure.value
        raise LayoutUnitError(
            f"{what} is a plain number, not {measure.describe()}", self.span(node),
            expected="a number without a unit",
        )

    def angle(self, node: t.Expr, what: str) -> Any:
        measure = self.value(node)
        if measure.dimension == (0, 1) or (measure.bare and measure.value == 0):
            return measure.value
        if measure.bare:
            raise LayoutUnitError(
                f"{what} needs a unit", self.span(node), expected="an angle such as 5 deg or 0.1 rad",
                hint=f"write '{_literal(node)} deg' or '{_literal(node)} rad'",
            )
        raise LayoutUnitError(f"{what} must be an angle, not {measure.describe()}", self.span(node))

    def power(self, node: t.Expr, what: str) -> Any:
        """An optical power; a bare number is in diopters."""
        measure = self.value(node)
        if measure.bare:
            return measure.value * LENGTH_UNITS[self.units] / 1000.0
        if measure.dimension == (-1, 0):
            return measure.value
        raise LayoutUnitError(f"{what} must be an optical power, not {measure.describe()}",
                              self.span(node), expected="a power such as 10 diopters")

    def positive(self, value: Any, node: t.Node, what: str, allow_zero: bool = False) -> Any:
        try:
            bad = bool(value < 0 or (value == 0 and not allow_zero))
        except TypeError:  # a symbolic value of unknown sign: checked at its nominal values
            return value
        if bad:
            bound = "zero or more" if allow_zero else "more than zero"
            raise LayoutValueError(f"{what} must be {bound}", self.span(node))
        return value

    def medium_named(self, ident: t.Ident) -> str:
        if ident.text in self.media:
            return ident.text
        close = difflib.get_close_matches(ident.text, list(self.media), n=1)
        raise LayoutNameError(
            f"unknown medium {ident.text!r}", self.span(ident),
            expected="a medium defined earlier with 'medium NAME index N', or air",
            hint=f"did you mean {close[0]!r}?" if close else None,
        )

    def once(self, existing: t.Node | None, node: t.Node, what: str) -> None:
        if existing is not None:
            raise LayoutValueError(
                f"{what} is given twice (first on line {existing.pos.line})", self.span(node)
            )

    # --- the run -----------------------------------------------------------------------------
    def run(self) -> Program:
        from ..nesting import TOO_DEEP, room_for_nesting

        with room_for_nesting():
            self.run_statements()
            try:
                return self.finish()
            except TypeError as error:  # a symbol where a number must be compared
                raise self.symbolic_type_error(error, None) from None
            except RecursionError:
                raise LayoutValueError(TOO_DEEP, self.span(self.script)) from None

    def run_statements(self) -> None:
        """Every statement in order, without the whole-layout checks of `finish`."""
        from ..nesting import TOO_DEEP, room_for_nesting

        with room_for_nesting():
            for statement in self.script.statements:
                try:
                    self.execute(statement)
                except RecursionError:
                    raise LayoutValueError(TOO_DEEP, self.span(statement)) from None
                except LayoutError:
                    raise
                except Exception as error:  # noqa: BLE001 - arithmetic said at its statement
                    converted = as_arithmetic_error(error, span=self.span(statement))
                    if converted is None:
                        raise
                    raise converted from None

    def execute(self, statement: t.Statement) -> None:
        handler = _HANDLERS.get(type(statement).__name__)
        if handler is None and isinstance(statement, t.SessionCommand):
            raise LayoutValueError("this command works only in the interactive session "
                                   "(layoutlang repl)", self.span(statement))
        if handler is None:
            raise LayoutValueError(f"statement {type(statement).__name__} is not supported here",
                                   self.span(statement))
        try:
            handler(self, statement)
        except TypeError as error:  # a symbol where a number must be compared
            raise self.symbolic_type_error(error, statement) from None

    def statement_Title(self, node: t.Title) -> None:
        """layout "text" """
        self.once(getattr(self, "title_node", None), node, "the title")
        self.title, self.title_node = node.text, node

    def statement_Units(self, node: t.Units) -> None:
        """units mm"""
        if node.unit.text not in LENGTH_UNITS:
            raise LayoutUnitError(f"unknown length unit {node.unit.text!r}", self.span(node.unit),
                                  expected="one of " + ", ".join(LENGTH_UNITS))
        self.once(getattr(self, "units_node", None), node, "the length unit")
        self.units_node = node
        if self.units_fixed_by is not None:
            raise LayoutValueError(
                "units must come before any length is used "
                f"(line {self.units_fixed_by.pos.line} already used one)", self.span(node))
        self.units = "um" if node.unit.text == "µm" else node.unit.text
        self.evaluator.script_unit = self.units

    def _fix_units(self, node: t.Node) -> None:
        if self.units_fixed_by is None:
            self.units_fixed_by = node

    def statement_Let(self, node: t.Let) -> None:
        """let name = expression"""
        if node.name.text in self.names:
            raise LayoutNameError(f"{node.name.text!r} is already defined", self.span(node.name))
        self._fix_units(node)
        value = self.value(node.value)
        if value.bare and value.free == 0:  # a constant without a unit: it may be a length
            from dataclasses import replace

            value = replace(value, free=1)
        self.names[node.name.text] = value

    def statement_MediumIndex(self, node: t.MediumIndex) -> None:
        """medium NAME index N"""
        name = node.name.text
        if name in self.media_defined or name in PREDEFINED_MEDIA:
            raise LayoutNameError(f"medium {name!r} is already defined", self.span(node.name))
        index = self.number(node.index, "a refractive index")
        self.positive(index, node.index, "a refractive index")
        self.media[name] = Medium(name, index)
        self.media_defined[name] = node

    def statement_StartMedium(self, node: t.StartMedium) -> None:
        """start in MEDIUM"""
        if self.start is not None:
            raise LayoutValueError("the starting medium is given twice", self.span(node))
        if self.boundaries:
            raise LayoutValueError("'start in' must come before the first surface", self.span(node))
        self.start = self.current_medium = self.medium_named(node.medium)

    def statement_ObjectAtInfinity(self, node: t.ObjectAtInfinity) -> None:
        """object at infinity[, field angle A]"""
        self.once(self.object_node, node, "the object")
        if node.height is not None:
            raise LayoutValueError(
                "an object at infinity has no height: its size is the field angle it "
                "subtends", self.span(node.height),
                expected="'object at infinity, field angle 5 deg'",
                hint="for an object at a finite distance write 'object 250 before, height 4'")
        angle = 0.0
        if node.field_angle is not None:
            angle = self.angle(node.field_angle, "a field angle")
            if abs(angle) >= math.pi / 2:
                raise LayoutValueError("a field angle must be less than 90 deg",
                                       self.span(node.field_angle))
        self.object, self.object_node = ObjectSpec(None, 0.0, angle), node

    def statement_ObjectBefore(self, node: t.ObjectBefore) -> None:
        """object D before[, height H]"""
        self.once(self.object_node, node, "the object")
        self._fix_units(node)
        distance = self.length(node.distance, "the object distance")
        if node.field_angle is not None:
            raise LayoutValueError(
                "an object at a finite distance is sized by its height, not by a field angle",
                self.span(node.field_angle), expected="'object 250 before, height 4'",
                hint=self._height_for_angle(node) or "for a distant object write 'object at "
                     "infinity, field angle 5 deg'")
        height = 0.0 if node.height is None else self.length(node.height, "the object height")
        self.object, self.object_node = ObjectSpec(distance, height, 0.0), node

    def _height_for_angle(self, node: t.ObjectBefore) -> str | None:
        """The height that subtends the written field angle at the first vertex, as a hint."""
        try:
            distance = float(self.length(node.distance, "the object distance"))
            angle = float(self.angle(node.field_angle, "a field angle"))
        except (LayoutValueError, LayoutUnitError, TypeError):
            return None
        if not (distance > 0 and 0 < abs(angle) < math.pi / 2):
            return None
        from ..testing import format_number

        height = format_number(distance * math.tan(angle), 4)
        from ..syntax.unparse import expression_text

        return (f"{expression_text(node.field_angle)} seen from the first vertex at this distance is "
                f"a height of {height} {self.units}: write ', height {height}'")

    def statement_BoundaryStatement(self, node: t.BoundaryStatement) -> None:
        """surface [NAME] radius R | curvature C | flat [into MEDIUM][, clear diameter D]
        mirror [NAME] radius R | curvature C | flat[, clear diameter D]
        (surface and mirror also take the options of surfaces.lark: conic constant K,
        r4 coefficient A, q-type a0 A, q-type normalisation radius R, obscuration diameter D,
        hole diameter D)
        lens [NAME] focal length F | power P[, clear diameter D]"""
        if self.current_medium is None:
            raise LayoutValueError(
                f"a {node.kind} before any medium", self.span(node),
                hint="say where the light starts first, e.g. 'start in air'",
            )
        self._fix_units(node)
        number = len(self.boundaries) + 1
        name = node.name.text if node.name else f"#{number}"
        if node.name and any(b.name == name for b in self.boundaries):
            raise LayoutNameError(f"a surface named {name!r} already exists", self.span(node.name))
        if self.boundaries:
            self.gaps.append(0.0 if self.pending_gap is None else self.pending_gap_value)
        elif self.pending_gap is not None:
            raise LayoutValueError("a gap before the first surface", self.span(self.pending_gap),
                                   hint="place the object with 'object 250 before' instead")
        self.pending_gap = None
        curvature, power, kind = 0.0, 0.0, REFRACT
        after = self.current_medium
        if node.kind in ("surface", "mirror"):
            curvature = self.curvature(node.shape)
            if node.kind == "mirror":
                kind = MIRROR
            elif node.into is not None:
                after = self.medium_named(node.into)
        else:
            kind = IDEAL
            if node.strength_kind == "power":
                power = self.invertible(self.power(node.strength, "a lens power"),
                                        node.strength, "a lens power")
            else:
                focal = self.length(node.strength, "a focal length")
                if focal == 0:
                    raise LayoutValueError("a focal length cannot be zero", self.span(node.strength))
                power = 1 / self.invertible(focal, node.strength, "a focal length")
        clear = None
        if node.clear_diameter is not None:
            clear = self.positive(self.length(node.clear_diameter, "a clear diameter"),
                                  node.clear_diameter, "a clear diameter")
        shape = self.surface_fields(node, curvature, clear)
        self.remember_boundary(node)
        if len(self.boundaries) >= MAX_SURFACES:
            raise LayoutValueError(f"a layout has at most {MAX_SURFACES:,} surfaces",
                                   self.span(node), hint="this limit keeps every report fast")
        self.boundaries.append(Boundary(name, curvature, after, kind, power, clear, **shape))
        self.current_medium = after

    def curvature(self, shape: t.Shape) -> Any:
        if shape.kind == "flat":
            return 0.0
        if shape.kind == "curvature":
            measure = self.value(shape.value)
            if measure.bare or measure.dimension == (-1, 0):
                return self.invertible(measure.value, shape.value, "a curvature")
            raise LayoutUnitError(f"a curvature is 1/length, not {measure.describe()}",
                                  self.span(shape.value))
        radius = self.length(shape.value, "a radius")
        if radius == 0:
            raise LayoutValueError("a radius cannot be zero", self.span(shape.value),
                                   hint="write 'flat' for a plane surface")
        return 1 / self.invertible(radius, shape.value, "a radius")

    def invertible(self, value: Any, node: t.Node, what: str) -> Any:
        """`value` unless it is so close to zero that its reciprocal overflows (reports print
        both radius and curvature, so both must be finite)."""
        if value != 0 and isinstance(value, (int, float)) and not math.isfinite(1 / value):
            raise LayoutValueError(f"{what} this close to zero cannot be computed with",
                                   self.span(node))
        return value

    def statement_Gap(self, node: t.Gap) -> None:
        """gap LENGTH"""
        if self.pending_gap is not None:
            raise LayoutValueError(
                f"two gaps in a row (the other is on line {self.pending_gap.pos.line})",
                self.span(node), hint="add them into one gap")
        self._fix_units(node)
        value = self.positive(self.length(node.length, "a gap"), node.length, "a gap",
                              allow_zero=True)
        if not self.boundaries:
            raise LayoutValueError("a gap before the first surface", self.span(node),
                                   hint="place the object with 'object 250 before' instead")
        self.pending_gap, self.pending_gap_value = node, value

    def statement_Stop(self, node: t.Stop) -> None:
        """stop at NAME, SIZE | stop D before NAME, SIZE | stop D after NAME, SIZE"""
        self.once(self.stop_node, node, "the stop")
        self._fix_units(node)
        self.stop_node = node
        self.stop_context = (self.file, self.lines)

    def statement_Image(self, node: t.Image) -> None:
        """image at focus | image D after"""
        self.once(self.image_node, node, "the image plane")
        distance = None
        if node.distance is not None:
            self._fix_units(node)
            distance = self.length(node.distance, "the image distance")
        self.image, self.image_node = ImageSpec(distance, at_infinity=node.at_infinity), node
        self.image_context = (self.file, self.lines)

    def statement_ExpectAtInfinity(self, node: t.ExpectAtInfinity) -> None:
        """expect image at infinity"""
        if node.quantity.text != "image":
            raise LayoutValueError(
                f"only the image can be expected at infinity, not the {node.quantity.text}",
                self.span(node.quantity), expected="'expect image at infinity'")
        self.expect_nodes.append((node, (self.file, self.lines)))

    def check_image_at_infinity(self, program: Program) -> None:
        """`image at infinity` states the output is collimated: refuse it when it is not."""
        if not program.system.image.at_infinity or program.symbolic is not None:
            return
        from ..engines.firstorder import Unavailable, first_order

        value = first_order(program.system)["image distance"]
        if isinstance(value, Unavailable):
            return
        from ..testing import format_number

        self.file, self.lines = self.image_context
        side = "after" if value >= 0 else "before"
        raise LayoutValueError(
            f"the image is not at infinity: the paraxial image lies "
            f"{format_number(abs(value))} {program.system.units} {side} the last boundary",
            self.span(self.image_node), expected="a layout whose output is collimated",
            hint="place the object at the front focal point (or make the layout afocal), "
                 "or write 'image at focus'")

    def statement_Wavelengths(self, node: t.Wavelengths) -> None:
        """wavelengths W [primary], W, ..."""
        items = []
        for item in node.items:
            measure = self.wavelength_measure(item.value)  # also a line letter: d, F, C'
            if measure.bare or measure.dimension != (1, 0):
                raise LayoutUnitError("a wavelength needs a length unit", self.span(item.value),
                                      expected="a wavelength such as 587.6 nm or 0.5876 um")
            self.positive(measure.value, item.value, "a wavelength")
            items.append(Wavelength(measure.value, item.primary))
        self.once(getattr(self, "wavelengths_node", None), node, "the list of wavelengths")
        self.wavelengths_node = node
        if sum(w.primary for w in items) > 1:
            raise LayoutValueError("only one wavelength can be primary", self.span(node))
        for i, item in enumerate(items):
            if any(_same_number(item.value, other.value) for other in items[:i]):
                raise LayoutValueError("this wavelength is listed twice",
                                       self.span(node.items[i].value))
        self.wavelengths = tuple(items)

    def statement_Expect(self, node: t.Expect) -> None:
        """expect QUANTITY = V ± T | within T%, expect QUANTITY < V (and <=, >, >=)"""
        self.expect_nodes.append((node, (self.file, self.lines)))

    def statement_Report(self, node: t.Report) -> None:
        """report | report QUANTITY, QUANTITY, ..."""
        if self.report_chromatic(node):  # colour quantities (materialstatements.py)
            return
        if self.report_beam(node):  # beam quantities (beamstatements.py)
            return
        for quantity in node.quantities:
            if self.quantity(quantity).name in SURFACE_QUANTITIES:
                raise LayoutValueError(
                    f"say which surface: 'report {self.quantity(quantity).name} of front'",
                    self.span(quantity))
        self.reports.append(tuple(self.quantity(q).name for q in node.quantities))

    def statement_Hazard(self, node: t.Hazard) -> None:
        """hazard laser | hazard eye | hazard sunlight"""
        from ..hazards import CAUTIONS

        if node.kind.text not in CAUTIONS:
            close = difflib.get_close_matches(node.kind.text, list(CAUTIONS), n=1)
            raise LayoutNameError(f"unknown hazard {node.kind.text!r}", self.span(node.kind),
                                  expected="one of " + ", ".join(CAUTIONS),
                                  hint=f"did you mean {close[0]!r}?" if close else None)
        if node.kind.text not in self.hazards:
            self.hazards.append(node.kind.text)

    def statement_Use(self, node: t.Use) -> None:
        """use LIBRARY | use "file.lay" """
        if node.is_file:
            path = (self.base / node.target).resolve()
        else:
            from ..resources import stdlib_dir

            path = stdlib_dir() / f"{node.target}.lay"
            if not path.is_file():
                known = sorted(p.stem for p in stdlib_dir().glob("*.lay"))
                close = difflib.get_close_matches(node.target, known, n=1)
                raise LayoutNameError(
                    f"no library named {node.target!r}", self.span(node),
                    expected="one of " + ", ".join(known) if known else None,
                    hint=f"did you mean {close[0]!r}?" if close else None)
        path = path.resolve()
        if path in self.using:
            chain = " -> ".join(p.name for p in self.using[self.using.index(path):] + (path,))
            raise LayoutValueError(f"these files use each other in a circle: {chain}",
                                   self.span(node), hint="move what both need into a third file")
        if path in self.used:  # `use` is idempotent: a part used twice is loaded once
            return
        self.used.add(path)
        try:
            text = path.read_text(encoding="utf-8")
        except (OSError, UnicodeDecodeError) as error:
            raise LayoutFileError(f"cannot read {path}: {getattr(error, 'strerror', error)}",
                                  self.span(node)) from None
        script = parse(text, str(path))
        saved = (self.file, self.lines, self.base, self.using)
        self.file, self.lines, self.base = str(path), script.text.split("\n"), path.parent
        self.using = self.using + (path,)
        try:
            for statement in script.statements:
                self.execute(statement)
        finally:
            self.file, self.lines, self.base, self.using = saved

    # --- finishing ---------------------------------------------------------------------------
    def quantity(self, node: t.Quantity):
        info = lookup(node.text)
        if info is None:
            close = suggestion(node.text)
            raise LayoutNameError(
                f"unknown quantity {node.text!r}", self.span(node),
                expected="a quantity such as focal length, image distance or magnification",
                hint=f"did you mean {close!r}?" if close else None)
        return info

    def finish(self) -> Program:
        if not self.boundaries:
            raise LayoutValueError(NO_SURFACES, Span(self.file, 1, 1, 2,
                                   self.lines[0] if self.lines else ""),
                                   hint="add at least one 'surface', 'mirror' or 'lens'")
        if self.pending_gap is not None:
            raise LayoutValueError(
                "nothing follows this gap", self.span(self.pending_gap),
                hint="for the image plane write 'image 40 after' instead of a last gap")
        media_used = {self.start, *(b.medium_after for b in self.boundaries)}
        media = tuple(m for name, m in sorted(self.media.items()) if name in media_used)
        system = System(
            media=media, start_medium=self.start, boundaries=tuple(self.boundaries),
            gaps=tuple(self.gaps), object=self.object or ObjectSpec(),
            stop=None, image=self.image or ImageSpec(), wavelengths=self.wavelengths,
            title=self.title, units=self.units,
        )
        system = self.materials_system(system)  # dispersion, surroundings (materialstatements.py)
        system = self.placed_system(system)  # tilts, decenters, folds, prisms (placestatements.py)
        system = self.beam_system(system)  # the beam and fibre (beamstatements.py)
        if self.stop_node is not None:
            from dataclasses import replace

            self.file, self.lines = self.stop_context
            system = replace(system, stop=self.build_stop(self.stop_node, system))
        rays = self.ray_settings(system)
        quality = self.quality_plan(system)
        expectations = []
        for node, (self.file, self.lines) in self.expect_nodes:
            expectations.append(self.expectation(node))
        expectations = tuple(expectations)
        ray_requests = self.ray_requests()
        self.refuse_unused_ray_settings(expectations, ray_requests)
        tolerances = self.tolerance_setup(system)  # tolerancestatements.py
        self.refuse_unused_quality_settings(expectations)  # qualitystatements.py
        program = self.check_buildable(self.finish_symbolic(Program(
            self.script.file, system, expectations, tuple(self.reports),
            self.beam_hazards(self.hazards), dict(self.names), rays=rays,
            ray_reports=self.ray_reports(), ray_requests=ray_requests,
            colour=self.colour_requests(system), warnings=self.material_warnings(),
            beams=self.beam_settings(system), surface_requests=self.surface_reports(system),
            quality=quality, tolerances=tolerances)))
        self.check_image_at_infinity(program)
        return program

    def build_stop(self, node: t.Stop, system: System) -> StopSpec:
        try:
            index = system.boundary_index(node.anchor.text)
        except KeyError:
            names = [b.name for b in system.boundaries]
            close = difflib.get_close_matches(node.anchor.text, names, n=1)
            raise LayoutNameError(
                f"no surface named {node.anchor.text!r} to place the stop at",
                self.span(node.anchor), expected="the name of a surface, mirror or lens",
                hint=f"did you mean {close[0]!r}?" if close else None) from None
        if node.size_kind == "diameter":
            size = self.positive(self.length(node.size, "the stop diameter"), node.size,
                                 "the stop diameter")
        else:
            size = self.positive(self.number(node.size, f"the {node.size_kind}"), node.size,
                                 f"the {node.size_kind}")
            if node.size_kind == "numerical aperture" and size >= system.indices()[0]:
                raise LayoutValueError(
                    "a numerical aperture must be less than the object-space index",
                    self.span(node.size))
        if node.relation == "at":
            return StopSpec(index, 0.0, node.size_kind, size, node.anchor.text)
        offset = self.positive(self.length(node.offset, "the stop distance"), node.offset,
                               "the stop distance", allow_zero=True)
        last = len(system.boundaries) - 1
        if node.relation == "after":
            room = system.gaps[index] if index < last else math.inf
            if offset > room:
                raise LayoutValueError(
                    f"the stop cannot be placed: the gap after {node.anchor.text!r} is only "
                    f"{room:g} {self.units}", self.span(node.offset))
            return StopSpec(index, offset, node.size_kind, size, node.anchor.text)
        if index == 0:
            return StopSpec(-1, -offset, node.size_kind, size, node.anchor.text)
        room = system.gaps[index - 1]
        if offset > room:
            raise LayoutValueError(
                f"the stop cannot be placed: the gap before {node.anchor.text!r} is only "
                f"{room:g} {self.units}", self.span(node.offset))
        return StopSpec(index - 1, room - offset, node.size_kind, size, node.anchor.text)

    def expectation(self, node: t.Expect) -> Expectation:
        if isinstance(node, t.ExpectYield):  # tolerancestatements.py
            return self.yield_expectation(node)
        if isinstance(node, (t.QualityExpect, t.ExpectCoverage)):  # qualitystatements.py
            return self.quality_expectation(node)
        if isinstance(node, t.ExpectAtInfinity):
            span = self.span(node)
            return Expectation("image distance", LENGTH, "at infinity", 0.0, None, False, span,
                               span.line_text.strip(), label="image")
        beam = self.beam_expectation(node)  # beam quantities (beamstatements.py)
        if beam is not None:
            return beam
        if self.quantity(node.quantity).name in SURFACE_QUANTITIES:  # edge thickness of NAME
            request = self.surface_request(self.quantity(node.quantity).name,
                                           getattr(node, "qualifiers", ()), node,
                                           self._materials()["system"])
        else:
            request = self.expect_request(node)  # colour quantities, `at wavelength F`
        if request is None and (isinstance(node, t.ExpectRays)
                                or is_ray_quantity(node.quantity.text)):
            return self.ray_expectation(node)
        info = self.quantity(node.quantity)
        convert = self.converter(info.kind, "the expected value")
        expected = convert(node.value)
        tolerance, relative = self.tolerance(node, self.converter(info.kind, "the tolerance"))
        span = self.span(node)
        return Expectation(info.name, info.kind, node.op, expected, tolerance, relative, span,
                           span.line_text.strip(), request=request)

    def converter(self, kind: str, what: str):
        """The reading of an expression as a quantity of this kind (length, power, number)."""
        return {LENGTH: lambda e: self.length(e, what),
                POWER: lambda e: self.power(e, what),
                NUMBER: lambda e: self.number(e, what)}[kind]

    def tolerance(self, node: t.Expect, convert, percent_allowed: bool = True):
        """(tolerance, relative) of an expectation: '± T' in the quantity's unit, or a
        percentage (relative) where `percent_allowed`; '=' must have one, bounds none."""
        if node.tolerance is None:
            if node.op == "=":
                raise LayoutValueError(
                    "an '=' expectation needs a tolerance", self.span(node),
                    expected="'± 0.05' or 'within 1%' after the value")
            return None, False
        if node.op != "=":
            raise LayoutValueError("a tolerance only goes with '='", self.span(node.tolerance))
        measure = self.value(node.tolerance.value)
        if node.tolerance.kind == "within" and measure.bare:
            written = _literal(node.tolerance.value)
            raise LayoutUnitError(
                "a 'within' tolerance needs '%' or a unit", self.span(node.tolerance.value),
                expected=f"'within {written}%' (relative) or 'within {written} "
                         f"{self.units}' (absolute)",
                hint=f"'± {written}' is an absolute tolerance in the quantity's own unit")
        if measure.relative and percent_allowed:
            tolerance, relative = measure.value, True
        else:
            tolerance, relative = convert(node.tolerance.value), False
        self.positive(tolerance, node.tolerance.value, "a tolerance", allow_zero=True)
        return tolerance, relative


def _same_number(a: Any, b: Any) -> bool:
    try:
        return bool(abs(a - b) <= 1e-12 * abs(a))
    except TypeError:  # symbolic values: equal only when identical
        return a == b


def _literal(node: t.Expr) -> str:
    return node.text if isinstance(node, t.Number) else "5"


_HANDLERS = {
    name[len("statement_"):]: method
    for cls in (RayStatements, SymbolicStatements, MaterialStatements, BeamStatements,
                BuildStatements, PlaceStatements, SurfaceOptions, QualityStatements, ToleranceStatements,
                _Interpreter)
    for name, method in vars(cls).items()
    if name.startswith("statement_")
}
