"""Edits in the window keep the file and the picture true, under Xvfb with real input
(xdotool): a body duplicated and saved adds only its own table to the file (``diff``
shows nothing else), and after an edit of a the equal-time sectors still tile the whole
orbit on the screen, with no gap.

References: the second law (equal areas in equal times: the six sectors of one period
cover the ellipse in six equal areas, Vallado 4th ed. sec. 1.2, from memory); the
orbit's outline on the screen is projected here from the saved elements.
"""

from __future__ import annotations

import shutil
import subprocess
import time
import tomllib
from pathlib import Path

import numpy as np
import pytest
from PIL import Image, ImageDraw
from scipy import ndimage
from support.xwindow import (
    WINDOW,
    Display,
    press,
    read_report,
    type_into,
    viewer_on_bundled,
    wait_for,
    window_pixels,
)

from viewer.geometry.camera import view_for
from viewer.geometry.frame import ALTERNATE_FILL
from viewer.orbit import state_from_elements
from viewer.scene import load_scene

pytestmark = WINDOW

W, H = 1600, 900


@pytest.fixture
def mission(display: Display, tmp_path: Path):  # type: ignore[no-untyped-def]
    with viewer_on_bundled(display, tmp_path, "earth-mission.toml") as running:
        yield running


def test_duplicate_then_save_and_diff_shows_only_the_new_table(
        display: Display, mission, tmp_path: Path) -> None:  # type: ignore[no-untyped-def]
    report, _, scene = mission
    before = tmp_path / "before.toml"
    shutil.copy(scene, before)
    press(display, report, "Down", selection=1)  # "Wren transfer"
    press(display, report, "ctrl+d", bodies=["Wren parking", "Wren transfer",
                                             "Wren transfer copy", "Stint departure"])
    press(display, report, "ctrl+s", dirty=False)
    out = subprocess.run(["diff", str(before), str(scene)], capture_output=True, text=True)
    assert out.returncode == 1  # the files differ ...
    lines = out.stdout.splitlines()
    assert not [line for line in lines if line.startswith("<")]  # ... and nothing went
    hunks = [line for line in lines if line[:1].isdigit()]
    assert len(hunks) == 1 and "a" in hunks[0]  # one block, added
    added = [line[2:] for line in lines if line.startswith("> ")]
    # diff may place the block's "[[body]]" line at its end (the next table's header
    # matches): one header, the new name, the keys and a blank line, nothing else.
    assert 'name = "Wren transfer copy"' in added
    assert sum(line == "[[body]]" for line in added) == 1
    assert sum(line == "" for line in added) == 1
    # The new table holds the original's keys as the user wrote them.
    tables = tomllib.loads(scene.read_text(encoding="utf-8"))["body"]
    assert tables[2] == {**tables[1], "name": "Wren transfer copy"}


def test_after_an_edit_of_a_the_sectors_tile_the_orbit_on_the_screen(
        display: Display, mission) -> None:  # type: ignore[no-untyped-def]
    report, origin, scene = mission
    press(display, report, "Down", selection=1)  # "Wren transfer": six derived sectors
    type_into(display, origin, read_report(report)["rects"]["a"], "30000 km")  # was 24 421
    wait_for(lambda: (r := read_report(report)) and r["dirty"], what="the edit of a")
    press(display, report, "F10", presenting=True)  # no panel over the picture
    time.sleep(0.8)
    px = window_pixels(display, origin)
    press(display, report, "ctrl+s", dirty=False)
    saved = load_scene(scene)
    body = saved.body("Wren transfer")
    assert float(body.elements.a) == 30_000e3
    # The outline of the edited orbit on the screen, projected here, less a margin for
    # its line and less the Earth's disc at the focus.
    view = view_for(saved, 0.0, (W, H), saved.camera)
    nu = np.linspace(0.0, 2 * np.pi, 720, endpoint=False)
    outline, _ = view.project(np.asarray(state_from_elements(body.elements.with_(nu=nu))[0]))
    img = Image.new("L", (W, H), 0)
    ImageDraw.Draw(img).polygon([(float(x), float(y)) for x, y in outline], fill=1)
    inside = ndimage.binary_erosion(np.asarray(img) > 0, iterations=4)
    centre, _ = view.project(np.zeros((1, 3)))
    yy, xx = np.mgrid[:H, :W]
    earth_px = saved.center.radius_m * view.px_per_m
    inside &= np.hypot(xx - centre[0, 0], yy - centre[0, 1]) > earth_px + 12
    assert inside.sum() > 100_000
    red = px[..., 0][inside]
    # Tinted by a sector: the sweep colour at its opacity, every other one at
    # ALTERNATE_FILL of it (over the black sky).
    sweep = body.sweep
    assert sweep is not None
    bright = 255 * sweep.color[0] * sweep.opacity
    dim = ALTERNATE_FILL * bright
    sky = red < 0.5 * dim
    assert sky.mean() < 0.01, f"{100 * sky.mean():.1f} % of the orbit has no sector"
    # Six equal areas (the second law): the bright and the dim sectors share it evenly.
    n_bright = np.count_nonzero(np.abs(red - bright) < 12)
    n_dim = np.count_nonzero(np.abs(red - dim) < 12)
    assert n_bright + n_dim > 0.95 * red.size
    assert n_bright / (n_bright + n_dim) == pytest.approx(0.5, abs=0.02)
    # The reopened file draws the same sectors: the interval is still one period / 6.
    assert sweep.count * sweep.interval_s == pytest.approx(float(body.elements.period),
                                                           rel=1e-12)
