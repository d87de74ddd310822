"""The show's keyframes evaluated at a time into the show: camera, mark opacities,
captions and the on-screen clock. Pure functions of (scene, show time); no GL.

Camera keyframes (``[[timeline.camera]]``) each give the camera keys that change at their
time; a key a keyframe leaves out keeps its value from the keyframe before (the first
keyframe starts from ``[camera]``). Between keyframes each value eases from one to the
next: elevation, azimuth (the short way round) and fov linearly in the eased fraction,
width, distance and dome_distance geometrically (a zoom feels even), dome_elevation and
dome_tilt linearly, the target's position linearly
(a body target is followed as it moves); the projection switches at the keyframe.
Before the first keyframe the camera is the first keyframe's, after the last the last's.
A keyframe with ``path = "smooth"`` is passed through on a cubic curve through its
neighbours instead (see "smooth paths" below).
"""

from __future__ import annotations

import math
from dataclasses import dataclass, replace

import numpy as np

from ..orbit import state_from_elements
from .marks import NAMES
from .model import EASE_CURVES, Camera, CameraKey, Caption, Fade, MarkOpacity, Scene

TWO_PI = 2.0 * math.pi


def ease(u: float, kind: str) -> float:
    """The eased fraction of a move: linear, in (slow start), out (slow end), in-out
    (``model.EASE_CURVES``, the one home of the curves)."""
    u = min(1.0, max(0.0, u))
    return float(EASE_CURVES.get(kind, EASE_CURVES["in-out"])[0](u))


def _angles(cam: Camera) -> tuple[float, float]:
    """(elevation, azimuth) of any look: top is (90, 0) deg, edge (0, -90) deg."""
    if cam.look == "top":
        return math.pi / 2, 0.0
    if cam.look == "edge":
        return 0.0, -math.pi / 2
    return cam.elevation_rad, cam.azimuth_rad


def _apply(cam: Camera, key: CameraKey) -> Camera:
    changes = {name: getattr(key, name) for name in
               ("projection", "look", "elevation_rad", "azimuth_rad", "target", "width_m",
                "distance_m", "fov_rad", "dome_distance_m", "dome_elevation_rad",
                "dome_tilt_rad") if getattr(key, name) is not None}
    return replace(cam, **changes)


def resolved_keys(scene: Scene) -> list[tuple[float, str, Camera]]:
    """(time into the show, ease, full Camera) of each camera keyframe."""
    cam = scene.camera
    out = []
    for key in scene.timeline.camera_keys:
        cam = _apply(cam, key)
        out.append((key.at_s, key.ease, cam))
    return out


def target_point_m(scene: Scene, target: str | tuple[float, float, float],
                   t_s: float) -> np.ndarray:
    """Where a camera target is at scene time t_s (m, from the central body)."""
    if isinstance(target, str):
        if target == "center":
            return np.zeros(3)
        r, _ = state_from_elements(scene.body(target).elements_at(t_s))
        return np.asarray(r, dtype=np.float64)
    return np.asarray(target, dtype=np.float64)


def camera_at(scene: Scene, show_s: float, t_s: float | None = None) -> Camera:
    """The camera ``show_s`` seconds into the show (scene time ``t_s``, for moving targets)."""
    keys = resolved_keys(scene)
    if not keys:
        return scene.camera
    if show_s <= keys[0][0]:
        return keys[0][2]
    if show_s >= keys[-1][0]:
        return keys[-1][2]
    j = next(i for i in range(1, len(keys)) if show_s < keys[i][0])
    (t0, _, a), (t1, kind, b) = keys[j - 1], keys[j]
    paths = [k.path for k in scene.timeline.camera_keys]
    t = float(scene.timeline.scene_time_at(show_s)) if t_s is None else t_s
    if _passes(paths, j - 1) or _passes(paths, j):
        return _smooth_camera(scene, keys, paths, j, show_s, t)
    u = ease((show_s - t0) / (t1 - t0), kind)
    if a == b:
        return a
    el0, az0 = _angles(a)
    el1, az1 = _angles(b)
    daz = (az1 - az0 + math.pi) % TWO_PI - math.pi
    same_look = a.look == b.look and a.look in ("top", "edge")
    target = a.target if a.target == b.target else tuple(
        float(x) for x in (1 - u) * target_point_m(scene, a.target, t)
        + u * target_point_m(scene, b.target, t))
    return Camera(
        projection=a.projection if u < 1.0 else b.projection,
        look=a.look if same_look else "angles",
        elevation_rad=el0 + u * (el1 - el0), azimuth_rad=(az0 + u * daz) % TWO_PI,
        target=target,  # type: ignore[arg-type]
        width_m=a.width_m * (b.width_m / a.width_m) ** u,
        distance_m=a.distance_m * (b.distance_m / a.distance_m) ** u,
        fov_rad=a.fov_rad + u * (b.fov_rad - a.fov_rad),
        dome_distance_m=None if a.dome_distance_m is None and b.dome_distance_m is None
        else a.immersive_distance_m * (b.immersive_distance_m / a.immersive_distance_m) ** u,
        dome_elevation_rad=a.dome_elevation_rad
        + u * (b.dome_elevation_rad - a.dome_elevation_rad),
        dome_tilt_rad=a.dome_tilt_rad + u * (b.dome_tilt_rad - a.dome_tilt_rad))


# --- smooth paths: cubic Hermite through the keyframes -----------------------------------
#
# A keyframe with path = "smooth" is passed through, not stopped at: on the legs on either
# side of it every value follows a cubic Hermite curve (Kochanek & Bartels 1984; the
# Catmull-Rom choice of tangent, Catmull & Rom 1974), p(u) = h00 p0 + h10 h m0 + h01 p1 +
# h11 h m1 with u = (s - s0) / h linear in show time s, h = s1 - s0, and
# h00 = 2u^3 - 3u^2 + 1, h10 = u^3 - 2u^2 + u, h01 = -2u^3 + 3u^2, h11 = u^3 - u^2.
# The tangent (per second of show) at a smooth keyframe is the finite difference of its
# neighbours, m_k = (p_{k+1} - p_{k-1}) / (s_{k+1} - s_{k-1}); at an eased keyframe, and at
# the first and the last keyframe (the camera holds before and after them), it is 0, so a
# leg between two eased keyframes is the smoothstep of "in-out". A leg that touches a
# smooth keyframe runs linearly in time (its ease is not used). Values are interpolated
# where they move evenly: elevation, azimuth (unwrapped the short way from key to key),
# fov, dome elevation and tilt as they are; width, distance and dome distance as
# logarithms (a zoom feels even); the target as a point in space, except on a leg whose
# two keyframes look at the same target, which follows that target exactly.


def _passes(paths: list[str], k: int) -> bool:
    """Whether the camera passes through keyframe k without stopping."""
    return 0 < k < len(paths) - 1 and paths[k] == "smooth"


def _values(scene: Scene, cam: Camera, t_s: float, azimuth_rad: float) -> np.ndarray:
    """The interpolated values of a keyframe's camera at scene time t_s."""
    el, _ = _angles(cam)
    x, y, z = target_point_m(scene, cam.target, t_s)
    return np.array([el, azimuth_rad, math.log(cam.width_m), math.log(cam.distance_m),
                     cam.fov_rad, math.log(cam.immersive_distance_m), cam.dome_elevation_rad,
                     cam.dome_tilt_rad, x, y, z])


def _smooth_camera(scene: Scene, keys: list[tuple[float, str, Camera]], paths: list[str],
                   j: int, show_s: float, t_s: float) -> Camera:
    """The camera on the leg from keyframe j-1 to j when either end is passed through."""
    lo, hi = max(0, j - 2), min(len(keys) - 1, j + 1)
    azimuths = [_angles(keys[lo][2])[1]]
    for k in range(lo + 1, hi + 1):  # unwrapped: each step the short way round
        step = _angles(keys[k][2])[1] - _angles(keys[k - 1][2])[1]
        azimuths.append(azimuths[-1] + (step + math.pi) % TWO_PI - math.pi)
    times = {k: keys[k][0] for k in range(lo, hi + 1)}
    p = {k: _values(scene, keys[k][2], t_s, azimuths[k - lo]) for k in range(lo, hi + 1)}

    def tangent(k: int) -> np.ndarray:
        if not _passes(paths, k):
            return np.zeros_like(p[k])
        return (p[k + 1] - p[k - 1]) / (times[k + 1] - times[k - 1])

    s0, s1 = times[j - 1], times[j]
    h = s1 - s0
    u = (show_s - s0) / h
    h00, h10 = 2 * u**3 - 3 * u**2 + 1, u**3 - 2 * u**2 + u
    h01, h11 = -2 * u**3 + 3 * u**2, u**3 - u**2
    v = h00 * p[j - 1] + h10 * h * tangent(j - 1) + h01 * p[j] + h11 * h * tangent(j)
    a, b = keys[j - 1][2], keys[j][2]
    span = [keys[k][2] for k in range(lo, hi + 1)]
    same_target = a.target == b.target  # a leg between two keys on one target follows it
    same_look = all(c.look == a.look for c in span) and a.look in ("top", "edge")
    return Camera(
        projection=a.projection if u < 1.0 else b.projection,
        look=a.look if same_look else "angles",
        elevation_rad=float(np.clip(v[0], -math.pi / 2, math.pi / 2)),
        azimuth_rad=float(v[1]) % TWO_PI,
        target=a.target if same_target else (float(v[8]), float(v[9]), float(v[10])),
        width_m=float(math.exp(v[2])), distance_m=float(math.exp(v[3])),
        fov_rad=float(np.clip(v[4], 1e-6, math.pi - 1e-6)),
        dome_distance_m=None if a.dome_distance_m is None and b.dome_distance_m is None
        else float(math.exp(v[5])),
        dome_elevation_rad=float(np.clip(v[6], 0.0, math.pi / 2)),
        dome_tilt_rad=float(np.clip(v[7], 0.0, math.pi / 4)))


def _fade_value(f: Fade, show_s: float) -> float:
    times, values = f.at_s, f.opacity
    if show_s <= times[0]:
        return values[0]
    if show_s >= times[-1]:
        return values[-1]
    j = next(i for i in range(1, len(times)) if show_s < times[i])
    u = ease((show_s - times[j - 1]) / (times[j] - times[j - 1]), f.ease)
    return values[j - 1] + u * (values[j] - values[j - 1])


def mark_opacity(scene: Scene, body_name: str, mark: str, show_s: float) -> float:
    """The opacity (0..1) of one mark of a body: every matching fade multiplied."""
    out = 1.0
    for f in scene.timeline.fades:
        if f.body in ("*", body_name) and f.mark in ("all", mark):
            out *= _fade_value(f, show_s)
    return out


@dataclass(frozen=True)
class ShownCaption:
    caption: Caption
    opacity: float


def captions_at(scene: Scene, show_s: float) -> list[ShownCaption]:
    """The captions on the picture at ``show_s``, with their fade-in/fade-out opacity."""
    out = []
    for c in scene.timeline.captions:
        if not c.start_s <= show_s < c.end_s:
            continue
        edge = min(show_s - c.start_s, c.end_s - show_s)
        a = 1.0 if c.fade_s <= 0 else min(1.0, edge / c.fade_s)
        if a > 0:
            out.append(ShownCaption(c, ease(a, "in-out")))
    return out


def clock_text(scene: Scene, t_s: float) -> str | None:
    """The on-screen clock at scene time t_s: the date in the scene epoch's time scale,
    or the days since the timeline start; None when the scene has no clock."""
    kind = scene.timeline.clock
    if kind == "date":
        text = scene.epoch.plus_seconds(t_s).iso()
        return text.replace("T", "  ", 1)
    if kind == "elapsed":
        days = (t_s - scene.timeline.start_s) / 86_400.0
        return f"day {days:,.1f}"
    return None


MARKS = NAMES


def show_time_of(scene: Scene, t_s: float) -> float:
    """Seconds into the show at scene time t_s (0 before the start)."""
    return scene.timeline.show_time_at(t_s)


def scene_at_show_time(scene: Scene, show_s: float, t_s: float | None = None) -> Scene:
    """The scene as drawn ``show_s`` seconds into the show: the keyframed camera and each
    body's mark opacities from the fades. The same scene object when nothing is keyed."""
    tl = scene.timeline
    if not (tl.camera_keys or tl.fades):
        return scene
    changes: dict[str, object] = {}
    if tl.camera_keys:
        changes["camera"] = camera_at(scene, show_s, t_s)
    if tl.fades:
        bodies = []
        for b in scene.bodies:
            fade = MarkOpacity(**{m: mark_opacity(scene, b.name, m, show_s) for m in MARKS})
            bodies.append(b if fade == b.fade else replace(b, fade=fade))
        # The scene's own tuple when no fade changes a body: frames keep what does not
        # change between them by the bodies' identity (geometry.frame.StaticCache).
        unchanged = all(a is b for a, b in zip(bodies, scene.bodies, strict=True))
        changes["bodies"] = scene.bodies if unchanged else tuple(bodies)
    return replace(scene, **changes)  # type: ignore[arg-type]


@dataclass(frozen=True)
class OverlayText:
    """Text fixed on the picture (a caption or the clock): ``position`` is one of
    spec.CAPTION_POSITIONS, ``size_px`` at 1080 px image height, colour with alpha."""

    text: str
    position: str
    size_px: float
    rgba: tuple[float, float, float, float]
    #: "caption" or "clock" (a dome master places the clock by a rule of its own).
    kind: str = "caption"


CLOCK_SIZE_PX = 22.0
CLOCK_RGBA = (0.85, 0.88, 0.95, 0.9)


def overlay_at(scene: Scene, show_s: float, t_s: float) -> tuple[OverlayText, ...]:
    """The captions and the clock on the picture at ``show_s`` (scene time t_s)."""
    out = [OverlayText(s.caption.text, s.caption.position, s.caption.size_px,
                       (*s.caption.color, s.opacity)) for s in captions_at(scene, show_s)]
    clock = clock_text(scene, t_s)
    if clock is not None:
        out.append(OverlayText(clock, "top-left", CLOCK_SIZE_PX, CLOCK_RGBA, "clock"))
    return tuple(out)
