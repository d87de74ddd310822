"""The plot panel's data and the window clock's jumps, checked against the two-body laws."""

from __future__ import annotations

import math

import numpy as np
import pytest

from viewer.gui.clock import Clock, next_apsis_s
from viewer.gui.plots import orbit_profile, square_cube, third_law
from viewer.orbit import AU_M, DAY_S, Elements
from viewer.scene.model import Body, Center, Scene
from viewer.units import parse_epoch

GM_SUN = 1.32712440018e20  # IERS Conventions (2010) / DE405 heliocentric GM, m^3/s^2


def sun_scene(*bodies: Body) -> Scene:
    return Scene(title="t", epoch=parse_epoch("2030-01-01T00:00:00 TDB"), frame="ECLIPJ2000",
                 center=Center(name="Sun", gm_m3_s2=GM_SUN, radius_m=6.957e8), bodies=bodies)


def body(name: str, a_au: float, e: float, M: float = 0.0, offset_s: float = 0.0) -> Body:
    el = Elements(a=a_au * AU_M, e=e, mu=GM_SUN).at_mean_anomaly(M)
    return Body(name=name, elements=el, epoch_offset_s=offset_s)


def test_profile_spans_one_period_between_periapsis_and_apoapsis() -> None:
    b = body("Tarn", 1.2, 0.21, M=2.0, offset_s=3 * DAY_S)
    now = 100 * DAY_S
    p = orbit_profile(b, now, samples=2001)
    assert p is not None
    el = b.elements
    assert p.t_s[-1] - p.t_s[0] == pytest.approx(float(el.period), rel=1e-12)
    assert p.t_s[0] <= now <= p.t_s[-1]
    # It starts at periapsis: the first sample is the closest point.
    assert p.distance_m[0] == pytest.approx(float(el.periapsis), rel=1e-10)
    assert p.distance_m.max() == pytest.approx(float(el.apoapsis), rel=1e-6)
    # vis-viva at every sample, v^2 = mu (2/r - 1/a)
    a = float(el.a)
    np.testing.assert_allclose(p.speed_m_s, np.sqrt(GM_SUN * (2 / p.distance_m - 1 / a)),
                               rtol=1e-12)


def test_profile_of_an_open_orbit_is_none() -> None:
    b = Body(name="Comet", elements=Elements.from_periapsis(AU_M, 1.3, mu=GM_SUN))
    assert orbit_profile(b, 0.0) is None


def test_third_law_points_lie_on_a_line_of_slope_three_halves() -> None:
    scene = sun_scene(body("A", 0.39, 0.2), body("B", 1.0, 0.017), body("C", 5.2, 0.05),
                      body("D", 30.1, 0.01))
    law = third_law(scene)
    slope, _ = np.polyfit(np.log(law.a_m), np.log(law.period_s), 1)
    assert slope == pytest.approx(1.5, abs=1e-12)
    line_slope, _ = np.polyfit(np.log(law.line_a_m), np.log(law.line_period_s), 1)
    assert line_slope == pytest.approx(1.5, abs=1e-12)
    assert law.names == ("A", "B", "C", "D")


def test_third_law_at_one_au_gives_the_gaussian_year() -> None:
    # The Gaussian year, 365.2568983 d, is the period at a = 1 au for the Gaussian
    # gravitational constant k = 0.01720209895 (IAU 1976 system; common practice); the
    # IERS GM of the Sun gives it to about 1e-7.
    law = third_law(sun_scene(body("Earth-like", 1.0, 0.0)))
    assert law.period_s[0] / DAY_S == pytest.approx(365.2568983, rel=2e-7)


def test_next_periapsis_and_apoapsis_are_half_a_period_apart() -> None:
    b = body("Tarn", 1.2, 0.21, M=1.0, offset_s=5 * DAY_S)
    T = float(b.elements.period)
    t = 37 * DAY_S
    tp = next_apsis_s(b, t, "periapsis")
    ta = next_apsis_s(b, t, "apoapsis")
    assert tp is not None and ta is not None
    assert t < tp <= t + T and t < ta <= t + T
    assert abs(abs(tp - ta) - T / 2) < 1e-6 * T
    assert math.remainder(float(b.elements_at(tp).nu), 2 * math.pi) == pytest.approx(
        0.0, abs=1e-7)
    assert float(b.elements_at(ta).nu) % (2 * math.pi) == pytest.approx(math.pi, abs=1e-7)


def test_an_escaping_body_has_no_apoapsis_ahead() -> None:
    b = Body(name="Comet", elements=Elements.from_periapsis(AU_M, 1.3, nu=-1.0, mu=GM_SUN))
    assert next_apsis_s(b, 0.0, "apoapsis") is None
    tp = next_apsis_s(b, 0.0, "periapsis")
    assert tp is not None and tp > 0
    assert float(b.elements_at(tp).nu) == pytest.approx(0.0, abs=1e-9)


def test_the_clock_moves_only_while_playing_and_steps_by_timeline_frames() -> None:
    c = Clock(t_s=0.0, rate=10 * DAY_S, playing=False, fps=30.0)
    assert not c.advance(0.1) and c.t_s == 0.0
    c.playing = True
    assert c.advance(0.1) and c.t_s == pytest.approx(DAY_S)
    c.step(3)
    assert c.t_s == pytest.approx(DAY_S + 1.0 * DAY_S)


def test_neighbouring_names_on_the_third_law_plot_alternate_above_and_below() -> None:
    from viewer.gui.panels.plots_window import label_offsets

    a = np.array([1.0, 1.05, 1.1, 5.0, 30.0]) * 1.496e11
    span = np.array([0.3, 40.0]) * 1.496e11
    dy = label_offsets(a, span)
    assert dy[0] < 0 and dy[1] > 0 and dy[2] < 0  # three crowded names: up, down, up
    assert dy[3] < 0 and dy[4] < 0  # names far apart all sit above their points


def test_square_cube_is_a_line_through_the_origin_with_the_gaussian_slope() -> None:
    # The Gaussian gravitational constant k = 0.01720209895 rad/d (IAU 1976, from
    # memory) gives GM_sun = k^2 au^3/d^2, so 4 pi^2 / GM = (2 pi / k)^2 d^2/au^3: in
    # Julian years (365.25 d) 1.0000378. Our GM_SUN (IERS 2010) agrees to 1e-8.
    k = 0.01720209895
    gaussian = (2 * math.pi / k / 365.25) ** 2
    sc = sun_scene(body("Earthlike", 1.0, 0.0167), body("Far", 30.0, 0.01),
                   body("Open", 2.0, 1.3))
    sq = square_cube(sc)
    assert (sq.length_unit, sq.time_unit) == ("au", "yr")
    assert sq.slope == pytest.approx(gaussian, rel=1e-7)
    assert sq.names == ("Earthlike", "Far")  # closed orbits only
    # Each body on the line: T^2 = slope * a^3 (the third law, exactly for two bodies).
    assert sq.t2 == pytest.approx(sq.slope * sq.a3, rel=1e-12)
    assert sq.a3[0] == pytest.approx(1.0) and sq.a3[1] == pytest.approx(27000.0)


def test_square_cube_counts_small_orbits_in_km_and_hours() -> None:
    gm_earth = 3.986004418e14  # IERS Conventions (2010), m^3/s^2
    leo = Body(name="LEO", elements=Elements(a=6778e3, e=0.001, mu=gm_earth))
    sc = Scene(title="t", epoch=parse_epoch("2030-01-01T00:00:00 TDB"), frame="ECLIPJ2000",
               center=Center(name="Earth", gm_m3_s2=gm_earth, radius_m=6.378e6),
               bodies=(leo,))
    sq = square_cube(sc)
    assert (sq.length_unit, sq.time_unit) == ("1000 km", "h")
    # A 6778 km orbit takes about 92.6 min (common practice, no source): T^2 in h^2.
    assert math.sqrt(sq.t2[0]) * 60 == pytest.approx(92.56, abs=0.05)
