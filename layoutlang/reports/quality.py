"""Report sections for image quality (`report quality`, `report QUALITY`), as blocks that the
text report and the documents both print.

Every number carries its unit or says it is a plain fraction; a value that does not exist is
said in words; lost rays are counted per field; the sampling and the methods are stated.
"""

from __future__ import annotations

from ..engines.firstorder import FirstOrder, Unavailable
from ..interpret.interpreter import Program
from ..testing import format_number
from .blocks import Block, Heading, Line, Table

__all__ = ["quality_blocks", "quality_engine", "value_text", "mtf_frequencies",
           "METHOD_LINES"]

METHOD_LINES = (
    "wavefront: exact rays to the reference sphere centred where the chief ray meets the image "
    "plane, through the chief ray's point on the paraxial exit pupil plane; OPD = ray path minus "
    "chief-ray path, in waves; RMS and peak-to-valley with piston and tilt removed",
    "Strehl ratio: the point spread at the diffraction focus over that of the same pupil "
    "without aberration (Maréchal's exp(-(2π σ)²) beside it)",
    "Zernike terms: Noll's indexing (J. Opt. Soc. Am. 66, 207, 1976), each normalised to unit "
    "RMS over the full pupil, in waves",
    "MTF: the FFT of the pupil function (diffraction), tangential along the field direction, "
    "sagittal across it, wavelengths weighted; 'limit' is the same pupil without aberration",
    "field curves: close ray pairs about the chief ray (not the Coddington equations), along "
    "the axis from the image plane; illumination: the pupil's projected solid angle relative "
    "to the axis (contains cos⁴, pupil distortion and vignetting), cos⁴ of the chief-ray angle "
    "beside it",
)


def quality_engine(program: Program, results: FirstOrder):
    from ..engines.quality import image_quality

    return image_quality(program.system, program.rays, program.quality.settings, results)


def value_text(value, kind: str, units: str) -> str:
    """A quality value with its unit, or the reason it does not exist."""
    if isinstance(value, Unavailable):
        return str(value)
    if kind == "waves":
        return f"{format_number(value, 4)} waves"
    if kind == "degrees":
        return f"{format_number(value, 4)} deg"
    if kind == "length":
        return f"{format_number(value, 4)} {units}"
    return format_number(value, 4)


def _kind(name: str) -> str:
    if name.startswith("wavefront error") or name == "zernike":
        return "waves"
    if name == "chief-ray angle":
        return "degrees"
    if name in ("wavefront focus shift", "encircled energy radius", "tangential focus",
                "sagittal focus", "image circle margin"):
        return "length"
    return "number"


def mtf_frequencies(program: Program, cutoff: float) -> list[tuple[str, float]]:
    """(label, cycles per layout unit): quarter, half and full Nyquist with a sensor, else
    10 %, 25 % and 50 % of the cut-off."""
    sensor = program.quality.settings.sensor
    units = program.system.units
    if sensor is not None:
        nyq = sensor.nyquist
        return [(f"{format_number(nyq / 4, 4)} /{units} (Nyquist/4)", nyq / 4),
                (f"{format_number(nyq / 2, 4)} /{units} (Nyquist/2)", nyq / 2),
                (f"{format_number(nyq, 4)} /{units} (Nyquist)", nyq)]
    return [(f"{format_number(f * cutoff, 4)} /{units}", f * cutoff) for f in (0.1, 0.25, 0.5)]


def _sampling_words(s, units: str) -> str:
    """How the pupil was sampled (engines.psf.Sampling), in words."""
    return (f"pupil grid {s.cells} across, FFT {s.size} x {s.size}; point spread sampled every "
            f"{format_number(s.spacing_x, 4)} x {format_number(s.spacing_y, 4)} {units}; "
            f"transfer function in steps of {format_number(s.step_y, 4)} up to the cut-off "
            f"{format_number(s.cutoff_y, 4)} cycles per {units} (tangential)")


def _term(value: float) -> str:
    """A Zernike coefficient; below 1e-9 waves it is rounding noise of a symmetric layout."""
    return "0" if abs(value) < 1e-9 else format_number(value, 3)


def _field(system, fraction: float) -> str:
    from .rays import _field_words

    return _field_words(system, fraction)


def quality_blocks(program: Program, results: FirstOrder) -> list[Block]:
    """The requested quality values and, with `report quality`, the whole section."""
    plan = program.quality
    if plan is None or not plan.asked:
        return []
    engine = quality_engine(program, results)
    units = program.system.units
    out: list[Block] = []
    if plan.reports:
        rows = [[r.describe(), value_text(engine.value(r), _kind(r.name), units)]
                for r in plan.reports]
        out += [Heading("requested: " + ", ".join(r.describe() for r in plan.reports)),
                Table(rows, header=False)]
    if plan.whole:
        out += _whole(program, results, engine)
    return out


def _whole(program: Program, results: FirstOrder, engine) -> list[Block]:
    from ..engines.psf import marechal, radius_for_energy, otf, psf, strehl
    from ..engines.wavefront import best_focus
    from ..engines.zernike import TERM_NAMES

    system = program.system
    units = system.units
    out: list[Block] = [Heading("image quality")]
    setups = engine.setups
    if isinstance(setups, Unavailable):
        return out + [Line(f"no image quality: {setups}")]
    fields = [f for f in program.rays.fields]
    waves = {f: engine.wavefront(f) for f in fields}
    first = next((w for w in waves.values() if not isinstance(w, Unavailable)), None)
    if first is not None:
        from ..engines.psf import sampling

        out.append(Line("sampling: " + _sampling_words(sampling(first.pupil_function()), units)))
    weights = engine.weights()
    if len(setups) > 1:
        from .rays import _nm

        out.append(Line("wavelength weights: " + ", ".join(
            f"{_nm(system, s.wavelength)} × {format_number(w, 4)}"
            for s, w in zip(setups, weights))))
    for text in METHOD_LINES:
        out.append(Line(text))
    # wavefront per field (primary wavelength)
    rows = [["field", "RMS", "peak-to-valley", "Strehl ratio", "Maréchal", "best focus",
             "50 % energy radius", "80 % energy radius", "rays"]]
    for f, wf in waves.items():
        if isinstance(wf, Unavailable):
            rows.append([_field(system, f), str(wf)] + [""] * 7)
            continue
        pupil = wf.pupil_function()
        transfer = otf(psf(pupil))
        radii = [radius_for_energy(pupil, e, transfer) for e in (0.5, 0.8)]
        focus, _ = best_focus(wf.bundle)
        b = wf.bundle
        lost = f"{b.lost} of {int(b.inside.sum())} lost" if b.lost else \
            f"all {int(b.inside.sum())} arrive"
        rows.append([_field(system, f), f"{format_number(wf.rms, 4)} waves",
                     f"{format_number(wf.peak_to_valley, 4)} waves",
                     format_number(strehl(pupil), 4), format_number(marechal(wf.rms), 4),
                     f"{format_number(focus, 4)} {units}"]
                    + [("beyond the grid" if r is None else f"{format_number(r, 4)} {units}")
                       for r in radii] + [lost])
    out += [Heading("wavefront at the primary wavelength"), Table(rows)]
    for f, wf in waves.items():
        if not isinstance(wf, Unavailable) and wf.bundle.lost:
            out.append(Line(f"field {_field(system, f)}: {wf.bundle.lost_words}"))
    # Zernike terms
    good = [(f, w) for f, w in waves.items() if not isinstance(w, Unavailable)]
    if good:
        rows = [["Noll term"] + [_field(system, f) for f, _ in good]]
        for j in (4, 5, 6, 7, 8, 9, 10, 11, 22):
            rows.append([f"{j} {TERM_NAMES[j]}"]
                        + [_term(w.zernike.coefficient(j)) for _, w in good])
        out += [Heading("Zernike terms (waves)"), Table(rows)]
        if any(not w.zernike.full_circle for _, w in good):
            out.append(Line("on a vignetted pupil the terms are not orthogonal: the fit is the "
                            "least-squares one over the rays that arrive"))
    # MTF
    if first is not None:
        axis = engine.transfer(0.0, (1.0,), limit=False)
        freqs = mtf_frequencies(program, 1.0 if isinstance(axis, Unavailable) else axis.cutoff)
        values = tuple(f for _, f in freqs)
        rows = [["field"] + [f"{label} T / S" for label, _ in freqs]]
        notes = []
        limit_row = None
        for f in fields:
            tr = engine.transfer(f, values)
            if isinstance(tr, Unavailable):
                rows.append([_field(system, f), str(tr)] + [""] * (len(freqs) - 1))
                continue
            rows.append([_field(system, f)] + [
                f"{format_number(t, 3)} / {format_number(s, 3)}"
                for t, s in zip(tr.tangential, tr.sagittal)])
            if tr.note:
                notes.append(f"field {_field(system, f)}: {tr.note}")
            if limit_row is None:
                limit_row = ["limit (axis)"] + [f"{format_number(t, 3)} / {format_number(s, 3)}"
                                                for t, s in zip(tr.limit_tangential,
                                                                tr.limit_sagittal)]
        if limit_row:
            rows.append(limit_row)
        out += [Heading("MTF (tangential / sagittal), all wavelengths weighted"), Table(rows)]
        out += [Line(n) for n in notes]
    # field analyses
    rows = [["field", "image height", "tangential focus", "sagittal focus", "distortion",
             "lateral colour", "chief-ray angle", "illumination", "cos⁴"]]
    for f in fields:
        row = engine.field_row(f)
        rows.append([_field(system, f), value_text(row.image_height, "length", units),
                     value_text(row.tangential_focus, "length", units),
                     value_text(row.sagittal_focus, "length", units),
                     row.distortion if isinstance(row.distortion, Unavailable) else
                     f"{format_number(row.distortion * 100, 4)} %",
                     value_text(row.lateral_colour, "length", units),
                     value_text(row.chief_ray_angle, "degrees", units),
                     value_text(row.illumination, "number", units),
                     value_text(row.cos4_illumination, "number", units)])
    out += [Heading("across the field"), Table([[str(c) for c in r] for r in rows])]
    sensor = program.quality.settings.sensor
    if sensor is not None:
        radius = engine.image_circle_radius()
        out.append(Line(
            f"sensor {format_number(sensor.width, 4)} x {format_number(sensor.height, 4)} "
            f"{units}, pixel pitch {format_number(sensor.pitch, 4)} {units}: Nyquist "
            f"{format_number(sensor.nyquist, 4)} cycles per {units}, half diagonal "
            f"{format_number(sensor.half_diagonal, 4)} {units}; image circle radius "
            + value_text(radius, "length", units)))
    return out
