"""Classical orbital elements of any conic, their derived quantities, and state conversion.

Symbols (SI units and radians):
    a     semi-major axis, m (negative for a hyperbola, infinite for a parabola)
    e     eccentricity
    i     inclination, rad, in [0, pi]
    raan  right ascension of the ascending node (longitude of the node), rad, [0, 2 pi)
    argp  argument of periapsis, rad, [0, 2 pi)
    nu    true anomaly, rad
    p     semi-latus rectum a (1 - e^2), m (for a parabola 2 q)
    mu    gravitational parameter of the central body, m^3/s^2

Conventions for the singular cases (Vallado, *Fundamentals of Astrodynamics and
Applications*, 4th ed., sec. 2.5, "special cases"), so no NaN appears:
    equatorial (sin i < 1e-11):   raan = 0; argp is the longitude of periapsis, measured
                                  from +X about the angular-momentum direction
    circular (e < 1e-11):         argp = 0; nu is the argument of latitude (from the node)
    circular and equatorial:      raan = argp = 0; nu is the true longitude (from +X)
With these, ``state_from_elements(elements_from_state(r, v, mu))`` returns (r, v).

The element fields may be numpy arrays of one shape (a population); every derived
quantity is then an array too.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, replace
from functools import cached_property
from typing import Any

import numpy as np
from numpy.typing import ArrayLike, NDArray

from .anomaly import TWO_PI, mean_from_true, true_from_mean

Floats = NDArray[np.float64]

#: Below this eccentricity an orbit is treated as circular (argp = 0, see above).
CIRCULAR_E = 1e-11
#: Below this sin(i) an orbit is treated as equatorial (raan = 0, see above).
EQUATORIAL_SIN_I = 1e-11
#: Within this of 1 an eccentricity read from a state is taken as exactly parabolic.
PARABOLIC_E = 1e-10


class OrbitError(ValueError):
    """An orbit that the two-body model cannot describe (h = 0, mu <= 0, NaN, ...)."""


def _f(x: Any) -> Any:
    """A float for 0-d input, the array otherwise."""
    a = np.asarray(x, dtype=np.float64)
    return float(a) if a.ndim == 0 else a


@dataclass(frozen=True)
class Elements:
    """Classical elements of a conic about a central body (units in the module glossary).

    ``a`` is infinite for a parabola, whose size is then ``parabola_p`` (the semi-latus
    rectum, m); use :meth:`from_periapsis` to build any conic from its periapsis radius.
    ``mu`` (m^3/s^2) is optional, but the time and speed quantities need it.
    """

    a: Any
    e: Any
    i: Any = 0.0
    raan: Any = 0.0
    argp: Any = 0.0
    nu: Any = 0.0
    mu: Any = None
    parabola_p: Any = None

    # --- construction ----------------------------------------------------------

    @classmethod
    def from_periapsis(
        cls, periapsis: ArrayLike, e: ArrayLike, i: ArrayLike = 0.0, raan: ArrayLike = 0.0,
        argp: ArrayLike = 0.0, nu: ArrayLike = 0.0, mu: float | None = None,
    ) -> Elements:
        """Any conic from its periapsis radius q (m) and e: a = q / (1 - e)."""
        q = np.asarray(periapsis, dtype=np.float64)
        e_a = np.asarray(e, dtype=np.float64)
        parabolic = e_a == 1.0
        with np.errstate(divide="ignore"):
            a = np.where(parabolic, np.inf, q / np.where(parabolic, 1.0, 1.0 - e_a))
        p = 2.0 * q if np.all(parabolic) else (np.where(parabolic, 2.0 * q, np.nan)
                                                if np.any(parabolic) else None)
        return cls(_f(a), _f(e_a), _f(i), _f(raan), _f(argp), _f(nu), mu,
                   None if p is None else _f(p))

    def with_(self, **changes: Any) -> Elements:
        """A copy with some fields changed (the dataclass is frozen)."""
        return replace(self, **changes)

    def _mu(self) -> Any:
        if self.mu is None:
            raise OrbitError("this quantity needs the gravitational parameter mu; "
                             "build the elements with mu=...")
        return self.mu

    # --- shape -------------------------------------------------------------------

    @property
    def elliptic(self) -> Any:
        """True where 0 <= e < 1 (circles included)."""
        return np.asarray(self.e) < 1.0

    @property
    def hyperbolic(self) -> Any:
        return np.asarray(self.e) > 1.0

    @property
    def parabolic(self) -> Any:
        return np.asarray(self.e) == 1.0

    @property
    def p(self) -> Any:
        """Semi-latus rectum a (1 - e)(1 + e), m (1 - e is exact near e = 1: no cancellation)."""
        e = np.asarray(self.e, dtype=np.float64)
        a = np.asarray(self.a, dtype=np.float64)
        with np.errstate(invalid="ignore"):
            p = a * ((1.0 - e) * (1.0 + e))
        if self.parabola_p is not None:
            p = np.where(e == 1.0, self.parabola_p, p)
        return _f(p)

    @property
    def periapsis(self) -> Any:
        """Periapsis radius q = p / (1 + e), m."""
        return _f(np.asarray(self.p) / (1.0 + np.asarray(self.e)))

    @property
    def apoapsis(self) -> Any:
        """Apoapsis radius a (1 + e), m; NaN where the conic has none (e >= 1)."""
        e = np.asarray(self.e, dtype=np.float64)
        return _f(np.where(e < 1.0, np.asarray(self.a) * (1.0 + e), np.nan))

    @property
    def b(self) -> Any:
        """Semi-minor axis (ellipse) or conjugate semi-axis |a| sqrt(e^2 - 1) (hyperbola), m.

        Infinite for a parabola.
        """
        e = np.asarray(self.e, dtype=np.float64)
        a = np.abs(np.asarray(self.a, dtype=np.float64))
        with np.errstate(invalid="ignore"):  # inf * 0 for a parabola, replaced below
            b = a * np.sqrt(np.abs((1.0 - e) * (1.0 + e)))
        return _f(np.where(e == 1.0, np.inf, b))

    @property
    def focal_distance(self) -> Any:
        """Distance c = |a| e from the conic's centre to each focus, m (inf for a parabola)."""
        e = np.asarray(self.e, dtype=np.float64)
        return _f(np.where(e == 1.0, np.inf, np.abs(np.asarray(self.a)) * e))

    c = focal_distance

    # --- dynamics (need mu) -----------------------------------------------------

    @cached_property
    def mean_motion(self) -> Any:
        """Rate of the conic's mean anomaly, rad/s: sqrt(mu/|a|^3), or 2 sqrt(mu/p^3).
        Kept once made (the elements are frozen), as ``mean_anomaly``: a body's state at a
        new time (``after``) is then one Kepler solve, not three scalar chains."""
        mu = self._mu()
        e = np.asarray(self.e, dtype=np.float64)
        a = np.abs(np.asarray(self.a, dtype=np.float64))
        with np.errstate(divide="ignore", invalid="ignore"):
            n = np.where(e == 1.0, 2.0 * np.sqrt(mu / np.asarray(self.p) ** 3),
                         np.sqrt(mu / a**3))
        return _f(n)

    @property
    def period(self) -> Any:
        """Orbital period 2 pi sqrt(a^3/mu) (the third law), s; NaN for e >= 1."""
        mu = self._mu()
        e = np.asarray(self.e, dtype=np.float64)
        a = np.asarray(self.a, dtype=np.float64)
        with np.errstate(invalid="ignore"):
            return _f(np.where(e < 1.0, TWO_PI * np.sqrt(np.where(e < 1.0, a, 1.0) ** 3 / mu),
                               np.nan))

    @property
    def energy(self) -> Any:
        """Specific orbital energy -mu / (2a), J/kg (0 for a parabola)."""
        mu = self._mu()
        return _f(-mu / (2.0 * np.asarray(self.a, dtype=np.float64)))

    @property
    def h(self) -> Any:
        """Specific angular momentum sqrt(mu p), m^2/s."""
        return _f(np.sqrt(self._mu() * np.asarray(self.p)))

    def radius_at(self, nu: ArrayLike) -> Any:
        """Distance from the occupied focus at true anomaly nu, p / (1 + e cos nu), m."""
        return _f(np.asarray(self.p) / (1.0 + np.asarray(self.e) * np.cos(nu)))

    def speed_at(self, nu: ArrayLike) -> Any:
        """Speed at true anomaly nu, m/s: vis-viva written as the sum of its radial and
        transverse parts, v^2 = (mu/p) [(1 + e cos nu)^2 + (e sin nu)^2] (Curtis, eqs. 2.31
        and 2.49), which has no cancellation where 2/r - 1/a would lose its digits
        (apoapsis as e -> 1)."""
        mu = self._mu()
        e = np.asarray(self.e, dtype=np.float64)
        return _f(np.sqrt(mu / np.asarray(self.p)) * np.hypot(1.0 + e * np.cos(nu),
                                                              e * np.sin(nu)))

    def flight_path_angle_at(self, nu: ArrayLike) -> Any:
        """Flight-path angle above the local horizontal, atan2(e sin nu, 1 + e cos nu), rad."""
        e = np.asarray(self.e)
        return _f(np.arctan2(e * np.sin(nu), 1.0 + e * np.cos(nu)))

    @property
    def speed_periapsis(self) -> Any:
        """Speed at periapsis sqrt(mu/p) (1 + e), m/s: the fastest point of the orbit."""
        e = np.asarray(self.e, dtype=np.float64)
        return _f(np.sqrt(self._mu() / np.asarray(self.p)) * (1.0 + e))

    @property
    def speed_apoapsis(self) -> Any:
        """Speed at apoapsis sqrt(mu/p) (1 - e) = sqrt(mu (1 - e) / (a (1 + e))), m/s: the
        slowest point; NaN for e >= 1. 1 - e is exact near e = 1, so no digit is lost."""
        e = np.asarray(self.e, dtype=np.float64)
        with np.errstate(invalid="ignore", divide="ignore"):
            v = np.sqrt(self._mu() / np.asarray(self.p)) * (1.0 - e)
        return _f(np.where(e < 1.0, v, np.nan))

    @property
    def v_infinity(self) -> Any:
        """Hyperbolic excess speed sqrt(-mu/a), m/s; 0 for a parabola, NaN for an ellipse."""
        mu = self._mu()
        e = np.asarray(self.e, dtype=np.float64)
        a = np.asarray(self.a, dtype=np.float64)
        with np.errstate(invalid="ignore", divide="ignore"):
            v = np.where(e > 1.0, np.sqrt(np.abs(mu / a)), np.where(e == 1.0, 0.0, np.nan))
        return _f(v)

    @property
    def turning_angle(self) -> Any:
        """Total turn of a hyperbolic flyby's velocity, 2 asin(1/e), rad; NaN for e <= 1."""
        e = np.asarray(self.e, dtype=np.float64)
        with np.errstate(invalid="ignore"):
            return _f(np.where(e > 1.0, 2.0 * np.arcsin(1.0 / np.maximum(e, 1.0)), np.nan))

    @cached_property
    def mean_anomaly(self) -> Any:
        """The conic's mean anomaly at ``nu`` (see viewer.orbit.anomaly), rad."""
        return mean_from_true(self.nu, self.e)

    @property
    def time_since_periapsis(self) -> Any:
        """Time since the last periapsis passage (negative before it on open conics), s."""
        return _f(np.asarray(self.mean_anomaly) / np.asarray(self.mean_motion))

    def at_mean_anomaly(self, M: ArrayLike) -> Elements:
        """The same orbit at another mean anomaly."""
        return replace(self, nu=true_from_mean(M, self.e))

    def after(self, dt_s: ArrayLike) -> Elements:
        """The same orbit dt_s seconds later (two-body motion: only nu changes)."""
        M = np.asarray(self.mean_anomaly) + np.asarray(self.mean_motion) * np.asarray(dt_s)
        return self.at_mean_anomaly(M)

    # --- orientation -------------------------------------------------------------

    def perifocal_basis(self) -> tuple[Any, Any, Any]:
        """Unit vectors P (to periapsis), Q (90 deg ahead in the plane), W (along h).

        Shapes (..., 3). The rotation R3(-raan) R1(-i) R3(-argp) of Vallado sec. 2.6.
        """
        cO, sO = np.cos(self.raan), np.sin(self.raan)
        ci, si = np.cos(self.i), np.sin(self.i)
        cw, sw = np.cos(self.argp), np.sin(self.argp)
        P = np.stack([cO * cw - sO * sw * ci, sO * cw + cO * sw * ci, sw * si * np.ones_like(cO)],
                     axis=-1)
        Q = np.stack([-cO * sw - sO * cw * ci, -sO * sw + cO * cw * ci,
                      cw * si * np.ones_like(cO)], axis=-1)
        W = np.stack([sO * si * np.ones_like(cw), -cO * si * np.ones_like(cw),
                      ci * np.ones_like(cw * cO)], axis=-1)
        return P, Q, W


def state_from_elements(elements: Elements, mu: float | None = None) -> tuple[Floats, Floats]:
    """Position (m) and velocity (m/s) from classical elements (Vallado alg. 10, COE2RV).

    ``mu`` defaults to ``elements.mu``. Shapes: (3,) for scalar elements, (..., 3) for
    array elements.
    """
    mu_v = elements.mu if mu is None else mu
    if mu_v is None:
        raise OrbitError("state_from_elements needs mu")
    if np.any(np.asarray(mu_v) <= 0):
        raise OrbitError("mu must be positive")
    p = np.asarray(elements.p, dtype=np.float64)
    e = np.asarray(elements.e, dtype=np.float64)
    nu = np.asarray(elements.nu, dtype=np.float64)
    if np.any(p <= 0) or not np.all(np.isfinite(p)):
        raise OrbitError("the elements give no finite, positive semi-latus rectum")
    c, s = np.cos(nu), np.sin(nu)
    r = p / (1.0 + e * c)
    vs = np.sqrt(mu_v / p)
    P, Q, _ = elements.perifocal_basis()
    r_vec = (r * c)[..., None] * P + (r * s)[..., None] * Q
    v_vec = (-vs * s)[..., None] * P + (vs * (e + c))[..., None] * Q
    return r_vec, v_vec


def _norm(x: Floats) -> Floats:
    return np.sqrt(np.einsum("...i,...i->...", x, x))


def _angle_about(u: Floats, w: Floats, axis: Floats) -> Floats:
    """Signed angle from u to w about the unit vector ``axis`` (atan2 form, no acos)."""
    return np.arctan2(np.einsum("...i,...i->...", np.cross(u, w), axis),
                      np.einsum("...i,...i->...", u, w))


def elements_from_state(r: ArrayLike, v: ArrayLike, mu: float) -> Elements:
    """Classical elements from position r (m) and velocity v (m/s) (Vallado alg. 9, RV2COE).

    Vectorised over (..., 3). Singular cases follow the module's conventions. Angles
    are found with atan2 about the angular-momentum axis, so none is lost to acos
    rounding. Raises OrbitError for a rectilinear orbit (h = 0), r = 0 or mu <= 0.
    """
    r_a = np.asarray(r, dtype=np.float64)
    v_a = np.asarray(v, dtype=np.float64)
    if not (np.all(np.isfinite(r_a)) and np.all(np.isfinite(v_a))):
        raise OrbitError("position and velocity must be finite")
    if not mu > 0 or not math.isfinite(mu):
        raise OrbitError("mu must be a positive, finite number (m^3/s^2)")
    r_a, v_a = np.broadcast_arrays(r_a, v_a)
    rn = _norm(r_a)
    if np.any(rn == 0):
        raise OrbitError("position is at the centre of the central body (r = 0)")
    h_vec = np.cross(r_a, v_a)
    hn = _norm(h_vec)
    if np.any(hn <= 1e-14 * rn * _norm(v_a)):
        raise OrbitError("rectilinear orbit (r parallel to v, h = 0) is not supported")
    w_hat = h_vec / hn[..., None]
    v2 = np.einsum("...i,...i->...", v_a, v_a)
    rv = np.einsum("...i,...i->...", r_a, v_a)
    e_vec = ((v2 - mu / rn)[..., None] * r_a - rv[..., None] * v_a) / mu
    e = _norm(e_vec)
    p = hn * hn / mu

    # atan2 of the in-plane and normal parts of h, not acos(h_z/|h|): acos loses every
    # digit of i near 0 and 180 deg, where a few millimetres out of the plane matter.
    i = np.arctan2(np.hypot(h_vec[..., 0], h_vec[..., 1]), h_vec[..., 2])
    node = np.stack([-h_vec[..., 1], h_vec[..., 0], np.zeros_like(hn)], axis=-1)
    nn = _norm(node)
    equatorial = nn < EQUATORIAL_SIN_I * hn
    x_hat = np.broadcast_to(np.array([1.0, 0.0, 0.0]), node.shape)
    n_hat = np.where(equatorial[..., None], x_hat, node / np.where(nn > 0, nn, 1.0)[..., None])
    raan = np.where(equatorial, 0.0, np.mod(np.arctan2(node[..., 1], node[..., 0]), TWO_PI))

    circular = e < CIRCULAR_E
    p_hat = np.where(circular[..., None], n_hat, e_vec / np.where(e > 0, e, 1.0)[..., None])
    argp = np.where(circular, 0.0, np.mod(_angle_about(n_hat, p_hat, w_hat), TWO_PI))
    nu = _angle_about(p_hat, r_a, w_hat)
    e = np.where(circular, 0.0, e)

    parabolic = np.abs(e - 1.0) < PARABOLIC_E
    e = np.where(parabolic, 1.0, e)
    safe_e = np.where(parabolic, 0.0, e)
    # a from p and e everywhere: near e = 1 it is no worse than -mu / (2 energy) (both
    # lose about eps / |1 - e|), and Elements.p = a (1 - e^2) then gives back this p, so
    # state_from_elements returns the state (a from the energy put p off by ~1e-6
    # relative at |1 - e| = 1e-10).
    a = np.where(parabolic, np.inf, p / (1.0 - safe_e * safe_e))
    elliptic_nu = np.where(e < 1.0, np.mod(nu, TWO_PI), nu)
    any_parabolic = bool(np.any(parabolic))
    return Elements(_f(a), _f(e), _f(i), _f(raan), _f(argp), _f(elliptic_nu), mu,
                    _f(np.where(parabolic, p, np.nan)) if any_parabolic else None)
