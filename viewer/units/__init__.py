"""Quantities and epochs at the edges: scene files, CLI flags, panel inputs, printed tables.

Owns the parsing of dimensional strings ("1.52 au", "7000 km", "88 d", "12 deg",
"1.32712440018e20 m3/s2", "5 d/s") into SI floats, the formatting of SI values back into
human units, and epochs (ISO 8601 with a TDB, TT or UTC suffix, leap seconds right).
Time scales come from pyerfa (the IAU SOFA routines; see DEVELOPERS.md for why), which
is imported only when an epoch is parsed. Must not be imported by viewer.orbit.
"""

from .epoch import Epoch, EpochError, parse_epoch
from .quantity import (
    DIMENSIONS,
    QuantityError,
    format_eccentricity,
    format_quantity,
    parse_quantity,
    unit_factor,
)

__all__ = [
    "DIMENSIONS", "Epoch", "EpochError", "QuantityError", "format_eccentricity",
    "format_quantity", "parse_epoch",
    "parse_quantity", "unit_factor",
]
