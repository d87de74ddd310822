"""The frame path for exporters: one scene's frames as RGBA arrays, in a headless context.

``FrameSource(scene, ...)`` opens a headless context and a Renderer once and hands out
frames by scene time (``at``) or by timeline frame number (``frame``), so a sequence,
a video or a dome render shares one context and reuses its buffers. Frames come back as
(H, W, 4) uint8, top row first; pass ``out`` to fill an array of your own instead of a
new one (an encoder thread can hold the previous frame meanwhile).
"""

from __future__ import annotations

from types import TracebackType
from typing import Any

import numpy as np
from numpy.typing import NDArray

from ..scene.model import Camera, Scene
from .context import headless_context, release_context
from .renderer import Renderer

UInt8s = NDArray[np.uint8]


class FrameSource:
    """Frames of ``scene`` at ``size_px`` through ``camera`` (the scene's own by default)."""

    def __init__(self, scene: Scene, size_px: tuple[int, int] | None = None,
                 camera: Camera | None = None, transparent: bool = False,
                 ctx: Any = None) -> None:
        self.scene = scene
        self.size_px = tuple(scene.render.size_px if size_px is None else size_px)
        self.camera = camera
        self.transparent = transparent
        self._own_ctx = ctx is None
        self.ctx = headless_context() if ctx is None else ctx
        self.renderer = Renderer(self.ctx)

    def at(self, t_s: float, out: UInt8s | None = None) -> UInt8s:
        """The frame at scene time ``t_s`` (s)."""
        return self.renderer.render(self.scene, float(t_s), self.size_px,  # type: ignore[arg-type]
                                    self.camera, self.transparent, out)

    def frame(self, k: int, out: UInt8s | None = None) -> UInt8s:
        """Frame ``k`` of the scene's timeline (scene time start + k * rate / fps)."""
        return self.at(float(self.scene.timeline.time_of_frame(k)), out)

    def close(self) -> None:
        self.renderer.release()
        if self._own_ctx:
            release_context(self.ctx)

    def __enter__(self) -> FrameSource:
        return self

    def __exit__(self, exc_type: type[BaseException] | None, exc: BaseException | None,
                 tb: TracebackType | None) -> None:
        self.close()
