"""Large populations (belts, debris) prepared for fast propagation: per-body constants.

A population of N elliptic orbits is reduced once to constants, so that the position at
any time is r = (cos E - e) a P + sin E b Q with E from Kepler's equation
M = E - e sin E and M = M0 + n (t - t0) (Vallado, *Fundamentals of Astrodynamics and
Applications*, 4th ed., sec. 2.2 and 2.6). Per frame the CPU only advances and reduces the
mean anomalies in float64 (two array operations); the renderer solves Kepler's equation
and projects in its vertex shader. ``positions_at`` is the float64 reference on the CPU.

Open orbits (e >= 1) in a population are left out: a belt table is for bound bodies.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from numpy.typing import NDArray

from ..orbit import eccentric_anomaly
from ..scene.model import Population

Floats = NDArray[np.float64]


@dataclass(frozen=True)
class PopulationConstants:
    """Per-body constants of the elliptic members of a population (SI units)."""

    M0: Floats          # mean anomaly at the population's epoch, rad
    n_rad_s: Floats     # mean motion, rad/s
    e: Floats
    aP_m: Floats        # a * P, (N, 3)
    bQ_m: Floats        # b * Q, (N, 3)
    epoch_offset_s: float

    @property
    def count(self) -> int:
        return len(self.e)


def population_constants(pop: Population) -> PopulationConstants:
    """Reduce a population's elements to the constants above (elliptic members only)."""
    el = pop.elements
    e_all = np.atleast_1d(np.asarray(el.e, dtype=np.float64))
    keep = e_all < 1.0
    sub = el.with_(**{f: np.atleast_1d(np.asarray(getattr(el, f), dtype=np.float64))[keep]
                      for f in ("a", "e", "i", "raan", "argp", "nu")})
    P, Q, _ = sub.perifocal_basis()
    a = np.asarray(sub.a, dtype=np.float64)
    b = np.asarray(sub.b, dtype=np.float64)
    return PopulationConstants(
        M0=np.atleast_1d(np.asarray(sub.mean_anomaly, dtype=np.float64)),
        n_rad_s=np.atleast_1d(np.asarray(sub.mean_motion, dtype=np.float64)),
        e=np.asarray(sub.e, dtype=np.float64),
        aP_m=np.asarray(P).reshape(-1, 3) * a[:, None],
        bQ_m=np.asarray(Q).reshape(-1, 3) * b[:, None],
        epoch_offset_s=float(pop.epoch_offset_s),
    )


def mean_anomaly_at(c: PopulationConstants, t_s: float) -> Floats:
    """Mean anomalies at scene time t_s, reduced to [0, 2 pi) in float64."""
    return np.mod(c.M0 + c.n_rad_s * (t_s - c.epoch_offset_s), 2.0 * np.pi)


def positions_at(c: PopulationConstants, t_s: float) -> Floats:
    """Positions (m, (N, 3)) at scene time t_s, in float64: the reference for the shader."""
    E = np.asarray(eccentric_anomaly(mean_anomaly_at(c, t_s), c.e))
    return (np.cos(E) - c.e)[:, None] * c.aP_m + np.sin(E)[:, None] * c.bQ_m
