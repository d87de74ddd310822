"""The menu bar: its entries come from the action table (``viewer.gui.actions``)."""

from __future__ import annotations

from typing import TYPE_CHECKING

from imgui_bundle import imgui

from ..actions import MENUS, menu_actions
from ..session import Session
from .widgets import (
    AMBER,
    DIM,
    ORBIT_TABS,
    _rect,
)

if TYPE_CHECKING:
    from . import Panels


def draw(p: Panels, s: Session) -> None:
    """The menu bar: one menu per group of the action table, each entry with its keys
    (``viewer.gui.actions``); the Mission menu brings its tab forward."""
    ed = s.editor
    if not imgui.begin_main_menu_bar():
        return
    for name in MENUS:
        if imgui.begin_menu(name):
            for act in menu_actions(name):
                label = act.label
                if act.name == "undo":
                    label = f"Undo {ed.undo_label}"
                elif act.name == "redo":
                    label = f"Redo {ed.redo_label}"
                checked = act.checked(s) if act.checked is not None else False
                if imgui.menu_item_simple(label, act.keys_text, checked, act.enabled(s)):
                    act.run(s)
            imgui.end_menu()
        p.report["rects"][f"menu:{name}"] = _rect()
        if name == "View" and imgui.begin_menu("Mission"):
            for tab in ORBIT_TABS[1:]:
                if imgui.menu_item_simple(tab):
                    p.orbit_tab = tab
            imgui.end_menu()
    title = ed.path.name if ed.path else "new scene"
    state = "unsaved changes" if ed.dirty else "saved"
    imgui.text_colored(DIM, f"   {ed.scene.title}  -  {title}  ({state})")
    if s.message:
        imgui.text_colored(AMBER, "   " + s.message)
    imgui.end_main_menu_bar()
