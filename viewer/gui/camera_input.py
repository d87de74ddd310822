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
from typing import Any

import numpy as np

from ..geometry.camera import View
from ..orbit import state_from_elements
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


def on_screen(view: View, ui_scale: float, free_px: tuple[int, int, int, int]) -> View:
    """The window's ``view``: labels, markers and lines sized in screen pixels by the UI
    scale, as the panel text is (an export sizes them by its image height instead), and
    labels kept inside ``free_px`` (x, y from the top, width, height), the area the
    panels leave free."""
    x0, top, w, h = free_px
    return replace(view, style_height_px=max(1, round(1080.0 * ui_scale)),
                   label_box_px=(float(x0), float(top), float(x0 + w), float(top + h)))


def fit(camera: Camera, scene: Any, t_s: float, window_px: tuple[int, int],
        free_px: tuple[int, int], margin: float = 0.9) -> Camera:
    """The camera framing every orbit of ``scene`` (and the central body) inside the part
    of the window the panels leave free, ``free_px`` of ``window_px``, looking the same
    way. Orthographic: ``width`` (which spans the whole window); perspective: the eye's
    distance. The target becomes the centre of the orbits' extent."""
    from ..geometry.camera import view_for

    view = view_for(scene, t_s, window_px, camera)
    pts = [np.zeros((1, 3))]
    for b in scene.bodies:
        el = b.elements_at(t_s)
        e = float(el.e)
        if e < 1.0:
            nu = np.linspace(0.0, 2.0 * math.pi, 181)
        else:
            r_max = b.limit_radius_m or 5.0 * float(el.periapsis)
            c = max(-1.0, min(1.0, (float(el.p) / r_max - 1.0) / e))
            nu = np.linspace(-math.acos(c), math.acos(c), 181)
        r, _ = state_from_elements(el.with_(nu=nu))
        pts.append(np.asarray(r).reshape(-1, 3))
    p = np.concatenate(pts) - view.origin_m
    x, y = p @ view.basis[0], p @ view.basis[1]
    cx, cy = 0.5 * (x.max() + x.min()), 0.5 * (y.max() + y.min())
    bw = max(float(x.max() - x.min()), 1.0)
    bh = max(float(y.max() - y.min()), 1.0)
    target = view.origin_m + cx * view.basis[0] + cy * view.basis[1]
    W, H = window_px
    fw, fh = max(free_px[0], 1), max(free_px[1], 1)
    out = replace(camera, target=(float(target[0]), float(target[1]), float(target[2])))
    if camera.projection == "perspective":
        tan = 2.0 * math.tan(0.5 * camera.fov_rad)
        d = max(bw * H / (margin * fw * tan), bh * H / (margin * fh * tan))
        return replace(out, distance_m=d)
    return replace(out, width_m=max(bw * W / (margin * fw), bh * W / (margin * fh)))
