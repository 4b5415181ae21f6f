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
    "Sample", "FocusTolerance", "ReportRays", "ExpectRays",
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


@dataclass(frozen=True)
class Node:
    pos: Pos = field(default=NO_POS, compare=False, repr=False, kw_only=True)


@dataclass(frozen=True)
class Ident(Node):
    """A user-chosen name (surface, medium, constant, library)."""

    text: str


# --- expressions -----------------------------------------------------------------------------


@dataclass(frozen=True)
class Expr(Node):
    pass


@dataclass(frozen=True)
class Number(Expr):
    """A literal as written (the text keeps 0.1 exact for symbolic work) and its unit, if any."""

    text: str
    unit: str | None = None


@dataclass(frozen=True)
class Name(Expr):
    id: str


@dataclass(frozen=True)
class Binary(Expr):
    op: str  # one of + - * / ^
    left: Expr
    right: Expr


@dataclass(frozen=True)
class Negate(Expr):
    operand: Expr


@dataclass(frozen=True)
class Call(Expr):
    func: str
    args: tuple[Expr, ...]


# --- statements ------------------------------------------------------------------------------


@dataclass(frozen=True)
class Statement(Node):
    pass


@dataclass(frozen=True)
class Title(Statement):
    text: str


@dataclass(frozen=True)
class Units(Statement):
    unit: Ident


@dataclass(frozen=True)
class Let(Statement):
    name: Ident
    value: Expr


@dataclass(frozen=True)
class MediumIndex(Statement):
    name: Ident
    index: Expr


@dataclass(frozen=True)
class StartMedium(Statement):
    medium: Ident


@dataclass(frozen=True)
class ObjectAtInfinity(Statement):
    field_angle: Expr | None = None


@dataclass(frozen=True)
class ObjectBefore(Statement):
    distance: Expr
    height: Expr | None = None


@dataclass(frozen=True)
class Shape(Node):
    """How a boundary is curved: kind is 'radius', 'curvature' or 'flat'."""

    kind: str
    value: Expr | None = None


@dataclass(frozen=True)
class BoundaryStatement(Statement):
    """`surface`, `mirror` or `lens` (an ideal thin lens of given strength)."""

    kind: str  # 'surface' | 'mirror' | 'lens'
    name: Ident | None
    shape: Shape | None = None  # surface and mirror
    into: Ident | None = None  # surface only
    strength_kind: str | None = None  # lens only: 'focal length' | 'power'
    strength: Expr | None = None
    clear_diameter: Expr | None = None


@dataclass(frozen=True)
class Gap(Statement):
    length: Expr


@dataclass(frozen=True)
class Stop(Statement):
    """The aperture stop: at a surface, or a distance before/after one."""

    anchor: Ident
    relation: str  # 'at' | 'before' | 'after'
    offset: Expr | None
    size_kind: str  # 'diameter' | 'f-number' | 'numerical aperture'
    size: Expr


@dataclass(frozen=True)
class Image(Statement):
    distance: Expr | None = None  # None: at the paraxial focus


@dataclass(frozen=True)
class Wavelength(Node):
    value: Expr
    primary: bool = False


@dataclass(frozen=True)
class Wavelengths(Statement):
    items: tuple[Wavelength, ...]


@dataclass(frozen=True)
class Quantity(Node):
    """A quantity named in plain words, e.g. ('focal', 'length') or ('f-number',)."""

    words: tuple[str, ...]

    @property
    def text(self) -> str:
        return " ".join(self.words)


@dataclass(frozen=True)
class Tolerance(Node):
    kind: str  # '±' | 'within'
    value: Expr


@dataclass(frozen=True)
class Expect(Statement):
    quantity: Quantity
    op: str  # = < <= > >=
    value: Expr
    tolerance: Tolerance | None = None


@dataclass(frozen=True)
class Report(Statement):
    quantities: tuple[Quantity, ...] = ()


@dataclass(frozen=True)
class Hazard(Statement):
    """A declared hazard (laser, eye, sunlight): reports then carry the usual caution."""

    kind: Ident


@dataclass(frozen=True)
class Use(Statement):
    target: str
    is_file: bool


@dataclass(frozen=True)
class Script(Node):
    """A parsed file: its statements and the file name errors should mention."""

    file: str
    statements: tuple[Statement, ...]
    text: str = field(default="", compare=False, repr=False)


# --- commands of the interactive session (grammar/session.lark) -------------------------------


@dataclass(frozen=True)
class SessionCommand(Statement):
    """A command of `layoutlang repl`; a script file cannot use one."""


@dataclass(frozen=True)
class Change(SessionCommand):
    """`change ...`: target is 'named' (a boundary, medium or constant by its name), 'medium',
    'gap', 'object' or 'stop'; prop the property in words ('radius', 'clear diameter', 'flat',
    'value' for a constant, 'before'/'after' for a gap); value None only for 'flat'."""

    target: str
    name: Ident | None
    prop: str
    value: Expr | None = None


@dataclass(frozen=True)
class Insert(SessionCommand):
    """`insert <surface|mirror|lens|gap statement> before|after NAME`."""

    item: Statement
    place: str
    anchor: Ident


@dataclass(frozen=True)
class Remove(SessionCommand):
    """`remove NAME` (gap None) or `remove gap before|after NAME` (gap = 'before'/'after')."""

    anchor: Ident
    gap: str | None = None


@dataclass(frozen=True)
class Rename(SessionCommand):
    old: Ident
    new: Ident


@dataclass(frozen=True)
class Undo(SessionCommand):
    pass


@dataclass(frozen=True)
class Redo(SessionCommand):
    pass


@dataclass(frozen=True)
class Show(SessionCommand):
    what: str  # 'table' | 'script' | 'results' | 'expectations'


@dataclass(frozen=True)
class Save(SessionCommand):
    path: str | None = None


@dataclass(frozen=True)
class Help(SessionCommand):
    pass


@dataclass(frozen=True)
class Leave(SessionCommand):
    pass


# --- exact rays and aberrations (grammar/rays.lark) ------------------------------------------


@dataclass(frozen=True)
class Sample(Statement):
    """`sample pupils ...`, `sample fields ...` or `sample grid N`: what the ray report traces."""

    what: str  # 'pupils' | 'fields' | 'grid'
    values: tuple[Expr, ...]


@dataclass(frozen=True)
class FocusTolerance(Statement):
    """`focus tolerance D`: judge the real focus and image height against D."""

    value: Expr


@dataclass(frozen=True)
class ReportRays(Statement):
    """`report exact rays` or `report seidel sums`."""

    what: str  # 'exact rays' | 'seidel sums'


@dataclass(frozen=True)
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


@dataclass(frozen=True)
class MediumModel(Statement):
    """A medium with a dispersion model; kind is 'model glass' (values: index, Abbe number),
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


@dataclass(frozen=True)
class Surroundings(Statement):
    """`layout in standard air` | `layout in vacuum`."""

    environment: str  # 'standard air' | 'vacuum'


@dataclass(frozen=True)
class Achromat(Statement):
    """`achromat from FIRST and SECOND[, focal length F]`: the thin-lens achromat condition."""

    first: Ident
    second: Ident
    focal_length: Expr | None = None


@dataclass(frozen=True)
class WavelengthRef(Node):
    """A wavelength named in a qualifier: a spectral line letter or `let` name (name, with
    its apostrophe if primed), or a number with a length unit."""

    name: str | None = None
    number: Number | None = None


@dataclass(frozen=True)
class Qualifier(Node):
    """`of MEDIUM`, `at wavelength W`, `between W and W`, `across W, W and W`."""

    kind: str  # 'of' | 'at' | 'between' | 'across'
    medium: Ident | None = None
    wavelengths: tuple[WavelengthRef, ...] = ()


@dataclass(frozen=True)
class QualifiedExpect(Expect):
    """An `expect` whose quantity carries qualifiers (medium, wavelengths)."""

    qualifiers: tuple[Qualifier, ...] = ()


@dataclass(frozen=True)
class QualifiedReport(Statement):
    """`report QUANTITY QUALIFIER...`: one quantity at stated wavelengths or of a medium."""

    quantity: Quantity
    qualifiers: tuple[Qualifier, ...] = ()

__all__ += ["MediumModel", "Surroundings", "Achromat", "WavelengthRef", "Qualifier",
            "QualifiedExpect", "QualifiedReport"]


# --- symbolic statements (grammar/symbolic.lark) ----------------------------------------------

__all__ += ["Symbols", "NominalValue", "Nominal", "Derive", "Condition", "Solve", "Sensitivity",
            "ExpectSensitivity"]


@dataclass(frozen=True)
class Symbols(Statement):
    """`symbols n1 n2 R positive`: free symbols and an optional assumption ('positive'/'real')."""

    names: tuple[Ident, ...]
    assumption: str | None = None


@dataclass(frozen=True)
class NominalValue(Node):
    name: Ident
    value: Expr


@dataclass(frozen=True)
class Nominal(Statement):
    """`nominal R = 20, a = 100`: the values a symbolic layout is checked at."""

    values: tuple[NominalValue, ...]


@dataclass(frozen=True)
class Derive(Statement):
    quantities: tuple[Quantity, ...]


@dataclass(frozen=True)
class Condition(Node):
    quantity: Quantity
    value: Expr


@dataclass(frozen=True)
class Solve(Statement):
    """`solve R so that image distance = 40 [and ...]`."""

    unknowns: tuple[Ident, ...]
    conditions: tuple[Condition, ...]


@dataclass(frozen=True)
class Sensitivity(Statement):
    """`sensitivity of image distance to d, R`."""

    quantities: tuple[Quantity, ...]
    symbols: tuple[Ident, ...]


@dataclass(frozen=True)
class ExpectSensitivity(Statement):
    """`expect sensitivity of image distance to d < 1.5`."""

    quantity: Quantity
    symbol: Ident
    op: str
    value: Expr
    tolerance: Tolerance | None = None
