"""Bodies that follow a published ephemeris: JPL DE421, read with jplephem.

The kernel comes from the ``de421`` package on PyPI (JPL's Chebyshev coefficients as numpy
files; W. M. Folkner, J. G. Williams, D. H. Boggs, "The Planetary and Lunar Ephemeris
DE 421", IPN Progress Report 42-178, 2009); nothing is downloaded at run time. It is
read through ``jplephem.ephem.Ephemeris``, the reader that package was made for.

Frames and time, as the ephemeris defines them:

* DE421 positions are barycentric, in the ICRF, with TDB as the time argument. A
  ``Track`` gives a target relative to a centre (the Sun: heliocentric; or any other
  target, such as the Earth for the Moon), so the barycentre drops out.
* ``ICRF``, ``J2000`` and ``EME2000`` are taken as one frame, as SPICE does for DE
  kernels (the frame bias between them, about 0.02", is below the kernel's accuracy
  for this use). ``ECLIPJ2000`` is SPICE's: the equatorial frame rotated about x by
  the IAU 1976 obliquity of J2000, 84381.448".
* Earth is not in the kernel: Earth = EMB - Moon_geocentric / (1 + EMRAT), and the Moon
  = EMB + Moon_geocentric * EMRAT / (1 + EMRAT) (the kernel's Earth-Moon mass ratio).
  Mars to Pluto are their system barycentres, which is what DE421 tabulates for them.

Glossary: ``jd1 + jd2`` a two-part TDB Julian date; ``t_s`` TDB seconds from the scene
epoch; ``EMB`` the Earth-Moon barycentre; ``EMRAT`` the Earth/Moon mass ratio.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from typing import Any

import numpy as np

from .errors import UserInputError
from .orbit import Elements, elements_from_state

#: The IAU 1976 obliquity of the ecliptic at J2000 (SPICE's ECLIPJ2000), in radians.
OBLIQUITY_J2000_RAD = math.radians(84381.448 / 3600.0)
#: Frames a scene with ephemeris bodies may use: equatorial (the kernel's) or ecliptic.
EQUATORIAL_FRAMES = ("ICRF", "J2000", "EME2000")
ECLIPTIC_FRAMES = ("ECLIPJ2000",)
#: Ephemerides this version reads.
EPHEMERIDES = ("DE421",)
#: Where positions are counted from: the centre body itself, or the solar-system barycentre.
ORIGINS = ("body", "barycenter")
#: Bodies of DE421, by the names scene files use.
TARGETS = ("sun", "mercury", "venus", "earth", "moon", "earth-moon-barycenter", "mars",
           "jupiter", "saturn", "uranus", "neptune", "pluto")
#: The span we use, within both the package's coefficients and JPL's published DE421
#: span (1899-07-29 to 2053-10-09 TDB in the SPICE kernel): 1900-01-01 to 2050-12-31 TDB.
SPAN_JD = (2415020.5, 2470172.5)  # 1900-01-01T00 to 2051-01-01T00 TDB
SPAN_TEXT = "1900-01-01 to 2050-12-31 TDB (to 2051-01-01T00:00)"
_J2000_JD = 2451545.0
_KERNEL_NAMES = {"sun": "sun", "mercury": "mercury", "venus": "venus", "mars": "mars",
                 "jupiter": "jupiter", "saturn": "saturn", "uranus": "uranus",
                 "neptune": "neptune", "pluto": "pluto", "earth-moon-barycenter": "earthmoon"}
_GM_KEYS = {"sun": "GMS", "mercury": "GM1", "venus": "GM2", "mars": "GM4", "jupiter": "GM5",
            "saturn": "GM6", "uranus": "GM7", "neptune": "GM8", "pluto": "GM9",
            "earth-moon-barycenter": "GMB"}


class EphemerisSpanError(UserInputError):
    """A time outside the span of the ephemeris."""


def ecliptic_rotation() -> np.ndarray:
    """The matrix that takes ICRF/J2000 vectors to ECLIPJ2000 (a rotation about x)."""
    c, s = math.cos(OBLIQUITY_J2000_RAD), math.sin(OBLIQUITY_J2000_RAD)
    return np.array([[1.0, 0.0, 0.0], [0.0, c, s], [0.0, -s, c]])


def frame_rotation(frame: str) -> np.ndarray | None:
    """ICRF -> ``frame``, or None if the frame is not one an ephemeris body can use."""
    name = frame.upper()
    if name in EQUATORIAL_FRAMES:
        return np.eye(3)
    if name in ECLIPTIC_FRAMES:
        return ecliptic_rotation()
    return None


class Kernel:
    """One loaded ephemeris: barycentric ICRF states of its targets at TDB dates, and the
    GM values it was fitted with. Files are read on first use of each target."""

    def __init__(self, name: str = "DE421") -> None:
        if name.upper() not in EPHEMERIDES:
            raise KeyError(f"unknown ephemeris {name!r}; this version reads "
                           f"{', '.join(EPHEMERIDES)}")
        import de421
        from jplephem.ephem import Ephemeris

        self.name = name.upper()
        self._eph = Ephemeris(de421)
        self.au_m = float(self._eph.AU) * 1e3
        self.emrat = float(self._eph.EMRAT)

    def gm_m3_s2(self, target: str) -> float:
        """The kernel's GM of ``target`` in m^3/s^2 (a system GM for Mars to Pluto)."""
        scale = self.au_m**3 / 86400.0**2
        if target == "earth":
            return float(self._eph.GMB) * self.emrat / (1.0 + self.emrat) * scale
        if target == "moon":
            return float(self._eph.GMB) / (1.0 + self.emrat) * scale
        return float(getattr(self._eph, _GM_KEYS[target])) * scale

    def check_span(self, jd: np.ndarray, what: str) -> None:
        """Raise EphemerisSpanError when any date is outside ``SPAN_JD``."""
        if jd.size and not (np.all(jd >= SPAN_JD[0]) and np.all(jd <= SPAN_JD[1])):
            bad = jd[(jd < SPAN_JD[0]) | (jd > SPAN_JD[1])][0]
            year = 2000.0 + (float(bad) - _J2000_JD) / 365.25
            raise EphemerisSpanError(what, f"a time near year {year:.1f} is outside the span "
                                     f"of {self.name}: {SPAN_TEXT}")

    def state(self, target: str, jd1: Any, jd2: Any) -> tuple[np.ndarray, np.ndarray]:
        """Barycentric ICRF position (m) and velocity (m/s) of ``target``, shape (N, 3)."""
        jd1 = np.atleast_1d(np.asarray(jd1, dtype=np.float64))
        jd2 = np.atleast_1d(np.asarray(jd2, dtype=np.float64))
        jd1, jd2 = np.broadcast_arrays(jd1, jd2)
        if target == "barycenter":  # the solar-system barycentre, the kernel's origin
            zero = np.zeros(jd1.shape + (3,))
            return zero, zero.copy()
        if target in ("earth", "moon"):
            r_b, v_b = self._raw("earthmoon", jd1, jd2)
            r_m, v_m = self._raw("moon", jd1, jd2)
            share = (-1.0 / (1.0 + self.emrat) if target == "earth"
                     else self.emrat / (1.0 + self.emrat))
            return r_b + share * r_m, v_b + share * v_m
        return self._raw(_KERNEL_NAMES[target], jd1, jd2)

    def _raw(self, name: str, jd1: np.ndarray, jd2: np.ndarray
             ) -> tuple[np.ndarray, np.ndarray]:
        r_km, v_km_d = self._eph.position_and_velocity(name, jd1, jd2)
        return (np.asarray(r_km).T * 1e3, np.asarray(v_km_d).T * (1e3 / 86400.0))


@dataclass(frozen=True)
class Track:
    """Where an ephemeris body is: ``target`` relative to ``centre`` (a target, or
    "barycenter" for the solar-system barycentre) in ``frame``, at TDB
    seconds from the scene epoch ``epoch_jd`` (two parts). ``mu`` (m^3/s^2) is GM_centre +
    GM_body, used for the osculating conic."""

    kernel: Kernel = field(compare=False, hash=False, repr=False)
    target: str
    centre: str
    frame: str
    epoch_jd: tuple[float, float]
    mu: float
    #: Scene time whose osculating conic is drawn (None: the displayed time).
    osculate_s: float | None = None

    @property
    def source(self) -> str:
        return self.kernel.name

    def with_epoch_moved(self, shift_s: float) -> Track:
        """The same track for a scene epoch ``shift_s`` seconds later."""
        from dataclasses import replace

        osc = None if self.osculate_s is None else self.osculate_s - shift_s
        return replace(self, epoch_jd=(self.epoch_jd[0], self.epoch_jd[1] + shift_s / 86400.0),
                       osculate_s=osc)

    def span_s(self) -> tuple[float, float]:
        """(first, last) scene time covered, TDB seconds from the scene epoch."""
        e = self.epoch_jd[0] + self.epoch_jd[1]
        return ((SPAN_JD[0] - e) * 86400.0, (SPAN_JD[1] - e) * 86400.0)

    def state(self, t_s: Any, what: str = "the scene time") -> tuple[np.ndarray, np.ndarray]:
        """Position (m) and velocity (m/s) relative to the centre in the scene's frame at
        scene times ``t_s`` (shape (...,) -> (..., 3))."""
        t = np.asarray(t_s, dtype=np.float64)
        days = t.ravel() / 86400.0
        jd1 = np.full(days.shape, self.epoch_jd[0])
        jd2 = self.epoch_jd[1] + days
        self.kernel.check_span(jd1 + jd2, what)
        r, v = self.kernel.state(self.target, jd1, jd2)
        rc, vc = self.kernel.state(self.centre, jd1, jd2)
        rot = frame_rotation(self.frame)
        assert rot is not None
        r = (r - rc) @ rot.T
        v = (v - vc) @ rot.T
        return r.reshape(t.shape + (3,)), v.reshape(t.shape + (3,))

    def elements_at(self, t_s: float) -> Elements:
        """The osculating conic at scene time ``t_s`` (true anomaly at that time)."""
        r, v = self.state(float(t_s))
        return elements_from_state(r, v, self.mu)
