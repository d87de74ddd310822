"""``perifocal demo``: the main job on the bundled demo scene.

With a display and the viewer installed it opens the window; with no display it renders
the demo's stills and a short video into ./perifocal-demo/ and prints where. Parts that
a build lacks (no GL, no viewer yet) fall back to the next thing that works, and say so
in one line, ending with the demo's ``check`` table at the least.
"""

from __future__ import annotations

import argparse
import importlib.resources
import importlib.util
import os
import sys
from pathlib import Path
from typing import Any

EXAMPLES = """examples:
  perifocal demo                     # window if there is a display, else files
  perifocal demo --out my-demo/      # where the files go when there is no display
  perifocal demo --no-window         # files even when there is a display
"""

DEMO_SCENE = "demo.toml"


def demo_scene_path() -> Path:
    """The bundled demo scene, from the installed package (wheel or checkout)."""
    return Path(str(importlib.resources.files("viewer") / "scenes" / DEMO_SCENE))


def add_parser(sub: Any) -> None:
    from . import CAUTION

    p = sub.add_parser(
        "demo", help="the bundled demo: open the viewer, or render it to files",
        description="Show the bundled demo scene (an invented star with its planets and a "
        "comet sweeping equal areas): in the viewer when a display is there, otherwise "
        "rendered to stills and a short video.",
        epilog=EXAMPLES + "\n" + CAUTION, formatter_class=argparse.RawDescriptionHelpFormatter,
    )
    p.add_argument("--out", default="perifocal-demo/", metavar="DIR",
                   help="folder for the files when there is no display (default %(default)s)")
    p.add_argument("--no-window", action="store_true", help="render files even with a display")
    p.set_defaults(run=run)


def _has(module: str) -> bool:
    try:
        return importlib.util.find_spec(module) is not None
    except ModuleNotFoundError:
        return False


def run(args: argparse.Namespace) -> int:
    scene_path = demo_scene_path()
    if os.environ.get("DISPLAY") and not args.no_window and _has("viewer.gui.window"):
        from . import main

        return main(["open", str(scene_path)])
    if os.environ.get("DISPLAY") is None and not args.no_window:
        sys.stderr.write("perifocal demo: no display here, so the demo is rendered to files "
                         f"in {args.out} instead of opening the viewer\n")
    return render_demo_files(scene_path, Path(args.out))


def render_demo_files(scene_path: Path, out: Path) -> int:
    """The demo's stills (top view, SVG diagram, dome master) and a short video."""
    from ..errors import UserInputError
    from ..fileio import describe_os_error
    from . import main

    if out.exists() and not out.is_dir():
        raise UserInputError("--out", f"{str(out)!r} exists and is not a folder; give another "
                             "folder with --out DIR")
    try:
        out.mkdir(parents=True, exist_ok=True)
    except OSError as err:
        raise UserInputError("--out", f"cannot make the folder {str(out)!r}: "
                             f"{describe_os_error(err)} (or give another with --out DIR)") from None
    steps = [
        (["--at", "0 d", "-o", str(out / "demo.png")], "a still of the system"),
        (["--at", "0 d", "-o", str(out / "demo.svg")], "the same still as a vector diagram"),
        (["--at", "0 d", "--dome", "--size", "1024x1024", "-o", str(out / "demo-dome.png")],
         "a 1024 px fulldome master"),
        (["--frames", "0:150", "--size", "1280x720", "-o", str(out / "demo.mp4")],
         "the first 5 s of the show as video"),
    ]
    for flags, what in steps:
        sys.stderr.write(f"perifocal demo: {what}\n")
        # The demo's own files in its own folder are remade on every run (old ones -> .bak).
        code = main(["render", str(scene_path), "--force", *flags])
        if code != 0:
            return code
    print(f"perifocal demo: wrote demo.png, demo.svg, demo-dome.png and demo.mp4 in {out}/")
    print("numbers behind the pictures: perifocal check " + str(scene_path))
    return 0
