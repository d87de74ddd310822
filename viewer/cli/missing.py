"""``perifocal missing SCENE FOLDER``: does a folder hold every frame of the show, each whole?

For shows rendered in pieces (a Dask cluster, a job array, GNU parallel): lists the
frames that are absent or broken (truncated, not decodable) as ``--frames`` ranges, ready
to render again with ``--resume``. No GL is needed.
"""

from __future__ import annotations

import argparse
import json
import sys
from pathlib import Path
from typing import Any

from ..errors import UserInputError

#: Exit status when frames are missing (0: all whole; 2: bad input).
EXIT_MISSING = 3

EXAMPLES = """examples:
  perifocal missing scenes/demo.toml frames/
  perifocal missing scenes/demo.toml dome/ --frames 0:3000
  perifocal missing scenes/demo.toml frames/ --format jpg --json

A frame is whole when frame_NNNNNN.png (or .jpg) is there and decodes completely; the
same test --resume uses. Missing and broken frames are printed as A:B ranges, to render
again with: perifocal render SCENE -o FOLDER/ --frames A:B --resume
Exit status: 0 every frame is whole, 3 some are missing or broken, 2 bad input.
--json prints {"folder", "frames", "whole", "missing": [[A, B], ...]} (B exclusive).
"""


def add_parser(sub: Any) -> None:
    p = sub.add_parser(
        "missing", help="list the frames of a show that a folder lacks or holds broken",
        description="Check that a folder holds every frame of the show, each one whole, "
        "and list the missing or broken frames as ranges to render again.",
        epilog=EXAMPLES, formatter_class=argparse.RawDescriptionHelpFormatter,
    )
    p.add_argument("scene", metavar="SCENE", help="the show's scene file (.toml)")
    p.add_argument("folder", metavar="FOLDER", help="the folder of frames")
    p.add_argument("--frames", metavar="A:B[:STEP]", help="only frames A..B-1, every "
                   "STEP-th with A:B:STEP (default: the whole timeline)")
    p.add_argument("--format", choices=("png", "jpg"), default="png",
                   help="the frames' image format (default png)")
    p.add_argument("--json", action="store_true", help="print the answer as JSON")
    p.set_defaults(run=run)


def run(args: argparse.Namespace) -> int:
    from ..export.completeness import frame_ranges, missing_frames, ranges_text
    from ..export.frames import parse_frame_range
    from ..export.progress import Progress
    from ..scene import load_scene

    scene = load_scene(args.scene)
    frames = parse_frame_range(args.frames, scene.timeline.frame_count)
    folder = Path(args.folder)
    if not folder.is_dir():
        raise UserInputError(args.folder, "no such folder; give the folder the frames "
                             "were rendered into")
    progress = Progress(len(frames), "frames checked")
    missing = missing_frames(folder, frames, args.format, progress=progress)
    progress.finish(args.folder)
    runs = frame_ranges(missing)
    whole = len(frames) - len(missing)
    if args.json:
        sys.stdout.write(json.dumps({"folder": args.folder, "frames": len(frames),
                                     "whole": whole,
                                     "missing": [[r.start, r.stop] for r in runs]}) + "\n")
    elif not missing:
        print(f"{args.folder}: all {len(frames)} frames ({frames.start}:{frames.stop}) "
              "are whole")
    else:
        print(f"{args.folder}: {len(missing)} of {len(frames)} frames are missing or "
              f"broken: {ranges_text(runs)}")
        print(f"render them again with: perifocal render {args.scene} -o {args.folder} "
              f"--frames A:B --resume   (one A:B above at a time)")
    return EXIT_MISSING if missing else 0
