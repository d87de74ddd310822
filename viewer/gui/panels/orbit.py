"""The "Orbit" panel: tabs for the element editor (with its lock), quick answers and transfers."""

from __future__ import annotations

from typing import TYPE_CHECKING

from imgui_bundle import imgui

from ..session import Session
from . import mission_tabs
from .widgets import (
    DIM,
    ELEMENT_ROWS,
    FORM_ROWS,
    LOCKS,
    LOCKS_PER_LINE,
    ORBIT_TABS,
    _rect,
    label_w,
)

if TYPE_CHECKING:
    from . import Panels


def draw(p: Panels, s: Session, pos: tuple[float, float], size: tuple[float, float]) -> None:
    if p.window("Orbit", pos, size):
        if imgui.begin_tab_bar("orbit-tabs"):
            tabs = (_elements, mission_tabs.quick_answers, mission_tabs.transfer)
            for tab, body in zip(ORBIT_TABS, tabs,
                                 strict=True):
                flags = imgui.TabItemFlags_.set_selected if p.orbit_tab == tab else 0
                opened, _ = imgui.begin_tab_item(tab, None, flags)
                p.report["rects"]["tab:" + tab] = _rect()
                if opened:
                    p.report["tab"] = tab
                    body(p, s)
                    imgui.end_tab_item()
            imgui.end_tab_bar()
        p.orbit_tab = ""
    imgui.end()


def _elements(p: Panels, s: Session) -> None:
    ed = s.editor
    k = ed.selection
    if k is None:
        imgui.text_colored(DIM, "Select or add a body to edit its orbit.")
        return
    b = ed.scene.bodies[k]
    if b.track is not None:
        _follows_ephemeris(p, s, k)
        return
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
        p.report["rects"][f"lock:{hold}"] = _rect()
    # What the lock keeps: the last edit's in words, else the natural partners.
    kept = ed.kept or ("natural partner: a with e, periapsis with apoapsis"
                       if ed.hold == "auto" else "")
    p.report["kept"] = kept
    if kept:
        imgui.text_colored(DIM, kept)
    imgui.separator_text("Elements")
    _rows(p, s, k, ELEMENT_ROWS)
    imgui.separator_text("The same size as radius, altitude, period")
    _forms(p, s, k)


def _follows_ephemeris(p: Panels, s: Session, k: int) -> None:
    """A body that follows an ephemeris has no elements of its own to edit: say so, show
    its osculating conic now, and offer to make it a fixed conic."""
    ed = s.editor
    b = ed.scene.bodies[k]
    assert b.track is not None
    imgui.push_text_wrap_pos(0.0)
    imgui.text(f"{b.name} follows the ephemeris {b.track.source}: its orbit comes from "
               "it, drawn as the osculating conic at the time shown.")
    imgui.text_colored(DIM, "To edit its elements, make it a two-body conic: its "
                       "osculating elements now, from then on without the ephemeris "
                       "(Ctrl+Z undoes).")
    imgui.pop_text_wrap_pos()
    if p.button("Make it a fixed conic at this time"):
        ed.fix_conic(s.clock.t_s, k)
        s.message = f"{b.name} is now a fixed conic (its osculating elements at this time)"


def _rows(p: Panels, s: Session, k: int, rows: tuple[tuple[str, str], ...]) -> None:
    if not imgui.begin_table(f"rows{rows[0][0]}", 2, imgui.TableFlags_.sizing_stretch_prop):
        return
    imgui.table_setup_column("what", imgui.TableColumnFlags_.width_fixed,
                             label_w(225, (label for _, label in rows)))
    imgui.table_setup_column("value", imgui.TableColumnFlags_.width_stretch)
    for name, label in rows:
        imgui.table_next_row()
        imgui.table_next_column()
        imgui.align_text_to_frame_padding()
        imgui.text(label)
        imgui.table_next_column()
        p.element_field(s, k, name)
    imgui.end_table()


def _forms(p: Panels, s: Session, k: int) -> None:
    if not imgui.begin_table("forms", 3, imgui.TableFlags_.sizing_stretch_same):
        return
    imgui.table_setup_column("what", imgui.TableColumnFlags_.width_fixed,
                             label_w(90, [label for label, _, _ in FORM_ROWS] + ["period"]))
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
        p.element_field(s, k, radius)
        imgui.table_next_column()
        p.element_field(s, k, altitude)
    imgui.table_next_row()
    imgui.table_next_column()
    imgui.align_text_to_frame_padding()
    imgui.text("period")
    imgui.table_next_column()
    p.element_field(s, k, "period")
    imgui.end_table()
