"""Where an orbit's annotations are: foci, axes, apsides, line of nodes, grid, arrows.

Pure functions of an orbit's elements (and of the view, for the grid's extent), in
metres from the occupied focus, float64. Conventions as in viewer.orbit.elements: P
points to periapsis, Q is 90 degrees ahead in the orbit plane, the occupied focus is at
the origin. For the ellipse the centre is at -a e P and the empty focus at -2 a e P; for
the hyperbola (a < 0) the centre is at |a| e P, beyond the periapsis, and the other
focus at 2 |a| e P (Vallado, 4th ed., sec. 2.4; Curtis, ch. 2).
"""

from __future__ import annotations

import math

import numpy as np
from numpy.typing import NDArray

from ..orbit import Elements, asymptote_true_anomaly
from .camera import View

Floats = NDArray[np.float64]


def _pq(el: Elements) -> tuple[Floats, Floats]:
    P, Q, _ = el.perifocal_basis()
    return np.asarray(P, dtype=np.float64), np.asarray(Q, dtype=np.float64)


def conic_centre_m(el: Elements) -> Floats | None:
    """The conic's geometric centre (m); None for a parabola."""
    e = float(el.e)
    if e == 1.0:
        return None
    P, _ = _pq(el)
    c = abs(float(el.a)) * e
    return -c * P if e < 1.0 else c * P


def foci_m(el: Elements) -> tuple[Floats, Floats | None]:
    """(occupied focus, empty focus) in m; the empty one is None for a parabola."""
    centre = conic_centre_m(el)
    return np.zeros(3), None if centre is None else 2.0 * centre


def apsides_m(el: Elements) -> tuple[Floats, Floats | None]:
    """(periapsis, apoapsis) points in m; apoapsis is None for open conics."""
    P, _ = _pq(el)
    q = float(el.periapsis)
    apo = -float(el.apoapsis) * P if float(el.e) < 1.0 else None
    return q * P, apo


def axes_m(el: Elements, limit_radius_m: float) -> list[Floats]:
    """Axis segments (each (2, 3), m): major and minor axes of an ellipse; the axis and
    the asymptotes of a hyperbola; the axis of a parabola (to ``limit_radius_m``)."""
    P, Q = _pq(el)
    e = float(el.e)
    peri, apo = apsides_m(el)
    if e < 1.0:
        centre = conic_centre_m(el)
        assert centre is not None and apo is not None
        b = float(el.b)
        return [np.stack([peri, apo]), np.stack([centre - b * Q, centre + b * Q])]
    if e == 1.0:
        return [np.stack([peri, -limit_radius_m * P])]
    centre = conic_centre_m(el)
    assert centre is not None
    nu_inf = float(asymptote_true_anomaly(e))
    out = [np.stack([peri, 2.0 * centre])]
    for s in (1.0, -1.0):
        d = math.cos(nu_inf) * P + s * math.sin(nu_inf) * Q
        # From the centre back past the focus's side, where the branch runs.
        out.append(np.stack([centre, centre + limit_radius_m * d]))
    return out


def nodes_m(el: Elements, limit_radius_m: float) -> tuple[Floats, Floats] | None:
    """(ascending node, descending node) in m, where the orbit crosses the reference
    plane; None for an orbit in the plane. A node an open conic never reaches is drawn
    at ``limit_radius_m`` along the line of nodes."""
    if abs(math.sin(float(el.i))) < 1e-9:
        return None
    raan = float(el.raan)
    n_hat = np.array([math.cos(raan), math.sin(raan), 0.0])
    e = float(el.e)
    argp = float(el.argp)
    nu_max = math.pi if e < 1.0 else float(asymptote_true_anomaly(e))
    out = []
    for nu, sign in ((-argp, 1.0), (math.pi - argp, -1.0)):
        nu = math.remainder(nu, 2.0 * math.pi)
        if e < 1.0 or abs(nu) < nu_max - 1e-9:
            r = float(el.p) / (1.0 + e * math.cos(nu))
            r = min(r, limit_radius_m) if e >= 1.0 else r
        else:
            r = limit_radius_m
        out.append(sign * r * n_hat)
    return out[0], out[1]


def nice_step(span: float, target_count: float = 8.0) -> float:
    """A round number (1, 2 or 5 times a power of ten) near span / target_count."""
    raw = span / target_count
    mag = 10.0 ** math.floor(math.log10(raw))
    for k in (1.0, 2.0, 5.0, 10.0):
        if k * mag >= raw:
            return k * mag
    return 10.0 * mag


def grid_radii_m(view: View, unit_m: float, extent_m: float) -> tuple[Floats, float]:
    """Radii (m) of the reference-plane grid's rings and their step.

    The step is a round number of the scene's length unit, about a tenth of the field;
    rings reach ``extent_m`` (and the field's corners), at most 60 of them, and only
    those that can cross the field are kept.
    """
    field = view.field_width_m
    step = nice_step(field / unit_m, 10.0) * unit_m
    d = float(np.hypot(view.origin_m[0], view.origin_m[1]))
    half_diag = 0.5 * field * math.hypot(1.0, view.size_px[1] / view.size_px[0])
    if view.perspective:
        r_lo, r_hi = step, extent_m
    else:
        r_lo, r_hi = max(step, d - half_diag), d + half_diag
    k0 = max(1, math.ceil(r_lo / step))
    k1 = min(math.floor(r_hi / step), k0 + 59)
    return np.arange(k0, k1 + 1, dtype=np.float64) * step, step
