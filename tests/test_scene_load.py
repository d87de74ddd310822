"""Loading scene files: every size and anomaly form, defaults, units, epochs, warnings.

Expected values come from outside the loader: the third law and vis-viva written out in
the test, 50-digit Kepler solutions from mpmath, the NSSDCA Planetary Fact Sheet and
time-scale facts (sources beside each value).
"""

from __future__ import annotations

import math

import mpmath
import pytest
from reference_values import AU, DAY, DEG, R_EARTH

from viewer.errors import UserInputError
from viewer.scene import load_scene_text

GM_SUN = 1.32712440018e20  # JPL DE value, m^3/s^2 (from memory)
GM_EARTH = 3.986004418e14  # IERS Conventions (2010) / WGS 84

HEAD = '[center]\ngm = "1.32712440018e20 m3/s2"\n'


def one_body(lines: str, head: str = HEAD):
    scene = load_scene_text(head + '[[body]]\nname = "X"\n' + lines)
    return scene, scene.bodies[0]


def problems(text: str) -> list[str]:
    with pytest.raises(UserInputError) as info:
        load_scene_text(text)
    return info.value.problems


# --- sizes ---------------------------------------------------------------------------


def test_a_with_units_is_converted_to_metres():
    _, b = one_body('a = "1.2 au"\ne = 0.21\n')
    assert b.elements.a == pytest.approx(1.2 * AU, rel=1e-15)
    assert b.elements.e == 0.21


def test_period_gives_a_by_the_third_law():
    # NSSDCA Planetary Fact Sheet, Earth: sidereal period 365.256 d, semimajor axis
    # 149.598e6 km (from memory). The third law with the Sun's GM alone gives a within
    # the fact sheet's rounding and Earth's own mass (3e-6 of the Sun's).
    _, b = one_body('period = "365.256 d"\ne = 0.0167\n')
    assert b.elements.a == pytest.approx(149.598e9, rel=1e-4)
    # and back: 2 pi sqrt(a^3 / GM) is the period we gave
    a = b.elements.a
    assert 2 * math.pi * math.sqrt(a**3 / GM_SUN) == pytest.approx(365.256 * DAY, rel=1e-12)


def test_periapsis_and_apoapsis_give_a_and_e():
    # NSSDCA fact sheet, Earth: perihelion 147.095e6 km, aphelion 152.100e6 km,
    # eccentricity 0.0167 (from memory).
    _, b = one_body('periapsis = "147.095e6 km"\napoapsis = "152.100e6 km"\n')
    assert b.elements.a == pytest.approx((147.095e9 + 152.100e9) / 2, rel=1e-15)
    assert b.elements.e == pytest.approx(0.0167, abs=5e-5)


def test_periapsis_and_e_give_an_ellipse():
    _, b = one_body('periapsis = "0.9 au"\ne = 0.7\n')
    assert b.elements.a == pytest.approx(0.9 * AU / 0.3, rel=1e-14)


def test_periapsis_and_e_above_one_give_a_hyperbola_with_negative_a():
    # A departure with v_inf^2 = mu (e - 1) / rp (vis-viva at infinity, Curtis sec. 2.9)
    scene, b = one_body('periapsis = "6678 km"\ne = 1.5\n',
                        head='[center]\npreset = "earth"\n')
    assert b.elements.a == pytest.approx(-6678e3 / 0.5, rel=1e-14)
    assert b.limit_radius_m == pytest.approx(5 * 6678e3)
    assert any("escape" in w for w in b.warnings)


def test_negative_a_with_e_above_one_is_a_hyperbola():
    _, b = one_body('a = "-20000 km"\ne = 1.2\n', head='[center]\npreset = "earth"\n')
    assert b.elements.periapsis == pytest.approx(20000e3 * 0.2, rel=1e-14)


def test_parabola_from_periapsis_and_e_of_one():
    scene, b = one_body('periapsis = "0.5 au"\ne = 1\n')
    assert math.isinf(b.elements.a)
    assert b.elements.periapsis == pytest.approx(0.5 * AU, rel=1e-15)
    # speed at periapsis of a parabola is the escape speed sqrt(2 mu / r) (vis-viva, a = inf)
    assert b.elements.speed_periapsis == pytest.approx(math.sqrt(2 * GM_SUN / (0.5 * AU)),
                                                        rel=1e-14)


def test_bare_numbers_take_the_file_units():
    text = ('[scene]\nunits = { length = "km", time = "h", angle = "rad" }\n' + HEAD
            + '[[body]]\nname = "X"\na = 7000\ni = 0.5\n'
            + '[[body]]\nname = "Y"\nperiod = 2\n')
    scene = load_scene_text(text)
    assert scene.bodies[0].elements.a == 7000e3
    assert scene.bodies[0].elements.i == 0.5
    assert scene.bodies[1].elements.period == pytest.approx(7200.0, rel=1e-12)
    assert (scene.length_unit, scene.time_unit, scene.angle_unit) == ("km", "h", "rad")


def test_default_units_are_au_days_and_degrees():
    _, b = one_body("a = 2\ni = 30\n")
    assert b.elements.a == 2 * AU
    assert b.elements.i == pytest.approx(30 * DEG, rel=1e-15)


# --- anomalies -----------------------------------------------------------------------


def _kepler_nu_mpmath(M: float, e: float) -> float:
    """True anomaly from mean anomaly by a 50-digit solve of E - e sin E = M."""
    mpmath.mp.dps = 50
    E = mpmath.findroot(lambda x: x - e * mpmath.sin(x) - M, M + e * mpmath.sin(M))
    nu = 2 * mpmath.atan(mpmath.sqrt((1 + e) / (1 - e)) * mpmath.tan(E / 2))
    return float(nu % (2 * mpmath.pi))


def test_mean_anomaly_becomes_the_true_anomaly_of_kepler_equation():
    _, b = one_body('a = "1 au"\ne = 0.6\nM = "70 deg"\n')
    assert b.elements.nu == pytest.approx(_kepler_nu_mpmath(70 * DEG, 0.6), abs=1e-12)


def test_true_anomaly_is_taken_as_given():
    _, b = one_body('a = "1 au"\ne = 0.6\nnu = "200 deg"\n')
    assert b.elements.nu == pytest.approx(200 * DEG, abs=1e-15)


def test_time_of_periapsis_gives_the_mean_anomaly():
    # 30 days after periapsis: M = n * 30 d with n = sqrt(GM / a^3)
    _, b = one_body('a = "1.5 au"\ne = 0.3\ntp = "-30 d"\n')
    n = math.sqrt(GM_SUN / (1.5 * AU) ** 3)
    assert b.elements.nu == pytest.approx(_kepler_nu_mpmath(n * 30 * DAY, 0.3), abs=1e-11)


def test_time_of_periapsis_as_an_epoch():
    text = ('[scene]\nepoch = "2030-01-11T00:00:00 TDB"\n' + HEAD
            + '[[body]]\nname = "X"\na = "1.5 au"\ne = 0.3\ntp = "2030-01-01T00:00:00 TDB"\n')
    b = load_scene_text(text).bodies[0]
    n = math.sqrt(GM_SUN / (1.5 * AU) ** 3)
    assert b.elements.nu == pytest.approx(_kepler_nu_mpmath(n * 10 * DAY, 0.3), abs=1e-11)


def test_hyperbolic_true_anomaly_must_lie_inside_the_asymptotes():
    # asymptote at acos(-1/e): 120 deg for e = 2 (trigonometry of the conic)
    text = HEAD + '[[body]]\nname = "X"\nperiapsis = "1 au"\ne = 2\nnu = "125 deg"\n'
    (msg,) = problems(text)
    assert "body[0].nu" in msg and "120 deg" in msg
    _, b = one_body('periapsis = "1 au"\ne = 2\nnu = "-115 deg"\n')
    assert b.elements.nu == pytest.approx(-115 * DEG)


# --- epochs and frames ------------------------------------------------------------------


def test_default_scene_epoch_is_j2000_tdb():
    scene, _ = one_body('a = "1 au"\n')
    assert scene.epoch.iso() == "2000-01-01T12:00:00 TDB"
    assert scene.frame == "ECLIPJ2000"


def test_body_epoch_is_an_offset_from_the_scene_epoch():
    text = ('[scene]\nepoch = "2030-01-01T00:00:00 TDB"\nframe = "EME2000"\n' + HEAD
            + '[[body]]\nname = "X"\na = "1 au"\nepoch = "2030-01-11T00:00:00 TDB"\n')
    scene = load_scene_text(text)
    assert scene.bodies[0].epoch_offset_s == pytest.approx(10 * DAY, abs=1e-6)
    assert scene.frame == "EME2000"


def test_utc_body_epoch_differs_from_tdb_by_the_leap_seconds():
    # TT - UTC = 32.184 s + 37 leap seconds since 2017-01-01 (IERS Bulletin C, from
    # memory); TDB - TT stays within 2 ms (IAU 2006 Resolution B3).
    text = ('[scene]\nepoch = "2030-01-01T00:00:00 TDB"\n' + HEAD
            + '[[body]]\nname = "X"\na = "1 au"\nepoch = "2030-01-01T00:00:00 UTC"\n')
    offset = load_scene_text(text).bodies[0].epoch_offset_s
    assert offset == pytest.approx(69.184, abs=0.002)


# --- centre, defaults and warnings -------------------------------------------------------


def test_earth_preset_takes_the_catalogue_gm_and_radius():
    scene, _ = one_body('a = "7000 km"\n', head='[center]\npreset = "Earth"\n')
    assert scene.center.gm_m3_s2 == GM_EARTH
    assert scene.center.radius_m == R_EARTH
    assert scene.center.name == "Earth"


def test_show_merges_with_the_defaults():
    _, b = one_body('a = "1 au"\nshow = { foci = true, label = false }\n')
    s = b.show
    assert (s.orbit, s.marker, s.label, s.foci, s.axes, s.apsides, s.nodes, s.velocity,
            s.sweep) == (True, True, False, True, False, False, False, False, False)


def test_sweep_defaults_to_sectors_that_tile_one_period():
    _, b = one_body('a = "1 au"\ne = 0.5\nsweep = { count = 4 }\n')
    assert b.show.sweep
    assert b.sweep.count * b.sweep.interval_s == pytest.approx(
        2 * math.pi * math.sqrt(AU**3 / GM_SUN), rel=1e-12)


def test_sweep_start_may_be_negative():
    _, b = one_body('a = "1 au"\nsweep = { start = "-15 d", interval = "30 d", count = 2 }\n')
    assert b.sweep.bounds_s() == [(-15 * DAY, 15 * DAY), (15 * DAY, 45 * DAY)]


def test_suspicious_values_are_warnings_not_errors():
    text = ('[center]\npreset = "earth"\n'
            '[[body]]\nname = "Low"\nperiapsis = "6000 km"\napoapsis = "7000 km"\n'
            '[[body]]\nname = "Long"\na = "60000 km"\ne = 0.99\n'
            '[[body]]\nname = "Back"\na = "7000 km"\ni = "120 deg"\n')
    scene = load_scene_text(text)
    low, long_, back = scene.bodies
    assert any("inside the central body" in w for w in low.warnings)
    assert any("nearly parabolic" in w for w in long_.warnings)
    assert any("retrograde" in w for w in back.warnings)
    assert any(w.startswith('body[0] ("Low")') for w in scene.warnings)
    assert len(scene.warnings) == sum(len(b.warnings) for b in scene.bodies)


def test_camera_fits_every_orbit_when_no_width_is_given():
    text = HEAD + '[[body]]\nname = "X"\na = "2 au"\ne = 0.5\n[render]\nsize = [1000, 1000]\n'
    scene = load_scene_text(text)
    # apoapsis 3 au: the square image spans it with a 10 % margin on each side
    assert scene.camera.width_m == pytest.approx(2.2 * 3 * AU)


def test_camera_angles_and_point_target():
    text = HEAD + ('[[body]]\nname = "X"\na = "1 au"\n[camera]\nelevation = "30 deg"\n'
                   'azimuth = "-90 deg"\ntarget = ["1 au", 0, "-1000 km"]\n')
    cam = load_scene_text(text).camera
    assert cam.look == "angles"
    assert cam.elevation_rad == pytest.approx(30 * DEG)
    assert cam.azimuth_rad == pytest.approx(270 * DEG)
    assert cam.target == (AU, 0.0, -1e6)


def test_timeline_duration_takes_seconds_and_rate_scene_time_per_second():
    text = HEAD + '[timeline]\nstart = "-2 d"\nrate = 3\nfps = 24\nduration = 10\n'
    tl = load_scene_text(text).timeline
    assert (tl.start_s, tl.rate, tl.fps, tl.duration_s) == (-2 * DAY, 3 * DAY, 24.0, 10.0)
    assert tl.frame_count == 240


def test_all_problems_of_a_file_are_reported_together():
    text = ('[center]\npreset = "sun"\n'
            '[[body]]\nname = "A"\na = "1 au"\ne = 1.5\n'
            '[[body]]\nname = "B"\na = "1 au"\nperiod = "1 yr"\n'
            '[[body]]\nname = "C"\nperiapsis = "1 au"\ncolour = "#fff"\n')
    msgs = problems(text)
    assert len(msgs) == 4, msgs
    assert msgs[0].startswith('body[0].e ("A", line 6)')
    assert msgs[1].startswith('body[1].period ("B", line 10)')
    assert any('did you mean "color"' in m and "line 14" in m for m in msgs)
    assert any("periapsis needs e or apoapsis" in m for m in msgs)
