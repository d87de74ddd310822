"""The imgui panels of the viewer. They read the Session and call the editor; nothing else.

Layout (our own): a menu bar; on the left "Bodies" (the list and the central body) above
"Marks" (drawing toggles, style, equal-time sectors); on the right "Orbit" (the element
editor and its lock) above "Numbers" (the live readout); along the bottom "Time". A help
overlay lists the shortcuts; modal prompts ask before quitting with unsaved changes and
for a file name on save-as. Every number shown carries its unit.

``Panels.report`` collects, per frame, the screen rectangles of the named inputs and the
texts of the readout, so tests (and the docs' screenshot script) can drive the window
through the X server and read what it shows.
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

import numpy as np
from imgui_bundle import imgui

from ..errors import UserInputError
from ..mission import CAUTION
from ..orbit import AU_M, DAY_S, swept_area
from ..scene.marks import MARKS
from ..units import QuantityError, parse_quantity
from .camera_input import focus, preset
from .clock import next_apsis_s
from .editor import Editor, EditRefused
from .jobs import VIDEO_QUALITIES
from .mission import (
    MAX_E,
    QuickInputs,
    body_warnings,
    circular_bodies,
    plan_transfer,
    quick_answer_rows,
    transfer_rows,
)
from .plots import orbit_profile, third_law
from .readout import body_readout, format_time
from .session import Session

__all__ = ["Panels", "Session", "scene_area", "shortcut_list"]

MENU_H = 26.0
LEFT_W = 340.0
RIGHT_W = 430.0
TIME_H = 118.0
GAP = 6.0
#: Width of a dialog's text (its path input and its wrapped problems), px.
DIALOG_TEXT_W = 640.0

AMBER = imgui.ImVec4(1.0, 0.75, 0.3, 1.0)
RED = imgui.ImVec4(1.0, 0.45, 0.4, 1.0)
DIM = imgui.ImVec4(0.65, 0.68, 0.72, 1.0)

#: Element fields in the order shown, with their labels.
ELEMENT_ROWS = (
    ("a", "a  semi-major axis"), ("e", "e  eccentricity"), ("i", "i  inclination"),
    ("raan", "RAAN  node longitude"), ("argp", "argp  arg. of periapsis"),
    ("M", "M  mean anomaly at epoch"), ("nu", "nu  true anomaly at epoch"),
)
#: The same size in the forms users think in: (label, radius field, altitude field).
FORM_ROWS = (
    ("periapsis", "periapsis", "periapsis_altitude"),
    ("apoapsis", "apoapsis", "apoapsis_altitude"),
)
LOCKS = (("auto", "natural partner"), ("a", "a and period"), ("e", "e"),
         ("periapsis", "periapsis"), ("apoapsis", "apoapsis"))
LOCKS_PER_LINE = 3
#: The tabs of the right-hand panel.
ORBIT_TABS = ("Elements", "Quick answers", "Transfer")
SHOW_LABELS = tuple((m.name, m.label) for m in MARKS)
SHORTCUTS = (
    ("Space", "play / pause"), ("Left / Right", "step one frame back / on"),
    ("[  /  ]", "halve / double the rate"), ("Home", "back to the timeline start"),
    ("P / O", "jump to the next periapsis / apoapsis (selected body)"),
    ("Ctrl+Z / Ctrl+Y", "undo / redo"), ("Ctrl+S", "save"), ("Ctrl+Shift+S", "save as"),
    ("Ctrl+O", "open another scene"), ("Ctrl+E", "export a still of the view"),
    ("Ctrl+R", "render the timeline (frames or video)"),
    ("Ctrl+N / Ctrl+D", "add a body / duplicate the selected one"),
    ("Up / Down", "select the previous / next body"),
    ("T / E", "top view / edge view"), ("G", "plots: distance and speed, third law"),
    ("F / C", "follow the selected body / the centre"),
    ("drag", "turn the view"), ("right-drag, Shift+drag", "pan"),
    ("wheel", "zoom toward the cursor"), ("Enter", "apply a typed value"),
    ("Esc", "leave a field unchanged"), ("F1 or H", "this help"),
    ("Ctrl+Q", "quit (asks first if there are unsaved changes)"),
)


def scene_area(size: tuple[int, int]) -> tuple[int, int, int, int]:
    """(x, y from the top, width, height) in px of the window left for the picture
    between the panels' home places (at least a quarter of the window each way)."""
    w, h = size
    x0 = int(LEFT_W + 2 * GAP)
    x1 = int(w - RIGHT_W - 2 * GAP)
    top = int(MENU_H)
    bottom = int(h - TIME_H - 2 * GAP)
    if x1 - x0 < w // 4:
        x0, x1 = 0, w
    if bottom - top < h // 4:
        top, bottom = 0, h
    return x0, top, x1 - x0, bottom - top


def _rect() -> tuple[float, float, float, float]:
    a, b = imgui.get_item_rect_min(), imgui.get_item_rect_max()
    return (a.x, a.y, b.x, b.y)


@dataclass
class Panels:
    """The panels' own state: text being typed and refusals, per field."""

    buffers: dict[tuple[int, str], str] = field(default_factory=dict)
    errors: dict[tuple[int, str], str] = field(default_factory=dict)
    rename_text: dict[int, str] = field(default_factory=dict)
    rate_text: str | None = None
    rate_error: str = ""
    center_text: dict[str, str] = field(default_factory=dict)
    center_error: str = ""
    sweep_error: str = ""
    epoch_text: str | None = None
    epoch_error: str = ""
    #: A tab of the right-hand panel to bring forward on the next frame.
    orbit_tab: str = ""
    quick: QuickInputs = field(default_factory=QuickInputs)
    transfer_from: int | None = None
    transfer_to: int | None = None
    transfer_kind: str = "hohmann"
    transfer_via: str = ""
    report: dict[str, Any] = field(default_factory=dict)
    _editor: Any = None

    def _reset_for(self, editor: Editor) -> None:
        """Another scene was opened: drop what was typed for the old one."""
        fresh = Panels()
        for name in ("buffers", "errors", "rename_text", "center_text", "quick"):
            setattr(self, name, getattr(fresh, name))
        self.center_error = self.sweep_error = self.epoch_error = ""
        self.epoch_text = self.transfer_from = self.transfer_to = None
        self.transfer_via = ""
        self._editor = editor

    def draw(self, s: Session, size: tuple[int, int]) -> None:
        """All panels for one frame (call between imgui.new_frame and imgui.render)."""
        if s.editor is not self._editor:
            self._reset_for(s.editor)
        w, h = float(size[0]), float(size[1])
        self.report = {"rects": {}, "readout": [], "values": {}, "dirty": s.editor.dirty,
                       "prompt": "unsaved" if s.unsaved_for else "",
                       "bodies": [b.name for b in s.editor.scene.bodies]}
        self._menu(s)
        top = MENU_H + GAP
        split = top + min(250.0, 0.33 * h)
        self._bodies(s, (GAP, top), (LEFT_W, split - top))
        self._marks(s, (GAP, split + GAP), (LEFT_W, h - split - TIME_H - 3 * GAP))
        split = top + min(480.0, 0.56 * h)
        self._orbit(s, (w - RIGHT_W - GAP, top), (RIGHT_W, split - top))
        self._numbers(s, (w - RIGHT_W - GAP, split + GAP),
                      (RIGHT_W, h - split - TIME_H - 3 * GAP))
        self._time(s, (GAP, h - TIME_H - GAP), (w - 2 * GAP, TIME_H))
        if s.show_plots:
            self._plots(s, w, h)
        if s.job is not None:
            self._job_progress(s, w, h)
        if s.show_help:
            self._help(s, w, h)
        self._unsaved_prompt(s)
        self._save_as(s)
        self._open_dialog(s)
        self._still_dialog(s)
        self._job_dialog(s)

    # --- helpers --------------------------------------------------------------------------

    @staticmethod
    def _window(name: str, pos: tuple[float, float], size: tuple[float, float]) -> bool:
        imgui.set_next_window_pos(imgui.ImVec2(*pos), imgui.Cond_.first_use_ever)
        imgui.set_next_window_size(imgui.ImVec2(*size), imgui.Cond_.first_use_ever)
        return imgui.begin(name, None, imgui.WindowFlags_.no_collapse)[0]

    def _field(self, s: Session, k: int, name: str, width: float = -1.0) -> None:
        """One element input: shows the value with its unit; Enter (or leaving the field
        after typing) applies it through the editor; a refusal stays in place in red."""
        ed = s.editor
        key = (k, name)
        current = ed.field_text(name, k)
        text = self.buffers.get(key, current)
        imgui.set_next_item_width(width)
        flags = imgui.InputTextFlags_.enter_returns_true | imgui.InputTextFlags_.auto_select_all
        entered, text = imgui.input_text(f"##{name}", text, flags)
        self.report["rects"][name] = _rect()
        if imgui.is_item_active():
            if text != self.buffers.get(key, current):
                self.errors.pop(key, None)
            self.buffers[key] = text
        if entered or imgui.is_item_deactivated_after_edit():
            try:
                ed.set_field(name, text, k)
                self.buffers.pop(key, None)
                self.errors.pop(key, None)
            except EditRefused as err:
                self.errors[key] = err.problems[0]
                self.buffers[key] = text
        elif not imgui.is_item_active() and key not in self.errors:
            self.buffers.pop(key, None)
        if key in self.errors:
            imgui.push_text_wrap_pos(0.0)
            imgui.text_colored(RED, "refused: " + self.errors[key])
            imgui.pop_text_wrap_pos()

    def _button(self, label: str, size: Any = None) -> bool:
        """A button whose rectangle is reported under "button:<label>"."""
        pressed = imgui.button(label) if size is None else imgui.button(label, size)
        self.report["rects"]["button:" + label.split("##")[0]] = _rect()
        return pressed

    # --- menu -----------------------------------------------------------------------------

    def _menu(self, s: Session) -> None:
        ed = s.editor
        if not imgui.begin_main_menu_bar():
            return
        if imgui.begin_menu("File"):
            if imgui.menu_item_simple("Open...", "Ctrl+O"):
                s.request_open()
            if imgui.menu_item_simple("Save", "Ctrl+S"):
                s.save()
            if imgui.menu_item_simple("Save as...", "Ctrl+Shift+S"):
                s.open_save_as()
            imgui.separator()
            if imgui.menu_item_simple("Export a still of the view...", "Ctrl+E"):
                s.show_still()
            running = s.job is not None and s.job.active
            if imgui.menu_item_simple("Render the timeline...", "Ctrl+R", False, not running):
                s.show_job()
            imgui.separator()
            if imgui.menu_item_simple("Quit", "Ctrl+Q"):
                s.request_quit()
            imgui.end_menu()
        self.report["rects"]["menu:File"] = _rect()
        if imgui.begin_menu("Edit"):
            if imgui.menu_item_simple(f"Undo {ed.undo_label}", "Ctrl+Z", False, ed.can_undo):
                ed.undo()
            if imgui.menu_item_simple(f"Redo {ed.redo_label}", "Ctrl+Y", False, ed.can_redo):
                ed.redo()
            imgui.end_menu()
        if imgui.begin_menu("View"):
            if imgui.menu_item_simple("From the top", "T"):
                s.camera = preset(s.camera, "top")
            if imgui.menu_item_simple("Along the edge", "E"):
                s.camera = preset(s.camera, "edge")
            if imgui.menu_item_simple("Follow the selected body", "F", False,
                                      ed.body is not None) and ed.body is not None:
                s.camera = focus(s.camera, ed.body.name)
            if imgui.menu_item_simple("Centre on the central body", "C"):
                s.camera = focus(s.camera, "center")
            imgui.separator()
            if imgui.menu_item_simple("Plots", "G", s.show_plots):
                s.show_plots = not s.show_plots
            imgui.end_menu()
        if imgui.begin_menu("Mission"):
            for tab in ORBIT_TABS[1:]:
                if imgui.menu_item_simple(tab):
                    self.orbit_tab = tab
            imgui.end_menu()
        if imgui.begin_menu("Help"):
            if imgui.menu_item_simple("Shortcuts", "F1"):
                s.show_help = not s.show_help
            imgui.end_menu()
        title = ed.path.name if ed.path else "new scene"
        state = "unsaved changes" if ed.dirty else "saved"
        imgui.text_colored(DIM, f"   {ed.scene.title}  -  {title}  ({state})")
        if s.message:
            imgui.text_colored(AMBER, "   " + s.message)
        imgui.end_main_menu_bar()

    # --- bodies ---------------------------------------------------------------------------

    def _bodies(self, s: Session, pos: tuple[float, float], size: tuple[float, float]) -> None:
        ed = s.editor
        if self._window("Bodies", pos, size):
            for k, b in enumerate(ed.scene.bodies):
                imgui.color_button(f"##c{k}", imgui.ImVec4(*b.color, 1.0),
                                   imgui.ColorEditFlags_.no_tooltip, imgui.ImVec2(12, 12))
                imgui.same_line()
                clicked, _ = imgui.selectable(f"{b.name}##b{k}", ed.selection == k)
                if clicked:
                    ed.select(k)
            imgui.separator()
            if self._button("Add"):
                ed.add_body()
            imgui.same_line()
            has = ed.body is not None
            imgui.begin_disabled(not has)
            if self._button("Duplicate"):
                ed.duplicate()
            imgui.same_line()
            if self._button("Remove"):
                ed.delete()
            imgui.same_line()
            if imgui.arrow_button("##up", imgui.Dir.up) and has:
                ed.move((ed.selection or 0) - 1)
            imgui.same_line()
            if imgui.arrow_button("##down", imgui.Dir.down) and has:
                ed.move((ed.selection or 0) + 1)
            imgui.end_disabled()
            k = ed.selection
            if k is not None:
                name = self.rename_text.get(k, ed.scene.bodies[k].name)
                imgui.set_next_item_width(-70)
                entered, name = imgui.input_text(
                    "name##rename", name, imgui.InputTextFlags_.enter_returns_true)
                self.rename_text[k] = name
                if entered:
                    try:
                        ed.rename(name)
                        self.rename_text.pop(k, None)
                        s.message = ""
                    except EditRefused as err:
                        s.message = "name refused: " + err.problems[0]
                elif not imgui.is_item_active():
                    self.rename_text.pop(k, None)
            if imgui.collapsing_header("Central body"):
                self._center(s)
        imgui.end()

    def _center(self, s: Session) -> None:
        ed = s.editor
        c = ed.scene.center
        rows = (("name", c.name), ("gm", f"{c.gm_m3_s2:.10g} m3/s2"),
                ("radius", f"{c.radius_m / 1e3:.10g} km"))
        for key, value in rows:
            text = self.center_text.get(key, value)
            imgui.set_next_item_width(-70)
            entered, text = imgui.input_text(f"{key}##center", text,
                                             imgui.InputTextFlags_.enter_returns_true)
            if imgui.is_item_active() or entered:
                self.center_text[key] = text
            else:
                self.center_text.pop(key, None)
            if entered:
                try:
                    ed.set_center(**{key: text})
                    self.center_error = ""
                    self.center_text.pop(key, None)
                except EditRefused as err:
                    self.center_error = err.problems[0]
        if self.center_error:
            imgui.text_colored(RED, "refused: " + self.center_error)

    # --- marks ----------------------------------------------------------------------------

    def _marks(self, s: Session, pos: tuple[float, float], size: tuple[float, float]) -> None:
        ed = s.editor
        if self._window("Marks", pos, size):
            b = ed.body
            if b is None:
                imgui.text_colored(DIM, "Select a body to choose what is drawn.")
            else:
                imgui.text(f"Drawn for {b.name}:")
                for i, (flag, label) in enumerate(SHOW_LABELS):
                    if i % 2:
                        imgui.same_line(170)
                    changed, on = imgui.checkbox(label, getattr(b.show, flag))
                    if changed:
                        ed.set_show(flag, on)
                changed, col = imgui.color_edit3("colour", list(b.color),
                                                 imgui.ColorEditFlags_.no_inputs)
                if changed:  # one undo step per drag, however many frames it takes
                    ed.set_color(tuple(col), merge=True)  # type: ignore[arg-type]
                imgui.set_next_item_width(150)
                changed, width = imgui.slider_float("line width (px)", b.line_width_px, 0.5,
                                                    8.0, "%.1f px")
                if changed:
                    ed.set_line_width(width, merge=True)
                if b.show.sweep and b.sweep is not None:
                    self._sectors(s)
        imgui.end()

    def _sectors(self, s: Session) -> None:
        ed = s.editor
        b = ed.body
        assert b is not None and b.sweep is not None
        sw = b.sweep
        imgui.separator_text("Equal-time sectors")
        imgui.set_next_item_width(120)
        changed, count = imgui.input_int("count", sw.count)
        if changed:
            self._try_sweep(ed, count=count)
        imgui.set_next_item_width(160)
        entered, text = imgui.input_text("interval", format_time(sw.interval_s),
                                         imgui.InputTextFlags_.enter_returns_true)
        if entered:
            self._try_sweep(ed, interval=text)
        imgui.set_next_item_width(150)
        changed, op = imgui.slider_float("opacity", sw.opacity, 0.0, 1.0, "%.2f")
        if changed:
            self._try_sweep(ed, opacity=op)
        if self.sweep_error:
            imgui.text_colored(RED, "refused: " + self.sweep_error)
        areas = [float(swept_area(b.elements, t0 - b.epoch_offset_s, t1 - b.epoch_offset_s))
                 for t0, t1 in sw.bounds_s()]
        unit, f = ("km^2", 1e6) if max(areas) < 1e18 else ("au^2", 149_597_870_700.0**2)
        imgui.text("areas, side by side:")
        imgui.text_wrapped("  ".join(f"{a / f:.5g}" for a in areas) + f"  {unit}")
        if len(areas) > 1 and min(areas) > 0:
            spread = (max(areas) - min(areas)) / max(areas)
            imgui.text_colored(DIM, f"largest minus smallest: {spread * 100:.2g} % of the largest")

    def _try_sweep(self, ed: Editor, **changes: Any) -> None:
        try:
            ed.set_sweep(**changes)
            self.sweep_error = ""
        except EditRefused as err:
            self.sweep_error = err.problems[0]

    # --- orbit (element editor) -----------------------------------------------------------

    def _orbit(self, s: Session, pos: tuple[float, float], size: tuple[float, float]) -> None:
        if self._window("Orbit", pos, size):
            if imgui.begin_tab_bar("orbit-tabs"):
                for tab, body in zip(ORBIT_TABS, (self._elements, self._quick, self._transfer),
                                     strict=True):
                    flags = imgui.TabItemFlags_.set_selected if self.orbit_tab == tab else 0
                    opened, _ = imgui.begin_tab_item(tab, None, flags)
                    self.report["rects"]["tab:" + tab] = _rect()
                    if opened:
                        self.report["tab"] = tab
                        body(s)
                        imgui.end_tab_item()
                imgui.end_tab_bar()
            self.orbit_tab = ""
        imgui.end()

    def _elements(self, s: Session) -> None:
        ed = s.editor
        k = ed.selection
        if k is None:
            imgui.text_colored(DIM, "Select or add a body to edit its orbit.")
            return
        b = ed.scene.bodies[k]
        imgui.text(f"{b.name}: type a value with its unit, then Enter.")
        imgui.align_text_to_frame_padding()
        imgui.text("Keep fixed:")
        for i, (hold, label) in enumerate(LOCKS):
            if i % LOCKS_PER_LINE or i == 0:
                imgui.same_line()
            else:
                imgui.dummy(imgui.ImVec2(imgui.calc_text_size("Keep fixed:").x, 0))
                imgui.same_line()
            if imgui.radio_button(f"{label}##lock", ed.hold == hold):
                ed.hold = hold
            self.report["rects"][f"lock:{hold}"] = _rect()
        imgui.separator_text("Elements")
        self._rows(s, k, ELEMENT_ROWS)
        imgui.separator_text("The same size as radius, altitude, period")
        self._forms(s, k)

    # --- mission: quick answers and transfers -------------------------------------------------

    @staticmethod
    def _table(name: str, rows: tuple[tuple[str, str], ...], first_w: float = 165) -> None:
        if not rows or not imgui.begin_table(name, 2, imgui.TableFlags_.row_bg):
            return
        imgui.table_setup_column("q", imgui.TableColumnFlags_.width_fixed, first_w)
        imgui.table_setup_column("v", imgui.TableColumnFlags_.width_stretch)
        for label, text in rows:
            imgui.table_next_row()
            imgui.table_next_column()
            imgui.text_colored(DIM, label)
            imgui.table_next_column()
            imgui.text_wrapped(text)
        imgui.end_table()

    @staticmethod
    def _refusal(text: str) -> None:
        imgui.push_text_wrap_pos(0.0)
        imgui.text_colored(RED, "refused: " + text)
        imgui.pop_text_wrap_pos()

    def _input(self, name: str, value: str, width: float) -> str:
        """A live text input (the answers follow each keystroke); its rect is reported."""
        imgui.set_next_item_width(width)
        _, value = imgui.input_text(f"##{name}", value, imgui.InputTextFlags_.auto_select_all)
        self.report["rects"][name] = _rect()
        return value

    def _quick(self, s: Session) -> None:
        ed, q = s.editor, self.quick
        k = ed.selection
        if k is None:
            imgui.text_colored(DIM, "Select a body to ask about its orbit.")
            return
        b = ed.scene.bodies[k]
        e = float(b.elements.e)
        kind = ("circle" if e == 0.0 else "ellipse" if e < 1.0 else "parabola" if e == 1.0
                else "hyperbola")
        imgui.text(f"{b.name}: {kind}, e = {e:.6g}")
        imgui.text_colored(DIM, "Type values with their units; the answers follow.")
        rows, problems = quick_answer_rows(ed.scene, k, s.clock.t_s, q)
        self.report["answers"] = {key: [list(r) for r in v] for key, v in rows.items()}
        self.report["answer_problems"] = problems
        imgui.separator_text("Time of flight between true anomalies")
        imgui.align_text_to_frame_padding()
        imgui.text("from")
        imgui.same_line()
        q.nu_from = self._input("quick:nu_from", q.nu_from, 110)
        imgui.same_line()
        imgui.text("to")
        imgui.same_line()
        q.nu_to = self._input("quick:nu_to", q.nu_to, 110)
        if "flight" in problems:
            self._refusal(problems["flight"])
        self._table("q-flight", rows.get("flight", ()))
        imgui.separator_text("When it is at a radius")
        if imgui.radio_button("radius##q", not q.altitude):
            q.altitude = False
        imgui.same_line()
        if imgui.radio_button("altitude##q", q.altitude):
            q.altitude = True
        imgui.same_line()
        q.radius = self._input("quick:radius", q.radius, -1)
        if not q.radius.strip():
            imgui.text_colored(DIM, 'e.g. "20000 km"; a bare number is in km')
        if "radius" in problems:
            self._refusal(problems["radius"])
        self._table("q-radius", rows.get("radius", ()))
        imgui.separator_text("Speed now")
        self._table("q-speed", rows["speed"])
        if rows["hyperbola"]:
            imgui.separator_text("Open orbit: the pass")
            self._table("q-hyperbola", rows["hyperbola"])
        self._warnings(body_warnings(ed.scene, k))

    def _warnings(self, lines: list[str] | tuple[str, ...]) -> None:
        imgui.separator_text("Warnings")
        self.report["mission_warnings"] = list(lines)
        imgui.push_text_wrap_pos(0.0)
        if not lines:
            imgui.text_colored(DIM, "none (impact, atmosphere, sphere of influence, escape)")
        for line in lines:
            imgui.text_colored(AMBER, "warning: " + line)
        imgui.text_colored(DIM, CAUTION)
        self.report["caution"] = CAUTION
        imgui.pop_text_wrap_pos()

    def _body_combo(self, name: str, s: Session, current: int | None,
                    choices: list[int]) -> int | None:
        bodies = s.editor.scene.bodies
        preview = bodies[current].name if current is not None else "choose"
        imgui.set_next_item_width(-1)
        opened = imgui.begin_combo(f"##{name}", preview)
        self.report["rects"][f"combo:{name}"] = _rect()
        if opened:
            for k in choices:
                clicked, _ = imgui.selectable(f"{bodies[k].name}##{name}{k}", k == current)
                self.report["rects"][f"combo:{name}:{bodies[k].name}"] = _rect()
                if clicked:
                    current = k
            imgui.end_combo()
        return current

    def _transfer(self, s: Session) -> None:
        ed = s.editor
        scene = ed.scene
        circles = circular_bodies(scene)
        imgui.push_text_wrap_pos(0.0)
        imgui.text("Between two circular orbits in one plane, departing now.")
        imgui.pop_text_wrap_pos()
        if len(circles) < 2:
            imgui.push_text_wrap_pos(0.0)
            imgui.text_colored(AMBER, f"This needs two bodies on circles (e below {MAX_E:g}); "
                               f"the scene has {len(circles)}. Add one (Bodies > Add makes a "
                               "circle) and set its a.")
            imgui.pop_text_wrap_pos()
            return
        if self.transfer_from not in circles:
            self.transfer_from = ed.selection if ed.selection in circles else circles[0]
        if self.transfer_to not in circles or self.transfer_to == self.transfer_from:
            self.transfer_to = next(k for k in circles if k != self.transfer_from)
        if imgui.begin_table("tr-bodies", 2, imgui.TableFlags_.sizing_stretch_prop):
            imgui.table_setup_column("w", imgui.TableColumnFlags_.width_fixed, 60)
            imgui.table_setup_column("v", imgui.TableColumnFlags_.width_stretch)
            for label, attr in (("from", "transfer_from"), ("to", "transfer_to")):
                imgui.table_next_row()
                imgui.table_next_column()
                imgui.align_text_to_frame_padding()
                imgui.text(label)
                imgui.table_next_column()
                setattr(self, attr, self._body_combo(label, s, getattr(self, attr), circles))
            imgui.end_table()
        if imgui.radio_button("Hohmann", self.transfer_kind == "hohmann"):
            self.transfer_kind = "hohmann"
        self.report["rects"]["kind:hohmann"] = _rect()
        imgui.same_line()
        if imgui.radio_button("bi-elliptic, via", self.transfer_kind == "bi-elliptic"):
            self.transfer_kind = "bi-elliptic"
        self.report["rects"]["kind:bi-elliptic"] = _rect()
        imgui.same_line()
        imgui.begin_disabled(self.transfer_kind != "bi-elliptic")
        if not self.transfer_via:
            r = max(float(scene.bodies[k].elements.a) for k in (self.transfer_from,
                                                                 self.transfer_to))
            self.transfer_via = f"{3 * r / 1e3:.0f} km"
        self.transfer_via = self._input("transfer:via", self.transfer_via, -1)
        imgui.end_disabled()
        t = s.clock.t_s
        try:
            plan = plan_transfer(scene, self.transfer_from, self.transfer_to,
                                 self.transfer_kind, self.transfer_via, t)
        except EditRefused as err:
            for line in err.problems:
                self._refusal(line)
            self.report["transfer"] = None
            return
        burns, rows = transfer_rows(plan, scene)
        self.report["transfer"] = {"burns": [list(r) for r in burns],
                                   **{k: [list(r) for r in v] for k, v in rows.items()}}
        imgui.text_colored(DIM, f"departs at {scene.epoch.plus_seconds(t).iso()}")
        imgui.separator_text("Burns (dv: + prograde, - retrograde)")
        if imgui.begin_table("tr-burns", 4, imgui.TableFlags_.row_bg
                             | imgui.TableFlags_.sizing_fixed_fit):
            for head in ("burn", "dv", "at radius", "time"):
                imgui.table_setup_column(head)
            imgui.table_headers_row()
            for row in burns:
                imgui.table_next_row()
                for text in row:
                    imgui.table_next_column()
                    imgui.text(text)
            imgui.end_table()
        self._table("tr-totals", rows["totals"], 150)
        if self._button("Add to the scene"):
            idx = ed.add_bodies(plan.legs, f"transfer {plan.from_name} to {plan.to_name}")
            names = ", ".join(ed.scene.bodies[i].name for i in idx)
            s.message = f"added {names} (Ctrl+Z undoes)"
        imgui.same_line()
        if self._button("Jump to the next departure window"):
            s.clock.t_s = plan.next_window_s
        imgui.separator_text("Phasing with the target")
        self._table("tr-phasing", rows["phasing"], 150)
        imgui.separator_text("Transfer orbit" if len(plan.legs) == 1 else "Legs")
        self._table("tr-legs", rows["legs"], 150)
        self._warnings(plan.warnings)

    def _rows(self, s: Session, k: int, rows: tuple[tuple[str, str], ...]) -> None:
        if not imgui.begin_table(f"rows{rows[0][0]}", 2, imgui.TableFlags_.sizing_stretch_prop):
            return
        imgui.table_setup_column("what", imgui.TableColumnFlags_.width_fixed, 190)
        imgui.table_setup_column("value", imgui.TableColumnFlags_.width_stretch)
        for name, label in rows:
            imgui.table_next_row()
            imgui.table_next_column()
            imgui.align_text_to_frame_padding()
            imgui.text(label)
            imgui.table_next_column()
            self._field(s, k, name)
        imgui.end_table()

    def _forms(self, s: Session, k: int) -> None:
        if not imgui.begin_table("forms", 3, imgui.TableFlags_.sizing_stretch_same):
            return
        imgui.table_setup_column("what", imgui.TableColumnFlags_.width_fixed, 90)
        imgui.table_setup_column("radius", imgui.TableColumnFlags_.width_stretch)
        imgui.table_setup_column("altitude", imgui.TableColumnFlags_.width_stretch)
        imgui.table_next_row()
        imgui.table_next_column()
        imgui.table_next_column()
        imgui.text_colored(DIM, "radius")
        imgui.table_next_column()
        imgui.text_colored(DIM, "altitude")
        for label, radius, altitude in FORM_ROWS:
            imgui.table_next_row()
            imgui.table_next_column()
            imgui.align_text_to_frame_padding()
            imgui.text(label)
            imgui.table_next_column()
            self._field(s, k, radius)
            imgui.table_next_column()
            self._field(s, k, altitude)
        imgui.table_next_row()
        imgui.table_next_column()
        imgui.align_text_to_frame_padding()
        imgui.text("period")
        imgui.table_next_column()
        self._field(s, k, "period")
        imgui.end_table()

    # --- numbers (readout) ----------------------------------------------------------------

    def _numbers(self, s: Session, pos: tuple[float, float], size: tuple[float, float]) -> None:
        ed = s.editor
        if self._window("Numbers", pos, size):
            k = ed.selection
            if k is None:
                imgui.text_colored(DIM, "No body selected.")
            else:
                r = body_readout(ed.scene, k, s.clock.t_s)
                self.report["readout"] = [list(row) for row in r.rows]
                self.report["values"] = r.values
                if imgui.begin_table("readout", 2, imgui.TableFlags_.row_bg):
                    imgui.table_setup_column("q", imgui.TableColumnFlags_.width_fixed, 170)
                    imgui.table_setup_column("v", imgui.TableColumnFlags_.width_stretch)
                    for label, text in r.rows:
                        imgui.table_next_row()
                        imgui.table_next_column()
                        imgui.text_colored(DIM, label)
                        imgui.table_next_column()
                        imgui.text(text)
                    imgui.end_table()
                for w in r.warnings:
                    imgui.push_text_wrap_pos(0.0)
                    imgui.text_colored(AMBER, "warning: " + w)
                    imgui.pop_text_wrap_pos()
                self.report["warnings"] = list(r.warnings)
        imgui.end()

    # --- time -----------------------------------------------------------------------------

    def _time(self, s: Session, pos: tuple[float, float], size: tuple[float, float]) -> None:
        ed, clock = s.editor, s.clock
        if self._window("Time", pos, size):
            if self._button("Pause" if clock.playing else "Play", imgui.ImVec2(70, 0)):
                clock.playing = not clock.playing
            imgui.same_line()
            if self._button("<|"):
                clock.step(-1)
            imgui.same_line()
            if self._button("|>"):
                clock.step(1)
            imgui.same_line()
            b = ed.body
            for which, label in (("periapsis", "next periapsis"), ("apoapsis", "next apoapsis")):
                imgui.begin_disabled(b is None)
                if self._button(label) and b is not None:
                    t = next_apsis_s(b, clock.t_s, which)
                    if t is not None:
                        clock.t_s = t
                imgui.end_disabled()
                imgui.same_line()
            imgui.text("   rate")
            imgui.same_line()
            imgui.set_next_item_width(130)
            shown = self.rate_text if self.rate_text is not None else _rate_text(clock.rate)
            entered, text = imgui.input_text("##rate", shown,
                                             imgui.InputTextFlags_.enter_returns_true)
            self.report["rects"]["rate"] = _rect()
            self.rate_text = text if imgui.is_item_active() else None
            if entered:
                try:
                    clock.rate = parse_quantity(text, "rate", "d/s")
                    self.rate_error = ""
                except QuantityError as err:
                    self.rate_error = str(err)
            imgui.same_line()
            when = ed.scene.epoch.plus_seconds(clock.t_s).iso()
            imgui.text(f"   {when}   ({clock.t_s / DAY_S:+.3f} d since the scene epoch)")
            if self.rate_error:
                imgui.text_colored(RED, "rate refused: " + self.rate_error)
            lo, hi = clock.span(ed.scene)
            hi = max(hi, lo + DAY_S)
            imgui.set_next_item_width(-1)
            changed, days = imgui.slider_float("##scrub", clock.t_s / DAY_S, lo / DAY_S,
                                               hi / DAY_S, "%.2f d")
            if changed:
                clock.t_s = days * DAY_S
            self._epoch(s)
        imgui.end()

    def _epoch(self, s: Session) -> None:
        ed = s.editor
        imgui.align_text_to_frame_padding()
        imgui.text("scene epoch (t = 0)")
        imgui.same_line()
        imgui.set_next_item_width(300)
        shown = self.epoch_text if self.epoch_text is not None else ed.scene.epoch.iso()
        entered, text = imgui.input_text("##epoch", shown,
                                         imgui.InputTextFlags_.enter_returns_true)
        self.report["rects"]["epoch"] = _rect()
        self.report["epoch"] = ed.scene.epoch.iso()
        self.epoch_text = text if imgui.is_item_active() or self.epoch_error else None
        if entered:
            try:
                if ed.set_epoch(text):
                    s.message = f"scene epoch set to {ed.scene.epoch.iso()} (Ctrl+Z undoes)"
                self.epoch_error = ""
                self.epoch_text = None
            except EditRefused as err:
                self.epoch_error = err.problems[0]
                self.epoch_text = text
        elif self.epoch_error and not imgui.is_item_active() and text == ed.scene.epoch.iso():
            self.epoch_error = ""
        imgui.same_line()
        if self.epoch_error:
            imgui.text_colored(RED, "refused: " + self.epoch_error)
            self.report["epoch_error"] = self.epoch_error
        else:
            imgui.text_colored(DIM, "ISO date and time with UTC, TT or TDB (TDB when none); "
                               "Enter sets it. Bodies keep their own epochs.")

    # --- plots ------------------------------------------------------------------------------

    def _plots(self, s: Session, w: float, h: float) -> None:
        from imgui_bundle import implot

        x0, top, fw, fh = scene_area((int(w), int(h)))
        imgui.set_next_window_pos(imgui.ImVec2(x0 + fw - 520 - GAP, top + GAP),
                                  imgui.Cond_.first_use_ever)
        imgui.set_next_window_size(imgui.ImVec2(520, min(640.0, fh - 2 * GAP)),
                                   imgui.Cond_.first_use_ever)
        opened, keep = imgui.begin("Plots", True, imgui.WindowFlags_.no_collapse)
        if opened:
            ed = s.editor
            b = ed.body
            prof = orbit_profile(b, s.clock.t_s) if b is not None else None
            half = 0.5 * (imgui.get_content_region_avail().y - 8)
            if prof is None:
                imgui.text_colored(DIM, "Distance and speed: select a closed orbit.")
            elif implot.begin_plot(f"{b.name}: one period##profile",  # type: ignore[union-attr]
                                   imgui.ImVec2(-1, half)):
                L = ed.scene.length_unit
                unit, f = (("au", AU_M) if L == "au" and prof.distance_m.max() >= 1e9
                           else ("km", 1e3))
                days = (prof.t_s - prof.now_s) / DAY_S
                implot.setup_axes("days from now", f"distance ({unit})")
                implot.setup_axis(implot.ImAxis_.y2, "speed (km/s)",
                                  implot.AxisFlags_.aux_default)
                implot.setup_axes_limits(float(days[0]), float(days[-1]),
                                         0.0, 1.1 * float(prof.distance_m.max() / f),
                                         implot.Cond_.always)
                implot.setup_axis_limits(implot.ImAxis_.y2, 0.0,
                                         1.1 * float(prof.speed_m_s.max() / 1e3),
                                         implot.Cond_.always)
                implot.plot_line("distance", days, prof.distance_m / f)
                implot.set_axes(implot.ImAxis_.x1, implot.ImAxis_.y2)
                implot.plot_line("speed", days, prof.speed_m_s / 1e3)
                implot.set_axes(implot.ImAxis_.x1, implot.ImAxis_.y1)
                implot.plot_inf_lines("now", np.array([0.0]))
                implot.end_plot()
            law = third_law(ed.scene)
            if len(law.a_m) and implot.begin_plot("Third law: T^2 grows as a^3##law",
                                                  imgui.ImVec2(-1, -1)):
                implot.setup_axes("semi-major axis a (au)", "period T (d)")
                implot.setup_axis_scale(implot.ImAxis_.x1, implot.Scale_.log10)
                implot.setup_axis_scale(implot.ImAxis_.y1, implot.Scale_.log10)
                implot.setup_axes_limits(float(law.line_a_m[0] / AU_M),
                                         float(law.line_a_m[-1] / AU_M),
                                         float(law.line_period_s[0] / DAY_S),
                                         float(law.line_period_s[-1] / DAY_S),
                                         implot.Cond_.always)
                implot.plot_line("T = 2 pi sqrt(a^3/GM): slope 3/2", law.line_a_m / AU_M,
                                 law.line_period_s / DAY_S)
                implot.plot_scatter("bodies", law.a_m / AU_M, law.period_s / DAY_S)
                for name, a, T in zip(law.names, law.a_m, law.period_s, strict=True):
                    implot.plot_text(name, float(a / AU_M), float(T / DAY_S),
                                     imgui.ImVec2(0, -10))
                implot.end_plot()
        imgui.end()
        if keep is False:
            s.show_plots = False

    # --- overlays and prompts ----------------------------------------------------------------

    def _help(self, s: Session, w: float, h: float) -> None:
        imgui.set_next_window_pos(imgui.ImVec2(0.5 * w, 0.5 * h), imgui.Cond_.always,
                                  imgui.ImVec2(0.5, 0.5))
        imgui.set_next_window_bg_alpha(0.94)
        opened, keep = imgui.begin("Shortcuts", True, imgui.WindowFlags_.always_auto_resize
                                   | imgui.WindowFlags_.no_collapse)
        if opened and imgui.begin_table("keys", 2):
            for key, what in SHORTCUTS:
                imgui.table_next_row()
                imgui.table_next_column()
                imgui.text_colored(AMBER, key)
                imgui.table_next_column()
                imgui.text(what)
            imgui.end_table()
        imgui.text_colored(DIM, "Two-body Keplerian model: not for operational navigation.")
        imgui.end()
        if keep is False:
            s.show_help = False

    def _unsaved_prompt(self, s: Session) -> None:
        if s.unsaved_for and not imgui.is_popup_open("Unsaved changes"):
            imgui.open_popup("Unsaved changes")
        _centre_next_window()
        opened, _ = imgui.begin_popup_modal("Unsaved changes", None,
                                            imgui.WindowFlags_.always_auto_resize)
        if not opened:
            return
        quitting = s.unsaved_for == "quit"
        imgui.text("This scene has changes that are not saved.")
        if not quitting:
            imgui.text_colored(DIM, "Nothing is lost until another scene is opened.")
        then = "quit" if quitting else "open another"
        choice = ""
        if self._button(f"Save and {then}"):
            choice = "save"
        self.report["rects"]["prompt:save"] = _rect()
        imgui.same_line()
        if self._button("Quit without saving" if quitting else "Open another without saving"):
            choice = "discard"
        self.report["rects"]["prompt:discard"] = _rect()
        imgui.same_line()
        if self._button("Keep editing") or imgui.is_key_pressed(imgui.Key.escape):
            choice = "cancel"
        self.report["rects"]["prompt:cancel"] = _rect()
        if choice:
            s.unsaved_choice(choice)
            imgui.close_current_popup()
        imgui.end_popup()

    def _modal(self, name: str, wanted: bool) -> bool:
        """Begin the modal dialog ``name`` while ``wanted``; True if it is drawn now
        (then end it with imgui.end_popup)."""
        if wanted and not imgui.is_popup_open(name):
            imgui.open_popup(name)
        _centre_next_window()
        opened, _ = imgui.begin_popup_modal(name, None, imgui.WindowFlags_.always_auto_resize)
        if opened and not wanted:
            imgui.close_current_popup()
            imgui.end_popup()
            return False
        return bool(opened)

    def _path_input(self, name: str, value: str, width: float = DIALOG_TEXT_W
                    ) -> tuple[bool, str]:
        """A path input that takes the keyboard when its dialog appears."""
        if imgui.is_window_appearing():
            imgui.set_keyboard_focus_here()
        imgui.set_next_item_width(width)
        entered, value = imgui.input_text(f"##{name}", value,
                                          imgui.InputTextFlags_.enter_returns_true)
        self.report["rects"][name] = _rect()
        return entered, value

    def _errors(self, lines: list[str]) -> None:
        """Problems in red, one per line (a long one wraps at the dialog's width)."""
        imgui.push_text_wrap_pos(imgui.get_cursor_pos_x() + DIALOG_TEXT_W)
        for line in lines:
            imgui.text_colored(RED, line)
        imgui.pop_text_wrap_pos()

    def _ok_cancel(self, ok: str) -> tuple[bool, bool]:
        pressed = self._button(ok)
        imgui.same_line()
        cancel = self._button("Cancel##dialog") or imgui.is_key_pressed(imgui.Key.escape)
        return pressed, cancel

    def _end_dialog(self, s: Session, flag: str, ok: str, entered: bool,
                    act: Callable[[], bool]) -> None:
        """The dialog's OK and Cancel buttons, then its end: OK (or Enter in its path)
        runs ``act``, which closes the dialog when it succeeds; Cancel or Esc closes it."""
        pressed, cancel = self._ok_cancel(ok)
        if (pressed or entered) and act():
            imgui.close_current_popup()
        elif cancel:
            setattr(s, flag, False)
            imgui.close_current_popup()
        imgui.end_popup()

    def _size_input(self, name: str, s: Session, attr: str) -> None:
        """ "size (W x H px)" with the scene's [render] size as the hint."""
        w, h = s.editor.scene.render.size_px
        imgui.align_text_to_frame_padding()
        imgui.text("size (W x H px):")
        imgui.same_line()
        imgui.set_next_item_width(140)
        _, value = imgui.input_text_with_hint(f"##{name}", f"{w}x{h}", getattr(s, attr))
        self.report["rects"][name] = _rect()
        setattr(s, attr, value)

    def _save_as(self, s: Session) -> None:
        if not self._modal("Save as", s.save_as_prompt):
            return
        imgui.text("File name (.toml):")
        entered, s.save_as_text = self._path_input("saveas", s.save_as_text)
        ok, cancel = self._ok_cancel("Save")
        if ok or entered:
            try:
                path = s.editor.save(Path(s.save_as_text).expanduser())
                s.message = f"saved {path}"
                s.save_as_prompt = False
                imgui.close_current_popup()
            except UserInputError as err:
                s.message = "not saved: " + "; ".join(err.problems)
        if cancel:
            s.save_as_prompt = False
            imgui.close_current_popup()
        imgui.end_popup()

    def _open_dialog(self, s: Session) -> None:
        if not self._modal("Open a scene", s.open_prompt):
            return
        imgui.text("Scene file (.toml):")
        entered, s.open_text = self._path_input("open", s.open_text)
        self.report["open_errors"] = list(s.open_errors)
        if s.open_errors:
            imgui.text_colored(AMBER, "Not opened; the current scene is kept:")
            self._errors(s.open_errors)
        self._end_dialog(s, "open_prompt", "Open", entered, s.open_scene)

    def _still_dialog(self, s: Session) -> None:
        if not self._modal("Export a still", s.still_prompt):
            return
        when = s.editor.scene.epoch.plus_seconds(s.clock.t_s).iso()
        imgui.text(f"The view in the window at {when}, drawn by the renderer.")
        imgui.text("File (.png, .jpg or .svg):")
        entered, s.still_text = self._path_input("still", s.still_text)
        self._size_input("stillsize", s, "still_size")
        imgui.same_line()
        imgui.text_colored(DIM, "empty: the scene's [render] size")
        self._errors(s.still_errors)
        self._end_dialog(s, "still_prompt", "Export", entered, s.export_still)

    def _job_dialog(self, s: Session) -> None:
        if not self._modal("Render the timeline", s.job_prompt):
            return
        tl = s.editor.scene.timeline
        imgui.text(f"{tl.frame_count} frames at {tl.fps:g} frames/s ({tl.duration_s:g} s of show).")
        imgui.text("Output: a folder ending in / (numbered frames) or a video file .mp4:")
        entered, s.job_text = self._path_input("job", s.job_text)
        video = s.job_text.strip().lower().endswith(".mp4")
        if video:
            imgui.text("quality:")
            for q in VIDEO_QUALITIES:
                imgui.same_line()
                if imgui.radio_button(f"{q}##quality", s.job_quality == q):
                    s.job_quality = q
        else:
            imgui.text("frames as:")
            for fmt in ("png", "jpg"):
                imgui.same_line()
                if imgui.radio_button(f"{fmt}##fmt", s.job_format == fmt):
                    s.job_format = fmt
        self._size_input("jobsize", s, "job_size")
        imgui.same_line()
        imgui.text("frames A:B")
        imgui.same_line()
        imgui.set_next_item_width(140)
        _, s.job_frames = imgui.input_text_with_hint("##jobframes", f"0:{tl.frame_count}",
                                                     s.job_frames)
        self.report["rects"]["jobframes"] = _rect()
        _, s.job_window_camera = imgui.checkbox(
            "seen as in the window (off: the scene's own camera)", s.job_window_camera)
        self._errors(s.job_errors)
        self._end_dialog(s, "job_prompt", "Start", entered, s.start_job)

    def _job_progress(self, s: Session, w: float, h: float) -> None:
        job = s.job
        assert job is not None
        x0, top, fw, fh = scene_area((int(w), int(h)))
        width = min(620.0, fw - 2 * GAP)
        imgui.set_next_window_pos(imgui.ImVec2(x0 + 0.5 * (fw - width), top + fh - 112 - GAP),
                                  imgui.Cond_.first_use_ever)
        imgui.set_next_window_size(imgui.ImVec2(width, 112), imgui.Cond_.first_use_ever)
        if imgui.begin("Render job", None, imgui.WindowFlags_.no_collapse)[0]:
            imgui.text_colored(DIM, f"{job.request.out}  ({job.request.size_px[0]}x"
                               f"{job.request.size_px[1]} px)")
            text = job.progress_text()
            self.report["job"] = {"state": job.state, "done": job.done, "total": job.total,
                                  "text": text}
            imgui.push_text_wrap_pos(0.0)
            if job.active:
                imgui.progress_bar(job.fraction, imgui.ImVec2(-90, 0),
                                   f"{100 * job.fraction:.0f} %")
                imgui.same_line()
                if self._button("Cancel##job"):
                    job.cancel()
                imgui.text(text)
            else:
                imgui.text_colored(AMBER if job.state != "done" else DIM, text)
                if self._button("Close##job"):
                    s.job = None
            imgui.pop_text_wrap_pos()
        imgui.end()


def _centre_next_window() -> None:
    """Keep the next window (a dialog that sizes itself) centred in the display."""
    centre = imgui.get_main_viewport().get_center()
    imgui.set_next_window_pos(centre, imgui.Cond_.always, imgui.ImVec2(0.5, 0.5))


def _rate_text(rate: float) -> str:
    """A rate in the largest time unit per second that keeps it readable."""
    for unit, f in (("yr", 365.25 * DAY_S), ("d", DAY_S), ("h", 3600.0), ("min", 60.0)):
        if abs(rate) >= f:
            return f"{rate / f:.6g} {unit}/s"
    return f"{rate:.6g} s/s"


def shortcut_list() -> tuple[tuple[str, str], ...]:
    """The shortcuts the help overlay lists (key, what it does)."""
    return SHORTCUTS

