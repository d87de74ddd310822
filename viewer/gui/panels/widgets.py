"""Shared pieces of the panels: the layout, colours, and the widgets every panel uses
(a window at its home place, a typed field that commits through the editor, buttons and
tables whose rectangles are reported for the tests)."""

from __future__ import annotations

from collections.abc import Callable
from typing import Any

from imgui_bundle import imgui

from ...mission import CAUTION
from ...scene.marks import MARKS
from ...units import QuantityError
from .. import theme
from ..editor import EditRefused
from ..session import Session

MENU_H = 26.0
LEFT_W = 340.0
RIGHT_W = 490.0
TIME_H = 118.0
#: Height of the timeline panel, docked between the side columns above "Time".
TIMELINE_H = 300.0
GAP = 6.0
#: Width of a dialog's text (its path input and its wrapped problems), px.
DIALOG_TEXT_W = 640.0

AMBER = imgui.ImVec4(*theme.WARNING)
RED = imgui.ImVec4(*theme.REFUSAL)
DIM = imgui.ImVec4(*theme.TEXT_SECONDARY)  # secondary text, high contrast on the panels

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


def scene_area(size: tuple[int, int], scale: float = 1.0,
               presenting: bool = False, timeline: bool = False) -> tuple[int, int, int, int]:
    """(x, y from the top, width, height) in px of the window left for the picture
    between the panels' home places (at least a quarter of the window each way); the
    whole window while presenting (no panels). ``scale`` is the UI scale; ``timeline``:
    the timeline panel is shown (above "Time", between the side columns)."""
    w, h = size
    if presenting:
        return 0, 0, w, h
    x0 = int(scale * (LEFT_W + 2 * GAP))
    x1 = int(w - scale * (RIGHT_W + 2 * GAP))
    top = int(scale * MENU_H)
    bottom = int(h - scale * (TIME_H + 2 * GAP + ((TIMELINE_H + GAP) if timeline else 0.0)))
    if x1 - x0 < w // 4:
        x0, x1 = 0, w
    if bottom - top < h // 4:
        top, bottom = 0, h
    return x0, top, x1 - x0, bottom - top


def px(n: float) -> float:
    """A size given in pixels at UI scale 1, at the panels' scale now (their font's)."""
    return n * imgui.get_font_size() / theme.PANEL_FONT_PX


def label_w(base: float, texts: Any) -> float:
    """The width of a column of labels: ``base`` px at UI scale 1, wider where a label
    needs it, so that no label is cut short at any UI scale."""
    pad = 2.0 * imgui.get_style().cell_padding.x
    return max(px(base), max((imgui.calc_text_size(t).x for t in texts), default=0.0) + pad)


def _rect() -> tuple[float, float, float, float]:
    a, b = imgui.get_item_rect_min(), imgui.get_item_rect_max()
    return (a.x, a.y, b.x, b.y)


def centre_next_window() -> None:
    """Keep the next window (a dialog that sizes itself) centred in the display."""
    centre = imgui.get_main_viewport().get_center()
    imgui.set_next_window_pos(centre, imgui.Cond_.always, imgui.ImVec2(0.5, 0.5))



class Widgets:
    """The widgets, drawing into imgui and noting each named rectangle in ``report``."""

    report: dict[str, Any]
    #: What is being typed, and refusals, per field key.
    buffers: dict[str, str]
    errors: dict[str, str]

    @staticmethod
    def window(name: str, pos: tuple[float, float], size: tuple[float, float]) -> bool:
        # Docked to the window's edges: the panels keep their place when the window is
        # resized or goes fullscreen.
        imgui.set_next_window_pos(imgui.ImVec2(*pos), imgui.Cond_.always)
        imgui.set_next_window_size(imgui.ImVec2(*size), imgui.Cond_.always)
        flags = imgui.WindowFlags_.no_collapse | imgui.WindowFlags_.no_move \
            | imgui.WindowFlags_.no_resize
        return imgui.begin(name, None, flags)[0]

    def typed_field(self, key: str, shown: str, commit: Callable[[str], object],
                    width: float = -1.0, label: str = "", rect: str | None = None,
                    refusal: bool = True) -> bool:
        """The one typed field: shows ``shown``; Enter (or leaving the field after typing)
        calls ``commit(text)``, which parses, validates and applies it and raises
        EditRefused (or QuantityError) with what is allowed. A refusal keeps the typed
        text and stays under the field in red (``refusal=False``: the caller shows
        ``self.errors[key]`` where it likes). Returns True when a value was applied."""
        text = self.buffers.get(key, shown)
        imgui.set_next_item_width(width)
        flags = imgui.InputTextFlags_.enter_returns_true | imgui.InputTextFlags_.auto_select_all
        entered, text = imgui.input_text(f"{label}##{key}", text, flags)
        self.report["rects"][rect or key] = _rect()
        applied = False
        if imgui.is_item_active():
            if text != self.buffers.get(key, shown):
                self.errors.pop(key, None)
            self.buffers[key] = text
        if entered or imgui.is_item_deactivated_after_edit():
            try:
                commit(text)
                applied = True
                self.buffers.pop(key, None)
                self.errors.pop(key, None)
            except (EditRefused, QuantityError) as err:
                self.errors[key] = err.problems[0] if isinstance(err, EditRefused) else str(err)
                self.buffers[key] = text
        elif not imgui.is_item_active() and key not in self.errors:
            self.buffers.pop(key, None)
        if refusal and key in self.errors:
            self.refusal(self.errors[key])
        return applied

    def element_field(self, s: Session, k: int, name: str, width: float = -1.0) -> None:
        """One element input of body ``k``, applied through the editor's lock rules."""
        ed = s.editor
        self.typed_field(f"{k}:{name}", ed.field_text(name, k),
                         lambda text: ed.set_field(name, text, k), width, rect=name)

    def button(self, label: str, size: Any = None) -> bool:
        """A button whose rectangle is reported under "button:<label>"."""
        pressed = imgui.button(label) if size is None else imgui.button(label, size)
        self.report["rects"]["button:" + label.split("##")[0]] = _rect()
        return pressed

    @staticmethod
    def table(name: str, rows: tuple[tuple[str, str], ...], first_w: float = 165) -> None:
        if not rows or not imgui.begin_table(name, 2, imgui.TableFlags_.row_bg):
            return
        imgui.table_setup_column("q", imgui.TableColumnFlags_.width_fixed,
                                 label_w(first_w, (label for label, _ in rows)))
        imgui.table_setup_column("v", imgui.TableColumnFlags_.width_stretch)
        for label, text in rows:
            imgui.table_next_row()
            imgui.table_next_column()
            imgui.text_colored(DIM, label)
            imgui.table_next_column()
            imgui.text_wrapped(text)
        imgui.end_table()

    @staticmethod
    def refusal(text: str) -> None:
        imgui.push_text_wrap_pos(0.0)
        imgui.text_colored(RED, "refused: " + text)
        imgui.pop_text_wrap_pos()

    def live_input(self, name: str, value: str, width: float, hint: str = "") -> str:
        """A live text input (the answers follow each keystroke), showing ``hint`` while
        empty; its rect is reported."""
        imgui.set_next_item_width(width)
        _, value = imgui.input_text_with_hint(f"##{name}", hint, value,
                                              imgui.InputTextFlags_.auto_select_all)
        self.report["rects"][name] = _rect()
        return value

    def mission_warnings(self, lines: list[str] | tuple[str, ...]) -> None:
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

    def body_combo(self, name: str, s: Session, current: int | None,
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

    def modal(self, name: str, wanted: bool) -> bool:
        """Begin the modal dialog ``name`` while ``wanted``; True if it is drawn now
        (then end it with imgui.end_popup)."""
        if wanted and not imgui.is_popup_open(name):
            imgui.open_popup(name)
        centre_next_window()
        opened, _ = imgui.begin_popup_modal(name, None, imgui.WindowFlags_.always_auto_resize)
        if opened and not wanted:
            imgui.close_current_popup()
            imgui.end_popup()
            return False
        return bool(opened)

    def path_input(self, name: str, value: str, width: float = DIALOG_TEXT_W
                    ) -> tuple[bool, str]:
        """A path input that takes the keyboard when its dialog appears."""
        if imgui.is_window_appearing():
            imgui.set_keyboard_focus_here()
        imgui.set_next_item_width(width)
        entered, value = imgui.input_text(f"##{name}", value,
                                          imgui.InputTextFlags_.enter_returns_true)
        self.report["rects"][name] = _rect()
        return entered, value

    def error_lines(self, lines: list[str]) -> None:
        """Problems in red, one per line (a long one wraps at the dialog's width)."""
        imgui.push_text_wrap_pos(imgui.get_cursor_pos_x() + DIALOG_TEXT_W)
        for line in lines:
            imgui.text_colored(RED, line)
        imgui.pop_text_wrap_pos()

    def ok_cancel(self, ok: str) -> tuple[bool, bool]:
        pressed = self.button(ok)
        imgui.same_line()
        cancel = self.button("Cancel##dialog") or imgui.is_key_pressed(imgui.Key.escape)
        return pressed, cancel

    def end_dialog(self, s: Session, flag: str, ok: str, entered: bool,
                    act: Callable[[], bool]) -> None:
        """The dialog's OK and Cancel buttons, then its end: OK (or Enter in its path)
        runs ``act``, which closes the dialog when it succeeds; Cancel or Esc closes it."""
        pressed, cancel = self.ok_cancel(ok)
        if (pressed or entered) and act():
            imgui.close_current_popup()
        elif cancel:
            setattr(s, flag, False)
            imgui.close_current_popup()
        imgui.end_popup()

    def size_input(self, name: str, s: Session, attr: str) -> None:
        """ "size (W x H px)" with the scene's [render] size as the hint."""
        w, h = s.editor.scene.render.size_px
        imgui.align_text_to_frame_padding()
        imgui.text("size (W x H px):")
        imgui.same_line()
        imgui.set_next_item_width(140)
        _, value = imgui.input_text_with_hint(f"##{name}", f"{w}x{h}", getattr(s, attr))
        self.report["rects"][name] = _rect()
        setattr(s, attr, value)
