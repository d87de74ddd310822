"""The "Numbers" panel: the live readout of the selected body."""

from __future__ import annotations

from typing import TYPE_CHECKING

from imgui_bundle import imgui

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
            r = s.readout(k)  # at the readout time (Session.update_readout)
            p.report["readout"] = [list(row) for row in r.rows]
            p.report["values"] = r.values
            p.table("readout", tuple(r.rows), 170)
            for w in r.warnings:
                imgui.push_text_wrap_pos(0.0)
                imgui.text_colored(AMBER, "warning: " + w)
                imgui.pop_text_wrap_pos()
            p.report["warnings"] = list(r.warnings)
    imgui.end()
