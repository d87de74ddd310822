"""The third law of a scene as arrays: what the window's plots and ``perifocal plot`` draw.

* ``third_law``: period against semi-major axis of every closed orbit, and the third-law
  line T = 2 pi sqrt(a^3 / mu) through the same range. On log axes the line has slope
  3/2 (log T = 3/2 log a + const), which is T^2 proportional to a^3.
* ``square_cube``: the same law as a straight line through the origin, T^2 against a^3,
  of slope 4 pi^2 / GM (Vallado 4th ed. eq. 2-21, T = 2 pi sqrt(a^3 / mu)), in units
  people read.

Periods are each body's own (with GM_centre + the body's gm); the line is the centre's.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
from numpy.typing import NDArray

from ..orbit import AU_M, DAY_S, JULIAN_YEAR_S
from .model import Scene

Floats = NDArray[np.float64]


@dataclass(frozen=True)
class ThirdLaw:
    """Closed orbits' a (m) and T (s) with names, and the line T(a) for the centre's mu."""

    names: tuple[str, ...]
    a_m: Floats
    period_s: Floats
    line_a_m: Floats
    line_period_s: Floats


@dataclass(frozen=True)
class SquareCube:
    """The third law as a straight line: T^2 against a^3 for every closed orbit, in
    units people read (``length_unit``^3 and ``time_unit``^2), and the line's slope
    4 pi^2 / GM in those units (through the origin)."""

    names: tuple[str, ...]
    a3: Floats
    t2: Floats
    slope: float
    length_unit: str
    time_unit: str


#: (name, metres) and (name, seconds) the square-cube plot may count in.
_LENGTHS = (("au", AU_M), ("1000 km", 1.0e6), ("km", 1.0e3))
_TIMES = (("yr", JULIAN_YEAR_S), ("d", DAY_S), ("h", 3600.0))


def square_cube(scene: Scene) -> SquareCube:
    """T^2 against a^3 of ``scene``'s closed orbits (``third_law``'s bodies): au and
    Julian years when the largest orbit is at least 0.1 au and the longest period a
    year, else 1000 km or km, and days or hours, so the numbers stay near 1 to 1e4."""
    law = third_law(scene)
    a_max = float(law.a_m.max()) if len(law.a_m) else 1.0
    t_max = float(law.period_s.max()) if len(law.period_s) else 1.0
    lname, lm = next((n, m) for n, m in _LENGTHS if a_max >= 0.1 * m or m == 1.0e3)
    tname, ts = next((n, x) for n, x in _TIMES if t_max >= x or x == 3600.0)
    slope = 4.0 * math.pi ** 2 / scene.center.gm_m3_s2 * lm ** 3 / ts ** 2
    return SquareCube(law.names, (law.a_m / lm) ** 3, (law.period_s / ts) ** 2, slope,
                      lname, tname)


def third_law(scene: Scene) -> ThirdLaw:
    """Every closed orbit of ``scene`` and the third-law line across their range."""
    closed = [b for b in scene.bodies if float(b.elements.e) < 1.0]
    a = np.array([float(b.elements.a) for b in closed])
    T = np.array([float(b.elements.period) for b in closed])
    if len(a):
        lo, hi = float(a.min()) / 1.5, float(a.max()) * 1.5
    else:
        lo, hi = 1.0e6, 1.0e12
    line_a = np.geomspace(lo, hi, 50)
    line_T = 2.0 * math.pi * np.sqrt(line_a**3 / scene.center.gm_m3_s2)
    return ThirdLaw(tuple(b.name for b in closed), a, T, line_a, line_T)
