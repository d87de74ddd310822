"""The imgui panels of the viewer, one module per panel. They read the Session and call
the editor; nothing else.

Layout (our own): a menu bar; on the left "Bodies" (the list and the central body) above
"Marks" (drawing toggles, style, equal-time sectors); on the right "Orbit" (the element
editor and its lock) above "Numbers" (the live readout); along the bottom "Time", and
above it, between the side columns, the "Timeline" of the show (Ctrl+T). A help
overlay lists the shortcuts; modal prompts ask before quitting with unsaved changes and
for a file name on save-as. Every number shown carries its unit.

Modules: ``widgets`` (layout, colours, the shared widgets, among them the typed field
that parses, commits and shows its refusal), ``menu``, ``bodies`` (Bodies and Marks),
``orbit`` (the element editor's tabs), ``mission_tabs`` (quick answers, transfers),
``numbers`` (the readout), ``time_panel``, ``timeline`` (the show's tracks),
``plots_window``, ``season`` (the launch
season's pork-chop plot), ``dialogs``. Keyboard
shortcuts, menu entries and the help overlay come from one table, ``viewer.gui.actions``.

``Panels.report`` collects, per frame, the screen rectangles of the named inputs and the
texts of the readout, so tests (and the docs' screenshot script) can drive the window
through the X server and read what it shows.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Any

from ..actions import shortcut_rows
from ..editor import Editor
from ..mission import QuickInputs
from ..porkchop import SeasonState
from ..session import Session
from . import (
    bodies,
    dialogs,
    menu,
    numbers,
    orbit,
    plots_window,
    season,
    time_panel,
    timeline,
)
from .widgets import GAP, LEFT_W, MENU_H, RIGHT_W, TIME_H, TIMELINE_H, Widgets, scene_area

__all__ = ["Panels", "Session", "scene_area", "shortcut_list"]


@dataclass
class Panels(Widgets):
    """The panels' own state: text being typed and refusals, per field."""

    buffers: dict[str, str] = field(default_factory=dict)
    errors: dict[str, str] = field(default_factory=dict)
    #: A tab of the right-hand panel to bring forward on the next frame.
    orbit_tab: str = ""
    quick: QuickInputs = field(default_factory=QuickInputs)
    transfer_from: int | None = None
    transfer_to: int | None = None
    transfer_kind: str = "hohmann"
    transfer_via: str = ""
    season: SeasonState = field(default_factory=SeasonState)
    #: The third-law plot shown: "log" (log T against log a), "square" (T^2 vs a^3) or
    #: "both" (one above the other).
    law_view: str = "both"
    #: What the transfer goes to: "body", or a typed "radius" or "altitude".
    transfer_target: str = "body"
    transfer_radius: str = ""
    #: The via radius the plans use: the one typed, else ``default_via``'s.
    via_shown: str = ""
    report: dict[str, Any] = field(default_factory=dict)
    #: A drag on the timeline's tracks: what it moves (None: the scrub bar).
    timeline_drag: dict[str, Any] | None = None
    #: The part of the show the timeline's axis spans, (from, to) s; None: all of it.
    timeline_span: tuple[float, float] | None = None
    _editor: Any = None

    def _reset_for(self, editor: Editor) -> None:
        """Another scene was opened: drop what was typed for the old one."""
        fresh = Panels()
        for name in ("buffers", "errors", "quick", "season"):
            setattr(self, name, getattr(fresh, name))
        self.transfer_from = self.transfer_to = None
        self.transfer_via = self.transfer_radius = ""
        self._editor = editor

    def draw(self, s: Session, size: tuple[int, int]) -> None:
        """All panels for one frame (call between imgui.new_frame and imgui.render)."""
        if s.editor is not self._editor:
            self._reset_for(s.editor)
        w, h = float(size[0]), float(size[1])
        self.report = {"rects": {}, "readout": [], "values": {}, "dirty": s.editor.dirty,
                       "prompt": "unsaved" if s.unsaved_for else "",
                       "bodies": [b.name for b in s.editor.scene.bodies]}
        self.report.update(presenting=s.presenting, fullscreen=s.fullscreen,
                           overlays=dict(s.overlays), plots=s.show_plots, help=s.show_help,
                           camera_width_m=s.camera.width_m, ui_scale=s.ui_scale)
        if not s.presenting:  # presentation: no panel at all, only dialogs when asked
            self._home_panels(s, w, h)
        if s.show_season:
            season.draw(self, s, w, h)
        elif s.show_plots:
            plots_window.draw(self, s, w, h)
        if s.job is not None:
            dialogs.job_progress(self, s, w, h)
        if s.show_help:
            dialogs.help_overlay(self, s, w, h)
        dialogs.unsaved_prompt(self, s)
        dialogs.save_as(self, s)
        dialogs.open_dialog(self, s)
        dialogs.still_dialog(self, s)
        dialogs.job_dialog(self, s)
        dialogs.new_show_dialog(self, s)


    def _home_panels(self, s: Session, w: float, h: float) -> None:
        """The menu bar and the five docked panels, sized by the UI scale."""
        k = s.ui_scale
        gap, left, right, time_h = GAP * k, LEFT_W * k, RIGHT_W * k, TIME_H * k
        menu.draw(self, s)
        top = MENU_H * k + gap
        split = top + min(250.0 * k, 0.33 * h)
        bodies.draw_bodies(self, s, (gap, top), (left, split - top))
        bodies.draw_marks(self, s, (gap, split + gap), (left, h - split - time_h - 3 * gap))
        if not (s.show_plots or s.show_season):  # the plots take the right-hand column
            split = top + min(480.0 * k, 0.56 * h)
            orbit.draw(self, s, (w - right - gap, top), (right, split - top))
            numbers.draw(self, s, (w - right - gap, split + gap),
                         (right, h - split - time_h - 3 * gap))
        time_panel.draw(self, s, (gap, h - time_h - gap), (w - 2 * gap, time_h))
        if s.show_timeline:
            x0, x1 = left + 2 * gap, w - right - 2 * gap
            tl_h = TIMELINE_H * k
            timeline.draw(self, s, (x0, h - time_h - tl_h - 2 * gap), (x1 - x0, tl_h))


def shortcut_list() -> tuple[tuple[str, str], ...]:
    """The shortcuts the help overlay lists (keys, what they do), from the action table."""
    return shortcut_rows()
