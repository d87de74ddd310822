"""The "Quick answers" and "Transfer" tabs: inputs, and the formatted answers of
``viewer.gui.mission``."""

from __future__ import annotations

from typing import TYPE_CHECKING

from imgui_bundle import imgui

from ..editor import EditRefused
from ..mission import (
    KINDS,
    MAX_E,
    TransferPlan,
    body_warnings,
    circular_bodies,
    default_via,
    plan_to_radius,
    plan_transfer,
    quick_answer_rows,
    side_by_side_rows,
    transfer_pair,
    transfer_rows,
)
from ..session import Session
from .widgets import (
    AMBER,
    DIM,
    RED,
    _rect,
    label_w,
    px,
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
    q.nu_from = p.live_input("quick:nu_from", q.nu_from, px(110))
    imgui.same_line()
    imgui.text("to")
    imgui.same_line()
    q.nu_to = p.live_input("quick:nu_to", q.nu_to, px(110))
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


#: What a transfer goes to: a circular body of the scene, or a typed radius or altitude.
TARGETS = (("body", "a body"), ("radius", "a radius"), ("altitude", "an altitude"))


def _plans(p: Panels, s: Session) -> tuple[TransferPlan | EditRefused, TransferPlan | EditRefused]:
    """The Hohmann and the bi-elliptic plan to the chosen target (or their refusals)."""
    scene, t = s.editor.scene, s.clock.t_s
    out: list[TransferPlan | EditRefused] = []
    for kind in KINDS:
        try:
            if p.transfer_target == "body":
                assert p.transfer_from is not None and p.transfer_to is not None
                out.append(plan_transfer(scene, p.transfer_from, p.transfer_to, kind,
                                         p.via_shown, t))
            else:
                assert p.transfer_from is not None
                out.append(plan_to_radius(scene, p.transfer_from, p.transfer_radius,
                                          p.transfer_target == "altitude", kind,
                                          p.via_shown, t))
        except EditRefused as err:
            out.append(err)
    return out[0], out[1]


def transfer(p: Panels, s: Session) -> None:
    ed = s.editor
    scene = ed.scene
    circles = circular_bodies(scene)
    imgui.push_text_wrap_pos(0.0)
    imgui.text("From a circular orbit to another circle in its plane, departing now.")
    imgui.pop_text_wrap_pos()
    if not circles:
        imgui.push_text_wrap_pos(0.0)
        imgui.text_colored(AMBER, f"This needs a body on a circle (e below {MAX_E:g}); the "
                           "scene has none. Add one (Bodies > Add makes a circle) and set its a.")
        imgui.pop_text_wrap_pos()
        return
    p.transfer_from, p.transfer_to = transfer_pair(scene, p.transfer_from, p.transfer_to)
    if imgui.begin_table("tr-bodies", 2, imgui.TableFlags_.sizing_stretch_prop):
        imgui.table_setup_column("w", imgui.TableColumnFlags_.width_fixed,
                                 label_w(60, ("from", "to", "via")))
        imgui.table_setup_column("v", imgui.TableColumnFlags_.width_stretch)
        imgui.table_next_row()
        imgui.table_next_column()
        imgui.align_text_to_frame_padding()
        imgui.text("from")
        imgui.table_next_column()
        p.transfer_from = p.body_combo("from", s, p.transfer_from, circles)
        imgui.table_next_row()
        imgui.table_next_column()
        imgui.align_text_to_frame_padding()
        imgui.text("to")
        imgui.table_next_column()
        for i, (target, label) in enumerate(TARGETS):
            if i:
                imgui.same_line()
            if imgui.radio_button(f"{label}##target", p.transfer_target == target):
                p.transfer_target = target
            p.report["rects"][f"target:{target}"] = _rect()
        imgui.table_next_row()
        imgui.table_next_column()
        imgui.table_next_column()
        if p.transfer_target == "body":
            others = [k for k in circles if k != p.transfer_from]
            if others:
                p.transfer_to = p.body_combo("to", s, p.transfer_to, others)
            else:
                imgui.text_colored(AMBER, "no other circular body: choose a radius")
        else:
            p.transfer_radius = p.live_input("transfer:radius", p.transfer_radius, -1)
            if not p.transfer_radius.strip():
                imgui.text_colored(DIM, f'e.g. "42164 km"; a bare number is in '
                                   f"{scene.length_unit}")
        imgui.table_next_row()
        imgui.table_next_column()
        imgui.align_text_to_frame_padding()
        imgui.text("via")
        imgui.table_next_column()
        assert p.transfer_from is not None
        radius = "" if p.transfer_target == "body" else p.transfer_radius
        p.via_shown = p.transfer_via or default_via(
            scene, p.transfer_from, p.transfer_to, radius, p.transfer_target == "altitude")
        p.transfer_via = p.live_input("transfer:via", p.transfer_via, -1, p.via_shown)
        imgui.end_table()
    if p.transfer_target == "body" and p.transfer_to is None:
        p.report["transfer"] = None
        return
    plans = dict(zip(KINDS, _plans(p, s), strict=True))
    side = side_by_side_rows(plans["hohmann"], plans["bi-elliptic"])
    p.report["side_by_side"] = [list(r) for r in side]
    imgui.separator_text("Side by side (bi-elliptic through the via radius)")
    if imgui.begin_table("tr-side", 3, imgui.TableFlags_.row_bg
                         | imgui.TableFlags_.sizing_stretch_prop):
        imgui.table_setup_column("", imgui.TableColumnFlags_.width_fixed,
                                 label_w(130, (row[0] for row in side)))
        imgui.table_setup_column("Hohmann")
        imgui.table_setup_column("bi-elliptic")
        imgui.table_headers_row()
        for row in side:
            imgui.table_next_row()
            for i, text in enumerate(row):
                imgui.table_next_column()
                if i == 0:
                    imgui.text_colored(DIM, text)
                elif text.startswith("refused: "):
                    imgui.push_text_wrap_pos(0.0)
                    imgui.text_colored(RED, text)
                    imgui.pop_text_wrap_pos()
                else:
                    imgui.text(text)
        imgui.end_table()
    imgui.align_text_to_frame_padding()
    imgui.text("details of")
    for kind, label in (("hohmann", "Hohmann"), ("bi-elliptic", "bi-elliptic")):
        imgui.same_line()
        if imgui.radio_button(label, p.transfer_kind == kind):
            p.transfer_kind = kind
        p.report["rects"][f"kind:{kind}"] = _rect()
    plan = plans[p.transfer_kind]
    if isinstance(plan, EditRefused):
        for line in plan.problems:
            p.refusal(line)
        p.report["transfer"] = None
        return
    _plan_details(p, s, plan)


def _plan_details(p: Panels, s: Session, plan: TransferPlan) -> None:
    """The burns, totals, phasing and legs of one plan, and its buttons."""
    ed, scene, t = s.editor, s.editor.scene, s.clock.t_s
    burns, rows = transfer_rows(plan, scene)
    p.report["transfer"] = {"burns": [list(r) for r in burns],
                               **{k: [list(r) for r in v] for k, v in rows.items()}}
    if p.button("Add to the scene"):
        idx = ed.add_bodies(plan.legs, f"transfer {plan.from_name} to {plan.to_name}")
        names = ", ".join(ed.scene.bodies[i].name for i in idx)
        s.message = f"added {names} (Ctrl+Z undoes)"
    if plan.next_window_s is not None:
        imgui.same_line()
        if p.button("Jump to the next departure window"):
            s.clock.seek_scene(plan.next_window_s)
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
    imgui.separator_text("Phasing with the target")
    p.table("tr-phasing", rows["phasing"], 150)
    imgui.separator_text("Transfer orbit" if len(plan.legs) == 1 else "Legs")
    p.table("tr-legs", rows["legs"], 150)
    p.mission_warnings(plan.warnings)
