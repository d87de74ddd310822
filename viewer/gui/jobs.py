"""Exports from the window: a still of the current view, and a render job of the timeline
that runs while the window stays live. No imgui here.

A still is one frame through the window's renderer (PNG, JPEG) or the SVG writer
(``viewer.export.svg.write_svg``), with the window's current camera.

A render job writes a frame sequence (a folder) or an H.264 video (.mp4) through the
export pipeline (``viewer.export.frames.render_sequence`` / ``render_video``: numbered
files, atomic writes, the encoder pool). That pipeline runs on a worker thread; each
frame it asks for is drawn by the thread that owns the GL context (the window's, between
its own frames), which calls ``pump`` with a time budget. So the window keeps drawing
and answering input while the job runs, and GL is only ever touched from one thread.
Cancelling makes the next frame request raise ``JobCancelled`` inside the pipeline,
which leaves no half-written file: frames already written are whole, a video's
temporary file is removed.
"""

from __future__ import annotations

import io
import math
import threading
import time
from collections.abc import Callable
from dataclasses import dataclass, replace
from pathlib import Path
from typing import Any

import numpy as np

from ..errors import UserInputError
from ..scene.model import Camera, Scene
from ..units import forms

__all__ = ["JobCancelled", "JobRequest", "RenderJob", "StillRequest", "export_still",
           "job_request", "still_request"]

STILL_FORMATS = {".png": "png", ".jpg": "jpg", ".jpeg": "jpg", ".svg": "svg"}
VIDEO_QUALITIES = ("draft", "preview", "final")
MAX_SIDE_PX = forms.MAX_SIDE_PX

#: Draws one frame: scene time (s) -> RGBA uint8 (H, W, 4), top row first.
FrameFn = Callable[[float], np.ndarray]


class JobCancelled(Exception):
    """Raised inside the export pipeline when the user cancels the job."""


def parse_size(text: str, default: tuple[int, int]) -> tuple[int, int]:
    """(W, H) from "WxH" ("" for ``default``), by ``viewer.units.forms.parse_size``;
    UserInputError naming the size field otherwise."""
    if not text.strip():
        return default
    try:
        return forms.parse_size(text)
    except forms.SizeError as err:
        raise UserInputError("size", str(err)) from None


def _existing_folder(folder: Path) -> None:
    if not folder.is_dir():
        raise UserInputError(str(folder), f"the folder {folder} does not exist")


# --- stills --------------------------------------------------------------------------------


@dataclass(frozen=True)
class StillRequest:
    path: Path
    fmt: str  # "png", "jpg" or "svg"
    size_px: tuple[int, int]


def still_request(path_text: str, size_text: str, scene: Scene) -> StillRequest:
    """A still export checked before anything is drawn: the file name (.png, .jpg, .jpeg,
    .svg), an existing folder, the size (default the scene's [render] size)."""
    text = path_text.strip()
    if not text:
        raise UserInputError("file", "give a file name ending in .png, .jpg or .svg")
    path = Path(text).expanduser()
    fmt = STILL_FORMATS.get(path.suffix.lower())
    if fmt is None:
        raise UserInputError(str(path), "a still is written as .png, .jpg or .svg")
    _existing_folder(path.parent if str(path.parent) else Path("."))
    return StillRequest(path, fmt, parse_size(size_text, scene.render.size_px))


def with_camera(scene: Scene, camera: Camera) -> Scene:
    """The scene seen through ``camera`` for the whole show: its camera keyframes are
    dropped (the window's view wins); fades, captions and the clock stay."""
    return replace(scene, camera=camera,
                   timeline=replace(scene.timeline, camera_keys=()))


def export_still(scene: Scene, camera: Camera, t_s: float, request: StillRequest,
                 renderer: Any = None) -> str:
    """Write the still of ``scene`` at scene time ``t_s`` seen by ``camera`` (atomically)
    and return a line saying what was written. PNG and JPEG need ``renderer`` (a
    ``viewer.render.Renderer``); SVG is written by the SVG writer without GL."""
    from ..fileio import atomic_write_bytes, user_write_error

    seen = with_camera(scene, camera)
    w, h = request.size_px
    if request.fmt == "svg":
        from ..export.svg import write_svg

        write_svg(seen, t_s, request.path, request.size_px)
    else:
        from ..export.encode import encode_still

        if renderer is None:
            raise UserInputError("still", "no renderer: the scene cannot be drawn here")
        from ..export.show import ShowFrames

        rgba = ShowFrames(renderer, seen, request.size_px).at(t_s)
        try:
            atomic_write_bytes(request.path, encode_still(rgba, request.fmt))
        except OSError as err:
            raise user_write_error(request.path, err) from None
    return f"wrote {request.path} ({w}x{h}, {scene.epoch.plus_seconds(t_s).iso()})"


# --- render jobs ---------------------------------------------------------------------------


@dataclass(frozen=True)
class JobRequest:
    out: Path
    kind: str  # "sequence" or "video"
    fmt: str  # frame format of a sequence: "png" or "jpg"
    size_px: tuple[int, int]
    frames: range
    quality: str = "preview"
    #: "flat", or a "dome" master or "panorama" (``spec``, an export.immersive.Immersive).
    view: str = "flat"
    spec: Any = None


def show_range(from_text: str, to_text: str, scene: Scene) -> str:
    """Frames "A:B" of the show between two show times ("4 s", "12 s"; empty: the start
    or the end), for ``job_request``; "" when both are empty (the whole show)."""
    from .timeline_edits import TimelineRefused, parse_show_time

    if not (from_text.strip() or to_text.strip()):
        return ""
    tl = scene.timeline
    try:
        a = parse_show_time(from_text, tl.duration_s, "from") if from_text.strip() else 0.0
        b = parse_show_time(to_text, tl.duration_s, "to") if to_text.strip() else tl.duration_s
    except TimelineRefused as err:
        raise UserInputError("show time", err.problems[0]) from None
    first, end = math.ceil(a * tl.fps - 1e-6), math.ceil(b * tl.fps - 1e-6)
    if end <= first:
        raise UserInputError("show time", "the range ends after it starts (at least one "
                             "frame)")
    return f"{first}:{min(end, tl.frame_count)}"


def job_request(out_text: str, size_text: str, frames_text: str, scene: Scene,
                fmt: str = "png", quality: str = "preview", view: str = "flat",
                from_text: str = "", to_text: str = "") -> JobRequest:
    """A render job checked before it starts: a folder (a name ending in /, or an
    existing folder) for a numbered frame sequence, or a .mp4 file for a video; the size
    (default the scene's); the frames "A:B" (default the whole timeline)."""
    from ..export.encode import check_video_size
    from ..export.frames import parse_frame_range

    text = out_text.strip()
    if not text:
        raise UserInputError("output", "give a folder ending in / or a video file .mp4")
    out = Path(text).expanduser()
    if text.endswith(("/", "\\")) or out.is_dir():
        kind = "sequence"  # the pipeline makes the folder (and its parents) if need be
    elif out.suffix.lower() == ".mp4":
        kind = "video"
        _existing_folder(out.parent if str(out.parent) else Path("."))
    else:
        raise UserInputError(str(out), "write a folder ending in / (numbered frames) or a "
                             "video file ending in .mp4")
    if fmt not in ("png", "jpg"):
        raise UserInputError("format", f"frames are png or jpg, not {fmt!r}")
    if quality not in VIDEO_QUALITIES:
        raise UserInputError("quality", f"video quality is one of {', '.join(VIDEO_QUALITIES)}")
    h = scene.render.size_px[1]
    default = {"flat": scene.render.size_px, "dome": (h, h), "panorama": (2 * h, h)}[view]
    size = parse_size(size_text, default)
    spec = None
    if view != "flat":
        from ..export.immersive import Immersive

        spec = Immersive(view, size, grid=2 if size[1] < 4096 else 1)
        try:
            spec.check_memory(sequence=True)  # a video's writer holds frames too
        except UserInputError as err:
            raise UserInputError("size", err.problems) from None
    if kind == "video":
        check_video_size(*size)
    ranged = show_range(from_text, to_text, scene)
    frames = parse_frame_range(ranged or frames_text.strip() or None,
                               scene.timeline.frame_count)
    return JobRequest(out, kind, fmt, size, frames, quality, view, spec)


class RenderJob:
    """One timeline render: the pipeline on a worker thread, frames drawn by ``pump``.

    ``state`` is "running", then "done", "failed" or "cancelled"; ``summary`` says what
    was written (or why not), in one line. ``done``/``total`` count frames; ``rate_fps``
    and ``left_s`` are measured on ``clock``.
    """

    def __init__(self, scene: Scene, camera: Camera | None, request: JobRequest,
                 clock: Callable[[], float] = time.monotonic) -> None:
        self.scene = scene if camera is None else with_camera(scene, camera)
        self.request = request
        self.clock = clock
        self.total = len(request.frames)
        self.done = 0
        self.state = "running"
        self.summary = ""
        self._cancel = False
        self._want: int | None = None  # the frame the pipeline waits for
        self._have: np.ndarray | None = None  # the frame drawn for it
        self._cond = threading.Condition()
        self._start = clock()
        self._end: float | None = None
        self._thread = threading.Thread(target=self._work, name="perifocal-render-job",
                                        daemon=True)
        self._thread.start()

    # --- the worker thread --------------------------------------------------------------

    def _frame(self, k: int) -> np.ndarray:
        """The pipeline's render callback: ask for frame k and wait until it is drawn."""
        with self._cond:
            if self._cancel:
                raise JobCancelled
            self._want, self._have = k, None
            self._cond.notify_all()
            while self._have is None and not self._cancel:
                self._cond.wait(0.1)
            if self._have is None:
                raise JobCancelled
            img, self._have, self._want = self._have, None, None
            return img

    def _work(self) -> None:
        from ..export.frames import render_sequence, render_video

        req = self.request
        sink = io.StringIO()  # the pipeline's own progress lines; the window shows its own
        try:
            if req.kind == "sequence":
                result = render_sequence(req.frames, self._frame, req.out, req.fmt,
                                         stream=sink)
            else:
                result = render_video(req.frames, self._frame, req.out, req.size_px,
                                      self.scene.timeline.fps, req.quality, stream=sink)
            self._finish("done", f"wrote {req.out}: {result.summary.split(' -> ')[0]}")
        except JobCancelled:
            self._finish("cancelled", f"cancelled after {self.done} of {self.total} frames"
                         + (f"; the frames written so far are whole, in {req.out}"
                            if req.kind == "sequence" and self.done else
                            "; nothing was written" if req.kind == "video" else ""))
        except UserInputError as err:
            self._finish("failed", "not rendered: " + "; ".join(err.problems))
        except Exception as err:  # the window must stay up; say what went wrong
            self._finish("failed", f"not rendered: {type(err).__name__}: {err}")

    def _finish(self, state: str, summary: str) -> None:
        with self._cond:
            self.state = state
            self.summary = summary
            self._end = self.clock()
            self._cond.notify_all()

    # --- the GL thread ------------------------------------------------------------------

    def pump(self, draw: FrameFn, budget_s: float = 0.03) -> int:
        """Draw the frames the pipeline asks for, for up to ``budget_s`` of wall time
        (at least one frame if one is waiting); returns how many were drawn. Call it
        from the thread that owns the GL context of ``draw``."""
        t_end = time.monotonic() + budget_s
        drawn = 0
        while self.state == "running":
            with self._cond:
                while self._want is None and self.state == "running" and not self._cancel:
                    left = t_end - time.monotonic()
                    if left <= 0:
                        return drawn
                    self._cond.wait(min(left, 0.01))
                if self._want is None or self._cancel:
                    return drawn
                k = self._want
            try:
                img = draw(float(self.scene.timeline.time_of_frame(k)))
            except Exception as err:  # a GL failure ends the job, not the window
                self.cancel()
                self.join()
                self.state = "failed"
                self.summary = f"not rendered: the frame cannot be drawn: {err}"
                return drawn
            with self._cond:
                self._have = img
                self._want = None
                self.done += 1
                self._cond.notify_all()
            drawn += 1
            if time.monotonic() >= t_end:
                break
        return drawn

    def cancel(self) -> None:
        with self._cond:
            self._cancel = True
            self._cond.notify_all()

    def join(self, timeout_s: float | None = None) -> bool:
        """Wait for the worker to end; True if it has."""
        self._thread.join(timeout_s)
        return not self._thread.is_alive()

    # --- progress -----------------------------------------------------------------------

    @property
    def active(self) -> bool:
        return self.state == "running"

    @property
    def fraction(self) -> float:
        return self.done / self.total if self.total else 1.0

    @property
    def rate_fps(self) -> float:
        """Frames drawn per second of wall time so far."""
        elapsed = (self._end if self._end is not None else self.clock()) - self._start
        return self.done / elapsed if elapsed > 0 and self.done else 0.0

    @property
    def left_s(self) -> float:
        """Estimated wall time left, s (NaN until a frame is drawn)."""
        rate = self.rate_fps
        return (self.total - self.done) / rate if rate > 0 else math.nan

    def progress_text(self) -> str:
        """"120/660 frames, 14.2 frames/s, 0:38 left" (or the summary once it ended)."""
        if not self.active:
            return self.summary
        left = self.left_s
        eta = "?" if not math.isfinite(left) else _clock_text(left)
        return (f"{self.done}/{self.total} frames, {self.rate_fps:.1f} frames/s, "
                f"{eta} left")


def _clock_text(seconds: float) -> str:
    m, s = divmod(int(round(max(0.0, seconds))), 60)
    h, m = divmod(m, 60)
    return f"{h}:{m:02d}:{s:02d}" if h else f"{m}:{s:02d}"
