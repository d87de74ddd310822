"""The magnitude limits every value from a user obeys: scene keys, command-line options and
panel fields alike, so that every later computation stays finite.

One home for the rule: ``viewer.scene.values`` (scene files), ``viewer.cli.options``
(flags) and ``viewer.gui.elements_edit`` (typed fields) all read these numbers. The limits
are wide on purpose (a length of 1e21 m is some 30 kpc, a time of 1e16 s some 300 million
years) and only keep squares and products of values far from overflow. docs/scene-format.md
lists them.
"""

from __future__ import annotations

import math

from .quantity import QuantityError, parse_quantity

#: Largest size (|a|, periapsis, radius, any length) in metres.
MAX_LENGTH_M = 1e21
#: Smallest size of an orbit or a radius in metres.
MIN_SIZE_M = 1e-3
#: Largest time (offset, span, step, duration) in seconds.
MAX_TIME_S = 1e16
#: Gravitational parameters, m3/s2.
MIN_GM, MAX_GM = 1e-20, 1e40
#: Largest angle in radians (angles are reduced to a turn afterwards).
MAX_ANGLE_RAD = 1e6
#: Largest speed: the speed of light, 299 792 458 m/s (exact, by the SI definition of the
#: metre); a Newtonian two-body answer beyond it means nothing.
MAX_SPEED_M_S = 299_792_458.0
#: Largest eccentricity.
MAX_E = 1000.0
#: Values smaller than this (in SI) are taken as zero, so no later step underflows.
TINY = 1e-150

#: Dimension -> largest magnitude in SI units (viewer.units.quantity.DIMENSIONS names).
LIMITS: dict[str, float] = {"length": MAX_LENGTH_M, "time": MAX_TIME_S,
                            "angle": MAX_ANGLE_RAD, "rate": 1e16, "gm": MAX_GM,
                            "speed": MAX_SPEED_M_S, "dimensionless": MAX_E}
#: The SI unit each limit is written in.
SI_UNIT = {"length": "m", "time": "s", "angle": "rad", "rate": "s/s", "gm": "m3/s2",
           "speed": "m/s", "dimensionless": ""}


def limit_problem(x: float, dimension: str) -> str | None:
    """'is too large; allowed up to ...' when |x| (SI) is beyond the dimension's limit."""
    limit = LIMITS.get(dimension)
    if limit is None or abs(x) <= limit:
        return None
    unit = SI_UNIT[dimension]
    return f"is too large; allowed up to {limit:g}{' ' + unit if unit else ''} in size"


def parse_limited(value: object, dimension: str, default_unit: str | None = None) -> float:
    """parse_quantity, then the limit of the dimension; tiny values become 0.

    Raises QuantityError saying what is wrong and the allowed range.
    """
    if isinstance(value, str) and len(value) > 200:
        raise QuantityError(f"{value[:37]!r}... is not a quantity (too long)")
    x = parse_quantity(value, dimension, default_unit)
    problem = limit_problem(x, dimension)
    if problem is not None:
        raise QuantityError(f"{value!r} {problem}")
    return 0.0 if abs(x) < TINY else x


def finite_or_none(x: float) -> float | None:
    """A float for output, or None when it is NaN or infinite (JSON null, a dash in tables)."""
    x = float(x)
    return x if math.isfinite(x) else None
