"""The clock of the window: the scene time shown, play/pause, and the show clock.

Not part of the Scene or of the edit history: moving through time is not an edit.

Two ways to move through time:

* **on the show** (``on_show``): the clock holds ``show_s``, seconds into the show, and
  the scene time is the timeline's ``scene_time_at(show_s)`` (the one map from show time
  to scene time, the same the exporter uses). Playing runs the show at real time times
  ``speed`` whatever a frame costs: a slow frame makes the next one jump (frames are
  dropped), the show is never slowed. The picture shows the frame of the export's frame
  grid (``k / fps``) that the show has reached, so a paused window shows exactly a frame
  the renderer would write. At the end the show stops, or starts again at the start of
  ``loop_range`` (the whole show when None) when ``loop`` is on.
* **off the show**: free scene time ``t_s`` run at ``rate`` scene seconds per second, as
  the element editor always had (jumps to a periapsis, the scene-time slider).

``follow_show(timeline)`` gives the clock the scene's current timeline (after every edit:
a changed rate or duration moves the scene time under the same show time).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from ..scene.model import Body, Scene, Timeline

#: The longest wall-clock gap a playing scene clock (off the show) moves by, s: a stall
#: of the machine does not jump the scene. The show clock keeps to real time instead.
SCENE_STALL_S = 0.25


@dataclass
class Clock:
    """Scene time ``t_s`` (s), ``rate`` (scene seconds per second off the show),
    ``playing``; on the show, ``show_s`` (s into the show) and ``speed`` (1 = real
    time). ``loop_range`` is (from, to) in seconds of show, or None for the whole show."""

    t_s: float = 0.0
    rate: float = 86_400.0
    playing: bool = False
    fps: float = 30.0
    on_show: bool = False
    show_s: float = 0.0
    speed: float = 1.0
    loop: bool = False
    loop_range: tuple[float, float] | None = None
    timeline: Timeline | None = None

    @classmethod
    def for_scene(cls, scene: Scene) -> Clock:
        """Paused at the timeline start; on the show when the scene has one (camera
        keys, fades, captions or a clock)."""
        tl = scene.timeline
        clock = cls(t_s=tl.start_s, rate=tl.rate, playing=False, fps=tl.fps,
                    on_show=has_show(scene), timeline=tl)
        clock.follow_show(tl)
        return clock

    # --- the show -------------------------------------------------------------------------

    @property
    def duration_s(self) -> float:
        return self.timeline.duration_s if self.timeline is not None else 0.0

    @property
    def frame(self) -> int:
        """The frame of the show's grid that ``show_s`` has reached (at the very end, the
        show's last frame: the renderer writes frames 0 to frame_count - 1)."""
        k = int(math.floor(self.show_s * self.fps + 1e-6))
        if self.timeline is not None and self.on_show:
            k = min(k, self.timeline.frame_count - 1)
        return max(k, 0)

    @property
    def frame_show_s(self) -> float:
        """Seconds into the show of that frame (what the picture shows)."""
        return self.frame / self.fps

    def follow_show(self, timeline: Timeline) -> None:
        """Take the scene's timeline (it may have been edited); on the show, the scene
        time follows the show time again."""
        self.timeline = timeline
        self.fps = timeline.fps
        if self.on_show:
            self.show_s = min(max(self.show_s, 0.0), timeline.duration_s)
            self.t_s = float(timeline.scene_time_at(self.frame_show_s))
        else:
            self.show_s = timeline.show_time_at(self.t_s)

    def seek_show(self, show_s: float) -> None:
        """Go to ``show_s`` seconds into the show (clamped to the show), on the show."""
        assert self.timeline is not None, "follow_show first"
        self.on_show = True
        self.show_s = min(max(float(show_s), 0.0), self.timeline.duration_s)
        self.t_s = float(self.timeline.scene_time_at(self.frame_show_s))

    def seek_scene(self, t_s: float) -> None:
        """Go to scene time ``t_s``, off the show (a periapsis jump, the date slider)."""
        self.on_show = False
        self.t_s = float(t_s)
        if self.timeline is not None:
            self.show_s = self.timeline.show_time_at(self.t_s)

    def _loop_span(self) -> tuple[float, float]:
        end = self.duration_s
        if self.loop_range is None:
            return 0.0, end
        a, b = self.loop_range
        return max(0.0, min(a, end)), max(0.0, min(b, end))

    def play(self) -> None:
        """Play; on the show, from the start (of the loop) when at the end."""
        if self.on_show:
            lo, hi = self._loop_span() if self.loop else (0.0, self.duration_s)
            if self.show_s >= hi - 0.5 / self.fps or self.show_s < lo:
                self.seek_show(lo)
        self.playing = True

    def toggle(self) -> None:
        if self.playing:
            self.playing = False
        else:
            self.play()

    # --- moving ---------------------------------------------------------------------------

    def advance(self, wall_s: float) -> bool:
        """Move on by ``wall_s`` seconds of wall time if playing; True if time moved."""
        if not self.playing or wall_s <= 0:
            return False
        if not self.on_show:
            self.t_s += self.rate * min(wall_s, SCENE_STALL_S)
            if self.timeline is not None:
                self.show_s = self.timeline.show_time_at(self.t_s)
            return True
        show = self.show_s + self.speed * wall_s
        lo, hi = self._loop_span() if self.loop else (0.0, self.duration_s)
        if self.speed >= 0 and show >= hi:
            if self.loop and hi > lo:
                show = lo + (show - hi) % (hi - lo)
            else:
                show, self.playing = hi, False
        elif self.speed < 0 and show <= lo:
            if self.loop and hi > lo:
                show = hi - (lo - show) % (hi - lo)
            else:
                show, self.playing = lo, False
        self.seek_show(show)
        return True

    def step(self, frames: int = 1) -> None:
        """Step by whole frames: on the show, to the next frame of the export's grid
        (k / fps); off it, by rate / fps scene seconds."""
        if self.on_show:
            self.seek_show((self.frame + frames) / self.fps)
        else:
            self.seek_scene(self.t_s + frames * self.rate / self.fps)

    def span(self, scene: Scene) -> tuple[float, float]:
        """The timeline's scene-time span, for the scrub slider."""
        tl = scene.timeline
        return tl.start_s, float(tl.scene_time_at(tl.duration_s))


def has_show(scene: Scene) -> bool:
    """True when the scene's timeline holds a show: camera keys, fades, captions or an
    on-screen clock (a scene with none plays free scene time)."""
    tl = scene.timeline
    return bool(tl.camera_keys or tl.fades or tl.captions or tl.clock != "none")


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
