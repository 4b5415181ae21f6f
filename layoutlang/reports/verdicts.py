"""The verdicts of the exact-ray report in words: does the paraxial focus, does the paraxial
image height hold for real rays?

The engine (`engines/aberrations.py`) returns the numbers (marginal and chief rows, depth of
focus, Airy radius, the stated tolerance); the words are built here, so a value that cannot be
computed reads as such (`testing.format_number`) and never as 'nan'.
"""

from __future__ import annotations

from typing import Any

from ..engines.firstorder import Unavailable
from ..testing import format_number

__all__ = ["focus_verdict", "height_verdict"]


def _fmt(value: float, units: str) -> str:
    text = format_number(value, 4)
    return text if text.startswith("(") else f"{text} {units}"


def focus_verdict(analysis: Any, units: str) -> str:
    """Whether the real marginal focus stays within half the depth of focus (or the stated
    tolerance) of the paraxial one."""
    rows, dof, tolerance = analysis.marginal, analysis.depth_of_focus, analysis.settings.tolerance
    shifts = [abs(r.longitudinal) for r in rows if not isinstance(r.longitudinal, Unavailable)]
    lost = [r for r in rows if isinstance(r.longitudinal, Unavailable)]
    if not shifts:
        return "no marginal ray reaches the image: the paraxial focus cannot be judged"
    worst = max(shifts)
    if tolerance is not None:
        limit, what = tolerance, f"the stated tolerance {_fmt(tolerance, units)}"
    elif isinstance(dof, Unavailable):
        return f"largest real-minus-paraxial focus {_fmt(worst, units)} (no depth of focus: {dof})"
    else:
        limit, what = dof / 2, (f"half the depth of focus (λ/NA² = {_fmt(dof, units)}, "
                                f"so ±{_fmt(dof / 2, units)})")
    tail = f"; {len(lost)} marginal ray(s) lost" if lost else ""
    if worst != worst or worst == float("inf"):  # not finite: nothing to judge
        return f"the real focus cannot be computed, so the paraxial focus cannot be judged{tail}"
    if not isinstance(dof, Unavailable) and dof:
        # the measure `expect marginal focus shift < N depth of focus` compares
        tail = f"; that is {format_number(worst / dof, 3)} depth of focus" + tail
    if worst <= limit:
        return (f"paraxial focus holds: the real focus stays within {what} "
                f"(largest shift {_fmt(worst, units)}){tail}")
    ratio = worst / limit if limit else float("inf")
    times = f"{format_number(ratio, 3)} times" if ratio != float("inf") else "beyond"
    return (f"paraxial focus does not hold: the real focus moves {_fmt(worst, units)}, "
            f"{times} {what}{tail}")


def height_verdict(analysis: Any, units: str) -> str:
    """Whether real and paraxial chief-ray heights agree within the Airy radius (or the stated
    tolerance)."""
    rows, airy, tolerance = analysis.chief, analysis.airy_radius, analysis.settings.tolerance
    diffs = [abs(r.difference) for r in rows if not isinstance(r.difference, Unavailable)]
    if not diffs:
        return "no chief ray reaches the image: the paraxial image height cannot be judged"
    worst = max(diffs)
    if worst != worst or worst == float("inf"):
        return "the real image height cannot be computed, so the paraxial one cannot be judged"
    if tolerance is not None:
        limit, what = tolerance, f"the stated tolerance {_fmt(tolerance, units)}"
    elif isinstance(airy, Unavailable):
        return f"largest real-minus-paraxial image height {_fmt(worst, units)}"
    else:
        limit, what = airy, f"the Airy radius 0.61 λ/NA = {_fmt(airy, units)}"
    if worst <= limit:
        return f"paraxial image height holds: within {what} (largest {_fmt(worst, units)})"
    return (f"paraxial image height does not hold: real and paraxial heights differ by up to "
            f"{_fmt(worst, units)}, more than {what}")
