"""Two-body propagation of a state vector over time, for every conic, vectorised.

Universal-variable formulation (Vallado, *Fundamentals of Astrodynamics and
Applications*, 4th ed., sec. 2.3, algorithm 8 "KEPLER"; Curtis, *Orbital Mechanics for
Engineering Students*, sec. 3.7). Symbols:
    chi    universal anomaly, sqrt(m)
    alpha  1/a, 1/m (positive ellipse, zero parabola, negative hyperbola)
    psi    chi^2 alpha
    c2, c3 Stumpff functions of psi
    f, g   Lagrange coefficients
"""

from __future__ import annotations

import numpy as np
from numpy.typing import ArrayLike, NDArray

from .elements import OrbitError

Floats = NDArray[np.float64]


def stumpff_c2_c3(psi: ArrayLike) -> tuple[Floats, Floats]:
    """Stumpff functions c2 = (1 - cos sqrt psi) / psi, c3 = (sqrt psi - sin sqrt psi) / psi^1.5.

    Half-angle forms avoid cancellation; a series serves |psi| < 1.
    """
    psi = np.asarray(psi, dtype=np.float64)
    c2 = np.empty_like(psi)
    c3 = np.empty_like(psi)
    small = np.abs(psi) < 1.0
    pos = psi >= 1.0
    neg = psi <= -1.0
    if np.any(small):
        x = psi[small]
        # sum_k (-x)^k / (2k+2)! and / (2k+3)!, 12 terms: error below 1e-20 for |x| < 1.
        s2 = np.zeros_like(x)
        s3 = np.zeros_like(x)
        term2 = np.full_like(x, 0.5)
        term3 = np.full_like(x, 1.0 / 6.0)
        with np.errstate(under="ignore"):  # terms of a tiny psi underflow harmlessly to 0
            for k in range(12):
                s2 += term2
                s3 += term3
                term2 = term2 * (-x) / ((2 * k + 3) * (2 * k + 4))
                term3 = term3 * (-x) / ((2 * k + 4) * (2 * k + 5))
        c2[small] = s2
        c3[small] = s3
    if np.any(pos):
        x = psi[pos]
        s = np.sqrt(x)
        c2[pos] = 2.0 * np.sin(s / 2.0) ** 2 / x
        c3[pos] = (s - np.sin(s)) / (x * s)
    if np.any(neg):
        x = psi[neg]
        s = np.sqrt(-x)
        c2[neg] = -2.0 * np.sinh(s / 2.0) ** 2 / x
        c3[neg] = (np.sinh(s) - s) / (-x * s)
    return c2, c3


def _dot(a: Floats, b: Floats) -> Floats:
    return np.einsum("...i,...i->...", a, b)


def _kepler_universal(chi: Floats, r0n: Floats, rv: Floats, alpha: Floats, dt: Floats,
                      sqmu: float) -> tuple[Floats, Floats, Floats, Floats, Floats]:
    """psi, c2, c3, the radius r (= dG/dchi) and f = sqrt(mu) dt - G(chi) at ``chi``."""
    psi = chi * chi * alpha
    c2, c3 = stumpff_c2_c3(psi)
    r = chi * chi * c2 + rv / sqmu * chi * (1.0 - psi * c3) + r0n * (1.0 - psi * c2)
    f = sqmu * dt - chi**3 * c3 - rv / sqmu * chi * chi * c2 - r0n * chi * (1.0 - psi * c3)
    return psi, c2, c3, r, f


def _laguerre_conway(chi: Floats, r0n: Floats, rv: Floats, alpha: Floats, dt: Floats,
                     sqmu: float) -> Floats:
    """The universal variable by Laguerre's method (n = 5), for the states where Newton's
    method did not converge (it can diverge on near-rectilinear ellipses, e -> 1, whose
    radius, the derivative, is tiny at periapsis).

    B. A. Conway, "An improved algorithm due to Laguerre for the solution of Kepler's
    equation", Celestial Mechanics 39 (1986) 199-211 ("from memory"): with
    G(chi) = chi^3 c3 + rv/sqrt(mu) chi^2 c2 + r0 chi (1 - psi c3) - sqrt(mu) dt,
    G' = r and G'' = rv/sqrt(mu) (1 - psi c2) + (1 - alpha r0) chi (1 - psi c3), the
    step is -n G / (G' + sqrt(|(n - 1)^2 G'^2 - n (n - 1) G G''|)).
    """
    n = 5.0
    todo = np.ones(chi.shape, dtype=bool)
    for _ in range(200):
        psi, c2, c3, r, f = _kepler_universal(chi, r0n, rv, alpha, dt, sqmu)
        d2 = rv / sqmu * (1.0 - psi * c2) + (1.0 - alpha * r0n) * chi * (1.0 - psi * c3)
        step = n * f / (r + np.sqrt(np.abs((n - 1.0) ** 2 * r * r + n * (n - 1.0) * f * d2)))
        chi = np.where(todo, chi + step, chi)
        todo = todo & (np.abs(step) > 1e-14 * np.abs(chi) + 1e-12)
        if not np.any(todo):
            return chi
    raise OrbitError("universal-variable iteration did not converge")


def _propagate_flat(r0: Floats, v0: Floats, mu: float, dt: Floats) -> tuple[Floats, Floats]:
    """r0, v0 of shape (K, 3) and dt of shape (K,), one time per state."""
    sqmu = np.sqrt(mu)
    r0n = np.sqrt(_dot(r0, r0))
    v2 = _dot(v0, v0)
    rv = _dot(r0, v0)
    alpha = 2.0 / r0n - v2 / mu
    h = np.sqrt(_dot(np.cross(r0, v0), np.cross(r0, v0)))
    if np.any(h <= 1e-14 * r0n * np.sqrt(v2)):
        raise OrbitError("rectilinear orbit (h = 0) cannot be propagated")
    dt = dt.copy()
    ell = alpha * r0n > 1e-12
    hyp = alpha * r0n < -1e-12
    par = ~(ell | hyp)
    chi = np.zeros_like(dt)
    if np.any(ell):
        # Whole periods change nothing: reduce dt so chi stays small (Vallado alg. 8).
        period = 2.0 * np.pi / np.sqrt(mu * alpha[ell] ** 3)
        dt[ell] = dt[ell] - period * np.trunc(dt[ell] / period)
        chi[ell] = sqmu * dt[ell] * alpha[ell]
    if np.any(hyp):
        a = 1.0 / alpha[hyp]
        s = np.where(dt[hyp] >= 0, 1.0, -1.0)
        arg = (-2.0 * mu * alpha[hyp] * dt[hyp]) / (
            rv[hyp] + s * np.sqrt(-mu * a) * (1.0 - r0n[hyp] * alpha[hyp]))
        with np.errstate(invalid="ignore", divide="ignore"):
            guess = s * np.sqrt(-a) * np.log(arg)
        chi[hyp] = np.where(np.isfinite(guess) & (arg > 0), guess, sqmu * dt[hyp] / r0n[hyp])
    if np.any(par):
        p = h[par] ** 2 / mu
        s = 0.5 * np.arctan2(1.0, 3.0 * np.sqrt(mu / p**3) * dt[par])  # (1/2) acot(...)
        w = np.arctan(np.cbrt(np.tan(s)))
        with np.errstate(divide="ignore"):
            guess = np.sqrt(p) * 2.0 / np.tan(2.0 * w)
        chi[par] = np.where(np.isfinite(guess), guess, 0.0)
    # A bracket for chi: dchi/dt = sqrt(mu)/r and r >= periapsis q = p/(1 + e), so chi lies
    # between 0 and sqrt(mu) dt / q. Newton steps that leave it are replaced by bisection,
    # so the iteration converges from any guess (the time equation increases with chi).
    p_h = h * h / mu
    q = p_h / (1.0 + np.sqrt(np.maximum(1.0 - p_h * alpha, 0.0)))
    reach = sqmu * dt / q * (1.0 + 1e-9)
    lo, hi = np.minimum(reach, 0.0) - 1e-12, np.maximum(reach, 0.0) + 1e-12
    chi = np.clip(chi, lo, hi)
    start = chi.copy()  # where Laguerre-Conway starts, should bracketed Newton not settle
    todo = np.ones(dt.shape, dtype=bool)
    for _ in range(200):
        psi = chi * chi * alpha
        c2, c3 = stumpff_c2_c3(psi)
        r = chi * chi * c2 + rv / sqmu * chi * (1.0 - psi * c3) + r0n * (1.0 - psi * c2)
        f = sqmu * dt - chi**3 * c3 - rv / sqmu * chi * chi * c2 - r0n * chi * (1.0 - psi * c3)
        lo = np.where(f > 0, chi, lo)
        hi = np.where(f < 0, chi, hi)
        newton = chi + f / r
        inside = (newton > lo) & (newton < hi)
        step = np.where(inside, newton, 0.5 * (lo + hi)) - chi
        chi = np.where(todo, chi + step, chi)
        todo = todo & (np.abs(step) > 1e-14 * np.abs(chi) + 1e-12)
        if not np.any(todo):
            break
    else:
        chi[todo] = _laguerre_conway(start[todo], r0n[todo], rv[todo], alpha[todo], dt[todo],
                                     sqmu)
    psi = chi * chi * alpha
    c2, c3 = stumpff_c2_c3(psi)
    r = chi * chi * c2 + rv / sqmu * chi * (1.0 - psi * c3) + r0n * (1.0 - psi * c2)
    f = 1.0 - chi * chi / r0n * c2
    g = dt - chi**3 / sqmu * c3
    gdot = 1.0 - chi * chi / r * c2
    fdot = sqmu / (r * r0n) * chi * (psi * c3 - 1.0)
    r1 = f[:, None] * r0 + g[:, None] * v0
    v1 = fdot[:, None] * r0 + gdot[:, None] * v0
    return r1, v1


def propagate(r: ArrayLike, v: ArrayLike, mu: float, dt: ArrayLike) -> tuple[Floats, Floats]:
    """State (r in m, v in m/s) after ``dt`` seconds of two-body motion, any conic.

    Shapes: r, v (3,) with scalar dt give (3,); (N, 3) with scalar dt give (N, 3);
    (3,) with dt (T,) give (T, 3); (N, 3) with dt (T,) give (T, N, 3).
    """
    r_a = np.asarray(r, dtype=np.float64)
    v_a = np.asarray(v, dtype=np.float64)
    dt_a = np.asarray(dt, dtype=np.float64)
    if r_a.shape != v_a.shape or r_a.shape[-1:] != (3,) or r_a.ndim > 2:
        raise ValueError("r and v must both have shape (3,) or (N, 3)")
    if dt_a.ndim > 1:
        raise ValueError("dt must be a scalar or a 1-d array of times")
    if not (np.all(np.isfinite(r_a)) and np.all(np.isfinite(v_a)) and np.all(np.isfinite(dt_a))):
        raise OrbitError("r, v and dt must be finite")
    if not mu > 0:
        raise OrbitError("mu must be positive (m^3/s^2)")
    R = r_a.reshape(-1, 3)
    V = v_a.reshape(-1, 3)
    T = dt_a.reshape(-1)
    n, t = R.shape[0], T.shape[0]
    r1, v1 = _propagate_flat(np.tile(R, (t, 1)), np.tile(V, (t, 1)), float(mu),
                             np.repeat(T, n))
    shape = dt_a.shape + r_a.shape
    return r1.reshape(shape), v1.reshape(shape)
