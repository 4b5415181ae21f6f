"""Draw a layout's cross-section with matplotlib, in layoutlang's own quiet style.

Glass is a pale fill with a dark outline, mirrors a heavier line with short strokes on their
back, the stop two dark bars, the image plane a thin upright line, the axis a dash-dot line.
Ray bundles at the axis, an intermediate and the full field each have their own colour; with
dispersive media the axial bundle is drawn in every wavelength's colour and the off-axis
bundles (primary wavelength) are dashed. The legend lists only what is drawn. matplotlib is
imported here only, so no other command pays for it; output is deterministic (fixed SVG id
salt, no dates in the metadata). The geometry comes from `cross_section.py`.
"""

from __future__ import annotations

from pathlib import Path
from typing import Any


from ..system import IDEAL, MIRROR, System
from .cross_section import CrossSection, cross_section
from ..guard import guarded

__all__ = ["figure", "save_drawing", "drawing_bytes", "figure_bytes", "STYLE", "FIGURE_WIDTH"]

#: Our colours: ink for outlines and labels, a pale blue-grey family for materials, a deep
#: teal for rays of a single wavelength.
STYLE = {
    "ink": "#2b3440",
    "axis": "#8a94a3",
    "glass": ["#dbe7ef", "#e6e0f0", "#dcefe3", "#f1e6d6"],
    "mirror": "#4a5563",
    "ray": "#0f6e73",
    # one colour per drawn field: the axis, the intermediate field, the full field
    "fields": ["#0f6e73", "#c07a12", "#8a3b8f"],
    "font": 8,
    "beam": "#b8322b",  # the Gaussian beam's envelope: a translucent warm band
    "beam_alpha": 0.22,
}
#: Line styles of the off-axis bundles when colour stands for the wavelength.
_FIELD_DASHES = {0.7: (0, (5, 3)), 1.0: (0, (7, 2, 1.5, 2))}
#: Most label levels above the drawing; a name that still overlaps is left out (and said).
_MAX_LEVELS = 6

#: The drawing's width in inches; its height follows the layout (equal scales on both axes).
FIGURE_WIDTH = 9.0
MAX_AXES_HEIGHT = 6.5
#: Height in inches of the panel that shows a Gaussian beam's radius at an enlarged scale.
BEAM_PANEL = 2.1

_METADATA = {"svg": {"Date": None}, "pdf": {"CreationDate": None, "ModDate": None},
             "png": {}}


def _wavelength_colour(nm: float) -> str:
    """A darkened colour near the hue of visible light of this wavelength (a piecewise
    approximation of the spectrum, from memory), so blue light is drawn bluish, red reddish.
    Outside 400-700 nm the nearest end is used."""
    stops = [(400, (0.35, 0.1, 0.6)), (450, (0.15, 0.25, 0.8)), (490, (0.0, 0.5, 0.7)),
             (530, (0.1, 0.55, 0.2)), (580, (0.65, 0.55, 0.0)), (620, (0.85, 0.35, 0.0)),
             (700, (0.7, 0.05, 0.05))]
    nm = min(max(nm, stops[0][0]), stops[-1][0])
    for (w0, c0), (w1, c1) in zip(stops, stops[1:]):
        if w0 <= nm <= w1:
            t = (nm - w0) / (w1 - w0)
            r, g, b = (a + (b_ - a) * t for a, b_ in zip(c0, c1))
            return "#{:02x}{:02x}{:02x}".format(*(round(255 * v) for v in (r, g, b)))
    return STYLE["ray"]


def _ray_sets(system: System, exact: bool) -> list[tuple[str, str, CrossSection]]:
    """(label, colour, cross-section) per wavelength where the layout's indices depend on the
    wavelength, the primary last (drawn on top); one set in our ray colour otherwise."""
    section = cross_section(system, exact=exact)
    waves = list(system.wavelengths)
    at = getattr(system, "at_wavelength", None)
    dispersive = any(getattr(m, "model", None) is not None for m in system.media)
    if at is None or len(waves) < 2 or not dispersive:
        label = ""
        if waves:
            label = ", ".join(f"{_nm(system, w.value):g}" for w in waves) + " nm"
        return [(label, STYLE["ray"], section)]
    from dataclasses import replace

    from ..engines.firstorder import Unavailable, first_order

    sets = []
    primary = system.primary_wavelength
    # drawn in this order, the primary last so that its rays lie on top
    waves = sorted((w for w in waves if w is not primary), key=lambda w: float(w.value))
    waves.append(primary)
    # every colour ends on the one image plane (the primary's), where the sensor is
    plane = first_order(at(primary.value))["image plane distance"]
    for wave in waves:
        nm = _nm(system, wave.value)
        coloured = at(wave.value)
        if not isinstance(plane, Unavailable):
            # the same plane, keeping its tilt (a sensor mounted off square)
            coloured = replace(coloured, image=replace(coloured.image, distance=float(plane),
                                                       at_infinity=False))
        label = f"{nm:g} nm" + (" (primary)" if wave is primary else "")
        sets.append((label, _wavelength_colour(nm), cross_section(coloured, exact=exact)))
    return sets


def _nm(system: System, value: Any) -> float:
    from ..measure import to_nanometres

    return round(float(to_nanometres(float(value), system.units)), 3)


def _field_words(system: System, fraction: float) -> str:
    from ..testing import format_number

    if fraction == 0:
        return "on axis"
    obj = system.object
    name = "full field" if fraction == 1 else f"{format_number(fraction)} field"
    if obj.at_infinity:
        import math

        return f"{name} ({format_number(math.degrees(fraction * float(obj.field_angle)), 4)} deg)"
    return f"{name} (height {format_number(fraction * float(obj.height), 4)} {system.units})"


def figure(system: System, hazards: tuple[str, ...] = (), exact: bool = True,
           width: float = FIGURE_WIDTH) -> Any:
    """A matplotlib Figure of the layout (not attached to any GUI backend).

    Args:
        system: the layout.
        hazards: the script's declared hazards (laser, eye, sunlight): the drawing then carries
            a short caution, since a picture often travels without its report.
        exact: draw exactly traced rays where the layout allows (paraxial otherwise).
        width: the figure's width in inches.
    """
    from matplotlib.figure import Figure

    figure_width = width
    sets = _ray_sets(system, exact)
    section = sets[-1][2]  # the primary wavelength's
    if section.placed is not None:  # the folded path, in the plane of the fold
        from .placed_drawing import placed_figure

        return placed_figure(system, sets, hazards, figure_width)
    z_min, z_max, y_max = section.extent()
    for _, _, other in sets[:-1]:
        a, b, c = other.extent()
        z_min, z_max, y_max = min(z_min, a), max(z_max, b), max(y_max, c)
    width = max(z_max - z_min, 1e-9)
    bar = 0.0
    if section.stop is not None:
        bar = max(0.22 * section.stop[1], 0.04 * y_max)
    top = max([p.semi_aperture for p in section.profiles]
              + ([section.stop[1] + bar] if section.stop else []))
    notes = list(section.notes)
    if hazards:
        notes.insert(0, "CAUTION (" + ", ".join(hazards) + "): see the report's caution; follow "
                     "local codes and licensed practice")
    # Equal scales on both axes (shapes stay true), so the figure's height follows the layout:
    # the axes are placed by hand, in inches, with room for the names above and the words below.
    span = 1.08 * width
    axes_w = figure_width - 0.4
    for _ in range(3):
        per_unit = axes_w * 72 / span  # points per layout unit
        levels = _label_levels(section, 0.62 * STYLE["font"] / per_unit)
        y_top = top + (8 + 11 * (max((lv for lv in levels if lv is not None), default=0) + 1)
                       ) / per_unit
        y_bottom = -max(y_max, top) - 16 / per_unit
        axes_h = (y_top - y_bottom) * per_unit / 72
        if axes_h <= MAX_AXES_HEIGHT:
            break
        axes_w *= MAX_AXES_HEIGHT / axes_h
    header, footer = 0.75, 0.5 + 0.15 * len(notes)
    hidden = [p.name for p, level in zip(section.profiles, levels) if level is None]
    if hidden:
        notes.append("names left out where they would overlap: " + ", ".join(hidden))
        footer += 0.15
    panel = BEAM_PANEL if section.beam is not None else 0.0  # the beam at an enlarged scale
    fig_h = header + axes_h + footer + panel
    fig = Figure(figsize=(figure_width, fig_h), dpi=110)
    left = (figure_width - axes_w) / 2 / figure_width
    ax = fig.add_axes([left, (footer + panel) / fig_h, axes_w / figure_width, axes_h / fig_h])
    ink, font = STYLE["ink"], STYLE["font"]

    ax.axhline(0, color=STYLE["axis"], lw=0.7, ls=(0, (8, 3, 1, 3)), zorder=1)
    media = sorted({e.medium for e in section.elements})
    for element in section.elements:
        z, y = element.outline(section.profiles)
        tint = STYLE["glass"][media.index(element.medium) % len(STYLE["glass"])]
        ax.fill(z, y, facecolor=tint, edgecolor=ink, lw=0.9, zorder=2)
    for profile in section.profiles:
        _draw_profile(ax, profile, y_max)
    for profile, level in zip(section.profiles, levels):
        if level is None:
            continue
        ax.plot([profile.z, profile.z], [profile.semi_aperture, top], color=STYLE["axis"],
                lw=0.5, zorder=1)
        ax.annotate(profile.name, (profile.z, top), (0, 4 + 11 * level),
                    textcoords="offset points", ha="center",
                    va="bottom", fontsize=font, color=ink,
                    arrowprops={"arrowstyle": "-", "color": STYLE["axis"], "lw": 0.5,
                                "shrinkA": 1, "shrinkB": 0})
    if section.stop is not None:
        z, r = section.stop
        for sign in (1, -1):
            ax.plot([z, z], [sign * r, sign * (r + bar)], color=ink, lw=3.2,
                    solid_capstyle="butt", zorder=4)
        ax.annotate("stop", (z, -(r + bar)), (0, -2), textcoords="offset points",
                    ha="center", va="top", fontsize=font, color=ink)
    if section.image is not None:
        z, h = section.image
        virtual = any(ray.virtual_z for ray in section.rays)
        ax.plot([z, z], [-h, h], color=ink, lw=1.1, zorder=4, ls=(0, (2, 2)) if virtual else "-")
        ax.annotate("virtual image" if virtual else "image", (z, -h), (0, -2),
                    textcoords="offset points", ha="center", va="top", fontsize=font, color=ink)
    draw_object(ax, section.object_plane, ink, font)

    handles = [_draw_beam(ax, section.beam)] if section.beam is not None else []
    handles += _draw_rays(ax, system, sets)
    if handles:
        fig.legend(handles=handles, loc="upper left", fontsize=font, frameon=False,
                   ncol=min(len(handles), 4),
                   bbox_to_anchor=(0.1 / figure_width, 1 - 0.32 / fig_h))

    ax.set_xlim(z_min - 0.04 * width, z_max + 0.04 * width)
    ax.set_ylim(y_bottom, y_top)
    if section.beam is not None:
        beam_ax = fig.add_axes([left, (footer + 0.2) / fig_h, axes_w / figure_width,
                                (panel - 0.85) / fig_h])
        _beam_panel(beam_ax, section, ax.get_xlim())
    for side in ("top", "right", "left"):
        ax.spines[side].set_visible(False)
    ax.spines["bottom"].set_color(STYLE["axis"])
    ax.tick_params(colors=STYLE["axis"], labelsize=font, left=False, labelleft=False)
    ax.set_xlabel(f"z along the axis ({section.units}); light starts toward +z", fontsize=font,
                  color=ink)
    title = section.title or "layout"
    fig.text(0.2 / figure_width, 1 - 0.1 / fig_h, title, fontsize=font + 2, color=ink,
             va="top")
    if notes:
        fig.text(0.2 / figure_width, 0.06 / fig_h, "\n".join(notes), fontsize=font - 1,
                 color=STYLE["axis"], va="bottom")
    return fig


def _draw_beam(ax: Any, beam) -> Any:
    """The 1/e² envelope as a translucent band with its edges, each waist a short bar across
    the band and its radius in words; returns the legend entry."""
    from matplotlib.patches import Patch

    colour, ink, font = STYLE["beam"], STYLE["ink"], STYLE["font"]
    upper = list(beam.radius)
    lower = [-r for r in beam.radius]
    ax.fill_between(beam.z, lower, upper, color=colour, alpha=STYLE["beam_alpha"], lw=0,
                    zorder=2.5)
    for edge in (upper, lower):
        ax.plot(beam.z, edge, color=colour, lw=0.6, zorder=2.6)
    for z, radius, _ in beam.waists:  # named in the enlarged panel below
        ax.plot([z, z], [-radius, radius], color=colour, lw=1.6, zorder=5,
                solid_capstyle="butt")
    return Patch(facecolor=colour, alpha=0.45, edgecolor=colour, lw=0.6,
                 label="beam, 1/e² radius (Gaussian)")


def _beam_panel(ax: Any, section: CrossSection, xlim: tuple[float, float]) -> None:
    """The beam's 1/e² radius against z at an enlarged radial scale (the cross-section above
    is true to scale, where a beam is often a thin line): the envelope, a thin line at each
    boundary with its name, and each waist with its radius."""
    from ..measure import LENGTH_UNITS

    beam = section.beam
    colour, ink, axis, font = STYLE["beam"], STYLE["ink"], STYLE["axis"], STYLE["font"]
    in_mm = max(beam.radius) * LENGTH_UNITS[section.units]
    scale, unit = (1000 / LENGTH_UNITS[section.units], "µm") if in_mm < 1 else (1.0,
                                                                               section.units)
    radius = [r * scale for r in beam.radius]
    top = 1.25 * max(radius)
    ax.fill_between(beam.z, [-r for r in radius], radius, color=colour,
                    alpha=STYLE["beam_alpha"], lw=0)
    for sign in (1, -1):
        ax.plot(beam.z, [sign * r for r in radius], color=colour, lw=0.9)
    ax.axhline(0, color=axis, lw=0.6, ls=(0, (8, 3, 1, 3)))
    for profile in section.profiles:
        ax.axvline(profile.z, color=axis, lw=0.6, ls=(0, (2, 2)))
        ax.annotate(profile.name, (profile.z, top), (2, -2), textcoords="offset points",
                    ha="left", va="top", fontsize=font - 1, color=axis)
    width = xlim[1] - xlim[0]
    for z, r, words in beam.waists:
        ax.plot([z, z], [-r * scale, r * scale], color=colour, lw=1.8, solid_capstyle="butt")
        where = (z - xlim[0]) / width  # names near an edge lean inwards
        align, shift = ("left", 3) if where < 0.15 else ("right", -3) if where > 0.85 else (
            "center", 0)
        ax.annotate(words, (z, -r * scale), (shift, -3), textcoords="offset points",
                    ha=align, va="top", fontsize=font - 1, color=ink)
    ax.set_xlim(*xlim)
    ax.set_ylim(-top, top)
    for side in ("top", "right"):
        ax.spines[side].set_visible(False)
    for side in ("bottom", "left"):
        ax.spines[side].set_color(axis)
    ax.tick_params(colors=axis, labelsize=font - 1)
    # the radius labels inside the axes: the cross-section above leaves no margin for them
    ax.tick_params(axis="y", direction="in", pad=-3)
    for label in ax.get_yticklabels():
        label.set_horizontalalignment("left")
    ax.set_title(f"the beam at an enlarged radial scale: 1/e² radius in {unit}",
                 fontsize=font, color=ink, loc="left", pad=3)


def _label_levels(section: CrossSection, char: float) -> list[int | None]:
    """A height level for each surface name so that no two names overlap: a name moves up a
    level while its text (about `char` layout units per character, plus a gap) would touch a
    name already placed on that level; past the last level it is left out (None)."""
    placed: list[tuple[float, float, int]] = []  # (left, right, level)
    levels: list[int | None] = []
    for profile in section.profiles:
        half = char * (len(profile.name) + 1.5) / 2
        left, right = profile.z - half, profile.z + half
        level: int | None = 0
        while any(lv == level and left < r and l < right for l, r, lv in placed):
            level += 1
            if level >= _MAX_LEVELS:
                level = None
                break
        if level is not None:
            placed.append((left, right, level))
        levels.append(level)
    return levels


def _draw_rays(ax: Any, system: System, sets: list[tuple[str, str, CrossSection]]) -> list:
    """Draw every bundle; return legend handles for exactly what was drawn."""
    from matplotlib.lines import Line2D

    ink = STYLE["ink"]
    by_wavelength = len(sets) > 1
    drawn_fields: list[float] = []
    handles = []
    kinds = set()
    for index, (label, colour, section) in enumerate(sets):
        primary = index == len(sets) - 1
        drawn = False
        for ray in section.rays:
            if by_wavelength and not primary and ray.field != 0:
                continue  # other wavelengths: the axial bundle only, or the picture is a tangle
            if by_wavelength:
                line_colour, style = colour, _FIELD_DASHES.get(ray.field, "-")
            else:
                line_colour, style = _field_colour(section, ray.field), "-"
            ax.plot(ray.z, ray.y, color=line_colour, lw=0.8, ls=style, zorder=3)
            if ray.virtual_z:  # where the light seems to come from: faint and dotted
                ax.plot(ray.virtual_z, ray.virtual_y, color=line_colour, lw=0.6,
                        ls=(0, (1, 2)), alpha=0.6, zorder=3)
            drawn = True
            kinds.add("exact" if ray.label == "exact" else "paraxial")
            if ray.field not in drawn_fields:
                drawn_fields.append(ray.field)
        if by_wavelength and drawn and label:
            handles.append(Line2D([], [], color=colour, lw=1.5, label=label))
    if by_wavelength:  # the wavelengths from short to long, wherever the primary is drawn
        handles.sort(key=lambda h: _legend_order(h.get_label()))
    section = sets[-1][2]
    for fraction in sorted(drawn_fields):
        words = _field_words(system, fraction)
        if by_wavelength:
            if fraction:
                handles.append(Line2D([], [], color=ink, lw=0.9, ls=_FIELD_DASHES[fraction],
                                      label=words))
        else:
            handles.append(Line2D([], [], color=_field_colour(section, fraction), lw=1.5,
                                  label=words))
    if kinds:
        words = {"exact": "exact rays, aimed at the real stop", "paraxial": "paraxial rays"}
        handles.append(Line2D([], [], color="none",
                              label=" and ".join(words[k] for k in sorted(kinds))
                              + (f" ({sets[0][0]})" if not by_wavelength and sets[0][0] else "")))
    return handles


def _field_colour(section: CrossSection, fraction: float) -> str:
    colours = STYLE["fields"]
    fields = list(section.fields) or [0.0]
    return colours[fields.index(fraction) % len(colours)] if fraction in fields else colours[0]


def _draw_profile(ax: Any, profile, y_max: float) -> None:
    ink = STYLE["ink"]
    if profile.kind == IDEAL:  # a thin ideal lens: a line with arrow tips, outward for power
        r = profile.semi_aperture
        style = "<|-|>" if profile.power >= 0 else "]-["
        ax.annotate("", (profile.z, r), (profile.z, -r),
                    arrowprops={"arrowstyle": style, "color": ink, "lw": 1.2,
                                "shrinkA": 0, "shrinkB": 0})
        return
    z, y = profile.points()
    if profile.kind == MIRROR:
        ax.plot(z, y, color=STYLE["mirror"], lw=2.0, zorder=4, solid_capstyle="butt")
        # short strokes on the back: behind the mirror is further along the arriving light
        back = profile.sense_in
        tick = 0.05 * max(profile.semi_aperture, 0.2 * y_max)
        for zi, yi in zip(z[::3], y[::3]):
            ax.plot([zi, zi + back * tick], [yi, yi + tick], color=STYLE["mirror"], lw=0.7,
                    zorder=4)
    else:
        ax.plot(z, y, color=ink, lw=1.0, zorder=4)
    shadow = profile.obscuration_points()
    if shadow is not None:  # the blocking disc, a grey band just before the surface
        zs, ys = shadow
        lead = -profile.sense_in * 0.02 * max(profile.semi_aperture, 0.2 * y_max)
        ax.plot(zs + lead, ys, color=STYLE["axis"], lw=4.0, alpha=0.55, zorder=5,
                solid_capstyle="butt")


@guarded
def save_drawing(system: System, path: str | Path, kind: str | None = None,
                 hazards: tuple[str, ...] = (), exact: bool = True,
                 dpi: float | None = None) -> None:
    """Write the drawing to `path` (svg, png or pdf, from `kind` or the file suffix); `dpi`
    sets a PNG's resolution (its width in pixels is FIGURE_WIDTH × dpi)."""
    kind = kind or Path(path).suffix.lower().lstrip(".")
    Path(path).write_bytes(drawing_bytes(system, kind, hazards, exact, dpi))


@guarded
def drawing_bytes(system: System, kind: str = "svg", hazards: tuple[str, ...] = (),
                  exact: bool = True, dpi: float | None = None) -> bytes:
    """The drawing as the bytes of an svg, png or pdf file (the same layout, the same bytes)."""
    return figure_bytes(lambda: figure(system, hazards, exact), kind, dpi)


def figure_bytes(make_figure, kind: str = "svg", dpi: float | None = None) -> bytes:
    """The bytes of the figure `make_figure()` builds, written deterministically (fixed SVG id
    salt, no dates, one font): every picture of layoutlang goes through here."""
    import io

    import matplotlib

    matplotlib.use("Agg")
    import matplotlib.pyplot as plt

    with matplotlib.rc_context({"svg.hashsalt": "layoutlang", "svg.fonttype": "none",
                                "pdf.compression": 6, "font.family": "DejaVu Sans"}):
        fig = make_figure()
        buffer = io.BytesIO()
        options = {"dpi": dpi} if dpi is not None and kind == "png" else {}
        fig.savefig(buffer, format=kind, metadata=_METADATA[kind], **options)
    plt.close(fig)
    return buffer.getvalue()


def _legend_order(label: str) -> float:
    """Where a legend entry goes, short wavelengths first: the first number of its label (one
    entry lists every wavelength, '587.562, 486.1 nm', when the media do not disperse)."""
    import re

    match = re.match(r"\s*([0-9]+(?:\.[0-9]*)?)", label)
    return float(match.group(1)) if match else 0.0


def draw_object(ax, object_plane, ink, font) -> None:
    """The object as an upright arrow at its plane (nothing when the layout has none drawn)."""
    if object_plane is None:
        return
    z, h = object_plane
    if h:
        ax.annotate("", (z, h), (z, 0), arrowprops={"arrowstyle": "-|>", "color": ink,
                                                      "lw": 1.0})
    ax.annotate("object", (z, 0), (0, -3), textcoords="offset points", ha="center",
                va="top", fontsize=font, color=ink)
