"""``perifocal check``: the JSON contract of cli.md, the human table, fast start.

The demo's numbers are recomputed here from the TOML text with viewer.orbit alone (its
own unit parsing, no scene loader); the third law and vis-viva are checked against the
NSSDCA Planetary Fact Sheet through ``check --json``.
"""

from __future__ import annotations

import json
import math
import subprocess
import sys
import tomllib
from pathlib import Path

import numpy as np
import pytest
from reference_values import AU, CONTRACT_BODY, DAY, DEG, KM_S, MILLION_KM, NSSDCA, assert_printed

from viewer.cli import main
from viewer.orbit import CATALOGUE, Elements, state_from_elements, true_from_mean

ROOT = Path(__file__).resolve().parents[1]
SCENES = ROOT / "scenes"

#: Every key of the cli.md body object, always present.
BODY_KEYS = {"name", "a_m", "e", "p_m", "i_rad", "raan_rad", "argp_rad", "period_s",
             "periapsis_m", "apoapsis_m", "periapsis_altitude_m", "apoapsis_altitude_m",
             "speed_periapsis_m_s", "speed_apoapsis_m_s", "distance_m", "speed_m_s",
             "specific_energy_j_kg", "h_m2_s", "v_inf_m_s", "warnings"}


def check_json(path: Path, capsys: pytest.CaptureFixture[str]) -> dict:
    assert main(["check", str(path), "--json"]) == 0
    return json.loads(capsys.readouterr().out)


def _si(text: str) -> float:
    """The test's own reading of the few units the demo uses."""
    number, unit = text.split()
    return float(number) * {"au": AU, "deg": DEG, "km": 1e3, "m3/s2": 1.0}[unit]


def test_demo_json_agrees_with_the_orbit_core(capsys):
    doc = tomllib.loads((SCENES / "demo.toml").read_text())
    mu = _si(doc["center"]["gm"])
    radius = _si(doc["center"]["radius"])
    out = check_json(SCENES / "demo.toml", capsys)
    assert out["scene"] == doc["scene"]["title"]
    assert out["epoch"] == "2030-01-01T00:00:00 TDB"
    assert [b["name"] for b in out["bodies"]] == [b["name"] for b in doc["body"]]
    for raw, got in zip(doc["body"], out["bodies"], strict=True):
        assert set(got) >= BODY_KEYS
        a, e = _si(raw["a"]), raw["e"]
        nu = float(true_from_mean(_si(raw["M"]), e))
        el = Elements(a, e, _si(raw["i"]), _si(raw["raan"]), _si(raw["argp"]), nu, mu=mu)
        r, v = state_from_elements(el)
        rel = 1e-12
        assert got["a_m"] == pytest.approx(a, rel=rel)
        assert got["period_s"] == pytest.approx(2 * math.pi * math.sqrt(a**3 / mu), rel=rel)
        assert got["periapsis_m"] == pytest.approx(a * (1 - e), rel=rel)
        assert got["apoapsis_m"] == pytest.approx(a * (1 + e), rel=rel)
        assert got["periapsis_altitude_m"] == pytest.approx(a * (1 - e) - radius, rel=rel)
        assert got["speed_periapsis_m_s"] == pytest.approx(
            math.sqrt(mu * (2 / (a * (1 - e)) - 1 / a)), rel=rel)
        assert got["speed_apoapsis_m_s"] == pytest.approx(
            math.sqrt(mu * (2 / (a * (1 + e)) - 1 / a)), rel=rel)
        assert got["distance_m"] == pytest.approx(float(np.linalg.norm(r)), rel=1e-11)
        assert got["speed_m_s"] == pytest.approx(float(np.linalg.norm(v)), rel=1e-11)
        assert got["specific_energy_j_kg"] == pytest.approx(-mu / (2 * a), rel=rel)
        assert got["h_m2_s"] == pytest.approx(float(np.linalg.norm(np.cross(r, v))), rel=1e-11)
        assert got["v_inf_m_s"] is None


def test_contract_example_body_prints_the_contract_numbers(tmp_path, capsys):
    # /work/shared/design/cli.md: the example body's values, to their printed digits.
    scene = tmp_path / "tarn.toml"
    scene.write_text('[scene]\ntitle = "A four-planet system"\nepoch = "2030-01-01T00:00:00"\n'
                     '[center]\ngm = "1.32712440018e20 m3/s2"\nradius = "695700 km"\n'
                     '[[body]]\nname = "Tarn"\na = "1.2 au"\ne = 0.21\ni = "3 deg"\n'
                     'raan = "40 deg"\nargp = "110 deg"\nM = "0 deg"\n')
    out = check_json(scene, capsys)
    assert out["epoch"] == "2030-01-01T00:00:00 TDB"
    (b,) = out["bodies"]
    for key in ("a_m", "p_m", "period_s", "periapsis_m", "apoapsis_m", "speed_periapsis_m_s",
                "speed_apoapsis_m_s", "specific_energy_j_kg", "h_m2_s", "i_rad", "raan_rad",
                "argp_rad"):
        assert_printed(b[key], CONTRACT_BODY[key], 1.0, what=key)
    assert b["distance_m"] == b["periapsis_m"] and b["speed_m_s"] == b["speed_periapsis_m_s"]
    assert b["warnings"] == [] and out["warnings"] == []


def _fact_sheet_scene(tmp_path: Path) -> Path:
    # NASA NSSDCA Planetary Fact Sheet perihelion and aphelion (10^6 km), from memory.
    text = '[center]\npreset = "sun"\n'
    for name, row in NSSDCA.items():
        text += (f'[[body]]\nname = "{name}"\nperiapsis = "{row["perihelion"]}e6 km"\n'
                 f'apoapsis = "{row["aphelion"]}e6 km"\n')
    path = tmp_path / "factsheet.toml"
    path.write_text(text)
    return path


def test_third_law_through_check_matches_the_fact_sheet_periods(tmp_path, capsys):
    out = check_json(_fact_sheet_scene(tmp_path), capsys)
    for b in out["bodies"]:
        # NSSDCA sidereal orbit period (days), from memory; 0.5 % covers the sheet's
        # rounding and the planets' own masses.
        assert b["period_s"] == pytest.approx(NSSDCA[b["name"]]["period_d"] * DAY, rel=5e-3)


def test_vis_viva_through_check_matches_the_fact_sheet_speeds(tmp_path, capsys):
    out = check_json(_fact_sheet_scene(tmp_path), capsys)
    for b in out["bodies"]:
        row = NSSDCA[b["name"]]
        # NSSDCA max. and min. orbital velocity (km/s), from memory.
        assert b["speed_periapsis_m_s"] == pytest.approx(row["v_max"] * KM_S, rel=5e-3)
        assert b["speed_apoapsis_m_s"] == pytest.approx(row["v_min"] * KM_S, rel=5e-3)
        # A planet moves fastest at periapsis (common practice, no source).
        assert b["speed_periapsis_m_s"] > b["speed_apoapsis_m_s"]


def test_standish_scene_agrees_with_the_fact_sheet(capsys):
    out = check_json(SCENES / "solar-system-mean.toml", capsys)
    by_name = {b["name"].split("-")[0].split()[0].lower(): b for b in out["bodies"]}
    for name, row in NSSDCA.items():
        b = by_name[name]
        # Standish's J2000 mean elements against the fact sheet (both from memory): the
        # tables differ in epoch and averaging, so 1 % for apsides and speeds.
        assert b["periapsis_m"] == pytest.approx(row["perihelion"] * MILLION_KM, rel=1e-2)
        assert b["apoapsis_m"] == pytest.approx(row["aphelion"] * MILLION_KM, rel=1e-2)
        assert b["period_s"] == pytest.approx(row["period_d"] * DAY, rel=5e-3)
        assert b["speed_periapsis_m_s"] == pytest.approx(row["v_max"] * KM_S, rel=1e-2)


def test_open_conics_have_nulls_for_what_they_lack(tmp_path, capsys):
    scene = tmp_path / "open.toml"
    scene.write_text('[center]\npreset = "earth"\n'
                     '[[body]]\nname = "H"\nperiapsis = "7000 km"\ne = 1.4\n'
                     '[[body]]\nname = "P"\nperiapsis = "7000 km"\ne = 1\n')
    out = check_json(scene, capsys)
    h, p = out["bodies"]
    mu = CATALOGUE["earth"].gm_m3_s2
    for b in (h, p):
        assert set(b) >= BODY_KEYS
        for key in ("period_s", "apoapsis_m", "apoapsis_altitude_m", "speed_apoapsis_m_s"):
            assert b[key] is None, key
    assert p["a_m"] is None and p["v_inf_m_s"] is None
    assert p["specific_energy_j_kg"] == 0.0
    # hyperbolic excess speed: v_inf^2 = mu (e - 1) / rp (Curtis eq. 2.104 with a = rp/(1-e))
    assert h["v_inf_m_s"] == pytest.approx(math.sqrt(mu * 0.4 / 7000e3), rel=1e-12)
    assert h["a_m"] == pytest.approx(7000e3 / (1 - 1.4), rel=1e-14)
    assert any("escape" in w for w in h["warnings"])
    assert len(out["warnings"]) == len(h["warnings"]) + len(p["warnings"])


def test_human_table_uses_km_and_hours_near_earth(capsys):
    assert main(["check", str(SCENES / "earth-mission.toml")]) == 0
    text = capsys.readouterr().out
    block = text.split("Wren transfer")[1].split("\n\n")[0]
    assert "42164 km" in block
    assert " h" in block.split("period")[1].splitlines()[0]
    assert "km/s" in block
    assert "warnings" in text


def test_human_table_uses_au_and_days_for_planets(capsys):
    assert main(["check", str(SCENES / "demo.toml")]) == 0
    text = capsys.readouterr().out
    block = text.split("Tarn")[1].split("\n\n")[0]
    assert "1.2 au" in block and " d" in block.split("period")[1].splitlines()[0]


def test_help_has_an_example_and_the_two_body_caution(capsys):
    from viewer.cli import CAUTION

    with pytest.raises(SystemExit) as info:
        main(["check", "--help"])
    assert info.value.code == 0
    text = " ".join(capsys.readouterr().out.split())
    assert "perifocal check scenes/demo.toml" in text
    assert " ".join(CAUTION.split()) in text


def test_check_imports_no_gl_windowing_or_ui():
    code = ("import sys\nfrom viewer.cli import main\n"
            f"rc = main(['check', {str(SCENES / 'demo.toml')!r}, '--json'])\n"
            "bad = sorted(m for m in sys.modules if m.split('.')[0] in "
            "('moderngl', 'pyglet', 'imgui_bundle', 'imgui', 'glcontext', 'tomlkit'))\n"
            # nor any other command's module (each command's parser is built on demand)
            "bad += sorted(m for m in sys.modules if m.startswith('viewer.cli.') and "
            "m not in ('viewer.cli.check', 'viewer.cli.__main__', 'viewer.cli.options'))\n"
            "sys.stderr.write(repr(bad))\nsys.exit(rc)\n")
    res = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True,
                         cwd=ROOT, timeout=60)
    assert res.returncode == 0, res.stderr
    assert res.stderr == "[]"
