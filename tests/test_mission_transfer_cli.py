"""``perifocal transfer``: textbook numbers through the command, and the transfer orbit
it adds to a scene flies from one circle to the other."""

from __future__ import annotations

import json
import math
from pathlib import Path

import numpy as np
import pytest
from reference_values import HOUR, KM

from viewer.cli import CAUTION, main
from viewer.orbit import propagate, state_from_elements
from viewer.scene import load_scene

# Vallado, Fundamentals of Astrodynamics and Applications (4th ed.), Example 6-1 radii
# (from memory): 191.344 11 km and 35 781.348 57 km altitude above 6378.137 km.
SCENE = """# Two circles for transfers.
[scene]
title = "LEO and GEO"
epoch = "2030-01-01T00:00:00 TDB"
frame = "EME2000"

[center]
preset = "earth"

[[body]]
name = "LEO"
a = "6569.48111 km"
e = 0
i = "28.5 deg"
raan = "40 deg"

[[body]]
name = "GEO"
a = "42159.48557 km"
e = 0
i = "28.5 deg"
raan = "40 deg"
nu = "130 deg"

[[body]]
name = "Tilted"
a = "20000 km"
e = 0
i = "10 deg"

[[body]]
name = "Eccentric"
a = "20000 km"
e = 0.2
i = "28.5 deg"
raan = "40 deg"
"""


@pytest.fixture
def scene(tmp_path: Path) -> Path:
    path = tmp_path / "leo_geo.toml"
    path.write_text(SCENE)
    return path


def run_json(capsys: pytest.CaptureFixture[str], *argv: str) -> dict:
    assert main([*argv, "--json"]) == 0
    out = json.loads(capsys.readouterr().out)
    assert out["caution"] == CAUTION
    return out


def test_hohmann_leo_to_geo_numbers_match_vallado_example_6_1(
        scene: Path, capsys: pytest.CaptureFixture[str]) -> None:
    # Vallado Example 6-1, from memory: dv 2.457 + 1.478 = 3.935 km/s, 5.256 h.
    out = run_json(capsys, "transfer", str(scene), "--from", "LEO", "--to", "GEO")
    assert [b["dv_m_s"] for b in out["burns"]] == pytest.approx([2457.0, 1478.0], abs=0.5)
    assert out["dv_total_m_s"] == pytest.approx(3935.0, abs=0.5)
    assert out["time_of_flight_s"] == pytest.approx(5.256 * HOUR, abs=0.001 * HOUR)
    assert out["warnings"] == []


def test_the_written_transfer_flies_from_the_departure_body_to_the_arrival_circle(
        scene: Path, tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    out_path = tmp_path / "with_transfer.toml"
    out = run_json(capsys, "transfer", str(scene), "--from", "LEO", "--to", "GEO",
                   "--at", "25 min", "-o", str(out_path))
    assert out_path.read_text().startswith(SCENE)  # the user's file, then the new body
    s = load_scene(out_path)
    mu = s.center.gm_m3_s2
    tr = s.body("LEO to GEO")
    leo = s.body("LEO")
    t_dep = 25 * 60.0
    # At departure the transfer body is where LEO is, faster by the first burn.
    r_t, v_t = state_from_elements(tr.elements_at(t_dep), mu)
    r_l, v_l = state_from_elements(leo.elements_at(t_dep), mu)
    assert np.linalg.norm(r_t - r_l) < 1e-3
    assert np.linalg.norm(v_t) - np.linalg.norm(v_l) == pytest.approx(
        out["burns"][0]["dv_m_s"], abs=1e-6)
    # Propagated (universal variables) for the time of flight it reaches the GEO circle
    # opposite the departure point, in LEO's plane.
    r2, v2 = propagate(r_t, v_t, mu, out["time_of_flight_s"])
    assert np.linalg.norm(r2) == pytest.approx(42_159.48557 * KM, abs=1e-3)
    assert np.dot(r2, r_t) / (np.linalg.norm(r2) * np.linalg.norm(r_t)) == pytest.approx(-1)
    assert np.linalg.norm(v2) + out["burns"][1]["dv_m_s"] == pytest.approx(
        math.sqrt(mu / (42_159.48557 * KM)), abs=1e-6)


def test_departing_at_the_next_window_meets_the_target(
        scene: Path, tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    first = run_json(capsys, "transfer", str(scene), "--from", "LEO", "--to", "GEO")
    window = first["next_window_s"]
    out_path = tmp_path / "meet.toml"
    out = run_json(capsys, "transfer", str(scene), "--from", "LEO", "--to", "GEO",
                   "--at", f"{window!r} s", "-o", str(out_path))
    assert out["phase_angle_now_rad"] == pytest.approx(out["phase_angle_needed_rad"], abs=1e-9)
    s = load_scene(out_path)
    t_arr = window + out["time_of_flight_s"]
    r_tr, _ = state_from_elements(s.body("LEO to GEO").elements_at(t_arr), s.center.gm_m3_s2)
    r_geo, _ = state_from_elements(s.body("GEO").elements_at(t_arr), s.center.gm_m3_s2)
    assert np.linalg.norm(r_tr - r_geo) < 1.0  # metres


def test_bi_elliptic_adds_two_legs_that_join(scene: Path, tmp_path: Path,
                                            capsys: pytest.CaptureFixture[str]) -> None:
    out_path = tmp_path / "bi.toml"
    out = run_json(capsys, "transfer", str(scene), "--from", "LEO", "--to", "GEO",
                   "--via", "100000 km", "-o", str(out_path), "--name", "Long way")
    assert out["kind"] == "bi-elliptic" and len(out["burns"]) == 3
    s = load_scene(out_path)
    mu = s.center.gm_m3_s2
    t1 = out["burns"][1]["time_s"]
    r_a, _ = state_from_elements(s.body("Long way (leg 1)").elements_at(t1), mu)
    r_b, _ = state_from_elements(s.body("Long way (leg 2)").elements_at(t1), mu)
    assert np.linalg.norm(r_a) == pytest.approx(100_000 * KM, abs=1e-3)
    assert np.linalg.norm(r_a - r_b) < 1e-3
    assert out["dv_total_m_s"] == pytest.approx(sum(abs(b["dv_m_s"]) for b in out["burns"]))


@pytest.mark.parametrize("to, expected", [
    ("Tilted", "not coplanar"),
    ("Eccentric", "is not on a circle"),
    ("LEO", "bodies are the same"),
    ("Nowhere", "no body named 'Nowhere'"),
])
def test_transfers_that_are_not_between_coplanar_circles_are_refused(
        scene: Path, capsys: pytest.CaptureFixture[str], to: str, expected: str) -> None:
    assert main(["transfer", str(scene), "--from", "LEO", "--to", to]) == 2
    err = capsys.readouterr().err
    assert expected in err and "Traceback" not in err


def test_the_text_report_carries_the_numbers_and_the_caution(
        scene: Path, capsys: pytest.CaptureFixture[str]) -> None:
    assert main(["transfer", str(scene), "--from", "LEO", "--to", "GEO"]) == 0
    text = capsys.readouterr().out
    assert "total dv                  3.935224 km/s" in text
    assert text.rstrip().endswith(CAUTION)
