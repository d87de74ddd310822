"""The "Launch season" window: the pork-chop plot of the scene's two bodies (departure
C3 as colour, with contours of C3 and lines of equal time of flight), and a click on a
cell that makes that transfer a body of the scene, drawn from departure to arrival.

The numbers come from ``viewer.gui.porkchop`` (the same functions as ``perifocal
porkchop``); this module only draws them and passes the clicks on.
"""

from __future__ import annotations

import datetime as dt
from typing import TYPE_CHECKING, Any

import numpy as np
from imgui_bundle import imgui

from ...export.porkchop_plot import C3_LEVELS
from ...mission import CAUTION
from ...mission.porkchop import Season
from ..editor import EditRefused
from ..porkchop import cell_rows, compute, default_pair, pick, season_bodies, suggested
from ..session import Session
from .widgets import AMBER, DIM, GAP, MENU_H, RIGHT_W, TIME_H

if TYPE_CHECKING:
    from . import Panels

#: Width of the window, in right-hand panel widths.
WIDTH = 1.6
#: Lines and marks over the viridis colours (low C3 dark violet, high yellow): light
#: contours, and marks told apart by shape as well as colour.
CONTOUR_RGBA = (0.96, 0.96, 0.96, 0.85)
TOF_RGBA = (0.55, 0.85, 1.0, 0.75)
LEAST_C3_RGBA = (1.0, 1.0, 1.0, 1.0)
LEAST_DV_RGBA = (1.0, 0.6, 0.2, 1.0)
PICKED_RGBA = (1.0, 0.3, 0.55, 1.0)


def _unix(scene: Any, t_s: np.ndarray) -> np.ndarray:
    """Scene times as the plot's time axis counts them: seconds of the TDB calendar
    since 1970-01-01 (the axis shows TDB dates)."""
    base = dt.datetime.strptime(scene.epoch.iso("TDB")[:19], "%Y-%m-%dT%H:%M:%S")
    b = base.replace(tzinfo=dt.UTC).timestamp()
    return b + np.asarray(t_s, dtype=np.float64)


def _month_ticks(u0: float, u1: float, most: int = 7) -> tuple[list[float], list[str]]:
    """Ticks at the first of a month between two plot times (TDB calendar seconds since
    1970), every k-th month so that at most ``most`` are drawn, labelled "2027-05"."""
    d0 = dt.datetime.fromtimestamp(u0, dt.UTC)
    d1 = dt.datetime.fromtimestamp(u1, dt.UTC)
    months = (d1.year - d0.year) * 12 + d1.month - d0.month + 1
    step = max(1, -(-months // most))
    values, labels = [], []
    y, m = d0.year, d0.month
    for _ in range(months + 1):
        d = dt.datetime(y, m, 1, tzinfo=dt.UTC)
        if u0 <= d.timestamp() <= u1 and (y * 12 + m - 1) % step == 0:
            values.append(d.timestamp())
            labels.append(f"{y}-{m:02d}")
        y, m = (y + 1, 1) if m == 12 else (y, m + 1)
    return values, labels


def _contours(x: np.ndarray, y: np.ndarray, z: np.ndarray,
              levels: tuple[float, ...]) -> list[tuple[float, np.ndarray]]:
    """(level, (K, 2) line) of each contour line of z (rows x, columns y)."""
    import contourpy

    finite = z[np.isfinite(z)]
    if finite.size == 0:
        return []
    gen = contourpy.contour_generator(x, y, np.ma.masked_invalid(z.T))
    out: list[tuple[float, np.ndarray]] = []
    for level in levels:
        if finite.min() < level < finite.max():
            out.extend((level, np.asarray(line)) for line in gen.lines(level))
    return out


def draw(p: Panels, s: Session, w: float, h: float) -> None:
    from imgui_bundle import implot

    k = s.ui_scale
    top = 0.0 if s.presenting else MENU_H * k + GAP * k
    bottom = h if s.presenting else h - (TIME_H + 2 * GAP) * k
    width = min(WIDTH * RIGHT_W * k, 0.6 * w)
    imgui.set_next_window_pos(imgui.ImVec2(w - width - GAP * k, top), imgui.Cond_.always)
    imgui.set_next_window_size(imgui.ImVec2(width, bottom - top), imgui.Cond_.always)
    opened, keep = imgui.begin("Launch season", True, imgui.WindowFlags_.no_collapse
                               | imgui.WindowFlags_.no_move | imgui.WindowFlags_.no_resize)
    p.report["rects"]["window:season"] = _rect_of_window()
    if opened:
        _contents(p, s, implot)
    imgui.end()
    if keep is False:
        s.show_season = False


def _rect_of_window() -> tuple[float, float, float, float]:
    pos, size = imgui.get_window_pos(), imgui.get_window_size()
    return (pos.x, pos.y, size.x, size.y)


def _contents(p: Panels, s: Session, implot: Any) -> None:
    ed = s.editor
    scene = ed.scene
    choices = season_bodies(scene)
    if len(choices) < 2:
        imgui.push_text_wrap_pos(0.0)
        imgui.text_colored(AMBER, "A launch season needs two bodies on closed orbits; the "
                           f"scene has {len(choices)}.")
        imgui.pop_text_wrap_pos()
        return
    st = p.season
    inp = st.inputs
    if inp is None or inp.from_index not in choices or inp.to_index not in choices:
        pair = default_pair(scene, ed.selection)
        assert pair is not None
        inp = st.inputs = suggested(scene, s.clock.t_s, *pair)
        st.result = None
    changed = False
    if imgui.begin_table("season-in", 2, imgui.TableFlags_.sizing_stretch_prop):
        imgui.table_setup_column("w", imgui.TableColumnFlags_.width_fixed, 120 * s.ui_scale)
        imgui.table_setup_column("v", imgui.TableColumnFlags_.width_stretch)
        for label, attr in (("from", "from_index"), ("to", "to_index")):
            imgui.table_next_row()
            imgui.table_next_column()
            imgui.align_text_to_frame_padding()
            imgui.text(label)
            imgui.table_next_column()
            new = p.body_combo(f"season:{label}", s, getattr(inp, attr), choices)
            if new != getattr(inp, attr):
                setattr(inp, attr, new)
                changed = True
        for label, attr in (("departure", "depart"), ("arrival", "arrive")):
            imgui.table_next_row()
            imgui.table_next_column()
            imgui.align_text_to_frame_padding()
            imgui.text(label)
            imgui.table_next_column()
            lo, hi = getattr(inp, attr)
            half = 0.5 * (imgui.get_content_region_avail().x - 8)
            lo2 = p.live_input(f"season:{attr}:from", lo, half)
            imgui.same_line()
            hi2 = p.live_input(f"season:{attr}:to", hi, half)
            if (lo2, hi2) != (lo, hi):
                setattr(inp, attr, (lo2, hi2))
        for label, attr in (("parking alt.", "park_altitude"),
                            ("capture alt.", "capture_altitude")):
            imgui.table_next_row()
            imgui.table_next_column()
            imgui.align_text_to_frame_padding()
            imgui.text(label)
            imgui.table_next_column()
            setattr(inp, attr, p.live_input(f"season:{attr}", getattr(inp, attr), -1))
        imgui.end_table()
    if changed:  # other bodies: their season's dates
        fresh = suggested(scene, s.clock.t_s, inp.from_index, inp.to_index)
        inp.depart, inp.arrive = fresh.depart, fresh.arrive
    stale = st.result is not None and not (
        scene.bodies[inp.from_index] is st.result.dep
        and scene.bodies[inp.to_index] is st.result.arr)  # a body was edited
    if p.button("Compute") or (st.result is None and not st.error) or changed or stale:
        try:
            st.result = compute(scene, inp)
            st.error = ""
            st.cell = None
        except EditRefused as err:
            st.result = None
            st.error = err.problems[0]
    if st.error:
        p.refusal(st.error)
        p.report["season"] = {"error": st.error}
        return
    res = st.result
    assert res is not None
    imgui.same_line()
    imgui.text_colored(DIM, "click a cell: that transfer joins the scene (Ctrl+Z undoes)")
    rows = cell_rows(scene, res, st.cell) if st.cell is not None else ()
    avail = imgui.get_content_region_avail().y
    plot_h = max(200.0, avail - (len(rows) + 3) * imgui.get_text_line_height_with_spacing())
    marks: dict[str, Any] = {}
    clicked = _plot(implot, scene, res, st.cell, plot_h, marks)
    if clicked is not None:
        cell = res.cell_at(*clicked)
        if cell is not None:
            st.cell = cell
            try:
                st.added = pick(ed, res, cell, st.added)
                ed.select(st.added)
                s.clock.seek_scene(float(res.grid.t_dep_s[cell[0]]))
                s.message = (f"added the transfer {res.dep.name} to {res.arr.name} departing "
                             f"{cell_rows(scene, res, cell)[0][1]} (Ctrl+Z undoes)")
            except EditRefused as err:
                s.message = "not added: " + err.problems[0]
            rows = cell_rows(ed.scene, res, cell)
    p.table("season-cell", rows, 150 * s.ui_scale)
    imgui.push_text_wrap_pos(0.0)
    imgui.text_colored(DIM, CAUTION)
    imgui.pop_text_wrap_pos()
    p.report["season"] = {"cell": list(st.cell) if st.cell is not None else None,
                          "rows": [list(r) for r in rows], "added": st.added,
                          "inputs": [*inp.depart, *inp.arrive], **marks}


def _plot(implot: Any, scene: Any, res: Season, cell: tuple[int, int] | None,
          height: float, report: dict[str, Any]) -> tuple[float, float] | None:
    """Draw the plot; the (departure, arrival) scene times of a click, if any. The
    screen places of the marked cells go into ``report``."""
    g = res.grid
    x, y = _unix(scene, g.t_dep_s), _unix(scene, g.t_arr_s)
    c3 = g.c3_m2_s2 / 1e6
    finite = c3[np.isfinite(c3)]
    lo = float(finite.min())
    hi = float(min(finite.max(), max(4.0 * lo, lo + 20.0)))
    clicked = None
    implot.push_colormap(implot.Colormap_.viridis)
    if implot.begin_plot("##season", imgui.ImVec2(-84.0, height)):
        implot.setup_axes("departure (TDB)", "arrival (TDB)")
        # Month ticks on both axes (the plot's own time scale cannot be vertical).
        for axis, u in ((implot.ImAxis_.x1, x), (implot.ImAxis_.y1, y)):
            implot.setup_axis_ticks(axis, *_month_ticks(float(u[0]), float(u[-1])))
        implot.setup_axes_limits(float(x[0]), float(x[-1]), float(y[0]), float(y[-1]),
                                 implot.Cond_.always)
        implot.setup_legend(implot.Location_.south,
                            implot.LegendFlags_.outside | implot.LegendFlags_.horizontal)
        # Rows of the heat map run from the top (the last arrival) down.
        values = np.where(np.isfinite(c3), np.minimum(c3, hi), hi).T[::-1].copy()
        implot.plot_heatmap("departure C3 (km2/s2)", values, lo, hi, "",
                            implot.Point(float(x[0]), float(y[0])),
                            implot.Point(float(x[-1]), float(y[-1])))
        V = imgui.ImVec4
        c3_line = implot.Spec(line_color=V(*CONTOUR_RGBA), line_weight=1.5)
        for level, line in _contours(x, y, c3, C3_LEVELS):
            if level <= hi:
                implot.plot_line("C3 contours", np.ascontiguousarray(line[:, 0]),
                                 np.ascontiguousarray(line[:, 1]), c3_line)
                mid = line[len(line) // 3]
                implot.plot_text(f"{level:g}", float(mid[0]), float(mid[1]))
        tof = g.tof_s / 86400.0
        tof_line = implot.Spec(line_color=V(*TOF_RGBA), line_weight=1.0)
        for level, line in _contours(x, y, np.where(tof > 0, tof, np.nan),
                                     tuple(float(d) for d in range(100, 1000, 100))):
            implot.plot_line("time of flight", np.ascontiguousarray(line[:, 0]),
                             np.ascontiguousarray(line[:, 1]), tof_line)
            mid = line[len(line) // 2]
            implot.plot_text(f"{level:g} d", float(mid[0]), float(mid[1]))
        marks = (("least C3", g.best("c3"), implot.Marker_.circle, LEAST_C3_RGBA),
                 ("least dv", g.best("total"), implot.Marker_.square, LEAST_DV_RGBA),
                 ("picked", cell, implot.Marker_.diamond, PICKED_RGBA))
        for label, at, marker, rgba in marks:
            if at is not None:
                spec = implot.Spec(marker=marker, marker_size=7.0, line_color=V(*rgba),
                                   marker_fill_color=V(*rgba), marker_line_color=V(*rgba))
                implot.plot_scatter(label, np.array([x[at[0]]]), np.array([y[at[1]]]), spec)
        # Where the marked cells are on the screen, for tests that click them.
        shown = {}
        for label, at, _m, _c in marks:
            if at is not None:
                q = implot.plot_to_pixels(float(x[at[0]]), float(y[at[1]]))
                shown[label] = [q.x, q.y]
        report["marks_px"] = shown
        if implot.is_plot_hovered() and imgui.is_mouse_clicked(imgui.MouseButton_.left):
            m = implot.get_plot_mouse_pos()
            clicked = (float(m.x - x[0] + g.t_dep_s[0]), float(m.y - y[0] + g.t_arr_s[0]))
        implot.end_plot()
    imgui.same_line()
    implot.colormap_scale("C3 (km2/s2)", lo, hi, imgui.ImVec2(74, height))
    implot.pop_colormap()
    return clicked
