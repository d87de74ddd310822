"""The "Plots" window: distance and speed over one period, and the third law."""

from __future__ import annotations

from typing import TYPE_CHECKING, Any

import numpy as np
from imgui_bundle import imgui

from ...orbit import AU_M, DAY_S
from ...units.format import format_sig
from ..plots import orbit_profile, square_cube, third_law
from ..session import Session
from .widgets import (
    DIM,
    GAP,
    MENU_H,
    RIGHT_W,
    TIME_H,
)

if TYPE_CHECKING:
    from . import Panels


def draw(p: Panels, s: Session, w: float, h: float) -> None:
    from imgui_bundle import implot

    # Beside the picture, never over it: the plots take the right-hand column (the
    # Orbit and Numbers panels come back when they close); presenting, the right edge.
    k = s.ui_scale
    top = 0.0 if s.presenting else MENU_H * k + GAP * k
    bottom = h if s.presenting else h - (TIME_H + 2 * GAP) * k
    width = RIGHT_W * k
    imgui.set_next_window_pos(imgui.ImVec2(w - width - GAP * k, top), imgui.Cond_.always)
    imgui.set_next_window_size(imgui.ImVec2(width, bottom - top), imgui.Cond_.always)
    opened, keep = imgui.begin("Plots", True, imgui.WindowFlags_.no_collapse
                               | imgui.WindowFlags_.no_move | imgui.WindowFlags_.no_resize)
    if opened:
        ed = s.editor
        b = ed.body
        prof = orbit_profile(b, s.clock.t_s) if b is not None else None
        half = 0.5 * (imgui.get_content_region_avail().y - 8)
        if prof is None:
            imgui.text_colored(DIM, "Distance and speed: select a closed orbit.")
        elif implot.begin_plot(f"{b.name}: one period##profile",  # type: ignore[union-attr]
                               imgui.ImVec2(-1, half)):
            L = ed.scene.length_unit
            unit, f = (("au", AU_M) if L == "au" and prof.distance_m.max() >= 1e9
                       else ("km", 1e3))
            days = (prof.t_s - prof.now_s) / DAY_S
            implot.setup_axes("days from now", f"distance ({unit})")
            # Legends below the plot area, never over the curves.
            implot.setup_legend(implot.Location_.south,
                                implot.LegendFlags_.outside | implot.LegendFlags_.horizontal)
            implot.setup_axis(implot.ImAxis_.y2, "speed (km/s)",
                              implot.AxisFlags_.aux_default)
            implot.setup_axes_limits(float(days[0]), float(days[-1]),
                                     0.0, 1.1 * float(prof.distance_m.max() / f),
                                     implot.Cond_.always)
            implot.setup_axis_limits(implot.ImAxis_.y2, 0.0,
                                     1.1 * float(prof.speed_m_s.max() / 1e3),
                                     implot.Cond_.always)
            implot.plot_line("distance", days, prof.distance_m / f)
            implot.set_axes(implot.ImAxis_.x1, implot.ImAxis_.y2)
            implot.plot_line("speed", days, prof.speed_m_s / 1e3)
            implot.set_axes(implot.ImAxis_.x1, implot.ImAxis_.y1)
            implot.plot_inf_lines("now", np.array([0.0]))
            implot.end_plot()
        law = third_law(ed.scene)
        p.law_view = _law_tabs(p.law_view)
        if len(law.a_m):
            both = p.law_view == "both"
            height = 0.5 * (imgui.get_content_region_avail().y - 8) if both else -1.0
            if p.law_view in ("log", "both"):
                _log_log(implot, law, height)
            if p.law_view in ("square", "both"):
                _square_cube(implot, ed.scene, height)
    imgui.end()
    if keep is False:
        s.show_plots = False


def _log_log(implot: Any, law: Any, height: float) -> None:
    """log T against log a: the line of slope 3/2 through every closed orbit."""
    if not implot.begin_plot("Third law: T^2 grows as a^3##law", imgui.ImVec2(-1, height)):
        return
    implot.setup_axes("semi-major axis a (au)", "period T (d)")
    # Legends below the plot area, never over the curves.
    implot.setup_legend(implot.Location_.south,
                        implot.LegendFlags_.outside | implot.LegendFlags_.horizontal)
    implot.setup_axis_scale(implot.ImAxis_.x1, implot.Scale_.log10)
    implot.setup_axis_scale(implot.ImAxis_.y1, implot.Scale_.log10)
    # A margin of a fifth of a decade each way, so the end points' names fit.
    implot.setup_axes_limits(float(law.line_a_m[0] / AU_M) / 1.6,
                             float(law.line_a_m[-1] / AU_M) * 1.6,
                             float(law.line_period_s[0] / DAY_S) / 2.0,
                             float(law.line_period_s[-1] / DAY_S) * 2.0,
                             implot.Cond_.always)
    implot.plot_line("T = 2 pi sqrt(a^3/GM): slope 3/2", law.line_a_m / AU_M,
                     law.line_period_s / DAY_S)
    implot.plot_scatter("bodies", law.a_m / AU_M, law.period_s / DAY_S)
    for name, a, T, dy in zip(law.names, law.a_m, law.period_s,
                              label_offsets(law.a_m, law.line_a_m), strict=True):
        implot.plot_text(name, float(a / AU_M), float(T / DAY_S), imgui.ImVec2(0, dy))
    implot.end_plot()


def _law_tabs(view: str) -> str:
    """The views of the third law: log T against log a, T^2 against a^3, or both, one
    above the other."""
    for key, label in (("log", "log T vs log a"), ("square", "T^2 vs a^3"),
                       ("both", "both")):
        if imgui.radio_button(f"{label}##law-view", view == key):
            view = key
        imgui.same_line()
    imgui.new_line()
    return view


def _square_cube(implot: Any, scene: Any, height: float = -1.0) -> None:
    """T^2 against a^3: a straight line through the origin of slope 4 pi^2 / GM."""
    sq = square_cube(scene)
    L, T = sq.length_unit, sq.time_unit
    imgui.text(f"slope 4 pi^2 / GM = {format_sig(sq.slope, 6)} {T}^2 / {L}^3")
    if not implot.begin_plot("Third law: T^2 = (4 pi^2 / GM) a^3##square",
                             imgui.ImVec2(-1, height)):
        return
    implot.setup_axes(f"a^3 ({L}^3)", f"T^2 ({T}^2)")
    implot.setup_legend(implot.Location_.south,
                        implot.LegendFlags_.outside | implot.LegendFlags_.horizontal)
    x_hi = 1.1 * float(sq.a3.max())
    y_hi = 1.1 * max(float(sq.t2.max()), sq.slope * x_hi)
    implot.setup_axes_limits(0.0, x_hi, 0.0, y_hi, implot.Cond_.always)
    implot.plot_line("T^2 = (4 pi^2 / GM) a^3", np.array([0.0, x_hi]),
                     np.array([0.0, sq.slope * x_hi]))
    implot.plot_scatter("bodies", sq.a3, sq.t2)
    # Inner orbits crowd the origin here (the log view tells them apart): only points
    # a twentieth of the axis from the origin and from each other get their names.
    last = -np.inf
    for name, x, y in sorted(zip(sq.names, sq.a3, sq.t2, strict=True), key=lambda r: r[1]):
        if x > 0.05 * x_hi and x - last > 0.05 * x_hi:
            implot.plot_text(name, float(x), float(y), imgui.ImVec2(0, -12))
            last = x
    implot.end_plot()


def label_offsets(a_m: np.ndarray, span_m: np.ndarray, px: float = 12.0) -> list[float]:
    """Vertical offsets (px) of the point labels on the third-law plot: above the point,
    and for a point within a twentieth of the axis (in log a) of the previous labelled
    one, alternately below, so neighbouring names do not print over each other."""
    if len(a_m) == 0:
        return []
    x = np.log10(np.asarray(a_m, dtype=np.float64))
    near = 0.05 * max(float(np.ptp(np.log10(span_m))), 1e-9)
    order = np.argsort(x)
    out = [0.0] * len(x)
    side = -1.0
    last = -np.inf
    for k in order:
        side = -side if x[k] - last < near else 1.0
        out[int(k)] = -px * side
        last = x[k]
    return out
