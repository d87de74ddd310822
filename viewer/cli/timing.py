"""``perifocal timing``: quick answers about one body's pass: time of flight between two
true anomalies, when it next reaches a radius (outbound and inbound), escape speed there,
and for open orbits v-infinity, turning angle and the asymptote's anomaly."""

from __future__ import annotations

import argparse
import math
import sys
from typing import Any

from ..errors import UserInputError

EXAMPLES = """examples:
  time of flight from periapsis to 120 deg of true anomaly:
    perifocal timing scenes/earth-mission.toml --body "Wren transfer" --nu 0 120
  when the departure hyperbola next reaches 400 000 km, and the pass's numbers:
    perifocal timing scenes/earth-mission.toml --body "Stint departure" --radius "400000 km"
  both, as JSON (SI units):
    perifocal timing scenes/earth-mission.toml --body "Wren transfer" --nu 0 180 \\
        --radius "42164 km" --json

Angles are true anomalies in degrees unless a unit is given ("2.1 rad"); radii are from
the centre of the central body (a bare number is in the scene's length unit). Times are
counted from the scene epoch, where the body is as the scene places it.

On an ellipse the body goes round: --nu 0 360 is one period, 0 720 two, 90 89.999 nearly
one. On an open orbit it passes each anomaly once, so --nu 60 -60 is refused (the message
gives the time from -60 to 60). A circle asked for its own radius is always there.
"""


def add_parser(sub: Any) -> None:
    from . import CAUTION

    p = sub.add_parser(
        "timing", help="time of flight between anomalies, when a body reaches a radius",
        description="Quick answers for one body of a scene: the time of flight between two "
        "true anomalies, the next times it reaches a radius (outbound and inbound), the "
        "escape speed there, and for open orbits v-infinity, the turning angle and the "
        "asymptote.",
        epilog=EXAMPLES + "\n" + CAUTION, formatter_class=argparse.RawDescriptionHelpFormatter,
    )
    p.add_argument("scene", metavar="SCENE", help="the scene file")
    p.add_argument("--body", required=True, metavar="NAME", help="the body's name")
    p.add_argument("--nu", nargs=2, metavar=("FROM", "TO"),
                   help="time of flight between these true anomalies, in the direction of motion")
    p.add_argument("--radius", metavar="R", help="when the body next reaches this distance")
    p.add_argument("--json", action="store_true", help="print SI numbers as JSON")
    p.set_defaults(run=run)


def _angle(text: str, flag: str) -> float:
    from .options import quantity

    return quantity(text, flag, "angle", "deg")


#: Mission refusal fields -> the flag that gave the input.
FLAGS = {"nu": "--nu", "radius": "--radius", "body": "--body"}


def answers(scene: Any, name: str, nu: tuple[float, float] | None,
            radius_m: float | None) -> dict[str, Any]:
    """The quick answers in SI units (None where the conic has no such value), from
    ``viewer.mission.quick``; refusals name the flag."""
    from ..mission import quick
    from ..mission.transfer import body_index

    try:
        body = scene.bodies[body_index(scene, name, "body")]
        el = body.elements_at(0.0)
        out: dict[str, Any] = {"body": name, "e": float(el.e),
                               "periapsis_m": float(el.periapsis), "nu_now_rad": float(el.nu)}
        if nu is not None:
            ft = quick.flight_time(el, nu[0], nu[1])
            out.update({"time_of_flight_s": ft.seconds, "full_turns": ft.turns,
                        "nu_from_rad": nu[0], "nu_to_rad": nu[1]})
        if radius_m is not None:
            rc = quick.radius_crossing(el, radius_m, scene.center.gm_m3_s2, scene.length_unit)
            out.update({
                "radius_m": rc.radius_m,
                "reaches_radius": rc.reached,
                "always_at_radius": rc.kind == "always",
                "nu_at_radius_rad": rc.nu_rad,
                "time_from_periapsis_to_radius_s": rc.from_periapsis_s,
                "next_outbound_s": rc.next_outbound_s, "next_inbound_s": rc.next_inbound_s,
                "escape_speed_at_radius_m_s": rc.escape_speed_m_s,
                "speed_at_radius_m_s": rc.speed_m_s,
                "radius_note": rc.reason or None,
            })
    except quick.MissionRefused as err:
        raise UserInputError(FLAGS.get(err.field, err.field), err.problems) from None
    hp = quick.hyperbolic_pass(el)
    out["v_inf_m_s"] = None if hp is None else hp.v_infinity_m_s
    out["turning_angle_rad"] = None if hp is None else hp.turning_angle_rad
    out["asymptote_nu_rad"] = None if hp is None else hp.asymptote_nu_rad
    return out


def _duration(s: float | None) -> str:
    if s is None:
        return "- (not ahead)"
    d = s / 86400.0
    return f"{d:,.6f} d" if abs(d) >= 2 else f"{s / 3600.0:,.6f} h  ({s:,.1f} s)"


def run(args: argparse.Namespace) -> int:
    from ..scene import load_scene
    from ..units import format_eccentricity
    from . import CAUTION
    from .options import quantity, write_json

    if args.nu is None and args.radius is None:
        raise UserInputError("timing", "nothing to answer: give --nu FROM TO (a time of "
                             "flight) or --radius R (when the body reaches it), or both")
    scene = load_scene(args.scene)
    nu = None if args.nu is None else (_angle(args.nu[0], "--nu"), _angle(args.nu[1], "--nu"))
    radius = None
    if args.radius is not None:
        radius = quantity(args.radius, "--radius", "length", scene.length_unit)
    out = answers(scene, args.body, nu, radius)
    if args.json:
        out["caution"] = CAUTION
        write_json(out)
        return 0
    rows = [("body", f"{out['body']} (e = {format_eccentricity(out['e'])})")]
    if "time_of_flight_s" in out:
        turns = out["full_turns"]
        nu0, nu1 = out["nu_from_rad"], out["nu_to_rad"]
        rows.append((f"time of flight {math.degrees(nu0):.4g} -> {math.degrees(nu1):.4g} "
                     "deg", _duration(out["time_of_flight_s"])
                     + (f"  ({turns} full turn{'s' if turns > 1 else ''})" if turns else "")))
    if radius is not None:
        r_km = f"{radius / 1e3:,.3f} km"
        if out["always_at_radius"]:
            rows += [(r_km, out["radius_note"]),
                     ("speed there", f"{out['speed_at_radius_m_s'] / 1e3:.6f} km/s")]
        elif out["reaches_radius"]:
            rows += [("true anomaly at " + r_km,
                      f"{math.degrees(out['nu_at_radius_rad']):.6f} deg outbound, "
                      f"{-math.degrees(out['nu_at_radius_rad']):.6f} deg inbound"),
                     ("time from periapsis to it",
                      _duration(out["time_from_periapsis_to_radius_s"])),
                     ("next outbound crossing", _duration(out["next_outbound_s"])),
                     ("next inbound crossing", _duration(out["next_inbound_s"])),
                     ("speed there", f"{out['speed_at_radius_m_s'] / 1e3:.6f} km/s")]
        else:
            rows.append((r_km, f"never reached: {out['radius_note']}"))
        rows.append(("escape speed there", f"{out['escape_speed_at_radius_m_s'] / 1e3:.6f} km/s"))
    if out["v_inf_m_s"] is not None:
        rows += [("v-infinity", f"{out['v_inf_m_s'] / 1e3:.6f} km/s"),
                 ("turning angle", f"{math.degrees(out['turning_angle_rad']):.6f} deg"),
                 ("asymptote true anomaly", f"{math.degrees(out['asymptote_nu_rad']):.6f} deg")]
    width = max(len(k) for k, _ in rows)
    sys.stdout.write("\n".join(f"{k:<{width}}  {v}" for k, v in rows) + "\n\n" + CAUTION + "\n")
    return 0
