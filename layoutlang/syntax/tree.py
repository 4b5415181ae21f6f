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
    """`expect Q at field F < V` or `expect Q < V depth of focus` (scale 'depth of focus')."""

    quantity: Quantity
    op: str
    value: Expr
    tolerance: Tolerance | None = None
    field: Expr | None = None
    scale: str = ""
