"""The help overlay, the prompts and dialogs (unsaved changes, save as, open, still
export, render job) and the render job's progress."""

from __future__ import annotations

from collections.abc import Callable
from pathlib import Path
from typing import TYPE_CHECKING

from imgui_bundle import imgui

from ..actions import shortcut_rows
from ..jobs import VIDEO_QUALITIES
from ..session import Session
from .widgets import (
    AMBER,
    DIALOG_TEXT_W,
    DIM,
    GAP,
    _rect,
    centre_next_window,
    px,
    scene_area,
)

if TYPE_CHECKING:
    from . import Panels


def help_overlay(p: Panels, s: Session, w: float, h: float) -> None:
    imgui.set_next_window_pos(imgui.ImVec2(0.5 * w, 0.5 * h), imgui.Cond_.always,
                              imgui.ImVec2(0.5, 0.5))
    imgui.set_next_window_bg_alpha(0.94)
    opened, keep = imgui.begin("Shortcuts", True, imgui.WindowFlags_.always_auto_resize
                               | imgui.WindowFlags_.no_collapse)
    if opened and imgui.begin_table("keys", 2):
        for key, what in shortcut_rows():
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


def unsaved_prompt(p: Panels, s: Session) -> None:
    if s.unsaved_for and not imgui.is_popup_open("Unsaved changes"):
        imgui.open_popup("Unsaved changes")
    centre_next_window()
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
    if p.button(f"Save and {then}"):
        choice = "save"
    p.report["rects"]["prompt:save"] = _rect()
    imgui.same_line()
    if p.button("Quit without saving" if quitting else "Open another without saving"):
        choice = "discard"
    p.report["rects"]["prompt:discard"] = _rect()
    imgui.same_line()
    if p.button("Keep editing") or imgui.is_key_pressed(imgui.Key.escape):
        choice = "cancel"
    p.report["rects"]["prompt:cancel"] = _rect()
    if choice:
        s.unsaved_choice(choice)
        imgui.close_current_popup()
    imgui.end_popup()


#: Height of the file chooser's lists, px at UI scale 1.
CHOOSER_H = 260.0
RECENT_W = 0.42  # the recent files' share of the dialog's width
#: A list entry answers the second press of a double click too (it opens the file).
TWICE = imgui.SelectableFlags_.allow_double_click


def file_chooser(p: Panels, s: Session, dialog: str, act: Callable[[], bool]) -> bool:
    """The recent files beside the chooser's folder (its sub-folders and .toml files): a
    click names a file or shows a folder, a double click on a file runs ``act``. True
    when ``act`` ran and succeeded (the dialog then closes)."""
    chooser = s.chooser
    if chooser is None:
        return False
    k = s.ui_scale
    width, height = DIALOG_TEXT_W * k, CHOOSER_H * k
    done = False
    imgui.begin_group()
    imgui.text_colored(DIM, "Recent")
    if imgui.begin_child("recent", imgui.ImVec2(RECENT_W * width, height),
                         imgui.ChildFlags_.borders):
        if not s.recent:
            imgui.text_colored(DIM, "none yet")
        for i, path in enumerate(s.recent):
            named = getattr(s, f"{dialog}_text") == path
            clicked, _ = imgui.selectable(f"{Path(path).name}##recent{i}", named, TWICE)
            p.report["rects"][f"recent:{i}"] = _rect()
            if imgui.is_item_hovered():
                imgui.set_tooltip(path)
            if clicked:  # a double click opens what its first click named
                setattr(s, f"{dialog}_text", path)
                if named and imgui.is_mouse_double_clicked(0):
                    done = act()
    imgui.end_child()
    imgui.end_group()
    imgui.same_line()
    imgui.begin_group()
    if p.button(f"Up##{dialog}"):
        s.chooser_up(dialog)
    imgui.same_line()
    imgui.text_colored(DIM, str(chooser.folder))
    p.report["chooser"] = {"folder": str(chooser.folder), "problem": chooser.problem,
                           "entries": [e.text for e in chooser.entries],
                           "recent": list(s.recent)}
    if imgui.begin_child("folder", imgui.ImVec2((1.0 - RECENT_W) * width - GAP * k,
                                                height - imgui.get_frame_height_with_spacing()),
                         imgui.ChildFlags_.borders):
        if chooser.problem:
            p.error_lines([chooser.problem])
        elif not chooser.entries:
            imgui.text_colored(DIM, "no folders or .toml files here")
        for entry in list(chooser.entries):
            named = getattr(s, f"{dialog}_text") == str(entry.path)
            clicked, _ = imgui.selectable(f"{entry.text}##entry", named, TWICE)
            p.report["rects"][f"entry:{entry.text}"] = _rect()
            if clicked:
                s.choose(entry, dialog)
                if named and not entry.folder and imgui.is_mouse_double_clicked(0):
                    done = act()
    imgui.end_child()
    imgui.end_group()
    return done


def _path_dialog(p: Panels, s: Session, title: str, dialog: str, ok: str,
                 act: Callable[[], bool], kept: str) -> None:
    """A dialog for a scene file (``dialog`` "open" or "save_as"): the typed path, the
    file chooser, the problems of the last try (one line each), OK and Cancel."""
    if not p.modal(title, getattr(s, f"{dialog}_prompt")):
        return
    imgui.text("Scene file (.toml):")
    entered, text = p.path_input(dialog, getattr(s, f"{dialog}_text"))
    setattr(s, f"{dialog}_text", text)
    picked = file_chooser(p, s, dialog, act)
    errors = getattr(s, f"{dialog}_errors")
    p.report[f"{dialog}_errors"] = list(errors)
    if errors:
        imgui.text_colored(AMBER, kept)
        p.error_lines(errors)
    if picked:
        imgui.close_current_popup()
        imgui.end_popup()
        return
    p.end_dialog(s, f"{dialog}_prompt", ok, entered, act)


def save_as(p: Panels, s: Session) -> None:
    _path_dialog(p, s, "Save as", "save_as", "Save", s.save_as,
                 "Not saved; the file is unchanged:")


def open_dialog(p: Panels, s: Session) -> None:
    _path_dialog(p, s, "Open a scene", "open", "Open", s.open_scene,
                 "Not opened; the current scene is kept:")


def still_dialog(p: Panels, s: Session) -> None:
    if not p.modal("Export a still", s.still_prompt):
        return
    when = s.editor.scene.epoch.plus_seconds(s.clock.t_s).iso()
    imgui.text(f"The view in the window at {when}, drawn by the renderer.")
    imgui.text("File (.png, .jpg or .svg):")
    entered, s.still_text = p.path_input("still", s.still_text)
    p.size_input("stillsize", s, "still_size")
    imgui.same_line()
    imgui.text_colored(DIM, "empty: the scene's [render] size")
    p.error_lines(s.still_errors)
    p.end_dialog(s, "still_prompt", "Export", entered, s.export_still)


def job_dialog(p: Panels, s: Session) -> None:
    if not p.modal("Render the show", s.job_prompt):
        return
    tl = s.editor.scene.timeline
    imgui.text(f"{tl.frame_count} frames at {tl.fps:g} frames/s ({tl.duration_s:g} s of show).")
    imgui.text("Output: a folder ending in / (numbered frames) or a video file .mp4:")
    entered, s.job_text = p.path_input("job", s.job_text)
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
    imgui.text("picture:")
    for v, label in (("flat", "flat"), ("dome", "dome master"), ("panorama", "panorama")):
        imgui.same_line()
        if imgui.radio_button(f"{label}##jobview", s.job_view == v):
            s.job_view = v
    imgui.align_text_to_frame_padding()
    imgui.text("show time from")
    imgui.same_line()
    imgui.set_next_item_width(px(90))
    _, s.job_from = imgui.input_text_with_hint("##jobfrom", "0 s", s.job_from)
    p.report["rects"]["jobfrom"] = _rect()
    imgui.same_line()
    imgui.text("to")
    imgui.same_line()
    imgui.set_next_item_width(px(90))
    _, s.job_to = imgui.input_text_with_hint("##jobto", f"{tl.duration_s:g} s", s.job_to)
    p.report["rects"]["jobto"] = _rect()
    if s.clock.loop and s.clock.loop_range is not None:
        imgui.same_line()
        if p.button("the loop##job"):
            a, b = s.clock.loop_range
            s.job_from, s.job_to = f"{a:g} s", f"{b:g} s"
    imgui.same_line()
    imgui.text_colored(DIM, "(empty: the whole show)")
    p.size_input("jobsize", s, "job_size")
    imgui.same_line()
    imgui.text("or frames A:B")
    imgui.same_line()
    imgui.set_next_item_width(140)
    _, s.job_frames = imgui.input_text_with_hint("##jobframes", f"0:{tl.frame_count}",
                                                 s.job_frames)
    p.report["rects"]["jobframes"] = _rect()
    _, s.job_window_camera = imgui.checkbox(
        "seen as in the window (off: the scene's own camera)", s.job_window_camera)
    p.error_lines(s.job_errors)
    p.end_dialog(s, "job_prompt", "Start", entered, s.start_job)


def new_show_dialog(p: Panels, s: Session) -> None:
    if not p.modal("New show", s.new_show_prompt):
        return
    scene = s.editor.scene
    when = scene.epoch.plus_seconds(s.clock.t_s).iso()
    imgui.text(f"A show from the scene time shown ({when}),")
    imgui.text("its first camera key the view in the window.")
    if scene.timeline.camera_keys or scene.timeline.fades or scene.timeline.captions:
        imgui.text_colored(AMBER, "This replaces the scene's show (Ctrl+Z brings it back).")
    for attr, label, hint in (("duration", "duration", "30 s"), ("rate", "rate", "5 d/s"),
                              ("fps", "frames per second", "30")):
        imgui.align_text_to_frame_padding()
        imgui.text(f"{label}:")
        imgui.same_line(px(190))
        imgui.set_next_item_width(px(160))
        _, value = imgui.input_text_with_hint(f"##newshow{attr}", hint,
                                              getattr(s, f"new_show_{attr}"))
        p.report["rects"][f"newshow:{attr}"] = _rect()
        setattr(s, f"new_show_{attr}", value)
    imgui.align_text_to_frame_padding()
    imgui.text("clock:")
    for c in ("none", "date", "elapsed"):
        imgui.same_line()
        if imgui.radio_button(f"{c}##newshowclock", s.new_show_clock == c):
            s.new_show_clock = c
    p.error_lines(s.new_show_errors)
    p.report["new_show_errors"] = list(s.new_show_errors)
    p.end_dialog(s, "new_show_prompt", "Make the show", False, s.new_show)


def job_progress(p: Panels, s: Session, w: float, h: float) -> None:
    job = s.job
    assert job is not None
    x0, top, fw, fh = scene_area((int(w), int(h)), s.ui_scale, s.presenting,
                                 s.show_timeline)
    width = min(620.0, fw - 2 * GAP)
    imgui.set_next_window_pos(imgui.ImVec2(x0 + 0.5 * (fw - width), top + fh - 112 - GAP),
                              imgui.Cond_.first_use_ever)
    imgui.set_next_window_size(imgui.ImVec2(width, 112), imgui.Cond_.first_use_ever)
    if imgui.begin("Render job", None, imgui.WindowFlags_.no_collapse)[0]:
        imgui.text_colored(DIM, f"{job.request.out}  ({job.request.size_px[0]}x"
                           f"{job.request.size_px[1]} px)")
        text = job.progress_text()
        p.report["job"] = {"state": job.state, "done": job.done, "total": job.total,
                              "text": text}
        imgui.push_text_wrap_pos(0.0)
        if job.active:
            imgui.progress_bar(job.fraction, imgui.ImVec2(-90, 0),
                               f"{100 * job.fraction:.0f} %")
            imgui.same_line()
            if p.button("Cancel##job"):
                job.cancel()
            imgui.text(text)
        else:
            imgui.text_colored(AMBER if job.state != "done" else DIM, text)
            if p.button("Close##job"):
                s.job = None
        imgui.pop_text_wrap_pos()
    imgui.end()
