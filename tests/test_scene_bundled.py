"""The bundled scenes: each loads and checks, and the real-solar-system scene is the
published element table, converted correctly."""

from __future__ import annotations

import json
import math
import re
from pathlib import Path

import pytest
from reference_values import AU

from viewer.cli import main
from viewer.scene import load_scene

SCENES = Path(__file__).resolve().parents[1] / "scenes"
BUNDLED = sorted(SCENES.glob("*.toml"))


@pytest.mark.parametrize("path", BUNDLED, ids=[p.stem for p in BUNDLED])
def test_every_bundled_scene_checks_with_exit_0(path, capsys):
    assert main(["check", str(path), "--json"]) == 0
    out = json.loads(capsys.readouterr().out)
    assert out["bodies"] or out["populations"]
    assert main(["check", str(path)]) == 0
    assert "no warnings" in capsys.readouterr().out or path.stem == "earth-mission"


# E. M. Standish, "Keplerian Elements for Approximate Positions of the Major Planets"
# (JPL SSD), Table 1, as pasted into the scene's comments (from memory of the table):
# a, e, I, L, varpi, Omega. The test reads them back and converts them itself.
_TABLE_ROW = re.compile(r"^#.*?a ([\d.]+)\s+e ([\d.]+)\s+I ([-\d.]+)\s+L ([-\d.]+)\s+"
                        r"varpi ([-\d.]+)\s+Omega ([-\d.]+)\s*$", re.M)


def test_solar_system_elements_are_the_table_converted_to_argp_and_m():
    text = (SCENES / "solar-system-mean.toml").read_text()
    rows = _TABLE_ROW.findall(text)
    scene = load_scene(SCENES / "solar-system-mean.toml")
    assert len(rows) == len(scene.bodies) == 9
    for row, body in zip(rows, scene.bodies, strict=True):
        a, e, inc, L, varpi, node = map(float, row)
        if inc < 0:  # the same plane: I' = -I, Omega' = Omega + 180, varpi unchanged
            inc, node = -inc, node + 180.0
        el = body.elements
        assert el.a == pytest.approx(a * AU, rel=1e-15), body.name
        assert el.e == e
        assert math.degrees(el.i) == pytest.approx(inc, abs=1e-9)
        assert math.degrees(el.raan) == pytest.approx(node % 360.0, abs=1e-9)
        # argument of periapsis = longitude of perihelion - longitude of the node
        assert math.degrees(el.argp) == pytest.approx((varpi - node) % 360.0, abs=1e-8)
        # mean anomaly = mean longitude - longitude of perihelion
        M = math.degrees(float(el.mean_anomaly)) % 360.0
        assert M == pytest.approx((L - varpi) % 360.0, abs=1e-8), body.name


def test_earth_is_near_perihelion_at_j2000():
    # The Sun's mean anomaly at J2000 is 357.529 deg (Astronomical Almanac low-precision
    # solar formula, g = 357.529 + 0.98560028 d, from memory), and Earth's distance from
    # the Sun on 2000 January 1 is about 0.9833 au (Astronomical Almanac, from memory).
    scene = load_scene(SCENES / "solar-system-mean.toml")
    earth = scene.body("Earth-Moon barycentre").elements
    # 0.005 deg: the formula prints three decimals, and it is the Sun's mean anomaly seen
    # from Earth, not the Earth-Moon barycentre's of a fitted 1800-2050 table.
    assert math.degrees(float(earth.mean_anomaly)) == pytest.approx(357.529, abs=0.005)
    assert float(earth.radius_at(earth.nu)) / AU == pytest.approx(0.9833, abs=2e-4)


def test_demo_has_four_to_six_planets_and_a_comet_with_equal_time_sectors():
    scene = load_scene(SCENES / "demo.toml")
    comets = [b for b in scene.bodies if b.sweep is not None]
    planets = [b for b in scene.bodies if b.sweep is None]
    assert 4 <= len(planets) <= 6
    assert len({round(float(b.elements.e), 3) for b in planets}) == len(planets)
    assert len({round(float(b.elements.i), 4) for b in planets}) == len(planets)
    (comet,) = comets
    assert float(comet.elements.e) == pytest.approx(0.7)
    # the timeline shows the whole sweep: one comet period within the show
    tl = scene.timeline
    shown = tl.duration_s * tl.rate
    assert shown >= 0.99 * comet.sweep.count * comet.sweep.interval_s


def test_laws_scene_shows_the_third_law():
    scene = load_scene(SCENES / "laws.toml")
    long_, short = scene.body("Long").elements, scene.body("Short").elements
    # T^2 / a^3 is the same for both orbits (the third law): 4^3 = 8^2
    assert long_.period**2 / long_.a**3 == pytest.approx(short.period**2 / short.a**3,
                                                         rel=1e-12)
    assert long_.period / short.period == pytest.approx(8.0, rel=1e-4)
    b = scene.body("Long")
    assert b.show.foci and b.show.axes and b.show.apsides and b.sweep is not None


def test_earth_mission_scene_has_parking_transfer_and_departure():
    scene = load_scene(SCENES / "earth-mission.toml")
    parking, transfer, departure = scene.bodies
    assert scene.center.preset == "earth"
    assert float(parking.elements.e) == 0.0
    assert float(parking.elements.a) - scene.center.radius_m < 2000e3  # low orbit
    # geostationary radius 42 164 km (common practice, no source)
    assert float(transfer.elements.apoapsis) == pytest.approx(42_164e3, rel=1e-3)
    assert float(transfer.elements.periapsis) == pytest.approx(float(parking.elements.a))
    assert float(departure.elements.e) > 1.0
