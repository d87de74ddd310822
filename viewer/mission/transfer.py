"""Transfers between two circular, coplanar bodies of a scene, planned once for every
front end: the burns and legs (``viewer.orbit.transfer``: Hohmann, bi-elliptic), the legs
placed in the departure orbit's plane as bodies ready to add, the phasing and the
warnings.

Symbols: u argument of latitude (argp + nu, rad: the angle from the ascending node in
the orbit plane); n mean motion (rad/s); r1, r2 the circles' radii, rb a bi-elliptic
transfer's intermediate apoapsis (m).

Decided cases (the same answer in the window and on the command line):

* both bodies must be on circles (e below ``MAX_E``; a is the radius) whose planes are
  within ``MAX_PLANE_RAD``; two bodies on circles of the same radius (to 1e-9) have
  nothing to transfer, so that is refused rather than answered with a zero dv;
* a leg k starts at burn k, on the departure line when k is even and on the opposite
  side when odd (each leg is half an ellipse). Its plane is the departure orbit's
  (i, raan); its periapsis lies where its anomaly at the start (0 at periapsis, pi at
  apoapsis) puts it: argp = u_start - nu_start;
* a transfer to a typed radius (``plan_to_radius``) goes to the circle of that radius in
  the departure orbit's plane; it has no target body, so no phasing, and a radius inside
  the central body or equal to the departure circle's is refused;
* the phase angle is the target's lead over the departure body about the departure
  orbit's normal, in [0, 2 pi); the next window is the first departure at or after the
  asked time with the needed lead, then one every synodic period.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from ..orbit import Elements, OrbitError, state_from_elements
from ..orbit.flight import conic_warnings
from ..orbit.transfer import Transfer, bi_elliptic, hohmann
from ..scene.loader import free_color
from ..scene.model import Body, BodyShow, Scene
from ..units.format import format_length
from ..units.limits import MAX_TIME_S, limit_problem
from .quick import MissionRefused

#: Largest eccentricity taken as circular, and the largest angle between the two orbit
#: planes, for a transfer between circles.
MAX_E = 0.01
MAX_PLANE_RAD = math.radians(0.5)
TWO_PI = 2.0 * math.pi
KINDS = ("hohmann", "bi-elliptic")


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
    #: leads at ``departure_s`` (rad, [0, 2 pi), about the departure orbit's normal;
    #: None for a transfer to a radius, which has no target body).
    phase_needed_rad: float
    phase_now_rad: float | None
    #: Scene time of the first departure at or after ``departure_s`` with the needed
    #: phase (None when bodies that follow an ephemeris never reach it in the search,
    #: or there is no target body), and the synodic period between such chances (s).
    next_window_s: float | None
    synodic_s: float | None
    warnings: tuple[str, ...]

    @property
    def leg_names(self) -> tuple[str, ...]:
        return tuple(b.name for b in self.legs)


def _normal(el: Elements) -> np.ndarray:
    return np.asarray(el.perifocal_basis()[2], dtype=np.float64)


def _circle_problem(body: Body, role: str) -> list[str]:
    e = float(body.elements.e)
    if e < MAX_E:
        return []
    return [f"{role} {body.name!r} is not on a circle (e = {e:.4g}; a transfer between "
            f"circles needs e below {MAX_E:g})"]


def lower_first(scene: Scene, indices: list[int]) -> list[int]:
    """Circular body indices ordered by radius, lowest first (the usual "from")."""
    return sorted(indices, key=lambda k: float(scene.bodies[k].elements.a))


def plan_transfer(scene: Scene, from_index: int, to_index: int, kind: str = "hohmann",
                  via_m: float | None = None, departure_s: float = 0.0,
                  name: str = "") -> TransferPlan:
    """Plan a Hohmann (``kind`` "hohmann") or bi-elliptic ("bi-elliptic", through the
    apoapsis radius ``via_m``) transfer from body ``from_index`` to body ``to_index``,
    departing at scene time ``departure_s`` (s) from where the departure body is then.
    Raises MissionRefused listing everything that does not allow it."""
    if kind not in KINDS:
        raise MissionRefused("transfer", f"unknown transfer {kind!r}; allowed: "
                             f"{', '.join(KINDS)}")
    if from_index == to_index:
        raise MissionRefused("to", "the departure and arrival bodies are the same; choose two "
                             "different bodies")
    dep, arr = scene.bodies[from_index], scene.bodies[to_index]
    # Bodies that follow an ephemeris: their osculating conics at the departure time.
    real = dep.track is not None and arr.track is not None
    if real:
        dep, arr = dep.osculating(departure_s), arr.osculating(departure_s)
    problems = _circle_problem(dep, "from") + _circle_problem(arr, "to")
    tilt = math.acos(float(np.clip(np.dot(_normal(dep.elements), _normal(arr.elements)),
                                   -1.0, 1.0)))
    if tilt > MAX_PLANE_RAD:
        problems.append(f"the orbits are not coplanar: their planes are "
                        f"{math.degrees(tilt):.4g} deg apart (at most "
                        f"{math.degrees(MAX_PLANE_RAD):g} deg; a plane change is not part of "
                        f"this transfer)")
    notes: tuple[str, ...] = ()
    if real and problems:  # real planets: the textbook estimate between mean circles
        assert dep.track is not None
        notes = (f"{dep.name} and {arr.name} follow {dep.track.source}: treated as circles "
                 f"of radius a (osculating at departure) in {dep.name}'s plane (their e are "
                 f"{float(dep.elements.e):.3g} and {float(arr.elements.e):.3g}, their planes "
                 f"{math.degrees(tilt):.3g} deg apart); the window is found from their real "
                 f"positions. For transfers on real dates see perifocal porkchop (Lambert)",)
        problems = []
    r1, r2 = float(dep.elements.a), float(arr.elements.a)
    if math.isclose(r1, r2, rel_tol=1e-9):
        problems.append("both circles have the same radius: there is nothing to transfer")
    if problems:
        raise MissionRefused("transfer", problems)
    tr, legs, warnings = _transfer_legs(scene, dep, r2, kind, via_m, departure_s,
                                        name.strip() or f"{dep.name} to {arr.name}")
    now = dep.elements_at(departure_s)
    mu = scene.center.gm_m3_s2

    # Phasing: the target's lead over the departure body, about the departure normal.
    w = _normal(dep.elements)
    r_dep = state_from_elements(now, mu)[0]
    r_tgt = state_from_elements(arr.elements_at(departure_s), mu)[0]
    lead = math.atan2(float(np.dot(np.cross(r_dep, r_tgt), w)), float(np.dot(r_dep, r_tgt)))
    lead %= TWO_PI
    n_dep, n_tgt = math.sqrt(mu / r1**3), math.sqrt(mu / r2**3)
    synodic = TWO_PI / abs(n_tgt - n_dep)
    # The lead changes at n_tgt - n_dep; the wait until it is the needed one, mod synodic.
    wait: float | None = ((float(tr.phase_angle_rad) - lead) / (n_tgt - n_dep)) % synodic
    if real:
        wait = _real_wait(dep, arr, w, float(tr.phase_angle_rad), synodic, departure_s)

    return TransferPlan(kind=kind, from_name=dep.name, to_name=arr.name,
                        departure_s=departure_s, transfer=tr, legs=legs,
                        phase_needed_rad=float(tr.phase_angle_rad), phase_now_rad=lead,
                        next_window_s=None if wait is None else departure_s + wait,
                        synodic_s=synodic, warnings=notes + warnings)


def plan_to_radius(scene: Scene, from_index: int, radius_m: float, kind: str = "hohmann",
                   via_m: float | None = None, departure_s: float = 0.0,
                   name: str = "") -> TransferPlan:
    """Plan a transfer from the circular body ``from_index`` to the circle of radius
    ``radius_m`` (m, from the centre) in its plane, departing at scene time
    ``departure_s``: the same burns and legs as to a body on that circle, with no target
    to meet, so no phasing (``phase_now_rad``, ``next_window_s`` and ``synodic_s`` are
    None). Raises MissionRefused listing everything that does not allow it."""
    if kind not in KINDS:
        raise MissionRefused("transfer", f"unknown transfer {kind!r}; allowed: "
                             f"{', '.join(KINDS)}")
    dep = scene.bodies[from_index]
    if dep.track is not None:
        dep = dep.osculating(departure_s)
    r2 = float(radius_m)
    if problems := _circle_problem(dep, "from"):
        raise MissionRefused("from", problems)
    if not (math.isfinite(r2) and r2 > 0) or limit_problem(r2, "length") is not None:
        raise MissionRefused("to", "the target radius must be a positive, finite distance "
                             "from the centre")
    L, R = scene.length_unit, scene.center.radius_m
    if r2 <= R:
        raise MissionRefused("to", f"the target radius {format_length(r2, L)} is inside the "
                             f"central body (radius {format_length(R, L)}); give a larger one")
    if math.isclose(float(dep.elements.a), r2, rel_tol=1e-9):
        raise MissionRefused("to", "the target circle is the departure circle: there is "
                             "nothing to transfer")
    to_name = f"the circle of {format_length(r2, L)}"
    tr, legs, warnings = _transfer_legs(scene, dep, r2, kind, via_m, departure_s,
                                        name.strip() or f"{dep.name} to {format_length(r2, L)}")
    return TransferPlan(kind=kind, from_name=dep.name, to_name=to_name,
                        departure_s=departure_s, transfer=tr, legs=legs,
                        phase_needed_rad=float(tr.phase_angle_rad), phase_now_rad=None,
                        next_window_s=None, synodic_s=None, warnings=warnings)


def _transfer_legs(scene: Scene, dep: Body, r2: float, kind: str, via_m: float | None,
                   departure_s: float, label: str
                   ) -> tuple[Transfer, tuple[Body, ...], tuple[str, ...]]:
    """The transfer from ``dep``'s circle to radius ``r2`` (checked: the via radius, the
    time limit), its legs as bodies named after ``label``, and each leg's warnings."""
    r1 = float(dep.elements.a)
    rb = 0.0
    if kind == "bi-elliptic":
        if via_m is None or not (math.isfinite(via_m) and via_m > 0):
            raise MissionRefused("via", "a bi-elliptic transfer needs its intermediate "
                                 "apoapsis radius, a positive distance")
        if via_m < max(r1, r2):
            raise MissionRefused("via", f"the intermediate radius must be at least the larger "
                                 f"circle's, {max(r1, r2) / 1e3:,.3f} km")
        rb = via_m
    mu = scene.center.gm_m3_s2
    try:
        with np.errstate(over="raise", invalid="raise"):
            tr = hohmann(r1, r2, mu) if kind == "hohmann" else bi_elliptic(r1, rb, r2, mu)
    except (OrbitError, FloatingPointError) as err:
        raise MissionRefused("via" if kind == "bi-elliptic" else "transfer", str(err)) from None
    tof = float(tr.time_of_flight_s)
    if limit_problem(tof, "time") is not None:
        raise MissionRefused("via" if kind == "bi-elliptic" else "transfer", (
            f"the transfer would take {tof:.3g} s, beyond the {MAX_TIME_S:g} s every time is "
            f"held to" + ("; choose a smaller intermediate radius" if kind == "bi-elliptic"
                          else "")))

    now = dep.elements_at(departure_s)
    u0 = float(now.argp) + float(now.nu)
    color = free_color(scene.bodies)
    legs = []
    for k, (leg, burn) in enumerate(zip(tr.legs, tr.burns, strict=False)):
        nu0 = float(leg.nu)
        el = Elements(a=float(leg.a), e=float(leg.e), i=float(now.i), raan=float(now.raan),
                      argp=math.remainder(u0 + k * math.pi - nu0, TWO_PI) % TWO_PI, nu=nu0,
                      mu=mu)
        start = departure_s + float(burn.time_s)
        legs.append(Body(
            name=label if len(tr.legs) == 1 else f"{label} (leg {k + 1})", elements=el,
            epoch_offset_s=start, color=color, show=BodyShow(apsides=True),
            # Only the half ellipse between this leg's burns is flown.
            flight_s=(start, departure_s + float(tr.burns[k + 1].time_s))))
    c = scene.center
    warnings = tuple(f"leg {k + 1}: {line}" for k, b in enumerate(legs)
                     for line in conic_warnings(b.elements, c.radius_m, c.atmosphere_m,
                                                c.soi_radius_m))
    return tr, tuple(legs), warnings


def _real_wait(dep: Body, arr: Body, w: np.ndarray, need_rad: float, synodic_s: float,
               t_dep: float) -> float | None:
    """Seconds from t_dep to the first time the target's real lead over the departure
    body (angle about the departure plane's normal, from the ephemeris) is the phase angle
    the transfer needs; searched a day at a time over 1.5 synodic periods, then
    interpolated. None if it never is (or the search would leave the ephemeris' span)."""
    assert dep.track is not None and arr.track is not None
    _, hi = dep.track.span_s()
    t = np.arange(t_dep, min(t_dep + 1.5 * synodic_s, hi), 86400.0)
    if t.size < 2:
        return None
    r1, _ = dep.track.state(t)
    r2, _ = arr.track.state(t)
    lead = np.arctan2(np.einsum("ij,j->i", np.cross(r1, r2), w), np.einsum("ij,ij->i", r1, r2))
    miss = np.angle(np.exp(1j * (lead - need_rad)))  # wrapped to (-pi, pi]
    if miss[0] == 0.0:
        return 0.0
    cross = np.flatnonzero((np.sign(miss[:-1]) != np.sign(miss[1:]))
                           & (np.abs(miss[:-1]) < 1.0) & (np.abs(miss[1:]) < 1.0))
    if cross.size == 0:
        return None
    k = int(cross[0])
    frac = miss[k] / (miss[k] - miss[k + 1])
    return float(t[k] + frac * (t[k + 1] - t[k]) - t_dep)


def check_leg_names(scene: Scene, plan: TransferPlan) -> None:
    """Refuse adding the plan's legs to ``scene`` when a leg's name is taken."""
    taken = [b.name for b in plan.legs if any(o.name == b.name for o in scene.bodies)]
    if taken:
        raise MissionRefused("name", f"the scene already has a body named {taken[0]!r}; give "
                             f"the transfer another name")


def body_index(scene: Scene, name: str, field: str) -> int:
    """The index of the body called ``name``; MissionRefused listing the scene's bodies."""
    for k, b in enumerate(scene.bodies):
        if b.name == name:
            return k
    names = ", ".join(repr(b.name) for b in scene.bodies) or "none"
    raise MissionRefused(field, f"the scene has no body named {name!r}; its bodies: {names}")
