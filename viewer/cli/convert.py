"""``perifocal convert``: a state vector to classical elements, or elements to a state."""

from __future__ import annotations

import argparse
import math
import sys
from typing import Any

from ..errors import UserInputError
from ..units import format_eccentricity
from .options import quantity, write_json

EXAMPLES = """examples:
  state to elements (km and km/s), about Earth's catalogue GM:
    perifocal convert --center earth --unit km --r 6524.834 6862.875 6448.296 \\
        --v 4.901327 5.533756 -1.976341
  elements to state, quantities with units:
    perifocal convert --gm "3.986004418e14 m3/s2" --a "7000 km" --e 0.01 \\
        --i "51.6 deg" --raan "40 deg" --argp "10 deg" --nu "25 deg" --json
  a parabola has no finite a: give --periapsis instead
    perifocal convert --center sun --periapsis "0.3 au" --e 1 --nu "60 deg"

Bare numbers: lengths in m (km with --unit km), speeds in m/s (km/s with --unit km),
GM in m3/s2 (km3/s2 with --unit km), angles in deg.
"""


def add_parser(sub: Any) -> None:
    from . import CAUTION

    p = sub.add_parser(
        "convert",
        help="state vector <-> classical orbital elements",
        description="Convert a state vector (r, v) to classical elements, or elements to a "
        "state vector, about a catalogue body (--center) or a given GM (--gm).",
        epilog=EXAMPLES + "\n" + CAUTION,
        formatter_class=argparse.RawDescriptionHelpFormatter,
    )
    where = p.add_mutually_exclusive_group(required=True)
    where.add_argument("--center", metavar="NAME", help="central body from the catalogue "
                       "(sun, mercury, venus, earth, moon, mars, jupiter, saturn, uranus, neptune)")
    where.add_argument("--gm", metavar="VALUE",
                       help='gravitational parameter, e.g. "3.986e14 m3/s2"')
    p.add_argument("--unit", choices=("m", "km"), default="m",
                   help="unit of bare numbers: m and m/s (default) or km and km/s")
    p.add_argument("--r", nargs=3, metavar=("X", "Y", "Z"), help="position components")
    p.add_argument("--v", nargs=3, metavar=("VX", "VY", "VZ"), help="velocity components")
    for name, what in (("a", "semi-major axis (negative for a hyperbola)"),
                       ("periapsis", "periapsis radius (instead of --a; needed for e = 1)"),
                       ("e", "eccentricity (a bare number)"), ("i", "inclination"),
                       ("raan", "right ascension of the ascending node"),
                       ("argp", "argument of periapsis"), ("nu", "true anomaly"),
                       ("M", "mean anomaly (instead of --nu)")):
        p.add_argument(f"--{name}", metavar="Q", help=what)
    p.add_argument("--json", action="store_true", help="print JSON with SI keys")
    p.set_defaults(run=run)


def _gm(args: argparse.Namespace) -> float:
    from ..orbit import central_body
    from ..units.limits import MIN_GM

    if args.center is not None:
        try:
            return central_body(args.center).gm_m3_s2
        except KeyError as err:
            raise UserInputError("--center", str(err).strip("'\"")) from None
    gm = quantity(args.gm, "--gm", "gm", "km3/s2" if args.unit == "km" else "m3/s2")
    if not gm >= MIN_GM:
        raise UserInputError("--gm", f"GM must be positive (at least {MIN_GM:g} m3/s2), got "
                             f"{args.gm!r}")
    return gm


def _vector(flag: str, values: list[str], dimension: str, unit: str) -> list[float]:
    return [quantity(v, flag, dimension, unit) for v in values]


def run(args: argparse.Namespace) -> int:
    from . import CAUTION

    mu = _gm(args)
    element_flags = [n for n in ("a", "periapsis", "e", "i", "raan", "argp", "nu", "M")
                     if getattr(args, n) is not None]
    if (args.r is not None or args.v is not None) and element_flags:
        raise UserInputError("convert", "give either --r and --v (state to elements) or "
                             "element flags (elements to state), not both")
    if args.r is not None or args.v is not None:
        if args.r is None or args.v is None:
            raise UserInputError("--r/--v",
                                 "state to elements needs both --r X Y Z and --v VX VY VZ")
        out = _state_to_elements(args, mu)
    elif element_flags:
        out = _elements_to_state(args, mu)
    else:
        raise UserInputError("convert", "nothing to convert: give --r and --v, or --a/--periapsis "
                             "and --e (and optionally --i --raan --argp --nu)")
    if args.json:
        out["caution"] = CAUTION
        write_json(out)
    else:
        sys.stdout.write(_table(out, args.unit) + "\n\n" + CAUTION + "\n")
    return 0


def _state_to_elements(args: argparse.Namespace, mu: float) -> dict[str, Any]:
    from ..orbit import OrbitError, elements_from_state

    length = "km" if args.unit == "km" else "m"
    speed = "km/s" if args.unit == "km" else "m/s"
    r = _vector("--r", args.r, "length", length)
    v = _vector("--v", args.v, "speed", speed)
    try:
        el = elements_from_state(r, v, mu)
    except OrbitError as err:
        raise UserInputError("--r/--v", str(err)) from None
    return _describe(el, mu, r, v)


def _elements_to_state(args: argparse.Namespace, mu: float) -> dict[str, Any]:
    from ..orbit import AnomalyError, Elements, OrbitError, state_from_elements, true_from_mean

    length = "km" if args.unit == "km" else "m"

    def q(flag: str, dimension: str, unit: str | None, default: float | None = None) -> float:
        raw = getattr(args, flag)
        if raw is None:
            if default is None:
                raise UserInputError(f"--{flag}", f"--{flag} is needed for elements to state")
            return default
        return quantity(raw, f"--{flag}", dimension, unit)

    e = q("e", "dimensionless", None)
    if e < 0:
        raise UserInputError("--e", f"eccentricity must be >= 0, got {e}")
    if args.a is not None and args.periapsis is not None:
        raise UserInputError("--a/--periapsis", "give one size: --a or --periapsis, not both")
    angles = {n: q(n, "angle", "deg", 0.0) for n in ("i", "raan", "argp")}
    if not 0.0 <= angles["i"] <= math.pi:
        raise UserInputError("--i", "inclination must be within 0..180 deg")
    if args.nu is not None and args.M is not None:
        raise UserInputError("--nu/--M", "give one anomaly: --nu or --M, not both")
    try:
        nu = q("nu", "angle", "deg", 0.0) if args.M is None else float(
            true_from_mean(q("M", "angle", "deg"), e))
        if args.periapsis is not None:
            rp = q("periapsis", "length", length)
            if rp <= 0:
                raise UserInputError("--periapsis", "periapsis radius must be positive")
            el = Elements.from_periapsis(rp, e, nu=nu, mu=mu, **angles)
        else:
            if e == 1.0:
                raise UserInputError("--a", "a parabola (e = 1) has no finite a: give --periapsis")
            a = q("a", "length", length)
            if (e < 1.0 and a <= 0) or (e > 1.0 and a >= 0):
                raise UserInputError("--a", f"with e = {e:g} the semi-major axis must be "
                                     f"{'positive' if e < 1 else 'negative (a hyperbola)'}")
            el = Elements(a, e, nu=nu, mu=mu, **angles)
        if e >= 1.0 and abs(nu) >= math.acos(-1.0 / e):
            limit = math.degrees(math.acos(-1.0 / e))
            raise UserInputError("--nu", f"true anomaly is beyond the asymptotes "
                                 f"(|nu| < {limit:.4f} deg for e = {e:g})")
        r, v = state_from_elements(el)
    except (OrbitError, AnomalyError) as err:
        raise UserInputError("convert", str(err)) from None
    return _describe(el, mu, list(map(float, r)), list(map(float, v)))


def _describe(el: Any, mu: float, r: list[float], v: list[float]) -> dict[str, Any]:
    """Everything convert prints, in SI, keys named with their unit."""
    e = float(el.e)
    r_norm = math.sqrt(sum(x * x for x in r))
    v_norm = math.sqrt(sum(x * x for x in v))
    return {
        "mu_m3_s2": mu,
        "r_m": [float(x) for x in r], "v_m_s": [float(x) for x in v],
        "a_m": float(el.a) if math.isfinite(el.a) else None, "e": e,
        "i_rad": float(el.i), "raan_rad": float(el.raan), "argp_rad": float(el.argp),
        "nu_rad": float(el.nu), "p_m": float(el.p),
        "periapsis_m": float(el.periapsis), "apoapsis_m": float(el.apoapsis),
        "period_s": float(el.period), "speed_periapsis_m_s": float(el.speed_periapsis),
        "speed_apoapsis_m_s": float(el.speed_apoapsis), "distance_m": r_norm, "speed_m_s": v_norm,
        "flight_path_angle_rad": float(el.flight_path_angle_at(el.nu)),
        "specific_energy_j_kg": float(el.energy), "h_m2_s": float(el.h),
        "v_inf_m_s": float(el.v_infinity) if e > 1.0 else None,
        "conic": ("circle" if e == 0 else "ellipse" if e < 1
                  else "parabola" if e == 1 else "hyperbola"),
    }


def _table(d: dict[str, Any], unit: str) -> str:
    km = unit == "km" or (d["periapsis_m"] > 1e5)

    def length(x: float | None) -> str:
        if x is None or not math.isfinite(x):
            return "-"
        return f"{x / 1e3:,.3f} km" if km else f"{x:,.3f} m"

    def speed(x: float | None) -> str:
        if x is None or not math.isfinite(x):
            return "-"
        return f"{x / 1e3:.6f} km/s"

    def angle(x: float) -> str:
        return f"{math.degrees(x):.6f} deg"

    def duration(x: float) -> str:
        if not math.isfinite(x):
            return "- (open orbit)"
        return f"{x / 86400:.6f} d" if x > 2 * 86400 else f"{x / 3600:.6f} h"

    rows = [
        ("conic", d["conic"]),
        ("r", "  ".join(length(x) for x in d["r_m"])),
        ("v", "  ".join(speed(x) for x in d["v_m_s"])),
        ("a  semi-major axis", length(d["a_m"])),
        ("e  eccentricity", format_eccentricity(d["e"], 9)),
        ("i  inclination", angle(d["i_rad"])),
        ("raan", angle(d["raan_rad"])),
        ("argp  argument of periapsis", angle(d["argp_rad"])),
        ("nu  true anomaly", angle(d["nu_rad"])),
        ("p  semi-latus rectum", length(d["p_m"])),
        ("periapsis radius", length(d["periapsis_m"])),
        ("apoapsis radius", length(d["apoapsis_m"])),
        ("period", duration(d["period_s"])),
        ("speed at periapsis", speed(d["speed_periapsis_m_s"])),
        ("speed at apoapsis", speed(d["speed_apoapsis_m_s"])),
        ("distance now", length(d["distance_m"])),
        ("speed now", speed(d["speed_m_s"])),
        ("flight-path angle now", angle(d["flight_path_angle_rad"])),
        ("specific energy", f"{d['specific_energy_j_kg'] / 1e6:.6f} MJ/kg"),
        ("h  angular momentum", f"{d['h_m2_s'] / 1e6:,.3f} km2/s"),
        ("v-infinity", speed(d["v_inf_m_s"])),
    ]
    width = max(len(k) for k, _ in rows)
    return "\n".join(f"{k:<{width}}  {v}" for k, v in rows)
