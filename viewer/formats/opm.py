"""CCSDS Orbit Parameter Messages (OPM) in KVN: parse and write.

CCSDS 502.0-B (Orbit Data Messages), sec. 3 "Orbit Parameter Message". An OPM holds one
state at one epoch: a header (CCSDS_OPM_VERS, CREATION_DATE, ORIGINATOR), metadata
(OBJECT_NAME, OBJECT_ID, CENTER_NAME, REF_FRAME, TIME_SYSTEM, ...) and data: the state
vector (EPOCH, X Y Z [km], X_DOT Y_DOT Z_DOT [km/s]), optionally osculating Keplerian
elements (SEMI_MAJOR_AXIS [km], ECCENTRICITY, INCLINATION, RA_OF_ASC_NODE,
ARG_OF_PERICENTER [deg], TRUE_ANOMALY or MEAN_ANOMALY [deg], GM [km**3/s**2]), and
optional spacecraft, covariance and manoeuvre blocks, which are kept but not used.

The standard makes the state vector mandatory; we also read a message that gives the
Keplerian elements instead (and then the epoch alone of the state-vector block). GM is
optional here: without it the centre's catalogue value is used. Values are SI inside:
``r_m`` in metres, ``v_m_s`` in m/s, angles in radians, ``gm_m3_s2`` in m^3/s^2.
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from ..errors import UserInputError
from ..units import Epoch
from ..units.limits import limit_problem
from .kvn import (
    KvnLine,
    by_line,
    check_time_system,
    check_unit,
    did_you_mean,
    format_epoch,
    header_lines,
    kvn,
    parse_ccsds_epoch,
    parse_number,
    split_lines,
)

DEG = np.pi / 180.0
KM = 1e3

HEADER = ("CCSDS_OPM_VERS", "CREATION_DATE", "ORIGINATOR", "MESSAGE_ID")
METADATA = ("OBJECT_NAME", "OBJECT_ID", "CENTER_NAME", "REF_FRAME", "REF_FRAME_EPOCH",
            "TIME_SYSTEM")
STATE = ("EPOCH", "X", "Y", "Z", "X_DOT", "Y_DOT", "Z_DOT")
KEPLER = ("SEMI_MAJOR_AXIS", "ECCENTRICITY", "INCLINATION", "RA_OF_ASC_NODE",
          "ARG_OF_PERICENTER", "TRUE_ANOMALY", "MEAN_ANOMALY", "GM")
SPACECRAFT = ("MASS", "SOLAR_RAD_AREA", "SOLAR_RAD_COEFF", "DRAG_AREA", "DRAG_COEFF")
_COV_AXES = ("X", "Y", "Z", "X_DOT", "Y_DOT", "Z_DOT")
COVARIANCE = ("COV_REF_FRAME",) + tuple(
    f"C{_COV_AXES[i]}_{_COV_AXES[j]}" for i in range(6) for j in range(i + 1))
MANEUVER = ("MAN_EPOCH_IGNITION", "MAN_DURATION", "MAN_DELTA_MASS", "MAN_REF_FRAME",
            "MAN_DV_1", "MAN_DV_2", "MAN_DV_3")
KNOWN = HEADER + METADATA + STATE + KEPLER + SPACECRAFT + COVARIANCE + MANEUVER

#: The unit each keyword is given in by CCSDS 502.0-B (None: a bare number or text).
UNITS: dict[str, str | None] = {
    "X": "km", "Y": "km", "Z": "km", "X_DOT": "km/s", "Y_DOT": "km/s", "Z_DOT": "km/s",
    "SEMI_MAJOR_AXIS": "km", "ECCENTRICITY": None, "INCLINATION": "deg",
    "RA_OF_ASC_NODE": "deg", "ARG_OF_PERICENTER": "deg", "TRUE_ANOMALY": "deg",
    "MEAN_ANOMALY": "deg", "GM": "km**3/s**2", "MASS": "kg", "SOLAR_RAD_AREA": "m**2",
    "SOLAR_RAD_COEFF": None, "DRAG_AREA": "m**2", "DRAG_COEFF": None, "MAN_DURATION": "s",
    "MAN_DELTA_MASS": "kg", "MAN_DV_1": "km/s", "MAN_DV_2": "km/s", "MAN_DV_3": "km/s",
}
for _k in COVARIANCE[1:]:
    _n_dot = _k.count("DOT")
    UNITS[_k] = ("km**2", "km**2/s", "km**2/s**2")[_n_dot]

_NUMERIC = set(UNITS)
#: Keywords held to the limits every value obeys (viewer.units.limits): dimension and
#: factor from the keyword's unit to SI.
_LIMITED = {**{k: ("length", 1e3) for k in ("X", "Y", "Z", "SEMI_MAJOR_AXIS")},
            **{k: ("speed", 1e3) for k in ("X_DOT", "Y_DOT", "Z_DOT")},
            "ECCENTRICITY": ("dimensionless", 1.0), "GM": ("gm", 1e9),
            **{k: ("angle", 0.017453292519943295) for k in (
                "INCLINATION", "RA_OF_ASC_NODE", "ARG_OF_PERICENTER", "TRUE_ANOMALY",
                "MEAN_ANOMALY")}}
#: Frames that rotate with the Earth (CCSDS SANA reference-frame list): two-body
#: propagation in them is wrong, so they are refused on import.
ROTATING_FRAMES = ("ITRF", "ITRF-93", "ITRF-97", "ITRF2000", "ITRF2005", "ITRF2008",
                   "ITRF2014", "ITRF2020", "GRC", "TDR", "GTOD")


@dataclass(frozen=True)
class Comment:
    """A COMMENT line: its text, its 1-based line number and the section it sits in."""

    line: int
    text: str
    section: str


@dataclass(frozen=True)
class Keplerian:
    """The optional osculating Keplerian elements (SI units, radians).

    Exactly one of ``nu`` (true anomaly) and ``M`` (mean anomaly) is set; ``gm_m3_s2``
    is the message's GM or None.
    """

    a_m: float
    e: float
    i: float
    raan: float
    argp: float
    nu: float | None
    M: float | None
    gm_m3_s2: float | None


@dataclass(frozen=True)
class Opm:
    """A parsed OPM: header and metadata text, the epoch, the state vector (or None) and
    the Keplerian elements (or None), every COMMENT, the keywords that the two-body
    model does not use (``unused``: keyword, value text, line), and the line of each
    keyword (``lines``) for messages that point back into the file."""

    version: str
    creation_date: str
    originator: str
    object_name: str
    object_id: str
    center_name: str
    ref_frame: str
    time_system: str
    epoch_text: str
    epoch: Epoch
    r_m: np.ndarray | None
    v_m_s: np.ndarray | None
    keplerian: Keplerian | None
    comments: tuple[Comment, ...] = ()
    unused: tuple[tuple[str, str, int], ...] = ()
    lines: dict[str, int] = field(default_factory=dict)
    ref_frame_epoch: str | None = None

    @property
    def gm_m3_s2(self) -> float | None:
        """GM given by the message (Keplerian block), m^3/s^2, or None."""
        return None if self.keplerian is None else self.keplerian.gm_m3_s2

    def state(self, mu: float | None = None) -> tuple[np.ndarray, np.ndarray]:
        """Position (m) and velocity (m/s) at the epoch: the state vector if the message
        has one, else from the Keplerian elements with the message's GM (or ``mu``)."""
        if self.r_m is not None and self.v_m_s is not None:
            return self.r_m.copy(), self.v_m_s.copy()
        from ..orbit import Elements, state_from_elements, true_from_mean

        k = self.keplerian
        assert k is not None
        gm = k.gm_m3_s2 if k.gm_m3_s2 is not None else mu
        if gm is None:
            raise ValueError("the message gives no GM; pass mu")
        if k.nu is not None:
            nu = k.nu
        else:
            assert k.M is not None  # a Keplerian block has one anomaly or the other
            nu = float(true_from_mean(k.M, k.e))
        return state_from_elements(Elements(k.a_m, k.e, k.i, k.raan, k.argp, nu, gm))


def parse_opm(text: str, source: str) -> Opm:
    """Read an OPM in KVN. Raises UserInputError(source, problems) listing every problem
    (each names its line and keyword): malformed lines, unknown or repeated keywords,
    bad numbers, units other than the standard's, bad epochs, unsupported time systems,
    missing mandatory keywords, impossible elements."""
    problems: list[str] = []
    lines = split_lines(text, problems)
    values: dict[str, KvnLine] = {}
    comments: list[Comment] = []
    unused: list[tuple[str, str, int]] = []
    section = "header"
    first_keyword = True
    pending: list[KvnLine] = []
    for ln in lines:
        if ln.keyword is None:
            problems.append(f"line {ln.number}: {ln.value[:40]!r} is not a KVN line of an OPM "
                            f"(data lines and META_START belong in an OEM)")
            continue
        if ln.keyword == "COMMENT":
            pending.append(ln)
            continue
        kw = ln.keyword
        if first_keyword and kw != "CCSDS_OPM_VERS":
            problems.append(f"line {ln.number}: an OPM begins with CCSDS_OPM_VERS, got {kw}")
        first_keyword = False
        # A block's comments come at its start: they belong to the next keyword's block.
        section = _section_of(kw, section)
        comments += [Comment(c.number, c.value, section) for c in pending]
        pending.clear()
        if kw not in KNOWN and not kw.startswith("USER_DEFINED_"):
            problems.append(f"line {ln.number}: unknown keyword {kw}{did_you_mean(kw, KNOWN)}")
            continue
        if kw in MANEUVER or kw.startswith("USER_DEFINED_"):
            unused.append((kw, ln.value, ln.number))  # manoeuvres repeat, one block each
            continue
        if kw in values:
            problems.append(f"line {ln.number}: {kw} given twice (first at line "
                            f"{values[kw].number})")
            continue
        if not ln.value:
            problems.append(f"line {ln.number}: {kw} has no value")
            continue
        values[kw] = ln
        if kw in SPACECRAFT or kw in COVARIANCE:
            unused.append((kw, ln.value, ln.number))
    comments += [Comment(c.number, c.value, section) for c in pending]
    return _build(values, comments, unused, lines, problems, source)


def _section_of(kw: str, current: str) -> str:
    if kw in HEADER:
        return "header"
    if kw in METADATA:
        return "metadata"
    if kw in STATE:
        return "state vector"
    if kw in KEPLER:
        return "keplerian elements"
    return current if kw.startswith("USER_DEFINED_") else "other data"


def _missing(values: dict[str, KvnLine], wanted: tuple[str, ...], block: tuple[str, ...],
             label: str, lines: list[KvnLine], problems: list[str]) -> None:
    """A problem for each absent keyword of ``wanted``, naming the last line of its block
    (or the file's last line when the whole block is absent)."""
    present = [ln.number for k, ln in values.items() if k in block]
    where = max(present) if present else (lines[-1].number if lines else 1)
    for kw in wanted:
        if kw not in values:
            problems.append(f"line {where}: missing mandatory keyword {kw} ({label})")


def _build(values: dict[str, KvnLine], comments: list[Comment],
           unused: list[tuple[str, str, int]], lines: list[KvnLine], problems: list[str],
           source: str) -> Opm:
    _missing(values, ("CCSDS_OPM_VERS", "CREATION_DATE", "ORIGINATOR"), HEADER, "header",
             lines, problems)
    _missing(values, ("OBJECT_NAME", "OBJECT_ID", "CENTER_NAME", "REF_FRAME", "TIME_SYSTEM"),
             METADATA, "metadata", lines, problems)
    if "CCSDS_OPM_VERS" in values and values["CCSDS_OPM_VERS"].value not in ("1.0", "2.0", "3.0"):
        ln = values["CCSDS_OPM_VERS"]
        problems.append(f"line {ln.number}: CCSDS_OPM_VERS = {ln.value!r}; this reader knows "
                        f"versions 1.0, 2.0 and 3.0")
    numbers: dict[str, float] = {}
    for kw, ln in values.items():
        if kw in _NUMERIC:
            check_unit(ln, UNITS[kw], problems)
            x = parse_number(ln, problems)
            if x is not None and kw in _LIMITED:
                dimension, factor = _LIMITED[kw]
                too_large = limit_problem(x * factor, dimension)
                if too_large is not None:
                    problems.append(f"line {ln.number}: {kw} = {ln.value} [{UNITS[kw]}] "
                                    f"{too_large}")
                    continue
            if x is not None:
                numbers[kw] = x
        elif ln.unit is not None and kw != "COV_REF_FRAME":
            problems.append(f"line {ln.number}: {kw}: unit [{ln.unit}] given, but {kw} "
                            f"takes no unit")
    time_system = (check_time_system(values["TIME_SYSTEM"], problems)
                   if "TIME_SYSTEM" in values else None)
    epoch = None
    if "EPOCH" in values:
        epoch = parse_ccsds_epoch(values["EPOCH"], time_system, problems)
    else:
        _missing(values, ("EPOCH",), STATE, "state vector", lines, problems)

    r = v = None
    has_state = any(k in values for k in STATE[1:])
    has_kepler = any(k in values for k in KEPLER)
    if has_state or not has_kepler:
        _missing(values, STATE[1:], STATE, "state vector" if has_state else
                 "state vector (or Keplerian elements)", lines, problems)
        if all(k in numbers for k in STATE[1:]):
            r = np.array([numbers[k] for k in ("X", "Y", "Z")]) * KM
            v = np.array([numbers[k] for k in ("X_DOT", "Y_DOT", "Z_DOT")]) * KM
    kep = _keplerian(values, numbers, lines, problems) if has_kepler else None
    if problems:
        raise UserInputError(source, by_line(problems))
    assert epoch is not None and time_system is not None
    text = {k: ln.value for k, ln in values.items()}
    return Opm(
        version=text["CCSDS_OPM_VERS"], creation_date=text["CREATION_DATE"],
        originator=text["ORIGINATOR"], object_name=text["OBJECT_NAME"],
        object_id=text["OBJECT_ID"], center_name=text["CENTER_NAME"],
        ref_frame=text["REF_FRAME"], time_system=time_system, epoch_text=text["EPOCH"],
        epoch=epoch, r_m=r, v_m_s=v, keplerian=kep, comments=tuple(comments),
        unused=tuple(unused), lines={k: ln.number for k, ln in values.items()},
        ref_frame_epoch=text.get("REF_FRAME_EPOCH"),
    )


def _keplerian(values: dict[str, KvnLine], numbers: dict[str, float], lines: list[KvnLine],
               problems: list[str]) -> Keplerian | None:
    need = ("SEMI_MAJOR_AXIS", "ECCENTRICITY", "INCLINATION", "RA_OF_ASC_NODE",
            "ARG_OF_PERICENTER")
    _missing(values, need, KEPLER, "keplerian elements", lines, problems)
    anomalies = [k for k in ("TRUE_ANOMALY", "MEAN_ANOMALY") if k in values]
    if not anomalies:
        _missing(values, ("TRUE_ANOMALY",), KEPLER,
                 "keplerian elements: TRUE_ANOMALY or MEAN_ANOMALY", lines, problems)
    elif len(anomalies) == 2:
        problems.append(f"line {values['MEAN_ANOMALY'].number}: give TRUE_ANOMALY or "
                        f"MEAN_ANOMALY, not both (TRUE_ANOMALY at line "
                        f"{values['TRUE_ANOMALY'].number})")
    if not all(k in numbers for k in need) or len(anomalies) != 1 or anomalies[0] not in numbers:
        return None
    a, e = numbers["SEMI_MAJOR_AXIS"] * KM, numbers["ECCENTRICITY"]
    bad = len(problems)
    if e < 0 or e == 1.0:
        problems.append(f"line {values['ECCENTRICITY'].number}: ECCENTRICITY = {e:g}: must be "
                        f">= 0 and not 1 (a parabola has no finite SEMI_MAJOR_AXIS; give the "
                        f"state vector)")
    elif (e < 1 and a <= 0) or (e > 1 and a >= 0):
        problems.append(f"line {values['SEMI_MAJOR_AXIS'].number}: SEMI_MAJOR_AXIS must be "
                        f"{'positive' if e < 1 else 'negative (a hyperbola)'} with "
                        f"ECCENTRICITY = {e:g}")
    i = numbers["INCLINATION"]
    if not 0 <= i <= 180:
        problems.append(f"line {values['INCLINATION'].number}: INCLINATION = {i:g} deg is "
                        f"outside 0..180 deg")
    gm = numbers.get("GM")
    if gm is not None and gm <= 0:
        problems.append(f"line {values['GM'].number}: GM must be positive")
    anomaly = numbers[anomalies[0]] * DEG
    if e > 1 and anomalies[0] == "TRUE_ANOMALY" and abs(anomaly) >= np.arccos(-1.0 / e):
        problems.append(f"line {values['TRUE_ANOMALY'].number}: TRUE_ANOMALY is beyond the "
                        f"asymptotes of the hyperbola (|nu| < "
                        f"{np.degrees(np.arccos(-1.0 / e)):.4f} deg)")
    if len(problems) > bad:
        return None
    nu = anomaly if anomalies[0] == "TRUE_ANOMALY" else None
    M = anomaly if anomalies[0] == "MEAN_ANOMALY" else None
    return Keplerian(a, e, i * DEG, numbers["RA_OF_ASC_NODE"] * DEG,
                     numbers["ARG_OF_PERICENTER"] * DEG, nu, M,
                     None if gm is None else gm * KM**3)


def write_opm(
    *, object_name: str, object_id: str, center_name: str, ref_frame: str, time_system: str,
    epoch: Epoch, r_m: np.ndarray, v_m_s: np.ndarray, gm_m3_s2: float,
    creation_date: str, originator: str = "Perifocal", comments: list[str] | None = None,
) -> str:
    """An OPM (version 2.0, KVN) with the state vector and the osculating Keplerian
    elements computed from it with ``gm_m3_s2`` (omitted for a parabola, which has no
    finite semi-major axis). Positions to 1 mm, velocities to 1 um/s."""
    from ..orbit import elements_from_state

    out = header_lines("CCSDS_OPM_VERS", comments or [], creation_date, originator)
    out += ["COMMENT Metadata",
            kvn("OBJECT_NAME", object_name), kvn("OBJECT_ID", object_id),
            kvn("CENTER_NAME", center_name), kvn("REF_FRAME", ref_frame),
            kvn("TIME_SYSTEM", time_system), "",
            "COMMENT State vector",
            kvn("EPOCH", format_epoch(epoch, time_system, 6))]
    r = np.asarray(r_m, dtype=np.float64) / KM
    v = np.asarray(v_m_s, dtype=np.float64) / KM
    out += [kvn(k, f"{x:.6f}", "km") for k, x in zip(("X", "Y", "Z"), r, strict=True)]
    out += [kvn(k, f"{x:.9f}", "km/s") for k, x in zip(("X_DOT", "Y_DOT", "Z_DOT"), v,
                                                        strict=True)]
    el = elements_from_state(r_m, v_m_s, gm_m3_s2)
    if float(el.e) != 1.0:
        out += ["", "COMMENT Osculating Keplerian elements (two-body, from the state vector)",
                kvn("SEMI_MAJOR_AXIS", f"{float(el.a) / KM:.6f}", "km"),
                kvn("ECCENTRICITY", f"{float(el.e):.12f}"),
                kvn("INCLINATION", f"{np.degrees(el.i):.10f}", "deg"),
                kvn("RA_OF_ASC_NODE", f"{np.degrees(el.raan):.10f}", "deg"),
                kvn("ARG_OF_PERICENTER", f"{np.degrees(el.argp):.10f}", "deg"),
                kvn("TRUE_ANOMALY", f"{np.degrees(el.nu):.10f}", "deg"),
                kvn("GM", f"{gm_m3_s2 / KM**3:.12g}", "km**3/s**2")]
    return "\n".join(out) + "\n"
