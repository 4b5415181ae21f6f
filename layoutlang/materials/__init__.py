"""Real materials: dispersion models, the standard spectral lines and the air around a layout.

`dispersion` holds the models (constant, glass from nd and νd, Sellmeier, Cauchy, table, standard air),
`lines` the conventional letters of the spectral lines, `environment` the choice between a
layout in standard air and one in vacuum. All models evaluate numpy arrays of wavelengths.
"""

from __future__ import annotations

__all__: list[str] = []
