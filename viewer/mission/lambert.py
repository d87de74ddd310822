"""Lambert's problem: the conic from r1 to r2 in a given time of flight, vectorised.

The method is Izzo's (D. Izzo, "Revisiting Lambert's problem", Celestial Mechanics and
Dynamical Astronomy 121, 1-15, 2015): the problem is reduced to one non-dimensional time
of flight T(x; lambda, M), solved for x by Householder's third-order iteration from Izzo's
initial guesses, and the velocities follow from x in closed form. Every function works on
arrays of cases at once (leading shape ``(...)``, vectors ``(..., 3)``); scalars work too.

Glossary (Izzo 2015, sections 2-3):

* ``c`` chord |r2 - r1|; ``s`` semi-perimeter (|r1| + |r2| + c) / 2.
* ``lam`` (lambda) = +-sqrt(1 - c / s), negative when the transfer angle exceeds 180 deg.
* ``T`` non-dimensional time of flight sqrt(2 mu / s^3) * tof.
* ``x`` the unknown (x < 1 ellipse, x = 1 parabola, x > 1 hyperbola); ``y`` = sqrt(1 -
  lam^2 (1 - x^2)).
* ``M`` whole revolutions before arrival. With M >= 1 there are two solutions when T
  exceeds the minimum T_min(M), on Izzo's "left" (x < x_Tmin) and "right" branches.
* direction: "prograde" means the angular momentum has a positive z component (the
  transfer angle is measured counter-clockwise about +z); "retrograde" the opposite.

Degenerate geometry is refused rather than guessed: with r1 and r2 on one line through the
centre (transfer angle 0 or 180 deg, to within ``COLLINEAR_SINE``) the plane of the
transfer is not fixed by r1 and r2, and ``solve`` marks those cases as having no solution
(``LambertResult.collinear``).
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any

import numpy as np

#: |sin(transfer angle)| below which r1 and r2 are taken as collinear (plane undefined).
COLLINEAR_SINE = 1e-7
#: Householder iterations at most, and the tolerance on x.
MAX_ITERATIONS = 35
X_TOLERANCE = 1e-13
#: Distances from x = 1 below which T uses Battin's series, and Lagrange's form (Izzo 2015).
_BATTIN = 0.01
_LAGRANGE = 0.2


@dataclass(frozen=True)
class LambertResult:
    """Velocities at r1 and r2 (m/s, shape (..., 3)); ``ok`` where a solution was found.

    Where ``ok`` is False, v1 and v2 are NaN: no solution with these revolutions, the
    iteration did not converge, or r1 and r2 are collinear (``collinear``)."""

    v1: np.ndarray
    v2: np.ndarray
    ok: np.ndarray
    collinear: np.ndarray


def _geometry(mu: Any, r1: Any, r2: Any, tof: Any, prograde: bool) -> dict[str, np.ndarray]:
    r1 = np.asarray(r1, dtype=np.float64)
    r2 = np.asarray(r2, dtype=np.float64)
    shape = np.broadcast_shapes(r1.shape[:-1], r2.shape[:-1], np.shape(tof), np.shape(mu))
    r1 = np.broadcast_to(r1, shape + (3,)).reshape(-1, 3)
    r2 = np.broadcast_to(r2, shape + (3,)).reshape(-1, 3)
    tof = np.broadcast_to(np.asarray(tof, dtype=np.float64), shape).ravel()
    mu = np.broadcast_to(np.asarray(mu, dtype=np.float64), shape).ravel()
    r1n = np.linalg.norm(r1, axis=-1)
    r2n = np.linalg.norm(r2, axis=-1)
    c = np.linalg.norm(r2 - r1, axis=-1)
    s = 0.5 * (r1n + r2n + c)
    ir1 = r1 / r1n[:, None]
    ir2 = r2 / r2n[:, None]
    h = np.cross(ir1, ir2)
    hn = np.linalg.norm(h, axis=-1)
    collinear = hn < COLLINEAR_SINE
    ih = h / np.where(collinear, 1.0, hn)[:, None]
    lam = np.sqrt(np.clip(1.0 - c / s, 0.0, 1.0))
    # Transfer angle beyond 180 deg about +z: lambda < 0 and the tangents flip (Izzo 2015).
    long_way = ih[:, 2] < 0.0
    lam = np.where(long_way, -lam, lam)
    it1 = np.where(long_way[:, None], np.cross(ir1, ih), np.cross(ih, ir1))
    it2 = np.where(long_way[:, None], np.cross(ir2, ih), np.cross(ih, ir2))
    if not prograde:
        lam, it1, it2 = -lam, -it1, -it2
    T = np.sqrt(2.0 * mu / s**3) * tof
    return {"shape": np.array(shape), "r1n": r1n, "r2n": r2n, "c": c, "s": s, "ir1": ir1,
            "ir2": ir2, "it1": it1, "it2": it2, "lam": lam, "T": T, "mu": mu,
            "collinear": collinear}


def _hypergeometric(z: np.ndarray) -> np.ndarray:
    """2F1(3, 1; 5/2; z) by its series (|z| is small where it is used: Battin's region)."""
    total = np.ones_like(z)
    term = np.ones_like(z)
    for j in range(60):
        term = term * (3.0 + j) * (1.0 + j) / (2.5 + j) * z / (j + 1.0)
        total = total + term
        if np.all(np.abs(term) < 1e-16):
            break
    return total


def time_of_flight(x: Any, lam: Any, M: Any) -> np.ndarray:
    """Izzo's non-dimensional T(x; lambda, M), eqs. 18-20 (Lancaster-Blanchard form, with
    Lagrange's form for 0.01 < |x - 1| < 0.2 and Battin's series for |x - 1| < 0.01)."""
    x, lam, M = np.broadcast_arrays(np.asarray(x, dtype=np.float64),
                                    np.asarray(lam, dtype=np.float64),
                                    np.asarray(M, dtype=np.float64))
    out = np.empty(x.shape)
    dist = np.abs(x - 1.0)
    battin = dist < _BATTIN
    lagrange = (dist >= _BATTIN) & (dist < _LAGRANGE) & (M == 0)
    general = ~(battin | lagrange)

    if battin.any():
        xb, lb, mb = x[battin], lam[battin], M[battin]
        E = xb * xb - 1.0
        z = np.sqrt(1.0 + lb * lb * E)
        eta = z - lb * xb
        s1 = 0.5 * (1.0 - lb - xb * eta)
        q = 4.0 / 3.0 * _hypergeometric(s1)
        rev = np.zeros_like(xb)
        with_revs = mb > 0
        rev[with_revs] = mb[with_revs] * np.pi / np.abs(E[with_revs]) ** 1.5
        out[battin] = (eta**3 * q + 4.0 * lb * eta) / 2.0 + rev
    if lagrange.any():
        xl, ll = x[lagrange], lam[lagrange]
        a = 1.0 / (1.0 - xl * xl)
        res = np.empty_like(xl)
        ell = a > 0.0
        if ell.any():
            ae, le = a[ell], ll[ell]
            alfa = 2.0 * np.arccos(xl[ell])
            beta = np.copysign(2.0 * np.arcsin(np.sqrt(le * le / ae)), le)
            res[ell] = ae * np.sqrt(ae) * ((alfa - np.sin(alfa)) - (beta - np.sin(beta))) / 2.0
        hyp = ~ell
        if hyp.any():
            ah, lh = a[hyp], ll[hyp]
            alfa = 2.0 * np.arccosh(xl[hyp])
            beta = np.copysign(2.0 * np.arcsinh(np.sqrt(-lh * lh / ah)), lh)
            res[hyp] = -ah * np.sqrt(-ah) * ((beta - np.sinh(beta))
                                             - (alfa - np.sinh(alfa))) / 2.0
        out[lagrange] = res
    if general.any():
        xg, lg, mg = x[general], lam[general], M[general]
        E = xg * xg - 1.0
        rho = np.abs(E)
        z = np.sqrt(1.0 + lg * lg * E)
        y = np.sqrt(rho)
        g = xg * z - lg * E
        d = np.empty_like(xg)
        ell = E < 0.0
        d[ell] = mg[ell] * np.pi + np.arccos(np.clip(g[ell], -1.0, 1.0))
        hyp = ~ell
        f = y[hyp] * (z[hyp] - lg[hyp] * xg[hyp])
        d[hyp] = np.log(f + g[hyp])
        out[general] = (xg - lg * z - d / y) / E
    return out


def _derivatives(x: np.ndarray, T: np.ndarray, lam: np.ndarray
                 ) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """dT/dx, d2T/dx2, d3T/dx3 at x where T = T(x) (Izzo 2015, eq. 22)."""
    l2 = lam * lam
    l3 = l2 * lam
    umx2 = 1.0 - x * x
    y = np.sqrt(1.0 - l2 * umx2)
    y2 = y * y
    y3 = y2 * y
    dT = (3.0 * T * x - 2.0 + 2.0 * l3 * x / y) / umx2
    ddT = (3.0 * T + 5.0 * x * dT + 2.0 * (1.0 - l2) * l3 / y3) / umx2
    dddT = (7.0 * x * ddT + 8.0 * dT - 6.0 * (1.0 - l2) * l2 * l3 * x / y3 / y2) / umx2
    return dT, ddT, dddT


def minimum_time(lam: Any, M: Any) -> tuple[np.ndarray, np.ndarray]:
    """(x, T) of the least non-dimensional time of flight with M >= 1 revolutions, found by
    Halley's iteration on dT/dx = 0 from x = 0 (Izzo 2015, section 3)."""
    lam, M = np.broadcast_arrays(np.asarray(lam, dtype=np.float64),
                                 np.asarray(M, dtype=np.float64))
    x = np.zeros(lam.shape)
    T = time_of_flight(x, lam, M)
    for _ in range(MAX_ITERATIONS):
        dT, ddT, dddT = _derivatives(x, T, lam)
        step = dT * ddT / (ddT * ddT - dT * dddT / 2.0)
        x = np.clip(x - step, -1.0 + 1e-12, 1.0 - 1e-12)
        T = time_of_flight(x, lam, M)
        if np.all(np.abs(step) < X_TOLERANCE):
            break
    return x, T


def _initial_guess(T: np.ndarray, lam: np.ndarray, M: int, right: bool) -> np.ndarray:
    """Izzo 2015, eq. 30 (M = 0) and eq. 31 (M >= 1, left or right branch)."""
    if M == 0:
        T00 = np.arccos(lam) + lam * np.sqrt(1.0 - lam * lam)
        T1 = 2.0 / 3.0 * (1.0 - lam**3)
        x0 = np.empty_like(T)
        slow = T >= T00
        fast = T <= T1
        mid = ~(slow | fast)
        x0[slow] = -(T[slow] - T00[slow]) / (T[slow] - T00[slow] + 4.0)
        x0[fast] = (T1[fast] * (T1[fast] - T[fast])
                    / (0.4 * (1.0 - lam[fast] ** 5) * T[fast]) + 1.0)
        x0[mid] = (T[mid] / T00[mid]) ** (np.log(2.0) / np.log(T1[mid] / T00[mid])) - 1.0
        return x0
    if right:
        k = ((8.0 * T) / (M * np.pi)) ** (2.0 / 3.0)
    else:
        k = ((M * np.pi + np.pi) / (8.0 * T)) ** (2.0 / 3.0)
    return (k - 1.0) / (k + 1.0)


def _householder(x: np.ndarray, T: np.ndarray, lam: np.ndarray, M: int
                 ) -> tuple[np.ndarray, np.ndarray]:
    """Householder's third-order iteration on T(x) = T; returns x and a converged mask."""
    done = np.zeros(x.shape, dtype=bool)
    x = x.copy()
    active = np.arange(x.size)
    for _ in range(MAX_ITERATIONS):
        xa, la, Ta = x[active], lam[active], T[active]
        Tx = time_of_flight(xa, la, M)
        delta = Tx - Ta
        dT, ddT, dddT = _derivatives(xa, Tx, la)
        step = delta * (dT * dT - delta * ddT / 2.0) / (
            dT * (dT * dT - delta * ddT) + dddT * delta * delta / 6.0)
        bad = ~np.isfinite(step)
        step[bad] = 0.0
        xn = xa - step
        # Keep x in its domain (x > -1; x < 1 for M >= 1).
        xn = np.maximum(xn, -1.0 + 1e-15) if M == 0 else np.clip(xn, -1.0 + 1e-15,
                                                                  1.0 - 1e-15)
        x[active] = xn
        converged = (np.abs(step) < X_TOLERANCE * np.maximum(1.0, np.abs(xn))) & ~bad
        done[active[converged]] = True
        active = active[~converged & ~bad]
        if active.size == 0:
            break
    return x, done


def solve(mu: Any, r1: Any, r2: Any, tof: Any, revolutions: int = 0, prograde: bool = True,
          right_branch: bool = False) -> LambertResult:
    """Velocities (m/s) of the transfer from r1 to r2 (m) in ``tof`` seconds about ``mu``
    (m^3/s^2), with ``revolutions`` whole revolutions on the way.

    Shapes broadcast: r1, r2 (..., 3); tof and mu (...). With revolutions >= 1 there are
    two solutions where one exists; ``right_branch`` picks Izzo's right one (the left one
    otherwise). Cases without a solution, including tof <= 0, come back NaN with ``ok``
    False.
    """
    g = _geometry(mu, r1, r2, tof, prograde)
    shape = tuple(int(n) for n in g["shape"])
    lam, T = g["lam"], g["T"]
    M = int(revolutions)
    n = lam.size
    ok = ~g["collinear"] & (T > 0.0) & (g["c"] > 0.0)
    x = np.full(n, np.nan)
    if M > 0:
        with np.errstate(invalid="ignore"):
            ok &= T >= M * np.pi  # the least T with M revolutions exceeds M pi
        if ok.any():
            _, t_min = minimum_time(lam[ok], M)
            enough = T[ok] >= t_min
            idx = np.flatnonzero(ok)
            ok[idx[~enough]] = False
    if ok.any():
        idx = np.flatnonzero(ok)
        x0 = _initial_guess(T[idx], lam[idx], M, right_branch)
        xs, converged = _householder(x0, T[idx], lam[idx], M)
        valid = converged & (xs > -1.0)
        if M > 0:
            valid &= xs < 1.0
        x[idx[valid]] = xs[valid]
        ok[idx[~valid]] = False
    v1 = np.full((n, 3), np.nan)
    v2 = np.full((n, 3), np.nan)
    if ok.any():
        k = ok
        lk, xk = lam[k], x[k]
        r1n, r2n, c, s = g["r1n"][k], g["r2n"][k], g["c"][k], g["s"][k]
        gamma = np.sqrt(g["mu"][k] * s / 2.0)
        rho = (r1n - r2n) / c
        sigma = np.sqrt(np.clip(1.0 - rho * rho, 0.0, None))
        y = np.sqrt(1.0 - lk * lk + lk * lk * xk * xk)
        vr1 = gamma * ((lk * y - xk) - rho * (lk * y + xk)) / r1n
        vr2 = -gamma * ((lk * y - xk) + rho * (lk * y + xk)) / r2n
        vt = gamma * sigma * (y + lk * xk)
        v1[k] = vr1[:, None] * g["ir1"][k] + (vt / r1n)[:, None] * g["it1"][k]
        v2[k] = vr2[:, None] * g["ir2"][k] + (vt / r2n)[:, None] * g["it2"][k]
    return LambertResult(v1=v1.reshape(shape + (3,)), v2=v2.reshape(shape + (3,)),
                         ok=ok.reshape(shape), collinear=g["collinear"].reshape(shape))


def max_revolutions(mu: Any, r1: Any, r2: Any, tof: Any, prograde: bool = True,
                    limit: int | None = None) -> np.ndarray:
    """The most whole revolutions a transfer of this time can make (0 where only the direct
    one exists), per case; at most ``limit`` when given (the count of a very long flight
    about a strong centre runs to thousands)."""
    g = _geometry(mu, r1, r2, tof, prograde)
    shape = tuple(int(n) for n in g["shape"])
    lam, T = g["lam"], g["T"]
    m_top = np.where(T > 0.0, np.floor(np.maximum(T, 0.0) / np.pi), 0.0).astype(int)
    if limit is not None:
        m_top = np.minimum(m_top, limit)
    result = np.zeros(lam.size, dtype=int)
    for M in range(1, int(m_top.max(initial=0)) + 1):
        cand = m_top >= M
        if not cand.any():
            break
        _, t_min = minimum_time(lam[cand], M)
        idx = np.flatnonzero(cand)
        result[idx[T[cand] >= t_min]] = M
    return result.reshape(shape)


def all_solutions(mu: float, r1: Any, r2: Any, tof: float,
                  max_revs: int = 50) -> list[dict[str, Any]]:
    """Every solution of one case: both directions, 0 to the most revolutions (at most
    ``max_revs``), both branches for M >= 1. Each a dict with ``revolutions``,
    ``direction``, ``branch`` ("single", "left" or "right"), ``v1_m_s``, ``v2_m_s``."""
    out: list[dict[str, Any]] = []
    for prograde in (True, False):
        direction = "prograde" if prograde else "retrograde"
        top = int(max_revolutions(mu, r1, r2, tof, prograde, limit=max_revs))
        for M in range(top + 1):
            for right in ((False,) if M == 0 else (False, True)):
                res = solve(mu, r1, r2, tof, M, prograde, right)
                if bool(res.ok):
                    out.append({"revolutions": M, "direction": direction,
                                "branch": "single" if M == 0 else ("right" if right else "left"),
                                "v1_m_s": res.v1.tolist(), "v2_m_s": res.v2.tolist()})
    return out
