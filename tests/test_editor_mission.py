"""The mission panels' model: transfers between circular bodies added to the scene through
the editor, quick answers about one conic, and the warnings shown beside them.

Check values: Vallado, *Fundamentals of Astrodynamics and Applications*, 4th ed.,
Examples 6-1 (Hohmann) and 6-2 (bi-elliptic), and Curtis, *Orbital Mechanics for
Engineering Students*, Examples 3.1 (ellipse) and 3.5 (hyperbola), all from memory; and
independent computations here: the time of flight as the integral of r^2 / h over the
true anomaly (scipy.integrate.quad, not Kepler's equation), positions by a numerical
integration of the two-body equations (scipy solve_ivp), vis-viva.
"""

from __future__ import annotations

import math
from pathlib import Path

import numpy as np
import pytest
from reference_values import CURTIS_MU, CURTIS_R, DEG, HOUR, KM, KM_S, VALLADO_MU, VALLADO_R
from scipy.integrate import quad, solve_ivp

from viewer.gui.editor import Editor, EditRefused
from viewer.gui.mission import (
    QuickInputs,
    body_warnings,
    circular_bodies,
    hyperbola_rows,
    plan_transfer,
    quick_answer_rows,
    radius_crossing_rows,
    speed_rows,
    time_of_flight_between,
    transfer_rows,
)
from viewer.orbit import Elements, state_from_elements
from viewer.orbit.flight import time_of_flight
from viewer.scene.loader import load_scene
from viewer.scene.model import Body, Center, Scene
from viewer.units import parse_epoch

# Vallado's Earth (from memory): mu = 398 600.4418 km^3/s^2, R = 6378.137 km.
# Curtis's Earth (from memory): mu = 398 600 km^3/s^2, R = 6378 km.
UNITS = ("km/s", "km", " s", "min", " h", " d", "yr", "deg", "UTC", "TDB")


def scene_of(*bodies: tuple[str, Elements], mu: float, radius: float,
             atmosphere: float | None = None, soi: float | None = None) -> Scene:
    center = Center(name="Earth", gm_m3_s2=mu, radius_m=radius, atmosphere_m=atmosphere,
                    soi_radius_m=soi)
    return Scene(title="mission test", epoch=parse_epoch("2030-01-01T00:00:00 TDB"),
                 frame="EME2000", center=center,
                 bodies=tuple(Body(name=n, elements=el.with_(mu=mu)) for n, el in bodies),
                 length_unit="km", time_unit="min")


def leo_geo(mu: float = VALLADO_MU, i: float = 28.5 * DEG, raan: float = 40 * DEG,
            geo_phase: float = 200 * DEG) -> Scene:
    # Vallado Example 6-1 (from memory): from 191.34411 km to 35 781.34857 km altitude.
    low = Elements(a=VALLADO_R + 191.34411 * KM, e=0.0, i=i, raan=raan, nu=10 * DEG)
    high = Elements(a=VALLADO_R + 35_781.34857 * KM, e=0.0, i=i, raan=raan, nu=geo_phase)
    return scene_of(("LEO", low), ("GEO", high), mu=mu, radius=VALLADO_R)


def position(body: Body, t_s: float) -> np.ndarray:
    return state_from_elements(body.elements_at(t_s))[0]


# --- transfers -------------------------------------------------------------------------


def test_hohmann_leo_to_geo_matches_vallado_example_6_1() -> None:
    # Vallado Example 6-1 (from memory): dv_a = 2.457 km/s, dv_b = 1.478 km/s, total
    # 3.935 km/s, time of flight 5.256 h (to the book's last digit).
    plan = plan_transfer(leo_geo(), 0, 1)
    dv = [float(b.dv_m_s) for b in plan.transfer.burns]
    assert dv == pytest.approx([2.457 * KM_S, 1.478 * KM_S], abs=0.0006 * KM_S)
    assert float(plan.transfer.dv_total_m_s) == pytest.approx(3.935 * KM_S, abs=0.0006 * KM_S)
    assert float(plan.transfer.time_of_flight_s) == pytest.approx(5.256 * HOUR,
                                                                  abs=0.001 * HOUR)
    burns, rows = transfer_rows(plan, leo_geo())
    assert [b[0] for b in burns] == ["departure", "arrival"]
    assert dict(rows["totals"])["total dv"] == "3.9352 km/s"
    assert dict(rows["totals"])["time of flight"].startswith("5.2567 h")


def test_bi_elliptic_matches_vallado_example_6_2() -> None:
    # Vallado Example 6-2 (from memory): 191.34411 km to 376 310 km altitude through
    # 503 873 km altitude: dv 3.156, 0.677, -0.070 km/s, total 3.904 km/s, 593.92 h.
    low = Elements(a=VALLADO_R + 191.34411 * KM, e=0.0)
    far = Elements(a=VALLADO_R + 376_310 * KM, e=0.0)
    scene = scene_of(("low", low), ("far", far), mu=VALLADO_MU, radius=VALLADO_R)
    plan = plan_transfer(scene, 0, 1, "bi-elliptic", f"{(VALLADO_R / KM) + 503_873} km")
    dv = [float(b.dv_m_s) for b in plan.transfer.burns]
    assert dv == pytest.approx([3.156 * KM_S, 0.677 * KM_S, -0.070 * KM_S], abs=0.0006 * KM_S)
    assert float(plan.transfer.dv_total_m_s) == pytest.approx(3.904 * KM_S, abs=0.0006 * KM_S)
    assert float(plan.transfer.time_of_flight_s) == pytest.approx(593.92 * HOUR,
                                                                  abs=0.006 * HOUR)
    assert [b.name for b in plan.legs] == ["low to far (leg 1)", "low to far (leg 2)"]


def test_the_transfer_leg_starts_at_the_departure_body_and_ends_on_the_target_circle() -> None:
    scene = leo_geo()
    t_dep = 1234.0
    plan = plan_transfer(scene, 0, 1, departure_s=t_dep)
    leg = plan.legs[0]
    t_arr = t_dep + float(plan.transfer.time_of_flight_s)
    # Departure: the same place as the LEO body, moving the same way, faster by dv.
    r_leo, v_leo = state_from_elements(scene.bodies[0].elements_at(t_dep))
    r_leg, v_leg = state_from_elements(leg.elements_at(t_dep))
    assert np.linalg.norm(r_leg - r_leo) < 1e-3  # m
    dv = float(plan.transfer.burns[0].dv_m_s)
    assert np.linalg.norm(v_leg - v_leo * (1 + dv / np.linalg.norm(v_leo))) < 1e-6  # m/s
    # Independently integrated from departure to arrival (solve_ivp): the leg is then
    # on the GEO circle, on the far side, moving along it.
    mu = scene.center.gm_m3_s2

    def two_body(_t: float, y: np.ndarray) -> np.ndarray:
        r = y[:3]
        return np.concatenate([y[3:], -mu * r / np.linalg.norm(r) ** 3])

    sol = solve_ivp(two_body, (t_dep, t_arr), np.concatenate([r_leg, v_leg]), rtol=1e-12,
                    atol=1e-6, method="DOP853")
    r_end = sol.y[:3, -1]
    assert np.linalg.norm(r_end) == pytest.approx(float(scene.bodies[1].elements.a), rel=1e-8)
    assert np.dot(r_end, r_leo) / (np.linalg.norm(r_end) * np.linalg.norm(r_leo)) == \
        pytest.approx(-1.0, abs=1e-9)
    assert np.linalg.norm(position(leg, t_arr) - r_end) < 5.0  # m: our propagation agrees


def test_departing_at_the_next_window_meets_the_target_at_arrival() -> None:
    scene = leo_geo()
    first = plan_transfer(scene, 0, 1, departure_s=0.0)
    plan = plan_transfer(scene, 0, 1, departure_s=first.next_window_s)
    assert plan.phase_now_rad == pytest.approx(plan.phase_needed_rad, abs=1e-9)
    t_arr = plan.departure_s + float(plan.transfer.time_of_flight_s)
    gap = np.linalg.norm(position(plan.legs[0], t_arr) - position(scene.bodies[1], t_arr))
    assert gap < 1.0  # m
    # Vallado's phase angle for LEO to GEO (from Curtis sec. 6.10's relation, computed
    # independently here): pi - n_target * tof.
    n2 = math.sqrt(VALLADO_MU / float(scene.bodies[1].elements.a) ** 3)
    need = math.pi - n2 * float(plan.transfer.time_of_flight_s)
    assert plan.phase_needed_rad == pytest.approx(need % (2 * math.pi), abs=1e-12)


def test_adding_a_transfer_is_one_undoable_edit_that_grows_the_body_list() -> None:
    ed = Editor(leo_geo())
    plan = plan_transfer(ed.scene, 0, 1, "bi-elliptic", "100000 km")
    added = ed.add_bodies(plan.legs, "transfer LEO to GEO")
    assert added == [2, 3] and ed.selection == 2
    assert [b.name for b in ed.scene.bodies][2:] == ["LEO to GEO (leg 1)", "LEO to GEO (leg 2)"]
    assert ed.dirty and ed.undo_label == "transfer LEO to GEO"
    again = ed.add_bodies(plan_transfer(ed.scene, 0, 1).legs, "transfer")
    assert ed.scene.bodies[again[0]].name == "LEO to GEO"  # unique names
    ed.undo()
    ed.undo()
    assert [b.name for b in ed.scene.bodies] == ["LEO", "GEO"] and not ed.dirty
    ed.redo()
    assert len(ed.scene.bodies) == 4


def test_a_saved_transfer_loads_back_where_it_was_added(tmp_path: Path) -> None:
    path = tmp_path / "leo_geo.toml"
    path.write_text('[scene]\nepoch = "2030-01-01T00:00:00 TDB"\nunits = { length = "km" }\n\n'
                    '[center]\npreset = "earth"\n\n'
                    '[[body]]\nname = "LEO"   # parking\na = "6678.137 km"\ne = 0\n\n'
                    '[[body]]\nname = "GEO"\na = "42164 km"\ne = 0\nM = "80 deg"\n',
                    encoding="utf-8")
    ed = Editor.open(path)
    plan = plan_transfer(ed.scene, 0, 1, "bi-elliptic", "90000 km", departure_s=600.0)
    ed.add_bodies(plan.legs, "transfer")
    ed.save()
    loaded = load_scene(path)
    assert "# parking" in path.read_text(encoding="utf-8")
    assert [b.name for b in loaded.bodies] == [b.name for b in ed.scene.bodies]
    # The file holds each leg's epoch to the microsecond: a few mm at a few km/s.
    for k in (2, 3):
        for t in (600.0, 600.0 + float(plan.transfer.burns[k - 1].time_s), 1e5):
            assert np.linalg.norm(position(loaded.bodies[k], t) - position(ed.scene.bodies[k],
                                                                            t)) < 0.01  # m


def test_a_transfer_is_refused_with_a_reason_for_each_problem() -> None:
    low = Elements(a=7000 * KM, e=0.0)
    tilted = Elements(a=42164 * KM, e=0.0, i=10 * DEG)
    oval = Elements(a=20000 * KM, e=0.3)
    scene = scene_of(("low", low), ("tilted", tilted), ("oval", oval), mu=VALLADO_MU,
                     radius=VALLADO_R)
    assert circular_bodies(scene) == [0, 1]
    with pytest.raises(EditRefused) as err:
        plan_transfer(scene, 0, 1)
    assert "deg apart" in err.value.problems[0]
    with pytest.raises(EditRefused) as err:
        plan_transfer(scene, 2, 1)
    assert len(err.value.problems) == 2 and "'oval' is not on a circle" in err.value.problems[0]
    with pytest.raises(EditRefused) as err:
        plan_transfer(leo_geo(), 0, 1, "bi-elliptic", "12 parsnips")
    assert err.value.problems[0].startswith("via radius:")
    with pytest.raises(EditRefused) as err:
        plan_transfer(leo_geo(), 0, 1, "bi-elliptic", "20000 km")
    assert "at least the larger" in err.value.problems[0]


def test_a_transfer_leg_dipping_into_the_atmosphere_is_warned_about() -> None:
    # Down from GEO to a circle just above a 100 km atmosphere: the leg's periapsis is
    # the low circle, above the atmosphere; a low circle at 80 km is inside it.
    high = Elements(a=42164 * KM, e=0.0)
    low = Elements(a=VALLADO_R + 80 * KM, e=0.0)
    scene = scene_of(("GEO", high), ("low", low), mu=VALLADO_MU, radius=VALLADO_R,
                     atmosphere=100 * KM)
    plan = plan_transfer(scene, 0, 1)
    assert len(plan.warnings) == 1
    assert plan.warnings[0].startswith("leg 1: periapsis altitude 80.000 km is below the top "
                                       "of the atmosphere (100.000 km)")


# --- quick answers ---------------------------------------------------------------------


def curtis_3_1() -> Scene:
    # Curtis Example 3.1 (from memory): perigee 9600 km, apogee 21 000 km radius.
    el = Elements(a=15_300 * KM, e=11_400 / 30_600)
    return scene_of(("Sat", el), mu=CURTIS_MU, radius=CURTIS_R)


def curtis_3_5() -> Scene:
    # Curtis Example 3.5 (from memory): perigee altitude 300 km, perigee speed 15 km/s.
    rp = CURTIS_R + 300 * KM
    e = rp * (15 * KM_S) ** 2 / CURTIS_MU - 1.0
    return scene_of(("Pass", Elements(a=rp / (1.0 - e), e=e)), mu=CURTIS_MU, radius=CURTIS_R)


def quad_time_of_flight(el: Elements, nu0: float, nu1: float) -> float:
    """t = integral of r^2 / h dnu (angular momentum), independent of Kepler's equation."""
    h = float(el.h)
    p = float(el.p)
    e = float(el.e)
    value, _ = quad(lambda nu: (p / (1 + e * math.cos(nu))) ** 2 / h, nu0, nu1,
                    epsabs=1e-9, epsrel=1e-13, limit=200)
    return value


def test_time_of_flight_to_120_deg_is_curtis_example_3_1() -> None:
    body = curtis_3_1().bodies[0]
    # Curtis Example 3.1 (from memory): 4077 s from perigee to true anomaly 120 deg.
    t = time_of_flight_between(body, "0 deg", "120 deg")
    assert t == pytest.approx(4077.0, abs=0.5)
    assert t == pytest.approx(quad_time_of_flight(body.elements, 0.0, 120 * DEG), rel=1e-10)
    # Units in the input: radians, and a bare number in degrees.
    assert time_of_flight_between(body, "0", f"{120 * DEG!r} rad") == pytest.approx(t,
                                                                                   rel=1e-12)


def test_time_of_flight_wraps_through_periapsis_on_an_ellipse() -> None:
    body = curtis_3_1().bodies[0]
    t = time_of_flight_between(body, "300 deg", "30 deg")
    expected = quad_time_of_flight(body.elements, -60 * DEG, 30 * DEG)
    assert t == pytest.approx(expected, rel=1e-10)
    assert t == pytest.approx(float(time_of_flight(body.elements, 300 * DEG, 30 * DEG)),
                              rel=1e-14)


def test_hyperbola_answers_match_curtis_example_3_5() -> None:
    scene = curtis_3_5()
    body = scene.bodies[0]
    # Curtis Example 3.5 (from memory): at true anomaly 100 deg the radius is 48 497 km,
    # reached 4141 s after perigee.
    rows = dict(radius_crossing_rows(scene, 0, 0.0, "48497 km"))
    assert rows["true anomaly there"].startswith("+/- 100 deg")
    seconds = float(rows["from periapsis"].split("(")[1].split(" s")[0].replace(",", ""))
    assert seconds == pytest.approx(4141.0, abs=1.0)
    t = time_of_flight_between(body, "0 deg", "100 deg")
    assert t == pytest.approx(4141.0, abs=1.0)
    assert t == pytest.approx(quad_time_of_flight(body.elements, 0.0, 100 * DEG), rel=1e-10)
    # v_inf from vis-viva at infinity, v_inf^2 = v_p^2 - 2 mu / r_p (computed here).
    rp = CURTIS_R + 300 * KM
    v_inf = math.sqrt((15 * KM_S) ** 2 - 2 * CURTIS_MU / rp)
    hyp = dict(hyperbola_rows(body))
    assert hyp["v-infinity"] == f"{v_inf / KM_S:.6g} km/s"
    # The asymptote's true anomaly and the turning angle: delta = 2 nu_inf - 180 deg.
    e = float(body.elements.e)
    nu_inf = math.degrees(math.acos(-1 / e))
    assert hyp["asymptote true anomaly"].startswith(f"+/- {nu_inf:.6g} deg")
    assert hyp["turning angle"] == f"{2 * nu_inf - 180:.6g} deg"


def test_an_open_orbit_refuses_an_anomaly_beyond_its_asymptote() -> None:
    body = curtis_3_5().bodies[0]
    with pytest.raises(EditRefused) as err:
        time_of_flight_between(body, "0 deg", "160 deg")
    assert "beyond the asymptotes" in err.value.problems[0]
    # Open conics pass each anomaly once: going back to periapsis is refused, and the
    # refusal gives the time the body really takes, from 0 to 100 deg (quad reference).
    with pytest.raises(EditRefused) as err:
        time_of_flight_between(body, "100 deg", "0 deg")
    forward = quad_time_of_flight(body.elements, 0.0, 100 * DEG)
    assert "passes each true anomaly once" in err.value.problems[0]
    assert f"takes {forward:,.1f} s" in err.value.problems[0]
    assert time_of_flight_between(body, "0 deg", "100 deg") == pytest.approx(forward, rel=1e-10)


def test_the_next_crossings_of_a_radius_come_a_half_orbit_apart_around_apoapsis() -> None:
    scene = curtis_3_1()
    el = scene.bodies[0].elements
    r = 15_000 * KM
    nu = math.acos((float(el.p) / r - 1) / float(el.e))
    t_out = quad_time_of_flight(el, 0.0, nu)
    period = float(el.period)
    rows = radius_crossing_rows(scene, 0, 0.0, "15000 km")
    table = dict(rows)
    assert table["next outbound"] == f"in {t_out / 60:.7g} min"
    t_in = period - t_out  # the inbound crossing mirrors the outbound one in time
    assert table["next inbound"] == f"in {t_in / 3600:.7g} h"
    # As an altitude above Curtis's 6378 km.
    alt = dict(radius_crossing_rows(scene, 0, 0.0, f"{(r - CURTIS_R) / KM} km", altitude=True))
    assert alt["next outbound"] == table["next outbound"]


def test_a_radius_the_orbit_never_reaches_is_refused_with_its_range() -> None:
    scene = curtis_3_1()
    with pytest.raises(EditRefused) as err:
        radius_crossing_rows(scene, 0, 0.0, "30000 km")
    assert err.value.problems[0] == ("never at 30,000 km: the orbit stays between 9,600 km "
                                     "and 21,000 km")
    with pytest.raises(EditRefused) as err:
        radius_crossing_rows(scene, 0, 0.0, "a long way")
    assert "a long way" in err.value.problems[0]


def test_escape_speed_now_is_vis_viva_with_an_infinite_axis() -> None:
    scene = curtis_3_1()
    el = scene.bodies[0].elements
    rows = dict(speed_rows(scene, 0, 0.0))  # at perigee
    v_esc = math.sqrt(2 * CURTIS_MU / (9600 * KM))
    v_p = math.sqrt(CURTIS_MU * (2 / (9600 * KM) - 1 / float(el.a)))
    assert rows["escape speed here"] == f"{v_esc / KM_S:.6g} km/s"
    assert rows["speed now"] == f"{v_p / KM_S:.6g} km/s"
    assert rows["speed minus escape"].startswith("-")


def test_every_quick_answer_carries_its_unit() -> None:
    for scene, inputs in ((curtis_3_1(), QuickInputs(radius="15000 km")),
                          (curtis_3_5(), QuickInputs(nu_to="100 deg", radius="20000 km"))):
        rows, problems = quick_answer_rows(scene, 0, 0.0, inputs)
        assert problems == {}
        assert set(rows) == {"flight", "radius", "speed", "hyperbola"}
        for section in rows.values():
            for label, text in section:
                assert any(u in text for u in UNITS) or "passed" in text, (label, text)


def test_warnings_name_impact_atmosphere_and_sphere_of_influence() -> None:
    R = CURTIS_R
    inside = Elements(a=(R - 100 * KM + 20_000 * KM) / 2, e=(20_000 * KM - R + 100 * KM)
                      / (20_000 * KM + R - 100 * KM))
    grazing = Elements(a=(R + 60 * KM + 20_000 * KM) / 2, e=(20_000 * KM - R - 60 * KM)
                       / (20_000 * KM + R + 60 * KM))
    far = Elements(a=(R + 500 * KM + 2e6 * KM) / 2, e=(2e6 * KM - R - 500 * KM)
                   / (2e6 * KM + R + 500 * KM))
    scene = scene_of(("inside", inside), ("grazing", grazing), ("far", far), mu=CURTIS_MU,
                     radius=R, atmosphere=100 * KM, soi=924_000 * KM)
    assert body_warnings(scene, 0)[0].startswith("impact: periapsis radius 6,278.000 km is "
                                                 "inside the central body")
    assert body_warnings(scene, 1) == ["periapsis altitude 60.000 km is below the top of the "
                                       "atmosphere (100.000 km)"]
    assert body_warnings(scene, 2)[0].startswith("apoapsis 2,000,000 km is beyond the sphere "
                                                 "of influence (924,000 km)")
