"""``perifocal render SCENE -o OUT``: stills, frame sequences, video, dome masters,
panoramas and SVG diagrams of a scene.

What is made follows OUT: a .png/.jpg/.svg file is a still (``--at T``), a folder (a name
ending in ``/``) is a numbered frame sequence, a .mp4 file is an H.264 video; ``--frames
A:B`` picks frames A..B-1 of the timeline. ``--dome [FOV]`` and ``--panorama`` reproject
the view from the camera's eye into a fulldome master or a 2:1 panorama. Frames are
drawn headlessly (OpenGL through EGL; Mesa llvmpipe when there is no GPU) by the same
renderer the window uses and written atomically, so a failed render never leaves half a
file. GL is imported inside ``run`` only.
"""

from __future__ import annotations

import argparse
from pathlib import Path
from typing import Any

from ..errors import UserInputError
from . import cluster_options

EXAMPLES = """examples:
  perifocal render scenes/demo.toml -o demo.png
  perifocal render scenes/demo.toml --at "120 d" -o day120.jpg
  perifocal render scenes/laws.toml --show-at 0:12 -o twelve-seconds-in.png
  perifocal render scenes/laws.toml --show-at 121/30 -o frame121.png   # = --frames 121:122
  perifocal render scenes/laws.toml --at "2030-06-01T00:00:00 TDB" --size 3840x2160 -o laws.png
  perifocal render scenes/demo.toml --transparent -o overlay.png
  perifocal render scenes/demo.toml -o diagram.svg
  perifocal render scenes/demo.toml -o frames/                 # the whole timeline
  perifocal render scenes/demo.toml --frames 0:300 -o frames/ --resume
  perifocal render scenes/demo.toml -o show.mp4 --quality final
  perifocal render scenes/demo.toml --dome --size 4096x4096 -o dome/
  perifocal render scenes/demo.toml --dome 200 --tilt 20 --at "30 d" -o dome.png
  perifocal render scenes/demo.toml --dome --dome-grid --tilt 15 -o check.png
  perifocal render scenes/demo.toml --panorama -o pano.png
  perifocal render scenes/demo.toml --scheduler tcp://10.0.0.5:8786 -o /shared/frames/

--at is an offset from the scene epoch ("90 d", "-15 d"; a bare number is in the scene's
time unit) or an epoch ("2030-06-01T00:00:00 TDB"); the default is the timeline start.
--show-at is a time into the show instead (camera keyframes, fades, captions, pace and the
clock as the show has them there): seconds ("12 s"; a bare number is seconds), m:ss
("1:05"), or a frame as frame/fps ("121/30") or "frame 121"; the still is the very
picture of that frame of --frames. --at and --show-at exclude each other.
--frames A:B renders frames A..B-1; files are numbered by absolute frame, so shards
rendered on several machines (--frames 0:3000, 3000:6000, ...) fill one folder.
--size overrides [render] size (dome: HxH, panorama: 2HxH from the render height H).

Dome shows: rapid flashing or fast, high-contrast motion is a photosensitivity risk for
some viewers; follow your venue's guidance before you show a render.
"""

STILL_SUFFIXES = {".png": "png", ".jpg": "jpg", ".jpeg": "jpg", ".svg": "svg"}
VIDEO_SUFFIXES = (".mp4",)


def add_parser(sub: Any) -> None:
    from . import CAUTION

    p = sub.add_parser(
        "render", help="render stills, frame sequences, video, dome masters, SVG",
        description="Render a scene with the viewer's renderer: a still (.png, .jpg, .svg), "
        "a numbered frame sequence (a folder ending in /), or an H.264 video (.mp4); "
        "optionally as a fulldome master (--dome) or a 2:1 panorama (--panorama).",
        epilog=EXAMPLES + "\n" + CAUTION, formatter_class=argparse.RawDescriptionHelpFormatter,
    )
    p.add_argument("scene", metavar="SCENE", help="a scene file (.toml)")
    p.add_argument("-o", "--output", required=True, metavar="OUT",
                   help="a still (.png, .jpg, .svg), a folder ending in / for a frame "
                   "sequence, or a video (.mp4)")
    p.add_argument("--at", metavar="T", help="scene time of a still: an offset (\"90 d\") or "
                   "an epoch; default the timeline start")
    p.add_argument("--show-at", metavar="T", help="time into the show of a still: \"12 s\", "
                   "\"1:05\" (m:ss), \"121/30\" or \"frame 121\" (frame 121 of the show)")
    p.add_argument("--frames", metavar="A:B[:STEP]",
                   help="timeline frames A..B-1, every STEP-th with A:B:STEP (sequence, "
                   "video)")
    p.add_argument("--size", metavar="WxH", help="image size in pixels, e.g. 1920x1080")
    p.add_argument("--transparent", action="store_true",
                   help="alpha background instead of the scene's background colour (PNG)")
    p.add_argument("--format", choices=("png", "jpg"), default="png",
                   help="image format of a frame sequence (default png)")
    p.add_argument("--bits", type=int, choices=(8, 16), default=8,
                   help="PNG bits per channel (default 8)")
    p.add_argument("--quality", choices=("draft", "preview", "final"), default="preview",
                   help="video: draft (fastest), preview (default) or final (best, slow)")
    p.add_argument("--dome", nargs="?", type=float, const=180.0, metavar="FOV",
                   help="a square angular-fisheye dome master; FOV in deg (default 180)")
    p.add_argument("--tilt", type=float, default=None, metavar="DEG",
                   help="dome: the dome's tilt toward the front, 0 to 45 deg: turns the "
                   "zenith toward the front by DEG (default: the camera's dome_tilt, 0)")
    p.add_argument("--dome-grid", action="store_true",
                   help="dome: draw the dome grid (elevation rings, azimuth spokes, the front "
                   "marked) to check orientation on your dome")
    p.add_argument("--panorama", action="store_true",
                   help="a 2:1 equirectangular 360-degree panorama")
    p.add_argument("--supersample", type=int, choices=(1, 2, 3, 4), metavar="N",
                   help="dome/panorama: N x N samples per output pixel (default 2; 1 from "
                   "4096 px up)")
    p.add_argument("--force", action="store_true",
                   help="still or video: replace an existing file (the old one is kept as "
                   "NAME.bak)")
    p.add_argument("--resume", action="store_true",
                   help="sequence: skip frames whose files are already complete")
    cluster_options.add_arguments(p)
    p.set_defaults(run=run)


def parse_size(text: str | None) -> tuple[int, int] | None:
    """(W, H) from "WxH" (``viewer.units.forms``); UserInputError naming --size."""
    if text is None:
        return None
    from ..units.forms import SizeError
    from ..units.forms import parse_size as parse

    try:
        return parse(text)
    except SizeError as err:
        raise UserInputError("--size", str(err)) from None


def parse_time(text: str | None, scene: Any) -> float:
    """Scene time (s) from --at: an offset from the scene epoch, or an epoch
    (``viewer.units.forms.parse_scene_time``). Without --at, the timeline start."""
    if text is None:
        return float(scene.timeline.start_s)
    from ..units.forms import EpochError, QuantityError, parse_scene_time, scene_time_hint

    try:
        return parse_scene_time(text, scene.epoch, scene.time_unit or "d")
    except (EpochError, QuantityError) as err:
        raise UserInputError("--at", f"{err}; {scene_time_hint()}") from None


def parse_show_at(text: str, scene: Any) -> float:
    """Seconds into the show from --show-at (``viewer.units.forms.parse_show_time``),
    within the show; UserInputError naming --show-at."""
    from ..units.forms import ShowTimeError, parse_show_time

    tl = scene.timeline
    try:
        return parse_show_time(text, tl.duration_s, fps=tl.fps)
    except ShowTimeError as err:
        raise UserInputError("--show-at", str(err)) from None


def still_time(args: argparse.Namespace, scene: Any) -> tuple[float, float | None]:
    """(scene time, show time or None) of a still: --show-at T into the show, or --at."""
    if args.show_at is None:
        return parse_time(args.at, scene), None
    show_s = parse_show_at(args.show_at, scene)
    return float(scene.timeline.scene_time_at(show_s)), show_s


def output_format(path: str, transparent: bool) -> str:
    """"png" or "jpg" from the file name; UserInputError (naming -o) otherwise."""
    fmt = STILL_SUFFIXES.get(Path(path).suffix.lower())
    if fmt is None:
        raise UserInputError("-o", f"{path!r}: a still is written as .png or .jpg "
                             f"(allowed: {', '.join(STILL_SUFFIXES)})")
    if transparent and fmt == "jpg":
        raise UserInputError("--transparent", "JPEG has no alpha channel; write a .png")
    return fmt


def write_still(rgba: Any, path: str, fmt: str, transparent: bool, bits: int = 8) -> None:
    """Encode and write atomically; a write the user can fix is a UserInputError."""
    from ..export.encode import encode_still
    from ..fileio import atomic_write_bytes, user_write_error

    data = encode_still(rgba, fmt, transparent, bits)
    try:
        atomic_write_bytes(path, data)
    except OSError as err:
        raise user_write_error(path, err) from None


def output_kind(path: str) -> str:
    """"sequence" (a name ending in /), "video" (.mp4) or "still" (by suffix);
    UserInputError otherwise, also for an existing folder named without its trailing /."""
    if path.endswith(("/", "\\")):
        return "sequence"
    if Path(path).is_dir():
        raise UserInputError("-o", f"{path!r} is a folder; a frame sequence is written to a "
                             f"name ending in / ({path}/), a still to a .png, .jpg or .svg file")
    suffix = Path(path).suffix.lower()
    if suffix in VIDEO_SUFFIXES:
        return "video"
    if suffix in STILL_SUFFIXES:
        return "still"
    raise UserInputError("-o", f"{path!r}: write a still (.png, .jpg, .svg), a folder "
                         "ending in / (a frame sequence) or a video (.mp4)")


def immersive_spec(args: argparse.Namespace, scene: Any, size: tuple[int, int] | None) -> Any:
    """The dome/panorama request, with the default sizes (HxH, 2HxH), or None."""
    if args.dome is None and not args.panorama:
        if args.tilt is not None:
            raise UserInputError("--tilt", "--tilt applies to a dome master: add --dome")
        if args.dome_grid:
            raise UserInputError("--dome-grid", "--dome-grid applies to a dome master: add "
                                 "--dome")
        return None
    if args.dome is not None and args.panorama:
        raise UserInputError("--dome/--panorama", "choose one: a dome master or a panorama")
    from ..export.immersive import Immersive

    h = scene.render.size_px[1]
    kind = "dome" if args.dome is not None else "panorama"
    size = size or ((h, h) if kind == "dome" else (2 * h, h))
    grid = args.supersample or (2 if size[1] < 4096 else 1)
    if kind == "dome":
        if args.tilt is not None and not 0.0 <= args.tilt <= 45.0:
            raise UserInputError("--tilt", f"the dome's tilt toward the front is 0 to 45 deg, "
                                 f"got {args.tilt:g}")
        return Immersive("dome", size, args.dome, 0.0, grid, dome_tilt_deg=args.tilt,
                         dome_grid=args.dome_grid)
    return Immersive("panorama", size, grid=grid)


def run(args: argparse.Namespace) -> int:
    size = parse_size(args.size)
    kind = output_kind(args.output)
    fmt = output_format(args.output, args.transparent) if kind == "still" else args.format
    if kind == "sequence" and args.transparent and fmt == "jpg":
        raise UserInputError("--transparent", "JPEG has no alpha channel; use --format png")
    if kind == "video" and args.transparent:
        raise UserInputError("--transparent", "H.264 video has no alpha channel; render a "
                             "PNG sequence (-o frames/) for compositing")
    if kind == "still" and args.frames is not None:
        raise UserInputError("--frames", "a still is one frame: use --at, or write a folder "
                             "(-o frames/) or a video (-o show.mp4)")
    if kind != "still" and args.at is not None:
        raise UserInputError("--at", "--at picks the time of a still; sequences and videos "
                             "follow the timeline (use --frames A:B)")
    if args.show_at is not None and args.at is not None:
        raise UserInputError("--show-at", "--at (scene time) and --show-at (time into the "
                             "show) both pick the time of a still; give one")
    if kind != "still" and args.show_at is not None:
        raise UserInputError("--show-at", "--show-at picks the time of a still; sequences "
                             "and videos follow the timeline (use --frames A:B)")
    if args.resume and kind != "sequence":
        raise UserInputError("--resume", "--resume applies to a frame sequence (-o frames/)")
    if args.bits == 16 and fmt != "png":
        raise UserInputError("--bits", f"16 bits per channel is a PNG option; {fmt.upper()} "
                             "has 8 (write a .png, or --format png)")
    from ..fileio import claim_output
    from ..scene import load_scene

    scene = load_scene(args.scene)
    if kind != "sequence":
        claim_output(args.output, force=args.force, inputs=[args.scene])
    spec = immersive_spec(args, scene, size)
    if spec is not None:
        spec.check_memory(args.bits, sequence=kind in ("sequence", "video"))
    if spec is not None and fmt == "svg":
        raise UserInputError("-o", "an SVG diagram is a flat view; dome masters and "
                             "panoramas are written as .png or .jpg")
    out_size: tuple[int, int] = (spec.size_px if spec is not None
                                 else (size or scene.render.size_px))
    if kind == "video":
        from ..export.encode import check_video_size

        check_video_size(*out_size)
    options = {"transparent": args.transparent, "bits": args.bits} if fmt == "png" else {}
    # Everything a sequence's frames depend on, recorded in its folder (resume checks it).
    settings = {"size": list(out_size), "format": fmt, **options,
                "projection": repr(spec), "scene_sha256": _digest(args.scene)}
    address = cluster_options.cluster_address(args, kind)
    if address is not None:
        return cluster_options.run_on_cluster(args, address, scene, kind, fmt, spec, out_size,
                                              settings)
    if fmt == "svg":
        from ..export.svg import write_svg

        t_s, show_s = still_time(args, scene)
        write_svg(scene, t_s, args.output, out_size, show_s=show_s)
        print(f"wrote {args.output} ({out_size[0]}x{out_size[1]}, scene time "
              f"{t_s / 86400.0:.6g} d)")
        return 0
    with _Frames(scene, out_size, spec, args.transparent) as frames:
        if kind == "still":
            t_s, show_s = still_time(args, scene)
            rgba = frames.at(t_s, show_s)
            write_still(rgba, args.output, fmt, args.transparent, args.bits)
            h, w = rgba.shape[:2]
            print(f"wrote {args.output} ({w}x{h}, scene time {t_s / 86400.0:.6g} d)")
            return 0
        from ..export.frames import parse_frame_range, render_sequence, render_video

        todo = parse_frame_range(args.frames, scene.timeline.frame_count)
        if kind == "sequence":
            result = render_sequence(todo, frames.frame, Path(args.output), fmt,
                                     resume=args.resume, size=out_size, settings=settings,
                                     **options)
        else:
            result = render_video(todo, frames.frame, Path(args.output), out_size,
                                  scene.timeline.fps, args.quality)
        print(f"wrote {args.output} ({result.rendered} frames rendered"
              + (f", {result.skipped} already complete" if result.skipped else "") + ")")
    return 0


def _digest(path: str) -> str:
    """SHA-256 of the scene file: a frame depends on all of it."""
    import hashlib

    from ..fileio import read_regular_bytes

    return hashlib.sha256(read_regular_bytes(path)).hexdigest()


class _Frames:
    """The show's frames (viewer.export.show.ShowFrames) on a headless context of their own."""

    def __init__(self, scene: Any, size: tuple[int, int], spec: Any, transparent: bool) -> None:
        from ..export.show import ShowFrames
        from ..render.context import headless_context
        from ..render.renderer import Renderer

        self.ctx = headless_context()
        self.renderer = Renderer(self.ctx)
        self.show = ShowFrames(self.renderer, scene, size, spec, transparent)
        self.at = self.show.at
        self.frame = self.show.frame

    def __enter__(self) -> _Frames:
        return self

    def __exit__(self, *exc: object) -> None:
        from ..render.context import release_context

        self.show.close()
        self.renderer.release()
        release_context(self.ctx)
