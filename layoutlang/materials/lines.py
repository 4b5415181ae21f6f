"""The standard spectral lines by their conventional letters (d, F, C, e, g, ...).

Wavelengths in nanometres, in standard air, as tabulated for optical glass data (common
practice; e.g. ISO 7944:1998, Optics and optical instruments — Reference wavelengths). A primed
letter is written with an apostrophe: F' and C' (the cadmium lines used with the e line).
"""

from __future__ import annotations

__all__ = ["SPECTRAL_LINES", "LINE_SOURCES", "line_nm", "is_line", "line_letter",
           "colour_pair", "in_vacuum_nm"]

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


def in_vacuum_nm(air_nm: float) -> float:
    """The vacuum wavelength of light whose wavelength in standard air is `air_nm`:
    λ_vacuum = λ_air · n_air(λ_vacuum), n_air from Ciddor (1996) (`dispersion.StandardAir`,
    which takes vacuum wavelengths), solved by fixed-point steps (n_air − 1 ≈ 3e-4, so three
    steps agree to far below 1e-9 nm)."""
    from .dispersion import StandardAir

    air = StandardAir()
    vacuum = air_nm
    for _ in range(4):
        vacuum = air_nm * float(air.index(vacuum / 1000.0))
    return vacuum


def line_nm(letter: str, environment: str = "standard air") -> float:
    """The wavelength of a spectral line in nm, as measured in the layout's surroundings
    (the table is in standard air; `layout in vacuum` takes the vacuum wavelength of the same
    line); KeyError for an unknown letter."""
    if environment == "vacuum":
        return in_vacuum_nm(SPECTRAL_LINES[letter])
    return SPECTRAL_LINES[letter]


def line_letter(nanometres: float, environment: str = "standard air") -> str | None:
    """The letter of the spectral line at this wavelength (in the layout's surroundings), if
    it is one."""
    return next((k for k in SPECTRAL_LINES
                 if abs(line_nm(k, environment) - nanometres) < 5e-5), None)


def colour_pair(wavelengths_nm, environment: str = "standard air"
                ) -> tuple[str | None, float, float] | None:
    """The blue and red ends colour is measured between, from a layout's wavelengths (nm).

    The trade's pairs come first: F and C (around d), then F' and C' (around e), whenever both
    are listed; otherwise the shortest and longest listed. Returns (the middle line's letter or
    None, blue, red), or None with fewer than two wavelengths.
    """
    values = sorted(float(w) for w in wavelengths_nm)
    if len(values) < 2:
        return None

    def listed(letter: str) -> bool:
        return any(abs(w - line_nm(letter, environment)) <= 1e-6 * w for w in values)

    for blue, red, middle in (("F", "C", "d"), ("F'", "C'", "e")):
        if listed(blue) and listed(red):
            return middle, line_nm(blue, environment), line_nm(red, environment)
    return None, values[0], values[-1]
