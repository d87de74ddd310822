"""Pork-chop grids (viewer.mission.porkchop, `perifocal porkchop`): cells against the slow
universal-variable reference, the Earth-Mars Hohmann numbers of the textbooks, the shape
of the 2026 Earth-Mars season against facts of the trade, and the command's outputs."""

from __future__ import annotations

import csv
import json
import math
import sys
import xml.etree.ElementTree as ET
from pathlib import Path

import numpy as np
import pytest
from PIL import Image

from viewer.cli import main
from viewer.mission.cautions import CAUTION
from viewer.mission.porkchop import body_states, burn_from_circle, grid, synodic_period_s
from viewer.orbit.transfer import hohmann
from viewer.scene import load_scene
from viewer.units import parse_epoch

sys.path.insert(0, str(Path(__file__).parent))
from test_mission_lambert import reference  # noqa: E402

SCENE = Path(__file__).resolve().parents[1] / "scenes" / "solar-system.toml"
DAY = 86400.0
SEASON = ["--depart", "2026-09-01", "2027-01-31", "--arrive", "2027-05-01", "2028-03-01"]


@pytest.fixture(scope="module")
def scene():
    return load_scene(SCENE)


def _season(scene, n=120):
    td = np.linspace(*(parse_epoch(x).seconds_since(scene.epoch) for x in SEASON[1:3]), n)
    ta = np.linspace(*(parse_epoch(x).seconds_since(scene.epoch) for x in SEASON[4:6]), n)
    earth, mars = scene.body("Earth"), scene.body("Mars")
    g = grid(scene.center.gm_m3_s2, body_states(earth, td), body_states(mars, ta), td, ta,
             (3.986004418e14, 6378.137e3 + 200e3), (4.282837e13, 3396.19e3 + 250e3))
    return g, body_states(earth, td), body_states(mars, ta)


def test_earth_mars_hohmann_numbers(scene):
    # Textbook Earth-Mars Hohmann (REFERENCES.md; e.g. Curtis ch. 8, from memory): about
    # 259 days, a departure phase angle of about 44 deg, a synodic period of about 780 d.
    earth, mars = scene.body("Earth").elements, scene.body("Mars").elements
    tr = hohmann(float(earth.a), float(mars.a), scene.center.gm_m3_s2)
    assert float(tr.time_of_flight_s) / DAY == pytest.approx(259.0, abs=3.0)
    assert math.degrees(float(tr.phase_angle_rad)) == pytest.approx(44.0, abs=1.5)
    synodic = synodic_period_s(float(earth.period), float(mars.period)) / DAY
    assert synodic == pytest.approx(780.0, abs=5.0)


def test_grid_cells_match_the_universal_variable_reference(scene):
    g, (r1, v1p), (r2, _) = _season(scene, 40)
    rng = np.random.default_rng(2026)
    mu = scene.center.gm_m3_s2
    checked = 0
    for _ in range(60):
        i, j = rng.integers(0, 40, 2)
        if not np.isfinite(g.c3_m2_s2[i, j]):
            continue
        ref = reference(mu, r1[i], r2[j], g.tof_s[i, j], 0, True)
        assert len(ref) == 1
        c3_ref = float(np.sum((ref[0][0] - v1p[i]) ** 2))
        assert g.c3_m2_s2[i, j] == pytest.approx(c3_ref, rel=1e-7, abs=1e-3)
        checked += 1
    assert checked > 40


def test_patched_conic_burn_from_leo():
    # Escape from a 300 km circular orbit with v_inf = 3 km/s: sqrt(v_inf^2 + v_esc^2) - v_c
    # (Curtis eq. 8.40; v_c = 7.726 km/s, v_esc = 10.926 km/s at 6678 km, from memory).
    assert burn_from_circle(3000.0, 398600e9, 6678e3) == pytest.approx(
        math.sqrt(3.0**2 + 10.926**2) * 1e3 - 7726.0, abs=3.0)


def test_the_2026_earth_mars_season_has_the_shape_of_the_trade(scene):
    # Facts of the trade, from memory: Earth-Mars windows open every ~26 months; the
    # 2026 one departs in the last months of 2026 and arrives in the second half of 2027;
    # the least C3 of an Earth-Mars opportunity lies around 8-16 km2/s2 over the 15-year
    # cycle, with arrival v_inf of roughly 2.5-4 km/s; the plot has two basins, type I
    # (transfer angle below 180 deg, shorter) and type II (longer), split by a ridge of
    # very high C3 along the 180-degree transfers.
    g, _, _ = _season(scene)
    i, j = g.best("c3")
    c3 = g.c3_m2_s2 / 1e6
    dep = scene.epoch.plus_seconds(float(g.t_dep_s[i])).iso()
    arr = scene.epoch.plus_seconds(float(g.t_arr_s[j])).iso()
    assert "2026-10-01" <= dep <= "2026-12-15", dep
    assert "2027-06-01" <= arr <= "2027-12-31", arr
    assert 8.0 <= c3[i, j] <= 12.0
    assert 2.0 <= g.vinf_arr_m_s[i, j] / 1e3 <= 4.0
    # Along the best departure date, C3 against time of flight: two minima and a ridge.
    column = c3[i]
    tof = g.tof_s[i] / DAY
    ridge = int(np.nanargmax(np.where((tof > 150) & (tof < 350), column, -np.inf)))
    assert column[ridge] > 50.0
    type1, type2 = np.nanmin(column[:ridge]), np.nanmin(column[ridge + 1:])
    assert type1 < 20.0 and type2 < 20.0
    assert min(type1, type2) == pytest.approx(c3[i, j], abs=0.5)


def test_command_writes_plot_grid_and_json_per_the_contract(tmp_path, capsys):
    prefix = tmp_path / "mars"
    assert main(["porkchop", str(SCENE), "--from", "Earth", "--to", "Mars", *SEASON,
                 "--steps", "60", "50", "-o", str(prefix), "--json"]) == 0
    out = json.loads(capsys.readouterr().out)
    assert out["caution"] == CAUTION
    for key in ("best_c3", "best_total"):
        best = out[key]
        assert set(best) >= {"departure", "arrival", "c3_km2_s2", "vinf_arrival_km_s",
                             "tof_days"}
        assert best["departure"].endswith(" TDB") and best["arrival"].endswith(" TDB")
        tof = parse_epoch(best["arrival"]).seconds_since(parse_epoch(best["departure"])) / DAY
        assert tof == pytest.approx(best["tof_days"], abs=1e-3)
    assert out["best_total"]["dv_total_km_s"] <= out["best_c3"]["dv_total_km_s"]
    with Image.open(f"{prefix}.png") as im:
        assert im.size[0] >= 800
    assert ET.parse(f"{prefix}.svg").getroot().tag.endswith("svg")
    with open(f"{prefix}.csv") as f:
        rows = list(csv.DictReader(f))
    assert len(rows) == 60 * 50
    least = min(float(r["c3_km2_s2"]) for r in rows if r["c3_km2_s2"])
    assert least == pytest.approx(out["best_c3"]["c3_km2_s2"], abs=1e-5)
    assert main(["porkchop", str(SCENE), "--from", "Earth", "--to", "Mars", *SEASON,
                 "--steps", "20", "20"]) == 0
    text = capsys.readouterr().out
    assert "least C3" in text and CAUTION in text


@pytest.mark.parametrize("argv, flag", [
    (["--from", "Earth", "--to", "Vulcan", *SEASON], "--to"),
    (["--from", "Earth", "--to", "Earth", *SEASON], "--to"),
    (["--from", "Earth", "--to", "Mars", "--depart", "2049-01-01", "2051-06-01",
      "--arrive", "2050-01-01", "2050-06-01"], "--depart"),
    (["--from", "Earth", "--to", "Mars", *SEASON, "--steps", "2000", "2001"], "--steps"),
    (["--from", "Earth", "--to", "Mars", *SEASON, "--steps", "2000", "2000"], "--steps"),
    (["--from", "Earth", "--to", "Mars", "--depart", "2027-01-01", "2027-02-01",
      "--arrive", "2026-01-01", "2026-06-01"], "--arrive"),
    (["--from", "Earth", "--to", "Mars", "--depart", "2027-01-01", "2026-02-01",
      "--arrive", "2026-01-01", "2026-06-01"], "--depart"),
])
def test_bad_input_is_one_clear_line_and_exit_2(capsys, argv, flag):
    assert main(["porkchop", str(SCENE), *argv]) == 2
    err = capsys.readouterr().err.strip().splitlines()
    assert flag in err[0] and len(err) == 2, err


def test_the_chosen_lambert_transfer_is_saved_and_flies_from_earth_to_mars(tmp_path, capsys):
    target = tmp_path / "mars2026.toml"
    assert main(["porkchop", str(SCENE), "--from", "Earth", "--to", "Mars", *SEASON,
                 "--steps", "40", "40", "--save", str(target), "--json"]) == 0
    out = json.loads(capsys.readouterr().out)
    scene = load_scene(target)
    leg = scene.body(out["saved_body"])
    best = out["best_total"]
    t_dep = leg.epoch_offset_s  # the departure, to the microsecond
    assert t_dep == pytest.approx(parse_epoch(best["departure"]).seconds_since(scene.epoch),
                                  abs=0.5)
    t_arr = t_dep + best["tof_days"] * DAY
    assert leg.flight_s == pytest.approx((t_dep, t_arr), abs=1e-3)  # only the flown arc
    from viewer.orbit import state_from_elements

    # The saved conic, propagated by the scene's own two-body motion, leaves the Earth's
    # DE421 position and meets Mars's DE421 position (to 1 km after 310 days).
    for t, body, tol in ((t_dep, "Earth", 1.0), (t_arr, "Mars", 1e3)):
        r = state_from_elements(leg.elements_at(t))[0]
        assert np.linalg.norm(r - scene.body(body).track.state(t)[0]) < tol, body
    assert main(["porkchop", str(SCENE), "--from", "Earth", "--to", "Mars", *SEASON,
                 "--steps", "10", "10", "--save", str(target)]) == 2  # exists, no --force
    assert "exists" in capsys.readouterr().err


def test_invented_planets_use_their_own_gm_and_radius(tmp_path, capsys):
    # Two invented planets on fixed conics: the burns use each one's gm and radius from
    # the scene; patched-conic escape from 1.1 radii (Curtis eq. 8.40) checks the total.
    scene = tmp_path / "invented.toml"
    scene.write_text('[scene]\nepoch = "2030-01-01T00:00:00 TDB"\n[center]\npreset = "sun"\n'
                     '[[body]]\nname = "Inner"\na = "1 au"\ngm = "4e14 m3/s2"\n'
                     'radius = "6000 km"\n'
                     '[[body]]\nname = "Outer"\na = "1.6 au"\nnu = "60 deg"\n'
                     'gm = "5e13 m3/s2"\nradius = "3500 km"\n')
    argv = ["porkchop", str(scene), "--from", "Inner", "--to", "Outer", "--depart", "0 d",
            "400 d", "--arrive", "150 d", "800 d", "--steps", "40", "40",
            "--park-altitude", "600 km", "--capture-altitude", "350 km", "--json"]
    assert main(argv) == 0
    best = json.loads(capsys.readouterr().out)["best_total"]
    dep = burn_from_circle(best["vinf_departure_km_s"] * 1e3, 4e14, 6600e3)
    arr = burn_from_circle(best["vinf_arrival_km_s"] * 1e3, 5e13, 3850e3)
    assert best["dv_total_km_s"] == pytest.approx((dep + arr) / 1e3, rel=1e-9)
    v, r = best["vinf_departure_km_s"] * 1e3, 6600e3
    assert dep == pytest.approx(math.sqrt(v * v + 2 * 4e14 / r) - math.sqrt(4e14 / r))
    scene.write_text(scene.read_text().replace('gm = "5e13 m3/s2"\n', ""))
    assert main(argv) == 2
    assert "--to" in capsys.readouterr().err
