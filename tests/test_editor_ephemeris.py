"""Editing a body that follows DE421: its elements are refused (the ephemeris sets the
orbit, so an edit would change nothing drawn and nothing saved), and "make it a fixed
conic" turns it into the osculating two-body conic at the time shown, which starts
exactly where DE421 has the body (positions by jplephem from the packaged kernel) and
saves as that one table's keys, the rest of the file unchanged."""

from __future__ import annotations

import difflib
import shutil
from pathlib import Path

import numpy as np
import pytest

from viewer.gui.editor import Editor, EditRefused
from viewer.mission.porkchop import body_states
from viewer.scene import load_scene

ROOT = Path(__file__).resolve().parents[1]
DAY = 86400.0


@pytest.fixture
def solar(tmp_path: Path) -> Path:
    path = tmp_path / "solar.toml"
    shutil.copy(ROOT / "scenes" / "solar-system.toml", path)
    return path


def test_elements_of_an_ephemeris_body_are_refused(solar: Path) -> None:
    ed = Editor.open(solar)
    k = [b.name for b in ed.scene.bodies].index("Mars")
    before = ed.scene
    with pytest.raises(EditRefused) as err:
        ed.set_field("a", "2 au", k)
    assert len(err.value.problems) == 1
    assert "follows the ephemeris DE421" in err.value.problems[0]
    assert ed.scene is before and not ed.dirty


def test_a_fixed_conic_starts_where_de421_has_the_body(solar: Path) -> None:
    ed = Editor.open(solar)
    k = [b.name for b in ed.scene.bodies].index("Mars")
    tracked = ed.scene.bodies[k]
    t = 40.0 * DAY
    ed.fix_conic(t, k)
    fixed = ed.scene.bodies[k]
    assert fixed.track is None and fixed.epoch_offset_s == t
    r_fix, v_fix = (x[0] for x in body_states(fixed, np.array([t])))
    r_eph, v_eph = (x[0] for x in body_states(tracked, np.array([t])))
    assert np.linalg.norm(r_fix - r_eph) < 1.0  # m, of 2.1e11 m
    assert np.linalg.norm(v_fix - v_eph) < 1e-6  # m/s
    # Thirty days on, the conic and the ephemeris part by the planets' pull only: well
    # under 0.1 % of the distance (common practice, no source: Mars' osculating elements
    # change slowly).
    later = np.array([t + 30.0 * DAY])
    gap = np.linalg.norm(body_states(fixed, later)[0][0] - body_states(tracked, later)[0][0])
    assert 0.0 < gap < 1e-3 * np.linalg.norm(r_eph)
    ed.set_field("e", "0.2", k)  # now an ordinary body
    ed.undo()
    ed.undo()
    assert ed.scene.bodies[k].track is not None


def test_a_fixed_conic_saves_as_its_own_table(solar: Path) -> None:
    ed = Editor.open(solar)
    before = solar.read_text(encoding="utf-8")
    k = [b.name for b in ed.scene.bodies].index("Mars")
    ed.fix_conic(10.0 * DAY, k)
    ed.save()
    after = solar.read_text(encoding="utf-8")
    changed = [d for d in difflib.ndiff(before.splitlines(), after.splitlines())
               if d[:1] in "+-"]
    assert changed[0] == '- ephemeris = "DE421"'
    assert all(d.startswith("+ ") for d in changed[1:])
    again = load_scene(solar).body("Mars")
    mine = ed.scene.bodies[k]
    assert again.track is None
    for name in ("a", "e", "i", "raan", "argp", "nu"):
        assert float(getattr(again.elements, name)) == pytest.approx(
            float(getattr(mine.elements, name)), rel=1e-12, abs=1e-12)
