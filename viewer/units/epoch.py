"""Epochs: ISO 8601 text with a time-scale suffix, held as a two-part TDB Julian date.

"2030-01-01T00:00:00 TDB", "2024-03-01T12:00:00.5 UTC", "2000-01-01 12:00 TT"; no suffix
means TDB. UTC goes through the leap-second table of the IAU SOFA library (via pyerfa):
UTC -> TAI (leap seconds) -> TT (+32.184 s) -> TDB (the periodic terms of
erfa.dtdb at the geocentre). A second of 60 is allowed on a leap-second day only.

pyerfa warns "dubious year" for UTC dates past its table's horizon: no leap second has
been announced after 2016-12-31 (IERS Bulletin C, from memory), and we take none to come.
"""

from __future__ import annotations

import functools
import math
import re
import warnings
from dataclasses import dataclass

DAY_S = 86_400.0
SCALES = ("TDB", "TT", "UTC", "TAI")
_ISO = re.compile(
    r"^\s*(\d{4})-(\d{2})-(\d{2})(?:[T ](\d{2}):(\d{2})(?::(\d{2}(?:\.\d*)?))?)?"
    r"\s*(?:Z|([A-Za-z]{2,3}))?\s*$"
)


#: UTC dates before this year are refused: the IAU SOFA leap-second table (via pyerfa)
#: starts on 1960-01-01, before which UTC was not defined (SOFA's iau_DAT notes).
FIRST_UTC_YEAR = 1960


#: Julian dates of 0001-01-01T00:00 and 10000-01-01T00:00 (proleptic Gregorian; erfa.cal2jd).
CALENDAR_JD = (1721425.5, 5373484.5)


class EpochError(ValueError):
    """Text that is not an ISO 8601 epoch with a known time scale."""


def _erfa():  # imported on first use, so that importing viewer.units stays cheap
    import erfa

    return erfa


#: Epochs are equal when they fall in the same nanosecond of TDB: far below a microsecond,
#: and far above the 20 ps rounding of a two-part Julian date.
_TICKS_PER_DAY = 86_400 * 10**9


@functools.total_ordering
@dataclass(frozen=True, eq=False)
class Epoch:
    """An instant as a two-part TDB Julian date (jd1 + jd2 days) and the scale to show it in.

    Equality, order and hash are those of the instant, to the nanosecond: the split of the
    Julian date into two parts and the display scale play no part (``Epoch(2451545.0, 0.5)
    == Epoch(2451545.5, 0.0, "UTC")``).
    """

    jd1: float
    jd2: float
    scale: str = "TDB"

    def instant(self) -> tuple[int, int] | tuple[float, int]:
        """(whole TDB Julian day, nanoseconds into it): the key of equality and order."""
        if not (math.isfinite(self.jd1) and math.isfinite(self.jd2)):
            return (self.jd1 + self.jd2, 0)
        d1, d2 = math.floor(self.jd1), math.floor(self.jd2)
        ticks = round(((self.jd1 - d1) + (self.jd2 - d2)) * _TICKS_PER_DAY)
        days, ticks = divmod(ticks, _TICKS_PER_DAY)
        return (int(d1 + d2 + days), int(ticks))

    def __eq__(self, other: object) -> bool:
        if not isinstance(other, Epoch):
            return NotImplemented
        return self.instant() == other.instant()

    def __lt__(self, other: object) -> bool:
        if not isinstance(other, Epoch):
            return NotImplemented
        return self.instant() < other.instant()

    def __hash__(self) -> int:
        return hash(self.instant())

    def seconds_since(self, other: Epoch) -> float:
        """TDB seconds from ``other`` to this epoch (positive if this one is later)."""
        return ((self.jd1 - other.jd1) + (self.jd2 - other.jd2)) * DAY_S

    def plus_seconds(self, seconds: float) -> Epoch:
        """This epoch moved by ``seconds`` of TDB, keeping the scale it is shown in."""
        return Epoch(self.jd1, self.jd2 + seconds / DAY_S, self.scale)

    def in_scale(self, scale: str) -> Epoch:
        """The same instant, to be shown in another scale."""
        scale = scale.upper()
        if scale not in SCALES:
            raise EpochError(f"unknown time scale {scale!r}; allowed: {', '.join(SCALES)}")
        return Epoch(self.jd1, self.jd2, scale)

    def iso(self, scale: str | None = None, decimals: int = 0) -> str:
        """ISO 8601 text "YYYY-MM-DDThh:mm:ss[.fff] SCALE" in ``scale`` (default: its own)."""
        scale = (scale or self.scale).upper()
        if not self.in_calendar():
            return f"JD {self.jd1 + self.jd2:.9g} TDB"  # no four-digit year to show it in
        erfa = _erfa()
        with warnings.catch_warnings():
            warnings.simplefilter("ignore", erfa.ErfaWarning)
            j1, j2 = _from_tdb(self.jd1, self.jd2, scale)
            y, mo, d, (h, mi, s, f) = erfa.d2dtf(scale if scale == "UTC" else "", decimals, j1, j2)
        text = f"{int(y):04d}-{int(mo):02d}-{int(d):02d}T{int(h):02d}:{int(mi):02d}:{int(s):02d}"
        if decimals > 0:
            text += f".{int(f):0{decimals}d}"
        return f"{text} {scale}"

    def in_calendar(self) -> bool:
        """Whether the instant falls in years 1 to 9999 (ISO 8601 and CCSDS four-digit
        years), where ``iso`` can write it as a date."""
        return CALENDAR_JD[0] <= self.jd1 + self.jd2 < CALENDAR_JD[1]

    def __str__(self) -> str:
        return self.iso()


def _to_tdb(scale: str, j1: float, j2: float) -> tuple[float, float]:
    erfa = _erfa()
    if scale == "UTC":
        j1, j2 = erfa.utctai(j1, j2)
        scale = "TAI"
    if scale == "TAI":
        j1, j2 = erfa.taitt(j1, j2)
        scale = "TT"
    if scale == "TT":
        dtr = _tdb_minus_tt(j1, j2)
        return erfa.tttdb(j1, j2, dtr)
    return j1, j2


def _from_tdb(j1: float, j2: float, scale: str) -> tuple[float, float]:
    erfa = _erfa()
    if scale == "TDB":
        return j1, j2
    # TDB - TT is the same function of either scale to far below a microsecond.
    j1, j2 = erfa.tdbtt(j1, j2, _tdb_minus_tt(j1, j2))
    if scale == "TT":
        return j1, j2
    j1, j2 = erfa.tttai(j1, j2)
    if scale == "TAI":
        return j1, j2
    return erfa.taiutc(j1, j2)


def _tdb_minus_tt(j1: float, j2: float) -> float:
    """TDB - TT in seconds at the geocentre (erfa.dtdb with zero site terms)."""
    erfa = _erfa()
    return float(erfa.dtdb(j1, j2, 0.0, 0.0, 0.0, 0.0))


def parse_epoch(text: object) -> Epoch:
    """An Epoch from ISO 8601 text with an optional scale suffix (TDB when none).

    Raises EpochError saying what is wrong and what is allowed.
    """
    if not isinstance(text, str):
        raise EpochError(
            f"an epoch is ISO 8601 text such as \"2030-01-01T00:00:00 TDB\", got {text!r}")
    m = _ISO.match(text)
    if not m:
        raise EpochError(
            f"{text!r} is not an ISO 8601 epoch; write e.g. \"2030-01-01T00:00:00 TDB\" "
            f"(scales: {', '.join(SCALES)}; TDB when none)")
    y, mo, d = int(m.group(1)), int(m.group(2)), int(m.group(3))
    h = int(m.group(4) or 0)
    mi = int(m.group(5) or 0)
    s = float(m.group(6) or 0.0)
    zulu = m.group(7) is None and text.strip().endswith("Z")
    scale = "UTC" if zulu else (m.group(7) or "TDB").upper()
    if scale not in SCALES:
        raise EpochError(f"{text!r}: unknown time scale {m.group(7)!r}; allowed: "
                         f"{', '.join(SCALES)}")
    if scale == "UTC" and y < FIRST_UTC_YEAR:
        raise EpochError(
            f"{text!r}: UTC begins in {FIRST_UTC_YEAR} (the leap-second table starts there), "
            f"so an earlier UTC date cannot be converted; write it in TT or TDB instead, e.g. "
            f"\"{y:04d}-{mo:02d}-{d:02d}T{h:02d}:{mi:02d}:{int(s):02d} TT\" (converted from "
            f"the time scale your source uses)")
    erfa = _erfa()
    if not (1 <= mo <= 12 and 1 <= d <= 31 and h <= 23 and mi <= 59 and s < 61.0):
        raise EpochError(f"{text!r}: a field is out of range (allowed: month 1-12, day 1-31, "
                         f"hour 0-23, minute 0-59, second 0-59, 60 on a leap second)")
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", erfa.ErfaWarning)
        try:
            j1, j2 = erfa.dtf2d(scale if scale == "UTC" else "", y, mo, d, h, mi, s)
        except erfa.ErfaError:
            raise EpochError(f"{text!r}: {y:04d}-{mo:02d} has no day {d}") from None
        if s >= 60.0 and scale != "UTC":
            raise EpochError(f"{text!r}: second 60 exists only in UTC, on a leap-second day")
        if s >= 60.0:
            # A second of 60 is valid only if TAI-UTC steps up at the end of this day.
            j0, j1d = erfa.cal2jd(y, mo, d)
            ny, nmo, nd, _ = erfa.jd2cal(j0, j1d + 1.0)
            if erfa.dat(ny, nmo, nd, 0.5) - erfa.dat(y, mo, d, 0.5) != 1.0:
                raise EpochError(f"{text!r}: {y:04d}-{mo:02d}-{d:02d} has no leap second")
        tdb = _to_tdb(scale, float(j1), float(j2))
    return Epoch(float(tdb[0]), float(tdb[1]), scale)
