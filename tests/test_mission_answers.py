"""The mission answers are decided once (viewer.mission) and the command line and the
window give the same ones.

References: times of flight by direct quadrature of dt = r^2 / h dnu (scipy ``quad``,
an independent route from Kepler's equation); the circle's period 2 pi sqrt(a^3/mu)
(Kepler's third law); the turning angle 2 asin(1/e) (Curtis, *Orbital Mechanics for
Engineering Students*, eq. 8.56, from memory); the Hohmann transfer LEO to GEO of
Vallado, *Fundamentals of Astrodynamics and Applications*, 4th ed., Example 6-1, and the
bi-elliptic transfer of Example 6-2 (both from memory); escape speed sqrt(2 mu / r).
"""

from __future__ import annotations

import json
import math
from pathlib import Path

import pytest
from reference_values import DEG, HOUR, KM, KM_S, MU_EARTH
from scipy.integrate import quad

from viewer.cli import main
from viewer.gui.editor import EditRefused
from viewer.gui.mission import (
    QuickInputs,
    plan_to_radius,
    plan_transfer,
    quick_answer_rows,
    radius_crossing_rows,
    side_by_side_rows,
    transfer_pair,
    transfer_rows,
)
from viewer.mission import quick
from viewer.mission.quick import MissionRefused
from viewer.orbit import Elements
from viewer.scene import load_scene
from viewer.units.format import format_direction, format_speed, format_time

ROOT = Path(__file__).resolve().parents[1]
MISSION = ROOT / "scenes" / "earth-mission.toml"


def quad_time(el: Elements, nu0: float, nu1: float) -> float:
    """Time from nu0 to nu1 by integrating dt/dnu = r^2 / h (independent of Kepler)."""
    h = float(el.h)
    p = float(el.p)
    e = float(el.e)
    value, _ = quad(lambda nu: (p / (1 + e * math.cos(nu))) ** 2 / h, nu0, nu1,
                    epsabs=0.0, epsrel=1e-12, limit=200)
    return value


def run_json(argv: list[str], capsys: pytest.CaptureFixture[str]) -> dict:
    assert main(argv) == 0
    return json.loads(capsys.readouterr().out, parse_constant=_no_nan)


def with_circle(folder: Path, name: str, a: str, nu: str) -> Path:
    """The mission scene with one more circular body in the parking orbit's plane."""
    path = folder / "with_circle.toml"
    path.write_text(MISSION.read_text(encoding="utf-8") + (
        f'\n[[body]]\nname = "{name}"\na = "{a}"\ne = 0\ni = "28.5 deg"\n'
        f'raan = "20 deg"\nnu = "{nu}"\n'), encoding="utf-8")
    return path


def _no_nan(name: str) -> None:
    raise AssertionError(f"{name} in JSON output")


# --- decided cases ----------------------------------------------------------------------


def test_a_hyperbola_never_goes_back_so_60_to_minus_60_is_refused_with_the_real_time(
        capsys: pytest.CaptureFixture[str]) -> None:
    argv = ["timing", str(MISSION), "--body", "Stint departure", "--nu", "60", "-60"]
    assert main(argv) == 2
    err = capsys.readouterr().err
    el = load_scene(MISSION).body("Stint departure").elements
    forward = quad_time(el, -60 * DEG, 60 * DEG)
    assert "passes each true anomaly once" in err and f"takes {forward:,.1f} s" in err
    assert "Traceback" not in err
    out = run_json(["timing", str(MISSION), "--body", "Stint departure", "--nu", "-60", "60",
                    "--json"], capsys)
    assert out["time_of_flight_s"] == pytest.approx(forward, rel=1e-9)


def test_a_full_turn_on_an_ellipse_is_one_period(capsys: pytest.CaptureFixture[str]) -> None:
    el = load_scene(MISSION).body("Wren transfer").elements
    period = 2 * math.pi * math.sqrt(float(el.a) ** 3 / float(el.mu))  # third law
    base = ["timing", str(MISSION), "--body", "Wren transfer", "--json", "--nu"]
    assert run_json(base + ["0", "360"], capsys)["time_of_flight_s"] == pytest.approx(
        period, rel=1e-12)
    two = run_json(base + ["0", "720"], capsys)
    assert two["time_of_flight_s"] == pytest.approx(2 * period, rel=1e-12)
    assert two["full_turns"] == 2
    assert run_json(base + ["0", "0"], capsys)["time_of_flight_s"] == 0.0
    nearly = run_json(base + ["90", "89.999"], capsys)["time_of_flight_s"]
    assert period * 0.999 < nearly < period
    # A part turn beyond a whole one: 30 -> 400 deg is a period plus 30 -> 40 deg.
    part = run_json(base + ["30", "400"], capsys)["time_of_flight_s"]
    assert part == pytest.approx(period + quad_time(el, 30 * DEG, 40 * DEG), rel=1e-9)


def test_a_circle_asked_for_its_own_radius_is_always_there(
        capsys: pytest.CaptureFixture[str]) -> None:
    argv = ["timing", str(MISSION), "--body", "Wren parking", "--radius", "6678.137 km"]
    assert main(argv) == 0
    text = capsys.readouterr().out
    assert "always there" in text and "never" not in text
    out = run_json([*argv, "--json"], capsys)
    assert out["reaches_radius"] is True and out["always_at_radius"] is True
    mu = float(load_scene(MISSION).center.gm_m3_s2)
    assert out["speed_at_radius_m_s"] == pytest.approx(math.sqrt(mu / 6678.137e3), rel=1e-12)
    # Another radius is never reached, and the reason names where the circle is.
    other = run_json(["timing", str(MISSION), "--body", "Wren parking", "--radius",
                      "7000 km", "--json"], capsys)
    assert other["reaches_radius"] is False and "circle" in other["radius_note"]


def test_two_circles_of_one_radius_have_nothing_to_transfer_in_both_front_ends(
        tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    path = with_circle(tmp_path, "Twin", "6678.137 km", "90 deg")
    assert main(["transfer", str(path), "--from", "Wren parking", "--to", "Twin"]) == 2
    err = capsys.readouterr().err
    assert "nothing to transfer" in err
    scene = load_scene(path)
    names = [b.name for b in scene.bodies]
    with pytest.raises(EditRefused) as refused:
        plan_transfer(scene, names.index("Wren parking"), names.index("Twin"))
    assert "nothing to transfer" in refused.value.problems[0]


def test_the_turning_angle_is_two_asin_one_over_e() -> None:
    el = load_scene(MISSION).body("Stint departure").elements
    hp = quick.hyperbolic_pass(el)
    assert hp is not None
    assert hp.turning_angle_rad == pytest.approx(2 * math.asin(1 / 1.15), rel=1e-15)
    # Curtis eq. 8.56 in its v-infinity form gives the same angle.
    from viewer.orbit.flight import turning_angle
    assert float(turning_angle(hp.v_infinity_m_s, float(el.periapsis), float(el.mu))) == \
        pytest.approx(hp.turning_angle_rad, rel=1e-12)


def test_a_nonfinite_anomaly_is_refused() -> None:
    el = Elements(a=7000 * KM, e=0.1, mu=3.986004418e14)
    with pytest.raises(MissionRefused):
        quick.flight_time(el, 0.0, math.inf)


@pytest.mark.parametrize(("rad", "text"), [
    (2 * math.pi, "0.0000 deg"), (-1e-17, "0.0000 deg"), (3.3e-15, "0.0000 deg"),
    (math.radians(359.99999), "0.0000 deg"), (math.radians(44.3), "44.3000 deg"),
    (math.radians(-90), "270.0000 deg"),
])
def test_phase_angles_are_reduced_and_rounded_for_people(rad: float, text: str) -> None:
    assert format_direction(rad) == text


# --- the two front ends agree -----------------------------------------------------------


@pytest.mark.parametrize(("body", "nu0", "nu1"), [
    ("Wren transfer", 0, 120), ("Wren transfer", 300, 10), ("Stint departure", -30, 80),
])
def test_the_window_and_the_command_give_the_same_time_of_flight(
        capsys: pytest.CaptureFixture[str], body: str, nu0: float, nu1: float) -> None:
    scene = load_scene(MISSION)
    k = [b.name for b in scene.bodies].index(body)
    out = run_json(["timing", str(MISSION), "--body", body, "--nu", str(nu0), str(nu1),
                    "--json"], capsys)
    rows, problems = quick_answer_rows(scene, k, 0.0, QuickInputs(f"{nu0} deg", f"{nu1} deg"))
    assert not problems
    assert dict(rows["flight"])["time of flight"].startswith(format_time(
        out["time_of_flight_s"]))


def test_the_window_and_the_command_give_the_same_radius_answers(
        capsys: pytest.CaptureFixture[str]) -> None:
    scene = load_scene(MISSION)
    k = [b.name for b in scene.bodies].index("Stint departure")
    out = run_json(["timing", str(MISSION), "--body", "Stint departure", "--radius",
                    "400000 km", "--json"], capsys)
    rows = dict(radius_crossing_rows(scene, k, 0.0, "400000 km"))
    assert rows["speed there"] == format_speed(out["speed_at_radius_m_s"])
    assert rows["escape speed there"] == format_speed(out["escape_speed_at_radius_m_s"])
    assert rows["next outbound"] == f"in {format_time(out['next_outbound_s'])}"
    hyper = dict(quick_answer_rows(scene, k, 0.0, QuickInputs())[0]["hyperbola"])
    assert hyper["v-infinity"] == format_speed(out["v_inf_m_s"])


def test_the_window_and_the_command_plan_the_same_transfer(
        tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    path = with_circle(tmp_path, "High", "42164 km", "200 deg")
    out = run_json(["transfer", str(path), "--from", "Wren parking", "--to", "High",
                    "--json"], capsys)
    scene = load_scene(path)
    names = [b.name for b in scene.bodies]
    plan = plan_transfer(scene, names.index("Wren parking"), names.index("High"))
    burns, sections = transfer_rows(plan, scene)
    assert float(plan.transfer.dv_total_m_s) == out["dv_total_m_s"]
    assert plan.next_window_s == out["next_window_s"]
    assert dict(sections["phasing"])["phase angle needed"].startswith(
        format_direction(out["phase_angle_needed_rad"]))
    assert [b[1] for b in burns] == [format_speed(b["dv_m_s"], 5, signed=True)
                                     for b in out["burns"]]


# --- a transfer to a typed radius or altitude ----------------------------------------------

#: Vallado's Example 6-1 and 6-2 departure circle: 191.344 11 km above Earth (from memory).
VALLADO_LEO = f"""[scene]
format = 1
title = "Vallado's examples 6-1 and 6-2"
epoch = "2031-03-14T06:00:00 UTC"
units = {{ length = "km", time = "min", angle = "deg" }}

[center]
preset = "earth"

[[body]]
name = "Parking"
a = "{6378.137 + 191.34411} km"
e = 0

[[body]]
name = "Higher"
a = "20000 km"
e = 0
nu = "30 deg"
"""


@pytest.fixture
def leo(tmp_path: Path) -> Path:
    path = tmp_path / "leo.toml"
    path.write_text(VALLADO_LEO, encoding="utf-8")
    return path


def test_a_hohmann_transfer_to_a_typed_altitude_is_vallados_leo_to_geo_in_both_front_ends(
        leo: Path, capsys: pytest.CaptureFixture[str]) -> None:
    # Vallado (4th ed.), Example 6-1, from memory: from 191.344 11 km to 35 781.348 57 km
    # altitude, dv_a = 2.457 km/s, dv_b = 1.478 km/s, total 3.935 km/s, 5.256 h.
    out = run_json(["transfer", str(leo), "--from", "Parking", "--to-altitude",
                    "35781.34857 km", "--json"], capsys)
    assert out["dv_total_m_s"] == pytest.approx(3.935 * KM_S, abs=0.5)
    assert out["time_of_flight_s"] == pytest.approx(5.256 * HOUR, abs=0.001 * HOUR)
    assert [b["dv_m_s"] for b in out["burns"]] == pytest.approx([2.457 * KM_S, 1.478 * KM_S],
                                                               abs=0.5)
    assert out["phase_angle_now_rad"] is None and out["next_window_s"] is None  # no target
    scene = load_scene(leo)
    plan = plan_to_radius(scene, 0, "35781.34857 km", altitude=True)
    burns, sections = transfer_rows(plan, scene)
    assert float(plan.transfer.dv_total_m_s) == out["dv_total_m_s"]
    assert [b[1] for b in burns] == [format_speed(b["dv_m_s"], 5, signed=True)
                                     for b in out["burns"]]
    assert dict(sections["totals"])["total dv"] == f"{out['dv_total_m_s'] / KM:.4f} km/s"
    # The same circle typed as a radius from the centre gives the same plan.
    by_radius = plan_to_radius(scene, 0, f"{6378.137 + 35781.34857} km")
    assert float(by_radius.transfer.dv_total_m_s) == pytest.approx(out["dv_total_m_s"],
                                                                   rel=1e-12)
    text = main(["transfer", str(leo), "--from", "Parking", "--to-radius",
                 f"{6378.137 + 35781.34857} km"])
    assert text == 0 and "3.9352" in capsys.readouterr().out


def test_hohmann_and_bi_elliptic_side_by_side_are_vallados_examples(
        leo: Path, capsys: pytest.CaptureFixture[str]) -> None:
    # Vallado (4th ed.), Example 6-2, from memory: from 191.344 11 km altitude through
    # 503 873 km altitude to 376 310 km altitude: total 3.904 km/s, 593.92 h. The
    # Hohmann transfer between the same circles needs more: their radius ratio, about 58,
    # is above 15.58, beyond which bi-elliptic always wins (common practice, no source).
    scene = load_scene(leo)
    via = f"{6378.137 + 503_873} km"
    hohmann = plan_to_radius(scene, 0, "376310 km", True)
    bi = plan_to_radius(scene, 0, "376310 km", True, "bi-elliptic", via)
    rows = {r[0]: r[1:] for r in side_by_side_rows(hohmann, bi)}
    out = run_json(["transfer", str(leo), "--from", "Parking", "--to-altitude", "376310 km",
                    "--via", via, "--json"], capsys)
    assert out["dv_total_m_s"] == pytest.approx(3.904 * KM_S, abs=0.5)
    assert out["time_of_flight_s"] == pytest.approx(593.92 * HOUR, abs=0.01 * HOUR)
    assert rows["total dv"][1] == f"{out['dv_total_m_s'] / KM:.4f} km/s"
    assert rows["time of flight"][1] == format_time(out["time_of_flight_s"], 5)
    assert rows["burns"] == ("2", "3")
    assert float(hohmann.transfer.dv_total_m_s) > out["dv_total_m_s"]
    # A refused via stays one line in its own column; the Hohmann column still answers.
    low = plan_to_radius(scene, 0, "376310 km", True)
    with pytest.raises(EditRefused) as refused:
        plan_to_radius(scene, 0, "376310 km", True, "bi-elliptic", "10000 km")
    rows = {r[0]: r[1:] for r in side_by_side_rows(low, refused.value)}
    assert rows["total dv"][0].endswith("km/s")
    assert rows["total dv"][1].startswith("refused: the intermediate radius must be at least")
    assert "\n" not in rows["total dv"][1]


def test_from_defaults_to_the_lower_orbit(leo: Path) -> None:
    scene = load_scene(leo)
    assert transfer_pair(scene, None, None) == (0, 1)
    assert transfer_pair(scene, 1, None) == (1, 0)  # a choice is kept
    assert transfer_pair(scene, 1, 1) == (1, 0)  # never from a body to itself


@pytest.mark.parametrize(("radius", "problem"), [
    ("100 km", "inside the central body"), ("-5 km", "positive"),
    (f"{6378.137 + 191.34411} km", "nothing to transfer"),
])
def test_a_target_radius_that_cannot_be_reached_is_refused_in_one_line_by_both(
        leo: Path, capsys: pytest.CaptureFixture[str], radius: str, problem: str) -> None:
    assert main(["transfer", str(leo), "--from", "Parking", "--to-radius", radius]) == 2
    err = capsys.readouterr().err
    assert problem in err and err.startswith("perifocal: error in --to-radius")
    with pytest.raises(EditRefused) as refused:
        plan_to_radius(load_scene(leo), 0, radius)
    assert problem in refused.value.problems[0] and "\n" not in refused.value.problems[0]


def test_speed_and_escape_speed_at_an_asked_radius_are_the_commands_in_km_s(
        capsys: pytest.CaptureFixture[str]) -> None:
    scene = load_scene(MISSION)
    names = [b.name for b in scene.bodies]
    for body, radius in (("Wren transfer", "20000 km"), ("Wren parking", "6678.137 km"),
                         ("Wren parking", "30000 km")):  # crossed, always there, never
        out = run_json(["timing", str(MISSION), "--body", body, "--radius", radius,
                        "--json"], capsys)
        text = main(["timing", str(MISSION), "--body", body, "--radius", radius])
        printed = capsys.readouterr().out
        assert text == 0
        rows, _ = quick_answer_rows(scene, names.index(body), 0.0, QuickInputs(radius=radius))
        shown = dict(rows["radius"])
        r = parse_length_km(radius)
        escape = math.sqrt(2 * MU_EARTH / r)  # escape speed, computed here
        assert out["escape_speed_at_radius_m_s"] == pytest.approx(escape, rel=1e-12)
        assert shown["escape speed there"] == format_speed(escape)
        assert f"{escape / KM:.6f} km/s" in printed  # the same unit on the command line
        if out["speed_at_radius_m_s"] is not None:
            assert shown["speed there"] == format_speed(out["speed_at_radius_m_s"])
            assert shown["speed there"].endswith(" km/s")
        else:
            assert "speed there" not in shown


def parse_length_km(text: str) -> float:
    value, unit = text.split()
    assert unit == "km"
    return float(value) * KM
