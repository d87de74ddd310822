"""Physical constants and the central-body catalogue, each with its source.

SI units throughout: metres, seconds, m^3/s^2. Nothing here imports beyond the standard
library, so the catalogue is cheap to read from anywhere.
"""

from __future__ import annotations

from dataclasses import dataclass

#: Astronomical unit in metres, exact by definition (IAU 2012 Resolution B2).
AU_M = 149_597_870_700.0
#: Seconds in a Julian day (IAU; exact by definition).
DAY_S = 86_400.0
#: Seconds in a Julian year of 365.25 days (IAU; exact by definition).
JULIAN_YEAR_S = 365.25 * DAY_S
#: Newtonian constant of gravitation in m^3/(kg s^2), CODATA 2018.
G_SI = 6.674_30e-11
#: Speed of light in vacuum, m/s (exact, SI definition).
C_M_S = 299_792_458.0


@dataclass(frozen=True)
class CentralBody:
    """A catalogue entry: the gravitational parameter and equatorial radius of a body.

    ``gm_m3_s2`` in m^3/s^2, ``radius_m`` in metres; ``source`` names where the values come
    from (and says "from memory" where they were recalled rather than read).
    """

    key: str
    name: str
    gm_m3_s2: float
    radius_m: float
    source: str


# The Sun: nominal values of IAU 2015 Resolution B3 (GM_sun^N = 1.3271244e20 m^3/s^2,
# R_sun^N = 6.957e8 m). The scene format's example uses the TDB-compatible
# heliocentric GM of the JPL ephemerides (1.32712440018e20, from memory), which differs
# from the nominal value in the ninth digit; we keep the more precise ephemeris value.
_SUN = CentralBody(
    "sun", "Sun", 1.327_124_400_18e20, 6.957e8,
    "GM: JPL DE ephemeris value 1.32712440018e20 m^3/s^2 (from memory; IAU 2015 B3 nominal "
    "1.3271244e20); radius: IAU 2015 B3 nominal 695 700 km",
)
# Earth: GM from IERS Conventions (2010) table 1.1 / WGS 84 (3.986004418e14 m^3/s^2),
# equatorial radius from WGS 84 (6 378 137 m).
_EARTH = CentralBody(
    "earth", "Earth", 3.986_004_418e14, 6_378_137.0,
    "GM: IERS Conventions (2010) / WGS 84; radius: WGS 84 equatorial",
)

# The other planets and the Moon: GM from JPL's planetary constants (DE440-era values,
# system GM for planets with moons), equatorial radii from the IAU WG on Cartographic
# Coordinates and Rotational Elements (2015). All recalled: "from memory".
_FROM_MEMORY = "JPL planetary constants (GM) and IAU WGCCRE 2015 (radius), from memory"
CATALOGUE: dict[str, CentralBody] = {
    b.key: b
    for b in (
        _SUN,
        CentralBody("mercury", "Mercury", 2.203_2e13, 2_440_530.0, _FROM_MEMORY),
        CentralBody("venus", "Venus", 3.248_59e14, 6_051_800.0, _FROM_MEMORY),
        _EARTH,
        CentralBody("moon", "Moon", 4.902_800_1e12, 1_738_100.0, _FROM_MEMORY),
        CentralBody("mars", "Mars", 4.282_837e13, 3_396_190.0, _FROM_MEMORY),
        CentralBody("jupiter", "Jupiter", 1.266_865_34e17, 71_492_000.0, _FROM_MEMORY),
        CentralBody("saturn", "Saturn", 3.793_118_7e16, 60_268_000.0, _FROM_MEMORY),
        CentralBody("uranus", "Uranus", 5.793_939e15, 25_559_000.0, _FROM_MEMORY),
        CentralBody("neptune", "Neptune", 6.836_529e15, 24_764_000.0, _FROM_MEMORY),
    )
}


def central_body(key: str) -> CentralBody:
    """The catalogue entry for ``key`` (case-insensitive: "sun", "Earth", ...).

    Raises KeyError naming the known keys when ``key`` is not in the catalogue.
    """
    try:
        return CATALOGUE[key.strip().lower()]
    except KeyError:
        known = ", ".join(CATALOGUE)
        raise KeyError(f"unknown central body {key!r}; the catalogue has: {known}") from None
