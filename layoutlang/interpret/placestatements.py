"""Interpreter part for surfaces placed in space (statements of grammar/placement.lark).

A mixin of the interpreter. `fold` and `prism` add boundaries at once (through the ordinary
boundary statement, so names, gaps and media are checked in one place); `tilt` and `decenter`
are collected and resolved at the end of the script by name, in any order, into
`Boundary.placement` (one surface) and `System.groups` (`through`: an element moved as one
body about its first vertex). A prism's face tilts need the glass index at the primary
wavelength, so they are set once the media are known.

Impossible combinations are errors at their words: an angle of 90° or more, a shift along the
axis (that is a gap), a fold about the axis itself, a fold or prism face told to fold again, a
decentred mirror whose axis follows, two statements that disagree about the axis, a tilt given
twice about one axis, groups that overlap without one holding the other.
"""

from __future__ import annotations

import difflib
import math
from dataclasses import dataclass, field, replace
from typing import Any

from ..errors import LayoutNameError, LayoutValueError
from ..surfaces.placement import FOLLOWS, RETURNS, Placement
from ..syntax import tree as t
from ..system import MIRROR, GroupPlacement, System

__all__ = ["PlaceStatements", "PRISM"]

#: The name of a prism's group: `System.groups` holds each prism as an unmoved group.
PRISM = "prism "

_AXES = {"x": 0, "y": 1, "z": 2}
_RIGHT = math.pi / 2


@dataclass
class _Move:
    """The tilts and decenters said about one target (a surface, or first..last)."""

    tilt: list = field(default_factory=lambda: [0.0, 0.0, 0.0])
    decenter: list = field(default_factory=lambda: [0.0, 0.0])
    said: dict = field(default_factory=dict)  # ('tilt', axis) -> node
    mode: str | None = None
    mode_node: t.Node | None = None
    first: t.Ident | None = None
    last: t.Ident | None = None


class PlaceStatements:
    """`tilt`, `decenter`, `fold`, `prism`, `tilt image plane`."""

    def _placement_state(self) -> dict:
        state = self.__dict__.get("_place_state")
        if state is None:
            state = self.__dict__["_place_state"] = {
                "moves": {}, "order": [], "fixed": {}, "prisms": [], "image": None,
                "image_node": None}
        return state

    def _place_number(self, value: Any, node: t.Node) -> float:
        try:
            number = float(value)
        except TypeError:
            raise LayoutValueError("a placement needs a number: symbols cannot place a surface",
                                   self.span(node)) from None
        return number

    def statement_PlaceMove(self, node: t.PlaceMove) -> None:
        """tilt NAME [through NAME] by ANGLE about x|y|z[, axis follows|returns]
        decenter NAME [through NAME] by LENGTH along x|y[, axis follows|returns]"""
        state = self._placement_state()
        key = (node.first.text, None if node.last is None else node.last.text)
        move = state["moves"].get(key)
        if move is None:
            move = state["moves"][key] = _Move(first=node.first, last=node.last)
            state["order"].append(key)
        axis = _AXES[node.axis]
        said = (node.kind, axis)
        if said in move.said:
            word = "tilt about" if node.kind == "tilt" else "decenter along"
            raise LayoutValueError(
                f"the {word} {node.axis} of this {'group' if node.last else 'surface'} is given "
                f"twice (first on line {move.said[said].pos.line})", self.span(node),
                hint="add the two into one statement")
        if node.kind == "tilt":
            angle = self._place_number(self.angle(node.amount, "a tilt"), node.amount)
            limit = math.pi if axis == 2 else _RIGHT
            if abs(angle) >= limit:
                raise LayoutValueError(
                    "a tilt about z must be within ±180 deg" if axis == 2 else
                    "a tilt about x or y must be less than 90 deg: the surface would face "
                    "away from the light", self.span(node.amount))
            move.tilt[axis] = angle
        else:
            if axis == 2:
                raise LayoutValueError(
                    "a decenter is across the axis (x or y): a shift along z is a change of "
                    "gap", self.span(node), hint="change the gap before the surface instead")
            self._fix_units(node)
            move.decenter[axis] = self._place_number(self.length(node.amount, "a decenter"),
                                                     node.amount)
        move.said[said] = node
        if node.mode is not None:
            if move.mode is not None and move.mode != node.mode:
                raise LayoutValueError(
                    f"the axis cannot both follow and return (line {move.mode_node.pos.line} "
                    f"says 'axis {move.mode}')", self.span(node),
                    hint="say it once, on one of the statements")
            move.mode, move.mode_node = node.mode, node

    def statement_Fold(self, node: t.Fold) -> None:
        """fold [NAME] at ANGLE about x|y[, clear diameter D]"""
        angle = self._place_number(self.angle(node.angle, "a fold angle"), node.angle)
        if node.axis == "z":
            raise LayoutValueError("a mirror turned about z (the axis itself) folds nothing",
                                   self.span(node), hint="fold about x or y")
        if angle == 0:
            raise LayoutValueError("a fold at 0 deg sends the light straight back",
                                   self.span(node.angle),
                                   hint="write 'mirror NAME flat' for a mirror square to the axis")
        if abs(angle) >= _RIGHT:
            raise LayoutValueError("a fold mirror must be turned by less than 90 deg",
                                   self.span(node.angle))
        mirror = t.BoundaryStatement("mirror", node.name, shape=t.Shape("flat", pos=node.pos),
                                     clear_diameter=node.clear_diameter, pos=node.pos)
        self.statement_BoundaryStatement(mirror)
        tilt = [0.0, 0.0, 0.0]
        tilt[_AXES[node.axis]] = angle
        self._placement_state()["fixed"][len(self.boundaries) - 1] = (Placement(tilt=tuple(tilt),
                                                                      axis=FOLLOWS), node)

    def statement_Prism(self, node: t.Prism) -> None:
        """prism NAME in MEDIUM, apex A[, thickness T][, incidence I][, clear diameter D]
        prism NAME in MEDIUM, right angle, size S"""
        outside = self.current_medium
        glass = self.medium_named(node.medium)
        if outside is None:
            raise LayoutValueError("a prism before any medium", self.span(node),
                                   hint="say where the light starts first, e.g. 'start in air'")
        first = len(self.boundaries)

        def face(suffix: str, into: str, kind: str = "surface", clear=None) -> None:
            ident = t.Ident(f"{node.name.text}_{suffix}", pos=node.name.pos)
            self.statement_BoundaryStatement(t.BoundaryStatement(
                kind, ident, shape=t.Shape("flat", pos=node.pos),
                into=None if kind == "mirror" else t.Ident(into, pos=node.medium.pos),
                clear_diameter=clear, pos=node.pos))

        def inner_gap(value: Any) -> None:
            self.pending_gap, self.pending_gap_value = node, value

        if node.kind == "right angle":
            size = self.positive(self.length(node.size, "a prism size"), node.size,
                                 "a prism size")
            self._place_number(size, node.size)
            side = t.Number(repr(float(size)), None, pos=node.size.pos)
            face("front", glass, clear=side)
            inner_gap(size / 2)
            face("fold", glass, kind="mirror",
                 clear=t.Number(repr(float(size) * math.sqrt(2)), None, pos=node.size.pos))
            self._placement_state()["fixed"][first + 1] = (Placement(tilt=(math.pi / 4, 0.0, 0.0),
                                                           axis=FOLLOWS), node)
            inner_gap(size / 2)
            face("back", outside, clear=side)
        else:
            apex = self._place_number(self.angle(node.apex, "an apex angle"), node.apex)
            if not 0 < apex < math.pi:
                raise LayoutValueError("an apex angle must be more than 0 and less than 180 deg",
                                       self.span(node.apex))
            if node.thickness is None:
                raise LayoutValueError("a wedge prism needs its thickness along the axis",
                                       self.span(node), expected="', thickness 10' after the apex")
            thickness = self.positive(self.length(node.thickness, "a prism thickness"),
                                      node.thickness, "a prism thickness")
            incidence = None
            if node.incidence is not None:
                incidence = self._place_number(self.angle(node.incidence, "an incidence angle"),
                                               node.incidence)
                if abs(incidence) >= _RIGHT:
                    raise LayoutValueError("an incidence angle must be less than 90 deg",
                                           self.span(node.incidence))
            face("front", glass, clear=node.clear_diameter)
            inner_gap(self._place_number(thickness, node.thickness))
            face("back", outside, clear=node.clear_diameter)
            self._placement_state()["prism_faces"] = self._placement_state().get("prism_faces", [])
            self._placement_state()["prism_faces"].append((first, apex, incidence, node))
        self._placement_state()["prisms"].append((first, len(self.boundaries) - 1, node.name.text))

    def statement_ImageTilt(self, node: t.ImageTilt) -> None:
        """tilt image plane by ANGLE about x|y"""
        state = self._placement_state()
        self.once(state["image_node"], node, "the tilt of the image plane")
        if node.axis == "z":
            raise LayoutValueError("turning the image plane about the axis changes nothing that "
                                   "is computed", self.span(node), hint="tilt it about x or y")
        angle = self._place_number(self.angle(node.angle, "an image plane tilt"), node.angle)
        if abs(angle) >= _RIGHT:
            raise LayoutValueError("an image plane tilt must be less than 90 deg",
                                   self.span(node.angle))
        tilt = [0.0, 0.0, 0.0]
        tilt[_AXES[node.axis]] = angle
        state["image"], state["image_node"] = tuple(tilt), node

    # --- at the end of the script -------------------------------------------------------------
    def placed_system(self, system: System) -> System:
        """The layout with every placement resolved (media and indices known by now)."""
        state = self._placement_state()
        if not (state["moves"] or state["fixed"] or state["prisms"] or state["image"]):
            return system
        boundaries = list(system.boundaries)
        fixed = dict(state["fixed"])
        indices = system.indices()
        for first, apex, incidence, node in state.get("prism_faces", []):
            n = float(indices[first + 1]) / float(indices[first])
            if incidence is None:  # symmetric: minimum deviation at the primary wavelength
                if n * math.sin(apex / 2) >= 1:
                    raise LayoutValueError(
                        "no ray passes this prism at minimum deviation: n·sin(apex/2) ≥ 1",
                        self.span(node.apex))
                incidence = math.asin(n * math.sin(apex / 2))
            inside = math.asin(math.sin(incidence) / n)
            if abs(apex - inside) >= _RIGHT or abs(math.sin(apex - inside) * n) >= 1:
                raise LayoutValueError("the axis cannot leave this prism: it is totally "
                                       "reflected at the second face", self.span(node))
            fixed[first] = (Placement(tilt=(incidence, 0.0, 0.0), axis=FOLLOWS), node)
            fixed[first + 1] = (Placement(tilt=(inside - apex, 0.0, 0.0), axis=FOLLOWS), node)
        for index, (placement, _) in fixed.items():
            boundaries[index] = replace(boundaries[index], placement=placement)
        groups = list(system.groups)
        ranges: list[tuple[int, int, t.Node]] = []
        for key in state["order"]:
            move = state["moves"][key]
            first = self._placed_index(system, move.first)
            last = first if move.last is None else self._placed_index(system, move.last)
            anchor = next(iter(move.said.values()))
            if last < first:
                raise LayoutValueError(
                    f"{move.last.text!r} comes before {move.first.text!r}: a group runs from its "
                    "first surface to its last", self.span(move.last))
            mode = FOLLOWS if move.mode == "follows" else RETURNS
            placement = Placement(tuple(move.decenter), tuple(move.tilt), mode)
            if mode == FOLLOWS and any(move.decenter) and any(
                    system.boundaries[i].kind == MIRROR for i in range(first, last + 1)) \
                    and move.last is None:
                raise LayoutValueError("a decentred mirror cannot also carry the axis: decenter "
                                       "it without 'axis follows'", self.span(move.mode_node))
            for lo, hi, other in ranges:
                inside = lo <= first and last <= hi or first <= lo and hi <= last
                if not (last < lo or hi < first or inside):
                    raise LayoutValueError(
                        f"this group overlaps the one on line {other.pos.line} without holding "
                        "it or being held by it", self.span(anchor))
            if move.last is None and first not in fixed and boundaries[first].placement is None:
                boundaries[first] = replace(boundaries[first], placement=placement)
                continue
            if move.last is None and mode == FOLLOWS:
                raise LayoutValueError(
                    f"{move.first.text!r} already turns the axis (a fold or a prism face)",
                    self.span(move.mode_node), hint="tilt it as a perturbation, without "
                    "'axis follows'")
            ranges.append((first, last, anchor))
            groups.append(GroupPlacement(first, last, placement, "" if move.last is None
                                         else f"{move.first.text} through {move.last.text}"))
        for first, last, name in state["prisms"]:
            groups.append(GroupPlacement(first, last, Placement(), PRISM + name))
        image = system.image
        if state["image"] is not None:
            image = replace(image, tilt=state["image"])
        return replace(system, boundaries=tuple(boundaries), groups=tuple(groups), image=image)

    def _placed_index(self, system: System, ident: t.Ident) -> int:
        try:
            return system.boundary_index(ident.text)
        except KeyError:
            names = [b.name for b in system.boundaries]
            close = difflib.get_close_matches(ident.text, names, n=1)
            raise LayoutNameError(f"no surface named {ident.text!r} to place",
                                  self.span(ident),
                                  expected="the name of a surface, mirror, lens or prism face",
                                  hint=f"did you mean {close[0]!r}?" if close else None) from None
