"""Saving an edited Scene into its file: key edits that keep the user's comments.

The editor knows the Scene as it was last loaded or saved and, for each current body,
which [[body]] table of the file it came from. From that, ``scene_file_edits`` makes a
list of key edits for ``viewer.scene.save.edit_text`` (only what changed is rewritten,
in the form the file used: a body given by its period keeps a period); removed bodies
are deleted, added ones appended; a body list that was reordered is rewritten from the
first body out of place. ``save_editor_scene`` applies them to the loaded text,
validates the result with the loader and writes it atomically (through
``viewer.scene.save``). A scene with no file text is written whole with ``dump_scene``.
"""

from __future__ import annotations

import math
import re
import tomllib
from dataclasses import replace
from pathlib import Path
from typing import Any

from ..orbit import mean_from_true
from ..scene import writer
from ..scene.model import Body, Scene
from ..scene.save import SaveError, dump_scene, edit_text, save_text
from ..units.forms import is_epoch_text

Edit = tuple[str, Any]
_SIZE_KEYS = ("a", "period", "periapsis", "apoapsis")
_ANOMALY_KEYS = ("M", "nu", "tp")
def body_table(scene: Scene, body: Body) -> dict[str, Any]:
    """The [[body]] table the scene writer makes for ``body`` (plain values)."""
    return writer.body_table(scene, body)


def _mean_anomaly(body: Body) -> float:
    return float(mean_from_true(body.elements.nu, body.elements.e))


def _body_edits(path: str, scene: Scene, new: Body, old: Body, raw: dict[str, Any],
                epoch_moved: bool = False) -> list[Edit]:
    """Key edits turning the file's table ``raw`` (which loaded as ``old``) into ``new``.

    ``epoch_moved``: the scene epoch changed, so a sector start written as a date is
    rewritten as the offset the Scene holds.
    """
    sweep_date = epoch_moved and isinstance(raw.get("sweep"), dict) and is_epoch_text(
        raw["sweep"].get("start"))
    if new == old and not sweep_date:
        return []
    out: list[Edit] = []
    d = body_table(scene, new)
    if (new.track is None) != (old.track is None):  # to or from an ephemeris: its keys
        keys = set(d) | set(raw)
        return [(f"{path}.{k}", d.get(k)) for k in sorted(keys, key=_key_order(d, raw))
                if d.get(k) != raw.get(k) and k not in ("show", "sweep", "flight")] + [
                    (f"{path}.{k}", d.get(k)) for k in ("show", "sweep", "flight")
                    if d.get(k) != raw.get(k)]
    lu = scene.length_unit
    el, el0 = new.elements, old.elements
    if new.name != old.name:
        out.append((f"{path}.name", new.name))
    shape = (el.a, el.e, el.parabola_p) != (el0.a, el0.e, el0.parabola_p)
    if shape or (el.mu != el0.mu and "period" in raw):
        e = float(el.e)
        given = [k for k in _SIZE_KEYS if k in raw]
        values: dict[str, Any]
        if given == ["period"] and e < 1.0:
            values = {"period": writer.duration(float(el.period)), "e": e}
        elif given == ["periapsis", "apoapsis"] and e < 1.0:
            values = {"periapsis": writer.length(float(el.periapsis), lu),
                      "apoapsis": writer.length(float(el.apoapsis), lu)}
        elif given == ["periapsis"] or e >= 1.0:
            values = {"periapsis": writer.length(float(el.periapsis), lu), "e": e}
        else:
            values = {"a": writer.length(float(el.a), lu), "e": e}
        for k in (*_SIZE_KEYS, "e"):
            if k in raw and k not in values:
                out.append((f"{path}.{k}", None))
        # A value that did not change keeps its line as the user wrote it (e = 0, not 0.0).
        out.extend((f"{path}.{k}", v) for k, v in values.items()
                   if not (k == "e" and isinstance(raw.get("e"), (int, float))
                           and float(raw["e"]) == float(v)))
    for k in ("i", "raan", "argp"):
        if getattr(el, k) != getattr(el0, k):
            out.append((f"{path}.{k}", writer.angle(float(getattr(el, k)))))
    if el != el0:
        if "nu" in raw:
            if el.nu != el0.nu:
                out.append((f"{path}.nu", writer.angle(float(el.nu))))
        elif not math.isclose(_mean_anomaly(new), _mean_anomaly(old), rel_tol=0.0,
                              abs_tol=1e-12):
            if "tp" in raw:
                out.append((f"{path}.tp", None))
            out.append((f"{path}.M", writer.angle(_mean_anomaly(new))))
    elif epoch_moved and "tp" in raw and not is_epoch_text(raw["tp"]):
        # tp as an offset counts from the scene epoch, which moved: the same periapsis
        # time, counted from the new epoch.
        tp_s = new.epoch_offset_s - float(el.time_since_periapsis)
        out.append((f"{path}.tp", writer.duration(tp_s)))
    if new.color != old.color:
        out.append((f"{path}.color", writer.color(new.color)))
    if new.line_width_px != old.line_width_px:
        out.append((f"{path}.line_width", new.line_width_px))
    if new.show != old.show or (new.sweep is None) != (old.sweep is None):
        flags = writer.show_table(new.show, new.sweep is not None)
        out.append((f"{path}.show", flags or None))
    if new.sweep != old.sweep or sweep_date:
        out.append((f"{path}.sweep", d.get("sweep")))
    for attr, key in (("radius_m", "radius"), ("epoch_offset_s", "epoch"),
                      ("flight_s", "flight")):
        if getattr(new, attr) != getattr(old, attr):
            out.append((f"{path}.{key}", d.get(key)))
    if new.limit_radius_m != old.limit_radius_m and ("limit_radius" in raw
                                                     or float(el.e) < 1.0):
        out.append((f"{path}.limit_radius", d.get("limit_radius")))
    return out


def _key_order(d: dict[str, Any], raw: dict[str, Any]) -> Any:
    """Keys in the writer's order, then any the file had that it does not write."""
    order = {k: i for i, k in enumerate([*d, *raw])}
    return lambda k: order[k]


def _center_edits(scene: Scene, saved: Scene, raw: dict[str, Any]) -> list[Edit]:
    c, c0 = scene.center, saved.center
    out: list[Edit] = []
    if c.name != c0.name:
        out.append(("center.name", c.name))
    if c.gm_m3_s2 != c0.gm_m3_s2:
        if "preset" in raw:
            out.append(("center.preset", None))
            if c.radius_m == c0.radius_m:
                out.append(("center.radius", writer.length(c.radius_m, "km")))
        out.append(("center.gm", writer.gm(c.gm_m3_s2)))
    if c.radius_m != c0.radius_m:
        out.append(("center.radius", writer.length(c.radius_m, "km")))
    if c.color != c0.color:
        out.append(("center.color", writer.color(c.color)))
    if (c.show_body, c.show_label) != (c0.show_body, c0.show_label):
        out.append(("center.show", {"body": c.show_body, "label": c.show_label}))
    return out


def epoch_text(epoch: Any) -> str:
    """An epoch as the file writes it (``viewer.scene.writer.epoch``)."""
    return writer.epoch(epoch)


def _epoch_edits(scene: Scene, saved: Scene, data: dict[str, Any]) -> list[Edit]:
    """The scene epoch, and what depends on it: population epochs, a timeline start
    written as a date (bodies' epochs are body keys)."""
    if scene.epoch == saved.epoch and scene.epoch.scale == saved.epoch.scale:
        return []  # the same instant, shown in the same scale (Epoch compares instants)
    out: list[Edit] = [("scene.epoch", epoch_text(scene.epoch))]
    timeline = data.get("timeline")
    if isinstance(timeline, dict) and is_epoch_text(timeline.get("start")):
        out.append(("timeline.start", writer.duration(scene.timeline.start_s)))
    for k, (pop, old) in enumerate(zip(scene.populations, saved.populations, strict=False)):
        if pop.epoch_offset_s != old.epoch_offset_s:
            out.append((f"population[{k}].epoch", epoch_text(scene.epoch.plus_seconds(
                pop.epoch_offset_s)) if pop.epoch_offset_s else None))
    return out


def scene_file_edits(scene: Scene, saved: Scene, origins: tuple[int | None, ...],
                     file_text: str) -> list[Edit]:
    """Key edits (in order) that turn ``file_text`` (which loaded as ``saved``) into
    ``scene``; ``origins[k]`` is the file index of body k of ``scene`` or None if new."""
    data = tomllib.loads(file_text)
    raw_bodies: list[dict[str, Any]] = data.get("body", [])
    edits: list[Edit] = _epoch_edits(scene, saved, data)
    edits += _center_edits(scene, saved, data.get("center", {}))
    moved = scene.epoch != saved.epoch
    kept = [o for o in origins if o is not None]
    if kept == list(range(len(saved.bodies))) and None not in origins:
        for j, src in enumerate(kept):
            edits.extend(_body_edits(f"body[{j}]", scene, scene.bodies[j], saved.bodies[src],
                                     raw_bodies[src], moved))
        return edits
    # Bodies were added, removed or moved, and the file's tables could not be moved as
    # text (``restructure_bodies``): rewrite the tables from the first one out of place.
    gone = sorted(set(range(len(saved.bodies))) - set(kept), reverse=True)
    if gone and not kept:
        # Remove the array itself: an emptied array of tables is written as "body = []"
        # at the top of the file, before [scene].
        edits.append(("body", None))
    else:
        edits.extend((f"body[{d}]", None) for d in gone)
    # After the deletions, the surviving tables are in file order: rank = new index.
    rank = {o: j for j, o in enumerate(sorted(kept))}
    in_place = 0  # bodies at the front that keep their table in place
    for k, o in enumerate(origins):
        if o is None or rank[o] != k:
            break
        in_place += 1
    for k in range(in_place):
        o = origins[k]
        assert o is not None
        edits.extend(_body_edits(f"body[{k}]", scene, scene.bodies[k], saved.bodies[o],
                                 raw_bodies[o], moved))
    for k in range(in_place, len(scene.bodies)):
        table = body_table(scene, scene.bodies[k])
        edits.append((f"body[{k}]" if k < len(kept) else "body[+]", table))
    return edits


_BODY_HEADER = re.compile(r"^\s*\[\[\s*body\s*\]\]\s*(#.*)?$")
_ANY_HEADER = re.compile(r"^\s*\[")


def body_blocks(text: str) -> list[tuple[int, int]] | None:
    """The line spans [start, end) of each ``[[body]]`` table of ``text``: from the comment
    lines directly above its header to the start of the next block. None when the body
    tables are not one run (another table stands between two of them) or the headers
    cannot be told apart from text inside multi-line strings."""
    lines = text.splitlines(keepends=True)
    headers: list[int] = []
    others: list[int] = []
    in_string = False
    for n, line in enumerate(lines):
        if not in_string and _BODY_HEADER.match(line):
            headers.append(n)
        elif not in_string and _ANY_HEADER.match(line):
            others.append(n)
        if (line.count('"""') + line.count("'''")) % 2:
            in_string = not in_string
    if in_string or not headers:
        return None

    def block_start(h: int) -> int:
        while h > 0 and lines[h - 1].lstrip().startswith("#"):
            h -= 1
        return h

    starts = [block_start(h) for h in headers]
    after = [o for o in others if o > headers[-1]]
    end = block_start(after[0]) if after else len(lines)
    if any(headers[0] < o < headers[-1] for o in others):
        return None
    return list(zip(starts, [*starts[1:], end], strict=True))


def _new_body_table(scene: Scene, saved: Scene, raw: list[dict[str, Any]],
                    body: Body) -> dict[str, Any]:
    """A new body's table in the file's own style: a copy of the saved table it was
    duplicated from (its keys as the user wrote them) with the new name and colour, else
    the scene writer's table."""
    for k, old in enumerate(saved.bodies):
        if replace(old, name=body.name, color=body.color, warnings=body.warnings) == body:
            table = dict(raw[k])
            table["name"] = body.name
            if body.color != old.color:
                table["color"] = writer.color(body.color)
            return table
    return writer.body_table(scene, body)


def restructure_bodies(scene: Scene, saved: Scene, origins: tuple[int | None, ...],
                       file_text: str) -> str | None:
    """``file_text`` with its ``[[body]]`` tables in the order of ``scene``: kept tables
    moved as text with their comments, removed ones taken out with only their own lines,
    new ones written where they now stand. Every other line stays as it was. None when
    the file's body tables are not one run (``body_blocks``)."""
    raw: list[dict[str, Any]] = tomllib.loads(file_text).get("body", [])
    blocks = body_blocks(file_text) if raw else None
    if blocks is None or len(blocks) != len(raw):
        return None
    lines = file_text.splitlines(keepends=True)
    texts = ["".join(lines[a:b]) for a, b in blocks]
    out: list[str] = []
    for k, o in enumerate(origins):
        if o is not None:
            block = texts[o]
        else:
            block = writer.table_text("body", _new_body_table(scene, saved, raw,
                                                              scene.bodies[k]))
        if out and not out[-1].endswith("\n\n"):
            out[-1] = out[-1] + ("" if out[-1].endswith("\n") else "\n") + "\n"
        out.append(block)
    tail = "".join(lines[blocks[-1][1]:])
    if out and tail and not out[-1].endswith("\n\n"):
        out[-1] += "\n"
    return "".join(lines[:blocks[0][0]]) + "".join(out) + tail


def save_editor_scene(scene: Scene, saved: Scene, origins: tuple[int | None, ...],
                      path: str | Path, file_text: str | None) -> str:
    """Write ``scene`` to ``path`` and return the text written.

    With the loaded ``file_text``, only changed keys are rewritten (comments kept); if
    ``path`` is the loaded file and it changed on disk since, nothing is written. The
    edited text is validated by the loader before the atomic write.
    """
    from ..scene.loader import read_scene_text

    p = Path(path)
    if file_text is None:
        text = dump_scene(scene)
    else:
        if saved.source is not None and p.exists() and p.resolve() == Path(
                saved.source).resolve() and read_scene_text(p) != file_text:
            raise SaveError(str(p), "the file changed on disk since it was loaded; nothing "
                            "was written (save as another file, or reload)")
        text = file_text
        moved = restructure_bodies(scene, saved, origins, file_text) \
            if (None in origins or list(origins) != list(range(len(saved.bodies)))) else None
        if moved is not None:
            # The tables are in place now: body k of the text is body k of the scene.
            text = moved
            bridged = replace(saved, bodies=tuple(
                saved.bodies[o] if o is not None else scene.bodies[k]
                for k, o in enumerate(origins)))
            origins = tuple(range(len(origins)))
            saved, file_text = bridged, text
        for key, value in scene_file_edits(scene, saved, origins, file_text):
            text = edit_text(text, {key: value})
        text = save_timeline(scene, saved, text)
    save_text(p, text)
    return text


# --- the show ---------------------------------------------------------------------------

_SHOW_KINDS = ("camera", "fade", "caption")


def _header(kind: str) -> re.Pattern[str]:
    return re.compile(r"^\s*\[\[\s*timeline\s*\.\s*" + kind + r"\s*\]\]\s*(#.*)?$")


def _show_blocks(lines: list[str], kind: str) -> list[tuple[int, int]]:
    """Line spans [start, end) of each ``[[timeline.KIND]]`` table: from the comment lines
    directly above its header to the comments above the next header (or the end)."""
    own = _header(kind)
    spans = []
    for n, line in enumerate(lines):
        if own.match(line):
            start = n
            while start > 0 and lines[start - 1].lstrip().startswith("#"):
                start -= 1
            end = n + 1
            while end < len(lines) and not _ANY_HEADER.match(lines[end]):
                end += 1
            back = end
            while back > n + 1 and lines[back - 1].lstrip().startswith("#"):
                back -= 1
            spans.append((start, back if end < len(lines) else end))
    return spans


def _show_table_text(scene: Scene, kind: str, item: Any) -> str:
    if kind == "camera":
        table = writer.camera_key_table(item, scene.length_unit)
    elif kind == "fade":
        table = writer.fade_table(item)
    else:
        table = writer.caption_table(item)
    return writer.table_text(f"timeline.{kind}", table)


def save_timeline(scene: Scene, saved: Scene, text: str) -> str:
    """``text`` (which holds ``saved``'s show) with ``scene``'s show: changed settings of
    ``[timeline]`` edited in place; for each of camera keys, fades and captions, a table
    that did not change keeps its lines (and the comments above it) byte for byte, a
    changed or new one is written by the scene writer where it now stands, a removed one
    takes only its own lines. Every other line stays as it was."""
    tl, old = scene.timeline, saved.timeline
    if tl == old:
        return text
    settings: dict[str, Any] = {}
    if tl.duration_s != old.duration_s:
        settings["timeline.duration"] = writer.duration(tl.duration_s)
    if tl.rate != old.rate:
        settings["timeline.rate"] = writer.quantity(tl.rate, "rate", "d/s")
    if tl.fps != old.fps:
        settings["timeline.fps"] = int(tl.fps) if tl.fps.is_integer() else tl.fps
    if tl.clock != old.clock:
        settings["timeline.clock"] = tl.clock
    if tl.start_s != old.start_s:
        settings["timeline.start"] = writer.quantity(tl.start_s, "time", scene.time_unit)
    if settings:
        text = edit_text(text, settings)
    for kind in _SHOW_KINDS:
        attr = {"camera": "camera_keys", "fade": "fades", "caption": "captions"}[kind]
        new, was = getattr(tl, attr), getattr(old, attr)
        if new == was:
            continue
        lines = text.splitlines(keepends=True)
        if lines and not lines[-1].endswith("\n"):
            lines[-1] += "\n"
        spans = _show_blocks(lines, kind)
        if len(spans) != len(was):
            raise SaveError("timeline", f"the [[timeline.{kind}]] tables of the file could "
                            "not be told apart; nothing was written (save as another file)")
        texts = ["".join(lines[a:b]) for a, b in spans]
        used: set[int] = set()
        out = []
        same = {k: next((j for j, w in enumerate(was) if w == item), None)
                for k, item in enumerate(new)}
        for k, item in enumerate(new):
            j = same[k] if same[k] not in used else None
            if j is not None:
                used.add(j)
                block = texts[j]
            else:
                block = _show_table_text(scene, kind, item)
                # An edited table keeps the comment lines above it.
                if k < len(was) and k not in same.values():
                    head = [ln for ln in texts[k].splitlines(keepends=True)]
                    comments = []
                    for ln in head:
                        if not ln.lstrip().startswith("#"):
                            break
                        comments.append(ln)
                    block = "".join(comments) + block
            out.append(block if block.endswith("\n\n") else block.rstrip("\n") + "\n\n")
        if spans:
            keep = [ln for n, ln in enumerate(lines)
                    if not any(a <= n < b for a, b in spans)]
            at = spans[0][0]
            before = sum(1 for n in range(at) if not any(a <= n < b for a, b in spans))
            lines = keep[:before] + out + keep[before:]
        else:
            if "timeline" not in tomllib.loads(text):
                lines.append(("\n" if lines and lines[-1].strip() else "") + "[timeline]\n\n")
            elif lines and lines[-1].strip():
                lines.append("\n")
            lines += out
        text = "".join(lines)
        text = text.rstrip("\n") + "\n"
    return text
