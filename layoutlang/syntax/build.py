"""Turn lark's parse tree into the syntax-tree dataclasses, keeping every position.

Runs after parsing (not inside `Lark(transformer=...)`) so that the meta information carrying
line and column is available to every node. One method per grammar alias.
"""

from __future__ import annotations

from lark import Token, Transformer, v_args

from . import tree as t

__all__ = ["build_script"]


def _pos(meta) -> t.Pos:
    if getattr(meta, "empty", True):
        return t.NO_POS
    return t.Pos(meta.line, meta.column, meta.end_line, meta.end_column)


def _token_pos(token: Token) -> t.Pos:
    return t.Pos(token.line, token.column, token.end_line, token.end_column)


def _ident(token: Token | None) -> t.Ident | None:
    return None if token is None else t.Ident(str(token), pos=_token_pos(token))


class OptionTwice(Exception):
    """The same `, option value` appears twice in one statement (which one would count?)."""

    def __init__(self, key: str, value) -> None:
        super().__init__(key)
        self.key, self.value = key, value


def _surface_options(items) -> tuple:
    """The shape and aperture options of surfaces.lark, (key, value) in written order."""
    return tuple((key, value) for key, value in _options(items).items()
                 if key != "clear diameter")


def _options(items) -> dict:
    """Collect trailing `, option value` pairs given as (key, value) tuples; an option given
    twice is refused rather than one of them silently winning."""
    found: dict = {}
    for item in items:
        if isinstance(item, tuple):
            if item[0] in found:
                raise OptionTwice(item[0], item[1])
            found[item[0]] = item[1]
    return found


@v_args(meta=True)
class _Builder(Transformer):
    # --- expressions ---------------------------------------------------------------------
    def number(self, meta, items):
        value, unit = items
        return t.Number(str(value), None if unit is None else str(unit), pos=_pos(meta))

    def name(self, meta, items):
        return t.Name(str(items[0]), pos=_pos(meta))

    def call(self, meta, items):
        return t.Call(str(items[0]), tuple(items[1:]), pos=_pos(meta))

    def binary(self, meta, items):
        left, op, right = items
        symbol = {"−": "-", "×": "*", "÷": "/"}.get(str(op), str(op))
        return t.Binary(symbol, left, right, pos=_pos(meta))

    def negate(self, meta, items):
        return t.Negate(items[1], pos=_pos(meta))

    def unary_plus(self, meta, items):
        return items[1]

    # --- statements ----------------------------------------------------------------------
    def start(self, meta, items):
        return list(items)

    def title(self, meta, items):
        return t.Title(str(items[0])[1:-1], pos=_pos(meta))

    def units(self, meta, items):
        return t.Units(_ident(items[0]), pos=_pos(meta))

    def let(self, meta, items):
        return t.Let(_ident(items[0]), items[1], pos=_pos(meta))

    def medium_index(self, meta, items):
        return t.MediumIndex(_ident(items[0]), items[1], pos=_pos(meta))

    def start_medium(self, meta, items):
        return t.StartMedium(_ident(items[0]), pos=_pos(meta))

    def object_height(self, meta, items):
        return ("height", items[0])

    def object_field_angle(self, meta, items):
        return ("field angle", items[0])

    def object_at_infinity(self, meta, items):
        options = _options(items)
        return t.ObjectAtInfinity(options.get("field angle"), options.get("height"),
                                  pos=_pos(meta))

    def object_before(self, meta, items):
        options = _options(items[1:])
        return t.ObjectBefore(items[0], options.get("height"), options.get("field angle"),
                              pos=_pos(meta))

    def radius(self, meta, items):
        return t.Shape("radius", items[0], pos=_pos(meta))

    def curvature(self, meta, items):
        return t.Shape("curvature", items[0], pos=_pos(meta))

    def flat(self, meta, items):
        return t.Shape("flat", None, pos=_pos(meta))

    def clear_diameter(self, meta, items):
        return ("clear diameter", items[0])

    # surfaces.lark: shape and aperture options, kept in written order as (key, value)
    def conic_constant(self, meta, items):
        return ("conic constant", items[0])

    def even_coefficient(self, meta, items):
        return (f"{items[0]} coefficient", items[1])

    def q_type_coefficient(self, meta, items):
        return (f"q-type {items[0]}", items[1])

    def q_type_radius(self, meta, items):
        return ("q-type normalisation radius", items[0])

    def obscuration_diameter(self, meta, items):
        return ("obscuration diameter", items[0])

    def hole_diameter(self, meta, items):
        return ("hole diameter", items[0])

    def lens_focal_length(self, meta, items):
        return ("focal length", items[0])

    def lens_power(self, meta, items):
        return ("power", items[0])

    def surface(self, meta, items):
        name, shape, into, *rest = items
        return t.BoundaryStatement(
            "surface", _ident(name), shape=shape, into=_ident(into),
            clear_diameter=_options(rest).get("clear diameter"),
            surface_options=_surface_options(rest), pos=_pos(meta),
        )

    def mirror(self, meta, items):
        name, shape, *rest = items
        return t.BoundaryStatement(
            "mirror", _ident(name), shape=shape,
            clear_diameter=_options(rest).get("clear diameter"),
            surface_options=_surface_options(rest), pos=_pos(meta),
        )

    def lens(self, meta, items):
        name, (kind, strength), *rest = items
        return t.BoundaryStatement(
            "lens", _ident(name), strength_kind=kind, strength=strength,
            clear_diameter=_options(rest).get("clear diameter"),
            surface_options=_surface_options(rest), pos=_pos(meta),
        )

    def gap(self, meta, items):
        return t.Gap(items[0], pos=_pos(meta))

    def stop_diameter(self, meta, items):
        return ("diameter", items[0])

    def stop_f_number(self, meta, items):
        return ("f-number", items[0])

    def stop_numerical_aperture(self, meta, items):
        return ("numerical aperture", items[0])

    def stop_at(self, meta, items):
        anchor, (kind, size) = items
        return t.Stop(_ident(anchor), "at", None, kind, size, pos=_pos(meta))

    def stop_before(self, meta, items):
        offset, anchor, (kind, size) = items
        return t.Stop(_ident(anchor), "before", offset, kind, size, pos=_pos(meta))

    def stop_after(self, meta, items):
        offset, anchor, (kind, size) = items
        return t.Stop(_ident(anchor), "after", offset, kind, size, pos=_pos(meta))

    def image_at_focus(self, meta, items):
        return t.Image(None, pos=_pos(meta))

    def image_at_infinity(self, meta, items):
        return t.Image(None, True, pos=_pos(meta))

    def expect_at_infinity(self, meta, items):
        return t.ExpectAtInfinity(items[0], pos=_pos(meta))

    def image_after(self, meta, items):
        return t.Image(items[0], pos=_pos(meta))

    def wavelength(self, meta, items):
        return t.Wavelength(items[0], items[1] is not None, pos=_pos(meta))

    def wavelengths(self, meta, items):
        return t.Wavelengths(tuple(items), pos=_pos(meta))

    def quantity(self, meta, items):
        words: list[str] = []
        joined = False
        for token in items:
            if token.type == "MINUS":
                joined = True
            elif joined:
                words[-1] += "-" + str(token)
                joined = False
            else:
                words.append(str(token))
        return t.Quantity(tuple(words), pos=_pos(meta))

    def comparison(self, meta, items):
        return str(items[0])

    def tolerance_plus_minus(self, meta, items):
        return t.Tolerance("±", items[1], pos=_pos(meta))

    def tolerance_within(self, meta, items):
        return t.Tolerance("within", items[0], pos=_pos(meta))

    def expect(self, meta, items):
        quantity, op, value, tolerance = items
        return t.Expect(quantity, op, value, tolerance, pos=_pos(meta))

    def report(self, meta, items):
        return t.Report(tuple(q for q in items if q is not None), pos=_pos(meta))

    def hazard(self, meta, items):
        return t.Hazard(_ident(items[0]), pos=_pos(meta))

    def use_library(self, meta, items):
        return t.Use(str(items[0]), False, pos=_pos(meta))

    def use_file(self, meta, items):
        return t.Use(str(items[0])[1:-1], True, pos=_pos(meta))

    # --- commands of the interactive session (grammar/session.lark) -----------------------
    def _words(self, meta, items):
        return " ".join(str(token) for token in items)

    boundary_property = object_property = stop_property = place = show_what = _words

    def change_property(self, meta, items):
        name, prop, value = items
        return t.Change("named", _ident(name), prop, value, pos=_pos(meta))

    def change_to_flat(self, meta, items):
        return t.Change("named", _ident(items[0]), "flat", None, pos=_pos(meta))

    def change_constant(self, meta, items):
        return t.Change("named", _ident(items[0]), "value", items[1], pos=_pos(meta))

    def change_medium_index(self, meta, items):
        return t.Change("medium", _ident(items[0]), "index", items[1], pos=_pos(meta))

    def change_gap(self, meta, items):
        place, name, value = items
        return t.Change("gap", _ident(name), place, value, pos=_pos(meta))

    def change_object(self, meta, items):
        return t.Change("object", None, items[0], items[1], pos=_pos(meta))

    def change_stop(self, meta, items):
        return t.Change("stop", None, items[0], items[1], pos=_pos(meta))

    def insert(self, meta, items):
        item, place, anchor = items
        return t.Insert(item, place, _ident(anchor), pos=_pos(meta))

    def remove_boundary(self, meta, items):
        return t.Remove(_ident(items[0]), None, pos=_pos(meta))

    def remove_gap(self, meta, items):
        return t.Remove(_ident(items[1]), items[0], pos=_pos(meta))

    def rename(self, meta, items):
        return t.Rename(_ident(items[0]), _ident(items[1]), pos=_pos(meta))

    def undo(self, meta, items):
        return t.Undo(pos=_pos(meta))

    def redo(self, meta, items):
        return t.Redo(pos=_pos(meta))

    def show(self, meta, items):
        return t.Show(items[0], pos=_pos(meta))

    def save(self, meta, items):
        return t.Save(None if items[0] is None else str(items[0])[1:-1], pos=_pos(meta))

    def help(self, meta, items):
        return t.Help(pos=_pos(meta))

    def leave(self, meta, items):
        return t.Leave(pos=_pos(meta))

    # --- exact rays and aberrations (grammar/rays.lark) -------------------------------------
    def sample_pupils(self, meta, items):
        return t.Sample("pupils", tuple(items), pos=_pos(meta))

    def sample_fields(self, meta, items):
        return t.Sample("fields", tuple(items), pos=_pos(meta))

    def sample_grid(self, meta, items):
        return t.Sample("grid", (items[0],), pos=_pos(meta))

    def focus_tolerance(self, meta, items):
        return t.FocusTolerance(items[0], pos=_pos(meta))

    def report_exact_rays(self, meta, items):
        return t.ReportRays("exact rays", pos=_pos(meta))

    def report_seidel_sums(self, meta, items):
        return t.ReportRays("seidel sums", pos=_pos(meta))

    def report_at_field(self, meta, items):
        quantity, field, wavelength = items
        return t.ReportAtField(quantity, field, wavelength, pos=_pos(meta))

    def ray_wavelength(self, meta, items):
        return items[-1]  # the WavelengthRef; the optional word 'wavelength' is noise

    def expect_at_field(self, meta, items):
        quantity, field, wavelength, op, value, tolerance = items
        return t.ExpectRays(quantity, op, value, tolerance, field, wavelength=wavelength,
                            pos=_pos(meta))

    def expect_in_depths(self, meta, items):
        quantity, op, value = items
        return t.ExpectRays(quantity, op, value, None, None, "depth of focus", pos=_pos(meta))

    # --- placement (grammar/placement.lark) ------------------------------------------------
    def place_through(self, meta, items):
        return _ident(items[0])

    def axis_word(self, meta, items):
        return str(items[0])

    def place_axis(self, meta, items):
        return str(items[0])

    def tilt(self, meta, items):
        name, last, amount, axis, mode = items
        return t.PlaceMove("tilt", _ident(name), last, amount, str(axis), mode, pos=_pos(meta))

    def decenter(self, meta, items):
        name, last, amount, axis, mode = items
        return t.PlaceMove("decenter", _ident(name), last, amount, str(axis), mode,
                           pos=_pos(meta))

    def fold(self, meta, items):
        name, angle, axis, *rest = items
        return t.Fold(_ident(name), angle, str(axis),
                      clear_diameter=_options(rest).get("clear diameter"), pos=_pos(meta))

    def prism_thickness(self, meta, items):
        return ("thickness", items[0])

    def prism_incidence(self, meta, items):
        return ("incidence", items[0])

    def prism_clear(self, meta, items):
        return ("clear diameter", items[0])

    def prism_wedge(self, meta, items):
        name, medium, apex, *rest = items
        options = _options(rest)
        return t.Prism("wedge", _ident(name), _ident(medium), apex=apex,
                       thickness=options.get("thickness"), incidence=options.get("incidence"),
                       clear_diameter=options.get("clear diameter"), pos=_pos(meta))

    def prism_right_angle(self, meta, items):
        name, medium, size = items
        return t.Prism("right angle", _ident(name), _ident(medium), size=size, pos=_pos(meta))

    def image_tilt(self, meta, items):
        angle, axis = items
        return t.ImageTilt(angle, str(axis), pos=_pos(meta))

    # --- image quality (grammar/quality.lark) -----------------------------------------------
    def sensor(self, meta, items):
        width, height, pitch = items
        return t.Sensor(width, height, pitch, pos=_pos(meta))

    def wavefront_grid(self, meta, items):
        return t.WavefrontGrid(items[-1], pos=_pos(meta))  # after the word 'wavefront'

    def wavelength_weights(self, meta, items):
        return t.WavelengthWeights(tuple(i for i in items if not isinstance(i, Token)),
                                   pos=_pos(meta))

    def expect_quality(self, meta, items):
        quality, op, value, waves, tolerance = items
        return t.QualityExpect(quality, op, value, tolerance, waves is not None, pos=_pos(meta))

    def expect_coverage(self, meta, items):
        return t.ExpectCoverage(pos=_pos(meta))

    def report_quality_all(self, meta, items):
        return t.QualityReport(None, pos=_pos(meta))

    def report_quality(self, meta, items):
        return t.QualityReport(items[0], pos=_pos(meta))

    @staticmethod
    def _places(items) -> tuple:
        return tuple(i for i in items if isinstance(i, t.QualityPlace))

    def quality_mtf(self, meta, items):
        frequency, *places = items
        kind, value, per = frequency
        return t.Quality("mtf", value=value, frequency=kind, per=per,
                         places=self._places(places), pos=_pos(meta))

    def quality_wavefront(self, meta, items):
        _, measure, *places = items  # the word 'wavefront', then rms | peak-to-valley
        return t.Quality("wavefront error", str(measure), places=self._places(places),
                         pos=_pos(meta))

    def quality_wavefront_focus(self, meta, items):
        return t.Quality("wavefront focus shift", places=self._places(items), pos=_pos(meta))

    def quality_strehl(self, meta, items):
        return t.Quality("strehl ratio", places=self._places(items), pos=_pos(meta))

    def quality_encircled(self, meta, items):
        value, *places = items
        return t.Quality("encircled energy", value=value, places=self._places(places),
                         pos=_pos(meta))

    def quality_encircled_radius(self, meta, items):
        value, *places = items
        return t.Quality("encircled energy radius", value=value, places=self._places(places),
                         pos=_pos(meta))

    def quality_ensquared(self, meta, items):
        value, *places = items
        return t.Quality("ensquared energy", value=value, places=self._places(places),
                         pos=_pos(meta))

    def quality_zernike(self, meta, items):
        (term, words), *places = items
        return t.Quality("zernike", term=term, words=words, places=self._places(places),
                         pos=_pos(meta))

    def quality_tangential_focus(self, meta, items):
        return t.Quality("focus", "tangential", places=self._places(items), pos=_pos(meta))

    def quality_sagittal_focus(self, meta, items):
        return t.Quality("focus", "sagittal", places=self._places(items), pos=_pos(meta))

    def quality_chief_ray_angle(self, meta, items):
        return t.Quality("chief-ray angle", places=self._places(items), pos=_pos(meta))

    def quality_illumination(self, meta, items):
        return t.Quality("illumination", places=self._places(items), pos=_pos(meta))

    def wavefront_measure(self, meta, items):
        return str(items[0])

    def orientation(self, meta, items):
        return str(items[0])

    def sensor_place(self, meta, items):
        return str(items[0])

    def frequency_value(self, meta, items):
        value, per = items
        return ("value", value, _ident(per))

    def frequency_nyquist(self, meta, items):
        return ("nyquist", None, None)

    def frequency_half_nyquist(self, meta, items):
        return ("half nyquist", None, None)

    def zernike_number(self, meta, items):
        token = items[0]
        return (t.Number(str(token), None, pos=_token_pos(token)), ())

    def zernike_named(self, meta, items):
        return (None, tuple(str(i) for i in items))

    def at_field(self, meta, items):
        return t.QualityPlace("field", items[0], pos=_pos(meta))

    def at_sensor(self, meta, items):
        return t.QualityPlace("sensor", word=str(items[0]), pos=_pos(meta))

    def at_wavelength(self, meta, items):
        ref = items[-1]
        return t.QualityPlace("wavelength", wavelength=ref, pos=_pos(meta))

    def at_orientation(self, meta, items):
        return t.QualityPlace("orientation", word=str(items[0]), pos=_pos(meta))

    # --- real materials and several wavelengths (grammar/materials.lark) -------------------
    def pair(self, meta, items):
        return (items[0], items[1])

    def sellmeier_constant(self, meta, items):
        return ("constant", items[0])

    def material_valid(self, meta, items):
        return ("valid", (items[0], items[1]))

    def material_relative(self, meta, items):
        return ("relative to", str(items[0]))

    def _medium_model(self, meta, name, kind, rest, **fields):
        options = _options(item for item in rest if isinstance(item, tuple)
                           and isinstance(item[0], str))
        return t.MediumModel(_ident(name), kind, valid=options.get("valid"),
                             relative_to=options.get("relative to"), pos=_pos(meta), **fields)

    def medium_model_glass(self, meta, items):
        name, index, abbe, *rest = items
        return self._medium_model(meta, name, "nd and abbe number", rest, values=(index, abbe))

    def medium_glass_code(self, meta, items):
        name, code, *rest = items
        return self._medium_model(meta, name, "glass code", rest, code=str(code))

    def medium_sellmeier(self, meta, items):
        name, constant, squared, *rest = items
        pairs = tuple(item for item in rest if isinstance(item, tuple)
                      and not isinstance(item[0], str))
        return self._medium_model(meta, name, "sellmeier", rest, pairs=pairs,
                                  squared=squared is not None,
                                  constant=None if constant is None else constant[1])

    def medium_cauchy(self, meta, items):
        name, *rest = items
        values = tuple(item for item in rest if not isinstance(item, tuple))
        return self._medium_model(meta, name, "cauchy", rest, values=values)

    def medium_table(self, meta, items):
        name, *rest = items
        pairs = tuple(item for item in rest if isinstance(item, tuple)
                      and not isinstance(item[0], str))
        return self._medium_model(meta, name, "table", rest, pairs=pairs)

    def surroundings_air(self, meta, items):
        return t.Surroundings("standard air", pos=_pos(meta))

    def surroundings_vacuum(self, meta, items):
        return t.Surroundings("vacuum", pos=_pos(meta))

    def achromat(self, meta, items):
        first, second, focal = items
        return t.Achromat(_ident(first), _ident(second), focal, pos=_pos(meta))

    def wavelength_primed(self, meta, items):
        name, prime, primary = items
        line = t.Name(str(name) + "'", pos=t.Pos(name.line, name.column, prime.end_line,
                                                 prime.end_column))
        return t.Wavelength(line, primary is not None, pos=_pos(meta))

    def wavelength_named(self, meta, items):
        name, prime = items
        return t.WavelengthRef(str(name) + ("'" if prime is not None else ""), pos=_pos(meta))

    def wavelength_number(self, meta, items):
        value, unit = items
        number = t.Number(str(value), str(unit), pos=_pos(meta))
        return t.WavelengthRef(None, number, pos=_pos(meta))

    def qualifier_of(self, meta, items):
        return t.Qualifier("of", medium=_ident(items[0]), pos=_pos(meta))

    def qualifier_at(self, meta, items):
        refs = tuple(item for item in items if isinstance(item, t.WavelengthRef))
        return t.Qualifier("at", wavelengths=refs, pos=_pos(meta))

    def qualifier_between(self, meta, items):
        return t.Qualifier("between", wavelengths=tuple(items), pos=_pos(meta))

    def qualifier_across(self, meta, items):
        return t.Qualifier("across", wavelengths=tuple(items), pos=_pos(meta))

    def expect_qualified(self, meta, items):
        quantity, *qualifiers = items[:-3]
        op, value, tolerance = items[-3:]
        return t.QualifiedExpect(quantity, op, value, tolerance, tuple(qualifiers),
                                 pos=_pos(meta))

    def report_qualified(self, meta, items):
        quantity, *qualifiers = items
        return t.QualifiedReport(quantity, tuple(qualifiers), pos=_pos(meta))


_BUILDER = _Builder()


def _option_twice(error: OptionTwice, file: str, text: str):
    from ..errors import LayoutSyntaxError, Span

    pos = error.value.pos if hasattr(error.value, "pos") else t.NO_POS
    line_text = text.split("\n")[pos.line - 1] if 0 < pos.line <= text.count("\n") + 1 else ""
    end = pos.end_column if pos.end_line == pos.line else len(line_text) + 1
    return LayoutSyntaxError(f"'{error.key}' is given twice in this statement",
                             Span(file, pos.line, pos.column, max(end, pos.column + 1), line_text),
                             hint="keep one of them")


def build_script(parse_tree, file: str, text: str) -> t.Script:
    """The syntax tree of one parsed file (statement by statement, so that a statement too
    deeply nested to build is reported at its own line)."""
    from lark.exceptions import VisitError

    from ..errors import LayoutSyntaxError, Span
    from ..nesting import TOO_DEEP, room_for_nesting

    statements = []
    with room_for_nesting():
        for child in parse_tree.children:
            try:
                statements.append(_BUILDER.transform(child))
            except (RecursionError, VisitError) as error:
                cause = getattr(error, "orig_exc", error)
                if isinstance(cause, OptionTwice):
                    raise _option_twice(cause, file, text) from None
                if not isinstance(cause, RecursionError):
                    raise
                line = child.meta.line
                line_text = text.split("\n")[line - 1] if line else ""
                raise LayoutSyntaxError(TOO_DEEP, Span(file, line, child.meta.column,
                                                       len(line_text) + 1, line_text)) from None
    return t.Script(file, tuple(statements), text=text, pos=t.Pos(1, 1, 1, 1))


def _symbolic_builders() -> None:
    """The builder methods of grammar/symbolic.lark (symbols, nominal, derive, solve,
    sensitivity), kept together so the feature reads in one place."""

    def split(items):
        quantities = tuple(i for i in items if isinstance(i, t.Quantity))
        names = tuple(_ident(i) for i in items if isinstance(i, Token))
        return quantities, names

    def symbols(self, meta, items):
        *names, assumption = items
        return t.Symbols(tuple(_ident(n) for n in names),
                         None if assumption is None else str(assumption.children[0]),
                         pos=_pos(meta))

    def nominal_value(self, meta, items):
        return t.NominalValue(_ident(items[0]), items[1], pos=_pos(meta))

    def nominal(self, meta, items):
        return t.Nominal(tuple(items), pos=_pos(meta))

    def derive(self, meta, items):
        return t.Derive(tuple(items), pos=_pos(meta))

    def condition(self, meta, items):
        return t.Condition(items[0], items[1], pos=_pos(meta))

    def solve(self, meta, items):
        unknowns = tuple(_ident(i) for i in items if isinstance(i, Token))
        conditions = tuple(i for i in items if isinstance(i, t.Condition))
        return t.Solve(unknowns, conditions, pos=_pos(meta))

    def sensitivity(self, meta, items):
        quantities, names = split(items)
        return t.Sensitivity(quantities, names, pos=_pos(meta))

    def expect_sensitivity(self, meta, items):
        quantity, name, op, value, tolerance = items
        return t.ExpectSensitivity(quantity, _ident(name), op, value, tolerance, pos=_pos(meta))

    for method in (symbols, nominal_value, nominal, derive, condition, solve, sensitivity,
                   expect_sensitivity):
        setattr(_Builder, method.__name__, v_args(meta=True)(method))


_symbolic_builders()


def _tolerance_builders() -> None:
    """The builder methods of grammar/tolerances.lark, kept together."""

    def tolerance_on(self, meta, items):
        (target, name, through), _, limit, axis, distribution = items
        return t.ToleranceOn(target, name, limit, distribution, through, axis, pos=_pos(meta))

    def tolerance_of(self, meta, items):
        return items[0], _ident(items[1]), items[2]

    def tolerance_gap(self, meta, items):
        return "gap", _ident(items[0]), None

    def tolerance_along(self, meta, items):
        return str(items[0])

    def tolerance_about(self, meta, items):
        return str(items[0])

    def toleranced(self, meta, items):
        return " ".join(str(token) for token in items)

    def distribution_uniform(self, meta, items):
        return t.Distribution("uniform", pos=_pos(meta))

    def distribution_normal(self, meta, items):
        return t.Distribution("normal", items[0] if items else None, pos=_pos(meta))

    def distribution_end_points(self, meta, items):
        return t.Distribution("end points", pos=_pos(meta))

    def compensate_focus(self, meta, items):
        return t.Compensate("focus", None, items[0], pos=_pos(meta))

    def compensate_gap(self, meta, items):
        return t.Compensate("gap", _ident(items[0]), items[1], pos=_pos(meta))

    def monte_carlo(self, meta, items):
        return t.MonteCarlo(items[0], items[1], pos=_pos(meta))

    def report_tolerances(self, meta, items):
        return t.ReportTolerances(pos=_pos(meta))

    def expect_yield(self, meta, items):
        quantity, op, value = items
        return t.ExpectYield(quantity, op, value, pos=_pos(meta))

    for method in (tolerance_on, tolerance_of, tolerance_gap, tolerance_along, tolerance_about,
                   toleranced, distribution_uniform,
                   distribution_normal, distribution_end_points, compensate_focus,
                   compensate_gap, monte_carlo, report_tolerances, expect_yield):
        setattr(_Builder, method.__name__, v_args(meta=True)(method))


_tolerance_builders()


def _beam_builders() -> None:
    """The builder methods of grammar/beams.lark (beam, fibre, limits, `at D after`)."""

    def option(kind, with_value=True):
        def build(self, meta, items):
            values = [i for i in items if not isinstance(i, Token)]
            value = values[0] if with_value and values else None
            at = values[1] if len(values) > 1 else None
            return t.BeamOption(kind, value, at, pos=_pos(meta))
        build.__name__ = "beam_" + kind.replace(" ", "_")
        return build

    table = {
        "beam_waist_radius": option("waist radius"),
        "beam_waist_before": option("waist before"),
        "beam_waist_after": option("waist after"),
        "beam_wavelength": option("wavelength"),
        "beam_propagation_ratio": option("propagation ratio"),
        "fibre_mode_field": option("mode field diameter"),
        "fibre_at_image": option("at image", with_value=False),
        "fibre_at_waist": option("at waist", with_value=False),
        "fibre_after": option("after"),
        "fibre_offset": option("offset"),
        "fibre_tilt": option("tilt"),
    }

    def beam(self, meta, items):
        return t.Beam(tuple(items), pos=_pos(meta))

    def fibre(self, meta, items):
        word, *options = items
        return t.Fibre(tuple(options), str(word), pos=_pos(meta))

    def clipping_limit(self, meta, items):
        return t.BeamLimit("clipping", items[0], pos=_pos(meta))

    def clearance_limit(self, meta, items):
        return t.BeamLimit("clearance", items[0], pos=_pos(meta))

    def beam_expect_after(self, meta, items):
        quantity, distance, op, value, tolerance = items
        return t.ExpectAfter(quantity, distance, op, value, tolerance, pos=_pos(meta))

    def beam_report_after(self, meta, items):
        return t.ReportAfter(items[0], items[1], pos=_pos(meta))

    for name, method in table.items():
        setattr(_Builder, name, v_args(meta=True)(method))
    for method in (beam, fibre, clipping_limit, clearance_limit, beam_expect_after,
                   beam_report_after):
        setattr(_Builder, method.__name__, v_args(meta=True)(method))


_beam_builders()
_BUILDER = _Builder()
