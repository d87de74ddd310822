"""Population constants reproduce every member's position (against state_from_elements,
Vallado alg. 10 COE2RV, an independent path through the elements)."""

from __future__ import annotations

import numpy as np

from viewer.geometry.population import mean_anomaly_at, population_constants, positions_at
from viewer.orbit import AU_M, DAY_S, Elements, state_from_elements
from viewer.render.samples import GM_SUN, belt_population
from viewer.scene import Population


def test_population_positions_match_each_body_propagated_on_its_own():
    pop = belt_population(300)
    c = population_constants(pop)
    t = 123.4 * DAY_S
    got = positions_at(c, t)
    el = pop.elements
    for k in range(0, 300, 37):
        one = Elements(float(el.a[k]), float(el.e[k]), float(el.i[k]), float(el.raan[k]),
                       float(el.argp[k]), float(el.nu[k]), mu=GM_SUN)
        r, _ = state_from_elements(one.after(t))
        assert np.allclose(got[k], r, rtol=0, atol=1e-6 * AU_M * 1e-3)


def test_mean_anomalies_are_reduced_to_one_turn_in_float64():
    c = population_constants(belt_population(1000))
    M = mean_anomaly_at(c, 50 * 365.25 * DAY_S)
    assert M.min() >= 0.0 and M.max() < 2 * np.pi


def test_open_orbits_are_left_out_of_a_population():
    el = Elements(np.array([1.0, -2.0]) * AU_M, np.array([0.1, 1.5]), np.zeros(2), np.zeros(2),
                  np.zeros(2), np.zeros(2), mu=GM_SUN)
    c = population_constants(Population("p", el, 0.0, (1, 1, 1), 1.0))
    assert c.count == 1
