"""Benchmark: diffraction MTF of a 10-surface layout at 9 fields x 3 wavelengths on a 128 x 128
pupil grid (FFT 256 x 256), against the bare FFTs of the same 27 grids, measured in one run.

Reported: time of the whole MTF (exact rays aimed at the stop and traced, OPD against the
reference sphere, pupil functions, PSFs by batched FFT, line OTFs, weighting) divided by the time
of one 256 x 256 complex FFT per grid (scipy.fft, the same workers). Goal <= 2.
"""

from __future__ import annotations

import sys
from pathlib import Path

import numpy as np

sys.path.insert(0, str(Path(__file__).resolve().parents[1]))

from _timing import best_of  # noqa: E402
import layoutlang  # noqa: E402
from layoutlang.engines.mtf import transfers  # noqa: E402
from layoutlang.engines.quality import ImageQuality  # noqa: E402
from layoutlang.engines.qualitysettings import QualitySettings  # noqa: E402

SCRIPT = """
units mm
medium crown index 1.5168, abbe number 64.2
medium flint index 1.6200, abbe number 36.4
wavelengths 587.6 nm primary, 486.1 nm, 656.3 nm
object at infinity, field angle 5 deg
start in air
surface s1 radius 60 into crown
gap 4
surface s2 radius -250 into air
gap 2
surface s3 radius 45 into crown
gap 4
surface s4 radius 300 into air
gap 2
surface s5 radius -80 into flint
gap 2
surface s6 radius 40 into air
gap 4
surface s7 radius 120 into crown
gap 4
surface s8 radius -90 into air
gap 2
surface s9 radius 70 into crown
gap 4
surface s10 radius -200 into air
stop 1 before s1, f-number 8
image at focus
"""

FIELDS = tuple(np.linspace(0, 1, 9).tolist())
FREQUENCIES = tuple(np.linspace(0, 100, 11).tolist())
CELLS, REPEATS = 128, 3


def main() -> float:
    from scipy import fft

    program = layoutlang.loads(SCRIPT)

    def whole():
        engine = ImageQuality(program.system, program.rays, QualitySettings(cells=CELLS))
        groups = [[engine.wavefront(f, i) for i in range(3)] for f in FIELDS]
        return transfers(groups, engine.weights(), FREQUENCIES, limit=False)

    found = whole()
    assert all(t.method == "diffraction" for t in found), [t.note for t in found]
    grids = np.zeros((27, 256, 256), dtype=complex)
    grids[:, :CELLS, :CELLS] = 1.0

    def bare():
        fft.fft2(grids, axes=(-2, -1), workers=2)

    t_whole, t_bare = best_of(whole, bare, repeats=REPEATS)
    ratio = t_whole / t_bare
    print(f"MTF, 9 fields x 3 wavelengths, {CELLS}^2 pupil grid (256^2 FFT): "
          f"{t_whole * 1000:.0f} ms; bare FFTs of the same 27 grids: {t_bare * 1000:.1f} ms; "
          f"ratio {ratio:.1f} (goal <= 2)")
    return ratio


if __name__ == "__main__":
    main()
