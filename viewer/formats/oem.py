"""CCSDS Orbit Ephemeris Messages (OEM) in KVN: write, and parse (for tests and round trips).

CCSDS 502.0-B (Orbit Data Messages), sec. 5 "Orbit Ephemeris Message". An OEM is a
header (CCSDS_OEM_VERS, CREATION_DATE, ORIGINATOR) and one or more segments, each a
metadata block between META_START and META_STOP (OBJECT_NAME, OBJECT_ID, CENTER_NAME,
REF_FRAME, TIME_SYSTEM, START_TIME, STOP_TIME, optional USEABLE_START_TIME,
USEABLE_STOP_TIME, INTERPOLATION, INTERPOLATION_DEGREE, REF_FRAME_EPOCH) followed by data
lines "epoch x y z vx vy vz [ax ay az]" in km, km/s (and km/s**2), and optionally a
covariance block between COVARIANCE_START and COVARIANCE_STOP (skipped here).

SI inside: positions in metres, velocities in m/s.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np

from ..errors import UserInputError
from ..units import Epoch
from .kvn import (
    KvnLine,
    by_line,
    check_time_system,
    did_you_mean,
    header_lines,
    kvn,
    parse_ccsds_epoch,
    split_lines,
)

KM = 1e3
META = ("OBJECT_NAME", "OBJECT_ID", "CENTER_NAME", "REF_FRAME", "REF_FRAME_EPOCH",
        "TIME_SYSTEM", "START_TIME", "USEABLE_START_TIME", "USEABLE_STOP_TIME", "STOP_TIME",
        "INTERPOLATION", "INTERPOLATION_DEGREE")
META_REQUIRED = ("OBJECT_NAME", "OBJECT_ID", "CENTER_NAME", "REF_FRAME", "TIME_SYSTEM",
                 "START_TIME", "STOP_TIME")


@dataclass(frozen=True)
class OemSegment:
    """One segment: its metadata (keyword -> value text), the data lines' epoch texts as
    written, their Epochs, positions ``r_m`` (N, 3) in m and velocities ``v_m_s`` (N, 3)
    in m/s, and the COMMENT lines of the segment."""

    meta: dict[str, str]
    epoch_texts: tuple[str, ...]
    epochs: tuple[Epoch, ...]
    r_m: np.ndarray
    v_m_s: np.ndarray
    comments: tuple[str, ...] = ()


@dataclass(frozen=True)
class Oem:
    """A parsed OEM: the header (keyword -> value text), header comments and segments."""

    header: dict[str, str]
    comments: tuple[str, ...]
    segments: tuple[OemSegment, ...]


def write_oem(
    *, object_name: str, object_id: str, center_name: str, ref_frame: str, time_system: str,
    epoch_texts: Sequence[str], r_m: np.ndarray, v_m_s: np.ndarray, creation_date: str,
    originator: str = "Perifocal", comments: Sequence[str] = (),
) -> str:
    """An OEM (version 2.0, KVN) of one segment.

    ``epoch_texts`` are CCSDS epochs already formatted in ``time_system``; the first and
    last become START_TIME and STOP_TIME. Positions are written in km with 6 decimals
    (1 mm) and velocities in km/s with 9 decimals (1 um/s), so 0.1 m survives the trip
    whatever the size of the orbit.
    """
    r = np.asarray(r_m, dtype=np.float64) / KM
    v = np.asarray(v_m_s, dtype=np.float64) / KM
    if r.shape != v.shape or r.ndim != 2 or r.shape[1] != 3 or len(epoch_texts) != len(r):
        raise ValueError("epoch_texts, r_m and v_m_s must have N, (N, 3) and (N, 3) entries")
    if len(r) == 0:
        raise ValueError("an OEM needs at least one data line")
    out = header_lines("CCSDS_OEM_VERS", list(comments), creation_date, originator)
    out += ["META_START",
            kvn("OBJECT_NAME", object_name), kvn("OBJECT_ID", object_id),
            kvn("CENTER_NAME", center_name), kvn("REF_FRAME", ref_frame),
            kvn("TIME_SYSTEM", time_system), kvn("START_TIME", epoch_texts[0]),
            kvn("STOP_TIME", epoch_texts[-1]),
            "META_STOP", ""]
    out += [f"{t} {x[0]:.6f} {x[1]:.6f} {x[2]:.6f} {w[0]:.9f} {w[1]:.9f} {w[2]:.9f}"
            for t, x, w in zip(epoch_texts, r, v, strict=True)]
    return "\n".join(out) + "\n"


def parse_oem(text: str, source: str) -> Oem:
    """Read an OEM in KVN; UserInputError(source, problems) lists every problem by line."""
    problems: list[str] = []
    lines = split_lines(text, problems)
    header: dict[str, str] = {}
    header_comments: list[str] = []
    segments: list[OemSegment] = []
    i = 0
    while i < len(lines) and lines[i].value != "META_START":
        ln = lines[i]
        if ln.keyword == "COMMENT":
            header_comments.append(ln.value)
        elif ln.keyword in ("CCSDS_OEM_VERS", "CREATION_DATE", "ORIGINATOR", "MESSAGE_ID"):
            header[ln.keyword] = ln.value
        else:
            problems.append(f"line {ln.number}: {ln.keyword or ln.value[:30]!r} does not "
                            f"belong in the OEM header")
        i += 1
    for kw in ("CCSDS_OEM_VERS", "CREATION_DATE", "ORIGINATOR"):
        if kw not in header:
            problems.append(f"line {lines[i - 1].number if i else 1}: missing mandatory "
                            f"keyword {kw} (header)")
    if i == len(lines):
        problems.append(f"line {lines[-1].number if lines else 1}: no META_START: an OEM "
                        f"needs at least one segment")
    while i < len(lines):
        i = _segment(lines, i, segments, problems)
    if problems:
        raise UserInputError(source, by_line(problems))
    return Oem(header, tuple(header_comments), tuple(segments))


def _segment(lines: list[KvnLine], i: int, segments: list[OemSegment],
             problems: list[str]) -> int:
    """Read one segment starting at META_START (lines[i]); the index after it."""
    start = lines[i]
    if start.value != "META_START":
        problems.append(f"line {start.number}: expected META_START")
        return len(lines)
    meta: dict[str, KvnLine] = {}
    comments: list[str] = []
    i += 1
    while i < len(lines) and lines[i].value != "META_STOP":
        ln = lines[i]
        if ln.keyword == "COMMENT":
            comments.append(ln.value)
        elif ln.keyword in META:
            meta[ln.keyword] = ln
        else:
            name = ln.keyword or ln.value[:30]
            problems.append(f"line {ln.number}: {name!r} is not an OEM metadata keyword"
                            f"{did_you_mean(ln.keyword, META) if ln.keyword else ''}")
        i += 1
    if i == len(lines):
        problems.append(f"line {start.number}: META_START without META_STOP")
        return i
    stop_line = lines[i].number
    for kw in META_REQUIRED:
        if kw not in meta:
            problems.append(f"line {stop_line}: missing mandatory keyword {kw} (metadata)")
    scale = check_time_system(meta["TIME_SYSTEM"], problems) if "TIME_SYSTEM" in meta else None
    i += 1
    texts: list[str] = []
    epochs: list[Epoch] = []
    states: list[list[float]] = []
    in_cov = False
    while i < len(lines) and lines[i].value != "META_START":
        ln = lines[i]
        i += 1
        if ln.value == "COVARIANCE_START":
            in_cov = True
        elif ln.value == "COVARIANCE_STOP":
            in_cov = False
        elif in_cov:
            continue
        elif ln.keyword == "COMMENT":
            comments.append(ln.value)
        elif ln.keyword is not None:
            problems.append(f"line {ln.number}: {ln.keyword} outside a metadata block")
        else:
            _data_line(ln, scale, texts, epochs, states, problems)
    if not texts:
        problems.append(f"line {stop_line}: the segment has no data lines")
    arr = np.array(states, dtype=np.float64).reshape(-1, 6) * KM
    segments.append(OemSegment({k: ln.value for k, ln in meta.items()}, tuple(texts),
                               tuple(epochs), arr[:, :3], arr[:, 3:], tuple(comments)))
    return i


def _data_line(ln: KvnLine, scale: str | None, texts: list[str], epochs: list[Epoch],
               states: list[list[float]], problems: list[str]) -> None:
    fields = ln.value.split()
    if len(fields) not in (7, 10):
        problems.append(f"line {ln.number}: a data line is an epoch and 6 numbers "
                        f"(x y z vx vy vz, optionally ax ay az), got {len(fields)} fields")
        return
    try:
        numbers = [float(f) for f in fields[1:7]]
    except ValueError:
        numbers = []
    if len(numbers) != 6 or not np.all(np.isfinite(numbers)):
        problems.append(f"line {ln.number}: a data line's values must be finite numbers")
        return
    epoch = parse_ccsds_epoch(ln, scale, problems, text=fields[0])
    if epoch is None:
        return
    texts.append(fields[0])
    epochs.append(epoch)
    states.append(numbers)
