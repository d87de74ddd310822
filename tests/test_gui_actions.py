"""One table of actions (viewer.gui.actions): the keys, the menus and the help overlay
all come from it, so a shortcut cannot be listed in one place and missing in another."""

from __future__ import annotations

from pathlib import Path

from viewer.gui.actions import ACTIONS, EXTRA_HELP, MENUS, action_for, shortcut_rows
from viewer.gui.clock import Clock
from viewer.gui.editor import Editor
from viewer.gui.session import Session

ROOT = Path(__file__).resolve().parents[1]


def session() -> Session:
    ed = Editor.open(ROOT / "scenes" / "laws.toml")
    return Session(editor=ed, clock=Clock.for_scene(ed.scene), camera=ed.scene.camera)


def test_no_key_chord_is_bound_to_two_actions() -> None:
    chords = [c for a in ACTIONS for c in a.chords]
    assert len(chords) == len(set(chords))
    assert len({a.name for a in ACTIONS}) == len(ACTIONS)


def test_the_help_lists_every_action_with_its_keys() -> None:
    rows = shortcut_rows()
    assert len(rows) == len(ACTIONS) + len(EXTRA_HELP)
    for a, (keys, _) in zip(ACTIONS, rows, strict=False):
        assert keys == a.keys_text and keys


def test_every_menu_of_an_action_is_on_the_menu_bar() -> None:
    assert {a.menu for a in ACTIONS if a.menu} <= set(MENUS)


def test_keys_find_their_action_with_ctrl_and_shift() -> None:
    assert action_for("S", ctrl=True, shift=False).name == "save"  # type: ignore[union-attr]
    assert action_for("S", ctrl=True, shift=True).name == "save_as"  # type: ignore[union-attr]
    assert action_for("E", ctrl=False, shift=False).name == "edge"  # type: ignore[union-attr]
    assert action_for("E", ctrl=True, shift=False).name == "still"  # type: ignore[union-attr]
    assert action_for("Q", ctrl=False, shift=False) is None


def test_running_actions_changes_the_session_as_their_labels_say() -> None:
    s = session()
    was = s.clock.playing
    action_for("SPACE", False, False).run(s)  # type: ignore[union-attr]
    assert s.clock.playing is not was
    rate = s.clock.rate
    action_for("BRACKETRIGHT", False, False).run(s)  # type: ignore[union-attr]
    assert s.clock.rate == 2 * rate
    s.editor.select(0)
    count = len(s.editor.scene.bodies)
    action_for("D", True, False).run(s)  # type: ignore[union-attr]
    assert len(s.editor.scene.bodies) == count + 1
    undo = action_for("Z", True, False)
    assert undo is not None and undo.enabled(s)
    undo.run(s)
    assert len(s.editor.scene.bodies) == count
    follow = action_for("F", False, False)
    assert follow is not None
    s.editor.select(None)
    assert not follow.enabled(s)
