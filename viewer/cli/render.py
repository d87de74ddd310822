"""``perifocal render SCENE --at T -o still.png``: one frame of a scene to a PNG or JPEG.

The frame is drawn headlessly (OpenGL through EGL; Mesa llvmpipe when there is no GPU)
by the same renderer the window uses, and written atomically (a temporary file renamed
over the target), so a failed render never leaves half a file. GL is imported inside
``run`` only.
"""

from __future__ import annotations

import argparse
import re
from pathlib import Path
from typing import Any

from ..errors import UserInputError

EXAMPLES = """examples:
  perifocal render scenes/demo.toml -o demo.png
  perifocal render scenes/demo.toml --at "120 d" -o day120.jpg
  perifocal render scenes/laws.toml --at "2030-06-01T00:00:00 TDB" --size 3840x2160 -o laws.png
  perifocal render scenes/demo.toml --transparent -o overlay.png

--at is an offset from the scene epoch ("90 d", "-15 d"; a bare number is in the scene's
time unit) or an epoch ("2030-06-01T00:00:00 TDB"); the default is the timeline start.
--size overrides [render] size; --transparent gives a PNG with an alpha background.
"""

STILL_SUFFIXES = {".png": "png", ".jpg": "jpg", ".jpeg": "jpg"}
_EPOCH_LIKE = re.compile(r"^\s*[+-]?\d{4}-\d{2}-\d{2}")
MAX_SIDE_PX = 16384


def add_parser(sub: Any) -> None:
    from . import CAUTION

    p = sub.add_parser(
        "render", help="render a still of a scene to PNG or JPEG",
        description="Render one frame of a scene (at a scene time) to a PNG or JPEG file, "
        "with the same renderer as the viewer.",
        epilog=EXAMPLES + "\n" + CAUTION, formatter_class=argparse.RawDescriptionHelpFormatter,
    )
    p.add_argument("scene", metavar="SCENE", help="a scene file (.toml)")
    p.add_argument("-o", "--output", required=True, metavar="OUT",
                   help="the image to write: .png or .jpg")
    p.add_argument("--at", metavar="T", help="scene time: an offset (\"90 d\") or an epoch")
    p.add_argument("--size", metavar="WxH", help="image size in pixels, e.g. 1920x1080")
    p.add_argument("--transparent", action="store_true",
                   help="alpha background instead of the scene's background colour (PNG)")
    p.set_defaults(run=run)


def parse_size(text: str | None) -> tuple[int, int] | None:
    """(W, H) from "WxH"; UserInputError (naming --size) for anything else."""
    if text is None:
        return None
    m = re.fullmatch(r"\s*(\d+)\s*[xX\u00d7]\s*(\d+)\s*", text)
    if not m:
        raise UserInputError("--size", f"{text!r} is not a size; write WxH, e.g. 1920x1080")
    w, h = int(m.group(1)), int(m.group(2))
    if not (1 <= w <= MAX_SIDE_PX and 1 <= h <= MAX_SIDE_PX):
        raise UserInputError("--size", f"{text!r}: each side must be 1 to {MAX_SIDE_PX} px")
    return w, h


def parse_time(text: str | None, scene: Any) -> float:
    """Scene time (s) from --at: an offset from the scene epoch, or an epoch.

    Without --at, the timeline start.
    """
    if text is None:
        return float(scene.timeline.start_s)
    from ..units import EpochError, QuantityError, parse_epoch, parse_quantity

    if _EPOCH_LIKE.match(text):
        try:
            return parse_epoch(text).seconds_since(scene.epoch)
        except EpochError as err:
            raise UserInputError("--at", str(err)) from None
    try:
        return parse_quantity(text, "time", scene.time_unit or "d")
    except QuantityError as err:
        raise UserInputError("--at", f"{err}; or give an epoch such as "
                             "\"2030-01-01T00:00:00 TDB\"") from None


def output_format(path: str, transparent: bool) -> str:
    """"png" or "jpg" from the file name; UserInputError (naming -o) otherwise."""
    fmt = STILL_SUFFIXES.get(Path(path).suffix.lower())
    if fmt is None:
        raise UserInputError("-o", f"{path!r}: a still is written as .png or .jpg "
                             f"(allowed: {', '.join(STILL_SUFFIXES)})")
    if transparent and fmt == "jpg":
        raise UserInputError("--transparent", "JPEG has no alpha channel; write a .png")
    return fmt


def write_still(rgba: Any, path: str, fmt: str, transparent: bool) -> None:
    """Encode and write atomically; a write the user can fix is a UserInputError."""
    from ..export.encode import encode_still
    from ..fileio import atomic_write_bytes, user_write_error

    data = encode_still(rgba, fmt, transparent)
    try:
        atomic_write_bytes(path, data)
    except OSError as err:
        raise user_write_error(path, err) from None


def run(args: argparse.Namespace) -> int:
    size = parse_size(args.size)
    fmt = output_format(args.output, args.transparent)
    from ..scene import load_scene

    scene = load_scene(args.scene)
    t_s = parse_time(args.at, scene)
    from ..render import render_still

    rgba = render_still(scene, t_s, size, transparent=args.transparent)
    write_still(rgba, args.output, fmt, args.transparent)
    h, w = rgba.shape[:2]
    print(f"wrote {args.output} ({w}x{h}, scene time {t_s / 86400.0:.6g} d)")
    return 0
