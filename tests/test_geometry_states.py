"""A frame's bodies evaluated together get the bits each gets alone.

``states_at`` solves Kepler's equation and evaluates the state of every body of a frame
in one vectorised pass. Both steps are elementwise, so each body's position and velocity
must equal, bit for bit, what its own ``Body.elements_at`` and ``state_from_elements``
give: frames stay byte-identical to frames made body by body. The elements below are
random (ellipses from circles to e = 1 - 1e-9, where the Kepler solver's guard takes
Newton steps, and hyperbolas), at random times; the reference is the per-body path.
"""

from __future__ import annotations

import numpy as np
from hypothesis import given, settings
from hypothesis import strategies as st

from viewer.geometry.frame import StaticCache, _state_at, states_at
from viewer.orbit import Elements
from viewer.scene.model import Body

MU_SUN = 1.32712440018e20  # m^3/s^2 (IAU 2015 nominal GM of the Sun; from memory)
AU = 1.495978707e11  # m (IAU 2012 Resolution B2)


def _body(k: int, a_au: float, e: float, angles: tuple[float, float, float, float],
          epoch_s: float) -> Body:
    i, raan, argp, nu = angles
    if e > 1.0:
        a = -a_au * AU
        nu = nu * 0.9 * float(np.arccos(-1.0 / e)) / np.pi  # inside the asymptotes
    else:
        a = a_au * AU
    el = Elements(a, e, i, raan, argp, nu, MU_SUN)
    return Body(name=f"b{k}", elements=el, color=(1.0, 1.0, 1.0), epoch_offset_s=epoch_s)


eccentricity = st.one_of(st.integers(0, 990_000).map(lambda k: k / 1e6),
                         st.integers(1, 10_000_000).map(lambda k: 1.0 - k * 1e-9),
                         st.integers(1, 3_000_000).map(lambda k: 1.0 + k * 1e-6))
# Whole seconds and milliradians apart from zero: no subnormal value, which the tests'
# np.seterr(all="raise") would turn into an underflow error on either path.
angle = st.integers(-3141, 3141).map(lambda k: k / 1000.0)
seconds = st.integers(-3_000_000_000, 3_000_000_000).map(float)


@settings(max_examples=60, deadline=None)
@given(st.lists(st.tuples(st.integers(50, 60_000).map(lambda k: k / 1000.0), eccentricity,
                          st.tuples(angle.map(abs), angle, angle, angle),
                          seconds), min_size=2, max_size=12),
       seconds)
def test_bodies_together_have_the_bits_each_has_alone(rows, t_s):
    bodies = [_body(k, *row) for k, row in enumerate(rows)]
    together = states_at(bodies, t_s)
    for body, (r, v) in zip(bodies, together, strict=True):
        r1, v1 = _state_at(body, t_s)
        assert np.array_equal(r, r1) and np.array_equal(v, v1), body


def test_the_cache_keeps_each_state_and_recomputes_at_a_new_time():
    bodies = [_body(0, 1.0, 0.2, (0.1, 0.2, 0.3, 0.4), 0.0),
              _body(1, 5.2, 0.05, (0.02, 1.0, 4.0, 2.0), 0.0)]
    cache = StaticCache()
    first = cache.states(bodies, 1e7)
    again = cache.states(bodies, 1e7)
    assert all(a[0] is b[0] for a, b in zip(first, again, strict=True))  # kept
    later = cache.states(bodies, 2e7)
    for body, (r, _v) in zip(bodies, later, strict=True):
        assert np.array_equal(r, _state_at(body, 2e7)[0])
    # Moved along the orbit: a later time gives another position.
    assert not np.array_equal(first[0][0], later[0][0])


def test_kepler_values_that_take_newton_steps_do_not_depend_on_their_neighbours():
    """Near periapsis at e -> 1 the solver's guard takes Newton steps, a different number
    for different values; each value must still come out as it does alone."""
    from viewer.orbit import eccentric_anomaly

    rng = np.random.default_rng(7)
    M = np.concatenate([rng.uniform(0.0, 0.05, 300), rng.uniform(-np.pi, np.pi, 100)])
    e = np.concatenate([1.0 - 10.0 ** rng.uniform(-9, -2, 300), rng.uniform(0, 0.9, 100)])
    together = eccentric_anomaly(M, e)
    alone = np.array([eccentric_anomaly(M[k:k + 1], e[k:k + 1])[0] for k in range(M.size)])
    assert np.array_equal(together, alone)
