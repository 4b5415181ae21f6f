"""Write a syntax tree back as script text, so an edited session can be saved as a script.

The inverse of parsing: `parse(unparse(statements))` gives the same tree (positions aside).
One function per node class, found by name (`_<Class>`), with a clear error for a class that
has none; expressions get parentheses only where the grammar needs them.
"""

from __future__ import annotations

from typing import Callable, Iterable

from . import tree as t

__all__ = ["unparse", "unparse_statement", "expression_text", "binding_level", "UnparseError"]


class UnparseError(TypeError):
    """A node class the unparser has no rule for (a programming error, not a user error)."""


def unparse(statements: Iterable[t.Statement]) -> str:
    """The canonical script text of these statements, one per line, ending in a newline."""
    return "".join(unparse_statement(s) + "\n" for s in statements)


def unparse_statement(node: t.Statement) -> str:
    """One statement as one line of script text (no newline)."""
    rule: Callable | None = _RULES.get(type(node).__name__)
    if rule is None:
        raise UnparseError(f"no way to write a {type(node).__name__} back as text")
    return rule(node)


# --- expressions -----------------------------------------------------------------------------

# Binding strength of each operator; a child that binds more loosely than its place needs is
# put in parentheses.
_SUM, _PRODUCT, _SIGNED, _POWER, _ATOM = 1, 2, 3, 4, 5
_LEVEL = {"+": _SUM, "-": _SUM, "*": _PRODUCT, "/": _PRODUCT, "^": _POWER}


def _level(node: t.Expr) -> int:
    if isinstance(node, t.Binary):
        return _LEVEL[node.op]
    if isinstance(node, t.Negate):
        return _SIGNED
    return _ATOM


def binding_level(node: t.Expr) -> int:
    """How tightly an expression binds (higher binds tighter): text that replaces a
    sub-expression needs parentheses when it binds more loosely than what it replaces."""
    return _level(node)


def _wrap(node: t.Expr, needed: int) -> str:
    text = expression_text(node)
    return f"({text})" if _level(node) < needed else text


def expression_text(node: t.Expr) -> str:
    """An expression as text; `a - (b - c)` keeps its parentheses, `a - b - c` has none."""
    if isinstance(node, t.Number):
        if node.unit is None:
            return node.text
        return f"{node.text}%" if node.unit == "%" else f"{node.text} {node.unit}"
    if isinstance(node, t.Name):
        return node.id
    if isinstance(node, t.Call):
        return f"{node.func}(" + ", ".join(expression_text(a) for a in node.args) + ")"
    if isinstance(node, t.Negate):
        return "-" + _wrap(node.operand, _SIGNED)
    if isinstance(node, t.Binary):
        level = _LEVEL[node.op]
        if node.op == "^":
            # grammar: atom ^ signed
            return f"{_wrap(node.left, _ATOM)}^{_wrap(node.right, _SIGNED)}"
        # left-associative: the left side may be at the same level, the right must bind tighter
        right_needed = level + 1 if level == _SUM else _SIGNED
        left_needed = level if level == _SUM else _PRODUCT
        return f"{_wrap(node.left, left_needed)} {node.op} {_wrap(node.right, right_needed)}"
    raise UnparseError(f"no way to write a {type(node).__name__} back as text")


# --- statements (one rule per class) ---------------------------------------------------------


def _shape(shape: t.Shape) -> str:
    return "flat" if shape.kind == "flat" else f"{shape.kind} {expression_text(shape.value)}"


def _BoundaryStatement(node: t.BoundaryStatement) -> str:
    parts = [node.kind]
    if node.name is not None:
        parts.append(node.name.text)
    if node.kind == "lens":
        parts.append(f"{node.strength_kind} {expression_text(node.strength)}")
    else:
        parts.append(_shape(node.shape))
    if node.into is not None:
        parts.append(f"into {node.into.text}")
    text = " ".join(parts)
    if node.clear_diameter is not None:
        text += f", clear diameter {expression_text(node.clear_diameter)}"
    for key, value in node.surface_options:
        text += f", {key} {expression_text(value)}"
    return text


def _Stop(node: t.Stop) -> str:
    if node.relation == "at":
        place = f"stop at {node.anchor.text}"
    else:
        place = f"stop {expression_text(node.offset)} {node.relation} {node.anchor.text}"
    return f"{place}, {node.size_kind} {expression_text(node.size)}"


def _ObjectBefore(node: t.ObjectBefore) -> str:
    text = f"object {expression_text(node.distance)} before"
    return text + _object_options(node)


def _ObjectAtInfinity(node: t.ObjectAtInfinity) -> str:
    return "object at infinity" + _object_options(node)


def _object_options(node) -> str:
    text = ""
    if node.height is not None:
        text += f", height {expression_text(node.height)}"
    if node.field_angle is not None:
        text += f", field angle {expression_text(node.field_angle)}"
    return text


def _Wavelengths(node: t.Wavelengths) -> str:
    items = (expression_text(w.value) + (" primary" if w.primary else "") for w in node.items)
    return "wavelengths " + ", ".join(items)


def _Expect(node: t.Expect) -> str:
    return (f"expect {node.quantity.text} {node.op} {expression_text(node.value)}"
            + _tolerance(node.tolerance))


def _Report(node: t.Report) -> str:
    return " ".join(["report", ", ".join(q.text for q in node.quantities)]).rstrip()


def _Change(node: t.Change) -> str:
    value = "" if node.value is None else expression_text(node.value)
    if node.target == "gap":
        return f"change gap {node.prop} {node.name.text} to {value}"
    if node.target in ("object", "stop"):
        return f"change {node.target} {node.prop} to {value}"
    if node.target == "medium":
        return f"change medium {node.name.text} index to {value}"
    if node.prop == "flat":
        return f"change {node.name.text} to flat"
    if node.prop == "value":
        return f"change {node.name.text} to {value}"
    return f"change {node.name.text} {node.prop} to {value}"


def _Remove(node: t.Remove) -> str:
    if node.gap is None:
        return f"remove {node.anchor.text}"
    return f"remove gap {node.gap} {node.anchor.text}"


def _tolerance(node: t.Tolerance | None) -> str:
    if node is None:
        return ""
    word = "±" if node.kind == "±" else "within"
    return f" {word} {expression_text(node.value)}"


def _exprs(values) -> str:
    return ", ".join(expression_text(v) for v in values)


# exact rays (grammar/rays.lark)
def _ExpectRays(node: t.ExpectRays) -> str:
    at = "" if node.field is None else f" at field {expression_text(node.field)}"
    if node.wavelength is not None:
        at += f" at wavelength {_wavelength_ref(node.wavelength)}"
    text = f"expect {node.quantity.text}{at} {node.op} {expression_text(node.value)}"
    if node.scale:
        return f"{text} {node.scale}"
    return text + _tolerance(node.tolerance)


# image quality (grammar/quality.lark)
def _quality_place(place: t.QualityPlace) -> str:
    if place.kind == "field":
        return f"at field {expression_text(place.value)}"
    if place.kind == "sensor":
        return f"at sensor {place.word}"
    if place.kind == "wavelength":
        return f"at wavelength {_wavelength_ref(place.wavelength)}"
    return place.word


def _quality(q: t.Quality) -> str:
    if q.kind == "mtf":
        if q.frequency == "value":
            head = f"mtf at {expression_text(q.value)} cycles per {q.per.text}"
        else:
            head = f"mtf at {q.frequency}"
    elif q.kind == "wavefront error":
        head = f"wavefront error {q.measure}"
    elif q.kind in ("encircled energy", "ensquared energy"):
        head = f"{q.kind} within {expression_text(q.value)}"
    elif q.kind == "encircled energy radius":
        head = f"encircled energy radius for {expression_text(q.value)}"
    elif q.kind == "zernike":
        head = "zernike " + (expression_text(q.term) if q.term is not None else " ".join(q.words))
    elif q.kind == "focus":
        head = f"{q.measure} focus"
    else:
        head = q.kind
    return " ".join([head] + [_quality_place(p) for p in q.places])


def _QualityExpect(node: t.QualityExpect) -> str:
    text = f"expect {_quality(node.quality)} {node.op} {expression_text(node.value)}"
    if node.waves:
        text += " waves"
    return text + _tolerance(node.tolerance)


# materials (grammar/materials.lark)
def _pairs(pairs) -> str:
    return ", ".join(f"({expression_text(a)}, {expression_text(b)})" for a, b in pairs)


def _MediumModel(node: t.MediumModel) -> str:
    head = f"medium {node.name.text}"
    if node.kind == "nd and abbe number":
        index, abbe = node.values
        text = f"{head} index {expression_text(index)}, abbe number {expression_text(abbe)}"
    elif node.kind == "glass code":
        text = f"{head} glass code {node.code}"
    elif node.kind == "sellmeier":
        text = f"{head} sellmeier"
        if node.constant is not None:
            text += f" constant {expression_text(node.constant)}"
        if node.squared:
            text += " squared"
        text += f" wavelengths {_pairs(node.pairs)}"
    elif node.kind == "cauchy":
        text = f"{head} cauchy {_exprs(node.values)}"
    else:  # table
        text = f"{head} table {_pairs(node.pairs)}"
    if node.valid is not None:
        low, high = node.valid
        text += f", valid from {expression_text(low)} to {expression_text(high)}"
    if node.relative_to is not None:
        text += f", relative to {node.relative_to}"
    return text


def _wavelength_ref(ref: t.WavelengthRef) -> str:
    return ref.name if ref.name is not None else expression_text(ref.number)


def _qualifier(q: t.Qualifier) -> str:
    refs = [_wavelength_ref(r) for r in q.wavelengths]
    if q.kind == "of":
        return f"of {q.medium.text}"
    if q.kind == "at":  # 'wavelength' is optional: written where the place is a wavelength
        ref = q.wavelengths[0]
        if ref.number is not None and ref.number.unit in ("nm", "um", "µm") or _is_line(ref):
            return f"at wavelength {refs[0]}"
        return f"at {refs[0]}"
    if q.kind == "between":
        return f"between {refs[0]} and {refs[1]}"
    return f"across {refs[0]}, {refs[1]} and {refs[2]}"


def _is_line(ref: t.WavelengthRef) -> bool:
    from ..materials.lines import SPECTRAL_LINES

    return ref.name is not None and ref.name in SPECTRAL_LINES


def _QualifiedExpect(node: t.QualifiedExpect) -> str:
    qualifiers = " ".join(_qualifier(q) for q in node.qualifiers)
    return (f"expect {node.quantity.text} {qualifiers} {node.op} {expression_text(node.value)}"
            + _tolerance(node.tolerance))


def _Achromat(node: t.Achromat) -> str:
    text = f"achromat from {node.first.text} and {node.second.text}"
    if node.focal_length is not None:
        text += f", focal length {expression_text(node.focal_length)}"
    return text


# symbolic work (grammar/symbolic.lark)
def _names(idents) -> str:
    return ", ".join(i.text for i in idents)


def _Symbols(node: t.Symbols) -> str:
    text = "symbols " + " ".join(i.text for i in node.names)
    return text if node.assumption is None else f"{text} {node.assumption}"


def _Solve(node: t.Solve) -> str:
    conditions = " and ".join(f"{c.quantity.text} = {expression_text(c.value)}"
                              for c in node.conditions)
    return f"solve {_names(node.unknowns)} so that {conditions}"


def _ToleranceOn(node: t.ToleranceOn) -> str:
    target = f"gap after {node.name.text}" if node.target == "gap" \
        else f"{node.target} of {node.name.text}"
    if node.through is not None:
        target += f" through {node.through.text}"
    text = f"tolerance {target} ± {expression_text(node.limit)}"
    if node.axis is not None:
        text += (" along " if node.target == "decenter" else " about ") + node.axis
    d = node.distribution
    if d is not None:
        text += ", " + d.kind + ("" if d.sigmas is None else f" {expression_text(d.sigmas)} sigma")
    return text


def _Compensate(node: t.Compensate) -> str:
    text = "compensate focus" if node.what == "focus" else f"compensate gap after {node.name.text}"
    return text + ("" if node.limit is None else f" within {expression_text(node.limit)}")


# placement (grammar/placement.lark)
def _PlaceMove(node: t.PlaceMove) -> str:
    through = "" if node.last is None else f" through {node.last.text}"
    word = "about" if node.kind == "tilt" else "along"
    text = (f"{node.kind} {node.first.text}{through} by {expression_text(node.amount)} "
            f"{word} {node.axis}")
    return text if node.mode is None else f"{text}, axis {node.mode}"


def _Fold(node: t.Fold) -> str:
    name = "" if node.name is None else f" {node.name.text}"
    text = f"fold{name} at {expression_text(node.angle)} about {node.axis}"
    if node.clear_diameter is not None:
        text += f", clear diameter {expression_text(node.clear_diameter)}"
    return text


def _Prism(node: t.Prism) -> str:
    head = f"prism {node.name.text} in {node.medium.text}"
    if node.kind == "right angle":
        return f"{head}, right angle, size {expression_text(node.size)}"
    text = f"{head}, apex {expression_text(node.apex)}"
    for word, value in (("thickness", node.thickness), ("incidence", node.incidence),
                        ("clear diameter", node.clear_diameter)):
        if value is not None:
            text += f", {word} {expression_text(value)}"
    return text


# laser beams and fibres (grammar/beams.lark)
def _beam_option(option: t.BeamOption) -> str:
    kind = option.kind
    if kind in ("at image", "at waist"):
        return kind
    if kind in ("waist before", "waist after"):
        return f"waist {expression_text(option.value)} {kind.split()[1]}"
    if kind == "after":
        return f"{expression_text(option.value)} after"
    text = f"{kind} {expression_text(option.value)}"
    return text if option.at is None else f"{text} at {expression_text(option.at)}"


def _BeamLimit(node: t.BeamLimit) -> str:
    if node.kind == "clipping":
        return f"clipping limit {expression_text(node.value)}"
    return f"clearance limit {expression_text(node.value)} beam diameters"


_RULES: dict[str, Callable] = {
    "Title": lambda n: f'layout "{n.text}"',
    "Units": lambda n: f"units {n.unit.text}",
    "Let": lambda n: f"let {n.name.text} = {expression_text(n.value)}",
    "MediumIndex": lambda n: f"medium {n.name.text} index {expression_text(n.index)}",
    "StartMedium": lambda n: f"start in {n.medium.text}",
    "ObjectAtInfinity": _ObjectAtInfinity,
    "ObjectBefore": _ObjectBefore,
    "BoundaryStatement": _BoundaryStatement,
    "Gap": lambda n: f"gap {expression_text(n.length)}",
    "Stop": _Stop,
    "Image": lambda n: "image at infinity" if n.at_infinity else "image at focus"
    if n.distance is None else f"image {expression_text(n.distance)} after",
    "ExpectAtInfinity": lambda n: f"expect {n.quantity.text} at infinity",
    "Wavelengths": _Wavelengths,
    "Expect": _Expect,
    "Report": _Report,
    "Use": lambda n: f'use "{n.target}"' if n.is_file else f"use {n.target}",
    "Hazard": lambda n: f"hazard {n.kind.text}",
    # exact rays
    "Sample": lambda n: f"sample {n.what} {_exprs(n.values)}",
    "FocusTolerance": lambda n: f"focus tolerance {expression_text(n.value)}",
    "ReportRays": lambda n: f"report {n.what}",
    "ExpectRays": _ExpectRays,
    # placement
    "PlaceMove": _PlaceMove,
    "Fold": _Fold,
    "Prism": _Prism,
    "ImageTilt": lambda n: f"tilt image plane by {expression_text(n.angle)} about {n.axis}",
    "ReportAtField": lambda n: f"report {n.quantity.text} at field {expression_text(n.field)}"
    + ("" if n.wavelength is None else f" at wavelength {_wavelength_ref(n.wavelength)}"),
    # image quality
    "Sensor": lambda n: f"sensor {expression_text(n.width)} by {expression_text(n.height)}, "
    f"pixel pitch {expression_text(n.pitch)}",
    "WavefrontGrid": lambda n: f"wavefront grid {expression_text(n.value)}",
    "WavelengthWeights": lambda n: f"wavelength weights {_exprs(n.values)}",
    "QualityExpect": _QualityExpect,
    "ExpectCoverage": lambda n: "expect sensor covered by image circle",
    "QualityReport": lambda n: "report quality" if n.quality is None
    else f"report {_quality(n.quality)}",
    # materials and wavelengths
    "MediumModel": _MediumModel,
    "Surroundings": lambda n: f"layout in {n.environment}",
    "Achromat": _Achromat,
    "QualifiedExpect": _QualifiedExpect,
    "QualifiedReport": lambda n: f"report {n.quantity.text} "
    + " ".join(_qualifier(q) for q in n.qualifiers),
    # symbolic work
    "Symbols": _Symbols,
    "Nominal": lambda n: "nominal " + ", ".join(f"{v.name.text} = {expression_text(v.value)}"
                                                for v in n.values),
    "Derive": lambda n: "derive " + ", ".join(q.text for q in n.quantities),
    "Solve": _Solve,
    "Sensitivity": lambda n: "sensitivity of " + ", ".join(q.text for q in n.quantities)
    + f" to {_names(n.symbols)}",
    "ExpectSensitivity": lambda n: f"expect sensitivity of {n.quantity.text} to "
    f"{n.symbol.text} {n.op} {expression_text(n.value)}" + _tolerance(n.tolerance),
    # tolerances
    "ToleranceOn": _ToleranceOn,
    "Compensate": _Compensate,
    "MonteCarlo": lambda n: f"monte carlo {expression_text(n.samples)} samples"
    + ("" if n.seed is None else f", seed {expression_text(n.seed)}"),
    "ReportTolerances": lambda n: "report tolerances",
    "ExpectYield": lambda n: "expect yield"
    + ("" if n.quantity is None else f" of {n.quantity.text}")
    + f" {n.op} {expression_text(n.value)}",
    # laser beams and fibres
    "Beam": lambda n: "beam " + ", ".join(_beam_option(o) for o in n.options),
    "Fibre": lambda n: f"{n.word} " + ", ".join(_beam_option(o) for o in n.options),
    "BeamLimit": _BeamLimit,
    "ExpectAfter": lambda n: f"expect {n.quantity.text} at {expression_text(n.distance)} after "
    f"{n.op} {expression_text(n.value)}" + _tolerance(n.tolerance),
    "ReportAfter": lambda n: f"report {n.quantity.text} at {expression_text(n.distance)} after",
    # commands of the interactive session
    "Change": _Change,
    "Insert": lambda n: f"insert {unparse_statement(n.item)} {n.place} {n.anchor.text}",
    "Remove": _Remove,
    "Rename": lambda n: f"rename {n.old.text} to {n.new.text}",
    "Undo": lambda n: "undo",
    "Redo": lambda n: "redo",
    "Show": lambda n: f"show {n.what}",
    "Save": lambda n: "save" if n.path is None else f'save "{n.path}"',
    "Help": lambda n: "help",
    "Leave": lambda n: "leave",
}

