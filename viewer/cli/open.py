"""``perifocal open SCENE``: the interactive viewer and element editor.

The window, GL and imgui are imported inside ``run``, so the other commands do not pay
for them. With no display it says so in one line and exits 2.
"""

from __future__ import annotations

import argparse
import os
from typing import Any

EXAMPLES = """examples:
  perifocal open scenes/demo.toml
  perifocal open my-orbit.toml --size 1920x1080
  perifocal open scenes/demo.toml --screenshot shot.png --quit-after 5
  perifocal open scenes/demo.toml --view dome --screenshot dome.png --quit-after 3

In the window: select a body on the left, type new values with their units on the right
("400 km", "2.5 h", "12 deg") and press Enter; choose what is kept fixed with the lock.
Ctrl+Z undoes, Ctrl+S saves (comments in the file are kept), F1 lists every shortcut.
--screenshot with --quit-after N draws N frames, saves the whole window (panels
included) as a PNG and exits 0.
"""


def _size(text: str) -> tuple[int, int]:
    try:
        w, h = (int(x) for x in text.lower().split("x"))
    except ValueError:
        raise argparse.ArgumentTypeError(f"{text!r} is not WIDTHxHEIGHT (e.g. 1600x900)") from None
    if not (320 <= w <= 8192 and 240 <= h <= 8192):
        raise argparse.ArgumentTypeError(f"{text!r}: allowed 320x240 to 8192x8192")
    return w, h


def _count(text: str) -> int:
    try:
        n = int(text)
    except ValueError:
        raise argparse.ArgumentTypeError(f"{text!r} is not a whole number of frames") from None
    if n < 1:
        raise argparse.ArgumentTypeError("--quit-after needs at least 1 frame")
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
    p.add_argument("--view", choices=("flat", "dome", "panorama"), default="flat",
                   help="open in this view: the flat picture, or the dome master or "
                   "panorama as the export makes it (key V switches)")
    p.add_argument("--quit-after", type=_count, metavar="N",
                   help="draw N frames, then exit 0 (for tests and the docs' screenshots)")
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
    from ..gui.editor import Editor

    editor = Editor.open(args.scene)
    if not os.environ.get("DISPLAY") and not os.environ.get("WAYLAND_DISPLAY"):
        raise UserInputError("display", "no display (DISPLAY is not set): the viewer needs "
                             "a window; use 'perifocal render' for files instead")
    from ..gui.window import ViewerWindow

    try:
        window = ViewerWindow(editor, size=args.size, ui_report=args.ui_report,
                              view=args.view)
    except Exception as err:  # no X server, no GL visual: one line, exit 2
        if type(err).__module__.startswith(("pyglet", "moderngl")) or "display" in str(err):
            raise UserInputError("display", f"cannot open a window: {err}") from None
        raise
    return window.run(quit_after=args.quit_after, screenshot=args.screenshot)
