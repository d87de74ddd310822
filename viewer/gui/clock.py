"""The scene clock of the window: the current scene time, play/pause, rate, step, jumps.

Not part of the Scene or of the edit history: moving through time is not an edit. The
window advances it by the wall-clock time between frames (``advance``); everything else
is set by the panels. Scene time ``t_s`` is seconds from the scene epoch.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from ..scene.model import Body, Scene


@dataclass
class Clock:
    """Scene time ``t_s`` (s), ``rate`` (scene seconds per second), ``playing``."""

    t_s: float = 0.0
    rate: float = 86_400.0
    playing: bool = False
    fps: float = 30.0

    @classmethod
    def for_scene(cls, scene: Scene) -> Clock:
        tl = scene.timeline
        return cls(t_s=tl.start_s, rate=tl.rate, playing=False, fps=tl.fps)

    def advance(self, wall_s: float) -> bool:
        """Move on by ``wall_s`` seconds of wall time if playing; True if time moved."""
        if not self.playing or wall_s <= 0:
            return False
        self.t_s += self.rate * min(wall_s, 0.25)  # a stall does not jump the scene
        return True

    def step(self, frames: int = 1) -> None:
        """Step by whole frames of the timeline (rate / fps scene seconds each)."""
        self.t_s += frames * self.rate / self.fps

    def span(self, scene: Scene) -> tuple[float, float]:
        """The timeline's scene-time span, for the scrub slider."""
        tl = scene.timeline
        return tl.start_s, tl.start_s + tl.duration_s * tl.rate


def next_apsis_s(body: Body, t_s: float, which: str) -> float | None:
    """Scene time of the body's next periapsis or apoapsis after ``t_s`` (None if it has
    none ahead: an open orbit past periapsis, or any open orbit for the apoapsis)."""
    now = body.elements_at(t_s)
    since = float(now.time_since_periapsis)
    e = float(now.e)
    if e >= 1.0:
        return t_s - since if which == "periapsis" and since < 0 else None
    period = float(now.period)
    phase = since % period
    target = 0.0 if which == "periapsis" else 0.5 * period
    wait = (target - phase) % period
    if wait < 1e-9 * period:
        wait = period
    return t_s + wait if math.isfinite(wait) else None
