"""``perifocal import`` and the round trip OPM -> scene -> OEM, against an independent
integration (scipy) and a published Kepler's-problem example."""

from __future__ import annotations

import math
from pathlib import Path

import numpy as np
import pytest
from reference_values import KM, MM
from scipy.integrate import solve_ivp

from viewer.cli import CAUTION, main
from viewer.formats import parse_oem, parse_opm
from viewer.orbit import state_from_elements
from viewer.scene import load_scene
from viewer.units import parse_epoch

DATA = Path(__file__).parent / "data" / "ccsds"

EME2000_EARTH_SCENE = """# My mission scene: these comments must survive an import --into.
[scene]
title = "Mission"
epoch = "2030-01-01T00:00:00 UTC"
frame = "EME2000"

[center]
preset = "earth"   # the catalogue's Earth

[[body]]
name = "Station"
a = "6778 km"
e = 0.0005
i = "51.6 deg"
"""


def opm(name: str):
    return parse_opm((DATA / name).read_text(), name)


def imported(tmp_path: Path, name: str, capsys: pytest.CaptureFixture[str]) -> Path:
    out = tmp_path / (Path(name).stem + ".toml")
    assert main(["import", str(DATA / name), "-o", str(out)]) == 0
    assert CAUTION in capsys.readouterr().out
    return out


def two_body_reference(r0: np.ndarray, v0: np.ndarray, mu: float,
                       t_s: np.ndarray) -> np.ndarray:
    """Independent propagation: scipy's DOP853 on r'' = -mu r / |r|^3, rtol 1e-12."""
    def f(_t: float, y: np.ndarray) -> np.ndarray:
        r = y[:3]
        return np.concatenate([y[3:], -mu * r / np.linalg.norm(r) ** 3])

    # scipy's step-size floor takes nextafter(0), a (harmless) denormal underflow.
    with np.errstate(under="ignore"):
        sol = solve_ivp(f, (0.0, float(t_s[-1])), np.concatenate([r0, v0]), method="DOP853",
                        t_eval=t_s, rtol=1e-12, atol=1e-9)
    assert sol.success
    return sol.y.T


def oem_of(tmp_path: Path, scene: Path, body: str, *extra: str) -> object:
    out = tmp_path / "out.oem"
    assert main(["ephemeris", str(scene), "--body", body, *extra, "-o", str(out)]) == 0
    return parse_oem(out.read_text(), str(out))


def test_a_new_scene_takes_frame_centre_name_and_epoch_from_the_opm(
        tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    scene = load_scene(imported(tmp_path, "leo_state.opm", capsys))
    m = opm("leo_state.opm")
    assert scene.frame == "EME2000"
    assert scene.center.name == "Earth" and scene.center.preset == "earth"
    body = scene.body("TESTSAT 1")
    assert scene.epoch == parse_epoch("2030-01-01T00:00:00 UTC")
    assert body.epoch_offset_s == 0.0
    r, v = state_from_elements(body.elements, scene.center.gm_m3_s2)
    assert np.max(np.abs(r - m.r_m)) < 1 * MM
    assert np.max(np.abs(v - m.v_m_s)) < 1e-6


def test_comment_lines_become_comments_in_the_scene(
        tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    text = imported(tmp_path, "leo_state.opm", capsys).read_text()
    assert ("# OPM COMMENT: A low Earth orbit, state vector only: the initial state of "
            "Vallado's") in text
    assert "OBJECT_ID = 2030-001A" in text
    assert "# " + CAUTION in text


def test_the_messages_gm_is_the_scenes_gm(tmp_path: Path,
                                         capsys: pytest.CaptureFixture[str]) -> None:
    scene = load_scene(imported(tmp_path, "standard_layout.opm", capsys))
    assert scene.center.gm_m3_s2 == pytest.approx(398_600.4415e9, rel=1e-15)
    assert scene.center.radius_m == pytest.approx(6_378_137.0)  # WGS 84, from the catalogue
    assert scene.frame == "TOD"


def test_keplerian_elements_alone_in_terrestrial_time(
        tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    scene = load_scene(imported(tmp_path, "mars_keplerian.opm", capsys))
    m = opm("mars_keplerian.opm")
    assert scene.center.name == "Mars"
    assert scene.epoch == m.epoch and scene.epoch.scale == "TT"
    r, v = state_from_elements(scene.body("AREOSAT").elements, scene.center.gm_m3_s2)
    r0, v0 = m.state()
    assert np.max(np.abs(r - r0)) < 1 * MM and np.max(np.abs(v - v0)) < 1e-6


def test_round_trip_matches_vallado_example_2_4(tmp_path: Path,
                                               capsys: pytest.CaptureFixture[str]) -> None:
    # Vallado, Fundamentals of Astrodynamics and Applications (4th ed.), Example 2-4
    # (Kepler's problem), from memory: r0 = [1131.340, -2282.343, 6672.423] km,
    # v0 = [-5.64305, 4.30333, 2.42879] km/s, 40 min later
    # r = [-4219.7527, 4363.0292, -3958.7666] km, v = [3.689866, -1.916735, -6.112511] km/s.
    scene = imported(tmp_path, "leo_state.opm", capsys)
    seg = oem_of(tmp_path, scene, "TESTSAT 1", "--start", "0 s", "--stop", "40 min",
                 "--step", "10 min").segments[0]
    assert seg.epoch_texts[-1] == "2030-01-01T00:40:00.000"
    assert seg.r_m[-1] == pytest.approx(np.array([-4219.7527, 4363.0292, -3958.7666]) * KM,
                                        abs=0.1)  # metres: the book prints 0.1 m
    assert seg.v_m_s[-1] == pytest.approx(np.array([3.689866, -1.916735, -6.112511]) * KM,
                                          abs=1e-3)  # m/s: the book prints 1 mm/s


@pytest.mark.parametrize("name, body, stop, step", [
    ("leo_state.opm", "TESTSAT 1", "1 d", "17 min"),
    ("standard_layout.opm", "EUTELSAT W4", "3 d", "2 h"),
    ("mars_keplerian.opm", "AREOSAT", "2 d", "45 min"),
    ("earth_departure.opm", "DEPARTURE", "2 d", "1 h"),
    ("earth_parabola.opm", "ESCAPE", "3 d", "3 h"),
])
def test_round_trip_agrees_with_an_independent_integration(
        tmp_path: Path, capsys: pytest.CaptureFixture[str], name: str, body: str, stop: str,
        step: str) -> None:
    # scipy.integrate.solve_ivp (DOP853, rtol 1e-12) from the message's own state, timed
    # from the OEM's printed epochs. Measured: within 1 mm and 1 um/s, the resolution the
    # file prints; the contract asks for 0.1 m, the check allows 1 cm.
    scene_path = imported(tmp_path, name, capsys)
    scene = load_scene(scene_path)
    m = opm(name)
    seg = oem_of(tmp_path, scene_path, body, "--start", "0 s", "--stop", stop,
                 "--step", step).segments[0]
    t = np.array([e.seconds_since(m.epoch) for e in seg.epochs])
    r0, v0 = m.state()
    ref = two_body_reference(r0, v0, scene.center.gm_m3_s2, t)
    assert np.max(np.linalg.norm(seg.r_m - ref[:, :3], axis=1)) < 0.01
    assert np.max(np.linalg.norm(seg.v_m_s - ref[:, 3:], axis=1)) < 1e-5


def test_into_adds_a_body_and_keeps_the_users_file(tmp_path: Path,
                                                  capsys: pytest.CaptureFixture[str]) -> None:
    path = tmp_path / "mission.toml"
    path.write_text(EME2000_EARTH_SCENE)
    assert main(["import", str(DATA / "leo_state.opm"), "--into", str(path)]) == 0
    assert CAUTION in capsys.readouterr().out
    text = path.read_text()
    assert text.startswith(EME2000_EARTH_SCENE)
    scene = load_scene(path)
    assert [b.name for b in scene.bodies] == ["Station", "TESTSAT 1"]
    # The body keeps its own epoch (the OPM's) against the scene epoch (both UTC here).
    assert scene.body("TESTSAT 1").epoch_offset_s == pytest.approx(0.0, abs=1e-6)
    assert "# OPM COMMENT: A low Earth orbit" in text


def test_into_refuses_a_different_frame_naming_both(tmp_path: Path,
                                                   capsys: pytest.CaptureFixture[str]) -> None:
    path = tmp_path / "mission.toml"
    path.write_text(EME2000_EARTH_SCENE)
    assert main(["import", str(DATA / "standard_layout.opm"), "--into", str(path)]) == 2
    err = capsys.readouterr().err
    assert "standard_layout.opm" in err.splitlines()[0]
    assert "line 10: REF_FRAME = TOD, but the scene's frame is EME2000" in err
    assert "Traceback" not in err
    assert path.read_text() == EME2000_EARTH_SCENE  # untouched


def test_into_refuses_a_duplicate_name_and_accepts_another(
        tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    path = tmp_path / "mission.toml"
    path.write_text(EME2000_EARTH_SCENE)
    src = str(DATA / "leo_state.opm")
    assert main(["import", src, "--into", str(path), "--name", "Station"]) == 2
    assert "already has a body named 'Station'" in capsys.readouterr().err
    assert main(["import", src, "--into", str(path), "--name", "Chaser"]) == 0
    assert [b.name for b in load_scene(path).bodies] == ["Station", "Chaser"]


@pytest.mark.parametrize("name, expected", [
    ("bad_missing_keyword.opm", "line 13: missing mandatory keyword Y_DOT (state vector)"),
    ("bad_number.opm", "line 11: Y: '-2282.3.43' is not a number"),
    ("bad_unit.opm", "line 10: X: unknown unit [m]; CCSDS 502.0-B gives X in [km]"),
])
def test_bad_messages_exit_2_naming_keyword_and_line_and_write_nothing(
        tmp_path: Path, capsys: pytest.CaptureFixture[str], name: str, expected: str) -> None:
    out = tmp_path / "x.toml"
    assert main(["import", str(DATA / name), "-o", str(out)]) == 2
    err = capsys.readouterr().err
    assert err.splitlines()[0] == f"perifocal: error in {DATA / name}"
    assert expected in err
    assert not out.exists()
    assert list(tmp_path.iterdir()) == []  # no temporary file left either


def test_an_earth_fixed_frame_is_refused(tmp_path: Path,
                                         capsys: pytest.CaptureFixture[str]) -> None:
    src = tmp_path / "itrf.opm"
    src.write_text((DATA / "leo_state.opm").read_text().replace("EME2000", "ITRF2000"))
    assert main(["import", str(src), "-o", str(tmp_path / "x.toml")]) == 2
    assert "line 9: REF_FRAME = ITRF2000 rotates with the Earth" in capsys.readouterr().err


def test_a_frame_the_scene_format_cannot_name_is_refused_before_writing(
        tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    src = tmp_path / "odd.opm"
    src.write_text((DATA / "leo_state.opm").read_text().replace("EME2000", "MOON ME"))
    out = tmp_path / "x.toml"
    assert main(["import", str(src), "-o", str(out)]) == 2
    err = capsys.readouterr().err
    assert err.splitlines()[0] == f"perifocal: error in {src}"
    assert "scene.frame" in err and not out.exists()


def test_an_unknown_centre_needs_the_messages_gm(tmp_path: Path,
                                                capsys: pytest.CaptureFixture[str]) -> None:
    src = tmp_path / "ceres.opm"
    src.write_text((DATA / "leo_state.opm").read_text().replace("CENTER_NAME = EARTH",
                                                                "CENTER_NAME = CERES"))
    assert main(["import", str(src), "-o", str(tmp_path / "x.toml")]) == 2
    assert "line 8: CENTER_NAME = CERES is not in the catalogue" in capsys.readouterr().err


def test_an_existing_scene_is_not_replaced_without_force(
        tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    out = tmp_path / "x.toml"
    out.write_text("keep me")
    assert main(["import", str(DATA / "leo_state.opm"), "-o", str(out)]) == 2
    assert out.read_text() == "keep me"
    assert main(["import", str(DATA / "leo_state.opm"), "-o", str(out), "--force"]) == 0
    assert load_scene(out).body("TESTSAT 1")


def test_a_hyperbolic_departure_reports_v_infinity(tmp_path: Path,
                                                  capsys: pytest.CaptureFixture[str]) -> None:
    # Curtis Example 8.3 numbers (from memory): v_inf = 2.943 km/s from rp = 6678 km.
    out = tmp_path / "dep.toml"
    assert main(["import", str(DATA / "earth_departure.opm"), "-o", str(out)]) == 0
    text = capsys.readouterr().out
    assert "v_inf = 2.943000 km/s" in text
    el = load_scene(out).body("DEPARTURE").elements
    assert el.v_infinity == pytest.approx(2943.0, abs=1e-3)
    assert math.isclose(el.periapsis, 6678 * KM, rel_tol=1e-12)


def test_help_has_an_example_and_the_caution(capsys: pytest.CaptureFixture[str]) -> None:
    for command in ("import", "ephemeris", "transfer"):
        with pytest.raises(SystemExit) as info:
            main([command, "--help"])
        assert info.value.code == 0
        text = " ".join(capsys.readouterr().out.split())
        assert "example" in text and f"perifocal {command} " in text
        assert " ".join(CAUTION.split()) in text
