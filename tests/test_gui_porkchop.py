"""The window's launch season (pork-chop plot): the same grid as ``perifocal porkchop``,
a picked cell's transfer that really arrives at the target (DE421), one body kept while
clicking about, refusals in one line, and the season it opens on.

Independent checks: the transfer body, propagated as a two-body conic from its
departure, must arrive where DE421 puts Mars at the arrival date (the Lambert boundary
condition, the positions read by jplephem from the packaged kernel); the 2026 Earth-Mars
launch period (late 2026, from memory: minimum-energy departures about November 2026)."""

from __future__ import annotations

import difflib
import json
import shutil
from pathlib import Path

import numpy as np
import pytest

from viewer.cli import main
from viewer.gui.editor import Editor, EditRefused
from viewer.gui.porkchop import (
    SeasonInputs,
    cell_rows,
    compute,
    default_pair,
    pick,
    suggested,
)
from viewer.mission.porkchop import body_states
from viewer.scene import load_scene
from viewer.units import parse_epoch

ROOT = Path(__file__).resolve().parents[1]
SOLAR = ROOT / "scenes" / "solar-system.toml"
DEPART = ("2026-09-01", "2027-01-31")
ARRIVE = ("2027-05-01", "2028-03-01")


@pytest.fixture(scope="module")
def scene():  # type: ignore[no-untyped-def]
    return load_scene(SOLAR)


def _index(scene, name: str) -> int:  # type: ignore[no-untyped-def]
    return [b.name for b in scene.bodies].index(name)


def _inputs(scene, steps: int = 60) -> SeasonInputs:  # type: ignore[no-untyped-def]
    return SeasonInputs(_index(scene, "Earth"), _index(scene, "Mars"), DEPART, ARRIVE,
                        steps=steps)


def test_the_window_grid_is_the_command_lines(scene, capsys) -> None:  # type: ignore[no-untyped-def]
    res = compute(scene, _inputs(scene, steps=40))
    assert main(["porkchop", str(SOLAR), "--from", "Earth", "--to", "Mars", "--depart",
                 *DEPART, "--arrive", *ARRIVE, "--steps", "40", "40", "--json"]) == 0
    cli = json.loads(capsys.readouterr().out)
    for which, key in (("c3", "best_c3"), ("total", "best_total")):
        cell = res.grid.best(which)
        assert cell is not None
        rows = dict(cell_rows(scene, res, cell))
        assert rows["departure"] == cli[key]["departure"][:19] + " TDB"
        assert rows["departure C3"] == f"{cli[key]['c3_km2_s2']:.3f} km2/s2"
        assert rows["total dv"] == f"{cli[key]['dv_total_km_s']:.3f} km/s"


def test_a_picked_transfer_arrives_at_mars(scene) -> None:  # type: ignore[no-untyped-def]
    ed = Editor(scene, SOLAR)
    res = compute(scene, _inputs(scene))
    cell = res.grid.best("total")
    assert cell is not None
    k = pick(ed, res, cell, None)
    body = ed.scene.bodies[k]
    t_dep, t_arr = float(res.grid.t_dep_s[cell[0]]), float(res.grid.t_arr_s[cell[1]])
    assert body.flight_s == (t_dep, t_arr) and body.epoch_offset_s == t_dep
    r_end = body_states(body, np.array([t_arr]))[0][0]
    r_mars = body_states(scene.body("Mars"), np.array([t_arr]))[0][0]
    r_earth = body_states(scene.body("Earth"), np.array([t_dep]))[0][0]
    r_start = body_states(body, np.array([t_dep]))[0][0]
    # Boundary conditions of Lambert's problem, against DE421's positions: well under a
    # kilometre over some 300 million km.
    assert np.linalg.norm(r_end - r_mars) < 1e3
    assert np.linalg.norm(r_start - r_earth) < 1e3


def test_clicking_about_keeps_one_transfer_and_each_click_undoes(scene) -> None:  # type: ignore[no-untyped-def]
    ed = Editor(scene, SOLAR)
    n = len(scene.bodies)
    res = compute(scene, _inputs(scene))
    k = pick(ed, res, (10, 20), None)
    k2 = pick(ed, res, (30, 25), k)
    assert k2 == k and len(ed.scene.bodies) == n + 1
    assert ed.scene.bodies[k].flight_s[0] == pytest.approx(float(res.grid.t_dep_s[30]))
    ed.undo()
    assert ed.scene.bodies[k].flight_s[0] == pytest.approx(float(res.grid.t_dep_s[10]))
    ed.undo()
    assert len(ed.scene.bodies) == n


def test_a_picked_transfer_saves_as_one_new_table(scene, tmp_path: Path) -> None:  # type: ignore[no-untyped-def]
    path = tmp_path / "solar.toml"
    shutil.copy(SOLAR, path)
    ed = Editor.open(path)
    before = path.read_text(encoding="utf-8")
    res = compute(ed.scene, _inputs(ed.scene))
    cell = res.grid.best("c3")
    assert cell is not None
    pick(ed, res, cell, None)
    ed.save()
    after = path.read_text(encoding="utf-8")
    diff = [d for d in difflib.ndiff(before.splitlines(), after.splitlines())
            if d[:1] in "+-?"]
    assert not [d for d in diff if d[:1] != "+"]  # every line of the file kept as it was
    added = "\n".join(d[2:] for d in diff)
    assert added.count("[[body]]") == 1 and "flight" in added
    again = load_scene(path)
    body = again.body("Earth to Mars (Lambert)")
    assert body.flight_s == pytest.approx((float(res.grid.t_dep_s[cell[0]]),
                                           float(res.grid.t_arr_s[cell[1]])), abs=1e-3)


@pytest.mark.parametrize(("change", "field", "words"), [
    ({"depart": ("2027-01-31", "2026-09-01")}, "porkchop:depart", "after the first"),
    ({"arrive": ("next year", "2028-03-01")}, "porkchop:arrive", "epoch such as"),
    ({"park_altitude": "-5 km"}, "porkchop:park", "zero or more"),
    ({"steps": 1}, "porkchop:steps", "2 to 2000"),
])
def test_refusals_are_one_line_naming_the_field(scene, change, field, words) -> None:  # type: ignore[no-untyped-def]
    inp = _inputs(scene)
    for k, v in change.items():
        setattr(inp, k, v)
    with pytest.raises(EditRefused) as err:
        compute(scene, inp)
    assert err.value.source == field
    assert len(err.value.problems) == 1 and words in err.value.problems[0]


def test_the_same_body_twice_is_refused(scene) -> None:  # type: ignore[no-untyped-def]
    inp = _inputs(scene)
    inp.to_index = inp.from_index
    with pytest.raises(EditRefused, match="same"):
        compute(scene, inp)


def test_the_season_opens_on_earth_to_mars_about_the_next_window(scene) -> None:  # type: ignore[no-untyped-def]
    pair = default_pair(scene, 0)
    assert pair == (_index(scene, "Earth"), _index(scene, "Mars"))
    inp = suggested(scene, 0.0, *pair)
    lo, hi = (parse_epoch(x) for x in inp.depart)
    mid = lo.plus_seconds(0.5 * hi.seconds_since(lo))
    # The 2026 Earth-Mars launch period is late 2026 (from memory: about November).
    assert mid.iso()[:7] in ("2026-10", "2026-11", "2026-12")
    res = compute(scene, inp)
    best = res.grid.best("c3")
    assert best is not None
    # Its least C3 lies inside the grid, not on an edge (the season is framed).
    assert 0 < best[0] < inp.steps - 1 and 0 < best[1] < inp.steps - 1
    assert 7.0 < float(res.grid.c3_m2_s2[best]) / 1e6 < 12.0  # km2/s2; from memory ~9
