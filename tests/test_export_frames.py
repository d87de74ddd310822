"""The export pipeline: frame ranges, names, resume, atomic files, video, bad options.

Frames here come from a small deterministic function of the frame number, so these tests
check the pipeline alone; tests with the real renderer live beside the renderer's.
"""

from __future__ import annotations

import io
import os
import subprocess
import sys
import textwrap
from pathlib import Path

import numpy as np
import pytest

from viewer.errors import UserInputError
from viewer.export.encode import check_video_size, image_is_complete, png_bytes
from viewer.export.frames import frame_path, parse_frame_range, render_sequence, render_video
from viewer.export.progress import Progress

H, W = 48, 64


def frame_of(k: int) -> np.ndarray:
    """A frame that differs for every k: a bar at row k, alpha 255."""
    img = np.zeros((H, W, 4), np.uint8)
    img[..., 3] = 255
    img[k % H, :, :3] = (255, 200, 40)
    return img


def test_frame_ranges_are_half_open_and_checked_against_the_timeline() -> None:
    assert parse_frame_range(None, 600) == range(600)
    assert parse_frame_range("40:80", 600) == range(40, 80)
    assert parse_frame_range(":10", 600) == range(10)
    assert parse_frame_range("590:", 600) == range(590, 600)
    # A step, as in a Python slice: every 30th frame of a 30 fps show is one a second.
    assert parse_frame_range("::30", 600) == range(0, 600, 30)
    assert list(parse_frame_range("10:100:45", 600)) == [10, 55]
    for bad, needle in (("0:601", "at most 600"), ("5:5", "0 <= A < B"), ("a:b", "not a range"),
                        ("-1:4", "0 <= A < B"), ("1:2:x", "not a range"),
                        ("1:2:3:4", "not a range"), ("0:10:0", "step must be")):
        with pytest.raises(UserInputError, match=needle):
            parse_frame_range(bad, 600)


def test_files_are_numbered_by_absolute_frame(tmp_path: Path) -> None:
    render_sequence(range(40, 43), frame_of, tmp_path / "out", stream=io.StringIO())
    assert sorted(p.name for p in (tmp_path / "out").iterdir()) == [
        "frame_000040.png", "frame_000041.png", "frame_000042.png"]


def test_a_split_render_gives_the_same_bytes_as_a_whole_one(tmp_path: Path) -> None:
    render_sequence(range(0, 6), frame_of, tmp_path / "whole", stream=io.StringIO())
    render_sequence(range(0, 3), frame_of, tmp_path / "split", stream=io.StringIO())
    render_sequence(range(3, 6), frame_of, tmp_path / "split", stream=io.StringIO())
    for k in range(6):
        assert (frame_path(tmp_path / "whole", k, "png").read_bytes()
                == frame_path(tmp_path / "split", k, "png").read_bytes())


def test_resume_renders_only_missing_and_broken_frames(tmp_path: Path) -> None:
    out = tmp_path / "seq"
    render_sequence(range(8), frame_of, out, stream=io.StringIO())
    good = frame_path(out, 5, "png").read_bytes()
    frame_path(out, 2, "png").unlink()                       # deleted
    p = frame_path(out, 5, "png")
    p.write_bytes(good[: len(good) // 2])                    # truncated
    frame_path(out, 6, "png").write_bytes(b"\x89PNG\r\n\x1a\n" + b"\0" * 64)  # garbage
    rendered: list[int] = []

    def counting(k: int) -> np.ndarray:
        rendered.append(k)
        return frame_of(k)

    result = render_sequence(range(8), counting, out, resume=True, stream=io.StringIO())
    assert sorted(rendered) == [2, 5, 6]
    assert (result.rendered, result.skipped) == (3, 5)
    assert frame_path(out, 5, "png").read_bytes() == good
    assert all(image_is_complete(frame_path(out, k, "png")) for k in range(8))


@pytest.mark.parametrize("transparent", [False, True])
def test_eight_bit_png_decodes_to_the_same_pixels(tmp_path: Path, transparent: bool) -> None:
    from PIL import Image

    img = np.random.default_rng(3).integers(0, 256, (H, W, 4), dtype=np.uint8)
    path = tmp_path / "frame.png"
    path.write_bytes(png_bytes(img, transparent=transparent))
    with Image.open(path) as decoded:
        assert decoded.mode == ("RGBA" if transparent else "RGB")
        got = np.asarray(decoded)
    assert np.array_equal(got, img if transparent else img[..., :3])


def test_opaque_png_rows_are_each_pixels_rgb_for_any_width() -> None:
    """The packed scanlines (one overlapping 4-byte copy per pixel) equal the plain
    per-channel copy, at widths of every remainder mod 4 and a single row or column;
    a packing garbled in any row is caught by the last-row check and redone."""
    from viewer.export.encode import _checked_rgb_rows, _png_rows

    rng = np.random.default_rng(11)
    for h, w in ((1, 1), (1, 7), (5, 1), (9, 13), (16, 30), (33, 64), (7, 1023)):
        img = rng.integers(0, 256, (h, w, 4), dtype=np.uint8)
        raw = _png_rows(img, 3, 1)
        assert raw.shape == (h, 1 + 3 * w)
        assert not raw[:, 0].any()
        assert np.array_equal(raw[:, 1:].reshape(h, w, 3), img[..., :3])
    img = rng.integers(0, 256, (6, 10, 4), dtype=np.uint8)
    garbled = np.zeros((6, 31), np.uint8)
    fixed = _checked_rgb_rows(garbled, img)
    assert np.array_equal(fixed[:, 1:].reshape(6, 10, 3), img[..., :3])


def test_sixteen_bit_png_keeps_the_values(tmp_path: Path) -> None:
    from PIL import Image

    img = (np.arange(H * W * 4, dtype=np.uint32).reshape(H, W, 4) * 37 % 65536).astype(np.uint16)
    path = tmp_path / "deep.png"
    path.write_bytes(png_bytes(img, transparent=True, bits=16))
    with Image.open(path) as decoded:
        assert decoded.size == (W, H)
    # Pillow reads 16-bit RGBA as 8-bit; decode with zlib to check the stored samples.
    import zlib

    data = path.read_bytes()
    idat = data[data.index(b"IDAT") + 4: data.index(b"IEND") - 8]
    raw = np.frombuffer(zlib.decompress(idat), np.uint8).reshape(H, 1 + W * 8)
    samples = raw[:, 1:].copy().view(">u2").reshape(H, W, 4)
    assert np.array_equal(samples, img)


def test_the_video_decodes_to_the_right_frame_count_and_size(tmp_path: Path) -> None:
    out = tmp_path / "show.mp4"
    render_video(range(12), frame_of, out, (W, H), fps=24, stream=io.StringIO())
    assert decoded_frames(out) == (12, W, H)
    assert [p.name for p in tmp_path.iterdir()] == ["show.mp4"]  # no temporary left


def decoded_frames(path: Path) -> tuple[int, int, int]:
    """(frame count, width, height) by decoding the whole video with the bundled ffmpeg."""
    import re

    import imageio_ffmpeg

    proc = subprocess.run([imageio_ffmpeg.get_ffmpeg_exe(), "-hide_banner", "-i", str(path),
                           "-f", "rawvideo", "-pix_fmt", "rgb24", "-"], capture_output=True)
    assert proc.returncode == 0, proc.stderr.decode()
    w, h = map(int, re.search(rb"Video: .*?, (\d+)x(\d+)", proc.stderr).groups())
    count, rest = divmod(len(proc.stdout), w * h * 3)
    assert rest == 0
    return count, w, h


def test_odd_video_sizes_are_refused_not_resized() -> None:
    with pytest.raises(UserInputError, match="even width and height"):
        check_video_size(1919, 1080)


def test_an_unwritable_folder_is_a_clear_error(tmp_path: Path) -> None:
    if os.geteuid() == 0:
        target = Path("/proc/perifocal-cannot-exist/frames")  # even root cannot write here
    else:
        locked = tmp_path / "locked"
        locked.mkdir(mode=0o500)
        target = locked / "frames"
    with pytest.raises(UserInputError, match="cannot create the output folder"):
        render_sequence(range(2), frame_of, target, stream=io.StringIO())


def run_with_file_size_limit(limit_bytes: int, call: str) -> subprocess.CompletedProcess[str]:
    """Run ``call`` (an export of noisy 64x64 frames) in a child that may write files of at
    most ``limit_bytes`` (RLIMIT_FSIZE, a stand-in for a full disk), reporting a
    UserInputError the way the command does (exit 2)."""
    script = textwrap.dedent(f"""
        import io, resource, signal, sys
        import numpy as np
        signal.signal(signal.SIGXFSZ, signal.SIG_IGN)   # get EFBIG instead of a kill
        resource.setrlimit(resource.RLIMIT_FSIZE, ({limit_bytes}, {limit_bytes}))
        from pathlib import Path
        from viewer.cli import report_input_error
        from viewer.errors import UserInputError
        from viewer.export.frames import render_sequence, render_video
        rng = np.random.default_rng(1)
        def noisy(k):
            return rng.integers(0, 255, (64, 64, 4), dtype=np.uint8)
        try:
            {call}
        except UserInputError as err:
            report_input_error(err)
            sys.exit(2)
    """)
    return subprocess.run([sys.executable, "-c", script], capture_output=True, text=True)


def test_a_full_disk_leaves_no_partial_frame(tmp_path: Path) -> None:
    # Files of at most 2 kB; our frames are larger.
    proc = run_with_file_size_limit(2048, f"render_sequence(range(3), noisy, "
                                    f"Path({str(tmp_path / 'full')!r}), stream=io.StringIO())")
    assert proc.returncode == 2, proc.stderr
    assert "file size limit" in proc.stderr
    assert "Traceback" not in proc.stderr
    assert list((tmp_path / "full").iterdir()) == []  # no partial frame, no temporary


class FakeClock:
    def __init__(self) -> None:
        self.t = 0.0

    def __call__(self) -> float:
        return self.t


def test_progress_prints_rate_and_time_left_then_a_summary() -> None:
    clock = FakeClock()
    out = io.StringIO()
    p = Progress(10, "frames", out, clock=clock, every_s=0.0)
    for _ in range(4):
        clock.t += 0.5
        p.advance()
    assert "4/10 frames, 2.0/s, 0:03 left" in out.getvalue()
    clock.t += 3.0
    for _ in range(6):
        p.advance(skipped=True)
    assert p.finish("out/") == "4 frames in 0:05, 0.8/s, 6 already complete, skipped -> out/"


def test_a_full_disk_during_a_video_leaves_no_partial_file(tmp_path: Path) -> None:
    # ffmpeg inherits the child's 20 kB file-size limit; the video needs more.
    proc = run_with_file_size_limit(20_000, f"render_video(range(60), noisy, "
                                    f"Path({str(tmp_path / 'show.mp4')!r}), (64, 64), 24, "
                                    f"stream=io.StringIO())")
    assert proc.returncode == 2, proc.stderr
    assert "writing the video failed" in proc.stderr
    assert "file size limit" in proc.stderr
    assert "Traceback" not in proc.stderr
    assert list(tmp_path.iterdir()) == []
