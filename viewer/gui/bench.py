"""Measuring the window: frames per second while the time plays, beside the scene alone.

``measure_window(scene_path)`` opens the viewer (it needs a display: an X server or
Xvfb), plays the clock and times whole frames (scene, panels, buffer swap), then times
the renderer alone drawing the same frames into an offscreen target of the same size,
so the cost of the panels and the window is the difference. It also checks that an
edit is visible in the next frame and that an idle window draws nothing. Returns a
dict of plain numbers (the CLI's ``bench window`` prints it).
"""

from __future__ import annotations

import statistics
import time
from pathlib import Path
from typing import Any


def measure_window(scene_path: str | Path, size: tuple[int, int] = (1920, 1080),
                   frames: int = 120, warmup: int = 10) -> dict[str, Any]:
    """Median frame times (ms) of the window playing ``scene_path`` and of the scene alone."""
    from .editor import Editor
    from .window import ViewerWindow

    editor = Editor.open(scene_path)
    win = ViewerWindow(editor, size=size)
    try:
        clock = win.session.clock
        clock.playing = True
        step_s = 1.0 / 60.0
        whole: list[float] = []
        for k in range(warmup + frames):
            t0 = time.perf_counter()
            win.window.dispatch_events()
            clock.advance(step_s)
            win.draw()
            win.window.flip()
            if k >= warmup:
                whole.append(time.perf_counter() - t0)
        # The scene alone, same frames, same context, offscreen, finished before timing.
        scene_only: list[float] = []
        renderer = win.renderer
        if renderer is not None:
            fbo = renderer.target(win.window.get_framebuffer_size())
            clock.playing = False
            for k in range(warmup + frames):
                t0 = time.perf_counter()
                clock.t_s += clock.rate * step_s
                view = win._view()  # the window's own view of the scene
                renderer.draw(renderer.geometry(editor.scene, clock.t_s, view), fbo)
                win.ctx.finish()
                if k >= warmup:
                    scene_only.append(time.perf_counter() - t0)
        # An edit is drawn in the very next frame: the loop sees the new revision.
        clock.playing = False
        win.draw()
        win._pending = 0
        idle_before = win.needs_frame()
        if editor.scene.bodies:
            editor.select(0)
            editor.set_field("e", "0.3" if editor.field_text("e") != "0.3" else "0.31")
        edit_seen_next_frame = win.needs_frame()
        median_ms = 1e3 * statistics.median(whole)
        return {
            "size": list(size),
            "frames": frames,
            "window_frame_median_ms": median_ms,
            "window_fps_median": 1e3 / median_ms,
            "window_frame_p95_ms": 1e3 * sorted(whole)[int(0.95 * (len(whole) - 1))],
            "scene_only_median_ms": (1e3 * statistics.median(scene_only)
                                     if scene_only else None),
            "idle_window_draws": idle_before,
            "edit_seen_next_frame": edit_seen_next_frame,
        }
    finally:
        win.close()
