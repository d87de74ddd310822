"""Dimensional strings to SI floats and back.

A quantity is a number and a unit, "1.52 au" or "1.52au"; a bare number (or a string
holding only a number) takes the caller's default unit. Units are grouped by dimension;
asking for a length and getting "1.5 kg" or "3 d" is an error that lists what is allowed.
"""

from __future__ import annotations

import math
import re

from ..orbit.constants import AU_M, DAY_S, JULIAN_YEAR_S


class QuantityError(ValueError):
    """A value that is not a quantity of the wanted dimension; the message says why."""


_LENGTH = {"m": 1.0, "km": 1e3, "Mm": 1e6, "Gm": 1e9, "au": AU_M}
_TIME = {"s": 1.0, "ms": 1e-3, "min": 60.0, "h": 3600.0, "d": DAY_S, "yr": JULIAN_YEAR_S}
_ANGLE = {"rad": 1.0, "deg": math.pi / 180.0, "arcmin": math.pi / 10800.0,
          "arcsec": math.pi / 648000.0}

#: Units by dimension: name -> factor to SI. The first unit listed is the SI one.
DIMENSIONS: dict[str, dict[str, float]] = {
    "length": _LENGTH,
    "time": _TIME,
    "angle": _ANGLE,
    "gm": {"m3/s2": 1.0, "km3/s2": 1e9, "au3/d2": AU_M**3 / DAY_S**2},
    "speed": {"m/s": 1.0, "km/s": 1e3, "au/d": AU_M / DAY_S},
    # Scene time per second of show (the timeline's rate): a time per second.
    "rate": {f"{u}/s": f for u, f in _TIME.items()},
    "dimensionless": {"": 1.0},
}

# Spellings people write for the same unit.
_ALIASES = {
    "metre": "m", "meter": "m", "metres": "m", "meters": "m", "kilometre": "km",
    "kilometer": "km", "kilometres": "km", "kilometers": "km", "AU": "au", "ua": "au",
    "sec": "s", "second": "s", "seconds": "s", "minute": "min", "minutes": "min",
    "hr": "h", "hour": "h", "hours": "h", "day": "d", "days": "d", "year": "yr",
    "years": "yr", "a": "yr", "y": "yr", "degree": "deg", "degrees": "deg", "°": "deg",
    "radian": "rad", "radians": "rad",
    "m^3/s^2": "m3/s2", "km^3/s^2": "km3/s2", "m3s-2": "m3/s2", "km3s-2": "km3/s2",
    "m**3/s**2": "m3/s2", "km**3/s**2": "km3/s2", "au^3/d^2": "au3/d2",
    "kps": "km/s", "km/sec": "km/s", "m/sec": "m/s",
    "day/s": "d/s", "days/s": "d/s", "hr/s": "h/s", "year/s": "yr/s", "sec/s": "s/s",
}

_NUMBER = r"[+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?"
_QUANTITY = re.compile(rf"^\s*({_NUMBER})\s*([^\s\d+-][^\s]*(?:\s*/\s*\S+)?)?\s*$")


def _allowed(dimension: str) -> str:
    return ", ".join(u for u in DIMENSIONS[dimension] if u) or "a bare number"


def _an(dimension: str) -> str:
    names = {"gm": "gravitational parameter", "rate": "time rate", "angle": "angle"}
    name = names.get(dimension, dimension)
    return ("an " if name[0] in "aeiou" else "a ") + name


def _canonical(unit: str) -> str:
    u = unit.replace(" ", "")
    return _ALIASES.get(u, _ALIASES.get(u.lower(), u))


def unit_factor(unit: str, dimension: str) -> float:
    """Factor from ``unit`` to SI for ``dimension``; QuantityError naming the allowed units."""
    table = DIMENSIONS[dimension]
    u = _canonical(unit)
    if u in table:
        return table[u]
    for other, units in DIMENSIONS.items():
        if u in units and other != dimension:
            raise QuantityError(
                f"unit {unit!r} is {_an(other)}, not {_an(dimension)}; "
                f"allowed: {_allowed(dimension)}")
    raise QuantityError(f"unknown unit {unit!r}; allowed for {_an(dimension)}: "
                        f"{_allowed(dimension)}")


def parse_quantity(value: object, dimension: str, default_unit: str | None = None) -> float:
    """An SI float from a quantity string ("7000 km"), or from a bare number in default_unit.

    ``dimension`` is a key of DIMENSIONS. Raises QuantityError for text that is not a
    number and unit, a unit of another dimension, a bare number where no default unit is
    given, and NaN or infinity.
    """
    if dimension not in DIMENSIONS:
        raise KeyError(f"unknown dimension {dimension!r}")
    if isinstance(value, bool):
        raise QuantityError(f"expected a {dimension} such as {_example(dimension)}, got {value}")
    if isinstance(value, (int, float)):
        number, unit = float(value), None
    elif isinstance(value, str):
        m = _QUANTITY.match(value)
        if not m:
            raise QuantityError(
                f"{value!r} is not a number with a unit; write e.g. {_example(dimension)}")
        number, unit = float(m.group(1)), m.group(2)
    else:
        raise QuantityError(
            f"expected a {dimension} such as {_example(dimension)}, got {type(value).__name__}")
    if not math.isfinite(number):
        raise QuantityError(f"{value!r} is not a finite number")
    if unit is None:
        if dimension == "dimensionless":
            return number
        if default_unit is None:
            raise QuantityError(
                f"{value!r} has no unit; write e.g. {_example(dimension)} "
                f"(allowed: {_allowed(dimension)})")
        unit = default_unit
    if dimension == "dimensionless":
        raise QuantityError(f"{value!r}: this value is a bare number, without a unit")
    result = number * unit_factor(unit, dimension)
    if not math.isfinite(result):
        raise QuantityError(f"{value!r} is too large")
    return result


def _example(dimension: str) -> str:
    return {
        "length": '"1.52 au" or "7000 km"', "time": '"88 d" or "90 min"',
        "angle": '"12 deg"', "gm": '"3.986004418e14 m3/s2"', "speed": '"7.5 km/s"',
        "rate": '"5 d/s"', "dimensionless": "0.21",
    }[dimension]


def format_quantity(value_si: float, dimension: str, unit: str, digits: int = 6) -> str:
    """``value_si`` written in ``unit`` with ``digits`` significant digits: "1.52 au"."""
    if not math.isfinite(value_si):
        return "-"
    return f"{value_si / unit_factor(unit, dimension):.{digits}g} {unit}"


def format_eccentricity(e: float, digits: int = 6) -> str:
    """e with ``digits`` significant digits, but never rounded onto 1 (an ellipse near
    e = 1 is not a parabola): then every digit up to the one that differs from 1."""
    text = f"{e:.{digits}g}"
    if float(text) == 1.0 and e != 1.0:
        return repr(float(e))  # the shortest text that reads back as e
    return text
