"""The "Timeline" panel: the show's tracks on one time axis, a scrub bar, and the fields of
what is selected.

Tracks, top to bottom: the ruler (show time, the scrub bar: click or drag anywhere to go
there), the camera keys, one track per fade (its points and its opacity line), one per
caption (a bar from start to end) and the clock. A click selects a key, a fade point or a
caption; dragging it moves it in time (one undo step per drag); Delete removes it; a
double click on the camera track keys the view at that time, on a fade track adds a
point. Ctrl+wheel over the tracks zooms the time axis around the pointer, Shift+wheel
slides it, and the buttons by the time read-out zoom or show the whole show again.
Times picked with the mouse snap to a grid that keeps about 6 px between its steps
(whole seconds, tenths, down to single frames when zoomed in); Alt held places on any
frame. Under the tracks, the fields of the selection (its values and easing; a
caption's text, times, place and size), or the show's own settings when nothing is
selected; the fields wrap onto more lines in a narrow window.
Every change goes through ``viewer.gui.timeline_edits`` (its refusals are one line under
the field) and the editor's history, and the picture follows at once.

Where each track, key and the axis are is written into ``report`` ("timeline_axis":
x of show time 0 and of the end, px; rects "timeline:ruler", "timeline:camera:I",
"timeline:fade:I:J", "timeline:caption:I"), so the window tests can drive it.
"""

from __future__ import annotations

import math
from typing import TYPE_CHECKING, Any

from imgui_bundle import imgui

from ...scene import spec
from ...scene.timeline import _fade_value
from .. import theme
from .. import timeline_edits as te
from ..session import Session
from .widgets import AMBER, DIM, px

if TYPE_CHECKING:
    from . import Panels

#: Height of one track, and width of the column of track names, px at UI scale 1.
TRACK_H = 20.0
LABEL_COL = 150.0
#: The shortest part of a show the axis zooms to (s), and the zoom per wheel notch.
MIN_SPAN_S = 0.5
ZOOM_PER_NOTCH = 0.8
#: The snapping grid keeps at least this many px between its steps (UI scale 1).
SNAP_PX = 6.0
#: How near the pointer must be to a key to pick it, px at UI scale 1.
PICK_PX = 7.0
CAMERA_COLOR = (0.55, 0.78, 1.0, 1.0)
FADE_COLOR = (1.0, 0.75, 0.3, 1.0)
CAPTION_COLOR = (0.62, 0.86, 0.62, 1.0)
PLAYHEAD = (1.0, 0.42, 0.38, 1.0)


def _u32(rgba: tuple[float, ...]) -> int:
    return imgui.color_convert_float4_to_u32(imgui.ImVec4(*rgba))


def _fmt(t: float) -> str:
    return f"{t:.2f} s"


def draw(p: Panels, s: Session, pos: tuple[float, float], size: tuple[float, float]) -> None:
    if p.window("Timeline", pos, size):
        if imgui.is_window_appearing():
            p.report.setdefault("rects", {})
        _controls(p, s)
        tl = s.editor.scene.timeline
        rows = _rows(s)
        line = imgui.get_frame_height_with_spacing()
        # The tracks take what they need while the fields keep two lines; the fields get
        # the rest (they scroll when the selection has more), the tracks scroll past that.
        avail = imgui.get_content_region_avail()
        need = px(TRACK_H) * len(rows) + 2.0 * imgui.get_style().window_padding.y
        tracks_h = max(px(TRACK_H) * 2, min(need, avail.y - 2.0 * line - px(10)))
        io = imgui.get_io()
        # Ctrl+wheel zooms and Shift+wheel slides the time axis: the list must not scroll.
        flags = (imgui.WindowFlags_.no_scroll_with_mouse if io.key_ctrl or io.key_shift
                 else 0)
        if imgui.begin_child("tracks", imgui.ImVec2(0, tracks_h), 0, flags):
            _tracks(p, s, tl, rows)
        imgui.end_child()
        imgui.separator()
        if imgui.begin_child("fields", imgui.ImVec2(0, 0)):
            _fields(p, s)
        imgui.end_child()
    imgui.end()


# --- the controls row --------------------------------------------------------------------


def _controls(p: Panels, s: Session) -> None:
    c, scene = s.clock, s.editor.scene
    tl = scene.timeline
    if p.button(("Pause" if c.playing else "Play") + "##show", imgui.ImVec2(px(70), 0)):
        if not c.on_show:
            s.seek_show(c.show_s)
        s.toggle_play()
    for label, run in (("|<", lambda: s.seek_show(0.0)), ("<", lambda: _step(s, -1)),
                       (">", lambda: _step(s, 1)), (">|", lambda: s.seek_show(tl.duration_s))):
        imgui.same_line()
        if p.button(f"{label}##show"):
            run()
    imgui.same_line()
    changed, c.loop = imgui.checkbox("loop", c.loop)
    p.report["rects"]["timeline:loop"] = _item_rect()
    imgui.same_line()
    imgui.set_next_item_width(px(80))
    speeds = ("0.125", "0.25", "0.5", "1", "2", "4", "8")
    now = f"{c.speed:g}"
    if imgui.begin_combo("##speed", f"{now} x"):
        for v in speeds:
            if imgui.selectable(f"{v} x", v == now)[0]:
                c.speed = float(v)
        imgui.end_combo()
    imgui.same_line()
    if p.button("Key the camera here"):
        s.key_camera_here()
    imgui.same_line()
    if p.button("+ caption"):
        _add_caption(s)
    imgui.same_line()
    if p.button("+ fade"):
        _add_fade(s)
    ep, t = scene.epoch, c.t_s
    when = s.kept_text("show date", (ep.jd1, ep.jd2, ep.scale, t),
                       lambda: ep.plus_seconds(t).iso())
    state = "" if c.on_show else "   (off the show: scene time)"
    text = (f"{c.show_s:.2f} s of {tl.duration_s:g} s   frame {c.frame} of "
            f"{tl.frame_count}   {when}{state}")
    imgui.text(text)
    p.report["timeline_time"] = text
    # Zoom of the time axis (also Ctrl+wheel over the tracks; Shift+wheel slides it).
    dur = tl.duration_s
    span = p.timeline_span or (0.0, dur)
    mid = min(max(c.show_s, span[0]), span[1])
    for label, notches in (("-", -3.0), ("+", 3.0)):
        imgui.same_line()
        if p.button(f"{label}##zoom"):
            p.timeline_span = zoom_span(span, dur, notches, mid)
    imgui.same_line()
    if p.button("whole show"):
        p.timeline_span = None


def _step(s: Session, frames: int) -> None:
    if not s.clock.on_show:
        s.seek_show(s.clock.show_s)
    s.clock.step(frames)
    s.follow_camera = True


def _add_caption(s: Session) -> None:
    c, tl = s.clock, s.editor.scene.timeline
    start = min(c.frame_show_s, max(0.0, tl.duration_s - 1.0 / tl.fps))
    end = min(tl.duration_s, start + 4.0)
    out = s.try_edit_show(lambda t: te.add_caption(t, "A caption", start, end), "add a caption")
    if out is not None:
        s.picked = ("caption", out[1])


def _add_fade(s: Session) -> None:
    """A fade of the selected body (every body if none) in over a second from now."""
    c, tl = s.clock, s.editor.scene.timeline
    body = s.editor.body.name if s.editor.body is not None else "*"
    a = min(c.frame_show_s, max(0.0, tl.duration_s - 1.0))
    b = min(tl.duration_s, a + 1.0)
    times, values = ([a, b], [0.0, 1.0]) if b > a else ([a], [1.0])
    out = s.try_edit_show(lambda t: te.add_fade(s.editor.scene, t, body, "all", times, values),
                          f"add a fade of {body}")
    if out is not None:
        s.picked = ("fade", out[1])


# --- the tracks --------------------------------------------------------------------------


def _rows(s: Session) -> list[tuple[str, Any]]:
    tl = s.editor.scene.timeline
    rows: list[tuple[str, Any]] = [("ruler", None), ("camera", None)]
    rows += [("fade", i) for i in range(len(tl.fades))]
    rows += [("caption", i) for i in range(len(tl.captions))]
    rows.append(("clock", None))
    return rows


def _row_label(s: Session, kind: str, i: Any) -> str:
    tl = s.editor.scene.timeline
    if kind == "ruler":
        return "show time"
    if kind == "camera":
        return "camera"
    if kind == "fade":
        f = tl.fades[i]
        return f"{'every body' if f.body == '*' else f.body}: {f.mark}"
    if kind == "caption":
        return f'"{tl.captions[i].text}"'
    return f"clock: {tl.clock}"


def _item_rect() -> list[float]:
    a, b = imgui.get_item_rect_min(), imgui.get_item_rect_max()
    return [a.x, a.y, b.x, b.y]


def _span(p: Panels, s: Session, dur: float) -> tuple[float, float]:
    """The part of the show the axis spans now, kept inside the show; while the show
    plays, the span pages along so the play head stays on it."""
    if p.timeline_span is None:
        return 0.0, dur
    a, b = p.timeline_span
    w = min(max(b - a, min(MIN_SPAN_S, dur)), dur)
    a = min(max(a, 0.0), dur - w)
    t = s.clock.show_s
    if s.clock.playing and not a <= t <= a + w:
        a = min(max(t, 0.0), dur - w)
    p.timeline_span = None if w >= dur else (a, a + w)
    return a, a + w


def zoom_span(span: tuple[float, float], dur: float, notches: float,
              at_s: float) -> tuple[float, float] | None:
    """``span`` zoomed by wheel ``notches`` (positive: in) keeping show time ``at_s`` where
    it is on the axis; None when it spans the whole show again."""
    a, b = span
    w = min(max((b - a) * ZOOM_PER_NOTCH ** notches, min(MIN_SPAN_S, dur)), dur)
    if w >= dur:
        return None
    f = (at_s - a) / (b - a) if b > a else 0.5
    a = min(max(at_s - f * w, 0.0), dur - w)
    return a, a + w


def snap(t_s: float, px_per_s: float, fps: float, free: bool = False,
         min_px: float = SNAP_PX) -> float:
    """``t_s`` on the frame grid, and (unless ``free``) on the finest of frames, tenths,
    fifths, halves, seconds, ... whose steps are at least ``min_px`` apart on the axis."""
    frame = 1.0 / fps
    if not free:
        for q in (frame, 0.1, 0.2, 0.5, 1, 2, 5, 10, 15, 30, 60, 120, 300, 600):
            if q >= frame and q * px_per_s >= min_px:
                t_s = round(t_s / q) * q
                break
    return round(t_s * fps) / fps


def _tracks(p: Panels, s: Session, tl: Any, rows: list[tuple[str, Any]]) -> None:
    dl = imgui.get_window_draw_list()
    origin = imgui.get_cursor_screen_pos()
    width = imgui.get_content_region_avail().x
    row_h = px(TRACK_H)
    x0 = origin.x + px(LABEL_COL)
    x1 = origin.x + width - px(18)
    dur = tl.duration_s
    v0, v1 = _span(p, s, dur)

    def x_of(t: float) -> float:
        return x0 + (x1 - x0) * (t - v0) / (v1 - v0)

    def t_of(x: float) -> float:
        return min(max(v0 + (x - x0) / (x1 - x0) * (v1 - v0), 0.0), dur)

    p.report["timeline_axis"] = {"x0": x0, "x1": x1, "duration_s": dur, "from_s": v0,
                                 "to_s": v1, "top": origin.y, "row_h": row_h}
    # One invisible button over the whole area takes the clicks and drags.
    imgui.invisible_button("##tracks", imgui.ImVec2(max(width, 1.0), row_h * len(rows)))
    hovered, active = imgui.is_item_hovered(), imgui.is_item_active()
    if hovered:
        _wheel(p, dur, (v0, v1), t_of(imgui.get_mouse_pos().x))
    text_col, dim_col = _u32(theme.TEXT), _u32(theme.TEXT_SECONDARY)
    grid_col = _u32((0.25, 0.30, 0.42, 0.6))
    bottom = origin.y + row_h * len(rows)
    # Everything on the axis is clipped to it (a zoomed axis shows part of the show).
    dl.push_clip_rect(imgui.ImVec2(x0 - px(8), origin.y), imgui.ImVec2(x1 + px(18), bottom),
                      True)
    # Ticks every "nice" second count.
    step = _tick_step(v1 - v0, (x1 - x0) / px(70))
    for k in range(math.ceil(v0 / step - 1e-9), math.floor(v1 / step + 1e-9) + 1):
        x = x_of(k * step)
        dl.add_line(imgui.ImVec2(x, origin.y + row_h * 0.55), imgui.ImVec2(x, bottom),
                    grid_col)
        dl.add_text(imgui.ImVec2(x + 2, origin.y), dim_col, f"{k * step:.10g}")
    dl.pop_clip_rect()
    picks: list[tuple[float, float, tuple[Any, ...]]] = []  # (x, y, pick) for hit tests
    pk = s.picked
    for r, (kind, i) in enumerate(rows):
        y = origin.y + r * row_h
        mid = y + 0.5 * row_h
        if r:
            dl.add_line(imgui.ImVec2(origin.x, y), imgui.ImVec2(x1, y), grid_col)
        label = _row_label(s, kind, i)
        dl.push_clip_rect(imgui.ImVec2(origin.x, y), imgui.ImVec2(x0 - 4, y + row_h), True)
        dl.add_text(imgui.ImVec2(origin.x + 2, y + 2), text_col if kind != "ruler" else dim_col,
                    label)
        dl.pop_clip_rect()
        p.report["rects"][f"timeline:row:{kind}:{i}"] = [origin.x, y, x1, y + row_h]
        dl.push_clip_rect(imgui.ImVec2(x0 - px(8), y), imgui.ImVec2(x1 + px(8), y + row_h),
                          True)
        if kind == "ruler":
            p.report["rects"]["timeline:ruler"] = [x0, y, x1, y + row_h]
        elif kind == "camera":
            for k, key in enumerate(tl.camera_keys):
                x = x_of(key.at_s)
                on = pk == ("camera", k)
                r_px = px(6.5 if on else 5.5)
                dl.add_quad_filled(imgui.ImVec2(x, mid - r_px), imgui.ImVec2(x + r_px, mid),
                                   imgui.ImVec2(x, mid + r_px), imgui.ImVec2(x - r_px, mid),
                                   _u32(PLAYHEAD if on else CAMERA_COLOR))
                picks.append((x, mid, ("camera", k)))
                p.report["rects"][f"timeline:camera:{k}"] = [x - r_px, mid - r_px, x + r_px,
                                                             mid + r_px]
        elif kind == "fade":
            f = tl.fades[i]
            top, bot = y + 3, y + row_h - 3
            pts = [imgui.ImVec2(x_of(t), bot - (bot - top) * _fade_value(f, t))
                   for t in _samples(f.at_s, dur)]
            for a, b in zip(pts[:-1], pts[1:], strict=False):
                dl.add_line(a, b, _u32(FADE_COLOR), 1.5)
            for j, (t, v) in enumerate(zip(f.at_s, f.opacity, strict=True)):
                x, yy = x_of(t), bot - (bot - top) * v
                on = pk == ("fade", i, j)
                dl.add_circle_filled(imgui.ImVec2(x, yy), px(5.5 if on else 4.5),
                                     _u32(PLAYHEAD if on else FADE_COLOR))
                picks.append((x, yy, ("fade", i, j)))
                p.report["rects"][f"timeline:fade:{i}:{j}"] = [x - 5, yy - 5, x + 5, yy + 5]
        elif kind == "caption":
            c = tl.captions[i]
            xa, xb = x_of(c.start_s), x_of(min(c.end_s, dur))
            on = pk == ("caption", i)
            dl.add_rect_filled(imgui.ImVec2(xa, y + 4), imgui.ImVec2(xb, y + row_h - 4),
                               _u32((*CAPTION_COLOR[:3], 0.85 if on else 0.45)), 3.0)
            if on:
                dl.add_rect(imgui.ImVec2(xa, y + 4), imgui.ImVec2(xb, y + row_h - 4),
                            _u32(PLAYHEAD), 3.0, 2.0)
            picks.append((xa, mid, ("caption", i)))
            p.report["rects"][f"timeline:caption:{i}"] = [xa, y + 4, xb, y + row_h - 4]
        elif kind == "clock" and tl.clock != "none":
            dl.add_rect_filled(imgui.ImVec2(x_of(0.0), y + 6),
                               imgui.ImVec2(x_of(dur), y + row_h - 6),
                               _u32((0.85, 0.88, 0.95, 0.35)), 2.0)
        dl.pop_clip_rect()
    # The play head.
    xp = x_of(s.clock.show_s)
    if x0 - 1 <= xp <= x1 + 1:
        dl.add_line(imgui.ImVec2(xp, origin.y), imgui.ImVec2(xp, bottom), _u32(PLAYHEAD), 2.0)
    # What is off the zoomed axis cannot be picked.
    picks = [pk_ for pk_ in picks if x0 - px(PICK_PX) <= pk_[0] <= x1 + px(PICK_PX)
             or pk_[2][0] == "caption"]

    def snapped(t: float) -> float:
        return snap(t, (x1 - x0) / (v1 - v0), tl.fps, imgui.get_io().key_alt, px(SNAP_PX))

    _pointer(p, s, tl, rows, picks, origin.y, row_h, x0, t_of, snapped, hovered, active)


def _wheel(p: Panels, dur: float, span: tuple[float, float], at_s: float) -> None:
    """Ctrl+wheel zooms the axis around ``at_s``; Shift+wheel (or a sideways wheel)
    slides it by a tenth of its span per notch."""
    io = imgui.get_io()
    if io.key_ctrl and io.mouse_wheel:
        p.timeline_span = zoom_span(span, dur, io.mouse_wheel, at_s)
    elif p.timeline_span is not None and (io.mouse_wheel_h or (io.key_shift
                                                               and io.mouse_wheel)):
        a, b = span
        d = -0.1 * (b - a) * (io.mouse_wheel_h or io.mouse_wheel)
        d = min(max(d, -a), dur - b)
        p.timeline_span = (a + d, b + d)


def _samples(times: tuple[float, ...], dur: float) -> list[float]:
    """Show times to draw a fade's opacity line through: its points and eased stretches."""
    out = [0.0]
    for a, b in zip(times[:-1], times[1:], strict=False):
        out += [a + (b - a) * k / 12.0 for k in range(13)]
    out += [*times, dur]
    return sorted(set(t for t in out if 0.0 <= t <= dur))


def _tick_step(dur: float, ticks: float) -> float:
    raw = dur / max(ticks, 1.0)
    for step in (0.1, 0.2, 0.5, 1, 2, 5, 10, 15, 30, 60, 120, 300, 600, 1800, 3600):
        if step >= raw:
            return float(step)
    return float(10 ** math.ceil(math.log10(raw)))


def _pointer(p: Panels, s: Session, tl: Any, rows: list[tuple[str, Any]],
             picks: list[tuple[float, float, tuple[Any, ...]]], top: float, row_h: float,
             x0: float, t_of: Any, snapped: Any, hovered: bool, active: bool) -> None:
    """Clicks and drags on the tracks: pick, move, scrub, add."""
    mouse = imgui.get_mouse_pos()
    state = p.timeline_drag
    if imgui.is_item_clicked(0):
        r = int((mouse.y - top) // row_h)
        kind, i = rows[r] if 0 <= r < len(rows) else ("", None)
        near = [(abs(x - mouse.x) + 0.3 * abs(y - mouse.y), pick) for x, y, pick in picks
                if abs(y - mouse.y) <= row_h * 0.5 + 2 and (abs(x - mouse.x) <= px(PICK_PX)
                                                              or pick[0] == "caption")]
        caption_hit = [pick for pick in (n[1] for n in near) if pick[0] == "caption"
                       and _in_caption(tl, pick[1], t_of(mouse.x))]
        keys = [n for n in near if n[1][0] != "caption"]
        if imgui.is_mouse_double_clicked(0) and mouse.x >= x0:
            t = snapped(t_of(mouse.x))
            if kind == "camera":
                s.seek_show(t)
                s.sync_show()
                s.follow_camera = False  # key the view shown, not the show camera
                s.key_camera_here()
            elif kind == "fade" and i is not None:
                fi: int = i
                out = s.try_edit_show(lambda t_: te.add_fade_point(t_, fi, t),
                                      "add a fade point")
                if out is not None:
                    s.picked = ("fade", fi, out[1])
            p.timeline_drag = None
            return
        if keys:
            pick = min(keys)[1]
            s.picked = pick
            p.timeline_drag = {"pick": pick, "x": mouse.x, "moved": False,
                               "grab": t_of(mouse.x) - _pick_time(tl, pick)}
        elif caption_hit:
            pick = caption_hit[0]
            s.picked = pick
            p.timeline_drag = {"pick": pick, "x": mouse.x, "moved": False,
                               "grab": t_of(mouse.x) - _pick_time(tl, pick)}
        elif kind == "fade" and mouse.x < x0:
            s.picked = ("fade", i)
            p.timeline_drag = None
        elif mouse.x >= x0:  # the ruler, or empty track: the scrub bar
            if kind != "ruler":
                s.picked = None
            p.timeline_drag = {"pick": None}
            s.seek_show(snapped(t_of(mouse.x)))
    if active and state is not None and imgui.is_mouse_down(0):
        if state["pick"] is None:
            s.seek_show(snapped(t_of(mouse.x)))
        elif abs(mouse.x - state["x"]) > 2 or state["moved"]:
            state["moved"] = True
            _move(s, state["pick"], snapped(t_of(mouse.x) - state["grab"]))
    if not imgui.is_mouse_down(0):
        p.timeline_drag = None
    if hovered and mouse.x >= x0:
        imgui.set_tooltip(f"{snapped(t_of(mouse.x)):.10g} s into the show")


def _in_caption(tl: Any, i: int, t: float) -> bool:
    c = tl.captions[i]
    return c.start_s <= t <= min(c.end_s, tl.duration_s)


def _pick_time(tl: Any, pick: tuple[Any, ...]) -> float:
    if pick[0] == "camera":
        return float(tl.camera_keys[pick[1]].at_s)
    if pick[0] == "fade":
        return float(tl.fades[pick[1]].at_s[pick[2]])
    return float(tl.captions[pick[1]].start_s)


def _move(s: Session, pick: tuple[Any, ...], t: float) -> None:
    """Move the picked key to show time ``t`` (one undo step per drag); a time the file
    does not allow (past a neighbour, outside the show) is not applied: the message says
    what is allowed."""
    tl = s.editor.scene.timeline
    if abs(_pick_time(tl, pick) - t) < 1e-9:
        return
    kind = pick[0]
    if kind == "camera":
        edit: Any = lambda x: te.move_camera_key(x, pick[1], t)  # noqa: E731
        label = f"move camera key {pick[1] + 1}"
    elif kind == "fade":
        edit = lambda x: te.move_fade_point(x, pick[1], pick[2], t)  # noqa: E731
        label = f"move fade point {pick[2] + 1}"
    else:
        edit = lambda x: te.move_caption(x, pick[1], t)  # noqa: E731
        label = f"move caption {pick[1] + 1}"
    s.try_edit_show(edit, label, merge=True)


# --- the fields of the selection ---------------------------------------------------------


def _wrap(label: str, width: float) -> None:
    """Start a new line when a field (its ``label`` and ``width`` px at UI scale 1) does
    not fit on this one, so no field is cut off in a narrow window."""
    style = imgui.get_style()
    need = imgui.calc_text_size(label).x + 2 * style.item_spacing.x + px(width)
    if imgui.get_cursor_pos_x() > style.window_padding.x + 1 and \
            imgui.get_content_region_avail().x < need:
        imgui.new_line()


def _field(p: Panels, s: Session, key: str, label: str, shown: str, edit: Any, what: str,
           width: float = 110.0) -> None:
    _wrap(label, width)
    imgui.align_text_to_frame_padding()
    imgui.text_colored(DIM, label)
    imgui.same_line()

    def commit(text: str) -> None:
        if text.strip() != shown:
            s.edit_show(lambda tl: edit(tl, text), what)
            s.message = f"{what}: {text.strip()} (Ctrl+Z undoes)"

    p.typed_field(key, shown, commit, px(width), rect=key, refusal=False)
    imgui.same_line()


def _choice(p: Panels, s: Session, key: str, label: str, current: str,
            choices: tuple[str, ...], edit: Any, what: str) -> None:
    _wrap(label, 105)
    imgui.align_text_to_frame_padding()
    imgui.text_colored(DIM, label)
    imgui.same_line()
    imgui.set_next_item_width(px(105))
    if imgui.begin_combo(f"##{key}", current, imgui.ComboFlags_.height_largest):
        for c in choices:
            if imgui.selectable(f"{c}##{key}", c == current)[0] and c != current:
                s.try_edit_show(lambda tl, c=c: edit(tl, c), what)
        imgui.end_combo()
    p.report["rects"][key] = _item_rect()
    imgui.same_line()


def _fields(p: Panels, s: Session) -> None:
    scene = s.editor.scene
    tl = scene.timeline
    pk = s.picked
    valid = pk is not None and (
        (pk[0] == "camera" and pk[1] < len(tl.camera_keys))
        or (pk[0] == "fade" and pk[1] < len(tl.fades)
            and (len(pk) < 3 or pk[2] < len(tl.fades[pk[1]].at_s)))
        or (pk[0] == "caption" and pk[1] < len(tl.captions)))
    if not valid:
        s.picked = pk = None
    if pk is None:
        _show_fields(p, s)
    elif pk[0] == "camera":
        _camera_fields(p, s, pk[1])
    elif pk[0] == "fade":
        _fade_fields(p, s, pk)
    else:
        _caption_fields(p, s, pk[1])
    imgui.new_line()
    errors = [v for k, v in p.errors.items() if k.startswith("tl:")]
    if errors:
        p.refusal(errors[-1])
        p.report["timeline_refusal"] = errors[-1]
    elif s.message.startswith("refused:"):
        imgui.text_colored(AMBER, s.message)


def _show_fields(p: Panels, s: Session) -> None:
    scene = s.editor.scene
    tl = scene.timeline
    imgui.text_colored(DIM, "The show:")
    imgui.same_line()
    from ...scene.writer import quantity

    _field(p, s, "tl:start", "start", quantity(tl.start_s, "time", scene.time_unit),
           lambda t, x: te.set_show(scene, t, "start", x), "show start", 90)
    _field(p, s, "tl:duration", "duration", f"{tl.duration_s:g} s",
           lambda t, x: te.set_show(scene, t, "duration", x), "show duration", 80)
    _field(p, s, "tl:rate", "rate", te.rate_text(tl.rate),
           lambda t, x: te.set_show(scene, t, "rate", x), "show rate", 100)
    _field(p, s, "tl:fps", "fps", f"{tl.fps:g}", lambda t, x: te.set_show(scene, t, "fps", x),
           "show fps", 50)
    _choice(p, s, "tl:clock", "clock", tl.clock, ("none", "date", "elapsed"),
            lambda t, x: te.set_show(scene, t, "clock", x), "show clock")
    imgui.new_line()
    imgui.text_colored(DIM, "Click a key to edit it; double-click the camera track to key "
                       "the view there.")


def _camera_fields(p: Panels, s: Session, i: int) -> None:
    scene = s.editor.scene
    key = scene.timeline.camera_keys[i]
    from ...scene.writer import angle, length

    def text(name: str) -> str:
        v = getattr(key, name)
        if v is None:
            return ""
        if name.endswith("_rad"):
            return angle(v)
        if name.endswith("_m"):
            return length(v, scene.length_unit)
        return str(v) if not isinstance(v, tuple) else "[a point]"

    def setter(name: str) -> Any:
        return lambda t, x: te.set_camera_key(scene, t, i, name, x)

    imgui.text_colored(DIM, f"Camera key {i + 1}:")
    imgui.same_line()
    _field(p, s, f"tl:cam:{i}:at", "at", f"{key.at_s:g} s", setter("at"),
           f"move camera key {i + 1}", 70)
    _choice(p, s, f"tl:cam:{i}:ease", "ease", key.ease, spec.EASES, setter("ease"),
            f"ease of camera key {i + 1}")
    if hasattr(key, "path"):
        _choice(p, s, f"tl:cam:{i}:path", "path", str(key.path), te._path_choices(),
                setter("path"), f"path of camera key {i + 1}")
    _choice(p, s, f"tl:cam:{i}:look", "look", key.look or "", ("top", "edge", "angles"),
            setter("look"), f"look of camera key {i + 1}")
    target = key.target if isinstance(key.target, str) or key.target is None else "[a point]"
    _field(p, s, f"tl:cam:{i}:target", "target", target or "", setter("target"),
           f"target of camera key {i + 1}", 90)
    imgui.new_line()
    for name, label in (("elevation_rad", "elevation"), ("azimuth_rad", "azimuth"),
                        ("width_m", "width"), ("distance_m", "distance"), ("fov_rad", "fov")):
        _field(p, s, f"tl:cam:{i}:{label}", label, text(name), setter(label),
               f"{label} of camera key {i + 1}", 85)


def _fade_fields(p: Panels, s: Session, pk: tuple[Any, ...]) -> None:
    scene = s.editor.scene
    i = pk[1]
    f = scene.timeline.fades[i]
    names = ("*", *(b.name for b in scene.bodies))
    imgui.text_colored(DIM, f"Fade {i + 1}:")
    imgui.same_line()
    _choice(p, s, f"tl:fade:{i}:body", "body", f.body, names,
            lambda t, x: te.set_fade(scene, t, i, body=x), f"body of fade {i + 1}")
    _choice(p, s, f"tl:fade:{i}:mark", "mark", f.mark, spec.FADE_MARKS,
            lambda t, x: te.set_fade(scene, t, i, mark=x), f"mark of fade {i + 1}")
    _choice(p, s, f"tl:fade:{i}:ease", "ease", f.ease, spec.EASES,
            lambda t, x: te.set_fade(scene, t, i, ease=x), f"ease of fade {i + 1}")
    imgui.new_line()
    if len(pk) < 3:
        imgui.text_colored(DIM, "Click a point of the fade to edit it; double-click its "
                           "track to add one.")
        return
    j = pk[2]
    imgui.text_colored(DIM, f"Point {j + 1}:")
    imgui.same_line()
    _field(p, s, f"tl:fade:{i}:{j}:at", "at", f"{f.at_s[j]:g} s",
           lambda t, x: te.move_fade_point(t, i, j, te.parse_show_time(x, t.duration_s, "at")),
           f"move fade point {j + 1}", 70)

    def opacity(t: Any, x: str) -> Any:
        try:
            v = float(x)
        except ValueError:
            raise te.TimelineRefused("opacity", "an opacity is a number from 0 to 1") from None
        return te.set_fade_point(t, i, j, v)

    _field(p, s, f"tl:fade:{i}:{j}:opacity", "opacity", f"{f.opacity[j]:g}", opacity,
           f"opacity of fade point {j + 1}", 60)


def _caption_fields(p: Panels, s: Session, i: int) -> None:
    scene = s.editor.scene
    c = scene.timeline.captions[i]

    def setter(name: str) -> Any:
        return lambda t, x: te.set_caption(t, i, name, x)

    imgui.text_colored(DIM, f"Caption {i + 1}:")
    imgui.same_line()
    _field(p, s, f"tl:cap:{i}:text", "text", c.text, setter("text"), f"text of caption {i + 1}",
           420)
    imgui.new_line()
    end = f"{c.end_s:g} s" if math.isfinite(c.end_s) else "end"
    _field(p, s, f"tl:cap:{i}:start", "start", f"{c.start_s:g} s", setter("start"),
           f"start of caption {i + 1}", 70)
    _field(p, s, f"tl:cap:{i}:end", "end", end, setter("end"), f"end of caption {i + 1}", 70)
    _field(p, s, f"tl:cap:{i}:fade", "fade", f"{c.fade_s:g} s", setter("fade"),
           f"fade of caption {i + 1}", 60)
    _choice(p, s, f"tl:cap:{i}:position", "at", c.position, spec.CAPTION_POSITIONS,
            setter("position"), f"position of caption {i + 1}")
    _field(p, s, f"tl:cap:{i}:size", "size", f"{c.size_px:g}", setter("size"),
           f"size of caption {i + 1}", 50)
