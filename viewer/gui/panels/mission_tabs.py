"""The "Quick answers" and "Transfer" tabs: inputs, and the formatted answers of
``viewer.gui.mission``."""

from __future__ import annotations

from typing import TYPE_CHECKING

from imgui_bundle import imgui

from ..editor import EditRefused
from ..mission import (
    MAX_E,
    body_warnings,
    circular_bodies,
    plan_transfer,
    quick_answer_rows,
    transfer_rows,
)
from ..session import Session
from .widgets import (
    AMBER,
    DIM,
    _rect,
)

if TYPE_CHECKING:
    from . import Panels


def quick_answers(p: Panels, s: Session) -> None:
    ed, q = s.editor, p.quick
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
    p.report["answers"] = {key: [list(r) for r in v] for key, v in rows.items()}
    p.report["answer_problems"] = problems
    imgui.separator_text("Time of flight between true anomalies")
    imgui.align_text_to_frame_padding()
    imgui.text("from")
    imgui.same_line()
    q.nu_from = p.live_input("quick:nu_from", q.nu_from, 110)
    imgui.same_line()
    imgui.text("to")
    imgui.same_line()
    q.nu_to = p.live_input("quick:nu_to", q.nu_to, 110)
    if "flight" in problems:
        p.refusal(problems["flight"])
    p.table("q-flight", rows.get("flight", ()))
    imgui.separator_text("When it is at a radius")
    if imgui.radio_button("radius##q", not q.altitude):
        q.altitude = False
    imgui.same_line()
    if imgui.radio_button("altitude##q", q.altitude):
        q.altitude = True
    imgui.same_line()
    q.radius = p.live_input("quick:radius", q.radius, -1)
    if not q.radius.strip():
        imgui.text_colored(DIM, f'e.g. "20000 km"; a bare number is in {ed.scene.length_unit}')
    if "radius" in problems:
        p.refusal(problems["radius"])
    p.table("q-radius", rows.get("radius", ()))
    imgui.separator_text("Speed now")
    p.table("q-speed", rows["speed"])
    if rows["hyperbola"]:
        imgui.separator_text("Open orbit: the pass")
        p.table("q-hyperbola", rows["hyperbola"])
    p.mission_warnings(body_warnings(ed.scene, k))


def transfer(p: Panels, s: Session) -> None:
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
    if p.transfer_from not in circles:
        p.transfer_from = ed.selection if ed.selection in circles else circles[0]
    if p.transfer_to not in circles or p.transfer_to == p.transfer_from:
        p.transfer_to = next(k for k in circles if k != p.transfer_from)
    if imgui.begin_table("tr-bodies", 2, imgui.TableFlags_.sizing_stretch_prop):
        imgui.table_setup_column("w", imgui.TableColumnFlags_.width_fixed, 60)
        imgui.table_setup_column("v", imgui.TableColumnFlags_.width_stretch)
        for label, attr in (("from", "transfer_from"), ("to", "transfer_to")):
            imgui.table_next_row()
            imgui.table_next_column()
            imgui.align_text_to_frame_padding()
            imgui.text(label)
            imgui.table_next_column()
            setattr(p, attr, p.body_combo(label, s, getattr(p, attr), circles))
        imgui.end_table()
    if imgui.radio_button("Hohmann", p.transfer_kind == "hohmann"):
        p.transfer_kind = "hohmann"
    p.report["rects"]["kind:hohmann"] = _rect()
    imgui.same_line()
    if imgui.radio_button("bi-elliptic, via", p.transfer_kind == "bi-elliptic"):
        p.transfer_kind = "bi-elliptic"
    p.report["rects"]["kind:bi-elliptic"] = _rect()
    imgui.same_line()
    imgui.begin_disabled(p.transfer_kind != "bi-elliptic")
    if not p.transfer_via:
        r = max(float(scene.bodies[k].elements.a) for k in (p.transfer_from,
                                                             p.transfer_to))
        p.transfer_via = f"{3 * r / 1e3:.0f} km"
    p.transfer_via = p.live_input("transfer:via", p.transfer_via, -1)
    imgui.end_disabled()
    t = s.clock.t_s
    try:
        plan = plan_transfer(scene, p.transfer_from, p.transfer_to,
                             p.transfer_kind, p.transfer_via, t)
    except EditRefused as err:
        for line in err.problems:
            p.refusal(line)
        p.report["transfer"] = None
        return
    burns, rows = transfer_rows(plan, scene)
    p.report["transfer"] = {"burns": [list(r) for r in burns],
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
    p.table("tr-totals", rows["totals"], 150)
    if p.button("Add to the scene"):
        idx = ed.add_bodies(plan.legs, f"transfer {plan.from_name} to {plan.to_name}")
        names = ", ".join(ed.scene.bodies[i].name for i in idx)
        s.message = f"added {names} (Ctrl+Z undoes)"
    imgui.same_line()
    if p.button("Jump to the next departure window") and plan.next_window_s is not None:
        s.clock.t_s = plan.next_window_s
    imgui.separator_text("Phasing with the target")
    p.table("tr-phasing", rows["phasing"], 150)
    imgui.separator_text("Transfer orbit" if len(plan.legs) == 1 else "Legs")
    p.table("tr-legs", rows["legs"], 150)
    p.mission_warnings(plan.warnings)
