"""Adaptive tessellation: every vertex on the conic, the polyline within 0.25 px of it.

The reference is the conic itself: r = p / (1 + e cos nu) from the occupied focus
(Vallado, 4th ed., eq. 2-35), sampled densely between the vertices and projected with
the same view.
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from reference_values import DEG

from viewer.geometry.camera import view_for
from viewer.geometry.conic import (
    TOLERANCE_PX,
    ConicShape,
    CurveBatch,
    open_limit_param,
    tessellate,
    whole_orbit_range,
)
from viewer.orbit import AU_M, Elements, state_from_elements
from viewer.render.samples import GM_SUN, elements, plain_scene
from viewer.scene import Body, Camera

ORBITS = {
    "ellipse": elements(1.0, 0.6, 20, 30, 40),
    "circle": elements(1.5, 0.0, 5, 10, 0),
    "near-parabolic ellipse": elements(3.0, 0.97, 0, 0, 120),
    "hyperbola": Elements.from_periapsis(0.8 * AU_M, 1.8, 10 * DEG, 50 * DEG, 20 * DEG,
                                         mu=GM_SUN),
    "parabola": Elements.from_periapsis(0.5 * AU_M, 1.0, 0.0, 0.0, 200 * DEG, mu=GM_SUN),
}

CAMERAS = {
    "top, whole system": Camera(look="top", width_m=8 * AU_M),
    "top, zoomed": None,  # made per orbit: a 0.3 au field centred on the orbit
    "oblique orthographic": Camera(look="angles", elevation_rad=0.3, azimuth_rad=2.0,
                                   width_m=5 * AU_M),
    "perspective": Camera(projection="perspective", look="angles", elevation_rad=0.5,
                          azimuth_rad=-0.7, distance_m=4 * AU_M, fov_rad=50 * DEG),
}


def _tessellate(el: Elements, camera: Camera, size=(1920, 1080)):
    view = view_for(plain_scene((Body("B", el),), camera, size), 0.0)
    shape = ConicShape.of(el)
    limit = 5 * AU_M
    u0, u1, _closed = whole_orbit_range(el, limit)
    batch = CurveBatch.empty()
    batch.add(shape, u0, u1)
    return view, shape, tessellate(batch, view)


def _max_visible_deviation_px(view, shape, u):
    """Largest distance (px) of the true curve from the drawn chords, where it is on screen."""
    s = np.linspace(0.0, 1.0, 17)[1:-1]
    ua, ub = u[:-1], u[1:]
    dense = ua[:, None] + (ub - ua)[:, None] * s[None, :]
    pa, fa = view.project(shape.points(ua))
    pb, fb = view.project(shape.points(ub))
    pd, fd = view.project(shape.points(dense))
    w, h = view.size_px
    on = (fd & fa[:, None] & fb[:, None] & (pd[..., 0] >= 0) & (pd[..., 0] <= w)
          & (pd[..., 1] >= 0) & (pd[..., 1] <= h))
    d = (pb - pa)[:, None, :]
    rel = pd - pa[:, None, :]
    L2 = np.maximum(np.sum(d * d, axis=-1), 1e-300)
    t = np.clip(np.sum(rel * d, axis=-1) / L2, 0, 1)
    off = rel - t[..., None] * d
    dist = np.sqrt(np.sum(off * off, axis=-1))
    assert on.any(), "the test view should see part of the curve"
    return float(dist[on].max())


@pytest.mark.parametrize("camera", list(CAMERAS))
@pytest.mark.parametrize("orbit", list(ORBITS))
def test_polyline_stays_within_a_quarter_pixel_of_the_true_conic(orbit, camera):
    el = ORBITS[orbit]
    cam = CAMERAS[camera]
    if cam is None:
        r, _ = state_from_elements(el.with_(nu=0.5))
        cam = Camera(look="top", width_m=0.3 * AU_M, target=tuple(float(x) for x in r))
    view, shape, tess = _tessellate(el, cam)
    assert _max_visible_deviation_px(view, shape, tess.arc_params(0)) <= TOLERANCE_PX


@pytest.mark.parametrize("orbit", list(ORBITS))
def test_every_vertex_lies_on_the_conic(orbit):
    el = ORBITS[orbit]
    _view, _shape, tess = _tessellate(el, CAMERAS["top, whole system"])
    pts = tess.arc(0)
    P, Q, W = (np.asarray(v) for v in el.perifocal_basis())
    assert np.allclose(pts @ W, 0.0, atol=1e-6 * float(el.periapsis))  # in the orbit plane
    x, y = pts @ P, pts @ Q
    r = np.hypot(x, y)
    nu = np.arctan2(y, x)
    expected = float(el.p) / (1.0 + float(el.e) * np.cos(nu))
    assert np.allclose(r, expected, rtol=1e-12)


def test_a_closed_ellipse_starts_and_ends_at_periapsis():
    el = ORBITS["ellipse"]
    _view, _shape, tess = _tessellate(el, CAMERAS["top, whole system"])
    pts = tess.arc(0)
    peri = float(el.periapsis) * np.asarray(el.perifocal_basis()[0])
    assert np.allclose(pts[0], peri) and np.allclose(pts[-1], peri, atol=1e-3)


@pytest.mark.parametrize("orbit", ["hyperbola", "parabola"])
def test_open_conics_are_drawn_out_to_the_limit_radius(orbit):
    el = ORBITS[orbit]
    _view, _shape, tess = _tessellate(el, CAMERAS["top, whole system"])
    pts = tess.arc(0)
    r = np.linalg.norm(pts, axis=1)
    assert np.isclose(r[0], 5 * AU_M, rtol=1e-9) and np.isclose(r[-1], 5 * AU_M, rtol=1e-9)
    assert np.isclose(r.min(), float(el.periapsis), rtol=1e-3)


def test_the_limit_parameter_inverts_the_radius():
    el = ORBITS["hyperbola"]
    u = open_limit_param(el, 3 * AU_M)
    r = float(np.linalg.norm(ConicShape.of(el).points(np.array([u]))[0]))
    assert math.isclose(r, 3 * AU_M, rel_tol=1e-12)


def test_a_40_au_orbit_seen_in_a_1e_minus_4_au_field_is_exact_where_seen_and_small():
    # The body's neighbourhood: the field is 2.5e-6 of the orbit's size.
    el = elements(40.0, 0.25, 3, 70, 20, 130)
    r, _ = state_from_elements(el)
    cam = Camera(look="top", width_m=1e-4 * AU_M, target=tuple(float(x) for x in r))
    view, shape, tess = _tessellate(el, cam)
    u = tess.arc_params(0)
    assert len(u) < 3000  # only the visible part is refined
    assert _max_visible_deviation_px(view, shape, u) <= TOLERANCE_PX


def test_tessellation_is_a_pure_function_of_the_view():
    el = ORBITS["ellipse"]
    a = _tessellate(el, CAMERAS["perspective"])[2]
    b = _tessellate(el, CAMERAS["perspective"])[2]
    assert np.array_equal(a.points_m, b.points_m)


def test_finer_zoom_needs_more_vertices_about_as_the_square_root_of_the_scale():
    # Chord sagitta ~ L^2 kappa / 8: a fixed pixel tolerance at k times the scale needs
    # about sqrt(k) times the vertices (common practice, no source).
    el = ORBITS["circle"]
    n1 = len(_tessellate(el, Camera(look="top", width_m=4 * AU_M))[2].u)
    n4 = len(_tessellate(el, Camera(look="top", width_m=4 * AU_M),
                         size=(7680, 4320))[2].u)
    assert 1.4 < n4 / n1 < 2.9
