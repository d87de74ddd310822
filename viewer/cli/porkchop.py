"""``perifocal porkchop``: departure C3, arrival v-infinity and total delta-v of direct
Lambert transfers between two bodies of a scene over a grid of departure and arrival
dates; a contour plot (PNG and SVG), the grid (CSV) and the best options."""

from __future__ import annotations

import argparse
import json
import sys
from pathlib import Path
from typing import Any

from ..errors import UserInputError

EXAMPLES = """examples:
  the 2026 Earth-Mars season on the bundled solar system (DE421):
    perifocal porkchop scenes/solar-system.toml --from Earth --to Mars \\
        --depart 2026-09-01 2027-01-31 --arrive 2027-05-01 2028-03-01 -o mars2026
  the best options as JSON, from a 300 km parking orbit into a 400 km capture orbit:
    perifocal porkchop scenes/solar-system.toml --from Earth --to Mars \\
        --depart 2026-09-01 2027-01-31 --arrive 2027-05-01 2028-03-01 \\
        --park-altitude "300 km" --capture-altitude "400 km" --json -o mars2026

Dates are epochs (TDB when no scale is given) or offsets from the scene epoch ("90 d").
Each cell is the direct (no whole revolution), prograde Lambert transfer between the two
bodies' centres about the scene's centre: C3 = v_inf^2 at departure, v_inf at arrival,
and the total delta-v from a circular parking orbit at the departure planet to a
circular capture orbit at the arrival planet (patched conics; each planet's GM and
radius from the catalogue). -o PREFIX writes PREFIX.png, PREFIX.svg and PREFIX.csv.

--save SCENE writes a copy of the scene with the chosen transfer (--pick total, the
default, or c3) added as a body: the Lambert conic with its epoch at the departure.
    perifocal porkchop scenes/solar-system.toml --from Earth --to Mars \
        --depart 2026-09-01 2027-01-31 --arrive 2027-05-01 2028-03-01 \
        --save mars2026.toml
"""

DEFAULT_STEPS = 200
#: Refusals name the command line's flags.
FLAGS = {"from": "--from", "to": "--to", "depart": "--depart", "arrive": "--arrive",
         "steps": "--steps"}


def add_parser(sub: Any) -> None:
    from . import CAUTION

    p = sub.add_parser(
        "porkchop",
        help="pork-chop plot: C3 and v-infinity over departure and arrival dates",
        description="Compute departure C3, arrival v-infinity and total delta-v of direct "
        "Lambert transfers between two bodies of a scene over a grid of departure and "
        "arrival dates; write a contour plot (PNG, SVG) and the grid (CSV), and print the "
        "least-C3 and least-total options.",
        epilog=EXAMPLES + "\n" + CAUTION,
        formatter_class=argparse.RawDescriptionHelpFormatter,
    )
    p.add_argument("scene", metavar="SCENE", help="the scene file")
    p.add_argument("--from", dest="from_body", required=True, metavar="NAME",
                   help="the departure body")
    p.add_argument("--to", dest="to_body", required=True, metavar="NAME",
                   help="the arrival body")
    p.add_argument("--depart", nargs=2, required=True, metavar=("FROM", "TO"),
                   help="first and last departure date")
    p.add_argument("--arrive", nargs=2, required=True, metavar=("FROM", "TO"),
                   help="first and last arrival date")
    p.add_argument("--steps", nargs=2, type=int, default=(DEFAULT_STEPS, DEFAULT_STEPS),
                   metavar=("N_DEP", "N_ARR"), help=f"grid size (default {DEFAULT_STEPS} "
                   f"{DEFAULT_STEPS}; at most 2000 each and 1,000,000 cells)")
    p.add_argument("--park-altitude", default="200 km", metavar="H",
                   help='circular parking orbit above the departure planet (default "200 km")')
    p.add_argument("--capture-altitude", default="250 km", metavar="H",
                   help='circular capture orbit above the arrival planet (default "250 km")')
    p.add_argument("-o", "--output", metavar="PREFIX",
                   help="write PREFIX.png, PREFIX.svg and PREFIX.csv")
    p.add_argument("--json", action="store_true", help="print the best options as JSON")
    p.add_argument("--save", metavar="SCENE", help="write a new scene with the chosen "
                   "transfer added as a body")
    p.add_argument("--pick", choices=("total", "c3"), default="total",
                   help="with --save: the least-total (default) or least-C3 transfer")
    p.add_argument("--name", help='with --save: the body\'s name (default "FROM to TO '
                   '(Lambert)")')
    p.add_argument("--force", action="store_true",
                   help="with -o or --save: replace existing files (each kept as NAME.bak)")
    p.set_defaults(run=run)


def _altitude(text: str, flag: str) -> float:
    from ..mission.porkchop import parse_altitude

    return parse_altitude(text, flag)


def _times(pair: list[str], n: int, flag: str, scene: Any) -> Any:
    import numpy as np

    from .ephemeris import time_arg

    t0, t1 = (time_arg(x, flag, scene).seconds_since(scene.epoch) for x in pair)
    if not t1 > t0:
        raise UserInputError(flag, f"the last date must be after the first; got {pair[0]!r} "
                             f"to {pair[1]!r}")
    return np.linspace(t0, t1, n)


def option(grid: Any, cell: tuple[int, int] | None, epoch0: Any) -> dict[str, Any] | None:
    """One best option of the JSON: dates (ISO TDB), C3, arrival v-infinity, tof."""
    if cell is None:
        return None
    i, j = cell
    return {"departure": epoch0.plus_seconds(float(grid.t_dep_s[i])).iso("TDB"),
            "arrival": epoch0.plus_seconds(float(grid.t_arr_s[j])).iso("TDB"),
            "c3_km2_s2": float(grid.c3_m2_s2[i, j]) / 1e6,
            "vinf_departure_km_s": float(grid.vinf_dep_m_s[i, j]) / 1e3,
            "vinf_arrival_km_s": float(grid.vinf_arr_m_s[i, j]) / 1e3,
            "dv_total_km_s": float(grid.dv_total_m_s[i, j]) / 1e3,
            "tof_days": float(grid.tof_s[i, j]) / 86400.0}


def run(args: argparse.Namespace) -> int:

    from ..mission.porkchop import check_steps, season
    from ..scene import load_scene
    from . import CAUTION
    from .ephemeris import body_by_name

    scene = load_scene(args.scene)
    dep = body_by_name(scene, args.from_body, "--from")
    arr = body_by_name(scene, args.to_body, "--to")
    if dep.name == arr.name:
        raise UserInputError("--to", "--from and --to name the same body")
    n_dep, n_arr = args.steps
    check_steps(n_dep, n_arr, "--steps")  # before the dates are laid out
    sea = season(scene, dep, arr, _times(args.depart, n_dep, "--depart", scene),
                 _times(args.arrive, n_arr, "--arrive", scene),
                 _altitude(args.park_altitude, "--park-altitude"),
                 _altitude(args.capture_altitude, "--capture-altitude"), FLAGS)
    g, park, capture = sea.grid, sea.park, sea.capture
    best = {"c3": g.best("c3"), "total": g.best("total")}
    if args.save:
        _save(args, scene, sea, best[args.pick])
    if args.output:
        _write(args.output, g, scene, dep.name, arr.name, best, CAUTION, args.force, args.scene)
    out = {"from": dep.name, "to": arr.name, "grid": [n_dep, n_arr],
           "best_c3": option(g, best["c3"], scene.epoch),
           "best_total": option(g, best["total"], scene.epoch),
           "park_radius_m": park[1], "capture_radius_m": capture[1], "caution": CAUTION}
    if args.save:
        out["saved"] = args.save
        out["saved_body"] = args.name or f"{dep.name} to {arr.name} (Lambert)"
    if args.json:
        sys.stdout.write(json.dumps(out, indent=1) + "\n")
        return 0
    lines = [f"{dep.name} to {arr.name}: {n_dep} x {n_arr} departure/arrival dates, direct "
             f"prograde Lambert transfers about {scene.center.name}"]
    for key, label in (("best_c3", "least C3"), ("best_total", "least total dv")):
        o = out[key]
        lines.append(f"  {label:<15} depart {o['departure']}, arrive {o['arrival']} "
                     f"({o['tof_days']:.1f} d): C3 {o['c3_km2_s2']:.3f} km2/s2, arrival v_inf "
                     f"{o['vinf_arrival_km_s']:.3f} km/s, total dv {o['dv_total_km_s']:.3f} "
                     f"km/s")
    if args.output:
        lines.append(f"wrote {args.output}.png, {args.output}.svg, {args.output}.csv")
    if args.save:
        lines.append(f"wrote {args.save} (added {out['saved_body']!r})")
    sys.stdout.write("\n".join(lines) + f"\n\n{CAUTION}\n")
    return 0


def _write(prefix: str, g: Any, scene: Any, a: str, b: str, best: Any, caution: str,
           force: bool, scene_path: str) -> None:
    from ..export.porkchop_plot import csv_text, plot
    from ..fileio import claim_output, write_output

    title = f"{a} to {b}: departure C3, arrival v∞, time of flight ({scene.title})"
    files = {f"{prefix}.png": plot(g, scene.epoch, title, caution, "png", best),
             f"{prefix}.svg": plot(g, scene.epoch, title, caution, "svg", best),
             f"{prefix}.csv": csv_text(g, scene.epoch).encode("utf-8")}
    for path in files:  # the output rule for all three before any is written
        claim_output(path, force=force, inputs=[scene_path])
    for path, data in files.items():
        write_output(Path(path), data)


def _save(args: argparse.Namespace, scene: Any, sea: Any, cell: tuple[int, int] | None) -> None:
    """A copy of the scene file with the chosen transfer appended as a [[body]]."""
    from ..fileio import claim_output, write_output
    from ..formats.scene_text import body_toml
    from ..mission.porkchop import transfer_elements
    from ..scene import load_scene_text, read_scene_text

    assert cell is not None
    dep, arr, g = sea.dep, sea.arr, sea.grid
    target = claim_output(args.save, force=args.force, inputs=[args.scene], flag="--save")
    name = args.name or f"{dep.name} to {arr.name} (Lambert)"
    if any(b.name == name for b in scene.bodies):
        raise UserInputError("--name", f"the scene already has a body named {name!r}; give "
                             f"another with --name")
    i, j = cell
    t_dep, t_arr = float(g.t_dep_s[i]), float(g.t_arr_s[j])
    el = transfer_elements(scene, sea, cell)
    depart = scene.epoch.plus_seconds(t_dep)
    arrive = scene.epoch.plus_seconds(t_arr)
    comments = [
        f"Made by `perifocal porkchop` ({args.pick}): the direct Lambert transfer from "
        f"{dep.name} to {arr.name},",
        f"departing {depart.iso('TDB', 3)}, arriving {arrive.iso('TDB', 3)} "
        f"({(t_arr - t_dep) / 86400.0:.3f} d); C3 {g.c3_m2_s2[i, j] / 1e6:.4f} km2/s2, "
        f"arrival v_inf {g.vinf_arr_m_s[i, j] / 1e3:.4f} km/s.",
        "Only the arc from departure to arrival is flown (and drawn). Two-body conic: "
        "sanity checks only.",
    ]
    text = read_scene_text(args.scene)
    block = body_toml(name, el, depart.iso("TDB", 6), comments, show={"apsides": True},
                      flight=(depart.iso("TDB", 6), arrive.iso("TDB", 6)))
    new_text = text + ("" if text.endswith("\n") else "\n") + "\n" + block
    load_scene_text(new_text, source=target, base_dir=Path(args.scene).parent)
    write_output(target, new_text.encode("utf-8"))
