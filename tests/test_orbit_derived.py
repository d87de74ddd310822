"""Derived quantities of every conic (circle, ellipse, parabola, hyperbola) against the
conic's own geometry, the state vectors, and the contract's example body
(/work/shared/design/cli.md, ``check --json``)."""

from __future__ import annotations

import math

import numpy as np
import pytest
from reference_values import CONTRACT_BODY, DEG, KM, MU_EARTH, RAD, assert_printed

from viewer.orbit import (
    AU_M,
    CATALOGUE,
    Elements,
    OrbitError,
    asymptote_true_anomaly,
    propagate,
    state_from_elements,
)

NU = np.linspace(-1.5, 1.5, 9)  # inside the asymptotes of every hyperbola used here


def test_contract_example_body_matches_check_json() -> None:
    # /work/shared/design/cli.md, `check --json`: a = 1.2 au, e = 0.21, i = 3 deg,
    # raan = 40 deg, argp = 110 deg, M = 0 about GM 1.32712440018e20, printed to five
    # significant figures; one unit of the last digit allowed.
    ex = CONTRACT_BODY
    el = Elements(ex["a_au"] * AU_M, ex["e"], ex["i_deg"] * DEG, ex["raan_deg"] * DEG,
                  ex["argp_deg"] * DEG, 0.0, mu=ex["gm_m3_s2"])
    checks = {
        "a_m": el.a, "p_m": el.p, "period_s": el.period, "periapsis_m": el.periapsis,
        "apoapsis_m": el.apoapsis, "speed_periapsis_m_s": el.speed_periapsis,
        "speed_apoapsis_m_s": el.speed_apoapsis, "specific_energy_j_kg": el.energy,
        "h_m2_s": el.h, "i_rad": el.i, "raan_rad": el.raan, "argp_rad": el.argp,
    }
    for key, value in checks.items():
        assert_printed(value, ex[key], 1.0, what=key)
    # At M = 0 the body is at periapsis: distance and speed are the periapsis values, and
    # the state vectors say so too.
    r, v = state_from_elements(el)
    assert_printed(np.linalg.norm(r), ex["periapsis_m"], 1.0, what="distance_m")
    assert_printed(np.linalg.norm(v), ex["speed_periapsis_m_s"], 1.0, what="speed_m_s")
    assert math.isnan(el.v_infinity)
    # periapsis_altitude_m 1.4112e11 in the contract: above the Sun's IAU nominal radius.
    altitude = el.periapsis - CATALOGUE["sun"].radius_m
    assert abs(altitude - 1.4112e11) <= 1e7


def test_circle_quantities() -> None:
    a = 7000 * KM
    el = Elements(a, 0.0, mu=MU_EARTH)
    v_circ = math.sqrt(MU_EARTH / a)
    assert el.p == el.periapsis == el.apoapsis == el.b == a
    assert el.c == 0.0
    assert el.mean_motion == pytest.approx(math.sqrt(MU_EARTH / a**3), rel=1e-15)
    assert el.period == pytest.approx(2 * math.pi * a / v_circ, rel=1e-15)
    assert el.energy == pytest.approx(-0.5 * v_circ**2, rel=1e-15)
    assert el.h == pytest.approx(a * v_circ, rel=1e-15)
    np.testing.assert_allclose(el.speed_at(NU), v_circ, rtol=1e-15)
    np.testing.assert_allclose(el.flight_path_angle_at(NU), 0.0, atol=0.0)
    assert math.isnan(el.v_infinity) and math.isnan(el.turning_angle)


@pytest.mark.parametrize("e", [0.05, 0.5, 0.9, 0.999])
def test_ellipse_quantities_agree_with_its_geometry(e: float) -> None:
    a = 26_600 * KM
    el = Elements(a, e, mu=MU_EARTH)
    q, Q = el.periapsis, el.apoapsis
    assert q + Q == pytest.approx(2 * a, rel=1e-15)
    assert q * Q == pytest.approx(el.b**2, rel=1e-14)
    assert el.b**2 == pytest.approx(a * el.p, rel=1e-14)
    assert el.c == pytest.approx(a - q, rel=1e-12)
    assert el.c**2 + el.b**2 == pytest.approx(a * a, rel=1e-14)
    assert el.period == pytest.approx(2 * math.pi / el.mean_motion, rel=1e-15)
    # Angular momentum at the apses, where v is perpendicular to r.
    assert el.speed_periapsis * q == pytest.approx(el.h, rel=1e-14)
    # Vis-viva at apoapsis subtracts 1/a from 2/Q, nearly equal as e -> 1: rounding in Q
    # grows by about Q/q (2000 at e = 0.999), so the allowance does too.
    assert el.speed_apoapsis * Q == pytest.approx(el.h, rel=1e-14 * Q / q)
    assert el.speed_periapsis / el.speed_apoapsis == pytest.approx((1 + e) / (1 - e),
                                                                   rel=1e-14 * Q / q)
    # Vis-viva at the apses equals the energy equation.
    assert 0.5 * el.speed_periapsis**2 - MU_EARTH / q == pytest.approx(el.energy, rel=1e-12)


@pytest.mark.parametrize("e", [0.0, 0.3, 0.97, 1.0, 1.6, 12.0])
def test_speed_and_flight_path_angle_agree_with_the_state_vectors(e: float) -> None:
    el = Elements.from_periapsis(7000 * KM, e, i=0.5, raan=1.0, argp=2.0, mu=MU_EARTH)
    limit = 0.95 * asymptote_true_anomaly(e) if e > 1 else 3.0
    for nu in np.linspace(-limit, limit, 9):
        r, v = state_from_elements(el.with_(nu=nu))
        radius, speed = np.linalg.norm(r), np.linalg.norm(v)
        assert el.radius_at(nu) == pytest.approx(radius, rel=1e-14)
        assert el.speed_at(nu) == pytest.approx(speed, rel=1e-13)
        gamma = math.asin(np.dot(r, v) / (radius * speed))
        assert el.flight_path_angle_at(nu) == pytest.approx(gamma, abs=1e-12 * RAD)
        assert np.linalg.norm(np.cross(r, v)) == pytest.approx(el.h, rel=1e-13)
        energy = 0.5 * speed**2 - MU_EARTH / radius
        assert energy == pytest.approx(el.energy, abs=1e-12 * speed**2)


def test_parabola_quantities() -> None:
    q = 7000 * KM
    el = Elements.from_periapsis(q, 1.0, mu=MU_EARTH)
    assert el.a == math.inf
    assert el.p == 2 * q
    assert el.periapsis == q
    assert el.b == math.inf and el.c == math.inf
    assert math.isnan(el.apoapsis) and math.isnan(el.period)
    assert math.isnan(el.speed_apoapsis) and math.isnan(el.turning_angle)
    assert el.energy == 0.0
    assert el.v_infinity == 0.0
    # Escape speed at periapsis; Barker's mean motion 2 sqrt(mu / p^3) (Vallado 2.2.5).
    assert el.speed_periapsis == pytest.approx(math.sqrt(2 * MU_EARTH / q), rel=1e-15)
    assert el.mean_motion == pytest.approx(2 * math.sqrt(MU_EARTH / el.p**3), rel=1e-15)
    assert el.h == pytest.approx(math.sqrt(MU_EARTH * 2 * q), rel=1e-15)
    # On a parabola the flight-path angle is half the true anomaly.
    np.testing.assert_allclose(el.flight_path_angle_at(NU), NU / 2, rtol=1e-14)


@pytest.mark.parametrize("e", [1.1, 2.0, 5.0])
def test_hyperbola_quantities(e: float) -> None:
    q = 7000 * KM
    el = Elements.from_periapsis(q, e, mu=MU_EARTH)
    a = el.a
    assert a < 0
    assert el.p == pytest.approx(a * (1 - e * e), rel=1e-15)
    assert el.b == pytest.approx(-a * math.sqrt(e * e - 1), rel=1e-15)
    assert el.c == pytest.approx(-a * e, rel=1e-15)
    assert el.c**2 == pytest.approx(a * a + el.b**2, rel=1e-14)
    assert math.isnan(el.apoapsis) and math.isnan(el.period) and math.isnan(el.speed_apoapsis)
    assert el.mean_motion == pytest.approx(math.sqrt(MU_EARTH / (-a) ** 3), rel=1e-15)
    assert el.energy == pytest.approx(0.5 * el.v_infinity**2, rel=1e-14)
    assert el.speed_periapsis**2 == pytest.approx(el.v_infinity**2 + 2 * MU_EARTH / q,
                                                  rel=1e-14)
    assert el.turning_angle == pytest.approx(2 * math.asin(1 / e), rel=1e-15)
    # The asymptotes: the velocity turns by 2 nu_inf - pi in all.
    assert el.turning_angle == pytest.approx(2 * asymptote_true_anomaly(e) - math.pi, rel=1e-12)


def test_hyperbola_turning_angle_agrees_with_propagated_velocities() -> None:
    # Independent: propagate far before and after periapsis; the velocity's direction
    # turns by the turning angle, less what the finite distance still has to bend
    # (about 2 mu / (r v_inf^2) at r = 1e6 q).
    q, e = 7000 * KM, 2.0
    el = Elements.from_periapsis(q, e, mu=MU_EARTH)
    r0, v0 = state_from_elements(el)
    _, v = propagate(r0, v0, MU_EARTH, np.array([-3e9, 3e9]))
    cos_turn = np.dot(v[0], v[1]) / (np.linalg.norm(v[0]) * np.linalg.norm(v[1]))
    assert math.acos(cos_turn) == pytest.approx(el.turning_angle, rel=1e-4)
    assert np.linalg.norm(v[1]) == pytest.approx(el.v_infinity, rel=1e-4)


def test_a_population_gives_arrays_of_every_quantity() -> None:
    e = np.array([0.0, 0.5, 1.0, 2.0])
    el = Elements.from_periapsis(np.full(4, 7000 * KM), e, mu=MU_EARTH)
    for name in ("p", "periapsis", "apoapsis", "b", "c", "mean_motion", "period", "energy",
                 "h", "speed_periapsis", "speed_apoapsis", "v_infinity", "turning_angle"):
        value = getattr(el, name)
        assert np.shape(value) == (4,), name
        single = getattr(Elements.from_periapsis(7000 * KM, e[1], mu=MU_EARTH), name)
        assert value[1] == pytest.approx(single, rel=1e-15, nan_ok=True), name
    np.testing.assert_array_equal(np.isnan(el.period), [False, False, True, True])
    np.testing.assert_array_equal(np.isnan(el.v_infinity), [True, True, False, False])


def test_time_quantities_need_mu() -> None:
    el = Elements(7000 * KM, 0.1)
    assert el.p == pytest.approx(7000 * KM * 0.99, rel=1e-15)  # geometry needs no mu
    for name in ("period", "mean_motion", "energy", "h", "speed_periapsis"):
        with pytest.raises(OrbitError, match="mu"):
            getattr(el, name)
