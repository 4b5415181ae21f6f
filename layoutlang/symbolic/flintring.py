"""Optional accelerator: python-flint's C polynomials behind the small interface `Ratio` uses.

`algebra.Ratio` was written against sympy's sparse polynomials (`PolyElement`). When
python-flint is installed, `FlintRing` offers the same few methods over `fmpz_mpoly`, whose
products run in C, about twenty times faster for the matrices of big layouts; results are the
same polynomials, so nothing else changes. Without python-flint sympy's rings are used.
"""

from __future__ import annotations

from typing import Any, Iterator

__all__ = ["available", "FlintRing", "FlintPoly"]


def available() -> bool:
    try:
        import flint  # noqa: F401
    except ImportError:
        return False
    return hasattr(flint, "fmpz_mpoly_ctx")


class FlintRing:
    """The ring of one derivation: generators, constants, polynomials from exponent dicts."""

    def __init__(self, names: list[str]) -> None:
        import flint

        self.ctx = flint.fmpz_mpoly_ctx.get(tuple(names), "lex")
        self.gens = tuple(FlintPoly(g, self) for g in self.ctx.gens())
        self.one = self(1)
        self.zero = self(0)
        self._index = {g: i for i, g in enumerate(self.gens)}

    def __call__(self, value: int) -> "FlintPoly":
        return FlintPoly(self.ctx.constant(int(value)), self)

    def from_dict(self, terms: dict) -> "FlintPoly":
        return FlintPoly(self.ctx.from_dict({m: int(c) for m, c in terms.items()}), self)

    def index(self, gen: "FlintPoly") -> int:
        return self._index[gen]


class FlintPoly:
    """An `fmpz_mpoly` with the methods of sympy's `PolyElement` that `Ratio` calls."""

    __slots__ = ("p", "ring", "_hash")

    def __init__(self, p: Any, ring: FlintRing) -> None:
        self.p, self.ring, self._hash = p, ring, None

    def _other(self, other: Any) -> Any:
        return other.p if isinstance(other, FlintPoly) else int(other)

    # --- arithmetic -----------------------------------------------------------------------
    def __add__(self, other: Any) -> "FlintPoly":
        return FlintPoly(self.p + self._other(other), self.ring)

    __radd__ = __add__

    def __sub__(self, other: Any) -> "FlintPoly":
        return FlintPoly(self.p - self._other(other), self.ring)

    def __rsub__(self, other: Any) -> "FlintPoly":
        return FlintPoly(self._other(other) - self.p, self.ring)

    def __neg__(self) -> "FlintPoly":
        return FlintPoly(-self.p, self.ring)

    def __mul__(self, other: Any) -> "FlintPoly":
        return FlintPoly(self.p * self._other(other), self.ring)

    __rmul__ = __mul__

    def __pow__(self, exponent: int) -> "FlintPoly":
        return FlintPoly(self.p ** exponent, self.ring)

    def mul_term(self, term: tuple) -> "FlintPoly":
        monom, coefficient = term
        return FlintPoly(self.p * self.ring.ctx.from_dict({monom: int(coefficient)}), self.ring)

    # --- facts ----------------------------------------------------------------------------
    def __bool__(self) -> bool:
        return not self.p.is_zero()

    def __len__(self) -> int:
        return len(self.p)

    def __eq__(self, other: Any) -> bool:
        if isinstance(other, FlintPoly):
            return self.p == other.p
        if isinstance(other, int):
            return self.p == self.ring.ctx.constant(other)
        return NotImplemented

    def __hash__(self) -> int:
        if self._hash is None:  # cheap C-side facts; equal polynomials always agree
            self._hash = hash((len(self.p), tuple(self.p.degrees()),
                               int(self.p.leading_coefficient()) if self else 0))
        return self._hash

    def __str__(self) -> str:
        return str(self.p)

    @property
    def LC(self) -> int:  # noqa: N802 — the name sympy uses
        return int(self.p.leading_coefficient())

    @property
    def is_ground(self) -> bool:
        return self.p.is_constant()

    @property
    def is_monomial(self) -> bool:
        return len(self.p) == 1

    def itermonoms(self) -> Iterator[tuple]:
        return (tuple(map(int, m)) for m in self.p.monoms())

    def iterterms(self) -> Iterator[tuple]:
        return ((tuple(map(int, m)), int(c)) for m, c in self.p.terms())

    def itercoeffs(self) -> Iterator[int]:
        return (int(c) for c in self.p.coeffs())

    def lowest(self) -> list[int]:
        """Smallest exponent of each generator over the terms (the monomial content)."""
        return [int(e) for e in self.p.term_content().monoms()[0]]

    def highest(self) -> list[int]:
        return [int(e) for e in self.p.degrees()]

    # --- algebra --------------------------------------------------------------------------
    def content(self) -> int:
        return int(self.p.content())

    def primitive(self) -> tuple[int, "FlintPoly"]:
        content, primitive = self.p.primitive()
        return int(content), FlintPoly(primitive, self.ring)

    def exquo_ground(self, value: int) -> "FlintPoly":
        return FlintPoly(self.p / self.ring.ctx.constant(int(value)), self.ring)

    def factor_list(self) -> tuple[int, list[tuple["FlintPoly", int]]]:
        try:
            coefficient, factors = self.p.factor()
        except OverflowError:  # python-flint sorts the factors by a key that overflows when a
            return self._factor_list_by_sympy()  # coefficient is big: same factors by sympy
        return int(coefficient), [(FlintPoly(f, self.ring), int(e)) for f, e in factors]

    def _factor_list_by_sympy(self) -> tuple[int, list[tuple["FlintPoly", int]]]:
        from sympy import ZZ
        from sympy.polys.orderings import lex
        from sympy.polys.rings import ring

        names = [str(name) for name in self.ring.ctx.names()]
        sympy_ring = ring(names, ZZ, lex)[0]
        terms = {tuple(int(e) for e in m): int(c) for m, c in self.p.to_dict().items()}
        coefficient, factors = sympy_ring.from_dict(terms).factor_list()
        return int(coefficient), [(self.ring.from_dict(dict(f.items())), int(e))
                                  for f, e in factors]

    def div(self, other: "FlintPoly") -> tuple["FlintPoly", "FlintPoly"]:
        quotient, remainder = divmod(self.p, other.p)
        return FlintPoly(quotient, self.ring), FlintPoly(remainder, self.ring)

    def gcd(self, other: "FlintPoly") -> "FlintPoly":
        return FlintPoly(self.p.gcd(other.p), self.ring)

    def diff(self, gen: "FlintPoly") -> "FlintPoly":
        return FlintPoly(self.p.derivative(self.ring.index(gen)), self.ring)
