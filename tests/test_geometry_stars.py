"""The starfield is procedural and deterministic: the same sky everywhere, every time."""

from __future__ import annotations

import numpy as np

from viewer.geometry.camera import view_for
from viewer.geometry.stars import make_starfield, splitmix64, star_points
from viewer.render.samples import elements, plain_scene
from viewer.scene import Body, Camera


def test_splitmix64_gives_the_published_first_outputs_for_seed_zero():
    # SplitMix64 seeded with 0 (state += golden gamma, then the mix): first output
    # 0xE220A8397B1DCDAF (from memory; the widely quoted reference value).
    idx = np.array([0], dtype=np.uint64)
    z = np.uint64(0x9E3779B97F4A7C15)
    with np.errstate(over="ignore"):
        z = (z ^ (z >> np.uint64(30))) * np.uint64(0xBF58476D1CE4E5B9)
        z = (z ^ (z >> np.uint64(27))) * np.uint64(0x94D049BB133111EB)
        z = z ^ (z >> np.uint64(31))
    assert int(z) == 0xE220A8397B1DCDAF
    # Our counter form with index 0, stream 0 mixes the state 1 * golden gamma: the same.
    expected = (0xE220A8397B1DCDAF >> 11) / 2.0**53
    assert splitmix64(idx, 0)[0] == expected


def test_the_starfield_is_the_same_every_time_it_is_made():
    a, b = make_starfield(), make_starfield()
    assert np.array_equal(a.directions, b.directions)
    assert np.array_equal(a.brightness, b.brightness) and np.array_equal(a.tint, b.tint)


def test_stars_cover_the_sphere_evenly():
    f = make_starfield(20000)
    assert np.allclose(np.linalg.norm(f.directions, axis=1), 1.0)
    assert np.all(np.abs(f.directions.mean(axis=0)) < 0.02)
    north = np.count_nonzero(f.directions[:, 2] > 0)
    assert abs(north / 20000 - 0.5) < 0.02


def test_faint_stars_outnumber_bright_ones():
    b = make_starfield().brightness
    assert np.count_nonzero(b < 0.3) > 5 * np.count_nonzero(b > 0.7)


def test_only_stars_the_view_faces_are_drawn_and_all_are_inside_the_image():
    view = view_for(plain_scene((Body("B", elements(1, 0)),), Camera(look="top")), 0.0)
    pts = star_points(make_starfield(), view, 1.0)
    assert 0 < len(pts) < len(make_starfield().directions) / 4
    w, h = view.size_px
    assert np.all((pts[:, 0] > -5) & (pts[:, 0] < w + 5) & (pts[:, 1] > -5) & (pts[:, 1] < h + 5))
