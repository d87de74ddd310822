"""The dome grid: an alignment aid drawn on a dome master, in the dome's own frame.

Rings of equal elevation every 15 deg of zenith angle (labelled with their elevation above
the dome's spring line, which is the horizon of a 180 deg dome), spokes of equal azimuth
every 30 deg from the rim to the 75 deg ring, and the front (the bottom of the frame)
marked with a brighter spoke and the word "front"; "back", "left" and "right" near the
rim. It does not follow the picture's tilt: it is the dome's, so a producer can check
orientation on their own dome. Pure numpy; drawn as strokes and labels in output pixels
after the reprojection.
"""

from __future__ import annotations

import math

import numpy as np
from numpy.typing import NDArray

from ..geometry.camera import View
from ..geometry.labels import LabelRequest
from ..geometry.strokes import STROKE_FLOATS, PolylineBatch, StrokeStyle, stroke_vertices
from .immersive_text import OutputMap

Floats = NDArray[np.float64]

RING_STEP_DEG = 15.0
SPOKE_STEP_DEG = 30.0
#: Spokes stop at this zenith angle, so the zenith stays clear (deg).
SPOKE_END_ZENITH_DEG = 15.0
GRID_RGBA = (0.55, 0.85, 0.65, 0.55)
FRONT_RGBA = (1.0, 0.55, 0.35, 0.95)
TEXT_RGBA = (0.75, 0.95, 0.8, 0.95)
#: Line width and text height of the grid as angles on the sky (deg).
LINE_DEG = 0.18
TEXT_DEG = 2.0


def pixel_view(size_px: tuple[int, int]) -> View:
    """A View whose "metres" are output pixels: (x - W/2, H/2 - y, 0) lands on pixel (x, y)."""
    w, h = size_px
    return View(size_px=(w, h), projection="orthographic", origin_m=np.zeros(3),
                basis=np.eye(3), width_m=float(w), distance_m=1.0, fov_rad=1.0, near_m=1.0)


def _polar_px(out: OutputMap, zenith_deg: Floats, azimuth_deg: Floats) -> Floats:
    """Pixels (N, 2) of the dome frame's directions: azimuth 0 is the front (the bottom of
    the frame), increasing toward the audience's right."""
    w = out.size_px[0]
    rho = np.asarray(zenith_deg, dtype=np.float64) / (out.fov_deg / 2.0)
    phi = -np.pi / 2 + np.radians(azimuth_deg)
    return np.stack([(1.0 + rho * np.cos(phi)) * w / 2, (1.0 - rho * np.sin(phi)) * w / 2],
                    axis=-1)


def _as_world(px: Floats, size_px: tuple[int, int]) -> Floats:
    w, h = size_px
    return np.stack([px[:, 0] - w / 2, h / 2 - px[:, 1], np.zeros(len(px))], axis=-1)


def dome_grid(out: OutputMap) -> tuple[Floats, list[LabelRequest]]:
    """The grid's stroke vertices (rows of STROKE_FLOATS, output pixels) and its labels."""
    if out.kind != "dome":
        return np.zeros((0, STROKE_FLOATS)), []
    size = out.size_px
    ppr = out.px_per_rad
    width = max(1.0, math.radians(LINE_DEG) * ppr)
    text_px = math.radians(TEXT_DEG) * ppr
    half = out.fov_deg / 2.0
    batch = PolylineBatch.empty()
    style = StrokeStyle(GRID_RGBA, width)
    labels: list[LabelRequest] = []
    around = np.linspace(0.0, 360.0, 721)
    rings = np.arange(RING_STEP_DEG, half + 1e-9, RING_STEP_DEG)
    for z in rings:
        ring_z = min(z, half - 0.5 * width / ppr * 180.0 / math.pi)  # the rim just inside
        px = _polar_px(out, np.full_like(around, ring_z), around)
        batch.add(_as_world(px, size), style, closed=True)
        if z < half:
            at = _polar_px(out, np.array([z]), np.array([15.0]))[0]
            labels.append(LabelRequest(f"{90.0 - z:g}\u00b0", (float(at[0]), float(at[1])),
                                       0.2 * text_px, text_px, TEXT_RGBA, -2))
    for az in np.arange(0.0, 360.0, SPOKE_STEP_DEG):
        z = np.linspace(SPOKE_END_ZENITH_DEG, half, 64)
        px = _polar_px(out, z, np.full_like(z, az))
        front = az == 0.0
        batch.add(_as_world(px, size), StrokeStyle(FRONT_RGBA, 2.0 * width) if front else style)
    edge = half - 9.0
    for word, az in (("front", 0.0), ("right", 90.0), ("back", 180.0), ("left", 270.0)):
        at = _polar_px(out, np.array([edge]), np.array([az]))[0]
        colour = FRONT_RGBA if word == "front" else TEXT_RGBA
        labels.append(LabelRequest(word, (float(at[0]), float(at[1])), 0.2 * text_px,
                                   1.2 * text_px, colour, -2))
    return stroke_vertices(batch, pixel_view(size)), labels
