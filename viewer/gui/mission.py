"""Mission-design answers for the panels: a transfer between two circular bodies of the
scene, and quick answers about the selected body's conic. Plain Python: no imgui.

The numbers come from ``viewer.orbit.transfer`` (Hohmann and bi-elliptic burns, legs,
time of flight, phase angle) and ``viewer.orbit.flight`` (time of flight between true
anomalies, radius crossings, escape speed, hyperbolic pass, warnings). This module picks
the bodies, parses what the user types (with units), places the transfer legs in the
departure body's plane and writes every number with its unit.

Symbols: u argument of latitude (argp + nu, rad: the angle from the ascending node in
the orbit plane); n mean motion (rad/s); other symbols as in ``viewer.orbit.flight``.

Placing a leg: leg k of a transfer starts at burn k, on the departure line when k is
even and on the opposite side when odd (each leg is half an ellipse). Its plane is the
departure orbit's (i, raan), and its periapsis lies where its anomaly at the start
(0 at periapsis, pi at apoapsis) puts it: argp = u_start - nu_start.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from ..mission import CAUTION
from ..orbit import Elements, OrbitError, state_from_elements
from ..orbit.flight import (
    conic_warnings,
    escape_speed,
    time_from_periapsis_to_radius,
    time_of_flight,
    times_to_radius,
    true_anomaly_at_radius,
    turning_angle,
)
from ..orbit.transfer import Transfer, bi_elliptic, hohmann
from ..scene.model import Body, BodyShow, Scene
from ..units import QuantityError, parse_quantity
from .editor import NEW_BODY_COLORS, EditRefused
from .readout import format_angle, format_length, format_speed, format_time

__all__ = ["CAUTION", "MAX_E", "MAX_PLANE_RAD", "QuickInputs", "TransferPlan",
           "body_warnings", "circular_bodies", "hyperbola_rows", "plan_transfer",
           "quick_answer_rows", "radius_crossing_rows", "speed_rows", "time_of_flight_between",
           "transfer_rows"]

#: Largest eccentricity taken as circular, and the largest angle between the two orbit
#: planes, for a transfer between circles (the same limits as ``perifocal transfer``).
MAX_E = 0.01
MAX_PLANE_RAD = math.radians(0.5)
TWO_PI = 2.0 * math.pi
KINDS = ("hohmann", "bi-elliptic")

Rows = tuple[tuple[str, str], ...]


# --- transfers ---------------------------------------------------------------------------


def circular_bodies(scene: Scene) -> list[int]:
    """Indices of the bodies on (near-)circular orbits, e below MAX_E."""
    return [k for k, b in enumerate(scene.bodies) if float(b.elements.e) < MAX_E]


@dataclass(frozen=True)
class TransferPlan:
    """A transfer from one circular body to another, departing at scene time
    ``departure_s``: the burns and legs (``transfer``), the legs as bodies ready to add,
    the phasing and the warnings of each leg."""

    kind: str
    from_name: str
    to_name: str
    departure_s: float
    transfer: Transfer
    legs: tuple[Body, ...]
    #: How far the target must lead the departure body at departure, and how far it
    #: leads at ``departure_s`` (rad, [0, 2 pi), about the departure orbit's normal).
    phase_needed_rad: float
    phase_now_rad: float
    #: Scene time of the first departure at or after ``departure_s`` with the needed
    #: phase, and the synodic period between such chances (s).
    next_window_s: float
    synodic_s: float
    warnings: tuple[str, ...]


def _normal(el: Elements) -> np.ndarray:
    return np.asarray(el.perifocal_basis()[2], dtype=np.float64)


def _circle_problem(body: Body, role: str) -> list[str]:
    e = float(body.elements.e)
    if e < MAX_E:
        return []
    return [f"{role} {body.name!r} is not on a circle (e = {e:.4g}; a transfer between "
            f"circles needs e below {MAX_E:g})"]


def plan_transfer(scene: Scene, from_index: int, to_index: int, kind: str = "hohmann",
                  via_text: str = "", departure_s: float = 0.0, name: str = "") -> TransferPlan:
    """Plan a Hohmann (``kind`` "hohmann") or bi-elliptic ("bi-elliptic", through the
    apoapsis radius ``via_text``, text with a unit) transfer from body ``from_index`` to
    body ``to_index``, departing at scene time ``departure_s`` (s) from where the
    departure body is then. Raises EditRefused listing what does not allow it.
    """
    if kind not in KINDS:
        raise ValueError(kind)
    dep, arr = scene.bodies[from_index], scene.bodies[to_index]
    if from_index == to_index:
        raise EditRefused("transfer", "choose two different bodies")
    problems = _circle_problem(dep, "from") + _circle_problem(arr, "to")
    tilt = math.acos(float(np.clip(np.dot(_normal(dep.elements), _normal(arr.elements)),
                                   -1.0, 1.0)))
    if tilt > MAX_PLANE_RAD:
        problems.append(f"the orbits are {math.degrees(tilt):.4g} deg apart in plane (at most "
                        f"{math.degrees(MAX_PLANE_RAD):g} deg; no plane change here)")
    r1, r2 = float(dep.elements.a), float(arr.elements.a)
    if math.isclose(r1, r2, rel_tol=1e-9):
        problems.append("both circles have the same radius: there is nothing to transfer")
    mu = scene.center.gm_m3_s2
    rb = None
    if kind == "bi-elliptic":
        try:
            rb = parse_quantity(via_text, "length", "km")
        except QuantityError as err:
            problems.append(f"via radius: {err}")
    if problems:
        raise EditRefused("transfer", problems)
    try:
        tr = hohmann(r1, r2, mu) if rb is None else bi_elliptic(r1, rb, r2, mu)
    except OrbitError as err:
        raise EditRefused("transfer", str(err)) from None

    now = dep.elements_at(departure_s)
    u0 = float(now.argp) + float(now.nu)
    legs = []
    label = name.strip() or f"{dep.name} to {arr.name}"
    color = NEW_BODY_COLORS[len(scene.bodies) % len(NEW_BODY_COLORS)]
    for k, (leg, burn) in enumerate(zip(tr.legs, tr.burns, strict=False)):
        nu0 = float(leg.nu)
        el = Elements(a=float(leg.a), e=float(leg.e), i=float(now.i), raan=float(now.raan),
                      argp=math.remainder(u0 + k * math.pi - nu0, TWO_PI) % TWO_PI, nu=nu0,
                      mu=mu)
        legs.append(Body(
            name=label if len(tr.legs) == 1 else f"{label} (leg {k + 1})", elements=el,
            epoch_offset_s=departure_s + float(burn.time_s), color=color,
            show=BodyShow(apsides=True)))

    # Phasing: the target's lead over the departure body, about the departure normal.
    w = _normal(dep.elements)
    r_dep = state_from_elements(now, mu)[0]
    r_tgt = state_from_elements(arr.elements_at(departure_s), mu)[0]
    lead = math.atan2(float(np.dot(np.cross(r_dep, r_tgt), w)), float(np.dot(r_dep, r_tgt)))
    lead %= TWO_PI
    n_dep, n_tgt = math.sqrt(mu / r1**3), math.sqrt(mu / r2**3)
    synodic = TWO_PI / abs(n_tgt - n_dep)
    # The lead changes at n_tgt - n_dep; the wait until it is the needed one, mod synodic.
    wait = ((float(tr.phase_angle_rad) - lead) / (n_tgt - n_dep)) % synodic

    c = scene.center
    warnings = tuple(f"leg {k + 1}: {line}" for k, b in enumerate(legs)
                     for line in conic_warnings(b.elements, c.radius_m, c.atmosphere_m,
                                                c.soi_radius_m))
    return TransferPlan(kind=kind, from_name=dep.name, to_name=arr.name,
                        departure_s=departure_s, transfer=tr, legs=tuple(legs),
                        phase_needed_rad=float(tr.phase_angle_rad), phase_now_rad=lead,
                        next_window_s=departure_s + wait, synodic_s=synodic,
                        warnings=warnings)


def _signed_speed(v_m_s: float) -> str:
    return f"{v_m_s / 1e3:+.4f} km/s"


def transfer_rows(plan: TransferPlan, scene: Scene
                  ) -> tuple[tuple[tuple[str, str, str, str], ...], dict[str, Rows]]:
    """(burns, sections) of a plan. A burn is (name, dv, radius, time after departure);
    the sections "totals", "phasing" and "legs" hold (label, text) rows; every number
    with its unit."""
    L = scene.length_unit
    tr = plan.transfer
    burns = tuple((b.label, _signed_speed(float(b.dv_m_s)), format_length(float(b.radius_m), L),
                   "+" + format_time(float(b.time_s), 5)) for b in tr.burns)
    tof = float(tr.time_of_flight_s)
    legs: list[tuple[str, str]] = []
    for k, leg in enumerate(plan.legs):
        el = leg.elements
        legs += [(f"leg {k + 1}" if len(plan.legs) > 1 else "transfer orbit",
                  f"{format_length(float(el.periapsis), L)} to "
                  f"{format_length(float(el.apoapsis), L)}"),
                 ("  eccentricity", f"{float(el.e):.6g}")]
    return burns, {
        "totals": (("total dv", f"{float(tr.dv_total_m_s) / 1e3:.4f} km/s"),
                   ("time of flight", f"{format_time(tof, 5)}  ({tof:,.0f} s)")),
        "phasing": (("phase angle needed", f"{format_angle(plan.phase_needed_rad)} "
                                           "(target ahead)"),
                    ("phase angle now", format_angle(plan.phase_now_rad)),
                    ("next window", f"in {format_time(plan.next_window_s - plan.departure_s, 5)}"),
                    ("  then every", format_time(plan.synodic_s, 5))),
        "legs": tuple(legs),
    }


# --- quick answers -----------------------------------------------------------------------


@dataclass
class QuickInputs:
    """What the user typed into the quick-answers panel (texts with units)."""

    nu_from: str = "0 deg"
    nu_to: str = "180 deg"
    radius: str = ""
    altitude: bool = False  # ``radius`` is an altitude above the central body's radius


def _angle(text: str, what: str) -> float:
    try:
        return parse_quantity(text, "angle", "deg")
    except QuantityError as err:
        raise EditRefused(what, f"{what}: {err}") from None


def time_of_flight_between(body: Body, nu_from_text: str, nu_to_text: str) -> float:
    """Seconds to fly from true anomaly ``nu_from_text`` to ``nu_to_text`` (angles with
    units; bare numbers in deg) along the body's conic, in the direction of motion.
    Ellipse: the forward time, within one period. Open conic: t(to) - t(from), negative
    when "to" comes first. Refused for an anomaly beyond an open conic's asymptotes."""
    nu0 = _angle(nu_from_text, "from")
    nu1 = _angle(nu_to_text, "to")
    try:
        with np.errstate(invalid="ignore", divide="ignore"):
            return float(time_of_flight(body.elements, nu0, nu1))
    except OrbitError as err:
        raise EditRefused("true anomaly", str(err)) from None


def _radius(scene: Scene, text: str, altitude: bool) -> float:
    try:
        x = parse_quantity(text, "length", "km")
    except QuantityError as err:
        raise EditRefused("radius", str(err)) from None
    r = x + (scene.center.radius_m if altitude else 0.0)
    if not r > 0:
        raise EditRefused("radius", "the radius must be above 0 (the centre)")
    return r


def radius_crossing_rows(scene: Scene, index: int, t_s: float, text: str,
                         altitude: bool = False) -> Rows:
    """When the body is at the radius ``text`` (or altitude, with ``altitude``): the true
    anomaly there, the time from periapsis, and the next outbound and inbound crossings
    after scene time ``t_s``. Refused for a radius the conic never reaches."""
    body = scene.bodies[index]
    el = body.elements
    L = scene.length_unit
    r = _radius(scene, text, altitude)
    e = float(el.e)
    with np.errstate(invalid="ignore", divide="ignore"):
        nu = float(true_anomaly_at_radius(el, r))
    if not math.isfinite(nu):
        q = format_length(float(el.periapsis), L)
        if e < 1e-12:
            reason = f"the orbit is a circle: it stays at {q}"
        elif e < 1.0:
            reason = (f"the orbit stays between {q} and "
                      f"{format_length(float(el.apoapsis), L)}")
        else:
            reason = f"the orbit comes no closer than {q}"
        raise EditRefused("radius", f"never at {format_length(r, L)}: {reason}")
    with np.errstate(invalid="ignore", divide="ignore"):
        from_q = float(time_from_periapsis_to_radius(el, r))
        out_s, in_s = (float(x) for x in times_to_radius(body.elements_at(t_s), r))
    R = scene.center.radius_m
    rows = [("radius / altitude", f"{format_length(r, L)} / {format_length(r - R, L)}"),
            ("true anomaly there", f"+/- {format_angle(nu)} (out / in)"),
            ("from periapsis", f"{format_time(from_q)}  ({from_q:,.1f} s)")]
    for label, dt in (("next outbound", out_s), ("next inbound", in_s)):
        if math.isfinite(dt):
            rows += [(label, f"in {format_time(dt)}"),
                     ("  at", scene.epoch.plus_seconds(t_s + dt).iso())]
        else:
            rows.append((label, "already passed (open orbit)"))
    return tuple(rows)


def speed_rows(scene: Scene, index: int, t_s: float) -> Rows:
    """Distance and speed now, the escape speed at this distance and the margin."""
    body = scene.bodies[index]
    now = body.elements_at(t_s)
    nu = float(now.nu)
    r = float(now.radius_at(nu))
    v = float(now.speed_at(nu))
    v_esc = float(escape_speed(scene.center.gm_m3_s2, r))
    return (
        ("distance now", format_length(r, scene.length_unit)),
        ("speed now", format_speed(v)),
        ("escape speed here", format_speed(v_esc)),
        ("speed minus escape", f"{(v - v_esc) / 1e3:+.6g} km/s"),
    )


def hyperbola_rows(body: Body) -> Rows:
    """For an open conic: v-infinity, the turning angle and the asymptote's true anomaly
    (nothing for an ellipse). Turning angle 2 asin(1/e) (Curtis eq. 8.56); the outgoing
    asymptote is at true anomaly arccos(-1/e) from periapsis."""
    el = body.elements
    e = float(el.e)
    if e < 1.0:
        return ()
    if e == 1.0:
        return (("v-infinity", "0 km/s (a parabola)"),
                ("asymptote", "parallel to the axis (true anomaly 180 deg)"))
    v_inf = float(el.v_infinity)
    delta = float(turning_angle(v_inf, float(el.periapsis), float(el.mu)))
    nu_inf = math.acos(-1.0 / e)
    return (
        ("v-infinity", format_speed(v_inf)),
        ("turning angle", format_angle(delta)),
        ("asymptote true anomaly", f"+/- {format_angle(nu_inf)}  (from periapsis)"),
    )


def body_warnings(scene: Scene, index: int) -> list[str]:
    """Impact, atmosphere, sphere of influence and escape warnings for one body, with the
    scene's [center] atmosphere and soi_radius (``viewer.orbit.flight.conic_warnings``)."""
    c = scene.center
    return conic_warnings(scene.bodies[index].elements, c.radius_m, c.atmosphere_m,
                          c.soi_radius_m)


def quick_answer_rows(scene: Scene, index: int, t_s: float, inputs: QuickInputs
                      ) -> tuple[dict[str, Rows], dict[str, str]]:
    """Every quick answer for body ``index`` at scene time ``t_s``: rows per section
    ("flight", "radius", "speed", "hyperbola") and a refusal line per input section."""
    body = scene.bodies[index]
    rows: dict[str, Rows] = {}
    problems: dict[str, str] = {}
    try:
        t = time_of_flight_between(body, inputs.nu_from, inputs.nu_to)
        rows["flight"] = (("time of flight", f"{format_time(t)}  ({t:,.1f} s)"),)
    except EditRefused as err:
        problems["flight"] = err.problems[0]
    if inputs.radius.strip():
        try:
            rows["radius"] = radius_crossing_rows(scene, index, t_s, inputs.radius,
                                                  inputs.altitude)
        except EditRefused as err:
            problems["radius"] = err.problems[0]
    rows["speed"] = speed_rows(scene, index, t_s)
    rows["hyperbola"] = hyperbola_rows(body)
    return rows, problems
