"""The third-law plot of a scene as PNG or SVG: log T against log a beside T^2 against a^3.

Left, every closed orbit's period against its semi-major axis on log axes, with the line
T = 2 pi sqrt(a^3 / GM) of the central body (slope 3/2). Right, the same bodies as T^2
against a^3 on linear axes: the straight line through the origin of slope 4 pi^2 / GM,
printed with its units. The data are ``viewer.scene.third_law`` (the window's plots draw
the same). Drawn with matplotlib's object API (no pyplot state), under the two-body
caution.
"""

from __future__ import annotations

import io
from typing import Any

import numpy as np

from ..orbit import AU_M, DAY_S
from ..scene.third_law import square_cube, third_law
from ..units.format import format_sig

LINE_COLOR = "#1d5fa6"
POINT_COLOR = "#b8442c"


def slope_text(scene: Any) -> str:
    """The printed slope: "4π²/GM = 1.00004 yr²/au³" in the plot's units."""
    sq = square_cube(scene)
    return f"4π²/GM = {format_sig(sq.slope, 6)} {sq.time_unit}²/{sq.length_unit}³"


def plot(scene: Any, fmt: str, caution: str) -> bytes:
    """The two views of the third law as ``fmt`` ("png" or "svg") bytes; the scene must
    have a closed orbit (callers refuse one without)."""
    import matplotlib

    matplotlib.use("Agg")
    from matplotlib.figure import Figure

    law = third_law(scene)
    sq = square_cube(scene)
    fig = Figure(figsize=(12, 5.6), dpi=120)
    left = fig.add_axes((0.07, 0.17, 0.40, 0.72))
    right = fig.add_axes((0.57, 0.17, 0.40, 0.72))

    a_au, t_d = law.a_m / AU_M, law.period_s / DAY_S
    left.loglog(law.line_a_m / AU_M, law.line_period_s / DAY_S, color=LINE_COLOR,
                linewidth=1.2, label="T = 2π √(a³/GM): slope 3/2")
    left.loglog(a_au, t_d, "o", color=POINT_COLOR, markersize=5, label="bodies")
    for name, x, y in zip(law.names, a_au, t_d, strict=True):
        left.annotate(name, (x, y), textcoords="offset points", xytext=(5, -10), fontsize=8)
    left.set_xlabel("semi-major axis a (au)")
    left.set_ylabel("period T (d)")
    left.set_title("log T against log a", fontsize=10)
    left.grid(True, which="both", color="#dddddd", linewidth=0.5)
    left.legend(loc="upper left", fontsize=8, framealpha=0.9)

    x_hi = 1.1 * float(sq.a3.max())
    y_hi = 1.1 * max(float(sq.t2.max()), sq.slope * x_hi)
    L, T = sq.length_unit, sq.time_unit
    right.plot([0.0, x_hi], [0.0, sq.slope * x_hi], color=LINE_COLOR, linewidth=1.2,
               label=f"T² = (4π²/GM) a³, {slope_text(scene)}")
    right.plot(sq.a3, sq.t2, "o", color=POINT_COLOR, markersize=5, label="bodies")
    last = -np.inf
    # Inner orbits crowd the origin here (the log view tells them apart): names only for
    # points a twentieth of the axis from the origin and from each other.
    for name, x, y in sorted(zip(sq.names, sq.a3, sq.t2, strict=True), key=lambda r: r[1]):
        if x > 0.05 * x_hi and x - last > 0.05 * x_hi:
            right.annotate(name, (x, y), textcoords="offset points", xytext=(5, -10),
                           fontsize=8)
            last = x
    right.set_xlim(0.0, x_hi)
    right.set_ylim(0.0, y_hi)
    right.set_xlabel(f"a³ ({L}³)")
    right.set_ylabel(f"T² ({T}²)")
    right.set_title("T² against a³: a straight line through the origin", fontsize=10)
    right.grid(True, color="#dddddd", linewidth=0.5)
    right.legend(loc="upper left", fontsize=8, framealpha=0.9)

    fig.suptitle(f"{scene.title}: the third law about {scene.center.name}", fontsize=11)
    fig.text(0.5, 0.015, caution, ha="center", va="bottom", fontsize=7, wrap=True)
    buf = io.BytesIO()
    meta = {"Software": None} if fmt == "png" else {"Date": None}
    # SVG text stays text (editable on a slide, and searchable), in this call only.
    with matplotlib.rc_context({"svg.fonttype": "none"}):
        fig.savefig(buf, format=fmt, metadata=meta)
    return buf.getvalue()
