"""The viewer window under Xvfb, driven through the X server like a user would.

Each test starts its own ``Xvfb -screen 0 1920x1080x24`` (display number chosen by the
server, the screen mirrored to a file with -fbdir so the test can look at what X shows)
and runs ``perifocal open`` in a subprocess. Input goes through xdotool: real mouse
clicks and key presses, delivered by the X server to the window. The window's hidden
``--ui-report`` flag writes the panels' input rectangles and readout texts after every
frame, so the test knows where to click and what the panel says.
"""

from __future__ import annotations

import json
import math
import os
import shutil
import struct
import subprocess
import sys
import time
from collections.abc import Iterator
from pathlib import Path

import numpy as np
import pytest

from viewer.scene.loader import load_scene

pytestmark = [
    pytest.mark.window,
    pytest.mark.skipif(shutil.which("Xvfb") is None, reason="Xvfb is not installed"),
]

ROOT = Path(__file__).resolve().parents[1]
KM = 1e3
MU_EARTH = 3.986004418e14  # IERS Conventions (2010), the "earth" preset's GM, m^3/s^2
PERIFOCAL = [sys.executable, "-m", "viewer.cli"]

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


class Display:
    """A private X server; ``screen()`` is what it shows, as RGB (H, W, 3)."""

    def __init__(self, tmp: Path) -> None:
        self.fbdir = tmp / "fb"
        self.fbdir.mkdir()
        read, write = os.pipe()
        self.proc = subprocess.Popen(
            ["Xvfb", "-displayfd", str(write), "-screen", "0", "1920x1080x24", "-fbdir",
             str(self.fbdir), "-nolisten", "tcp"],
            pass_fds=(write,), stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL)
        os.close(write)
        with os.fdopen(read) as fh:
            number = fh.readline().strip()
        if not number:
            self.proc.kill()
            pytest.skip("Xvfb did not start")
        self.name = f":{number}"
        self.env = {**os.environ, "DISPLAY": self.name}

    def screen(self) -> np.ndarray:
        # XWD file: a big-endian header (its size first), a colormap of ncolors entries
        # of 12 bytes, then 32-bit pixels (byte order in the header; 0 = LSB first).
        data = (self.fbdir / "Xvfb_screen0").read_bytes()
        h = struct.unpack(">25I", data[:100])
        header, width, height, order, bpl, ncolors = h[0], h[4], h[5], h[7], h[12], h[19]
        start = header + 12 * ncolors
        px = np.frombuffer(data, dtype=np.uint8, count=bpl * height, offset=start)
        px = px.reshape(height, bpl)[:, : width * 4].reshape(height, width, 4)
        return px[..., [2, 1, 0]] if order == 0 else px[..., [1, 2, 3]]

    def xdotool(self, *args: str) -> str:
        out = subprocess.run(["xdotool", *args], env=self.env, capture_output=True,
                             text=True, timeout=30, check=True)
        return out.stdout

    def close(self) -> None:
        self.proc.terminate()
        try:
            self.proc.wait(timeout=10)
        except subprocess.TimeoutExpired:
            self.proc.kill()


@pytest.fixture
def display(tmp_path: Path) -> Iterator[Display]:
    d = Display(tmp_path)
    try:
        yield d
    finally:
        d.close()


def wait_for(predicate, timeout_s: float = 60.0, what: str = "the window"):  # type: ignore[no-untyped-def]
    end = time.monotonic() + timeout_s
    while time.monotonic() < end:
        value = predicate()
        if value:
            return value
        time.sleep(0.1)
    raise AssertionError(f"timed out waiting for {what}")


def read_report(path: Path) -> dict | None:
    try:
        return json.loads(path.read_text(encoding="utf-8"))
    except (OSError, ValueError):
        return None


def settled_report(path: Path) -> dict | None:
    """The report once imgui has laid the panels out (its first frames size them)."""
    r = read_report(path)
    return r if r and r["frames"] >= 3 else None


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
    # The menu bar: a grey strip with its words on it, across the top.
    menu = img[2:18, :].reshape(-1, 3).astype(int)
    assert 20 < np.median(menu) < 90 and (menu.min(axis=1) > 180).sum() > 100
    # The scene between the side panels: dark sky with coloured orbit lines drawn on it.
    middle = img[100:700, 400:1100].reshape(-1, 3).astype(int)
    assert np.median(middle, axis=0).max() < 40
    assert (middle.max(axis=1) - middle.min(axis=1) > 60).sum() > 500  # coloured pixels
    # Every row of the readout carries a unit (or is the bare eccentricity).
    units = ("au", "km", "km/s", "deg", "MJ/kg", "km^2/s", " s", "min", " h", " d", "yr")
    for label, text in ui["readout"]:
        assert label.startswith("eccentricity") or any(u in text for u in units), label


def stable_rect(path: Path, name: str) -> dict | None:
    """The report once the rectangle ``name`` stays put for a few frames (a new popup
    sizes itself over its first frames)."""
    first = read_report(path)
    time.sleep(0.3)
    second = read_report(path)
    if not first or not second or name not in first["rects"] or name not in second["rects"]:
        return None
    return second if first["rects"][name] == second["rects"][name] else None


def start_viewer(display: Display, tmp: Path, scene: Path, report: Path) -> subprocess.Popen:
    """``perifocal open SCENE`` at 1600x900, its output in tmp/viewer.log."""
    with open(tmp / "viewer.log", "wb") as log:
        return subprocess.Popen([*PERIFOCAL, "open", str(scene), "--size", "1600x900",
                                 "--ui-report", str(report)], env=display.env,
                                stdout=log, stderr=subprocess.STDOUT)


def window_origin(display: Display) -> tuple[int, int]:
    wid = wait_for(lambda: display.xdotool("search", "--name", "Perifocal").split(),
                   what="the window to be mapped")[0]
    geo = display.xdotool("getwindowgeometry", "--shell", wid)
    values = dict(line.split("=", 1) for line in geo.split())
    return int(values["X"]), int(values["Y"])


def click(display: Display, origin: tuple[int, int], rect: list[float]) -> None:
    x = origin[0] + int((rect[0] + rect[2]) / 2)
    y = origin[1] + int((rect[1] + rect[3]) / 2)
    display.xdotool("mousemove", str(x), str(y))
    time.sleep(0.2)
    display.xdotool("click", "1")


def select_all(display: Display) -> None:
    """Ctrl+A as a hand presses it: xdotool's "key ctrl+a" comes so fast that pyglet
    delivers the Ctrl release before the A release, and imgui may then see A alone."""
    display.xdotool("keydown", "ctrl")
    time.sleep(0.1)
    display.xdotool("key", "a")
    time.sleep(0.1)
    display.xdotool("keyup", "ctrl")


def type_into(display: Display, origin: tuple[int, int], rect: list[float], text: str) -> None:
    """Click into an input, select what is there, type ``text`` and press Enter."""
    click(display, origin, rect)
    time.sleep(0.3)
    select_all(display)
    display.xdotool("type", "--delay", "30", text)
    display.xdotool("key", "Return")


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
