"""The pork-chop plot of a grid (viewer.mission.porkchop) as PNG or SVG, and its CSV.

Contours of departure C3 (solid, labelled in km^2/s^2) and of arrival v-infinity
(dashed, km/s) against departure and arrival dates, with lines of equal time of flight
(dotted, labelled in days), the least-C3 and least-total cells marked, and the two-body
caution under the plot. Drawn with matplotlib's object API (no pyplot state), written
atomically.
"""

from __future__ import annotations

import datetime as dt
import io
from typing import Any

import numpy as np

#: The usual C3 levels (km^2/s^2) and arrival v-infinity levels (km/s) of such plots.
C3_LEVELS = (8, 9, 10, 11, 12, 13, 14, 16, 18, 20, 25, 30, 40, 50)
VINF_LEVELS = (2.0, 2.5, 3.0, 3.5, 4.0, 4.5, 5.0, 6.0, 7.0, 8.0)
C3_COLOR = "#1d5fa6"
VINF_COLOR = "#b8442c"
TOF_COLOR = "#6e6e6e"


def _datetimes(epoch0: Any, t_s: np.ndarray) -> list[dt.datetime]:
    """Naive datetimes of TDB calendar labels (scene times from ``epoch0``)."""
    base = dt.datetime.strptime(epoch0.iso("TDB")[:19], "%Y-%m-%dT%H:%M:%S")
    return [base + dt.timedelta(seconds=float(s)) for s in t_s]


def _levels(values: np.ndarray, levels: tuple[float, ...]) -> list[float]:
    finite = values[np.isfinite(values)]
    if finite.size == 0:
        return []
    inside = [x for x in levels if finite.min() < x < finite.max()]
    return inside or [float(np.nanpercentile(finite, 10))]


def plot(grid: Any, epoch0: Any, title: str, caution: str, fmt: str,
         best: dict[str, tuple[int, int] | None]) -> bytes:
    """The plot as ``fmt`` ("png" or "svg") bytes."""
    import matplotlib

    matplotlib.use("Agg")
    import matplotlib.dates as mdates
    from matplotlib.figure import Figure

    dep = _datetimes(epoch0, grid.t_dep_s)
    arr = _datetimes(epoch0, grid.t_arr_s)
    X, Y = np.meshgrid(np.asarray(mdates.date2num(dep)), np.asarray(mdates.date2num(arr)),
                       indexing="ij")
    c3 = grid.c3_m2_s2 / 1e6
    vinf = grid.vinf_arr_m_s / 1e3
    tof = grid.tof_s / 86400.0
    fig = Figure(figsize=(10, 7.5), dpi=120)
    ax = fig.add_axes((0.09, 0.16, 0.86, 0.76))
    masked = np.ma.masked_invalid
    lc = _levels(c3, C3_LEVELS)
    if lc:
        cs = ax.contour(X, Y, masked(c3), levels=lc, colors=C3_COLOR, linewidths=1.1)
        ax.clabel(cs, fmt="%g", fontsize=7)
    lv = _levels(vinf, VINF_LEVELS)
    if lv:
        cv = ax.contour(X, Y, masked(vinf), levels=lv, colors=VINF_COLOR, linewidths=0.9,
                        linestyles="dashed")
        ax.clabel(cv, fmt="%g", fontsize=7)
    finite_tof = tof[tof > 0]
    if finite_tof.size:
        step = 25.0 if finite_tof.max() - finite_tof.min() < 400 else 100.0
        lt = list(np.arange(np.ceil(finite_tof.min() / step) * step, finite_tof.max(), step))
        if lt:
            ct = ax.contour(X, Y, np.ma.masked_less_equal(tof, 0), levels=lt, colors=TOF_COLOR,
                            linewidths=0.6, linestyles="dotted")
            ax.clabel(ct, fmt="%g d", fontsize=7)
    marks = (("c3", "o", C3_COLOR, "least C3"), ("total", "x", "#000000", "least total dv"))
    for key, marker, color, label in marks:
        cell = best.get(key)
        if cell is not None:
            ax.plot([X[cell]], [Y[cell]], marker=marker, color=color, markersize=8,
                    linestyle="none", label=label)
    ax.plot([], [], color=C3_COLOR, label="departure C3 (km²/s²)")
    ax.plot([], [], color=VINF_COLOR, linestyle="dashed", label="arrival v∞ (km/s)")
    ax.plot([], [], color=TOF_COLOR, linestyle="dotted", label="time of flight (d)")
    ax.legend(loc="upper left", fontsize=8, framealpha=0.9)
    ax.xaxis_date()
    ax.yaxis_date()
    ax.set_xlabel("departure (TDB)")
    ax.set_ylabel("arrival (TDB)")
    ax.set_title(title, fontsize=11)
    ax.grid(True, color="#dddddd", linewidth=0.5)
    fig.autofmt_xdate()
    fig.text(0.5, 0.015, caution, ha="center", va="bottom", fontsize=7, wrap=True)
    buf = io.BytesIO()
    meta = {"Software": None} if fmt == "png" else {"Date": None}
    fig.savefig(buf, format=fmt, metadata=meta)
    return buf.getvalue()


def csv_text(grid: Any, epoch0: Any) -> str:
    """One row per cell: departure and arrival (ISO TDB), tof (d), C3 (km^2/s^2),
    departure and arrival v-infinity (km/s), total dv (km/s); empty where no solution."""
    dep = [d.isoformat(timespec="seconds") for d in _datetimes(epoch0, grid.t_dep_s)]
    arr = [d.isoformat(timespec="seconds") for d in _datetimes(epoch0, grid.t_arr_s)]
    lines = ["departure_tdb,arrival_tdb,tof_d,c3_km2_s2,vinf_departure_km_s,"
             "vinf_arrival_km_s,dv_total_km_s"]

    def f(x: float) -> str:
        return f"{x:.6f}" if np.isfinite(x) else ""

    for i, d in enumerate(dep):
        for j, a in enumerate(arr):
            lines.append(f"{d},{a},{grid.tof_s[i, j] / 86400.0:.6f},"
                         f"{f(grid.c3_m2_s2[i, j] / 1e6)},{f(grid.vinf_dep_m_s[i, j] / 1e3)},"
                         f"{f(grid.vinf_arr_m_s[i, j] / 1e3)},"
                         f"{f(grid.dv_total_m_s[i, j] / 1e3)}")
    return "\n".join(lines) + "\n"
