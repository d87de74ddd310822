"""The live readout of one body: derived quantities with their units, and warnings.

``body_readout(scene, index, t_s)`` recomputes everything from the Scene on every call
(a few microseconds of numpy), so the panel never shows a stale number. Values are SI in
``values`` (keys named with their unit, as in ``perifocal check --json``) and written
for people in ``rows`` (label, text with its unit). Formulas: vis-viva and the third law
(``viewer.orbit.Elements``); warnings from ``viewer.scene.report.orbit_warnings``.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from ..orbit import DAY_S
from ..scene.model import Scene
from ..scene.report import orbit_warnings
from ..units.format import format_angle, format_length, format_speed, format_time


@dataclass(frozen=True)
class Readout:
    """Derived numbers of one body at one scene time."""

    name: str
    values: dict[str, float | None]
    rows: tuple[tuple[str, str], ...]
    warnings: tuple[str, ...]


def _num(x: object) -> float | None:
    v = float(x)  # type: ignore[arg-type]
    return v if math.isfinite(v) else None


def body_readout(scene: Scene, index: int, t_s: float) -> Readout:
    """Derived quantities of body ``index`` of ``scene`` at scene time ``t_s`` (s)."""
    body = scene.bodies[index]
    center = scene.center
    el = body.elements
    e = float(el.e)
    closed = e < 1.0
    R = center.radius_m
    q = float(el.periapsis)
    Q = float(el.apoapsis) if closed else None
    now = body.elements_at(t_s)
    nu = float(now.nu)
    period = float(el.period) if closed else None
    values: dict[str, float | None] = {
        "period_s": period,
        "a_m": _num(el.a) if e != 1.0 else None,
        "e": e,
        "periapsis_m": q,
        "apoapsis_m": Q,
        "periapsis_altitude_m": q - R,
        "apoapsis_altitude_m": None if Q is None else Q - R,
        "speed_periapsis_m_s": float(el.speed_periapsis),
        "speed_apoapsis_m_s": float(el.speed_apoapsis) if closed else None,
        "distance_m": float(now.radius_at(nu)),
        "speed_m_s": float(now.speed_at(nu)),
        "flight_path_angle_rad": float(now.flight_path_angle_at(nu)),
        "specific_energy_j_kg": float(el.energy) + 0.0,
        "h_m2_s": float(el.h),
        "v_inf_m_s": float(el.v_infinity) if e > 1.0 else None,
        "time_since_periapsis_s": _num(now.time_since_periapsis),
    }
    L = scene.length_unit
    energy = values["specific_energy_j_kg"]
    period_text = format_time(period)
    if period is not None and not period_text.endswith(" d"):
        period_text += f"  ({period / DAY_S:.6g} d)"
    rows: list[tuple[str, str]] = [
        ("period", period_text),
        ("semi-major axis a", format_length(values["a_m"], L)),
        ("eccentricity e", f"{e:.6g}"),
        ("periapsis radius", format_length(q, L)),
        ("  altitude", format_length(q - R, L)),
        ("  speed there", format_speed(values["speed_periapsis_m_s"])),
        ("apoapsis radius", format_length(Q, L)),
        ("  altitude", format_length(None if Q is None else Q - R, L)),
        ("  speed there", format_speed(values["speed_apoapsis_m_s"])),
        ("distance now", format_length(values["distance_m"], L)),
        ("speed now", format_speed(values["speed_m_s"])),
        ("flight-path angle now", format_angle(values["flight_path_angle_rad"])),
        ("time since periapsis", format_time(values["time_since_periapsis_s"])),
        ("specific energy", f"{(energy or 0.0) / 1e6:.6g} MJ/kg"),
        ("angular momentum h", f"{values['h_m2_s'] / 1e6:.6g} km^2/s"),  # type: ignore[operator]
    ]
    if e > 1.0:
        rows.append(("excess speed v_inf", format_speed(values["v_inf_m_s"])))
    return Readout(body.name, values, tuple(rows), tuple(orbit_warnings(el, center)))
