"""The view follows scene-format.md's camera directions exactly (no GL)."""

from __future__ import annotations

import math

import numpy as np
import pytest
from reference_values import DEG

from viewer.geometry.camera import look_basis, view_for
from viewer.orbit import AU_M, DAY_S, state_from_elements
from viewer.render.samples import elements, plain_scene
from viewer.scene import Body, Camera


def _scene(camera: Camera, size=(1920, 1080)):
    return plain_scene((Body("B", elements(1.0, 0.3, 10, 20, 30, 40)),), camera, size)


def test_top_view_puts_plus_x_right_plus_y_up_and_the_eye_on_plus_z():
    right, up, d = look_basis(Camera(look="top"))
    assert np.allclose(right, [1, 0, 0]) and np.allclose(up, [0, 1, 0])
    assert np.allclose(d, [0, 0, 1])


def test_edge_view_puts_plus_x_right_plus_z_up_and_the_eye_on_minus_y():
    right, up, d = look_basis(Camera(look="edge"))
    assert np.allclose(right, [1, 0, 0]) and np.allclose(up, [0, 0, 1])
    assert np.allclose(d, [0, -1, 0])


@pytest.mark.parametrize("el_deg, az_deg", [(30, 60), (-20, 200), (89, 10), (0, -90)])
def test_angles_give_the_eye_direction_and_up_is_the_projection_of_z(el_deg, az_deg):
    right, up, d = look_basis(Camera(look="angles", elevation_rad=el_deg * DEG,
                                     azimuth_rad=az_deg * DEG))
    el, az = el_deg * DEG, az_deg * DEG
    assert np.allclose(d, [math.cos(el) * math.cos(az), math.cos(el) * math.sin(az),
                           math.sin(el)])
    z_proj = np.array([0, 0, 1.0]) - math.sin(el) * d
    assert np.allclose(up, z_proj / np.linalg.norm(z_proj))
    assert np.allclose(np.cross(up, d), right)
    assert np.allclose([np.dot(right, up), np.dot(right, d), np.dot(up, d)], 0, atol=1e-15)


def test_angles_looking_straight_down_take_plus_y_as_up():
    right, up, d = look_basis(Camera(look="angles", elevation_rad=math.pi / 2))
    assert np.allclose(up, [0, 1, 0]) and np.allclose(d, [0, 0, 1])
    assert np.allclose(right, [1, 0, 0])  # the same picture as look = "top"


def test_angles_at_zero_elevation_and_minus_90_azimuth_are_the_edge_view():
    a = look_basis(Camera(look="angles", elevation_rad=0.0, azimuth_rad=-math.pi / 2))
    b = look_basis(Camera(look="edge"))
    for u, v in zip(a, b, strict=True):
        assert np.allclose(u, v, atol=1e-15)


def test_orthographic_top_view_maps_the_target_to_the_centre_and_width_across_the_image():
    view = view_for(_scene(Camera(look="top", width_m=4 * AU_M)), 0.0)
    px, front = view.project(np.array([[0, 0, 0], [-2 * AU_M, 0, 0], [2 * AU_M, 0, 0],
                                       [0, 1 * AU_M, 0]]))
    assert front.all()
    assert np.allclose(px[0], [960, 540])
    assert np.allclose(px[1], [0, 540]) and np.allclose(px[2], [1920, 540])
    assert np.allclose(px[3], [960, 540 - 480])  # +Y is up: 1 au = 480 px


def test_a_body_target_is_where_the_body_is_at_that_time():
    scene = _scene(Camera(look="top", target="B", width_m=0.1 * AU_M))
    t = 17 * DAY_S
    view = view_for(scene, t)
    r, _ = state_from_elements(scene.body("B").elements_at(t))
    assert np.allclose(view.origin_m, r)
    px, _ = view.project(np.asarray(r).reshape(1, 3))
    assert np.allclose(px[0], [960, 540], atol=1e-9)


def test_perspective_view_puts_the_target_at_the_centre_and_fov_across_the_height():
    cam = Camera(projection="perspective", look="angles", elevation_rad=0.4, azimuth_rad=1.0,
                 distance_m=6 * AU_M, fov_rad=45 * DEG)
    view = view_for(_scene(cam), 0.0)
    right, up, d = look_basis(cam)
    eye = 6 * AU_M * d
    assert np.allclose(view.eye_m, eye)
    # A point seen fov/2 above the line of sight lands on the top edge.
    toward = -d * math.cos(22.5 * DEG) + up * math.sin(22.5 * DEG)
    px, front = view.project(np.stack([np.zeros(3), eye + 3 * AU_M * toward]))
    assert front.all()
    assert np.allclose(px[0], [960, 540])
    assert np.allclose(px[1], [960, 0], atol=1e-6)


def test_points_behind_a_perspective_eye_are_not_in_front():
    cam = Camera(projection="perspective", look="top", distance_m=2 * AU_M)
    view = view_for(_scene(cam), 0.0)
    _, front = view.project(np.array([[0, 0, 3 * AU_M], [0, 0, 1 * AU_M]]))
    assert list(front) == [False, True]


def test_camera_px_of_camera_coordinates_is_project_of_the_world_points():
    # The frame builder projects a body once and keeps its camera coordinates
    # (frame._seen_px): the pixels must be project's own, bit for bit, in front and behind.
    cam = Camera(projection="perspective", look="angles", elevation_rad=0.4, azimuth_rad=1.0,
                 distance_m=6 * AU_M, fov_rad=45 * DEG)
    view = view_for(_scene(cam), 0.0)
    pts = np.random.default_rng(3).normal(scale=8 * AU_M, size=(50, 3))
    px, front = view.project(pts)
    px2, front2 = view.camera_px(view.to_camera(pts))
    assert not front.all() and front.any()
    assert np.array_equal(px, px2) and np.array_equal(front, front2)
