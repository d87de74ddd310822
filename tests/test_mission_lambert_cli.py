"""`perifocal lambert`: the contract's JSON, the published example, and bad input (exit 2)."""

from __future__ import annotations

import json

import numpy as np
import pytest

from viewer.cli import main
from viewer.mission.cautions import CAUTION

CURTIS_5_2 = ["--r1", "5000,10000,2100", "--r2", "-14600,2500,7000"]


def test_json_holds_every_solution_with_curtis_example_first(capsys):
    # Curtis Example 5.2 (values from memory): v1 = (-5.9925, 1.9254, 3.2456) km/s.
    assert main(["lambert", "--mu", "398600 km3/s2", *CURTIS_5_2, "--tof", "1 h",
                 "--json"]) == 0
    out = json.loads(capsys.readouterr().out)
    assert out["caution"] == CAUTION
    first = out["solutions"][0]
    assert (first["revolutions"], first["direction"]) == (0, "prograde")
    np.testing.assert_allclose(first["v1_km_s"], [-5.9925, 1.9254, 3.2456], atol=1e-4)
    np.testing.assert_allclose(first["v2_km_s"], [-3.3125, -4.1966, -0.38529], atol=1e-4)
    assert {s["direction"] for s in out["solutions"]} == {"prograde", "retrograde"}
    for s in out["solutions"]:
        assert len(s["v1_km_s"]) == 3 and len(s["v2_km_s"]) == 3


def test_table_with_a_preset_and_units_and_revolutions(capsys):
    # Six hours about the Earth between two points ~8000 km out leaves time for laps.
    assert main(["lambert", "--mu", "earth", "--r1", "7000,0,0", "--r2", "-2000,9000,1500",
                 "--tof", "6 h"]) == 0
    out = capsys.readouterr().out
    assert "left" in out and "right" in out and CAUTION in out
    assert main(["lambert", "--mu", "earth", "--r1", "7000000,0,0 m", "--r2",
                 "-2000,9000,1500", "--tof", "21600 s", "--json"]) == 0
    assert max(s["revolutions"] for s in json.loads(capsys.readouterr().out)["solutions"]) >= 2


@pytest.mark.parametrize("argv, flag", [
    (["--mu", "earth", *CURTIS_5_2, "--tof", "0 s"], "--tof"),
    (["--mu", "earth", *CURTIS_5_2, "--tof", "-1 h"], "--tof"),
    (["--mu", "earth", *CURTIS_5_2, "--tof", "1 km"], "--tof"),
    (["--mu", "pluto-ish", *CURTIS_5_2, "--tof", "1 h"], "--mu"),
    (["--mu", "-5 km3/s2", *CURTIS_5_2, "--tof", "1 h"], "--mu"),
    (["--mu", "earth", "--r1", "1,2", "--r2", "3,4,5", "--tof", "1 h"], "--r1"),
    (["--mu", "earth", "--r1", "7000,0,0", "--r2", "-9000,0,0", "--tof", "1 h"], "--r2"),
])
def test_bad_input_is_one_clear_line_and_exit_2(capsys, argv, flag):
    assert main(["lambert", *argv]) == 2
    err = capsys.readouterr().err
    assert flag in err.splitlines()[0]
    assert len(err.strip().splitlines()) == 2


def test_closest_approach_and_impact_warnings_follow_the_flown_arc(capsys):
    # The least distance reported for each solution is the minimum of the arc sampled
    # densely with the universal-variable propagator (tested against solve_ivp); the
    # warning appears exactly when that is inside the Earth (WGS 84 radius).
    from viewer.orbit import propagate

    r1 = np.array([7000.0, 0.0, 0.0]) * 1e3
    assert main(["lambert", "--mu", "earth", "--r1", "7000,0,0", "--r2", "-2000,9000,1500",
                 "--tof", "3 h", "--json"]) == 0
    out = json.loads(capsys.readouterr().out)
    t = np.linspace(0.0, 3 * 3600.0, 20001)
    for s in out["solutions"]:
        r, _ = propagate(r1, np.array(s["v1_km_s"]) * 1e3, 398600.4418e9, t)
        least = np.linalg.norm(r, axis=-1).min() / 1e3
        assert s["closest_km"] == pytest.approx(least, abs=1.0)
        assert bool(s["warnings"]) == (least < 6378.137)
    assert any(s["warnings"] for s in out["solutions"])


def test_a_long_flight_lists_the_fewest_revolutions_up_to_max_revs(capsys):
    # Ten years between two low orbits allows tens of thousands of laps; the listing
    # stops at --max-revs, each count with both branches and both directions.
    assert main(["lambert", "--mu", "earth", "--r1", "7000,0,0", "--r2", "0,7100,0",
                 "--tof", "3650 d", "--max-revs", "3", "--json"]) == 0
    sols = json.loads(capsys.readouterr().out)["solutions"]
    assert sorted({s["revolutions"] for s in sols}) == [0, 1, 2, 3]
    assert len(sols) == 2 * (1 + 2 * 3)
