"""Planets of the real solar system: the third law and vis-viva against the NSSDCA
Planetary Fact Sheet, and the facts of the trade (Kepler's laws as practitioners state
them)."""

from __future__ import annotations

import numpy as np
import pytest
from reference_values import DAY, KM, KM_S, MILLION_KM, NSSDCA

from viewer.orbit import AU_M, CATALOGUE, Elements, sector_area, swept_area

GM_SUN = CATALOGUE["sun"].gm_m3_s2
#: The fact sheet prints 3-4 significant figures; its speeds and periods are the real
#: planet's (perturbed, and with the planet's own mass), so 0.5 % is the honest match.
FACT_SHEET_REL = 5e-3


def _planet(name: str) -> Elements:
    # NASA NSSDCA Planetary Fact Sheet (D. R. Williams), from memory: a = (q + Q) / 2,
    # e = (Q - q) / (Q + q) from perihelion q and aphelion Q.
    row = NSSDCA[name]
    q, Q = row["perihelion"] * MILLION_KM, row["aphelion"] * MILLION_KM
    return Elements((q + Q) / 2.0, (Q - q) / (Q + q), mu=GM_SUN)


@pytest.mark.parametrize("name", list(NSSDCA))
def test_third_law_period_matches_nssdca_fact_sheet(name: str) -> None:
    # NSSDCA Planetary Fact Sheet, orbital period (days), from memory.
    assert _planet(name).period == pytest.approx(NSSDCA[name]["period_d"] * DAY,
                                                 rel=FACT_SHEET_REL)


@pytest.mark.parametrize("name", list(NSSDCA))
def test_vis_viva_speeds_match_nssdca_fact_sheet(name: str) -> None:
    # NSSDCA Planetary Fact Sheet, max. and min. orbital velocity (km/s), from memory.
    el = _planet(name)
    assert el.speed_periapsis == pytest.approx(NSSDCA[name]["v_max"] * KM_S, rel=FACT_SHEET_REL)
    assert el.speed_apoapsis == pytest.approx(NSSDCA[name]["v_min"] * KM_S, rel=FACT_SHEET_REL)


@pytest.mark.parametrize("name", list(NSSDCA))
def test_fact_sheet_periapsis_and_apoapsis_come_back(name: str) -> None:
    # The elements built from q and Q must give q and Q back (NSSDCA, from memory).
    el = _planet(name)
    assert el.periapsis == pytest.approx(NSSDCA[name]["perihelion"] * MILLION_KM, rel=1e-14)
    assert el.apoapsis == pytest.approx(NSSDCA[name]["aphelion"] * MILLION_KM, rel=1e-14)


def test_earth_and_mercury_share_t_squared_over_a_cubed() -> None:
    # Common practice, no source: Earth ~365 d at ~150 million km, Mercury ~88 d at
    # ~58 million km; T^2/a^3 is the same for both within the rounding (under 1 %).
    earth = 365.0 * DAY, 150e6 * KM
    mercury = 88.0 * DAY, 58e6 * KM
    k_earth = earth[0] ** 2 / earth[1] ** 3
    k_mercury = mercury[0] ** 2 / mercury[1] ** 3
    assert k_mercury == pytest.approx(k_earth, rel=0.01)
    # ... and the code's third law gives the same constant, 4 pi^2 / GM_sun.
    el = Elements(1.0 * AU_M, 0.0, mu=GM_SUN)
    assert el.period**2 / el.a**3 == pytest.approx(k_earth, rel=0.01)
    assert el.period**2 / el.a**3 == pytest.approx(4 * np.pi**2 / GM_SUN, rel=1e-14)


@pytest.mark.parametrize("e", [0.0167, 0.0934, 0.2056, 0.6, 0.97])
def test_a_planet_is_fastest_at_periapsis_and_slowest_at_apoapsis(e: float) -> None:
    # Common practice, no source (Kepler's second law as usually stated).
    el = Elements(1.5 * AU_M, e, mu=GM_SUN)
    nu = np.linspace(-np.pi, np.pi, 2001)
    speeds = np.asarray(el.speed_at(nu))
    assert np.argmax(speeds) == np.argmin(np.abs(nu))
    assert np.argmin(speeds) in (0, len(nu) - 1)
    assert speeds.max() == pytest.approx(el.speed_periapsis, rel=1e-15)
    assert speeds.min() == pytest.approx(el.speed_apoapsis, rel=1e-12)
    assert np.all(speeds <= el.speed_periapsis * (1 + 1e-15))
    assert np.all(speeds >= el.speed_apoapsis * (1 - 1e-15))


def test_equal_times_sweep_equal_areas_for_mercury() -> None:
    # Common practice, no source: equal times sweep equal areas. Twelve equal slices of
    # Mercury's year (NSSDCA q, Q, from memory) from periapsis round the orbit.
    el = _planet("mercury")
    t = np.linspace(0.0, el.period, 13)
    areas = np.array([swept_area(el, t0, t1) for t0, t1 in zip(t[:-1], t[1:], strict=True)])
    assert areas == pytest.approx(np.full(12, areas.mean()), rel=1e-12)
    # The twelve slices tile the ellipse: pi a b in all.
    assert areas.sum() == pytest.approx(np.pi * el.a * el.b, rel=1e-12)
    # ... and the sectors are not equal in angle: fast near periapsis, slow at apoapsis.
    nu = np.array([el.after(ti).nu for ti in t[:-1]])
    sweep = np.diff(np.unwrap(np.append(nu, 2 * np.pi)))
    assert sweep[0] > 1.5 * sweep[6]
    assert sector_area(el, nu[0], nu[1]) == pytest.approx(areas[0], rel=1e-12)


def test_the_sun_sits_at_a_focus_not_the_centre() -> None:
    # Common practice, no source: a planet's orbit is nearly a circle, but the Sun sits at
    # a focus, |a| e from the centre (Earth: about 2.5 million km).
    el = _planet("earth")
    assert el.c == pytest.approx(el.a * el.e, rel=1e-15)
    assert 2.0e6 * KM < el.c < 3.0e6 * KM
    assert el.b / el.a > 0.9998
    assert el.apoapsis - el.a == pytest.approx(el.c, rel=1e-12)
