"""The output rule every command that writes a file follows (viewer.fileio.claim_output):
an existing file is refused unless --force, the input is never the output, a replaced
file keeps a .bak and its mode, a new file gets 0666 less the umask, and a name's kind
(still, folder, video) is what it says."""

from __future__ import annotations

import os
import stat
from collections.abc import Iterator
from pathlib import Path

import pytest

from viewer.cli import main

SCENE = """[scene]
title = "Output rule"
epoch = "2030-01-01T00:00:00 TDB"

[center]
preset = "earth"

[[body]]
name = "LEO"
a = "6600 km"
e = 0

[[body]]
name = "GEO"
a = "42164 km"
e = 0
"""

DATA = Path(__file__).parent / "data" / "ccsds"


@pytest.fixture
def scene(tmp_path: Path) -> Path:
    path = tmp_path / "m.toml"
    path.write_text(SCENE)
    return path


@pytest.fixture
def umask_022() -> Iterator[None]:
    from viewer import fileio

    old = os.umask(0o022)
    fileio._umask.cache_clear()  # the writer reads the umask once per process
    try:
        yield
    finally:
        os.umask(old)
        fileio._umask.cache_clear()


def ephemeris(scene: Path, out: Path, *extra: str) -> int:
    return main(["ephemeris", str(scene), "--body", "LEO", "--start", "0 s", "--stop", "1 h",
                 "--step", "10 min", "-o", str(out), *extra])


def one_line_exit_2(code: int, capsys: pytest.CaptureFixture[str], *words: str) -> str:
    err = capsys.readouterr().err
    assert code == 2, err
    assert "Traceback" not in err
    for w in words:
        assert w in err, err
    return err


def test_ephemeris_never_overwrites_its_own_scene(scene: Path,
                                                  capsys: pytest.CaptureFixture[str]) -> None:
    before = scene.read_bytes()
    for extra in ((), ("--force",)):
        one_line_exit_2(ephemeris(scene, scene, *extra), capsys, "input")
        assert scene.read_bytes() == before
    # also through another spelling of the same file
    one_line_exit_2(ephemeris(scene, scene.parent / "." / "m.toml", "--force"), capsys, "input")
    assert scene.read_bytes() == before


def test_ephemeris_refuses_an_existing_file_unless_forced_and_keeps_a_bak(
        scene: Path, capsys: pytest.CaptureFixture[str]) -> None:
    out = scene.parent / "old.opm"
    out.write_text("precious\n")
    out.chmod(0o640)
    one_line_exit_2(ephemeris(scene, out), capsys, "--force", "exists")
    assert out.read_text() == "precious\n"
    assert ephemeris(scene, out, "--force") == 0
    assert "CCSDS_OEM_VERS" in out.read_text()
    assert (scene.parent / "old.opm.bak").read_text() == "precious\n"
    assert stat.S_IMODE(out.stat().st_mode) == 0o640  # a replaced file keeps its mode


def test_new_files_get_the_mode_of_a_plain_file(scene: Path, umask_022: None,
                                                capsys: pytest.CaptureFixture[str]) -> None:
    oem = scene.parent / "new.oem"
    assert ephemeris(scene, oem) == 0
    imported = scene.parent / "imported.toml"
    assert main(["import", str(DATA / "leo_state.opm"), "-o", str(imported)]) == 0
    moved = scene.parent / "moved.toml"
    assert main(["transfer", str(scene), "--from", "LEO", "--to", "GEO", "-o", str(moved)]) == 0
    for path in (oem, imported, moved):
        assert stat.S_IMODE(path.stat().st_mode) == 0o644, path  # 0666 & ~022


def test_import_and_transfer_keep_a_bak_when_forced(scene: Path,
                                                    capsys: pytest.CaptureFixture[str]) -> None:
    target = scene.parent / "t.toml"
    target.write_text("# mine\n")
    code = main(["transfer", str(scene), "--from", "LEO", "--to", "GEO", "-o", str(target)])
    one_line_exit_2(code, capsys, "--force")
    assert main(["transfer", str(scene), "--from", "LEO", "--to", "GEO", "-o", str(target),
                 "--force"]) == 0
    assert (scene.parent / "t.toml.bak").read_text() == "# mine\n"
    opm = DATA / "leo_state.opm"
    one_line_exit_2(main(["import", str(opm), "-o", str(target)]), capsys, "--force")


def test_render_refuses_a_folder_named_like_a_still(scene: Path,
                                                    capsys: pytest.CaptureFixture[str]) -> None:
    folder = scene.parent / "still.png"
    folder.mkdir()
    one_line_exit_2(main(["render", str(scene), "-o", str(folder)]), capsys, "folder", "/")
    assert list(folder.iterdir()) == []


def test_render_refuses_16_bits_for_jpeg(scene: Path, capsys: pytest.CaptureFixture[str]) -> None:
    code = main(["render", str(scene), "--bits", "16", "-o", str(scene.parent / "x.jpg")])
    one_line_exit_2(code, capsys, "--bits", "PNG")
    code = main(["render", str(scene), "--bits", "16", "--format", "jpg",
                 "-o", str(scene.parent / "frames") + "/"])
    one_line_exit_2(code, capsys, "--bits")


def test_render_refuses_an_existing_still_unless_forced(
        scene: Path, capsys: pytest.CaptureFixture[str]) -> None:
    still = scene.parent / "s.svg"
    still.write_text("mine")
    one_line_exit_2(main(["render", str(scene), "-o", str(still)]), capsys, "--force")
    assert still.read_text() == "mine"


def test_demo_with_a_file_in_the_way_or_a_read_only_folder(
        tmp_path: Path, capsys: pytest.CaptureFixture[str],
        monkeypatch: pytest.MonkeyPatch) -> None:
    monkeypatch.delenv("DISPLAY", raising=False)
    monkeypatch.chdir(tmp_path)
    Path("perifocal-demo").write_text("not a folder")
    one_line_exit_2(main(["demo"]), capsys, "--out", "not a folder")
    if os.geteuid() == 0:
        return  # root writes anywhere
    locked = tmp_path / "locked"
    locked.mkdir()
    locked.chmod(0o500)
    try:
        one_line_exit_2(main(["demo", "--out", str(locked / "d")]), capsys, "--out",
                        "permission")
    finally:
        locked.chmod(0o700)


def test_a_screenshot_follows_the_rule_too(scene: Path, capsys: pytest.CaptureFixture[str],
                                           monkeypatch: pytest.MonkeyPatch) -> None:
    shot = scene.parent / "shot.png"
    shot.write_bytes(b"mine")
    monkeypatch.delenv("DISPLAY", raising=False)  # refused before any window is opened
    code = main(["open", str(scene), "--screenshot", str(shot), "--quit-after", "1"])
    one_line_exit_2(code, capsys, "--screenshot", "--force")
    assert shot.read_bytes() == b"mine"
