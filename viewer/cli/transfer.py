"""``perifocal transfer``: a Hohmann (or bi-elliptic) transfer between two circular,
coplanar bodies of a scene: the burns, their dv and total, the time of flight, the
phasing; optionally a new scene with the transfer orbit added as a body."""

from __future__ import annotations

import argparse
import sys
from pathlib import Path
from typing import Any

from ..errors import UserInputError

EXAMPLES = """examples:
  the numbers of a Hohmann transfer from one body's circle to another's:
    perifocal transfer leo_geo.toml --from LEO --to GEO
  the same to a circle 35 786 km up, with no body there:
    perifocal transfer leo_geo.toml --from LEO --to-altitude "35786 km"
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
    to = p.add_mutually_exclusive_group(required=True)
    to.add_argument("--to", dest="to_body", metavar="NAME",
                    help="the body on the arrival circle")
    to.add_argument("--to-radius", metavar="R", help='or the arrival circle\'s radius from '
                    'the centre, e.g. "42164 km" (no target body, so no phasing)')
    to.add_argument("--to-altitude", metavar="H", help="or its altitude above the central "
                    'body\'s radius, e.g. "35786 km"')
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


#: Mission refusal fields -> the flag (or file) that gave the input.
FLAGS = {"from": "--from", "to": "--to", "via": "--via", "name": "--name"}


def target_radius(args: argparse.Namespace, scene: Any) -> float | None:
    """The arrival circle's radius (m) from --to-radius or --to-altitude; None for --to."""
    from ..mission.quick import MissionRefused, radius_from_altitude
    from .options import quantity

    if args.to_radius is not None:
        return quantity(args.to_radius, "--to-radius", "length", scene.length_unit)
    if args.to_altitude is None:
        return None
    h = quantity(args.to_altitude, "--to-altitude", "length", scene.length_unit)
    try:
        return radius_from_altitude(h, scene.center.radius_m)
    except MissionRefused as err:
        raise UserInputError("--to-altitude", err.problems) from None


def run(args: argparse.Namespace) -> int:
    from ..mission.quick import MissionRefused
    from ..mission.transfer import body_index, check_leg_names, plan_to_radius, plan_transfer
    from ..scene import load_scene
    from . import CAUTION
    from .ephemeris import time_arg
    from .options import quantity, write_json

    scene = load_scene(args.scene)
    at = time_arg(args.at, "--at", scene) if args.at is not None else scene.epoch
    via = None if args.via is None else quantity(args.via, "--via", "length",
                                                 scene.length_unit)
    r2 = target_radius(args, scene)
    kind = "hohmann" if via is None else "bi-elliptic"
    t_dep = at.seconds_since(scene.epoch)
    flags = {**FLAGS, "to": "--to" if r2 is None else
             "--to-radius" if args.to_radius is not None else "--to-altitude"}
    try:
        i = body_index(scene, args.from_body, "from")
        if r2 is None:
            j = body_index(scene, args.to_body, "to")
            plan = plan_transfer(scene, i, j, kind, via, t_dep, args.name or "")
        else:
            plan = plan_to_radius(scene, i, r2, kind, via, t_dep, args.name or "")
        if args.output is not None:
            check_leg_names(scene, plan)
    except MissionRefused as err:
        raise UserInputError(flags.get(err.field, args.scene), err.problems) from None
    out = _describe(scene, plan)
    if out["next_window_s"] is not None:
        out["next_window_epoch"] = scene.epoch.plus_seconds(out["next_window_s"]).iso(decimals=3)
    if args.output is not None:
        _write(args, scene, plan, out)
    if args.json:
        out["caution"] = CAUTION
        write_json(out)
    else:
        sys.stdout.write(_table(out) + "\n\n" + CAUTION + "\n")
    return 0


def _describe(scene: Any, plan: Any) -> dict[str, Any]:
    """Everything the command reports, SI units, keys named with their unit."""
    tr = plan.transfer
    t_dep = plan.departure_s
    legs = [{"a_m": float(b.elements.a), "e": float(b.elements.e),
             "periapsis_m": float(b.elements.periapsis),
             "apoapsis_m": float(b.elements.apoapsis), "period_s": float(b.elements.period),
             "time_of_flight_s": float(b.elements.period) / 2} for b in plan.legs]
    return {
        "scene": scene.title, "kind": tr.kind, "from": plan.from_name, "to": plan.to_name,
        "mu_m3_s2": scene.center.gm_m3_s2, "r1_m": float(tr.r1_m), "r2_m": float(tr.r2_m),
        "departure_epoch": scene.epoch.plus_seconds(t_dep).iso(decimals=3),
        "departure_time_s": t_dep,
        "burns": [{"name": b.label, "time_s": t_dep + float(b.time_s),
                   "radius_m": float(b.radius_m), "speed_before_m_s": float(b.speed_before_m_s),
                   "speed_after_m_s": float(b.speed_after_m_s), "dv_m_s": float(b.dv_m_s)}
                  for b in tr.burns],
        "dv_total_m_s": float(tr.dv_total_m_s),
        "time_of_flight_s": float(tr.time_of_flight_s),
        "legs": legs,
        "phase_angle_needed_rad": plan.phase_needed_rad,
        "phase_angle_now_rad": plan.phase_now_rad,
        "next_window_s": plan.next_window_s,
        "synodic_period_s": plan.synodic_s,
        "warnings": list(plan.warnings),
    }


def _write(args: argparse.Namespace, scene: Any, plan: Any, out: dict[str, Any]) -> None:
    from ..fileio import claim_output, write_output
    from ..scene import load_scene_text, read_scene_text
    from ..scene.writer import body_text

    if not all(scene.epoch.plus_seconds(leg.epoch_offset_s).in_calendar() for leg in plan.legs):
        raise UserInputError("-o", "a leg would start after year 9999, which a scene epoch "
                             "cannot be written in; choose a smaller --via")
    target = claim_output(args.output, force=args.force, inputs=[args.scene])
    text = read_scene_text(args.scene)
    blocks = []
    n = len(plan.legs)
    for k, leg in enumerate(plan.legs):
        before, after = out["burns"][k], out["burns"][k + 1]
        comments = [
            f"Made by `perifocal transfer` ({out['kind']}, {out['from']} to {out['to']}), leg "
            f"{k + 1} of {n}:",
            f"burn {before['name']} at scene time {before['time_s']:.3f} s: dv "
            f"{before['dv_m_s'] / 1e3:+.6f} km/s; burn {after['name']} at "
            f"{after['time_s']:.3f} s: dv {after['dv_m_s'] / 1e3:+.6f} km/s",
            f"total dv {out['dv_total_m_s'] / 1e3:.6f} km/s, time of flight "
            f"{out['time_of_flight_s'] / 3600:.6f} h. Only the half ellipse between the "
            f"burns is flown (and drawn).",
        ]
        blocks.append(body_text(scene, leg, comments))
    new_text = text + ("" if text.endswith("\n") else "\n") + "\n" + "\n".join(blocks)
    load_scene_text(new_text, source=target, base_dir=Path(args.scene).parent)
    write_output(target, new_text.encode("utf-8"))
    out["wrote"] = str(target)
    out["bodies_added"] = list(plan.leg_names)


def _table(d: dict[str, Any]) -> str:
    from ..units.format import format_direction

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
    if d["phase_angle_now_rad"] is None:  # to a radius: no target body to meet
        rows.append(("phasing", "none: no body waits on the arrival circle"))
    else:
        rows += [("phase angle needed", f"{format_direction(d['phase_angle_needed_rad'])} "
                  f"(target ahead of the departure point)"),
                 ("phase angle at departure", format_direction(d['phase_angle_now_rad'])),
                 ("next window", "-" if d["next_window_s"] is None else
                  f"scene time {d['next_window_s']:.3f} s"
                  + (f", {d['next_window_epoch']}" if "next_window_epoch" in d else "")
                  + f" (synodic period {hours(d['synodic_period_s'])})")]
    if "wrote" in d:
        rows.append(("wrote", f"{d['wrote']} (added {', '.join(d['bodies_added'])})"))
    rows += [("warning", w) for w in d["warnings"]]
    width = max(len(k) for k, _ in rows)
    return "\n".join(f"{k:<{width}}  {v}" for k, v in rows)
