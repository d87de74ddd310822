"""The window in front of an audience, under Xvfb with real key presses (xdotool):
presentation mode leaves no panel pixel, "fit" frames the whole scene in the free area,
the overlay switches change the picture but not the file, Esc closes the plots, and the
panels stay docked to the window's edges when it is resized."""

from __future__ import annotations

import time
from pathlib import Path

import numpy as np
import pytest
from support.xwindow import (
    WINDOW,
    Display,
    press,
    read_report,
    viewer_on_bundled,
    wait_for,
    window_pixels,
)

from viewer.gui.panels.widgets import GAP, LEFT_W, MENU_H, RIGHT_W, TIME_H, scene_area
from viewer.gui.theme import HEADER

pytestmark = WINDOW

W, H = 1600, 900
DUNMORE = (0xc7, 0xa4, 0xff)  # the demo's outermost orbit colour (scenes/demo.toml)
TITLE = tuple(round(255 * c) for c in HEADER[:3])  # a panel's active title bar


def near(px: np.ndarray, rgb: tuple[int, ...], tol: int) -> np.ndarray:
    return np.all(np.abs(px - np.array(rgb, dtype=np.int16)) <= tol, axis=-1)


@pytest.fixture
def demo(display: Display, tmp_path: Path):  # type: ignore[no-untyped-def]
    with viewer_on_bundled(display, tmp_path, "demo.toml") as running:
        yield running


def test_presentation_mode_leaves_no_panel_pixels(display: Display, demo) -> None:  # type: ignore[no-untyped-def]
    report, origin, _ = demo
    before = window_pixels(display, origin)
    assert near(before, TITLE, 3).sum() > 1000  # the panels' title bars are on screen
    ui = press(display, report, "F10", presenting=True)
    assert ui["rects"] == {}  # no panel drew anything
    time.sleep(0.5)
    after = window_pixels(display, origin)
    assert near(after, TITLE, 3).sum() == 0
    # The picture now fills the window: the outer orbit is drawn where the panels were.
    cols = np.flatnonzero(near(after, DUNMORE, 40).any(axis=0))
    assert cols.size and cols.min() < scene_area((W, H))[0]
    press(display, report, "F10", presenting=False)


def test_fit_frames_the_whole_scene_in_the_free_area(display: Display, demo) -> None:  # type: ignore[no-untyped-def]
    report, origin, _ = demo
    press(display, report, "shift+Home")
    time.sleep(0.5)
    px = window_pixels(display, origin)
    orbit = near(px, DUNMORE, 20)
    # What the audience sees of the picture: the free area and the gaps between the
    # panels (the panels' own widgets, such as the colour swatches, are left out).
    orbit[:, : int(GAP + LEFT_W)] = False
    orbit[:, int(W - GAP - RIGHT_W):] = False
    orbit[: int(MENU_H)] = False
    orbit[int(H - GAP - TIME_H):] = False
    ys, xs = np.nonzero(orbit)
    x0, top, fw, fh = scene_area((W, H))
    assert xs.min() >= x0 and xs.max() < x0 + fw, (xs.min(), xs.max(), x0, fw)
    assert ys.min() >= top and ys.max() < top + fh, (ys.min(), ys.max(), top, fh)
    # ... and it fills it: the orbit spans most of the free height or width.
    assert max((ys.max() - ys.min()) / fh, (xs.max() - xs.min()) / fw) > 0.8
    ui = read_report(report)
    assert ui is not None and ui["dirty"] is False  # a view change, not an edit


def test_overlay_switches_change_the_picture_not_the_file(display: Display, demo) -> None:  # type: ignore[no-untyped-def]
    report, origin, scene = demo
    text = scene.read_text(encoding="utf-8")
    press(display, report, "F10", presenting=True)
    time.sleep(0.3)
    before = window_pixels(display, origin)
    ui = press(display, report, "shift+L", overlays={"labels": False})  # every label off
    assert ui["dirty"] is False
    time.sleep(0.5)
    after = window_pixels(display, origin)
    assert np.abs(after - before).sum() > 0  # the labels are gone from the picture
    ui = press(display, report, "shift+L", overlays={"labels": True})
    assert ui["dirty"] is False and scene.read_text(encoding="utf-8") == text


def test_esc_closes_the_plots_and_the_help(display: Display, demo) -> None:  # type: ignore[no-untyped-def]
    report, _, _ = demo
    press(display, report, "g", plots=True)
    press(display, report, "Escape", plots=False)
    press(display, report, "F1", help=True)
    press(display, report, "Escape", help=False)


def test_panels_stay_docked_when_the_window_is_resized(display: Display, demo) -> None:  # type: ignore[no-untyped-def]
    report, _, _ = demo
    ui = read_report(report)
    assert ui is not None
    tab = ui["rects"]["tab:Elements"]
    wid = display.xdotool("search", "--name", "Perifocal").split()[0]
    display.xdotool("windowsize", wid, "1400", "800")
    moved = wait_for(lambda: (r := read_report(report)) and r["rects"].get("tab:Elements")
                     and abs(r["rects"]["tab:Elements"][0] - (tab[0] - 200)) < 1.5 and r,
                     what="the Orbit panel to follow the right edge")
    # The Time panel stays along the bottom edge: its play button moved up by 100 px.
    assert moved["rects"]["button:Play"][1] == pytest.approx(
        ui["rects"]["button:Play"][1] - 100, abs=1.5)
