"""Quick answers of flight geometry (time of flight, radius crossings, hyperbolic passes,
escape speed, warnings) against Curtis's worked examples and independent checks."""

from __future__ import annotations

import math

import numpy as np
import pytest
from reference_values import DEG, HOUR, KM, KM_S, MU_EARTH

from viewer.orbit import Elements, OrbitError, elements_from_state, propagate
from viewer.orbit.flight import (
    asymptotes,
    conic_warnings,
    escape_speed,
    hyperbola_from_v_infinity,
    time_from_periapsis_to_radius,
    time_of_flight,
    time_since_periapsis_at,
    times_to_radius,
    true_anomaly_at_radius,
    turning_angle,
)

MU_CURTIS = 398_600e9  # Curtis uses mu = 398 600 km^3/s^2 for the Earth


def curtis_3_1_orbit() -> Elements:
    # Curtis, Orbital Mechanics for Engineering Students, Example 3.1: perigee radius
    # 9600 km, apogee radius 21 000 km.
    rp, ra = 9600 * KM, 21_000 * KM
    return Elements((rp + ra) / 2, (ra - rp) / (ra + rp), mu=MU_CURTIS)


def test_time_from_perigee_to_120_deg_matches_curtis_example_3_1() -> None:
    # Curtis Example 3.1, from memory: e = 0.37255, T = 18 834 s, t = 4077 s.
    el = curtis_3_1_orbit()
    assert el.e == pytest.approx(0.37255, abs=1e-5)
    assert el.period == pytest.approx(18_834, abs=1)
    assert time_of_flight(el, 0.0, 120 * DEG) == pytest.approx(4077, abs=1)


def test_time_of_flight_wraps_through_periapsis_on_an_ellipse() -> None:
    el = curtis_3_1_orbit()
    forward = time_of_flight(el, 120 * DEG, 0.0)  # the rest of the orbit back to perigee
    assert forward + time_of_flight(el, 0.0, 120 * DEG) == pytest.approx(el.period, rel=1e-12)
    assert time_of_flight(el, 200 * DEG, -100 * DEG) == pytest.approx(
        time_of_flight(el, 200 * DEG, 260 * DEG), rel=1e-12)


def test_time_of_flight_agrees_with_propagation() -> None:
    # Independent check: propagate (universal variables) the state at nu1 for the time of
    # flight; the true anomaly reached must be nu2.
    el = curtis_3_1_orbit().with_(i=0.4, raan=1.0, argp=2.0, nu=30 * DEG)
    from viewer.orbit import state_from_elements

    r, v = state_from_elements(el)
    dt = time_of_flight(el, 30 * DEG, 250 * DEG)
    r2, v2 = propagate(r, v, MU_CURTIS, dt)
    assert math.degrees(elements_from_state(r2, v2, MU_CURTIS).nu) == pytest.approx(250, abs=1e-8)


def test_hyperbolic_departure_matches_curtis_example_3_5() -> None:
    # Curtis Example 3.5, from memory: perigee speed 15 km/s at 300 km altitude
    # (Earth radius 6378 km): e = 2.7696, h = 100 170 km^2/s; at nu = 100 deg,
    # r = 48 497 km, reached 4141 s after perigee; three hours later r = 163 180 km and
    # v = 10.51 km/s.
    rp, vp = 6678 * KM, 15 * KM_S
    el = Elements.from_periapsis(rp, rp * vp**2 / MU_CURTIS - 1.0, mu=MU_CURTIS)
    assert el.e == pytest.approx(2.7696, abs=1e-4)
    assert el.h == pytest.approx(100_170e6, rel=1e-5)
    assert el.radius_at(100 * DEG) == pytest.approx(48_497 * KM, abs=1 * KM)
    t100 = time_since_periapsis_at(el, 100 * DEG)
    assert t100 == pytest.approx(4141, abs=1)
    assert time_from_periapsis_to_radius(el, el.radius_at(100 * DEG)) == pytest.approx(t100)
    later = el.with_(nu=100 * DEG).after(3 * HOUR)
    assert later.radius_at(later.nu) == pytest.approx(163_180 * KM, abs=1 * KM)
    assert later.speed_at(later.nu) == pytest.approx(10.51 * KM_S, abs=0.005 * KM_S)


def test_hyperbolic_pass_from_a_state_matches_curtis_example_2_10() -> None:
    # Curtis Example 2.10, from memory: geocentric r = 14 600 km, v = 8.6 km/s, flight-path
    # angle 50 deg: a hyperbola with v_inf = 4.400 km/s, rp = 6986 km, e = 1.339.
    gamma = 50 * DEG
    r = np.array([14_600 * KM, 0.0, 0.0])
    v = 8.6 * KM_S * np.array([math.sin(gamma), math.cos(gamma), 0.0])
    el = elements_from_state(r, v, MU_CURTIS)
    assert el.v_infinity == pytest.approx(4.400 * KM_S, abs=0.5)
    assert el.periapsis == pytest.approx(6986 * KM, abs=1 * KM)
    assert el.e == pytest.approx(1.339, abs=5e-4)
    # Turning angle from the same numbers two ways (Curtis eq. 8.56 and 2 asin(1/e)).
    assert turning_angle(el.v_infinity, el.periapsis, MU_CURTIS) == pytest.approx(
        el.turning_angle, rel=1e-12)


def test_earth_departure_hyperbola_matches_curtis_example_8_3() -> None:
    # Curtis Example 8.3, from memory: Earth departure for a Hohmann transfer to Mars from
    # a 300 km circular parking orbit (rp = 6678 km) with v_inf = 2.943 km/s: e = 1.1451,
    # dv = 3.590 km/s, the periapsis lies beta = 29.16 deg from the asymptote's
    # perpendicular (beta = acos(1/e)).
    rp = 6678 * KM
    el = hyperbola_from_v_infinity(2.943 * KM_S, rp, MU_CURTIS)
    assert el.e == pytest.approx(1.1451, abs=1e-4)
    assert el.speed_periapsis - math.sqrt(MU_CURTIS / rp) == pytest.approx(3.590 * KM_S, abs=1)
    assert math.degrees(math.acos(1 / el.e)) == pytest.approx(29.16, abs=0.01)
    assert el.v_infinity == pytest.approx(2.943 * KM_S, rel=1e-12)
    assert el.periapsis == pytest.approx(rp, rel=1e-12)


def test_asymptote_directions_are_the_far_velocities_of_a_propagated_pass() -> None:
    # Independent check: propagate a hyperbola far before and after periapsis; the unit
    # velocities approach the asymptote directions, and their angle is the turning angle.
    el = hyperbola_from_v_infinity(3 * KM_S, 7000 * KM, MU_EARTH, i=0.5, raan=1.2, argp=2.2)
    from viewer.orbit import state_from_elements

    r, v = state_from_elements(el)
    (_, v_before), (_, v_after) = (propagate(r, v, MU_EARTH, dt) for dt in (-1e9, 1e9))
    centre, incoming, outgoing = asymptotes(el)
    assert np.dot(incoming, v_before / np.linalg.norm(v_before)) == pytest.approx(1, abs=1e-6)
    assert np.dot(outgoing, v_after / np.linalg.norm(v_after)) == pytest.approx(1, abs=1e-6)
    angle = math.acos(np.clip(np.dot(incoming, outgoing), -1, 1))
    assert angle == pytest.approx(el.turning_angle, abs=1e-12)
    # The asymptote lines cross at the centre, |a| e beyond the focus.
    assert np.linalg.norm(centre) == pytest.approx(abs(el.a) * el.e, rel=1e-12)
    assert np.linalg.norm(v_after) == pytest.approx(el.v_infinity, rel=1e-3)


def test_an_ellipse_has_no_asymptotes() -> None:
    centre, incoming, outgoing = asymptotes(curtis_3_1_orbit())
    assert np.all(np.isnan(centre)) and np.all(np.isnan(incoming)) and np.all(np.isnan(outgoing))


def test_escape_speed_is_sqrt2_times_circular_speed() -> None:
    # Vis-viva with a -> infinity (common practice, no source); at Earth's surface about
    # 11.18 km/s (common practice, no source).
    assert escape_speed(MU_EARTH, 6378.137 * KM) == pytest.approx(11.18 * KM_S, abs=0.01 * KM_S)
    r = np.array([7000, 42_164]) * KM
    assert np.allclose(escape_speed(MU_EARTH, r), np.sqrt(2 * MU_EARTH / r), rtol=1e-15)


def test_radius_crossings_are_where_propagation_reaches_that_radius() -> None:
    el = curtis_3_1_orbit().with_(nu=200 * DEG)
    target = 15_000 * KM
    out_dt, in_dt = times_to_radius(el, target)
    assert 0 < out_dt < el.period and 0 < in_dt < el.period
    from viewer.orbit import state_from_elements

    r, v = state_from_elements(el)
    for dt, outward in ((out_dt, True), (in_dt, False)):
        r2, v2 = propagate(r, v, MU_CURTIS, dt)
        assert np.linalg.norm(r2) == pytest.approx(target, abs=1e-3)
        assert (np.dot(r2, v2) > 0) == outward


def test_unreachable_radius_gives_nan() -> None:
    el = curtis_3_1_orbit()
    assert math.isnan(true_anomaly_at_radius(el, 5000 * KM))  # inside perigee
    assert math.isnan(true_anomaly_at_radius(el, 30_000 * KM))  # beyond apogee
    hyp = hyperbola_from_v_infinity(3 * KM_S, 7000 * KM, MU_EARTH, nu=1.0)
    out_dt, in_dt = times_to_radius(hyp, 20_000 * KM)
    assert out_dt > 0 and math.isnan(in_dt)  # the inbound crossing is already past


def test_time_of_flight_beyond_the_asymptote_is_refused() -> None:
    hyp = hyperbola_from_v_infinity(3 * KM_S, 7000 * KM, MU_EARTH)
    with pytest.raises(OrbitError, match="asymptotes"):
        time_of_flight(hyp, 0.0, 179 * DEG)


def test_warnings_name_impact_atmosphere_escape_and_sphere_of_influence() -> None:
    re = 6378.137 * KM
    low = Elements.from_periapsis(6300 * KM, 0.1, mu=MU_EARTH)
    assert any("impact" in w for w in conic_warnings(low, re))
    grazing = Elements.from_periapsis(re + 80 * KM, 0.1, mu=MU_EARTH)
    assert any("atmosphere" in w for w in conic_warnings(grazing, re, atmosphere_m=100 * KM))
    assert conic_warnings(grazing, re) == []
    far = Elements.from_periapsis(7000 * KM, 0.99, mu=MU_EARTH)
    # Earth's sphere of influence, about 925 000 km (Curtis table A.2, from memory).
    assert any("sphere of influence" in w
               for w in conic_warnings(far, re, soi_radius_m=925_000 * KM))
    hyp = hyperbola_from_v_infinity(3 * KM_S, 7000 * KM, MU_EARTH)
    assert any("escape" in w for w in conic_warnings(hyp, re))
