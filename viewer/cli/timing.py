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


def answers(scene: Any, name: str, nu: tuple[float, float] | None,
            radius_m: float | None) -> dict[str, Any]:
    """The quick answers in SI units (None where the conic has no such value)."""
    from ..orbit import OrbitError
    from ..orbit import flight as fl

    try:
        body = scene.body(name)
    except KeyError:
        names = ", ".join(b.name for b in scene.bodies)
        raise UserInputError("--body", f'no body is named "{name}"; the scene has: {names}') \
            from None
    el = body.elements_at(0.0)
    e = float(el.e)
    mu = scene.center.gm_m3_s2
    out: dict[str, Any] = {"body": name, "e": e, "periapsis_m": float(el.periapsis),
                           "nu_now_rad": float(el.nu)}
    if nu is not None:
        try:
            out["time_of_flight_s"] = float(fl.time_of_flight(el, nu[0], nu[1]))
        except OrbitError as err:
            raise UserInputError("--nu", str(err)) from None
        out["nu_from_rad"], out["nu_to_rad"] = nu
    if radius_m is not None:
        if radius_m <= 0:
            raise UserInputError("--radius", "a radius is a positive distance")
        nu_r = float(fl.true_anomaly_at_radius(el, radius_m))
        reached = math.isfinite(nu_r)
        outbound, inbound = fl.times_to_radius(el, radius_m)
        out.update({
            "radius_m": radius_m,
            "reaches_radius": reached,
            "nu_at_radius_rad": nu_r if reached else None,
            "time_from_periapsis_to_radius_s":
                float(fl.time_from_periapsis_to_radius(el, radius_m)) if reached else None,
            "next_outbound_s": _num(outbound), "next_inbound_s": _num(inbound),
            "escape_speed_at_radius_m_s": float(fl.escape_speed(mu, radius_m)),
            "speed_at_radius_m_s": float(el.speed_at(nu_r)) if reached else None,
        })
    out["v_inf_m_s"] = float(el.v_infinity) if e > 1.0 else None
    out["turning_angle_rad"] = float(el.turning_angle) if e > 1.0 else None
    out["asymptote_nu_rad"] = float(math.acos(-1.0 / e)) if e > 1.0 else None
    return out


def _num(x: Any) -> float | None:
    x = float(x)
    return x if math.isfinite(x) else None


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
        rows.append((f"time of flight {math.degrees(nu[0]):.4g} -> {math.degrees(nu[1]):.4g} "
                     "deg", _duration(out["time_of_flight_s"])))
    if radius is not None:
        r_km = f"{radius / 1e3:,.3f} km"
        if out["reaches_radius"]:
            rows += [("true anomaly at " + r_km,
                      f"{math.degrees(out['nu_at_radius_rad']):.6f} deg outbound, "
                      f"{-math.degrees(out['nu_at_radius_rad']):.6f} deg inbound"),
                     ("time from periapsis to it",
                      _duration(out["time_from_periapsis_to_radius_s"])),
                     ("next outbound crossing", _duration(out["next_outbound_s"])),
                     ("next inbound crossing", _duration(out["next_inbound_s"])),
                     ("speed there", f"{out['speed_at_radius_m_s'] / 1e3:.6f} km/s")]
        else:
            rows.append((r_km, "never reached on this orbit"))
        rows.append(("escape speed there", f"{out['escape_speed_at_radius_m_s'] / 1e3:.6f} km/s"))
    if out["v_inf_m_s"] is not None:
        rows += [("v-infinity", f"{out['v_inf_m_s'] / 1e3:.6f} km/s"),
                 ("turning angle", f"{math.degrees(out['turning_angle_rad']):.6f} deg"),
                 ("asymptote true anomaly", f"{math.degrees(out['asymptote_nu_rad']):.6f} deg")]
    width = max(len(k) for k, _ in rows)
    sys.stdout.write("\n".join(f"{k:<{width}}  {v}" for k, v in rows) + "\n\n" + CAUTION + "\n")
    return 0
