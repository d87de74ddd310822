"""What ``perifocal check`` reports: derived quantities of each body in SI, and warnings.

``body_summary`` gives the keys of the cli.md contract (``a_m``, ``period_s``, ...), with
None where the conic has no such value (a hyperbola has no period or apoapsis, a parabola
no finite a). ``orbit_warnings`` lists what is legal but suspicious (periapsis inside the
central body or its atmosphere, nearly parabolic, escaping, retrograde). Formulas are the
two-body ones of ``viewer.orbit`` (vis-viva, the third law); nothing here is drawn.
"""

from __future__ import annotations

import math
from typing import Any

from ..orbit import Elements
from ..orbit.flight import conic_warnings
from ..units import format_eccentricity
from .model import Body, Center, Scene

#: Above this eccentricity (and below 1) an orbit is called nearly parabolic.
NEARLY_PARABOLIC_E = 0.98


def kind_of(e: float) -> str:
    """"circle", "ellipse", "parabola" or "hyperbola"."""
    if e == 0.0:
        return "circle"
    if e < 1.0:
        return "ellipse"
    return "parabola" if e == 1.0 else "hyperbola"


def _num(x: Any) -> float | None:
    v = float(x)
    return v if math.isfinite(v) else None


def orbit_warnings(el: Elements, center: Center) -> list[str]:
    """Warnings about a legal orbit, one line each, without the body's name.

    Impact, atmosphere, escape and sphere of influence come from
    ``viewer.orbit.flight.conic_warnings``; nearly parabolic and retrograde are added here.
    """
    out = conic_warnings(el, center.radius_m, center.atmosphere_m, center.soi_radius_m)
    e = float(el.e)
    if NEARLY_PARABOLIC_E < e < 1.0:
        out.append(f"nearly parabolic: e = {format_eccentricity(e)} is above "
                   f"{NEARLY_PARABOLIC_E}, so a small change of e moves the apoapsis and the "
                   f"period a lot")
    if float(el.i) > math.pi / 2:
        out.append(f"retrograde: i = {math.degrees(float(el.i)):.6g} deg is above 90 deg")
    return out


def body_summary(body: Body, center: Center) -> dict[str, Any]:
    """The per-body keys of ``perifocal check --json`` (cli.md), SI units, None if absent."""
    el = body.elements
    e = float(el.e)
    closed = e < 1.0
    now = body.elements_at(0.0)
    nu_now = float(now.nu)
    q = float(el.periapsis)
    apo = float(el.apoapsis) if closed else None
    return {
        "name": body.name,
        "kind": kind_of(e),
        "a_m": _num(el.a) if e != 1.0 else None,
        "e": e,
        "p_m": float(el.p),
        "i_rad": float(el.i),
        "raan_rad": float(el.raan),
        "argp_rad": float(el.argp),
        "nu_rad": nu_now,
        "period_s": _num(el.period) if closed else None,
        "periapsis_m": q,
        "apoapsis_m": apo,
        "periapsis_altitude_m": q - center.radius_m,
        "apoapsis_altitude_m": None if apo is None else apo - center.radius_m,
        "speed_periapsis_m_s": float(el.speed_periapsis),
        "speed_apoapsis_m_s": float(el.speed_apoapsis) if closed else None,
        "distance_m": float(now.radius_at(nu_now)),
        "speed_m_s": float(now.speed_at(nu_now)),
        "specific_energy_j_kg": float(el.energy) + 0.0,  # + 0.0 turns -0.0 into 0.0
        "h_m2_s": float(el.h),
        "v_inf_m_s": float(el.v_infinity) if e > 1.0 else None,
        "gm_m3_s2": body.gm_m3_s2,
        "ephemeris": _ephemeris_summary(body),
        "warnings": list(body.warnings),
    }


def _ephemeris_summary(body: Body) -> dict[str, Any] | None:
    """Which ephemeris a body follows and over what span (None if it follows none)."""
    from ..ephemeris import SPAN_TEXT

    if body.track is None:
        return None
    return {"source": body.track.source, "target": body.track.target,
            "centre": body.track.centre, "frame": body.track.frame, "span": SPAN_TEXT,
            "elements": "osculating at the scene epoch"}


def scene_summary(scene: Scene) -> dict[str, Any]:
    """The whole ``perifocal check --json`` document (cli.md keys, and a few more)."""
    c = scene.center
    return {
        "scene": scene.title,
        "epoch": scene.epoch.iso(),
        "frame": scene.frame,
        "center": {"name": c.name, "gm_m3_s2": c.gm_m3_s2, "radius_m": c.radius_m},
        "bodies": [body_summary(b, c) for b in scene.bodies],
        "populations": [{"name": p.name, "count": p.count} for p in scene.populations],
        "warnings": list(scene.warnings),
    }
