"""The paraxial engine: one algorithm over plain arithmetic.

Rays are traced in reduced form, height y and reduced angle nu = n·u (u the slope along the
direction of travel), through a sequence of steps:

    refraction  nu' = nu - y·phi      phi = c·(N' - N) with signed indices N = ±n
    transfer    y'  = y + tau·nu      tau = gap / n  (always positive)

Inside the engine an index carries the sense of travel (negative after an odd number of
mirrors), so a mirror is a refraction into -N. Only `+ - * /` are used, so the same code runs on
floats, numpy arrays (vectorized over samples) and sympy expressions. Every first-order quantity
is then a formula over the 2×2 system matrix (A B; C D), written once in `formulas`.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any, Sequence

from ..system import IDEAL, MIRROR, System

__all__ = [
    "Step", "REFRACTION", "TRANSFER", "steps_of", "trace", "trace_samples", "matrix",
    "Split", "split_at_stop", "formulas", "gaussian",
]

Number = Any
REFRACTION, TRANSFER = "refraction", "transfer"


@dataclass(frozen=True)
class Step:
    kind: str  # REFRACTION or TRANSFER
    value: Number  # phi for a refraction, tau for a transfer


def signed_indices(system: System) -> list[Number]:
    """The index of each space carrying the sense of travel (object space first)."""
    return [sense * n for sense, n in zip(system.directions(), system.indices())]


def thin_lens_power(signed_index: Number, sense: int, power: Number) -> Number:
    """The reduced power of an ideal thin lens in a space of `signed_index` crossed in
    `sense` (±1): a thin lens converges whichever way the light crosses it, so it takes the
    physical index |N| = sense·N, not the signed one."""
    return signed_index * power if sense > 0 else -signed_index * power


def surface_powers(system: System) -> list[Number]:
    """The reduced power phi of each boundary."""
    indices = signed_indices(system)
    senses = system.directions()
    powers = []
    for i, boundary in enumerate(system.boundaries):
        before, after = indices[i], indices[i + 1]
        if boundary.kind == IDEAL:
            powers.append(thin_lens_power(before, senses[i], boundary.power))
        elif boundary.kind == MIRROR:
            powers.append(boundary.curvature * (-before - before))
        else:
            powers.append(boundary.curvature * (after - before))
    return powers


def reduced_gaps(system: System) -> list[Number]:
    """tau = gap / n for each gap (n the physical index of the space it crosses)."""
    indices = system.indices()
    return [gap / indices[i + 1] for i, gap in enumerate(system.gaps)]


def steps_of(system: System) -> list[Step]:
    """The whole layout as steps, first vertex to last vertex."""
    steps: list[Step] = []
    taus = reduced_gaps(system)
    for i, phi in enumerate(surface_powers(system)):
        steps.append(Step(REFRACTION, phi))
        if i < len(taus):
            steps.append(Step(TRANSFER, taus[i]))
    return steps


def trace(y: Number, nu: Number, steps: Sequence[Step]) -> tuple[Number, Number]:
    """Trace a paraxial ray (or many at once) through the steps.

    numpy arrays given as `y`/`nu` are updated in place (pass copies to keep them); the
    in-place form lets a caller stream large sample sets through cache-sized chunks.
    """
    for step in steps:
        if step.kind is TRANSFER:
            y += step.value * nu
        else:
            nu -= step.value * y
    return y, nu


def trace_samples(y, nu, steps: Sequence[Step], chunk: int = 16384):
    """Trace many rays (numpy arrays) through the steps, streaming cache-sized chunks.

    Step values may be scalars or arrays of the same length as the rays (one layout per
    sample, e.g. Monte-Carlo tolerance samples). Returns new arrays; the inputs are kept.
    """
    import numpy as np

    y = np.array(y, dtype=float, copy=True)
    nu = np.array(nu, dtype=float, copy=True)
    per_sample = [np.ndim(step.value) > 0 for step in steps]
    varying = any(per_sample)
    for start in range(0, len(y), chunk):
        window = slice(start, start + chunk)
        part = steps
        if varying:
            part = [Step(step.kind, step.value[window]) if sliced else step
                    for step, sliced in zip(steps, per_sample)]
        trace(y[window], nu[window], part)
    return y, nu


def matrix(steps: Sequence[Step]) -> tuple[Number, Number, Number, Number]:
    """The system matrix (A, B, C, D): (y', nu') = (A y + B nu, C y + D nu)."""
    a, c = trace(1, 0, steps)
    b, d = trace(0, 1, steps)
    return a, b, c, d


@dataclass(frozen=True)
class Split:
    """The layout cut at the stop plane: first vertex → stop, and stop → last vertex."""

    front: list[Step]
    back: list[Step]


def split_at_stop(system: System) -> Split:
    """Cut the steps at the stop plane (which may lie inside a gap or in object space)."""
    stop = system.stop
    assert stop is not None
    indices = system.indices()
    steps = steps_of(system)
    if stop.after < 0:  # in object space: a (backward) free-space transfer from the first vertex
        lead = stop.offset / indices[0]
        return Split([Step(TRANSFER, lead)], [Step(TRANSFER, -lead)] + steps)
    cut = 2 * stop.after + 1  # the steps up to and including boundary `after`
    into = stop.offset / indices[stop.after + 1]
    if stop.after == len(system.boundaries) - 1:  # in image space, after the last vertex
        return Split(steps + [Step(TRANSFER, into)], [Step(TRANSFER, -into)])
    rest = steps[cut].value - into
    return Split(steps[:cut] + [Step(TRANSFER, into)], [Step(TRANSFER, rest)] + steps[cut + 1 :])


class formulas:
    """First-order quantities as formulas over the system matrix, written once.

    n0 and nk are the physical indices of object and image space, sense_k the sense of travel
    in image space (±1). Distances are along the direction of travel, positive downstream.
    No zero checks here: callers decide how to treat a vanishing denominator.
    """

    @staticmethod
    def power(a, b, c, d):
        return -c

    @staticmethod
    def back_focal_distance(a, b, c, d, nk):
        return -a * nk / c

    @staticmethod
    def front_focal_distance(a, b, c, d, n0):
        """Distance of the front focal point *before* the first vertex."""
        return -d * n0 / c

    @staticmethod
    def front_principal_point(a, b, c, d, n0):
        """Position of the front principal point after the first vertex."""
        return n0 * (d - 1) / c

    @staticmethod
    def back_principal_point(a, b, c, d, nk):
        """Position of the back principal point after the last vertex."""
        return nk * (1 - a) / c

    @staticmethod
    def nodal_shift(a, b, c, d, n0, nk, sense_k):
        """How far each nodal point lies downstream of its principal point."""
        return (sense_k * n0 - nk) / c

    #: The quantities `cardinal` knows, in report order.
    CARDINAL = ("power", "effective focal length", "focal length", "object focal length",
                "back focal distance", "front focal distance", "front principal point",
                "back principal point", "front nodal point", "back nodal point")

    @classmethod
    def cardinal(cls, name, a, b, c, d, n0, nk, sense_k=1):
        """One of the focal lengths, focal distances, principal or nodal points, by name
        (for a layout with power: c must not vanish)."""
        def power():
            return cls.power(a, b, c, d)

        def front():
            return cls.front_principal_point(a, b, c, d, n0)

        def back():
            return cls.back_principal_point(a, b, c, d, nk)

        def shift():
            return cls.nodal_shift(a, b, c, d, n0, nk, sense_k)

        table = {
            "power": power,
            "effective focal length": lambda: 1 / power(),
            "focal length": lambda: nk / power(),
            "object focal length": lambda: n0 / power(),
            "back focal distance": lambda: cls.back_focal_distance(a, b, c, d, nk),
            "front focal distance": lambda: cls.front_focal_distance(a, b, c, d, n0),
            "front principal point": front,
            "back principal point": back,
            "front nodal point": lambda: front() + sense_k * shift(),
            "back nodal point": lambda: back() + shift(),
        }
        return table[name]()

    @staticmethod
    def conjugate_denominator(a, b, c, d, object_tau):
        return c * object_tau + d

    @staticmethod
    def image_distance(a, b, c, d, object_tau, nk):
        """Image after the last vertex for an object `object_tau` (reduced) before the first."""
        return -(a * object_tau + b) * nk / (c * object_tau + d)

    @staticmethod
    def magnification(a, b, c, d, object_tau):
        return 1 / (c * object_tau + d)


class gaussian:
    """A Gaussian beam through the same system matrix: the ABCD law of Kogelnik & Li (1966,
    "Laser beams and resonators", Appl. Opt. 5:1550), written once over `+ - * /`.

    In the engine's reduced form a beam is a complex ray (y, nu) and its reduced complex
    parameter q̂ = q/n = y/nu obeys q̂' = (A q̂ + B)/(C q̂ + D). Started at its waist,
    q̂ = i·b with b = π w0²/(M² λ0) (the confocal parameter reduced by n: b = z_R/n, the same
    in every medium; λ0 the wavelength in the reference medium). Splitting the law into real
    and imaginary parts (det = AD − BC = 1 for reduced matrices) gives every formula below as
    a rational function of A, B, C, D, b, n: they run on floats, numpy arrays and the symbolic
    engine's ratios alike. Distances are along the path, positive downstream; `n` is the
    physical index of the space where the quantity is taken. Beam radii are returned squared
    (the one square root is the caller's), so the symbolic forms stay rational.
    """

    @staticmethod
    def abcd_law(a, b, c, d, q):
        """q̂' = (A q̂ + B)/(C q̂ + D) (complex q̂; the reference form the others expand)."""
        return (a * q + b) / (c * q + d)

    @staticmethod
    def radius_squared(a, b, c, d, waist_squared, confocal):
        """w² at the output plane of (A B; C D) for a beam whose waist (radius² waist_squared)
        is at its input plane: w² = w0² (A² + (B/b)²)."""
        return waist_squared * (a * a + (b / confocal) * (b / confocal))

    @staticmethod
    def curvature_numerator(a, b, c, d, confocal):
        """Re(1/q̂)·|A i b + B|²: zero where the wavefront is flat."""
        return b * d + a * c * confocal * confocal

    @staticmethod
    def wavefront_radius(a, b, c, d, confocal, n):
        """R = n (B² + A² b²)/(B D + A C b²); R > 0 when the wavefront diverges (its centre
        lies upstream). The caller handles a vanishing denominator (a flat wavefront)."""
        return n * (b * b + a * a * confocal * confocal) / (b * d + a * c * confocal * confocal)

    @staticmethod
    def waist_denominator(a, b, c, d, confocal):
        """D² + C² b², the |C q̂ + D|² of the law: never zero for a real beam."""
        return d * d + c * c * confocal * confocal

    @classmethod
    def waist_distance(cls, a, b, c, d, confocal, n):
        """Where the new waist lies after the output plane: −n Re(q̂')."""
        return -n * (a * c * confocal * confocal + b * d) / cls.waist_denominator(a, b, c, d,
                                                                                   confocal)

    @classmethod
    def waist_radius_squared(cls, a, b, c, d, waist_squared, confocal):
        """The new waist's radius²: w0² · Im(q̂')/b = w0² / (D² + C² b²)."""
        return waist_squared / cls.waist_denominator(a, b, c, d, confocal)

    @classmethod
    def rayleigh_range(cls, a, b, c, d, confocal, n):
        """The new Rayleigh range n·Im(q̂') = n b / (D² + C² b²)."""
        return n * confocal / cls.waist_denominator(a, b, c, d, confocal)
