"""Conic arcs as parametric curves, and their adaptive tessellation for a given view.

Each conic is written in its own natural parameter u, so that a point costs no Kepler
solve (Vallado, *Fundamentals of Astrodynamics and Applications*, 4th ed., sec. 2.2):

    ellipse    u = E (eccentric anomaly)   x = a (cos E - e),      y = b sin E
    hyperbola  u = F (hyperbolic anomaly)  x = |a| (e - cosh F),   y = |a| sqrt(e^2-1) sinh F
    parabola   u = D = tan(nu / 2)         x = q (1 - D^2),        y = 2 q D

with x toward periapsis (P) and y along Q, the occupied focus at the origin. Written
generically as x = c1 f1(u) + c0, y = c2 f2(u).

``tessellate`` refines every curve of a batch at once, in one vectorised loop: an
interval is split while it can be seen and the midpoint of its arc lies more than
``tol_px`` (0.25 px) from its chord in the image. The image of a conic under a parallel or
central projection is again a conic (no inflections), so the midpoint deviation measures
the whole interval once the interval is small. Intervals that cannot be seen stay coarse,
which is what lets a 40 au orbit be drawn inside a field of 1e-4 au.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass
from typing import Any

import numpy as np
from numpy.typing import NDArray

from ..orbit import Elements, asymptote_true_anomaly
from ..orbit.anomaly import eccentric_from_true, hyperbolic_from_true
from .camera import View, intrinsics

Floats = NDArray[np.float64]
Ints = NDArray[np.int64]

ELLIPSE, HYPERBOLA, PARABOLA = 0, 1, 2

#: Deviation allowed between the drawn polyline and the true curve, pixels.
TOLERANCE_PX = 0.25
#: The split test uses the arc midpoint; this safety factor covers the small asymmetry
#: of the deviation inside an interval.
_SAFETY = 0.8
_START_INTERVALS = 16
_MAX_LEVELS = 48
_MAX_INTERVALS = 400_000


@dataclass(frozen=True)
class ConicShape:
    """One conic's constants: kind, x = c1 f1(u) + c0, y = c2 f2(u), in the plane (P, Q)."""

    kind: int
    c0: float
    c1: float
    c2: float
    P: Floats
    Q: Floats

    @classmethod
    def of(cls, el: Elements) -> ConicShape:
        e = float(el.e)
        P, Q, _ = el.perifocal_basis()
        P = np.asarray(P, dtype=np.float64)
        Q = np.asarray(Q, dtype=np.float64)
        if e < 1.0:
            a = float(el.a)
            return cls(ELLIPSE, -a * e, a, float(el.b), P, Q)
        if e > 1.0:
            A = abs(float(el.a))
            return cls(HYPERBOLA, A * e, -A, A * np.sqrt(e * e - 1.0), P, Q)
        q = float(el.periapsis)
        return cls(PARABOLA, q, -q, 2.0 * q, P, Q)

    def param_of_true(self, nu: float | Floats, e: float) -> Floats:
        """The curve parameter u of true anomaly nu (same turn for the ellipse)."""
        if self.kind == ELLIPSE:
            return np.asarray(eccentric_from_true(nu, e), dtype=np.float64)
        if self.kind == HYPERBOLA:
            return np.asarray(hyperbolic_from_true(nu, e), dtype=np.float64)
        return np.tan(np.asarray(nu, dtype=np.float64) / 2.0)

    def points(self, u: Floats) -> Floats:
        """Points (m, (..., 3)) at parameters u."""
        return _eval(np.full(np.shape(u), self.kind), np.full(np.shape(u), self.c0),
                     np.full(np.shape(u), self.c1), np.full(np.shape(u), self.c2),
                     np.broadcast_to(self.P, np.shape(u) + (3,)),
                     np.broadcast_to(self.Q, np.shape(u) + (3,)), np.asarray(u, float))


def open_limit_param(el: Elements, limit_radius_m: float) -> float:
    """The parameter where an open conic (e >= 1) reaches ``limit_radius_m`` from the focus.

    From r = |a| (e cosh F - 1) for the hyperbola and r = q (1 + D^2) for the parabola.
    A limit inside the periapsis gives 0 (just the periapsis point).
    """
    e = float(el.e)
    q = float(el.periapsis)
    r = max(limit_radius_m, q)
    if e > 1.0:
        A = abs(float(el.a))
        return float(np.arccosh((r / A + 1.0) / e))
    if e == 1.0:
        return float(np.sqrt(r / q - 1.0))
    raise ValueError("open_limit_param is for e >= 1")


def default_limit_radius_m(el: Elements) -> float:
    """A few periapsis radii: how far an open conic is drawn when the scene gives no limit.

    Kept below where the hyperbola's asymptote dominates, so the bend stays on screen.
    """
    return 6.0 * float(el.periapsis)


def whole_orbit_range(el: Elements, limit_radius_m: float | None) -> tuple[float, float, bool]:
    """(u0, u1, closed) for the whole drawable orbit: a full turn, or an open branch."""
    if float(el.e) < 1.0:
        return 0.0, 2.0 * np.pi, True
    lim = default_limit_radius_m(el) if limit_radius_m is None else limit_radius_m
    u = open_limit_param(el, lim)
    return -u, u, False


def max_true_anomaly(el: Elements) -> float:
    """The largest |nu| an open conic reaches (its asymptote); pi for an ellipse."""
    e = float(el.e)
    return float(np.pi) if e < 1.0 else float(asymptote_true_anomaly(e))


def _eval(kind: Ints, c0: Floats, c1: Floats, c2: Floats, P: Floats, Q: Floats,
          u: Floats) -> Floats:
    ell = kind == ELLIPSE
    if ell.all():  # the usual frame: the same values as the general form, fewer calls
        f1, f2 = np.cos(u), np.sin(u)
    else:
        hyp = kind == HYPERBOLA
        f1 = np.where(ell, np.cos(u), np.where(hyp, np.cosh(np.where(hyp, u, 0.0)), u * u))
        f2 = np.where(ell, np.sin(u), np.where(hyp, np.sinh(np.where(hyp, u, 0.0)), u))
    x = c1 * f1 + c0
    y = c2 * f2
    return x[..., None] * P + y[..., None] * Q


@dataclass
class CurveBatch:
    """Many arcs to tessellate together: one row per arc (shape, parameter range)."""

    kind: list[int]
    c0: list[float]
    c1: list[float]
    c2: list[float]
    P: list[Floats]
    Q: list[Floats]
    u0: list[float]
    u1: list[float]
    tol_px: list[float]

    @classmethod
    def empty(cls) -> CurveBatch:
        return cls([], [], [], [], [], [], [], [], [])

    def add(self, shape: ConicShape, u0: float, u1: float, tol_px: float = TOLERANCE_PX) -> int:
        """Add the arc u0 -> u1 of ``shape``; returns its index in the batch."""
        self.kind.append(shape.kind)
        self.c0.append(shape.c0)
        self.c1.append(shape.c1)
        self.c2.append(shape.c2)
        self.P.append(shape.P)
        self.Q.append(shape.Q)
        self.u0.append(float(u0))
        self.u1.append(float(u1))
        self.tol_px.append(float(tol_px))
        return len(self.kind) - 1

    def __len__(self) -> int:
        return len(self.kind)


@dataclass(frozen=True)
class Tessellation:
    """Parameters and points of every arc: arc k is ``points[starts[k]:starts[k+1]]``."""

    u: Floats
    points_m: Floats
    starts: Ints

    def arc(self, k: int) -> Floats:
        return self.points_m[self.starts[k]:self.starts[k + 1]]

    def arc_params(self, k: int) -> Floats:
        return self.u[self.starts[k]:self.starts[k + 1]]


def _visible(view: View, ca: Floats, cb: Floats, cm: Floats,
             margin_px: float) -> NDArray[np.bool_]:
    """Whether an interval's arc may touch the (margin-expanded) image, in camera space.

    A sphere around the chord midpoint holding the whole arc is tested against the
    view's box (orthographic) or frustum (perspective).
    """
    centre = 0.5 * (ca + cb)
    half = 0.5 * np.linalg.norm(cb - ca, axis=-1)
    bulge = np.linalg.norm(cm - centre, axis=-1)
    radius = half + 2.0 * bulge
    w, h = view.size_px
    if not view.perspective:
        mpp = 1.0 / view.px_per_m
        hx = 0.5 * w * mpp + margin_px * mpp + radius
        hy = 0.5 * h * mpp + margin_px * mpp + radius
        return (np.abs(centre[:, 0]) <= hx) & (np.abs(centre[:, 1]) <= hy)
    f = view.focal_px
    ok = centre[:, 2] - radius < -view.near_m
    # Side planes through the eye: x * f - (-z) * (w/2 + margin) <= 0, normalised.
    for axis, half_px in ((0, 0.5 * w + margin_px), (1, 0.5 * h + margin_px)):
        norm = np.hypot(f, half_px)
        for sign in (1.0, -1.0):
            dist = (sign * centre[:, axis] * f + centre[:, 2] * half_px) / norm
            ok &= dist <= radius
    return ok


def _deviation_px(view: View, ca: Floats, cb: Floats, cm: Floats
                  ) -> tuple[Floats, NDArray[np.bool_]]:
    """(distance of the arc midpoint from the chord in pixels, all three points in front)."""
    front = view.in_front(ca) & view.in_front(cb) & view.in_front(cm)
    pa = view.camera_to_px(np.where(front[:, None], ca, [0.0, 0.0, -1.0]))
    pb = view.camera_to_px(np.where(front[:, None], cb, [0.0, 0.0, -1.0]))
    pm = view.camera_to_px(np.where(front[:, None], cm, [0.0, 0.0, -1.0]))
    d = pb - pa
    L2 = np.einsum("ij,ij->i", d, d)
    rel = pm - pa
    t = np.clip(np.einsum("ij,ij->i", rel, d) / np.where(L2 > 0, L2, 1.0), 0.0, 1.0)
    off = rel - t[:, None] * d
    return np.sqrt(np.einsum("ij,ij->i", off, off)), front


def tessellate(batch: CurveBatch, view: View, margin_px: float = 16.0) -> Tessellation:
    """Adaptive polylines for every arc of ``batch``, within its ``tol_px`` where visible.

    Returns parameters and world points (m, float64) of each arc, ends included.
    """
    return tessellate_views([batch], [view], margin_px)[0]


def tessellate_views(batches: Sequence[CurveBatch], views: Sequence[View],
                     margin_px: float = 16.0) -> list[Tessellation]:
    """``tessellate(batches[i], views[i])`` for every i, refined in one loop when the
    views share their intrinsics (the faces of a dome master): the same numpy calls
    serve all of them. Each view's points go through its own ``to_camera`` on the rows it
    would have alone, in the same order, and everything else is row by row, so each
    result is bit-identical to tessellating it on its own."""
    if len({intrinsics(v) for v in views}) > 1:
        return [tessellate_views([b], [v], margin_px)[0] for b, v in zip(batches, views,
                                                                          strict=True)]
    sizes = [len(b) for b in batches]
    n = sum(sizes)
    if n == 0:
        return [Tessellation(np.zeros(0), np.zeros((0, 3)), np.zeros(1, dtype=np.int64))
                for _ in batches]
    view = views[0]
    face_of = np.repeat(np.arange(len(batches)), sizes)  # each curve's view
    filled = [b for b in batches if len(b)]

    def column(name: str, dtype: type = np.float64) -> Any:
        return np.concatenate([np.asarray(getattr(b, name), dtype=dtype) for b in filled])

    kind = column("kind", np.int64)
    c0, c1, c2, P, Q, u0, u1 = (column(k) for k in ("c0", "c1", "c2", "P", "Q", "u0", "u1"))
    tol = column("tol_px") * _SAFETY

    def cam_at(cid: Ints, u: Floats, rows: list[Ints]) -> Floats:
        """Camera coordinates of the curves ``cid`` at ``u``; ``rows``: each view's rows."""
        world = _eval(kind[cid], c0[cid], c1[cid], c2[cid], P[cid], Q[cid], u)
        if len(views) == 1:
            return view.to_camera(world)
        cam = np.empty_like(world)
        for v, mine in zip(views, rows, strict=True):
            if mine.size:
                cam[mine] = v.to_camera(world[mine])
        return cam

    k = np.arange(_START_INTERVALS)
    cid = np.repeat(np.arange(n), _START_INTERVALS)
    frac = np.tile(k, n) / _START_INTERVALS
    span = (u1 - u0)[cid]
    a = u0[cid] + frac * span
    b = u0[cid] + (np.tile(k, n) + 1) / _START_INTERVALS * span
    b = np.where(np.tile(k, n) == _START_INTERVALS - 1, u1[cid], b)
    done_c: list[Ints] = []
    done_a: list[Floats] = []
    for _level in range(_MAX_LEVELS):
        m = 0.5 * (a + b)
        face = face_of[cid]
        rows = [np.flatnonzero(face == f) for f in range(len(views))] if len(views) > 1 \
            else []
        ca, cb, cm = cam_at(cid, a, rows), cam_at(cid, b, rows), cam_at(cid, m, rows)
        vis = _visible(view, ca, cb, cm, margin_px)
        dev, front = _deviation_px(view, ca, cb, cm)
        split = vis & (~front | (dev > tol[cid]))
        # Each view on its own stops splitting where it would hold too many intervals.
        over = (np.bincount(face, minlength=len(views))
                + np.bincount(face[split], minlength=len(views))) > _MAX_INTERVALS
        if np.any(over):
            split &= ~over[face]
        keep = ~split
        done_c.append(cid[keep])
        done_a.append(a[keep])
        if not np.any(split):
            break
        cs, as_, bs, ms = cid[split], a[split], b[split], m[split]
        cid = np.concatenate([cs, cs])
        a = np.concatenate([as_, ms])
        b = np.concatenate([ms, bs])
    else:
        done_c.append(cid)
        done_a.append(a)
    all_c = np.concatenate(done_c + [np.arange(n)])
    all_u = np.concatenate(done_a + [u1])
    order = np.lexsort((all_u, all_c))  # curves are numbered view by view
    all_c = all_c[order]
    all_u = all_u[order]
    counts = np.bincount(all_c, minlength=n)
    starts = np.concatenate([[0], np.cumsum(counts)]).astype(np.int64)
    pts = _eval(kind[all_c], c0[all_c], c1[all_c], c2[all_c], P[all_c], Q[all_c], all_u)
    out = []
    first = 0
    for size in sizes:
        lo, hi = starts[first], starts[first + size]
        out.append(Tessellation(all_u[lo:hi], pts[lo:hi], starts[first:first + size + 1] - lo))
        first += size
    return out
