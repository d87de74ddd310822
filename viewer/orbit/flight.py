"""Quick answers of flight geometry on a two-body conic: time of flight between anomalies,
when a body reaches a radius, hyperbolic asymptotes, escape speed, turning angle, and the
warnings a designer wants beside every number.

Symbols (SI units and radians, as in viewer.orbit.elements):
    nu     true anomaly, rad
    p      semi-latus rectum, m
    q      periapsis radius (rp), m
    n      the conic's mean motion, rad/s (its "mean anomaly" per second)
    v_inf  hyperbolic excess speed, m/s
    delta  turning angle of a hyperbolic pass (angle between the asymptotes' velocities)
    mu     gravitational parameter of the central body, m^3/s^2

Equations: the conic's mean anomaly over its mean motion gives time since periapsis
(Curtis, *Orbital Mechanics for Engineering Students*, ch. 3: eq. 3.6-3.14 ellipse,
Barker's equation for the parabola, eq. 3.40-3.45 hyperbola; Vallado, *Fundamentals of
Astrodynamics and Applications*, 4th ed., sec. 2.2). The radius at an anomaly is the
orbit equation r = p / (1 + e cos nu). Hyperbolic-pass relations (e = 1 + rp v_inf^2/mu,
delta = 2 asin(1/e)) are Curtis sec. 2.9 and 8.9.

numpy only. Scalars or arrays everywhere (one vectorised path); element fields may be
arrays of one shape.
"""

from __future__ import annotations

import numpy as np
from numpy.typing import ArrayLike, NDArray

from .anomaly import TWO_PI, AnomalyError, asymptote_true_anomaly, mean_from_true
from .elements import Elements, OrbitError

Floats = NDArray[np.float64]


def _out(x: Floats) -> float | Floats:
    return float(x) if np.ndim(x) == 0 else x


def time_since_periapsis_at(elements: Elements, nu: ArrayLike) -> float | Floats:
    """Time from periapsis to true anomaly nu, s (negative before periapsis on open conics).

    Ellipse: in the same turn as nu, so nu in [0, 2 pi) gives [0, period). Open conics:
    |nu| must be inside the asymptotes (OrbitError otherwise).
    """
    e = np.asarray(elements.e, dtype=np.float64)
    nu_a = np.asarray(nu, dtype=np.float64)
    try:
        M = np.asarray(mean_from_true(nu_a, e))
    except AnomalyError:
        limit = np.degrees(np.asarray(asymptote_true_anomaly(np.maximum(e, 1.0))))
        raise OrbitError(f"true anomaly is beyond the asymptotes of the open conic "
                         f"(|nu| < {np.min(limit):.6g} deg)") from None
    return _out(M / np.asarray(elements.mean_motion))


def time_of_flight(elements: Elements, nu_from: ArrayLike, nu_to: ArrayLike) -> float | Floats:
    """Time to fly from true anomaly ``nu_from`` to ``nu_to`` in the direction of motion, s.

    Ellipse: the forward time in [0, period) (it wraps through periapsis when nu_to is
    behind nu_from). Open conics pass each anomaly once, so the result is
    t(nu_to) - t(nu_from), negative when nu_to comes first.
    """
    e = np.asarray(elements.e, dtype=np.float64)
    elliptic = e < 1.0
    with np.errstate(invalid="ignore"):
        period = np.where(elliptic, np.asarray(elements.period), np.inf)
    nu0 = np.where(elliptic, np.mod(nu_from, TWO_PI), nu_from)
    nu1 = np.where(elliptic, np.mod(nu_to, TWO_PI), nu_to)
    dt = (np.asarray(time_since_periapsis_at(elements, nu1))
          - np.asarray(time_since_periapsis_at(elements, nu0)))
    safe_period = np.where(elliptic, period, 1.0)
    return _out(np.where(elliptic, np.mod(dt, safe_period), dt))


def true_anomaly_at_radius(elements: Elements, r_m: ArrayLike) -> float | Floats:
    """The outbound true anomaly in [0, pi] at which the conic has radius r (m).

    From the orbit equation, cos nu = (p / r - 1) / e. The inbound crossing is at -nu.
    NaN where the conic never reaches r (below periapsis, beyond apoapsis) and for a
    circle (every point, or none, has that radius).
    """
    e = np.asarray(elements.e, dtype=np.float64)
    p = np.asarray(elements.p, dtype=np.float64)
    r = np.asarray(r_m, dtype=np.float64)
    with np.errstate(divide="ignore", invalid="ignore"):
        c = (p / r - 1.0) / e
    # Let a radius equal to periapsis or apoapsis (to rounding) count as reached.
    c = np.where(np.abs(c - 1.0) < 1e-12, 1.0, np.where(np.abs(c + 1.0) < 1e-12, -1.0, c))
    reachable = (e > 0.0) & (r > 0.0) & (np.abs(c) <= 1.0)
    # On an open conic any r > 0 gives c > -1/e, so nu stays inside the asymptotes.
    nu = np.arccos(np.where(reachable, c, 0.0))
    return _out(np.where(reachable, nu, np.nan))


def time_from_periapsis_to_radius(elements: Elements, r_m: ArrayLike) -> float | Floats:
    """Time from periapsis out to radius r (m), s; the inbound crossing is as long before.

    NaN where the conic never reaches r.
    """
    nu = np.asarray(true_anomaly_at_radius(elements, r_m))
    ok = np.isfinite(nu)
    t = np.asarray(time_since_periapsis_at(elements, np.where(ok, nu, 0.0)))
    return _out(np.where(ok, t, np.nan))


def times_to_radius(elements: Elements, r_m: ArrayLike) -> tuple[float | Floats, float | Floats]:
    """(outbound, inbound): seconds from the elements' own epoch (their nu) to the next
    time the body reaches radius r moving outward, and moving inward.

    Ellipse: both within one period ahead. Open conics: NaN for a crossing that is
    already past. NaN where the conic never reaches r.
    """
    e = np.asarray(elements.e, dtype=np.float64)
    elliptic = e < 1.0
    t_r = np.asarray(time_from_periapsis_to_radius(elements, r_m))
    t_now = np.asarray(elements.time_since_periapsis, dtype=np.float64)
    with np.errstate(invalid="ignore"):
        period = np.where(elliptic, np.asarray(elements.period), 1.0)
    out_dt = t_r - t_now
    in_dt = -t_r - t_now
    with np.errstate(invalid="ignore"):
        out_dt = np.where(elliptic, np.mod(out_dt, period), np.where(out_dt >= 0, out_dt, np.nan))
        in_dt = np.where(elliptic, np.mod(in_dt, period), np.where(in_dt >= 0, in_dt, np.nan))
    return _out(out_dt), _out(in_dt)


def escape_speed(mu: ArrayLike, r_m: ArrayLike) -> float | Floats:
    """Escape speed sqrt(2 mu / r) at radius r (m), m/s (vis-viva with a = infinity)."""
    return _out(np.sqrt(2.0 * np.asarray(mu, dtype=np.float64) / np.asarray(r_m, dtype=np.float64)))


def hyperbola_from_v_infinity(
    v_inf_m_s: ArrayLike, periapsis_m: ArrayLike, mu: float, i: ArrayLike = 0.0,
    raan: ArrayLike = 0.0, argp: ArrayLike = 0.0, nu: ArrayLike = 0.0,
) -> Elements:
    """The hyperbola with excess speed v_inf (m/s) and periapsis radius rp (m).

    a = -mu / v_inf^2 and e = 1 + rp v_inf^2 / mu (Curtis eq. 2.104 and 8.38).
    """
    v = np.asarray(v_inf_m_s, dtype=np.float64)
    rp = np.asarray(periapsis_m, dtype=np.float64)
    if np.any(v <= 0) or np.any(rp <= 0) or not mu > 0:
        raise OrbitError("a hyperbola needs v_inf > 0, periapsis > 0 and mu > 0")
    e = 1.0 + rp * v * v / mu
    a = -mu / (v * v)
    return Elements(_out(a), _out(e), i, raan, argp, nu, mu)


def turning_angle(v_inf_m_s: ArrayLike, periapsis_m: ArrayLike, mu: ArrayLike) -> float | Floats:
    """Turning angle of a hyperbolic pass, 2 asin(1 / (1 + rp v_inf^2 / mu)), rad.

    Curtis eq. 8.56, with rp the periapsis radius (m) and v_inf in m/s.
    """
    v = np.asarray(v_inf_m_s, dtype=np.float64)
    rp = np.asarray(periapsis_m, dtype=np.float64)
    e = 1.0 + rp * v * v / np.asarray(mu, dtype=np.float64)
    return _out(2.0 * np.arcsin(1.0 / e))


def asymptotes(elements: Elements) -> tuple[Floats, Floats, Floats]:
    """Where the asymptotes of an open conic are: (centre, incoming, outgoing).

    ``incoming`` is the unit direction of the velocity far before periapsis,
    ``outgoing`` far after it, shape (..., 3) in the frame of the elements; the angle
    between them is the turning angle. ``centre`` (m) is the hyperbola's centre, |a| e
    beyond the focus along the periapsis direction, through which both asymptote lines
    pass. For a parabola the directions are the axis and the centre is NaN; for an
    ellipse everything is NaN.
    """
    e = np.asarray(elements.e, dtype=np.float64)
    open_conic = e >= 1.0
    nu_inf = np.asarray(asymptote_true_anomaly(np.where(open_conic, e, 1.0)))
    P, Q, _ = elements.perifocal_basis()
    c, s = np.cos(nu_inf)[..., None], np.sin(nu_inf)[..., None]
    outgoing = c * P + s * Q
    incoming = -(c * P - s * Q)  # minus the radial direction at -nu_inf
    hyperbolic = (e > 1.0)[..., None]
    with np.errstate(invalid="ignore"):
        dist = np.where(e > 1.0, np.abs(np.asarray(elements.a, dtype=np.float64)) * e, np.nan)
    centre = np.where(hyperbolic, dist[..., None] * P, np.nan)
    nan = np.full_like(outgoing, np.nan)
    mask = open_conic[..., None]
    return centre, np.where(mask, incoming, nan), np.where(mask, outgoing, nan)


def conic_warnings(
    elements: Elements, central_radius_m: float, atmosphere_m: float | None = None,
    soi_radius_m: float | None = None,
) -> list[str]:
    """Warnings for one (scalar) orbit, as one-line strings naming the numbers.

    Periapsis inside the central body (an impact); periapsis below the top of an
    atmosphere (``atmosphere_m`` is its height above the surface); apoapsis beyond the
    sphere of influence ``soi_radius_m`` (there the two-body model about this centre no
    longer holds); an open conic (the body escapes).
    """
    out: list[str] = []
    q = float(elements.periapsis)
    e = float(elements.e)
    km = 1e-3
    if central_radius_m > 0 and q < central_radius_m:
        out.append(f"impact: periapsis radius {q * km:,.3f} km is inside the central body "
                   f"(radius {central_radius_m * km:,.3f} km)")
    elif atmosphere_m is not None and q < central_radius_m + atmosphere_m:
        out.append(f"periapsis altitude {(q - central_radius_m) * km:,.3f} km is below the "
                   f"top of the atmosphere ({atmosphere_m * km:,.3f} km)")
    if e >= 1.0:
        out.append(f"escape: the orbit is open (e = {e:.6g}), the body leaves the central body")
    if soi_radius_m is not None:
        if e >= 1.0:
            out.append(f"leaves the sphere of influence ({soi_radius_m * km:,.0f} km): "
                       f"beyond it the two-body model about this centre does not hold")
        elif float(elements.apoapsis) > soi_radius_m:
            out.append(f"apoapsis {float(elements.apoapsis) * km:,.0f} km is beyond the "
                       f"sphere of influence ({soi_radius_m * km:,.0f} km): there the "
                       f"two-body model about this centre does not hold")
    return out
