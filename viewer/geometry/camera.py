"""The view: where the eye is, which way is up, and how metres become pixels.

Directions follow scene-format.md ("Camera directions"): the eye sits at
``target + distance * d`` with ``d`` pointing from the target to the eye;
``look = "top"``: d = +Z, right = +X, up = +Y; ``look = "edge"``: d = -Y, right = +X,
up = +Z; otherwise d = (cos el cos az, cos el sin az, sin el) and up is the projection of
+Z onto the image plane (of +Y when looking straight along Z). right = up x d.

Image coordinates are pixels with x to the right and y down from the top-left corner of
the image; pixel (i, j) covers [i, i + 1] x [j, j + 1]. The target maps to (W/2, H/2).
All of this is float64: positions are made relative to the view's ``origin_m`` (the
target) before anything is cast to float32.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, replace
from typing import Any

import numpy as np
from numpy.typing import ArrayLike, NDArray

from ..orbit import state_from_elements
from ..scene.model import Camera, Scene

Floats = NDArray[np.float64]

#: Below this |sin(elevation)| distance from +-1 the view looks straight along Z and
#: image up becomes the projection of +Y (scene-format.md).
_STRAIGHT = 1e-9

#: Field of view used to place the (infinitely far) starfield behind an orthographic view.
ORTHO_SKY_FOV_RAD = math.radians(40.0)


def look_basis(camera: Camera) -> tuple[Floats, Floats, Floats]:
    """(right, up, d) unit vectors for the camera's look; d points from target to eye."""
    if camera.look == "top":
        return np.array([1.0, 0, 0]), np.array([0, 1.0, 0]), np.array([0, 0, 1.0])
    if camera.look == "edge":
        return np.array([1.0, 0, 0]), np.array([0, 0, 1.0]), np.array([0, -1.0, 0])
    el, az = camera.elevation_rad, camera.azimuth_rad
    d = np.array([math.cos(el) * math.cos(az), math.cos(el) * math.sin(az), math.sin(el)])
    ref = np.array([0, 1.0, 0]) if abs(abs(d[2]) - 1.0) < _STRAIGHT else np.array([0, 0, 1.0])
    # up is ref's projection on the image plane, and right = up x d; built as
    # right = ref x d / |ref x d| and up = d x right they stay orthonormal to rounding.
    right = np.cross(ref, d)
    right /= np.linalg.norm(right)
    up = np.cross(d, right)
    return right, up, d


@dataclass(frozen=True)
class View:
    """A resolved camera for one frame: everything needed to turn metres into pixels.

    ``origin_m`` is the target's position (m, from the central body); every position is
    made relative to it in float64 first. ``basis`` rows are (right, up, d).
    """

    size_px: tuple[int, int]
    projection: str
    origin_m: Floats
    basis: Floats
    width_m: float
    distance_m: float
    fov_rad: float
    near_m: float
    #: Image height that line widths, markers and labels are sized for (px); the
    #: view's own height when None. Cube faces of a dome master use the master's.
    style_height_px: int | None = None
    #: The part of the image labels are kept inside, (x0, y0, x1, y1) px: the window
    #: passes the area its panels leave free, so no label is cut short by a panel. The
    #: whole image when None (every export).
    label_box_px: tuple[float, float, float, float] | None = None

    @property
    def style_scale(self) -> float:
        """Multiplier of every size given "at 1080 px image height"."""
        return (self.style_height_px or self.size_px[1]) / 1080.0

    @property
    def perspective(self) -> bool:
        return self.projection == "perspective"

    @property
    def eye_m(self) -> Floats:
        """The eye's position (m, from the central body)."""
        return self.origin_m + self.distance_m * self.basis[2]

    @property
    def focal_px(self) -> float:
        """Perspective: pixels per unit of x/depth (H/2 / tan(fov/2))."""
        return 0.5 * self.size_px[1] / math.tan(0.5 * self.fov_rad)

    @property
    def px_per_m(self) -> float:
        """Orthographic scale; for perspective, the scale at the target's depth."""
        if self.perspective:
            return self.focal_px / self.distance_m
        return self.size_px[0] / self.width_m

    @property
    def field_width_m(self) -> float:
        """The width of the picture at the target, m (orthographic: ``width_m``)."""
        return self.size_px[0] / self.px_per_m

    def to_camera(self, world_m: ArrayLike) -> Floats:
        """Camera coordinates (x right, y up, z toward the eye) of world points (m), (..., 3).

        For perspective views z is measured from the eye (points in front have z < 0);
        for orthographic views from the target plane.
        """
        rel = np.asarray(world_m, dtype=np.float64) - self.origin_m
        cam = rel @ self.basis.T
        if self.perspective:
            cam[..., 2] -= self.distance_m
        return cam

    def camera_to_px(self, cam: Floats) -> Floats:
        """Image pixels (..., 2) of camera coordinates. Perspective needs z < 0."""
        w, h = self.size_px
        out = np.empty(cam.shape[:-1] + (2,))
        if self.perspective:
            s: Any = self.focal_px / -cam[..., 2]
            out[..., 0] = 0.5 * w + cam[..., 0] * s
            out[..., 1] = 0.5 * h - cam[..., 1] * s
        else:
            s = self.px_per_m
            out[..., 0] = 0.5 * w + cam[..., 0] * s
            out[..., 1] = 0.5 * h - cam[..., 1] * s
        return out

    def in_front(self, cam: Floats) -> NDArray[np.bool_]:
        """Points the view can see along depth (all, for orthographic)."""
        if self.perspective:
            return cam[..., 2] < -self.near_m
        return np.ones(cam.shape[:-1], dtype=bool)

    def project(self, world_m: ArrayLike) -> tuple[Floats, NDArray[np.bool_]]:
        """(pixels (..., 2), visible-in-depth mask) of world points (m)."""
        return self.camera_px(self.to_camera(world_m))

    def camera_px(self, cam: Floats) -> tuple[Floats, NDArray[np.bool_]]:
        """``project`` of points already in camera coordinates."""
        front = self.in_front(cam)
        safe = cam.copy()
        if self.perspective:
            safe[..., 2] = np.where(front, safe[..., 2], -1.0)
        return self.camera_to_px(safe), front

    def metres_per_px(self, cam: Floats) -> Floats:
        """Size of one pixel (m) at camera-space points (depth-dependent in perspective)."""
        if self.perspective:
            depth = np.maximum(-cam[..., 2], self.near_m)
            return depth / self.focal_px
        return np.full(cam.shape[:-1], 1.0 / self.px_per_m)

    def sky_px(self, directions: ArrayLike) -> tuple[Floats, NDArray[np.bool_]]:
        """Pixels of directions at infinity (unit vectors, (..., 3)) and a visibility mask.

        Perspective views use their own field of view; orthographic views place the sky
        as a perspective of ``ORTHO_SKY_FOV_RAD`` would, so turning the camera turns it.
        """
        cam = np.asarray(directions, dtype=np.float64) @ self.basis.T
        front = cam[..., 2] < -1e-6
        fov = self.fov_rad if self.perspective else ORTHO_SKY_FOV_RAD
        f = 0.5 * self.size_px[1] / math.tan(0.5 * fov)
        z = np.where(front, -cam[..., 2], 1.0)
        w, h = self.size_px
        px = np.stack([0.5 * w + f * cam[..., 0] / z, 0.5 * h - f * cam[..., 1] / z], axis=-1)
        return px, front


def intrinsics(view: View) -> tuple[object, ...]:
    """What turns camera coordinates into pixels: views alike in this differ only in
    where they stand and look (the cube faces of a dome master)."""
    return (view.size_px, view.projection, view.fov_rad, view.near_m, view.width_m,
            view.distance_m)


def target_position_m(scene: Scene, camera: Camera, t_s: float) -> Floats:
    """Where the camera's target is at scene time t_s (m, from the central body)."""
    target = camera.target
    if isinstance(target, str):
        if target == "center":
            return np.zeros(3)
        body = scene.body(target)
        r, _ = state_from_elements(body.elements_at(t_s))
        return np.asarray(r, dtype=np.float64)
    return np.asarray(target, dtype=np.float64).reshape(3)


def view_for(scene: Scene, t_s: float, size_px: tuple[int, int] | None = None,
             camera: Camera | None = None) -> View:
    """The View of ``scene`` at scene time ``t_s`` (s), at ``size_px`` (W, H).

    ``camera`` overrides the scene's camera (the window's orbit controls pass theirs);
    ``size_px`` overrides the scene's render size.
    """
    cam = scene.camera if camera is None else camera
    size = tuple(scene.render.size_px if size_px is None else size_px)
    right, up, d = look_basis(cam)
    basis = np.vstack([right, up, d])
    # Perspective near plane: a small fraction of the eye distance keeps depth sane
    # while showing everything a viewer would expect in front of the eye.
    near = max(cam.distance_m * 1e-4, 1.0)
    return View(size_px=(int(size[0]), int(size[1])), projection=cam.projection,
                origin_m=target_position_m(scene, cam, t_s), basis=basis,
                width_m=float(cam.width_m), distance_m=float(cam.distance_m),
                fov_rad=float(cam.fov_rad), near_m=near)


def with_size(view: View, size_px: tuple[int, int]) -> View:
    """The same view at another image size (orthographic width and fov are kept)."""
    return replace(view, size_px=(int(size_px[0]), int(size_px[1])))
