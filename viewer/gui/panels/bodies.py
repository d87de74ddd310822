"""The left panels: "Bodies" (the list, add/duplicate/remove, rename, the central
body) and "Marks" (what is drawn, style, equal-time sectors)."""

from __future__ import annotations

from typing import TYPE_CHECKING, Any

from imgui_bundle import imgui

from ...orbit import swept_area
from ..editor import Editor, EditRefused
from ..readout import format_time
from ..session import Session
from .widgets import (
    DIM,
    SHOW_LABELS,
    px,
)

if TYPE_CHECKING:
    from . import Panels


def draw_bodies(p: Panels, s: Session, pos: tuple[float, float], size: tuple[float, float]) -> None:
    ed = s.editor
    if p.window("Bodies", pos, size):
        for k, b in enumerate(ed.scene.bodies):
            imgui.color_button(f"##c{k}", imgui.ImVec4(*b.color, 1.0),
                               imgui.ColorEditFlags_.no_tooltip, imgui.ImVec2(px(12), px(12)))
            imgui.same_line()
            clicked, _ = imgui.selectable(f"{b.name}##b{k}", ed.selection == k)
            if clicked:
                ed.select(k)
        imgui.separator()
        if p.button("Add"):
            ed.add_body()
        imgui.same_line()
        has = ed.body is not None
        imgui.begin_disabled(not has)
        if p.button("Duplicate"):
            ed.duplicate()
        imgui.same_line()
        if p.button("Remove"):
            ed.delete()
        imgui.same_line()
        if imgui.arrow_button("##up", imgui.Dir.up) and has:
            ed.move((ed.selection or 0) - 1)
        imgui.same_line()
        if imgui.arrow_button("##down", imgui.Dir.down) and has:
            ed.move((ed.selection or 0) + 1)
        imgui.end_disabled()
        sel = ed.selection
        if sel is not None:
            p.typed_field(f"{sel}:rename", ed.scene.bodies[sel].name, ed.rename, -70,
                          label="name", rect="rename")
        if imgui.collapsing_header("Central body"):
            _center(p, s)
    imgui.end()


def _center(p: Panels, s: Session) -> None:
    ed = s.editor
    c = ed.scene.center
    rows = (("name", c.name), ("gm", f"{c.gm_m3_s2:.10g} m3/s2"),
            ("radius", f"{c.radius_m / 1e3:.10g} km"))
    for key, value in rows:
        def commit(text: str, key: str = key) -> None:
            ed.set_center(**{key: text})

        p.typed_field(f"center:{key}", value, commit, -70, label=key)


def draw_marks(p: Panels, s: Session, pos: tuple[float, float], size: tuple[float, float]) -> None:
    ed = s.editor
    if p.window("Marks", pos, size):
        b = ed.body
        if b is None:
            imgui.text_colored(DIM, "Select a body to choose what is drawn.")
        else:
            imgui.text(f"Drawn for {b.name}:")
            # The second column starts past the widest label of the first.
            second = max(px(170), imgui.get_frame_height() + 3 * imgui.get_style().item_spacing.x
                         + max(imgui.calc_text_size(lab).x for _, lab in SHOW_LABELS[::2]))
            for i, (flag, label) in enumerate(SHOW_LABELS):
                if i % 2:
                    imgui.same_line(second)
                changed, on = imgui.checkbox(label, getattr(b.show, flag))
                if changed:
                    ed.set_show(flag, on)
            changed, col = imgui.color_edit3("colour", list(b.color),
                                             imgui.ColorEditFlags_.no_inputs)
            if changed:  # one undo step per drag, however many frames it takes
                ed.set_color(tuple(col), merge=True)  # type: ignore[arg-type]
            imgui.set_next_item_width(px(150))
            changed, width = imgui.slider_float("line width (px)", b.line_width_px, 0.5,
                                                8.0, "%.1f px")
            if changed:
                ed.set_line_width(width, merge=True)
            if b.show.sweep and b.sweep is not None:
                _sectors(p, s)
    imgui.end()


def _sectors(p: Panels, s: Session) -> None:
    ed = s.editor
    b = ed.body
    assert b is not None and b.sweep is not None
    sw = b.sweep
    imgui.separator_text("Equal-time sectors")
    imgui.set_next_item_width(px(120))
    changed, count = imgui.input_int("count", sw.count)
    if changed:
        _try_sweep(p, ed, count=count)
    p.typed_field("sweep:interval", format_time(sw.interval_s),
                  lambda text: ed.set_sweep(interval=text), px(160), label="interval")
    p.report["sweep_interval_given"] = sw.interval_given
    if sw.interval_given:
        imgui.text_colored(DIM, "interval as written: it stays when the orbit changes")
    else:
        imgui.text_colored(DIM, "interval = period / count: it follows the orbit")
    imgui.set_next_item_width(px(150))
    changed, op = imgui.slider_float("opacity", sw.opacity, 0.0, 1.0, "%.2f")
    if changed:
        _try_sweep(p, ed, opacity=op)
    if "sweep" in p.errors:
        p.refusal(p.errors["sweep"])
    areas = [float(swept_area(b.elements, t0 - b.epoch_offset_s, t1 - b.epoch_offset_s))
             for t0, t1 in sw.bounds_s()]
    unit, f = ("km^2", 1e6) if max(areas) < 1e18 else ("au^2", 149_597_870_700.0**2)
    imgui.text("areas, side by side:")
    imgui.text_wrapped("  ".join(f"{a / f:.5g}" for a in areas) + f"  {unit}")
    if len(areas) > 1 and min(areas) > 0:
        spread = (max(areas) - min(areas)) / max(areas)
        imgui.text_colored(DIM, f"largest minus smallest: {spread * 100:.2g} % of the largest")


def _try_sweep(p: Panels, ed: Editor, **changes: Any) -> None:
    try:
        ed.set_sweep(**changes)
        p.errors.pop("sweep", None)
    except EditRefused as err:
        p.errors["sweep"] = err.problems[0]
