"""Frames of a show: frame k of the timeline with its keyframed camera, fades, captions
and clock (viewer.scene.timeline), through the one renderer.

A frame is a pure function of (scene, frame number, size): the show time is k / fps, the
scene time the timeline's ``time_of_frame(k)``; a still at scene time t takes the show
time that t falls at.
"""

from __future__ import annotations

from typing import Any

import numpy as np
from numpy.typing import NDArray

from ..scene.model import Scene
from ..scene.timeline import OverlayText, overlay_at, scene_at_show_time, show_time_of

UInt8s = NDArray[np.uint8]


def show_picture(scene: Scene, t_s: float, show_s: float | None = None
                 ) -> tuple[Scene, tuple[OverlayText, ...]]:
    """What a picture of the show draws at scene time ``t_s`` (``show_s`` into the show;
    by default the show time that ``t_s`` falls at): the scene with the show's camera and
    fades applied, and the captions and clock on it. The one recipe of a show frame: the
    exporter and the window's picture (flat and immersive) both draw this."""
    show = show_time_of(scene, t_s) if show_s is None else show_s
    return scene_at_show_time(scene, show, t_s), overlay_at(scene, show, t_s)


class ShowFrames:
    """Frames of ``scene``: flat through a Renderer, or dome/panorama (``spec``, an
    ``Immersive``) through an ImmersiveRenderer on the same context."""

    def __init__(self, renderer: Any, scene: Scene, size_px: tuple[int, int],
                 spec: Any = None, transparent: bool = False) -> None:
        self.renderer = renderer
        self.scene = scene
        self.size_px = size_px
        self.spec = spec
        self.transparent = transparent
        self.immersive = None
        if spec is not None:
            from .immersive import ImmersiveRenderer

            self.immersive = ImmersiveRenderer(renderer)

    def at(self, t_s: float, show_s: float | None = None) -> UInt8s:
        """The picture at scene time ``t_s`` (``show_s`` into the show, if known)."""
        scene, overlay = show_picture(self.scene, t_s, show_s)
        if self.immersive is not None:
            return self.immersive.render(scene, t_s, self.spec, transparent=self.transparent,
                                         overlay=overlay)
        return self.renderer.render(scene, t_s, self.size_px, transparent=self.transparent,
                                    overlay=overlay)

    def frame(self, k: int) -> UInt8s:
        """Frame ``k`` of the timeline."""
        tl = self.scene.timeline
        return self.at(float(tl.time_of_frame(k)), float(tl.show_time_of_frame(k)))

    def close(self) -> None:
        if self.immersive is not None:
            self.immersive.release()
