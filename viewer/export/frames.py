"""Timelines to frames to files: frame ranges, file names, resume, the render loop.

A frame depends only on the scene and its number, so ``--frames A:B`` is the unit of
work for any scheduler, and a split render gives the same files as a whole one. Files
are numbered by absolute frame: ``frame_000040.png`` is frame 40 wherever it was made.
"""

from __future__ import annotations

import contextlib
import json
import os
from collections.abc import Callable, Mapping
from dataclasses import dataclass
from pathlib import Path
from typing import TextIO

import numpy as np

from ..errors import UserInputError
from ..fileio import atomic_path, atomic_write_bytes, describe_os_error
from .encode import StillWriter, VideoWriter, image_is_complete
from .progress import Progress

FRAME_NAME = "frame_{:06d}.{}"
#: The settings a sequence folder's frames were made with (for --resume).
SETTINGS_NAME = ".perifocal-frames.json"


def parse_frame_range(text: str | None, frame_count: int) -> range:
    """Frames A..B-1 from "A:B", or every S-th of them from "A:B:S" (as a Python slice;
    A or B may be empty: ":B", "A:", "::30"), checked.

    Without ``text`` the whole timeline. B past the last frame is an error.
    """
    if frame_count <= 0:
        raise UserInputError("[timeline]", "the timeline has no frames (duration * fps "
                             "rounds to 0); set duration and fps")
    if text is None:
        return range(frame_count)
    parts = text.split(":")
    try:
        if len(parts) not in (2, 3):
            raise ValueError
        a = int(parts[0]) if parts[0].strip() else 0
        b = int(parts[1]) if parts[1].strip() else frame_count
        step = int(parts[2]) if len(parts) == 3 and parts[2].strip() else 1
    except ValueError:
        raise UserInputError("--frames", f"{text!r} is not a range A:B (or A:B:STEP) of "
                             f"frame numbers (e.g. 0:{frame_count}, or 0:{frame_count}:30 "
                             "for every 30th frame)") from None
    if a < 0 or b <= a:
        raise UserInputError("--frames", f"{text!r}: need 0 <= A < B")
    if step < 1:
        raise UserInputError("--frames", f"{text!r}: the step must be a whole number >= 1")
    if b > frame_count:
        raise UserInputError("--frames", f"{text!r}: the timeline has {frame_count} frames "
                             f"(0..{frame_count - 1}), so B may be at most {frame_count}")
    return range(a, b, step)


def frame_path(folder: Path, k: int, fmt: str) -> Path:
    return folder / FRAME_NAME.format(k, fmt)


@dataclass
class SequenceResult:
    rendered: int
    skipped: int
    summary: str


RenderFn = Callable[[int], np.ndarray]


def prepare_folder(folder: Path) -> None:
    try:
        folder.mkdir(parents=True, exist_ok=True)
    except OSError as err:
        raise UserInputError(str(folder), f"cannot create the output folder: "
                             f"{describe_os_error(err)}") from None
    if not os.access(folder, os.W_OK):
        raise UserInputError(str(folder), "the output folder is not writable")


def record_settings(folder: Path, settings: Mapping[str, object], resume: bool) -> None:
    """With ``resume``, refuse a folder whose frames were made with other settings (its
    SETTINGS_NAME file says so); then record the current ones there."""
    record = folder / SETTINGS_NAME
    wanted = json.loads(json.dumps(dict(settings)))  # as it reads back (tuples -> lists)
    try:
        before = json.loads(record.read_text(encoding="utf-8"))
    except (OSError, ValueError):
        before = None
    if before == wanted:
        return
    if resume:
        if isinstance(before, dict):
            changed = ", ".join(f"{k} {before.get(k)!r} -> {wanted.get(k)!r}"
                                for k in sorted(set(before) | set(wanted))
                                if before.get(k) != wanted.get(k))
            raise UserInputError("--resume", f"the frames in {folder} were rendered with other "
                                 f"settings ({changed}); resume with the same settings, or "
                                 f"render without --resume (or into a new folder)")
    try:
        atomic_write_bytes(record, (json.dumps(wanted, indent=1) + "\n").encode("utf-8"))
    except OSError as err:
        raise UserInputError(str(folder), f"writing frames failed: "
                             f"{describe_os_error(err)}") from None


def _remove_stale_temporaries(folder: Path, frames: range, fmt: str) -> None:
    """The temporary files of frames of ``frames`` that a killed render left behind (only
    of these frames: another shard may be writing its own into the same folder)."""
    for k in frames:
        for tmp in folder.glob(f".{FRAME_NAME.format(k, fmt)}.*.tmp"):
            with contextlib.suppress(OSError):
                tmp.unlink()


def render_sequence(frames: range, render: RenderFn, folder: Path, fmt: str = "png",
                    resume: bool = False, stream: TextIO | None = None,
                    size: tuple[int, int] | None = None,
                    settings: Mapping[str, object] | None = None,
                    **options: object) -> SequenceResult:
    """Render ``frames`` into ``folder`` as numbered stills; with ``resume``, frames whose
    files are already whole are skipped and broken ones are rendered again.

    With ``size``, a frame counts as whole only if it is the image these settings make
    (format, size, bit depth, alpha); with ``settings`` (everything else a frame depends
    on, e.g. the scene's digest), a resume into a folder made with others is refused.
    Temporary files that a killed render left for these frames are removed on resume.
    """
    prepare_folder(folder)
    if settings is not None:
        record_settings(folder, settings, resume)
    if resume:
        _remove_stale_temporaries(folder, frames, fmt)
    bits = int(options.get("bits", 8))  # type: ignore[call-overload]
    transparent = bool(options.get("transparent", False))
    progress = Progress(len(frames), "frames", stream)
    try:
        with StillWriter() as writer:
            for k in frames:
                path = frame_path(folder, k, fmt)
                if resume and image_is_complete(path, size, fmt if size else None, bits,
                                                transparent):
                    progress.advance(skipped=True)
                    continue
                writer.submit(path, render(k), fmt, **options)
                progress.advance()
    except OSError as err:
        raise UserInputError(str(folder), f"writing frames failed: "
                             f"{describe_os_error(err)}") from None
    summary = progress.finish(str(folder))
    return SequenceResult(progress.done - progress.skipped, progress.skipped, summary)


def render_video(frames: range, render: RenderFn, out: Path, size: tuple[int, int],
                 fps: float, quality: str = "preview",
                 stream: TextIO | None = None) -> SequenceResult:
    """Render ``frames`` into one H.264 MP4, written atomically (temp file, then rename)."""
    progress = Progress(len(frames), "frames", stream)
    try:
        with atomic_path(out, suffix=".tmp.mp4") as tmp:
            writer = VideoWriter(tmp, size, fps, quality)
            try:
                for k in frames:
                    writer.write(render(k))
                    progress.advance()
            finally:
                writer.close()
    except OSError as err:
        raise UserInputError(str(out), f"writing the video failed: "
                             f"{describe_os_error(err)}") from None
    summary = progress.finish(str(out))
    return SequenceResult(progress.done, 0, summary)
