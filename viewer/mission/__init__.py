"""Answers for mission design, computed once for every front end.

Owns transfers between circular orbits (Hohmann, bi-elliptic), quick answers about one
conic (time of flight, next time at a radius, escape speed, hyperbolic pass) and their
refusals, and the user-facing cautions. The command line and the window only format what
these functions return, so they cannot disagree.

May import viewer.orbit, viewer.scene and viewer.units; never viewer.cli, viewer.gui,
GL or windowing.
"""

from .cautions import CAUTION

__all__ = ["CAUTION"]
