"""The editor model: a Scene, the selected body, the lock, and an undo/redo history.

Plain Python: no imgui, pyglet or GL. The panels only read it and call its operations;
the renderer draws ``editor.scene``. Every operation either replaces the Scene with a
complete new one (pushing the old one on the undo stack) or raises ``EditRefused`` and
leaves everything as it was. Scenes are frozen, so the history is a list of Scenes and
undo is an assignment.

``revision`` counts changes (edits, undo, redo, selection), so a window redraws only
when it moves. ``dirty`` compares the current Scene with the one last saved or loaded,
by identity: undoing back to the saved state is clean again.
"""

from __future__ import annotations

import math
import re
from collections.abc import Sequence
from dataclasses import dataclass, replace
from pathlib import Path

from ..orbit import AU_M, DAY_S, JULIAN_YEAR_S, Elements
from ..scene.loader import free_color
from ..scene.model import Body, BodyShow, Center, Scene, Sweep, Timeline
from ..scene.report import orbit_warnings
from ..units import EpochError, QuantityError, parse_epoch, parse_quantity
from .elements_edit import FIELDS, HOLDS, EditRefused, edit_elements, kept_text

__all__ = ["Editor", "EditRefused", "FIELDS", "HOLDS"]

#: Colours given to new bodies in turn (the scene loader's palette, distinct on black).
#: Open orbits are drawn out to this many periapsis radii (the loader's default).
LIMIT_PERIAPSES = 5.0
_NAME_BAD = re.compile(r"[\x00-\x1f\x7f]")


@dataclass(frozen=True)
class _State:
    """One entry of the history: the scene, the selection and a stable id per body
    (kept through renames, moves and edits, so a save knows which [[body]] table of the
    file each body is)."""

    scene: Scene
    selection: int | None
    ids: tuple[int, ...]
    label: str = ""


def _unique(name: str, taken: set[str]) -> str:
    if name not in taken:
        return name
    base = re.sub(r" \d+$", "", name)
    k = 2
    while f"{base} {k}" in taken:
        k += 1
    return f"{base} {k}"


def field_unit(field: str, value_si: float, scene: Scene) -> str:
    """The unit an element field is shown in (and bare numbers typed into it take)."""
    dim = FIELDS[field][0]
    if dim == "length":
        if scene.length_unit in ("m", "km"):
            return scene.length_unit
        return "km" if abs(value_si) < 1e9 or not math.isfinite(value_si) else "au"
    if dim == "time":
        a = abs(value_si)
        for limit, unit in ((120.0, "s"), (3 * 3600.0, "min"), (3 * DAY_S, "h"),
                            (2 * JULIAN_YEAR_S, "d")):
            if a < limit:
                return unit
        return "yr"
    if dim == "angle":
        return "deg"
    return ""


_FACTORS = {"m": 1.0, "km": 1e3, "au": AU_M, "s": 1.0, "min": 60.0, "h": 3600.0, "d": DAY_S,
            "yr": JULIAN_YEAR_S, "deg": math.pi / 180.0, "": 1.0}


def field_value(field: str, el: Elements, central_radius_m: float) -> float:
    """The SI value of an element field of ``el`` (NaN where the conic has none)."""
    e = float(el.e)
    if field == "period":
        return float(el.period) if e < 1.0 else math.nan
    if field == "M":
        return float(el.mean_anomaly)
    if field in ("periapsis", "periapsis_altitude"):
        return float(el.periapsis) - (central_radius_m if field.endswith("altitude") else 0.0)
    if field in ("apoapsis", "apoapsis_altitude"):
        if e >= 1.0:
            return math.nan
        return float(el.apoapsis) - (central_radius_m if field.endswith("altitude") else 0.0)
    return float(getattr(el, field))


class Editor:
    """A scene being edited: selection, lock, history, dirty flag, save.

    ``hold`` is the lock: one of HOLDS ("auto" holds the natural partner: a <-> e,
    periapsis <-> apoapsis). ``path`` is where ``save`` writes; ``source_text`` is the
    file's text when it was loaded, so saving keeps the user's comments and layout.
    """

    def __init__(self, scene: Scene, path: str | Path | None = None,
                 source_text: str | None = None) -> None:
        self.path = Path(path) if path is not None else scene.source
        self.source_text = source_text
        self.hold = "auto"
        #: What the last element edit kept fixed, in words (``elements_edit.kept_text``).
        self.kept = ""
        n = len(scene.bodies)
        self._now = _State(scene, 0 if scene.bodies else None, tuple(range(n)))
        self._next_id = n
        self._file_ids: tuple[int, ...] = tuple(range(n))
        self._undo: list[_State] = []
        self._redo: list[_State] = []
        self._saved_scene = scene
        self.revision = 0
        #: Field texts of the scene they were made from: (scene, {(field, body): text}).
        self._texts: tuple[Scene, dict[tuple[str, int], str]] = (scene, {})

    @classmethod
    def open(cls, path: str | Path) -> Editor:
        """An editor on the scene file at ``path`` (UserInputError if it is not valid)."""
        from ..scene.loader import load_scene_text, read_scene_text

        p = Path(path)
        text = read_scene_text(p)
        return cls(load_scene_text(text, source=p, base_dir=p.parent), p, text)

    # --- reading ----------------------------------------------------------------------

    @property
    def scene(self) -> Scene:
        return self._now.scene

    @property
    def selection(self) -> int | None:
        return self._now.selection

    @property
    def origins(self) -> tuple[int | None, ...]:
        """For each body, its index among the bodies of the file last loaded or saved
        (None for a body added since)."""
        where = {i: k for k, i in enumerate(self._file_ids)}
        return tuple(where.get(i) for i in self._now.ids)

    def _new_id(self) -> int:
        self._next_id += 1
        return self._next_id

    @property
    def body(self) -> Body | None:
        """The selected body, or None."""
        k = self._now.selection
        return None if k is None else self.scene.bodies[k]

    @property
    def dirty(self) -> bool:
        """True when the scene differs from the one last loaded or saved."""
        return self.scene is not self._saved_scene

    @property
    def can_undo(self) -> bool:
        return bool(self._undo)

    @property
    def can_redo(self) -> bool:
        return bool(self._redo)

    @property
    def undo_label(self) -> str:
        return self._now.label if self._undo else ""

    @property
    def redo_label(self) -> str:
        return self._redo[-1].label if self._redo else ""

    def field_text(self, field: str, index: int | None = None) -> str:
        """An element field of a body as text with its unit ("6778.137 km"); "" if none.
        Made once per scene (an edit makes a new one): the panels ask every frame."""
        k = self._index(index)
        if self._texts[0] is not self.scene:
            self._texts = (self.scene, {})
        texts = self._texts[1]
        text = texts.get((field, k))
        if text is None:
            text = texts[(field, k)] = self._field_text(field, self.scene.bodies[k])
        return text

    def _field_text(self, field: str, body: Body) -> str:
        x = field_value(field, body.elements, self.scene.center.radius_m)
        if not math.isfinite(x):
            return ""
        unit = field_unit(field, x, self.scene)
        text = f"{x / _FACTORS[unit]:.10g}"
        return f"{text} {unit}" if unit else text

    def field_unit(self, field: str, index: int | None = None) -> str:
        body = self._body_at(index)
        return field_unit(field, field_value(field, body.elements, self.scene.center.radius_m),
                          self.scene)

    # --- history ----------------------------------------------------------------------

    def _push(self, scene: Scene, selection: int | None, ids: tuple[int, ...],
              label: str, merge: bool = False) -> None:
        # ``merge``: a continuing gesture (a colour or width being dragged) replaces the
        # edit it continues instead of adding one undo step per frame.
        if not (merge and self._undo and not self._redo and self._now.label == label):
            self._undo.append(self._now)
        self._redo.clear()
        self._now = _State(scene, selection, ids, label)
        self.revision += 1

    def undo(self) -> bool:
        """Go back one edit; False if there is none."""
        if not self._undo:
            return False
        self._redo.append(self._now)
        self._now = self._undo.pop()
        self.revision += 1
        return True

    def redo(self) -> bool:
        """Do again the last undone edit; False if there is none."""
        if not self._redo:
            return False
        self._undo.append(self._now)
        self._now = self._redo.pop()
        self.revision += 1
        return True

    # --- selection --------------------------------------------------------------------

    def select(self, index: int | None) -> None:
        """Select body ``index`` (None: nothing). Selection is not an edit: no history."""
        if index is not None and not 0 <= index < len(self.scene.bodies):
            raise IndexError(index)
        if index != self._now.selection:
            self._now = replace(self._now, selection=index)
            self.revision += 1

    def _index(self, index: int | None) -> int:
        k = self._now.selection if index is None else index
        if k is None:
            raise EditRefused("selection", "no body is selected")
        if not 0 <= k < len(self.scene.bodies):
            raise IndexError(k)
        return k

    def _body_at(self, index: int | None) -> Body:
        return self.scene.bodies[self._index(index)]

    # --- bodies -----------------------------------------------------------------------

    def _with_bodies(self, bodies: list[Body]) -> Scene:
        return _refresh_scene_warnings(replace(self.scene, bodies=tuple(bodies)))

    def add_body(self) -> int:
        """Add a circular body outside the others (or a quarter of the view across if
        there are none), select it and return its index."""
        scene = self.scene
        c = scene.center
        sizes = [float(b.elements.apoapsis) for b in scene.bodies if float(b.elements.e) < 1.0]
        if sizes:
            a = 1.3 * max(sizes)
        else:
            a = scene.camera.width_m / 4.0
        a = max(a, 2.0 * c.radius_m, 1.0)
        taken = {b.name for b in scene.bodies}
        name = _unique(f"Body {len(scene.bodies) + 1}", taken)
        el = Elements(a=a, e=0.0, mu=c.gm_m3_s2)
        color = free_color(scene.bodies)  # a colour no other body has, while any is left
        body = Body(name=name, elements=el, color=color,
                    warnings=tuple(orbit_warnings(el, c)))
        bodies = [*scene.bodies, body]
        k = len(bodies) - 1
        self._push(self._with_bodies(bodies), k, (*self._now.ids, self._new_id()),
                   f"add {name}")
        return k

    def add_bodies(self, bodies: Sequence[Body], label: str) -> list[int]:
        """Append ``bodies`` in one edit (one undo step); a name already in use gets a
        number. Selects the first of them and returns their indices."""
        if not bodies:
            return []
        c = self.scene.center
        taken = {b.name for b in self.scene.bodies}
        added = []
        for b in bodies:
            name = _unique(b.name, taken)
            taken.add(name)
            added.append(_with_elements(replace(b, name=name), b.elements.with_(
                mu=c.gm_m3_s2), c))
        first = len(self.scene.bodies)
        ids = (*self._now.ids, *(self._new_id() for _ in added))
        self._push(self._with_bodies([*self.scene.bodies, *added]), first, ids, label)
        return list(range(first, first + len(added)))

    def duplicate(self, index: int | None = None) -> int:
        """Copy a body (named "... copy") just after it; select and return the copy."""
        k = self._index(index)
        src = self.scene.bodies[k]
        name = _unique(f"{src.name} copy", {b.name for b in self.scene.bodies})
        bodies = list(self.scene.bodies)
        bodies.insert(k + 1, replace(src, name=name))
        ids = list(self._now.ids)
        ids.insert(k + 1, self._new_id())
        self._push(self._with_bodies(bodies), k + 1, tuple(ids), f"duplicate {src.name}")
        return k + 1

    def delete(self, index: int | None = None) -> None:
        """Remove a body; the selection moves to its neighbour."""
        k = self._index(index)
        name = self.scene.bodies[k].name
        bodies = list(self.scene.bodies)
        del bodies[k]
        ids = list(self._now.ids)
        del ids[k]
        sel = None if not bodies else min(k, len(bodies) - 1)
        self._push(self._with_bodies(bodies), sel, tuple(ids), f"delete {name}")

    def rename(self, name: str, index: int | None = None) -> None:
        """Rename a body; refused for an empty name, a name in use or control characters."""
        k = self._index(index)
        new = name.strip()
        old = self.scene.bodies[k].name
        if new == old:
            return
        if not new:
            raise EditRefused("name", "a body needs a name")
        if len(new) > 200:
            raise EditRefused("name", "a name may have at most 200 characters")
        if _NAME_BAD.search(new):
            raise EditRefused("name", "a name may not contain control characters")
        if any(b.name == new for j, b in enumerate(self.scene.bodies) if j != k):
            raise EditRefused("name", f'"{new}" is already the name of another body; names '
                              "must be unique")
        self._replace_body(k, replace(self.scene.bodies[k], name=new), f"rename {old}")

    def move(self, new_index: int, index: int | None = None) -> None:
        """Move a body to position ``new_index`` of the list (drawing and file order)."""
        k = self._index(index)
        n = len(self.scene.bodies)
        j = max(0, min(n - 1, new_index))
        if j == k:
            return
        bodies = list(self.scene.bodies)
        ids = list(self._now.ids)
        bodies.insert(j, bodies.pop(k))
        ids.insert(j, ids.pop(k))
        self._push(self._with_bodies(bodies), j, tuple(ids),
                   f"move {self.scene.bodies[k].name}")

    def replace_body(self, index: int, body: Body, label: str,
                     color: tuple[float, float, float] | None = None) -> None:
        """Put ``body`` (made elsewhere: a transfer, a pick of the pork-chop plot) in
        place of the body at ``index``, in one edit; it keeps that body's place in the
        file, and ``color`` if given. Its name must not be another body's."""
        k = self._index(index)
        if any(b.name == body.name for i, b in enumerate(self.scene.bodies) if i != k):
            raise EditRefused("name", f"another body is already named {body.name!r}")
        c = self.scene.center
        new = _with_elements(replace(body, color=color or body.color),
                             body.elements.with_(mu=c.gm_m3_s2), c)
        self._replace_body(k, new, label)

    def _replace_body(self, k: int, body: Body, label: str, merge: bool = False) -> None:
        bodies = list(self.scene.bodies)
        bodies[k] = body
        self._push(self._with_bodies(bodies), self._now.selection, self._now.ids, label,
                   merge)

    # --- elements ---------------------------------------------------------------------

    def set_field(self, field: str, text: str, index: int | None = None) -> bool:
        """Set an element field from text with units ("400 km", "2.5 h", "12 deg").

        A bare number takes the unit the field is shown in. The lock ``hold`` says what
        stays fixed. Returns False when the text is the current value (no edit); raises
        EditRefused (nothing changed) for input that is not allowed.
        """
        k = self._index(index)
        if text.strip() == self.field_text(field, k):
            return False
        body = self.scene.bodies[k]
        if body.track is not None:
            raise EditRefused(field, f"{body.name} follows the ephemeris "
                              f"{body.track.source}, which sets its orbit; to edit the "
                              f"elements, first make it a fixed conic (Orbit panel)")
        c = self.scene.center
        el = edit_elements(body.elements, field, text, self.hold, c.radius_m,
                           self.field_unit(field, k) or None)
        self._replace_body(k, _with_elements(body, el, c), f"{field} of {body.name}")
        self.kept = kept_text(field, self.hold)
        return True

    def fix_conic(self, t_s: float, index: int | None = None) -> None:
        """Make a body that follows an ephemeris a fixed two-body conic: its osculating
        elements at scene time ``t_s``, with their epoch there. One edit (undo brings the
        ephemeris back); the file then holds its elements in place of the ephemeris key."""
        k = self._index(index)
        body = self.scene.bodies[k]
        if body.track is None:
            raise EditRefused("ephemeris", f"{body.name} is already a fixed conic")
        fixed = replace(body.osculating(t_s), track=None)
        self._replace_body(k, _with_elements(fixed, fixed.elements, self.scene.center),
                           f"{body.name} as a fixed conic")

    # --- style and drawing --------------------------------------------------------------

    def set_show(self, flag: str, value: bool, index: int | None = None) -> None:
        """Turn one drawing toggle of a body on or off (orbit, foci, axes, ...)."""
        k = self._index(index)
        body = self.scene.bodies[k]
        if flag not in BodyShow.__dataclass_fields__:
            raise KeyError(flag)
        if flag == "sweep" and value and body.sweep is None:
            body = replace(body, sweep=_default_sweep(body))
        if getattr(body.show, flag) == value and body is self.scene.bodies[k]:
            return
        show = replace(body.show, **{flag: bool(value)})
        self._replace_body(k, replace(body, show=show), f"{flag} of {body.name}")

    def set_color(self, rgb: tuple[float, float, float], index: int | None = None,
                  merge: bool = False) -> None:
        """Set a body's colour (sRGB floats in [0, 1]); ``merge`` joins a dragged change
        into one undo step."""
        k = self._index(index)
        body = self.scene.bodies[k]
        rgb = tuple(min(1.0, max(0.0, float(x))) for x in rgb)  # type: ignore[assignment]
        if rgb != body.color:
            self._replace_body(k, replace(body, color=rgb), f"colour of {body.name}", merge)

    def set_line_width(self, px: float, index: int | None = None, merge: bool = False) -> None:
        """Set a body's line width in pixels at 1080 px image height."""
        k = self._index(index)
        body = self.scene.bodies[k]
        if not 0.0 < px <= 100.0:
            raise EditRefused("line_width", "the line width must be above 0 and at most 100 px")
        if px != body.line_width_px:
            self._replace_body(k, replace(body, line_width_px=float(px)),
                               f"line width of {body.name}", merge)

    def set_sweep(self, index: int | None = None, *, interval: str | None = None,
                  count: int | None = None, start: str | None = None,
                  opacity: float | None = None) -> None:
        """Change the equal-time sectors of a body (times as text with units)."""
        k = self._index(index)
        body = self.scene.bodies[k]
        sw = body.sweep or _default_sweep(body)
        unit = self.scene.time_unit
        try:
            changes: dict[str, float | int | bool] = {}
            if interval is not None:
                changes["interval_s"] = parse_quantity(interval, "time", unit)
                if not changes["interval_s"] > 0:
                    raise EditRefused("sweep.interval", "the interval must be positive")
                changes["interval_given"] = True
            if start is not None:
                changes["start_s"] = parse_quantity(start, "time", unit)
        except QuantityError as err:
            raise EditRefused("sweep", str(err)) from None
        if count is not None:
            if not 1 <= count <= 1000:
                raise EditRefused("sweep.count", "the count must be between 1 and 1000")
            changes["count"] = int(count)
        if opacity is not None:
            if not 0.0 <= opacity <= 1.0:
                raise EditRefused("sweep.opacity", "the opacity must be between 0 and 1")
            changes["opacity"] = float(opacity)
        new = _follow_orbit(replace(sw, **changes), body.elements)  # type: ignore[arg-type]
        if new != body.sweep:
            self._replace_body(k, replace(body, sweep=new), f"sectors of {body.name}")

    # --- the central body -------------------------------------------------------------

    def set_center(self, *, gm: str | None = None, radius: str | None = None,
                   name: str | None = None) -> None:
        """Change the central body: GM (every orbit keeps its shape, periods change),
        radius, name. Text values take units ("3.986004418e14 m3/s2", "6378 km")."""
        c = self.scene.center
        changes: dict[str, object] = {}
        try:
            if gm is not None:
                v = parse_quantity(gm, "gm", None)
                if not v > 0:
                    raise EditRefused("center.gm", "gm must be positive")
                if v != c.gm_m3_s2:
                    changes["gm_m3_s2"] = v
                    changes["preset"] = None
            if radius is not None:
                r = parse_quantity(radius, "length", "km")
                if r < 0:
                    raise EditRefused("center.radius", "the radius must be zero or positive")
                if r != c.radius_m:
                    changes["radius_m"] = r
        except QuantityError as err:
            raise EditRefused("center", str(err)) from None
        if name is not None and name.strip() != c.name:
            if not name.strip() or _NAME_BAD.search(name):
                raise EditRefused("center.name", "the central body needs a printable name")
            changes["name"] = name.strip()
        if not changes:
            return
        center = replace(c, **changes)  # type: ignore[arg-type]
        bodies = [_with_elements(b, b.elements.with_(mu=center.gm_m3_s2), center)
                  for b in self.scene.bodies]
        scene = _refresh_scene_warnings(replace(self.scene, center=center, bodies=tuple(bodies)))
        self._push(scene, self._now.selection, self._now.ids, "central body")

    # --- the show -------------------------------------------------------------------

    def edit_timeline(self, timeline: Timeline, label: str, merge: bool = False) -> bool:
        """Put ``timeline`` (made by ``viewer.gui.timeline_edits``, which refuses what the
        file does not allow) in place of the scene's show, in one edit; ``merge`` joins
        a continuing gesture (a key being dragged) into one undo step. False (no edit)
        when it is the show already."""
        if timeline == self.scene.timeline:
            return False
        self._push(replace(self.scene, timeline=timeline), self._now.selection,
                   self._now.ids, label, merge)
        return True

    # --- the scene epoch --------------------------------------------------------------

    def set_epoch(self, text: str) -> bool:
        """Set the scene epoch (t = 0 of the scene and of its timeline) from ISO 8601 text
        with a time scale ("2031-03-14T06:00:00 UTC"; TDB when none; TT, TAI too).

        Bodies and populations keep their own epochs, so each is where it was at every
        date; the timeline start and sector starts stay offsets from the (new) epoch.
        Returns False when the text names the current epoch in its scale (no edit);
        raises EditRefused (nothing changed) for text that is not an epoch.
        """
        try:
            new = parse_epoch(text)
        except EpochError as err:
            raise EditRefused("epoch", str(err)) from None
        old = self.scene.epoch
        if new == old:
            return False
        shift_s = new.seconds_since(old)
        bodies = [b.with_epoch_moved(shift_s) for b in self.scene.bodies]
        pops = [replace(p, epoch_offset_s=p.epoch_offset_s - shift_s)
                for p in self.scene.populations]
        scene = replace(self.scene, epoch=new, bodies=tuple(bodies), populations=tuple(pops))
        self._push(scene, self._now.selection, self._now.ids, "scene epoch")
        return True

    # --- saving -----------------------------------------------------------------------

    def save(self, path: str | Path | None = None) -> Path:
        """Save to ``path`` (default: where it was loaded), atomically, keeping the file's
        comments and layout where the file is the one loaded. Returns the path written."""
        from .scene_edits import save_editor_scene

        target = Path(path) if path is not None else self.path
        if target is None:
            raise EditRefused("save", "this scene has no file yet; use save as")
        text = save_editor_scene(self.scene, self._saved_scene, self.origins, target,
                                 self.source_text)
        self.path = target
        self.source_text = text
        self._saved_scene = self.scene
        self._file_ids = self._now.ids
        self.revision += 1
        return target


def _default_sweep(body: Body) -> Sweep:
    """Six sectors that tile an ellipse (one period / 6, following the orbit), or 30 d
    each on an open orbit."""
    el = body.elements
    closed = float(el.e) < 1.0
    interval = float(el.period) / 6.0 if closed else 30.0 * DAY_S
    return Sweep(start_s=0.0, interval_s=interval, count=6, color=(1.0, 0.702, 0.278),
                 opacity=0.45, interval_given=not closed)


def _follow_orbit(sweep: Sweep | None, el: Elements) -> Sweep | None:
    """A derived interval (one period / count) brought to the orbit's new period. An
    orbit that opens has no period to divide: its sectors keep the interval they had,
    now given (saved as ``interval``, as the scene format requires on an open orbit)."""
    if sweep is None or sweep.interval_given:
        return sweep
    if float(el.e) >= 1.0:
        return replace(sweep, interval_given=True)
    return replace(sweep, interval_s=float(el.period) / sweep.count)


def _with_elements(body: Body, el: Elements, center: Center) -> Body:
    """A body with new elements, its open-orbit limit radius and warnings brought along."""
    limit = body.limit_radius_m
    if float(el.e) < 1.0:
        limit = None
    elif limit is None or limit <= float(el.periapsis):
        limit = LIMIT_PERIAPSES * float(el.periapsis)
    return replace(body, elements=el, limit_radius_m=limit, sweep=_follow_orbit(body.sweep, el),
                   warnings=tuple(orbit_warnings(el, center)))


def _refresh_scene_warnings(scene: Scene) -> Scene:
    """Scene warnings with the body lines rebuilt from each body's current warnings."""
    kept = [w for w in scene.warnings if not w.startswith("body[")]
    lines = [f'body[{k}] ("{b.name}"): {w}' for k, b in enumerate(scene.bodies)
             for w in b.warnings]
    return replace(scene, warnings=tuple(kept + lines))
