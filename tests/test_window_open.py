"""The viewer window under Xvfb, driven through the X server like a user would.

Each test starts its own ``Xvfb -screen 0 1920x1080x24`` (display number chosen by the
server, the screen mirrored to a file with -fbdir so the test can look at what X shows)
and runs ``perifocal open`` in a subprocess. Input goes through xdotool: real mouse
clicks and key presses, delivered by the X server to the window. The window's hidden
``--ui-report`` flag writes the panels' input rectangles and readout texts after every
frame, so the test knows where to click and what the panel says.
"""

from __future__ import annotations

import math
import os
import shutil
import subprocess
import sys
import time
from pathlib import Path

import numpy as np
import pytest
from reference_values import KM, MU_EARTH
from support.xwindow import (
    PERIFOCAL,
    ROOT,
    Display,
    click,
    read_report,
    settled_report,
    stable_rect,
    start_viewer,
    type_into,
    wait_for,
    window_origin,
)

from viewer.scene.loader import load_scene

pytestmark = [
    pytest.mark.window,
    pytest.mark.skipif(shutil.which("Xvfb") is None, reason="Xvfb is not installed"),
]


EARTH_SCENE = """\
# A low orbit for the window tests.
[scene]
title = "Window test"
epoch = "2030-01-01T00:00:00 TDB"
units = { length = "km", time = "min", angle = "deg" }

[center]
name = "Earth"
preset = "earth"

[[body]]
name = "Low"   # this comment must survive the save
a = "6778.137 km"
e = 0.001
i = "51.6 deg"

[camera]
width = "30000 km"
"""


def test_screenshot_of_a_bundled_scene_shows_the_scene_and_the_panels(
        display: Display, tmp_path: Path) -> None:
    shot = tmp_path / "shot.png"
    report = tmp_path / "ui.json"
    run = subprocess.run([*PERIFOCAL, "open", str(ROOT / "scenes" / "demo.toml"),
                          "--size", "1600x900", "--screenshot", str(shot), "--quit-after", "4",
                          "--ui-report", str(report)],
                         env=display.env, capture_output=True, text=True, timeout=120)
    assert run.returncode == 0, run.stderr
    from PIL import Image

    img = np.asarray(Image.open(shot).convert("RGB"))
    assert img.shape == (900, 1600, 3)
    ui = read_report(report)
    assert ui is not None and ui["frames"] == 4, ui
    assert ui["message"] == "", ui["message"]
    # The element editor's "a" field: a dark input frame with the value's light text.
    x0, y0, x1, y1 = (int(round(v)) for v in ui["rects"]["a"])
    assert 1000 < x0 < x1 <= 1600 and 0 < y0 < y1 < 900  # in the right-hand panel
    field = img[y0 + 2:y1 - 2, x0 + 2:x1 - 2].reshape(-1, 3).astype(int)
    assert 10 < np.median(field) < 90 and field.max() > 180
    # The menu bar: a dark strip (the panels' own blue-black) with its words on it.
    menu = img[2:18, :].reshape(-1, 3).astype(int)
    assert 10 < np.median(menu) < 90 and (menu.min(axis=1) > 180).sum() > 100
    # The scene between the side panels: dark sky with coloured orbit lines drawn on it.
    middle = img[100:700, 400:1100].reshape(-1, 3).astype(int)
    assert np.median(middle, axis=0).max() < 40
    assert (middle.max(axis=1) - middle.min(axis=1) > 60).sum() > 500  # coloured pixels
    # Every row of the readout carries a unit (or is the bare eccentricity).
    units = ("au", "km", "km/s", "deg", "MJ/kg", "km^2/s", " s", "min", " h", " d", "yr")
    for label, text in ui["readout"]:
        assert label.startswith("eccentricity") or any(u in text for u in units), label


def test_typing_a_new_semi_major_axis_changes_the_period_the_picture_and_the_file(
        display: Display, tmp_path: Path) -> None:
    scene = tmp_path / "leo.toml"
    scene.write_text(EARTH_SCENE, encoding="utf-8")
    report = tmp_path / "ui.json"
    proc = start_viewer(display, tmp_path, scene, report)
    try:
        ui = wait_for(lambda: settled_report(report), what="the first frames")
        origin = window_origin(display)
        period_before = dict(ui["readout"])["period"]
        assert period_before.startswith("92.5")  # 92.56 min for a = 6778.137 km
        time.sleep(0.5)
        before = display.screen()

        type_into(display, origin, ui["rects"]["a"], "12000 km")

        def period_changed() -> dict | None:
            r = read_report(report)
            return r if r and dict(r["readout"])["period"] != period_before else None

        ui = wait_for(period_changed, what="the period to change")
        # Third law: T = 2 pi sqrt(a^3 / mu) = 3.6344 h for a = 12 000 km (IERS GM).
        T = 2 * math.pi * math.sqrt((12_000 * KM) ** 3 / MU_EARTH)
        assert ui["values"]["period_s"] == pytest.approx(T, rel=1e-12)
        assert dict(ui["readout"])["period"].startswith(f"{T / 3600:.7g} h")
        assert ui["dirty"] is True
        time.sleep(0.5)
        after = display.screen()
        # The drawn orbit moved: the picture between the panels changed.
        changed = np.abs(after[100:700, 400:1100].astype(int)
                         - before[100:700, 400:1100].astype(int)).max(axis=2) > 40
        assert changed.sum() > 200

        display.xdotool("key", "ctrl+s")
        wait_for(lambda: (r := read_report(report)) and r["dirty"] is False,
                 what="the save")
        text = scene.read_text(encoding="utf-8")
        assert "# this comment must survive the save" in text
        assert float(load_scene(scene).bodies[0].elements.a) == pytest.approx(12_000 * KM,
                                                                              rel=1e-12)
        display.xdotool("key", "ctrl+q")
        assert proc.wait(timeout=30) == 0
    finally:
        if proc.poll() is None:
            proc.kill()
            proc.wait()


def test_quitting_with_unsaved_changes_asks_first(display: Display, tmp_path: Path) -> None:
    scene = tmp_path / "leo.toml"
    scene.write_text(EARTH_SCENE, encoding="utf-8")
    report = tmp_path / "ui.json"
    proc = start_viewer(display, tmp_path, scene, report)
    try:
        ui = wait_for(lambda: settled_report(report), what="the first frames")
        origin = window_origin(display)
        type_into(display, origin, ui["rects"]["e"], "0.2")
        wait_for(lambda: (r := read_report(report)) and r["dirty"], what="the edit")
        display.xdotool("key", "ctrl+q")
        wait_for(lambda: (r := read_report(report)) and r["prompt"] == "unsaved" and
                 "prompt:discard" in r["rects"], what="the prompt")
        ui = wait_for(lambda: stable_rect(report, "prompt:discard"), what="the prompt's layout")
        assert proc.poll() is None  # still open, asking
        click(display, origin, ui["rects"]["prompt:discard"])
        assert proc.wait(timeout=30) == 0
        assert scene.read_text(encoding="utf-8") == EARTH_SCENE  # nothing was saved
    finally:
        if proc.poll() is None:
            proc.kill()
            proc.wait()


def test_open_without_a_display_says_so_in_one_line(tmp_path: Path) -> None:
    scene = tmp_path / "leo.toml"
    scene.write_text(EARTH_SCENE, encoding="utf-8")
    env = {k: v for k, v in os.environ.items() if k not in ("DISPLAY", "WAYLAND_DISPLAY")}
    run = subprocess.run([*PERIFOCAL, "open", str(scene)], env=env, capture_output=True,
                         text=True, timeout=60)
    assert run.returncode == 2
    assert "no display" in run.stderr and "Traceback" not in run.stderr


@pytest.mark.parametrize(("view", "flag"), [("dome", "--dome"), ("panorama", "--panorama")])
def test_the_dome_and_panorama_previews_are_the_exported_masters(
        display: Display, tmp_path: Path, view: str, flag: str) -> None:
    from PIL import Image

    scene = str(ROOT / "scenes" / "demo.toml")
    shot = tmp_path / f"{view}-window.png"
    report = tmp_path / "ui.json"
    run = subprocess.run([*PERIFOCAL, "open", scene, "--size", "1600x900", "--view", view,
                          "--screenshot", str(shot), "--quit-after", "3",
                          "--ui-report", str(report)],
                         env=display.env, capture_output=True, text=True, timeout=180)
    assert run.returncode == 0, run.stderr
    ui = read_report(report)
    assert ui is not None and ui["view"] == view and ui["message"] == "", ui
    x, y, w, h = ui["preview_rect"]
    assert w == (h if view == "dome" else 2 * h) and h >= 300  # the area between panels
    window = np.asarray(Image.open(shot).convert("RGB")).astype(int)
    assert window.shape == (900, 1600, 3)  # the whole window, panels included
    a = window[y:y + h, x:x + w]
    master = tmp_path / f"{view}-master.png"
    run = subprocess.run([*PERIFOCAL, "render", scene, flag, "--size", f"{w}x{h}",
                          "-o", str(master)], capture_output=True, text=True, timeout=180)
    assert run.returncode == 0, run.stderr
    b = np.asarray(Image.open(master).convert("RGB")).astype(int)
    assert np.abs(a - b).max() <= 1       # the same frame, the same time, the same text
    assert (b.max(axis=2) > 60).sum() > 2000  # and it is not an empty picture


_DRAFT_AND_STILL = """
import json, sys
from pathlib import Path
import numpy as np
from viewer.gui.editor import Editor
from viewer.gui.window import ViewerWindow
win = ViewerWindow(Editor.open(sys.argv[1]), size=(1600, 900))
clock = win.session.clock
win.session.view_mode = "dome"
clock.playing = True
for _ in range(6):  # playing: the draft, drawn straight onto the screen
    win.window.dispatch_events(); clock.advance(1 / 60); win.draw(); win.window.flip()
win.draw()
draft = win.screenshot()
clock.playing = False
for _ in range(3):  # stopped: the export's own frame, blitted
    win.window.dispatch_events(); win.draw(); win.window.flip()
win.draw()
still = win.screenshot()
x, y, w, h = win.preview_rect
np.save(sys.argv[2], np.stack([draft[y:y + h, x:x + w, :3], still[y:y + h, x:x + w, :3]]))
win.close()
"""


def test_the_playing_dome_draft_matches_the_still_preview(display: Display,
                                                          tmp_path: Path) -> None:
    """While the show plays the dome preview is a draft (four faces, one sample a pixel,
    drawn straight onto the screen, rows counted from the bottom): upright, in place, and
    differing from the still frame at the same time only where lines are resampled."""
    out = tmp_path / "frames.npy"
    run = subprocess.run([sys.executable, "-c", _DRAFT_AND_STILL,
                          str(ROOT / "scenes" / "demo.toml"), str(out)],
                         env=display.env, capture_output=True, text=True, timeout=180)
    assert run.returncode == 0, run.stderr
    draft, still = np.load(out).astype(int)
    lit = still.max(axis=2) > 60
    assert lit.sum() > 2000  # the orbits and labels are there
    diff = np.abs(draft - still).max(axis=2)
    assert diff.mean() < 2.0  # measured 0.79 at 924 px
    assert (diff > 100).sum() < 0.001 * diff.size
    # Upright: mirrored rows would move the lit pixels' centre far from the still's.
    rows = np.nonzero(lit)[0].mean(), np.nonzero(draft.max(axis=2) > 60)[0].mean()
    assert abs(rows[0] - rows[1]) < 2.0


@pytest.mark.parametrize(("name", "has_field"), [("demo.toml", False), ("laws.toml", True)])
def test_the_time_panel_offers_a_rate_only_off_the_show(display: Display, tmp_path: Path,
                                                        name: str, has_field: bool) -> None:
    """On a show the clock runs at the show's pace, so the Time panel says so instead of
    offering a rate that would change nothing (demo.toml has a show; laws.toml has none)."""
    report = tmp_path / "ui.json"
    run = subprocess.run([*PERIFOCAL, "open", str(ROOT / "scenes" / name), "--size",
                          "1600x900", "--quit-after", "3", "--ui-report", str(report)],
                         env=display.env, capture_output=True, text=True, timeout=180)
    assert run.returncode == 0, run.stderr
    ui = read_report(report)
    assert ui is not None and ui["on_show"] is not has_field, ui
    assert ("rate" in ui["rects"]) is has_field


_WINDOW_AFTER_A_HEADLESS_RENDER = """
import sys
import numpy as np
from viewer.gui.editor import Editor
from viewer.gui.window import ViewerWindow
from viewer.render.frame import FrameSource
from viewer.scene import load_scene
with FrameSource(load_scene(sys.argv[1]), (320, 180)) as frames:  # a headless context
    before = frames.frame(0)
win = ViewerWindow(Editor.open(sys.argv[1]), size=(1280, 720))
win.session.view_mode = "dome"
for _ in range(3):  # the still preview: the export's frame, blitted
    win.window.dispatch_events(); win.draw(); win.window.flip()
win.draw()
x, y, w, h = win.preview_rect
np.save(sys.argv[2], win.screenshot()[y:y + h, x:x + w, :3])
win.close()
"""


def test_a_window_after_a_headless_render_in_the_same_process_draws_its_preview(
        display: Display, tmp_path: Path) -> None:
    """A headless (EGL) context released before a window is made (as `perifocal bench`
    does, part after part) must leave no context current: the window's GL calls used to
    land in the released context, and its dome preview failed with an incomplete
    framebuffer (render.context.release_context)."""
    out = tmp_path / "preview.npy"
    run = subprocess.run([sys.executable, "-c", _WINDOW_AFTER_A_HEADLESS_RENDER,
                          str(ROOT / "scenes" / "demo.toml"), str(out)],
                         env=display.env, capture_output=True, text=True, timeout=180)
    assert run.returncode == 0, run.stderr
    preview = np.load(out)
    assert (preview.max(axis=2) > 60).sum() > 2000  # the orbits and labels are drawn
