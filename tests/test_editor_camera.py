"""Camera moves from the mouse (pure functions on the scene's Camera), as specifications."""

from __future__ import annotations

import math

import numpy as np
import pytest

from viewer.geometry.camera import view_for
from viewer.gui.camera_input import _point, as_angles, orbit, pan, zoom
from viewer.orbit import AU_M, Elements
from viewer.scene.model import Body, Camera, Center, Scene
from viewer.units import parse_epoch

SIZE = (1600, 900)


def scene(camera: Camera) -> Scene:
    return Scene(title="t", epoch=parse_epoch("2030-01-01T00:00:00 TDB"), frame="ECLIPJ2000",
                 center=Center(name="Sun", gm_m3_s2=1.32712440018e20, radius_m=6.957e8),
                 bodies=(Body(name="A", elements=Elements(a=AU_M, e=0.1, mu=1.3e20)),),
                 camera=camera)


@pytest.mark.parametrize("projection", ["orthographic", "perspective"])
def test_zoom_keeps_the_point_under_the_cursor_still(projection: str) -> None:
    cam = Camera(projection=projection, look="top", width_m=4 * AU_M, distance_m=6 * AU_M)
    s = scene(cam)
    view = view_for(s, 0.0, SIZE, cam)
    cursor = (400.0, 250.0)
    under = _point(view, *cursor)
    new = zoom(cam, view, 2.0, *cursor)
    assert new.width_m == pytest.approx(cam.width_m * 0.85**2)
    px, _ = view_for(s, 0.0, SIZE, new).project(under)
    np.testing.assert_allclose(px, cursor, atol=1e-6)


def test_pan_moves_the_picture_with_the_mouse() -> None:
    cam = Camera(look="top", width_m=4 * AU_M)
    s = scene(cam)
    view = view_for(s, 0.0, SIZE, cam)
    new = pan(cam, view, 80.0, -30.0)
    px, _ = view_for(s, 0.0, SIZE, new).project(np.zeros(3))
    np.testing.assert_allclose(px, (800 + 80, 450 - 30), atol=1e-6)


def test_presets_become_angles_that_look_the_same_way() -> None:
    for look in ("top", "edge"):
        cam = Camera(look=look)
        s = scene(cam)
        a = view_for(s, 0.0, SIZE, cam).basis
        b = view_for(s, 0.0, SIZE, as_angles(cam)).basis
        np.testing.assert_allclose(a, b, atol=1e-12)


def test_dragging_down_from_the_top_tilts_toward_the_edge_and_stops_at_the_pole() -> None:
    cam = Camera(look="top")
    tilted = orbit(cam, 0.0, -100.0)
    assert tilted.elevation_rad == pytest.approx(math.pi / 2 - 100 * math.radians(0.3))
    assert orbit(cam, 0.0, 10_000.0).elevation_rad == pytest.approx(math.pi / 2)
    turned = orbit(tilted, 50.0, 0.0)
    assert turned.azimuth_rad == pytest.approx(-math.pi / 2 - 50 * math.radians(0.3))
