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
from ..scene.model import Body, BodyShow, Scene
from ..scene.save import SaveError, dump_scene, edit_text, save_text

Edit = tuple[str, Any]
_SIZE_KEYS = ("a", "period", "periapsis", "apoapsis")
_ANOMALY_KEYS = ("M", "nu", "tp")
#: A time written as a date rather than an offset from the scene epoch.
_DATE = re.compile(r"^\s*[+-]?\d{4}-\d{2}-\d{2}")


def _is_date(value: Any) -> bool:
    return isinstance(value, str) and _DATE.match(value) is not None


def _hex(rgb: tuple[float, float, float]) -> str:
    return "#" + "".join(f"{max(0, min(255, round(c * 255))):02x}" for c in rgb)


def body_table(scene: Scene, body: Body) -> dict[str, Any]:
    """The [[body]] table that ``dump_scene`` writes for ``body`` (plain values)."""
    one = replace(scene, bodies=(body,), populations=())
    return dict(tomllib.loads(dump_scene(one))["body"][0])


def _q(x: float, unit: str, factor: float) -> str:
    """A quantity string with 15 significant digits (no float-division noise)."""
    return f"{x / factor:.15g} {unit}"


def _deg(x_rad: float) -> str:
    return f"{math.degrees(x_rad):.15g} deg"


def _mean_anomaly(body: Body) -> float:
    return float(mean_from_true(body.elements.nu, body.elements.e))


def _body_edits(path: str, scene: Scene, new: Body, old: Body, raw: dict[str, Any],
                epoch_moved: bool = False) -> list[Edit]:
    """Key edits turning the file's table ``raw`` (which loaded as ``old``) into ``new``.

    ``epoch_moved``: the scene epoch changed, so a sector start written as a date is
    rewritten as the offset the Scene holds.
    """
    from ..units import unit_factor

    sweep_date = epoch_moved and isinstance(raw.get("sweep"), dict) and _is_date(
        raw["sweep"].get("start"))
    if new == old and not sweep_date:
        return []
    out: list[Edit] = []
    d = body_table(scene, new)
    lu = scene.length_unit
    lf = unit_factor(lu, "length")
    el, el0 = new.elements, old.elements
    if new.name != old.name:
        out.append((f"{path}.name", new.name))
    shape = (el.a, el.e, el.parabola_p) != (el0.a, el0.e, el0.parabola_p)
    if shape or (el.mu != el0.mu and "period" in raw):
        e = float(el.e)
        given = [k for k in _SIZE_KEYS if k in raw]
        values: dict[str, Any]
        if given == ["period"] and e < 1.0:
            values = {"period": f"{float(el.period):.15g} s", "e": e}
        elif given == ["periapsis", "apoapsis"] and e < 1.0:
            values = {"periapsis": _q(float(el.periapsis), lu, lf),
                      "apoapsis": _q(float(el.apoapsis), lu, lf)}
        elif given == ["periapsis"] or e >= 1.0:
            values = {"periapsis": _q(float(el.periapsis), lu, lf), "e": e}
        else:
            values = {"a": _q(float(el.a), lu, lf), "e": e}
        for k in (*_SIZE_KEYS, "e"):
            if k in raw and k not in values:
                out.append((f"{path}.{k}", None))
        out.extend((f"{path}.{k}", v) for k, v in values.items())
    for k in ("i", "raan", "argp"):
        if getattr(el, k) != getattr(el0, k):
            out.append((f"{path}.{k}", _deg(float(getattr(el, k)))))
    if el != el0:
        if "nu" in raw:
            if el.nu != el0.nu:
                out.append((f"{path}.nu", _deg(float(el.nu))))
        elif not math.isclose(_mean_anomaly(new), _mean_anomaly(old), rel_tol=0.0,
                              abs_tol=1e-12):
            if "tp" in raw:
                out.append((f"{path}.tp", None))
            out.append((f"{path}.M", _deg(_mean_anomaly(new))))
    elif epoch_moved and "tp" in raw and not _is_date(raw["tp"]):
        # tp as an offset counts from the scene epoch, which moved: the same periapsis
        # time, counted from the new epoch.
        tp_s = new.epoch_offset_s - float(el.time_since_periapsis)
        out.append((f"{path}.tp", f"{tp_s!r} s"))
    if new.color != old.color:
        out.append((f"{path}.color", _hex(new.color)))
    if new.line_width_px != old.line_width_px:
        out.append((f"{path}.line_width", new.line_width_px))
    if new.show != old.show or (new.sweep is None) != (old.sweep is None):
        default = BodyShow()
        flags = {k: getattr(new.show, k) for k in BodyShow.__dataclass_fields__
                 if k != "sweep" and getattr(new.show, k) != getattr(default, k)}
        if new.show.sweep != (new.sweep is not None):
            flags["sweep"] = new.show.sweep
        out.append((f"{path}.show", flags or None))
    if new.sweep != old.sweep or sweep_date:
        out.append((f"{path}.sweep", d.get("sweep")))
    for attr, key in (("radius_m", "radius"), ("epoch_offset_s", "epoch")):
        if getattr(new, attr) != getattr(old, attr):
            out.append((f"{path}.{key}", d.get(key)))
    if new.limit_radius_m != old.limit_radius_m and ("limit_radius" in raw
                                                     or float(el.e) < 1.0):
        out.append((f"{path}.limit_radius", d.get("limit_radius")))
    return out


def _center_edits(scene: Scene, saved: Scene, raw: dict[str, Any]) -> list[Edit]:
    c, c0 = scene.center, saved.center
    out: list[Edit] = []
    if c.name != c0.name:
        out.append(("center.name", c.name))
    if c.gm_m3_s2 != c0.gm_m3_s2:
        if "preset" in raw:
            out.append(("center.preset", None))
            if c.radius_m == c0.radius_m:
                out.append(("center.radius", _q(c.radius_m, "km", 1e3)))
        out.append(("center.gm", f"{c.gm_m3_s2:.15g} m3/s2"))
    if c.radius_m != c0.radius_m:
        out.append(("center.radius", _q(c.radius_m, "km", 1e3)))
    if c.color != c0.color:
        out.append(("center.color", _hex(c.color)))
    if (c.show_body, c.show_label) != (c0.show_body, c0.show_label):
        out.append(("center.show", {"body": c.show_body, "label": c.show_label}))
    return out


def epoch_text(epoch: Any) -> str:
    """An epoch as the file writes it: microseconds, none when they are zero."""
    text = epoch.iso(decimals=6)
    return text.replace(".000000 ", " ")


def _epoch_edits(scene: Scene, saved: Scene, data: dict[str, Any]) -> list[Edit]:
    """The scene epoch, and what depends on it: population epochs, a timeline start
    written as a date (bodies' epochs are body keys)."""
    if scene.epoch == saved.epoch and scene.epoch.scale == saved.epoch.scale:
        return []  # the same instant, shown in the same scale (Epoch compares instants)
    out: list[Edit] = [("scene.epoch", epoch_text(scene.epoch))]
    timeline = data.get("timeline")
    if isinstance(timeline, dict) and _is_date(timeline.get("start")):
        out.append(("timeline.start", f"{scene.timeline.start_s!r} s"))
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
        for key, value in scene_file_edits(scene, saved, origins, file_text):
            text = edit_text(text, {key: value})
    save_text(p, text)
    return text
