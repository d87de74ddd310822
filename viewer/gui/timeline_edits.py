"""Edits of the show (``[timeline]``): camera keys, fades and their points, captions and
the show's own settings. Plain Python: no imgui, no GL.

Each edit takes a Timeline (and the Scene, for body names) and returns a complete new
Timeline, or raises ``TimelineRefused`` with one line saying what is allowed; a refused
edit changes nothing, so nothing refused reaches the Scene, the picture or the file.
The editor applies the result through its history (``Editor.edit_timeline``), so every
edit undoes.

What the file format allows is what an edit allows (docs/scene-format.md, "[timeline]"):
times into the show from 0 to the show's duration; camera keys in order of increasing
``at``, each at its own time (a key moves only between its neighbours, so a key that
inherits a value from the key before keeps inheriting it from the same key); a fade's
times increasing, opacities 0 to 1; a caption's text not empty (at most 500 characters,
no control characters), its end after its start. Values typed with units go through the
scene's quantity parser; their magnitude limits are the scene reader's.
"""

from __future__ import annotations

import math
import re
from collections.abc import Sequence
from dataclasses import replace
from typing import Any

from ..scene import spec
from ..scene.model import Camera, CameraKey, Caption, Fade, Scene, Timeline, name_key
from ..units import EpochError, QuantityError, unit_factor
from ..units.forms import ShowTimeError, parse_scene_time
from ..units.forms import parse_show_time as forms_show_time
from ..units.limits import parse_limited
from .elements_edit import EditRefused

__all__ = ["TimelineRefused", "add_camera_key", "add_caption", "add_fade", "add_fade_point",
           "delete_camera_key", "delete_caption", "delete_fade", "delete_fade_point",
           "key_from_camera", "move_camera_key", "tidy_view", "move_caption", "move_fade_point",
           "new_show", "parse_show_time", "set_camera_key", "set_caption", "set_fade",
           "set_fade_point", "set_show"]

#: Frames a show may have (the scene reader's limit).
MAX_FRAMES = 10_000_000
MAX_CAPTION_CHARS = 500
_CONTROL = re.compile(r"[\x00-\x08\x0b-\x1f\x7f]")
#: Camera key values a key may leave out (None: as at the key before).
CAMERA_VALUES = ("projection", "look", "elevation_rad", "azimuth_rad", "target", "width_m",
                 "distance_m", "fov_rad", "dome_distance_m", "dome_elevation_rad",
                 "dome_tilt_rad")


class TimelineRefused(EditRefused):
    """A show edit that was not applied; ``problems[0]`` says what is allowed."""


def _refuse(what: str, why: str) -> TimelineRefused:
    return TimelineRefused(what, why)


def _s(x: float) -> str:
    return f"{x:.6g} s"


# --- typed values -----------------------------------------------------------------------


def parse_show_time(text: str, duration_s: float | None = None, what: str = "time") -> float:
    """Seconds into the show from text, in every form ``viewer.units.forms.parse_show_time``
    reads ("12.5 s", "1:05", "121/30"; a bare number is seconds), refused outside
    0..``duration_s`` as a TimelineRefused naming the field ``what``."""
    try:
        x = forms_show_time(text)
    except ShowTimeError as err:
        raise _refuse(what, str(err)) from None
    _in_show(x, duration_s, what)
    return x


def _in_show(x: float, duration_s: float | None, what: str) -> None:
    if not math.isfinite(x) or x < 0 or (duration_s is not None and x > duration_s + 1e-9):
        end = "" if duration_s is None else f" to {_s(duration_s)}, the end of the show"
        raise _refuse(what, f"{what} {_s(x)} is outside the show: times into the show are "
                      f"0 s{end}")


def _quantity(text: str, dimension: str, unit: str, what: str) -> float:
    try:
        return parse_limited(text, dimension, unit)
    except QuantityError as err:
        raise _refuse(what, str(err)) from None


# --- camera keys ------------------------------------------------------------------------


def _with_keys(tl: Timeline, keys: Sequence[CameraKey]) -> Timeline:
    return replace(tl, camera_keys=tuple(keys))


def _without(tl: Timeline, field: str, i: int) -> Timeline:
    """``tl`` with item ``i`` of its tuple ``field`` (camera_keys, fades, captions) taken
    out; the caller has checked ``i``."""
    items = getattr(tl, field)
    return replace(tl, **{field: items[:i] + items[i + 1:]})


def _key_index(tl: Timeline, i: int) -> CameraKey:
    if not 0 <= i < len(tl.camera_keys):
        raise _refuse("camera key", f"there is no camera key {i + 1} (the show has "
                      f"{len(tl.camera_keys)})")
    return tl.camera_keys[i]


def _free_time(times: Sequence[float], at_s: float, what: str) -> None:
    clash = [t for t in times if abs(t - at_s) < 1e-9]
    if clash:
        raise _refuse(what, f"a key is already at {_s(at_s)}; each key needs its own time")


#: Significant digits of a keyed view's sizes, and decimals of its angles in degrees: a
#: view framed with the mouse has no more precision than that (1e-4 of the picture's
#: width is a fifth of a pixel at 1920 px), and the key reads like one typed by hand.
VIEW_DIGITS = 4
ANGLE_DECIMALS = 2


def _rounded(x_si: float, factor: float, digits: int) -> float:
    """``x_si`` to ``digits`` significant digits in the unit of ``factor``, as the scene
    reader makes it from that decimal (so the file's text gives back this very value)."""
    return float(f"{x_si / factor:.{digits}g}") * factor


def tidy_view(camera: Camera, length_unit: str) -> Camera:
    """``camera`` as a key stores a view framed with the mouse: width, distances and fov
    to ``VIEW_DIGITS`` significant digits (lengths in ``length_unit``), elevation and
    azimuth to ``ANGLE_DECIMALS`` decimals of a degree (azimuth in [0, 360)), a target
    point to the same 1e-4 of the picture's width. What the window shows does not move
    by a visible amount; the file reads "azimuth = 262.5 deg", not "-97.49999999 deg"."""
    lf, af = unit_factor(length_unit, "length"), unit_factor("deg", "angle")

    def deg(x: float, wrap: bool = False) -> float:
        d = round(math.degrees(x), ANGLE_DECIMALS)
        return float(f"{d % 360.0 if wrap else d:.{ANGLE_DECIMALS}f}") * af

    width = camera.width_m
    if camera.projection == "perspective":
        width = 2.0 * camera.distance_m * math.tan(0.5 * camera.fov_rad)
    target = camera.target
    if not isinstance(target, str):
        q = 10.0 ** math.floor(math.log10(max(width, 1e-300) / 10.0 ** VIEW_DIGITS / lf))
        x, y, z = (float(f"{round(v / lf / q) * q:.15g}") * lf for v in target)
        target = (x, y, z)
    return replace(
        camera, target=target, width_m=_rounded(camera.width_m, lf, VIEW_DIGITS),
        distance_m=_rounded(camera.distance_m, lf, VIEW_DIGITS),
        fov_rad=_rounded(camera.fov_rad, af, VIEW_DIGITS),
        elevation_rad=deg(camera.elevation_rad),
        azimuth_rad=deg(camera.azimuth_rad, wrap=True),
        dome_distance_m=(None if camera.dome_distance_m is None
                         else _rounded(camera.dome_distance_m, lf, VIEW_DIGITS)))


def key_from_camera(camera: Camera, at_s: float, base: Camera | None = None,
                    ease: str = "in-out") -> CameraKey:
    """A camera key at ``at_s`` holding the view ``camera``: its direction (a look, or
    elevation and azimuth), target, size (width or, in perspective, distance and fov)
    and the dome's framing. With ``base`` (the camera the key would otherwise take over
    from the keys before it), only what differs from ``base`` is kept, so the key reads
    as the move it is; a key always keeps its direction and size."""
    values: dict[str, Any] = {"projection": camera.projection, "target": camera.target}
    if camera.look in ("top", "edge"):
        values["look"] = camera.look
    else:
        values.update(elevation_rad=camera.elevation_rad, azimuth_rad=camera.azimuth_rad)
    if camera.projection == "perspective":
        values.update(distance_m=camera.distance_m, fov_rad=camera.fov_rad)
    else:
        values["width_m"] = camera.width_m
    if camera.dome_distance_m is not None:
        values["dome_distance_m"] = camera.dome_distance_m
    values.update(dome_elevation_rad=camera.dome_elevation_rad,
                  dome_tilt_rad=camera.dome_tilt_rad)
    if base is not None:
        always = {"look", "elevation_rad", "azimuth_rad", "width_m", "distance_m"}
        values = {k: v for k, v in values.items()
                  if k in always or getattr(base, k) != v}
    return CameraKey(at_s=float(at_s), ease=ease, **values)


def add_camera_key(tl: Timeline, key: CameraKey) -> tuple[Timeline, int]:
    """The timeline with ``key`` put in time order; (timeline, the key's index)."""
    _in_show(key.at_s, tl.duration_s, "at")
    _free_time([k.at_s for k in tl.camera_keys], key.at_s, "at")
    keys = list(tl.camera_keys)
    j = sum(1 for k in keys if k.at_s < key.at_s)
    keys.insert(j, key)
    return _with_keys(tl, keys), j


def delete_camera_key(tl: Timeline, i: int) -> Timeline:
    _key_index(tl, i)
    return _without(tl, "camera_keys", i)


def move_camera_key(tl: Timeline, i: int, at_s: float) -> Timeline:
    """Key ``i`` at ``at_s``: within the show and strictly between its neighbours (keys
    stay in order; a key that leaves a value out keeps inheriting it from the same key)."""
    key = _key_index(tl, i)
    _in_show(at_s, tl.duration_s, "at")
    keys = tl.camera_keys
    lo = keys[i - 1].at_s if i > 0 else None
    hi = keys[i + 1].at_s if i + 1 < len(keys) else None
    if (lo is not None and at_s <= lo) or (hi is not None and at_s >= hi):
        span = (f"after {_s(lo)}" if lo is not None else "") + \
            (" and " if lo is not None and hi is not None else "") + \
            (f"before {_s(hi)}" if hi is not None else "")
        raise _refuse("at", f"camera key {i + 1} moves {span} (the keys beside it): keys "
                      "stay in order of time")
    out = list(keys)
    out[i] = replace(key, at_s=float(at_s))
    return _with_keys(tl, out)


def set_camera_key(scene: Scene, tl: Timeline, i: int, name: str, text: str) -> Timeline:
    """One value of camera key ``i`` from text: ``at`` (seconds), ``ease``, ``path``,
    ``projection``, ``look``, ``elevation``, ``azimuth``, ``fov``, ``dome_elevation``,
    ``dome_tilt`` (angles), ``width``, ``distance``, ``dome_distance`` (lengths),
    ``target`` (a body's name or "center"). Empty text removes the value (the key then
    takes it from the key before), where the file allows that."""
    key = _key_index(tl, i)
    text = text.strip()
    if name == "at":
        return move_camera_key(tl, i, parse_show_time(text, tl.duration_s, "at"))
    choices = {"ease": spec.EASES, "projection": ("orthographic", "perspective"),
               "look": ("top", "edge", "angles")}
    if "path" in getattr(CameraKey, "__dataclass_fields__", {}):
        choices["path"] = _path_choices()
    changes: dict[str, Any] = {}
    if name in choices:
        if name in ("ease", "path") and not text:
            text = str(CameraKey.__dataclass_fields__[name].default)
        if text and text not in choices[name]:
            raise _refuse(name, f"{name} is one of {', '.join(choices[name])}")
        changes[name] = text or None
        if name == "look" and text in ("top", "edge"):
            changes.update(elevation_rad=None, azimuth_rad=None)
    elif name in ("elevation", "azimuth", "fov", "dome_elevation", "dome_tilt"):
        value = None if not text else _quantity(text, "angle", "deg", name)
        if value is not None:
            _angle_range(name, value)
        changes[f"{name}_rad"] = value
        if name in ("elevation", "azimuth") and value is not None:
            changes["look"] = "angles"  # as in [camera]: angles mean look = "angles"
    elif name in ("width", "distance", "dome_distance"):
        value = None if not text else _quantity(text, "length", scene.length_unit, name)
        if value is not None and not value > 0:
            raise _refuse(name, f"{name} must be positive")
        changes[f"{name}_m"] = value
    elif name == "target":
        changes["target"] = None if not text else _target(scene, text)
    else:
        raise _refuse(name, f"a camera key has no value {name!r}")
    out = list(tl.camera_keys)
    out[i] = replace(key, **changes)
    return _with_keys(tl, out)


def _path_choices() -> tuple[str, ...]:
    return tuple(getattr(spec, "CAMERA_PATHS", ("eased", "smooth")))


def _angle_range(name: str, x: float) -> None:
    if name == "elevation" and abs(x) > math.pi / 2 + 1e-12:
        raise _refuse(name, "elevation is -90 to 90 deg")
    if name == "fov" and not 0.0 < x < math.pi:
        raise _refuse(name, "fov must be above 0 and below 180 deg")
    if name == "dome_elevation" and not 0.0 <= x <= math.pi / 2 + 1e-12:
        raise _refuse(name, "dome_elevation is 0 to 90 deg")
    if name == "dome_tilt" and not 0.0 <= x <= math.radians(45.0) + 1e-12:
        raise _refuse(name, "dome_tilt is 0 to 45 deg")


def _target(scene: Scene, text: str) -> str:
    if name_key(text) in ("center", name_key(scene.center.name)):
        return "center"
    for b in scene.bodies:
        if name_key(b.name) == name_key(text):
            return b.name
    names = ", ".join(b.name for b in scene.bodies[:8])
    raise _refuse("target", f'no body is named "{text}"; write a body\'s name ({names}) '
                  'or "center"')


# --- fades ------------------------------------------------------------------------------


def _fade_index(tl: Timeline, i: int) -> Fade:
    if not 0 <= i < len(tl.fades):
        raise _refuse("fade", f"there is no fade {i + 1} (the show has {len(tl.fades)})")
    return tl.fades[i]


def _with_fade(tl: Timeline, i: int, fade: Fade) -> Timeline:
    fades = list(tl.fades)
    fades[i] = fade
    return replace(tl, fades=tuple(fades))


def _opacity(x: float) -> float:
    if not (math.isfinite(x) and 0.0 <= x <= 1.0):
        raise _refuse("opacity", f"{x:g} is not an opacity: 0 (hidden) to 1 (fully drawn)")
    return float(x)


def _fade_body(scene: Scene, body: str) -> str:
    return "*" if body.strip() == "*" else _target_body(scene, body)


def _target_body(scene: Scene, text: str) -> str:
    for b in scene.bodies:
        if name_key(b.name) == name_key(text):
            return b.name
    raise _refuse("body", f'no body is named "{text.strip()}"; a fade names a body, or "*" '
                  "for every body")


def add_fade(scene: Scene, tl: Timeline, body: str, mark: str, at_s: Sequence[float],
             opacity: Sequence[float], ease: str = "in-out") -> tuple[Timeline, int]:
    """A new fade of ``mark`` of ``body`` ("*": every body), appended; (timeline, index)."""
    if mark not in spec.FADE_MARKS:
        raise _refuse("mark", f"mark is one of {', '.join(spec.FADE_MARKS)}")
    if ease not in spec.EASES:
        raise _refuse("ease", f"ease is one of {', '.join(spec.EASES)}")
    times = [float(t) for t in at_s]
    if not times or len(times) != len(opacity):
        raise _refuse("fade", "a fade needs one opacity per time, at least one of each")
    for t in times:
        _in_show(t, tl.duration_s, "at")
    if any(b <= a for a, b in zip(times[:-1], times[1:], strict=False)):
        raise _refuse("at", "a fade's times increase")
    fade = Fade(_fade_body(scene, body), mark, tuple(times),
                tuple(_opacity(x) for x in opacity), ease)
    return replace(tl, fades=(*tl.fades, fade)), len(tl.fades)


def delete_fade(tl: Timeline, i: int) -> Timeline:
    _fade_index(tl, i)
    return _without(tl, "fades", i)


def set_fade(scene: Scene, tl: Timeline, i: int, *, body: str | None = None,
             mark: str | None = None, ease: str | None = None) -> Timeline:
    f = _fade_index(tl, i)
    if mark is not None and mark not in spec.FADE_MARKS:
        raise _refuse("mark", f"mark is one of {', '.join(spec.FADE_MARKS)}")
    if ease is not None and ease not in spec.EASES:
        raise _refuse("ease", f"ease is one of {', '.join(spec.EASES)}")
    new = replace(f, body=f.body if body is None else _fade_body(scene, body),
                  mark=mark or f.mark, ease=ease or f.ease)
    return _with_fade(tl, i, new)


def _point(f: Fade, j: int) -> None:
    if not 0 <= j < len(f.at_s):
        raise _refuse("fade point", f"this fade has no point {j + 1} (it has {len(f.at_s)})")


def move_fade_point(tl: Timeline, i: int, j: int, at_s: float) -> Timeline:
    """Point ``j`` of fade ``i`` at ``at_s``: within the show and between its
    neighbours (a fade's times increase)."""
    f = _fade_index(tl, i)
    _point(f, j)
    _in_show(at_s, tl.duration_s, "at")
    lo = f.at_s[j - 1] if j > 0 else None
    hi = f.at_s[j + 1] if j + 1 < len(f.at_s) else None
    if (lo is not None and at_s <= lo) or (hi is not None and at_s >= hi):
        span = (f"after {_s(lo)}" if lo is not None else "") + \
            (" and " if lo is not None and hi is not None else "") + \
            (f"before {_s(hi)}" if hi is not None else "")
        raise _refuse("at", f"this fade point moves {span} (the points beside it): a "
                      "fade's times increase")
    times = list(f.at_s)
    times[j] = float(at_s)
    return _with_fade(tl, i, replace(f, at_s=tuple(times)))


def set_fade_point(tl: Timeline, i: int, j: int, opacity: float) -> Timeline:
    f = _fade_index(tl, i)
    _point(f, j)
    values = list(f.opacity)
    values[j] = _opacity(opacity)
    return _with_fade(tl, i, replace(f, opacity=tuple(values)))


def add_fade_point(tl: Timeline, i: int, at_s: float,
                   opacity: float | None = None) -> tuple[Timeline, int]:
    """A point at ``at_s`` in fade ``i`` (its opacity: the fade's value there unless
    given); (timeline, the point's index)."""
    from ..scene.timeline import _fade_value

    f = _fade_index(tl, i)
    _in_show(at_s, tl.duration_s, "at")
    _free_time(f.at_s, at_s, "at")
    value = _fade_value(f, at_s) if opacity is None else _opacity(opacity)
    j = sum(1 for t in f.at_s if t < at_s)
    times, values = list(f.at_s), list(f.opacity)
    times.insert(j, float(at_s))
    values.insert(j, float(value))
    return _with_fade(tl, i, replace(f, at_s=tuple(times), opacity=tuple(values))), j


def delete_fade_point(tl: Timeline, i: int, j: int) -> Timeline:
    f = _fade_index(tl, i)
    _point(f, j)
    if len(f.at_s) == 1:
        raise _refuse("fade point", "a fade keeps at least one point; delete the fade "
                      "itself instead")
    times, values = list(f.at_s), list(f.opacity)
    del times[j], values[j]
    return _with_fade(tl, i, replace(f, at_s=tuple(times), opacity=tuple(values)))


# --- captions ---------------------------------------------------------------------------


def _caption_index(tl: Timeline, i: int) -> Caption:
    if not 0 <= i < len(tl.captions):
        raise _refuse("caption", f"there is no caption {i + 1} (the show has "
                      f"{len(tl.captions)})")
    return tl.captions[i]


def _caption_text(text: str) -> str:
    t = text.strip()
    if not t:
        raise _refuse("text", "a caption needs text; delete the caption to remove it")
    if len(t) > MAX_CAPTION_CHARS:
        raise _refuse("text", f"a caption has at most {MAX_CAPTION_CHARS} characters")
    if _CONTROL.search(t):
        raise _refuse("text", "a caption may not contain control characters")
    return t


def _checked_caption(tl: Timeline, c: Caption) -> Caption:
    _in_show(c.start_s, tl.duration_s, "start")
    if not c.end_s > c.start_s:
        raise _refuse("end", f"a caption ends after it starts (it starts at {_s(c.start_s)})")
    if math.isfinite(c.end_s) and c.end_s > tl.duration_s + 1e-9:
        raise _refuse("end", f"a caption ends at the latest at the end of the show, "
                      f"{_s(tl.duration_s)}")
    if not (math.isfinite(c.fade_s) and c.fade_s >= 0):
        raise _refuse("fade", "the fade time is 0 s or more")
    if not 0.0 < c.size_px <= 400.0:
        raise _refuse("size", "a caption's size is above 0 and at most 400 px (at 1080 px "
                      "image height)")
    if c.position not in spec.CAPTION_POSITIONS:
        raise _refuse("position", f"position is one of {', '.join(spec.CAPTION_POSITIONS)}")
    return c


def add_caption(tl: Timeline, text: str, start_s: float, end_s: float,
                **values: Any) -> tuple[Timeline, int]:
    """A new caption (its other values as in ``Caption``), appended; (timeline, index)."""
    c = _checked_caption(tl, Caption(_caption_text(text), float(start_s), float(end_s),
                                     **values))
    return replace(tl, captions=(*tl.captions, c)), len(tl.captions)


def delete_caption(tl: Timeline, i: int) -> Timeline:
    _caption_index(tl, i)
    return _without(tl, "captions", i)


def _with_caption(tl: Timeline, i: int, c: Caption) -> Timeline:
    caps = list(tl.captions)
    caps[i] = _checked_caption(tl, c)
    return replace(tl, captions=tuple(caps))


def set_caption(tl: Timeline, i: int, name: str, text: str) -> Timeline:
    """One value of caption ``i`` from text: ``text``, ``start``, ``end``, ``fade``
    (show times), ``position``, ``size`` (px at 1080 px height), ``color`` (#rrggbb)."""
    c = _caption_index(tl, i)
    if name == "text":
        return _with_caption(tl, i, replace(c, text=_caption_text(text)))
    if name in ("start", "end", "fade"):
        x = parse_show_time(text, None if name == "fade" else tl.duration_s, name)
        changes: dict[str, Any] = {f"{name}_s": x}
        return _with_caption(tl, i, replace(c, **changes))
    if name == "position":
        return _with_caption(tl, i, replace(c, position=text.strip()))
    if name == "size":
        try:
            size = float(text)
        except ValueError:
            raise _refuse("size", f"{text.strip()!r} is not a number of pixels") from None
        return _with_caption(tl, i, replace(c, size_px=size))
    if name == "color":
        m = re.fullmatch(r"#?([0-9a-fA-F]{6})", text.strip())
        if m is None:
            raise _refuse("color", "a colour is written #rrggbb, e.g. #f2f2f2")
        h = m.group(1)
        rgb = tuple(int(h[k:k + 2], 16) / 255.0 for k in (0, 2, 4))
        return _with_caption(tl, i, replace(c, color=rgb))  # type: ignore[arg-type]
    raise _refuse(name, f"a caption has no value {name!r}")


def move_caption(tl: Timeline, i: int, start_s: float) -> Timeline:
    """Caption ``i`` moved whole to start at ``start_s`` (it keeps its length; one that
    runs to the end of the show keeps running to the end)."""
    c = _caption_index(tl, i)
    length = c.end_s - c.start_s
    end = start_s + length if math.isfinite(length) else c.end_s
    return _with_caption(tl, i, replace(c, start_s=float(start_s), end_s=end))


# --- the show's settings ----------------------------------------------------------------


def _check_show(tl: Timeline) -> Timeline:
    if not (math.isfinite(tl.duration_s) and tl.duration_s > 0):
        raise _refuse("duration", "the show's duration must be positive")
    if not (math.isfinite(tl.fps) and 0.0 < tl.fps <= 1000.0):
        raise _refuse("fps", "fps is above 0 and at most 1000 frames per second")
    if not 1 <= tl.frame_count <= MAX_FRAMES:
        raise _refuse("duration", f"duration x fps gives {tl.frame_count} frames; allowed: "
                      f"1 to {MAX_FRAMES:,}")
    if not (math.isfinite(tl.rate) and tl.rate != 0):
        raise _refuse("rate", "rate must not be 0 (negative runs the show backwards)")
    if tl.clock not in ("none", "date", "elapsed"):
        raise _refuse("clock", "clock is one of none, date, elapsed")
    last = max([k.at_s for k in tl.camera_keys] + [t for f in tl.fades for t in f.at_s]
               + [c.start_s for c in tl.captions] + [0.0])
    if last > tl.duration_s + 1e-9:
        raise _refuse("duration", f"keys of the show are at up to {_s(last)}: the show lasts "
                      "at least that long (move or delete them first)")
    return tl


def set_show(scene: Scene, tl: Timeline, name: str, text: str) -> Timeline:
    """One setting of the show from text: ``start`` (the scene time the show starts at:
    an offset from the scene epoch, "180 d", or an epoch), ``duration`` (time), ``rate``
    (scene time per second of show, "5 d/s"), ``fps``, ``clock`` (none, date, elapsed)."""
    text = text.strip()
    if name == "start":
        try:
            start = parse_scene_time(text, scene.epoch, scene.time_unit)
        except (QuantityError, EpochError) as err:
            raise _refuse(name, f"{err}; give an offset from the scene epoch (\"180 d\") "
                          "or an epoch (\"2030-06-01T00:00:00 TDB\")") from None
        return _check_show(replace(tl, start_s=start))
    if name == "duration":
        return _check_show(replace(tl, duration_s=_quantity(text, "time", "s", name)))
    if name == "rate":
        return _check_show(replace(tl, rate=_quantity(text, "rate", "d/s", name)))
    if name == "fps":
        try:
            fps = float(text)
        except ValueError:
            raise _refuse("fps", f"{text!r} is not a number of frames per second") from None
        return _check_show(replace(tl, fps=fps))
    if name == "clock":
        return _check_show(replace(tl, clock=text))
    raise _refuse(name, f"the show has no setting {name!r}")


def new_show(duration_s: float, rate: float, fps: float, clock: str,
             start_s: float = 0.0) -> Timeline:
    """A new, empty show: ``duration_s`` of show at ``fps``, scene time running ``rate``
    scene seconds per second of show from ``start_s``, and an on-screen ``clock``."""
    return _check_show(Timeline(start_s=float(start_s), rate=float(rate), fps=float(fps),
                                duration_s=float(duration_s), clock=clock))


def rate_text(rate: float) -> str:
    """A rate in the largest time unit per second that keeps it readable ("5 d/s")."""
    for unit, f in (("yr", 365.25 * 86_400.0), ("d", 86_400.0), ("h", 3600.0), ("min", 60.0)):
        if abs(rate) >= f:
            return f"{rate / f:.6g} {unit}/s"
    return f"{rate:.6g} s/s"


def new_show_from_text(duration: str, rate: str, fps: str, clock: str,
                       start_s: float = 0.0) -> Timeline:
    """``new_show`` from the typed fields of the dialog."""
    try:
        fps_value = float(fps)
    except ValueError:
        raise _refuse("fps", f"{fps.strip()!r} is not a number of frames per second") from None
    return new_show(_quantity(duration, "time", "s", "duration"),
                    _quantity(rate, "rate", "d/s", "rate"), fps_value, clock.strip(), start_s)
