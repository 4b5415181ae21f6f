"""Ring ratios (symbolic/algebra.py) against sympy's own rational-function arithmetic."""

from __future__ import annotations

from fractions import Fraction

import pytest
import sympy as sp
from hypothesis import given, settings
from hypothesis import strategies as st

from layoutlang.symbolic import flintring
from layoutlang.symbolic.algebra import TooLarge
from layoutlang.symbolic.convert import TooComplex, make_context, to_ratio

# every test runs on sympy's polynomials and, when installed, on python-flint's
BACKENDS = ["sympy"] + (["flint"] if flintring.available() else [])

x, y, z = sp.symbols("x y z")

_atoms = st.sampled_from([x, y, z, x + 1, y - 2 * z, sp.Rational(3, 7), sp.Integer(-2)])


@st.composite
def expressions(draw, depth=3):
    if depth == 0 or draw(st.booleans()):
        return draw(_atoms)
    left, right = draw(expressions(depth - 1)), draw(expressions(depth - 1))
    op = draw(st.sampled_from("+-*/"))
    if op == "/" and sp.cancel(right) == 0:
        op = "*"
    return {"+": left + right, "-": left - right, "*": left * right, "/": left / right}[op]


def _ratio_expr(expr, backend="sympy"):
    ctx = make_context([expr], [x, y, z], backend=backend)
    return to_ratio(ctx, expr)


@pytest.mark.parametrize("backend", BACKENDS)
@settings(max_examples=60, deadline=None)
@given(a=expressions(), b=expressions())
def test_arithmetic_matches_sympy(backend, a, b) -> None:
    ctx = make_context([a, b], [x, y, z], backend=backend)
    ra, rb = to_ratio(ctx, a), to_ratio(ctx, b)
    for got, want in ((ra + rb, a + b), (ra - rb, a - b), (ra * rb, a * b)):
        assert sp.cancel(got.to_expr() - want) == 0
    if sp.cancel(b) != 0:
        assert sp.cancel((ra / rb).to_expr() - a / b) == 0


@pytest.mark.parametrize("backend", BACKENDS)
@settings(max_examples=50, deadline=None)
@given(a=expressions())
def test_canonical_form_is_reduced_and_equal(backend, a) -> None:
    ratio = _ratio_expr(a, backend)
    reduced, proven = ratio.canonical()
    assert sp.cancel(reduced.to_expr() - a) == 0
    if proven:  # numerator and denominator share no factor: same size as sympy's cancel
        num, den = sp.fraction(sp.cancel(sp.together(a)))
        ours_num, ours_den = sp.fraction(sp.together(reduced.to_expr(factor=False)))
        assert sp.Poly(ours_den, x, y, z).total_degree() == sp.Poly(den, x, y, z).total_degree()


@pytest.mark.parametrize("backend", BACKENDS)
@settings(max_examples=50, deadline=None)
@given(a=expressions())
def test_derivative_matches_sympy(backend, a) -> None:
    ratio = _ratio_expr(a, backend)
    gen = ratio.ctx.by_expr[x]
    assert sp.cancel(ratio.derivative(gen).to_expr() - sp.diff(a, x)) == 0


@pytest.mark.parametrize("backend", BACKENDS)
def test_evaluate_is_exact(backend) -> None:
    ratio = _ratio_expr((x + 1) / (3 * y), backend)
    point = {g: Fraction(1, 3) for g in ratio.ctx.ring.gens}
    assert ratio.evaluate(point) == Fraction(4, 3)
    with pytest.raises(ZeroDivisionError):
        ratio.evaluate({g: 0 for g in ratio.ctx.ring.gens})


@pytest.mark.parametrize("backend", BACKENDS)
def test_opaque_parts_become_generators(backend) -> None:
    expr = sp.sqrt(2) * x + sp.tan(y)
    ratio = _ratio_expr(expr, backend)
    assert sp.simplify(ratio.to_expr() - expr) == 0


@pytest.mark.parametrize("backend", BACKENDS)
def test_budgets(backend) -> None:
    with pytest.raises(TooComplex):
        make_context([(x + 1) ** 500], [x], backend=backend)
    ctx = make_context([x, y], [x, y], limit=50, backend=backend)
    big = to_ratio(ctx, x + y)
    with pytest.raises(TooLarge):
        for _ in range(20):
            big = big * big


@pytest.mark.parametrize("backend", BACKENDS)
def test_both_backends_print_the_same_derivation(backend, monkeypatch) -> None:
    from layoutlang import loads
    from layoutlang.symbolic import convert, render

    script = ("symbols R1 R2 real\nsymbols n d a positive\nnominal R1 = 30, R2 = -60, "
              "n = 1.5168, d = 8, a = 120\nmedium glass index n\nobject a before\n"
              "start in air\nsurface radius R1 into glass\ngap d\nsurface radius R2 into air\n"
              "derive focal length, image distance, conjugate equation\n"
              "sensitivity of image distance to d\nsolve R2 so that back focal distance = 30\n")
    monkeypatch.setattr(convert, "BACKEND", "sympy")
    reference = render.text(render.carry_out(loads(script)))
    monkeypatch.setattr(convert, "BACKEND", backend)
    assert render.text(render.carry_out(loads(script))) == reference
