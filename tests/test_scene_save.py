"""Saving scenes: edits change only the edited value, comments survive, and no failure or
kill at any step of a save leaves a truncated or missing file."""

from __future__ import annotations

import errno
import os
import random
import shutil
import signal
import subprocess
import sys
import time
from pathlib import Path

import pytest

from viewer import fileio as writer_module  # the one atomic writer, used by scene saves
from viewer.errors import UserInputError
from viewer.scene import dump_scene, edit_text, load_scene, load_scene_text, save_edits
from viewer.scene.save import SaveError, write_atomic

DATA = Path(__file__).parent / "data" / "scenes"
SCENES = Path(__file__).resolve().parents[1] / "scenes"


@pytest.fixture
def scene_file(tmp_path: Path) -> Path:
    path = tmp_path / "commented.toml"
    shutil.copyfile(DATA / "commented.toml", path)
    return path


def _changed_lines(before: str, after: str) -> list[tuple[str, str]]:
    a, b = before.splitlines(), after.splitlines()
    assert len(a) == len(b), "lines were added or removed"
    return [(x, y) for x, y in zip(a, b, strict=True) if x != y]


def _folder(path: Path) -> list[str]:
    return sorted(p.name for p in path.parent.iterdir())


# --- edits ---------------------------------------------------------------------------


def test_editing_one_element_changes_only_that_value_and_keeps_comments(scene_file):
    before = scene_file.read_text()
    scene = save_edits(scene_file, {"body[0].e": 0.3})
    after = scene_file.read_text()
    assert _changed_lines(before, after) == [
        ("e    = 0.21              # <- this value changes",
         "e    = 0.3              # <- this value changes")]
    comments = [ln for ln in before.splitlines() if "#" in ln]
    assert len(comments) >= 8
    for ln in comments:
        if "this value changes" not in ln:
            assert ln in after.splitlines()
    assert scene.bodies[0].elements.e == 0.3
    assert load_scene(scene_file).bodies[0].elements.e == 0.3


def test_the_previous_version_is_kept_as_bak(scene_file):
    before = scene_file.read_bytes()
    save_edits(scene_file, {"body[0].e": 0.3})
    assert (scene_file.parent / "commented.toml.bak").read_bytes() == before


def test_edits_by_body_name_and_in_inline_tables(scene_file):
    before = scene_file.read_text()
    save_edits(scene_file, {'body["Osk"].period': "720 d", 'body["Tarn"].show.axes': True})
    changed = _changed_lines(before, scene_file.read_text())
    assert changed == [
        ("show = { orbit = true, foci = true }   # an inline table",
         "show = { orbit = true, foci = true, axes = true }   # an inline table"),
        ('period = "700 d"', 'period = "720 d"')]


def test_removing_and_adding_keys_and_bodies():
    text = (DATA / "commented.toml").read_text()
    new = edit_text(text, {"body[1].period": None, "body[1].a": "2 au",
                           "body[+]": {"name": "New", "a": "3 au", "show": {"foci": True}}})
    scene = load_scene_text(new)
    assert [b.name for b in scene.bodies] == ["Tarn", "Osk", "New"]
    assert scene.bodies[2].show.foci
    assert "# trailing comment at the end of the file" in new
    scene = load_scene_text(edit_text(new, {"body[0]": None}))
    assert [b.name for b in scene.bodies] == ["Osk", "New"]


def test_bodies_written_as_an_inline_array_can_be_edited_and_appended():
    text = 'body = [{ name = "A", a = "1 au" }]\n[center]\npreset = "sun"\n'
    new = edit_text(text, {"body[0].e": 0.2, "body[+]": {"name": "B", "a": "2 au"}})
    scene = load_scene_text(new)
    assert [b.name for b in scene.bodies] == ["A", "B"]
    assert scene.bodies[0].elements.e == 0.2
    assert new.splitlines()[1:] == text.splitlines()[1:]


@pytest.mark.parametrize("path", ["body[7].e", 'body["Nobody"].e', "body[0]..e", "camera[0].x",
                                  "scene.title.x"])
def test_bad_key_paths_are_user_errors(path):
    with pytest.raises(UserInputError):
        edit_text((DATA / "commented.toml").read_text(), {path: 1})


def test_an_edit_that_breaks_the_scene_writes_nothing(scene_file):
    before = scene_file.read_bytes()
    listing = _folder(scene_file)
    with pytest.raises(UserInputError) as info:
        save_edits(scene_file, {"body[0].e": 1.5})
    assert "body[0].e" in info.value.problems[0]
    assert scene_file.read_bytes() == before
    assert _folder(scene_file) == listing


def test_a_file_changed_on_disk_since_loading_is_not_overwritten(scene_file):
    loaded = scene_file.read_text()
    scene_file.write_text(loaded.replace('"Osk"', '"Osk II"'))
    with pytest.raises(SaveError, match="changed on disk"):
        save_edits(scene_file, {"body[0].e": 0.3}, expected_text=loaded)
    assert '"Osk II"' in scene_file.read_text()


def test_a_read_only_file_is_refused(scene_file, monkeypatch):
    before = scene_file.read_bytes()
    # os.access stands in for a read-only file (root could write through a chmod 444)
    monkeypatch.setattr(writer_module.os, "access", lambda path, mode: False)
    with pytest.raises(SaveError, match="read-only"):
        save_edits(scene_file, {"body[0].e": 0.3})
    assert scene_file.read_bytes() == before


def test_saving_keeps_the_file_mode(scene_file):
    scene_file.chmod(0o640)
    save_edits(scene_file, {"body[0].e": 0.3})
    assert scene_file.stat().st_mode & 0o777 == 0o640
    assert (scene_file.parent / "commented.toml.bak").stat().st_mode & 0o777 == 0o640


@pytest.mark.parametrize("name", ["demo", "laws", "earth-mission", "solar-system"])
def test_a_dumped_scene_loads_back_to_the_same_orbits(name):
    scene = load_scene(SCENES / f"{name}.toml")
    again = load_scene_text(dump_scene(scene))
    assert again.epoch.seconds_since(scene.epoch) == pytest.approx(0.0, abs=1e-5)
    for b, c in zip(scene.bodies, again.bodies, strict=True):
        assert c.name == b.name and c.show == b.show and c.color == b.color
        for key in ("a", "e", "i", "raan", "argp", "nu"):
            x, y = float(getattr(b.elements, key)), float(getattr(c.elements, key))
            assert y == pytest.approx(x, rel=1e-14, abs=1e-14), (b.name, key)
        assert c.epoch_offset_s == pytest.approx(b.epoch_offset_s, abs=1e-5)
        assert (c.sweep is None) == (b.sweep is None)
    assert again.camera == scene.camera
    assert again.render == scene.render
    assert again.timeline == scene.timeline
    assert again.dome == scene.dome


# --- failures at each step of a save ----------------------------------------------------


class Boom(OSError):
    def __init__(self) -> None:
        super().__init__(errno.ENOSPC, "No space left on device")


def _fail_on_call(monkeypatch, name: str, call: int) -> None:
    """Make ``os.<name>`` raise on its ``call``-th use inside the atomic writer."""
    real = getattr(os, name)
    count = {"n": 0}

    def wrapped(*args, **kwargs):
        count["n"] += 1
        if count["n"] == call:
            raise Boom()
        return real(*args, **kwargs)

    monkeypatch.setattr(writer_module.os, name, wrapped)


@pytest.mark.parametrize("name, call, step", [
    ("write", 1, "writing the temporary file"),
    ("fsync", 1, "at the fsync of the backup copy"),
    ("fsync", 2, "after writing the temporary file, at its fsync"),
    ("replace", 1, "at the rename of the backup copy"),
    ("replace", 2, "at the rename of the new file, before it happens"),
])
def test_a_failure_before_the_rename_leaves_the_old_file(scene_file, monkeypatch, name, call,
                                                         step):
    before = scene_file.read_bytes()
    listing = _folder(scene_file)
    _fail_on_call(monkeypatch, name, call)
    with pytest.raises(SaveError, match="the file is unchanged"):
        save_edits(scene_file, {"body[0].e": 0.3})
    assert scene_file.read_bytes() == before, step
    left = set(_folder(scene_file)) - set(listing)
    assert left <= {"commented.toml.bak"}, (step, left)  # no temporary file stays behind
    bak = scene_file.parent / "commented.toml.bak"
    if bak.exists():
        assert bak.read_bytes() == before


def test_a_failure_after_the_rename_leaves_the_complete_new_file(scene_file, monkeypatch):
    before = scene_file.read_bytes()
    _fail_on_call(monkeypatch, "fsync", 3)  # the folder's fsync, after os.replace
    with pytest.raises(SaveError, match="new version is in place"):
        save_edits(scene_file, {"body[0].e": 0.3})
    assert load_scene(scene_file).bodies[0].elements.e == 0.3
    assert (scene_file.parent / "commented.toml.bak").read_bytes() == before
    assert [p for p in _folder(scene_file) if p.endswith(".tmp")] == []


def test_an_interrupt_while_writing_leaves_the_old_file(scene_file, monkeypatch):
    before = scene_file.read_bytes()

    def interrupted(*args):
        raise KeyboardInterrupt

    monkeypatch.setattr(writer_module.os, "fsync", interrupted)
    with pytest.raises(KeyboardInterrupt):
        save_edits(scene_file, {"body[0].e": 0.3})
    assert scene_file.read_bytes() == before
    assert [p for p in _folder(scene_file) if p.endswith(".tmp")] == []


# --- a real kill in the middle of saving a large scene --------------------------------------

_CHILD = """
import sys
from pathlib import Path
from viewer.scene.save import write_atomic
path = Path(sys.argv[1])
versions = [Path(sys.argv[2]).read_bytes(), Path(sys.argv[3]).read_bytes()]
sys.stdout.write("ready\\n"); sys.stdout.flush()
k = 0
while True:
    write_atomic(path, versions[k % 2])
    k += 1
"""


def _large_scene(n_bodies: int, e: float) -> bytes:
    parts = ['[scene]\ntitle = "Large"\n[center]\npreset = "sun"\n']
    for k in range(n_bodies):
        parts.append(f'\n[[body]]\nname = "B{k}"   # body {k}\na = "{1 + k * 1e-4} au"\n'
                     f'e = {e}\ni = "{k % 180} deg"\nshow = {{ foci = true }}\n')
    return "".join(parts).encode()


@pytest.mark.slow
def test_sigkill_in_the_middle_of_saving_never_truncates_the_scene(tmp_path):
    path = tmp_path / "large.toml"
    old, new = _large_scene(40_000, 0.1), _large_scene(40_000, 0.2)
    assert len(old) > 4_000_000
    (tmp_path / "old.bin").write_bytes(old)
    (tmp_path / "new.bin").write_bytes(new)
    path.write_bytes(old)
    rng = random.Random(20301)  # a fixed seed: the same kill times on every run
    root = Path(__file__).resolve().parents[1]
    for round_ in range(6):
        child = subprocess.Popen([sys.executable, "-c", _CHILD, str(path),
                                  str(tmp_path / "old.bin"), str(tmp_path / "new.bin")],
                                 stdout=subprocess.PIPE, cwd=root)
        assert child.stdout is not None
        assert child.stdout.readline() == b"ready\n"
        time.sleep(rng.uniform(0.02, 0.4))
        child.send_signal(signal.SIGKILL)
        child.wait(timeout=30)
        child.stdout.close()
        assert child.returncode == -signal.SIGKILL
        data = path.read_bytes()
        assert data in (old, new), f"round {round_}: the scene is neither version"
        bak = tmp_path / "large.toml.bak"
        if bak.exists():
            assert bak.read_bytes() in (old, new)
    # what a kill can leave: temporary files beside the scene, never a damaged scene. The
    # child saves without pause, so kills land inside saves and leave such files.
    stray = [p.name for p in tmp_path.iterdir() if p.name.endswith(".tmp")]
    assert stray, "no kill landed inside a save"
    assert all(p.startswith((".large.toml.", ".large.toml.bak.")) for p in stray)
    load_scene(path)


def test_write_atomic_creates_a_new_file_without_bak(tmp_path):
    target = tmp_path / "fresh.toml"
    write_atomic(target, "x = 1\n")
    assert target.read_text() == "x = 1\n"
    assert not (tmp_path / "fresh.toml.bak").exists()


def _another_value(value):
    """A different value of the same kind: numbers scaled, quantities' numbers scaled."""
    if isinstance(value, bool):
        return not value
    if isinstance(value, (int, float)):
        return value * 0.5 + 0.25
    number, _, unit = value.partition(" ")
    try:
        return f"{float(number) * 1.01 + 0.5!r} {unit}".strip()
    except ValueError:
        return value + " II"


@pytest.mark.parametrize("name", ["demo", "laws", "earth-mission", "solar-system"])
def test_every_single_value_edit_of_a_bundled_scene_changes_one_line(name):
    import tomllib

    text = (SCENES / f"{name}.toml").read_text()
    raw = tomllib.loads(text)
    edits = 0
    for k, body in enumerate(raw["body"]):
        for key, value in body.items():
            if isinstance(value, (dict, list)):
                continue
            new = edit_text(text, {f"body[{k}].{key}": _another_value(value)})
            (changed,) = _changed_lines(text, new)
            assert changed[0].split("=")[0] == changed[1].split("=")[0]
            assert tomllib.loads(new)["body"][k][key] == _another_value(value)
            edits += 1
    assert edits >= 2 * len(raw["body"])  # at least each name and size
