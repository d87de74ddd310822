"""Lambert's problem (viewer.mission.lambert) against published worked examples and a slow,
independent reference: the universal-variable formulation (Curtis, Algorithm 5.2; Bate,
Mueller & White section 5.3) with scipy's brentq for the roots, on thousands of random
cases: single and multi-revolution, prograde and retrograde, elliptic and hyperbolic."""

from __future__ import annotations

import numpy as np
import pytest
from scipy.optimize import brentq

from viewer.mission.lambert import all_solutions, max_revolutions, solve
from viewer.orbit import propagate

KM = 1e3
MU_EARTH = 398600.4418e9


def _stumpff(z: float) -> tuple[float, float]:
    if z > 1e-8:
        q = np.sqrt(z)
        return (1.0 - np.cos(q)) / z, (q - np.sin(q)) / q**3
    if z < -1e-8:
        q = np.sqrt(-z)
        return (np.cosh(q) - 1.0) / -z, (np.sinh(q) - q) / q**3
    return 0.5 - z / 24.0, 1.0 / 6.0 - z / 120.0


def reference(mu: float, r1: np.ndarray, r2: np.ndarray, tof: float, M: int,
              prograde: bool) -> list[tuple[np.ndarray, np.ndarray]]:
    """Every solution with M revolutions by universal variables (Curtis eqs. 5.35-5.46):
    z's interval scanned for sign changes of F(z) = t(z) - tof, each root by brentq."""
    r1n, r2n = np.linalg.norm(r1), np.linalg.norm(r2)
    cos_t = np.clip(np.dot(r1, r2) / (r1n * r2n), -1.0, 1.0)
    theta = np.arccos(cos_t)
    if (np.cross(r1, r2)[2] >= 0.0) != prograde:
        theta = 2.0 * np.pi - theta
    A = np.sin(theta) * np.sqrt(r1n * r2n / (1.0 - cos_t))

    def y(z: float) -> float:
        C, S = _stumpff(z)
        return r1n + r2n + A * (z * S - 1.0) / np.sqrt(C)

    def F(z: float) -> float:
        C, S = _stumpff(z)
        yz = y(z)
        if yz <= 0.0:
            return np.nan
        return ((yz / C) ** 1.5 * S + A * np.sqrt(yz)) / np.sqrt(mu) - tof

    lo = (2.0 * np.pi * M) ** 2
    hi = (2.0 * np.pi * (M + 1)) ** 2
    if M == 0:  # t(z) rises monotonically: one bracket, from far out on the hyperbolic side
        lo = -1.0
        while y(lo) > 0.0 and F(lo) > 0.0:
            lo *= 2.0
        if y(lo) <= 0.0:  # start just where y turns positive
            z0 = brentq(y, lo, 0.0 if y(0.0) > 0 else hi * (1.0 - 1e-6), xtol=1e-15)
            lo = z0 + 1e-12 * max(1.0, abs(z0))
        hi = hi * (1.0 - 1e-6)
        if not (F(lo) < 0.0 < F(hi)):
            return []
        roots = [brentq(F, lo, hi, xtol=1e-15, rtol=1e-15)]
        return [_velocities(mu, r1, r2, r1n, r2n, A, y(z)) for z in roots]
    zs = np.linspace(lo, hi, 2001)[1:-1]
    fs = np.array([F(z) for z in zs])
    roots = []
    for k in range(len(zs) - 1):
        if np.isfinite(fs[k]) and np.isfinite(fs[k + 1]) and fs[k] * fs[k + 1] < 0.0:
            roots.append(brentq(F, zs[k], zs[k + 1], xtol=1e-15, rtol=1e-15))
    return [_velocities(mu, r1, r2, r1n, r2n, A, y(z)) for z in roots]


def _velocities(mu, r1, r2, r1n, r2n, A, yz):
    """Lagrange coefficients f, g, g-dot (Curtis eqs. 5.46) to v1 and v2."""
    f = 1.0 - yz / r1n
    g = A * np.sqrt(yz / mu)
    gdot = 1.0 - yz / r2n
    return (r2 - f * r1) / g, (gdot * r2 - r1) / g


def test_curtis_example_5_2():
    # Curtis, Orbital Mechanics for Engineering Students, Example 5.2 (values from memory):
    # r1 = (5000, 10000, 2100) km, r2 = (-14600, 2500, 7000) km, 1 h, mu = 398600 km3/s2;
    # v1 = (-5.9925, 1.9254, 3.2456) km/s, v2 = (-3.3125, -4.1966, -0.38529) km/s.
    res = solve(398600e9, np.array([5000.0, 10000.0, 2100.0]) * KM,
                np.array([-14600.0, 2500.0, 7000.0]) * KM, 3600.0)
    assert res.ok
    np.testing.assert_allclose(res.v1 / KM, [-5.9925, 1.9254, 3.2456], atol=1e-4)
    np.testing.assert_allclose(res.v2 / KM, [-3.3125, -4.1966, -0.38529], atol=1e-4)


def test_vallado_example_7_5():
    # Vallado, Fundamentals of Astrodynamics and Applications, 4th ed., Example 7-5
    # (universal variables; values from memory): r0 = 15945.34 I km,
    # r = 12214.83899 I + 10249.46731 J km, 76 min, short way;
    # v0 = 2.058913 I + 2.915965 J km/s, v = -3.451565 I + 0.910315 J km/s.
    res = solve(MU_EARTH, np.array([15945.34, 0.0, 0.0]) * KM,
                np.array([12214.83899, 10249.46731, 0.0]) * KM, 76 * 60.0)
    assert res.ok
    np.testing.assert_allclose(res.v1 / KM, [2.058913, 2.915965, 0.0], atol=2e-6)
    np.testing.assert_allclose(res.v2 / KM, [-3.451565, 0.910315, 0.0], atol=2e-6)


def _random_cases(rng: np.random.Generator, n: int, tof_range: tuple[float, float]):
    d1 = rng.normal(size=(n, 3))
    d2 = rng.normal(size=(n, 3))
    r1 = d1 / np.linalg.norm(d1, axis=1)[:, None] * rng.uniform(0.5, 2.0, (n, 1))
    r2 = d2 / np.linalg.norm(d2, axis=1)[:, None] * rng.uniform(0.5, 2.0, (n, 1))
    tof = np.exp(rng.uniform(np.log(tof_range[0]), np.log(tof_range[1]), n))
    return r1, r2, tof


@pytest.mark.slow
@pytest.mark.parametrize("prograde", [True, False])
def test_single_revolution_matches_universal_variables(prograde):
    # 1500 random cases per direction, mu = 1, |r| in [0.5, 2], tof from 0.05 (hyperbolic)
    # to 30 (long, slow ellipses): every reference solution is found and agrees.
    rng = np.random.default_rng(14 + prograde)
    r1, r2, tof = _random_cases(rng, 1500, (0.05, 30.0))
    res = solve(1.0, r1, r2, tof, 0, prograde)
    assert res.ok.all()
    hyperbolic = elliptic = 0
    for k in range(len(tof)):
        ref = reference(1.0, r1[k], r2[k], tof[k], 0, prograde)
        assert len(ref) == 1, k
        np.testing.assert_allclose(res.v1[k], ref[0][0], rtol=1e-8, atol=1e-9)
        np.testing.assert_allclose(res.v2[k], ref[0][1], rtol=1e-8, atol=1e-9)
        energy = 0.5 * res.v1[k] @ res.v1[k] - 1.0 / np.linalg.norm(r1[k])
        hyperbolic += energy > 0
        elliptic += energy < 0
    assert hyperbolic > 100 and elliptic > 100  # both kinds were exercised


@pytest.mark.slow
@pytest.mark.parametrize("prograde", [True, False])
def test_multi_revolution_matches_universal_variables(prograde):
    # 400 random cases per direction with time for up to a few revolutions: each
    # revolution count has the reference's solutions, as an unordered left/right pair.
    rng = np.random.default_rng(41 + prograde)
    r1, r2, tof = _random_cases(rng, 400, (8.0, 60.0))
    top = max_revolutions(1.0, r1, r2, tof, prograde)
    assert top.max() >= 3
    compared = 0
    for M in range(1, int(top.max()) + 1):
        left = solve(1.0, r1, r2, tof, M, prograde, right_branch=False)
        right = solve(1.0, r1, r2, tof, M, prograde, right_branch=True)
        np.testing.assert_array_equal(left.ok, top >= M)
        np.testing.assert_array_equal(right.ok, top >= M)
        for k in np.flatnonzero(top >= M)[:120]:
            ref = reference(1.0, r1[k], r2[k], tof[k], M, prograde)
            if len(ref) != 2:  # the two roots are too close for the reference's scan
                continue
            ours = [left.v1[k], right.v1[k]]
            for v1_ref, _ in ref:
                err = min(np.linalg.norm(v - v1_ref) for v in ours)
                assert err < 1e-7 * np.linalg.norm(v1_ref), (M, k)
            compared += 1
    assert compared > 300


def test_reference_agrees_no_solution_past_max_revolutions():
    rng = np.random.default_rng(7)
    r1, r2, tof = _random_cases(rng, 60, (8.0, 40.0))
    top = max_revolutions(1.0, r1, r2, tof)
    for k in range(60):
        assert reference(1.0, r1[k], r2[k], tof[k], int(top[k]) + 1, True) == []
        assert not solve(1.0, r1[k], r2[k], tof[k], int(top[k]) + 1).ok


def test_solution_flies_from_r1_to_r2():
    # The universal-variable propagator (tested against Vallado and solve_ivp) carries
    # (r1, v1) to (r2, v2) in tof, for each solution of a multi-revolution case.
    r1 = np.array([7000.0, 0.0, 0.0]) * KM
    r2 = np.array([-2000.0, 9000.0, 1500.0]) * KM
    tof = 6 * 3600.0
    sols = all_solutions(MU_EARTH, r1, r2, tof)
    assert {s["revolutions"] for s in sols} >= {0, 1, 2}
    for s in sols:
        r, v = propagate(r1, np.array(s["v1_m_s"]), MU_EARTH, tof)
        np.testing.assert_allclose(r, r2, atol=1e-3)  # 1 mm
        np.testing.assert_allclose(v, s["v2_m_s"], atol=1e-6)


def test_collinear_positions_are_refused():
    r1 = np.array([7000.0, 0.0, 0.0]) * KM
    for r2 in (np.array([-9000.0, 0.0, 0.0]) * KM, np.array([9000.0, 0.0, 0.0]) * KM):
        res = solve(MU_EARTH, r1, r2, 3600.0)
        assert not res.ok and res.collinear
        assert np.isnan(res.v1).all()
    near = solve(MU_EARTH, r1, np.array([-9000.0, 9000.0 * 1e-4, 0.0]) * KM, 3600.0)
    assert near.ok and not near.collinear  # 0.006 deg short of 180: still solved


def test_zero_or_negative_time_has_no_solution():
    r1 = np.array([7000.0, 0.0, 0.0]) * KM
    r2 = np.array([0.0, 8000.0, 0.0]) * KM
    res = solve(MU_EARTH, r1, r2, np.array([0.0, -10.0, 100.0]))
    np.testing.assert_array_equal(res.ok, [False, False, True])
