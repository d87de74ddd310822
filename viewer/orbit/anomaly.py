"""Anomalies of every conic and the vectorised solvers of Kepler's equation.

Symbols:
    e   eccentricity (0 circle, <1 ellipse, 1 parabola, >1 hyperbola)
    nu  true anomaly, radians
    E   eccentric anomaly (ellipse), radians
    F   hyperbolic anomaly (hyperbola)
    D   parabolic anomaly tan(nu/2) (parabola, Barker)
    M   mean anomaly: E - e sin E (ellipse), e sinh F - F (hyperbola), D + D^3/3 (parabola)

Every function takes scalars or arrays (one vectorised path, ``np.asarray`` once) and
returns a float for scalar input and an array otherwise. Equations from Vallado,
*Fundamentals of Astrodynamics and Applications* (4th ed.), sec. 2.2-2.3, and Curtis,
*Orbital Mechanics for Engineering Students*, ch. 3.
"""

from __future__ import annotations

import contextvars
import functools
import os
from collections.abc import Callable, Iterator
from typing import Any, TypeVar

import numpy as np
from numpy.typing import ArrayLike, NDArray

TWO_PI = 2.0 * np.pi

Floats = NDArray[np.float64]
_F = TypeVar("_F", bound=Callable[..., Any])


class AnomalyError(ValueError):
    """An anomaly or eccentricity outside what the conic allows (NaN, e out of range)."""


def _out(x: Floats, scalar: bool) -> float | Floats:
    return float(x) if scalar else x


def _underflow_is_fine(func: _F) -> _F:
    """Run ``func`` with underflow ignored: the powers and series terms of a tiny anomaly
    flush harmlessly towards 0, and callers running under ``np.seterr(all="raise")``
    (as the tests do) must not see that as an error."""

    @functools.wraps(func)
    def wrapper(*args: Any, **kwargs: Any) -> Any:
        with np.errstate(under="ignore"):
            return func(*args, **kwargs)

    return wrapper  # type: ignore[return-value]


def _check_finite(name: str, x: Floats) -> None:
    if not np.all(np.isfinite(x)):
        raise AnomalyError(f"{name} must be finite; got NaN or infinity")


def wrap_pi(x: ArrayLike) -> float | Floats:
    """Reduce an angle to [-pi, pi)."""
    a = np.asarray(x, dtype=np.float64)
    return _out(np.mod(a + np.pi, TWO_PI) - np.pi, a.ndim == 0)


def wrap_two_pi(x: ArrayLike) -> float | Floats:
    """Reduce an angle to [0, 2 pi)."""
    a = np.asarray(x, dtype=np.float64)
    return _out(np.mod(a, TWO_PI), a.ndim == 0)


# --- ellipse -----------------------------------------------------------------------


def _odd_tail(x: Floats, sign: float, sin_x: Floats | None = None) -> Floats:
    """x - sin x (``sign`` = -1) or sinh x - x (``sign`` = +1) without cancellation.

    For |x| < 1 the odd series x^3/3! + sign x^5/5! + ... (9 terms: below 1e-18
    relative), else the direct difference. Near periapsis of a near-parabolic conic,
    E - e sin E and e sinh F - F are tiny differences of nearly equal numbers; written as
    (1 - e) sin E + (E - sin E) and (e - 1) sinh F + (sinh F - F) they keep full relative
    precision (the accuracy tests against mpmath at e = 1 -+ 1e-12 need it). ``sin_x``,
    if given, is ``np.sin(x)`` already computed (the same bits as computing it here).
    """
    small = np.abs(x) < 1.0
    xs = np.where(small, x, 0.0)
    x2 = xs * xs
    term = xs * x2 / 6.0
    series = np.zeros_like(xs)
    for k in range(2, 11):
        series += term
        term = sign * term * x2 / ((2 * k) * (2 * k + 1))
    big = np.where(small, 0.0, x)
    if sign > 0:
        direct = np.sinh(big) - big
    else:
        direct = big - (np.sin(big) if sin_x is None else sin_x)
    return np.where(small, series, direct)


def _elliptic_mean(E: Floats, e: Floats) -> Floats:
    """E - e sin E, as (1 - e) sin E + (E - sin E) where the direct form would cancel.

    The ratio of the terms to the result is about 1 / ((1 - e) + E^2/6); where that
    exceeds 4 the slower cancellation-free form is used (full precision as e -> 1, E -> 0).
    """
    E1 = np.atleast_1d(E)
    e1 = np.broadcast_to(e, E1.shape)
    out = E1 - e1 * np.sin(E1)
    near = np.flatnonzero((1.0 - e1) + E1 * E1 / 6.0 < 0.25)
    if near.size:
        En, en = E1.flat[near], e1.flat[near]
        out.flat[near] = (1.0 - en) * np.sin(En) + _odd_tail(En, -1.0)
    return out.reshape(np.shape(E))


def _hyperbolic_mean(F: Floats, e: Floats) -> Floats:
    """e sinh F - F, as (e - 1) sinh F + (sinh F - F) where the direct form would cancel."""
    F1 = np.atleast_1d(F)
    e1 = np.broadcast_to(e, F1.shape)
    out = e1 * np.sinh(F1) - F1
    near = np.flatnonzero((e1 - 1.0) + F1 * F1 / 6.0 < 0.25)
    if near.size:
        Fn, en = F1.flat[near], e1.flat[near]
        out.flat[near] = (en - 1.0) * np.sinh(Fn) + _odd_tail(Fn, 1.0)
    return out.reshape(np.shape(F))


#: Grid points per radian of the start of Markley's correction (``_markley``): a power of
#: two, so a grid point is exact in float64; half a step (3e-5 rad) is small beside the
#: starter's own error (its correction was at most 4.4e-4 rad on 2.1e6 random values, and
#: the guard takes over above 1e-3).
_GRID_PER_RAD = 2.0**14


@functools.lru_cache(maxsize=1)
def _sin_cos_grid() -> tuple[Floats, Floats]:
    """np.sin and np.cos on the grid of ``_GRID_PER_RAD`` over [0, 4] rad (Markley's E for
    M in [0, pi] lies in [0, pi]), read-only; 65,537 values each, built once (2 ms)."""
    x = np.arange(int(4.0 * _GRID_PER_RAD) + 1) / _GRID_PER_RAD
    tables = np.sin(x), np.cos(x)
    for table in tables:
        table.flags.writeable = False
    return tables


def _workspace(n: int) -> tuple[Floats, NDArray[np.intp]]:
    """Work arrays for ``_elliptic`` on up to ``n`` values: 11 rows of floats, one of ints."""
    return np.empty((11, n)), np.empty(n, dtype=np.intp)


def _markley(M: Floats, e: Floats,
             work: tuple[Floats, NDArray[np.intp]] | None = None) -> tuple[Floats, Floats]:
    """E for M in [0, pi] by Markley's non-iterative method, and the last correction.

    F. L. Markley, "Kepler equation solver", Celestial Mechanics and Dynamical Astronomy
    63 (1995) 101-111: a Pade-based cubic starter and one fifth-order correction
    (equations recalled from the paper, "from memory"; the tests check the result against
    mpmath at 50 digits, so a slip here cannot pass unseen). M, e: 1-d arrays of one
    length, never written; ``work`` (from ``_workspace``, rows 0-8 used) holds every
    intermediate, so a block allocates nothing but the few values near periapsis. The
    two arrays returned are rows of ``work``.
    """
    # In-place operations on the rows of ``work``: the same operations in the same order
    # as the plain formulas, so the same bits, with no temporaries to allocate (a
    # temporary of 32k values or more is mapped afresh by malloc and faulted in page by
    # page; with threads the allocations also contend).
    n = M.size
    rows, at = work if work is not None else _workspace(n)
    W = rows[:, :n]
    at = at[:n]
    pi2 = np.pi * np.pi
    one_m_e = np.subtract(1.0, e, out=W[0])
    alpha = np.subtract(np.pi, M, out=W[1])  # (3 pi^2 + 1.6 pi (pi - M) / (1 + e)) / (pi^2 - 6)
    alpha *= 1.6 * np.pi
    u = np.add(e, 1.0, out=W[2])
    alpha /= u
    alpha += 3.0 * pi2
    alpha /= pi2 - 6.0
    d = np.multiply(one_m_e, 3.0, out=W[3])  # d = 3 (1 - e) + alpha e
    d += np.multiply(alpha, e, out=u)
    M2 = np.multiply(M, M, out=W[4])
    ad = np.multiply(alpha, d, out=alpha)
    q = np.multiply(ad, 2.0, out=W[5])  # q = 2 alpha d (1 - e) - M^2
    q *= one_m_e
    q -= M2
    r = np.multiply(ad, 3.0, out=W[6])  # r = 3 alpha d (d - 1 + e) M + M^3
    r *= np.subtract(d, one_m_e, out=u)
    r *= M
    r += np.multiply(M2, M, out=u)
    w = np.multiply(q, q, out=W[7])  # w = cbrt(|r| + sqrt(q^3 + r^2))^2
    w *= q
    w += np.multiply(r, r, out=u)
    np.sqrt(w, out=w)
    np.abs(r, out=u)
    u += w
    np.cbrt(u, out=w)
    w *= w
    den = np.multiply(w, w, out=u)  # E = (2 r w / (w^2 + w q + q^2) + M) / d
    den += np.multiply(w, q, out=M2)
    den += np.multiply(q, q, out=M2)
    E = np.multiply(r, 2.0, out=W[8])
    E *= w
    E /= den
    E += M
    E /= d
    # Fifth-order correction (Markley eq. 29-31) from E0, the starter rounded to the grid
    # of ``_sin_cos_grid``: sin E0 and cos E0 are then two table reads holding np.sin and
    # np.cos of E0 (so f0 = E0 - e sin E0 - M is as exact as before), where computing
    # them took 9-13 ns a value each (numpy's float64 sin and cos are not vectorised).
    # Rounding moves the start by at most half a grid step, far inside the correction's
    # reach wherever the slope 1 - e cos E is not small. Where it is (e -> 1, E -> 0:
    # the cancellation-free forms are needed), the start stays E and f0 and f1 are redone
    # in cancellation-free forms, f1 = (1 - e) + 2 e sin^2(E/2).
    sin_grid, cos_grid = _sin_cos_grid()
    E0 = np.multiply(E, _GRID_PER_RAD, out=W[3])
    np.rint(E0, out=E0)
    np.clip(E0, 0.0, sin_grid.size - 1, out=E0)
    np.copyto(at, E0, casting="unsafe")  # whole numbers: the cast is exact
    E0 *= 1.0 / _GRID_PER_RAD  # an integer times a power of two: exact
    f2 = np.take(sin_grid, at, out=W[1], mode="clip")  # "clip": in range, so no checks
    f2 *= e
    f3 = np.take(cos_grid, at, out=W[2], mode="clip")
    f3 *= e
    f0 = np.subtract(E0, f2, out=W[4])
    f0 -= M
    f1 = np.subtract(1.0, f3, out=W[5])
    t = np.multiply(E, E, out=W[6])
    t /= 6.0
    t += one_m_e
    near = np.flatnonzero(t < 0.25)
    if near.size:
        En, en = E[near], e[near]
        sn = np.sin(En)
        E0[near] = En
        f2[near] = en * sn
        f0[near] = ((1.0 - en) * sn + _odd_tail(En, -1.0, sn)) - M[near]
        # 2 e sin^2(E/2) from tan(E/2), vectorised in numpy where cos is not.
        h = np.tan(0.5 * En)
        h *= h
        h /= h + 1.0
        h *= 2.0 * en
        f1[near] = (1.0 - en) + h
        f3[near] = en - h
    neg_f0 = np.negative(f0, out=f0)
    half_f2 = np.multiply(f2, 0.5, out=W[7])
    x = np.multiply(neg_f0, -0.5, out=W[6])  # d3 = -f0 / (f1 - 0.5 f0 f2 / f1)
    x *= f2
    x /= f1
    np.subtract(f1, x, out=x)
    d3 = np.divide(neg_f0, x, out=x)
    y = np.multiply(d3, f3, out=W[0])  # d4 = -f0 / (f1 + d3 (0.5 f2 + d3 f3 / 6))
    y /= 6.0
    y += half_f2
    y *= d3
    y += f1
    d4 = np.divide(neg_f0, y, out=y)
    z = np.multiply(d4, f2, out=d3)  # d5 = -f0 / (f1 + d4 (0.5 f2 + d4 (f3/6 - d4 f2/24)))
    z /= 24.0
    np.subtract(np.divide(f3, 6.0, out=f2), z, out=z)
    z *= d4
    z += half_f2
    z *= d4
    z += f1
    d5 = np.divide(neg_f0, z, out=z)
    E0 += d5
    return E0, d5


#: Elements per block for large arrays. A block's ufunc calls must be long enough (about
#: 20 us each at 65,536 values) that two threads gain from numpy releasing the GIL: with
#: 32k blocks, handing the GIL between the threads cost about what the second core gave.
#: Larger blocks spill the work arrays (``_workspace``, 11 rows) out of the core's cache
#: (docs/performance.md, "Kepler solve, session 6").
_BLOCK = 65_536


def _cores() -> int:
    try:
        return len(os.sched_getaffinity(0))
    except AttributeError:  # not on Linux
        return os.cpu_count() or 1


#: Markley's last (fifth-order) step, rad, above which the residual is measured and Newton
#: steps taken. Below it the error left is far below rounding: on 2e6 random values (e
#: up to 0.99 and 1 - 1e-12 .. 1 - 0.1) every last step was below 1e-3 and every residual
#: without the guard below 9e-16 rad, while at the earlier 1e-4 the guard re-measured more
#: than half of the bench's values (docs/performance.md, "Hot paths after the 2026-12-03
#: work"); tests/test_orbit_kepler_mpmath.py checks the values it no longer measures.
_GUARD_STEP = 1e-3


def _elliptic(M: Floats, e: Floats, tol: float, out: Floats | None = None,
              work: tuple[Floats, NDArray[np.intp]] | None = None) -> Floats:
    """E for any M (1-d, same length as e): reduce to [-pi, pi], Markley on |M|, the guard.

    Written into ``out`` if given; ``work`` as for ``_markley`` (rows 0-10 used).
    """
    n = M.size
    work = work if work is not None else _workspace(n)
    W = work[0][:, :n]
    turns = np.multiply(M, 1.0 / TWO_PI, out=W[9])
    np.rint(turns, out=turns)
    Mr = np.multiply(turns, TWO_PI, out=W[9])
    np.subtract(M, Mr, out=Mr)  # [-pi, pi], as accurate as float64 allows
    Ma = np.abs(Mr, out=W[10])
    E, last = _markley(Ma, e, work)
    check = np.flatnonzero(np.abs(last, out=last) > _GUARD_STEP)
    if check.size:
        Ec, Mc, ec = E[check], Ma[check], e[check]
        # Each value stops at its own convergence, so it never depends on the others in
        # its array (a body solved alone or with the rest of its scene: the same bits).
        for _ in range(8):
            f = _elliptic_mean(Ec, ec) - Mc
            bad = np.abs(f) > tol
            if not np.any(bad):
                break
            Ec = np.where(bad, Ec - f / ((1.0 - ec) + 2.0 * ec * np.sin(0.5 * Ec) ** 2), Ec)
        E[check] = Ec
    # E in the turn of M: M + (E - |Mr|) * sign keeps the small difference exact.
    E -= Ma
    np.copysign(E, Mr, out=E)
    return np.add(M, E, out=out)


def _elliptic_blocks(M: Floats, e: Floats, tol: float, threads: int | None = None) -> Floats:
    """``_elliptic`` over blocks of a large array, on ``threads`` (default one per core).

    Each block is solved on its own (the guard's Newton steps run per block), into the
    result, with the work arrays of its thread. The threads take the next block as they
    finish one (a core that is busy elsewhere then takes fewer), and run in a copy of the
    caller's context, so its ``np.errstate`` holds there.
    """
    Mf = np.ascontiguousarray(M).reshape(-1)
    ef = np.ascontiguousarray(e).reshape(-1)
    E = np.empty_like(Mf)
    starts = range(0, Mf.size, _BLOCK)
    _sin_cos_grid()  # built once here, not by two threads at once

    def solve(blocks: Iterator[int]) -> None:
        work = _workspace(_BLOCK)
        for i in blocks:  # shared among the threads: each next() holds the GIL
            j = i + _BLOCK
            _elliptic(Mf[i:j], ef[i:j], tol, out=E[i:j], work=work)

    threads = min(threads or _cores(), len(starts))
    if threads <= 1:
        solve(iter(starts))
    else:
        import concurrent.futures

        blocks = iter(starts)
        with concurrent.futures.ThreadPoolExecutor(max_workers=threads) as pool:
            runs = [pool.submit(contextvars.copy_context().run, solve, blocks)
                    for _ in range(threads)]
            for run in runs:
                run.result()
    return E.reshape(M.shape)


@_underflow_is_fine
def eccentric_anomaly(M: ArrayLike, e: ArrayLike, tol: float = 1e-13) -> float | Floats:
    """Eccentric anomaly E solving Kepler's equation M = E - e sin E, for 0 <= e < 1.

    Vectorised over M and e (broadcast together). E lies in the same revolution as M
    (|E - M| <= e). Markley's method (above) gives about 1e-15 rad. Its last step is of
    fifth order, so where that step was tiny the error left is far below rounding; only
    values whose last step exceeded 1e-3 rad get their residual measured, and Newton
    steps while it exceeds ``tol``. Raises AnomalyError for NaN/infinite M or e outside
    [0, 1). For |M| far beyond 2 pi the float64 spacing of E itself (2.2e-16 |M|)
    limits what any solver can return. Arrays larger than one block are solved block
    by block on every core.
    """
    M_in = np.asarray(M, dtype=np.float64)
    e_in = np.asarray(e, dtype=np.float64)
    scalar = M_in.ndim == 0 and e_in.ndim == 0
    _check_finite("mean anomaly M", M_in)
    _check_finite("eccentricity e", e_in)
    if np.any((e_in < 0.0) | (e_in >= 1.0)):
        raise AnomalyError("eccentric_anomaly needs 0 <= e < 1 (an ellipse or circle)")
    M_b, e_b = np.broadcast_arrays(M_in, e_in)
    if M_b.size > _BLOCK:
        return _elliptic_blocks(M_b, e_b, tol)
    E = _elliptic(M_b.reshape(-1), e_b.reshape(-1), tol)
    return _out(E.reshape(M_b.shape), scalar)


@_underflow_is_fine
def kepler_residual(E: ArrayLike, M: ArrayLike, e: ArrayLike) -> Floats:
    """|E - e sin E - M| measured on M reduced to [-pi, pi) (the contract's measure)."""
    E_a = np.asarray(E, dtype=np.float64)
    M_a = np.asarray(M, dtype=np.float64)
    Mr = np.mod(M_a + np.pi, TWO_PI) - np.pi
    Er = E_a - (M_a - Mr)
    return np.abs(Er - np.asarray(e) * np.sin(Er) - Mr)


def true_from_eccentric(E: ArrayLike, e: ArrayLike) -> float | Floats:
    """True anomaly from eccentric anomaly (Vallado eq. 2-9, half-angle form), same turn."""
    E_a = np.asarray(E, dtype=np.float64)
    e_a = np.asarray(e, dtype=np.float64)
    k = np.round(E_a / TWO_PI)
    Er = E_a - k * TWO_PI
    nu = 2.0 * np.arctan2(np.sqrt(1.0 + e_a) * np.sin(Er / 2.0),
                          np.sqrt(1.0 - e_a) * np.cos(Er / 2.0))
    return _out(nu + k * TWO_PI, E_a.ndim == 0 and e_a.ndim == 0)


def eccentric_from_true(nu: ArrayLike, e: ArrayLike) -> float | Floats:
    """Eccentric anomaly from true anomaly (Vallado eq. 2-9), in the same turn as nu."""
    nu_a = np.asarray(nu, dtype=np.float64)
    e_a = np.asarray(e, dtype=np.float64)
    k = np.round(nu_a / TWO_PI)
    nur = nu_a - k * TWO_PI
    E = 2.0 * np.arctan2(np.sqrt(1.0 - e_a) * np.sin(nur / 2.0),
                         np.sqrt(1.0 + e_a) * np.cos(nur / 2.0))
    return _out(E + k * TWO_PI, nu_a.ndim == 0 and e_a.ndim == 0)


# --- hyperbola ---------------------------------------------------------------------


@_underflow_is_fine
def hyperbolic_anomaly(M: ArrayLike, e: ArrayLike, tol: float = 1e-13) -> float | Floats:
    """Hyperbolic anomaly F solving M = e sinh F - F, for e > 1.

    Vectorised. The residual |e sinh F - F - M| is driven below ``tol`` |M| (so also
    below the contract's ``tol`` max(1, |M|), and relative even for the tiny M near
    periapsis of a near-parabolic hyperbola) by Newton steps from a starter that is good
    for both small and large |M| (Vallado sec. 2.2.6 uses Newton likewise); the residual
    is evaluated in a cancellation-free form. Raises AnomalyError for NaN/infinite input
    or e <= 1.
    """
    M_in = np.asarray(M, dtype=np.float64)
    e_in = np.asarray(e, dtype=np.float64)
    scalar = M_in.ndim == 0 and e_in.ndim == 0
    _check_finite("mean anomaly M", M_in)
    _check_finite("eccentricity e", e_in)
    if np.any(e_in <= 1.0):
        raise AnomalyError("hyperbolic_anomaly needs e > 1 (a hyperbola)")
    M_b, e_b = np.broadcast_arrays(M_in, e_in)
    sign = np.where(M_b < 0.0, -1.0, 1.0)
    Ma = np.abs(M_b)
    # Start from an upper bound of the root: e sinh F - F is convex for F >= 0, so Newton
    # from above falls monotonically onto the root with no overshoot. Bounds: the root is
    # below M/(e-1) (as e sinh F - F >= (e-1)F) and below cbrt(6M/e) (as it is >= e F^3/6),
    # hence also below asinh((M + either)/e).
    with np.errstate(divide="ignore"):
        bound = np.minimum(Ma / (e_b - 1.0), np.cbrt(6.0 * Ma / e_b))
    F = np.minimum(bound, np.arcsinh((Ma + bound) / e_b))
    for _ in range(100):
        f = _hyperbolic_mean(F, e_b) - Ma
        bad = np.abs(f) > tol * Ma
        if not np.any(bad):
            break
        # The slope e cosh F - 1; (e - 1) cosh F + 2 sinh^2(F/2) where that would cancel.
        slope = np.atleast_1d(e_b * np.cosh(F) - 1.0)
        near = np.flatnonzero(np.atleast_1d(slope < 0.25))
        if near.size:
            Fn = np.broadcast_to(F, slope.shape).flat[near]
            en = np.broadcast_to(e_b, slope.shape).flat[near]
            slope.flat[near] = (en - 1.0) * np.cosh(Fn) + 2.0 * np.sinh(0.5 * Fn) ** 2
        F = np.where(bad, F - f / slope.reshape(np.shape(F)), F)
    return _out(sign * F, scalar)


def true_from_hyperbolic(F: ArrayLike, e: ArrayLike) -> float | Floats:
    """True anomaly from hyperbolic anomaly (Vallado eq. 2-35, half-angle form)."""
    F_a = np.asarray(F, dtype=np.float64)
    e_a = np.asarray(e, dtype=np.float64)
    nu = 2.0 * np.arctan(np.sqrt((e_a + 1.0) / (e_a - 1.0)) * np.tanh(F_a / 2.0))
    return _out(nu, F_a.ndim == 0 and e_a.ndim == 0)


def hyperbolic_from_true(nu: ArrayLike, e: ArrayLike) -> float | Floats:
    """Hyperbolic anomaly from true anomaly; |nu| must be below the asymptote angle."""
    nu_a = np.asarray(nu, dtype=np.float64)
    e_a = np.asarray(e, dtype=np.float64)
    t = np.sqrt((e_a - 1.0) / (e_a + 1.0)) * np.tan(nu_a / 2.0)
    if np.any(np.abs(t) >= 1.0) or np.any(np.abs(nu_a) >= np.pi):
        raise AnomalyError("true anomaly is beyond the hyperbola's asymptotes")
    return _out(2.0 * np.arctanh(t), nu_a.ndim == 0 and e_a.ndim == 0)


def asymptote_true_anomaly(e: ArrayLike) -> float | Floats:
    """The true anomaly of the outgoing asymptote, arccos(-1/e), for e >= 1 (pi at e = 1)."""
    e_a = np.asarray(e, dtype=np.float64)
    return _out(np.arccos(-1.0 / e_a), e_a.ndim == 0)


# --- parabola (Barker) -------------------------------------------------------------


@_underflow_is_fine
def parabolic_anomaly(M: ArrayLike) -> float | Floats:
    """D = tan(nu/2) solving Barker's equation D + D^3/3 = M (Vallado sec. 2.2.5).

    Closed form (Cardano): with w = 3M/2, D = cbrt(w + sqrt(w^2 + 1)) - 1/that.
    For negative M the odd symmetry keeps the subtraction well conditioned.
    """
    M_a = np.asarray(M, dtype=np.float64)
    _check_finite("mean anomaly M", M_a)
    w = 1.5 * np.abs(M_a)
    A = np.cbrt(w + np.sqrt(w * w + 1.0))
    D = A - 1.0 / A
    # One Newton step tidies the rounding of the subtraction for small M.
    D = D - (D + D**3 / 3.0 - np.abs(M_a)) / (1.0 + D * D)
    return _out(np.sign(M_a) * D, M_a.ndim == 0)


# --- any conic ---------------------------------------------------------------------


@_underflow_is_fine
def mean_from_true(nu: ArrayLike, e: ArrayLike) -> float | Floats:
    """Mean anomaly of the conic from its true anomaly (ellipse, parabola or hyperbola).

    The elliptic result stays in the same turn as nu; for hyperbolas |nu| must be inside
    the asymptotes. The "mean anomaly" is the conic's own: see the module glossary.
    """
    nu_a = np.asarray(nu, dtype=np.float64)
    e_a = np.asarray(e, dtype=np.float64)
    scalar = nu_a.ndim == 0 and e_a.ndim == 0
    nu_b, e_b = np.broadcast_arrays(nu_a, e_a)
    out = np.empty(nu_b.shape)
    elliptic = e_b < 1.0
    parabolic = e_b == 1.0
    hyperbolic = e_b > 1.0
    if np.any(elliptic):
        E = np.asarray(eccentric_from_true(nu_b[elliptic], e_b[elliptic]))
        out[elliptic] = _elliptic_mean(E, e_b[elliptic])
    if np.any(parabolic):
        D = np.tan(nu_b[parabolic] / 2.0)
        out[parabolic] = D + D**3 / 3.0
    if np.any(hyperbolic):
        F = np.asarray(hyperbolic_from_true(nu_b[hyperbolic], e_b[hyperbolic]))
        out[hyperbolic] = _hyperbolic_mean(F, e_b[hyperbolic])
    return _out(out, scalar)


@_underflow_is_fine
def true_from_mean(M: ArrayLike, e: ArrayLike) -> float | Floats:
    """True anomaly of the conic from its mean anomaly (inverse of ``mean_from_true``).

    The elliptic result is in the same turn as M.
    """
    M_a = np.asarray(M, dtype=np.float64)
    e_a = np.asarray(e, dtype=np.float64)
    scalar = M_a.ndim == 0 and e_a.ndim == 0
    M_b, e_b = np.broadcast_arrays(M_a, e_a)
    out = np.empty(M_b.shape)
    elliptic = e_b < 1.0
    parabolic = e_b == 1.0
    hyperbolic = e_b > 1.0
    if np.any(elliptic):
        E = eccentric_anomaly(M_b[elliptic], e_b[elliptic])
        out[elliptic] = true_from_eccentric(E, e_b[elliptic])
    if np.any(parabolic):
        out[parabolic] = 2.0 * np.arctan(parabolic_anomaly(M_b[parabolic]))
    if np.any(hyperbolic):
        F = hyperbolic_anomaly(M_b[hyperbolic], e_b[hyperbolic])
        out[hyperbolic] = true_from_hyperbolic(F, e_b[hyperbolic])
    return _out(out, scalar)
