"""Quick answers about one body's conic, decided once for the window and the command line.

* ``flight_time(elements, nu_from, nu_to)``: seconds from one true anomaly to another in
  the direction of motion. On an ellipse the body goes round: a later angle is reached
  going forward, so ``0 -> 360 deg`` is one period and ``90 -> 89.999 deg`` nearly one;
  ``0 -> 720 deg`` is two periods; an angle equal to the start (``0 -> 0``, ``360 -> 0``)
  takes no time. On an open conic the body passes each anomaly once, from the incoming
  asymptote to the outgoing one, so ``60 -> -60 deg`` is refused, and the refusal gives
  the time the other way round (the body goes from -60 to 60 deg).
* ``radius_crossing(elements, r)``: when the body is at a distance: the true anomaly
  there, the time from periapsis, the next outbound and inbound crossings, the speed and
  escape speed there. A circle asked for its own radius is always there; a radius the
  conic never reaches says between which radii it stays.
* ``hyperbolic_pass(elements)``: v-infinity, the turning angle 2 asin(1/e) and the
  asymptote's true anomaly acos(-1/e) (Curtis, *Orbital Mechanics for Engineering
  Students*, sec. 2.9 and eq. 8.56); for a parabola v-infinity is 0 and both angles are
  180 deg.
* ``speed_here(elements, mu)``: distance and speed now, the escape speed there.

Symbols and units as in ``viewer.orbit.flight``: nu true anomaly (rad), r radius (m),
T period (s), mu gravitational parameter (m^3/s^2). Refusals are ``MissionRefused``,
naming the input (``field``) and what is allowed.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from ..errors import UserInputError
from ..orbit import Elements, OrbitError
from ..orbit.anomaly import asymptote_true_anomaly
from ..orbit.flight import (
    escape_speed,
    time_from_periapsis_to_radius,
    time_of_flight,
    times_to_radius,
    true_anomaly_at_radius,
)
from ..units.format import format_length

TWO_PI = 2.0 * math.pi
#: Relative tolerance within which a circle's radius counts as the asked radius.
CIRCLE_RADIUS_RTOL = 1e-9
#: Eccentricity below which an orbit is a circle for the radius question.
CIRCLE_E = 1e-12


class MissionRefused(UserInputError):
    """A question the two-body answer does not allow; ``field`` names the input ("nu",
    "radius", "from", "to", "via", "transfer"), ``problems`` says why, one line each."""

    def __init__(self, field: str, problems: list[str] | str) -> None:
        super().__init__(field, problems)
        self.field = field


def _finite(x: float) -> float | None:
    return x if math.isfinite(x) else None


# --- time of flight ---------------------------------------------------------------------


@dataclass(frozen=True)
class FlightTime:
    """The time to fly from ``nu_from_rad`` to ``nu_to_rad`` (s), with the full turns it
    includes (ellipses only)."""

    nu_from_rad: float
    nu_to_rad: float
    seconds: float
    turns: int


def flight_time(elements: Elements, nu_from_rad: float, nu_to_rad: float) -> FlightTime:
    """Seconds to fly from true anomaly ``nu_from_rad`` to ``nu_to_rad`` (see the module
    docstring for the rules on turns and on open conics)."""
    e = float(elements.e)
    for nu in (nu_from_rad, nu_to_rad):
        if not math.isfinite(nu):
            raise MissionRefused("nu", "a true anomaly must be a finite angle")
    if e < 1.0:
        span = nu_to_rad - nu_from_rad
        # Whole turns only when "to" is ahead of "from" by at least a turn (to rounding).
        turns = int(math.floor(span / TWO_PI + 1e-12)) if span > 0 else 0
        rest = float(time_of_flight(elements, nu_from_rad, nu_to_rad - turns * TWO_PI))
        period = float(elements.period)
        if turns and rest > period * (1.0 - 1e-12):
            rest = 0.0  # "to" is exactly whole turns ahead: no extra turn from rounding
        return FlightTime(nu_from_rad, nu_to_rad, turns * period + rest, turns)
    limit = float(asymptote_true_anomaly(e))
    for nu in (nu_from_rad, nu_to_rad):
        if abs(nu) >= limit:
            raise MissionRefused("nu", f"true anomaly {math.degrees(nu):.6g} deg is beyond the "
                                 f"asymptotes of this open orbit (|nu| below "
                                 f"{math.degrees(limit):.6g} deg)")
    try:
        dt = float(time_of_flight(elements, nu_from_rad, nu_to_rad))
    except OrbitError as err:
        raise MissionRefused("nu", str(err)) from None
    if dt < 0:
        raise MissionRefused("nu", (
            f"on an open orbit the body passes each true anomaly once, moving from the "
            f"incoming asymptote to the outgoing one: {math.degrees(nu_to_rad):.6g} deg comes "
            f"before {math.degrees(nu_from_rad):.6g} deg. From {math.degrees(nu_to_rad):.6g} "
            f"to {math.degrees(nu_from_rad):.6g} deg takes {-dt:,.1f} s; give the angles in "
            f"that order"))
    return FlightTime(nu_from_rad, nu_to_rad, dt, 0)


# --- radius crossings -------------------------------------------------------------------


@dataclass(frozen=True)
class RadiusCrossing:
    """When a body is at ``radius_m``. ``kind``: "crosses" (outbound at +nu, inbound at
    -nu), "always" (a circle at that radius) or "never" (``reason`` says where the body
    stays). Times are s after the elements' own instant; None where there is none (never
    reached, or a crossing an open orbit has already passed)."""

    radius_m: float
    kind: str
    reason: str
    nu_rad: float | None
    from_periapsis_s: float | None
    next_outbound_s: float | None
    next_inbound_s: float | None
    speed_m_s: float | None
    escape_speed_m_s: float

    @property
    def reached(self) -> bool:
        return self.kind != "never"


def radius_crossing(elements: Elements, radius_m: float, mu: float,
                    length_unit: str = "km") -> RadiusCrossing:
    """When the body on ``elements`` (at their own instant) is at ``radius_m`` from the
    centre; MissionRefused for a radius that is not a positive finite distance."""
    r = float(radius_m)
    if not (math.isfinite(r) and r > 0):
        raise MissionRefused("radius", "a radius is a positive, finite distance from the centre")
    e = float(elements.e)
    q = float(elements.periapsis)
    v_esc = float(escape_speed(mu, r))
    if e < CIRCLE_E:
        if math.isclose(r, q, rel_tol=CIRCLE_RADIUS_RTOL):
            return RadiusCrossing(r, "always", f"the orbit is a circle of radius "
                                  f"{format_length(q, length_unit)}: the body is always there",
                                  None, None, 0.0, 0.0, float(elements.speed_at(0.0)), v_esc)
        return RadiusCrossing(r, "never", f"the orbit is a circle: it stays at "
                              f"{format_length(q, length_unit)}", None, None, None, None, None,
                              v_esc)
    with np.errstate(invalid="ignore", divide="ignore", over="ignore"):
        nu = float(true_anomaly_at_radius(elements, r))
    if not math.isfinite(nu):
        if e < 1.0:
            reason = (f"the orbit stays between {format_length(q, length_unit)} and "
                      f"{format_length(float(elements.apoapsis), length_unit)}")
        else:
            reason = f"the orbit comes no closer than {format_length(q, length_unit)}"
        return RadiusCrossing(r, "never", reason, None, None, None, None, None, v_esc)
    with np.errstate(invalid="ignore", divide="ignore", over="ignore"):
        from_q = float(time_from_periapsis_to_radius(elements, r))
        out_s, in_s = (float(x) for x in times_to_radius(elements, r))
        speed = float(elements.speed_at(nu))
    return RadiusCrossing(r, "crosses", "", nu, _finite(from_q), _finite(out_s), _finite(in_s),
                          _finite(speed), v_esc)


def radius_from_altitude(altitude_m: float, central_radius_m: float) -> float:
    """The radius of an altitude above the central body's surface; refused below the centre."""
    r = altitude_m + central_radius_m
    if not (math.isfinite(r) and r > 0):
        raise MissionRefused("radius", "the radius must be above 0 (the centre of the central "
                             "body)")
    return r


# --- hyperbolic pass and speeds ---------------------------------------------------------


@dataclass(frozen=True)
class HyperbolicPass:
    """An open conic's pass: excess speed (m/s), turning angle and the outgoing
    asymptote's true anomaly (rad)."""

    v_infinity_m_s: float
    turning_angle_rad: float
    asymptote_nu_rad: float


def hyperbolic_pass(elements: Elements) -> HyperbolicPass | None:
    """The pass of an open conic; None for an ellipse."""
    e = float(elements.e)
    if e < 1.0:
        return None
    v_inf = 0.0 if e == 1.0 else float(elements.v_infinity)
    return HyperbolicPass(v_inf, 2.0 * math.asin(1.0 / e), math.acos(-1.0 / e))


@dataclass(frozen=True)
class SpeedHere:
    """Distance (m) and speed (m/s) at the elements' instant, and the escape speed there."""

    radius_m: float
    speed_m_s: float
    escape_speed_m_s: float


def speed_here(elements: Elements, mu: float) -> SpeedHere:
    nu = float(elements.nu)
    r = float(elements.radius_at(nu))
    return SpeedHere(r, float(elements.speed_at(nu)), float(escape_speed(mu, r)))
