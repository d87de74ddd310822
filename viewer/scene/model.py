"""The Scene: a frozen, validated description of one system, in SI units and radians.

This is what the loader produces and what geometry, renderer, exporter and editor read.
Every field has its unit in its name or docstring; nothing here knows about TOML.
Colours are sRGB triples of floats in [0, 1].
"""

from __future__ import annotations

import unicodedata
from dataclasses import dataclass, field, replace
from pathlib import Path
from typing import Any

import numpy as np

from ..ephemeris import Track
from ..orbit import Elements
from ..units import Epoch

RGB = tuple[float, float, float]

#: The scene epoch when a file gives none (J2000.0 in TDB).
DEFAULT_EPOCH_TEXT = "2000-01-01T12:00:00 TDB"



def name_key(name: str) -> str:
    """What makes two names the same name: equal after surrounding spaces are dropped and
    Unicode is normalised (NFC), so "Ceres", " Ceres " and a decomposed "Ce\u0301res" spelling
    of an accented name cannot be two bodies."""
    return unicodedata.normalize("NFC", name.strip())

@dataclass(frozen=True)
class BodyShow:
    """What to draw for a body (scene key ``show``); defaults as in scene-format.md."""

    orbit: bool = True
    marker: bool = True
    label: bool = True
    foci: bool = False
    axes: bool = False
    apsides: bool = False
    nodes: bool = False
    velocity: bool = False
    sweep: bool = False


@dataclass(frozen=True)
class MarkOpacity:
    """How opaque each mark of a body is drawn right now (a show's fades set these):
    0 hides the mark, 1 draws it as its style says."""

    orbit: float = 1.0
    marker: float = 1.0
    label: float = 1.0
    foci: float = 1.0
    axes: float = 1.0
    apsides: float = 1.0
    nodes: float = 1.0
    velocity: float = 1.0
    sweep: float = 1.0


@dataclass(frozen=True)
class Sweep:
    """Equal-time sectors: ``count`` sectors of ``interval_s`` from ``start_s`` (scene time)."""

    start_s: float
    interval_s: float
    count: int
    color: RGB
    opacity: float
    show_area: bool = False
    #: Whether the interval was written out; when not, it is one period / count and
    #: follows every change of the orbit or of the count (an ellipse's sectors then tile
    #: the whole orbit).
    interval_given: bool = True
    #: "all": every sector is drawn at every time; "swept": a sector appears once the
    #: body has swept it whole (``swept_until``), one by one as the show runs.
    reveal: str = "all"

    def bounds_s(self) -> list[tuple[float, float]]:
        """Scene-time bounds (t0, t1) of each sector, k = 0..count-1."""
        return [(self.start_s + k * self.interval_s, self.start_s + (k + 1) * self.interval_s)
                for k in range(self.count)]


@dataclass(frozen=True)
class Body:
    """One orbiting body.

    ``elements`` hold the orbit at the body's own epoch (with ``mu`` of the centre);
    ``epoch_offset_s`` is that epoch minus the scene epoch, in TDB seconds, so the body's
    state at scene time t is ``elements.after(t - epoch_offset_s)``.
    ``limit_radius_m`` bounds the drawn branch of an open conic (e >= 1).
    """

    name: str
    elements: Elements
    epoch_offset_s: float = 0.0
    color: RGB = (0.5, 0.8, 1.0)
    line_width_px: float = 2.0
    show: BodyShow = field(default_factory=BodyShow)
    sweep: Sweep | None = None
    limit_radius_m: float | None = None
    radius_m: float | None = None
    #: Legal but suspicious things about this body (one line each, without its name).
    warnings: tuple[str, ...] = ()
    #: Opacity of each mark at the frame being drawn (set per frame from the show's fades).
    fade: MarkOpacity = field(default_factory=MarkOpacity)
    #: The body's own GM (m^3/s^2); its two-body motion uses GM_centre + this.
    gm_m3_s2: float = 0.0
    #: Set when the body follows an ephemeris: its position at any time comes from there,
    #: and ``elements`` is the osculating conic at the scene epoch.
    track: Track | None = None
    #: A trajectory flown only between two scene times (s): its orbit is drawn from the
    #: first to the second, and its marker and label only in between.
    flight_s: tuple[float, float] | None = None

    def with_epoch_moved(self, shift_s: float) -> Body:
        """This body, unchanged in time, for a scene epoch moved ``shift_s`` seconds later:
        every scene time it holds (its epoch, flight, ephemeris anchor) is re-counted."""
        flight = None if self.flight_s is None else (self.flight_s[0] - shift_s,
                                                     self.flight_s[1] - shift_s)
        track = None if self.track is None else self.track.with_epoch_moved(shift_s)
        return replace(self, epoch_offset_s=self.epoch_offset_s - shift_s, flight_s=flight,
                       track=track)

    def in_flight(self, t_s: float) -> bool:
        """False outside the body's flight (always True for a body without one)."""
        return self.flight_s is None or self.flight_s[0] <= t_s <= self.flight_s[1]

    def elements_at(self, t_s: float) -> Elements:
        """The body's elements (its true anomaly) at scene time t_s; for a body that
        follows an ephemeris, the osculating conic there."""
        if self.track is not None:
            # ``elements`` is always the osculating conic at ``epoch_offset_s`` (as loaded,
            # and as ``osculating`` and ``with_epoch_moved`` keep it): no second look-up.
            if t_s == self.epoch_offset_s:
                return self.elements
            return self.track.elements_at(t_s)
        return self.elements.after(t_s - self.epoch_offset_s)

    def osculating(self, t_s: float) -> Body:
        """This body with ``elements`` the osculating conic at scene time t_s, or at its
        chosen ``osculating_epoch`` (itself when it does not follow an ephemeris)."""
        if self.track is None:
            return self
        at = t_s if self.track.osculate_s is None else self.track.osculate_s
        return replace(self, elements=self.track.elements_at(at), epoch_offset_s=at)


@dataclass(frozen=True)
class Population:
    """Many small bodies from a table file: element arrays of one shape (N,), drawn as points."""

    name: str
    elements: Elements
    epoch_offset_s: float
    color: RGB
    point_size_px: float
    source: Path | None = None

    @property
    def count(self) -> int:
        return int(np.asarray(self.elements.a).size)


@dataclass(frozen=True)
class Center:
    """The central body at the occupied focus: ``gm_m3_s2`` and ``radius_m``."""

    name: str
    gm_m3_s2: float
    radius_m: float
    color: RGB = (1.0, 0.82, 0.5)
    show_body: bool = True
    show_label: bool = True
    preset: str | None = None
    atmosphere_m: float | None = None
    soi_radius_m: float | None = None
    #: Where the positions of ephemeris bodies are counted from: "body" (the centre's own
    #: position: heliocentric for the Sun) or "barycenter" (the solar-system barycentre).
    origin: str = "body"


@dataclass(frozen=True)
class Camera:
    """How the scene is looked at (scene-format.md, "Camera directions").

    ``look`` is "top", "edge" or "angles" (then ``elevation_rad`` and ``azimuth_rad``
    give the eye direction). ``target`` is "center", a body's name, or an (x, y, z)
    point in metres. ``width_m`` is the orthographic field across the image width;
    ``distance_m`` the eye's distance from the target (perspective, dome, panorama).
    """

    projection: str = "orthographic"
    look: str = "top"
    elevation_rad: float = float(np.pi / 2)
    azimuth_rad: float = 0.0
    target: str | tuple[float, float, float] = "center"
    width_m: float = 4.0 * 149_597_870_700.0
    distance_m: float = 6.0 * 149_597_870_700.0
    fov_rad: float = float(np.radians(45.0))
    #: Dome and panorama framing (docs/export.md, "Composing for the dome"): the eye's
    #: distance from the target (None: ``distance_m``), the target's elevation above the
    #: audience's horizon (pi/2: the zenith) and the dome's tilt toward the front.
    dome_distance_m: float | None = None
    dome_elevation_rad: float = float(np.pi / 2)
    dome_tilt_rad: float = 0.0

    @property
    def immersive_distance_m(self) -> float:
        """The eye's distance from the target for dome masters and panoramas."""
        return self.distance_m if self.dome_distance_m is None else self.dome_distance_m


@dataclass(frozen=True)
class DomeSettings:
    """Sizes of dome masters and panoramas as angles (rad) on the sky: ``line_width`` of a
    line of width 2 (the default), ``label_size`` and ``caption_size`` text heights;
    ``line_scale`` and ``label_scale`` multiply them; ``grid`` draws the dome grid."""

    line_width_rad: float = float(np.radians(0.3))
    label_size_rad: float = float(np.radians(2.5))
    caption_size_rad: float = float(np.radians(4.0))
    line_scale: float = 1.0
    label_scale: float = 1.0
    grid: bool = False


@dataclass(frozen=True)
class RenderSettings:
    """Image settings: ``size_px`` (width, height), background colour, starfield, grid, labels."""

    size_px: tuple[int, int] = (1920, 1080)
    background: RGB = (0.0, 0.0, 0.0)
    stars: bool = True
    grid: bool = False
    labels: bool = True


@dataclass(frozen=True)
class CameraKey:
    """A camera keyframe at ``at_s`` seconds into the show: the camera keys that change
    there (None: as at the keyframe before), reached from the previous one with ``ease``.
    Units as in Camera."""

    at_s: float
    ease: str = "in-out"
    projection: str | None = None
    look: str | None = None
    elevation_rad: float | None = None
    azimuth_rad: float | None = None
    target: str | tuple[float, float, float] | None = None
    width_m: float | None = None
    distance_m: float | None = None
    fov_rad: float | None = None
    dome_distance_m: float | None = None
    dome_elevation_rad: float | None = None
    dome_tilt_rad: float | None = None
    #: "eased": the camera comes to rest at this key; "smooth": it passes through it
    #: on a curve through the neighbouring keys (spec.CAMERA_PATHS).
    path: str = "eased"


@dataclass(frozen=True)
class RateKey:
    """A time-rate keyframe (``[[timeline.pace]]``): at ``at_s`` seconds into the show the
    show runs at ``rate`` scene seconds per second of show, reached from the rate before
    (the previous key's, or ``[timeline] rate`` before the first key) with ``ease``."""

    at_s: float
    rate: float
    ease: str = "in-out"


@dataclass(frozen=True)
class Fade:
    """Opacity of the ``mark`` of ``body`` ("*": every body) at show times ``at_s``."""

    body: str
    mark: str
    at_s: tuple[float, ...]
    opacity: tuple[float, ...]
    ease: str = "in-out"


@dataclass(frozen=True)
class Caption:
    """Text on the picture from ``start_s`` to ``end_s`` seconds into the show, fading in
    and out over ``fade_s``; ``size_px`` at 1080 px image height."""

    text: str
    start_s: float = 0.0
    end_s: float = float("inf")
    fade_s: float = 0.5
    position: str = "bottom"
    size_px: float = 30.0
    color: RGB = (242 / 255, 242 / 255, 242 / 255)  # "#f2f2f2"


@dataclass(frozen=True)
class Timeline:
    """Scene time of the show: frame k is at ``start_s + k * rate / fps`` scene seconds.

    Camera keyframes, fades and captions are placed in seconds of show (``k / fps``);
    ``clock`` is "none", "date" or "elapsed" (an on-screen clock).
    """

    start_s: float = 0.0
    rate: float = 5.0 * 86_400.0  # scene seconds per second of show
    fps: float = 30.0
    duration_s: float = 20.0  # seconds of show
    clock: str = "none"
    camera_keys: tuple[CameraKey, ...] = ()
    fades: tuple[Fade, ...] = ()
    captions: tuple[Caption, ...] = ()
    rate_keys: tuple[RateKey, ...] = ()

    def show_time_of_frame(self, k: Any) -> Any:
        """Seconds into the show of frame k."""
        return np.asarray(k, dtype=np.float64) / self.fps

    @property
    def frame_count(self) -> int:
        return int(round(self.duration_s * self.fps))

    def scene_time_at(self, show_s: Any) -> Any:
        """Scene time (s) at ``show_s`` seconds into the show (scalar or array). The one
        map from show time to scene time: frames, the window's show clock and stills at a
        show time all go through it."""
        return self.start_s + np.asarray(show_s, dtype=np.float64) * self.rate

    def show_time_at(self, t_s: float) -> float:
        """Seconds into the show at scene time ``t_s`` (the inverse of ``scene_time_at``),
        0 before the start."""
        return max(0.0, (float(t_s) - self.start_s) / self.rate)

    def time_of_frame(self, k: Any) -> Any:
        """Scene time (s) of frame k (scalar or array)."""
        return self.scene_time_at(self.show_time_of_frame(k))


@dataclass(frozen=True)
class Scene:
    """A whole scene, frozen. Edit with ``dataclasses.replace`` (or ``Scene.with_body``)."""

    title: str
    epoch: Epoch
    frame: str
    center: Center
    bodies: tuple[Body, ...]
    camera: Camera = field(default_factory=Camera)
    render: RenderSettings = field(default_factory=RenderSettings)
    timeline: Timeline = field(default_factory=Timeline)
    populations: tuple[Population, ...] = ()
    source: Path | None = None
    dome: DomeSettings = field(default_factory=DomeSettings)
    length_unit: str = "au"
    time_unit: str = "d"
    angle_unit: str = "deg"
    warnings: tuple[str, ...] = ()

    def body(self, name: str) -> Body:
        """The body called ``name`` (as ``name_key`` compares names); KeyError if none."""
        key = name_key(name)
        for b in self.bodies:
            if name_key(b.name) == key:
                return b
        raise KeyError(name)

    def osculating(self, t_s: float) -> Scene:
        """A copy whose ephemeris bodies hold their osculating conics at scene time t_s
        (the scene itself when none follows an ephemeris): what a frame at t_s draws."""
        if all(b.track is None for b in self.bodies):
            return self
        return replace(self, bodies=tuple(b.osculating(t_s) for b in self.bodies))

    def with_body(self, index: int, body: Body) -> Scene:
        """A copy with body ``index`` replaced."""
        bodies = list(self.bodies)
        bodies[index] = body
        return replace(self, bodies=tuple(bodies))
