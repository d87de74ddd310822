"""Bodies that follow DE421 (viewer.ephemeris), checked by a second, independent route:
skyfield reading the SPICE kernel de421.bsp that the skyfield-data package ships
(REFERENCES.md), at many dates over 1900-2050; and the scene, check and ephemeris command
built on it."""

from __future__ import annotations

import json
import math
import os
from pathlib import Path

import numpy as np
import pytest

from viewer.cli import main
from viewer.ephemeris import SPAN_JD, Kernel, ecliptic_rotation
from viewer.orbit import state_from_elements
from viewer.scene import load_scene, load_scene_text
from viewer.units import parse_epoch

skyfield_api = pytest.importorskip("skyfield.api")
skyfield_data = pytest.importorskip("skyfield_data")
from skyfield.framelib import ecliptic_J2000_frame  # noqa: E402

SCENES = Path(__file__).resolve().parents[1] / "scenes"
KM = 1e3
#: Our target names -> the SPICE kernel's (planets from Mars out are system barycentres).
SPICE = {"mercury": "mercury", "venus": "venus", "earth": "earth", "moon": "moon",
         "mars": "mars barycenter", "jupiter": "jupiter barycenter",
         "saturn": "saturn barycenter", "uranus": "uranus barycenter",
         "neptune": "neptune barycenter", "pluto": "pluto barycenter"}


@pytest.fixture(scope="module")
def bsp():
    path = os.path.join(os.path.dirname(skyfield_data.__file__), "data", "de421.bsp")
    kernel = skyfield_api.load_file(path)
    yield kernel
    kernel.close()


@pytest.fixture(scope="module")
def ts():
    return skyfield_api.load.timescale(builtin=True)


@pytest.fixture(scope="module")
def kernel():
    return Kernel("DE421")


def _dates(n: int) -> np.ndarray:
    rng = np.random.default_rng(421)
    return np.sort(rng.uniform(SPAN_JD[0], SPAN_JD[1], n))


@pytest.mark.parametrize("target", list(SPICE))
def test_heliocentric_positions_agree_with_skyfield_within_10_km(bsp, ts, kernel, target):
    jd = _dates(400)
    t = ts.tdb_jd(jd)
    ref = (bsp[SPICE[target]].at(t).position.km - bsp["sun"].at(t).position.km).T * KM
    r, v = kernel.state(target, jd, 0.0)
    rs, vs = kernel.state("sun", jd, 0.0)
    err = np.linalg.norm(r - rs - ref, axis=1)
    assert err.max() < 10e3, (target, err.max())  # the bound: 10 km
    ref_v = (bsp[SPICE[target]].at(t).velocity.km_per_s
             - bsp["sun"].at(t).velocity.km_per_s).T * KM
    assert np.abs(v - vs - ref_v).max() < 1e-3  # 1 mm/s


def test_ecliptic_frame_is_spices_as_skyfield_has_it():
    # skyfield's ecliptic_J2000_frame is SPICE's ECLIPJ2000 (IAU 1976 obliquity 84381.448").
    np.testing.assert_allclose(ecliptic_rotation(), ecliptic_J2000_frame.rotation_at(None),
                               atol=1e-15)


def test_the_solar_system_scene_written_by_perifocal_ephemeris_agrees_with_de421(
        tmp_path, bsp, ts, capsys):
    # The check: the bundled scene's positions, as `perifocal ephemeris` writes them,
    # agree with DE421 (read by skyfield) to 10 km over the ephemeris' whole span.
    scene = load_scene(SCENES / "solar-system.toml")
    assert [b.name for b in scene.bodies] == ["Mercury", "Venus", "Earth", "Mars", "Jupiter",
                                             "Saturn", "Uranus", "Neptune"]
    assert scene.epoch.iso().startswith("202")
    for body in scene.bodies:
        out = tmp_path / f"{body.name}.oem"
        assert main(["ephemeris", str(SCENES / "solar-system.toml"), "--body", body.name,
                     "--start", "1900-01-01T00:00:00 TDB", "--stop", "2050-12-31T00:00:00 TDB",
                     "--step", "173 d", "-o", str(out)]) == 0
        rows = [line.split() for line in out.read_text().splitlines()
                if line[:1].isdigit() and "T" in line.split()[0]]
        assert len(rows) > 300
        jd = np.array([ts.tdb(*_ymd(r[0])).tdb for r in rows])
        t = ts.tdb_jd(jd)
        ref = (bsp[SPICE[body.name.lower()]].at(t).frame_xyz(ecliptic_J2000_frame).km
               - bsp["sun"].at(t).frame_xyz(ecliptic_J2000_frame).km).T
        ours = np.array([[float(x) for x in r[1:4]] for r in rows])
        assert np.linalg.norm(ours - ref, axis=1).max() < 10.0, body.name  # km
    capsys.readouterr()


def _ymd(text: str) -> tuple[int, int, int, int, int, float]:
    d, t = text.split("T")
    y, mo, dd = (int(x) for x in d.split("-"))
    h, mi, s = t.split(":")
    return y, mo, dd, int(h), int(mi), float(s)


def test_a_body_is_drawn_at_its_ephemeris_position_on_its_osculating_conic():
    scene = load_scene(SCENES / "solar-system.toml")
    mars = scene.body("Mars")
    for t_s in (0.0, 123.4 * 86400.0, -3000.0 * 86400.0):
        r_eph, v_eph = mars.track.state(t_s)
        r, v = state_from_elements(mars.elements_at(t_s))
        np.testing.assert_allclose(r, r_eph, atol=1.0)  # 1 m
        drawn = scene.osculating(t_s).body("Mars")
        r_d, v_d = state_from_elements(drawn.elements_at(t_s))
        np.testing.assert_allclose(r_d, r_eph, atol=1.0)
        np.testing.assert_allclose(v_d, v_eph, atol=1e-6)
        assert float(drawn.elements.mu) == pytest.approx(
            scene.center.gm_m3_s2 + mars.gm_m3_s2)


def test_jupiter_period_uses_the_sum_of_gms():
    # Jupiter's sidereal period 4332.59 d (NSSDCA planetary fact sheet, from memory). With
    # Standish's mean a = 5.20288700 au (the mean-element scene) about the Sun's GM alone
    # the period is about 2.2 d longer; with gm = DE421's Jupiter system GM it lands within
    # 0.5 d (the table's a is a 1800-2050 fit, not the fact sheet's).
    text = """[center]\npreset = "sun"\n[[body]]\nname = "J"\na = "5.20288700 au"\n{gm}"""
    alone = load_scene_text(text.format(gm="")).body("J").elements.period / 86400.0
    gm = Kernel("DE421").gm_m3_s2("jupiter")
    both = load_scene_text(text.format(gm=f'gm = "{gm!r} m3/s2"')).body("J")
    assert abs(alone - 4332.59) > 1.5
    assert both.elements.period / 86400.0 == pytest.approx(4332.59, abs=0.5)
    assert gm == pytest.approx(1.26712764e17, rel=1e-6)  # DE421 GM5, system (from memory)


def test_check_says_which_bodies_follow_the_ephemeris_and_its_span(capsys):
    assert main(["check", str(SCENES / "solar-system.toml"), "--json"]) == 0
    out = json.loads(capsys.readouterr().out)
    for b in out["bodies"]:
        assert b["ephemeris"]["source"] == "DE421"
        assert "1900-01-01" in b["ephemeris"]["span"] and "2050" in b["ephemeris"]["span"]
    assert main(["check", str(SCENES / "solar-system.toml")]) == 0
    assert "follows              DE421" in capsys.readouterr().out


BAD = {
    "outside the span": ('epoch = "2060-01-01T00:00:00 TDB"', 'name = "Mars"', "1900-01-01"),
    "unknown body": ("", 'name = "Vulcan"', "ephemeris_body"),
    "orbit keys too": ("", 'name = "Mars"\na = "1 au"', "body[0].a"),
    "wrong frame": ('frame = "ITRF"', 'name = "Mars"', "scene.frame"),
}


@pytest.mark.parametrize("case", list(BAD))
def test_bad_ephemeris_bodies_are_one_clear_line_and_exit_2(tmp_path, capsys, case):
    scene_line, body, expected = BAD[case]
    path = tmp_path / "bad.toml"
    path.write_text(f"[scene]\n{scene_line}\n[center]\npreset = \"sun\"\n"
                    f"[[body]]\n{body}\nephemeris = \"DE421\"\n")
    assert main(["check", str(path)]) == 2
    err = capsys.readouterr().err.strip().splitlines()
    assert len(err) == 2 and expected in err[1], err


def test_ephemeris_outside_the_span_says_the_span(tmp_path, capsys):
    assert main(["ephemeris", str(SCENES / "solar-system.toml"), "--body", "Mars", "--start",
                 "2050-06-01", "--stop", "2052-01-01", "--step", "10 d",
                 "-o", str(tmp_path / "m.oem")]) == 2
    assert "1900-01-01 to 2050-12-31" in capsys.readouterr().err
    assert not (tmp_path / "m.oem").exists()


def test_a_chosen_osculating_epoch_fixes_the_drawn_conic(tmp_path):
    text = ('[scene]\nepoch = "2026-01-01T00:00:00 TDB"\n[center]\npreset = "sun"\n'
            '[[body]]\nname = "Mars"\nephemeris = "DE421"\n{extra}\n')
    fixed = load_scene_text(text.format(extra='osculating_epoch = "2030-01-01T00:00:00 TDB"'))
    mars = fixed.body("Mars")
    t_2030 = 1461 * 86400.0  # 2026-01-01 to 2030-01-01: 4 years with one leap day
    expected = mars.track.elements_at(t_2030)
    for t_s in (0.0, 500 * 86400.0):
        drawn = fixed.osculating(t_s).body("Mars").elements
        assert float(drawn.a) == pytest.approx(float(expected.a), rel=1e-12)
        assert float(drawn.argp) == pytest.approx(float(expected.argp), abs=1e-12)
        # The marker still follows the ephemeris at the displayed time.
        r, _ = state_from_elements(fixed.body("Mars").elements_at(t_s))
        np.testing.assert_allclose(r, mars.track.state(t_s)[0], atol=1.0)
    from viewer.scene import dump_scene

    again = load_scene_text(dump_scene(fixed))
    assert again.body("Mars").track.osculate_s == pytest.approx(t_2030, abs=1e-3)
    with pytest.raises(Exception, match="osculating_epoch"):
        load_scene_text('[center]\npreset = "sun"\n[[body]]\nname = "X"\na = "1 au"\n'
                        'osculating_epoch = "10 d"\n')


def test_moving_the_scene_epoch_keeps_ephemeris_bodies_and_flights_at_their_dates():
    from viewer.gui.editor import Editor

    scene = load_scene(SCENES / "solar-system.toml")
    ed = Editor(scene)
    t_before = 100 * 86400.0
    r_before = scene.body("Mars").track.state(t_before)[0]
    assert ed.set_epoch("2026-03-01T00:00:00 TDB")
    shift = 59 * 86400.0  # 2026-01-01 to 2026-03-01
    moved = ed.scene.body("Mars")
    np.testing.assert_allclose(moved.track.state(t_before - shift)[0], r_before, atol=1e-3)
    body = scene.bodies[0].with_epoch_moved(0.0)
    assert body == scene.bodies[0]


def test_nothing_is_fetched_at_run_time(monkeypatch, tmp_path, capsys):
    # With every socket refused, the real sky still loads, checks and makes a pork-chop
    # grid: the kernel comes from the installed de421 package.
    import socket

    def refuse(*_args, **_kwargs):
        raise OSError("network use during a run")

    monkeypatch.setattr(socket.socket, "connect", refuse)
    monkeypatch.setattr(socket, "create_connection", refuse)
    assert main(["check", str(SCENES / "solar-system.toml")]) == 0
    assert main(["porkchop", str(SCENES / "solar-system.toml"), "--from", "Earth", "--to",
                 "Mars", "--depart", "2026-09-01", "2027-01-31", "--arrive", "2027-05-01",
                 "2028-03-01", "--steps", "20", "20", "--json"]) == 0
    capsys.readouterr()


def test_barycentric_positions_agree_with_skyfield(bsp, ts):
    # [center] origin = "barycenter": positions from the solar-system barycentre, as the
    # kernel has them; the Sun itself moves (by up to about two solar radii).
    scene = load_scene_text(
        '[scene]\nepoch = "2026-01-01T00:00:00 TDB"\nframe = "ICRF"\n'
        '[center]\nname = "Barycentre"\npreset = "sun"\norigin = "barycenter"\n'
        '[[body]]\nname = "Sun"\nephemeris = "DE421"\n'
        '[[body]]\nname = "Jupiter"\nephemeris = "DE421"\n')
    t_s = np.linspace(-40, 20, 25) * 365.25 * 86400.0
    t = ts.tdb_jd(2461041.5 + t_s / 86400.0)
    for name, spice in (("Sun", "sun"), ("Jupiter", "jupiter barycenter")):
        r, _ = scene.body(name).track.state(t_s)
        ref = bsp[spice].at(t).position.km.T * KM
        assert np.linalg.norm(r - ref, axis=1).max() < 10e3, name
    wobble = np.linalg.norm(scene.body("Sun").track.state(t_s)[0], axis=1)
    assert 1e8 < wobble.max() < 2.5e9  # m: the Sun's offset from the barycentre
    from viewer.scene import dump_scene

    assert load_scene_text(dump_scene(scene)).center.origin == "barycenter"


def test_a_mass_gives_the_gm():
    text = '[center]\npreset = "sun"\n[[body]]\nname = "J"\na = "5.2 au"\n{extra}\n'
    by_mass = load_scene_text(text.format(extra="mass = 1.898e27")).body("J")
    assert by_mass.gm_m3_s2 == pytest.approx(6.6743e-11 * 1.898e27)  # CODATA 2018 G
    with pytest.raises(Exception, match="both gm and mass"):
        load_scene_text(text.format(extra='mass = 1e27\ngm = "1e17 m3/s2"'))


@pytest.mark.parametrize("date", ["2025-01-16", "2027-02-19"])
def test_earth_and_mars_line_up_at_the_published_oppositions(date):
    # Mars oppositions on 2025 January 16 and 2027 February 19 (almanac dates, from
    # memory): the heliocentric ecliptic longitudes of Earth and Mars are then equal.
    scene = load_scene(SCENES / "solar-system.toml")
    t = parse_epoch(f"{date}T12:00:00 TT").seconds_since(scene.epoch)
    lon = [math.degrees(math.atan2(r[1], r[0])) for r in
           (scene.body(n).track.state(t)[0] for n in ("Earth", "Mars"))]
    assert abs((lon[0] - lon[1] + 180.0) % 360.0 - 180.0) < 0.6  # Mars moves 0.5 deg a day
