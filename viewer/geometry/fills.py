"""Filled triangles in the world (sector fans, arrow heads) to image pixels.

Fills are plain triangles: the rasteriser's shared-edge rule lets a fan cover its area
exactly once, with no seams and no double blending, and the edge stroke drawn inside
the shape (see strokes.py) gives the boundary its anti-aliasing. Perspective views clip
each triangle at the near plane first (one plane cuts a triangle into at most two).

Vertex layout: x, y (px), r, g, b, a (straight alpha).
"""

from __future__ import annotations

import numpy as np
from numpy.typing import NDArray

from .camera import View

Floats = NDArray[np.float64]

FILL_FLOATS = 6


def _near_clip_triangles(cam: Floats, rgba: Floats, near: float) -> tuple[Floats, Floats]:
    """Triangles (T, 3, 3) in camera space clipped to z <= -near, with their colours."""
    behind = cam[:, :, 2] >= -near
    k = behind.sum(axis=1)
    out = [cam[k == 0]]
    cols = [rgba[k == 0]]
    for n_behind in (1, 2):
        sel = np.flatnonzero(k == n_behind)
        if sel.size == 0:
            continue
        tri = cam[sel]
        odd = behind[sel] if n_behind == 1 else ~behind[sel]
        first = np.argmax(odd, axis=1)
        idx = (first[:, None] + np.arange(3)[None, :]) % 3
        t = np.take_along_axis(tri, idx[:, :, None], axis=1)  # odd vertex first, order kept
        A, B, C = t[:, 0], t[:, 1], t[:, 2]

        def cut(p: Floats, q: Floats) -> Floats:
            zp = p[:, 2] + near
            zq = q[:, 2] + near
            s = zp / np.where(zp != zq, zp - zq, 1.0)
            x = p + s[:, None] * (q - p)
            x[:, 2] = -near * (1.0 + 1e-9)
            return x

        iab = cut(A, B)
        iac = cut(A, C)
        if n_behind == 1:  # A behind: quad B, C, iac, iab
            out += [np.stack([iab, B, C], axis=1), np.stack([iab, C, iac], axis=1)]
            cols += [rgba[sel], rgba[sel]]
        else:  # A alone in front
            out.append(np.stack([A, iab, iac], axis=1))
            cols.append(rgba[sel])
    return np.concatenate(out), np.concatenate(cols)


def fill_vertices(view: View, triangles_m: Floats, rgba: Floats) -> Floats:
    """Triangles (T, 3, 3) in world metres with colours (T, 4) as fill vertices (T*3, 6)."""
    tris = np.asarray(triangles_m, dtype=np.float64).reshape(-1, 3, 3)
    cols = np.asarray(rgba, dtype=np.float64).reshape(-1, 4)
    if len(tris) == 0:
        return np.zeros((0, FILL_FLOATS))
    cam = view.to_camera(tris)
    if view.perspective:
        cam, cols = _near_clip_triangles(cam, cols, view.near_m)
    px = view.camera_to_px(cam)
    out = np.empty((len(px), 3, FILL_FLOATS))
    out[:, :, 0:2] = px
    out[:, :, 2:6] = cols[:, None, :]
    return out.reshape(-1, FILL_FLOATS)


def fan_triangles(pivot_m: Floats, arc_m: Floats) -> Floats:
    """The fan from ``pivot_m`` (3,) over consecutive points of ``arc_m`` (n, 3): (n-1, 3, 3)."""
    arc = np.asarray(arc_m, dtype=np.float64)
    n = len(arc) - 1
    tris = np.empty((max(n, 0), 3, 3))
    tris[:, 0] = pivot_m
    tris[:, 1] = arc[:-1]
    tris[:, 2] = arc[1:]
    return tris
