"""Labels for the typical syntax mistakes, matched by parser state (lark `match_examples`).

Each label lists a few wrong lines that leave the parser in the state we want to name; any
input failing in the same state gets the same label. Add a line here when users keep making a
mistake the generic "expected ..." message explains badly.
"""

from __future__ import annotations

from functools import cache

from lark.exceptions import UnexpectedInput

__all__ = ["label_for", "EXAMPLES"]

EXAMPLES: dict[str, list[str]] = {
    # radius and curvature leave the parser in the same state, so they share one label
    "a radius or curvature needs a value, e.g. 'radius 52.9', 'radius -38.1 mm' or "
    "'curvature 0.02'": [
        "surface front radius into glass\n",
        "surface radius into glass\n",
        "surface front radius\n",
        "mirror primary radius\n",
        "surface front radius , clear diameter 4\n",
        "surface front curvature into glass\n",
        "surface curvature\n",
        "surface front curvature\n",
        "mirror primary curvature\n",
    ],
    "a surface needs its shape: 'radius R', 'curvature C' or 'flat'": [
        "surface front into glass\n",
        "surface into glass\n",
        "surface front\n",
        "surface\n",
        "mirror\n",
        "mirror m\n",
    ],
    "a gap needs a length, e.g. 'gap 5.2'": ["gap\n"],
    # exact rays (grammar/rays.lark)
    "say which field: 'at field 1', 'at field 0.7' or 'at field 3 deg'": [
        "expect rms spot radius at field < 0.02\n",
        "expect distortion at field\n",
    ],
    "say what to sample: 'sample pupils 1, 0.7', 'sample fields 0, 1' or 'sample grid 17'": [
        "sample\n",
        "sample fields\n",
        "sample pupils\n",
    ],
    "say where the object is: 'object at infinity' or 'object 250 before'": [
        "object 250\n",
        "object\n",
        "object 250 after\n",
    ],
    "say how large the stop is: ', diameter D', ', f-number N' or ', numerical aperture NA'": [
        "stop at front\n",
        "stop at front,\n",
        "stop 3 after front\n",
    ],
    "say where the image plane is: 'image at focus' or 'image 40 after'": [
        "image\n",
        "image 40\n",
        "image at\n",
    ],
    "an expectation compares a quantity with a value, e.g. 'expect focal length = 80 ± 0.5'": [
        "expect focal length 80\n",
        "expect focal length\n",
        "expect\n",
    ],
    "a medium needs its refractive index, e.g. 'medium crown index 1.517'": [
        "medium crown\n",
        "medium crown 1.5\n",
        "medium crown index\n",
    ],
    "name the starting medium, e.g. 'start in air'": ["start\n", "start air\n", "start in\n"],
}


@cache
def _parse_function():
    from .parser import parser

    return parser().parse


def label_for(error: UnexpectedInput, source: str) -> str | None:
    """The label of the typical mistake this error matches, or None.

    Parser states are compared including stack depth, which depends on how many statements
    came before; so the failing line is re-parsed on its own and that error is matched.
    """
    line = getattr(error, "line", 0)
    lines = source.split("\n")
    if not 0 < line <= len(lines):
        return None
    try:
        _parse_function()(lines[line - 1] + "\n")
    except UnexpectedInput as alone:
        try:
            return alone.match_examples(_parse_function(), EXAMPLES, use_accepts=True)
        except Exception:  # a label is a courtesy: never let it hide the real error
            return None
    return None
