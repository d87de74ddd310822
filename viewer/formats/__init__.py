"""Interchange with open standards: CCSDS Orbit Data Messages (CCSDS 502.0-B) in KVN.

Owns reading and writing Orbit Parameter Messages (``opm``: one state, with optional
Keplerian elements) and Orbit Ephemeris Messages (``oem``: states at many epochs), the
KVN line syntax they share (``kvn``). May import viewer.orbit, viewer.units and
viewer.scene; never GL, windowing or UI.
"""

from .oem import Oem, OemSegment, parse_oem, write_oem
from .opm import ROTATING_FRAMES, Comment, Keplerian, Opm, parse_opm, write_opm

__all__ = [
    "ROTATING_FRAMES", "Comment", "Keplerian", "Oem", "OemSegment", "Opm", "parse_oem",
    "parse_opm", "write_oem", "write_opm",
]
