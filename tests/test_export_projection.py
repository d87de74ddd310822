"""Dome master and panorama directions against the definitions of the formats.

The dome master is a square angular (azimuthal-equidistant) fisheye: the angle from the
zenith is proportional to the radius, FOV/2 at the circle's edge, and the bottom of the
frame is the front of the dome (the Dome Master draft format; scene-format.md).
"""

from __future__ import annotations

import numpy as np
import pytest

from viewer.export.projection import (
    dome_directions,
    dome_pixel,
    panorama_directions,
    panorama_pixel,
)

PIXEL = 1.0


def angle_from(d: np.ndarray, axis: tuple[float, float, float]) -> np.ndarray:
    return np.degrees(np.arccos(np.clip(d @ np.asarray(axis), -1.0, 1.0)))


@pytest.mark.parametrize("fov", [180.0, 210.0, 160.0])
def test_dome_angle_from_zenith_is_proportional_to_radius(fov: float) -> None:
    n = 257
    d, inside = dome_directions(n, fov)
    x = (np.arange(n) + 0.5) / n * 2 - 1
    X, Y = np.meshgrid(x, x)
    rho = np.hypot(X, Y)
    np.testing.assert_allclose(angle_from(d, (0, 0, 1))[inside], (rho * fov / 2)[inside],
                               atol=1e-9)
    assert inside.sum() == pytest.approx(np.pi / 4 * n * n, rel=0.01)


def test_dome_bottom_of_frame_is_the_front() -> None:
    # The front of the dome is the camera's image-down side (-u, i.e. y = -1 here).
    n = 201
    d, _ = dome_directions(n, 180.0)
    bottom_centre = d[-1, n // 2]
    assert bottom_centre[1] == pytest.approx(-1.0, abs=1e-3)
    assert d[0, n // 2][1] == pytest.approx(1.0, abs=1e-3)   # top of frame: behind, up
    assert d[n // 2, -1][0] == pytest.approx(1.0, abs=1e-3)  # right of frame: image right


def test_tilt_turns_the_zenith_toward_the_front() -> None:
    n = 201
    d, _ = dome_directions(n, 180.0, tilt_deg=30.0)
    # The centre pixel (the zenith) now looks 30 deg from f toward the front (-u) ...
    zenith = d[n // 2, n // 2]
    assert angle_from(zenith, (0, 0, 1)) == pytest.approx(30.0, abs=1e-6)
    assert zenith[1] < 0
    # ... so f itself (the target) lands 30 deg from the centre toward the back: up the
    # frame, at radius 30/90 of the circle's radius.
    col, row = dome_pixel(np.array([0.0, 0.0, 1.0]), n, 180.0, tilt_deg=30.0)
    centre = (n - 1) / 2
    assert col == pytest.approx(centre, abs=1e-9)
    assert centre - row == pytest.approx(30.0 / 90.0 * n / 2, abs=PIXEL)


def test_dome_pixel_inverts_dome_directions() -> None:
    n = 64
    d, inside = dome_directions(n, 200.0, 12.0)
    px = dome_pixel(d[inside], n, 200.0, 12.0)
    rows, cols = np.nonzero(inside)
    np.testing.assert_allclose(px[:, 0], cols, atol=1e-6)
    np.testing.assert_allclose(px[:, 1], rows, atol=1e-6)


def test_panorama_centre_looks_at_the_target_and_edges_wrap() -> None:
    w, h = 400, 200
    d = panorama_directions(w, h)
    assert angle_from(d[h // 2, w // 2], (0, 0, 1)) < 1.0
    assert angle_from(d[h // 2, 0], (0, 0, -1)) < 1.0        # left edge: behind
    assert angle_from(d[0, w // 2], (0, 1, 0)) < 1.0          # top: up
    assert angle_from(d[h // 2, 3 * w // 4], (1, 0, 0)) < 1.0  # three quarters: right
    px = panorama_pixel(d.reshape(-1, 3), w, h).reshape(h, w, 2)
    cols, rows = np.meshgrid(np.arange(w), np.arange(h))
    np.testing.assert_allclose(px[..., 0], cols, atol=1e-6)
    np.testing.assert_allclose(px[..., 1], rows, atol=1e-6)


@pytest.mark.parametrize(("fov", "tilt_deg"), [(180.0, 0.0), (180.0, -55.0), (200.0, 17.0),
                                               (150.0, -80.0), (360.0, 0.0), (250.0, 44.0)])
def test_the_faces_drawn_are_exactly_those_a_fine_grid_of_the_dome_sees(fov, tilt_deg) -> None:
    from viewer.export.immersive import Immersive, needed_faces
    from viewer.export.projection import CUBE_FACES

    names = list(CUBE_FACES)
    fwd = np.array([CUBE_FACES[k][0] for k in names])
    d, inside = dome_directions(1024, min(360.0, fov * 1.01), tilt_deg)
    seen = {names[i] for i in np.unique(np.argmax(d[inside] @ fwd.T, axis=1))}
    assert set(needed_faces(Immersive("dome", (256, 256), fov, tilt_deg))) == seen
