"""What the image-quality engines sample and what the script asks of them: small values with no
numpy import, so the interpreter can carry a script's choices without loading the engines."""

from __future__ import annotations

from dataclasses import dataclass

__all__ = ["Sensor", "QualitySettings", "QualityRequest", "DEFAULT_CELLS"]

#: pupil grid cells across the stop diameter when the script does not say `wavefront grid N`
DEFAULT_CELLS = 64


@dataclass(frozen=True)
class Sensor:
    """A rectangular sensor centred on the axis (layout units)."""

    width: float
    height: float
    pitch: float

    @property
    def nyquist(self) -> float:
        """1/(2 × pixel pitch), cycles per layout unit."""
        return 1.0 / (2.0 * self.pitch)

    @property
    def half_diagonal(self) -> float:
        return 0.5 * (self.width ** 2 + self.height ** 2) ** 0.5

    def place(self, where: str) -> float:
        """Image height of a named place: corner (half the diagonal), edge (half the width),
        top (half the height), centre (the axis)."""
        return {"corner": self.half_diagonal, "edge": 0.5 * self.width,
                "top": 0.5 * self.height, "centre": 0.0}[where]


@dataclass(frozen=True)
class QualitySettings:
    """Pupil grid cells across, wavelength weights (in the order of `wavelengths`, None: all
    equal), and the sensor (None when the script declares none)."""

    cells: int = DEFAULT_CELLS
    weights: tuple[float, ...] | None = None
    sensor: Sensor | None = None


@dataclass(frozen=True)
class QualityRequest:
    """One image-quality quantity with its qualifiers, values already in layout units.

    Attributes:
        name: the quantity ('mtf', 'wavefront error rms', 'strehl ratio', ...).
        field: field fraction, or None when it is set by `image_height` (sensor places).
        image_height: an image height (layout units) the field is solved for, or None.
        wavelength: layout units, or None (the primary; MTF: every wavelength, weighted).
        frequency: cycles per layout unit (MTF).
        orientation: 'tangential', 'sagittal' or None (the lower of the two).
        size: radius or square width (energies), or the energy fraction (radius for).
        term: Noll index (Zernike).
        label: the words for reports.
    """

    name: str
    field: float | None = 0.0
    image_height: float | None = None
    wavelength: float | None = None
    frequency: float | None = None
    orientation: str | None = None
    size: float | None = None
    term: int | None = None
    label: str = ""

    def describe(self) -> str:
        return self.label or self.name
