"""Directions of the immersive outputs, as pure numpy (the shaders do the same per pixel).

Camera basis: ``f`` from the eye toward the target, ``r`` image right, ``u`` image up
(scene-format.md, "Camera directions"). Directions are given in that basis as
(x along r, y along u, z along f).

Dome master (square angular fisheye, azimuthal equidistant): the image centre is the
zenith = f; the angle from the zenith is proportional to the radius, FOV/2 at the edge of
the inscribed circle; the bottom of the frame is the camera's image-down side (the front
of the dome). ``tilt`` turns the zenith toward the front by that angle.

Panorama (2:1 equirectangular): the image centre looks along f; longitude runs across
(increasing to the right, toward r), latitude up (toward u), +-180 and +-90 deg at the
edges.
"""

from __future__ import annotations

import numpy as np
from numpy.typing import NDArray

Floats = NDArray[np.float64]

#: The six cube faces: (forward, up) in the camera basis, 90 deg square perspective each.
CUBE_FACES: dict[str, tuple[tuple[float, float, float], tuple[float, float, float]]] = {
    "front": ((0.0, 0.0, 1.0), (0.0, 1.0, 0.0)),
    "back": ((0.0, 0.0, -1.0), (0.0, 1.0, 0.0)),
    "right": ((1.0, 0.0, 0.0), (0.0, 1.0, 0.0)),
    "left": ((-1.0, 0.0, 0.0), (0.0, 1.0, 0.0)),
    "up": ((0.0, 1.0, 0.0), (0.0, 0.0, -1.0)),
    "down": ((0.0, -1.0, 0.0), (0.0, 0.0, 1.0)),
}


def pixel_centres(width: int, height: int) -> tuple[Floats, Floats]:
    """Normalised pixel centres: x in (-1, 1) left to right, y in (-1, 1) bottom to top."""
    x = (np.arange(width) + 0.5) / width * 2.0 - 1.0
    y = 1.0 - (np.arange(height) + 0.5) / height * 2.0
    return np.meshgrid(x, y)


def dome_directions(size: int, fov_deg: float = 180.0, tilt_deg: float = 0.0
                    ) -> tuple[Floats, NDArray[np.bool_]]:
    """Per-pixel view directions (size, size, 3) of a dome master, and the inside mask."""
    x, y = pixel_centres(size, size)
    rho = np.hypot(x, y)
    inside = rho <= 1.0
    theta = rho * np.radians(fov_deg) / 2.0
    phi = np.arctan2(y, x)
    s = np.sin(theta)
    d = np.stack([s * np.cos(phi), s * np.sin(phi), np.cos(theta)], axis=-1)
    return tilt(d, tilt_deg), inside


def tilt(d: Floats, tilt_deg: float) -> Floats:
    """Turn directions so the zenith moves toward the front (image-down, -u) by tilt_deg."""
    t = np.radians(tilt_deg)
    c, s = np.cos(t), np.sin(t)
    y = d[..., 1] * c - d[..., 2] * s
    z = d[..., 1] * s + d[..., 2] * c
    return np.stack([d[..., 0], y, z], axis=-1)


def dome_pixel(direction: Floats, size: int, fov_deg: float = 180.0, tilt_deg: float = 0.0
               ) -> Floats:
    """Where a camera-basis direction lands on the dome master, as (column, row) in pixels."""
    d = tilt(np.asarray(direction, dtype=np.float64), -tilt_deg)
    d = d / np.linalg.norm(d, axis=-1, keepdims=True)
    theta = np.arccos(np.clip(d[..., 2], -1.0, 1.0))
    phi = np.arctan2(d[..., 1], d[..., 0])
    rho = theta / (np.radians(fov_deg) / 2.0)
    x, y = rho * np.cos(phi), rho * np.sin(phi)
    return np.stack([(x + 1.0) / 2.0 * size - 0.5, (1.0 - y) / 2.0 * size - 0.5], axis=-1)


def panorama_directions(width: int, height: int) -> Floats:
    """Per-pixel view directions (height, width, 3) of a 2:1 equirectangular panorama."""
    x, y = pixel_centres(width, height)
    lon = x * np.pi
    lat = y * np.pi / 2.0
    return np.stack([np.cos(lat) * np.sin(lon), np.sin(lat), np.cos(lat) * np.cos(lon)],
                    axis=-1)


def panorama_pixel(direction: Floats, width: int, height: int) -> Floats:
    """Where a camera-basis direction lands on the panorama, as (column, row) in pixels."""
    d = np.asarray(direction, dtype=np.float64)
    d = d / np.linalg.norm(d, axis=-1, keepdims=True)
    lon = np.arctan2(d[..., 0], d[..., 2])
    lat = np.arcsin(np.clip(d[..., 1], -1.0, 1.0))
    return np.stack([(lon / np.pi + 1.0) / 2.0 * width - 0.5,
                     (1.0 - lat / (np.pi / 2.0)) / 2.0 * height - 0.5], axis=-1)
