"""`perifocal timing`: time of flight and radius crossings against Curtis's examples."""

from __future__ import annotations

import json
import math
from pathlib import Path

import pytest

from viewer.cli import main

MU = 398_600.0e9  # m^3/s^2: Curtis uses mu = 398 600 km^3/s^2 in these examples

SCENE = """
[scene]
title = "Curtis examples"
[center]
gm = "398600 km3/s2"
radius = "6378 km"
[[body]]
name = "Ex31"
periapsis = "9600 km"
apoapsis = "21000 km"
[[body]]
name = "Ex35"
periapsis = "6678 km"
e = {e35}
"""


@pytest.fixture
def scene(tmp_path: Path) -> Path:
    # Curtis Example 3.5 (from memory): perigee speed 15 km/s at 300 km altitude, so
    # e = rp v^2 / mu - 1 (Curtis eq. 2.66-ish; common practice, no source).
    e35 = 6678e3 * 15e3**2 / MU - 1.0
    path = tmp_path / "curtis.toml"
    path.write_text(SCENE.format(e35=repr(e35)))
    return path


def run_json(capsys: pytest.CaptureFixture[str], *argv: str) -> dict:
    assert main(["timing", *argv, "--json"]) == 0
    return json.loads(capsys.readouterr().out)


def test_time_from_perigee_to_120_deg_matches_curtis_example_3_1(scene, capsys) -> None:
    # Curtis, Orbital Mechanics for Engineering Students, Example 3.1 (from memory):
    # perigee 9600 km, apogee 21 000 km; from perigee to nu = 120 deg takes 4077 s.
    out = run_json(capsys, str(scene), "--body", "Ex31", "--nu", "0", "120")
    assert out["time_of_flight_s"] == pytest.approx(4077.0, abs=1.0)


def test_hyperbola_reaches_its_radius_when_curtis_example_3_5_says(scene, capsys) -> None:
    # Curtis Example 3.5 (from memory): at nu = 100 deg the radius is 48 497 km and the
    # time since perigee 4141 s.
    out = run_json(capsys, str(scene), "--body", "Ex35", "--radius", "48497 km")
    assert math.degrees(out["nu_at_radius_rad"]) == pytest.approx(100.0, abs=0.01)
    assert out["time_from_periapsis_to_radius_s"] == pytest.approx(4141.0, abs=2.0)
    # v_inf^2 = v_p^2 - 2 mu / r_p (vis-viva at infinity; common practice, no source).
    assert out["v_inf_m_s"] == pytest.approx(math.sqrt(15e3**2 - 2 * MU / 6678e3), rel=1e-9)
    assert out["turning_angle_rad"] == pytest.approx(2 * math.asin(1 / out["e"]), rel=1e-12)
    assert out["escape_speed_at_radius_m_s"] == pytest.approx(math.sqrt(2 * MU / 48497e3))
    assert out["next_inbound_s"] is None  # the hyperbola leaves and never comes back


def test_an_ellipse_never_reaching_a_radius_says_so(scene, capsys) -> None:
    out = run_json(capsys, str(scene), "--body", "Ex31", "--radius", "30000 km")
    assert out["reaches_radius"] is False and out["next_outbound_s"] is None
    assert main(["timing", str(scene), "--body", "Ex31", "--radius", "30000 km"]) == 0
    assert "never reached" in capsys.readouterr().out


@pytest.mark.parametrize(("argv", "source", "needle"), [
    (["--body", "Nope", "--nu", "0", "10"], "--body", "no body named"),
    (["--body", "Ex31", "--radius", "3 kg"], "--radius", "unknown unit"),
    (["--body", "Ex35", "--nu", "0", "170"], "--nu", "beyond the asymptotes"),
    (["--body", "Ex31", "--nu", "0", "fast"], "--nu", "not a number with a unit"),
])
def test_bad_timing_input_exits_2(scene, capsys, argv, source, needle) -> None:
    assert main(["timing", str(scene), *argv]) == 2
    err = capsys.readouterr().err
    assert err.splitlines()[0] == f"perifocal: error in {source}"
    assert needle in err and "Traceback" not in err
