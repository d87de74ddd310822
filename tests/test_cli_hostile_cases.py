"""Single cases of the hostile-input trial that need their own words checked: the reason
given, the digits printed, and values that must be accepted."""

from __future__ import annotations

import json
import math
from pathlib import Path

import pytest

from viewer.cli import main

DATA = Path(__file__).parent / "data" / "ccsds"
SCENE = """[scene]
epoch = "2030-01-01T00:00:00 UTC"

[center]
preset = "earth"

[[body]]
name = "Near parabola"
a = "7000 km"
e = 0.9999999999

[[body]]
name = "Hyp"
a = "-13356 km"
e = 1.5
"""


@pytest.fixture
def scene(tmp_path: Path) -> Path:
    path = tmp_path / "s.toml"
    path.write_text(SCENE)
    return path


def _err(code: int, capsys: pytest.CaptureFixture[str]) -> str:
    err = capsys.readouterr().err
    assert code == 2, err
    return err


def test_huge_values_are_out_of_range_not_rectilinear(tmp_path: Path,
                                                      capsys: pytest.CaptureFixture[str]) -> None:
    err = _err(main(["convert", "--center", "earth", "--r", "1e300", "0", "0",
                     "--v", "0", "1", "0"]), capsys)
    assert "rectilinear" not in err and "too large; allowed up to 1e+21 m" in err
    opm = tmp_path / "big.opm"
    opm.write_text("\n".join(
        "X = 1e300 [km]" if line.startswith("X ") else line
        for line in (DATA / "leo_state.opm").read_text().splitlines()) + "\n")
    err = _err(main(["import", str(opm), "-o", str(tmp_path / "big.toml")]), capsys)
    assert "rectilinear" not in err and "X = 1e300 [km] is too large" in err


def test_a_near_parabolic_ellipse_keeps_its_digits_in_check_and_convert(
        scene: Path, capsys: pytest.CaptureFixture[str]) -> None:
    assert main(["check", str(scene)]) == 0
    out = capsys.readouterr().out
    assert "0.9999999999" in out
    assert not any(line.split()[:2] == ["e", "1"] for line in out.splitlines())
    assert main(["convert", "--center", "earth", "--a", "7000 km", "--e", "0.9999999999",
                 "--nu", "180", "--json"]) == 0
    d = json.loads(capsys.readouterr().out)
    # at apoapsis the speed now is the apoapsis speed: sqrt(mu (1 - e) / (a (1 + e)))
    assert d["speed_apoapsis_m_s"] == pytest.approx(d["speed_m_s"], rel=1e-6)
    assert d["speed_apoapsis_m_s"] == pytest.approx(
        math.sqrt(3.986004418e14 * 1e-10 / (7e6 * (2 - 1e-10))), rel=1e-5)


def test_negative_numbers_in_scientific_notation_are_values(
        scene: Path, capsys: pytest.CaptureFixture[str]) -> None:
    assert main(["convert", "--center", "earth", "--a", "-1.3356e7", "--e", "1.5"]) == 0
    assert main(["convert", "--center", "earth", "--r", "7000000", "-1e-3", "0",
                 "--v", "0", "7500", "0"]) == 0
    assert main(["timing", str(scene), "--body", "Hyp", "--nu", "-1e1", "10"]) == 0
    capsys.readouterr()


def test_timing_with_nothing_to_answer_is_refused(scene: Path,
                                                  capsys: pytest.CaptureFixture[str]) -> None:
    err = _err(main(["timing", str(scene), "--body", "Hyp"]), capsys)
    assert "--nu" in err and "--radius" in err


def test_a_millisecond_step_can_be_written_as_the_error_says(
        scene: Path, capsys: pytest.CaptureFixture[str]) -> None:
    out = scene.parent / "ms.oem"
    err = _err(main(["ephemeris", str(scene), "--body", "Hyp", "--start", "0 s", "--stop",
                     "1 s", "--step", "0.5 ms", "-o", str(out)]), capsys)
    assert "at least 1 ms" in err
    assert main(["ephemeris", str(scene), "--body", "Hyp", "--start", "0 s", "--stop",
                 "10 ms", "--step", "1 ms", "-o", str(out)]) == 0
    lines = [ln for ln in out.read_text().splitlines() if ln.startswith("2030-01-01T00:00:00.0")]
    assert [ln.split()[0][-3:] for ln in lines] == [f"{k:03d}" for k in range(11)]


def _no_constants(name: str) -> None:
    raise AssertionError(f"the JSON holds {name}, which JSON does not have")


@pytest.mark.parametrize("bundled", sorted((Path(__file__).parent.parent / "scenes")
                                           .glob("*.toml")), ids=lambda p: p.name)
def test_check_json_of_every_bundled_scene_is_strict(bundled: Path,
                                                     capsys: pytest.CaptureFixture[str]) -> None:
    assert main(["check", str(bundled), "--json"]) == 0
    json.loads(capsys.readouterr().out, parse_constant=_no_constants)


def test_write_json_turns_every_non_finite_number_into_null() -> None:
    import io

    import numpy as np

    from viewer.cli.options import write_json

    out = io.StringIO()
    write_json({"a": math.nan, "b": [math.inf, -math.inf, 1.5], "c": np.float64("nan"),
                "d": (np.float32(2.0), None, True)}, out)
    assert json.loads(out.getvalue(), parse_constant=_no_constants) == {
        "a": None, "b": [None, None, 1.5], "c": None, "d": [2.0, None, True]}
