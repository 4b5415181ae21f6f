"""Property tests: every derived closed form, evaluated at random valid values, equals what the
numeric engine computes for the same layout (firstorder.py, the same paraxial code on floats)."""

from __future__ import annotations

import math

from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from layoutlang import loads
from layoutlang.engines.firstorder import Unavailable, first_order
from layoutlang.symbolic.derive import derive
from layoutlang.symbolic.layout import DERIVABLE

_radius = st.one_of(st.integers(-300, -8), st.integers(8, 300))
_index = st.sampled_from(["1.45", "1.5", "1.62", "1.8", "1.333"])
_gap = st.integers(1, 30)


@st.composite
def layouts(draw):
    """A random layout written with one symbol per number, and its nominal values."""
    count = draw(st.integers(1, 4))
    mirror_at = draw(st.one_of(st.none(), st.integers(0, count - 1)))
    infinite = draw(st.booleans())
    stop_kind = draw(st.sampled_from(["diameter", "f-number", "none"]))
    symbols, nominal, lines = [], [], ["units mm"]
    body = []
    media = ["air"]
    for i in range(count):
        r = f"R{i}"
        symbols.append(r)
        nominal.append(f"{r} = {draw(_radius)}")
        if i == mirror_at:
            body.append(f"mirror s{i} radius {r}")
        else:
            n = f"n{i}"
            symbols.append(n)
            nominal.append(f"{n} = {draw(_index)}")
            body.append(f"medium m{i} index {n}")
            body.append(f"surface s{i} radius {r} into m{i}")
            media.append(f"m{i}")
        if i < count - 1:
            d = f"d{i}"
            symbols.append(d)
            nominal.append(f"{d} = {draw(_gap)}")
            body.append(f"gap {d}")
    if infinite:
        obj = ["object at infinity, field angle 5 deg"]
    else:
        symbols.append("a")
        nominal.append(f"a = {draw(st.integers(15, 900))}")
        obj = ["object a before, height 3"]
    lines += [f"symbols {' '.join(symbols)} real", "nominal " + ", ".join(nominal)]
    lines += obj + ["start in air"] + body
    if stop_kind == "diameter":
        lines.append("stop at s0, diameter 6")
    elif stop_kind == "f-number":
        lines.append("stop at s0, f-number 8")
    return "\n".join(lines) + "\n"


def _close(a: float, b: float) -> bool:
    return math.isclose(a, b, rel_tol=1e-7, abs_tol=1e-7 * (1 + abs(b)))


@settings(max_examples=25, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(layouts())
def test_derived_forms_equal_the_numeric_engine(script: str) -> None:
    program = loads(script)
    numeric = first_order(program.system)
    part = program.symbolic
    compared = 0
    for name in DERIVABLE:
        expected = numeric[name]
        derived = derive(part, name)
        if isinstance(expected, Unavailable):
            continue  # the numeric engine also says "none" near a vanishing denominator
        if derived.unavailable:
            # the closed form says "none" only where the numbers make the layout special
            # (afocal at these values: the numeric engine then gives the afocal value)
            assert numeric.afocal or expected == 0, (name, derived.unavailable)
            continue
        assert derived.nominal_value is not None, name
        assert _close(derived.nominal_value, float(expected)), (name, derived.nominal_value,
                                                                 expected)
        compared += 1
    assert compared >= 8


def test_closed_form_evaluates_like_the_ring_value() -> None:
    # the printed sympy expression and the ring ratio are the same function
    program = loads("symbols R1 R2 n d a positive\nnominal R1 = 40, R2 = 60, n = 1.6, d = 4, "
                    "a = 300\nmedium g index n\nobject a before\nstart in air\n"
                    "surface radius R1 into g\ngap d\nsurface radius -R2 into air\n")
    part = program.symbolic
    for name in ("image distance", "back focal distance", "magnification"):
        d = derive(part, name)
        value = float(d.expr.subs(part.nominal))
        assert _close(value, d.nominal_value)
        assert _close(value, first_order(program.system)[name])


def test_seidel_sums_at_the_nominal_values_are_the_numeric_engines() -> None:
    # Each symbolic third-order sum (engines/seidel.py on exact ratios) evaluated at the
    # nominal values equals the numeric sum of the same layout, symbols in radii, a gap, a
    # conic constant and an r4 coefficient alike.
    import pytest
    import sympy as sp

    from layoutlang import loads
    from layoutlang.engines.seidel import seidel
    from layoutlang.symbolic.derive import derive
    from layoutlang.symbolic.layout import SEIDEL_DERIVABLE

    program = loads("""
symbols R1 t k A positive
nominal R1 = 40, t = 6, k = 0.5, A = 0.000002
medium glass index 1.6
object 300 before, height 5
start in air
surface front radius R1 into glass, conic constant -k, r4 coefficient A
gap t
surface back radius -90 into air
stop at front, diameter 12
image at focus
""")
    part = program.symbolic
    numeric = seidel(program.system)
    point = {s: part.nominal[s] for s in part.symbols}
    for name in SEIDEL_DERIVABLE:
        expr = derive(part, name).expr
        attribute = name.removesuffix(" sum").replace(" ", "_")
        assert float(sp.N(expr.subs(point), 30)) == pytest.approx(numeric.total(attribute),
                                                                   rel=1e-9, abs=1e-15)
