"""The Keyword = Value Notation (KVN) of CCSDS Orbit Data Messages, line by line.

CCSDS 502.0-B (Orbit Data Messages), sec. 7 "KVN syntax": one ``KEYWORD = value`` per
line, optionally followed by its unit in square brackets (``X = 6655.9942 [km]``), which
is informative but, when given, must be the unit the standard fixes for the keyword;
``COMMENT`` lines carry free text; blank lines are allowed; keywords are upper case.
Epochs are ``YYYY-MM-DDThh:mm:ss[.d...][Z]`` or ``YYYY-DDDThh:mm:ss[.d...][Z]``.

Everything here collects problems ("line 12: X: ...") instead of stopping at the
first, so a file's errors can all be shown at once.
"""

from __future__ import annotations

import datetime as _dt
import difflib
import re
from dataclasses import dataclass

from ..units import Epoch, EpochError, parse_epoch

#: Time systems we can turn into an Epoch (the others of the standard, such as GPS, UT1
#: or MET, are refused with this list in the message).
TIME_SYSTEMS = ("UTC", "TAI", "TT", "TDB")

_LINE = re.compile(r"^\s*([A-Za-z][A-Za-z0-9_]*)\s*=\s*(.*?)\s*$")
_UNIT = re.compile(r"^(.*?)\s*\[([^\]]*)\]\s*$")
_NUMBER = re.compile(r"^[+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?$")
_CAL = re.compile(r"^(\d{4})-(\d{2})-(\d{2})T(\d{2}):(\d{2}):(\d{2}(?:\.\d*)?)Z?$")
_DOY = re.compile(r"^(\d{4})-(\d{3})T(\d{2}):(\d{2}):(\d{2}(?:\.\d*)?)Z?$")


@dataclass(frozen=True)
class KvnLine:
    """One non-blank line: ``keyword`` (``COMMENT`` for comments, ``None`` for a data line
    of an ephemeris), its ``value`` text, the ``unit`` in brackets if any, the 1-based
    line ``number`` and the ``raw`` text."""

    number: int
    keyword: str | None
    value: str
    unit: str | None
    raw: str


def split_lines(text: str, problems: list[str]) -> list[KvnLine]:
    """Every non-blank line as a KvnLine. Lines that are neither ``KEYWORD = value``,
    ``COMMENT ...`` nor a bare data line (starting with a digit) go to ``problems``."""
    out: list[KvnLine] = []
    for n, raw in enumerate(text.splitlines(), start=1):
        s = raw.strip()
        if not s:
            continue
        if s == "COMMENT" or s.startswith("COMMENT ") or s.startswith("COMMENT\t"):
            out.append(KvnLine(n, "COMMENT", s[7:].strip(), None, raw))
            continue
        m = _LINE.match(s)
        if m:
            keyword, value = m.group(1), m.group(2)
            unit = None
            u = _UNIT.match(value)
            if u:
                value, unit = u.group(1).strip(), u.group(2).strip()
            out.append(KvnLine(n, keyword, value, unit, raw))
        elif s[0].isdigit() or s in ("META_START", "META_STOP", "COVARIANCE_START",
                                     "COVARIANCE_STOP"):
            out.append(KvnLine(n, None, s, None, raw))
        else:
            problems.append(f"line {n}: expected 'KEYWORD = value' or 'COMMENT text', "
                            f"got {_short(s)!r}")
    return out


def _short(s: str, n: int = 60) -> str:
    return s if len(s) <= n else s[: n - 3] + "..."


def by_line(problems: list[str]) -> list[str]:
    """Problems in file order: those starting "line N:" sorted by N (stable)."""
    def key(p: str) -> int:
        m = re.match(r"line (\d+):", p)
        return int(m.group(1)) if m else 0

    return sorted(problems, key=key)


def did_you_mean(word: str, known: list[str] | tuple[str, ...]) -> str:
    """' (did you mean X?)' for the closest known word, or ''."""
    close = difflib.get_close_matches(word.upper(), known, n=1, cutoff=0.6)
    return f" (did you mean {close[0]}?)" if close else ""


def parse_number(line: KvnLine, problems: list[str]) -> float | None:
    """The value as a float, or None with a problem naming the keyword and line."""
    text = line.value
    if not _NUMBER.match(text):
        problems.append(f"line {line.number}: {line.keyword}: {_short(text)!r} is not a number "
                        f"(write e.g. 6655.9942 or -1.5e3)")
        return None
    return float(text)


def check_unit(line: KvnLine, allowed: str | None, problems: list[str]) -> None:
    """A unit in brackets must be the standard's unit for the keyword (case-insensitive)."""
    if line.unit is None:
        return
    if allowed is None:
        problems.append(f"line {line.number}: {line.keyword}: unit [{line.unit}] given, but "
                        f"{line.keyword} has no unit in CCSDS 502.0-B")
    elif line.unit.replace(" ", "").lower() != allowed.lower():
        problems.append(f"line {line.number}: {line.keyword}: unknown unit [{line.unit}]; "
                        f"CCSDS 502.0-B gives {line.keyword} in [{allowed}]")


def ccsds_epoch_to_iso(text: str) -> str | None:
    """'YYYY-MM-DDThh:mm:ss.fff' for either CCSDS epoch form, or None if it is neither."""
    s = text.strip()
    m = _CAL.match(s)
    if m:
        return s.rstrip("Z")
    m = _DOY.match(s)
    if m:
        year, doy = int(m.group(1)), int(m.group(2))
        if not 1 <= doy <= (366 if _leap(year) else 365):
            return None
        day = _dt.date(year, 1, 1) + _dt.timedelta(days=doy - 1)
        return f"{day.isoformat()}T{m.group(3)}:{m.group(4)}:{m.group(5)}"
    return None


def _leap(year: int) -> bool:
    return year % 4 == 0 and (year % 100 != 0 or year % 400 == 0)


def parse_ccsds_epoch(line: KvnLine, time_system: str | None, problems: list[str],
                      text: str | None = None) -> Epoch | None:
    """An Epoch from a CCSDS epoch value in ``time_system``, or None with a problem."""
    raw = line.value if text is None else text
    where = f"line {line.number}: {line.keyword or 'epoch'}"
    iso = ccsds_epoch_to_iso(raw)
    if iso is None:
        problems.append(f"{where}: {_short(raw)!r} is not a CCSDS epoch; write "
                        f"YYYY-MM-DDThh:mm:ss.sss or YYYY-DDDThh:mm:ss.sss")
        return None
    # An unsupported TIME_SYSTEM has its own problem; still check the date itself.
    given = f"{iso} {time_system if time_system in TIME_SYSTEMS else 'TDB'}"
    try:
        epoch = parse_epoch(given)
    except EpochError as err:
        problems.append(f"{where}: {str(err).replace(repr(given), repr(raw))}")
        return None
    return epoch if time_system in TIME_SYSTEMS else None


def check_time_system(line: KvnLine, problems: list[str]) -> str | None:
    """The TIME_SYSTEM value if we can read it, else None with a problem."""
    value = line.value.strip().upper()
    if value in TIME_SYSTEMS:
        return value
    problems.append(f"line {line.number}: TIME_SYSTEM = {_short(line.value)!r} is not "
                    f"supported; Perifocal reads {', '.join(TIME_SYSTEMS)}")
    return None


def format_epoch(epoch: Epoch, scale: str, decimals: int = 3) -> str:
    """A CCSDS epoch 'YYYY-MM-DDThh:mm:ss.sss' of ``epoch`` shown in ``scale``."""
    return epoch.iso(scale, decimals).rsplit(" ", 1)[0]


def kvn(keyword: str, value: str, unit: str | None = None, width: int = 20) -> str:
    """One KVN line, keywords padded so the '=' signs line up."""
    text = f"{keyword:<{width}} = {value}"
    return f"{text} [{unit}]" if unit else text


def header_lines(version_keyword: str, comments: list[str] | tuple[str, ...],
                 creation_date: str, originator: str) -> list[str]:
    """The header of a message: its version line (2.0), COMMENT lines, creation date and
    originator, then a blank line."""
    out = [kvn(version_keyword, "2.0")]
    out += comment_lines("\n".join(comments)) if comments else []
    return out + [kvn("CREATION_DATE", creation_date), kvn("ORIGINATOR", originator), ""]


def comment_lines(text: str) -> list[str]:
    """``COMMENT`` lines for free text (one per line of ``text``)."""
    return [f"COMMENT {line}".rstrip() for line in text.splitlines()] or ["COMMENT"]


def creation_date_now() -> str:
    """The current UTC time as a CCSDS epoch (for CREATION_DATE)."""
    now = _dt.datetime.now(_dt.UTC)
    return now.strftime("%Y-%m-%dT%H:%M:%S.") + f"{now.microsecond // 1000:03d}"
