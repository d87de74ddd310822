"""Numbers for people: lengths, durations, speeds, angles and areas, formatted once.

The window, the command line and the picture's labels all call these, so they print the
same thing. Values come in SI (m, s, m/s, rad, m^2); None, NaN and infinity print as
``none`` (never "nan" or "inf").
"""

from __future__ import annotations

import math

from ..orbit.constants import AU_M, DAY_S, JULIAN_YEAR_S

NONE = "none"

#: A duration is written in the largest unit that keeps it above about 1.
_TIME_STEPS = ((120.0, 1.0, "s"), (3 * 3600.0, 60.0, "min"), (3 * DAY_S, 3600.0, "h"),
               (2 * JULIAN_YEAR_S, DAY_S, "d"))


def _finite(x: float | None) -> bool:
    return x is not None and math.isfinite(x)


def format_length(x_m: float | None, scene_unit: str = "au", digits: int = 7) -> str:
    """A length: km below 1e9 m (or always, in a km or m scene), au above; m for small
    lengths in a metre scene."""
    if x_m is None or not math.isfinite(x_m):
        return NONE
    if scene_unit == "m" and abs(x_m) < 1e6:
        return f"{x_m:,.{digits - 1}g} m"
    if scene_unit in ("km", "m", "Mm", "Gm") or abs(x_m) < 1e9:
        return f"{x_m / 1e3:,.{digits}g} km"
    return f"{x_m / AU_M:.{digits}g} au"


def format_time(t_s: float | None, digits: int = 7) -> str:
    """A duration in s, min, h, d or yr (the largest that keeps it above about 1)."""
    if t_s is None or not math.isfinite(t_s):
        return NONE
    a = abs(t_s)
    for limit, factor, unit in _TIME_STEPS:
        if a < limit:
            return f"{t_s / factor:.{digits}g} {unit}"
    return f"{t_s / JULIAN_YEAR_S:.{digits}g} yr"


def format_speed(v_m_s: float | None, digits: int = 6, signed: bool = False) -> str:
    """A speed in km/s ("+" shown for ``signed``, as for a burn's dv)."""
    if v_m_s is None or not math.isfinite(v_m_s):
        return NONE
    return f"{v_m_s / 1e3:{'+' if signed else ''}.{digits}g} km/s"


def format_angle(x_rad: float | None, digits: int = 6) -> str:
    """An angle in degrees."""
    if x_rad is None or not math.isfinite(x_rad):
        return NONE
    return f"{math.degrees(x_rad):.{digits}g} deg"


def format_direction(x_rad: float | None, decimals: int = 4) -> str:
    """A direction (a phase angle, an azimuth) in [0, 360) deg, rounded to ``decimals``:
    a value that rounds to 360 or to minus zero is written 0, and one within rounding of 0
    is not written as 3.3e-15."""
    if x_rad is None or not math.isfinite(x_rad):
        return NONE
    deg = round(math.degrees(x_rad) % 360.0, decimals)
    if deg >= 360.0 or deg == 0.0:
        deg = 0.0
    return f"{deg:.{decimals}f} deg"


def format_sig(x: float, digits: int = 3) -> str:
    """``x`` with ``digits`` significant digits, fixed-point for magnitudes 1e-5..1e6."""
    if x == 0 or not math.isfinite(x):
        return "0"
    mag = math.floor(math.log10(abs(x)))
    dec = max(0, digits - 1 - mag)
    return f"{x:.{dec}f}" if abs(mag) < 6 else f"{x:.{digits - 1}e}"


def label_speed(v_m_s: float) -> str:
    """A speed for a label in the picture: "29.8 km/s", or "850 m/s" below 1 km/s."""
    if v_m_s >= 1000.0:
        return f"{format_sig(v_m_s / 1000.0)} km/s"
    return f"{format_sig(v_m_s)} m/s"
