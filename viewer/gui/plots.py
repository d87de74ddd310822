"""What the plot panel shows, as arrays: no imgui here.

* ``orbit_profile``: distance from the central body and speed over one period of a closed
  orbit (from the last periapsis before the current time), with the current time, by
  Kepler's equation and vis-viva (``viewer.orbit.Elements``).
* ``third_law``: period against semi-major axis of every closed orbit, and the third-law
  line T = 2 pi sqrt(a^3 / mu) through the same range. On log axes the line has slope
  3/2 (log T = 3/2 log a + const), which is T^2 proportional to a^3.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
from numpy.typing import NDArray

from ..scene.model import Body, Scene

Floats = NDArray[np.float64]


@dataclass(frozen=True)
class Profile:
    """Samples over one period: scene times (s), distance (m), speed (m/s); ``now_s``."""

    t_s: Floats
    distance_m: Floats
    speed_m_s: Floats
    now_s: float


def orbit_profile(body: Body, now_s: float, samples: int = 400) -> Profile | None:
    """One period of ``body`` from its last periapsis before ``now_s``; None if open."""
    el = body.elements_at(now_s)
    if float(el.e) >= 1.0:
        return None
    period = float(el.period)
    start = now_s - float(el.time_since_periapsis) % period
    t = start + np.linspace(0.0, period, samples)
    at = body.elements_at(0.0).after(t)  # vectorised: one Kepler solve for all samples
    return Profile(t, np.asarray(at.radius_at(at.nu)), np.asarray(at.speed_at(at.nu)), now_s)


@dataclass(frozen=True)
class ThirdLaw:
    """Closed orbits' a (m) and T (s) with names, and the line T(a) for the centre's mu."""

    names: tuple[str, ...]
    a_m: Floats
    period_s: Floats
    line_a_m: Floats
    line_period_s: Floats


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
