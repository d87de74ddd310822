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
import re
from collections.abc import Mapping
from pathlib import Path
from typing import Any

from ..errors import UserInputError
from ..fileio import WriteError
from ..fileio import write_atomic as _write_atomic
from . import writer
from .loader import MAX_FILE_BYTES, load_scene_text, read_scene_text
from .model import Camera, DomeSettings, RenderSettings, Scene

_SEGMENT = re.compile(r'([A-Za-z0-9_-]+)(?:\[(?:(\d+)|(\+)|"((?:[^"\\]|\\.)*)")\])?')


#: A save that could not be done; the message says what is on disk now.
SaveError = WriteError


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


def write_atomic(path: str | Path, data: str | bytes, *, backup: bool = True) -> Path:
    """Write a scene file atomically, the previous version kept as ``NAME.bak``: the one
    writer, ``viewer.fileio.write_atomic``."""
    return _write_atomic(path, data, backup=backup)


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


def dump_scene(scene: Scene) -> str:
    """A scene file's text for ``scene`` (lengths in its length unit, angles in deg).

    Loading the text gives back the same scene to float rounding. Generated populations
    cannot be written back (their recipe is not kept in the Scene) and are left out with
    a comment; populations from table files keep their ``table`` path.
    """
    import tomlkit

    lu = scene.length_unit
    doc = tomlkit.document()
    doc.add(tomlkit.comment("Written by Perifocal. Units: lengths in " + lu
                            + ", angles in deg; see docs/scene-format.md."))
    s = tomlkit.table()
    s["format"] = 1
    s["title"] = scene.title
    s["epoch"] = writer.epoch(scene.epoch)
    s["frame"] = scene.frame
    s["units"] = {"length": lu, "time": scene.time_unit, "angle": "deg"}
    doc["scene"] = s
    c = scene.center
    ct = tomlkit.table()
    ct["name"] = c.name
    if c.preset:
        ct["preset"] = c.preset
        ct["radius"] = writer.length(c.radius_m, "km")
    else:
        ct["gm"] = writer.gm(c.gm_m3_s2)
        ct["radius"] = writer.length(c.radius_m, "km")
    for key, v in (("atmosphere", c.atmosphere_m), ("soi_radius", c.soi_radius_m)):
        if v is not None:
            ct[key] = writer.length(v, "km")
    ct["color"] = writer.color(c.color)
    if c.origin != "body":
        ct["origin"] = c.origin
    if not (c.show_body and c.show_label):
        ct["show"] = {"body": c.show_body, "label": c.show_label}
    doc["center"] = ct
    bodies = tomlkit.aot()
    for b in scene.bodies:
        t = tomlkit.table()
        for k, v in writer.body_table(scene, b).items():
            t[k] = _inline(v) if isinstance(v, Mapping) else v
        bodies.append(t)
    if scene.bodies:
        doc["body"] = bodies
    _dump_views(doc, scene, lu)
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
            pt["table"] = writer.file_path(scene, src)
            pt["color"] = writer.color(pop.color)
            pt["point_size"] = pop.point_size_px
            if pop.epoch_offset_s:
                pt["epoch"] = writer.epoch(scene.epoch.plus_seconds(pop.epoch_offset_s))
            aot.append(pt)
        doc["population"] = aot
    return tomlkit.dumps(doc)


def _inline(values: Mapping[str, Any]) -> Any:
    import tomlkit

    t = tomlkit.inline_table()
    t.update(values)
    return t


def _dump_views(doc: Any, scene: Scene, lu: str) -> None:
    import tomlkit

    cam = scene.camera
    d = Camera()
    ct = tomlkit.table()
    ct["projection"] = cam.projection
    ct["look"] = cam.look
    if cam.look == "angles":
        ct["elevation"] = writer.angle(cam.elevation_rad)
        ct["azimuth"] = writer.angle(cam.azimuth_rad)
    ct["target"] = writer.target(cam.target, lu)
    ct["width"] = writer.length(cam.width_m, lu)
    ct["distance"] = writer.length(cam.distance_m, lu)
    if cam.fov_rad != d.fov_rad:
        ct["fov"] = writer.angle(cam.fov_rad)
    _dump_dome_framing(ct, cam, d, lu)
    doc["camera"] = ct
    rs = scene.render
    rt = tomlkit.table()
    rt["size"] = list(rs.size_px)
    rt["background"] = writer.color(rs.background)
    for k in ("stars", "grid", "labels"):
        if getattr(rs, k) != getattr(RenderSettings(), k):
            rt[k] = getattr(rs, k)
    doc["render"] = rt
    tl = scene.timeline
    tt = tomlkit.table()
    tt.update(writer.timeline_table(tl))
    _dump_show(tt, tl, lu)
    doc["timeline"] = tt
    if scene.dome != DomeSettings():
        dt = tomlkit.table()
        dd = DomeSettings()
        for name in ("line_width", "label_size", "caption_size"):
            v = getattr(scene.dome, name + "_rad")
            if v != getattr(dd, name + "_rad"):
                dt[name] = writer.angle(v)
        for name in ("line_scale", "label_scale", "grid"):
            if getattr(scene.dome, name) != getattr(dd, name):
                dt[name] = getattr(scene.dome, name)
        doc["dome"] = dt


def _dump_dome_framing(t: Any, cam: Any, default: Any, lu: str) -> None:
    """dome_distance, dome_elevation, dome_tilt of the camera, when set."""
    for k, v in writer.dome_framing(cam, default, lu).items():
        t[k] = v


def _dump_show(tt: Any, tl: Any, lu: str) -> None:
    """The show's keyframes, pace, fades and captions as [[timeline.*]] tables, each from
    the writer's table of it."""
    import tomlkit

    for name, items, table in (
            ("camera", tl.camera_keys, lambda k: writer.camera_key_table(k, lu)),
            ("pace", tl.rate_keys, writer.pace_table),
            ("fade", tl.fades, writer.fade_table),
            ("caption", tl.captions, writer.caption_table)):
        if not items:
            continue
        aot = tomlkit.aot()
        for item in items:
            t = tomlkit.table()
            t.update(table(item))
            aot.append(t)
        tt[name] = aot


def save_scene(scene: Scene, path: str | Path) -> Path:
    """Write ``scene`` as a new file at ``path`` (atomically; an old file becomes .bak)."""
    return write_atomic(path, dump_scene(scene))
