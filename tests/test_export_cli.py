"""`perifocal render` for sequences, video, dome masters and panoramas, end to end.

Small sizes and short timelines keep these quick; the geometry of each output is
measured in its own test file (test_export_dome.py, test_render_measured.py).
"""

from __future__ import annotations

import hashlib
import subprocess
import sys
from pathlib import Path

import numpy as np
import pytest

from viewer.cli import main
from viewer.export.frames import SETTINGS_NAME

pytestmark = pytest.mark.gl

SHORT = """
[scene]
title = "Short show"
epoch = "2030-01-01T00:00:00 TDB"
[center]
preset = "sun"
[[body]]
name = "Wren"
a = "1.0 au"
e = 0.3
sweep = { interval = "30 d", count = 4 }
[camera]
width = "3 au"
distance = "4 au"
[render]
size = [160, 90]
stars = false
[timeline]
rate = "10 d/s"
fps = 10
duration = "1.2 s"
"""


@pytest.fixture
def scene(tmp_path: Path) -> Path:
    path = tmp_path / "short.toml"
    path.write_text(SHORT)
    return path


def digest(folder: Path) -> dict[str, str]:
    return {p.name: hashlib.sha256(p.read_bytes()).hexdigest() for p in sorted(folder.iterdir())}


def test_a_folder_gets_the_whole_timeline_numbered_by_frame(scene: Path, tmp_path: Path) -> None:
    out = tmp_path / "frames"
    assert main(["render", str(scene), "-o", f"{out}/"]) == 0
    frames = sorted(p.name for p in out.iterdir() if p.name != SETTINGS_NAME)
    assert frames == [f"frame_{k:06d}.png" for k in range(12)]


def test_shards_on_several_machines_give_the_frames_of_one_run(scene: Path,
                                                                 tmp_path: Path) -> None:
    # Two separate processes stand for two machines rendering their --frames shards.
    whole, split = tmp_path / "whole", tmp_path / "split"
    assert main(["render", str(scene), "-o", f"{whole}/"]) == 0
    for shard in ("0:5", "5:12"):
        proc = subprocess.run([sys.executable, "-m", "viewer.cli", "render", str(scene),
                               "--frames", shard, "-o", f"{split}/"], capture_output=True,
                              text=True)
        assert proc.returncode == 0, proc.stderr
    assert digest(whole) == digest(split)


def test_resume_re_renders_deleted_and_truncated_frames_only(scene: Path, tmp_path: Path) -> None:
    out = tmp_path / "frames"
    assert main(["render", str(scene), "-o", f"{out}/"]) == 0
    before = digest(out)
    (out / "frame_000003.png").unlink()
    p = out / "frame_000007.png"
    p.write_bytes(p.read_bytes()[:100])
    mtimes = {q.name: q.stat().st_mtime_ns for q in out.iterdir()}
    assert main(["render", str(scene), "--resume", "-o", f"{out}/"]) == 0
    assert digest(out) == before
    touched = {q.name for q in out.iterdir() if q.stat().st_mtime_ns != mtimes.get(q.name)}
    assert touched == {"frame_000003.png", "frame_000007.png"}


def test_a_video_has_the_timeline_frame_count_and_the_asked_size(scene: Path,
                                                                  tmp_path: Path) -> None:
    from test_export_frames import decoded_frames

    out = tmp_path / "show.mp4"
    assert main(["render", str(scene), "--size", "160x90", "-o", str(out)]) == 0
    assert decoded_frames(out) == (12, 160, 90)
    assert main(["render", str(scene), "--frames", "2:7", "-o", str(out), "--force"]) == 0
    assert decoded_frames(out) == (5, 160, 90)


def test_dome_and_panorama_stills_have_their_default_sizes(scene: Path, tmp_path: Path) -> None:
    from PIL import Image

    assert main(["render", str(scene), "--dome", "-o", str(tmp_path / "dome.png")]) == 0
    assert main(["render", str(scene), "--panorama", "-o", str(tmp_path / "pano.png")]) == 0
    with Image.open(tmp_path / "dome.png") as dome, Image.open(tmp_path / "pano.png") as pano:
        assert dome.size == (90, 90)
        assert pano.size == (180, 90)
        corner = np.asarray(dome)[0, 0]
    assert tuple(corner[:3]) == (0, 0, 0)  # outside the dome's circle


def test_sixteen_bit_transparent_sequence(scene: Path, tmp_path: Path) -> None:
    out = tmp_path / "deep"
    assert main(["render", str(scene), "--frames", "0:1", "--bits", "16", "--transparent",
                 "-o", f"{out}/"]) == 0
    data = (out / "frame_000000.png").read_bytes()
    assert data[24:26] == bytes([16, 6])  # IHDR: 16 bits, RGBA


@pytest.mark.parametrize(
    ("flags", "source", "needle"),
    [
        (["--frames", "0:13", "-o", "F/"], "--frames", "at most 12"),
        (["--frames", "0:2", "-o", "x.png"], "--frames", "a still is one frame"),
        (["--at", "3 d", "-o", "F/"], "--at", "sequences and videos follow the timeline"),
        (["--size", "161x90", "-o", "x.mp4"], "--size", "even width and height"),
        (["--transparent", "-o", "x.mp4"], "--transparent", "no alpha channel"),
        (["-o", "x.gif"], "-o", "write a still"),
        (["--dome", "--size", "300x200", "-o", "d.png"], "--size", "square"),
        (["--panorama", "--size", "300x200", "-o", "p.png"], "--size", "2:1"),
        (["--dome", "--panorama", "-o", "p.png"], "--dome/--panorama", "choose one"),
        (["--tilt", "10", "-o", "p.png"], "--tilt", "add --dome"),
        (["--dome", "--tilt", "-50", "-o", "d.png"], "--tilt", "0 to 45 deg"),
        (["--dome", "--tilt", "60", "-o", "d.png"], "--tilt", "0 to 45 deg"),
        (["--resume", "-o", "x.png"], "--resume", "applies to a frame sequence"),
        (["--dome", "-o", "d.svg"], "-o", "flat view"),
    ],
)
def test_bad_render_options_exit_2_and_write_nothing(scene: Path, tmp_path: Path,
                                                    capsys: pytest.CaptureFixture[str],
                                                    flags: list[str], source: str,
                                                    needle: str, monkeypatch) -> None:
    monkeypatch.chdir(tmp_path)
    before = set(tmp_path.iterdir())
    assert main(["render", str(scene), *flags]) == 2
    err = capsys.readouterr().err
    assert err.splitlines()[0] == f"perifocal: error in {source}"
    assert needle in err
    assert "Traceback" not in err
    assert set(tmp_path.iterdir()) == before


def test_an_unwritable_output_folder_is_a_clear_error(scene: Path,
                                                      capsys: pytest.CaptureFixture[str]) -> None:
    assert main(["render", str(scene), "-o", "/proc/perifocal-no/frames/"]) == 2
    assert "cannot create the output folder" in capsys.readouterr().err


def _sizes(folder: Path) -> set[tuple[int, int]]:
    from PIL import Image

    sizes = set()
    for p in folder.glob("frame_*.png"):
        with Image.open(p) as img:
            sizes.add(img.size)
    return sizes


def test_resume_never_keeps_frames_made_with_other_settings(
        scene: Path, tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    out = tmp_path / "frames"
    assert main(["render", str(scene), "--size", "32x18", "--frames", "0:4", "-o", f"{out}/"]) == 0
    capsys.readouterr()
    # the folder's record says 32x18: resuming at 64x36 is refused, saying why
    code = main(["render", str(scene), "--size", "64x36", "--resume", "-o", f"{out}/"])
    err = capsys.readouterr().err
    assert code == 2 and "--resume" in err and "size" in err and "Traceback" not in err
    assert _sizes(out) == {(32, 18)}
    # a folder without the record (made by hand, or by an older version): every frame
    # is checked against the settings, and the ones that differ are made again
    (out / SETTINGS_NAME).unlink()
    assert main(["render", str(scene), "--size", "64x36", "--resume", "-o", f"{out}/"]) == 0
    assert _sizes(out) == {(64, 36)} and len(list(out.glob("frame_*.png"))) == 12
    # the scene itself is part of the settings
    scene.write_text(SHORT.replace("e = 0.3", "e = 0.4"))
    code = main(["render", str(scene), "--size", "64x36", "--resume", "-o", f"{out}/"])
    assert code == 2 and "scene_sha256" in capsys.readouterr().err


def test_resume_removes_the_temporary_file_of_a_killed_frame(scene: Path, tmp_path: Path) -> None:
    out = tmp_path / "frames"
    assert main(["render", str(scene), "--frames", "0:3", "-o", f"{out}/"]) == 0
    stale = out / ".frame_000003.png.k1ll3d.png.tmp"  # what atomic_path leaves when killed
    stale.write_bytes(b"\x89PNG half a frame")
    other = out / ".frame_000011.png.sh4rd.png.tmp"  # another shard's frame, still being written
    other.write_bytes(b"\x89PNG")
    assert main(["render", str(scene), "--frames", "0:6", "--resume", "-o", f"{out}/"]) == 0
    assert not stale.exists() and other.exists()


def test_a_master_too_large_for_memory_is_refused_before_anything_is_written(
        scene: Path, tmp_path: Path, capsys: pytest.CaptureFixture[str],
        monkeypatch: pytest.MonkeyPatch) -> None:
    import viewer.export.immersive as immersive

    monkeypatch.setattr(immersive, "available_memory_bytes", lambda: 2**30)  # 1 GiB free
    out = tmp_path / "dome.png"
    assert main(["render", str(scene), "--dome", "--size", "8192x8192", "--bits", "16",
                 "-o", str(out)]) == 2
    err = capsys.readouterr().err
    assert err.splitlines()[0] == "perifocal: error in --size"
    assert "GiB of memory" in err and "fits here now" in err
    assert not out.exists() and [p.name for p in tmp_path.iterdir()] == [scene.name]


def test_a_sequence_is_refused_where_its_frames_in_flight_do_not_fit(
        scene: Path, tmp_path: Path, capsys: pytest.CaptureFixture[str],
        monkeypatch: pytest.MonkeyPatch) -> None:
    """A sequence holds the frames its writer still encodes (up to five read back and two
    PNG encodes at once), so a size whose still fits can be refused as a sequence: one
    line naming the sequence, exit 2, no folder made."""
    import viewer.export.immersive as immersive
    from viewer.export.immersive import MEMORY_SHARE, Immersive

    spec = Immersive("dome", (8192, 8192), grid=1)
    still, seq = spec.memory_bytes(), spec.memory_bytes(sequence=True)
    assert seq >= still + 4 * 8192 * 8192 * 4  # four more frames at least
    free = int((still + seq) / 2 / MEMORY_SHARE)  # enough for the still, not the sequence
    spec.check_memory(available=free)  # the still fits
    monkeypatch.setattr(immersive, "available_memory_bytes", lambda: free)
    out = tmp_path / "frames"
    assert main(["render", str(scene), "--dome", "--size", "8192x8192", "--frames", "0:2",
                 "-o", f"{out}/"]) == 2
    err = capsys.readouterr().err
    assert err.splitlines()[0] == "perifocal: error in --size"
    assert "8192x8192 dome sequence needs about" in err and "fits here now" in err
    assert not out.exists()
