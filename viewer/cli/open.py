"""``perifocal open SCENE``: the interactive viewer and element editor.

The window, GL and imgui are imported inside ``run``, so the other commands do not pay
for them. With no display it says so in one line and exits 2.
"""

from __future__ import annotations

import argparse
import math
import os
from typing import Any

EXAMPLES = """examples:
  perifocal open scenes/demo.toml
  perifocal open my-orbit.toml --size 1920x1080
  perifocal open scenes/demo.toml --screenshot shot.png --quit-after 5
  in front of an audience: full screen on the second screen, panels hidden, larger text:
    perifocal open scenes/demo.toml --fullscreen --screen 1 --present --ui-scale 1.5
  perifocal open scenes/demo.toml --view dome --screenshot dome.png --quit-after 3
  build a show: perifocal open scenes/demo.toml --timeline --show-at "8 s"

In the window: select a body on the left, type new values with their units on the right
("400 km", "2.5 h", "12 deg") and press Enter; choose what is kept fixed with the lock.
Ctrl+Z undoes, Ctrl+S saves (comments in the file are kept), F1 lists every shortcut.
F10 hides every panel (presentation), F11 goes full screen, Shift+Home fits the whole
scene in view; Shift+L, G, S, F, W, A switch labels, grid, stars, foci, sectors and axes
for every body at once (view settings: the file is not changed).
--screenshot with --quit-after N draws N frames, saves the whole window (panels
included) as a PNG and exits 0.
"""


def _size(text: str) -> tuple[int, int]:
    from ..units.forms import SizeError, parse_size

    try:
        return parse_size(text, low=(320, 240), high=(8192, 8192))
    except SizeError as err:
        raise argparse.ArgumentTypeError(str(err)) from None


def _count(text: str) -> int:
    try:
        n = int(text)
    except ValueError:
        raise argparse.ArgumentTypeError(f"{text!r} is not a whole number of frames") from None
    if n < 1:
        raise argparse.ArgumentTypeError("--quit-after needs at least 1 frame")
    return n


def _scale(text: str) -> float:
    from ..gui.settings import UI_SCALE_RANGE

    try:
        value = float(text)
    except ValueError:
        raise argparse.ArgumentTypeError(f"{text!r} is not a number (e.g. 1.5)") from None
    lo, hi = UI_SCALE_RANGE
    if not (math.isfinite(value) and lo <= value <= hi):
        raise argparse.ArgumentTypeError(f"{text!r}: the UI scale is {lo:g} to {hi:g}")
    return value


def _screen_number(text: str) -> int:
    try:
        n = int(text)
    except ValueError:
        raise argparse.ArgumentTypeError(f"{text!r} is not a screen number (0, 1, ...)") from None
    if n < 0:
        raise argparse.ArgumentTypeError("screens are numbered from 0")
    return n


def add_parser(sub: Any) -> None:
    from . import CAUTION

    p = sub.add_parser(
        "open", help="open a scene in the viewer and element editor",
        description="Open a scene in the interactive viewer: edit elements with units and "
        "locks, watch the period and speeds follow, undo, save.",
        epilog=EXAMPLES + "\n" + CAUTION, formatter_class=argparse.RawDescriptionHelpFormatter,
    )
    p.add_argument("scene", metavar="SCENE", help="a scene file (.toml)")
    p.add_argument("--size", type=_size, default=(1600, 900), metavar="WxH",
                   help="window size in pixels (default 1600x900)")
    p.add_argument("--screenshot", metavar="PNG",
                   help="with --quit-after: save the whole window as PNG, then exit")
    p.add_argument("--force", action="store_true",
                   help="--screenshot: replace an existing file (the old one is kept as NAME.bak)")
    p.add_argument("--view", choices=("flat", "dome", "panorama"), default="flat",
                   help="open in this view: the flat picture, or the dome master or "
                   "panorama as the export makes it (key V switches)")
    p.add_argument("--show-at", metavar="T",
                   help="open paused at T seconds into the show (\"12.5 s\"; --at is scene "
                   "time); with --present and --screenshot the picture is the one "
                   "'perifocal render' makes of that frame")
    p.add_argument("--timeline", action="store_true",
                   help="open with the timeline panel shown (Ctrl+T toggles)")
    p.add_argument("--quit-after", type=_count, metavar="N",
                   help="draw N frames, then exit 0 (for tests and the docs' screenshots)")
    p.add_argument("--ui-scale", type=_scale, metavar="S",
                   help="scale panel text, labels and markers (0.5 to 3; saved for the next "
                   "windows; default: the saved scale, else 1)")
    p.add_argument("--fullscreen", action="store_true", help="open full screen (F11 toggles)")
    p.add_argument("--screen", type=_screen_number, metavar="N",
                   help="the screen to go full screen on (0 is the first)")
    p.add_argument("--present", action="store_true",
                   help="open in presentation mode: every panel hidden (F10 toggles)")
    # For tests and the docs' screenshot script: write the panels' input rectangles and
    # readout texts as JSON after every frame.
    p.add_argument("--ui-report", metavar="JSON", help=argparse.SUPPRESS)
    p.set_defaults(run=run)


def run(args: argparse.Namespace) -> int:
    from ..errors import UserInputError

    if args.screenshot and args.quit_after is None:
        raise UserInputError("--screenshot", "needs --quit-after N (the frame to save)")
    if args.screenshot and not args.screenshot.lower().endswith(".png"):
        raise UserInputError("--screenshot", f"{args.screenshot!r}: the screenshot is a .png")
    from ..fileio import claim_output
    from ..gui.editor import Editor

    editor = Editor.open(args.scene)
    show_at = None
    if args.show_at is not None:
        from ..gui.timeline_edits import TimelineRefused, parse_show_time

        try:
            show_at = parse_show_time(args.show_at, editor.scene.timeline.duration_s,
                                      "--show-at")
        except TimelineRefused as err:
            raise UserInputError("--show-at", err.problems[0]) from None
    if args.screenshot:
        claim_output(args.screenshot, force=args.force, inputs=[args.scene],
                     flag="--screenshot")
    if not os.environ.get("DISPLAY") and not os.environ.get("WAYLAND_DISPLAY"):
        raise UserInputError("display", "no display (DISPLAY is not set): the viewer needs "
                             "a window; use 'perifocal render' for files instead")
    from ..gui.settings import load_ui_scale, save_ui_scale, settings_path
    from ..gui.window import ViewerWindow

    scale = args.ui_scale if args.ui_scale is not None else load_ui_scale()
    if args.ui_scale is not None:
        save_ui_scale(args.ui_scale)
    try:
        window = ViewerWindow(editor, size=args.size, ui_report=args.ui_report, ui_scale=scale,
                              screen=args.screen, fullscreen=args.fullscreen,
                              presenting=args.present, view=args.view,
                              settings_file=settings_path())
    except ValueError as err:  # a screen that does not exist
        raise UserInputError("--screen", str(err)) from None
    except Exception as err:  # no X server, no GL visual: one line, exit 2
        if type(err).__module__.startswith(("pyglet", "moderngl")) or "display" in str(err):
            raise UserInputError("display", f"cannot open a window: {err}") from None
        raise
    if show_at is not None:
        window.session.clock.follow_show(editor.scene.timeline)
        window.session.seek_show(show_at)
    window.session.show_timeline = bool(args.timeline)
    return window.run(quit_after=args.quit_after, screenshot=args.screenshot)
