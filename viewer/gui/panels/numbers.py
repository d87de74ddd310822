"""The "Numbers" panel: the live readout of the selected body."""

from __future__ import annotations

from typing import TYPE_CHECKING

from imgui_bundle import imgui

from ..readout import body_readout
from ..session import Session
from .widgets import (
    AMBER,
    DIM,
)

if TYPE_CHECKING:
    from . import Panels


def draw(p: Panels, s: Session, pos: tuple[float, float], size: tuple[float, float]) -> None:
    ed = s.editor
    if p.window("Numbers", pos, size):
        k = ed.selection
        if k is None:
            imgui.text_colored(DIM, "No body selected.")
        else:
            r = body_readout(ed.scene, k, s.clock.t_s)
            p.report["readout"] = [list(row) for row in r.rows]
            p.report["values"] = r.values
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
            p.report["warnings"] = list(r.warnings)
    imgui.end()
