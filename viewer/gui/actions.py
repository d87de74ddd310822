"""The one table of the window's actions: from it come the key handling, the menus and
the help overlay, so a shortcut is written once. Plain Python: no imgui, no pyglet.

An ``Action`` has a label (the menu entry), its key chords (``"Ctrl+S"``, ``"Space"``,
``"Left"``), the menu it sits in (or none: key only), what it does to the session, and
when it is allowed. ``keys_text`` is how the help and the menus show its keys; a row of
``EXTRA_HELP`` lists what is not an action (mouse gestures, typing in fields).

Key names are pyglet's symbol names (``pyglet.window.key.symbol_string``): letters,
``SPACE``, ``LEFT``, ``BRACKETLEFT``, ``F1``; the window passes them with the state of
Ctrl and Shift to ``action_for``.
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass
from typing import Any

from .camera_input import focus, preset
from .clock import next_apsis_s
from .overlays import OVERLAYS, scene_with_overlays, toggled

Run = Callable[[Any], None]
When = Callable[[Any], bool]

#: How a key symbol is written for people.
_KEY_TEXT = {"SPACE": "Space", "LEFT": "Left", "RIGHT": "Right", "UP": "Up", "DOWN": "Down",
             "HOME": "Home", "END": "End", "BRACKETLEFT": "[", "BRACKETRIGHT": "]",
             "ESCAPE": "Esc", "RETURN": "Enter", "DELETE": "Delete"}


@dataclass(frozen=True)
class Chord:
    """A key with the state of Ctrl and Shift: ``Chord("S", ctrl=True)``."""

    key: str
    ctrl: bool = False
    shift: bool = False

    @property
    def text(self) -> str:
        name = _KEY_TEXT.get(self.key, self.key)
        return ("Ctrl+" if self.ctrl else "") + ("Shift+" if self.shift else "") + name


@dataclass(frozen=True)
class Action:
    """One thing the user can do by key or menu (see the module docstring)."""

    name: str
    label: str
    chords: tuple[Chord, ...]
    run: Run
    menu: str = ""
    enabled: When = lambda s: True
    checked: When | None = None

    @property
    def keys_text(self) -> str:
        return " / ".join(c.text for c in self.chords)


def _always(s: Any) -> bool:
    return True


def _has_body(s: Any) -> bool:
    return s.editor.body is not None


def _no_job(s: Any) -> bool:
    return not (s.job is not None and s.job.active)


def _toggle_play(s: Any) -> None:
    s.toggle_play()


#: Playback speeds of the show (times real time) that [ and ] step through.
SPEEDS = (0.125, 0.25, 0.5, 1.0, 2.0, 4.0, 8.0)


def _speed(step: int) -> Run:
    """On the show: the next playback speed; off it: the scene rate halved or doubled."""
    def run(s: Any) -> None:
        c = s.clock
        if not c.on_show:
            c.rate *= 2.0 ** step
            return
        k = min(range(len(SPEEDS)), key=lambda j: abs(SPEEDS[j] - c.speed))
        c.speed = SPEEDS[max(0, min(len(SPEEDS) - 1, k + step))]
        s.message = f"playback speed {c.speed:g} x real time"
    return run


def _to_start(s: Any) -> None:
    if s.clock.on_show:
        s.seek_show(0.0)
    else:
        s.clock.seek_scene(s.editor.scene.timeline.start_s)


def _to_end(s: Any) -> None:
    s.seek_show(s.editor.scene.timeline.duration_s)


def _step(frames: int) -> Run:
    def run(s: Any) -> None:
        s.clock.step(frames)
        if s.clock.on_show:
            s.follow_camera = True
    return run


def _step_seconds(seconds: float) -> Run:
    def run(s: Any) -> None:
        s.seek_show(s.clock.show_s + seconds)
    return run


def _to_apsis(which: str) -> Run:
    def run(s: Any) -> None:
        t = next_apsis_s(s.editor.body, s.clock.t_s, which)
        if t is not None:
            s.clock.seek_scene(t)
    return run


def _toggle_loop(s: Any) -> None:
    s.clock.loop = not s.clock.loop


def _delete_picked(s: Any) -> None:
    """Delete what the timeline panel has selected (a key, a fade point, a caption)."""
    from . import timeline_edits as te

    p = s.picked
    if p is None:
        return
    kind = p[0]
    if kind == "camera":
        done = s.try_edit_show(lambda tl: te.delete_camera_key(tl, p[1]),
                               f"delete camera key {p[1] + 1}")
    elif kind == "fade" and len(p) > 2:
        done = s.try_edit_show(lambda tl: te.delete_fade_point(tl, p[1], p[2]),
                               "delete a fade point")
    elif kind == "fade":
        done = s.try_edit_show(lambda tl: te.delete_fade(tl, p[1]), "delete a fade")
    else:
        done = s.try_edit_show(lambda tl: te.delete_caption(tl, p[1]), "delete a caption")
    if done is not None:
        s.picked = None


def _select_step(step: int) -> Run:
    def run(s: Any) -> None:
        ed = s.editor
        if not ed.scene.bodies:
            return
        k = ed.selection if ed.selection is not None else 0
        ed.select(max(0, min(len(ed.scene.bodies) - 1, k + step)))
    return run


def _look(which: str) -> Run:
    def run(s: Any) -> None:
        s.camera = preset(s.camera, which)
    return run


def _follow(s: Any) -> None:
    s.camera = focus(s.camera, s.editor.body.name)


def _centre(s: Any) -> None:
    s.camera = focus(s.camera, "center")


def _toggle(attr: str) -> Run:
    def run(s: Any) -> None:
        setattr(s, attr, not getattr(s, attr))
    return run


def _flag(attr: str) -> When:
    return lambda s: bool(getattr(s, attr))


def _overlay(name: str) -> Run:
    def run(s: Any) -> None:
        s.overlays = toggled(s.editor.scene, s.overlays, name)
    return run


def _overlay_on(name: str) -> When:
    def on(s: Any) -> bool:
        drawn = scene_with_overlays(s.editor.scene, s.overlays)
        if OVERLAYS[name][1] == "render":
            return bool(getattr(drawn.render, name))
        return any(getattr(b.show, name) for b in drawn.bodies)
    return on


def _next_view(s: Any) -> None:
    order = ("flat", "dome", "panorama")
    s.view_mode = order[(order.index(s.view_mode) + 1) % len(order)]


def _fit(s: Any) -> None:
    s.fit_wanted = True


def _close_top(s: Any) -> None:
    """Esc: close the help overlay, else the plots window (dialogs close themselves)."""
    if s.show_help:
        s.show_help = False
    elif s.show_season:
        s.show_season = False
    elif s.show_plots:
        s.show_plots = False


C = Chord
ACTIONS: tuple[Action, ...] = (
    # File
    Action("open", "Open...", (C("O", ctrl=True),), lambda s: s.request_open(), "File"),
    Action("save", "Save", (C("S", ctrl=True),), lambda s: s.save(), "File"),
    Action("save_as", "Save as...", (C("S", ctrl=True, shift=True),),
           lambda s: s.open_save_as(), "File"),
    Action("still", "Export a still of the view...", (C("E", ctrl=True),),
           lambda s: s.show_still(), "File"),
    Action("render", "Render the show...", (C("R", ctrl=True),), lambda s: s.show_job(),
           "File", _no_job),
    Action("quit", "Quit", (C("Q", ctrl=True),), lambda s: s.request_quit(), "File"),
    # Edit
    Action("undo", "Undo", (C("Z", ctrl=True),), lambda s: s.editor.undo(), "Edit",
           lambda s: s.editor.can_undo),
    Action("redo", "Redo", (C("Y", ctrl=True), C("Z", ctrl=True, shift=True)),
           lambda s: s.editor.redo(), "Edit", lambda s: s.editor.can_redo),
    Action("add_body", "Add a body", (C("N", ctrl=True),), lambda s: s.editor.add_body(),
           "Edit"),
    Action("duplicate", "Duplicate the selected body", (C("D", ctrl=True),),
           lambda s: s.editor.duplicate(), "Edit", _has_body),
    Action("select_up", "Select the previous body", (C("UP"),), _select_step(-1)),
    Action("select_down", "Select the next body", (C("DOWN"),), _select_step(1)),
    # View
    Action("top", "From the top", (C("T"),), _look("top"), "View"),
    Action("edge", "Along the edge", (C("E"),), _look("edge"), "View"),
    Action("follow", "Follow the selected body", (C("F"),), _follow, "View", _has_body),
    Action("centre", "Centre on the central body", (C("C"),), _centre, "View"),
    Action("plots", "Plots: distance and speed, third law", (C("G"),), _toggle("show_plots"),
           "View", _always, _flag("show_plots")),
    Action("season", "Launch season: pork-chop plot", (C("L", ctrl=True),),
           _toggle("show_season"), "View", _always, _flag("show_season")),
    Action("view", "Next view: flat, dome master, panorama", (C("V"),), _next_view, "View"),
    Action("fit", "Fit the whole scene in view", (C("HOME", shift=True),), _fit, "View"),
    Action("presentation", "Presentation: hide every panel", (C("F10"),),
           _toggle("presenting"), "View", _always, _flag("presenting")),
    Action("fullscreen", "Full screen", (C("F11"),), _toggle("fullscreen"), "View", _always,
           _flag("fullscreen")),
    *(Action(f"overlay_{name}", f"Show {label}", (C(key, shift=True),), _overlay(name),
             "Overlays", _always, _overlay_on(name))
      for (name, (label, _)), key in zip(OVERLAYS.items(), ("L", "G", "S", "F", "W", "A"),
                                         strict=True)),
    Action("close", "Close the help, the launch season or the plots", (C("ESCAPE"),),
           _close_top),
    # Time
    Action("play", "Play / pause", (C("SPACE"),), _toggle_play, "Time"),
    Action("step_back", "Step one frame back", (C("LEFT"),), _step(-1), "Time"),
    Action("step_on", "Step one frame on", (C("RIGHT"),), _step(1), "Time"),
    Action("slower", "Slower: the show's playback speed (off the show: the rate)",
           (C("BRACKETLEFT"),), _speed(-1), "Time"),
    Action("faster", "Faster: the show's playback speed (off the show: the rate)",
           (C("BRACKETRIGHT"),), _speed(1), "Time"),
    Action("start", "Back to the start of the show", (C("HOME"),), _to_start, "Time"),
    Action("periapsis", "Next periapsis of the selected body", (C("P"),),
           _to_apsis("periapsis"), "Time", _has_body),
    Action("apoapsis", "Next apoapsis of the selected body", (C("O"),),
           _to_apsis("apoapsis"), "Time", _has_body),
    # Show
    Action("timeline", "Timeline panel", (C("T", ctrl=True),), _toggle("show_timeline"),
           "Show", _always, _flag("show_timeline")),
    Action("key_camera", "Key the camera here", (C("K"),), lambda s: s.key_camera_here(),
           "Show"),
    Action("delete_key", "Delete the selected key or caption", (C("DELETE"),),
           _delete_picked, "Show", lambda s: s.picked is not None),
    Action("loop", "Loop the show", (C("L"),), _toggle_loop, "Show", _always,
           lambda s: bool(s.clock.loop)),
    Action("second_back", "One second of show back", (C("LEFT", shift=True),),
           _step_seconds(-1.0), "Show"),
    Action("second_on", "One second of show on", (C("RIGHT", shift=True),),
           _step_seconds(1.0), "Show"),
    Action("show_end", "To the end of the show", (C("END"),), _to_end, "Show"),
    Action("new_show", "New show...", (C("N", ctrl=True, shift=True),),
           lambda s: s.show_new_show(), "Show"),
    # Help
    Action("help", "Shortcuts", (C("F1"), C("H")), _toggle("show_help"), "Help", _always,
           _flag("show_help")),
)

#: The menus in the order of the menu bar ("Mission" is drawn by the panels: its entries
#: open tabs, not actions).
MENUS = ("File", "Edit", "View", "Overlays", "Time", "Show", "Help")

#: Help rows for what is not an action.
EXTRA_HELP = (
    ("drag", "turn the view"), ("right-drag, Shift+drag", "pan"),
    ("wheel", "zoom toward the cursor"), ("Enter", "apply a typed value"),
    ("click, drag on the timeline", "select a key, move it in time"),
    ("Esc", "leave a field unchanged"),
)


def action_for(key: str, ctrl: bool, shift: bool) -> Action | None:
    """The action bound to a key symbol name with Ctrl and Shift as given, if any."""
    chord = Chord(key, ctrl, shift)
    return next((a for a in ACTIONS if chord in a.chords), None)


def menu_actions(menu: str) -> tuple[Action, ...]:
    return tuple(a for a in ACTIONS if a.menu == menu)


def shortcut_rows() -> tuple[tuple[str, str], ...]:
    """(keys, what) for the help overlay: every action, then the gestures."""
    return tuple((a.keys_text, a.label.rstrip(".").lower()) for a in ACTIONS) + EXTRA_HELP
