"""The viewer window: a pyglet window owning the loop, the scene drawn by the shared
renderer, the panels drawn by imgui on top.

The loop draws only when something changed: an input event (then a few frames, so
imgui settles), an edit, a camera move, or the clock playing. Otherwise it waits on the
X connection, so an idle window uses no CPU. ``ViewerWindow.run(quit_after=N,
screenshot=PNG)`` draws N frames, saves the whole window (panels included) and returns.

No global state: the imgui context, the GL context and the session belong to the window.
"""

from __future__ import annotations

import json
import math
import os
import time
from pathlib import Path
from typing import Any

import numpy as np

from .actions import action_for
from .camera_input import focus, on_screen, orbit, pan, zoom
from .clock import Clock
from .editor import Editor
from .overlays import scene_with_overlays
from .panels import Panels
from .session import Session
from .theme import PANEL_FONT_PX, apply_theme

#: Frames drawn after an input event, so imgui's hover and focus states settle.
SETTLE_FRAMES = 3
#: Longest wait for events when nothing moves, s (the loop wakes up to check quitting).
IDLE_WAIT_S = 0.5
#: Wall time per window frame given to a running render job's frames, s: the window
#: still draws several times a second while the job renders at nearly full speed.
JOB_BUDGET_S = 0.08
BACKGROUND = (0.02, 0.024, 0.035)


def _font_path() -> str | None:
    from importlib import resources

    p = resources.files("viewer").joinpath("fonts", "DejaVuSans.ttf")
    return str(p) if p.is_file() else None


#: A colour no frame starts with, written to one pixel to see if a swap keeps it.
_PROBE_RGB = (23, 161, 89)


def screen_keeps_pixels(ctx: Any, window: Any) -> bool:
    """Whether ``window``'s back buffer still holds its pixels after a buffer swap: one
    pixel of a black frame is set to a probe colour, the buffers swapped, and the pixel
    read back (GL_BACK). Software GLs that copy the back buffer to the window (llvmpipe,
    the machines Perifocal is measured on) keep it; GPU drivers that flip buffers show
    an older buffer there, so the answer is False and every frame is drawn whole."""
    window.switch_to()
    fw, fh = window.get_framebuffer_size()
    if fw <= 0 or fh <= 0:
        return False
    ctx.screen.use()
    ctx.clear(0.0, 0.0, 0.0, 1.0)
    r, g, b = (c / 255.0 for c in _PROBE_RGB)
    ctx.screen.clear(r, g, b, 1.0, viewport=(0, 0, 1, 1))
    window.flip()
    pixel = read_back_buffer(1, 1)
    ctx.clear(0.0, 0.0, 0.0, 1.0)
    return tuple(int(c) for c in pixel[0, 0, :3]) == _PROBE_RGB


def read_back_buffer(width: int, height: int) -> np.ndarray:
    """The current window's back buffer from its bottom-left corner, as RGBA uint8
    (height, width, 4), rows from the bottom: read with GL directly (moderngl's screen
    object names a colour attachment the default framebuffer does not have)."""
    import ctypes

    from pyglet import gl

    buf = (ctypes.c_ubyte * (width * height * 4))()
    gl.glBindFramebuffer(gl.GL_READ_FRAMEBUFFER, 0)
    gl.glReadBuffer(gl.GL_BACK)
    gl.glPixelStorei(gl.GL_PACK_ALIGNMENT, 1)
    gl.glReadPixels(0, 0, width, height, gl.GL_RGBA, gl.GL_UNSIGNED_BYTE, buf)
    return np.frombuffer(memoryview(buf), dtype=np.uint8).reshape(height, width, 4)


class ViewerWindow:
    """One scene in one window. ``editor`` holds the scene; ``size`` is (W, H) in px."""

    def __init__(self, editor: Editor, size: tuple[int, int] = (1600, 900),
                 visible: bool = True, ui_report: str | Path | None = None,
                 ui_scale: float = 1.0, screen: int | None = None, fullscreen: bool = False,
                 presenting: bool = False, view: str = "flat",
                 settings_file: Path | None = None) -> None:
        import moderngl
        import pyglet
        from imgui_bundle import imgui, implot

        from .imgui_gl import PanelInput, PanelRenderer

        self._pyglet = pyglet
        self._imgui = imgui
        config = pyglet.gl.Config(double_buffer=True, major_version=3,  # type: ignore[abstract]
                                  minor_version=3, depth_size=0)
        title = f"Perifocal - {editor.scene.title}"
        try:
            self.window = pyglet.window.Window(size[0], size[1], caption=title,
                                               resizable=True, visible=visible, config=config)
        except pyglet.window.NoSuchConfigException:
            self.window = pyglet.window.Window(size[0], size[1], caption=title,
                                               resizable=True, visible=visible)
        self.ctx = moderngl.create_context()
        self.imgui_ctx = imgui.create_context()
        self.implot_ctx = implot.create_context()
        io = imgui.get_io()
        io.set_ini_filename("")  # layout is ours; nothing is written beside the scene
        io.config_input_text_cursor_blink = False  # a blinking caret would need redraws
        font = _font_path()
        if font is not None:  # panel text of at least 18 px at scale 1 (projector-legible)
            io.fonts.add_font_from_file_ttf(font, PANEL_FONT_PX * ui_scale)
        apply_theme(imgui, ui_scale)
        io.fonts.flags |= imgui.ImFontAtlasFlags_.no_baked_lines  # sampled nearest
        w, h = self.window.get_size()
        io.display_size = imgui.ImVec2(float(w), float(h))
        self.panel_renderer = PanelRenderer(self.ctx)
        #: The screen's back buffer keeps its pixels across a swap (software GLs such as
        #: llvmpipe copy it to the window; a GPU's flipped buffers do not): each frame
        #: then draws only the picture anew and leaves unchanged panels on the screen.
        self.screen_keeps_pixels = screen_keeps_pixels(self.ctx, self.window)
        self.input = PanelInput(h)
        self.renderer: Any = None
        self.render_error = ""
        try:
            from ..render import Renderer

            self.renderer = Renderer(self.ctx)
        except Exception as err:  # the window still edits without the scene picture
            self.render_error = f"the scene cannot be drawn: {err}"
        self.session = Session(editor=editor, clock=Clock.for_scene(editor.scene),
                               camera=editor.scene.camera, message=self.render_error,
                               renderer=self.renderer, ui_scale=ui_scale,
                               fullscreen=fullscreen, presenting=presenting,
                               settings_file=settings_file)
        if settings_file is not None:  # the recent files: this scene first
            from .settings import load_recent

            self.session.recent = load_recent(settings_file)
            if editor.path is not None:
                self.session.remember(editor.path)
        screens = pyglet.display.get_display().get_screens()
        if screen is not None and not 0 <= screen < len(screens):
            raise ValueError(f"screen {screen} does not exist (this display has "
                             f"{len(screens)}: 0 to {len(screens) - 1})")
        self._screen = screens[screen] if screen is not None else None
        self._view_state: Any = None
        self._job_renderer: Any = None
        self._job_state = ""
        self._shown_editor: Any = editor
        self.panels = Panels()
        self.ui_report = Path(ui_report) if ui_report is not None else None
        self._pending = SETTLE_FRAMES
        self._last_revision = -1
        self._last_camera: Any = None
        self._last_layout: dict[str, Any] = {}
        self._drag_view: Any = None
        #: "flat", or "dome"/"panorama": the picture is the master the export would make.
        self.session.view_mode = view
        self._immersive: Any = None
        #: The dome preview drawn this frame, copied to the screen under the panels.
        self._blit: tuple[Any, tuple[int, int], int, int] | None = None
        self._shown: Any = None  # the last show picture, with what it was made from
        self._overlaid: Any = None  # the last shown scene with its overlay switches
        #: The geometry the picture area of the screen shows, while it keeps its pixels.
        self._picture_geom: Any = None
        self.preview_rect: tuple[int, int, int, int] | None = None
        self._closed = False
        #: A frame drawn by draw_frame and not yet swapped onto the screen.
        self._unshown = False
        self.frames_drawn = 0
        self.frame_times_s: list[float] = []
        self._attach()

    @property
    def editor(self) -> Editor:
        """The editor of the scene shown (another one after File > Open)."""
        return self.session.editor

    # --- events ---------------------------------------------------------------------------

    def _attach(self) -> None:
        win = self.window
        key = self._pyglet.window.key
        mouse = self._pyglet.window.mouse
        imgui = self._imgui

        def wake() -> None:
            self._pending = SETTLE_FRAMES

        def on_mouse_motion(x: int, y: int, dx: int, dy: int) -> None:
            self.input.mouse_move(x, y)
            wake()

        def on_mouse_press(x: int, y: int, button: int, mods: int) -> None:
            self.input.mouse_button(x, y, button, True)
            wake()

        def on_mouse_release(x: int, y: int, button: int, mods: int) -> None:
            self.input.mouse_button(x, y, button, False)
            wake()

        def on_mouse_drag(x: int, y: int, dx: int, dy: int, buttons: int, mods: int) -> None:
            self.input.mouse_move(x, y)
            wake()
            if imgui.get_io().want_capture_mouse:
                return
            s = self.session
            view = self._view()
            if buttons & mouse.RIGHT or (buttons & mouse.LEFT and mods & key.MOD_SHIFT):
                s.camera = self._unshift(pan(s.camera, view, dx, -dy))
            elif buttons & mouse.LEFT:
                s.camera = orbit(s.camera, dx, -dy)

        def on_mouse_scroll(x: int, y: int, sx: float, sy: float) -> None:
            self.input.mouse_move(x, y)
            wake()
            if imgui.get_io().want_capture_mouse:
                self.input.scroll(sx, sy)
                return
            h = self.window.get_size()[1]
            self.session.camera = self._unshift(zoom(self.session.camera, self._view(), sy,
                                                     x, h - y))

        def on_key_press(symbol: int, mods: int) -> bool:
            self.input.key(symbol, mods, True)
            wake()
            self._shortcut(symbol, mods)
            return True  # Escape must not close the window

        def on_key_release(symbol: int, mods: int) -> None:
            self.input.key(symbol, mods, False)
            wake()

        def on_text(text: str) -> None:
            self.input.text(text)
            wake()

        def on_resize(w: int, h: int) -> None:
            self.panel_renderer.forget()
            self.input.height_px = h
            imgui.get_io().display_size = imgui.ImVec2(float(w), float(h))
            wake()

        def on_close() -> bool:
            self.session.request_quit()
            wake()
            return True

        def on_expose() -> None:
            self.panel_renderer.forget()  # the window system may have drawn over it
            wake()

        for handler in (on_mouse_motion, on_mouse_press, on_mouse_release, on_mouse_drag,
                        on_mouse_scroll, on_key_press, on_key_release, on_text, on_resize,
                        on_close, on_expose):
            win.push_handlers(**{handler.__name__: handler})

    def _shortcut(self, symbol: int, mods: int) -> None:
        """Run the action bound to this key (``viewer.gui.actions``). Keys with Ctrl work
        everywhere, function keys everywhere but in a dialog (they type no text, and a
        field that has just taken Enter may still hold the keyboard for a frame); other
        plain keys only while no field or dialog takes the keyboard."""
        key = self._pyglet.window.key
        s = self.session
        ctrl = bool(mods & key.MOD_CTRL)
        name = key.symbol_string(symbol)
        function_key = name[:1] == "F" and name[1:].isdigit()
        typing = self._imgui.get_io().want_text_input and not function_key
        if not ctrl and (typing or s.any_dialog):
            return
        act = action_for(name, ctrl, bool(mods & key.MOD_SHIFT))
        if act is not None and act.enabled(s):
            act.run(s)

    # --- drawing --------------------------------------------------------------------------

    def _scene_area(self) -> tuple[int, int, int, int]:
        """(x, y from the top, width, height) in px of the picture: the window less the
        panels' home places, so no part of the scene hides behind a panel."""
        from .panels import scene_area

        s = self.session
        return scene_area(self.window.get_framebuffer_size(), s.ui_scale, s.presenting,
                          s.show_timeline)

    def _shift_m(self, view: Any) -> Any:
        """World offset (m) from the camera's target to the point drawn at the window's
        centre, so that the target sits at the centre of the picture between the panels."""
        fw, fh = view.size_px
        x0, top, w, h = self._scene_area()
        cx, cy = x0 + 0.5 * w - 0.5 * fw, top + 0.5 * h - 0.5 * fh
        return (cy * view.basis[1] - cx * view.basis[0]) / view.px_per_m

    def show_frame(self) -> tuple[int, int, int, int] | None:
        """Where the export's picture is in the window while a show is being built (the
        timeline shown, panels up, the flat view): (x, y from the top, width, height) px,
        the scene's render size fitted into the area between the panels. The camera then
        frames that rectangle as the export frames its image, so a view keyed in the
        window is the view rendered; the window dims what lies outside it. None
        otherwise (the camera's width spans the whole window, as before)."""
        s = self.session
        if not s.show_timeline or s.presenting or s.view_mode != "flat":
            return None
        ax, ay, aw, ah = self._scene_area()
        W, H = self.editor.scene.render.size_px
        k = min(aw / W, ah / H)
        w, h = max(1, round(W * k)), max(1, round(H * k))
        return ax + (aw - w) // 2, ay + (ah - h) // 2, w, h

    def _window_view(self, camera: Any) -> Any:
        """``camera``'s view at the window's size, framing the show frame when there is
        one: an orthographic width spans the frame's width and a perspective fov its
        height, as they span the exported image's."""
        from dataclasses import replace

        from ..geometry.camera import view_for

        size = self.window.get_framebuffer_size()
        view = view_for(self.editor.scene, self.session.clock.t_s, size, camera)
        frame = self.show_frame()
        if frame is None:
            return view
        if view.perspective:
            half = math.atan(math.tan(0.5 * view.fov_rad) * size[1] / frame[3])
            return replace(view, fov_rad=2.0 * half)
        return replace(view, width_m=view.width_m * size[0] / frame[2])

    def _view(self) -> Any:
        """The view drawn in the window: the whole window, the target at the picture's
        centre (drawing the whole window costs less on llvmpipe than a copy)."""
        from dataclasses import replace

        s = self.session
        try:
            view = self._window_view(s.camera)
        except KeyError:  # the followed body was renamed or removed
            s.camera = focus(s.camera, "center")
            view = self._window_view(s.camera)
        view = replace(view, origin_m=view.origin_m + self._shift_m(view))
        # Lines, labels and captions keep the window's sizes (readable at any frame size;
        # presentation mode shows the exported image itself).
        return on_screen(view, s.ui_scale, self.show_frame() or self._scene_area())

    def _unshift(self, camera: Any) -> Any:
        """A camera made from the shifted view (its target the point at the window's
        centre) back to one whose target is the picture's centre."""
        from dataclasses import replace

        if isinstance(camera.target, str):
            return camera
        view = self._window_view(camera)
        t = view.origin_m - self._shift_m(view)
        return replace(camera, target=(float(t[0]), float(t[1]), float(t[2])))

    def _input_queued(self) -> bool:
        """True while imgui still holds input events: it spreads a burst (a key pressed
        and released between two frames, typed text) over several frames."""
        return len(self._imgui.get_current_context().input_events_queue) > 0

    def needs_frame(self) -> bool:
        """True when the next frame would differ from the last one drawn."""
        s = self.session
        job = s.job.state if s.job is not None else ""
        return (self._pending > 0 or s.clock.playing or self._input_queued()
                or self._view_settings() != self._view_state
                or self.editor.revision != self._last_revision
                or s.camera is not self._last_camera or job == "running"
                or job != self._job_state or s.editor is not self._shown_editor)

    def _view_settings(self) -> Any:
        s = self.session
        # ``playing`` too: a show that stops on the frame already drawn (its last) still
        # needs one frame, or the Play button and the report keep saying "playing".
        return (s.presenting, s.fullscreen, tuple(sorted(s.overlays.items())), s.fit_wanted,
                s.view_mode, s.show_timeline, s.clock.on_show, s.clock.frame,
                s.clock.playing)

    def _apply_view_settings(self) -> None:
        """Full screen (on the chosen screen) and "fit" as the session asks."""
        from .camera_input import fit

        s = self.session
        if s.fullscreen != self.window.fullscreen:
            self.window.set_fullscreen(s.fullscreen, screen=self._screen)
            self._pending = SETTLE_FRAMES
        if s.fit_wanted:
            s.fit_wanted = False
            frame = self.show_frame()
            _, _, fw, fh = frame or self._scene_area()
            # The camera spans the show frame when there is one, else the whole window.
            size = (fw, fh) if frame else self.window.get_framebuffer_size()
            s.camera = fit(s.camera, self.editor.scene, s.clock.t_s, size, (fw, fh))
        self._view_state = self._view_settings()

    def draw(self) -> None:
        """Draw one frame: the scene, then the panels over it (not flipped yet)."""
        self._submit(self._prepare())

    def draw_frame(self) -> None:
        """One frame as the loop draws it, a frame behind on the screen: lay out this
        frame (the flat scene's geometry, the panels) while llvmpipe still draws the last
        one on its threads, swap the last one onto the screen, then queue this one's GL
        work and hand it to the GL (``flush``), to be drawn while the next frame is laid
        out. ``show_drawn`` swaps it on when no next frame follows."""
        from ..render.context import flush

        frame = self._prepare()
        self.show_drawn()
        self._submit(frame)
        flush()
        self._unshown = True

    def show_drawn(self) -> None:
        """Swap the frame ``draw_frame`` drew onto the screen, if it is not there yet."""
        if self._unshown:
            self._unshown = False
            self.window.flip()

    def _prepare(self) -> dict[str, Any]:
        """The Python half of a frame, with no GL call: the clock and the view follow the
        show, the flat picture's geometry is made, the panels are laid out (their edits
        take effect now and are drawn in the next frame)."""
        imgui = self._imgui
        t0 = time.perf_counter()
        self.session.sync_show()  # the clock and the view follow the show
        self.session.update_readout(t0)
        self._apply_view_settings()
        # What this frame shows; an edit made by the panels below changes the revision
        # again, so the loop draws the next frame at once (the edit is seen next frame).
        self._last_revision = self.editor.revision
        #: True while the picture moves (time playing, the camera turned since the last
        #: frame): the dome preview then samples once per pixel, and the settled frame
        #: after the move as the export does.
        moving = self.session.clock.playing or self.session.camera is not self._last_camera
        self._last_camera = self.session.camera
        self._job_state = self.session.job.state if self.session.job is not None else ""
        if self.session.editor is not self._shown_editor:  # File > Open showed another scene
            self._shown_editor = self.session.editor
            self.window.set_caption(f"Perifocal - {self.editor.scene.title}")
        geom = plan = None
        if self.renderer is not None:
            try:
                if self.session.view_mode == "flat":
                    # The show's fades, captions and clock as the export draws them
                    # (export.show.show_picture), seen through the window's view.
                    shown, overlay = self._show_picture()
                    drawn_scene = self._with_overlays(shown)
                    geom = self.renderer.geometry(drawn_scene, self.session.clock.t_s,
                                                  self._view(), overlay=overlay)
                else:
                    plan = self._immersive_plan(self.window.get_framebuffer_size()[1],
                                                moving)
            except Exception as err:  # keep the editor usable; say what went wrong
                self.session.message = f"the scene cannot be drawn: {err}"
        imgui.get_io().delta_time = 1.0 / 60.0
        imgui.new_frame()
        if self.renderer is not None and (frame := self.show_frame()) is not None:
            self._dim_outside(frame)
        self.panels.draw(self.session, self.window.get_size())
        # A panel or dialog that sizes itself to its content settles over a few frames
        # (it grows, then is placed by its new size): draw until the layout stays put.
        layout = self.panels.report["rects"]
        if layout != self._last_layout:
            self._pending = max(self._pending, 1)
        self._last_layout = layout
        imgui.render()
        return {"t0": t0, "geom": geom, "plan": plan}

    def _submit(self, frame: dict[str, Any]) -> None:
        """The GL half of a frame made by ``_prepare``: the picture, then the panels."""
        self.window.switch_to()
        fw, fh = self.window.get_framebuffer_size()
        self.ctx.screen.use()
        self.ctx.viewport = (0, 0, fw, fh)
        drawn = False
        #: On a screen that keeps its pixels, only the picture between the panels is
        #: drawn anew each frame, over the colour ``outside`` elsewhere, and the panels
        #: only when they changed (PanelRenderer.render's ``picture``).
        picture = self._scene_area() if self.screen_keeps_pixels else None
        outside = (0.0, 0.0, 0.0, 1.0)  # premultiplied RGBA round the picture
        geom, plan = frame["geom"], frame["plan"]
        if self.renderer is not None and (geom is not None or plan is not None):
            try:
                if geom is not None:
                    clip = None
                    kept = False
                    if picture is not None:
                        bg = geom.background
                        outside = (bg[0] * bg[3], bg[1] * bg[3], bg[2] * bg[3], bg[3])
                        kept = self.panel_renderer.keeps(picture, (fw, fh), outside)
                        if not kept:
                            self.ctx.clear(*outside)
                        px, py, pw, ph = picture
                        clip = (px, fh - py - ph, pw, ph)
                    # The same geometry as the picture the screen still shows (a show
                    # frame in its second screen refresh, no panel over it last frame):
                    # nothing to draw there.
                    if not (kept and geom is self._picture_geom):
                        self._picture_geom = None
                        self.renderer.draw(geom, self.ctx.screen, clip_px=clip)
                    self._picture_geom = geom if picture is not None else None
                else:
                    self._picture_geom = None
                    self._draw_immersive(fw, fh, plan, picture)
                drawn = True
            except Exception as err:  # keep the editor usable; say what went wrong
                self.session.message = f"the scene cannot be drawn: {err}"
            self.ctx.screen.use()
            self.ctx.viewport = (0, 0, fw, fh)
        if not drawn:
            self._picture_geom = None
            self.ctx.clear(*BACKGROUND)
            picture = None
        self._blit_preview()
        self.panel_renderer.render(self._imgui.get_draw_data(), (fw, fh), picture, outside)
        self.frames_drawn += 1
        self.frame_times_s.append(time.perf_counter() - frame["t0"])
        if self.ui_report is not None:
            self._write_report()

    def _dim_outside(self, frame: tuple[int, int, int, int]) -> None:
        """Dim the picture outside the show frame and outline it, under the panels: what
        is inside is what the export shows. (imgui counts in window points; the
        framebuffer may have more pixels on a high-density screen.)"""
        imgui = self._imgui
        fw, _ = self.window.get_framebuffer_size()
        k = self.window.get_size()[0] / fw
        x, y, w, h = (v * k for v in frame)
        ax, ay, aw, ah = (v * k for v in self._scene_area())
        dl = imgui.get_background_draw_list()
        shade = imgui.color_convert_float4_to_u32(imgui.ImVec4(0.0, 0.0, 0.0, 0.6))
        for a, b in (((ax, ay), (ax + aw, y)), ((ax, y + h), (ax + aw, ay + ah)),
                     ((ax, y), (x, y + h)), ((x + w, y), (ax + aw, y + h))):
            if b[0] > a[0] and b[1] > a[1]:
                dl.add_rect_filled(imgui.ImVec2(*a), imgui.ImVec2(*b), shade)
        edge = imgui.color_convert_float4_to_u32(imgui.ImVec4(0.55, 0.62, 0.78, 0.7))
        dl.add_rect(imgui.ImVec2(x - 1, y - 1), imgui.ImVec2(x + w + 1, y + h + 1), edge)

    def _show_picture(self) -> Any:
        """(scene as drawn, captions and clock) at the frame shown: on the show its frame
        of the export's grid, else the show time the scene time falls at (as a still)."""
        from ..export.show import show_picture

        c = self.session.clock
        show_s = c.frame_show_s if c.on_show else None
        # The same picture while nothing changes (paused, editing a panel): the same scene
        # object, so the frames keep their static geometry (a dome preview's five faces).
        key = (self.editor.scene, c.t_s, show_s)
        kept = self._shown
        if kept is None or kept[0][0] is not key[0] or kept[0][1:] != key[1:]:
            self._shown = kept = (key, show_picture(self.editor.scene, c.t_s, show_s))
        return kept[1]

    def _with_overlays(self, shown: Any) -> Any:
        """``shown`` with the overlay switches applied: the same object while neither
        changes, so the renderer keeps the frame's geometry (Renderer.geometry)."""
        switches = tuple(sorted(self.session.overlays.items()))
        kept = self._overlaid
        if kept is None or kept[0] is not shown or kept[1] != switches:
            self._overlaid = kept = (shown, switches,
                                     scene_with_overlays(shown, self.session.overlays))
        return kept[2]

    def _immersive_plan(self, fh: int, moving: bool) -> dict[str, Any]:
        """The part of a dome or panorama preview frame that needs no GL (``_prepare``):
        the preview's size and place, the show's picture, the faces' geometry."""
        from ..export.immersive import Immersive, ImmersiveRenderer, preview_size

        if self._immersive is None:
            self._immersive = ImmersiveRenderer(self.renderer)
        ax, ay, aw, ah = self._scene_area()
        size = preview_size(self.session.view_mode, (aw, ah))
        spec = Immersive(self.session.view_mode, size,
                         grid=1 if moving or size[1] >= 4096 else 2)
        # Centred in the area; GL counts rows from the bottom of the screen.
        x0 = ax + (aw - size[0]) // 2
        y0 = fh - (ay + (ah + size[1]) // 2)
        shown, overlay = self._show_picture()
        faces = self._immersive.faces(shown, self.session.clock.t_s, spec, draft=moving)
        return {"spec": spec, "origin": (x0, y0), "shown": shown, "overlay": overlay,
                "faces": faces, "moving": moving}

    def _draw_immersive(self, fw: int, fh: int, plan: dict[str, Any],
                        picture: tuple[int, int, int, int] | None = None) -> None:
        """The dome master or panorama of the scene as the export makes it (the show's
        camera, fades, captions and clock), at most 1024 px high, centred in the picture
        area between the panels. While the picture moves, a draft: one sample per pixel
        in place of the export's 2 x 2, and a dome through four cube faces
        (immersive.draft_rig); still, exactly the export. ``plan``: _immersive_plan's."""
        spec, (x0, y0), moving = plan["spec"], plan["origin"], plan["moving"]
        size = spec.size_px
        #: Where the preview is on the window: (x, y from the top, width, height) px.
        self.preview_rect = (x0, fh - y0 - size[1], size[0], size[1])
        self.ctx.screen.use()
        if picture is not None and self.panel_renderer.keeps(picture, (fw, fh)):
            # The panels of the last frame are still on the screen: clear the picture only.
            px, py, pw, ph = picture
            self.ctx.screen.clear(0.0, 0.0, 0.0, 1.0, viewport=(px, fh - py - ph, pw, ph))
        else:
            self.ctx.clear(0.0, 0.0, 0.0, 1.0)
        # As ShowFrames.at makes the exported frame, without reading it back. The draft
        # goes straight onto the screen; the still frame is the export's own (top row
        # first), blitted flipped under the panels (_blit_preview).
        fbo = self._immersive.draw(plan["shown"], self.session.clock.t_s, spec,
                                   overlay=plan["overlay"], draft=moving,
                                   screen=(self.ctx.screen, (x0, y0)) if moving else None,
                                   faces=plan["faces"])
        self._blit = None if moving else (fbo, size, x0, y0)

    def _blit_preview(self) -> None:
        """Copy the still preview drawn by _draw_immersive onto the screen, under the
        panels."""
        from pyglet import gl

        if self._blit is None:
            return
        fbo, size, x0, y0 = self._blit
        self._blit = None
        gl.glBindFramebuffer(gl.GL_READ_FRAMEBUFFER, fbo.glo)
        gl.glBindFramebuffer(gl.GL_DRAW_FRAMEBUFFER, 0)
        gl.glBlitFramebuffer(0, 0, size[0], size[1], x0, y0 + size[1], x0 + size[0], y0,
                             gl.GL_COLOR_BUFFER_BIT, gl.GL_NEAREST)

    def _write_report(self) -> None:
        assert self.ui_report is not None
        r = dict(self.panels.report)
        r["frames"] = self.frames_drawn
        c = self.session.clock
        r["t_s"] = c.t_s
        r["playing"] = c.playing
        r["on_show"] = c.on_show
        r["show_s"] = c.show_s
        r["frame"] = c.frame
        r["speed"] = c.speed
        r["loop"] = c.loop
        r["follow_camera"] = self.session.follow_camera
        r["picked"] = list(self.session.picked) if self.session.picked else None
        r["show_timeline"] = self.session.show_timeline
        tl = self.editor.scene.timeline
        r["show"] = {"duration_s": tl.duration_s, "fps": tl.fps,
                     "camera_keys": [k.at_s for k in tl.camera_keys],
                     "fades": [list(f.at_s) for f in tl.fades],
                     "captions": [[c.text, c.start_s, c.end_s] for c in tl.captions]}
        r["can_undo"] = self.editor.can_undo
        r["can_redo"] = self.editor.can_redo
        r["selection"] = self.editor.selection
        r["message"] = self.session.message
        r["dirty"] = self.editor.dirty  # after this frame's edits, like the readout
        r["prompt"] = "unsaved" if self.session.unsaved_for else ""
        r["bodies"] = [b.name for b in self.editor.scene.bodies]
        r["scene"] = str(self.editor.path) if self.editor.path else ""
        r["view"] = self.session.view_mode
        r["preview_rect"] = self.preview_rect if self.session.view_mode != "flat" else None
        r["show_frame"] = self.show_frame()
        tmp = self.ui_report.with_name(self.ui_report.name + ".tmp")
        tmp.write_text(json.dumps(r), encoding="utf-8")
        os.replace(tmp, self.ui_report)

    def screenshot(self) -> np.ndarray:
        """The window's back buffer as RGBA uint8 (H, W, 4), top row first."""
        fw, fh = self.window.get_framebuffer_size()
        img = read_back_buffer(fw, fh)[::-1].copy()
        img[..., 3] = 255
        return img

    # --- render jobs ------------------------------------------------------------------------

    def _pump_job(self, budget_s: float = JOB_BUDGET_S) -> None:
        """Draw the frames a running render job asks for, on this window's context, in a
        renderer of its own (so the window's cached geometry stays), then free it."""
        job = self.session.job
        if job is None or not job.active:
            if self._job_renderer is not None:
                self._job_renderer.release()
                self._job_renderer = None
            return
        from ..export.show import ShowFrames
        from ..render import Renderer

        self.window.switch_to()
        if self._job_renderer is None:
            self._job_renderer = Renderer(self.ctx)
        # The show's keyframes, fades, captions and clock, as `perifocal render` draws them.
        frames = ShowFrames(self._job_renderer, job.scene, job.request.size_px,
                            job.request.spec)
        job.pump(frames.at, budget_s)

    def _end_job(self) -> None:
        """On closing: cancel a running job and wait for its worker (a video's temporary
        file is removed; frames written so far are whole)."""
        job = self.session.job
        if job is not None and job.active:
            job.cancel()
            job.join(60.0)
        if self._job_renderer is not None:
            self._job_renderer.release()
            self._job_renderer = None

    # --- the loop ---------------------------------------------------------------------------

    def run(self, quit_after: int | None = None, screenshot: str | Path | None = None) -> int:
        """Run until the user quits (or ``quit_after`` frames are drawn); returns 0."""
        pyglet = self._pyglet
        loop = pyglet.app.platform_event_loop
        loop.start()
        last = time.perf_counter()
        try:
            while not self.session.quit_now:
                busy = self.needs_frame() or quit_after is not None
                if not busy:
                    self.show_drawn()  # nothing follows it for now: show the last frame
                loop.step(0.0 if busy else IDLE_WAIT_S)
                self.window.dispatch_events()
                if self.window.has_exit and not self.session.unsaved_for:
                    self.window.has_exit = False
                self._pump_job()
                now = time.perf_counter()
                self.session.clock.advance(now - last)
                last = now
                if not (self.needs_frame() or quit_after is not None):
                    continue
                self._pending = max(0, self._pending - 1)
                self.draw_frame()
                if quit_after is not None and self.frames_drawn >= quit_after:
                    if screenshot is not None:
                        from ..export.encode import write_still

                        write_still(Path(screenshot), self.screenshot(), "png")
                    self.show_drawn()
                    break
        finally:
            self.close()
        return 0

    def close(self) -> None:
        if self._closed:
            return
        self._closed = True
        self._end_job()
        imgui = self._imgui
        from imgui_bundle import implot

        self.panel_renderer.release()
        if self._immersive is not None:
            self._immersive.release()
        if self.renderer is not None:
            self.renderer.release()
        implot.destroy_context(self.implot_ctx)
        imgui.destroy_context(self.imgui_ctx)
        # pyglet checks glGetError after its last flush: an error left by the objects
        # released above (a framebuffer still bound as it went) must not fail the close.
        self.ctx.screen.use()
        _ = self.ctx.error
        self.window.close()
