"""``perifocal ephemeris``: the OEM's lines, epochs, time system and frame as cli.md says."""

from __future__ import annotations

import re
from pathlib import Path

import numpy as np
import pytest

from viewer.cli import CAUTION, main
from viewer.formats import parse_oem
from viewer.orbit import propagate, state_from_elements
from viewer.scene import load_scene
from viewer.units import parse_epoch

SCENE = """[scene]
title = "Ephemeris checks"
epoch = "2030-01-01T00:00:00 TDB"
frame = "GCRF"

[center]
preset = "earth"

[[body]]
name = "Sat"
a = "7000 km"
e = 0.01
i = "45 deg"
raan = "30 deg"
argp = "60 deg"
M = "10 deg"
epoch = "2030-01-01T06:00:00 UTC"
"""

CCSDS_EPOCH = re.compile(r"^\d{4}-\d{2}-\d{2}T\d{2}:\d{2}:\d{2}\.\d{3}$")


@pytest.fixture
def scene(tmp_path: Path) -> Path:
    path = tmp_path / "scene.toml"
    path.write_text(SCENE)
    return path


def ephemeris(scene: Path, capsys: pytest.CaptureFixture[str], *flags: str):
    out = scene.parent / "sat.oem"
    assert main(["ephemeris", str(scene), "--body", "Sat", *flags, "-o", str(out),
                 "--force"]) == 0
    assert CAUTION in capsys.readouterr().out
    text = out.read_text()
    return text, parse_oem(text, str(out)).segments[0]


def test_lines_run_from_start_to_stop_inclusive(scene: Path,
                                               capsys: pytest.CaptureFixture[str]) -> None:
    _, seg = ephemeris(scene, capsys, "--start", "0 s", "--stop", "1 h", "--step", "10 min")
    assert len(seg.epoch_texts) == 7
    assert seg.epoch_texts[0] == "2030-01-01T00:00:00.000"
    assert seg.epoch_texts[-1] == "2030-01-01T01:00:00.000"


def test_a_stop_off_the_step_grid_is_still_the_last_line(
        scene: Path, capsys: pytest.CaptureFixture[str]) -> None:
    _, seg = ephemeris(scene, capsys, "--start", "0 s", "--stop", "25 min", "--step", "10 min")
    assert seg.epoch_texts[-2:] == ("2030-01-01T00:20:00.000", "2030-01-01T00:25:00.000")


def test_time_system_is_the_scale_of_start_and_epochs_have_milliseconds(
        scene: Path, capsys: pytest.CaptureFixture[str]) -> None:
    _, seg = ephemeris(scene, capsys, "--start", "2030-01-01T00:00:00.25 UTC",
                       "--stop", "2030-01-01T00:03:00.25 UTC", "--step", "60 s")
    assert seg.meta["TIME_SYSTEM"] == "UTC"
    assert seg.epoch_texts[1] == "2030-01-01T00:01:00.250"
    assert all(CCSDS_EPOCH.match(t) for t in seg.epoch_texts)
    # An offset takes the scene epoch's scale; an epoch without suffix is TDB.
    _, seg = ephemeris(scene, capsys, "--start", "2030-01-01T00:00:00", "--stop", "2 min",
                       "--step", "1 min")
    assert seg.meta["TIME_SYSTEM"] == "TDB"


def test_ref_frame_is_the_scenes_frame_and_the_header_is_complete(
        scene: Path, capsys: pytest.CaptureFixture[str]) -> None:
    text, seg = ephemeris(scene, capsys, "--start", "0 s", "--stop", "1 min", "--step", "1 min")
    assert seg.meta["REF_FRAME"] == "GCRF"
    assert seg.meta["CENTER_NAME"] == "EARTH" and seg.meta["OBJECT_NAME"] == "Sat"
    assert (seg.meta["START_TIME"], seg.meta["STOP_TIME"]) == (seg.epoch_texts[0],
                                                               seg.epoch_texts[-1])
    assert f"COMMENT {CAUTION}" in text


def test_each_state_is_the_body_at_its_printed_epoch(scene: Path,
                                                    capsys: pytest.CaptureFixture[str]) -> None:
    # The body's own epoch is in UTC and the lines are in TT: every conversion between
    # scales sits between the two, and each line must still be the body at its label.
    _, seg = ephemeris(scene, capsys, "--start", "2030-01-01T05:00:00 TT",
                       "--stop", "2030-01-01T07:00:00 TT", "--step", "7 min")
    s = load_scene(scene)
    body = s.body("Sat")
    r0, v0 = state_from_elements(body.elements, s.center.gm_m3_s2)
    epoch0 = parse_epoch("2030-01-01T06:00:00 UTC")
    for text, r, v in zip(seg.epoch_texts, seg.r_m, seg.v_m_s, strict=True):
        dt = parse_epoch(f"{text} TT").seconds_since(epoch0)
        r_ref, v_ref = propagate(r0, v0, s.center.gm_m3_s2, dt)
        assert np.max(np.abs(r - r_ref)) < 1e-3 and np.max(np.abs(v - v_ref)) < 1e-6


@pytest.mark.parametrize("flags, expected", [
    (["--start", "1 h", "--stop", "0 s", "--step", "1 min"], "--stop"),
    (["--start", "0 s", "--stop", "1 h", "--step", "0.0001 s"], "at least 1 ms"),
    (["--start", "0 s", "--stop", "100 d", "--step", "1 s"], "at most 1,000,000"),
    (["--start", "soon", "--stop", "1 h", "--step", "1 min"], "--start"),
    (["--start", "0 s", "--stop", "1 h", "--step", "1 furlong"], "--step"),
])
def test_bad_flags_exit_2_and_write_nothing(scene: Path, capsys: pytest.CaptureFixture[str],
                                           flags: list[str], expected: str) -> None:
    out = scene.parent / "x.oem"
    assert main(["ephemeris", str(scene), "--body", "Sat", *flags, "-o", str(out)]) == 2
    err = capsys.readouterr().err
    assert expected in err and "Traceback" not in err
    assert not out.exists()


def test_an_unknown_body_lists_the_bodies(scene: Path,
                                          capsys: pytest.CaptureFixture[str]) -> None:
    assert main(["ephemeris", str(scene), "--body", "Moon", "--start", "0 s", "--stop", "1 h",
                 "--step", "1 min", "-o", str(scene.parent / "x.oem")]) == 2
    assert "no body named 'Moon'; its bodies: 'Sat'" in capsys.readouterr().err


@pytest.mark.parametrize("start, stop, step_s, scale", [
    # Across the leap second at the end of 2016 (IERS Bulletin C 52, from memory).
    ("2016-12-31T22:00:00 UTC", "2017-01-01T02:00:00 UTC", 600.0, "UTC"),
    ("2030-01-01T00:00:00 TT", "2030-01-15T00:00:00 TT", 3600.0 / 7, "TT"),
])
def test_label_times_match_converting_every_label(start: str, stop: str, step_s: float,
                                                  scale: str) -> None:
    from viewer.cli.ephemeris import epoch_labels, label_times

    epoch0 = parse_epoch("2016-06-01T00:00:00 TDB")
    texts, calendar_s = epoch_labels(parse_epoch(start), parse_epoch(stop), step_s, scale)
    fast = label_times(texts, calendar_s, scale, epoch0)
    exact = np.array([parse_epoch(f"{t} {scale}").seconds_since(epoch0) for t in texts])
    assert np.max(np.abs(fast - exact)) < 1e-6  # seconds; 1 us is 8 mm at 7.8 km/s
    if scale == "UTC":  # the ten minutes that hold the leap second last 601 s
        k = texts.index("2017-01-01T00:00:00.000")
        assert exact[k] - exact[k - 1] == pytest.approx(601.0, abs=1e-6)
