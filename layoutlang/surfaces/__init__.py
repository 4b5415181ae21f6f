"""What a boundary is, apart from the media around it: its profile (shape), its aperture
(where light may meet it) and its placement in space. Every engine reads these, none keeps its
own idea of a surface."""

from .aperture import Aperture
from .placement import Frame, Placement
from .profile import Profile

__all__ = ["Aperture", "Frame", "Placement", "Profile"]
