"""``perifocal convert`` and the command frame: published examples, exit codes, messages."""

from __future__ import annotations

import json
import math
import subprocess
import sys

import pytest
from reference_values import DEG, KM

from viewer.cli import main


def run_json(capsys: pytest.CaptureFixture[str], *argv: str) -> dict:
    assert main([*argv, "--json"]) == 0
    return json.loads(capsys.readouterr().out)


def test_state_to_elements_matches_vallado_example_2_5(capsys: pytest.CaptureFixture[str]) -> None:
    # Vallado, Fundamentals of Astrodynamics and Applications (4th ed.), Example 2-5
    # (RV2COE), printed values from memory: p = 11 067.790 km, a = 36 127.343 km,
    # e = 0.832853, i = 87.870 deg, raan = 227.898 deg, argp = 53.38 deg, nu = 92.335 deg.
    out = run_json(capsys, "convert", "--center", "earth", "--unit", "km",
                   "--r", "6524.834", "6862.875", "6448.296",
                   "--v", "4.901327", "5.533756", "-1.976341")
    assert out["p_m"] == pytest.approx(11_067.790 * KM, abs=0.05 * KM)
    assert out["a_m"] == pytest.approx(36_127.343 * KM, abs=0.05 * KM)
    assert out["e"] == pytest.approx(0.832853, abs=1e-6)
    assert out["i_rad"] == pytest.approx(87.870 * DEG, abs=0.001 * DEG)
    assert out["raan_rad"] == pytest.approx(227.898 * DEG, abs=0.001 * DEG)
    assert out["argp_rad"] == pytest.approx(53.38 * DEG, abs=0.01 * DEG)
    assert out["nu_rad"] == pytest.approx(92.335 * DEG, abs=0.001 * DEG)
    assert out["v_inf_m_s"] is None
    assert "flight-safety" in out["caution"]


def test_elements_to_state_is_the_inverse(capsys: pytest.CaptureFixture[str]) -> None:
    # Vallado Example 2-6 (COE2RV) takes the elements of Example 2-5 back to its state:
    # r = [6525.368, 6861.532, 6449.119] km, v = [4.902279, 5.533140, -1.975710] km/s
    # (printed from rounded elements, from memory): metres-level agreement expected.
    out = run_json(capsys, "convert", "--center", "earth", "--unit", "km",
                   "--a", "36127.343 km", "--e", "0.832853", "--i", "87.87 deg",
                   "--raan", "227.89 deg", "--argp", "53.38 deg", "--nu", "92.335 deg")
    r = [x / KM for x in out["r_m"]]
    v = [x / KM for x in out["v_m_s"]]
    for got, want in zip(r, [6525.368, 6861.532, 6449.119], strict=True):
        assert got == pytest.approx(want, abs=0.5)
    for got, want in zip(v, [4.902279, 5.533140, -1.975710], strict=True):
        assert got == pytest.approx(want, abs=5e-4)


def test_a_hyperbola_reports_v_infinity_and_no_period(capsys: pytest.CaptureFixture[str]) -> None:
    # v_inf^2 = v^2 - 2 mu / r (vis-viva at infinity; common practice, no source).
    mu = 3.986004418e14  # IERS Conventions (2010)
    out = run_json(capsys, "convert", "--gm", f"{mu} m3/s2", "--r", "7000000", "0", "0",
                   "--v", "0", "12000", "0")
    assert out["conic"] == "hyperbola"
    assert out["period_s"] is None and out["apoapsis_m"] is None
    assert out["v_inf_m_s"] == pytest.approx(math.sqrt(12000.0**2 - 2 * mu / 7.0e6), rel=1e-12)


def test_a_parabola_is_given_by_its_periapsis(capsys: pytest.CaptureFixture[str]) -> None:
    # Parabolic speed at r is the escape speed sqrt(2 mu / r) (common practice, no source).
    out = run_json(capsys, "convert", "--center", "earth", "--periapsis", "7000 km",
                   "--e", "1")
    assert out["a_m"] is None
    assert out["speed_m_s"] == pytest.approx(math.sqrt(2 * 3.986004418e14 / 7.0e6), rel=1e-12)


@pytest.mark.parametrize(
    ("argv", "source", "needle"),
    [
        (["--center", "pluto", "--a", "1 au", "--e", "0"], "--center", "unknown central body"),
        (["--center", "earth", "--a", "7000 kg", "--e", "0.1"], "--a", "unknown unit 'kg'"),
        (["--center", "earth", "--a", "7000 km", "--e", "1.5"], "--a", "must be negative"),
        (["--center", "earth", "--a", "7000 km", "--e", "-0.1"], "--e", "must be >= 0"),
        (["--center", "earth", "--a", "7000 km", "--e", "1"], "--a", "no finite a"),
        (["--center", "earth", "--r", "1", "0", "0"], "--r/--v", "needs both"),
        (["--center", "earth", "--r", "7e6", "0", "0", "--v", "1e3", "0", "0"], "--r/--v",
         "rectilinear"),
        (["--gm", "-5 m3/s2", "--a", "1 km", "--e", "0"], "--gm", "must be positive"),
        (["--center", "earth"], "convert", "nothing to convert"),
    ],
)
def test_bad_input_exits_2_with_the_source_and_one_line(
    capsys: pytest.CaptureFixture[str], argv: list[str], source: str, needle: str
) -> None:
    assert main(["convert", *argv]) == 2
    err = capsys.readouterr().err
    first, *rest = err.strip().splitlines()
    assert first == f"perifocal: error in {source}"
    assert any(needle in line for line in rest)
    assert "Traceback" not in err


def test_a_bad_flag_exits_2_without_a_traceback() -> None:
    proc = subprocess.run([sys.executable, "-m", "viewer.cli", "convert", "--center", "earth",
                           "--bogus"],
                          capture_output=True, text=True)
    assert proc.returncode == 2
    assert "unrecognized arguments: --bogus" in proc.stderr
    assert "Traceback" not in proc.stderr


def test_every_subcommand_help_has_an_example() -> None:
    from viewer.cli import COMMANDS

    for name in COMMANDS:
        proc = subprocess.run([sys.executable, "-m", "viewer.cli", name, "--help"],
                              capture_output=True, text=True)
        assert proc.returncode == 0, name
        assert "example" in proc.stdout.lower(), name
        assert f"perifocal {name}" in proc.stdout, name


def test_version_is_printed() -> None:
    import viewer

    proc = subprocess.run([sys.executable, "-m", "viewer.cli", "--version"],
                          capture_output=True, text=True)
    assert proc.stdout.strip() == f"perifocal {viewer.__version__}"
