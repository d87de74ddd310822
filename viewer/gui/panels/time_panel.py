"""The "Time" panel: play, step, rate, the scene date and epoch."""

from __future__ import annotations

from typing import TYPE_CHECKING

from imgui_bundle import imgui

from ...orbit import DAY_S
from ...units import parse_quantity
from ..clock import next_apsis_s
from ..session import Session
from ..timeline_edits import rate_text
from .widgets import (
    DIM,
    RED,
)

if TYPE_CHECKING:
    from . import Panels


def draw(p: Panels, s: Session, pos: tuple[float, float], size: tuple[float, float]) -> None:
    ed, clock = s.editor, s.clock
    if p.window("Time", pos, size):
        if p.button("Pause" if clock.playing else "Play", imgui.ImVec2(70, 0)):
            s.toggle_play()
        imgui.same_line()
        if p.button("<|"):
            clock.step(-1)
        imgui.same_line()
        if p.button("|>"):
            clock.step(1)
        imgui.same_line()
        b = ed.body
        for which, label in (("periapsis", "next periapsis"), ("apoapsis", "next apoapsis")):
            imgui.begin_disabled(b is None)
            if p.button(label) and b is not None:
                t = next_apsis_s(b, clock.t_s, which)
                if t is not None:
                    clock.seek_scene(t)
            imgui.end_disabled()
            imgui.same_line()
        if clock.on_show:
            # On the show the clock runs at the show's pace, not at this rate: say so
            # rather than offer a field that would change nothing.
            imgui.text_colored(DIM, "   rate: the show's pace (Timeline panel)")
        else:
            imgui.text("   rate")
            imgui.same_line()

            def set_rate(text: str) -> None:
                clock.rate = parse_quantity(text, "rate", "d/s")

            p.typed_field("rate", rate_text(clock.rate), set_rate, 130, refusal=False)
        imgui.same_line()
        shown = s.readout_t_s  # the clock, at most READOUT_HZ times a second while playing
        ep = ed.scene.epoch
        when = s.kept_text("date", (ep.jd1, ep.jd2, ep.scale, shown),
                           lambda: ep.plus_seconds(shown).iso())
        imgui.text(f"   {when}   ({shown / DAY_S:+.3f} d since the scene epoch)")
        if "rate" in p.errors:
            p.refusal("rate: " + p.errors["rate"])
        lo, hi = clock.span(ed.scene)
        hi = max(hi, lo + DAY_S)
        imgui.set_next_item_width(-1)
        changed, days = imgui.slider_float("##scrub", shown / DAY_S, lo / DAY_S,
                                           hi / DAY_S, "%.2f d")
        if changed:  # scene time: off the show (the timeline panel scrubs the show)
            clock.seek_scene(days * DAY_S)
        _epoch(p, s)
    imgui.end()


def _epoch(p: Panels, s: Session) -> None:
    ed = s.editor
    imgui.align_text_to_frame_padding()
    imgui.text("scene epoch (t = 0)")
    imgui.same_line()
    ep = ed.scene.epoch
    epoch_text = p.report["epoch"] = s.kept_text("epoch", (ep.jd1, ep.jd2, ep.scale), ep.iso)

    def set_epoch(text: str) -> None:
        if ed.set_epoch(text):
            s.message = f"scene epoch set to {ed.scene.epoch.iso()} (Ctrl+Z undoes)"

    p.typed_field("epoch", epoch_text, set_epoch, 300, refusal=False)
    imgui.same_line()
    if "epoch" in p.errors:
        imgui.text_colored(RED, "refused: " + p.errors["epoch"])
        p.report["epoch_error"] = p.errors["epoch"]
    else:
        imgui.text_colored(DIM, "ISO date and time with UTC, TT or TDB (TDB when none); "
                           "Enter sets it. Bodies keep their own epochs.")
