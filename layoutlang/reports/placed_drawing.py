"""Draw a placed layout (folds, tilts, decenters, prisms) in the plane of the fold.

The same quiet style as `drawing.py` (its colours, ray bundles and legend), but every part is
drawn where `placed_section.py` put it: faces as tilted outlines, the folded axis as a
polyline, the stop's bars and the image plane across their own frames, names beside the faces
(a folded path has no single row above it to hang them on). Equal scales on both axes.
"""

from __future__ import annotations

from typing import Any

from ..system import IDEAL, MIRROR, System
from .cross_section import CrossSection
from .drawing import MAX_AXES_HEIGHT, STYLE, _draw_rays, draw_object

__all__ = ["placed_figure"]


def placed_figure(system: System, sets: list[tuple[str, str, CrossSection]],
                  hazards: tuple[str, ...], figure_width: float) -> Any:
    """A matplotlib Figure of a placed layout (see `drawing.figure`)."""
    from matplotlib.figure import Figure

    section = sets[-1][2]
    u0, u1, v0, v1 = section.placed.bounds
    for _, _, other in sets[:-1]:
        a, b, c, d = other.placed.bounds
        u0, u1, v0, v1 = min(u0, a), max(u1, b), min(v0, c), max(v1, d)
    width = max(u1 - u0, 1e-9)
    notes = list(section.notes)
    if hazards:
        notes.insert(0, "CAUTION (" + ", ".join(hazards) + "): see the report's caution; follow "
                     "local codes and licensed practice")
    span = 1.3 * width  # room for the names beside the faces
    axes_w = figure_width - 1.0  # room for the y ticks on the left
    for _ in range(3):
        per_unit = axes_w * 72 / span
        y_top, y_bottom = v1 + 26 / per_unit, v0 - 18 / per_unit
        axes_h = (y_top - y_bottom) * per_unit / 72
        if axes_h <= MAX_AXES_HEIGHT:
            break
        axes_w *= MAX_AXES_HEIGHT / axes_h
    header, footer = 0.75, 0.5 + 0.15 * len(notes)
    fig_h = header + axes_h + footer
    fig = Figure(figsize=(figure_width, fig_h), dpi=110)
    left = 0.75 / figure_width
    ax = fig.add_axes([left, footer / fig_h, axes_w / figure_width, axes_h / fig_h])
    ink, font = STYLE["ink"], STYLE["font"]
    view = section.placed

    ax.plot(*view.axis, color=STYLE["axis"], lw=0.7, ls=(0, (8, 3, 1, 3)), zorder=1)
    media = sorted({e.medium for e in section.elements})
    for element in section.elements:
        u, v = element.outline(section.profiles)
        tint = STYLE["glass"][media.index(element.medium) % len(STYLE["glass"])]
        ax.fill(u, v, facecolor=tint, edgecolor=ink, lw=0.9, zorder=2)
    scale = max(u1 - u0, v1 - v0)
    for profile in section.profiles:
        _draw_face(ax, profile, scale)
    _names(ax, section, 0.62 * font / per_unit)
    for (a, b) in view.stop_marks:
        ax.plot([a[0], b[0]], [a[1], b[1]], color=ink, lw=3.2, solid_capstyle="butt", zorder=4)
    if view.stop_marks:
        tip = view.stop_marks[-1][1]
        ax.annotate("stop", tip, (0, -2), textcoords="offset points", ha="center", va="top",
                    fontsize=font, color=ink)
    if view.image_line is not None:
        (a, b) = view.image_line
        ax.plot([a[0], b[0]], [a[1], b[1]], color=ink, lw=1.1, zorder=4)
        low = min(view.image_line, key=lambda p: (p[1], p[0]))
        ax.annotate("image", low, (0, -3), textcoords="offset points", ha="center", va="top",
                    fontsize=font, color=ink)
    draw_object(ax, section.object_plane, ink, font)
    handles = _draw_rays(ax, system, sets)
    if handles:
        fig.legend(handles=handles, loc="upper left", fontsize=font, frameon=False,
                   ncol=min(len(handles), 4),
                   bbox_to_anchor=(0.1 / figure_width, 1 - 0.32 / fig_h))
    ax.set_xlim(u0 - 0.04 * width, u0 - 0.04 * width + span)
    ax.set_ylim(y_bottom, y_top)
    ax.set_aspect("equal", adjustable="datalim")
    for side in ("top", "right"):
        ax.spines[side].set_visible(False)
    for side in ("bottom", "left"):
        ax.spines[side].set_color(STYLE["axis"])
    ax.tick_params(colors=STYLE["axis"], labelsize=font)
    across = "y" if view.plane != "the x-z plane" else "x"
    ax.set_xlabel(f"global z ({section.units}); light starts toward +z; drawn in {view.plane}",
                  fontsize=font, color=ink)
    ax.set_ylabel(f"global {across} ({section.units})" if view.plane != "the plane of the fold"
                  else f"across ({section.units})", fontsize=font, color=ink)
    fig.text(0.2 / figure_width, 1 - 0.1 / fig_h, section.title or "layout", fontsize=font + 2,
             color=ink, va="top")
    if notes:
        fig.text(0.2 / figure_width, 0.06 / fig_h, "\n".join(notes), fontsize=font - 1,
                 color=STYLE["axis"], va="bottom")
    return fig


def _draw_face(ax: Any, profile, scale: float) -> None:
    """One face on its own line: an ideal lens with arrow tips, a mirror heavy with strokes on
    its back (the side the arriving light would go on to), a refracting face a thin line."""
    ink = STYLE["ink"]
    u, v = profile.points()
    if profile.kind == IDEAL:
        style = "<|-|>" if profile.power >= 0 else "]-["
        ax.annotate("", (u[-1], v[-1]), (u[0], v[0]),
                    arrowprops={"arrowstyle": style, "color": ink, "lw": 1.2,
                                "shrinkA": 0, "shrinkB": 0})
        return
    if profile.kind == MIRROR:
        ax.plot(u, v, color=STYLE["mirror"], lw=2.0, zorder=4, solid_capstyle="butt")
        back = profile.back or (1.0, 0.0)
        du, dv = u[-1] - u[0], v[-1] - v[0]
        length = (du * du + dv * dv) ** 0.5 or 1.0
        tick = 0.05 * max(profile.semi_aperture, 0.02 * scale)
        su, sv = tick * (back[0] + du / length), tick * (back[1] + dv / length)
        for ui, vi in zip(u[::3], v[::3]):
            ax.plot([ui, ui + su], [vi, vi + sv], color=STYLE["mirror"], lw=0.7, zorder=4)
    else:
        ax.plot(u, v, color=ink, lw=1.0, zorder=4)


def _names(ax: Any, section: CrossSection, char: float) -> None:
    """Each face's name beside the end of its outline farthest from the drawing's centre line
    (upward for upright faces, to the side for lying ones); a name that would sit on one
    already placed moves one line further out."""
    ink, font = STYLE["ink"], STYLE["font"]
    placed: list[tuple[float, float, float]] = []  # (left, right, v) of each name

    def box(point: tuple[float, float], name: str, ha: str) -> tuple[float, float, float]:
        wide = char * (len(name) + 1)
        left = point[0] - wide / 2 if ha == "center" else point[0]
        return left, left + wide, point[1]

    def crowded(point: tuple[float, float], name: str, ha: str) -> bool:
        left, right, v = box(point, name, ha)
        return any(left < r and l < right and abs(v - b) < 2.2 * char for l, r, b in placed)

    for profile in section.profiles:
        u, v = profile.points()
        upright = abs(v[-1] - v[0]) >= 0.5 * abs(u[-1] - u[0])
        if upright:  # above its upper end, else below its lower end
            high, low = (0, -1) if v[0] > v[-1] else (-1, 0)
            choices = [((u[high], v[high]), (0, 4), "bottom", 1.8),
                       ((u[low], v[low]), (0, -4), "top", -1.8)]
            ha = "center"
        else:  # beside its right end
            right = 0 if u[0] > u[-1] else -1
            choices = [((u[right], v[right]), (5, 0), "center", -1.8)]
            ha = "left"
        anchor, offset, va, step = next(
            (c for c in choices if not crowded(c[0], profile.name, ha)), choices[0])
        for _ in range(6):
            if not crowded(anchor, profile.name, ha):
                break
            anchor = (anchor[0], anchor[1] + step * char)
        placed.append(box(anchor, profile.name, ha))
        ax.annotate(profile.name, anchor, offset, textcoords="offset points", ha=ha, va=va,
                    fontsize=font, color=ink)
