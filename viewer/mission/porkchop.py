"""Pork-chop grids: departure C3, arrival v-infinity and total delta-v of the direct
(zero-revolution, prograde) Lambert transfer between two bodies, over a grid of departure
and arrival dates, in one vectorised solve (viewer.mission.lambert).

Patched conics (Curtis, ch. 8; Vallado, sec. 12.x): at departure the hyperbolic excess
velocity is v_inf = v1 - v_planet, C3 = |v_inf|^2; the burn from a circular parking orbit
of radius r_p about a planet of GM mu_p is sqrt(v_inf^2 + 2 mu_p / r_p) - sqrt(mu_p / r_p)
(Curtis eq. 8.40), and the same at arrival into a circular capture orbit. The total
delta-v is the sum of the two burns.

Glossary: ``t_dep``, ``t_arr`` scene times (TDB seconds from the scene epoch); ``tof``
t_arr - t_dep; ``c3`` m^2/s^2; ``vinf_arr`` m/s; ``dv_total`` m/s. Cells with tof <= 0 or
no Lambert solution are NaN.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any

import numpy as np

from ..orbit import propagate, state_from_elements
from .lambert import solve

#: Most cells one grid may have (each holds a few dozen float64 intermediates).
MAX_CELLS = 1_000_000


@dataclass(frozen=True)
class Grid:
    """One pork-chop grid: rows are departure times, columns arrival times (scene s)."""

    t_dep_s: np.ndarray
    t_arr_s: np.ndarray
    tof_s: np.ndarray
    c3_m2_s2: np.ndarray
    vinf_dep_m_s: np.ndarray
    vinf_arr_m_s: np.ndarray
    dv_total_m_s: np.ndarray

    def best(self, which: str) -> tuple[int, int] | None:
        """(departure index, arrival index) of the least ``c3`` or ``dv_total``; None if no
        cell has a solution."""
        values = self.c3_m2_s2 if which == "c3" else self.dv_total_m_s
        if not np.isfinite(values).any():
            return None
        k = int(np.nanargmin(values))
        return divmod(k, values.shape[1])


def body_states(body: Any, t_s: np.ndarray, what: str = "the scene time"
                ) -> tuple[np.ndarray, np.ndarray]:
    """Position (m) and velocity (m/s) of a scene body at scene times ``t_s`` (N,): from its
    ephemeris when it follows one (``what`` names the times in a span error), else its
    two-body conic."""
    t = np.asarray(t_s, dtype=np.float64)
    if body.track is not None:
        return body.track.state(t, what)
    mu = float(body.elements.mu)
    r0, v0 = state_from_elements(body.elements, mu)
    r, v = propagate(r0, v0, mu, t - body.epoch_offset_s)
    return np.asarray(r).reshape(t.shape + (3,)), np.asarray(v).reshape(t.shape + (3,))


def burn_from_circle(vinf_m_s: Any, gm_m3_s2: float, radius_m: float) -> np.ndarray:
    """Delta-v (m/s) between a circular orbit of ``radius_m`` and a hyperbola of excess
    speed ``vinf_m_s`` with its periapsis there (Curtis eq. 8.40)."""
    v = np.asarray(vinf_m_s, dtype=np.float64)
    return np.sqrt(v * v + 2.0 * gm_m3_s2 / radius_m) - np.sqrt(gm_m3_s2 / radius_m)


def grid(mu: float, dep: tuple[np.ndarray, np.ndarray], arr: tuple[np.ndarray, np.ndarray],
         t_dep_s: np.ndarray, t_arr_s: np.ndarray, park: tuple[float, float] | None = None,
         capture: tuple[float, float] | None = None) -> Grid:
    """The grid from the bodies' states at the departure times (``dep`` = (r, v), each
    (N, 3)) and at the arrival times (``arr``, (M, 3)). ``park`` and ``capture`` are
    (GM, circular orbit radius) of the departure and arrival planets for the total
    delta-v (NaN without them)."""
    r1, v_dep = (np.asarray(x, dtype=np.float64) for x in dep)
    r2, v_arr = (np.asarray(x, dtype=np.float64) for x in arr)
    n, m = len(t_dep_s), len(t_arr_s)
    tof = np.asarray(t_arr_s, dtype=np.float64)[None, :] - np.asarray(t_dep_s)[:, None]
    res = solve(mu, r1[:, None, :], r2[None, :, :], tof, 0, True)
    vinf_d = np.linalg.norm(res.v1 - v_dep[:, None, :], axis=-1)
    vinf_a = np.linalg.norm(res.v2 - v_arr[None, :, :], axis=-1)
    c3 = vinf_d * vinf_d
    total = np.full((n, m), np.nan)
    if park is not None and capture is not None:
        ok = res.ok
        total[ok] = (burn_from_circle(vinf_d[ok], *park)
                     + burn_from_circle(vinf_a[ok], *capture))
    return Grid(t_dep_s=np.asarray(t_dep_s, dtype=np.float64),
                t_arr_s=np.asarray(t_arr_s, dtype=np.float64), tof_s=tof, c3_m2_s2=c3,
                vinf_dep_m_s=vinf_d, vinf_arr_m_s=vinf_a, dv_total_m_s=total)


def synodic_period_s(period1_s: float, period2_s: float) -> float:
    """The synodic period 1 / |1/T1 - 1/T2| (common practice, no source)."""
    return 1.0 / abs(1.0 / period1_s - 1.0 / period2_s)
