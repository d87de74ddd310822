"""Properties of the two-body core that hold for every orbit, checked with hypothesis:
state <-> elements round trips (the awkward cases on purpose), conservation under
propagation, and the second law as computation (swept areas)."""

from __future__ import annotations

import math

import numpy as np
import pytest
from hypothesis import assume, given, settings
from hypothesis import strategies as st
from reference_values import DEG, KM, MU_EARTH

from viewer.orbit import (
    Elements,
    elements_from_state,
    propagate,
    sector_area,
    state_from_elements,
    swept_area,
)

#: Round trip state -> elements -> state, relative to |r| and |v|.
ROUND_TRIP_REL = 1e-9
FEW = settings(max_examples=60, deadline=None)


def real(lo: float, hi: float) -> st.SearchStrategy[float]:
    """Floats in [lo, hi] with the ones closer to 0 than 1e-9 snapped to 0: subnormal
    angles and direction cosines only make numpy report underflow (an error under the
    tests' np.seterr(all="raise")) and say nothing about orbits."""
    return st.floats(lo, hi).map(lambda x: 0.0 if abs(x) < 1e-9 else x)


unit_angle = real(0.0, 2 * math.pi).filter(lambda x: x < 2 * math.pi)


@st.composite
def states(draw: st.DrawFn, speed_over_escape: tuple[float, float]) -> tuple[
        np.ndarray, np.ndarray]:
    """A position 6 600 km .. 1e6 km from the centre and a velocity whose speed is the
    given fraction of the local escape speed, in a random direction not along r."""
    radius = draw(st.floats(6600 * KM, 1e6 * KM))
    fraction = draw(st.floats(*speed_over_escape))
    r_dir = np.array(draw(st.tuples(*[real(-1, 1)] * 3)))
    v_dir = np.array(draw(st.tuples(*[real(-1, 1)] * 3)))
    assume(np.linalg.norm(r_dir) > 0.1 and np.linalg.norm(v_dir) > 0.1)
    r_hat = r_dir / np.linalg.norm(r_dir)
    v_hat = v_dir / np.linalg.norm(v_dir)
    # Well away from rectilinear: as the angle between r and v closes, 1 + e cos nu -> 0
    # and classical elements lose about eps / angle^2 of the state (1.4e-9 at 1e-3 rad).
    assume(np.linalg.norm(np.cross(r_hat, v_hat)) > 0.02)
    speed = fraction * math.sqrt(2 * MU_EARTH / radius)
    return radius * r_hat, speed * v_hat


def _round_trip_error(r: np.ndarray, v: np.ndarray) -> float:
    r2, v2 = state_from_elements(elements_from_state(r, v, MU_EARTH))
    return max(np.linalg.norm(r2 - r) / np.linalg.norm(r),
               np.linalg.norm(v2 - v) / np.linalg.norm(v))


@FEW
@given(states((0.05, 0.999)))
def test_elliptic_state_survives_the_elements_round_trip(state: tuple) -> None:
    assert _round_trip_error(*state) <= ROUND_TRIP_REL


@FEW
@given(states((1.001, 5.0)))
def test_hyperbolic_state_survives_the_elements_round_trip(state: tuple) -> None:
    assert _round_trip_error(*state) <= ROUND_TRIP_REL


AWKWARD = {
    # name: (e, i); Vallado sec. 2.5 special cases, plus both sides of the parabola.
    "circular": (0.0, 0.7),
    "equatorial": (0.4, 0.0),
    "circular-equatorial": (0.0, 0.0),
    "retrograde-equatorial": (0.4, math.pi),
    "retrograde-circular-equatorial": (0.0, math.pi),
    "just-below-parabolic": (1 - 1e-9, 0.5),
    "below-parabolic": (1 - 1e-6, 0.5),
    "just-above-parabolic": (1 + 1e-9, 0.5),
    "above-parabolic": (1 + 1e-6, 0.5),
    "parabolic": (1.0, 0.5),
    "polar": (0.2, math.pi / 2),
}


@pytest.mark.parametrize("name", list(AWKWARD))
@FEW
@given(raan=unit_angle, argp=unit_angle, nu=real(-2.5, 2.5))
def test_awkward_orbits_survive_the_elements_round_trip(name: str, raan: float, argp: float,
                                                       nu: float) -> None:
    e, i = AWKWARD[name]
    el = Elements.from_periapsis(7000 * KM, e, i, raan, argp, nu, mu=MU_EARTH)
    r, v = state_from_elements(el)
    back = elements_from_state(r, v, MU_EARTH)
    for field in ("a", "e", "i", "raan", "argp", "nu"):
        assert not np.isnan(getattr(back, field)), field
    assert _round_trip_error(r, v) <= ROUND_TRIP_REL


def test_equatorial_and_circular_conventions_hold() -> None:
    # Vallado sec. 2.5 special cases, as the module documents them: equatorial -> raan = 0
    # and argp is the longitude of periapsis; circular -> argp = 0 and nu is the argument
    # of latitude; both -> nu is the true longitude.
    r, v = state_from_elements(Elements(8000 * KM, 0.3, 0.0, 1.0, 0.5, 0.2, mu=MU_EARTH))
    el = elements_from_state(r, v, MU_EARTH)
    assert el.raan == 0.0
    assert el.argp == pytest.approx(1.5, abs=1e-12)
    assert el.nu == pytest.approx(0.2, abs=1e-12)
    r, v = state_from_elements(Elements(8000 * KM, 0.0, 0.6, 1.0, 0.5, 0.2, mu=MU_EARTH))
    el = elements_from_state(r, v, MU_EARTH)
    assert (el.e, el.argp) == (0.0, 0.0)
    assert el.raan == pytest.approx(1.0, abs=1e-12)
    assert el.nu == pytest.approx(0.7, abs=1e-12)
    r, v = state_from_elements(Elements(8000 * KM, 0.0, 0.0, 1.0, 0.5, 0.2, mu=MU_EARTH))
    el = elements_from_state(r, v, MU_EARTH)
    assert (el.e, el.raan, el.argp) == (0.0, 0.0, 0.0)
    assert el.nu == pytest.approx(1.7, abs=1e-12)
    # Retrograde equatorial: i = 180 deg, the node convention as for i = 0.
    r, v = state_from_elements(Elements(8000 * KM, 0.3, math.pi, 0.0, 0.5, 0.2, mu=MU_EARTH))
    el = elements_from_state(r, v, MU_EARTH)
    assert el.i == pytest.approx(180 * DEG, abs=1e-12)
    assert el.raan == 0.0


@pytest.mark.parametrize(("e", "i"), [(0.0, 0.0), (0.0, 0.5), (0.5, 0.0), (0.0, math.pi)])
def test_no_nan_for_circular_or_equatorial_orbits(e: float, i: float) -> None:
    el = Elements(9000 * KM, e, i, mu=MU_EARTH)
    values = [el.p, el.periapsis, el.apoapsis, el.b, el.c, el.mean_motion, el.period,
              el.energy, el.h, el.speed_periapsis, el.speed_apoapsis,
              el.flight_path_angle_at(1.0), el.mean_anomaly, el.time_since_periapsis]
    assert not np.any(np.isnan(values))
    r, v = state_from_elements(el.after(1234.0))
    back = elements_from_state(r, v, MU_EARTH)
    assert not np.any(np.isnan([back.a, back.e, back.i, back.raan, back.argp, back.nu]))


# --- conservation under propagation ------------------------------------------------------


@FEW
@given(state=st.one_of(states((0.05, 0.99)), states((1.01, 4.0))),
       dt=real(-1e6, 1e6))
def test_propagation_conserves_energy_and_angular_momentum(state: tuple, dt: float) -> None:
    r0, v0 = state
    r1, v1 = propagate(r0, v0, MU_EARTH, dt)
    energy0 = 0.5 * v0 @ v0 - MU_EARTH / np.linalg.norm(r0)
    energy1 = 0.5 * v1 @ v1 - MU_EARTH / np.linalg.norm(r1)
    # The energy is a difference of two terms of size v^2: compare on that scale.
    scale = max(v0 @ v0, v1 @ v1, MU_EARTH / np.linalg.norm(r1))
    assert abs(energy1 - energy0) <= 1e-11 * scale
    h0, h1 = np.cross(r0, v0), np.cross(r1, v1)
    # h is a cross product: its rounding is on the scale |r| |v|, which far out on a
    # hyperbola is many times |h| (a flat angle between r and v).
    h_scale = max(np.linalg.norm(r0) * np.linalg.norm(v0), np.linalg.norm(r1) * np.linalg.norm(v1))
    assert np.linalg.norm(h1 - h0) <= 1e-11 * h_scale


# --- the second law as computation -----------------------------------------------------


conics = st.one_of(real(0.0, 0.95), st.just(1.0), real(1.05, 4.0))


@FEW
@given(e=conics, nu=real(-1.0, 1.0), t0=real(-2e4, 2e4),
       durations=st.lists(st.floats(1.0, 2e4), min_size=1, max_size=5))
def test_swept_area_is_h_over_two_times_elapsed_time(e: float, nu: float, t0: float,
                                                     durations: list[float]) -> None:
    # Kepler's second law: dA/dt = h/2 (Vallado sec. 1.3 and 2.2, from memory).
    el = Elements.from_periapsis(7000 * KM, e, nu=nu, mu=MU_EARTH)
    t = t0 + np.cumsum([0.0, *durations])
    areas = np.array([swept_area(el, t0, ti) for ti in t[1:]])
    expected = el.h / 2.0 * (t[1:] - t0)
    np.testing.assert_allclose(areas, expected, rtol=1e-9)


def test_swept_area_is_linear_in_time() -> None:
    # Equal steps of time give equal increments of area, on every conic; the increment
    # over a sum of intervals is the sum of the increments.
    for e in (0.0, 0.6, 0.97, 1.0, 1.4):
        el = Elements.from_periapsis(7000 * KM, e, nu=-0.3, mu=MU_EARTH)
        t = np.linspace(-3000.0, 9000.0, 13)
        areas = np.array([swept_area(el, t[0], ti) for ti in t])
        steps = np.diff(areas)
        np.testing.assert_allclose(steps, steps.mean(), rtol=1e-10)
        assert swept_area(el, t[2], t[7]) == pytest.approx(areas[7] - areas[2], rel=1e-10)


@pytest.mark.parametrize("e", [0.1, 0.5, 0.9, 0.99])
def test_sectors_of_equal_duration_have_equal_area_near_periapsis_and_apoapsis(
        e: float) -> None:
    # The geometry alone (sector_area between the true anomalies reached) agrees: a sector
    # of one-twentieth of a period centred on periapsis has the area of one centred on
    # apoapsis, though the one at periapsis is much wider in angle.
    el = Elements(20_000 * KM, e, mu=MU_EARTH)
    dt = el.period / 20.0
    at_peri = el.with_(nu=0.0)
    at_apo = el.with_(nu=math.pi)
    peri_from, peri_to = at_peri.after(-dt / 2).nu, at_peri.after(dt / 2).nu
    apo_from, apo_to = at_apo.after(-dt / 2).nu, at_apo.after(dt / 2).nu
    assert peri_from < 0.0 < peri_to  # the anomalies stay in the turn of their time
    assert apo_from < math.pi < apo_to
    peri = sector_area(el, peri_from, peri_to)
    apo = sector_area(el, apo_from, apo_to)
    assert peri == pytest.approx(apo, rel=1e-10)
    assert peri == pytest.approx(el.h / 2 * dt, rel=1e-10)
    assert peri_to - peri_from > apo_to - apo_from


def test_a_full_turn_sweeps_the_whole_ellipse() -> None:
    el = Elements(12_000 * KM, 0.45, nu=0.8, mu=MU_EARTH)
    assert swept_area(el, 0.0, el.period) == pytest.approx(math.pi * el.a * el.b, rel=1e-12)
    assert swept_area(el, 0.0, 3 * el.period) == pytest.approx(3 * math.pi * el.a * el.b,
                                                               rel=1e-12)
