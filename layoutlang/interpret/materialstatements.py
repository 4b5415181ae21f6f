"""Interpreter part for real materials and several wavelengths (grammar/materials.lark).

A mixin of the interpreter: dispersion models for `medium`, the surroundings (standard air or
vacuum), spectral lines by letter, the thin-lens achromat and the wavelength/medium qualifiers
of `expect` and `report`. numpy and the models are imported only when a script uses them, so a
layout with constant indices starts as fast as before.
"""

from __future__ import annotations

from dataclasses import dataclass, replace
from typing import Any

from ..errors import LayoutNameError, LayoutUnitError, LayoutValueError
from ..measure import Measure, from_nanometres, to_nanometres
from ..materials.lines import SPECTRAL_LINES, line_letter
from ..quantities import RAY_QUANTITIES, REPORT_ORDER, lookup
from ..syntax import tree as t
from ..system import System, Wavelength

__all__ = ["MaterialStatements", "ColourRequests", "AchromatRequest", "is_chromatic",
           "CHROMATIC_QUANTITIES"]

#: Quantities that only exist with wavelengths or a medium (engines/chromatic.py).
CHROMATIC_QUANTITIES = frozenset({"abbe number", "refractive index", "relative partial dispersion",
                                  "axial colour", "lateral colour", "secondary spectrum"})
_MEDIUM_QUANTITIES = frozenset({"abbe number", "refractive index", "relative partial dispersion"})


def is_chromatic(words: str) -> bool:
    info = lookup(words)
    return info is not None and info.name in CHROMATIC_QUANTITIES


@dataclass(frozen=True)
class AchromatRequest:
    """`achromat from A and B[, focal length F]`, resolved: the three wavelengths the Abbe
    numbers are taken across, and both media's indices there."""

    first: str
    second: str
    labels: tuple[str, str, str]
    first_indices: tuple[float, float, float]
    second_indices: tuple[float, float, float]
    focal_length: float | None  # None: the layout's own focal length


@dataclass(frozen=True)
class ColourRequests:
    """What a script asked for about colour, for the reports."""

    reports: tuple[Any, ...] = ()  # engines.chromatic.Request, from `report ... at/between`
    achromats: tuple[AchromatRequest, ...] = ()
    uses_dispersion: bool = False


class MaterialStatements:
    """Statement handlers and helpers mixed into the interpreter (`statement_<Class>`)."""

    # state (created lazily so the interpreter's __init__ stays untouched)
    def _materials(self) -> dict:
        state = self.__dict__.get("_material_state")
        if state is None:
            state = self.__dict__["_material_state"] = {
                "models": {}, "surroundings": None, "achromats": [], "reports": [],
                "warnings": [], "default_wavelength": False,
            }
        return state

    # --- statements ---------------------------------------------------------------------------
    def statement_MediumModel(self, node: t.MediumModel) -> None:
        """medium NAME index N, abbe number V | glass code 517642 | sellmeier [squared]
        wavelengths (B, λ), ... | cauchy A, B, ... | table (λ, n), ... [, valid from A to B]
        [, relative to vacuum|air]"""
        from ..materials.dispersion import DispersionError

        from .interpreter import PREDEFINED_MEDIA

        name = node.name.text
        if name in self.media_defined or name in PREDEFINED_MEDIA:
            raise LayoutNameError(f"medium {name!r} is already defined", self.span(node.name))
        try:
            model = self._build_model(node)
        except DispersionError as error:
            raise LayoutValueError(str(error), self.span(node)) from None
        # a first index (the primary one is taken when the layout is finished): at the d line,
        # else inside the valid range (an infrared material may have a resonance near d)
        valid = getattr(model, "valid_um", None)
        provisional = None
        for where in (0.5875618, sum(valid) / 2 if valid else None):
            try:
                provisional = None if where is None else model.index(where)
            except DispersionError as error:
                failure = error
            if provisional is not None:
                break
        if provisional is None:
            raise LayoutValueError(str(failure), self.span(node))
        from ..system import Medium

        self.media[name] = Medium(name, provisional, model)
        self.media_defined[name] = node
        self._materials()["models"][name] = (model, node)

    def statement_Surroundings(self, node: t.Surroundings) -> None:
        """layout in standard air | layout in vacuum"""
        state = self._materials()
        if state["surroundings"] is not None:
            raise LayoutValueError(
                f"the surroundings are given twice (first on line {state['surroundings'].pos.line})",
                self.span(node))
        state["surroundings"] = node

    def statement_Achromat(self, node: t.Achromat) -> None:
        """achromat from FIRST and SECOND[, focal length F]"""
        self._materials()["achromats"].append((node, (self.file, self.lines)))

    def statement_QualifiedExpect(self, node: t.QualifiedExpect) -> None:
        """expect QUANTITY of MEDIUM | at wavelength W | between W and W | across W, W and W ..."""
        self.expect_nodes.append((node, (self.file, self.lines)))

    def statement_QualifiedReport(self, node: t.QualifiedReport) -> None:
        """report QUANTITY of MEDIUM | at wavelength W | between W and W | across W, W and W"""
        self.quantity(node.quantity)  # unknown names fail here, where they are written
        if self.report_ray_qualified(node):  # a spot radius at a wavelength (raystatements.py)
            return
        if self.report_surface(node):  # edge thickness of NAME (buildstatements.py)
            return
        if self.report_beam(node):  # `report beam radius at front` (beamstatements.py)
            return
        self._materials()["reports"].append((node, (self.file, self.lines)))

    def report_chromatic(self, node: t.Report) -> bool:
        """A plain `report` naming chromatic quantities: each becomes a request with its
        default wavelengths. Returns False when the statement names none."""
        names = [self.quantity(q).name for q in node.quantities]
        if not any(n in CHROMATIC_QUANTITIES for n in names):
            return False
        if not all(n in CHROMATIC_QUANTITIES for n in names):
            raise LayoutValueError(
                "a report of colour quantities cannot be mixed with first-order ones",
                self.span(node), hint="write them on two report lines")
        for quantity in node.quantities:
            plain = t.QualifiedReport(quantity, (), pos=quantity.pos)
            self._materials()["reports"].append((plain, (self.file, self.lines)))
        return True

    # --- wavelengths --------------------------------------------------------------------------
    def wavelength_measure(self, node: t.Expr) -> Measure:
        """The value of one item of `wavelengths`: a line letter, a `let` name or a length."""
        if isinstance(node, t.Name):
            value = self._named_wavelength(node.id, node)
            if value is not None:
                return Measure(value, 1, 0, bare=False)
        return self.value(node)

    def _named_wavelength(self, name: str, node: t.Node) -> float | None:
        """A spectral line letter in layout units; None when `name` is not a line letter."""
        if name not in SPECTRAL_LINES:
            if name.endswith("'"):
                raise LayoutNameError(
                    f"there is no spectral line {name}", self.span(node),
                    expected="F' or C' (the cadmium lines)")
            return None
        if name in self.names:
            raise LayoutNameError(
                f"{name!r} is both a spectral line and a name defined with 'let'",
                self.span(node), hint="rename the constant, or write the wavelength in nm")
        return self._line(name)

    def _environment(self) -> str:
        """The surroundings the script states (standard air unless it says vacuum)."""
        node = self._materials()["surroundings"]
        if node is None:  # a line letter may come before the `layout in ...` line
            node = next((s for s in self.script.statements if isinstance(s, t.Surroundings)),
                        None)
        return node.environment if node is not None else "standard air"

    def _line(self, letter: str) -> float:
        """A spectral line's wavelength in layout units, as measured in the surroundings."""
        from ..materials.lines import line_nm

        return from_nanometres(line_nm(letter, self._environment()), self.units)

    def _resolve_ref(self, ref: t.WavelengthRef) -> tuple[float, str]:
        """(value in layout units, label) of a wavelength named in a qualifier."""
        if ref.number is not None:
            measure = self.value(ref.number)
            label = f"{ref.number.text} {ref.number.unit}"
        elif ref.name is not None:
            line = self._named_wavelength(ref.name, ref)
            if line is not None:
                return line, ref.name
            if ref.name not in self.names:
                raise LayoutNameError(
                    f"unknown wavelength {ref.name!r}", self.span(ref),
                    expected="a spectral line letter (i h g F' F e d D C' C r s t), a name "
                             "defined with 'let', or a number with a unit such as 532 nm")
            measure, label = self.names[ref.name], ref.name
        if measure.bare or measure.dimension != (1, 0):
            raise LayoutUnitError("a wavelength needs a length unit", self.span(ref),
                                  expected="a wavelength such as 587.6 nm or 0.5876 um")
        if not measure.value > 0:
            raise LayoutValueError("a wavelength must be more than zero", self.span(ref))
        return measure.value, label

    # --- models -------------------------------------------------------------------------------
    def _to_um(self, value: float) -> float:
        return to_nanometres(value, self.units) / 1000.0

    def _wavelength_um(self, node: t.Expr, what: str) -> float:
        measure = self.value(node)
        if measure.bare or measure.dimension != (1, 0):
            raise LayoutUnitError(f"{what} needs a length unit", self.span(node),
                                  expected="a wavelength such as 0.0684 um or 486.1 nm")
        self.positive(measure.value, node, what)
        return self._to_um(measure.value)

    def _plain(self, node: t.Expr, what: str) -> float:
        measure = self.value(node)
        if not measure.bare or measure.relative:
            raise LayoutUnitError(f"{what} is a plain number, not {measure.describe()}",
                                  self.span(node), expected="a number without a unit")
        return float(measure.value)

    def _build_model(self, node: t.MediumModel):
        from ..materials import dispersion as d

        options: dict[str, Any] = {}
        if node.valid is not None:
            low = self._wavelength_um(node.valid[0], "the shortest valid wavelength")
            high = self._wavelength_um(node.valid[1], "the longest valid wavelength")
            if high <= low:
                raise LayoutValueError("the valid range must go from short to long",
                                       self.span(node.valid[1]))
            options["valid_um"] = (low, high)
        if node.relative_to is not None:
            options["reference"] = node.relative_to
        name = node.name.text
        options["source"] = name
        if node.kind == "nd and abbe number":
            index = self._plain(node.values[0], "a refractive index")
            abbe = self._plain(node.values[1], "an Abbe number")
            return d.GlassFromNdVd(index, abbe, **options)
        if node.kind == "glass code":
            return d.GlassFromNdVd.from_code(node.code, **options)
        if node.kind == "sellmeier":
            strengths = [self._plain(b, "a Sellmeier B") for b, _ in node.pairs]
            constant = 1.0 if node.constant is None else self._plain(node.constant,
                                                                      "the Sellmeier constant")
            if node.squared:
                squares = []
                for _, c in node.pairs:
                    measure = self.value(c)
                    if not measure.bare:
                        raise LayoutUnitError(
                            "a Sellmeier C is a squared wavelength in µm², written without a "
                            "unit", self.span(c),
                            hint="or drop 'squared' and give the resonance wavelengths with "
                                 "a unit, e.g. (0.6961663, 0.0684043 um)")
                    squares.append(float(measure.value))
                return d.Sellmeier(tuple(strengths), tuple(squares), constant, **options)
            resonances = []
            for _, c in node.pairs:
                measure = self.value(c)
                if measure.bare:
                    raise LayoutUnitError(
                        "a resonance wavelength needs a length unit", self.span(c),
                        expected="e.g. 0.0684043 um",
                        hint="for C values in µm² write 'sellmeier squared wavelengths'")
                resonances.append(self._wavelength_um(c, "a resonance wavelength"))
            return d.Sellmeier.from_resonances(strengths, resonances, constant=constant,
                                               **options)
        if node.kind == "cauchy":
            return d.Cauchy(tuple(self._plain(v, "a Cauchy coefficient") for v in node.values),
                            **options)
        rows = [(self._wavelength_um(w, "a table wavelength"), self._plain(n, "an index"))
                for w, n in node.pairs]
        return d.Table(tuple(w for w, _ in rows), tuple(n for _, n in rows), **options)

    # --- finishing ----------------------------------------------------------------------------
    def materials_system(self, system: System) -> System:
        """Attach dispersion models, the surroundings and the wavelengths to the System, take
        every dispersive index at the primary wavelength, and collect range warnings."""
        state = self._materials()
        state["system"] = system
        node = state["surroundings"]
        used = {m.name for m in system.media}
        dispersive = [name for name in state["models"] if name in used]
        if node is None and not dispersive:
            return system  # indices as written: air and vacuum are 1, nothing to convert
        import numpy as np

        from ..materials.dispersion import DispersionError, range_warning
        from ..materials.environment import STANDARD_AIR, predefined_models, relative_index

        environment = node.environment if node is not None else STANDARD_AIR
        wavelengths = system.wavelengths
        if not wavelengths:
            d_line = self._line("d")
            wavelengths = (Wavelength(d_line, True),)
            state["default_wavelength"] = True
        system = replace(system, wavelengths=wavelengths, environment=environment)
        primary = system.primary_wavelength.value
        waves_um = np.array([system.to_micrometres(w.value) for w in wavelengths])
        predefined = predefined_models()
        media = []
        for medium in system.media:
            model, where = state["models"].get(medium.name, (predefined.get(medium.name), None))
            if model is None:
                media.append(medium)
                continue
            span = self.span(where) if where is not None else None
            try:
                relative_index(model, waves_um, environment)
                index = float(relative_index(model, system.to_micrometres(primary), environment))
            except DispersionError as error:
                raise LayoutValueError(f"medium {medium.name!r}: {error}", span) from None
            # air in a layout in standard air is exactly 1: its own range does not matter
            in_air = where is None and environment == STANDARD_AIR
            warning = None if in_air else range_warning(medium.name, model, waves_um)
            if warning:
                state["warnings"].append(_located(span, warning))
            media.append(replace(medium, index=index, model=model))
        system = state["system"] = replace(system, media=tuple(media))
        return system

    def expect_request(self, node: t.Expect):
        """The colour request of an `expect` with qualifiers or on a colour quantity, or None
        for a plain first-order expectation (then the interpreter's own path applies)."""
        qualifiers = getattr(node, "qualifiers", ())
        info = lookup(node.quantity.text)
        if info is None or not qualifiers and info.name not in CHROMATIC_QUANTITIES:
            return None
        if info.name in RAY_QUANTITIES:  # `at wavelength W` of a spot: the ray path takes it
            return None
        return self.colour_request(info.name, qualifiers, node, self._materials()["system"])

    def colour_request(self, name: str, qualifiers, node: t.Node, system: System):
        """Resolve qualifiers and defaults into an `engines.chromatic.Request`."""
        from ..engines.chromatic import Request

        found: dict[str, t.Qualifier] = {}
        for qualifier in qualifiers:
            if qualifier.kind in found:
                raise LayoutValueError(f"'{qualifier.kind}' is given twice", self.span(qualifier))
            found[qualifier.kind] = qualifier
        if "of" in found and name not in _MEDIUM_QUANTITIES:
            raise LayoutValueError(f"{name} belongs to the layout, not to one medium",
                                   self.span(found["of"]))
        medium_args: dict[str, Any] = {}
        if name in _MEDIUM_QUANTITIES:
            if "of" not in found:
                raise LayoutValueError(f"say which medium: '{name} of crown'", self.span(node))
            medium = self.medium_named(found["of"].medium)
            model, _ = self._materials()["models"].get(medium, (None, None))
            if model is None and medium in ("air", "vacuum") and system.environment:
                from ..materials.environment import predefined_models

                if self._materials()["surroundings"] is not None or any(
                        m.model is not None for m in system.media):
                    model = predefined_models()[medium]
            medium_args = {"medium": medium, "model": model, "index": self.media[medium].index}

        def refs(kind: str, count: int) -> tuple[tuple[float, ...], tuple[str, ...]] | None:
            if kind not in found:
                return None
            resolved = [self._resolve_ref(r) for r in found[kind].wavelengths]
            return tuple(v for v, _ in resolved), tuple(label for _, label in resolved)

        def lines(*letters: str) -> tuple[tuple[float, ...], tuple[str, ...]]:
            return tuple(self._line(k) for k in letters), letters

        def allow(*kinds: str) -> None:
            for kind, qualifier in found.items():
                if kind != "of" and kind not in kinds:
                    words = {"at": "at wavelength W", "between": "between W and W",
                             "across": "across W, W and W"}
                    raise LayoutValueError(
                        f"{name} is not taken '{kind} ...'", self.span(qualifier),
                        expected=" or ".join(f"'{words[k]}'" for k in kinds) or "no wavelengths")

        primary = system.primary_wavelength
        primary_ref = ((primary.value,), (self._label(primary.value),)) if primary else None
        if name == "refractive index":
            allow("at")
            waves = refs("at", 1) or primary_ref or lines("d")
        elif name == "abbe number":
            allow("at", "across")
            waves = refs("across", 3)
            if waves is None:
                at = refs("at", 1)
                if at is None or at[1] == ("d",):
                    waves = lines("F", "d", "C")
                elif at[1] == ("e",):
                    waves = lines("F'", "e", "C'")
                else:
                    raise LayoutValueError(
                        "an Abbe number is taken at d or e; for other lines give all three",
                        self.span(found["at"]), expected="'across F, d and C'")
        elif name == "relative partial dispersion":
            allow("between")
            pair = refs("between", 2) or lines("g", "F")
            ends = lines("F", "C")
            waves = (pair[0] + ends[0], pair[1] + ends[1])
        elif name in ("axial colour", "lateral colour"):
            allow("between")
            waves = refs("between", 2) or self._extremes(system, node, name)
        elif name == "secondary spectrum":
            allow("across")
            waves = refs("across", 3) or self._three(system, node)
        else:
            allow("at")
            if name not in REPORT_ORDER:
                raise LayoutValueError(
                    f"{name} cannot be taken at another wavelength (first-order quantities "
                    "only)", self.span(found["at"]))
            waves = refs("at", 1)
        self._check_wavelength_range(medium_args, waves[0], node)
        return Request(name, waves[0], waves[1], **medium_args)

    def _label(self, value: float) -> str:
        nm = to_nanometres(value, self.units)
        return line_letter(nm, self._environment()) or f"{nm:g} nm"

    def _extremes(self, system: System, node: t.Node, name: str):
        waves = sorted(w.value for w in system.wavelengths)
        if len(waves) < 2:
            raise LayoutValueError(
                f"{name} needs two wavelengths", self.span(node),
                expected="'between F and C', or a 'wavelengths' statement with two or more")
        return (waves[0], waves[-1]), (self._label(waves[0]), self._label(waves[-1]))

    def _three(self, system: System, node: t.Node):
        waves = sorted(w.value for w in system.wavelengths)
        primary = system.primary_wavelength
        if len(waves) < 3 or primary is None or not waves[0] < primary.value < waves[-1]:
            raise LayoutValueError(
                "the secondary spectrum needs three wavelengths with the primary between "
                "the others", self.span(node), expected="'across F, d and C'")
        chosen = (waves[0], primary.value, waves[-1])
        return chosen, tuple(self._label(w) for w in chosen)

    def _check_wavelength_range(self, medium_args: dict, waves: tuple[float, ...],
                                node: t.Node) -> None:
        model = medium_args.get("model")
        if model is None:
            return
        from ..materials.dispersion import range_warning

        warning = range_warning(medium_args["medium"], model, [self._to_um(w) for w in waves])
        if warning:
            self._materials()["warnings"].append(_located(self.span(node), warning))

    def colour_requests(self, system: System) -> ColourRequests:
        """Resolve `report ... at/between` and `achromat` statements after the layout is known."""
        state = self._materials()
        reports = []
        for node, (self.file, self.lines) in state["reports"]:
            info = self.quantity(node.quantity)
            request = self.colour_request(info.name, node.qualifiers, node, system)
            if request is None:
                raise LayoutValueError(f"nothing to report for {info.name}", self.span(node))
            reports.append(request)
        achromats = []
        for node, (self.file, self.lines) in state["achromats"]:
            achromats.append(self._achromat(node, system))
        uses = any(m.model is not None for m in system.media)
        return ColourRequests(tuple(reports), tuple(achromats), uses)

    def _achromat(self, node: t.Achromat, system: System) -> AchromatRequest:
        from ..materials.environment import relative_index

        names = [self.medium_named(node.first), self.medium_named(node.second)]
        if names[0] == names[1]:
            raise LayoutValueError("an achromat needs two different media", self.span(node.second))
        from ..materials.lines import colour_pair

        primary = system.primary_wavelength
        # the Abbe numbers of the condition are taken over F and C (or F' and C') whenever the
        # layout lists them, as the trade does; otherwise over its shortest and longest
        pair = colour_pair((to_nanometres(w.value, self.units) for w in system.wavelengths),
                           self._environment())
        if pair is not None and (pair[0] is not None or len(system.wavelengths) >= 3):
            middle, blue, red = pair
            blue, red = from_nanometres(blue, self.units), from_nanometres(red, self.units)
            if primary is not None and blue < primary.value < red:
                centre = primary.value
            else:
                centre = self._line(middle or "d")
            chosen = (blue, centre, red)
        else:
            chosen = tuple(self._line(k) for k in ("F", "d", "C"))
        indices = []
        for name, ident in zip(names, (node.first, node.second)):
            model, _ = self._materials()["models"].get(name, (None, None))
            if model is None:
                raise LayoutValueError(
                    f"medium {name!r} has a constant index: an achromat needs dispersion",
                    self.span(ident), hint="give it a glass code, an Abbe number or a formula")
            env = system.environment if system.media and any(
                m.model is not None for m in system.media) else "standard air"
            indices.append(tuple(float(relative_index(model, self._to_um(w), env))
                                 for w in chosen))
        focal = None
        if node.focal_length is not None:
            focal = self.length(node.focal_length, "a focal length")
            if focal == 0:
                raise LayoutValueError("a focal length cannot be zero",
                                       self.span(node.focal_length))
        return AchromatRequest(names[0], names[1], tuple(self._label(w) for w in chosen),
                               indices[0], indices[1], focal)

    def material_warnings(self) -> tuple[str, ...]:
        state = self._materials()
        found = list(state["warnings"])
        if state["default_wavelength"]:
            found.insert(0, "note: no wavelengths given; dispersive media are taken at the "
                            "d line, 587.5618 nm")
        return tuple(dict.fromkeys(found))  # once each, in order


def _located(span, message: str) -> str:
    if span is None:
        return f"warning: {message}"
    return f"{span.file}:{span.line}:{span.column}: warning: {message}"
