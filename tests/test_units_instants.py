"""Epochs compare as instants, a leap second is a valid start of an ephemeris, and a UTC
date before UTC existed is refused with what to write instead."""

from __future__ import annotations

from pathlib import Path

import pytest

from viewer.cli import main
from viewer.formats import parse_oem
from viewer.units import Epoch, EpochError, parse_epoch


def test_equal_instants_are_equal_whatever_the_split_and_the_scale() -> None:
    a, b = Epoch(2451545.0, 0.5), Epoch(2451545.5, 0.0, "UTC")
    assert a == b and hash(a) == hash(b) and not a < b and a <= b
    assert len({a, b, a.in_scale("TT")}) == 1
    # the same instant from different texts (TT - TDB is periodic, under 2 ms: erfa.dtdb)
    tt = parse_epoch("2030-01-01T00:00:00 TT")
    assert tt == tt.in_scale("UTC") == Epoch(tt.jd2, tt.jd1, "TAI")


def test_order_follows_the_instant_not_the_first_part() -> None:
    later = Epoch(2451545.0, 0.9)   # JD 2451545.9
    earlier = Epoch(2451545.5, 0.3)  # JD 2451545.8
    assert earlier < later and sorted([later, earlier]) == [earlier, later]
    t = parse_epoch("2030-01-01T00:00:00 TDB")
    assert t.plus_seconds(1e-6) > t  # a microsecond apart is another instant
    assert t.plus_seconds(1e-6).plus_seconds(-1e-6) == t


SCENE = """[scene]
epoch = "2016-12-31T23:59:60 UTC"

[center]
preset = "earth"

[[body]]
name = "Sat"
a = "7000 km"
e = 0.01
"""


def test_an_ephemeris_can_start_and_stop_in_a_leap_second(
        tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    # 2016-12-31T23:59:60 UTC is the last leap second (IERS Bulletin C 52, from memory);
    # CCSDS 502.0-B allows second 60 in UTC epochs.
    scene = tmp_path / "leap.toml"
    scene.write_text(SCENE)
    out = tmp_path / "a.oem"
    assert main(["ephemeris", str(scene), "--body", "Sat", "--start", "0 s", "--stop", "3 min",
                 "--step", "60 s", "-o", str(out)]) == 0
    seg = parse_oem(out.read_text(), str(out)).segments[0]
    assert seg.epoch_texts[0] == "2016-12-31T23:59:60.000"
    # three minutes of elapsed time after 23:59:60 end at 00:02:59 (one leap second)
    assert seg.epoch_texts[-1] == "2017-01-01T00:02:59.000"
    instants = [parse_epoch(t + " UTC") for t in seg.epoch_texts]
    assert instants == sorted(instants) and len(set(instants)) == len(instants)
    out = tmp_path / "b.oem"
    assert main(["ephemeris", str(scene), "--body", "Sat", "--start",
                 "2016-12-31T23:58:30 UTC", "--stop", "0 s", "--step", "60 s",
                 "-o", str(out)]) == 0
    texts = parse_oem(out.read_text(), str(out)).segments[0].epoch_texts
    assert list(texts) == ["2016-12-31T23:58:30.000", "2016-12-31T23:59:30.000",
                           "2016-12-31T23:59:60.000"]


@pytest.mark.parametrize("text", ["1959-12-31T23:59:59 UTC", "1900-01-01T00:00:00Z"])
def test_utc_before_1960_is_refused_saying_what_to_write(text: str) -> None:
    # The IAU SOFA leap-second table (iau_DAT) starts on 1960-01-01 (from memory).
    with pytest.raises(EpochError, match=r"TT or TDB") as err:
        parse_epoch(text)
    assert f'"{text[:19]} TT"' in str(err.value)
    assert parse_epoch(text[:19] + " TT").scale == "TT"
    assert parse_epoch("1960-01-01T00:00:00 UTC").scale == "UTC"


def test_the_editor_saves_an_epoch_only_when_the_instant_or_its_scale_changes(
        tmp_path: Path) -> None:
    from dataclasses import replace

    from viewer.gui.scene_edits import scene_file_edits
    from viewer.scene import load_scene

    path = tmp_path / "leap.toml"
    path.write_text(SCENE)
    saved = load_scene(path)
    origins = tuple(range(len(saved.bodies)))
    e = saved.epoch
    resplit = replace(saved, epoch=Epoch(e.jd1 + 0.25, e.jd2 - 0.25, e.scale))
    assert resplit.epoch == saved.epoch
    assert scene_file_edits(resplit, saved, origins, SCENE) == []  # the same instant
    shown_in_tt = replace(saved, epoch=e.in_scale("TT"))
    keys = [k for k, _ in scene_file_edits(shown_in_tt, saved, origins, SCENE)]
    assert keys == ["scene.epoch"]  # written again, in TT; no body moves
