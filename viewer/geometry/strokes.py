"""Polylines in the world to thick, anti-aliased line quads in image pixels.

The renderer draws lines as screen-space quads and sets each fragment's alpha from its
distance to the line (no wide lines, no MSAA). Everything that needs care is done here,
in float64, and tested without GL:

* perspective views clip segments at the near plane in camera space before projecting;
* segments are clipped to the image (plus a margin) so no vertex is huge in float32;
* joined segments meet on a mitre (the bisector), so a translucent line never overlaps
  itself and the across-line distance is an exact affine function on every quad;
  open ends, clipped ends and corners sharper than the mitre limit get butt caps;
* an ``offset`` shifts a stroke sideways by its half-width, so the edge of a filled
  shape can lie wholly inside it (the sector rule of scene-format.md).

Vertex layout (one row per vertex, 6 vertices per segment as two triangles):
x, y (px), across (px from the centre line), along (px along the polyline), cap_lo,
cap_hi (along-positions of open ends, or +-1e9), half_width (px), dash_on, dash_off (px),
then r, g, b, a (straight alpha, 0..1).
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np
from numpy.typing import NDArray

from .camera import View, intrinsics

Floats = NDArray[np.float64]
Ints = NDArray[np.int64]
Bools = NDArray[np.bool_]

#: Floats per stroke vertex (see the module docstring).
STROKE_FLOATS = 13
#: Anti-aliasing margin around every quad, px.
AA_PX = 1.0
#: A join whose mitre would be longer than this many half-widths gets caps instead.
MITRE_LIMIT = 4.0
_FAR = 1e9


@dataclass(frozen=True)
class StrokeStyle:
    """How a polyline is stroked: colour (sRGB + alpha), width (px), dashes, side offset.

    ``offset`` is -1, 0 or +1: the stroke's centre line sits half a width to the left
    (+1) or right (-1) of the polyline in the image (y down), or on it (0).
    """

    rgba: tuple[float, float, float, float]
    width_px: float
    dash_px: tuple[float, float] | None = None
    offset: float = 0.0


@dataclass
class PolylineBatch:
    """World polylines (m) to stroke together; polyline k is points[starts[k]:starts[k+1]].

    ``closed[k]`` joins the last segment to the first (the last point must equal the
    first, as a tessellated full ellipse does).
    """

    points: list[Floats]
    closed: list[bool]
    styles: list[StrokeStyle]

    @classmethod
    def empty(cls) -> PolylineBatch:
        return cls([], [], [])

    def add(self, points_m: Floats, style: StrokeStyle, closed: bool = False) -> None:
        pts = np.asarray(points_m, dtype=np.float64).reshape(-1, 3)
        if len(pts) >= 2:
            self.points.append(pts)
            self.closed.append(bool(closed))
            self.styles.append(style)


def _clip_near(c0: Floats, c1: Floats, near: float) -> tuple[Floats, Floats, Bools, Bools,
                                                                  Bools]:
    """Clip camera-space segments to z <= -near: (c0', c1', kept, start cut, end cut)."""
    z0 = c0[:, 2] + near
    z1 = c1[:, 2] + near
    in0 = z0 < 0
    in1 = z1 < 0
    kept = in0 | in1
    denom = np.where(z0 != z1, z0 - z1, 1.0)
    t = np.clip(z0 / denom, 0.0, 1.0)
    hit = c0 + t[:, None] * (c1 - c0)
    hit[:, 2] = -near * (1.0 + 1e-9)
    a = np.where((~in0 & kept)[:, None], hit, c0)
    b = np.where((~in1 & kept)[:, None], hit, c1)
    return a, b, kept, ~in0 & kept, ~in1 & kept


def _clip_rect(p0: Floats, p1: Floats, lo: Floats, hi: Floats) -> tuple[Floats, Floats]:
    """Liang-Barsky: the parameter range [t0, t1] of each segment inside the box (its
    corners ``lo`` and ``hi``, one for all segments or one row per segment)."""
    d = p1 - p0
    t0 = np.zeros(len(p0))
    t1 = np.ones(len(p0))
    for axis in (0, 1):
        dd = d[:, axis]
        par = np.abs(dd) < 1e-300
        safe = np.where(par, 1.0, dd)
        ta = (lo[..., axis] - p0[:, axis]) / safe
        tb = (hi[..., axis] - p0[:, axis]) / safe
        tmin = np.minimum(ta, tb)
        tmax = np.maximum(ta, tb)
        outside = par & ((p0[:, axis] < lo[..., axis]) | (p0[:, axis] > hi[..., axis]))
        t0 = np.where(par, t0, np.maximum(t0, tmin))
        t1 = np.where(par, t1, np.minimum(t1, tmax))
        t1 = np.where(outside, -1.0, t1)
    return t0, t1


def hidden_by_sphere(view: View, cam: Floats, centre_cam: Floats, radius_m: float) -> Bools:
    """Camera-space points the sphere (centre in camera space, radius m) hides from the eye.

    Orthographic: inside the sphere's silhouette and behind its front surface.
    Perspective: the sight line from the eye (the camera origin) meets the sphere first.
    """
    rel = cam - centre_cam
    if not view.perspective:
        rho2 = rel[..., 0] ** 2 + rel[..., 1] ** 2
        inside = rho2 < radius_m * radius_m
        front = np.sqrt(np.maximum(radius_m * radius_m - rho2, 0.0))
        return inside & (rel[..., 2] < front)
    a = np.einsum("...i,...i->...", cam, cam)
    b = np.einsum("...i,...i->...", cam, centre_cam)
    cc = float(centre_cam @ centre_cam) - radius_m * radius_m
    disc = b * b - a * cc
    root = np.sqrt(np.maximum(disc, 0.0))
    return (disc > 0) & (b - root < a) & (b + root > 0)


def _clip_occluded(view: View, c0: Floats, c1: Floats, kept: Bools, cut0: Bools, cut1: Bools,
                   occluder: tuple[Floats, float]) -> None:
    """Shorten (in place) segments that pass behind the occluding sphere; drop hidden ones.

    The crossing is found by bisection on the hidden test along each segment (16 steps,
    1.5e-5 of a segment: far below a pixel), so it works the same for both projections.
    """
    centre = view.to_camera(np.asarray(occluder[0], dtype=np.float64).reshape(1, 3))[0]
    radius = float(occluder[1])
    h0 = hidden_by_sphere(view, c0, centre, radius)
    h1 = hidden_by_sphere(view, c1, centre, radius)
    kept &= ~(h0 & h1)
    for hid_end, vis_pt, hid_pt, cut in ((h1 & ~h0, c0, c1, cut1), (h0 & ~h1, c1, c0, cut0)):
        sel = np.flatnonzero(hid_end & kept)
        if sel.size == 0:
            continue
        lo = np.zeros(sel.size)  # visible side
        hi = np.ones(sel.size)   # hidden side
        a, b = vis_pt[sel], hid_pt[sel]
        for _ in range(16):
            mid = 0.5 * (lo + hi)
            hm = hidden_by_sphere(view, a + mid[:, None] * (b - a), centre, radius)
            hi = np.where(hm, mid, hi)
            lo = np.where(hm, lo, mid)
        hid_pt[sel] = a + lo[:, None] * (b - a)
        cut[sel] = True


_PROBES = 16


def _passes_near(view: View, a: Floats, b: Floats, centre: Floats, radius: float) -> Bools:
    """Camera-space segments a->b whose sight lines come within ``radius`` of the centre
    (a cheap, conservative test: only these can hide their middle behind the sphere)."""
    if view.perspective:
        front = view.in_front(a) & view.in_front(b)
        pa = view.camera_to_px(np.where(front[:, None], a, [0.0, 0.0, -1.0]))
        pb = view.camera_to_px(np.where(front[:, None], b, [0.0, 0.0, -1.0]))
        depth = max(-float(centre[2]), view.near_m)
        c2 = view.camera_to_px(np.array([[centre[0], centre[1], -depth]]))[0]
        r = radius * view.focal_px / max(depth - radius, view.near_m) + 1.0
    else:
        front = np.ones(len(a), dtype=bool)
        pa, pb, c2, r = a[:, :2], b[:, :2], centre[:2], radius
    d = pb - pa
    L2 = np.einsum("ij,ij->i", d, d)
    t = np.clip(np.einsum("ij,ij->i", c2 - pa, d) / np.where(L2 > 0, L2, 1.0), 0.0, 1.0)
    off = pa + t[:, None] * d - c2
    return ~front | (np.einsum("ij,ij->i", off, off) < r * r)


def _split_around_occluder(view: View, batch: PolylineBatch,
                           occluder: tuple[Floats, float]) -> PolylineBatch:
    """A batch whose segments never hide their middle: a segment that passes behind the
    sphere with both ends in view (a straight axis across a planet) is cut into
    ``_PROBES`` pieces, so the end-point clipping below finds both limbs."""
    centre = view.to_camera(np.asarray(occluder[0], dtype=np.float64).reshape(1, 3))[0]
    radius = float(occluder[1])
    s = (np.arange(1, _PROBES) / _PROBES)[None, :, None]
    counts = np.array([len(p) for p in batch.points])
    starts = np.concatenate([[0], np.cumsum(counts)])
    allp = np.concatenate(batch.points)
    cam = view.to_camera(allp)
    near = _passes_near(view, cam[:-1], cam[1:], centre, radius)
    near[starts[1:-1] - 1] = False  # no segment joins one polyline to the next
    cand = np.flatnonzero(near)
    if cand.size == 0:
        return batch
    a, b = allp[cand], allp[cand + 1]
    probes = a[:, None, :] + (b - a)[:, None, :] * s
    hid = hidden_by_sphere(view, view.to_camera(probes), centre, radius).any(axis=1)
    split_at = cand[hid]
    split_probes = probes[hid]
    if split_at.size == 0:
        return batch
    line_of = np.searchsorted(starts, split_at, side="right") - 1
    points: list[Floats] = []
    for k, pts in enumerate(batch.points):
        mine = np.flatnonzero(line_of == k)
        if mine.size == 0:
            points.append(pts)
            continue
        pieces = []
        last = 0
        for j in mine:
            seg = int(split_at[j] - starts[k])
            pieces.append(pts[last:seg + 1])
            pieces.append(split_probes[j])
            last = seg + 1
        pieces.append(pts[last:])
        points.append(np.concatenate(pieces))
    return PolylineBatch(points, list(batch.closed), list(batch.styles))


def stroke_vertices(batch: PolylineBatch, view: View, margin_px: float = 8.0,
                    height_scale: float = 1.0,
                    occluder: tuple[Floats, float] | None = None) -> Floats:
    """All polylines of ``batch`` as stroke vertices (rows of STROKE_FLOATS, float64).

    ``height_scale`` multiplies every style's width (widths are given at 1080 px height).
    ``occluder`` (centre m, radius m) is a sphere that hides what passes behind it (the
    central body as drawn).
    """
    return stroke_vertices_views([batch], [view], margin_px, height_scale, [occluder])[0]


def stroke_vertices_views(batches: Sequence[PolylineBatch], views: Sequence[View],
                          margin_px: float = 8.0, height_scale: float = 1.0,
                          occluders: Sequence[tuple[Floats, float] | None] | None = None
                          ) -> list[Floats]:
    """``stroke_vertices(batches[i], views[i], occluder=occluders[i])`` for every i, in
    one pass when the views share their intrinsics (the faces of a dome master). Each
    view's points go through its own ``to_camera``, its along-line distances are summed
    on their own, and the rest is row by row, so each result is bit-identical to the
    view's own call."""
    occ = list(occluders) if occluders is not None else [None] * len(views)
    if len({intrinsics(v) for v in views}) > 1:
        return [stroke_vertices_views([b], [v], margin_px, height_scale, [o])[0]
                for b, v, o in zip(batches, views, occ, strict=True)]
    empty = np.zeros((0, STROKE_FLOATS))
    batches = [_split_around_occluder(v, b, o) if o is not None and b.points else b
               for b, v, o in zip(batches, views, occ, strict=True)]
    faces = [f for f, b in enumerate(batches) if b.points]
    if not faces:
        return [empty for _ in batches]
    views = [views[f] for f in faces]
    occ = [occ[f] for f in faces]
    lines_per = [len(batches[f].points) for f in faces]
    view = views[0]
    points = [p for f in faces for p in batches[f].points]
    styles = [st for f in faces for st in batches[f].styles]
    closed = np.asarray([c for f in faces for c in batches[f].closed])
    counts = np.array([len(p) for p in points])
    pts = np.concatenate(points)
    starts = np.concatenate([[0], np.cumsum(counts)])
    nline = len(counts)
    # Segments i -> i+1 inside each polyline; lines, points and segments run view by view.
    seg_line = np.repeat(np.arange(nline), counts - 1)
    first_seg = np.concatenate([[0], np.cumsum(counts - 1)])[:-1]
    local = np.arange(len(seg_line)) - first_seg[seg_line]
    i0 = starts[seg_line] + local
    line_at = np.concatenate([[0], np.cumsum(lines_per)])
    seg_at = np.concatenate([first_seg, [len(seg_line)]])[line_at]
    pt_at = starts[line_at]
    cam = np.concatenate([v.to_camera(pts[pt_at[f]:pt_at[f + 1]])
                          for f, v in enumerate(views)]) if len(views) > 1 \
        else view.to_camera(pts)
    c0, c1 = cam[i0], cam[i0 + 1]
    nseg = len(i0)
    cut0 = np.zeros(nseg, dtype=bool)
    cut1 = np.zeros(nseg, dtype=bool)
    kept = np.ones(nseg, dtype=bool)
    if view.perspective:
        c0, c1, kept, cut0, cut1 = _clip_near(c0, c1, view.near_m)
    p0 = view.camera_to_px(np.where(kept[:, None], c0, [0.0, 0.0, -1.0]))
    p1 = view.camera_to_px(np.where(kept[:, None], c1, [0.0, 0.0, -1.0]))
    # Along-line distance from each polyline's start (before any other clipping, so
    # that dashes run on across a gap), summed view by view.
    seg_len = np.where(kept, np.linalg.norm(p1 - p0, axis=1), 0.0)
    along0 = np.empty(nseg)
    for f in range(len(views)):
        s0, s1 = seg_at[f], seg_at[f + 1]
        cum = np.cumsum(seg_len[s0:s1])
        base = np.concatenate([[0.0], cum])[first_seg[line_at[f]:line_at[f + 1]] - s0]
        along0[s0:s1] = cum - seg_len[s0:s1] - base[seg_line[s0:s1] - line_at[f]]
    if any(o is not None for o in occ):
        c0, c1 = c0.copy(), c1.copy()
        for f, (v, o) in enumerate(zip(views, occ, strict=True)):
            if o is not None:
                part = slice(seg_at[f], seg_at[f + 1])
                _clip_occluded(v, c0[part], c1[part], kept[part], cut0[part], cut1[part], o)
        n0 = view.camera_to_px(np.where(kept[:, None], c0, [0.0, 0.0, -1.0]))
        n1 = view.camera_to_px(np.where(kept[:, None], c1, [0.0, 0.0, -1.0]))
        along0 = along0 + np.linalg.norm(n0 - p0, axis=1)
        p0, p1 = n0, n1
        seg_len = np.where(kept, np.linalg.norm(p1 - p0, axis=1), 0.0)
    # Clip to the image plus a margin that holds the widest stroke.
    hw_line = np.array([0.5 * s.width_px * height_scale for s in styles])
    w, h = view.size_px
    m = np.repeat([margin_px + 2.0 * float(hw_line[line_at[f]:line_at[f + 1]].max()) + 2.0
                   for f in range(len(views))], np.diff(seg_at))[:, None]
    t0, t1 = _clip_rect(p0, p1, np.broadcast_to(-m, (nseg, 2)), np.array([w, h]) + m)
    kept &= t1 > t0
    d = p1 - p0
    q0 = p0 + t0[:, None] * d
    q1 = p0 + t1[:, None] * d
    cut0 |= t0 > 0
    cut1 |= t1 < 1
    a0 = along0 + t0 * seg_len
    a1 = along0 + t1 * seg_len
    L = np.linalg.norm(q1 - q0, axis=1)
    kept &= L > 1e-6
    # Neighbours: previous/next segment of the same polyline (wrapping when closed).
    last_local = counts[seg_line] - 2
    prev = i_prev = np.arange(nseg) - 1
    i_next = np.arange(nseg) + 1
    wrap = closed[seg_line]
    i_prev = np.where(local == 0, np.where(wrap, first_seg[seg_line] + last_local, -1), prev)
    i_next = np.where(local == last_local, np.where(wrap, first_seg[seg_line], -1), i_next)
    has_prev = (i_prev >= 0) & kept & ~cut0
    has_prev &= np.where(i_prev >= 0, kept[np.maximum(i_prev, 0)] & ~cut1[np.maximum(i_prev, 0)],
                         False)
    has_next = (i_next >= 0) & kept & ~cut1
    has_next &= np.where(i_next >= 0, kept[np.maximum(i_next, 0)] & ~cut0[np.maximum(i_next, 0)],
                         False)
    tdir = (q1 - q0) / np.where(L > 0, L, 1.0)[:, None]
    nrm = np.stack([tdir[:, 1], -tdir[:, 0]], axis=1)  # left of the direction in a y-down image
    n_prev = nrm[np.maximum(i_prev, 0)]
    n_next = nrm[np.maximum(i_next, 0)]
    hw = hw_line[seg_line]
    # Mitres: m = (n_a + n_b) / (1 + n_a . n_b), so that m . n = 1 on both segments.
    dp = 1.0 + np.einsum("ij,ij->i", n_prev, nrm)
    dn = 1.0 + np.einsum("ij,ij->i", n_next, nrm)
    limit = 2.0 / (MITRE_LIMIT * MITRE_LIMIT)
    has_prev &= dp > limit
    has_next &= dn > limit
    # A join needs both sides to agree; recompute the partner's view of it.
    ok_prev = np.zeros(nseg, dtype=bool)
    ok_prev[has_prev] = True
    ok_next = np.zeros(nseg, dtype=bool)
    ok_next[has_next] = True
    has_prev &= np.where(i_prev >= 0, ok_next[np.maximum(i_prev, 0)], False)
    has_next &= np.where(i_next >= 0, ok_prev[np.maximum(i_next, 0)], False)
    m0 = np.where(has_prev[:, None], (n_prev + nrm) / np.where(has_prev, dp, 1.0)[:, None], nrm)
    m1 = np.where(has_next[:, None], (n_next + nrm) / np.where(has_next, dn, 1.0)[:, None], nrm)
    thin = hw < 0.5
    hw_eff = np.maximum(hw, 0.5)
    e = hw_eff + AA_PX
    off = np.array([s.offset for s in styles])[seg_line] * hw_eff
    cap0 = ~has_prev
    cap1 = ~has_next
    ext0 = np.where(cap0, AA_PX, 0.0)
    ext1 = np.where(cap1, AA_PX, 0.0)
    base0 = q0 - tdir * ext0[:, None] + m0 * off[:, None]
    base1 = q1 + tdir * ext1[:, None] + m1 * off[:, None]
    corners = np.stack([base0 + m0 * e[:, None], base0 - m0 * e[:, None],
                        base1 + m1 * e[:, None], base1 - m1 * e[:, None]], axis=1)
    across = np.stack([e, -e, e, -e], axis=1)
    # along = a0 + (corner - q0) . t : exact on each quad.
    rel = corners - q0[:, None, :]
    along = a0[:, None] + np.einsum("ikj,ij->ik", rel, tdir)
    cap_lo = np.where(cap0, a0, -_FAR)
    cap_hi = np.where(cap1, a1, _FAR)
    rgba = np.array([s.rgba for s in styles], dtype=np.float64)[seg_line]
    rgba[:, 3] *= np.where(thin, 2.0 * hw, 1.0)
    dash = np.array([s.dash_px if s.dash_px else (0.0, 0.0) for s in styles])[seg_line]
    dash *= height_scale
    sel = np.flatnonzero(kept)
    order = np.array([0, 1, 2, 2, 1, 3])
    nk = len(sel)
    out = np.empty((nk, 6, STROKE_FLOATS))
    out[:, :, 0:2] = corners[sel][:, order]
    out[:, :, 2] = across[sel][:, order]
    out[:, :, 3] = along[sel][:, order]
    out[:, :, 4] = cap_lo[sel, None]
    out[:, :, 5] = cap_hi[sel, None]
    out[:, :, 6] = hw_eff[sel, None]
    out[:, :, 7:9] = dash[sel][:, None, :]
    out[:, :, 9:13] = rgba[sel][:, None, :]
    rows = out.reshape(-1, STROKE_FLOATS)
    made = [empty for _ in batches]
    ends = np.searchsorted(sel, seg_at) * 6  # each view's rows, in view order
    for f, face in enumerate(faces):
        made[face] = rows[ends[f]:ends[f + 1]]
    return made


def stroke_coverage(across_px: Floats, along_px: Floats, half_width_px: float,
                    cap_lo: float = -_FAR, cap_hi: float = _FAR) -> Floats:
    """The alpha the stroke shader gives a fragment (a reference for tests, same formula).

    A one-pixel box filter: coverage = clamp(hw + 0.5 - |across|) times the same at the caps.
    """
    c = np.clip(half_width_px + 0.5 - np.abs(across_px), 0.0, 1.0)
    c *= np.clip(0.5 + along_px - cap_lo, 0.0, 1.0) * np.clip(0.5 + cap_hi - along_px, 0.0, 1.0)
    return c
