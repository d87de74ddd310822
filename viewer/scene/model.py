"""The Scene: a frozen, validated description of one system, in SI units and radians.

This is what the loader produces and what geometry, renderer, exporter and editor read.
Every field has its unit in its name or docstring; nothing here knows about TOML.
Colours are sRGB triples of floats in [0, 1].
"""

from __future__ import annotations

import math
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


def _linear(u: Any) -> Any:
    return u


def _linear_integral(u: Any) -> Any:
    return u * u / 2.0


def _in(u: Any) -> Any:
    return u * u * u


def _in_integral(u: Any) -> Any:
    return u ** 4 / 4.0


def _out(u: Any) -> Any:
    return 1.0 - (1.0 - u) ** 3


def _out_integral(u: Any) -> Any:
    return u + ((1.0 - u) ** 4 - 1.0) / 4.0


def _in_out(u: Any) -> Any:
    return u * u * (3.0 - 2.0 * u)  # smoothstep


def _in_out_integral(u: Any) -> Any:
    return u ** 3 - u ** 4 / 2.0


#: The easing curves of keyframed values (spec.EASES), each as (f, F) with f(u) the eased
#: fraction of a move at the fraction u in [0, 1] of its time (f(0) = 0, f(1) = 1) and
#: F(u) = the integral of f from 0 to u in closed form (what a time-rate key's scene time
#: needs). Vectorised over numpy arrays.
EASE_CURVES: dict[str, tuple[Any, Any]] = {
    "linear": (_linear, _linear_integral),
    "in": (_in, _in_integral),
    "out": (_out, _out_integral),
    "in-out": (_in_out, _in_out_integral),
}



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
    #: Set per frame by ``Scene.swept_at`` on a sweep that reveals: the scene time drawn,
    #: so only what the body has swept by then is drawn (None: every sector).
    shown_until_s: float | None = None

    def bounds_s(self) -> list[tuple[float, float]]:
        """Scene-time bounds (t0, t1) of each sector, k = 0..count-1."""
        return [(self.start_s + k * self.interval_s, self.start_s + (k + 1) * self.interval_s)
                for k in range(self.count)]

    def swept_until(self, t_s: float) -> float:
        """How many sectors the body has swept by scene time ``t_s``: whole sectors plus
        the fraction (of time) of the one being swept, from 0 to ``count``."""
        return min(float(self.count), max(0.0, (t_s - self.start_s) / self.interval_s))

    def drawn_s(self) -> list[tuple[float, float, bool]]:
        """(t0, t1, whole) of each sector drawn now: every sector, or with ``reveal =
        "swept"`` the sectors swept whole by ``shown_until_s`` and the one being swept,
        from its first edge to the body (``whole`` False: it grows, and has no area
        label)."""
        bounds = self.bounds_s()
        if self.reveal != "swept" or self.shown_until_s is None:
            return [(t0, t1, True) for t0, t1 in bounds]
        swept = self.swept_until(self.shown_until_s)
        whole = int(math.floor(swept + 1e-12))
        out = [(t0, t1, True) for t0, t1 in bounds[:whole]]
        if whole < self.count and swept - whole > 1e-9:
            out.append((bounds[whole][0], float(self.shown_until_s), False))
        return out


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


def _shaped(values: np.ndarray, shape: tuple[int, ...]) -> Any:
    """A flat result back in its input's shape; a float for a scalar input."""
    return float(values[0]) if shape == () else values.reshape(shape)


@dataclass(frozen=True)
class Timeline:
    """Scene time of the show: frame k is at ``scene_time_at(k / fps)`` scene seconds,
    which is ``start_s + k * rate / fps`` unless ``rate_keys`` (``[[timeline.pace]]``)
    change the pace along the show.

    Camera keyframes, fades, captions and pace keys are placed in seconds of show
    (``k / fps``); ``clock`` is "none", "date" or "elapsed" (an on-screen clock).
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

    def _pace_knots(self) -> tuple[np.ndarray, np.ndarray, tuple[str, ...], np.ndarray]:
        """(show times, rates, ease into each knot, scene time at each knot) of the pace:
        show time 0 runs at ``rate`` unless a key is at 0; each key's rate is reached
        from the one before with the key's ease; after the last key its rate stays."""
        keys = self.rate_keys
        if keys and keys[0].at_s <= 0.0:
            times = [k.at_s for k in keys]
            rates = [k.rate for k in keys]
            eases = tuple(k.ease for k in keys)
        else:
            times = [0.0] + [k.at_s for k in keys]
            rates = [self.rate] + [k.rate for k in keys]
            eases = ("linear",) + tuple(k.ease for k in keys)
        t = np.asarray(times, dtype=np.float64)
        r = np.asarray(rates, dtype=np.float64)
        scene = np.empty_like(t)
        scene[0] = self.start_s + t[0] * r[0]  # the rate at the first knot runs back to 0
        for i in range(1, len(t)):
            h = t[i] - t[i - 1]
            integral = EASE_CURVES[eases[i]][1](1.0)
            scene[i] = scene[i - 1] + h * (r[i - 1] + (r[i] - r[i - 1]) * integral)
        return t, r, eases, scene

    def rate_at(self, show_s: Any) -> Any:
        """Scene seconds per second of show at ``show_s`` (scalar or array): ``rate``, or
        the eased pace of the ``[[timeline.pace]]`` keys."""
        x = np.asarray(show_s, dtype=np.float64)
        shape = x.shape
        x = x.reshape(-1)
        if not self.rate_keys:
            out = np.full_like(x, self.rate)
        else:
            t, r, eases, _ = self._pace_knots()
            out = np.where(x < t[0], r[0], r[-1])
            for i in range(1, len(t)):
                leg = (x >= t[i - 1]) & (x < t[i])
                if leg.any():
                    u = (x[leg] - t[i - 1]) / (t[i] - t[i - 1])
                    out[leg] = r[i - 1] + (r[i] - r[i - 1]) * EASE_CURVES[eases[i]][0](u)
        return _shaped(out, shape)

    def scene_time_at(self, show_s: Any) -> Any:
        """Scene time (s) at ``show_s`` seconds into the show (scalar or array). The one
        map from show time to scene time: frames, the window's show clock and stills at a
        show time all go through it.

        Without pace keys it is ``start + show_s * rate``; with them it is ``start`` plus
        the integral of the eased rate (``rate_at``) from 0, in closed form: on a leg from
        knot i-1 to knot i (length h, rates r0 -> r1, ease curve f with integral F)
        scene time grows by ``r0 (t - t0) + (r1 - r0) h F((t - t0) / h)``.
        """
        x = np.asarray(show_s, dtype=np.float64)
        if not self.rate_keys:
            return self.start_s + x * self.rate
        shape = x.shape
        x = x.reshape(-1)
        t, r, eases, scene = self._pace_knots()
        before = scene[0] + (x - t[0]) * r[0]
        out = np.where(x < t[0], before, scene[-1] + (x - t[-1]) * r[-1])
        for i in range(1, len(t)):
            leg = (x >= t[i - 1]) & (x < t[i])
            if leg.any():
                h = t[i] - t[i - 1]
                dt = x[leg] - t[i - 1]
                out[leg] = (scene[i - 1] + r[i - 1] * dt
                            + (r[i] - r[i - 1]) * h * EASE_CURVES[eases[i]][1](dt / h))
        return _shaped(out, shape)

    def show_time_at(self, t_s: Any) -> Any:
        """Seconds into the show at scene time ``t_s`` (the inverse of ``scene_time_at``),
        0 before the start; scalar or array.

        Scene time grows monotonically with show time (every rate has the sign of
        ``rate``), so each leg between pace knots is solved by Newton's method on
        ``scene_time_at(x) - t_s`` (its derivative is ``rate_at``) kept inside the leg's
        bracket, with bisection whenever a step would leave it.
        """
        y = np.asarray(t_s, dtype=np.float64)
        shape = y.shape
        y = y.reshape(-1)
        if not self.rate_keys:
            return _shaped(np.maximum(0.0, (y - self.start_s) / self.rate), shape)
        t, r, _, scene = self._pace_knots()
        sign = 1.0 if self.rate > 0 else -1.0
        ys = sign * y
        ss = sign * scene
        out = np.where(ys < ss[0], t[0] + (y - scene[0]) / r[0],
                       t[-1] + (y - scene[-1]) / r[-1])
        leg = np.searchsorted(ss, ys, side="right")  # knot i-1 <= y < knot i
        inside = (leg >= 1) & (leg < len(t))
        if inside.any():
            i = leg[inside]
            lo, hi = t[i - 1].copy(), t[i].copy()
            goal = y[inside]
            x = lo + (hi - lo) * (goal - scene[i - 1]) / (scene[i] - scene[i - 1])
            for _ in range(100):
                g = self.scene_time_at(x) - goal
                below = sign * g < 0
                lo = np.where(below, x, lo)
                hi = np.where(below, hi, x)
                step = x - g / np.asarray(self.rate_at(x))
                bisect = ~((step > lo) & (step < hi))
                new = np.where(bisect, 0.5 * (lo + hi), step)
                done = np.abs(new - x) <= 1e-15 * np.maximum(1.0, np.abs(x))
                x = new
                if done.all():
                    break
            out[inside] = x
        return _shaped(np.maximum(0.0, out), shape)

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

    def swept_at(self, t_s: float) -> Scene:
        """A copy whose sweeps that reveal (``reveal = "swept"``) draw only what their
        body has swept by scene time t_s (``Sweep.drawn_s``); the scene itself when no
        sweep reveals. What a frame at t_s draws (``build_frame`` applies it)."""
        if not any(b.sweep is not None and b.sweep.reveal == "swept" for b in self.bodies):
            return self
        return replace(self, bodies=tuple(
            replace(b, sweep=replace(b.sweep, shown_until_s=float(t_s)))
            if b.sweep is not None and b.sweep.reveal == "swept" else b
            for b in self.bodies))

    def with_body(self, index: int, body: Body) -> Scene:
        """A copy with body ``index`` replaced."""
        bodies = list(self.bodies)
        bodies[index] = body
        return replace(self, bodies=tuple(bodies))
