"""Random layouts compared with the ray-transfer matrices of sympy.physics.optics.

sympy's matrices are an independent implementation (the SymPy Development Team, 2025,
SymPy 1.14, module `sympy.physics.optics.gaussopt`). Conventions differ from ours, so each
element is translated here, in one place:

* sympy acts on (height, angle) with the angle measured along the direction of travel; our
  engine acts on (height, n·u). So ours = diag(1, n_out) · sympy · diag(1, 1/n_in), with
  physical (positive) indices (our signed index N = ±n times the slope dy/dz is n times the
  slope along the travel direction).
* `CurvedRefraction(R, n1, n2)`: R > 0 when the centre of curvature lies downstream along
  the travel direction. Ours: R > 0 when the centre lies in +z. So R_sympy = sense · R_ours,
  with sense = +1 before an odd number of mirrors and -1 after.
* `CurvedMirror(R)`: R > 0 for a mirror concave toward the incoming light (sympy's docstring),
  i.e. the centre lies upstream. So R_sympy = -sense · R_ours.
* `FreeSpace(d)`, `ThinLens(f)`, `FlatRefraction(n1, n2)` need no translation: gaps are
  positive path lengths in both, and a thin lens of focal length f converges for f > 0 in
  either direction of travel.
"""

from __future__ import annotations

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from layoutlang import loads
from layoutlang.engines import paraxial

optics = pytest.importorskip("sympy.physics.optics")

radii = st.floats(5, 500).flatmap(lambda r: st.sampled_from([r, -r]))
indices = st.sampled_from([1.0, 1.33, 1.4585, 1.5168, 1.62, 1.75, 1.9])
gaps = st.floats(0.5, 80)
elements = st.one_of(
    st.tuples(st.just("surface"), radii, indices),
    st.tuples(st.just("flat"), st.just(0.0), indices),
    st.tuples(st.just("mirror"), radii, st.just(0.0)),
    st.tuples(st.just("lens"), st.floats(10, 300).flatmap(lambda f: st.sampled_from([f, -f])),
              st.just(0.0)),
)


def _script_and_sympy(layout):
    """The layoutlang script of a random layout and its sympy matrix (angle form)."""
    lines = ["start in air"]
    media = {}
    product = optics.RayTransferMatrix(1, 0, 0, 1)
    n_current, sense = 1.0, 1
    for i, ((kind, value, index), gap) in enumerate(layout):
        if i:
            lines.append(f"gap {gap!r}")
            product = optics.FreeSpace(gap) * product
        if kind in ("surface", "flat"):
            name = media.setdefault(index, f"m{len(media)}")
            shape = "flat" if kind == "flat" else f"radius {value!r}"
            lines.append(f"surface s{i} {shape} into {name}")
            step = (optics.FlatRefraction(n_current, index) if kind == "flat"
                    else optics.CurvedRefraction(sense * value, n_current, index))
            n_current = index
        elif kind == "mirror":
            lines.append(f"mirror s{i} radius {value!r}")
            step = optics.CurvedMirror(-sense * value)
            sense = -sense
        else:
            lines.append(f"lens s{i} focal length {value!r}")
            step = optics.ThinLens(value)
        product = step * product
    header = [f"medium {name} index {index!r}" for index, name in media.items()]
    return "\n".join(header + lines) + "\n", product, n_current


@settings(max_examples=150, deadline=None)
@given(st.lists(st.tuples(elements, gaps), min_size=1, max_size=6))
def test_random_layouts_match_sympy_ray_transfer_matrices(layout) -> None:
    script, sym, n_out = _script_and_sympy(layout)
    system = loads(script).system
    a, b, c, d = paraxial.matrix(paraxial.steps_of(system))
    n_in = 1.0
    # sympy's y' = A y + B u, u' = C y + D u  →  ours with reduced angles n u:
    # y' = A y + (B / n_in)(n_in u),  n_out u' = n_out C y + (n_out D / n_in)(n_in u)
    expected = (float(sym.A), float(sym.B) / n_in, float(sym.C) * n_out,
                float(sym.D) * n_out / n_in)
    scale = max(1.0, *(abs(v) for v in expected))
    for ours, theirs in zip((a, b, c, d), expected):
        assert ours == pytest.approx(theirs, rel=1e-9, abs=1e-12 * scale)


def test_sympy_translation_on_a_worked_case() -> None:
    # a concave mirror (R = -200 in our +z convention) is CurvedMirror(200) in sympy's:
    # focal length +100 either way (Hecht, 2017, Optics, 5th ed., mirror formula f = -R/2)
    system = loads("start in air\nmirror m radius -200\n").system
    a, b, c, d = paraxial.matrix(paraxial.steps_of(system))
    sym = optics.CurvedMirror(200)
    assert -1 / c == pytest.approx(100.0) and -1 / float(sym.C) == pytest.approx(100.0)
