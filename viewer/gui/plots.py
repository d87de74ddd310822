"""What the plot panel shows, as arrays: no imgui here.

* ``orbit_profile``: distance from the central body and speed over one period of a closed
  orbit (from the last periapsis before the current time), with the current time, by
  Kepler's equation and vis-viva (``viewer.orbit.Elements``).
* ``third_law`` and ``square_cube`` (from ``viewer.scene.third_law``, shared with the
  plot that ``perifocal plot`` writes): period against semi-major axis of every closed
  orbit with the line T = 2 pi sqrt(a^3 / mu), and T^2 against a^3 with its slope.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from numpy.typing import NDArray

from ..scene.model import Body
from ..scene.third_law import SquareCube, ThirdLaw, square_cube, third_law

__all__ = ["Profile", "SquareCube", "ThirdLaw", "orbit_profile", "square_cube", "third_law"]

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
