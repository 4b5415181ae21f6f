"""The standard spectral lines by their conventional letters (d, F, C, e, g, ...).

Wavelengths in nanometres, in standard air, as tabulated for optical glass data (common
practice; e.g. ISO 7944:1998, Optics and optical instruments — Reference wavelengths). A primed
letter is written with an apostrophe: F' and C' (the cadmium lines used with the e line).
"""

from __future__ import annotations

__all__ = ["SPECTRAL_LINES", "LINE_SOURCES", "line_nm", "is_line", "line_letter",
           "colour_pair"]

#: letter → wavelength in nm (standard air).
SPECTRAL_LINES: dict[str, float] = {
    "i": 365.0146,
    "h": 404.6561,
    "g": 435.8343,
    "F'": 479.9914,
    "F": 486.1327,
    "e": 546.0740,
    "d": 587.5618,
    "D": 589.2938,
    "C'": 643.8469,
    "C": 656.2725,
    "r": 706.5188,
    "s": 852.11,
    "t": 1013.98,
}

#: letter → the element whose emission line it is (for reports and the README).
LINE_SOURCES: dict[str, str] = {
    "i": "mercury", "h": "mercury", "g": "mercury", "F'": "cadmium", "F": "hydrogen",
    "e": "mercury", "d": "helium", "D": "sodium (mean of the doublet)", "C'": "cadmium",
    "C": "hydrogen", "r": "helium", "s": "caesium", "t": "mercury",
}


def is_line(letter: str) -> bool:
    """Whether `letter` names a standard spectral line (case matters: d and D differ)."""
    return letter in SPECTRAL_LINES


def line_nm(letter: str) -> float:
    """The wavelength of a spectral line in nm; KeyError for an unknown letter."""
    return SPECTRAL_LINES[letter]


def line_letter(nanometres: float) -> str | None:
    """The letter of the spectral line at this wavelength, if it is one."""
    return next((k for k, v in SPECTRAL_LINES.items() if abs(v - nanometres) < 5e-5), None)


def colour_pair(wavelengths_nm) -> tuple[str | None, float, float] | None:
    """The blue and red ends colour is measured between, from a layout's wavelengths (nm).

    The trade's pairs come first: F and C (around d), then F' and C' (around e), whenever both
    are listed; otherwise the shortest and longest listed. Returns (the middle line's letter or
    None, blue, red), or None with fewer than two wavelengths.
    """
    values = sorted(float(w) for w in wavelengths_nm)
    if len(values) < 2:
        return None

    def listed(letter: str) -> bool:
        return any(abs(w - SPECTRAL_LINES[letter]) <= 1e-6 * w for w in values)

    for blue, red, middle in (("F", "C", "d"), ("F'", "C'", "e")):
        if listed(blue) and listed(red):
            return middle, SPECTRAL_LINES[blue], SPECTRAL_LINES[red]
    return None, values[0], values[-1]
