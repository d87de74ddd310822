"""A procedural, deterministic starfield: directions, brightness and tint of background stars.

The stars are made from a counter-based hash (SplitMix64, as in Steele, Lea and Flood,
"Fast splittable pseudorandom number generators", OOPSLA 2014; the constants are the
published ones, "from memory"), so the sky is the same on every machine and every numpy
version, with no random state anywhere. They are decoration, not a catalogue: they sit
at infinity and turn with the camera, never move with time, and stay dim enough not to
be mistaken for bodies.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from numpy.typing import NDArray

from .camera import View

Floats = NDArray[np.float64]

_GOLDEN = np.uint64(0x9E3779B97F4A7C15)
_M1 = np.uint64(0xBF58476D1CE4E5B9)
_M2 = np.uint64(0x94D049BB133111EB)

#: Stars on the whole sphere; about 1/12 of them fall in a 45 degree field.
STAR_COUNT = 9000


def splitmix64(index: NDArray[np.uint64], stream: int) -> Floats:
    """Uniform floats in [0, 1) from the counter ``index`` in stream ``stream``."""
    with np.errstate(over="ignore"):
        z = index * np.uint64(8) + np.uint64(stream)
        z = (z + np.uint64(1)) * _GOLDEN
        z = (z ^ (z >> np.uint64(30))) * _M1
        z = (z ^ (z >> np.uint64(27))) * _M2
        z = z ^ (z >> np.uint64(31))
    return (z >> np.uint64(11)).astype(np.float64) * (1.0 / 9007199254740992.0)


@dataclass(frozen=True)
class Starfield:
    """Unit directions (N, 3), relative brightness in (0, 1] and sRGB tints (N, 3)."""

    directions: Floats
    brightness: Floats
    tint: Floats


def make_starfield(count: int = STAR_COUNT) -> Starfield:
    """The starfield: uniform on the sphere, many faint stars and few bright ones."""
    idx = np.arange(count, dtype=np.uint64)
    z = 2.0 * splitmix64(idx, 0) - 1.0
    phi = 2.0 * np.pi * splitmix64(idx, 1)
    s = np.sqrt(np.maximum(0.0, 1.0 - z * z))
    dirs = np.stack([s * np.cos(phi), s * np.sin(phi), z], axis=1)
    # Counts grow about 3x per magnitude: a power law in brightness.
    u = splitmix64(idx, 2)
    brightness = np.clip(0.06 + 0.94 * u**5, 0.0, 1.0)
    # A gentle spread of colour temperatures, from warm to cool white.
    w = splitmix64(idx, 3)
    warm = np.array([1.0, 0.86, 0.72])
    cool = np.array([0.78, 0.86, 1.0])
    white = np.array([1.0, 1.0, 1.0])
    tint = np.where((w < 0.5)[:, None], warm + (white - warm) * (2 * w)[:, None],
                    white + (cool - white) * (2 * w - 1)[:, None])
    return Starfield(dirs, brightness, tint)


def star_points(field: Starfield, view: View, height_scale: float) -> Floats:
    """Point rows (x, y, size px, r, g, b, a) of the stars the view sees."""
    px, front = view.sky_px(field.directions)
    w, h = view.size_px
    on = front & (px[:, 0] > -4) & (px[:, 0] < w + 4) & (px[:, 1] > -4) & (px[:, 1] < h + 4)
    b = field.brightness[on]
    out = np.empty((int(on.sum()), 7))
    out[:, 0:2] = px[on]
    out[:, 2] = (1.1 + 1.6 * b) * max(height_scale, 0.5)
    out[:, 3:6] = field.tint[on]
    out[:, 6] = 0.18 + 0.62 * b
    return out
