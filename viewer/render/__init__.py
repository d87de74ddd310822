"""The renderer: moderngl programs, buffers and passes that draw a frame's geometry.

Owns the OpenGL side: the headless EGL context, shader loading (files in shaders/), the
glyph atlas from the bundled font, and ``Renderer``, which draws a FrameGeometry into
any framebuffer, so the window and every export share one way to draw. May import
viewer.geometry and viewer.scene; never pyglet or imgui. moderngl is imported when a
Renderer or context is made, not when this package is imported.
"""

from .context import GLUnavailable, headless_context
from .renderer import Renderer, headless_renderer, render_still

__all__ = ["GLUnavailable", "Renderer", "headless_context", "headless_renderer",
           "render_still"]
