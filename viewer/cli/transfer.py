"""``perifocal transfer``: a Hohmann (or bi-elliptic) transfer between two circular,
coplanar bodies of a scene: the burns, their dv and total, the time of flight, the
phasing; optionally a new scene with the transfer orbit added as a body."""

from __future__ import annotations

import argparse
import json
import math
import sys
from pathlib import Path
from typing import Any

from ..errors import UserInputError

EXAMPLES = """examples:
  the numbers of a Hohmann transfer from one body's circle to another's:
    perifocal transfer leo_geo.toml --from LEO --to GEO
  a bi-elliptic transfer through 500 000 km, departing 2 h after the scene epoch, written
  with its legs as bodies into a new scene:
    perifocal transfer leo_geo.toml --from LEO --to GEO --via "500000 km" --at "2 h" \\
        -o leo_geo_transfer.toml

Both bodies must be on (near-)circular orbits (e below 0.01; a is used as the radius) in
one plane (normals within 0.5 deg). The transfer starts where the --from body is at --at
(default: the scene epoch), in its plane and direction of motion. The phase angle is how
far the --to body must lead at departure for it to be at the meeting point on arrival;
"next window" is the first departure time from --at with that phase.

Between two bodies that follow an ephemeris (the planets of scenes/solar-system.toml)
the transfer is the textbook estimate: circles of radius a (the osculating a at --at)
in the departure body's plane, whatever their real e and inclination (a warning says
so), and the next window is found from their real positions:
    perifocal transfer scenes/solar-system.toml --from Earth --to Mars --at 2026-01-01
For transfers between their real positions on real dates, use perifocal porkchop.
"""

#: Largest eccentricity treated as circular, and the largest angle between orbit planes.
MAX_E = 0.01
MAX_PLANE_RAD = math.radians(0.5)


def add_parser(sub: Any) -> None:
    from . import CAUTION

    p = sub.add_parser(
        "transfer",
        help="Hohmann or bi-elliptic transfer between two circular bodies",
        description="Compute a Hohmann transfer (or a bi-elliptic one with --via) between the "
        "circular, coplanar orbits of two bodies of a scene; print the burns, the total dv, "
        "the time of flight and the phasing, and with -o write a new scene that adds the "
        "transfer orbit as a body.",
        epilog=EXAMPLES + "\n" + CAUTION,
        formatter_class=argparse.RawDescriptionHelpFormatter,
    )
    p.add_argument("scene", metavar="SCENE", help="the scene file")
    p.add_argument("--from", dest="from_body", required=True, metavar="NAME",
                   help="the body on the departure circle")
    p.add_argument("--to", dest="to_body", required=True, metavar="NAME",
                   help="the body on the arrival circle")
    p.add_argument("--via", metavar="RADIUS", help="bi-elliptic: the intermediate apoapsis "
                   'radius, e.g. "500000 km" (at least the larger circle)')
    p.add_argument("--at", metavar="T", default=None,
                   help="departure: an epoch or an offset from the scene epoch (default 0)")
    p.add_argument("-o", "--output", metavar="SCENE", help="write a new scene with the "
                   "transfer orbit(s) added as bodies")
    p.add_argument("--name", help='the transfer body\'s name (default "FROM to TO")')
    p.add_argument("--force", action="store_true", help="with -o: replace an existing file")
    p.add_argument("--json", action="store_true", help="print JSON with SI keys")
    p.set_defaults(run=run)


def _body(scene: Any, name: str, flag: str) -> Any:
    from .ephemeris import body_by_name

    return body_by_name(scene, name, flag)


def _circle_problems(body: Any, flag: str) -> list[str]:
    e = float(body.elements.e)
    if e >= MAX_E:
        return [f"{flag} {body.name!r}: e = {e:.6g} is not circular (a transfer between "
                f"circles needs e below {MAX_E})"]
    return []


def _normal(el: Any) -> Any:
    return el.perifocal_basis()[2]


def run(args: argparse.Namespace) -> int:
    import numpy as np

    from ..orbit import OrbitError
    from ..orbit.transfer import bi_elliptic, hohmann
    from ..scene import load_scene
    from ..units import QuantityError, parse_quantity
    from . import CAUTION
    from .ephemeris import time_arg

    scene = load_scene(args.scene)
    dep = _body(scene, args.from_body, "--from")
    arr = _body(scene, args.to_body, "--to")
    if dep.name == arr.name:
        raise UserInputError("--to", "--from and --to name the same body")
    at = time_arg(args.at, "--at", scene) if args.at is not None else scene.epoch
    t_dep = at.seconds_since(scene.epoch)
    # Bodies that follow an ephemeris: their osculating conics at the departure time.
    real = dep.track is not None and arr.track is not None
    if real:
        dep, arr = dep.osculating(t_dep), arr.osculating(t_dep)
    problems = _circle_problems(dep, "--from") + _circle_problems(arr, "--to")
    w1, w2 = _normal(dep.elements), _normal(arr.elements)
    plane = math.acos(float(np.clip(np.dot(w1, w2), -1.0, 1.0)))
    if plane > MAX_PLANE_RAD:
        problems.append(f"the orbits are not coplanar: their planes are {math.degrees(plane):.4g}"
                        f" deg apart (at most {math.degrees(MAX_PLANE_RAD):g} deg; a plane "
                        f"change is not part of this transfer)")
    approximations = []
    if real and problems:  # real planets: the textbook estimate between mean circles
        approximations = [f"{dep.name} and {arr.name} follow {dep.track.source}: treated as "
                          f"circles of radius a (osculating at departure) in {dep.name}'s plane "
                          f"(their e are {float(dep.elements.e):.3g} and "
                          f"{float(arr.elements.e):.3g}, their planes "
                          f"{math.degrees(plane):.3g} deg apart); the window is found from "
                          f"their real positions. For transfers on real dates see perifocal "
                          f"porkchop (Lambert)"]
        problems = []
    if problems:
        raise UserInputError(args.scene, problems)
    mu = scene.center.gm_m3_s2
    r1, r2 = float(dep.elements.a), float(arr.elements.a)
    try:
        if args.via is None:
            tr = hohmann(r1, r2, mu)
        else:
            try:
                rb = parse_quantity(args.via, "length", scene.length_unit)
            except QuantityError as err:
                raise UserInputError("--via", str(err)) from None
            tr = bi_elliptic(r1, rb, r2, mu)
    except OrbitError as err:
        raise UserInputError("--via" if args.via else args.scene, str(err)) from None
    geometry = _geometry(scene, dep, arr, tr, t_dep)
    if real:
        geometry["wait_s"] = _real_wait(dep, arr, geometry, t_dep)
    out = _describe(scene, dep, arr, tr, t_dep, geometry)
    out["warnings"] = approximations + out["warnings"]
    if out["next_window_s"] is not None:
        out["next_window_epoch"] = scene.epoch.plus_seconds(out["next_window_s"]).iso(decimals=3)
    name = args.name or f"{dep.name} to {arr.name}"
    if args.output is not None:
        _write(args, scene, tr, geometry, name, out)
    if args.json:
        out["caution"] = CAUTION
        json.dump(out, sys.stdout, indent=1)
        sys.stdout.write("\n")
    else:
        sys.stdout.write(_table(out) + "\n\n" + CAUTION + "\n")
    return 0


def _geometry(scene: Any, dep: Any, arr: Any, tr: Any, t_dep: float) -> dict[str, Any]:
    """Where the transfer starts and its legs' states, in the scene frame (SI)."""
    import numpy as np

    from ..orbit import state_from_elements

    mu = scene.center.gm_m3_s2
    r_now, _ = state_from_elements(dep.elements_at(t_dep), mu)
    w = _normal(dep.elements)
    r_hat = r_now / np.linalg.norm(r_now)
    t_hat = np.cross(w, r_hat)  # along the motion of the departure body
    legs = []
    for k, burn in enumerate(tr.burns[:-1]):
        side = 1.0 if k % 2 == 0 else -1.0  # legs alternate sides of the centre
        r = side * float(burn.radius_m) * r_hat
        v = side * float(burn.speed_after_m_s) * t_hat
        legs.append((t_dep + float(burn.time_s), r, v))
    # Phasing: the target's angle ahead of the departure point, about the orbit normal.
    r_tgt, _ = state_from_elements(arr.elements_at(t_dep), mu)
    phase_now = math.atan2(float(np.dot(np.cross(r_hat, r_tgt), w)), float(np.dot(r_hat, r_tgt)))
    n1 = math.sqrt(mu / float(dep.elements.a) ** 3)
    n2 = math.sqrt(mu / float(arr.elements.a) ** 3)
    rel = n2 - n1
    need = float(tr.phase_angle_rad)
    wait = None
    if abs(rel) > 0:
        wait = ((need - phase_now) / rel) % (2.0 * math.pi / abs(rel))
    return {"legs": legs, "phase_now": phase_now % (2 * math.pi), "phase_need": need,
            "wait_s": wait, "synodic_s": 2 * math.pi / abs(rel) if rel else None}


def _real_wait(dep: Any, arr: Any, geometry: dict[str, Any], t_dep: float) -> float | None:
    """Seconds from t_dep to the first time the target's real lead over the departure
    body (angle about the departure plane's normal, from the ephemeris) is the phase angle
    the transfer needs; searched a day at a time over 1.5 synodic periods, then
    interpolated. None if it never is (or the search would leave the ephemeris' span)."""
    import numpy as np

    synodic = geometry["synodic_s"]
    if synodic is None:
        return None
    lo, hi = dep.track.span_s()
    stop = min(t_dep + 1.5 * synodic, hi)
    t = np.arange(t_dep, stop, 86400.0)
    if t.size < 2:
        return None
    w = _normal(dep.elements)
    r1, _ = dep.track.state(t)
    r2, _ = arr.track.state(t)
    lead = np.arctan2(np.einsum("ij,j->i", np.cross(r1, r2), w), np.einsum("ij,ij->i", r1, r2))
    miss = np.angle(np.exp(1j * (lead - geometry["phase_need"])))  # wrapped to (-pi, pi]
    cross = np.flatnonzero((np.sign(miss[:-1]) != np.sign(miss[1:]))
                           & (np.abs(miss[:-1]) < 1.0) & (np.abs(miss[1:]) < 1.0))
    if miss[0] == 0.0:
        return 0.0
    if cross.size == 0:
        return None
    k = int(cross[0])
    frac = miss[k] / (miss[k] - miss[k + 1])
    return float(t[k] + frac * (t[k + 1] - t[k]) - t_dep)


def _describe(scene: Any, dep: Any, arr: Any, tr: Any, t_dep: float,
              geometry: dict[str, Any]) -> dict[str, Any]:
    """Everything the command reports, SI units, keys named with their unit."""
    from ..orbit.flight import conic_warnings

    c = scene.center
    legs = []
    warnings: list[str] = []
    for k, leg in enumerate(tr.legs):
        mu_leg = leg.with_(mu=c.gm_m3_s2)
        period = float(mu_leg.period)
        legs.append({"a_m": float(leg.a), "e": float(leg.e),
                     "periapsis_m": float(leg.periapsis), "apoapsis_m": float(leg.apoapsis),
                     "period_s": period, "time_of_flight_s": period / 2})
        warnings += [f"leg {k + 1}: {w}" for w in conic_warnings(
            mu_leg, c.radius_m, c.atmosphere_m, c.soi_radius_m)]
    return {
        "scene": scene.title, "kind": tr.kind, "from": dep.name, "to": arr.name,
        "mu_m3_s2": c.gm_m3_s2, "r1_m": float(tr.r1_m), "r2_m": float(tr.r2_m),
        "departure_epoch": scene.epoch.plus_seconds(t_dep).iso(decimals=3),
        "departure_time_s": t_dep,
        "burns": [{"name": b.label, "time_s": t_dep + float(b.time_s),
                   "radius_m": float(b.radius_m), "speed_before_m_s": float(b.speed_before_m_s),
                   "speed_after_m_s": float(b.speed_after_m_s), "dv_m_s": float(b.dv_m_s)}
                  for b in tr.burns],
        "dv_total_m_s": float(tr.dv_total_m_s),
        "time_of_flight_s": float(tr.time_of_flight_s),
        "legs": legs,
        "phase_angle_needed_rad": geometry["phase_need"],
        "phase_angle_now_rad": geometry["phase_now"],
        "next_window_s": (None if geometry["wait_s"] is None
                          else t_dep + geometry["wait_s"]),
        "synodic_period_s": geometry["synodic_s"],
        "warnings": warnings,
    }


def _write(args: argparse.Namespace, scene: Any, tr: Any, geometry: dict[str, Any], name: str,
           out: dict[str, Any]) -> None:
    from ..formats.scene_text import body_toml
    from ..orbit import elements_from_state
    from ..scene import load_scene_text, read_scene_text, write_atomic

    target = Path(args.output)
    if target.exists() and not args.force:
        raise UserInputError(str(target), "the file exists; choose a new name or give --force")
    names = [name] if len(geometry["legs"]) == 1 else [
        f"{name} (leg {k + 1})" for k in range(len(geometry["legs"]))]
    taken = [n for n in names if any(b.name == n for b in scene.bodies)]
    if taken:
        raise UserInputError("--name", f"the scene already has a body named {taken[0]!r}; give "
                             f"another with --name")
    text = read_scene_text(args.scene)
    blocks = []
    for k, ((t, r, v), leg_name) in enumerate(zip(geometry["legs"], names, strict=True)):
        el = elements_from_state(r, v, scene.center.gm_m3_s2)
        epoch = scene.epoch.plus_seconds(t).iso(decimals=6)
        before, after = out["burns"][k], out["burns"][k + 1]
        comments = [
            f"Made by `perifocal transfer` ({tr.kind}, {out['from']} to {out['to']}), leg "
            f"{k + 1} of {len(names)}:",
            f"burn {before['name']} at scene time {before['time_s']:.3f} s: dv "
            f"{before['dv_m_s'] / 1e3:+.6f} km/s; burn {after['name']} at "
            f"{after['time_s']:.3f} s: dv {after['dv_m_s'] / 1e3:+.6f} km/s",
            f"total dv {out['dv_total_m_s'] / 1e3:.6f} km/s, time of flight "
            f"{out['time_of_flight_s'] / 3600:.6f} h. Only the half ellipse between the "
            f"burns is flown (and drawn).",
        ]
        end = scene.epoch.plus_seconds(after["time_s"]).iso(decimals=6)
        blocks.append(body_toml(leg_name, el, epoch, comments, show="{ apsides = true }")
                      + f'flight = {{ start = "{epoch}", end = "{end}" }}\n')
    new_text = text + ("" if text.endswith("\n") else "\n") + "\n" + "\n".join(blocks)
    load_scene_text(new_text, source=target, base_dir=Path(args.scene).parent)
    write_atomic(target, new_text)
    out["wrote"] = str(target)
    out["bodies_added"] = names


def _table(d: dict[str, Any]) -> str:
    def km(x: float) -> str:
        return f"{x / 1e3:,.3f} km"

    def kms(x: float) -> str:
        return f"{x / 1e3:+.6f} km/s"

    def hours(x: float | None) -> str:
        return "-" if x is None else f"{x / 3600:,.6f} h"

    rows = [(f"{d['kind']} transfer", f"{d['from']} -> {d['to']}"),
            ("departure circle r1", km(d["r1_m"])), ("arrival circle r2", km(d["r2_m"])),
            ("departure", f"{d['departure_epoch']} (scene time {d['departure_time_s']:.3f} s)")]
    for b in d["burns"]:
        rows.append((f"burn: {b['name']}", f"dv {kms(b['dv_m_s'])} at {km(b['radius_m'])}, "
                     f"scene time {b['time_s']:.3f} s ({b['speed_before_m_s'] / 1e3:.6f} -> "
                     f"{b['speed_after_m_s'] / 1e3:.6f} km/s)"))
    rows += [("total dv", f"{d['dv_total_m_s'] / 1e3:.6f} km/s"),
             ("time of flight", hours(d["time_of_flight_s"]))]
    for k, leg in enumerate(d["legs"]):
        rows.append((f"leg {k + 1}", f"a {km(leg['a_m'])}, e {leg['e']:.9f}, periapsis "
                     f"{km(leg['periapsis_m'])}, apoapsis {km(leg['apoapsis_m'])}"))
    rows += [("phase angle needed", f"{math.degrees(d['phase_angle_needed_rad']):.4f} deg "
              f"(target ahead of the departure point)"),
             ("phase angle at departure", f"{math.degrees(d['phase_angle_now_rad']):.4f} deg"),
             ("next window", "-" if d["next_window_s"] is None else
              f"scene time {d['next_window_s']:.3f} s"
              + (f", {d['next_window_epoch']}" if "next_window_epoch" in d else "")
              + f" (synodic period {hours(d['synodic_period_s'])})")]
    if "wrote" in d:
        rows.append(("wrote", f"{d['wrote']} (added {', '.join(d['bodies_added'])})"))
    rows += [("warning", w) for w in d["warnings"]]
    width = max(len(k) for k, _ in rows)
    return "\n".join(f"{k:<{width}}  {v}" for k, v in rows)
