"""Mission-design answers for the panels, formatted: a transfer between two circular
bodies of the scene, and quick answers about the selected body's conic. Plain Python:
no imgui.

Every number and every refusal comes from ``viewer.mission`` (the same functions the
command line calls, so the two cannot disagree); this module parses what the user types
(with units: a bare length is in the scene's length unit, as on the command line),
turns refusals into ``EditRefused`` and writes every number with its unit
(``viewer.units.format``).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from ..mission import CAUTION
from ..mission import quick as mq
from ..mission.transfer import (
    KINDS,
    MAX_E,
    MAX_PLANE_RAD,
    TransferPlan,
    circular_bodies,
    lower_first,
)
from ..mission.transfer import plan_to_radius as _plan_to_radius
from ..mission.transfer import plan_transfer as _plan
from ..orbit.flight import conic_warnings, escape_speed
from ..scene.model import Body, Scene
from ..units import QuantityError, parse_quantity
from ..units.format import (
    format_angle,
    format_direction,
    format_length,
    format_speed,
    format_time,
)
from .editor import EditRefused

__all__ = ["CAUTION", "KINDS", "MAX_E", "MAX_PLANE_RAD", "QuickInputs", "TransferPlan",
           "body_warnings", "circular_bodies", "default_via", "hyperbola_rows", "lower_first",
           "plan_to_radius", "plan_transfer", "quick_answer_rows", "radius_crossing_rows",
           "side_by_side_rows", "speed_rows", "time_of_flight_between", "transfer_pair",
           "transfer_rows"]

Rows = tuple[tuple[str, str], ...]


def _refused(err: mq.MissionRefused, what: str | None = None) -> EditRefused:
    return EditRefused(what or err.field, err.problems)


# --- transfers ---------------------------------------------------------------------------


def _via(scene: Scene, kind: str, via_text: str) -> float | None:
    if kind != "bi-elliptic":
        return None
    try:
        return parse_quantity(via_text, "length", scene.length_unit)
    except QuantityError as err:
        raise EditRefused("transfer", f"via radius: {err}") from None


def plan_transfer(scene: Scene, from_index: int, to_index: int, kind: str = "hohmann",
                  via_text: str = "", departure_s: float = 0.0, name: str = "") -> TransferPlan:
    """``viewer.mission.transfer.plan_transfer`` with the via radius as typed text (a
    bare number in the scene's length unit); refusals as EditRefused."""
    via = _via(scene, kind, via_text)
    try:
        return _plan(scene, from_index, to_index, kind, via, departure_s, name)
    except mq.MissionRefused as err:
        raise _refused(err, "transfer") from None


def plan_to_radius(scene: Scene, from_index: int, radius_text: str, altitude: bool = False,
                   kind: str = "hohmann", via_text: str = "", departure_s: float = 0.0,
                   name: str = "") -> TransferPlan:
    """``viewer.mission.transfer.plan_to_radius`` to a typed radius (or altitude, with
    ``altitude``), as ``perifocal transfer --to-radius`` (``--to-altitude``) reads it: a
    bare number in the scene's length unit; refusals as EditRefused."""
    if not radius_text.strip():
        raise EditRefused("to", f"type the arrival circle's {'altitude' if altitude else 'radius'}"
                          f', e.g. "42164 km" (a bare number is in {scene.length_unit})')
    r2 = _radius(scene, radius_text, altitude)
    via = _via(scene, kind, via_text)
    try:
        return _plan_to_radius(scene, from_index, r2, kind, via, departure_s, name)
    except mq.MissionRefused as err:
        raise _refused(err, "transfer") from None


def transfer_pair(scene: Scene, from_index: int | None, to_index: int | None
                  ) -> tuple[int | None, int | None]:
    """The transfer's bodies: those chosen while they are circular and differ, else
    "from" is the lowest circle and "to" the next one up (None where there is none)."""
    by_radius = lower_first(scene, circular_bodies(scene))
    if from_index not in by_radius:
        from_index = by_radius[0] if by_radius else None
    if to_index not in by_radius or to_index == from_index:
        to_index = next((k for k in by_radius if k != from_index), None)
    return from_index, to_index


def default_via(scene: Scene, from_index: int, to_index: int | None, radius_text: str = "",
                altitude: bool = False) -> str:
    """The bi-elliptic via radius offered until one is typed: three times the larger of
    the two circles (the departure circle's alone while the target cannot be read)."""
    radii = [float(scene.bodies[from_index].elements.a)]
    if to_index is not None and not radius_text:
        radii.append(float(scene.bodies[to_index].elements.a))
    elif radius_text.strip():
        try:
            radii.append(_radius(scene, radius_text, altitude))
        except EditRefused:
            pass
    return f"{3 * max(radii) / 1e3:.0f} km"


def side_by_side_rows(hohmann: TransferPlan | EditRefused,
                      bi_elliptic: TransferPlan | EditRefused) -> tuple[tuple[str, str, str], ...]:
    """(what, Hohmann, bi-elliptic) rows comparing the two ways to the same circle: the
    total dv, the time of flight and the burns; a refused plan shows its reason."""
    def cells(plan: TransferPlan | EditRefused) -> list[str]:
        if isinstance(plan, EditRefused):
            return ["refused: " + plan.problems[0], "", ""]
        tr = plan.transfer
        return [f"{float(tr.dv_total_m_s) / 1e3:.4f} km/s",
                format_time(float(tr.time_of_flight_s), 5), str(len(tr.burns))]
    h, b = cells(hohmann), cells(bi_elliptic)
    return tuple(zip(("total dv", "time of flight", "burns"), h, b, strict=True))


def transfer_rows(plan: TransferPlan, scene: Scene
                  ) -> tuple[tuple[tuple[str, str, str, str], ...], dict[str, Rows]]:
    """(burns, sections) of a plan. A burn is (name, dv, radius, time after departure);
    the sections "totals", "phasing" and "legs" hold (label, text) rows; every number
    with its unit."""
    L = scene.length_unit
    tr = plan.transfer
    burns = tuple((b.label, format_speed(float(b.dv_m_s), 5, signed=True),
                   format_length(float(b.radius_m), L),
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
        "phasing": ((("phasing", "none: no body waits on the arrival circle"),)
                    if plan.phase_now_rad is None else (
                    ("phase angle needed", f"{format_direction(plan.phase_needed_rad)} "
                                           "(target ahead)"),
                    ("phase angle now", format_direction(plan.phase_now_rad)),
                    ("next window", "none found" if plan.next_window_s is None else
                     f"in {format_time(plan.next_window_s - plan.departure_s, 5)}"),
                    ("  then every", format_time(plan.synodic_s, 5)))),
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
    units; bare numbers in deg), by ``viewer.mission.quick.flight_time``."""
    nu0 = _angle(nu_from_text, "from")
    nu1 = _angle(nu_to_text, "to")
    try:
        return mq.flight_time(body.elements, nu0, nu1).seconds
    except mq.MissionRefused as err:
        raise _refused(err, "true anomaly") from None


def _radius(scene: Scene, text: str, altitude: bool) -> float:
    try:
        x = parse_quantity(text, "length", scene.length_unit)
    except QuantityError as err:
        raise EditRefused("radius", str(err)) from None
    try:
        return mq.radius_from_altitude(x, scene.center.radius_m) if altitude else x
    except mq.MissionRefused as err:
        raise _refused(err) from None


def radius_crossing_rows(scene: Scene, index: int, t_s: float, text: str,
                         altitude: bool = False) -> Rows:
    """When the body is at the radius ``text`` (or altitude, with ``altitude``): the true
    anomaly there, the time from periapsis, the next outbound and inbound crossings
    after scene time ``t_s``, and the speed and escape speed there. Refused for a radius
    the conic never reaches."""
    body = scene.bodies[index]
    L = scene.length_unit
    r = _radius(scene, text, altitude)
    try:
        rc = mq.radius_crossing(body.elements_at(t_s), r, scene.center.gm_m3_s2, L)
    except mq.MissionRefused as err:
        raise _refused(err) from None
    if rc.kind == "never":
        raise EditRefused("radius", f"never at {format_length(r, L)}: {rc.reason}")
    R = scene.center.radius_m
    rows = [("radius / altitude", f"{format_length(r, L)} / {format_length(r - R, L)}")]
    if rc.kind == "always":
        rows.append(("on this orbit", rc.reason))
    else:
        assert rc.nu_rad is not None
        from_q = rc.from_periapsis_s
        rows += [("true anomaly there", f"+/- {format_angle(rc.nu_rad)} (out / in)"),
                 ("from periapsis", f"{format_time(from_q)}  ({from_q or 0.0:,.1f} s)")]
        for label, dt in (("next outbound", rc.next_outbound_s),
                          ("next inbound", rc.next_inbound_s)):
            if dt is not None:
                rows += [(label, f"in {format_time(dt)}"),
                         ("  at", scene.epoch.plus_seconds(t_s + dt).iso())]
            else:
                rows.append((label, "already passed (open orbit)"))
    rows += [("speed there", format_speed(rc.speed_m_s)),
             ("escape speed there", format_speed(rc.escape_speed_m_s))]
    return tuple(rows)


def _escape_row(scene: Scene, text: str, altitude: bool) -> Rows:
    """The escape speed at a radius the body never reaches (as ``perifocal timing``
    gives it); nothing when the text is not a radius."""
    try:
        r = _radius(scene, text, altitude)
    except EditRefused:
        return ()
    if not (r > 0 and math.isfinite(r)):
        return ()
    return (("escape speed there", format_speed(float(escape_speed(scene.center.gm_m3_s2,
                                                                     r)))),)


def speed_rows(scene: Scene, index: int, t_s: float) -> Rows:
    """Distance and speed now, the escape speed at this distance and the margin."""
    here = mq.speed_here(scene.bodies[index].elements_at(t_s), scene.center.gm_m3_s2)
    return (
        ("distance now", format_length(here.radius_m, scene.length_unit)),
        ("speed now", format_speed(here.speed_m_s)),
        ("escape speed here", format_speed(here.escape_speed_m_s)),
        ("speed minus escape", format_speed(here.speed_m_s - here.escape_speed_m_s,
                                            signed=True)),
    )


def hyperbola_rows(body: Body) -> Rows:
    """For an open conic: v-infinity, the turning angle and the asymptote's true anomaly
    (nothing for an ellipse), from ``viewer.mission.quick.hyperbolic_pass``."""
    hp = mq.hyperbolic_pass(body.elements)
    if hp is None:
        return ()
    note = "  (a parabola)" if float(body.elements.e) == 1.0 else ""
    return (
        ("v-infinity", format_speed(hp.v_infinity_m_s) + note),
        ("turning angle", format_angle(hp.turning_angle_rad)),
        ("asymptote true anomaly", f"+/- {format_angle(hp.asymptote_nu_rad)}  (from periapsis)"),
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
            rows["radius"] = _escape_row(scene, inputs.radius, inputs.altitude)
    rows["speed"] = speed_rows(scene, index, t_s)
    rows["hyperbola"] = hyperbola_rows(body)
    return rows, problems
