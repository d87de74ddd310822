"""The window's pork-chop plot: a launch season between two bodies of the scene, from
what the user typed, and the transfer of a picked cell as a body of the scene. Plain
Python: no imgui.

The grid, its refusals and the transfer conic come from ``viewer.mission.porkchop``,
the same functions ``perifocal porkchop`` calls, so the window and the command line
cannot disagree. Dates are typed as on the command line: an epoch (TDB without a
scale) or an offset from the scene epoch ("90 d").
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from ..mission.porkchop import Season, parse_altitude, season, transfer_body
from ..mission.quick import MissionRefused
from ..orbit import DAY_S
from ..scene.model import Body, Scene
from ..units import QuantityError
from ..units.forms import EpochError, epoch_from_text
from .editor import Editor, EditRefused

__all__ = ["SeasonInputs", "SeasonState", "cell_rows", "compute", "default_pair", "pick",
           "season_bodies", "suggested"]

#: Grid size of the window's plot: fine enough to pick a day, quick to redo (40,000
#: cells take about 40 ms here; docs/performance.md).
WINDOW_STEPS = 200

Rows = tuple[tuple[str, str], ...]


@dataclass
class SeasonInputs:
    """What the pork-chop panel holds: the two bodies (scene indices), the first and
    last departure and arrival dates as typed, and the parking and capture altitudes."""

    from_index: int = 0
    to_index: int = 1
    depart: tuple[str, str] = ("", "")
    arrive: tuple[str, str] = ("", "")
    park_altitude: str = "200 km"
    capture_altitude: str = "250 km"
    steps: int = WINDOW_STEPS


@dataclass
class SeasonState:
    """The launch-season window's state: the inputs, the last grid (or the refusal
    that stopped it), the picked cell and the index of the body the last pick made."""

    inputs: SeasonInputs | None = None
    result: Season | None = None
    error: str = ""
    cell: tuple[int, int] | None = None
    added: int | None = None


def season_bodies(scene: Scene) -> list[int]:
    """Bodies a season can join: the closed orbits (planets and the like)."""
    return [k for k, b in enumerate(scene.bodies)
            if b.flight_s is None and float(b.elements.e) < 1.0]


def default_pair(scene: Scene, selection: int | None) -> tuple[int, int] | None:
    """The two bodies a season opens with: from Earth when the scene has it (most
    seasons start there), else the selected body, else the innermost; to the next one
    out."""
    choices = season_bodies(scene)
    if len(choices) < 2:
        return None
    by_a = sorted(choices, key=lambda k: float(scene.bodies[k].elements.a))
    names = [b.name.lower() for b in scene.bodies]
    earth = names.index("earth") if "earth" in names else None
    start = earth if earth in choices else selection if selection in choices else by_a[0]
    pos = by_a.index(start)
    return start, by_a[pos + 1] if pos + 1 < len(by_a) else by_a[pos - 1]


def suggested(scene: Scene, t_s: float, from_index: int, to_index: int) -> SeasonInputs:
    """A season worth looking at from scene time ``t_s``: departures a quarter of a
    synodic period about the next Hohmann window (the phase angle the Hohmann time of
    flight needs, from the bodies' positions now and their mean motions), arrivals from
    half to twice that time of flight after them (common practice, no source)."""
    from ..mission.porkchop import body_states

    dep, arr = scene.bodies[from_index], scene.bodies[to_index]
    a1, a2 = float(dep.elements.a), float(arr.elements.a)
    mu = scene.center.gm_m3_s2
    hohmann = math.pi * math.sqrt((0.5 * (a1 + a2)) ** 3 / mu)
    n1, n2 = math.sqrt(mu / a1 ** 3), math.sqrt(mu / a2 ** 3)
    if n1 == n2:
        window, span = t_s, 2.0 * hohmann
    else:
        synodic = 2.0 * math.pi / abs(n1 - n2)
        now = np.array([t_s])
        r1 = body_states(dep, now)[0][0]
        r2 = body_states(arr, now)[0][0]
        normal = np.cross(r1, body_states(dep, now)[1][0])
        lead = math.atan2(float(np.dot(normal, np.cross(r1, r2))) / np.linalg.norm(normal),
                          float(np.dot(r1, r2)))
        needed = math.pi - n2 * hohmann
        wait = ((needed - lead) / (n2 - n1)) % synodic
        window, span = t_s + wait, 0.25 * synodic
    e0 = scene.epoch

    def date(t: float) -> str:  # whole days of the scene epoch's calendar
        return e0.plus_seconds(round(t / DAY_S) * DAY_S).iso("TDB", 0).replace(
            "T00:00:00", "")

    lo, hi = window - 0.5 * span, window + 0.5 * span
    return SeasonInputs(from_index, to_index, (date(lo), date(hi)),
                        (date(lo + 0.5 * hohmann), date(hi + 2.0 * hohmann)))


def _times(scene: Scene, pair: tuple[str, str], n: int, field: str) -> np.ndarray:
    try:
        t0, t1 = (epoch_from_text(x.strip(), scene.epoch, scene.time_unit)
                  .seconds_since(scene.epoch) for x in pair)
    except (EpochError, QuantityError) as err:
        raise EditRefused(field, str(err)) from None
    if not t1 > t0:
        raise EditRefused(field, f"the last date must be after the first; got {pair[0]!r} "
                          f"to {pair[1]!r}")
    return np.linspace(t0, t1, n)


def _altitude(text: str, field: str) -> float:
    try:
        return parse_altitude(text, field)
    except MissionRefused as err:
        raise EditRefused(field, err.problems) from None


FIELDS = {"from": "porkchop:from", "to": "porkchop:to", "depart": "porkchop:depart",
          "arrive": "porkchop:arrive", "steps": "porkchop:steps"}


def compute(scene: Scene, inp: SeasonInputs) -> Season:
    """The season the inputs describe; EditRefused (one line, naming the field) if not."""
    bodies = scene.bodies
    if not (0 <= inp.from_index < len(bodies) and 0 <= inp.to_index < len(bodies)):
        raise EditRefused("porkchop:from", "pick two bodies of the scene")
    t_dep = _times(scene, inp.depart, inp.steps, FIELDS["depart"])
    t_arr = _times(scene, inp.arrive, inp.steps, FIELDS["arrive"])
    try:
        return season(scene, bodies[inp.from_index], bodies[inp.to_index], t_dep, t_arr,
                      _altitude(inp.park_altitude, "porkchop:park"),
                      _altitude(inp.capture_altitude, "porkchop:capture"), FIELDS)
    except MissionRefused as err:
        raise EditRefused(err.field, err.problems) from None


def cell_rows(scene: Scene, s: Season, cell: tuple[int, int]) -> Rows:
    """The numbers of one cell, each with its unit (as ``perifocal porkchop`` prints)."""
    i, j = cell
    g = s.grid
    e0 = scene.epoch
    return (("departure", e0.plus_seconds(float(g.t_dep_s[i])).iso("TDB", 0)),
            ("arrival", e0.plus_seconds(float(g.t_arr_s[j])).iso("TDB", 0)),
            ("time of flight", f"{float(g.tof_s[i, j]) / DAY_S:.1f} d"),
            ("departure C3", f"{float(g.c3_m2_s2[i, j]) / 1e6:.3f} km2/s2"),
            ("departure v_inf", f"{float(g.vinf_dep_m_s[i, j]) / 1e3:.3f} km/s"),
            ("arrival v_inf", f"{float(g.vinf_arr_m_s[i, j]) / 1e3:.3f} km/s"),
            ("total dv", f"{float(g.dv_total_m_s[i, j]) / 1e3:.3f} km/s"))


def pick(editor: Editor, s: Season, cell: tuple[int, int], previous: int | None) -> int:
    """Make the transfer of ``cell`` a body of the scene (one undo step) and return its
    index. ``previous`` is the index of the body the last pick made: while it is still
    there, unchanged in name, it is replaced, so clicking about the plot keeps one
    transfer in the scene rather than piling them up."""
    scene = editor.scene
    name = f"{s.dep.name} to {s.arr.name} (Lambert)"
    body = transfer_body(scene, s, cell, name)
    label = f"pork-chop transfer {s.dep.name} to {s.arr.name}"
    if previous is not None and 0 <= previous < len(scene.bodies) \
            and scene.bodies[previous].name == name:
        old: Body = scene.bodies[previous]
        editor.replace_body(previous, body, label, color=old.color)
        return previous
    return editor.add_bodies([body], label)[0]
