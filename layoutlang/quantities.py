"""The first-order quantities a script can report and expect, named in plain words.

One table: the name used in scripts and reports, what kind of value it is (which fixes its
unit), and one line saying what it means in our sign convention. To add a quantity, compute it
in `engines/firstorder.py` under the same name and add a row here.
"""

from __future__ import annotations

import difflib
from dataclasses import dataclass

__all__ = ["QuantityInfo", "QUANTITIES", "ALIASES", "lookup", "REPORT_ORDER", "RAY_QUANTITIES", "PERCENT",
           "FIELD_DEFAULTS", "BEAM_QUANTITIES", "BEAM_PLACED", "ANGLE", "DECIBEL", "DEGREES",
           "WAVELENGTH_PLACED"]

LENGTH, POWER, NUMBER = "length", "power", "number"
DEGREES = "degrees"  # an angle kept in radians, shown and written in degrees
PERCENT = "percent"  # kept as a fraction, shown and written in percent
ANGLE = "angle"  # kept in radians, shown in mrad
DECIBEL = "decibel"  # a ratio in dB


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

#: Quantities of the exact ray trace and the third-order sums (engines/rayquantities.py).
_RAY_ROWS = [
    ("marginal focus shift", LENGTH, "real focus of the full-aperture marginal ray minus the "
                                     "paraxial focus, along the path (longitudinal spherical)"),
    ("transverse spherical aberration", LENGTH, "height of the full-aperture marginal ray on "
                                                "the paraxial focal plane"),
    ("best focus shift", LENGTH, "plane of least RMS spot (axial bundle) minus the paraxial focus"),
    ("depth of focus", LENGTH, "wavelength / NA² (the paraxial focus is judged against half)"),
    ("rms spot radius", LENGTH, "RMS radius about the centroid on the image plane, at a field"),
    ("largest spot radius", LENGTH, "largest ray distance from the centroid, at a field"),
    ("real image height", LENGTH, "real chief ray height on the image plane, at a field"),
    ("distortion", PERCENT, "(real - paraxial chief ray height) / paraxial, at a field"),
    ("spherical sum", LENGTH, "Seidel sum S I (third-order spherical aberration)"),
    ("coma sum", LENGTH, "Seidel sum S II (third-order coma)"),
    ("astigmatism sum", LENGTH, "Seidel sum S III (third-order astigmatism)"),
    ("field curvature sum", LENGTH, "Seidel sum S IV (Petzval field curvature)"),
    ("distortion sum", LENGTH, "Seidel sum S V (third-order distortion)"),
    ("axial colour sum", LENGTH, "first-order longitudinal chromatic sum C I"),
    ("lateral colour sum", LENGTH, "first-order transverse chromatic sum C II"),
    ("petzval radius", LENGTH, "radius of the Petzval surface, + when its centre is downstream"),
    # surfaces placed in space (engines/placed.py)
    ("axis turn", DEGREES, "angle between the object-space and the image-space axis (the folds)"),
    ("beam deviation", DEGREES, "angle the real axial ray turns by through the whole layout"),
    ("prism deviation", DEGREES, "angle the real axial ray turns by through the (first) prism"),
    ("image tilt", DEGREES, "tilt of the image plane from square to the image-space axis"),
    ("image shift", LENGTH, "real axial ray on the image plane, from the image-space axis"),
    ("parabasal focal length", LENGTH, "focal length about the real axial ray (y plane)"),
    ("parabasal back focal distance", LENGTH, "last surface to the parabasal focus, along the "
                                              "real axial ray"),
]

#: Placement quantities that take `at wavelength W` (engines/placed.py).
WAVELENGTH_PLACED = frozenset({"beam deviation", "prism deviation"})

#: The field (fraction of the full field) a field-dependent ray quantity is taken at when the
#: script does not say `at field ...`.
FIELD_DEFAULTS = {"rms spot radius": 0.0, "largest spot radius": 0.0,
                  "real image height": 1.0, "distortion": 1.0}

RAY_QUANTITIES = frozenset(name for name, _, _ in _RAY_ROWS)

QUANTITIES: dict[str, QuantityInfo] = {name: QuantityInfo(name, kind, meaning)
                                       for name, kind, meaning in _ROWS + _RAY_ROWS}

#: Chromatic quantities (engines/chromatic.py), taken with qualifiers: `of MEDIUM`,
#: `at wavelength W`, `between W and W`, `across W, W and W`. Not in the first-order report.
_COLOUR_ROWS = [
    ("refractive index", NUMBER, "index of a medium at a wavelength (default the primary)"),
    ("abbe number", NUMBER, "(n2 - 1)/(n1 - n3) of a medium across three wavelengths "
                            "(default F, d, C: the Abbe number vd; 'at e' uses F', e, C')"),
    ("relative partial dispersion", NUMBER, "(nx - ny)/(nF - nC) of a medium between x and y "
                                            "(default g and F)"),
    ("axial colour", LENGTH, "image distance at the first wavelength minus at the second "
                             "(default: shortest minus longest)"),
    ("lateral colour", LENGTH, "chief ray height on the image plane at the first wavelength "
                               "minus at the second (default: shortest minus longest)"),
    ("secondary spectrum", LENGTH, "mean image distance of the outer two of three wavelengths "
                                   "minus that of the middle one (default: shortest, primary, "
                                   "longest)"),
]
QUANTITIES.update({name: QuantityInfo(name, kind, meaning) for name, kind, meaning in _COLOUR_ROWS})

#: Quantities of one surface (engines/buildable.py), taken `of NAME`; not in the report.
_SURFACE_ROWS = [
    ("edge thickness", LENGTH, "thickness along the path from the surface to the next at the "
                               "element's edge (the larger clear or drawn semi-aperture)"),
    ("sag", LENGTH, "height of the surface above its vertex plane at its clear (or drawn) "
                    "semi-aperture, + downstream"),
]
QUANTITIES.update({name: QuantityInfo(name, kind, meaning)
                   for name, kind, meaning in _SURFACE_ROWS})

#: Gaussian-beam quantities (engines/beams.py): they need a `beam`; the coupling ones a
#: `fibre`. BEAM_PLACED are taken at a place: `at NAME` (a boundary, `image`, or a length
#: named with `let`, after the last boundary) or `at D after`.
_BEAM_ROWS = [
    ("waist position", LENGTH, "the output beam's waist after the last boundary, + downstream "
                               "(negative: a virtual waist upstream)"),
    ("waist radius", LENGTH, "1/e² intensity radius of the output beam's waist"),
    ("rayleigh range", LENGTH, "distance from the output waist at which the beam area doubles"),
    ("divergence", ANGLE, "far-field half-angle of the output beam (1/e² radius), in mrad"),
    ("beam radius", LENGTH, "1/e² intensity radius of the beam at a place"),
    ("wavefront radius", LENGTH, "radius of the beam's wavefront at a place, + diverging "
                                 "(centre upstream)"),
    ("power passed", PERCENT, "share of the beam's power inside the clear apertures (all, or "
                              "at one boundary): 1 − exp(−2a²/w²) each"),
    ("coupling efficiency", PERCENT, "power coupled into the fibre's mode (overlap of the "
                                     "two Gaussian modes, with offset and tilt)"),
    ("coupling loss", DECIBEL, "−10·log10 of the coupling efficiency, in dB"),
]
BEAM_QUANTITIES = frozenset(name for name, _, _ in _BEAM_ROWS)
BEAM_PLACED = frozenset({"beam radius", "wavefront radius", "power passed"})
QUANTITIES.update({name: QuantityInfo(name, kind, meaning) for name, kind, meaning in _BEAM_ROWS})

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
    "focus shift": "marginal focus shift",
    "longitudinal spherical aberration": "marginal focus shift",
    "spot radius": "rms spot radius",
    "petzval field radius": "petzval radius",
    "axial color sum": "axial colour sum",
    "lateral color sum": "lateral colour sum",
}

ALIASES.update({
    "index": "refractive index",
    "axial color": "axial colour",
    "longitudinal colour": "axial colour",
    "longitudinal color": "axial colour",
    "longitudinal chromatic aberration": "axial colour",
    "lateral color": "lateral colour",
    "transverse colour": "lateral colour",
    "transverse color": "lateral colour",
    "transverse chromatic aberration": "lateral colour",
    "partial dispersion": "relative partial dispersion",
    "far-field divergence": "divergence",
    "beam divergence": "divergence",
    "output waist position": "waist position",
    "output waist radius": "waist radius",
    "spot size": "beam radius",
    "coupling": "coupling efficiency",
    "transmitted power": "power passed",
})

#: The order of the first-order report.
REPORT_ORDER = [name for name, _, _ in _ROWS]


def lookup(words: str) -> QuantityInfo | None:
    """The quantity with these words (or an alias), else None."""
    name = ALIASES.get(words, words)
    return QUANTITIES.get(name)


def suggestion(words: str) -> str | None:
    close = difflib.get_close_matches(words, list(QUANTITIES) + list(ALIASES), n=1, cutoff=0.5)
    return close[0] if close else None
