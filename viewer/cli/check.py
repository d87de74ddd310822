"""``perifocal check SCENE [--json]``: validate a scene and print each body's numbers.

Imports only the scene loader and the orbit core (numpy, tomllib): no GL, windowing or UI,
so it starts fast and runs on machines without OpenGL.
"""

from __future__ import annotations

import argparse
import math
import sys
from typing import Any

from ..units import format_eccentricity
from .options import write_json

EXAMPLES = """examples:
  perifocal check scenes/demo.toml
  perifocal check scenes/earth-mission.toml --json > numbers.json

Prints, per body: period, a, e, periapsis and apoapsis (and their altitudes above the
central body's radius), speeds at periapsis and apoapsis, distance and speed at the
scene epoch, specific energy and angular momentum; then the warnings. Lengths are in au
or km by the orbit's scale, times in days or hours, speeds in km/s. --json prints the
same in SI units (keys named with their unit; null where the conic has no such value).
Exit status: 0 valid, 2 the file has problems (each listed on its own line).
"""

AU_M = 149_597_870_700.0
#: Orbits reaching at least this far (m) are printed in au, closer ones in km.
AU_SCALE_M = 0.01 * AU_M


def add_parser(sub: Any) -> None:
    from . import CAUTION

    p = sub.add_parser(
        "check", help="validate a scene and print each body's period, apsides, speeds",
        description="Validate a scene file (every problem is listed, one per line) and "
        "print the derived numbers of each body.",
        epilog=EXAMPLES + "\n" + CAUTION, formatter_class=argparse.RawDescriptionHelpFormatter,
    )
    p.add_argument("scene", metavar="SCENE", help="a scene file (.toml)")
    p.add_argument("--json", action="store_true",
                   help="print SI numbers as JSON (keys as in the docs)")
    p.set_defaults(run=run)


def run(args: argparse.Namespace) -> int:
    from ..scene.loader import load_scene
    from ..scene.report import scene_summary

    scene = load_scene(args.scene)
    summary = scene_summary(scene)
    if args.json:
        write_json(summary)
    else:
        sys.stdout.write(format_summary(summary, args.scene))
    return 0


def _length(x: float | None, unit: str) -> str:
    if x is None:
        return "-"
    return f"{x / AU_M:.6g} au" if unit == "au" else f"{x / 1e3:.6g} km"


def _time(x: float | None) -> str:
    if x is None:
        return "- (open orbit)"
    if x >= 2 * 86_400.0:
        text = f"{x / 86_400.0:.6g} d"
        return text + (f" ({x / (365.25 * 86_400.0):.4g} yr)" if x >= 365.25 * 86_400.0 else "")
    return f"{x / 3600.0:.6g} h"


def _speed(x: float | None) -> str:
    return "-" if x is None else f"{x / 1e3:.6g} km/s"


def format_summary(s: dict[str, Any], source: str) -> str:
    """The human table of ``check``: one block per body, then the warnings."""
    c = s["center"]
    out = [f"{s['scene']}  ({source})",
           f"epoch {s['epoch']}, frame {s['frame']}",
           f"center {c['name']}: GM {c['gm_m3_s2']:.10g} m3/s2, radius "
           f"{c['radius_m'] / 1e3:.6g} km", ""]
    for b in s["bodies"]:
        reach = b["apoapsis_m"] if b["apoapsis_m"] is not None else b["periapsis_m"]
        unit = "au" if reach >= AU_SCALE_M else "km"
        rows = [
            ("period", _time(b["period_s"])),
            ("a", _length(b["a_m"], unit) if b["a_m"] is not None else "- (parabola)"),
            ("e", format_eccentricity(b["e"])),
            ("i, raan, argp", ", ".join(f"{math.degrees(b[k]):.6g}" for k in
                                        ("i_rad", "raan_rad", "argp_rad")) + " deg"),
            ("periapsis", f"{_length(b['periapsis_m'], unit)}  (altitude "
             f"{_length(b['periapsis_altitude_m'], unit)})"),
            ("apoapsis", "- (open orbit)" if b["apoapsis_m"] is None else
             f"{_length(b['apoapsis_m'], unit)}  (altitude "
             f"{_length(b['apoapsis_altitude_m'], unit)})"),
            ("speed at periapsis", _speed(b["speed_periapsis_m_s"])),
            ("speed at apoapsis", _speed(b["speed_apoapsis_m_s"])),
            ("at the scene epoch", f"distance {_length(b['distance_m'], unit)}, speed "
             f"{_speed(b['speed_m_s'])}"),
            ("specific energy", f"{b['specific_energy_j_kg'] / 1e6:.6g} km2/s2"),
            ("angular momentum", f"{b['h_m2_s'] / 1e6:.6g} km2/s"),
        ]
        if b["v_inf_m_s"] is not None:
            rows.append(("v_inf", _speed(b["v_inf_m_s"])))
        eph = b.get("ephemeris")
        if eph is not None:
            rows.insert(0, ("follows", f"{eph['source']} ({eph['target']} from "
                            f"{eph['centre']}), {eph['span']}; the numbers below are the "
                            f"osculating conic at the scene epoch"))
        out.append(f"{b['name']}  ({b['kind']})")
        out += [f"  {label:<20} {value}" for label, value in rows]
        out.append("")
    for p in s["populations"]:
        out.append(f"population {p['name']}: {p['count']} bodies")
    if s["populations"]:
        out.append("")
    if s["warnings"]:
        out.append(f"warnings ({len(s['warnings'])}):")
        out += [f"  {w}" for w in s["warnings"]]
    else:
        out.append("no warnings")
    return "\n".join(out) + "\n"
