"""Kepler's equation of every conic against mpmath at 50 digits (an independent
reference library), plus the solvers' contract (/work/shared/design/cli.md, Python API):

* elliptic: E in the same revolution as M (|E - M| <= e); residual |E - e sin E - M|
  <= 1e-12 rad, measured on M reduced to [-pi, pi);
* hyperbolic: |e sinh F - F - M| / max(1, |M|) <= 1e-12;
* NaN/infinite input and e out of range raise AnomalyError (a ValueError).
"""

from __future__ import annotations

import math

import mpmath as mp
import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from reference_values import RAD

from viewer.orbit import (
    AnomalyError,
    Elements,
    eccentric_anomaly,
    hyperbolic_anomaly,
    kepler_residual,
    mean_from_true,
    parabolic_anomaly,
    propagate,
    state_from_elements,
    true_from_mean,
)

#: The contract's residual bound for both solvers (cli.md), rad.
CONTRACT_RESIDUAL = 1e-12 * RAD
#: Agreement of E with the 50-digit root for |M| <= pi, rad: a few float64 ulps of pi.
E_VS_MPMATH = 1e-14 * RAD
EPS = float(np.finfo(np.float64).eps)
DIGITS = 50

rng = np.random.default_rng(20_240_601)


def _mp_eccentric(M: float, e: float) -> mp.mpf:
    """The root of E - e sin E = M (float inputs taken exactly), 50 digits.

    Newton from E = pi on M reduced to [0, pi]: f is convex there and f(pi) >= 0, so the
    iteration falls monotonically onto the root with no safeguard needed.
    """
    with mp.workdps(DIGITS + 10):
        Mx, ex = mp.mpf(M), mp.mpf(e)
        turns = mp.nint(Mx / (2 * mp.pi))
        Mr = Mx - 2 * mp.pi * turns
        m = abs(Mr)
        E = +mp.pi
        for _ in range(400):
            step = (E - ex * mp.sin(E) - m) / (1 - ex * mp.cos(E))
            E -= step
            if abs(step) <= mp.mpf(10) ** (-DIGITS) * max(E, mp.mpf(10) ** -300):
                break
        return mp.sign(Mr) * E + 2 * mp.pi * turns if Mr != 0 else 2 * mp.pi * turns


def _mp_hyperbolic(M: float, e: float) -> mp.mpf:
    """The root of e sinh F - F = M, 50 digits, Newton from above (convex for F >= 0)."""
    with mp.workdps(DIGITS + 10):
        Mx, ex = mp.mpf(M), mp.mpf(e)
        m = abs(Mx)
        F = mp.asinh(2 * m / ex + 2) + 1  # above the root: e sinh F - F > m there
        for _ in range(1000):
            step = (ex * mp.sinh(F) - F - m) / (ex * mp.cosh(F) - 1)
            F -= step
            if abs(step) <= mp.mpf(10) ** (-DIGITS) * max(F, mp.mpf(10) ** -300):
                break
        return mp.sign(Mx) * F


def _mp_barker(M: float) -> mp.mpf:
    """The real root of D^3/3 + D - M = 0 by mpmath's polynomial root finder, 50 digits."""
    with mp.workdps(DIGITS):
        roots = mp.polyroots([-mp.mpf(M), 1, 0, mp.mpf(1) / 3], maxsteps=200, extraprec=200,
                             asc=True)
        return min(roots, key=lambda z: abs(mp.im(z))).real


ECCENTRICITIES = [0.0, 1e-9, 0.01, 0.1, 0.3, 0.5, 0.7, 0.9, 0.97, 0.99, 0.999, 0.9999,
                  1 - 1e-6, 1 - 1e-9, 1 - 1e-12]
MEAN_ANOMALIES = np.concatenate([
    np.linspace(-np.pi, np.pi, 61),
    [1e-100, -1e-100, 1e-20, 1e-12, -1e-9, 1e-6, 1e-3, 0.0, np.pi - 1e-12, -np.pi + 1e-12],
])


@pytest.mark.parametrize("e", ECCENTRICITIES)
def test_eccentric_anomaly_matches_mpmath_on_a_grid(e: float) -> None:
    # Independent reference: mpmath at 50 digits. Includes e -> 1 (1 - 1e-12), tiny M and
    # M at +-pi, where Kepler's equation is worst conditioned.
    E = eccentric_anomaly(MEAN_ANOMALIES, e)
    assert np.max(kepler_residual(E, MEAN_ANOMALIES, e)) <= CONTRACT_RESIDUAL
    ref = np.array([float(_mp_eccentric(M, e)) for M in MEAN_ANOMALIES])
    assert np.max(np.abs(E - ref)) <= E_VS_MPMATH
    # Tiny M near periapsis: the root is tiny too, and must be right relative to itself.
    tiny = np.abs(MEAN_ANOMALIES) < 1e-2
    nonzero = tiny & (ref != 0)
    assert np.all(np.abs(E[nonzero] - ref[nonzero]) <= 8 * EPS * np.abs(ref[nonzero]))


def test_eccentric_anomaly_matches_mpmath_next_to_apoapsis() -> None:
    # M at pi and a few ulps below it: E is pi, where the solver's tan(E/2) (for the
    # slope 1 - e cos E) is at its pole. Both signs, e from 0 to 1 - 1e-12.
    top = np.nextafter(np.pi, 0.0) - np.arange(6) * np.spacing(np.pi)
    M = np.concatenate([[np.pi, -np.pi], top, -top, np.pi - 10.0 ** -np.arange(3, 16)])
    for e in [0.0, 0.3, 0.9, 0.999, 1 - 1e-12]:
        E = eccentric_anomaly(M, e)
        ref = np.array([float(_mp_eccentric(m, e)) for m in M])
        assert np.max(np.abs(E - ref)) <= E_VS_MPMATH, e
        assert np.max(kepler_residual(E, M, e)) <= CONTRACT_RESIDUAL, e


def test_eccentric_anomaly_matches_mpmath_for_random_anomalies() -> None:
    # Random (M, e) in [-pi, pi) x [0, 1), with a third of e crowded towards 1.
    M = rng.uniform(-np.pi, np.pi, 600)
    e = np.concatenate([rng.uniform(0, 1, 400), 1 - 10 ** rng.uniform(-12, -1, 200)])
    E = eccentric_anomaly(M, e)
    ref = np.array([float(_mp_eccentric(m, x)) for m, x in zip(M, e, strict=True)])
    assert np.max(np.abs(E - ref)) <= E_VS_MPMATH
    assert np.max(kepler_residual(E, M, e)) <= CONTRACT_RESIDUAL


def test_eccentric_anomaly_for_many_turns_meets_the_contract() -> None:
    # |M| up to 1e3 rad: the contract's residual on M reduced to [-pi, pi), E in M's turn.
    # Against mpmath the float64 spacing of M itself bounds what any solver can return:
    # an error of a few ulp(M) in the reduced M, times the condition 1 / (1 - e cos E).
    M = rng.uniform(-1e3, 1e3, 400)
    e = np.concatenate([rng.uniform(0, 1, 300), 1 - 10 ** rng.uniform(-9, -1, 100)])
    E = eccentric_anomaly(M, e)
    assert np.max(kepler_residual(E, M, e)) <= CONTRACT_RESIDUAL
    assert np.all(np.abs(E - M) <= e + np.spacing(np.abs(E)))
    ref = [_mp_eccentric(m, x) for m, x in zip(M, e, strict=True)]
    for m, x, got, want in zip(M, e, E, ref, strict=True):
        condition = 1.0 / float(1 - x * mp.cos(want))
        allowed = E_VS_MPMATH + 4 * EPS * abs(m) * condition
        assert abs(got - float(want)) <= allowed, (m, x)


def test_a_large_array_solved_in_blocks_on_threads_matches_mpmath() -> None:
    # 200,000 values: more than one block, so the blocks are solved on several threads.
    # A sample of them against mpmath, every one against the contract's residual.
    n = 200_000
    M = rng.uniform(-20.0, 20.0, n)
    e = np.concatenate([rng.uniform(0, 1, n // 2), 1 - 10 ** rng.uniform(-12, -1, n // 2)])
    E = eccentric_anomaly(M, e)
    assert E.shape == (n,)
    assert np.max(kepler_residual(E, M, e)) <= CONTRACT_RESIDUAL
    for k in rng.choice(n, 60, replace=False):
        condition = 1.0 / float(1 - e[k] * mp.cos(_mp_eccentric(M[k], e[k])))
        allowed = E_VS_MPMATH + 4 * EPS * abs(M[k]) * condition
        assert abs(E[k] - float(_mp_eccentric(M[k], e[k]))) <= allowed, (M[k], e[k])


def test_a_large_array_gives_the_same_bits_on_any_number_of_threads() -> None:
    # Frames must not depend on the machine's core count (a show rendered on a cluster is
    # byte-identical to one rendered on one machine): blocks, threads and the unblocked
    # solve give the same E to the bit, including near periapsis at e -> 1, where the
    # correction starts from the starter itself rather than from the grid.
    from viewer.orbit.anomaly import _BLOCK, _elliptic, _elliptic_blocks

    n = 3 * _BLOCK + 1234
    M = rng.uniform(-20.0, 20.0, n)
    e = np.concatenate([rng.uniform(0, 1, n // 2), 1 - 10 ** rng.uniform(-12, -1, n - n // 2)])
    with np.errstate(under="ignore"):
        whole = _elliptic(M, e, 1e-13)
        for threads in (1, 2, 3):
            assert np.array_equal(_elliptic_blocks(M, e, 1e-13, threads=threads), whole)
    assert np.array_equal(eccentric_anomaly(M, e), whole)


def test_the_correction_starts_from_numpys_own_sines_on_its_grid() -> None:
    # Markley's correction starts on a grid of 2^-14 rad whose sines and cosines are
    # read from a table: they must be numpy's np.sin and np.cos of the grid points (so
    # f0 = E0 - e sin E0 - M is as exact as with a direct call), over all of [0, pi].
    from viewer.orbit.anomaly import _GRID_PER_RAD, _sin_cos_grid

    sin_grid, cos_grid = _sin_cos_grid()
    points = np.arange(sin_grid.size) / _GRID_PER_RAD
    assert points[-1] >= np.pi
    assert np.array_equal(sin_grid, np.sin(points))
    assert np.array_equal(cos_grid, np.cos(points))
    assert not sin_grid.flags.writeable and not cos_grid.flags.writeable


@settings(max_examples=150, deadline=None)
@given(M=st.floats(-1e3, 1e3), e=st.floats(0.0, 1.0, exclude_max=True))
def test_eccentric_anomaly_stays_in_the_turn_of_m_with_contract_residual(M: float,
                                                                         e: float) -> None:
    E = eccentric_anomaly(M, e)
    assert isinstance(E, float)
    # |E - M| <= e up to the rounding of E itself (a float64 spacing at E; it matters
    # only when e is below a few ulp(M)).
    assert abs(E - M) <= e + math.ulp(E)
    assert float(kepler_residual(E, M, e)) <= CONTRACT_RESIDUAL


def test_eccentric_anomaly_is_odd_and_periodic_in_m() -> None:
    # E(-M) = -E(M) and E(M + 2 pi k) = E(M) + 2 pi k (Vallado sec. 2.2, from the equation).
    M = np.linspace(0.01, 3.1, 50)
    e = 0.73
    assert np.array_equal(eccentric_anomaly(-M, e), -eccentric_anomaly(M, e))
    shifted = eccentric_anomaly(M + 6 * np.pi, e) - 6 * np.pi
    assert np.max(np.abs(shifted - eccentric_anomaly(M, e))) <= 1e-13


def test_eccentric_anomaly_broadcasts_m_against_e() -> None:
    M = np.linspace(-3, 3, 7)[:, None]
    e = np.array([0.1, 0.5, 0.9])[None, :]
    E = eccentric_anomaly(M, e)
    assert E.shape == (7, 3)
    assert np.max(kepler_residual(E, M, e)) <= CONTRACT_RESIDUAL


# --- hyperbola -----------------------------------------------------------------------


def _hyperbolic_cases(n: int) -> tuple[np.ndarray, np.ndarray]:
    e = 1.0 + 10 ** rng.uniform(-12, 3, n)  # e in (1, 1e3]
    M = np.where(rng.uniform(size=n) < 0.5, -1.0, 1.0) * 10 ** rng.uniform(-10, 8, n)
    return M, e


def test_hyperbolic_anomaly_meets_the_contract_residual() -> None:
    # e in (1, 1e3], |M| up to 1e8: |e sinh F - F - M| / max(1, |M|) <= 1e-12. The
    # residual is measured at 50 digits so float64 rounding of the check is not in it.
    M, e = _hyperbolic_cases(500)
    F = hyperbolic_anomaly(M, e)
    for m, x, f in zip(M, e, F, strict=True):
        with mp.workdps(DIGITS):
            residual = abs(mp.mpf(x) * mp.sinh(mp.mpf(f)) - mp.mpf(f) - mp.mpf(m))
        assert float(residual) / max(1.0, abs(m)) <= CONTRACT_RESIDUAL, (m, x)


def test_hyperbolic_anomaly_matches_mpmath_relative_to_itself() -> None:
    # Beyond the contract: F to 1e-12 of itself against mpmath, also for tiny M near
    # periapsis of a near-parabolic hyperbola (where an absolute residual of 1e-13
    # would leave F wrong in its leading digits, and positions off by kilometres).
    M, e = _hyperbolic_cases(500)
    F = hyperbolic_anomaly(M, e)
    ref = np.array([float(_mp_hyperbolic(m, x)) for m, x in zip(M, e, strict=True)])
    assert np.all(np.abs(F - ref) <= 1e-12 * np.abs(ref))


@settings(max_examples=150, deadline=None)
@given(M=st.floats(-1e8, 1e8), e=st.floats(1.0, 1e3, exclude_min=True))
def test_hyperbolic_anomaly_residual_property(M: float, e: float) -> None:
    F = hyperbolic_anomaly(M, e)
    assert isinstance(F, float)
    assert np.sign(F) in (np.sign(M), 0.0)  # 0 where M is so subnormal that F rounds to 0
    residual = abs(e * math.sinh(F) - F - M)
    # float64 evaluation of the check itself costs a few ulp of e sinh F ~ |M| + |F|.
    assert residual <= CONTRACT_RESIDUAL * max(1.0, abs(M)) + 4 * EPS * abs(F)


def test_hyperbolic_anomaly_matches_mpmath_at_vallado_like_inputs() -> None:
    # A grid of moderate cases (e 1.01 .. 100, M 0.1 .. 1e4): F to 2e-13 of itself, the
    # solver's stopping tolerance (1e-13 of M) through the condition M / (F dM/dF) <= 1.
    for e in (1.01, 1.5, 2.4, 10.0, 100.0):
        M = np.array([0.1, 1.0, 4.1085, 30.0, 1e3, 1e4])
        F = hyperbolic_anomaly(M, e)
        ref = np.array([float(_mp_hyperbolic(m, e)) for m in M])
        assert np.all(np.abs(F - ref) <= 2e-13 * np.abs(ref)), e


# --- parabola ------------------------------------------------------------------------


def test_parabolic_anomaly_matches_mpmath_cubic_root() -> None:
    # Barker's equation D + D^3/3 = M against mpmath's polynomial roots (Vallado sec.
    # 2.2.5 for the equation).
    M = np.concatenate([-np.logspace(-10, 8, 40), np.logspace(-10, 8, 40), [0.0]])
    D = parabolic_anomaly(M)
    ref = np.array([float(_mp_barker(m)) for m in M])
    assert np.all(np.abs(D - ref) <= 2 * EPS * np.abs(ref))


def test_parabolic_anomaly_of_zero_is_periapsis() -> None:
    assert parabolic_anomaly(0.0) == 0.0
    assert isinstance(parabolic_anomaly(0.5), float)


# --- anomalies round the conics ---------------------------------------------------------


@pytest.mark.parametrize("e", [0.0, 0.3, 0.95, 1 - 1e-9, 1.0, 1 + 1e-9, 1.2, 5.0])
def test_mean_and_true_anomaly_are_inverse(e: float) -> None:
    limit = np.pi if e <= 1 else math.acos(-1.0 / e)
    nu = np.linspace(-0.95 * limit, 0.95 * limit, 41)
    back = true_from_mean(mean_from_true(nu, e), e)
    assert np.max(np.abs(back - nu)) <= 1e-12


@pytest.mark.parametrize("e", [1 - 1e-12, 1 - 1e-8, 1 + 1e-8, 1 + 1e-12])
def test_elements_after_agrees_with_propagate_near_a_parabola(e: float) -> None:
    # The Kepler-equation path (Elements.after) against the universal-variable path
    # (propagate) on near-parabolic conics near periapsis, where the mean anomaly is tiny;
    # both against the 50-digit positions from mpmath's root of Kepler's equation.
    mu, q = 3.986004418e14, 7.0e6
    el = Elements.from_periapsis(q, e, mu=mu)
    r0, v0 = state_from_elements(el)
    for dt in (1.0, 100.0, 1e4):
        later = el.after(dt)
        r_kepler, _ = state_from_elements(later)
        r_universal, _ = propagate(r0, v0, mu, dt)
        with mp.workdps(DIGITS):
            a = mp.mpf(q) / (1 - mp.mpf(e))
            n = mp.sqrt(mp.mpf(mu) / abs(a) ** 3)
            if e < 1:
                E = _mp_eccentric(float(n * dt), e)
                x, y = a * (mp.cos(E) - e), a * mp.sqrt(1 - mp.mpf(e) ** 2) * mp.sin(E)
            else:
                F = _mp_hyperbolic(float(n * dt), e)
                x, y = -a * (e - mp.cosh(F)), -a * mp.sqrt(mp.mpf(e) ** 2 - 1) * mp.sinh(F)
        exact = np.array([float(x), float(y), 0.0])
        # 1 m over 7 000-50 000 km: the elements themselves carry a ~ q / |1 - e| = 7e18 m.
        assert np.linalg.norm(r_kepler - exact) <= 1.0, dt
        assert np.linalg.norm(r_universal - exact) <= 1.0, dt


# --- bad input -------------------------------------------------------------------------


@pytest.mark.parametrize(("M", "e"), [
    (math.nan, 0.5), (math.inf, 0.5), (-math.inf, 0.5), (1.0, math.nan),
    (1.0, -0.1), (1.0, 1.0), (1.0, 1.5), ([0.1, math.nan], 0.5), ([0.1, 0.2], [0.5, 1.0]),
])
def test_eccentric_anomaly_rejects_bad_input(M: object, e: object) -> None:
    with pytest.raises(AnomalyError):
        eccentric_anomaly(M, e)  # type: ignore[arg-type]


@pytest.mark.parametrize(("M", "e"), [
    (math.nan, 2.0), (math.inf, 2.0), (1.0, math.nan), (1.0, math.inf), (1.0, 1.0),
    (1.0, 0.5), ([1.0, 2.0], [2.0, 0.9]),
])
def test_hyperbolic_anomaly_rejects_bad_input(M: object, e: object) -> None:
    with pytest.raises(AnomalyError):
        hyperbolic_anomaly(M, e)  # type: ignore[arg-type]


@pytest.mark.parametrize("M", [math.nan, math.inf, -math.inf, [0.0, math.nan]])
def test_parabolic_anomaly_rejects_bad_input(M: object) -> None:
    with pytest.raises(AnomalyError):
        parabolic_anomaly(M)  # type: ignore[arg-type]


def test_anomaly_error_is_a_value_error() -> None:
    assert issubclass(AnomalyError, ValueError)
    with pytest.raises(ValueError, match="e < 1"):
        eccentric_anomaly(0.3, 1.2)


def test_values_past_markley_without_the_guard_match_mpmath() -> None:
    # The values whose last Markley step lies between 1e-4 and the guard's threshold are
    # returned without a measured residual: each must still be within a few ulps of the
    # 50-digit root (mpmath) and meet the contract.
    from viewer.orbit.anomaly import _GUARD_STEP, _markley

    M = rng.uniform(0.0, np.pi, 200_000)
    e = np.concatenate([rng.uniform(0, 0.99, 100_000), 1 - 10 ** rng.uniform(-12, -1, 100_000)])
    with np.errstate(under="ignore"):
        _, last = _markley(M.copy(), e)
    unguarded = np.flatnonzero((np.abs(last) > 1e-4) & (np.abs(last) <= _GUARD_STEP))
    assert unguarded.size > 1000
    E = eccentric_anomaly(M[unguarded], e[unguarded])
    assert np.max(kepler_residual(E, M[unguarded], e[unguarded])) <= CONTRACT_RESIDUAL
    for k in rng.choice(unguarded.size, 80, replace=False):
        want = float(_mp_eccentric(M[unguarded][k], e[unguarded][k]))
        assert abs(E[k] - want) <= E_VS_MPMATH, (M[unguarded][k], e[unguarded][k])
