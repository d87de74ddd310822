"""Invented scenes made in Python for benchmarks, tests and docs (not real bodies).

``demo_like_scene`` is a busy system like the bundled demo: four planets, one with
equal-time sectors, foci, axes and apsides, one inclined with its line of nodes, a
hyperbolic visitor, grid, labels and stars. ``belt_population`` makes a deterministic
asteroid belt of any size (elements from the SplitMix64 hash of the starfield, so the
same on every machine).
"""

from __future__ import annotations

import math

import numpy as np

from ..geometry.stars import splitmix64
from ..orbit import AU_M, DAY_S, Elements
from ..scene.model import (
    Body,
    BodyShow,
    Camera,
    Center,
    Population,
    RenderSettings,
    Scene,
    Sweep,
)
from ..units import parse_epoch

GM_SUN = 1.32712440018e20  # m^3/s^2, the scene-format example's value
DEG = math.pi / 180.0


def _el(a_au: float, e: float, i_deg: float = 0.0, raan_deg: float = 0.0,
        argp_deg: float = 0.0, nu_deg: float = 0.0) -> Elements:
    return Elements(a_au * AU_M, e, i_deg * DEG, raan_deg * DEG, argp_deg * DEG,
                    nu_deg * DEG, mu=GM_SUN)


def belt_population(n: int, name: str = "belt") -> Population:
    """``n`` bound orbits between 2.1 and 3.3 au, e < 0.25, i < 15 deg (invented)."""
    idx = np.arange(n, dtype=np.uint64) + np.uint64(1_000_003)
    u = [splitmix64(idx, s) for s in range(6)]
    el = Elements(a=(2.1 + 1.2 * u[0]) * AU_M, e=0.25 * u[1] ** 1.5, i=15 * DEG * u[2] ** 2,
                  raan=2 * math.pi * u[3], argp=2 * math.pi * u[4], nu=2 * math.pi * u[5],
                  mu=GM_SUN)
    return Population(name, el, 0.0, (0.62, 0.58, 0.52), 1.6)


def demo_like_scene(population: int = 0) -> Scene:
    """A four-planet system with every annotation switched on somewhere."""
    year = 365.25 * DAY_S
    bodies = (
        Body("Ember", _el(0.42, 0.18, argp_deg=30, nu_deg=200), color=(1.0, 0.62, 0.38),
             line_width_px=2.0),
        Body("Tarn", _el(1.2, 0.21, 3.0, 40.0, 110.0), color=(0.50, 0.82, 1.0),
             line_width_px=2.2,
             show=BodyShow(foci=True, axes=True, apsides=True, sweep=True, velocity=True),
             sweep=Sweep(0.0, 0.1 * 1.2**1.5 * year, 6, (1.0, 0.72, 0.28), 0.4,
                         show_area=True)),
        Body("Veil", _el(1.9, 0.08, 14.0, 200.0, 10.0, 60.0), color=(0.78, 0.62, 1.0),
             show=BodyShow(nodes=True)),
        Body("Quill", Elements.from_periapsis(0.7 * AU_M, 1.6, 8 * DEG, 300 * DEG,
                                              250 * DEG, -40 * DEG, mu=GM_SUN),
             color=(0.55, 0.95, 0.75), limit_radius_m=3.4 * AU_M),
    )
    pops = (belt_population(population),) if population else ()
    return Scene(
        title="A four-planet system", epoch=parse_epoch("2030-01-01T00:00:00 TDB"),
        frame="ECLIPJ2000",
        center=Center("Star", GM_SUN, 6.957e8, (1.0, 0.82, 0.5)),
        bodies=bodies, camera=Camera(width_m=5.0 * AU_M),
        render=RenderSettings(size_px=(1920, 1080), grid=True), populations=pops)


def plain_scene(bodies: tuple[Body, ...], camera: Camera | None = None,
                size_px: tuple[int, int] = (1600, 1200), show_center: bool = False,
                labels: bool = False) -> Scene:
    """Known geometry for measuring pictures: no stars, no grid, a black sky, the Sun's GM.

    Bodies are drawn as given (their ``show``); the central body only if asked.
    """
    return Scene(
        title="measured geometry", epoch=parse_epoch("2030-01-01T00:00:00 TDB"),
        frame="ECLIPJ2000",
        center=Center("Sun", GM_SUN, 6.957e8, (1.0, 0.82, 0.5), show_body=show_center,
                      show_label=labels),
        bodies=bodies, camera=camera or Camera(width_m=4.0 * AU_M),
        render=RenderSettings(size_px=size_px, background=(0.0, 0.0, 0.0), stars=False,
                              grid=False, labels=labels))


def elements(a_au: float, e: float, i_deg: float = 0.0, raan_deg: float = 0.0,
             argp_deg: float = 0.0, nu_deg: float = 0.0) -> Elements:
    """Elements about the Sun's GM from au and degrees (for tests and docs)."""
    return _el(a_au, e, i_deg, raan_deg, argp_deg, nu_deg)
