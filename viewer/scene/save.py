"""Saving scenes: edits that keep the user's comments, order and formatting, written
atomically with the previous version kept as ``NAME.toml.bak``.

* ``edit_text(text, edits)`` applies ``{key path: new value}`` to TOML text with tomlkit
  and returns the new text; only the edited values change. Paths are those of the error
  messages: ``"body[2].e"``, ``'body["Tarn"].show.foci'``, ``"camera.width"``; a value of
  None removes the key; ``"body[+]"`` with a table appends a body and ``"body[2]"`` with
  None removes one.
* ``save_edits(path, edits)`` edits a file: it validates the result with the loader and
  writes nothing if the edited scene has problems.
* ``write_atomic(path, data)``: a temporary file in the same folder, written and fsynced,
  the old file copied to ``NAME.toml.bak`` (itself through a temporary file), then one
  ``os.replace`` and an fsync of the folder. At every instant the file on disk is either
  the complete old version or the complete new one; a crash can leave at most a stray
  ``.NAME.toml.*.tmp`` file, which is safe to delete.
* ``dump_scene(scene)`` writes a Scene as a new TOML text (for imports and new files).

tomlkit is imported only here, so loading and ``perifocal check`` do not pay for it.
"""

from __future__ import annotations

import math
import os
import re
import shutil
import stat
import tempfile
from collections.abc import Mapping
from pathlib import Path
from typing import Any

from ..errors import UserInputError
from ..fileio import describe_os_error
from .loader import MAX_FILE_BYTES, load_scene_text, read_scene_text
from .model import BodyShow, Camera, DomeSettings, RenderSettings, Scene

_SEGMENT = re.compile(r'([A-Za-z0-9_-]+)(?:\[(?:(\d+)|(\+)|"((?:[^"\\]|\\.)*)")\])?')


class SaveError(UserInputError):
    """A save that could not be done; the message says what is on disk now."""


# --- editing text --------------------------------------------------------------------


def _parse_path(path: str) -> list[tuple[str, int | str | None]]:
    """'body[2].show.foci' -> [("body", 2), ("show", None), ("foci", None)]."""
    out: list[tuple[str, int | str | None]] = []
    pos = 0
    while pos < len(path):
        m = _SEGMENT.match(path, pos)
        if not m:
            raise UserInputError(path, "not a key path; write e.g. body[2].e, "
                                 'body["Tarn"].show.foci or camera.width')
        index: int | str | None = None
        if m.group(2) is not None:
            index = int(m.group(2))
        elif m.group(3):
            index = "+"
        elif m.group(4) is not None:
            index = "name:" + m.group(4).replace('\\"', '"')
        out.append((m.group(1), index))
        pos = m.end()
        if pos < len(path):
            if path[pos] != ".":
                raise UserInputError(path, f"unexpected {path[pos]!r} in the key path")
            pos += 1
    if not out:
        raise UserInputError(path, "empty key path")
    return out


def _item(value: Any, inline: bool = True) -> Any:
    """A tomlkit item for a plain value; tables nested in a table are written inline."""
    import tomlkit

    if isinstance(value, float) and not math.isfinite(value):
        raise UserInputError(str(value), "a scene value must be finite")
    if isinstance(value, Mapping):
        t = tomlkit.inline_table() if inline else tomlkit.table()
        for k, v in value.items():
            t[k] = _item(v)
        return t
    return tomlkit.item(value)


def edit_text(text: str, edits: Mapping[str, Any]) -> str:
    """The TOML ``text`` with ``edits`` applied (see the module docstring); comments,
    key order and the formatting of untouched lines are kept."""
    import tomlkit
    from tomlkit.exceptions import TOMLKitError

    try:
        doc = tomlkit.parse(text)
    except TOMLKitError as err:
        raise UserInputError("scene", f"cannot edit: the text is not valid TOML ({err})") from None
    for path, value in edits.items():
        _apply(doc, path, value)
    return tomlkit.dumps(doc)


def _apply(doc: Any, path: str, value: Any) -> None:
    """Set (or with None remove) the value at one key path of a tomlkit document."""
    import tomlkit
    from tomlkit.items import AoT

    parts = _parse_path(path)
    node = doc
    for depth, (name, index) in enumerate(parts):
        last = depth == len(parts) - 1
        top = depth == 0  # a top-level table such as [camera] is written as a table
        if index is None:
            if not last:
                if name not in node:
                    node[name] = tomlkit.table() if top else tomlkit.inline_table()
                node = node[name]
                if not isinstance(node, Mapping):
                    raise UserInputError(path, f"{name} is a value, not a table")
                continue
            if value is None:
                if name in node:
                    del node[name]
            else:
                new = name not in node
                node[name] = _item(value, inline=not top) if isinstance(value, Mapping) \
                    else value  # an existing key keeps its line's comment and spacing
                if new:
                    _tidy_inline(node)
            return
        if name not in node:
            if index != "+":
                raise UserInputError(path, f"the scene has no [[{name}]] tables")
            node[name] = tomlkit.aot()
        seq = node[name]
        if not isinstance(seq, list):
            raise UserInputError(path, f"{name} is not an array of tables")
        # [[body]] tables take tables; an inline array (body = [{...}]) takes inline ones
        inline = not isinstance(seq, AoT)
        if index == "+":
            if not last or not isinstance(value, Mapping):
                raise UserInputError(path, f"{name}[+] appends a table: give a table of keys")
            seq.append(_item(value, inline=inline))
            return
        if isinstance(index, str):
            wanted = index[len("name:"):]
            found = [k for k, t in enumerate(seq) if isinstance(t, Mapping)
                     and t.get("name") == wanted]
            if not found:
                raise UserInputError(path, f'no [[{name}]] is named "{wanted}"')
            index = found[0]
        if not 0 <= index < len(seq):
            raise UserInputError(path, f"there are {len(seq)} [[{name}]] tables (0 to "
                                 f"{len(seq) - 1})")
        if last:
            if value is None:
                del seq[index]
            elif isinstance(value, Mapping):
                seq[index] = _item(value, inline=inline)
            else:
                raise UserInputError(path, f"{name}[{index}] is a table: give a table of keys")
            return
        node = seq[index]


def _tidy_inline(node: Any) -> None:
    """Keep "{ a = 1, b = 2 }" spaced after tomlkit appends a key to an inline table.

    tomlkit leaves the space that stood before "}" in front of the new key ("b = 2}").
    Blank that space and add one at the end; appending keeps tomlkit's key indices valid.
    """
    from tomlkit.items import InlineTable, Whitespace

    if not isinstance(node, InlineTable):
        return
    try:
        body = node.value.body
        key, ws = body[-2]
        if key is None and isinstance(ws, Whitespace) and ws.s and not ws.s.strip():
            body[-2] = (None, Whitespace(""))
            body.append((None, Whitespace(ws.s)))
    except (AttributeError, IndexError, TypeError, ValueError):
        pass  # another tomlkit layout: the text is valid either way


# --- writing files -------------------------------------------------------------------


from ..fileio import fsync_dir as _fsync_dir  # noqa: E402  (one implementation)


def _temp_in(folder: Path, name: str) -> tuple[int, str]:
    return tempfile.mkstemp(prefix=f".{name}.", suffix=".tmp", dir=folder)


def _write_fd(fd: int, data: bytes) -> None:
    view = memoryview(data)
    while view:
        n = os.write(fd, view)
        view = view[n:]
    os.fsync(fd)


def _backup(path: Path) -> Path:
    """Copy ``path`` to NAME.bak through a fsynced temporary file and one rename."""
    bak = path.with_name(path.name + ".bak")
    fd, tmp = _temp_in(path.parent, bak.name)
    try:
        with open(path, "rb") as src, os.fdopen(fd, "wb", closefd=False) as dst:
            shutil.copyfileobj(src, dst, 1 << 20)
            dst.flush()
        os.fsync(fd)
        os.chmod(tmp, stat.S_IMODE(path.stat().st_mode))
        os.close(fd)
        fd = -1
        os.replace(tmp, bak)
    except BaseException:
        if fd >= 0:
            os.close(fd)
        _remove(tmp)
        raise
    return bak


def _remove(name: str) -> None:
    try:
        os.unlink(name)
    except OSError:
        pass


def write_atomic(path: str | Path, data: str | bytes, *, backup: bool = True) -> Path:
    """Write ``data`` to ``path`` so that a failure or kill at any step leaves either the
    old file or the new one, complete (see the module docstring). Returns the path.

    With ``backup``, the previous version is kept as ``NAME.bak`` (NAME.toml.bak).
    Raises SaveError (exit 2 in the CLI) saying what is on disk when a step fails.
    """
    p = Path(path)
    if p.is_symlink():
        p = p.resolve()
    blob = data.encode("utf-8") if isinstance(data, str) else data
    exists = p.exists()
    if exists and not p.is_file():
        raise SaveError(str(p), "cannot save: this is not a regular file")
    if exists and not os.access(p, os.W_OK):
        raise SaveError(str(p), "cannot save: the file is read-only; the file is unchanged")
    try:
        fd, tmp = _temp_in(p.parent, p.name)
    except OSError as err:
        raise SaveError(str(p), f"cannot save: cannot create a file in {p.parent} "
                        f"({describe_os_error(err)}); the file is unchanged") from None
    try:
        try:
            _write_fd(fd, blob)
        finally:
            os.close(fd)
        if exists:
            os.chmod(tmp, stat.S_IMODE(p.stat().st_mode))
            if backup:
                _backup(p)
        os.replace(tmp, p)
    except OSError as err:
        _remove(tmp)
        raise SaveError(str(p), f"cannot save: {describe_os_error(err)}; the file is unchanged"
                        + (" (the previous version may also be in "
                           f"{p.name}.bak)" if backup and exists else "")) from None
    except BaseException:
        _remove(tmp)
        raise
    try:
        _fsync_dir(p.parent)
    except OSError as err:
        raise SaveError(str(p), f"saved, but the folder could not be synced ({err.strerror}); "
                        "the new version is in place") from None
    return p


def save_edits(path: str | Path, edits: Mapping[str, Any], *,
               expected_text: str | None = None) -> Scene:
    """Apply ``edits`` to the scene file at ``path``, validate, and save atomically.

    ``expected_text`` is the text the caller loaded; if the file changed on disk since,
    nothing is written (the other change would be lost). If the edited scene has
    problems, nothing is written and UserInputError lists them. Returns the new Scene.
    """
    p = Path(path)
    current = read_scene_text(p)
    if expected_text is not None and current != expected_text:
        raise SaveError(str(p), "the file changed on disk since it was loaded; nothing was "
                        "written (reload it, then edit again)")
    new_text = edit_text(current, edits)
    if len(new_text.encode("utf-8")) > MAX_FILE_BYTES:
        raise SaveError(str(p), "the edited scene would be over the size limit; nothing was "
                        "written")
    scene = load_scene_text(new_text, source=p, base_dir=p.parent)
    write_atomic(p, new_text)
    return scene


def save_text(path: str | Path, text: str) -> Scene:
    """Validate TOML ``text`` as a scene and write it atomically to ``path`` (with .bak)."""
    p = Path(path)
    scene = load_scene_text(text, source=p, base_dir=p.parent)
    write_atomic(p, text)
    return scene


# --- writing a Scene as new text -------------------------------------------------------


def _hex(rgb: tuple[float, float, float]) -> str:
    return "#" + "".join(f"{max(0, min(255, round(c * 255))):02x}" for c in rgb)


def _q(x: float, unit: str, factor: float) -> str:
    return f"{x / factor!r} {unit}"


def dump_scene(scene: Scene) -> str:
    """A scene file's text for ``scene`` (lengths in its length unit, angles in deg).

    Loading the text gives back the same scene to float rounding. Generated populations
    cannot be written back (their recipe is not kept in the Scene) and are left out with
    a comment; populations from table files keep their ``table`` path.
    """
    import tomlkit

    from ..units import unit_factor

    lu = scene.length_unit
    lf = unit_factor(lu, "length")
    deg = math.pi / 180.0
    doc = tomlkit.document()
    doc.add(tomlkit.comment("Written by Perifocal. Units: lengths in " + lu
                            + ", angles in deg; see docs/scene-format.md."))
    s = tomlkit.table()
    s["format"] = 1
    s["title"] = scene.title
    s["epoch"] = scene.epoch.iso(decimals=6)
    s["frame"] = scene.frame
    s["units"] = {"length": lu, "time": scene.time_unit, "angle": "deg"}
    doc["scene"] = s
    c = scene.center
    ct = tomlkit.table()
    ct["name"] = c.name
    if c.preset:
        ct["preset"] = c.preset
        ct["radius"] = _q(c.radius_m, "km", 1e3)
    else:
        ct["gm"] = f"{c.gm_m3_s2!r} m3/s2"
        ct["radius"] = _q(c.radius_m, "km", 1e3)
    for key, v in (("atmosphere", c.atmosphere_m), ("soi_radius", c.soi_radius_m)):
        if v is not None:
            ct[key] = _q(v, "km", 1e3)
    ct["color"] = _hex(c.color)
    if not (c.show_body and c.show_label):
        ct["show"] = {"body": c.show_body, "label": c.show_label}
    doc["center"] = ct
    bodies = tomlkit.aot()
    default_show = BodyShow()
    for b in scene.bodies:
        el = b.elements
        t = tomlkit.table()
        t["name"] = b.name
        e = float(el.e)
        if e == 1.0:
            t["periapsis"] = _q(float(el.periapsis), lu, lf)
        else:
            t["a"] = _q(float(el.a), lu, lf)
        t["e"] = e
        for key in ("i", "raan", "argp", "nu"):
            t[key] = f"{float(getattr(el, key)) / deg!r} deg"
        if b.epoch_offset_s:
            t["epoch"] = scene.epoch.plus_seconds(b.epoch_offset_s).iso(decimals=6)
        if b.limit_radius_m is not None:
            t["limit_radius"] = _q(b.limit_radius_m, lu, lf)
        if b.radius_m is not None:
            t["radius"] = _q(b.radius_m, "km", 1e3)
        t["color"] = _hex(b.color)
        if b.line_width_px != 2.0:
            t["line_width"] = b.line_width_px
        show = {k: getattr(b.show, k) for k in default_show.__dataclass_fields__
                if k != "sweep" and getattr(b.show, k) != getattr(default_show, k)}
        if b.show.sweep != (b.sweep is not None):
            show["sweep"] = b.show.sweep
        if show:
            t["show"] = _inline(show)
        if b.sweep is not None:
            sw = b.sweep
            t["sweep"] = _inline({"start": f"{sw.start_s!r} s", "interval": f"{sw.interval_s!r} s",
                                  "count": sw.count, "color": _hex(sw.color),
                                  "opacity": sw.opacity, "show_area": sw.show_area})
        bodies.append(t)
    if scene.bodies:
        doc["body"] = bodies
    _dump_views(doc, scene, lu, lf)
    pops = [p for p in scene.populations if p.source is not None]
    if len(pops) < len(scene.populations):
        doc.add(tomlkit.comment("Generated populations are not written back; add their "
                                "[[population]] tables again."))
    if pops:
        aot = tomlkit.aot()
        for pop in pops:
            pt = tomlkit.table()
            pt["name"] = pop.name
            src = pop.source
            assert src is not None
            pt["table"] = str(src)
            pt["color"] = _hex(pop.color)
            pt["point_size"] = pop.point_size_px
            if pop.epoch_offset_s:
                pt["epoch"] = scene.epoch.plus_seconds(pop.epoch_offset_s).iso(decimals=6)
            aot.append(pt)
        doc["population"] = aot
    return tomlkit.dumps(doc)


def _inline(values: Mapping[str, Any]) -> Any:
    import tomlkit

    t = tomlkit.inline_table()
    t.update(values)
    return t


def _dump_views(doc: Any, scene: Scene, lu: str, lf: float) -> None:
    import tomlkit

    cam = scene.camera
    d = Camera()
    ct = tomlkit.table()
    ct["projection"] = cam.projection
    ct["look"] = cam.look
    if cam.look == "angles":
        ct["elevation"] = f"{math.degrees(cam.elevation_rad)!r} deg"
        ct["azimuth"] = f"{math.degrees(cam.azimuth_rad)!r} deg"
    ct["target"] = (cam.target if isinstance(cam.target, str)
                    else [_q(x, lu, lf) for x in cam.target])
    ct["width"] = _q(cam.width_m, lu, lf)
    ct["distance"] = _q(cam.distance_m, lu, lf)
    if cam.fov_rad != d.fov_rad:
        ct["fov"] = f"{math.degrees(cam.fov_rad)!r} deg"
    _dump_dome_framing(ct, cam, d, lu, lf)
    doc["camera"] = ct
    rs = scene.render
    rt = tomlkit.table()
    rt["size"] = list(rs.size_px)
    rt["background"] = _hex(rs.background)
    for k in ("stars", "grid", "labels"):
        if getattr(rs, k) != getattr(RenderSettings(), k):
            rt[k] = getattr(rs, k)
    doc["render"] = rt
    tl = scene.timeline
    tt = tomlkit.table()
    tt["start"] = f"{tl.start_s!r} s"
    tt["rate"] = f"{tl.rate!r} s/s"
    tt["fps"] = tl.fps
    tt["duration"] = f"{tl.duration_s!r} s"
    if tl.clock != "none":
        tt["clock"] = tl.clock
    _dump_show(tt, tl, lu, lf)
    doc["timeline"] = tt
    if scene.dome != DomeSettings():
        dt = tomlkit.table()
        dd = DomeSettings()
        for name in ("line_width", "label_size", "caption_size"):
            v = getattr(scene.dome, name + "_rad")
            if v != getattr(dd, name + "_rad"):
                dt[name] = f"{v!r} rad"
        for name in ("line_scale", "label_scale", "grid"):
            if getattr(scene.dome, name) != getattr(dd, name):
                dt[name] = getattr(scene.dome, name)
        doc["dome"] = dt


def _dump_dome_framing(t: Any, cam: Any, default: Any, lu: str, lf: float) -> None:
    """dome_distance, dome_elevation, dome_tilt of a camera or a keyframe, when set."""
    if cam.dome_distance_m is not None:
        t["dome_distance"] = _q(cam.dome_distance_m, lu, lf)
    for name in ("dome_elevation", "dome_tilt"):
        v = getattr(cam, name + "_rad")
        if v is not None and (default is None or v != getattr(default, name + "_rad")):
            t[name] = f"{v!r} rad"


def _dump_show(tt: Any, tl: Any, lu: str, lf: float) -> None:
    """The show's keyframes, fades and captions as [[timeline.*]] tables."""
    import tomlkit

    if tl.camera_keys:
        aot = tomlkit.aot()
        for key in tl.camera_keys:
            t = tomlkit.table()
            t["at"] = f"{key.at_s!r} s"
            t["ease"] = key.ease
            for name in ("projection", "look"):
                if getattr(key, name) is not None:
                    t[name] = getattr(key, name)
            for name, field in (("elevation", "elevation_rad"), ("azimuth", "azimuth_rad"),
                                ("fov", "fov_rad")):
                if getattr(key, field) is not None:
                    t[name] = f"{math.degrees(getattr(key, field))!r} deg"
            if key.target is not None:
                t["target"] = (key.target if isinstance(key.target, str)
                               else [_q(x, lu, lf) for x in key.target])
            for name, field in (("width", "width_m"), ("distance", "distance_m")):
                if getattr(key, field) is not None:
                    t[name] = _q(getattr(key, field), lu, lf)
            _dump_dome_framing(t, key, None, lu, lf)
            aot.append(t)
        tt["camera"] = aot
    if tl.fades:
        aot = tomlkit.aot()
        for f in tl.fades:
            t = tomlkit.table()
            t["body"] = f.body
            t["mark"] = f.mark
            t["at"] = [f"{x!r} s" for x in f.at_s]
            t["opacity"] = list(f.opacity)
            t["ease"] = f.ease
            aot.append(t)
        tt["fade"] = aot
    if tl.captions:
        aot = tomlkit.aot()
        for c in tl.captions:
            t = tomlkit.table()
            t["text"] = c.text
            t["start"] = f"{c.start_s!r} s"
            if math.isfinite(c.end_s):
                t["end"] = f"{c.end_s!r} s"
            t["fade"] = f"{c.fade_s!r} s"
            t["position"] = c.position
            t["size"] = c.size_px
            t["color"] = _hex(c.color)
            aot.append(t)
        tt["caption"] = aot


def save_scene(scene: Scene, path: str | Path) -> Path:
    """Write ``scene`` as a new file at ``path`` (atomically; an old file becomes .bak)."""
    return write_atomic(path, dump_scene(scene))
