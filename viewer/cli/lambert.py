"""``perifocal lambert``: every solution of Lambert's problem for one pair of positions and a
time of flight (viewer.mission.lambert, Izzo's method)."""

from __future__ import annotations

import argparse
import json
import re
import sys
from typing import Any

from ..errors import UserInputError

EXAMPLES = """examples:
  Curtis's example 5.2 (Earth, 1 h):
    perifocal lambert --mu earth --r1 5000,10000,2100 --r2 -14600,2500,7000 --tof "1 h"
  the same with the GM written out, as JSON:
    perifocal lambert --mu "398600 km3/s2" --r1 5000,10000,2100 --r2 -14600,2500,7000 \\
        --tof "3600 s" --json

--mu is a GM with its unit ("398600.4418 km3/s2") or a central body of the catalogue
(sun, mercury, venus, earth, moon, mars, jupiter, saturn, uranus, neptune). Positions are
three comma-separated numbers in km, or with one unit for all ("1,0,0 au"). Solutions are
listed for both directions ("prograde": angular momentum along +z) and every number of
whole revolutions the time allows; with one or more revolutions each has a "left" and a
"right" branch (Izzo 2015). r1 and r2 on one line through the centre (0 or 180 deg apart)
leave the plane of the transfer undefined and are refused.
"""

#: Most revolutions listed (a very long time of flight about a strong centre has thousands).
MAX_REVS = 20


def add_parser(sub: Any) -> None:
    from . import CAUTION

    p = sub.add_parser(
        "lambert",
        help="Lambert's problem: the orbits from r1 to r2 in a given time",
        description="Solve Lambert's problem: every two-body orbit from position r1 to r2 in "
        "the time of flight, single and multi-revolution, prograde and retrograde, with the "
        "velocities at both ends.",
        epilog=EXAMPLES + "\n" + CAUTION,
        formatter_class=argparse.RawDescriptionHelpFormatter,
    )
    # "-14600,2500,7000" is a value, not a flag (argparse knows only plain negative numbers).
    p._negative_number_matcher = re.compile(r"^-\.?\d")
    p.add_argument("--mu", required=True, metavar="GM", help='GM with units or a catalogue '
                   'body, e.g. "398600.4418 km3/s2" or earth')
    p.add_argument("--r1", required=True, metavar="X,Y,Z", help="departure position (km)")
    p.add_argument("--r2", required=True, metavar="X,Y,Z", help="arrival position (km)")
    p.add_argument("--tof", required=True, metavar="T", help='time of flight, e.g. "1 h"')
    p.add_argument("--max-revs", type=int, default=MAX_REVS, metavar="N",
                   help=f"list solutions of 0 to N whole revolutions, the fewest first "
                   f"(default {MAX_REVS})")
    p.add_argument("--json", action="store_true", help="print JSON (km/s)")
    p.set_defaults(run=run)


def central_radius_m(text: str) -> float | None:
    """The catalogue radius when --mu names a central body, else None."""
    from ..orbit.constants import CATALOGUE

    entry = CATALOGUE.get(text.strip().lower())
    return None if entry is None else entry.radius_m


def closest_m(mu: float, r1: Any, v1: Any, r2: Any, v2: Any, revolutions: int) -> float:
    """The least distance from the centre along the flown arc, m: the periapsis if the arc
    passes it (true anomaly crossing 0, always with whole revolutions), else the nearer
    end."""
    import math

    import numpy as np

    from ..orbit import elements_from_state

    a = elements_from_state(r1, v1, mu)
    nu1 = float(a.nu) % (2 * math.pi)
    nu2 = float(elements_from_state(r2, v2, mu).nu) % (2 * math.pi)
    if revolutions > 0 or nu2 < nu1:
        return float(a.periapsis)
    return float(min(np.linalg.norm(r1), np.linalg.norm(r2)))


def parse_mu(text: str, flag: str = "--mu") -> float:
    """A GM in m^3/s^2 from a quantity or a catalogue body's name."""
    from ..orbit.constants import CATALOGUE
    from ..units import QuantityError, parse_quantity

    if text.strip().lower() in CATALOGUE:
        return CATALOGUE[text.strip().lower()].gm_m3_s2
    try:
        gm = parse_quantity(text, "gm", "km3/s2")
    except QuantityError as err:
        raise UserInputError(flag, f"{err}; or a central body: {', '.join(CATALOGUE)}") from None
    if not gm > 0.0:
        raise UserInputError(flag, f"GM must be positive, got {text!r}")
    return gm


def parse_vector(text: str, flag: str) -> list[float]:
    """Three comma-separated lengths in m (km unless a unit follows the last number)."""
    import math

    from ..units import QuantityError, parse_quantity

    parts = [p.strip() for p in text.split(",")]
    if len(parts) != 3:
        raise UserInputError(flag, f"give three comma-separated numbers X,Y,Z (km unless a "
                             f"unit follows, e.g. \"1,0,0 au\"); got {text!r}")
    unit = "km"
    last = parts[2].split()
    if len(last) == 2:
        parts[2], unit = last
    try:
        out = [parse_quantity(f"{p} {unit}", "length") for p in parts]
    except QuantityError as err:
        raise UserInputError(flag, str(err)) from None
    if not all(math.isfinite(v) for v in out):
        raise UserInputError(flag, f"coordinates must be finite numbers; got {text!r}")
    if not any(out):
        raise UserInputError(flag, "the position is at the centre (0,0,0)")
    return out


def run(args: argparse.Namespace) -> int:
    import numpy as np

    from ..mission.lambert import COLLINEAR_SINE, all_solutions, solve
    from ..units import QuantityError, parse_quantity
    from . import CAUTION

    mu = parse_mu(args.mu)
    r1 = np.array(parse_vector(args.r1, "--r1"))
    r2 = np.array(parse_vector(args.r2, "--r2"))
    try:
        tof = parse_quantity(args.tof, "time", "s")
    except QuantityError as err:
        raise UserInputError("--tof", f"{err}; give a time such as \"1 h\"") from None
    if not tof > 0.0 or not np.isfinite(tof):
        raise UserInputError("--tof", f"the time of flight must be positive and finite; got "
                             f"{args.tof!r}")
    if args.max_revs < 0:
        raise UserInputError("--max-revs", f"must be 0 or more; got {args.max_revs}")
    if bool(solve(mu, r1, r2, tof).collinear):
        raise UserInputError("--r2", f"r1 and r2 lie on one line through the centre (transfer "
                             f"angle within {COLLINEAR_SINE:g} rad of 0 or 180 deg): the plane "
                             f"of the transfer is undefined; move one point off that line")
    sols = all_solutions(mu, r1, r2, tof, args.max_revs)
    if not sols:
        raise UserInputError("--tof", "no Lambert solution was found for these positions and "
                             "time of flight")
    radius = central_radius_m(args.mu)
    for s in sols:
        s["closest_m"] = closest_m(mu, r1, np.array(s["v1_m_s"]), r2, np.array(s["v2_m_s"]),
                                   s["revolutions"])
        s["warnings"] = []
        if radius is not None and s["closest_m"] < radius:
            s["warnings"].append(f"the arc passes {s['closest_m'] / 1e3:.6g} km from the "
                                 f"centre, inside the central body (radius "
                                 f"{radius / 1e3:.6g} km)")
    if args.json:
        out = {"mu_m3_s2": mu, "tof_s": tof, "solutions": [
            {"revolutions": s["revolutions"], "direction": s["direction"],
             "branch": s["branch"],
             "v1_km_s": [v / 1e3 for v in s["v1_m_s"]],
             "v2_km_s": [v / 1e3 for v in s["v2_m_s"]],
             "closest_km": s["closest_m"] / 1e3, "warnings": s["warnings"]}
            for s in sols],
            "caution": CAUTION}
        sys.stdout.write(json.dumps(out, indent=1) + "\n")
        return 0
    lines = [f"Lambert: GM = {mu / 1e9:.12g} km3/s2, tof = {tof:.9g} s "
             f"({tof / 86400.0:.6g} d); {len(sols)} solution(s)",
             f"{'revs':>4}  {'direction':<10} {'branch':<7} {'v1 (km/s)':>32}   "
             f"{'v2 (km/s)':>32}"]
    for s in sols:
        v1 = ", ".join(f"{v / 1e3:9.5f}" for v in s["v1_m_s"])
        v2 = ", ".join(f"{v / 1e3:9.5f}" for v in s["v2_m_s"])
        lines.append(f"{s['revolutions']:>4}  {s['direction']:<10} {s['branch']:<7} "
                     f"({v1})   ({v2})   closest {s['closest_m'] / 1e3:,.1f} km")
        lines += [f"      warning: {w}" for w in s["warnings"]]
    sys.stdout.write("\n".join(lines) + f"\n\n{CAUTION}\n")
    return 0
