"""Pork-chop grids: departure C3, arrival v-infinity and total delta-v of the direct
(zero-revolution, prograde) Lambert transfer between two bodies, over a grid of departure
and arrival dates, in one vectorised solve (viewer.mission.lambert).

Patched conics (Curtis, ch. 8; Vallado, sec. 12.x): at departure the hyperbolic excess
velocity is v_inf = v1 - v_planet, C3 = |v_inf|^2; the burn from a circular parking orbit
of radius r_p about a planet of GM mu_p is sqrt(v_inf^2 + 2 mu_p / r_p) - sqrt(mu_p / r_p)
(Curtis eq. 8.40), and the same at arrival into a circular capture orbit. The total
delta-v is the sum of the two burns.

Glossary: ``t_dep``, ``t_arr`` scene times (TDB seconds from the scene epoch); ``tof``
t_arr - t_dep; ``c3`` m^2/s^2; ``vinf_arr`` m/s; ``dv_total`` m/s. Cells with tof <= 0 or
no Lambert solution are NaN.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any

import numpy as np

from ..orbit import propagate, state_from_elements
from .lambert import solve

#: Most cells one grid may have (each holds a few dozen float64 intermediates).
MAX_CELLS = 1_000_000


@dataclass(frozen=True)
class Grid:
    """One pork-chop grid: rows are departure times, columns arrival times (scene s)."""

    t_dep_s: np.ndarray
    t_arr_s: np.ndarray
    tof_s: np.ndarray
    c3_m2_s2: np.ndarray
    vinf_dep_m_s: np.ndarray
    vinf_arr_m_s: np.ndarray
    dv_total_m_s: np.ndarray

    def best(self, which: str) -> tuple[int, int] | None:
        """(departure index, arrival index) of the least ``c3`` or ``dv_total``; None if no
        cell has a solution."""
        values = self.c3_m2_s2 if which == "c3" else self.dv_total_m_s
        if not np.isfinite(values).any():
            return None
        k = int(np.nanargmin(values))
        return divmod(k, values.shape[1])


def body_states(body: Any, t_s: np.ndarray, what: str = "the scene time"
                ) -> tuple[np.ndarray, np.ndarray]:
    """Position (m) and velocity (m/s) of a scene body at scene times ``t_s`` (N,): from its
    ephemeris when it follows one (``what`` names the times in a span error), else its
    two-body conic."""
    t = np.asarray(t_s, dtype=np.float64)
    if body.track is not None:
        return body.track.state(t, what)
    mu = float(body.elements.mu)
    r0, v0 = state_from_elements(body.elements, mu)
    r, v = propagate(r0, v0, mu, t - body.epoch_offset_s)
    return np.asarray(r).reshape(t.shape + (3,)), np.asarray(v).reshape(t.shape + (3,))


def burn_from_circle(vinf_m_s: Any, gm_m3_s2: float, radius_m: float) -> np.ndarray:
    """Delta-v (m/s) between a circular orbit of ``radius_m`` and a hyperbola of excess
    speed ``vinf_m_s`` with its periapsis there (Curtis eq. 8.40)."""
    v = np.asarray(vinf_m_s, dtype=np.float64)
    return np.sqrt(v * v + 2.0 * gm_m3_s2 / radius_m) - np.sqrt(gm_m3_s2 / radius_m)


def grid(mu: float, dep: tuple[np.ndarray, np.ndarray], arr: tuple[np.ndarray, np.ndarray],
         t_dep_s: np.ndarray, t_arr_s: np.ndarray, park: tuple[float, float] | None = None,
         capture: tuple[float, float] | None = None) -> Grid:
    """The grid from the bodies' states at the departure times (``dep`` = (r, v), each
    (N, 3)) and at the arrival times (``arr``, (M, 3)). ``park`` and ``capture`` are
    (GM, circular orbit radius) of the departure and arrival planets for the total
    delta-v (NaN without them)."""
    r1, v_dep = (np.asarray(x, dtype=np.float64) for x in dep)
    r2, v_arr = (np.asarray(x, dtype=np.float64) for x in arr)
    n, m = len(t_dep_s), len(t_arr_s)
    tof = np.asarray(t_arr_s, dtype=np.float64)[None, :] - np.asarray(t_dep_s)[:, None]
    res = solve(mu, r1[:, None, :], r2[None, :, :], tof, 0, True)
    vinf_d = np.linalg.norm(res.v1 - v_dep[:, None, :], axis=-1)
    vinf_a = np.linalg.norm(res.v2 - v_arr[None, :, :], axis=-1)
    c3 = vinf_d * vinf_d
    total = np.full((n, m), np.nan)
    if park is not None and capture is not None:
        ok = res.ok
        total[ok] = (burn_from_circle(vinf_d[ok], *park)
                     + burn_from_circle(vinf_a[ok], *capture))
    return Grid(t_dep_s=np.asarray(t_dep_s, dtype=np.float64),
                t_arr_s=np.asarray(t_arr_s, dtype=np.float64), tof_s=tof, c3_m2_s2=c3,
                vinf_dep_m_s=vinf_d, vinf_arr_m_s=vinf_a, dv_total_m_s=total)


def synodic_period_s(period1_s: float, period2_s: float) -> float:
    """The synodic period 1 / |1/T1 - 1/T2| (common practice, no source)."""
    return 1.0 / abs(1.0 / period1_s - 1.0 / period2_s)


# --- a launch season from what a person typed: one home for both front ends -------------

#: Grid sizes a season may have: each side, and the cells in all.
MIN_STEPS, MAX_STEPS = 2, 2000


@dataclass(frozen=True)
class Season:
    """A computed pork-chop grid with what it was made from: the two bodies, and
    (GM, circular orbit radius) of the parking and the capture orbit."""

    dep: Any
    arr: Any
    grid: Grid
    park: tuple[float, float]
    capture: tuple[float, float]

    def cell_at(self, t_dep_s: float, t_arr_s: float) -> tuple[int, int] | None:
        """The cell nearest to a departure and an arrival time, None outside the grid or
        where the cell has no transfer."""
        g = self.grid
        for t, axis in ((t_dep_s, g.t_dep_s), (t_arr_s, g.t_arr_s)):
            half = 0.5 * (axis[1] - axis[0])
            if not axis[0] - half <= t <= axis[-1] + half:
                return None
        i = int(np.argmin(np.abs(g.t_dep_s - t_dep_s)))
        j = int(np.argmin(np.abs(g.t_arr_s - t_arr_s)))
        return (i, j) if np.isfinite(g.c3_m2_s2[i, j]) else None


def check_steps(n: int, m: int, field: str) -> None:
    """Refuse a grid of n x m dates that is too small or too large for memory."""
    from .quick import MissionRefused

    if not (MIN_STEPS <= n <= MAX_STEPS and MIN_STEPS <= m <= MAX_STEPS):
        raise MissionRefused(field, f"each grid size must be {MIN_STEPS} to {MAX_STEPS}; "
                             f"got {n} {m}")
    if n * m > MAX_CELLS:
        raise MissionRefused(field, f"{n * m:,} cells is too large a grid for memory; at "
                             f"most {MAX_CELLS:,}")


def parse_altitude(text: str, field: str) -> float:
    """An orbit's altitude above a planet as typed ("200 km"; bare numbers in km)."""
    from ..units import QuantityError, parse_quantity
    from .quick import MissionRefused

    try:
        h = parse_quantity(text, "length", "km")
    except QuantityError as err:
        raise MissionRefused(field, f"{err}; give an altitude such as \"200 km\"") from None
    if not h >= 0.0:
        raise MissionRefused(field, f"the altitude must be zero or more; got {text!r}")
    return h


def planet_orbit(body: Any, altitude_m: float, field: str) -> tuple[float, float]:
    """(GM, radius of a circular orbit ``altitude_m`` above it) of a body as a planet:
    the catalogue entry of its ephemeris target or name, else the body's own gm (or
    mass) and radius from the scene."""
    from ..orbit.constants import CATALOGUE
    from .quick import MissionRefused

    if not altitude_m >= 0.0:
        raise MissionRefused(field, f"the orbit's altitude must be zero or more; got "
                             f"{altitude_m / 1e3:g} km")
    key = body.track.target if body.track is not None else body.name.strip().lower()
    entry = CATALOGUE.get(key)
    if entry is not None:
        return entry.gm_m3_s2, entry.radius_m + altitude_m
    if body.gm_m3_s2 > 0.0 and body.radius_m:
        return body.gm_m3_s2, body.radius_m + altitude_m
    raise MissionRefused(field, f"{body.name!r} is not a catalogue planet (one of "
                         f"{', '.join(CATALOGUE)}) and has no gm and radius in the scene, so "
                         f"its parking or capture orbit is unknown; give the body gm (or "
                         f"mass) and radius")


def season(scene: Any, dep: Any, arr: Any, t_dep_s: np.ndarray, t_arr_s: np.ndarray,
           park_altitude_m: float, capture_altitude_m: float,
           fields: dict[str, str] | None = None) -> Season:
    """The pork-chop grid of direct transfers from body ``dep`` to body ``arr`` of
    ``scene`` over the departure and arrival times (scene s, increasing). Refusals are
    MissionRefused naming the input by ``fields`` (keys "from", "to", "depart",
    "arrive", "steps"; the command line passes its flags). A body that is no planet of
    the catalogue and has no gm and radius is refused at "from" or "to"."""
    from .quick import MissionRefused

    name = {"from": "from", "to": "to", "depart": "depart", "arrive": "arrive",
            "steps": "steps", **(fields or {})}
    if dep.name == arr.name:
        raise MissionRefused(name["to"], "the departure and the arrival body are the same")
    check_steps(len(t_dep_s), len(t_arr_s), name["steps"])
    for key, t in (("depart", t_dep_s), ("arrive", t_arr_s)):
        if not np.all(np.diff(t) > 0):
            raise MissionRefused(name[key], "the last date must be after the first")
    park = planet_orbit(dep, park_altitude_m, name["from"])
    capture = planet_orbit(arr, capture_altitude_m, name["to"])
    g = grid(scene.center.gm_m3_s2, body_states(dep, t_dep_s, name["depart"]),
             body_states(arr, t_arr_s, name["arrive"]), t_dep_s, t_arr_s, park, capture)
    if not np.isfinite(g.c3_m2_s2).any():
        raise MissionRefused(name["arrive"], "no cell of the grid has a Lambert solution: "
                             "every arrival must come after its departure")
    return Season(dep, arr, g, park, capture)


def transfer_elements(scene: Any, s: Season, cell: tuple[int, int]) -> Any:
    """The conic (Elements at the departure) of the transfer of one cell."""
    from ..orbit import elements_from_state

    i, j = cell
    t_dep, t_arr = float(s.grid.t_dep_s[i]), float(s.grid.t_arr_s[j])
    r1, _ = body_states(s.dep, np.array([t_dep]))
    r2, _ = body_states(s.arr, np.array([t_arr]))
    res = solve(scene.center.gm_m3_s2, r1[0], r2[0], t_arr - t_dep)
    return elements_from_state(r1[0], res.v1, scene.center.gm_m3_s2)


def transfer_body(scene: Any, s: Season, cell: tuple[int, int], name: str,
                  color: tuple[float, float, float] = (1.0, 0.85, 0.35)) -> Any:
    """The transfer of one cell as a scene body: the Lambert conic with its epoch at the
    departure, flown (and drawn) from departure to arrival, apsides shown."""
    from ..scene.model import Body, BodyShow

    i, j = cell
    t_dep, t_arr = float(s.grid.t_dep_s[i]), float(s.grid.t_arr_s[j])
    return Body(name=name, elements=transfer_elements(scene, s, cell), epoch_offset_s=t_dep,
                color=color, show=BodyShow(apsides=True), flight_s=(t_dep, t_arr))
