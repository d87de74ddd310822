"""Structural edits (add, duplicate, remove, move) saved into the user's file: only the
tables that changed change; every other line, comments and blank lines included, stays
byte for byte (the diff of the file is the edit and nothing else)."""

from __future__ import annotations

import difflib
import shutil
import tomllib
from pathlib import Path

import pytest

from viewer.gui.editor import Editor
from viewer.scene import load_scene

ROOT = Path(__file__).resolve().parents[1]


@pytest.fixture
def mission(tmp_path: Path) -> Path:
    p = tmp_path / "mission.toml"
    shutil.copy(ROOT / "scenes" / "earth-mission.toml", p)
    return p


def changed_lines(before: str, after: str) -> tuple[list[str], list[str]]:
    """(removed, added) lines of a line diff."""
    removed, added = [], []
    for line in difflib.ndiff(before.splitlines(), after.splitlines()):
        if line.startswith("- "):
            removed.append(line[2:])
        elif line.startswith("+ "):
            added.append(line[2:])
    return removed, added


def test_a_duplicate_adds_only_its_own_table_in_the_files_style(mission: Path) -> None:
    before = mission.read_text(encoding="utf-8")
    ed = Editor.open(mission)
    ed.duplicate(1)  # "Wren transfer", given by periapsis and apoapsis
    ed.save()
    after = mission.read_text(encoding="utf-8")
    removed, added = changed_lines(before, after)
    assert removed == []
    assert "[[body]]" in added and 'name = "Wren transfer copy"' in added
    # The same keys as the original's table, written as the user wrote them.
    original = tomllib.loads(before)["body"][1]
    copy = tomllib.loads(after)["body"][2]
    assert copy == {**original, "name": "Wren transfer copy"}
    # The copy stands right after its original, and loads as the same orbit.
    names = [b["name"] for b in tomllib.loads(after)["body"]]
    assert names[1:3] == ["Wren transfer", "Wren transfer copy"]
    again = load_scene(mission)
    assert again.bodies[2].elements == again.bodies[1].elements


def test_removing_a_body_takes_only_its_own_lines_and_comments(mission: Path) -> None:
    before = mission.read_text(encoding="utf-8")
    ed = Editor.open(mission)
    ed.delete(1)
    ed.save()
    after = mission.read_text(encoding="utf-8")
    removed, added = changed_lines(before, after)
    assert added == []
    assert 'name = "Wren transfer"' in removed
    # Every removed line is from the removed table's block (its comments and keys).
    lines = before.splitlines()
    start = lines.index('name = "Wren transfer"') - 1
    end = lines.index('name = "Stint departure"') - 1
    while lines[end - 1].startswith("#"):
        end -= 1
    block = lines[start:end]
    assert all(r in block for r in removed)
    assert [b.name for b in load_scene(mission).bodies] == ["Wren parking", "Stint departure"]


def test_moving_a_body_moves_its_table_with_its_comments(mission: Path) -> None:
    before = mission.read_text(encoding="utf-8")
    ed = Editor.open(mission)
    ed.select(2)
    ed.move(0)
    ed.save()
    after = mission.read_text(encoding="utf-8")
    assert sorted(before.splitlines()) == sorted(after.splitlines())
    assert [b.name for b in load_scene(mission).bodies] == [
        "Stint departure", "Wren parking", "Wren transfer"]


def test_an_added_body_and_an_edit_of_another_save_together(mission: Path) -> None:
    before = mission.read_text(encoding="utf-8")
    ed = Editor.open(mission)
    ed.add_body()
    ed.select(0)
    ed.set_field("i", "30 deg")
    ed.save()
    after = mission.read_text(encoding="utf-8")
    removed, added = changed_lines(before, after)
    assert removed == ['i = "28.5 deg"']
    assert 'i = "30 deg"' in added and "[[body]]" in added
    assert len(load_scene(mission).bodies) == 4


def test_derived_sectors_follow_an_edit_of_the_orbit_and_given_ones_stay(
        mission: Path) -> None:
    ed = Editor.open(mission)
    k = [b.name for b in ed.scene.bodies].index("Wren transfer")
    sw = ed.scene.bodies[k].sweep
    assert sw is not None and not sw.interval_given  # the file gives count 6, no interval
    ed.select(k)
    ed.set_field("apoapsis", "30000 km")
    body = ed.scene.bodies[k]
    assert body.sweep is not None
    # The six sectors tile the new orbit: together they last one (new) period.
    assert body.sweep.count * body.sweep.interval_s == pytest.approx(
        float(body.elements.period), rel=1e-12)
    ed.save()
    again = load_scene(mission).bodies[k]
    assert again.sweep == body.sweep  # the window and the reopened file agree
    assert "interval" not in tomllib.loads(mission.read_text(encoding="utf-8"))["body"][k][
        "sweep"]
    # An interval written out stays when the orbit changes.
    ed.set_sweep(k, interval="2 h")
    ed.set_field("apoapsis", "35000 km")
    kept = ed.scene.bodies[k].sweep
    assert kept is not None and kept.interval_given and kept.interval_s == 7200.0


def test_derived_sectors_keep_their_interval_when_the_orbit_opens(mission: Path) -> None:
    """An open orbit has no period to divide, and the scene format then requires the
    sectors' interval (viewer.scene.loader): a derived interval becomes a given one, the
    same length, and the saved file loads. (Hypothesis found this: sectors shown, then e
    set to 3, then saved.)"""
    ed = Editor.open(mission)
    k = [b.name for b in ed.scene.bodies].index("Wren transfer")
    before = ed.scene.bodies[k].sweep
    assert before is not None and not before.interval_given
    ed.select(k)
    ed.hold = "periapsis"  # an orbit opens about its periapsis
    ed.set_field("e", "3")
    opened = ed.scene.bodies[k].sweep
    assert opened is not None and opened.interval_given
    assert opened.interval_s == before.interval_s and opened.count == before.count
    ed.save()
    again = load_scene(mission).bodies[k]
    assert float(again.elements.e) == 3.0
    assert again.sweep is not None and again.sweep.interval_given
    assert again.sweep.interval_s == pytest.approx(before.interval_s, rel=1e-12)
