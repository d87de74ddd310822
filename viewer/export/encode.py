"""Encoders: RGBA frames (numpy uint8 or uint16, H x W x 4, top row first) to files.

PNG and JPEG through Pillow, written atomically; PNG integrity check for ``--resume``;
H.264 MP4 through imageio-ffmpeg (its wheel ships ffmpeg). Pillow's encoders release the
GIL, so a small thread pool encodes frame k while the renderer draws frame k + 1.
"""

from __future__ import annotations

import concurrent.futures
import errno
import io
import queue
import signal
import subprocess
import tempfile
import threading
import zlib
from pathlib import Path
from typing import Any

import numpy as np
from isal import isal_zlib

from ..errors import UserInputError
from ..fileio import atomic_write_bytes

STILL_FORMATS = ("png", "jpg")
#: ISA-L level for PNG: 1 compresses these dark, mostly flat frames nearly as well as
#: zlib's 6 at a fraction of the time (docs/performance.md).
PNG_LEVEL = 1


class RowScratch:
    """Memory for the scanlines of one PNG at a time, kept from frame to frame.

    A frame's rows are as large as the frame (200 MB at 8192 x 8192); new ones come
    from fresh pages that the kernel clears on the first write, which cost more than
    the packing itself at 8K. ``StillWriter`` gives each encode one of these.
    """

    def __init__(self) -> None:
        self.buf: np.ndarray | None = None

    def take(self, size: int) -> np.ndarray:
        if self.buf is None or self.buf.size != size:
            self.buf = np.empty(size, np.uint8)
        return self.buf


def _png_rows(rgba: np.ndarray, channels: int, per_sample: int,
              scratch: RowScratch | None = None) -> np.ndarray:
    """The PNG scanlines of a frame: filter byte 0 (None), then the samples, per row.

    Opaque 8-bit frames (RGB out of RGBA) are packed by ``_rgb_rows`` (into ``scratch``
    if given); other frames by a plain numpy copy of their samples.
    """
    h, w = rgba.shape[:2]
    if channels == 3 and per_sample == 1 and rgba.flags.c_contiguous:
        return _rgb_rows(rgba, scratch)
    row = 1 + w * channels * per_sample
    raw = np.empty((h, row), np.uint8)
    raw[:, 0] = 0
    samples = rgba.reshape(h, w, 4 * per_sample)[..., : channels * per_sample]
    raw[:, 1:] = samples.reshape(h, -1)
    return raw


def _rgb_rows(rgba: np.ndarray, scratch: RowScratch | None = None) -> np.ndarray:
    """PNG scanlines (filter byte 0, then R G B per pixel) of a C-contiguous RGBA uint8
    frame, by one copy of whole 4-byte pixels to byte offsets 3 apart.

    Each pixel's store also writes its alpha into the byte where the next pixel's red
    goes, and that next store, made after it, puts the red there; the row's last alpha
    lands on the next row's filter byte, which is set afterwards (one spare byte takes
    the frame's last). That is four times faster than copying two bytes and one byte
    per pixel (docs/performance.md), and it relies on numpy's copy storing a row's
    elements in order. A copy that stored them otherwise would garble the packed rows,
    so the last row is checked against the per-channel copy, and any difference falls
    back to that copy for the whole frame (tests/test_export_frames.py checks both).
    """
    h, w = rgba.shape[:2]
    row = 1 + 3 * w
    buf = np.empty(h * row + 1, np.uint8) if scratch is None else scratch.take(h * row + 1)
    np.ndarray((h, w), np.uint32, buf, 1, (row, 3))[...] = rgba.view(np.uint32)[..., 0]
    raw = buf[:h * row].reshape(h, row)
    raw[:, 0] = 0
    return _checked_rgb_rows(raw, rgba)


def _checked_rgb_rows(raw: np.ndarray, rgba: np.ndarray) -> np.ndarray:
    """``raw`` if its last row holds that row's R G B of ``rgba``; else ``raw`` rewritten
    by the per-channel copy."""
    h, w = rgba.shape[:2]
    if h and not np.array_equal(raw[-1, 1:].reshape(w, 3), rgba[-1, :, :3]):
        raw[:, 1:] = rgba[..., :3].reshape(h, -1)
    return raw


def png_bytes(rgba: np.ndarray, transparent: bool = False, bits: int = 8,
              scratch: RowScratch | None = None) -> bytes:
    """A PNG of an RGBA frame (top row first): RGB unless ``transparent``; 8 or 16 bits.

    Written directly (signature, IHDR, one IDAT, IEND) with filter type 0 on every row,
    deflated by ISA-L (``isal``) at its level 1: five times faster than zlib's fastest
    level on 1080p frames, for files about 2 % larger (docs/performance.md). The
    compressor releases the GIL, so frames encode on other threads while the next
    renders. Any PNG reader reads the stream: it is standard zlib. ``scratch`` holds
    the rows of opaque 8-bit frames.
    """
    if bits not in (8, 16):
        raise UserInputError("--bits", f"PNG depth must be 8 or 16, got {bits}")
    if bits == 16:
        arr = rgba if rgba.dtype == np.uint16 else rgba.astype(np.uint16) * 257
        arr = np.ascontiguousarray(arr.astype(">u2")).view(np.uint8)
    else:
        arr = rgba if rgba.dtype == np.uint8 else (rgba >> 8).astype(np.uint8)
    h, w = rgba.shape[:2]
    channels = 4 if transparent else 3
    raw = _png_rows(arr.reshape(h, w, -1), channels, bits // 8, scratch)

    def chunk(kind: bytes, data: bytes) -> bytes:
        return (len(data).to_bytes(4, "big") + kind + data
                + zlib.crc32(kind + data).to_bytes(4, "big"))

    color_type = 6 if transparent else 2
    ihdr = w.to_bytes(4, "big") + h.to_bytes(4, "big") + bytes([bits, color_type, 0, 0, 0])
    return (b"\x89PNG\r\n\x1a\n" + chunk(b"IHDR", ihdr)
            + chunk(b"IDAT", isal_zlib.compress(raw, PNG_LEVEL)) + chunk(b"IEND", b""))


def jpeg_bytes(rgba: np.ndarray, quality: int = 92) -> bytes:
    from PIL import Image

    img = Image.fromarray(np.ascontiguousarray(rgba[..., :3]), "RGB")
    buf = io.BytesIO()
    img.save(buf, format="JPEG", quality=quality, subsampling=0)
    return buf.getvalue()


def encode_still(rgba: np.ndarray, fmt: str, transparent: bool = False, bits: int = 8,
                 quality: int = 92, scratch: RowScratch | None = None) -> bytes:
    if fmt == "png":
        return png_bytes(rgba, transparent, bits, scratch)
    if fmt == "jpg":
        if transparent:
            raise UserInputError("--transparent", "JPEG has no alpha channel; use PNG")
        return jpeg_bytes(rgba if rgba.dtype == np.uint8 else (rgba >> 8).astype(np.uint8),
                          quality)
    raise UserInputError("--format", f"unknown format {fmt!r}; allowed: png, jpg")


def write_still(path: Path, rgba: np.ndarray, fmt: str, scratch: RowScratch | None = None,
                **options: Any) -> None:
    """Encode and write one image atomically (``scratch``: see ``png_bytes``)."""
    atomic_write_bytes(path, encode_still(rgba, fmt, scratch=scratch, **options))


def image_is_complete(path: Path, size: tuple[int, int] | None = None, fmt: str | None = None,
                      bits: int = 8, transparent: bool = False) -> bool:
    """True if ``path`` is a whole, decodable PNG or JPEG (for ``--resume``).

    With ``size`` (and ``fmt``, ``bits``, ``transparent``), it must also be the image the
    current settings make: that format, W x H pixels, that bit depth and alpha channel;
    a frame rendered with other settings is not complete.
    """
    try:
        data = path.read_bytes()
    except OSError:
        return False
    if data.startswith(b"\x89PNG\r\n\x1a\n"):
        if not data.endswith(b"IEND\xaeB`\x82"):
            return False
        kind = "png"
    elif data.startswith(b"\xff\xd8"):
        if not data.rstrip(b"\x00").endswith(b"\xff\xd9"):
            return False
        kind = "jpg"
    else:
        return False
    if fmt is not None and kind != fmt:
        return False
    if size is not None and kind == "png":
        w, h = int.from_bytes(data[16:20], "big"), int.from_bytes(data[20:24], "big")
        if (w, h) != tuple(size) or (data[24], data[25]) != (bits, 6 if transparent else 2):
            return False
    from PIL import Image

    try:
        with Image.open(io.BytesIO(data)) as img:
            img.load()
            if size is not None and img.size != tuple(size):
                return False
    except Exception:  # any decoding failure means "render it again"
        return False
    return True


#: Frames a StillWriter encodes at once (its threads).
STILL_WORKERS = 2


class StillWriter:
    """Encodes and writes frames on a thread pool, a bounded number in flight."""

    def __init__(self, workers: int = STILL_WORKERS, in_flight: int = 4) -> None:
        self.pool = concurrent.futures.ThreadPoolExecutor(max_workers=workers)
        self.in_flight = in_flight
        self.pending: list[concurrent.futures.Future[None]] = []
        # One RowScratch per encode running at once (at most ``workers``), reused.
        self._scratch: queue.SimpleQueue[RowScratch] = queue.SimpleQueue()

    def submit(self, path: Path, rgba: np.ndarray, fmt: str, **options: Any) -> None:
        while len(self.pending) >= self.in_flight:
            self.pending.pop(0).result()  # raises the worker's error, if any
        self.pending.append(self.pool.submit(self._write, path, rgba, fmt, options))

    def _write(self, path: Path, rgba: np.ndarray, fmt: str, options: dict[str, Any]) -> None:
        try:
            scratch = self._scratch.get_nowait()
        except queue.Empty:
            scratch = RowScratch()
        try:
            write_still(path, rgba, fmt, scratch=scratch, **options)
        finally:
            self._scratch.put(scratch)

    def close(self) -> None:
        try:
            for f in self.pending:
                f.result()
        finally:
            self.pending.clear()
            self.pool.shutdown(wait=True, cancel_futures=True)

    def __enter__(self) -> StillWriter:
        return self

    def __exit__(self, *exc: object) -> None:
        self.close()


#: --quality names for video -> x264 CRF and preset. "preview" (the default) is
#: superfast: on 2 cores shared with llvmpipe it keeps 1080p output above 30 frames/s
#: (veryfast does not; docs/performance.md), at about twice veryfast's file size.
VIDEO_QUALITY = {"draft": (28, "ultrafast"), "preview": (23, "superfast"),
                 "final": (17, "slow")}


def check_video_size(width: int, height: int) -> None:
    """H.264 in yuv420p needs even sizes; refuse odd ones rather than resize silently."""
    if width % 2 or height % 2:
        raise UserInputError("--size", f"video needs an even width and height (H.264 "
                             f"yuv420p), got {width}x{height}; try "
                             f"{width + width % 2}x{height + height % 2}")


class VideoWriter:
    """H.264 MP4: raw RGBA frames piped into the ffmpeg that imageio-ffmpeg ships.

    We run that binary ourselves (``imageio_ffmpeg.get_ffmpeg_exe()``) rather than through
    its ``write_frames`` generator, which leaves pipe files unclosed (imageio-ffmpeg issue
    #61); this way the pipes are closed and ffmpeg's own error text is kept for a clear
    message. A feeder thread writes into the pipe (the write releases the GIL), so the
    next frame renders while ffmpeg takes in the last one.
    """

    def __init__(self, path: Path, size: tuple[int, int], fps: float,
                 quality: str = "preview") -> None:
        import imageio_ffmpeg

        check_video_size(*size)
        crf, preset = VIDEO_QUALITY[quality]
        w, h = size
        self.size = size
        cmd = [imageio_ffmpeg.get_ffmpeg_exe(), "-y", "-loglevel", "error",
               "-f", "rawvideo", "-pix_fmt", "rgba", "-s", f"{w}x{h}", "-r", f"{fps}",
               "-i", "-", "-an", "-c:v", "libx264", "-preset", preset, "-crf", str(crf),
               "-pix_fmt", "yuv420p", "-movflags", "+faststart", "-f", "mp4", str(path)]
        self._err = tempfile.TemporaryFile()
        self._proc = subprocess.Popen(cmd, stdin=subprocess.PIPE, stdout=subprocess.DEVNULL,
                                      stderr=self._err)
        self._queue: queue.Queue[np.ndarray | None] = queue.Queue(maxsize=2)
        self._broken = False
        self._feeder = threading.Thread(target=self._feed, daemon=True)
        self._feeder.start()

    def _feed(self) -> None:
        stdin = self._proc.stdin
        assert stdin is not None
        while (frame := self._queue.get()) is not None:
            if self._broken:
                continue
            try:
                stdin.write(frame.data)
            except (BrokenPipeError, OSError):
                self._broken = True  # ffmpeg has stopped; close() reports its reason

    def write(self, rgba: np.ndarray) -> None:
        if rgba.dtype != np.uint8:
            rgba = (rgba >> 8).astype(np.uint8)
        if self._broken:
            self.close()  # raises with ffmpeg's reason
        # RGBA as it comes from the renderer, no copy: ffmpeg drops the alpha itself.
        self._queue.put(np.ascontiguousarray(rgba))

    def close(self) -> None:
        """Finish the file; raises OSError with ffmpeg's message if it failed."""
        if self._feeder.is_alive():
            self._queue.put(None)
            self._feeder.join()
        if self._proc.stdin is not None and not self._proc.stdin.closed:
            try:
                self._proc.stdin.close()
            except BrokenPipeError:
                pass
        code = self._proc.wait()
        self._err.seek(0)
        text = self._err.read().decode(errors="replace").strip()
        self._err.close()
        if code != 0:
            if code < 0:  # killed by a signal; SIGXFSZ is the file-size limit
                name = signal.Signals(-code).name
                reason = text.splitlines()[-1] if text else f"ffmpeg was stopped by {name}"
                if -code == signal.SIGXFSZ:
                    raise OSError(errno.EFBIG, reason)
                raise OSError(reason)
            reason = text.splitlines()[-1] if text else f"ffmpeg exited with code {code}"
            err = errno.ENOSPC if "No space left" in text else (
                errno.EFBIG if "File too large" in text else None)
            raise OSError(err, reason) if err else OSError(reason)
