"""CCSDS Orbit Ephemeris Messages (CCSDS 502.0-B, KVN): the layout we write, what it keeps
(0.1 m whatever the orbit's size), and the parser used for round trips."""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pytest
from reference_values import AU, KM

from viewer.errors import UserInputError
from viewer.formats import parse_oem, write_oem
from viewer.units import parse_epoch

DATA = Path(__file__).parent / "data" / "ccsds"


def sample(n: int = 3, scale: float = 7000 * KM) -> tuple[list[str], np.ndarray, np.ndarray]:
    rng = np.random.default_rng(7)
    r = rng.uniform(-1, 1, (n, 3)) * scale
    v = rng.uniform(-1, 1, (n, 3)) * 7.5 * KM
    texts = [f"2030-01-01T00:0{k}:00.000" for k in range(n)]
    return texts, r, v


def written(texts: list[str], r: np.ndarray, v: np.ndarray, **kw: str) -> str:
    args = dict(object_name="TESTSAT 1", object_id="2030-001A", center_name="EARTH",
                ref_frame="EME2000", time_system="UTC", creation_date="2030-01-02T00:00:00.000")
    args.update(kw)
    return write_oem(epoch_texts=texts, r_m=r, v_m_s=v, comments=["Caution: two-body only."],
                     **args)


def test_the_header_and_metadata_keywords_of_the_standard_are_written_in_order() -> None:
    # CCSDS 502.0-B sec. 5.2: header, then META_START ... META_STOP, then data lines.
    text = written(*sample())
    keys = [line.split("=")[0].strip() for line in text.splitlines() if "=" in line]
    assert keys == ["CCSDS_OEM_VERS", "CREATION_DATE", "ORIGINATOR", "OBJECT_NAME", "OBJECT_ID",
                    "CENTER_NAME", "REF_FRAME", "TIME_SYSTEM", "START_TIME", "STOP_TIME"]
    lines = text.splitlines()
    assert lines.index("META_START") < lines.index("META_STOP")
    assert "COMMENT Caution: two-body only." in lines[:3]
    data = lines[lines.index("META_STOP") + 1:]
    data = [d for d in data if d]
    assert len(data) == 3 and all(len(d.split()) == 7 for d in data)


def test_start_and_stop_time_are_the_first_and_last_data_lines() -> None:
    texts, r, v = sample(4)
    meta = parse_oem(written(texts, r, v), "x.oem").segments[0].meta
    assert (meta["START_TIME"], meta["STOP_TIME"]) == (texts[0], texts[-1])


@pytest.mark.parametrize("size_m", [7000 * KM, 42_164 * KM, 40 * AU])
def test_positions_survive_the_trip_to_a_tenth_of_a_metre(size_m: float) -> None:
    # The contract: enough digits for 0.1 m, for an Earth orbit and a body 40 au out.
    texts, r, v = sample(5, size_m)
    seg = parse_oem(written(texts, r, v), "x.oem").segments[0]
    assert np.max(np.abs(seg.r_m - r)) < 0.1
    assert np.max(np.abs(seg.v_m_s - v)) < 1e-5


def test_epochs_are_read_in_the_messages_time_system() -> None:
    texts, r, v = sample(2)
    seg = parse_oem(written(texts, r, v, time_system="TT"), "x.oem").segments[0]
    assert seg.epochs[1] == parse_epoch("2030-01-01T00:01:00 TT")


def test_a_hand_written_file_with_two_segments_parses() -> None:
    # Layout of CCSDS 502.0-B-2 sec. 5 examples: comments, optional metadata, data lines
    # with accelerations, a covariance block (skipped), day-of-year epochs.
    path = DATA / "two_segments.oem"
    oem = parse_oem(path.read_text(), str(path))
    first, second = oem.segments
    assert oem.header["ORIGINATOR"] == "PERIFOCAL TESTS"
    assert len(oem.comments) == 3
    assert first.meta["INTERPOLATION"] == "HERMITE"
    assert first.r_m.shape == (3, 3) and second.r_m.shape == (2, 3)
    assert first.r_m[0] == pytest.approx(np.array([2789.619, -280.045, -1746.755]) * KM)
    assert second.v_m_s[1] == pytest.approx(np.array([5.18604, -2.42124, -1.99608]) * KM)
    # 2030-352 is 18 December (common practice, no source). TT - UTC = 69.184 s
    # (37 leap seconds + 32.184 s; IERS Bulletin C, from memory), so a UTC label is
    # that much later than the same TT label.
    assert second.epochs[0] == parse_epoch("2030-12-18T12:30:00.331 TDB")
    assert first.epochs[0].seconds_since(parse_epoch("2030-12-18T12:00:00.331 TT")) == (
        pytest.approx(69.184, abs=1e-3))


def test_a_bad_data_line_names_its_line() -> None:
    lines = written(*sample(2)).splitlines()
    bad = lines.index("META_STOP") + 3  # the first data line, after a blank line
    lines[bad - 1] = lines[bad - 1].rsplit(" ", 1)[0] + " 1.2.3"
    text = "\n".join(lines)
    with pytest.raises(UserInputError) as info:
        parse_oem(text, "x.oem")
    assert info.value.problems == [f"line {bad}: a data line's values must be finite numbers"]


def test_a_segment_without_its_mandatory_metadata_is_refused() -> None:
    text = written(*sample(2)).replace("REF_FRAME            = EME2000\n", "")
    with pytest.raises(UserInputError) as info:
        parse_oem(text, "x.oem")
    assert any("missing mandatory keyword REF_FRAME" in p for p in info.value.problems)
