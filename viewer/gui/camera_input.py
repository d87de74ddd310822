"""Camera moves from the mouse: orbit, pan, zoom toward the cursor, presets.

Pure functions from (Camera, View, pixels) to a new Camera (the frozen scene dataclass),
so the window keeps no camera state but the current Camera. Pixel offsets are in image
pixels (x right, y down). Directions follow scene-format.md ("Camera directions"): a
top view is elevation 90 deg, an edge view elevation 0, both at azimuth -90 deg, so
dragging away from a preset turns the picture continuously.
"""

from __future__ import annotations

import math
from dataclasses import replace

import numpy as np

from ..geometry.camera import View
from ..scene.model import Camera

#: Radians of turn per pixel of drag.
ORBIT_RAD_PER_PX = math.radians(0.3)
#: Width factor per wheel notch (below 1 zooms in).
ZOOM_PER_NOTCH = 0.85
_HALF_PI = math.pi / 2


def as_angles(camera: Camera) -> Camera:
    """The same direction as explicit elevation and azimuth (look = "angles")."""
    if camera.look == "top":
        return replace(camera, look="angles", elevation_rad=_HALF_PI, azimuth_rad=-_HALF_PI)
    if camera.look == "edge":
        return replace(camera, look="angles", elevation_rad=0.0, azimuth_rad=-_HALF_PI)
    return camera


def orbit(camera: Camera, dx_px: float, dy_px: float) -> Camera:
    """Turn the eye around the target: right-drag turns the scene right, down tilts it."""
    c = as_angles(camera)
    el = min(_HALF_PI, max(-_HALF_PI, c.elevation_rad + dy_px * ORBIT_RAD_PER_PX))
    az = math.remainder(c.azimuth_rad - dx_px * ORBIT_RAD_PER_PX, 2.0 * math.pi)
    return replace(c, elevation_rad=el, azimuth_rad=az)


def _point(view: View, x_px: float, y_px: float) -> np.ndarray:
    """The world point (m) under image pixel (x, y) in the target's plane."""
    w, h = view.size_px
    right, up = view.basis[0], view.basis[1]
    s = 1.0 / view.px_per_m
    return view.origin_m + ((x_px - 0.5 * w) * right - (y_px - 0.5 * h) * up) * s


def pan(camera: Camera, view: View, dx_px: float, dy_px: float) -> Camera:
    """Slide the picture with the mouse: the target becomes a fixed point."""
    w, h = view.size_px
    p = _point(view, 0.5 * w - dx_px, 0.5 * h - dy_px)
    return replace(camera, target=(float(p[0]), float(p[1]), float(p[2])))


def zoom(camera: Camera, view: View, notches: float, x_px: float, y_px: float) -> Camera:
    """Zoom by wheel notches (positive: in), keeping the point under the cursor still."""
    f = ZOOM_PER_NOTCH ** notches
    p = _point(view, x_px, y_px)
    o = p + (view.origin_m - p) * f
    return replace(camera, width_m=camera.width_m * f, distance_m=camera.distance_m * f,
                   target=(float(o[0]), float(o[1]), float(o[2])))


def preset(camera: Camera, look: str) -> Camera:
    """The camera looking from the "top" (+Z) or along the "edge" (-Y)."""
    return replace(camera, look=look)


def focus(camera: Camera, target: str) -> Camera:
    """Follow a body (its name) or the central body ("center")."""
    return replace(camera, target=target)
