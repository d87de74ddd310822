"""Quantities and epochs at the edges, against definitions and published time-scale facts."""

from __future__ import annotations

import math

import pytest
from reference_values import AU, DAY

from viewer.units import EpochError, QuantityError, parse_epoch, parse_quantity

MICROSECOND = 1e-6


@pytest.mark.parametrize(
    ("text", "dimension", "si"),
    [
        ("1.52 au", "length", 1.52 * AU),
        ("7000 km", "length", 7.0e6),
        ("7000km", "length", 7.0e6),
        ("88 d", "time", 88 * DAY),
        ("90 min", "time", 5400.0),
        ("1 yr", "time", 365.25 * DAY),  # Julian year (IAU), exact
        ("12 deg", "angle", math.radians(12.0)),
        ("3600 arcsec", "angle", math.radians(1.0)),
        ("1.32712440018e20 m3/s2", "gm", 1.32712440018e20),
        ("398600.4418 km3/s2", "gm", 3.986004418e14),
        ("398600.4418 km^3/s^2", "gm", 3.986004418e14),
        ("5 d/s", "rate", 5 * DAY),
        ("7.5 km/s", "speed", 7500.0),
    ],
)
def test_quantity_strings_become_si_floats(text: str, dimension: str, si: float) -> None:
    assert parse_quantity(text, dimension) == pytest.approx(si, rel=1e-15)


def test_bare_number_takes_the_default_unit() -> None:
    assert parse_quantity(1.5, "length", "au") == pytest.approx(1.5 * AU, rel=1e-15)
    assert parse_quantity("30", "time", "d") == pytest.approx(30 * DAY, rel=1e-15)


@pytest.mark.parametrize(
    ("value", "dimension", "needle"),
    [
        ("1.5 kg", "length", "unknown unit 'kg'"),
        ("3 d", "length", "is a time, not a length"),
        ("12 km", "angle", "is a length, not an angle"),
        ("fast", "speed", "not a number with a unit"),
        ("nan au", "length", "not a number with a unit"),
        ("1e999 km", "length", "not a finite number"),
        (True, "length", "expected a length"),
        ([1, 2], "length", "expected a length"),
        (7, "length", "has no unit"),
    ],
)
def test_bad_quantities_say_what_is_wrong_and_what_is_allowed(
    value: object, dimension: str, needle: str
) -> None:
    with pytest.raises(QuantityError, match=needle):
        parse_quantity(value, dimension)


def test_epoch_default_scale_is_tdb() -> None:
    assert parse_epoch("2030-01-01T00:00:00").scale == "TDB"
    assert parse_epoch("2030-01-01T00:00:00").iso() == "2030-01-01T00:00:00 TDB"


def test_j2000_is_julian_date_2451545_tt() -> None:
    # J2000.0 = 2000-01-01T12:00:00 TT = JD 2451545.0 TT (IAU definition). |TDB - TT|
    # stays below 2 ms (periodic, amplitude about 1.66 ms, from memory), so the TDB
    # Julian date of that instant is 2451545.0 to within 2 ms.
    e = parse_epoch("2000-01-01T12:00:00 TT")
    assert abs((e.jd1 + e.jd2) - 2451545.0) * DAY < 2e-3


def test_utc_to_tt_offset_after_2017_is_69_184_s() -> None:
    # TAI - UTC = 37 s since 2017-01-01 (IERS Bulletin C 52, from memory) and
    # TT - TAI = 32.184 s (IAU definition): TT - UTC = 69.184 s. TDB - TT < 2 ms.
    utc = parse_epoch("2030-01-01T00:00:00 UTC")
    tt = parse_epoch("2030-01-01T00:00:00 TT")
    assert utc.seconds_since(tt) == pytest.approx(69.184, abs=2e-3)


def test_the_leap_second_at_the_end_of_2016_is_counted() -> None:
    # A leap second was inserted at 2016-12-31T23:59:60 UTC (IERS Bulletin C 52,
    # from memory): 23:59:59 to 00:00:00 spans two SI seconds.
    before = parse_epoch("2016-12-31T23:59:59 UTC")
    leap = parse_epoch("2016-12-31T23:59:60 UTC")
    after = parse_epoch("2017-01-01T00:00:00 UTC")
    assert after.seconds_since(before) == pytest.approx(2.0, abs=MICROSECOND)
    assert after.seconds_since(leap) == pytest.approx(1.0, abs=MICROSECOND)


def test_a_second_of_60_is_refused_on_a_day_without_a_leap_second() -> None:
    with pytest.raises(EpochError, match="has no leap second"):
        parse_epoch("2015-01-01T23:59:60 UTC")


def test_an_epoch_round_trips_through_each_scale() -> None:
    e = parse_epoch("2024-03-01T12:34:56.789 UTC")
    for scale in ("UTC", "TT", "TDB", "TAI"):
        text = e.iso(scale, decimals=3)
        assert text.endswith(scale)
        assert parse_epoch(text).seconds_since(e) == pytest.approx(0.0, abs=1e-3)


@pytest.mark.parametrize(
    ("text", "needle"),
    [
        ("tomorrow", "not an ISO 8601 epoch"),
        ("2030-13-01", "out of range"),
        ("2030-02-30", "has no day 30"),
        ("2030-01-01T00:00:00 XYZ", "unknown time scale 'XYZ'"),
        ("2030-01-01T00:00:60 TT", "exists only in UTC"),
        (20300101, "ISO 8601 text"),
    ],
)
def test_bad_epochs_are_refused_with_a_reason(text: object, needle: str) -> None:
    with pytest.raises(EpochError, match=needle):
        parse_epoch(text)
