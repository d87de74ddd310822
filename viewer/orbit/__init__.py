"""Two-body orbital mechanics in numpy: elements, anomalies, Kepler solvers, conversions,
propagation, swept areas, derived quantities and central-body constants.

Owns the physics. Imports numpy only: never GL, windowing, UI or the units library
(a test proves it). SI units and radians everywhere; see each module's glossary.
"""

from .anomaly import (
    AnomalyError,
    asymptote_true_anomaly,
    eccentric_anomaly,
    eccentric_from_true,
    hyperbolic_anomaly,
    hyperbolic_from_true,
    kepler_residual,
    mean_from_true,
    parabolic_anomaly,
    true_from_eccentric,
    true_from_hyperbolic,
    true_from_mean,
    wrap_pi,
    wrap_two_pi,
)
from .constants import AU_M, CATALOGUE, DAY_S, JULIAN_YEAR_S, CentralBody, central_body
from .elements import Elements, OrbitError, elements_from_state, state_from_elements
from .propagate import propagate, stumpff_c2_c3
from .sweep import conic_points, sector_area, sector_polygon, swept_area

__all__ = [
    "AU_M", "CATALOGUE", "DAY_S", "JULIAN_YEAR_S", "AnomalyError", "CentralBody", "Elements",
    "OrbitError", "asymptote_true_anomaly", "central_body", "conic_points",
    "eccentric_anomaly", "eccentric_from_true", "elements_from_state", "hyperbolic_anomaly",
    "hyperbolic_from_true", "kepler_residual", "mean_from_true", "parabolic_anomaly",
    "propagate", "sector_area", "sector_polygon", "state_from_elements", "stumpff_c2_c3",
    "swept_area", "true_from_eccentric", "true_from_hyperbolic", "true_from_mean", "wrap_pi",
    "wrap_two_pi",
]
