"""Exact rational functions that stay polynomials until printed, so big layouts derive fast.

A `Ratio` is a numerator polynomial over the integers (a sympy `PolyRing` element) divided by
a product of *atoms* kept apart, each with its exponent. Adding two ratios only needs the least
common multiple of two such products (largest exponent of each atom), so the paraxial trace runs
without a single polynomial gcd: this is the homogeneous reduced-angle matrix product in
disguise. `canonical()` cancels what can be cancelled once at the end, and `to_expr()` makes a
sympy expression only when something is printed.

Only `+ - * /` with ints are supported, which is all `engines.paraxial` uses.
"""

from __future__ import annotations

from fractions import Fraction
from typing import Any

__all__ = ["Ratio", "TooLarge", "RingContext", "FACTOR_ATOM_TERMS"]

#: Atoms with at most this many terms are split into irreducible factors (cheap, and equal
#: factors from different inputs then cancel); larger ones are kept whole.
FACTOR_ATOM_TERMS = 24


class TooLarge(ArithmeticError):
    """A polynomial grew past the size budget of the derivation."""

    def __init__(self, terms: int) -> None:
        super().__init__(f"{terms} terms")
        self.terms = terms


class RingContext:
    """The polynomial ring of one derivation and its size budget.

    Args:
        ring: a sympy `PolyRing` over ZZ whose generators stand for the user's symbols and for
            any opaque sub-expression (sqrt(2), tan(theta)) that is not a rational function.
        meaning: generator → the sympy expression it stands for.
        limit: the largest number of terms any polynomial may reach (None: no limit).
    """

    def __init__(self, ring: Any, meaning: dict[Any, Any], limit: int | None = None) -> None:
        self.ring = ring
        self.meaning = meaning
        self.limit = limit
        self._atom_cache: dict[Any, tuple[int, dict[Any, int]]] = {}
        self.irreducible: set[Any] = set()  # atoms known to be irreducible (factored)
        fast = hasattr(ring, "ctx")  # flintring.FlintRing: gcds in C are cheap
        self.gcd_terms = 200000 if fast else 3000  # trial division / gcd budget (terms)
        self.proof_terms = 200000 if fast else 400  # gcd taken to prove a form reduced

    def check(self, poly: Any) -> Any:
        if self.limit is not None and len(poly) > self.limit:
            raise TooLarge(len(poly))
        return poly

    def constant(self, value: int | Fraction) -> "Ratio":
        value = Fraction(value)
        num = self.ring(value.numerator)
        den = {} if value.denominator == 1 else {self.ring(value.denominator): 1}
        return Ratio(self, num, den)

    def atoms_of(self, poly: Any) -> tuple[int, dict[Any, int]]:
        """Split a nonzero polynomial into sign × integer content × atoms (normalised so equal
        factors get equal keys)."""
        small = len(poly) <= FACTOR_ATOM_TERMS
        cached = self._atom_cache.get(poly) if small else None
        if cached is not None:
            return cached
        ring = self.ring
        sign = 1
        atoms: dict[Any, int] = {}
        if len(poly) <= FACTOR_ATOM_TERMS:
            coefficient, factors = poly.factor_list()
            coefficient = int(coefficient)
            for factor, exponent in factors:
                if factor.LC < 0:
                    factor = -factor
                    if exponent % 2:
                        coefficient = -coefficient
                atoms[factor] = atoms.get(factor, 0) + exponent
                self.irreducible.add(factor)
        else:
            content, primitive = poly.primitive()
            coefficient = int(content)
            if primitive.LC < 0:
                primitive, coefficient = -primitive, -coefficient
            atoms[primitive] = 1
        if coefficient < 0:
            sign, coefficient = -1, -coefficient
        if coefficient != 1:
            atoms[ring(coefficient)] = atoms.get(ring(coefficient), 0) + 1
        result = (sign, atoms)
        if small:
            self._atom_cache[poly] = result
        return result


def _merge(first: dict[Any, int], second: dict[Any, int], sign: int = 1) -> dict[Any, int]:
    merged = dict(first)
    for atom, exponent in second.items():
        total = merged.get(atom, 0) + sign * exponent
        if total:
            merged[atom] = total
        else:
            merged.pop(atom, None)
    return merged


class Ratio:
    """numerator / Π atom^exponent, exact, over the integers."""

    __slots__ = ("ctx", "num", "den")

    def __init__(self, ctx: RingContext, num: Any, den: dict[Any, int] | None = None) -> None:
        self.ctx = ctx
        self.num = num
        self.den = den or {}

    # --- coercion ---------------------------------------------------------------------------
    def _coerce(self, other: Any) -> "Ratio":
        if isinstance(other, Ratio):
            return other
        if isinstance(other, bool):
            raise TypeError("a truth value is not a number")
        if isinstance(other, (int, Fraction)):
            return self.ctx.constant(other)
        if isinstance(other, float) and other.is_integer():
            return self.ctx.constant(int(other))
        return NotImplemented  # type: ignore[return-value]

    def _scaled(self, target: dict[Any, int]) -> Any:
        """The numerator multiplied up to the denominator `target` (a multiple of ours)."""
        factor = None
        for atom, exponent in target.items():
            missing = exponent - self.den.get(atom, 0)
            if missing:
                power = atom**missing if missing > 1 else atom
                factor = power if factor is None else _multiply(factor, power)
        return self.num if factor is None else _multiply(self.num, factor)

    # --- arithmetic -------------------------------------------------------------------------
    def __add__(self, other: Any) -> "Ratio":
        other = self._coerce(other)
        if other is NotImplemented:
            return NotImplemented
        if not other.num:
            return self
        if not self.num:
            return other
        if self.den == other.den:
            return Ratio(self.ctx, self.ctx.check(self.num + other.num), self.den)
        lcm = dict(self.den)
        for atom, exponent in other.den.items():
            if exponent > lcm.get(atom, 0):
                lcm[atom] = exponent
        num = self._scaled(lcm) + other._scaled(lcm)
        return Ratio(self.ctx, self.ctx.check(num), lcm)

    __radd__ = __add__

    def __neg__(self) -> "Ratio":
        return Ratio(self.ctx, -self.num, self.den)

    def __pos__(self) -> "Ratio":
        return self

    def __sub__(self, other: Any) -> "Ratio":
        other = self._coerce(other)
        if other is NotImplemented:
            return NotImplemented
        return self + (-other)

    def __rsub__(self, other: Any) -> "Ratio":
        return (-self) + other

    def __mul__(self, other: Any) -> "Ratio":
        other = self._coerce(other)
        if other is NotImplemented:
            return NotImplemented
        if not self.num or not other.num:
            return Ratio(self.ctx, self.ctx.ring.zero)
        return Ratio(self.ctx, self.ctx.check(_multiply(self.num, other.num)),
                     _merge(self.den, other.den))

    __rmul__ = __mul__

    def inverse(self) -> "Ratio":
        if not self.num:
            raise ZeroDivisionError("division by an expression that is identically zero")
        sign, atoms = self.ctx.atoms_of(self.num)
        num = self.ctx.ring.one
        for atom, exponent in self.den.items():
            num = _multiply(num, atom**exponent)
        return Ratio(self.ctx, num if sign > 0 else -num, atoms)

    def __truediv__(self, other: Any) -> "Ratio":
        other = self._coerce(other)
        if other is NotImplemented:
            return NotImplemented
        return self * other.inverse()

    def __rtruediv__(self, other: Any) -> "Ratio":
        return self._coerce(other) * self.inverse()

    def __pow__(self, exponent: int) -> "Ratio":
        if not isinstance(exponent, int):
            return NotImplemented
        base = self if exponent >= 0 else self.inverse()
        result = self.ctx.constant(1)
        for _ in range(abs(exponent)):
            result = result * base
        return result

    # --- facts ------------------------------------------------------------------------------
    def is_zero(self) -> bool:
        return not self.num

    def terms(self) -> int:
        """Terms of the expanded numerator plus those of the denominator's atoms."""
        return len(self.num) + sum(len(atom) for atom in self.den)

    def free_generators(self) -> set[Any]:
        found = set()
        for poly in (self.num, *self.den):
            for monom in poly.itermonoms():
                for gen, power in zip(self.ctx.ring.gens, monom):
                    if power:
                        found.add(gen)
        return found

    # --- canonical form and conversion ------------------------------------------------------
    def canonical(self, gcd_terms: int | None = None) -> tuple["Ratio", bool]:
        """Cancel every common factor that can be found cheaply.

        Atoms that are single generators cancel by exponent counting, integer atoms by the
        content, other atoms by exact trial division; a full gcd is taken only for atoms and
        numerators below `gcd_terms` terms. Returns the reduced ratio and whether it is proven
        fully reduced (coprime numerator and denominator).
        """
        ring = self.ctx.ring
        if gcd_terms is None:
            gcd_terms = self.ctx.gcd_terms
        num = self.num
        if not num:
            return Ratio(self.ctx, ring.zero), True
        den = dict(self.den)
        proven = True
        # integer atoms: one integer denominator, cancelled against the content
        integer = 1
        for atom in [a for a in den if a.is_ground]:
            integer *= int(atom.LC) ** den.pop(atom)
        content = int(num.content())
        from math import gcd

        common = gcd(content, integer)
        if common > 1:
            num = num.exquo_ground(common) if hasattr(num, "exquo_ground") else num.quo_ground(common)
            integer //= common
        # atoms that are one generator: cancel by exponent counting, all in one pass
        lowest = _lowest(num)
        shift = [0] * len(lowest)
        for atom in [a for a in den if len(a) == 1 and a.is_monomial and a.LC == 1]:
            (monom,) = atom.itermonoms()
            if sum(monom) != 1:
                continue
            position = monom.index(1)
            cancel = min(den[atom], lowest[position] - shift[position])
            if cancel > 0:
                shift[position] += cancel
                if den[atom] == cancel:
                    del den[atom]
                else:
                    den[atom] -= cancel
        if any(shift):
            num = _shift_down(num, shift)
        highest = _highest(num)
        for atom in list(den):
            if len(atom) == 1 and atom.is_monomial:
                continue
            exponent = den[atom]
            while exponent:
                degrees = _highest(atom)
                if any(a > h for a, h in zip(degrees, highest)):
                    # the atom cannot divide the numerator; an irreducible one is then coprime
                    if atom not in self.ctx.irreducible:
                        small = len(num) + len(atom) <= self.ctx.proof_terms
                        proven = proven and small and num.gcd(atom) == 1
                    break
                if len(atom) <= gcd_terms and len(num) <= 50 * gcd_terms:
                    quotient, remainder = num.div(atom)
                    if remainder:
                        if atom not in self.ctx.irreducible:
                            proven = proven and len(num) <= gcd_terms and num.gcd(atom) == 1
                        break
                    num = quotient
                    highest = _highest(num)
                else:
                    proven = False
                    break
                exponent -= 1
            if exponent:
                den[atom] = exponent
            else:
                del den[atom]
        if integer != 1:
            den[ring(integer)] = 1
        return Ratio(self.ctx, num, den), proven

    def to_expr(self, factor: bool = True) -> Any:
        """The sympy expression (factored where small)."""
        import sympy as sp

        meaning = self.ctx.meaning

        def expr_of(poly: Any, split: bool) -> Any:
            if split and 1 < len(poly) <= 60:
                coefficient, factors = poly.factor_list()
                value = sp.Integer(int(coefficient))
                for part, exponent in factors:
                    value *= sp.Pow(_as_expr(part, meaning), exponent)
                return value
            return _as_expr(poly, meaning)

        num, den = self._fewest_minus_signs()
        numerator = expr_of(num, factor)
        denominator = sp.Integer(1)
        for atom in sorted(den, key=lambda a: (len(a), str(a))):
            denominator *= sp.Pow(expr_of(atom, factor), den[atom])
        return numerator / denominator

    def _fewest_minus_signs(self) -> tuple[Any, dict[Any, int]]:
        """The same ratio with the sign moved between the numerator and one odd-power
        denominator factor where that leaves fewer minus signs to read."""
        def minus(poly: Any) -> int:
            return sum(1 for c in poly.itercoeffs() if c < 0)

        num, den = self.num, dict(self.den)
        total = minus(num) + sum(minus(atom) for atom in den)
        best = None
        for atom in sorted(den, key=lambda a: (-len(a), str(a))):
            if den[atom] % 2 and len(atom) > 1:
                flipped = total - minus(num) - minus(atom) + minus(-num) + minus(-atom)
                if flipped < total and (best is None or flipped < best[0]):
                    best = (flipped, atom)
        if best is not None:
            atom = best[1]
            den[-atom] = den.pop(atom)
            num = -num
        return num, den

    def evaluate(self, values: dict[Any, Any]) -> Any:
        """The value with every generator replaced (Fractions give an exact Fraction; any
        float makes a float). Raises ZeroDivisionError where the denominator vanishes."""
        point = [values[gen] for gen in self.ctx.ring.gens]
        num = _evaluate_poly(self.num, point)
        den: Any = 1
        for atom, exponent in self.den.items():
            den = den * _evaluate_poly(atom, point) ** exponent
        if den == 0:
            raise ZeroDivisionError("the denominator vanishes at these values")
        return num / den if not isinstance(num, int) or not isinstance(den, int) else Fraction(num, den)

    def derivative(self, gen: Any) -> "Ratio":
        """The exact partial derivative with respect to one generator."""
        ctx = self.ctx
        result = Ratio(ctx, ctx.check(self.num.diff(gen)), self.den)
        for atom, exponent in self.den.items():
            slope = atom.diff(gen)
            if slope:
                result = result - Ratio(ctx, ctx.check(self.num * slope) * exponent,
                                        _merge(self.den, {atom: 1}))
        return result


def _lowest(poly: Any) -> list[int]:
    if hasattr(poly, "lowest"):  # flintring.FlintPoly: computed in C
        return poly.lowest()
    return [min(column) for column in zip(*poly.itermonoms())]


def _highest(poly: Any) -> list[int]:
    if hasattr(poly, "highest"):
        return poly.highest()
    return [max(column) for column in zip(*poly.itermonoms())]


def _shift_down(poly: Any, shift: list[int]) -> Any:
    """poly divided by the monomial with exponents `shift` (known to divide it)."""
    if hasattr(poly, "lowest"):
        quotient, _ = poly.div(poly.ring.from_dict({tuple(shift): 1}))
        return quotient
    return poly.ring.from_dict({tuple(m - s for m, s in zip(monom, shift)): c
                                for monom, c in poly.iterterms()})


def _multiply(p: Any, q: Any) -> Any:
    """p·q, by shifting exponents when one side is a single term (most products here)."""
    if hasattr(p, "lowest"):  # flintring.FlintPoly: the C product is already fast
        return p * q
    if len(q) == 1:
        return p.mul_term(next(iter(q.items())))
    if len(p) == 1:
        return q.mul_term(next(iter(p.items())))
    return p * q


def _evaluate_poly(poly: Any, point: list[Any]) -> Any:
    total: Any = 0
    for monom, coefficient in poly.iterterms():
        term: Any = int(coefficient)
        for value, power in zip(point, monom):
            if power:
                term = term * value**power
        total = total + term
    return total


def _as_expr(poly: Any, meaning: dict[Any, Any]) -> Any:
    import sympy as sp

    symbols = [meaning[gen] for gen in poly.ring.gens]
    terms = []
    for monom, coefficient in poly.iterterms():
        factors = [sp.Integer(int(coefficient))]
        for symbol, power in zip(symbols, monom):
            if power:
                factors.append(symbol**power)
        terms.append(sp.Mul(*factors))
    return sp.Add(*terms)
