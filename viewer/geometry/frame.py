"""One frame's geometry: everything the renderer draws, from (scene, time, view).

``build_frame`` is a pure function: the same scene, time, view and text measure give the
same arrays, bit for bit. It gathers every curve of the frame (orbits, sector arcs, grid
rings) into one batch and tessellates them together, turns polylines into stroke quads
and sectors into fans, places markers and labels, and returns arrays in image pixels
ready for upload (the renderer casts them to float32). Nothing here touches GL.

Draw order (back to front): stars, grid, populations, sector fills, the central body
with its glow, lines (sector edges, orbits, axes, nodes, arrows), markers, labels.
Lines and marks that pass behind the central body (as drawn) are cut where its limb
hides them, so an orbit goes behind the planet and in front of it as it should.
"""

from __future__ import annotations

import math
from collections.abc import Generator, Sequence
from dataclasses import dataclass, field
from typing import Any

import numpy as np
from numpy.typing import NDArray

from ..orbit import Elements, state_from_elements, true_from_mean
from ..scene.model import Body, Population, Scene
from ..scene.timeline import OverlayText
from ..units import unit_factor
from ..units.format import format_sig, label_speed
from . import marks
from .camera import View, intrinsics
from .conic import (
    ConicShape,
    CurveBatch,
    Tessellation,
    default_limit_radius_m,
    tessellate_views,
    whole_orbit_range,
)
from .fills import FILL_FLOATS, fan_triangles, fill_vertices
from .labels import LabelRequest, Measure, PlacedLabel, place_labels
from .stars import Starfield, make_starfield, star_points
from .strokes import (
    STROKE_FLOATS,
    PolylineBatch,
    StrokeStyle,
    hidden_by_sphere,
    stroke_vertices,
    stroke_vertices_views,
)

Floats = NDArray[np.float64]
RGB = tuple[float, float, float]
RGBA = tuple[float, float, float, float]

# Marker shapes (the marker shader draws each from its distance function).
DISC, RING, DIAMOND, GLOW, SPHERE, CROSSHAIR, ARROWHEAD = range(7)
#: Floats per marker: x, y, radius (px), shape, param (px), angle (rad), r, g, b, a.
MARKER_FLOATS = 10

#: Sizes in pixels at 1080 px image height; every one scales with the height.
#: Labels of at least 16 px (legible on a projector), body names a little larger.
LABEL_PX = 18.0
SMALL_LABEL_PX = 16.0
AREA_LABEL_PX = 16.0
BODY_MARKER_PX = 5.5
STAR_MIN_RADIUS_PX = 7.0
PLANET_MIN_RADIUS_PX = 6.0
FOCUS_RING_PX = 7.5
APSIS_PX = 4.5
NODE_PX = 3.5
ARROW_MAX_PX = 150.0
EDGE_PX = 1.2
GRID_PX = 1.0
AXIS_PX = 1.1
#: Opacity factor of every other translucent sector.
ALTERNATE_FILL = 0.6
#: A central body at least this massive (GM, m^3/s^2) is drawn as a star with a glow;
#: below it, as a planet (about 7.6 Jupiter masses; common practice, no source).
STAR_GM_M3_S2 = 1.0e18

GRID_RGB = (0.42, 0.52, 0.68)
FOCUS_RGB = (0.96, 0.97, 1.0)
NODE_RGB = (0.80, 0.82, 0.88)


@dataclass
class VectorParts:
    """The frame's lines and fills before they become triangles, for vector output (SVG).

    ``grid`` and ``lines`` are the world polylines (m) with their styles, as stroked;
    ``sectors`` the sector outlines (world, m: focus, arc, focus) with their fill RGBA.
    """

    grid: PolylineBatch
    lines: PolylineBatch
    sectors: list[tuple[Floats, RGBA]]


@dataclass
class FrameGeometry:
    """A frame ready to draw: arrays in image pixels (y down), float64, straight alpha."""

    view: View
    background: RGBA
    stars: Floats                 # (K, 7) points: x, y, size, r, g, b, a
    grid: Floats                  # (N, STROKE_FLOATS)
    fills: Floats                 # (N, FILL_FLOATS)
    glows: Floats                 # (M, MARKER_FLOATS): the central body and its glow
    strokes: Floats               # (N, STROKE_FLOATS)
    markers: Floats               # (M, MARKER_FLOATS)
    labels: list[PlacedLabel]
    populations: list[Population] = field(default_factory=list)
    t_s: float = 0.0
    vector: VectorParts | None = None
    #: Every label wanted, before placement, and the boxes labels keep clear of (markers):
    #: the dome and the panorama place them again in their own pixels.
    label_requests: list[LabelRequest] = field(default_factory=list)
    label_obstacles: list[tuple[float, float, float, float]] = field(default_factory=list)


def _rgba(c: RGB, a: float = 1.0) -> RGBA:
    return (float(c[0]), float(c[1]), float(c[2]), float(a))


def _lighten(c: RGB, k: float) -> RGB:
    return (c[0] + (1 - c[0]) * k, c[1] + (1 - c[1]) * k, c[2] + (1 - c[2]) * k)


def _mix(c: RGB, d: RGB, k: float) -> RGB:
    return (c[0] + (d[0] - c[0]) * k, c[1] + (d[1] - c[1]) * k, c[2] + (d[2] - c[2]) * k)


def format_area(area_m2: float, unit: str) -> str:
    """An area in the scene's length unit squared: "0.215 au²"."""
    f = unit_factor(unit, "length")
    return f"{format_sig(area_m2 / (f * f))} {unit}\u00b2"


def _format_length(x_m: float, unit: str) -> str:
    """A round grid radius without trailing zeros: "2 au", "0.5 au", "20000 km"."""
    return f"{x_m / unit_factor(unit, 'length'):.6g} {unit}"


@dataclass
class _Marks:
    rows: list[list[float]] = field(default_factory=list)

    def add(self, px: Floats, radius: float, shape: int, rgb: RGB, alpha: float = 1.0,
            param: float = 0.0, angle: float = 0.0) -> None:
        self.rows.append([float(px[0]), float(px[1]), radius, float(shape), param, angle,
                          rgb[0], rgb[1], rgb[2], alpha])

    def array(self) -> Floats:
        return np.array(self.rows, dtype=np.float64).reshape(-1, MARKER_FLOATS)


def _body_limit(body: Body) -> float:
    el = body.elements
    if float(el.e) < 1.0:
        return float(el.apoapsis)
    return body.limit_radius_m if body.limit_radius_m else default_limit_radius_m(el)


def _sector_params(body: Body, shape: ConicShape
                   ) -> list[tuple[float, float, float, float, bool]]:
    """(u0, u1, t0, t1, whole) of each sweep sector drawn (``Sweep.drawn_s``: all of them,
    or those a reveal has reached); exact time bounds by Kepler's equation."""
    assert body.sweep is not None
    e = float(body.elements.e)
    out = []
    for t0, t1, whole in body.sweep.drawn_s():
        lo, hi = (t0, t1) if t1 >= t0 else (t1, t0)
        u0 = float(shape.param_of_true(body.elements_at(lo).nu, e))
        u1 = float(shape.param_of_true(body.elements_at(hi).nu, e))
        if e < 1.0:
            u1 = min(u1, u0 + 2.0 * math.pi)  # a sector of more than a turn is the ellipse
        out.append((u0, u1, lo, hi, whole))
    return out


def _flight_params(body: Body, shape: ConicShape) -> tuple[float, float]:
    """Curve parameters (u0, u1) of the arc flown from the flight's start to its end."""
    assert body.flight_s is not None
    e = float(body.elements.e)
    t0, t1 = body.flight_s
    u0 = float(shape.param_of_true(body.elements_at(t0).nu, e))
    u1 = float(shape.param_of_true(body.elements_at(t1).nu, e))
    if e < 1.0:
        period = float(body.elements.period)
        turns = math.floor((t1 - t0) / period)
        u1 = u0 + (u1 - u0) % (2.0 * math.pi) + 2.0 * math.pi * turns
        u1 = min(u1, u0 + 2.0 * math.pi)
    return u0, u1


def _central_radius_px(scene: Scene, view: View) -> tuple[float, Floats, bool]:
    """(radius px, centre px, visible) of the central body, at least its minimum size."""
    px, front = view.project(np.zeros((1, 3)))
    hs = view.style_scale
    cam = view.to_camera(np.zeros((1, 3)))
    r_true = scene.center.radius_m / float(view.metres_per_px(cam)[0])
    star = scene.center.gm_m3_s2 >= STAR_GM_M3_S2
    r_min = (STAR_MIN_RADIUS_PX if star else PLANET_MIN_RADIUS_PX) * hs
    return max(r_true, r_min), px[0], bool(front[0])


def _motion_key(body: Body) -> tuple[object, ...]:
    """What a body's cached values depend on: its elements and sectors (compared by
    identity: both are frozen, and an edit makes new ones), its epoch and its flight.
    Not its fades, show switches or colour, so a show that fades a body's marks from
    frame to frame (a new Body each frame) keeps its conic and its sectors."""
    return (body.elements, body.sweep, body.epoch_offset_s, body.flight_s,
            body.limit_radius_m)


class StaticCache:
    """What a frame needs that depends only on a body's motion, not on the view: its
    conic's constants, its sectors' anomaly bounds and areas, and its state at the last
    time asked (the faces of a dome master share it). Keyed by what those depend on
    (``_motion_key``), so an edited scene (new elements) never sees stale values; a
    cache changes only how fast a frame is made, never what it holds."""

    def __init__(self, limit: int = 512) -> None:
        self._items: dict[int, tuple[tuple[object, ...], dict[str, object]]] = {}
        self._frames: dict[tuple[object, ...], tuple[tuple[object, ...], _StaticPart]] = {}
        self._limit = limit

    def frame_part(self, key: tuple[object, ...], owners: tuple[object, ...]) -> _StaticPart | None:
        """The time-independent part of a frame for this view, if kept (see build_frame)."""
        hit = self._frames.get(key)
        if hit is not None and all(a is b for a, b in zip(hit[0], owners, strict=True)):
            return hit[1]
        return None

    def keep_frame_part(self, key: tuple[object, ...], owners: tuple[object, ...],
                        part: _StaticPart) -> None:
        if len(self._frames) >= 8:
            self._frames.clear()
        self._frames[key] = (owners, part)

    def of(self, body: Body) -> dict[str, object]:
        key = _motion_key(body)
        hit = self._items.get(id(body.elements))
        if hit is not None and len(hit[0]) == len(key) and all(
                a is b or (isinstance(a, float | tuple) and a == b)
                for a, b in zip(hit[0], key, strict=True)):
            return hit[1]
        if len(self._items) >= self._limit:
            self._items.clear()
        entry: dict[str, object] = {}
        self._items[id(body.elements)] = (key, entry)
        return entry

    def states(self, bodies: Sequence[Body], t_s: float) -> list[tuple[Floats, Floats]]:
        """``states_at`` of ``bodies``, each kept with its body for the next call at the
        same time (the faces of a dome master, a window frame drawn again)."""
        entries = [self.of(b) for b in bodies]
        kept: list[Any] = [e.get("state") for e in entries]
        todo = [k for k, st in enumerate(kept) if st is None or st[0] != t_s]
        for k, rv in zip(todo, states_at([bodies[k] for k in todo], t_s), strict=True):
            kept[k] = entries[k]["state"] = (t_s, *rv)
        return [(st[1], st[2]) for st in kept]


def _state_at(body: Body, t_s: float) -> tuple[Floats, Floats]:
    r, v = state_from_elements(body.elements_at(t_s))
    return np.asarray(r, dtype=np.float64), np.asarray(v, dtype=np.float64)


def states_at(bodies: Sequence[Body], t_s: float) -> list[tuple[Floats, Floats]]:
    """Each body's position and velocity (m, m/s) at scene time ``t_s``: those on their
    own two-body conic in one Kepler solve and one state evaluation for them all. Both
    are elementwise, so each body gets the very bits its own ``elements_at`` and
    ``state_from_elements`` give (tests/test_geometry_states.py); a body that follows
    an ephemeris or holds a parabola's size is evaluated on its own."""
    out: list[Any] = [None] * len(bodies)
    batch = [k for k, b in enumerate(bodies)
             if b.track is None and b.elements.parabola_p is None and b.elements.mu is not None]
    if len(batch) > 1:
        els = [bodies[k].elements for k in batch]

        def col(name: str) -> Floats:
            return np.array([getattr(el, name) for el in els], dtype=np.float64)

        dt = np.array([t_s - bodies[k].epoch_offset_s for k in batch], dtype=np.float64)
        e = col("e")
        M = col("mean_anomaly") + col("mean_motion") * dt  # as Elements.after, per row
        now = Elements(col("a"), e, col("i"), col("raan"), col("argp"),
                       true_from_mean(M, e), col("mu"))
        r, v = state_from_elements(now)
        for j, k in enumerate(batch):
            out[k] = (r[j], v[j])
    for k, b in enumerate(bodies):
        if out[k] is None:
            out[k] = _state_at(b, t_s)
    return out


def _static(cache: StaticCache | None, body: Body, key: str, make: Any) -> Any:
    if cache is None:
        return make()
    entry = cache.of(body)
    if key not in entry:
        entry[key] = make()
    return entry[key]


@dataclass
class _StaticPart:
    """What a frame holds that depends on the scene and the view but not on time."""

    grid: Floats
    fills: Floats
    glows: Floats
    strokes: Floats
    markers: Floats
    labels: list[LabelRequest]
    obstacles: list[tuple[float, float, float, float]]
    occluder: tuple[Floats, float] | None
    stars: Floats
    vector: VectorParts


def _view_key(view: View) -> tuple[object, ...]:
    """What a frame's time-independent part depends on in ``view`` (not where its labels
    are kept: they are placed per frame)."""
    return (view.size_px, view.projection, view.origin_m.tobytes(), view.basis.tobytes(),
            view.width_m, view.distance_m, view.fov_rad, view.near_m, view.style_height_px)


def frame_view_key(view: View) -> tuple[object, ...]:
    """Everything in ``view`` that a whole frame depends on: two views with equal keys
    give the same frame."""
    return (*_view_key(view), view.label_box_px)


def build_frame(scene: Scene, t_s: float, view: View, measure: Measure,
                transparent: bool = False, starfield: Starfield | None = None,
                cache: StaticCache | None = None,
                overlay: Sequence[OverlayText] = (), place: bool = True) -> FrameGeometry:
    """The geometry of ``scene`` at scene time ``t_s`` (s) seen through ``view``.

    ``measure`` sizes label text (the renderer's font); ``starfield`` may be passed to
    reuse one already made and ``cache`` to keep what does not change between frames
    (per-body constants, and everything but the bodies' positions while the scene and
    the view stay the same). Both are deterministic: the result is the same with or
    without them. ``overlay`` is text fixed on the picture (captions, the clock: see
    viewer.scene.timeline.overlay_at), placed before every other label. A body that
    follows an ephemeris is drawn on its osculating conic at ``t_s``. ``place`` False
    leaves the labels unplaced (``labels`` empty, ``label_requests`` filled): the dome and
    the panorama place them in their own pixels.
    """
    return build_frames(scene, t_s, [view], measure, transparent, starfield, cache, overlay,
                        place)[0]


def build_frames(scene: Scene, t_s: float, views: Sequence[View], measure: Measure,
                 transparent: bool = False, starfield: Starfield | None = None,
                 cache: StaticCache | None = None,
                 overlay: Sequence[OverlayText] = (), place: bool = True
                 ) -> list[FrameGeometry]:
    """``build_frame`` for each of ``views`` at once (the cube faces of a dome master or
    a panorama): the same frames, made with one tessellation and one stroking pass for
    all the views whose time-independent part is not kept in ``cache``."""
    scene = scene.osculating(t_s).swept_at(t_s)
    owners = (scene.bodies, scene.center, scene.render)
    keys = [(_view_key(v), id(scene.bodies), id(scene.center), id(scene.render),
             scene.length_unit) for v in views]
    kept = [cache.frame_part(k, owners) if cache is not None else None for k in keys]
    missing = [i for i, st in enumerate(kept) if st is None]
    made = dict(zip(missing, _static_parts(scene, [views[i] for i in missing], measure,
                                           starfield, cache), strict=True))
    if cache is not None:
        for i, part in made.items():
            cache.keep_frame_part(keys[i], owners, part)
    return [_frame(scene, t_s, v, st or made[i], measure, transparent, cache, overlay, place)
            for i, (v, st) in enumerate(zip(views, kept, strict=True))]


def _frame(scene: Scene, t_s: float, view: View, static: _StaticPart, measure: Measure,
           transparent: bool, cache: StaticCache | None, overlay: Sequence[OverlayText],
           place: bool) -> FrameGeometry:
    """One view's frame: its kept time-independent part and the bodies at ``t_s``."""
    w, h = view.size_px
    hs = view.style_scale
    bg = scene.render.background
    background = (bg[0], bg[1], bg[2], 0.0 if transparent else 1.0)
    lines = PolylineBatch.empty()
    markers = _Marks()
    arrows = _Marks()
    labels = list(static.labels)
    obstacles = list(static.obstacles)
    occluder = static.occluder
    centre_cam = _centre_cam(view, occluder) if occluder is not None else None
    v_ref = _reference_speed(scene)
    drawn = [(k, body) for k, body in enumerate(scene.bodies)
             if ((body.show.marker and body.fade.marker > 0)
                 or (body.show.label and body.fade.label > 0)
                 or (body.show.velocity and body.fade.velocity > 0)) and body.in_flight(t_s)]
    bodies = [body for _k, body in drawn]
    states = cache.states(bodies, t_s) if cache is not None else states_at(bodies, t_s)
    for (k, body), (r, v) in zip(drawn, states, strict=True):
        show = body.show
        fade = body.fade
        col = body.color
        q, f, cam = _seen_px(view, r, occluder, centre_cam)
        if not f:
            continue
        mpp = float(view.metres_per_px(cam)[0])
        m_r = BODY_MARKER_PX * hs
        if body.radius_m:
            m_r = max(m_r, body.radius_m / mpp)
        if show.velocity and fade.velocity > 0:
            _velocity_arrow(lines, arrows, labels, view, r, np.asarray(v), mpp, v_ref, col,
                            hs, m_r, scene.render.labels, fade.velocity)
        if show.marker and fade.marker > 0:
            markers.add(q, m_r, DISC, col, fade.marker, param=1.3 * hs)
            obstacles.append((q[0] - m_r, q[1] - m_r, q[0] + m_r, q[1] + m_r))
        if show.label and scene.render.labels and fade.label > 0:
            labels.append(LabelRequest(body.name, (float(q[0]), float(q[1])), m_r + 1.0 * hs,
                                       LABEL_PX * hs, _rgba(_lighten(col, 0.45), fade.label),
                                       1 + k))
    moving = (stroke_vertices(lines, view, height_scale=hs, occluder=occluder)
              if lines.points else np.zeros((0, STROKE_FLOATS)))
    strokes = np.vstack([static.strokes, moving]) if len(moving) else static.strokes
    marker_rows = np.vstack([static.markers, markers.array(), arrows.array()])
    for text in overlay:
        labels.append(_overlay_label(text, measure, (w, h), hs, view.label_box_px))
        x0, y0 = labels[-1].at_px  # type: ignore[misc]
        tw, asc, desc = measure(text.text, text.size_px * hs)
        obstacles.append((x0, y0 - asc, x0 + tw, y0 + desc))
    placed = place_labels(labels, measure, (w, h), obstacles,
                          keep_in=view.label_box_px) if place else []
    sv = static.vector
    vector = VectorParts(sv.grid, PolylineBatch(sv.lines.points + lines.points,
                                                sv.lines.closed + lines.closed,
                                                sv.lines.styles + lines.styles), sv.sectors)
    return FrameGeometry(
        view=view, background=background, stars=static.stars, grid=static.grid,
        fills=static.fills, glows=static.glows, strokes=strokes, markers=marker_rows,
        labels=placed, populations=list(scene.populations), t_s=t_s, vector=vector,
        label_requests=labels, label_obstacles=obstacles)


#: Margin between overlay text and the picture's edge, px at 1080 px image height.
OVERLAY_MARGIN_PX = 28.0


def _overlay_label(text: OverlayText, measure: Measure, size: tuple[int, int],
                   hs: float, box: tuple[float, float, float, float] | None = None
                   ) -> LabelRequest:
    """A caption or the clock as a label fixed at its position on the picture (inside
    ``box``, x0, y0, x1, y1 px, when given: the window's area between its panels)."""
    bx, by, bx1, by1 = box if box is not None else (0.0, 0.0, float(size[0]), float(size[1]))
    w, h = bx1 - bx, by1 - by
    px = text.size_px * hs
    tw, asc, desc = measure(text.text, px)
    m = OVERLAY_MARGIN_PX * hs
    pos = text.position
    x = m if pos.endswith("left") else (w - m - tw if pos.endswith("right") else 0.5 * (w - tw))
    if pos.startswith("top"):
        y = m + asc
    elif pos.startswith("bottom"):
        y = h - m - desc
    else:
        y = 0.5 * (h + asc - desc)
    x, y = x + bx, y + by
    return LabelRequest(text.text, (x, y), 0.0, px, text.rgba, -1, at_px=(x, y))


def _seen_px(view: View, p: Floats, occluder: tuple[Floats, float] | None,
             centre_cam: Floats | None = None) -> tuple[Floats, bool, Floats]:
    """Pixels of a world point, whether it can be seen (in front, not hidden) and its
    camera coordinates (1, 3). ``centre_cam``: the occluder's centre in camera
    coordinates, if already known (it is the same for every point of a view)."""
    pw = np.asarray(p, dtype=np.float64).reshape(1, 3)
    cam = view.to_camera(pw)
    q, f = view.camera_px(cam)
    seen = bool(f[0])
    if seen and occluder is not None and np.any(pw != 0.0):
        if centre_cam is None:
            centre_cam = _centre_cam(view, occluder)
        seen = not bool(hidden_by_sphere(view, cam, centre_cam, occluder[1])[0])
    return q[0], seen, cam


def _centre_cam(view: View, occluder: tuple[Floats, float]) -> Floats:
    """The occluding sphere's centre in the view's camera coordinates."""
    return view.to_camera(occluder[0].reshape(1, 3))[0]


def _static_parts(scene: Scene, views: Sequence[View], measure: Measure,
                  starfield: Starfield | None, cache: StaticCache | None) -> list[_StaticPart]:
    """``_static_steps`` for each view, with the tessellation and the strokes of all of
    them made together (one set of numpy calls for the five faces of a dome master; each
    result is bit-identical to the view's own)."""
    if len({(intrinsics(v), v.style_scale) for v in views}) > 1:
        return [_static_parts(scene, [v], measure, starfield, cache)[0] for v in views]
    steps = [_static_steps(scene, v, measure, starfield, cache) for v in views]
    curves = [next(s) for s in steps]
    tess = tessellate_views(curves, views)
    lines = [s.send(t) for s, t in zip(steps, tess, strict=True)]
    hs = views[0].style_scale if views else 1.0
    # The grid and the lines of every view in one stroking pass (each result is still
    # bit-identical to its own call: stroke_vertices_views).
    n = len(views)
    both = stroke_vertices_views([g for g, _l, _o in lines] + [ln for _g, ln, _o in lines],
                                 list(views) * 2, height_scale=hs,
                                 occluders=[o for _g, _l, o in lines] * 2)
    grid, strokes = both[:n], both[n:]
    parts = []
    for s, g, k in zip(steps, grid, strokes, strict=True):
        try:
            s.send((g, k))
        except StopIteration as done:
            parts.append(done.value)
    return parts


def _static_steps(scene: Scene, view: View, measure: Measure, starfield: Starfield | None,
                  cache: StaticCache | None
                  ) -> Generator[Any, Any, _StaticPart]:
    """Grid, sectors, the central body, orbits, axes, nodes, foci and apsides, in three
    steps so that several views can share the costly ones (see _static_parts): it yields
    the curves to tessellate and is sent their Tessellation; it yields the grid lines,
    the lines and the occluder and is sent their stroke vertices; it returns the part."""
    hs = view.style_scale
    unit = scene.length_unit
    unit_m = unit_factor(unit, "length")
    curves = CurveBatch.empty()
    grid_lines = PolylineBatch.empty()
    lines = PolylineBatch.empty()
    fill_tris: list[Floats] = []
    fill_cols: list[Floats] = []
    sector_rings: list[tuple[Floats, RGBA]] = []
    glows = _Marks()
    markers = _Marks()
    labels: list[LabelRequest] = []
    obstacles: list[tuple[float, float, float, float]] = []

    def obstacle(p: Floats, r: float) -> None:
        obstacles.append((p[0] - r, p[1] - r, p[0] + r, p[1] + r))

    # --- grid: rings about the focus in the reference plane, and spokes -----------------
    grid_arcs: list[tuple[int, float]] = []
    extent = max([_body_limit(b) for b in scene.bodies] + [view.field_width_m])
    if scene.render.grid:
        radii, _step = marks.grid_radii_m(view, unit_m, 1.2 * extent)
        for r in radii:
            circle = ConicShape(0, 0.0, float(r), float(r), np.array([1.0, 0, 0]),
                                np.array([0, 1.0, 0]))
            grid_arcs.append((curves.add(circle, 0.0, 2.0 * math.pi, 0.4), float(r)))
        if len(radii):
            r_out = float(radii[-1])
            for k in range(12):
                ang = k * math.pi / 6.0
                d = np.array([math.cos(ang), math.sin(ang), 0.0])
                grid_lines.add(np.stack([float(radii[0]) * d, r_out * d]),
                               StrokeStyle(_rgba(GRID_RGB, 0.22), GRID_PX))

    # --- bodies: curves first, so that one tessellation serves the whole frame ----------
    shapes = [_static(cache, b, "shape", lambda b=b: ConicShape.of(b.elements))
              for b in scene.bodies]
    orbit_arc: dict[int, tuple[int, bool]] = {}
    sector_arcs: dict[int, list[tuple[int, float, float, bool]]] = {}
    for k, (body, shape) in enumerate(zip(scene.bodies, shapes, strict=True)):
        if body.show.orbit and body.fade.orbit > 0:
            if body.flight_s is not None:  # only the flown arc
                u0, u1 = _flight_params(body, shape)
                closed = False
            else:
                u0, u1, closed = whole_orbit_range(body.elements, body.limit_radius_m)
            orbit_arc[k] = (curves.add(shape, u0, u1), closed)
        if (body.show.sweep and body.sweep is not None and body.sweep.count > 0
                and body.fade.sweep > 0):
            params = _static(cache, body, "sectors",
                             lambda body=body, shape=shape: _sector_params(body, shape))
            sector_arcs[k] = [(curves.add(shape, u0, u1, 0.2), t0, t1, whole)
                              for u0, u1, t0, t1, whole in params]
    tess: Tessellation = yield curves

    for arc, _r in grid_arcs:
        grid_lines.add(tess.arc(arc), StrokeStyle(_rgba(GRID_RGB, 0.30), GRID_PX), closed=True)

    # --- the central body: drawn before the lines, and hiding what passes behind it ----
    center = scene.center
    c_r, c_px, c_front = _central_radius_px(scene, view)
    star = center.gm_m3_s2 >= STAR_GM_M3_S2
    occluder: tuple[Floats, float] | None = None
    if center.show_body and c_front:
        if star:
            glows.add(c_px, max(c_r * 7.0, 46.0 * hs), GLOW, center.color, 0.55,
                      param=c_r)
        else:
            glows.add(c_px, c_r * 1.35, GLOW, _lighten(center.color, 0.3), 0.35, param=c_r)
        glows.add(c_px, c_r, SPHERE, center.color, 1.0, param=0.55 if star else 0.25)
        obstacle(c_px, c_r)
        mpp0 = float(view.metres_per_px(view.to_camera(np.zeros((1, 3))))[0])
        occluder = (np.zeros(3), c_r * mpp0)
    if center.show_label and scene.render.labels and c_front:
        labels.append(LabelRequest(center.name, (float(c_px[0]), float(c_px[1])),
                                   c_r + 2.0 * hs, LABEL_PX * hs,
                                   _rgba(_lighten(center.color, 0.45)), 0))

    centre_cam = _centre_cam(view, occluder) if occluder is not None else None

    def px_of(p: Floats) -> tuple[Floats, bool]:
        q, seen, _cam = _seen_px(view, p, occluder, centre_cam)
        return q, seen

    # --- sectors: fans from the occupied focus, edges inside them -----------------------
    for k, arcs in sector_arcs.items():
        body = scene.bodies[k]
        sw = body.sweep
        assert sw is not None
        fa = body.fade.sweep
        if fa <= 0:
            continue
        edge_a = min(1.0, sw.opacity + 0.3) * fa
        for j, (arc, t0, t1, whole) in enumerate(arcs):
            pts = tess.arc(arc)
            tris = fan_triangles(np.zeros(3), pts)
            fill_tris.append(tris)
            # Translucent neighbours alternate in strength, so each sector reads on its own.
            alpha = fa * sw.opacity * (ALTERNATE_FILL if (j % 2 and sw.opacity < 1.0) else 1.0)
            fill_cols.append(np.tile(_rgba(sw.color, alpha), (len(tris), 1)))
            ring = np.vstack([np.zeros((1, 3)), pts, np.zeros((1, 3))])
            sector_rings.append((ring, _rgba(sw.color, alpha)))
            ring_px, front = view.project(ring)
            offset = 0.0
            if np.all(front):
                x, y = ring_px[:, 0], ring_px[:, 1]
                signed = 0.5 * float(np.sum(x[:-1] * y[1:] - x[1:] * y[:-1]))
                # In a y-down image a positive shoelace sum runs clockwise on screen, so
                # the inside is to the right of the direction of travel.
                offset = -1.0 if signed > 0 else 1.0
            lines.add(ring, StrokeStyle(_rgba(_lighten(sw.color, 0.3), edge_a), EDGE_PX,
                                        offset=offset))
            if sw.show_area and scene.render.labels and whole:  # no label on a growing one
                area = _static(cache, body, f"area{t0!r}:{t1!r}",
                               lambda body=body, t0=t0, t1=t1: _sector_area_m2(body, t0, t1))
                cx, cy = _polygon_centroid(ring_px) if np.all(front) else (np.nan, np.nan)
                if math.isfinite(cx):
                    text = format_area(area, unit)
                    tw, asc, _desc = measure(text, AREA_LABEL_PX * hs)
                    labels.append(LabelRequest(text, (cx, cy), 0.0, AREA_LABEL_PX * hs,
                                               _rgba(_lighten(sw.color, 0.55), fa), 30,
                                               at_px=(cx - 0.5 * tw, cy + 0.35 * asc)))

    # --- each body's fixed lines and marks ----------------------------------------------
    for k, (body, _shape) in enumerate(zip(scene.bodies, shapes, strict=True)):
        el = body.elements
        col = body.color
        show = body.show
        limit = _body_limit(body)
        fade = body.fade
        if k in orbit_arc and fade.orbit > 0:
            arc, closed = orbit_arc[k]
            lines.add(tess.arc(arc), StrokeStyle(_rgba(col, 0.92 * fade.orbit),
                                                 body.line_width_px), closed=closed)
        if show.axes and fade.axes > 0:
            axes = _static(cache, body, "axes", lambda el=el, lim=limit: marks.axes_m(el, lim))
            for seg in axes:
                lines.add(seg, StrokeStyle(_rgba(col, 0.55 * fade.axes), AXIS_PX,
                                           dash_px=(7.0, 5.0)))
        if show.nodes and fade.nodes > 0:
            nodes = _static(cache, body, "nodes",
                            lambda el=el, lim=limit: marks.nodes_m(el, lim))
            if nodes is not None:
                node_a, node_d = nodes
                lines.add(np.stack([node_d, node_a]),
                          StrokeStyle(_rgba(_mix(col, NODE_RGB, 0.6), 0.7 * fade.nodes),
                                      AXIS_PX, dash_px=(2.0, 4.0)))
                for p, shape_id in ((node_a, DISC), (node_d, RING)):
                    q, f = px_of(p)
                    if f:
                        markers.add(q, NODE_PX * hs, shape_id, _mix(col, NODE_RGB, 0.6),
                                    fade.nodes, param=1.2 * hs)
                        obstacle(q, NODE_PX * hs)
        if show.foci and fade.foci > 0:
            occ, emp = _static(cache, body, "foci", lambda el=el: marks.foci_m(el))
            for focus_m, shape_id in ((occ, RING), (emp, CROSSHAIR)):
                if focus_m is None:
                    continue
                q, f = px_of(focus_m)
                if f:
                    markers.add(q, FOCUS_RING_PX * hs, shape_id,
                                FOCUS_RGB if shape_id == RING else _lighten(col, 0.35),
                                fade.foci, param=1.5 * hs)
                    obstacle(q, FOCUS_RING_PX * hs)
        if show.apsides and fade.apsides > 0:
            peri, apo = _static(cache, body, "apsides", lambda el=el: marks.apsides_m(el))
            for apsis_m, text in ((peri, "periapsis"), (apo, "apoapsis")):
                if apsis_m is None:
                    continue
                q, f = px_of(apsis_m)
                if f:
                    markers.add(q, APSIS_PX * hs, DIAMOND, _lighten(col, 0.2), fade.apsides)
                    obstacle(q, APSIS_PX * hs)
                    if scene.render.labels:
                        labels.append(LabelRequest(text, (float(q[0]), float(q[1])),
                                                   APSIS_PX * hs, SMALL_LABEL_PX * hs,
                                                   _rgba(_lighten(col, 0.4),
                                                         0.85 * fade.apsides), 40,
                                                   required=False))

    if scene.render.grid and scene.render.labels and grid_arcs:
        for _arc, r in grid_arcs[1:: max(2, len(grid_arcs) // 4)]:
            p = np.array([r, 0.0, 0.0])
            q, f = px_of(p)
            if f:
                labels.append(LabelRequest(_format_length(r, unit), (float(q[0]), float(q[1])),
                                           2.0 * hs, SMALL_LABEL_PX * hs,
                                           _rgba(_lighten(GRID_RGB, 0.2), 0.7), 50,
                                           required=False))

    grid_vertices, stroke_rows = yield grid_lines, lines, occluder
    stars = (star_points(starfield or make_starfield(), view, hs) if scene.render.stars
             else np.zeros((0, 7)))
    fills = (fill_vertices(view, np.concatenate(fill_tris), np.concatenate(fill_cols))
             if fill_tris else np.zeros((0, FILL_FLOATS)))
    return _StaticPart(
        grid=grid_vertices, fills=fills, glows=glows.array(), strokes=stroke_rows,
        markers=markers.array(), labels=labels, obstacles=obstacles, occluder=occluder,
        stars=stars, vector=VectorParts(grid_lines, lines, sector_rings))


def _sector_area_m2(body: Body, t0: float, t1: float) -> float:
    from ..orbit import swept_area

    return abs(float(swept_area(body.elements, t0 - body.epoch_offset_s,
                                t1 - body.epoch_offset_s)))


def _polygon_centroid(px: Floats) -> tuple[float, float]:
    x, y = px[:, 0], px[:, 1]
    cross = x[:-1] * y[1:] - x[1:] * y[:-1]
    a = 0.5 * float(np.sum(cross))
    if abs(a) < 1e-9:
        return float("nan"), float("nan")
    cx = float(np.sum((x[:-1] + x[1:]) * cross)) / (6.0 * a)
    cy = float(np.sum((y[:-1] + y[1:]) * cross)) / (6.0 * a)
    return cx, cy


def _reference_speed(scene: Scene) -> float:
    """The speed drawn at ARROW_MAX_PX: the fastest periapsis speed of the arrowed bodies."""
    speeds = [float(b.elements.speed_periapsis) for b in scene.bodies if b.show.velocity]
    return max(speeds) if speeds else 1.0


def _velocity_arrow(lines: PolylineBatch, arrows: _Marks, labels: list[LabelRequest],
                    view: View, r: Floats, v: Floats, mpp: float, v_ref: float, col: RGB,
                    hs: float, marker_r: float, with_label: bool, alpha: float = 1.0) -> None:
    """An arrow from the body along its velocity, length proportional to speed."""
    speed = float(np.linalg.norm(v))
    if speed <= 0:
        return
    length_px = ARROW_MAX_PX * hs * speed / v_ref
    tip_w = r + v / speed * (length_px * mpp)
    p = view.project(np.stack([r, tip_w]))
    if not np.all(p[1]):
        return
    a_px, b_px = p[0]
    d = b_px - a_px
    L = float(np.hypot(d[0], d[1]))
    head = 9.0 * hs
    if L < marker_r + head:
        return
    u = d / L
    start_f = marker_r / L
    end_f = (L - 0.8 * head) / L
    shaft = np.stack([r + (tip_w - r) * start_f, r + (tip_w - r) * end_f])
    colour = _lighten(col, 0.25)
    lines.add(shaft, StrokeStyle(_rgba(colour, alpha), 1.6))
    arrows.add(b_px - u * 0.5 * head, 0.5 * head, ARROWHEAD, colour, alpha,
               angle=float(math.atan2(u[1], u[0])))
    if with_label:
        labels.append(LabelRequest(label_speed(speed), (float(b_px[0]), float(b_px[1])),
                                   4.0 * hs, SMALL_LABEL_PX * hs,
                                   _rgba(_lighten(col, 0.5), alpha), 20))
