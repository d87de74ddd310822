"""The window leaves unchanged panels on a screen that keeps its pixels and draws only
the picture between them anew (viewer.gui.imgui_gl.PanelRenderer.render's ``picture``),
and the panels' time readouts move on at most READOUT_HZ times a second while time
plays (Session).

What must hold: a frame that left the panels on the screen is, pixel for pixel, the
frame drawn whole (every panel drawn over a cleared screen) in the same state; after
the panels change (another body selected, a window opened and closed) likewise; and a
screen that does not keep its pixels is drawn whole every frame.
"""

from __future__ import annotations

import json
import subprocess
import sys
from pathlib import Path

from support.xwindow import ROOT, WINDOW, Display

from viewer.gui.clock import Clock
from viewer.gui.editor import Editor
from viewer.gui.imgui_gl import _outside
from viewer.gui.session import READOUT_HZ, Session

_KEPT_AND_WHOLE = """
import json, sys
import numpy as np
from viewer.gui.editor import Editor
from viewer.gui.window import ViewerWindow
win = ViewerWindow(Editor.open(sys.argv[1]), size=(1600, 900))
s, clock = win.session, win.session.clock
drawn = []
render = win.panel_renderer.render
def counted(*a, **k):
    drawn.append(render(*a, **k))
    return drawn[-1]
win.panel_renderer.render = counted
lists_drawn = []  # (lists drawn, lists in the frame) per frame that drew panels
draw_lists = win.panel_renderer._draw
def counted_lists(lists, *a):
    lists_drawn.append((len(lists), len(list(win._imgui.get_draw_data().cmd_lists))))
    return draw_lists(lists, *a)
win.panel_renderer._draw = counted_lists
pictures = []  # one entry per flat picture drawn
draw_picture = win.renderer.draw
def counted_picture(*a, **k):
    pictures.append(1)
    return draw_picture(*a, **k)
win.renderer.draw = counted_picture
def frame(dt=0.0):
    win.window.dispatch_events(); clock.advance(dt); win.draw()
    shot = win.screenshot(); win.window.flip()
    return shot
out = {"keeps": win.screen_keeps_pixels, "checks": []}
def check(label):
    # The same state twice: the readout held, the clock not moved. The first frame may
    # leave the panels on the screen; the second is drawn whole after forget().
    s.update_readout = lambda wall_s: None
    frame()
    n_pictures = len(pictures)
    kept = frame()
    skipped = drawn[-1] is False
    picture_kept = len(pictures) == n_pictures
    win.panel_renderer.forget()
    whole = frame()
    del s.update_readout
    diff = int((kept != whole).any(axis=2).sum())
    out["checks"].append([label, skipped, diff, picture_kept])
steps = [  # (what changes, then frames played before the check, its label)
    ("play", 6, "flat, playing"),
    ("timeline", 3, "flat, timeline shown"),  # the show frame dimmed: reaches the picture
    ("no timeline", 3, "flat, timeline hidden"),
    ("dome", 6, "dome, playing"),
    ("select", 1, "dome, another body selected"),
    ("plots", 3, "dome, plots open"),
    ("no plots", 3, "dome, plots closed"),
    ("panorama", 3, "panorama, paused"),
]
changes = {
    "play": lambda: setattr(clock, "playing", True),
    "timeline": lambda: setattr(s, "show_timeline", True),
    "no timeline": lambda: setattr(s, "show_timeline", False),
    "dome": lambda: setattr(s, "view_mode", "dome"),
    "select": lambda: win.editor.select(2),
    "plots": lambda: setattr(s, "show_plots", True),
    "no plots": lambda: setattr(s, "show_plots", False),
    "panorama": lambda: (setattr(clock, "playing", False),
                         setattr(s, "view_mode", "panorama")),
}
for change, frames, label in steps:
    changes[change]()
    for _ in range(frames):
        frame(1 / 60)
    check(label)
win.screen_keeps_pixels = False
s.view_mode = "dome"
for _ in range(3):
    frame()
n = len(drawn)
for _ in range(3):
    frame()
out["whole_without_keeping"] = all(drawn[n:])
out["lists_drawn"] = lists_drawn
win.close()
print(json.dumps(out))
"""


@WINDOW[0]
@WINDOW[1]
def test_panels_left_on_the_screen_equal_panels_drawn_whole(display: Display,
                                                            tmp_path: Path) -> None:
    run = subprocess.run([sys.executable, "-c", _KEPT_AND_WHOLE,
                          str(ROOT / "scenes" / "demo.toml")],
                         env=display.env, capture_output=True, text=True, timeout=240)
    assert run.returncode == 0, run.stderr
    out = json.loads(run.stdout.strip().splitlines()[-1])
    assert out["keeps"] is True  # Xvfb with llvmpipe copies the back buffer on a swap
    for label, _skipped, diff, _picture in out["checks"]:
        assert diff == 0, (label, diff)
    skipped = {label: s for label, s, _, _ in out["checks"]}
    picture_kept = {label: p for label, _, _, p in out["checks"]}
    # The same show frame again with no panel over the picture: the picture was left on
    # the screen too (the renderer's geometry is the same object, not drawn again), and
    # equals the picture drawn whole (diff 0 above).
    assert picture_kept["flat, playing"] and picture_kept["flat, timeline hidden"]
    assert not picture_kept["flat, timeline shown"]  # dimmed frame: a panel reaches in
    # Frames drew only the panels that changed (and those they touch), not all of them.
    assert any(0 < n < total for n, total in out["lists_drawn"])
    # Nothing changed between the two frames: the panels were left on the screen.
    assert skipped["flat, playing"] and skipped["dome, playing"] and \
        skipped["panorama, paused"]
    assert not skipped["flat, timeline shown"]  # drawn whole while a panel reaches in
    assert out["whole_without_keeping"]


def test_the_screen_outside_a_picture_is_covered_once() -> None:
    """The rectangles cleared round the picture and the picture tile the screen."""
    import numpy as np

    for picture in [(10, 20, 300, 200), (0, 0, 640, 480), (-5, 100, 50, 50),
                    (600, 400, 100, 100), (700, 10, 20, 20)]:
        cover = np.zeros((480, 640), dtype=int)
        for x, y, w, h in _outside(picture, (640, 480)):
            assert w > 0 and h > 0
            cover[y:y + h, x:x + w] += 1
        x, y, w, h = picture
        inside = np.zeros_like(cover)
        inside[max(0, y):max(0, y + h), max(0, x):max(0, x + w)] = 1
        if inside.sum() == 0:  # a picture off the screen: the whole screen is cleared
            assert (cover == 1).all()
        else:
            assert ((cover + inside) == 1).all(), picture


def test_readouts_move_on_at_most_readout_hz_while_playing() -> None:
    ed = Editor.open(ROOT / "scenes" / "laws.toml")
    s = Session(editor=ed, clock=Clock.for_scene(ed.scene), camera=ed.scene.camera)
    c = s.clock
    assert s.readout_t_s == c.t_s  # before any update: the clock's
    c.playing = True
    s.update_readout(100.0)
    start = c.t_s
    assert s.readout_t_s == start
    c.advance(0.04)
    s.update_readout(100.04)
    assert s.readout_t_s == start != c.t_s  # held within 1 / READOUT_HZ
    first = s.readout(0)
    assert s.readout(0) is first  # the same readout object while nothing changes
    s.update_readout(100.0 + 1.5 / READOUT_HZ)
    assert s.readout_t_s == c.t_s  # moved on
    assert s.readout(0) is not first
    c.advance(0.04)
    c.playing = False
    assert s.readout_t_s == c.t_s  # paused: the clock's at once


_SHOWN = """
import sys, time
import numpy as np
from viewer.gui.editor import Editor
from viewer.gui.window import ViewerWindow
win = ViewerWindow(Editor.open(sys.argv[1]), size=(1280, 720))
win.window.set_location(0, 0)
s = win.session
for _ in range(20):  # mapped, laid out, settled
    win.window.dispatch_events(); time.sleep(0.02); win.draw_frame()
win.show_drawn()
s.overlays["grid"] = False  # a frame unlike the one before it
s.overlays["stars"] = False
win.window.dispatch_events(); win.draw_frame()
queued = win.screenshot()[..., :3]
print("queued, screen shows the one before", flush=True)
sys.stdin.readline()
win.show_drawn()
time.sleep(0.3)
np.save(sys.argv[2], queued)
print("shown", flush=True)
sys.stdin.readline()
win.close()
"""


@WINDOW[0]
@WINDOW[1]
def test_the_loop_shows_a_queued_frame_once_nothing_follows(display: Display,
                                                            tmp_path: Path) -> None:
    """draw_frame queues a frame and swaps the one before onto the screen; show_drawn
    (the loop calls it before it waits for input) puts the queued one on: the X server
    then shows exactly what the window drew."""
    import numpy as np

    out = tmp_path / "queued.npy"
    with subprocess.Popen([sys.executable, "-c", _SHOWN, str(ROOT / "scenes" / "demo.toml"),
                           str(out)], env=display.env, stdin=subprocess.PIPE,
                          stdout=subprocess.PIPE, stderr=subprocess.DEVNULL,
                          text=True) as proc:
        try:
            assert proc.stdout is not None and proc.stdin is not None
            assert proc.stdout.readline().startswith("queued")
            before = display.screen()[:720, :1280].astype(int)
            proc.stdin.write("\n")
            proc.stdin.flush()
            assert proc.stdout.readline().startswith("shown")
            after = display.screen()[:720, :1280].astype(int)
            proc.stdin.write("\n")
            proc.stdin.flush()
            assert proc.wait(timeout=60) == 0
        finally:
            if proc.poll() is None:
                proc.kill()
    queued = np.load(out).astype(int)
    assert (after.max(axis=2) > 60).sum() > 5000  # panels and orbits, not a blank screen
    assert np.abs(after - queued).max() <= 1  # the queued frame, now on the screen
    assert (np.abs(before - queued).max(axis=2) > 8).sum() > 500  # and not before
