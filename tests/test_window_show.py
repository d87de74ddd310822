"""The show in the window under Xvfb: opened paused at a show time (``--show-at``), the
picture is the frame the exporter writes; a camera key stored with K from the keyboard
(real input through xdotool) is saved as a readable [[timeline.camera]] table, every
other line of the file unchanged."""

from __future__ import annotations

import difflib
import shutil
import subprocess
import time
from pathlib import Path

import numpy as np
import pytest
from support.xwindow import (
    PERIFOCAL,
    ROOT,
    WINDOW,
    Display,
    press,
    read_report,
    running_viewer,
    wait_for,
)

pytestmark = WINDOW


def _rgb(path: Path) -> np.ndarray:
    from PIL import Image

    with Image.open(path) as im:
        return np.asarray(im.convert("RGB"))


def test_a_still_at_a_show_time_is_the_exported_frame(display: Display, tmp_path: Path) -> None:

    scene = str(ROOT / "scenes" / "demo.toml")
    shot = tmp_path / "window.png"
    # UI scale 0.5 in a 540 px high window sizes labels for 1080 x 0.5 = 540 px, as the
    # export sizes them for its 540 px height; presentation mode: no panel.
    run = subprocess.run([*PERIFOCAL, "open", scene, "--size", "960x540", "--ui-scale", "0.5",
                          "--present", "--show-at", "8 s", "--screenshot", str(shot),
                          "--quit-after", "4"], env=display.env, capture_output=True,
                         text=True, timeout=180)
    assert run.returncode == 0, run.stderr
    out = tmp_path / "frames"
    run = subprocess.run([*PERIFOCAL, "render", scene, "--frames", "240:241", "--size",
                          "960x540", "-o", f"{out}/"], capture_output=True, text=True,
                         timeout=180)
    assert run.returncode == 0, run.stderr
    a = _rgb(shot).astype(int)
    b = _rgb(out / "frame_000240.png").astype(int)
    assert a.shape == b.shape == (540, 960, 3)
    differ = (np.abs(a - b).max(axis=2) > 8).mean()
    assert differ < 1e-4  # frame 240 = 8 s x 30 fps: the same picture, pixel for pixel
    assert (b.max(axis=2) > 60).sum() > 2000  # and not an empty one


def test_a_camera_key_from_the_keyboard_is_saved_as_a_readable_table(
        display: Display, tmp_path: Path) -> None:
    scene = tmp_path / "demo.toml"
    shutil.copy(ROOT / "scenes" / "demo.toml", scene)
    before = scene.read_text(encoding="utf-8")
    with running_viewer(display, tmp_path, scene) as (report, origin):
        # Step 75 frames (2.5 s) on the show with the Right key, turn to the edge view
        # (E), store the view as a key (K) and save (Ctrl+S).
        for _ in range(75):
            display.xdotool("key", "Right")
        wait_for(lambda: (r := read_report(report)) and r["frame"] == 75, what="frame 75")
        press(display, report, "e")
        ui = press(display, report, "k", dirty=True)
        assert ui["show"]["camera_keys"] == [0.0, 2.5, 8.0, 18.0]
        press(display, report, "ctrl+z", dirty=False)
        press(display, report, "ctrl+y", dirty=True)
        press(display, report, "ctrl+s", dirty=False)
    after = scene.read_text(encoding="utf-8")
    diff = [ln for ln in difflib.unified_diff(before.splitlines(), after.splitlines(),
                                              lineterm="", n=0)
            if ln[:1] in "+-" and not ln.startswith(("+++", "---"))]
    assert all(ln.startswith("+") for ln in diff), diff  # no line of the file changed
    added = [ln[1:] for ln in diff]
    assert "[[timeline.camera]]" in added and 'at = "2.5 s"' in added
    assert 'look = "edge"' in added
    from viewer.scene import load_scene

    keys = load_scene(scene).timeline.camera_keys
    assert [k.at_s for k in keys] == [0.0, 2.5, 8.0, 18.0] and keys[1].look == "edge"


@pytest.mark.parametrize("bad", ["30 s", "soon"])
def test_a_show_time_outside_the_show_is_refused_in_one_line(bad: str) -> None:
    run = subprocess.run([*PERIFOCAL, "open", str(ROOT / "scenes" / "demo.toml"),
                          "--show-at", bad], capture_output=True, text=True, timeout=60)
    assert run.returncode == 2 and "--show-at" in run.stderr
    assert "Traceback" not in run.stderr


def test_playing_from_0_reaches_the_second_keys_view(display: Display, tmp_path: Path) -> None:
    """Played from 0 s with Space (at 8 x real time, ] three times), the picture after the
    second key (the last one here) is that key's view: the exporter's frame pixel for
    pixel, and not the first key's."""
    from support.xwindow import window_origin, window_pixels

    text = (ROOT / "scenes" / "demo.toml").read_text(encoding="utf-8")
    cut = text.index("[[timeline.camera]]\nat = \"18 s\"")
    end = text.index("[[timeline.fade]]")
    scene = tmp_path / "two-keys.toml"
    scene.write_text(text[:cut] + text[end:], encoding="utf-8")
    report = tmp_path / "ui.json"
    with open(tmp_path / "viewer.log", "wb") as log:
        proc = subprocess.Popen([*PERIFOCAL, "open", str(scene), "--size", "960x540",
                                 "--ui-scale", "0.5", "--present", "--ui-report", str(report)],
                                env=display.env, stdout=log, stderr=subprocess.STDOUT)
    try:
        wait_for(lambda: (r := read_report(report)) and r["frames"] >= 3, what="the window")
        origin = window_origin(display)
        first = window_pixels(display, origin, (960, 540))
        for _ in range(3):
            press(display, report, "bracketright")
        ui = press(display, report, "space", playing=True)
        ui = wait_for(lambda: (r := read_report(report)) and not r["playing"] and r, 60,
                      "the show to end")
        assert ui["show_s"] == 20.0 and ui["frame"] == 599
        # key 2: width = "10 au" (the au of IAU 2012 Resolution B2)
        assert ui["camera_width_m"] == pytest.approx(10 * 1.495978707e11)
        time.sleep(0.5)  # the last frame on the X server
        time_shot = window_pixels(display, origin, (960, 540))
        display.xdotool("key", "ctrl+q")
        assert proc.wait(timeout=60) == 0
    finally:
        if proc.poll() is None:
            proc.kill()
    out = tmp_path / "frames"
    run = subprocess.run([*PERIFOCAL, "render", str(scene), "--frames", "599:600", "--size",
                          "960x540", "-o", f"{out}/"], capture_output=True, text=True,
                         timeout=180)
    assert run.returncode == 0, run.stderr
    exported = _rgb(out / "frame_000599.png").astype(int)
    # At the end the window shows the show's last frame, 599, as the export writes it.
    differ = (np.abs(time_shot - exported).max(axis=2) > 8).mean()
    moved = (np.abs(first - exported).max(axis=2) > 40).mean()
    assert differ < 0.002 and moved > 10 * differ  # (read from the X server: a few edge
    # pixels of text differ)


def test_a_fade_point_dragged_on_the_timeline_moves_in_the_saved_show(
        display: Display, tmp_path: Path) -> None:
    """The demo's sector fade runs 1 s -> 4 s; its second point dragged with the mouse to
    about 8 s is saved, and what the exporter draws follows (the opacity at 4 s is no
    longer 1)."""
    from viewer.scene import load_scene
    from viewer.scene.timeline import mark_opacity

    scene = tmp_path / "demo.toml"
    shutil.copy(ROOT / "scenes" / "demo.toml", scene)
    report = tmp_path / "ui.json"
    with open(tmp_path / "viewer.log", "wb") as log:
        proc = subprocess.Popen([*PERIFOCAL, "open", str(scene), "--size", "1600x900",
                                 "--timeline", "--ui-report", str(report)],
                                env=display.env, stdout=log, stderr=subprocess.STDOUT)
    try:
        ui = wait_for(lambda: (r := read_report(report)) and r["frames"] >= 3
                      and "timeline:fade:0:1" in r["rects"] and r, what="the timeline")
        from support.xwindow import window_origin

        ox, oy = window_origin(display)
        x0, y0, x1, y1 = ui["rects"]["timeline:fade:0:1"]
        axis = ui["timeline_axis"]
        to_x = axis["x0"] + (axis["x1"] - axis["x0"]) * 8.0 / axis["duration_s"]
        cx, cy = ox + int((x0 + x1) / 2), oy + int((y0 + y1) / 2)
        display.xdotool("mousemove", str(cx), str(cy))
        time.sleep(0.3)
        display.xdotool("mousedown", "1")
        for k in range(1, 9):
            time.sleep(0.08)
            display.xdotool("mousemove", str(int(cx + (ox + to_x - cx) * k / 8)), str(cy))
        time.sleep(0.3)
        display.xdotool("mouseup", "1")
        ui = wait_for(lambda: (r := read_report(report)) and r["dirty"] and r, what="the drag")
        moved = ui["show"]["fades"][0][1]
        assert 7.5 <= moved <= 8.5 and ui["show"]["fades"][0][0] == 1.0
        press(display, report, "ctrl+s", dirty=False)
        display.xdotool("key", "ctrl+q")
        assert proc.wait(timeout=60) == 0
    finally:
        if proc.poll() is None:
            proc.kill()
    saved = load_scene(scene)
    assert saved.timeline.fades[0].at_s == pytest.approx((1.0, moved))
    assert mark_opacity(saved, "Skerry", "sweep", 4.0) < 0.8  # was 1 at 4 s before
    assert mark_opacity(saved, "Skerry", "sweep", moved) == pytest.approx(1.0)


def _fill_extent(img: np.ndarray) -> np.ndarray:
    """The box (x0, y0, x1, y1) px of a sector fill's orange (not its bright lines or
    labels): the 0.5 and 99.5 percentiles of where the pixels are, so a stray pixel does
    not count."""
    rgb = img[..., :3].astype(int)
    r, g, b = rgb[..., 0], rgb[..., 1], rgb[..., 2]
    fill = (r - b > 35) & (g - b > 15) & (rgb.max(axis=2) < 170) & (r > 50)
    ys, xs = np.nonzero(fill)
    assert xs.size > 5000, "the sectors are not in the picture"
    return np.array([np.percentile(xs, 0.5), np.percentile(ys, 0.5),
                     np.percentile(xs, 99.5), np.percentile(ys, 99.5)])


def test_with_the_timeline_up_the_window_frames_the_exported_picture(
        display: Display, tmp_path: Path) -> None:
    """With the panels up, the show frame (the render size fitted between the panels) holds
    what the export shows: Skerry's equal-time sectors (their fill, #ffb347 at 0.4 in
    demo.toml) span the same part of the frame as of the exported image, within 1 % of
    its width. (Labels and lines keep the window's sizes, so they are not compared.)"""
    scene = str(ROOT / "scenes" / "demo.toml")
    shot, report = tmp_path / "window.png", tmp_path / "ui.json"
    run = subprocess.run([*PERIFOCAL, "open", scene, "--size", "1600x900", "--timeline",
                          "--show-at", "8 s", "--screenshot", str(shot), "--quit-after", "6",
                          "--ui-report", str(report)], env=display.env, capture_output=True,
                         text=True, timeout=180)
    assert run.returncode == 0, run.stderr
    x, y, w, h = read_report(report)["show_frame"]  # type: ignore[index]
    assert abs(w / h - 16 / 9) < 0.01 and w > 600  # demo.toml renders 1920 x 1080
    window = _rgb(shot)[y:y + h, x:x + w]
    out = tmp_path / "still.png"
    run = subprocess.run([*PERIFOCAL, "render", scene, "--show-at", "8 s", "--size",
                          f"{w}x{h}", "-o", str(out)], capture_output=True, text=True,
                         timeout=180)
    assert run.returncode == 0, run.stderr
    a, b = _fill_extent(window), _fill_extent(_rgb(out))
    assert np.abs(a - b).max() < 0.01 * w, (a, b)


def test_the_time_axis_zooms_with_ctrl_wheel_and_a_click_snaps_to_its_grid(
        display: Display, tmp_path: Path) -> None:
    """Real input: a click on the ruler a pixel or two off 12 s of the demo's 20 s show goes
    to 12 s (the grid's steps are 0.5 s at 28 px/s), K keys the view there; Ctrl+wheel over
    the tracks zooms the axis around the pointer, and "whole show" undoes the zoom."""
    from support.xwindow import click, viewer_on_bundled, window_origin

    with viewer_on_bundled(display, tmp_path, "demo.toml") as (report, origin, _scene):
        press(display, report, "ctrl+t", show_timeline=True)
        ui = wait_for(lambda: (r := read_report(report)) and "timeline_axis" in r
                      and "button:whole show" in r["rects"] and r, what="the timeline")
        ox, oy = window_origin(display)
        axis = ui["timeline_axis"]
        x = axis["x0"] + (axis["x1"] - axis["x0"]) * 12.0 / axis["duration_s"] + 1.6
        y = axis["top"] + axis["row_h"] / 2
        display.xdotool("mousemove", str(ox + int(x)), str(oy + int(y)))
        time.sleep(0.3)
        display.xdotool("click", "1")
        wait_for(lambda: (r := read_report(report)) and r["show_s"] == 12.0, what="12 s")
        ui = press(display, report, "k", dirty=True)
        assert 12.0 in ui["show"]["camera_keys"]
        display.xdotool("keydown", "ctrl")
        for _ in range(3):
            display.xdotool("click", "4")
            time.sleep(0.1)
        display.xdotool("keyup", "ctrl")
        ui = wait_for(lambda: (r := read_report(report)) and r["timeline_axis"]["to_s"]
                      - r["timeline_axis"]["from_s"] < 19.0 and r, what="the zoom")
        a, b = ui["timeline_axis"]["from_s"], ui["timeline_axis"]["to_s"]
        assert b - a == pytest.approx(20.0 * 0.8 ** 3, rel=1e-6)
        assert a < 12.0 < b  # around the pointer (12 s)
        click(display, origin, ui["rects"]["button:whole show"])
        wait_for(lambda: (r := read_report(report)) and r["timeline_axis"]["from_s"] == 0.0
                 and r["timeline_axis"]["to_s"] == 20.0, what="the whole show")
