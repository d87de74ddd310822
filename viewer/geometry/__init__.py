"""Curves, sectors, markers and labels as arrays, from a Scene and a time, in float64.

Owns the view (camera directions and projection), the adaptive tessellation of conics,
the sector fans, the annotation marks, label placement, the starfield and the
preparation of large populations, and one frame's geometry in image pixels
(``build_frame``). Pure numpy: may import viewer.orbit, viewer.scene and viewer.units,
never GL, windowing or UI (the renderer passes in a text measure).
"""

from .camera import View, look_basis, view_for
from .conic import TOLERANCE_PX, ConicShape, CurveBatch, Tessellation, tessellate
from .frame import FrameGeometry, build_frame

__all__ = [
    "TOLERANCE_PX", "ConicShape", "CurveBatch", "FrameGeometry", "Tessellation", "View",
    "build_frame", "look_basis", "tessellate", "view_for",
]
