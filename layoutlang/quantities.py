"""The first-order quantities a script can report and expect, named in plain words.

One table: the name used in scripts and reports, what kind of value it is (which fixes its
unit), and one line saying what it means in our sign convention. To add a quantity, compute it
in `engines/firstorder.py` under the same name and add a row here.
"""

from __future__ import annotations

import difflib
from dataclasses import dataclass

__all__ = ["QuantityInfo", "QUANTITIES", "ALIASES", "lookup", "REPORT_ORDER"]

LENGTH, POWER, NUMBER = "length", "power", "number"


@dataclass(frozen=True)
class QuantityInfo:
    name: str
    kind: str  # LENGTH | POWER | NUMBER
    meaning: str


_ROWS = [
    ("power", POWER, "optical power of the whole layout (diopters)"),
    ("focal length", LENGTH, "image-side effective focal length n'/power"),
    ("object focal length", LENGTH, "object-side effective focal length n/power"),
    ("effective focal length", LENGTH, "1/power, the focal length reduced to air"),
    ("back focal distance", LENGTH, "last vertex to the back focal point, + downstream"),
    ("front focal distance", LENGTH, "front focal point to the first vertex, + when before it"),
    ("front principal point", LENGTH, "position after the first vertex"),
    ("back principal point", LENGTH, "position after the last vertex"),
    ("front nodal point", LENGTH, "position after the first vertex"),
    ("back nodal point", LENGTH, "position after the last vertex"),
    ("afocal angular magnification", NUMBER, "angular magnification of an afocal layout"),
    ("image distance", LENGTH, "last vertex to the paraxial image, + real (downstream)"),
    ("image position", LENGTH, "paraxial image along z from the first vertex"),
    ("image height", LENGTH, "paraxial image height, negative when inverted"),
    ("magnification", NUMBER, "lateral magnification, negative when inverted"),
    ("angular magnification", NUMBER, "ratio of image to object ray slopes"),
    ("longitudinal magnification", NUMBER, "axial shift of the image per axial object shift"),
    ("entrance pupil position", LENGTH, "position after the first vertex"),
    ("entrance pupil diameter", LENGTH, "diameter of the stop's image in object space"),
    ("exit pupil position", LENGTH, "position after the last vertex"),
    ("exit pupil diameter", LENGTH, "diameter of the stop's image in image space"),
    ("stop diameter", LENGTH, "diameter of the aperture stop"),
    ("f-number", NUMBER, "working f-number 1/(2 n' u') of the image-side cone"),
    ("numerical aperture", NUMBER, "image-side numerical aperture n' u'"),
    ("object numerical aperture", NUMBER, "object-side numerical aperture n u"),
    ("lagrange invariant", LENGTH, "n u y(chief) - n u(chief) y, in length units"),
    ("axial length", LENGTH, "first vertex to last vertex along the path"),
    ("total length", LENGTH, "first vertex to the image plane along the path"),
    ("image plane distance", LENGTH, "last vertex to the image plane"),
    ("defocus", LENGTH, "paraxial image minus image plane, along the path"),
]

QUANTITIES: dict[str, QuantityInfo] = {name: QuantityInfo(name, kind, meaning)
                                       for name, kind, meaning in _ROWS}

#: Other words people use for the same quantity.
ALIASES = {
    "efl": "effective focal length",
    "image focal length": "focal length",
    "bfd": "back focal distance",
    "ffd": "front focal distance",
    "lateral magnification": "magnification",
    "working f-number": "f-number",
    "image numerical aperture": "numerical aperture",
    "track length": "total length",
}

#: The order of the first-order report.
REPORT_ORDER = [name for name, _, _ in _ROWS]


def lookup(words: str) -> QuantityInfo | None:
    """The quantity with these words (or an alias), else None."""
    name = ALIASES.get(words, words)
    return QUANTITIES.get(name)


def suggestion(words: str) -> str | None:
    close = difflib.get_close_matches(words, list(QUANTITIES) + list(ALIASES), n=1, cutoff=0.5)
    return close[0] if close else None
