"""The one numeric guard: what numbers may enter a script, what values may leave a report, and
how an unexpected exception becomes a message.

Entry: every number a script writes, and every expression's value, must be finite and of a
magnitude the engines can square and cube without overflow (`admissible`, called by the
expression evaluator for numeric and symbolic scripts alike). Exit: a value that is not finite
never reaches text, JSON, documents or drawings; `finite_or_unavailable` turns it into the words
`cannot be computed: ...` (`testing.format_number`, `reports.machine.dumps` and the drawing call
it). Between the two, `guarded` wraps the few entry points of the core (interpret, evaluate,
render) so an arithmetic failure deep in an engine (overflow, division by zero, a recursion too
deep) becomes a `LayoutValueError`; `unexpected_error` is the front ends' last resort for
everything else (an internal error, exit status 2). New engines get all of this for free as long
as they are reached through those entry points.
"""

from __future__ import annotations

import functools
import math
import traceback
import warnings
from pathlib import Path
from typing import Any, Callable, TypeVar

from .errors import LayoutError, LayoutValueError, Span

__all__ = [
    "LARGEST", "SMALLEST", "SMALLEST_COEFFICIENT", "NOT_FINITE_REASON", "MAX_SCRIPT_BYTES",
    "MAX_STATEMENTS", "MAX_SURFACES", "read_script", "LayoutInternalError", "admissible",
    "is_finite", "finite_or_unavailable", "json_safe", "guarded", "unexpected_error",
    "quiet_numeric_warnings",
]

#: Magnitudes a script's numbers may have (zero aside): a third-order sum multiplies about six
#: of them, which stays far inside the range of a double (about 1e308).
LARGEST = 1e15
SMALLEST = 1e-15
#: Aspheric coefficients (r⁴ … r²⁰, in layout units) are small by nature — an r¹⁰ term of a
#: telescope mirror in mm is about 1e-20 — and only ever multiply a power of r: they may go
#: down to this magnitude (the interpreter asks for it where a coefficient is written).
SMALLEST_COEFFICIENT = 1e-200

#: Size limits, so no input reads or grows without end (README, "Size limits").
MAX_SCRIPT_BYTES = 2_000_000
MAX_STATEMENTS = 20_000
MAX_SURFACES = 5_000

NOT_FINITE_REASON = "cannot be computed: not a finite number"

F = TypeVar("F", bound=Callable[..., Any])


class LayoutInternalError(LayoutError, RuntimeError):
    """Something went wrong inside layoutlang itself (a bug): said in words, exit status 2."""


def read_script(path: str | Path) -> str:
    """A script's text, read at most MAX_SCRIPT_BYTES (+1) bytes far: `/dev/zero` or a runaway
    generated file is an error, not a hang.

    Raises:
        LayoutFileError: the file cannot be read, is not UTF-8 text, or is too large.
    """
    from .errors import LayoutFileError

    try:
        with open(path, "rb") as handle:
            data = handle.read(MAX_SCRIPT_BYTES + 1)
    except OSError as error:
        raise LayoutFileError(f"cannot read {path}: {error.strerror or error}") from None
    if len(data) > MAX_SCRIPT_BYTES:
        raise LayoutFileError(f"{path} is larger than {MAX_SCRIPT_BYTES:,} bytes, the largest "
                              "script layoutlang reads", hint="split it with 'use \"file\"'")
    try:
        return data.decode("utf-8")
    except UnicodeDecodeError as error:
        raise LayoutFileError(f"cannot read {path}: {error}") from None


def admissible(value: Any, smallest: float = SMALLEST) -> str | None:
    """Why a number written in (or computed by) a script cannot be used, or None if it can.

    Works for floats and for exact sympy numbers (which may exceed a double's range); a value
    with free symbols is not judged (its nominal values are).
    """
    magnitude = _magnitude(value)
    if magnitude is None:
        return None
    if math.isnan(magnitude):
        return "this number is not defined (it is not a number)"
    if magnitude > LARGEST:
        return f"this number is too large (layoutlang works with magnitudes up to {LARGEST:g})"
    if 0 < magnitude < smallest:
        return (f"this number is too small (layoutlang works with magnitudes from {smallest:g}, "
                "or exactly 0)")
    return None


def _magnitude(value: Any) -> float | None:
    if isinstance(value, (int, float)):
        try:
            return abs(float(value))
        except OverflowError:  # a Python int beyond a double
            return math.inf
    if getattr(value, "free_symbols", None):  # sympy with symbols: judged at its nominal values
        return None
    if hasattr(value, "is_number") and value.is_number:  # an exact sympy number
        import sympy as sp

        if value.has(sp.zoo, sp.oo, -sp.oo, sp.nan):
            return math.inf
        try:
            magnitude = sp.Abs(value).evalf(20)
            if not magnitude.is_Number:  # a complex value, say
                return None
            if magnitude > sp.Float(1e300):
                return 1e300  # exact, just far beyond LARGEST
            return float(magnitude)
        except (TypeError, ValueError, ArithmeticError, RecursionError):
            return None
    try:
        return abs(float(value))
    except (TypeError, ValueError, OverflowError):
        return None


def is_finite(value: Any) -> bool:
    """True for a finite float (or an array of them); anything that is not a number is 'finite'
    here, since it is not a number to print."""
    try:
        return math.isfinite(value)
    except (TypeError, ValueError):
        pass
    try:
        import numpy as np

        array = np.asarray(value)
        if array.dtype.kind in "fc":
            return bool(np.isfinite(array).all())
    except Exception:  # not numeric at all
        pass
    return True


def finite_or_unavailable(value: Any) -> Any:
    """`value` itself, or an `Unavailable` saying it cannot be computed when it is not finite."""
    if isinstance(value, (int, float)) and not math.isfinite(value):
        from .engines.firstorder import Unavailable

        return Unavailable(NOT_FINITE_REASON)
    return value


def json_safe(data: Any) -> Any:
    """A copy of JSON data with every non-finite float replaced by None, the reason beside it
    (`"why"` in the same object when it has none, else in a list)."""
    if isinstance(data, float) and not math.isfinite(data):
        return None
    if isinstance(data, dict):
        cleaned = {}
        bad = False
        for key, item in data.items():
            if isinstance(item, float) and not math.isfinite(item):
                bad = True
            cleaned[key] = json_safe(item)
        if bad and "why" not in cleaned:
            cleaned["why"] = NOT_FINITE_REASON
        return cleaned
    if isinstance(data, (list, tuple)):
        return [json_safe(item) for item in data]
    return data


#: Failures of arithmetic itself: the layout's numbers, not a bug, are the cause.
def _arithmetic_errors() -> tuple[type[BaseException], ...]:
    import decimal

    return (OverflowError, ZeroDivisionError, FloatingPointError, RecursionError,
            decimal.DecimalException)


#: Where an arithmetic failure happened, in words (by the module the traceback ends in).
_PLACES = {
    "seidel": "the Seidel sums", "realrays": "the exact ray trace",
    "aberrations": "the ray aberrations", "firstorder": "the first-order properties",
    "paraxial": "the paraxial trace", "chromatic": "the colour values",
    "algebra": "the symbolic algebra", "flintring": "the symbolic algebra",
    "layout": "the symbolic layout", "derive": "a derivation", "solve": "a solution",
    "sensitivity": "a sensitivity", "nominal": "the nominal values",
    "formatter": "the canonical layout", "cross_section": "the drawing", "drawing": "the drawing",
    "machine": "the JSON values", "text": "the report's values",
    "document": "the document's values",
}


def _place(error: BaseException) -> str:
    frames = traceback.extract_tb(error.__traceback__)
    for frame in reversed(frames):
        if "layoutlang" in frame.filename:
            name = Path(frame.filename).stem
            if name in _PLACES:
                return _PLACES[name]
    return "the computation"


def _is_digit_limit(error: BaseException) -> bool:
    return isinstance(error, ValueError) and "int_max_str_digits" in str(error)


def as_arithmetic_error(error: BaseException, file: str | None = None,
                        span: Span | None = None) -> LayoutValueError | None:
    """The words for an arithmetic failure (overflow, division by zero, too deep a
    recursion, an integer too long to print), or None when `error` is not one."""
    hint = None
    if isinstance(error, RecursionError):
        why = "the expressions of this layout are nested too deeply to compute"
        hint = "split a long expression into several 'let' lines"
    elif _is_digit_limit(error):
        why = "a number of this layout has too many digits to compute with"
    elif isinstance(error, _arithmetic_errors()):
        why = ("the numbers of this layout overflow the arithmetic"
               if not isinstance(error, ZeroDivisionError) else
               "the numbers of this layout lead to a division by zero")
        hint = ("check for a zero or near-zero index, radius, gap or aperture where none is "
                "meant, and for magnitudes far apart")
    else:
        return None
    place = _place(error)
    message = f"{place} cannot be computed: {why}"
    if span is None and file:
        return _FileError(message, file, hint=hint)
    return LayoutValueError(message, span, hint=hint)


class _FileError(LayoutValueError):
    """A value error about a whole script (no one line is to blame): `FILE: error: ...`."""

    def __init__(self, message: str, file: str, expected: str | None = None,
                 hint: str | None = None) -> None:
        super().__init__(message, None, expected, hint)
        self.script = file

    def __str__(self) -> str:
        return f"{self.script}: {super().__str__()}"

    def __reduce__(self):
        return (self.__class__, (self.message, self.script, self.expected, self.hint))


def guarded(func: F) -> F:
    """Wrap an entry point of the core: arithmetic failures inside become `LayoutValueError`.

    The script's file is taken from a `file` attribute of the first argument (a Program, a
    syntax tree) or a `file`/`path` keyword, when there is one.
    """

    @functools.wraps(func)
    def wrapper(*args: Any, **kwargs: Any) -> Any:
        try:
            return func(*args, **kwargs)
        except LayoutError:
            raise
        except Exception as error:  # noqa: BLE001 - only arithmetic is converted, rest re-raised
            converted = as_arithmetic_error(error, _file_of(args, kwargs))
            if converted is None:
                raise
            raise converted from None

    return wrapper  # type: ignore[return-value]


def _file_of(args: tuple, kwargs: dict) -> str | None:
    for key in ("file", "path"):
        if isinstance(kwargs.get(key), (str, Path)):
            return str(kwargs[key])
    if args:
        first = args[0]
        if isinstance(first, (str, Path)) and str(first).endswith(".lay"):
            return str(first)
        found = getattr(first, "file", None)
        if isinstance(found, str):
            return found
    return None


def unexpected_error(error: BaseException, file: str | None = None,
                     command: str | None = None) -> LayoutError:
    """The front ends' last resort: any exception that is not a `LayoutError` as one message.

    Arithmetic failures are said as such; anything else is an internal error (a bug of
    layoutlang), named with its Python type so it can be reported, never as a traceback.
    """
    if isinstance(error, LayoutError):
        return error
    converted = as_arithmetic_error(error, file)
    if converted is not None:
        return converted
    doing = f" while running '{command}'" if command else ""
    where = f" on {file}" if file else ""
    detail = str(error).splitlines()[0][:200] if str(error) else ""
    message = (f"internal error{doing}{where}: {type(error).__name__}"
               + (f": {detail}" if detail else ""))
    internal = LayoutInternalError(
        message, hint="this is a bug in layoutlang, not in the script; please report it with "
                      "the script that caused it")
    return internal


def quiet_numeric_warnings() -> None:
    """Keep numpy's RuntimeWarnings (overflow, invalid value) off a user's terminal: the exit
    guard says in words what could not be computed. Front ends call this once at start."""
    warnings.filterwarnings("ignore", category=RuntimeWarning)
