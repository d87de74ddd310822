"""Hohmann and bi-elliptic transfers between coplanar circles, against textbook figures."""

from __future__ import annotations

import math

import numpy as np
import pytest
from reference_values import HOUR, KM, KM_S, MU_EARTH, R_EARTH

from viewer.orbit import OrbitError, propagate, state_from_elements
from viewer.orbit.transfer import bi_elliptic, hohmann


def test_hohmann_leo_to_geo_matches_vallado_example_6_1() -> None:
    # Vallado, Fundamentals of Astrodynamics and Applications (4th ed.), Example 6-1,
    # from memory: from 191.344 11 km altitude to 35 781.348 57 km altitude,
    # dv_a = 2.457 km/s, dv_b = 1.478 km/s, total 3.935 km/s, time of flight 5.256 h.
    t = hohmann(R_EARTH + 191.34411 * KM, R_EARTH + 35_781.34857 * KM, MU_EARTH)
    dep, arr = t.burns
    assert dep.dv_m_s == pytest.approx(2.457 * KM_S, abs=0.5)
    assert arr.dv_m_s == pytest.approx(1.478 * KM_S, abs=0.5)
    assert t.dv_total_m_s == pytest.approx(3.935 * KM_S, abs=0.5)
    assert t.time_of_flight_s == pytest.approx(5.256 * HOUR, abs=0.001 * HOUR)
    assert arr.time_s == pytest.approx(t.time_of_flight_s)


def test_bi_elliptic_matches_vallado_example_6_2() -> None:
    # Vallado (4th ed.), Example 6-2, from memory: from 191.344 11 km altitude through
    # rb at 503 873 km altitude to 376 310 km altitude: dv_a = 3.156 km/s,
    # dv_b = 0.677 km/s, dv_c = -0.0705 km/s, total 3.904 km/s, time of flight 593.92 h.
    t = bi_elliptic(R_EARTH + 191.34411 * KM, R_EARTH + 503_873 * KM, R_EARTH + 376_310 * KM,
                    MU_EARTH)
    a, b, c = (burn.dv_m_s for burn in t.burns)
    assert a == pytest.approx(3.156 * KM_S, abs=0.5)
    assert b == pytest.approx(0.677 * KM_S, abs=0.5)
    assert c == pytest.approx(-0.0705 * KM_S, abs=0.5)
    assert t.dv_total_m_s == pytest.approx(3.904 * KM_S, abs=0.5)
    assert t.time_of_flight_s == pytest.approx(593.92 * HOUR, abs=0.01 * HOUR)


def test_bi_elliptic_beats_hohmann_only_for_large_radius_ratios() -> None:
    # Common practice, no source (Vallado sec. 6.3 discusses it): with rb far out, the
    # bi-elliptic transfer needs less dv than Hohmann above r2/r1 of about 11.94 and more
    # below it; at 15.58 it wins for any rb beyond r2.
    r1 = 7000 * KM
    far = 1e4 * r1
    assert bi_elliptic(r1, far, 16 * r1, MU_EARTH).dv_total_m_s < hohmann(
        r1, 16 * r1, MU_EARTH).dv_total_m_s
    assert bi_elliptic(r1, 20 * r1, 8 * r1, MU_EARTH).dv_total_m_s > hohmann(
        r1, 8 * r1, MU_EARTH).dv_total_m_s


def test_inward_hohmann_mirrors_outward_with_retrograde_burns() -> None:
    # An inward transfer flies the same ellipse backwards: the same speeds, burns reversed.
    out = hohmann(7000 * KM, 42_164 * KM, MU_EARTH)
    back = hohmann(42_164 * KM, 7000 * KM, MU_EARTH)
    assert back.dv_total_m_s == pytest.approx(out.dv_total_m_s, rel=1e-12)
    assert back.time_of_flight_s == pytest.approx(out.time_of_flight_s, rel=1e-12)
    assert all(b.dv_m_s < 0 for b in back.burns)
    assert back.legs[0].nu == pytest.approx(math.pi)  # it leaves from the apoapsis


def test_burns_take_a_circle_onto_the_transfer_and_back_to_a_circle() -> None:
    # Independent check by propagation: start on the circle at r1, add dv_a along the
    # velocity, propagate (universal variables) for the time of flight; the craft must
    # be at r2, opposite the start, with the speed the arrival burn assumes.
    r1, r2 = 6800 * KM, 26_000 * KM
    t = hohmann(r1, r2, MU_EARTH)
    r0 = np.array([r1, 0.0, 0.0])
    v0 = np.array([0.0, math.sqrt(MU_EARTH / r1) + t.burns[0].dv_m_s, 0.0])
    r, v = propagate(r0, v0, MU_EARTH, t.time_of_flight_s)
    assert np.linalg.norm(r) == pytest.approx(r2, abs=1e-3)
    assert r[0] == pytest.approx(-r2, abs=1e-3)
    assert np.linalg.norm(v) + t.burns[1].dv_m_s == pytest.approx(math.sqrt(MU_EARTH / r2),
                                                                   abs=1e-6)


def test_transfer_legs_are_the_half_ellipses_between_the_radii() -> None:
    t = bi_elliptic(7000 * KM, 90_000 * KM, 40_000 * KM, MU_EARTH)
    first, second = t.legs
    assert first.periapsis == pytest.approx(7000 * KM)
    assert first.apoapsis == pytest.approx(90_000 * KM)
    assert second.apoapsis == pytest.approx(90_000 * KM)
    assert second.periapsis == pytest.approx(40_000 * KM)
    # The second leg starts at its apoapsis, where the first one ends.
    r_end_first, _ = state_from_elements(first.with_(nu=math.pi))
    r_start_second, _ = state_from_elements(second)
    assert np.linalg.norm(r_end_first) == pytest.approx(np.linalg.norm(r_start_second))


def test_hohmann_phase_angle_lets_the_target_arrive_at_the_meeting_point() -> None:
    # The target, leading by the phase angle at departure, covers pi - phase in the time
    # of flight (Curtis sec. 6.10; common practice).
    r1, r2 = 7000 * KM, 42_164 * KM
    t = hohmann(r1, r2, MU_EARTH)
    n2 = math.sqrt(MU_EARTH / r2**3)
    assert t.phase_angle_rad + n2 * t.time_of_flight_s == pytest.approx(math.pi, abs=1e-12)


def test_vectorised_over_arrays_of_radii() -> None:
    r2 = np.array([10_000, 20_000, 42_164]) * KM
    t = hohmann(7000 * KM, r2, MU_EARTH)
    each = [hohmann(7000 * KM, x, MU_EARTH).dv_total_m_s for x in r2]
    assert np.allclose(t.dv_total_m_s, each, rtol=1e-14)


def test_impossible_transfers_are_refused() -> None:
    with pytest.raises(OrbitError):
        hohmann(-1.0, 7000 * KM, MU_EARTH)
    with pytest.raises(OrbitError, match="intermediate"):
        bi_elliptic(7000 * KM, 10_000 * KM, 42_164 * KM, MU_EARTH)
