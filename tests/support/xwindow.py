"""Driving the viewer window under Xvfb like a user: a private X server per test, real
input through xdotool, and the window's ``--ui-report`` file to know where the panels'
inputs are and what they show."""

from __future__ import annotations

import contextlib
import json
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

ROOT = Path(__file__).resolve().parents[2]
PERIFOCAL = [sys.executable, "-m", "viewer.cli"]
#: The marks of a window test module: ``pytestmark = WINDOW``.
WINDOW = [pytest.mark.window,
          pytest.mark.skipif(shutil.which("Xvfb") is None, reason="Xvfb is not installed")]


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
        # The viewer's per-user settings (UI scale, recent files) go to the test's folder.
        self.env = {**os.environ, "DISPLAY": self.name,
                    "XDG_CONFIG_HOME": str(tmp / "config")}

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


@contextlib.contextmanager
def running_viewer(display: Display, tmp: Path,
                   scene: Path) -> Iterator[tuple[Path, tuple[int, int]]]:
    """``perifocal open SCENE`` until the block ends: (report path, window origin). At the
    end it quits with Ctrl+Q (discarding unsaved changes at the prompt) and must exit 0."""
    report = tmp / "ui.json"
    proc = start_viewer(display, tmp, scene, report)
    try:
        wait_for(lambda: settled_report(report), what="the first frames")
        yield report, window_origin(display)
        display.xdotool("key", "ctrl+q")
        if (r := read_report(report)) and r["dirty"]:
            ui = wait_for(lambda: stable_rect(report, "prompt:discard"), what="the prompt")
            click(display, window_origin(display), ui["rects"]["prompt:discard"])
        assert proc.wait(timeout=60) == 0
    finally:
        if proc.poll() is None:
            proc.kill()


@contextlib.contextmanager
def viewer_on_bundled(display: Display, tmp: Path,
                      name: str) -> Iterator[tuple[Path, tuple[int, int], Path]]:
    """``running_viewer`` on a copy of the bundled scene ``scenes/NAME`` in ``tmp``:
    (report path, window origin, the copy's path)."""
    scene = tmp / name
    shutil.copy(ROOT / "scenes" / name, scene)
    with running_viewer(display, tmp, scene) as (report, origin):
        yield report, origin, scene


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




def window_pixels(display: Display, origin: tuple[int, int],
                  size: tuple[int, int] = (1600, 900)) -> np.ndarray:
    """What the window shows, as int16 RGB (H, W, 3) (signed, so differences work)."""
    x, y = origin
    return display.screen()[y:y + size[1], x:x + size[0]].astype(np.int16)


def press(display: Display, report: Path, key: str, **wanted: object) -> dict:
    """Press ``key``; the report of the first frame drawn after it with the wanted values."""
    start = read_report(report)["frames"]  # type: ignore[index]
    display.xdotool("key", key)
    return wait_for(lambda: (r := read_report(report)) and r["frames"] > start and all(
        r.get(k) == v for k, v in wanted.items()) and r, what=f"{key}: frames with {wanted}")
