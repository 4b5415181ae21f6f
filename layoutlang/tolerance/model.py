"""What a script says about manufacturing: the toleranced numbers, the compensators, the
Monte Carlo settings. Plain values made by the interpreter (interpret/tolerancestatements.py)
and read by the tolerance engine (tolerance/analysis.py)."""

from __future__ import annotations

from dataclasses import dataclass

__all__ = ["ToleranceItem", "Compensator", "ToleranceSetup", "YieldRequest",
           "UNIFORM", "NORMAL", "END_POINTS", "PLACED", "DEFAULT_SAMPLES", "DEFAULT_SEED",
           "DEFAULT_SIGMAS"]

UNIFORM, NORMAL, END_POINTS = "uniform", "normal", "end points"

#: Tolerances on where a surface or element sits (engines/frames.py): a decenter (a length)
#: and a tilt (an angle, radians), each about its vertex, the axis after it unmoved.
PLACED = ("decenter", "tilt")

#: Without `monte carlo N samples`: enough for a yield known to about ±1.4 % (95 %) at 90 %.
DEFAULT_SAMPLES = 2000
#: Without `seed S`: the same numbers on every run (output is deterministic).
DEFAULT_SEED = 1
#: `normal` without a number: the limit is three standard deviations (truncated there).
DEFAULT_SIGMAS = 3.0


@dataclass(frozen=True)
class ToleranceItem:
    """One toleranced number.

    Attributes:
        target: 'radius', 'curvature', 'gap', 'index', 'abbe number', 'conic constant' or
            'clear diameter'.
        name: the surface (gap: the surface the gap follows) or medium the script named.
        position: boundary index (gap: gap index); -1 for a medium.
        limit: the ± limit, in layout units (or a fraction of the nominal when `relative`).
        relative: the limit is a fraction (written with %).
        distribution: UNIFORM, NORMAL or END_POINTS.
        sigmas: for NORMAL, how many standard deviations the limit is (truncated there).
        text: the statement as written, for reports.
        line: its line in the script.
    """

    target: str
    name: str
    position: int
    limit: float
    relative: bool
    distribution: str = UNIFORM
    sigmas: float = DEFAULT_SIGMAS
    text: str = ""
    line: int = 0
    #: decenter/tilt only: the last surface of the element (= position for one surface), its
    #: name when the script named one ('through'), and the axis letter (along / about)
    last: int = -1
    through: str = ""
    axis: str = ""

    @property
    def label(self) -> str:
        if self.target == "gap":
            return f"gap after {self.name}"
        if self.target in PLACED:
            element = f" through {self.through}" if self.through else ""
            way = "along" if self.target == "decenter" else "about"
            return f"{self.target} of {self.name}{element} {way} {self.axis}"
        return f"{self.target} of {self.name}"


@dataclass(frozen=True)
class Compensator:
    """What the assembler adjusts on every built unit.

    Attributes:
        kind: 'focus' (the image plane moves to the unit's paraxial focus) or 'gap' (the gap
            after surface `name` moves until the paraxial image lands on the image plane).
        name: the surface the gap follows ('gap' only).
        position: the gap index ('gap' only).
        limit: the largest adjustment either way, or None for no limit.
    """

    kind: str
    name: str = ""
    position: int = -1
    limit: float | None = None
    units: str = "mm"

    @property
    def label(self) -> str:
        what = "focus (image plane)" if self.kind == "focus" else f"gap after {self.name}"
        return what if self.limit is None else f"{what} within ± {self.limit:g} {self.units}"


@dataclass(frozen=True)
class YieldRequest:
    """`expect yield [of QUANTITY]`: the fraction of built units meeting every other
    expectation, or only those on QUANTITY."""

    quantity: str | None = None


@dataclass(frozen=True)
class ToleranceSetup:
    items: tuple[ToleranceItem, ...]
    compensators: tuple[Compensator, ...] = ()
    samples: int = DEFAULT_SAMPLES
    seed: int = DEFAULT_SEED
    report: bool = False
