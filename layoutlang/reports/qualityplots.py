"""Pictures of image quality, in the same quiet style as the cross-section (reports/drawing.py):
spot diagrams, transverse ray fans, OPD fans, the wavefront map, the point spread, MTF curves
with the diffraction limit, field curves with distortion and lateral colour, and MTF through
focus. matplotlib is imported only here (and only when a picture is asked for); the bytes are
deterministic for the same script.

Each picture takes the fields of `sample fields` (default 0, 0.5, 0.7071, 1) and, where
colours matter, every wavelength, drawn in a colour near its hue.
"""

from __future__ import annotations

import math
from typing import Any

import numpy as np

from ..engines.firstorder import FirstOrder, Unavailable, first_order
from ..interpret.interpreter import Program
from ..testing import format_number
from .drawing import STYLE, _METADATA, _wavelength_colour

__all__ = ["PICTURES", "picture_bytes", "picture_figure"]

#: picture name → what it shows (for `draw --what` and its help)
PICTURES = {
    "spots": "spot diagrams per field and wavelength, with the Airy disk",
    "fans": "transverse ray fans, tangential and sagittal, per field",
    "opd": "optical path difference fans, tangential and sagittal, per field",
    "wavefront": "the wavefront map at each field (primary wavelength, piston and tilt removed)",
    "psf": "the point spread at each field (primary wavelength)",
    "mtf": "MTF against spatial frequency per field, with the diffraction limit",
    "field": "field curves (tangential and sagittal focus), distortion and lateral colour",
    "focus": "MTF at one frequency through focus, per field",
}

_FIELD_SHADES = ["#0f6e73", "#7a4f9a", "#b5651d", "#2b6cb0", "#8c2f39", "#4d7c0f"]


def _engine(program: Program, results: FirstOrder):
    from ..engines.quality import image_quality

    return image_quality(program.system, program.rays, program.quality.settings, results)


def _field_label(program: Program, fraction: float) -> str:
    from .rays import _field_words

    return "field " + _field_words(program.system, fraction)


def _nm(program: Program, wavelength: float) -> str:
    from ..measure import to_nanometres

    return f"{format_number(to_nanometres(wavelength, program.system.units), 4)} nm"


def _colour(program: Program, wavelength: float, index: int, count: int) -> str:
    if count == 1:
        return STYLE["ray"]
    from ..measure import to_nanometres

    return _wavelength_colour(to_nanometres(wavelength, program.system.units))


def _style(ax, font: int) -> None:
    ink = STYLE["ink"]
    ax.tick_params(labelsize=font - 1, colors=ink, length=2.5, width=0.6)
    for side in ("top", "right"):
        ax.spines[side].set_visible(False)
    for side in ("left", "bottom"):
        ax.spines[side].set_color(STYLE["axis"])
        ax.spines[side].set_linewidth(0.6)
    ax.grid(True, color="#e3e7ec", lw=0.5)
    ax.set_axisbelow(True)


def _grid(plt, count: int, rows: int = 1, width: float = 2.4, height: float = 2.5):
    fig, axes = plt.subplots(rows, count, figsize=(max(width * count, 4.0), height * rows),
                             squeeze=False)
    return fig, axes


def _unavailable(ax, why: Any) -> None:
    ax.text(0.5, 0.5, str(why), ha="center", va="center", fontsize=STYLE["font"] - 1,
            color=STYLE["ink"], wrap=True, transform=ax.transAxes)
    ax.set_xticks([])
    ax.set_yticks([])


def _title(fig, program: Program, what: str) -> None:
    title = program.system.title or program.file
    fig.suptitle(f"{title}: {what}", fontsize=STYLE["font"] + 1, color=STYLE["ink"], x=0.01,
                 ha="left")


def _spots(plt, program, engine):
    fields = list(program.rays.fields)
    setups = engine.setups
    fig, axes = _grid(plt, len(fields))
    units = program.system.units
    for ax, f in zip(axes[0], fields):
        _style(ax, STYLE["font"])
        ax.set_title(_field_label(program, f), fontsize=STYLE["font"], color=STYLE["ink"])
        reference = engine.bundle(f, 0)
        if isinstance(reference, Unavailable):
            _unavailable(ax, reference)
            continue
        centre = reference.image_point()
        reach = 0.0
        for i, s in enumerate(setups):
            b = engine.bundle(f, i)
            if isinstance(b, Unavailable):
                continue
            x, y = b.on_plane()
            x, y = (x - centre[0]) * 1000, (y - centre[1]) * 1000
            ax.plot(x, y, ls="none", marker=".", ms=1.6, color=_colour(program, s.wavelength,
                                                                     i, len(setups)),
                    label=_nm(program, s.wavelength) + (f", {b.lost} lost" if b.lost else ""))
            if len(x):
                reach = max(reach, float(np.max(np.hypot(x, y))))
        s0 = setups[0]
        airy = 0.61 * s0.wavelength / max(s0.numerical_aperture, 1e-12) * 1000
        circle = np.linspace(0, 2 * np.pi, 181)
        ax.plot(airy * np.cos(circle), airy * np.sin(circle), color=STYLE["axis"], lw=0.6,
                ls="--")
        limit = max(reach, airy) * 1.15
        ax.set_xlim(-limit, limit)
        ax.set_ylim(-limit, limit)
        ax.set_aspect("equal")
        ax.set_xlabel(f"x (µm, 1/1000 {units})" if units != "mm" else "x (µm)",
                      fontsize=STYLE["font"] - 1)
        ax.legend(fontsize=STYLE["font"] - 2, frameon=False, loc="upper right")
    axes[0][0].set_ylabel("y about the chief ray (µm)", fontsize=STYLE["font"] - 1)
    _title(fig, program, "spot diagrams on the image plane (dashed: Airy radius 0.61 λ/NA)")
    return fig


def _fan_rays(engine, f: int, index: int, plane: str):
    from ..engines import aberrations

    s = engine.setups[index]
    t = np.linspace(-1, 1, 41)
    px, py = (np.zeros_like(t), t) if plane == "y" else (t, np.zeros_like(t))
    rays = aberrations.launch(s, f, px, py)
    chief = aberrations.launch(s, f, np.zeros(1), np.zeros(1))
    with np.errstate(invalid="ignore", divide="ignore"):
        step = (s.image_z - rays.z) / rays.kz
        x, y = rays.x + step * rays.kx, rays.y + step * rays.ky
        c = (s.image_z - chief.z) / chief.kz
        cx, cy = chief.x + c * chief.kx, chief.y + c * chief.ky
    ok = rays.ok & np.isfinite(x)
    value = (y - cy) if plane == "y" else (x - cx)
    return t[ok], value[ok], int((~ok).sum())


def _fans(plt, program, engine):
    fields = list(program.rays.fields)
    setups = engine.setups
    fig, axes = _grid(plt, len(fields), rows=2, height=2.2)
    units = program.system.units
    for col, f in enumerate(fields):
        for row, plane in enumerate(("y", "x")):
            ax = axes[row][col]
            _style(ax, STYLE["font"])
            lost = 0
            for i, s in enumerate(setups):
                t, v, n = _fan_rays(engine, f, i, plane)
                lost += n
                ax.plot(t, v * 1000, color=_colour(program, s.wavelength, i, len(setups)),
                        lw=1.0, label=_nm(program, s.wavelength))
            ax.axhline(0, color=STYLE["axis"], lw=0.6)
            if row == 0:
                ax.set_title(_field_label(program, f), fontsize=STYLE["font"],
                             color=STYLE["ink"])
            if lost:
                ax.text(0.02, 0.95, f"{lost} rays lost", transform=ax.transAxes,
                        fontsize=STYLE["font"] - 2, va="top", color=STYLE["ink"])
            ax.set_xlabel("pupil fraction " + ("(tangential)" if plane == "y" else
                                               "(sagittal)"), fontsize=STYLE["font"] - 1)
    axes[0][0].set_ylabel("Δy on the image (µm)", fontsize=STYLE["font"] - 1)
    axes[1][0].set_ylabel("Δx on the image (µm)", fontsize=STYLE["font"] - 1)
    if len(setups) > 1:
        axes[0][-1].legend(fontsize=STYLE["font"] - 2, frameon=False)
    _title(fig, program, f"transverse ray fans about the chief ray ({units} × 1000)")
    return fig


def _opd(plt, program, engine):
    fields = list(program.rays.fields)
    setups = engine.setups
    fig, axes = _grid(plt, len(fields), rows=2, height=2.2)
    for col, f in enumerate(fields):
        for row, plane in enumerate(("y", "x")):
            ax = axes[row][col]
            _style(ax, STYLE["font"])
            for i, s in enumerate(setups):
                wf = engine.wavefront(f, i)
                if isinstance(wf, Unavailable):
                    _unavailable(ax, wf)
                    break
                from ..engines.psf import cell_centres

                u = cell_centres(wf.bundle.cells)
                middle = wf.bundle.cells // 2
                line = wf.opd[:, middle] if plane == "y" else wf.opd[middle, :]
                centre_value = np.nanmean(wf.opd[middle - 1:middle + 1, middle - 1:middle + 1])
                ax.plot(u, line - centre_value, color=_colour(program, s.wavelength, i,
                                                             len(setups)),
                        lw=1.0, label=_nm(program, s.wavelength))
            ax.axhline(0, color=STYLE["axis"], lw=0.6)
            if row == 0:
                ax.set_title(_field_label(program, f), fontsize=STYLE["font"],
                             color=STYLE["ink"])
            ax.set_xlabel("pupil fraction " + ("(tangential)" if plane == "y" else
                                               "(sagittal)"), fontsize=STYLE["font"] - 1)
    axes[0][0].set_ylabel("OPD (waves)", fontsize=STYLE["font"] - 1)
    axes[1][0].set_ylabel("OPD (waves)", fontsize=STYLE["font"] - 1)
    if len(setups) > 1:
        axes[0][-1].legend(fontsize=STYLE["font"] - 2, frameon=False)
    _title(fig, program, "optical path difference, ray minus chief ray, to the reference sphere")
    return fig


def _wavefront_maps(plt, program, engine):
    fields = list(program.rays.fields)
    fig, axes = _grid(plt, len(fields), height=2.7)
    for ax, f in zip(axes[0], fields):
        wf = engine.wavefront(f)
        ax.set_title(_field_label(program, f), fontsize=STYLE["font"], color=STYLE["ink"])
        if isinstance(wf, Unavailable):
            _unavailable(ax, wf)
            continue
        bound = max(float(np.nanmax(np.abs(wf.clean))), 1e-6)
        image = ax.imshow(wf.clean, origin="lower", extent=(-1, 1, -1, 1), cmap="RdBu_r",
                          vmin=-bound, vmax=bound, interpolation="nearest")
        ax.set_xticks([-1, 0, 1])
        ax.set_yticks([-1, 0, 1])
        ax.tick_params(labelsize=STYLE["font"] - 1, colors=STYLE["ink"])
        ax.set_xlabel(f"RMS {format_number(wf.rms, 3)}, P-V {format_number(wf.peak_to_valley, 3)}"
                      " waves", fontsize=STYLE["font"] - 1)
        bar = fig.colorbar(image, ax=ax, fraction=0.046, pad=0.04)
        bar.ax.tick_params(labelsize=STYLE["font"] - 2)
    _title(fig, program, "wavefront (waves, piston and tilt removed; x across, y along the field)")
    return fig


def _psfs(plt, program, engine):
    from ..engines.psf import psf, sampling

    fields = list(program.rays.fields)
    fig, axes = _grid(plt, len(fields), height=2.7)
    for ax, f in zip(axes[0], fields):
        wf = engine.wavefront(f)
        ax.set_title(_field_label(program, f), fontsize=STYLE["font"], color=STYLE["ink"])
        if isinstance(wf, Unavailable):
            _unavailable(ax, wf)
            continue
        pupil = wf.pupil_function()
        spread = np.fft.fftshift(psf(pupil))
        s = sampling(pupil, spread.shape[0])
        m = spread.shape[0]
        half = min(m // 2, 24)
        window = spread[m // 2 - half:m // 2 + half, m // 2 - half:m // 2 + half]
        ex, ey = half * s.spacing_x * 1000, half * s.spacing_y * 1000
        peak = float(psf(pupil.perfect()).max())
        ax.imshow(window / peak, origin="lower", extent=(-ex, ex, -ey, ey), cmap="magma",
                  vmin=0, vmax=1, interpolation="bilinear")
        ax.set_xlabel("µm about the diffraction focus", fontsize=STYLE["font"] - 1)
        ax.tick_params(labelsize=STYLE["font"] - 1, colors=STYLE["ink"])
    _title(fig, program, "point spread (primary wavelength, relative to the unaberrated peak)")
    return fig


def _mtf(plt, program, engine):
    fields = list(program.rays.fields)
    fig, ax = plt.subplots(figsize=(6.4, 3.8))
    _style(ax, STYLE["font"])
    units = program.system.units
    axis = engine.transfer(0.0, (1.0,), limit=False)
    if isinstance(axis, Unavailable):
        _unavailable(ax, axis)
        return fig
    top = axis.cutoff
    sensor = program.quality.settings.sensor
    if sensor is not None:
        top = min(top, 2 * sensor.nyquist)
    freqs = tuple(np.linspace(0, top, 121).tolist())
    limit_drawn = False
    for k, f in enumerate(fields):
        tr = engine.transfer(f, freqs)
        if isinstance(tr, Unavailable):
            continue
        colour = _FIELD_SHADES[k % len(_FIELD_SHADES)]
        label = _field_label(program, f) + (" (geometric)" if tr.method == "geometric" else "")
        ax.plot(tr.frequencies, tr.tangential, color=colour, lw=1.1, label=label + " T")
        ax.plot(tr.frequencies, tr.sagittal, color=colour, lw=1.1, ls="--", label=label + " S")
        if not limit_drawn:
            ax.plot(tr.frequencies, tr.limit_tangential, color=STYLE["axis"], lw=1.6,
                    alpha=0.8, label="diffraction limit")
            limit_drawn = True
    if sensor is not None:
        ax.axvline(sensor.nyquist, color=STYLE["ink"], lw=0.7, ls=":")
        ax.text(sensor.nyquist, 1.02, " Nyquist", fontsize=STYLE["font"] - 1,
                color=STYLE["ink"], va="bottom")
    ax.set_xlim(0, top)
    ax.set_ylim(0, 1.05)
    ax.set_xlabel(f"spatial frequency (cycles per {units})", fontsize=STYLE["font"])
    ax.set_ylabel("modulation", fontsize=STYLE["font"])
    ax.legend(fontsize=STYLE["font"] - 2, frameon=False, ncol=2)
    _title(fig, program, "MTF (solid tangential, dashed sagittal; wavelengths weighted)")
    return fig


def _field_curves(plt, program, engine):
    fractions = np.linspace(0, 1, 11)
    rows = [engine.field_row(float(f)) for f in fractions]
    fig, axes = plt.subplots(1, 3, figsize=(9.0, 3.2))
    units = program.system.units

    def series(attribute):
        values = [getattr(r, attribute) for r in rows]
        return np.array([math.nan if isinstance(v, Unavailable) else float(v) for v in values])

    ax = axes[0]
    _style(ax, STYLE["font"])
    ax.plot(series("tangential_focus"), fractions, color=STYLE["ray"], lw=1.2,
            label="tangential")
    ax.plot(series("sagittal_focus"), fractions, color=STYLE["ray"], lw=1.2, ls="--",
            label="sagittal")
    ax.axvline(0, color=STYLE["axis"], lw=0.6)
    ax.set_xlabel(f"focus from the image plane ({units})", fontsize=STYLE["font"])
    ax.set_ylabel("field fraction", fontsize=STYLE["font"])
    ax.set_title("field curves (close ray pairs)", fontsize=STYLE["font"], color=STYLE["ink"])
    ax.legend(fontsize=STYLE["font"] - 2, frameon=False)
    ax = axes[1]
    _style(ax, STYLE["font"])
    ax.plot(series("distortion") * 100, fractions, color=STYLE["ink"], lw=1.2)
    ax.axvline(0, color=STYLE["axis"], lw=0.6)
    ax.set_xlabel("distortion (%)", fontsize=STYLE["font"])
    ax.set_title("distortion (real chief ray)", fontsize=STYLE["font"], color=STYLE["ink"])
    ax = axes[2]
    _style(ax, STYLE["font"])
    colour = series("lateral_colour")
    if np.isfinite(colour).any():
        ax.plot(colour * 1000, fractions, color="#7a4f9a", lw=1.2)
        ax.axvline(0, color=STYLE["axis"], lw=0.6)
        ax.set_xlabel("shortest − longest wavelength (µm)", fontsize=STYLE["font"])
    else:
        _unavailable(ax, rows[-1].lateral_colour)
    ax.set_title("lateral colour", fontsize=STYLE["font"], color=STYLE["ink"])
    _title(fig, program, "across the field")
    return fig


def _through_focus(plt, program, engine):
    from ..engines.mtf import through_focus

    fields = list(program.rays.fields)
    fig, ax = plt.subplots(figsize=(6.4, 3.6))
    _style(ax, STYLE["font"])
    setups = engine.setups
    units = program.system.units
    sensor = program.quality.settings.sensor
    axis = engine.transfer(0.0, (1.0,), limit=False)
    if isinstance(axis, Unavailable):
        _unavailable(ax, axis)
        return fig
    frequency = sensor.nyquist / 2 if sensor is not None else 0.25 * axis.cutoff
    na = max(setups[0].numerical_aperture, 1e-9)
    reach = 2.0 * setups[0].wavelength / (na * na)  # ± two depths of focus λ/NA²
    shifts = np.linspace(-reach, reach, 17)
    weights = engine.weights()
    for k, f in enumerate(fields):
        bundles = [engine.bundle(f, i) for i in range(len(setups))]
        if any(isinstance(b, Unavailable) for b in bundles):
            continue
        t, s = through_focus(bundles, weights, frequency, shifts)
        colour = _FIELD_SHADES[k % len(_FIELD_SHADES)]
        ax.plot(shifts, t, color=colour, lw=1.1, label=_field_label(program, f) + " T")
        ax.plot(shifts, s, color=colour, lw=1.1, ls="--", label=_field_label(program, f) + " S")
    ax.axvline(0, color=STYLE["axis"], lw=0.6)
    ax.set_ylim(0, 1.05)
    ax.set_xlabel(f"image plane shift along the path ({units})", fontsize=STYLE["font"])
    ax.set_ylabel("modulation", fontsize=STYLE["font"])
    ax.legend(fontsize=STYLE["font"] - 2, frameon=False, ncol=2)
    _title(fig, program, f"MTF through focus at {format_number(frequency, 4)} cycles per {units}")
    return fig


_MAKERS = {"spots": _spots, "fans": _fans, "opd": _opd, "wavefront": _wavefront_maps,
           "psf": _psfs, "mtf": _mtf, "field": _field_curves, "focus": _through_focus}


def picture_figure(program: Program, what: str, results: FirstOrder | None = None):
    """The matplotlib figure of one picture (see `PICTURES`)."""
    import matplotlib

    matplotlib.use("Agg")
    import matplotlib.pyplot as plt

    results = results or first_order(program.system)
    engine = _engine(program, results)
    if isinstance(engine.setups, Unavailable):
        fig, ax = plt.subplots(figsize=(5, 1.5))
        _unavailable(ax, engine.setups)
        return fig
    fig = _MAKERS[what](plt, program, engine)
    fig.tight_layout(rect=(0, 0, 1, 0.94))
    return fig


def picture_bytes(program: Program, what: str, kind: str = "svg",
                  results: FirstOrder | None = None) -> bytes:
    """One picture as svg, png or pdf bytes (the same script, the same bytes)."""
    import io

    import matplotlib

    with matplotlib.rc_context({"svg.hashsalt": "layoutlang", "svg.fonttype": "none",
                                "pdf.compression": 6, "font.family": "DejaVu Sans"}):
        fig = picture_figure(program, what, results)
        buffer = io.BytesIO()
        fig.savefig(buffer, format=kind, metadata=_METADATA[kind], dpi=130)
        import matplotlib.pyplot as plt

        plt.close(fig)
    return buffer.getvalue()
