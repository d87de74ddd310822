"""The cluster options of ``perifocal render``: ``--scheduler``, ``--chunk``, ``--return-frames``.

Kept apart from render.py so the local render stays as it is; ``render.run`` hands a
sequence or a video here when a scheduler is given (the flag, or Dask's own
``DASK_SCHEDULER_ADDRESS``). Dask is imported only then.
"""

from __future__ import annotations

import argparse
from pathlib import Path
from typing import Any

from ..errors import UserInputError

DEFAULT_CHUNK = 8  # the same as viewer.export.cluster.DEFAULT_CHUNK, without importing Dask


def add_arguments(p: argparse.ArgumentParser) -> None:
    p.add_argument("--scheduler", metavar="ADDRESS",
                   help="render a sequence or video on a Dask cluster, e.g. "
                   "tcp://10.0.0.5:8786 (default: $DASK_SCHEDULER_ADDRESS, if set)")
    p.add_argument("--chunk", type=int, metavar="N",
                   help=f"cluster: frames per task (default {DEFAULT_CHUNK})")
    p.add_argument("--return-frames", action="store_true",
                   help="cluster: workers send the encoded frames back and this machine "
                   "writes them (for clusters with no shared storage)")


def cluster_address(args: argparse.Namespace, kind: str) -> str | None:
    """The scheduler address when this render goes to a cluster, else None; cluster
    options without a cluster, or with a still, are refused."""
    from ..export.cluster import scheduler_address

    explicit = args.scheduler is not None
    if kind == "still":
        if explicit:
            raise UserInputError("--scheduler", "a still is one frame: render it here, or "
                                 "write a folder (-o frames/) or a video (-o show.mp4)")
        address = None
    else:
        address = scheduler_address(args.scheduler)
    if address is None:
        for flag, given in (("--chunk", args.chunk is not None),
                            ("--return-frames", args.return_frames)):
            if given:
                raise UserInputError(flag, f"{flag} applies to a render on a cluster: add "
                                     "--scheduler tcp://HOST:PORT")
    elif args.return_frames and kind == "video":
        raise UserInputError("--return-frames", "a video's frames always come back to this "
                             "machine, which encodes them; drop --return-frames")
    return address


def run_on_cluster(args: argparse.Namespace, address: str, scene: Any, kind: str, fmt: str,
                   spec: Any, size: tuple[int, int], settings: dict[str, Any]) -> int:
    from ..export.cluster import Show, check_chunk, render_on_cluster
    from ..export.frames import parse_frame_range

    chunk = check_chunk(DEFAULT_CHUNK if args.chunk is None else args.chunk)
    todo = parse_frame_range(args.frames, scene.timeline.frame_count)
    options = {"transparent": args.transparent, "bits": args.bits} if fmt == "png" else {}
    show = Show(scene, (size[0], size[1]), spec, args.transparent)
    result = render_on_cluster(address, show, todo, Path(args.output), kind, fmt,
                               resume=args.resume, chunk=chunk,
                               return_frames=args.return_frames, fps=scene.timeline.fps,
                               quality=args.quality,
                               settings=settings if kind == "sequence" else None, **options)
    print(f"wrote {args.output} ({result.rendered} frames rendered on the cluster"
          + (f", {result.skipped} already complete" if result.skipped else "")
          + (f"; all {len(todo)} frames checked whole" if kind == "sequence" else "") + ")")
    return 0
