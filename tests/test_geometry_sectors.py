"""Swept sectors as fans: exact time bounds, pivot on the focus, equal areas in equal times.

The second law (equal areas in equal times) is the outside fact checked here: the area
swept in dt is (h / 2) dt, i.e. pi a b dt / T (Vallado, 4th ed., sec. 1.3 and eq. 2-22;
common practice). The sector's end points are checked against the body's own positions
at the sweep times from viewer.orbit.
"""

from __future__ import annotations

import math

import numpy as np
import pytest

from viewer.geometry.camera import view_for
from viewer.geometry.conic import ConicShape, CurveBatch, tessellate
from viewer.geometry.fills import fan_triangles, fill_vertices
from viewer.geometry.frame import _sector_params
from viewer.orbit import AU_M, DAY_S, Elements, state_from_elements
from viewer.render.samples import GM_SUN, elements, plain_scene
from viewer.scene import Body, BodyShow, Camera, Sweep


def _body(el: Elements, start_d=0.0, interval_d=30.0, count=6) -> Body:
    return Body("B", el, show=BodyShow(sweep=True),
                sweep=Sweep(start_d * DAY_S, interval_d * DAY_S, count, (1, 0.7, 0.3), 1.0))


def _arcs(body: Body, camera: Camera | None = None):
    scene = plain_scene((body,), camera or Camera(look="top", width_m=5 * AU_M))
    view = view_for(scene, 0.0)
    shape = ConicShape.of(body.elements)
    batch = CurveBatch.empty()
    params = _sector_params(body, shape)
    for u0, u1, _t0, _t1, _whole in params:
        batch.add(shape, u0, u1, 0.2)
    tess = tessellate(batch, view)
    return view, params, [tess.arc(k) for k in range(len(params))]


def _plane_area(el: Elements, pivot, arc) -> float:
    """Area of the polygon pivot + arc, measured in the orbit plane (m^2)."""
    P, Q, _ = (np.asarray(v) for v in el.perifocal_basis())
    poly = np.vstack([pivot, arc])
    x, y = poly @ P, poly @ Q
    return 0.5 * abs(float(np.sum(x * np.roll(y, -1) - np.roll(x, -1) * y)))


ORBITS = {
    "ellipse e=0.6": elements(1.3, 0.6, 12, 40, 70, 10),
    "circle": elements(1.0, 0.0),
    "hyperbola": Elements.from_periapsis(0.9 * AU_M, 1.5, 0.1, 0.2, 0.3, -0.9, mu=GM_SUN),
}


@pytest.mark.parametrize("orbit", list(ORBITS))
def test_sector_arcs_start_and_end_where_the_body_is_at_the_sweep_times(orbit):
    body = _body(ORBITS[orbit], start_d=-45.0, interval_d=30.0, count=4)
    _view, params, arcs = _arcs(body)
    for (_u0, _u1, t0, t1, _whole), arc in zip(params, arcs, strict=True):
        r0, _ = state_from_elements(body.elements_at(t0))
        r1, _ = state_from_elements(body.elements_at(t1))
        scale = float(np.linalg.norm(r0))
        assert np.allclose(arc[0], r0, atol=1e-9 * scale)
        assert np.allclose(arc[-1], r1, atol=1e-9 * scale)


def test_neighbouring_sectors_share_their_boundary_point_bit_for_bit():
    _view, _params, arcs = _arcs(_body(ORBITS["ellipse e=0.6"], count=5))
    for a, b in zip(arcs[:-1], arcs[1:], strict=True):
        assert np.array_equal(a[-1], b[0])


def test_the_fan_pivots_on_the_occupied_focus():
    _view, _params, arcs = _arcs(_body(ORBITS["ellipse e=0.6"]))
    tris = fan_triangles(np.zeros(3), arcs[0])
    assert np.array_equal(tris[:, 0], np.zeros((len(tris), 3)))
    assert np.array_equal(tris[:, 1], arcs[0][:-1]) and np.array_equal(tris[:, 2], arcs[0][1:])


@pytest.mark.parametrize("orbit", ["ellipse e=0.6", "circle"])
def test_sectors_of_equal_duration_have_equal_area(orbit):
    el = ORBITS[orbit]
    period_d = float(el.period) / DAY_S
    body = _body(el, start_d=-period_d / 24, interval_d=period_d / 12, count=12)
    _view, _params, arcs = _arcs(body)
    expected = math.pi * float(el.a) * float(el.b) / 12  # pi a b dt / T
    areas = np.array([_plane_area(el, np.zeros(3), arc) for arc in arcs])
    # Chords cut the arc: at 0.2 px tolerance the polygon is smaller by well under 0.1 %.
    assert np.allclose(areas, expected, rtol=1e-3)


def test_a_sweep_may_start_before_the_scene_epoch():
    el = ORBITS["ellipse e=0.6"]
    body = _body(el, start_d=-200.0, interval_d=50.0, count=3)
    _view, params, _arcs_ = _arcs(body)
    assert [p[2] / DAY_S for p in params] == [-200.0, -150.0, -100.0]


def test_fan_triangles_behind_a_perspective_eye_are_clipped_not_dropped_whole():
    cam = Camera(projection="perspective", look="angles", elevation_rad=0.05,
                 azimuth_rad=0.0, distance_m=1.0 * AU_M, fov_rad=1.2)
    view = view_for(plain_scene((_body(ORBITS["circle"]),), cam), 0.0)
    # A fan around the eye's position: part in front, part behind.
    arc = np.array([[2 * AU_M * math.cos(a), 2 * AU_M * math.sin(a), 0.0]
                    for a in np.linspace(-2.5, 2.5, 60)])
    tris = fan_triangles(np.zeros(3), arc)
    out = fill_vertices(view, tris, np.tile([1, 1, 1, 1.0], (len(tris), 1)))
    assert len(out) % 3 == 0 and len(out) > 0 and np.all(np.isfinite(out))
