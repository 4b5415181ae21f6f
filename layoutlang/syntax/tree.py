"""The syntax tree: plain frozen dataclasses, one per grammar alias, each with its position.

Nodes hold data only. Behaviour lives in the consumers (interpreter, formatter), which dispatch
on the class name. Positions are excluded from equality so two scripts that say the same thing
compare equal wherever they were written.
"""

from __future__ import annotations

from dataclasses import dataclass, field

__all__ = [
    "Pos", "Node", "Ident",
    "Expr", "Number", "Name", "Binary", "Negate", "Call",
    "Statement", "Title", "Units", "Let", "MediumIndex", "StartMedium",
    "ObjectAtInfinity", "ObjectBefore", "Shape", "BoundaryStatement",
    "Gap", "Stop", "Image", "Wavelength", "Wavelengths", "Quantity", "Tolerance",
    "Expect", "Report", "Hazard", "Use", "Script",
    "Sensor", "WavefrontGrid", "WavelengthWeights", "QualityPlace", "Quality", "QualityExpect",
    "ExpectCoverage", "QualityReport",
    "ExpectAtInfinity", "Sample", "FocusTolerance", "ReportRays", "ReportAtField", "ExpectRays",
    "PlaceMove", "Fold", "Prism", "ImageTilt",
    "SessionCommand", "Change", "Insert", "Remove", "Rename", "Undo", "Redo", "Show", "Save",
    "Help", "Leave",
]


@dataclass(frozen=True)
class Pos:
    """Where a node stands in its source: 1-based line/column, end exclusive."""

    line: int
    column: int
    end_line: int
    end_column: int


NO_POS = Pos(0, 0, 0, 0)

_PENDING: set[type] = set()


def node(cls: type) -> type:
    """Declare a syntax-tree class: it becomes a frozen dataclass when first instantiated.

    Building every frozen dataclass at import costs ~30 ms (six generated methods each) while a
    script uses a handful of statement kinds, and a numeric check must start fast.
    """
    _PENDING.add(cls)
    return cls


def realize(cls: type) -> type:
    """Make `cls` (and its bases) a frozen dataclass now, if it is not one yet."""
    if cls in _PENDING:
        for base in reversed(cls.__mro__[1:]):
            realize(base)
        _PENDING.discard(cls)
        dataclass(frozen=True)(cls)
    return cls


@node
class Node:
    pos: Pos = field(default=NO_POS, compare=False, repr=False, kw_only=True)

    def __new__(cls, *args, **kwargs):
        if cls in _PENDING:
            realize(cls)
        return object.__new__(cls)


@node
class Ident(Node):
    """A user-chosen name (surface, medium, constant, library)."""

    text: str


# --- expressions -----------------------------------------------------------------------------


@node
class Expr(Node):
    pass


@node
class Number(Expr):
    """A literal as written (the text keeps 0.1 exact for symbolic work) and its unit, if any."""

    text: str
    unit: str | None = None


@node
class Name(Expr):
    id: str


@node
class Binary(Expr):
    op: str  # one of + - * / ^
    left: Expr
    right: Expr


@node
class Negate(Expr):
    operand: Expr


@node
class Call(Expr):
    func: str
    args: tuple[Expr, ...]


# --- statements ------------------------------------------------------------------------------


@node
class Statement(Node):
    pass


@node
class Title(Statement):
    text: str


@node
class Units(Statement):
    unit: Ident


@node
class Let(Statement):
    name: Ident
    value: Expr


@node
class MediumIndex(Statement):
    name: Ident
    index: Expr


@node
class StartMedium(Statement):
    medium: Ident


@node
class ObjectAtInfinity(Statement):
    field_angle: Expr | None = None
    height: Expr | None = None  # not meaningful at infinity: the interpreter says so


@node
class ObjectBefore(Statement):
    distance: Expr
    height: Expr | None = None
    field_angle: Expr | None = None  # not meaningful for a near object: the interpreter says so


@node
class Shape(Node):
    """How a boundary is curved: kind is 'radius', 'curvature' or 'flat'."""

    kind: str
    value: Expr | None = None


@node
class BoundaryStatement(Statement):
    """`surface`, `mirror` or `lens` (an ideal thin lens of given strength)."""

    kind: str  # 'surface' | 'mirror' | 'lens'
    name: Ident | None
    shape: Shape | None = None  # surface and mirror
    into: Ident | None = None  # surface only
    strength_kind: str | None = None  # lens only: 'focal length' | 'power'
    strength: Expr | None = None
    clear_diameter: Expr | None = None
    # surfaces.lark: ('conic constant', expr), ('r4 coefficient', expr), ('q-type a0', expr),
    # ('q-type normalisation radius', expr), ('obscuration diameter', expr),
    # ('hole diameter', expr), in written order
    surface_options: tuple[tuple[str, Expr], ...] = ()


@node
class Gap(Statement):
    length: Expr


@node
class Stop(Statement):
    """The aperture stop: at a surface, or a distance before/after one."""

    anchor: Ident
    relation: str  # 'at' | 'before' | 'after'
    offset: Expr | None
    size_kind: str  # 'diameter' | 'f-number' | 'numerical aperture'
    size: Expr


@node
class Image(Statement):
    distance: Expr | None = None  # None: at the paraxial focus
    at_infinity: bool = False  # `image at infinity`: the output is stated to be collimated


@node
class ExpectAtInfinity(Statement):
    """`expect image at infinity`: the paraxial output is collimated."""

    quantity: Quantity


@node
class Wavelength(Node):
    value: Expr
    primary: bool = False


@node
class Wavelengths(Statement):
    items: tuple[Wavelength, ...]


@node
class Quantity(Node):
    """A quantity named in plain words, e.g. ('focal', 'length') or ('f-number',)."""

    words: tuple[str, ...]

    @property
    def text(self) -> str:
        return " ".join(self.words)


@node
class Tolerance(Node):
    kind: str  # '±' | 'within'
    value: Expr


@node
class Expect(Statement):
    quantity: Quantity
    op: str  # = < <= > >=
    value: Expr
    tolerance: Tolerance | None = None


@node
class Report(Statement):
    quantities: tuple[Quantity, ...] = ()


@node
class Hazard(Statement):
    """A declared hazard (laser, eye, sunlight): reports then carry the usual caution."""

    kind: Ident


@node
class Use(Statement):
    target: str
    is_file: bool


@node
class Script(Node):
    """A parsed file: its statements and the file name errors should mention."""

    file: str
    statements: tuple[Statement, ...]
    text: str = field(default="", compare=False, repr=False)


# --- commands of the interactive session (grammar/session.lark) -------------------------------


@node
class SessionCommand(Statement):
    """A command of `layoutlang repl`; a script file cannot use one."""


@node
class Change(SessionCommand):
    """`change ...`: target is 'named' (a boundary, medium or constant by its name), 'medium',
    'gap', 'object' or 'stop'; prop the property in words ('radius', 'clear diameter', 'flat',
    'value' for a constant, 'before'/'after' for a gap); value None only for 'flat'."""

    target: str
    name: Ident | None
    prop: str
    value: Expr | None = None


@node
class Insert(SessionCommand):
    """`insert <surface|mirror|lens|gap statement> before|after NAME`."""

    item: Statement
    place: str
    anchor: Ident


@node
class Remove(SessionCommand):
    """`remove NAME` (gap None) or `remove gap before|after NAME` (gap = 'before'/'after')."""

    anchor: Ident
    gap: str | None = None


@node
class Rename(SessionCommand):
    old: Ident
    new: Ident


@node
class Undo(SessionCommand):
    pass


@node
class Redo(SessionCommand):
    pass


@node
class Show(SessionCommand):
    what: str  # 'table' | 'script' | 'results' | 'expectations'


@node
class Save(SessionCommand):
    path: str | None = None


@node
class Help(SessionCommand):
    pass


@node
class Leave(SessionCommand):
    pass


# --- exact rays and aberrations (grammar/rays.lark) ------------------------------------------


@node
class Sample(Statement):
    """`sample pupils ...`, `sample fields ...` or `sample grid N`: what the ray report traces."""

    what: str  # 'pupils' | 'fields' | 'grid'
    values: tuple[Expr, ...]


@node
class FocusTolerance(Statement):
    """`focus tolerance D`: judge the real focus and image height against D."""

    value: Expr


@node
class ReportRays(Statement):
    """`report exact rays` or `report seidel sums`."""

    what: str  # 'exact rays' | 'seidel sums'


@node
class ReportAtField(Statement):
    """`report Q at field F [at wavelength W]`: one ray quantity where `expect` takes it."""

    quantity: Quantity
    field: Expr
    wavelength: Node | None = None


@node
class ExpectRays(Statement):
    """`expect Q at field F [at wavelength W] < V` or `expect Q < V depth of focus` (scale
    'depth of focus'); `wavelength` is a WavelengthRef (grammar/materials.lark) or None."""

    quantity: Quantity
    op: str
    value: Expr
    tolerance: Tolerance | None = None
    field: Expr | None = None
    scale: str = ""
    wavelength: Node | None = None


# --- real materials and several wavelengths (grammar/materials.lark) ---------------------------


@node
class MediumModel(Statement):
    """A medium with a dispersion model; kind is 'nd and abbe number' (values: index, Abbe number),
    'glass code' (code: the digits as written), 'sellmeier' (pairs of B and λᵢ, or of B and C
    when squared), 'cauchy' (values: the coefficients) or 'table' (pairs of λ and n)."""

    name: Ident
    kind: str
    values: tuple[Expr, ...] = ()
    pairs: tuple[tuple[Expr, Expr], ...] = ()
    code: str | None = None
    squared: bool = False
    constant: Expr | None = None
    valid: tuple[Expr, Expr] | None = None
    relative_to: str | None = None  # 'air' | 'vacuum' | None (not said)


@node
class Surroundings(Statement):
    """`layout in standard air` | `layout in vacuum`."""

    environment: str  # 'standard air' | 'vacuum'


@node
class Achromat(Statement):
    """`achromat from FIRST and SECOND[, focal length F]`: the thin-lens achromat condition."""

    first: Ident
    second: Ident
    focal_length: Expr | None = None


@node
class WavelengthRef(Node):
    """A wavelength named in a qualifier: a spectral line letter or `let` name (name, with
    its apostrophe if primed), or a number with a length unit."""

    name: str | None = None
    number: Number | None = None


@node
class Qualifier(Node):
    """`of MEDIUM`, `at wavelength W`, `between W and W`, `across W, W and W`."""

    kind: str  # 'of' | 'at' | 'between' | 'across'
    medium: Ident | None = None
    wavelengths: tuple[WavelengthRef, ...] = ()


@node
class QualifiedExpect(Expect):
    """An `expect` whose quantity carries qualifiers (medium, wavelengths)."""

    qualifiers: tuple[Qualifier, ...] = ()


@node
class QualifiedReport(Statement):
    """`report QUANTITY QUALIFIER...`: one quantity at stated wavelengths or of a medium."""

    quantity: Quantity
    qualifiers: tuple[Qualifier, ...] = ()

__all__ += ["MediumModel", "Surroundings", "Achromat", "WavelengthRef", "Qualifier",
            "QualifiedExpect", "QualifiedReport"]


# --- symbolic statements (grammar/symbolic.lark) ----------------------------------------------

__all__ += ["Symbols", "NominalValue", "Nominal", "Derive", "Condition", "Solve", "Sensitivity",
            "ExpectSensitivity"]


@node
class Symbols(Statement):
    """`symbols n1 n2 R positive`: free symbols and an optional assumption ('positive'/'real')."""

    names: tuple[Ident, ...]
    assumption: str | None = None


@node
class NominalValue(Node):
    name: Ident
    value: Expr


@node
class Nominal(Statement):
    """`nominal R = 20, a = 100`: the values a symbolic layout is checked at."""

    values: tuple[NominalValue, ...]


@node
class Derive(Statement):
    quantities: tuple[Quantity, ...]


@node
class Condition(Node):
    quantity: Quantity
    value: Expr


@node
class Solve(Statement):
    """`solve R so that image distance = 40 [and ...]`."""

    unknowns: tuple[Ident, ...]
    conditions: tuple[Condition, ...]


@node
class Sensitivity(Statement):
    """`sensitivity of image distance to d, R`."""

    quantities: tuple[Quantity, ...]
    symbols: tuple[Ident, ...]


@node
class ExpectSensitivity(Statement):
    """`expect sensitivity of image distance to d < 1.5`."""

    quantity: Quantity
    symbol: Ident
    op: str
    value: Expr
    tolerance: Tolerance | None = None


# --- tolerances and yield (grammar/tolerances.lark) --------------------------------------------
__all__ += ["Distribution", "ToleranceOn", "Compensate", "MonteCarlo", "ReportTolerances",
            "ExpectYield"]


@node
class Distribution(Node):
    """How a toleranced number is drawn: 'uniform', 'normal' (the limit is `sigmas` standard
    deviations, truncated there; None: the default) or 'end points'."""

    kind: str
    sigmas: Expr | None = None


@node
class ToleranceOn(Statement):
    """`tolerance radius of front ± 0.1 mm[, normal 2 sigma]` or `tolerance gap after front ± …`."""

    target: str  # 'radius' | 'curvature' | 'index' | 'abbe number' | 'conic constant' | 'clear diameter' | 'gap' | 'decenter' | 'tilt'
    name: Ident
    limit: Expr
    distribution: Distribution | None = None
    through: Ident | None = None  # decenter/tilt of an element: its last surface
    axis: str | None = None  # decenter: 'along x|y'; tilt: 'about x|y|z' (the axis letter)


@node
class Compensate(Statement):
    """`compensate focus [within D]` or `compensate gap after NAME [within D]`."""

    what: str  # 'focus' | 'gap'
    name: Ident | None = None
    limit: Expr | None = None


@node
class MonteCarlo(Statement):
    """`monte carlo N samples[, seed S]`."""

    samples: Expr
    seed: Expr | None = None


@node
class ReportTolerances(Statement):
    """`report tolerances`: the sensitivity table, the estimate and the Monte Carlo result."""


@node
class ExpectYield(Statement):
    """`expect yield > 95 %` (every other expectation holds) or `expect yield of Q > 99 %`."""

    quantity: Quantity | None
    op: str
    value: Expr


# --- placement (grammar/placement.lark) ------------------------------------------------------


@node
class PlaceMove(Statement):
    """`tilt NAME [through NAME] by ANGLE about AXIS` or `decenter ... by LENGTH along AXIS`,
    with an optional `, axis follows | returns` (None: not said, the axis returns)."""

    kind: str  # 'tilt' | 'decenter'
    first: Ident
    last: Ident | None
    amount: Expr
    axis: str  # 'x' | 'y' | 'z'
    mode: str | None = None  # 'follows' | 'returns' | None


@node
class Fold(Statement):
    """`fold [NAME] at ANGLE about AXIS[, clear diameter D]`: a flat mirror the axis follows."""

    name: Ident | None
    angle: Expr
    axis: str
    clear_diameter: Expr | None = None


@node
class Prism(Statement):
    """`prism NAME in MEDIUM, apex A[, thickness T][, incidence I][, clear diameter D]` or
    `prism NAME in MEDIUM, right angle, size S`."""

    kind: str  # 'wedge' | 'right angle'
    name: Ident
    medium: Ident
    apex: Expr | None = None
    thickness: Expr | None = None
    incidence: Expr | None = None
    clear_diameter: Expr | None = None
    size: Expr | None = None


@node
class ImageTilt(Statement):
    """`tilt image plane by ANGLE about AXIS`."""

    angle: Expr
    axis: str


# --- laser beams and fibres (grammar/beams.lark) ----------------------------------------------

__all__ += ["BeamOption", "Beam", "Fibre", "BeamLimit", "ExpectAfter", "ReportAfter"]


@node
class BeamOption(Node):
    """One option of `beam` or `fibre`, as written: kind is 'waist radius', 'waist before',
    'waist after', 'wavelength', 'propagation ratio' (beam) or 'mode field diameter' (with
    `at` its wavelength), 'at image', 'at waist', 'after', 'offset', 'tilt' (fibre)."""

    kind: str
    value: Expr | None = None
    at: Expr | None = None


@node
class Beam(Statement):
    """`beam waist radius W, waist D before, wavelength L[, propagation ratio M2]`."""

    options: tuple[BeamOption, ...]


@node
class Fibre(Statement):
    """`fibre mode field diameter D [at L], at image | at waist | D after[, offset X][, tilt A]`
    (`word` keeps the spelling written: fibre or fiber)."""

    options: tuple[BeamOption, ...]
    word: str = "fibre"


@node
class BeamLimit(Statement):
    """`clipping limit P %` or `clearance limit K beam diameters`."""

    kind: str  # 'clipping' | 'clearance'
    value: Expr


@node
class ExpectAfter(Statement):
    """`expect QUANTITY at D after < V`: a beam quantity a distance after the last boundary."""

    quantity: Quantity
    distance: Expr
    op: str
    value: Expr
    tolerance: Tolerance | None = None


@node
class ReportAfter(Statement):
    """`report QUANTITY at D after`."""

    quantity: Quantity
    distance: Expr


# --- image quality (grammar/quality.lark) --------------------------------------------------


@node
class Sensor(Statement):
    """`sensor W by H, pixel pitch P`: a rectangular sensor centred on the axis."""

    width: Expr
    height: Expr
    pitch: Expr


@node
class WavefrontGrid(Statement):
    """`wavefront grid N`: pupil grid cells across the stop diameter."""

    value: Expr


@node
class WavelengthWeights(Statement):
    """`wavelength weights 1, 2, 1`: in the order of the `wavelengths` statement."""

    values: tuple[Expr, ...]


@node
class QualityPlace(Node):
    """A qualifier of an image-quality quantity: `at field F`, `at sensor corner`,
    `at wavelength W` or an orientation word (kind 'field' | 'sensor' | 'wavelength' |
    'orientation'; `word` holds the sensor place or the orientation)."""

    kind: str
    value: Expr | None = None
    word: str = ""
    wavelength: Node | None = None


@node
class Quality(Node):
    """An image-quality quantity with its qualifiers.

    kind: 'mtf', 'wavefront error', 'wavefront focus shift', 'strehl ratio', 'encircled energy',
    'encircled energy radius', 'ensquared energy', 'zernike', 'focus', 'chief-ray angle',
    'illumination'; `measure` is 'rms' / 'peak-to-valley' (wavefront error) or the orientation
    (focus); `value` the size (energies) or the frequency number; `frequency` 'value',
    'nyquist' or 'half nyquist' and `per` the length unit of a frequency value; a Zernike term
    is `term` (its Noll number) or `words` (its name)."""

    kind: str
    measure: str = ""
    value: Expr | None = None
    frequency: str = ""
    per: Ident | None = None
    term: Number | None = None
    words: tuple[str, ...] = ()
    places: tuple[QualityPlace, ...] = ()


@node
class QualityExpect(Statement):
    """`expect QUALITY < V [waves]` (and `=` with a tolerance, `>`, ...)."""

    quality: Quality
    op: str
    value: Expr
    tolerance: Tolerance | None = None
    waves: bool = False


@node
class ExpectCoverage(Statement):
    """`expect sensor covered by image circle`."""


@node
class QualityReport(Statement):
    """`report quality` (quality None: the whole image-quality section) or
    `report QUALITY` (one quantity)."""

    quality: Quality | None = None
