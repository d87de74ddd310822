"""Setting the scene epoch from the Time panel (the editor model): t = 0 moves, every body
stays where it was at every date, the edit is refused in place for bad text, undoes, and
saves into the file so that it loads back as the same scene.

Time scales (common practice, no source beyond the standards' definitions): TT - TAI =
32.184 s exactly; TAI - UTC = 37 s from 2017-01-01 (IERS Bulletin C, from memory); TDB -
TT stays within 2 ms.
"""

from __future__ import annotations

import shutil
from pathlib import Path

import numpy as np
import pytest
from reference_values import DAY, MM

from viewer.gui.editor import Editor, EditRefused
from viewer.orbit import state_from_elements
from viewer.scene.loader import load_scene
from viewer.units import parse_epoch

ROOT = Path(__file__).resolve().parents[1]


def positions_at(scene, t_from_epoch_s: float) -> np.ndarray:  # type: ignore[no-untyped-def]
    return np.array([state_from_elements(b.elements_at(t_from_epoch_s))[0]
                     for b in scene.bodies])


@pytest.fixture
def mission(tmp_path: Path) -> Path:
    """A copy of the bundled Earth mission scene: a body with no epoch of its own, one
    placed by tp (an offset from the scene epoch) and one with equal-time sectors."""
    p = tmp_path / "mission.toml"
    shutil.copy(ROOT / "scenes" / "earth-mission.toml", p)
    return p


def test_a_new_epoch_moves_t_zero_and_leaves_every_body_where_it_was_at_each_date(
        mission: Path) -> None:
    ed = Editor.open(mission)
    before = ed.scene
    assert ed.set_epoch("2031-03-15T06:00:00 UTC") is True
    after = ed.scene
    assert after.epoch.iso() == "2031-03-15T06:00:00 UTC"
    shift = after.epoch.seconds_since(before.epoch)
    # No leap second that day; TDB - TT drifts by tens of microseconds a day.
    assert shift == pytest.approx(DAY, abs=1e-4)
    for t in (0.0, 3600.0, 5 * DAY):  # the same dates, in the old and new scene time
        assert np.abs(positions_at(after, t - shift) - positions_at(before, t)).max() < MM
    # The timeline and the sectors stay offsets from the (new) epoch.
    assert after.timeline == before.timeline
    assert [b.sweep for b in after.bodies] == [b.sweep for b in before.bodies]
    assert ed.undo_label == "scene epoch" and ed.dirty


def test_the_epoch_takes_utc_tt_and_tdb(mission: Path) -> None:
    ed = Editor.open(mission)
    ed.set_epoch("2031-03-14T06:00:00 TDB")
    tdb = ed.scene.epoch
    ed.set_epoch("2031-03-14T06:00:00 TT")
    assert abs(ed.scene.epoch.seconds_since(tdb)) < 0.002
    ed.set_epoch("2031-03-14T06:00:00 UTC")
    assert ed.scene.epoch.seconds_since(tdb) == pytest.approx(37 + 32.184, abs=0.002)
    assert ed.scene.epoch.iso() == "2031-03-14T06:00:00 UTC"
    ed.set_epoch("2031-03-14T06:00:00")  # no scale: TDB
    assert ed.scene.epoch == tdb


def test_an_epoch_that_is_not_one_is_refused_with_the_reason_and_changes_nothing(
        mission: Path) -> None:
    ed = Editor.open(mission)
    scene = ed.scene
    for text, reason in (("next tuesday", "is not an ISO 8601 epoch"),
                         ("2031-02-30T00:00:00 UTC", "has no day 30"),
                         ("2031-03-14T06:00:00 GPS", "unknown time scale")):
        with pytest.raises(EditRefused) as err:
            ed.set_epoch(text)
        assert reason in err.value.problems[0], err.value.problems
    assert ed.scene is scene and not ed.can_undo
    assert ed.set_epoch(scene.epoch.iso()) is False  # the same epoch: no edit


def test_undo_brings_the_old_epoch_back(mission: Path) -> None:
    ed = Editor.open(mission)
    scene = ed.scene
    ed.set_epoch("2040-01-01T00:00:00 TDB")
    ed.undo()
    assert ed.scene is scene and not ed.dirty
    ed.redo()
    assert ed.scene.epoch == parse_epoch("2040-01-01T00:00:00 TDB")


def test_a_saved_epoch_loads_back_as_the_same_scene(mission: Path) -> None:
    ed = Editor.open(mission)
    before = ed.scene
    ed.set_epoch("2031-03-15T00:00:00 UTC")
    ed.save()
    text = mission.read_text(encoding="utf-8")
    assert 'epoch = "2031-03-15T00:00:00 UTC"' in text
    # Comments kept; tp, an offset from the scene epoch, is now counted from the new one
    # (the periapsis passage 20 min before the old epoch is 18 h 20 min before the new).
    assert "# 300 km above the equatorial radius" in text
    assert 'tp = "-66000.0' in text and "# it passed periapsis 20 minutes" in text
    loaded = load_scene(mission)
    assert loaded.epoch == ed.scene.epoch
    shift = loaded.epoch.seconds_since(before.epoch)
    for t in (0.0, 7 * 3600.0):
        assert np.abs(positions_at(loaded, t - shift) - positions_at(before, t)).max() < MM
    assert loaded.timeline.start_s == before.timeline.start_s
    assert [b.sweep for b in loaded.bodies] == [b.sweep for b in before.bodies]


def test_a_timeline_start_written_as_a_date_is_kept_in_scene_time(tmp_path: Path) -> None:
    p = tmp_path / "dated.toml"
    p.write_text('[scene]\nepoch = "2030-01-01T00:00:00 TDB"\n\n[center]\npreset = "sun"\n\n'
                 '[[body]]\nname = "A"\na = "1 au"\ne = 0.1\n'
                 'sweep = { start = "2030-01-11T00:00:00 TDB", interval = "30 d", count = 3 }\n\n'
                 '[timeline]\nstart = "2030-01-02T00:00:00 TDB"\n', encoding="utf-8")
    ed = Editor.open(p)
    before = ed.scene
    assert before.timeline.start_s == pytest.approx(DAY)
    ed.set_epoch("2031-01-01T00:00:00 TDB")
    ed.save()
    loaded = load_scene(p)
    assert loaded.timeline.start_s == pytest.approx(DAY, abs=1e-6)
    assert loaded.bodies[0].sweep is not None
    assert loaded.bodies[0].sweep.start_s == pytest.approx(10 * DAY, abs=1e-6)
    shift = loaded.epoch.seconds_since(before.epoch)
    assert np.abs(positions_at(loaded, -shift) - positions_at(before, 0.0)).max() < MM
