"""`perifocal render --scheduler` on a real Dask cluster, and `perifocal missing`.

A ``distributed.LocalCluster`` with two worker processes (each with its own GL context,
as on a render farm) renders small frames, so the cluster tests stay quick. The local
render through the same command is the reference: the cluster's files must be the same
bytes, because a frame is a pure function of the scene and its number.
"""

from __future__ import annotations

import hashlib
import os
import signal
import socket
import threading
import time
from collections.abc import Iterator
from pathlib import Path

import pytest

from viewer.cli import main
from viewer.export.completeness import frame_ranges

distributed = pytest.importorskip("distributed")
dask = pytest.importorskip("dask")

pytestmark = pytest.mark.gl

SHOW = """
[scene]
title = "Cluster show"
epoch = "2030-01-01T00:00:00 TDB"
[center]
preset = "sun"
[[body]]
name = "Wren"
a = "1.0 au"
e = 0.3
sweep = { interval = "30 d", count = 4 }
[[body]]
name = "Ost"
a = "1.6 au"
e = 0.1
[camera]
width = "4 au"
distance = "5 au"
[render]
size = [160, 90]
stars = false
[timeline]
rate = "10 d/s"
fps = 10
duration = "4 s"
[[timeline.caption]]
text = "Second law"
start = "0.5 s"
end = "3 s"
"""
FRAMES = 40


@pytest.fixture(scope="module")
def cluster() -> Iterator[object]:
    """Two worker processes with one thread each (one GL context each)."""
    with (pytest.MonkeyPatch.context() as mp):
        mp.setenv("LP_NUM_THREADS", "1")
        with distributed.LocalCluster(n_workers=2, threads_per_worker=1, processes=True,
                                      dashboard_address=":0", silence_logs=40) as c:
            yield c


@pytest.fixture(scope="module")
def scene(tmp_path_factory: pytest.TempPathFactory) -> Path:
    path = tmp_path_factory.mktemp("show") / "show.toml"
    path.write_text(SHOW)
    return path


@pytest.fixture(scope="module")
def local(scene: Path) -> Path:
    """The reference: the same show rendered on this machine alone."""
    out = scene.parent / "local"
    assert main(["render", str(scene), "-o", f"{out}/"]) == 0
    return out


def digest(folder: Path) -> dict[str, str]:
    """Every file of a folder by its bytes: the frames and the settings record."""
    return {p.name: hashlib.sha256(p.read_bytes()).hexdigest() for p in sorted(folder.iterdir())}


def frames_of(folder: Path) -> dict[str, str]:
    return {k: v for k, v in digest(folder).items() if k.startswith("frame_")}


def test_a_cluster_render_is_byte_identical_to_a_local_one(
        cluster: object, scene: Path, local: Path, tmp_path: Path,
        capsys: pytest.CaptureFixture[str]) -> None:
    address = cluster.scheduler_address  # type: ignore[attr-defined]
    shared = tmp_path / "shared"
    assert main(["render", str(scene), "--scheduler", address, "--chunk", "3",
                 "-o", f"{shared}/"]) == 0
    assert f"all {FRAMES} frames checked whole" in capsys.readouterr().out
    assert digest(shared) == digest(local)
    assert len(frames_of(local)) == FRAMES
    # With no shared storage the client writes the frames the workers send back.
    back = tmp_path / "back"
    assert main(["render", str(scene), "--scheduler", address, "--return-frames",
                 "-o", f"{back}/"]) == 0
    assert digest(back) == digest(local)


def test_the_address_can_come_from_dask_s_own_variable(cluster: object, scene: Path,
                                                      local: Path, tmp_path: Path,
                                                      monkeypatch: pytest.MonkeyPatch) -> None:
    monkeypatch.setenv("DASK_SCHEDULER_ADDRESS", cluster.scheduler_address)  # type: ignore
    out = tmp_path / "env"
    assert main(["render", str(scene), "--frames", "10:20", "-o", f"{out}/"]) == 0
    assert frames_of(out) == {k: v for k, v in frames_of(local).items()
                           if 10 <= int(k[6:12]) < 20}


def test_a_cluster_video_is_the_same_file_as_a_local_one(cluster: object, scene: Path,
                                                        tmp_path: Path) -> None:
    # x264 is deterministic for the same frames and settings (common practice, no source),
    # and the client feeds it the frames in order however the chunks arrive.
    assert main(["render", str(scene), "-o", str(tmp_path / "here.mp4")]) == 0
    assert main(["render", str(scene), "--scheduler",
                 cluster.scheduler_address, "--chunk", "2",  # type: ignore[attr-defined]
                 "-o", str(tmp_path / "there.mp4")]) == 0
    assert (tmp_path / "here.mp4").read_bytes() == (tmp_path / "there.mp4").read_bytes()


def test_resume_on_the_cluster_renders_only_missing_and_broken_frames(
        cluster: object, scene: Path, local: Path, tmp_path: Path) -> None:
    out = tmp_path / "resume"
    out.mkdir()
    for name in ("frame_000003.png", "frame_000004.png", "frame_000030.png"):
        (out / name).write_bytes((local / name).read_bytes())
    (out / "frame_000030.png").write_bytes((local / "frame_000030.png").read_bytes()[:200])
    before = (out / "frame_000003.png").stat().st_mtime_ns
    assert main(["render", str(scene), "--scheduler",
                 cluster.scheduler_address,  # type: ignore[attr-defined]
                 "--resume", "-o", f"{out}/"]) == 0
    assert digest(out) == digest(local)
    assert (out / "frame_000003.png").stat().st_mtime_ns == before  # left alone


def test_a_killed_worker_costs_only_its_chunk(cluster: object, scene: Path, local: Path,
                                             tmp_path: Path) -> None:
    address = cluster.scheduler_address  # type: ignore[attr-defined]
    out = tmp_path / "killed"
    with distributed.Client(address, set_as_default=False) as client:
        pids = client.run(os.getpid)
    victim = sorted(pids.values())[0]
    seen: list[int] = []

    def kill_when_frames_appear() -> None:
        deadline = time.monotonic() + 60
        while time.monotonic() < deadline:
            if out.is_dir() and any(out.glob("frame_*.png")):
                seen.append(len(list(out.glob("frame_*.png"))))
                os.kill(victim, signal.SIGKILL)
                return
            time.sleep(0.002)

    killer = threading.Thread(target=kill_when_frames_appear)
    killer.start()
    try:
        assert main(["render", str(scene), "--scheduler", address, "--chunk", "2",
                     "-o", f"{out}/"]) == 0
    finally:
        killer.join()
    assert seen and seen[0] < FRAMES  # the worker died with the show under way
    assert digest(out) == digest(local)  # every frame there, and each one the same bytes
    with distributed.Client(address, set_as_default=False) as client:
        client.wait_for_workers(2, timeout=60)
        assert victim not in client.run(os.getpid).values()  # a new process took its place


def unused_port() -> int:
    with socket.socket() as s:
        s.bind(("127.0.0.1", 0))
        return int(s.getsockname()[1])


def test_an_unreachable_scheduler_is_one_line_and_nothing_is_written(
        scene: Path, tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    out = tmp_path / "never"
    with dask.config.set({"distributed.comm.timeouts.connect": "2s"}):
        code = main(["render", str(scene), "--scheduler", f"tcp://127.0.0.1:{unused_port()}",
                     "-o", f"{out}/"])
    err = capsys.readouterr().err
    assert code == 2
    assert "cannot reach a Dask scheduler at tcp://127.0.0.1:" in err
    assert "Traceback" not in err
    assert not out.exists()


@pytest.mark.parametrize(("flags", "message"), [
    (["--scheduler", "localhost"], "not a scheduler address"),
    (["--scheduler", "tcp://host:99999"], "not a scheduler address"),
    (["--scheduler", "tcp://127.0.0.1:8786", "--chunk", "0"], "give 1 or more"),
    (["--chunk", "4"], "applies to a render on a cluster"),
    (["--return-frames"], "applies to a render on a cluster"),
])
def test_bad_cluster_options_are_refused_before_anything_is_written(
        scene: Path, tmp_path: Path, capsys: pytest.CaptureFixture[str], flags: list[str],
        message: str, monkeypatch: pytest.MonkeyPatch) -> None:
    monkeypatch.delenv("DASK_SCHEDULER_ADDRESS", raising=False)
    out = tmp_path / "never"
    assert main(["render", str(scene), *flags, "-o", f"{out}/"]) == 2
    assert message in capsys.readouterr().err
    assert not out.exists()


def test_workers_that_cannot_write_the_folder_are_refused(
        cluster: object, scene: Path, capsys: pytest.CaptureFixture[str]) -> None:
    # Even root cannot make a folder under /proc.
    out = "/proc/perifocal-cannot-exist/frames/"
    code = main(["render", str(scene), "--scheduler",
                 cluster.scheduler_address, "-o", out])  # type: ignore[attr-defined]
    err = capsys.readouterr().err
    assert code == 2
    assert "2 of 2 workers cannot write the output folder" in err


def test_workers_with_another_version_are_refused(cluster: object, scene: Path, tmp_path: Path,
                                                 capsys: pytest.CaptureFixture[str],
                                                 monkeypatch: pytest.MonkeyPatch) -> None:
    import viewer.export.cluster as cluster_module

    monkeypatch.setattr(cluster_module, "__version__", "0.0.0-elsewhere")  # this client only
    out = tmp_path / "never"
    code = main(["render", str(scene), "--scheduler",
                 cluster.scheduler_address, "-o", f"{out}/"])  # type: ignore[attr-defined]
    err = capsys.readouterr().err
    assert code == 2
    assert "this client Perifocal 0.0.0-elsewhere, isal" in err
    assert "install the same versions everywhere" in err
    assert not out.exists()


def test_missing_lists_absent_and_broken_frames_as_ranges(
        scene: Path, local: Path, tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    folder = tmp_path / "partial"
    folder.mkdir()
    for k in range(FRAMES):
        if k in (5, 6, 7, 20):
            continue
        data = (local / f"frame_{k:06d}.png").read_bytes()
        (folder / f"frame_{k:06d}.png").write_bytes(data[:-20] if k == 33 else data)
    assert main(["missing", str(scene), str(folder)]) == 3
    assert "5 of 40 frames are missing or broken: 5:8 20:21 33:34" in capsys.readouterr().out
    assert main(["missing", str(scene), str(local)]) == 0
    assert "all 40 frames (0:40) are whole" in capsys.readouterr().out
    assert main(["missing", str(scene), str(folder), "--frames", "8:20"]) == 0


def test_frame_ranges_are_half_open_runs() -> None:
    assert frame_ranges([9, 3, 4, 5, 11]) == [range(3, 6), range(9, 10), range(11, 12)]
    assert frame_ranges([]) == []


def test_workers_without_opengl_are_refused(scene: Path, tmp_path: Path,
                                            capsys: pytest.CaptureFixture[str],
                                            monkeypatch: pytest.MonkeyPatch) -> None:
    # A worker process whose Mesa cannot find its drivers has no OpenGL (eglInitialize
    # fails), as on a node without the GL packages.
    monkeypatch.setenv("LIBGL_DRIVERS_PATH", str(tmp_path / "no-drivers-here"))
    out = tmp_path / "never"
    with distributed.LocalCluster(n_workers=1, threads_per_worker=1, processes=True,
                                  dashboard_address=":0", silence_logs=40) as no_gl:
        code = main(["render", str(scene), "--scheduler", no_gl.scheduler_address,
                     "-o", f"{out}/"])
    err = capsys.readouterr().err
    assert code == 2
    assert "1 of 1 workers have no OpenGL" in err
    assert "install libegl1 and libgl1-mesa-dri" in err
    assert "Traceback" not in err
    assert not out.exists()


def test_a_dome_master_sequence_on_the_cluster_matches_a_local_one(
        cluster: object, scene: Path, tmp_path: Path) -> None:
    # The dome's reprojection runs in each worker's own GL context, kept across chunks.
    flags = ["--dome", "--size", "96x96", "--frames", "4:12"]
    assert main(["render", str(scene), *flags, "-o", f"{tmp_path / 'here'}/"]) == 0
    assert main(["render", str(scene), *flags, "--chunk", "3", "--scheduler",
                 cluster.scheduler_address,  # type: ignore[attr-defined]
                 "-o", f"{tmp_path / 'there'}/"]) == 0
    assert digest(tmp_path / "there") == digest(tmp_path / "here")
    assert len(frames_of(tmp_path / "here")) == 8
