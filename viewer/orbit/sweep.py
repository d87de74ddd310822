"""The second law as computation: areas swept from the occupied focus, and sectors.

``sector_area`` measures the area of the focal sector between two true anomalies from
the conic's geometry alone (integral of r^2/2 dnu in closed form); ``swept_area`` finds
the anomalies at two times with Kepler's equation and measures that area, so the test
``swept_area == h/2 * dt`` checks the solver and the geometry against the law.

Closed forms (from r = p / (1 + e cos nu)):
    ellipse    A = (a b / 2) (E - e sin E)   between the eccentric anomalies
    hyperbola  A = (|a| b / 2) (e sinh F - F)
    parabola   A = (p^2 / 4) (D + D^3 / 3),   D = tan(nu / 2)
i.e. (a b / 2) M, the mean anomaly in each conic's own form (Vallado sec. 2.2).
"""

from __future__ import annotations

import numpy as np
from numpy.typing import ArrayLike, NDArray

from .anomaly import (
    TWO_PI,
    eccentric_anomaly,
    mean_from_true,
    true_from_eccentric,
    true_from_mean,
)
from .elements import Elements

Floats = NDArray[np.float64]


def _area_scale(el: Elements) -> Floats:
    """Area per unit of the conic's mean anomaly: a b / 2, or p^2 / 4 for a parabola."""
    e = np.asarray(el.e, dtype=np.float64)
    with np.errstate(invalid="ignore"):
        ab = np.abs(np.asarray(el.a, dtype=np.float64)) * np.asarray(el.b)
    return np.where(e == 1.0, np.asarray(el.p) ** 2 / 4.0, ab / 2.0)


def sector_area(el: Elements, nu0: ArrayLike, nu1: ArrayLike) -> float | Floats:
    """Area (m^2) of the sector from the occupied focus between true anomalies nu0 -> nu1.

    Signed (negative if nu1 < nu0); on an ellipse, anomalies more than a turn apart
    include the whole turns (pi a b each).
    """
    M0 = np.asarray(mean_from_true(nu0, el.e))
    M1 = np.asarray(mean_from_true(nu1, el.e))
    out = _area_scale(el) * (M1 - M0)
    return float(out) if out.ndim == 0 else out


def swept_area(el: Elements, t0_s: ArrayLike, t1_s: ArrayLike) -> float | Floats:
    """Area (m^2) swept from the occupied focus between times t0_s and t1_s (s after el).

    Positions come from Kepler's equation, the area from the conic's geometry
    (``sector_area``); whole turns of an ellipse between the times are counted.
    """
    a = el.after(t0_s)
    b = el.after(t1_s)
    # The anomalies come back in the turn of their mean anomaly, so whole turns between
    # the times are already in nu1 - nu0 for ellipses.
    out = np.asarray(sector_area(el, a.nu, b.nu))
    return float(out) if out.ndim == 0 else out


def conic_points(el: Elements, nu: ArrayLike) -> Floats:
    """Points (m, shape (..., 3)) of the conic at true anomalies ``nu``, in the inertial frame."""
    nu_a = np.asarray(nu, dtype=np.float64)
    r = np.asarray(el.p) / (1.0 + np.asarray(el.e) * np.cos(nu_a))
    P, Q, _ = el.perifocal_basis()
    return (r * np.cos(nu_a))[..., None] * P + (r * np.sin(nu_a))[..., None] * Q


def sector_polygon(el: Elements, t0_s: float, t1_s: float, n: int = 64) -> Floats:
    """The sector swept between two times as a closed polygon: focus, then the arc.

    Returns (n + 2, 3) points in m: the occupied focus (the origin) followed by n + 1
    points on the conic from the position at t0_s to the position at t1_s, equally spaced
    in the conic's anomaly so the arc is even where the body is fast. Exact time bounds.
    """
    M0 = float(np.asarray(el.after(t0_s).mean_anomaly))
    M1 = float(np.asarray(el.after(t1_s).mean_anomaly))
    if el.e < 1.0 and M1 < M0:
        M1 += TWO_PI * np.ceil((M0 - M1) / TWO_PI)
    if el.e < 1.0:
        # Even steps in the eccentric anomaly, between the exact end anomalies.
        E = np.linspace(eccentric_anomaly(M0, el.e), eccentric_anomaly(M1, el.e), n + 1)
        nu = np.asarray(true_from_eccentric(E, el.e))
    else:
        nu = np.asarray(true_from_mean(np.linspace(M0, M1, n + 1), el.e))
    pts = conic_points(el, nu)
    return np.vstack([np.zeros((1, 3)), pts])
