"""The one scene writer: typed scene values to TOML text.

Every path that writes scene TOML goes through here: the editor's saves (key edits in
``viewer.gui.scene_edits``), whole new scenes (``viewer.scene.save.dump_scene``), and
bodies appended by ``perifocal import`` and ``perifocal transfer``
(``viewer.formats.scene_text``). So a value is written one way everywhere:

* a quantity is a string with its unit, ``"1.52 au"``, with the fewest significant
  digits (up to 17) that the loader turns back into the very same float64 (the loader
  multiplies the number by the unit's factor, so plain ``repr`` of a divided value would
  carry division noise such as ``1.5200000000000002``);
* angles in degrees, times in seconds, gravitational parameters in m3/s2 (km3/s2 for
  ``center.gm`` written beside a km radius is not needed: the unit is in the string);
* colours as ``#rrggbb``; epochs as ISO 8601 with microseconds (none when they are
  zero) and the time scale;
* a body's size in its conic's form: ``a`` for an ellipse, ``periapsis`` with ``e`` for
  a parabola or a hyperbola; where it is, as ``nu`` (true anomaly), which the format
  takes for every conic (scene-format.md, "Orbit elements").

Writes text itself (no document model), so the tables it makes look like the ones
people write.
"""

from __future__ import annotations

import json
import math
from collections.abc import Iterable, Mapping
from dataclasses import fields
from pathlib import Path
from typing import Any

from ..units import Epoch, unit_factor
from .model import Body, BodyShow, CameraKey, Caption, Fade, RateKey, Scene, Timeline

RGB = tuple[float, float, float]


def toml_string(text: str) -> str:
    """A TOML basic string (JSON escaping is valid TOML)."""
    return json.dumps(text, ensure_ascii=False)


def comment_block(lines: Iterable[str], prefix: str = "") -> str:
    """TOML comment lines ('# ...') for each line of text, one per line."""
    out = []
    for line in lines:
        for part in (line.splitlines() or [""]):
            out.append(f"# {prefix}{part}".rstrip())
    return "\n".join(out) + ("\n" if out else "")


def number(x_si: float, factor: float = 1.0) -> str:
    """The fewest digits of ``x_si / factor`` that give back ``x_si`` when the loader
    multiplies them by ``factor``; where no decimal does that exactly (a few angles in
    degrees), the one that comes closest (within one unit of the last place)."""
    x = float(x_si)
    if not math.isfinite(x):
        raise ValueError("a scene value must be finite")
    v = x / factor
    best, best_err = v, math.inf
    for digits in range(1, 18):
        w = float(f"{v:.{digits}g}")
        err = abs(w * factor - x)
        if err == 0.0:
            return _plain(w)
        if digits >= 15 and err < best_err:
            best, best_err = w, err
    return _plain(best)


def _plain(w: float) -> str:
    """Python's shortest text of ``w``, without a trailing ".0" and with a short
    exponent ("86400", "1.52", "2.5e-7", "1e21")."""
    text = repr(w)
    if "e" in text:
        mant, exp = text.split("e")
        mant = mant[:-2] if mant.endswith(".0") else mant
        return f"{mant}e{int(exp)}"
    return text[:-2] if text.endswith(".0") else text


def quantity(x_si: float, dimension: str, unit: str) -> str:
    """A quantity string: ``quantity(2.274e11, "length", "au") == "1.52 au"``."""
    return f"{number(x_si, unit_factor(unit, dimension))} {unit}"


def length(x_m: float, unit: str) -> str:
    return quantity(x_m, "length", unit)


def angle(x_rad: float) -> str:
    return quantity(x_rad, "angle", "deg")


def duration(x_s: float) -> str:
    return quantity(x_s, "time", "s")


def gm(x_m3_s2: float) -> str:
    return quantity(x_m3_s2, "gm", "m3/s2")


def color(rgb: RGB) -> str:
    return "#" + "".join(f"{max(0, min(255, round(c * 255))):02x}" for c in rgb)


def epoch(e: Epoch) -> str:
    """An epoch as the file writes it: microseconds, none when they are zero."""
    return e.iso(decimals=6).replace(".000000 ", " ")


def file_path(scene: Scene, path: Path) -> str:
    """A file a key names, relative to the scene's folder (scenes read only files inside
    their own folder), with forward slashes."""
    if scene.source is not None and path.is_absolute():
        try:
            return path.relative_to(Path(scene.source).resolve().parent).as_posix()
        except ValueError:
            pass
    return path.as_posix()


# --- tables -----------------------------------------------------------------------------


def show_table(show: BodyShow, has_sweep: bool) -> dict[str, bool]:
    """The ``show`` keys that differ from the defaults (``sweep`` defaults to whether a
    sweep table is given)."""
    default = BodyShow()
    out = {f.name: getattr(show, f.name) for f in fields(BodyShow)
           if f.name != "sweep" and getattr(show, f.name) != getattr(default, f.name)}
    if show.sweep != has_sweep:
        out["sweep"] = show.sweep
    return out


def body_table(scene: Scene, body: Body) -> dict[str, Any]:
    """The ``[[body]]`` table of ``body`` as plain values (lengths in the scene's unit)."""
    lu = scene.length_unit
    el = body.elements
    e = float(el.e)
    t: dict[str, Any] = {"name": body.name}
    if body.track is not None:  # the orbit comes from the ephemeris
        t["ephemeris"] = body.track.source
        if body.name.strip().lower() != body.track.target:
            t["ephemeris_body"] = body.track.target
        if body.track.osculate_s is not None:
            t["osculating_epoch"] = epoch(scene.epoch.plus_seconds(body.track.osculate_s))
    else:
        if e < 1.0:
            t["a"] = length(float(el.a), lu)
        else:
            t["periapsis"] = length(float(el.periapsis), lu)
        t["e"] = e
        for key in ("i", "raan", "argp", "nu"):
            t[key] = angle(float(getattr(el, key)))
        if body.gm_m3_s2:
            t["gm"] = gm(body.gm_m3_s2)
        if body.epoch_offset_s:
            t["epoch"] = epoch(scene.epoch.plus_seconds(body.epoch_offset_s))
    if body.limit_radius_m is not None and e >= 1.0:
        t["limit_radius"] = length(body.limit_radius_m, lu)
    if body.radius_m is not None:
        t["radius"] = length(body.radius_m, "km")
    t["color"] = color(body.color)
    if body.line_width_px != 2.0:
        t["line_width"] = body.line_width_px
    show = show_table(body.show, body.sweep is not None)
    if show:
        t["show"] = show
    if body.flight_s is not None:
        t["flight"] = {"start": epoch(scene.epoch.plus_seconds(body.flight_s[0])),
                       "end": epoch(scene.epoch.plus_seconds(body.flight_s[1]))}
    if body.sweep is not None:
        t["sweep"] = sweep_table(scene, body)
    return t


def sweep_table(scene: Scene, body: Body) -> dict[str, Any]:
    """The ``sweep`` table of a body; ``interval`` only where it was given (otherwise the
    loader derives one period / count, so it goes on following the orbit)."""
    sw = body.sweep
    assert sw is not None
    out: dict[str, Any] = {"start": duration(sw.start_s)}
    if sw.interval_given:
        out["interval"] = duration(sw.interval_s)
    out.update({"count": sw.count, "color": color(sw.color), "opacity": sw.opacity})
    if sw.show_area:
        out["show_area"] = True
    if sw.reveal != "all":
        out["reveal"] = sw.reveal
    return out


# --- the show's tables ([timeline] and its [[timeline.*]] arrays) -------------------------


def target(value: str | tuple[float, float, float], length_unit: str) -> Any:
    """A camera target: "center", a body's name, or [x, y, z] in ``length_unit``."""
    return value if isinstance(value, str) else [length(x, length_unit) for x in value]


def dome_framing(cam: Any, default: Any, length_unit: str) -> dict[str, Any]:
    """dome_distance, dome_elevation, dome_tilt of a camera or a keyframe, when set (and,
    with a ``default`` camera, when they differ from it)."""
    out: dict[str, Any] = {}
    if cam.dome_distance_m is not None:
        out["dome_distance"] = length(cam.dome_distance_m, length_unit)
    for name in ("dome_elevation", "dome_tilt"):
        v = getattr(cam, name + "_rad")
        if v is not None and (default is None or v != getattr(default, name + "_rad")):
            out[name] = angle(v)
    return out


def timeline_table(tl: Timeline) -> dict[str, Any]:
    """The plain keys of ``[timeline]`` (its arrays of tables are written apart)."""
    out: dict[str, Any] = {"start": duration(tl.start_s),
                           "rate": quantity(tl.rate, "rate", "s/s"),
                           "fps": tl.fps, "duration": duration(tl.duration_s)}
    if tl.clock != "none":
        out["clock"] = tl.clock
    return out


def pace_table(rate_key: RateKey) -> dict[str, Any]:
    """A ``[[timeline.pace]]`` table: ``at``, ``rate`` (in s/s) and ``ease``."""
    return {"at": duration(rate_key.at_s), "rate": quantity(rate_key.rate, "rate", "s/s"),
            "ease": rate_key.ease}


def value_text(value: Any) -> str:
    """A plain value as TOML text; inline tables written ``{ key = value, ... }`` as the
    format's docs and the bundled scenes write them."""
    if isinstance(value, bool):
        return "true" if value else "false"
    if isinstance(value, str):
        return toml_string(value)
    if isinstance(value, int):
        return str(value)
    if isinstance(value, float):
        if not math.isfinite(value):
            raise ValueError("a scene value must be finite")
        return repr(value)
    if isinstance(value, Mapping):
        return "{ " + ", ".join(f"{_key(k)} = {value_text(v)}" for k, v in value.items()) + " }"
    if isinstance(value, (list, tuple)):
        return "[" + ", ".join(value_text(v) for v in value) + "]"
    raise TypeError(f"no TOML text for {type(value).__name__}")


def _key(name: str) -> str:
    return name if name.replace("_", "").replace("-", "").isalnum() else toml_string(name)


def table_text(name: str, table: Mapping[str, Any], comments: Iterable[str] = ()) -> str:
    """A ``[[name]]`` table as TOML text (nested tables inline), after comment lines."""
    lines = [f"[[{name}]]"] + [f"{_key(k)} = {value_text(v)}" for k, v in table.items()]
    return comment_block(comments) + "\n".join(lines) + "\n"


def body_text(scene: Scene, body: Body, comments: Iterable[str] = ()) -> str:
    """``body`` as a ``[[body]]`` table's text, ready to append to a scene file."""
    return table_text("body", body_table(scene, body), comments)


def camera_key_table(key: CameraKey, length_unit: str = "au") -> dict[str, Any]:
    """A ``[[timeline.camera]]`` table of ``key``: ``at``, ``ease`` and ``path`` when not
    the defaults, then the camera keys it sets (lengths in ``length_unit``)."""
    t: dict[str, Any] = {"at": duration(key.at_s)}
    if key.ease != "in-out":
        t["ease"] = key.ease
    if key.path != "eased":
        t["path"] = key.path
    lu = length_unit
    for attr, name in (("projection", "projection"), ("look", "look")):
        v = getattr(key, attr)
        if v is not None and not (name == "look" and v == "angles"
                                  and key.elevation_rad is not None):
            t[name] = v
    for attr, name in (("elevation_rad", "elevation"), ("azimuth_rad", "azimuth")):
        if getattr(key, attr) is not None:
            t[name] = angle(getattr(key, attr))
    if key.target is not None:
        t["target"] = target(key.target, lu)
    for attr, name in (("width_m", "width"), ("distance_m", "distance")):
        if getattr(key, attr) is not None:
            t[name] = length(getattr(key, attr), lu)
    if key.fov_rad is not None:
        t["fov"] = angle(key.fov_rad)
    t.update(dome_framing(key, None, lu))
    return t


def fade_table(fade: Fade) -> dict[str, Any]:
    """A ``[[timeline.fade]]`` table of ``fade``."""
    t: dict[str, Any] = {"body": fade.body, "mark": fade.mark,
                         "at": [duration(x) for x in fade.at_s],
                         "opacity": [float(number(x)) for x in fade.opacity]}
    if fade.ease != "in-out":
        t["ease"] = fade.ease
    return t


def caption_table(caption: Caption) -> dict[str, Any]:
    """A ``[[timeline.caption]]`` table of ``caption`` (defaults left out)."""

    d = Caption("")
    t: dict[str, Any] = {"text": caption.text, "start": duration(caption.start_s)}
    if math.isfinite(caption.end_s):
        t["end"] = duration(caption.end_s)
    if caption.fade_s != d.fade_s:
        t["fade"] = duration(caption.fade_s)
    if caption.position != d.position:
        t["position"] = caption.position
    if caption.size_px != d.size_px:
        t["size"] = caption.size_px
    if caption.color != d.color:
        t["color"] = color(caption.color)
    return t
