"""Open and Save As without a window: the file chooser lists a folder's sub-folders and
scene files and walks through them, the recent files are saved per user beside the UI
scale, and a save that cannot be done stays one line in the dialog with nothing written."""

from __future__ import annotations

import os
import shutil
from pathlib import Path

import pytest

from viewer.gui.clock import Clock
from viewer.gui.editor import Editor
from viewer.gui.files import FileChooser, folder_of
from viewer.gui.session import Session
from viewer.gui.settings import (
    RECENT_MAX,
    add_recent,
    load_recent,
    load_ui_scale,
    save_ui_scale,
)

ROOT = Path(__file__).resolve().parents[1]


@pytest.fixture
def tree(tmp_path: Path) -> Path:
    """shows/ with two scenes, a sub-folder, a hidden folder and files of other kinds."""
    top = tmp_path / "shows"
    (top / "Moons").mkdir(parents=True)
    (top / ".cache").mkdir()
    shutil.copy(ROOT / "scenes" / "earth-mission.toml", top / "mission.toml")
    shutil.copy(ROOT / "scenes" / "demo.toml", top / "Moons" / "demo.toml")
    (top / "alpha.TOML").write_text((top / "mission.toml").read_text(encoding="utf-8"),
                                    encoding="utf-8")
    (top / "notes.txt").write_text("not a scene\n", encoding="utf-8")
    (top / "frame.png").write_bytes(b"\x89PNG")
    return top


def session_on(path: Path, settings: Path | None = None) -> Session:
    ed = Editor.open(path)
    return Session(editor=ed, clock=Clock.for_scene(ed.scene), camera=ed.scene.camera,
                   settings_file=settings)


def test_the_chooser_lists_folders_then_scene_files_and_leaves_out_the_rest(tree: Path) -> None:
    chooser = FileChooser(tree)
    assert [e.text for e in chooser.entries] == ["Moons/", "alpha.TOML", "mission.toml"]
    assert chooser.problem == ""
    chooser.go(tree / "Moons")
    assert [e.text for e in chooser.entries] == ["demo.toml"]
    chooser.up()
    assert chooser.folder == tree


def test_a_folder_that_cannot_be_read_is_one_line_and_an_empty_list(tmp_path: Path) -> None:
    chooser = FileChooser(tmp_path / "gone")
    assert chooser.entries == []
    assert chooser.problem.startswith(f"cannot list {tmp_path / 'gone'}: ")
    assert "\n" not in chooser.problem


def test_a_typed_path_opens_the_chooser_in_its_folder(tree: Path) -> None:
    assert folder_of(str(tree / "mission.toml")) == tree
    assert folder_of(str(tree / "Moons")) == tree / "Moons"
    assert folder_of(str(tree / "new.toml")) == tree  # a file not written yet
    assert folder_of(str(tree / "no" / "such" / "x.toml")) == Path.cwd()


def test_walking_the_chooser_names_the_file_to_open_and_opens_it(tree: Path) -> None:
    s = session_on(tree / "mission.toml")
    s.request_open()
    assert s.chooser is not None and s.chooser.folder == tree
    moons = next(e for e in s.chooser.entries if e.folder)
    s.choose(moons, "open")
    assert s.open_text == str(tree / "Moons") + os.sep
    demo = s.chooser.entries[0]
    s.choose(demo, "open")
    assert s.open_text == str(tree / "Moons" / "demo.toml")
    assert s.open_scene() and s.editor.scene.title == "The Halcyra system"
    assert s.recent[0] == str(tree / "Moons" / "demo.toml")


def test_save_as_keeps_the_file_name_while_walking_folders(tree: Path) -> None:
    s = session_on(tree / "mission.toml")
    s.open_save_as()
    assert s.chooser is not None
    s.choose(next(e for e in s.chooser.entries if e.folder), "save_as")
    assert s.save_as_text == str(tree / "Moons" / "mission.toml")
    s.chooser_up("save_as")
    assert s.save_as_text == str(tree / "mission.toml") and s.chooser.folder == tree
    assert s.save_as(str(tree / "Moons" / "copy.toml"))
    assert (tree / "Moons" / "copy.toml").read_text(encoding="utf-8") == (
        tree / "mission.toml").read_text(encoding="utf-8")
    assert not s.save_as_prompt and s.recent[0] == str(tree / "Moons" / "copy.toml")


@pytest.mark.parametrize("where", ["folder", "missing folder", "empty"])
def test_a_save_as_that_cannot_be_done_is_one_line_in_the_dialog_and_writes_nothing(
        tree: Path, where: str) -> None:
    s = session_on(tree / "mission.toml")
    s.open_save_as()
    before = sorted(p.relative_to(tree) for p in tree.rglob("*"))
    target = {"folder": str(tree / "Moons"), "missing folder": str(tree / "no" / "x.toml"),
              "empty": ""}[where]
    assert not s.save_as(target)
    assert s.save_as_prompt and len(s.save_as_errors) == 1
    assert "\n" not in s.save_as_errors[0]
    assert sorted(p.relative_to(tree) for p in tree.rglob("*")) == before


def test_recent_files_are_saved_per_user_beside_the_ui_scale(tree: Path, tmp_path: Path) -> None:
    settings = tmp_path / "config" / "perifocal" / "settings.toml"
    save_ui_scale(1.5, settings)
    s = session_on(tree / "mission.toml", settings)
    s.remember(tree / "mission.toml")
    s.request_open()
    assert s.open_scene(str(tree / "Moons" / "demo.toml"))
    assert load_recent(settings) == [str(tree / "Moons" / "demo.toml"),
                                     str(tree / "mission.toml")]
    assert load_ui_scale(settings) == 1.5  # the other setting stays
    save_ui_scale(2.0, settings)
    assert load_recent(settings)[0] == str(tree / "Moons" / "demo.toml")
    # Reopening one moves it first, once; the list keeps the newest RECENT_MAX.
    add_recent(tree / "mission.toml", settings)
    assert load_recent(settings) == [str(tree / "mission.toml"),
                                     str(tree / "Moons" / "demo.toml")]
    for k in range(RECENT_MAX + 3):
        add_recent(tree / f"s{k}.toml", settings)
    assert len(load_recent(settings)) == RECENT_MAX
    assert load_recent(settings)[0] == str(tree / f"s{RECENT_MAX + 2}.toml")


def test_a_settings_file_of_something_else_is_ignored(tmp_path: Path) -> None:
    settings = tmp_path / "settings.toml"
    settings.write_text('recent = "not a list"\nui_scale = "big"\n', encoding="utf-8")
    assert load_recent(settings) == [] and load_ui_scale(settings) == 1.0
    add_recent(tmp_path / "a.toml", settings)
    assert load_recent(settings) == [str(tmp_path / "a.toml")]
