"""Impulsive transfers between coplanar circular orbits: Hohmann and bi-elliptic.

Symbols (SI units):
    r1, r2   radii of the departure and arrival circles, m
    rb       apoapsis radius of a bi-elliptic transfer's intermediate point, m
    dv       speed change of a burn, m/s: positive prograde (speeding up), negative
             retrograde; totals add magnitudes
    tof      time of flight from the first burn to the last, s
    mu       gravitational parameter of the central body, m^3/s^2

Each leg is a half ellipse between its apsides; every speed comes from vis-viva,
v^2 = mu (2/r - 1/a) (Vallado, *Fundamentals of Astrodynamics and Applications*, 4th ed.,
sec. 6.3, algorithms 36 and 37; Curtis, *Orbital Mechanics for Engineering Students*,
sec. 6.2-6.4). A leg's time is half its period, pi sqrt(a^3 / mu).

Every function takes scalars or arrays (broadcast together); numpy only.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any

import numpy as np
from numpy.typing import ArrayLike

from .anomaly import TWO_PI
from .elements import Elements, OrbitError


@dataclass(frozen=True)
class Burn:
    """One impulsive burn: where (``radius_m``), when (``time_s`` after the first burn), the
    speeds before and after (m/s), and ``dv_m_s`` = after - before (negative = retrograde)."""

    label: str
    radius_m: Any
    time_s: Any
    speed_before_m_s: Any
    speed_after_m_s: Any

    @property
    def dv_m_s(self) -> Any:
        return np.asarray(self.speed_after_m_s) - np.asarray(self.speed_before_m_s)


@dataclass(frozen=True)
class Transfer:
    """A transfer: its burns in order, its legs (half ellipses, as Elements in the
    perifocal frame with ``nu`` at the leg's start: 0 from periapsis, pi from apoapsis),
    and how long it takes."""

    kind: str
    mu: float
    r1_m: Any
    r2_m: Any
    burns: tuple[Burn, ...]
    legs: tuple[Elements, ...]

    @property
    def dv_total_m_s(self) -> Any:
        """Sum of the burns' speed-change magnitudes, m/s."""
        return sum(np.abs(b.dv_m_s) for b in self.burns)

    @property
    def time_of_flight_s(self) -> Any:
        """From the first burn to the last, s: half a period per leg."""
        return sum(0.5 * np.asarray(leg.period) for leg in self.legs)

    @property
    def sweep_rad(self) -> float:
        """Angle the spacecraft travels round the centre: pi per leg."""
        return np.pi * len(self.legs)

    @property
    def phase_angle_rad(self) -> Any:
        """Lead of the target on the arrival circle over the spacecraft at the first burn,
        for them to meet at the last burn, wrapped to [0, 2 pi): sweep - n2 tof, with n2
        the target's angular rate (Curtis sec. 6.10, phasing)."""
        r2 = np.asarray(self.r2_m, dtype=np.float64)
        n2 = np.sqrt(self.mu / r2**3)
        return np.mod(self.sweep_rad - n2 * np.asarray(self.time_of_flight_s), TWO_PI)


def _radii(mu: float, *radii: ArrayLike) -> list[np.ndarray]:
    out = [np.asarray(r, dtype=np.float64) for r in radii]
    if not mu > 0:
        raise OrbitError("mu must be positive (m^3/s^2)")
    for r in out:
        if np.any(~np.isfinite(r)) or np.any(r <= 0):
            raise OrbitError("transfer radii must be positive and finite (m)")
    return out


def _vis_viva(mu: float, r: np.ndarray, a: np.ndarray) -> np.ndarray:
    return np.sqrt(mu * (2.0 / r - 1.0 / a))


def _leg(mu: float, r_start: np.ndarray, r_end: np.ndarray) -> Elements:
    """The half ellipse from r_start to r_end, starting at periapsis when going out."""
    a = 0.5 * (r_start + r_end)
    e = np.abs(r_end - r_start) / (r_start + r_end)
    nu = np.where(r_end >= r_start, 0.0, np.pi)
    return Elements(_scalar(a), _scalar(e), nu=_scalar(nu), mu=mu)


def _scalar(x: np.ndarray) -> Any:
    return float(x) if np.ndim(x) == 0 else x


def hohmann(r1_m: ArrayLike, r2_m: ArrayLike, mu: float) -> Transfer:
    """The Hohmann transfer from a circle of radius r1 to one of radius r2 (either way).

    Two tangential burns at the apsides of one half ellipse with a = (r1 + r2) / 2
    (Vallado alg. 36).
    """
    r1, r2 = _radii(mu, r1_m, r2_m)
    a = 0.5 * (r1 + r2)
    burns = (
        Burn("departure", r1, np.zeros_like(a), np.sqrt(mu / r1), _vis_viva(mu, r1, a)),
        Burn("arrival", r2, np.pi * np.sqrt(a**3 / mu), _vis_viva(mu, r2, a), np.sqrt(mu / r2)),
    )
    return Transfer("hohmann", mu, r1, r2, burns, (_leg(mu, r1, r2),))


def bi_elliptic(r1_m: ArrayLike, rb_m: ArrayLike, r2_m: ArrayLike, mu: float) -> Transfer:
    """The bi-elliptic transfer r1 -> rb -> r2 through an intermediate apoapsis rb.

    Three tangential burns: out onto a half ellipse to rb, there onto a second half
    ellipse whose periapsis is r2, and at r2 onto the circle (Vallado alg. 37). ``rb``
    must be at least max(r1, r2).
    """
    r1, rb, r2 = _radii(mu, r1_m, rb_m, r2_m)
    if np.any(rb < np.maximum(r1, r2)):
        raise OrbitError("a bi-elliptic transfer's intermediate radius rb must be at least "
                         "the larger of r1 and r2")
    a1 = 0.5 * (r1 + rb)
    a2 = 0.5 * (rb + r2)
    t1 = np.pi * np.sqrt(a1**3 / mu)
    t2 = np.pi * np.sqrt(a2**3 / mu)
    burns = (
        Burn("departure", r1, np.zeros_like(t1), np.sqrt(mu / r1), _vis_viva(mu, r1, a1)),
        Burn("intermediate", rb, t1, _vis_viva(mu, rb, a1), _vis_viva(mu, rb, a2)),
        Burn("arrival", r2, t1 + t2, _vis_viva(mu, r2, a2), np.sqrt(mu / r2)),
    )
    return Transfer("bi-elliptic", mu, r1, r2, burns, (_leg(mu, r1, rb), _leg(mu, rb, r2)))
