"""Show-ready dome masters and panoramas, measured from their pixels: captions where the
placement rules put them, labels drawn whole across cube-face seams, a 2048 master that
scaled down matches the 1024 one, and the bundled shows composed for a dome.

The dome master is the square angular fisheye of the Dome Master draft format (angle from
the zenith proportional to the radius, the bottom of the frame the front of the dome;
common practice, no source for the numbers of the caption band, which are ours:
docs/export.md, "Text on the dome").
"""

from __future__ import annotations

import math
from dataclasses import replace
from pathlib import Path

import numpy as np
import pytest

from viewer.errors import UserInputError
from viewer.export.immersive import Immersive
from viewer.orbit import AU_M
from viewer.render.samples import elements, plain_scene
from viewer.scene import load_scene
from viewer.scene.model import Body, BodyShow, Camera
from viewer.scene.timeline import OverlayText, scene_at_show_time

pytestmark = pytest.mark.gl

SCENES = Path(__file__).resolve().parent.parent / "scenes"


def lit(img: np.ndarray, level: int = 40) -> np.ndarray:
    return img[..., :3].max(axis=2) > level


def changed(a: np.ndarray, b: np.ndarray) -> np.ndarray:
    return np.abs(a[..., :3].astype(int) - b[..., :3].astype(int)).max(axis=2) > 24


def labelled(angle_deg: float, name: str = "Marker-Seven") -> Body:
    """A body in the reference plane ``angle_deg`` from the +X axis seen from the top."""
    return Body(name, elements(1.0, 0.0, 0.0, 0.0, 0.0, angle_deg), color=(1.0, 1.0, 1.0),
                show=BodyShow(orbit=False, marker=True, label=True))


TOP = Camera(look="top", width_m=3 * AU_M, distance_m=1.0 * AU_M)


def test_a_caption_sits_in_the_front_band_of_the_dome(immersive) -> None:
    size = 1024
    scene = plain_scene((), TOP, labels=True)
    spec = Immersive("dome", (size, size), grid=1)
    bare = immersive.render(scene, 0.0, spec)
    text = OverlayText("Equal times sweep equal areas", "bottom", 30.0, (1.0, 1.0, 1.0, 1.0))
    img = immersive.render(scene, 0.0, spec, overlay=(text,))
    rows, cols = np.nonzero(changed(img, bare))
    assert len(rows) > 500, "no caption drawn"
    # Every caption pixel inside the disc, in the front (bottom) half, centred left-right.
    c = size / 2
    rho = np.hypot(cols + 0.5 - c, rows + 0.5 - c) / c
    assert rho.max() < 1.0
    assert rows.min() > c
    assert abs(cols.mean() + 0.5 - c) < 0.02 * size
    # Elevation above the front edge: 90 deg at the zenith, 0 at the rim (180 deg dome).
    elevation = 90.0 * (1.0 - rho[np.abs(cols + 0.5 - c) < 0.05 * size])
    assert 20.0 <= elevation.min() and elevation.max() <= 50.0
    # Text height as an angle: 4 deg ([dome] caption_size) within a pixel row or two.
    tall = (rows.max() - rows.min() + 1) / (size / 180.0)
    assert 3.0 < tall < 6.0


def test_a_caption_that_cannot_fit_the_dome_is_refused(immersive) -> None:
    scene = plain_scene((), TOP)
    long = OverlayText("A caption far too long " * 6, "bottom", 30.0, (1.0, 1.0, 1.0, 1.0))
    with pytest.raises(UserInputError) as err:
        immersive.render(scene, 0.0, Immersive("dome", (256, 256), grid=1), overlay=(long,))
    assert "does not fit on the dome" in str(err.value)


def label_mask(immersive, body: Body, spec: Immersive, camera: Camera = TOP) -> np.ndarray:
    """Pixels the body's label changes: the frame with labels against the frame without
    (the star's own label left off)."""
    scene = plain_scene((body,), camera, labels=True)
    scene = replace(scene, center=replace(scene.center, show_label=False))
    with_label = immersive.render(scene, 0.0, spec)
    without = immersive.render(replace(scene, render=replace(scene.render, labels=False)),
                               0.0, spec)
    return changed(with_label, without)


def at_radius(a_au: float, angle_deg: float = 0.0) -> Body:
    return replace(labelled(0.0), elements=elements(a_au, 0.0, 0.0, 0.0, 0.0, angle_deg))


def test_a_label_across_a_face_seam_is_drawn_whole(immersive) -> None:
    # Eye 1 au above the star, looking down: a body 1 au out along +X is 45 deg from the
    # zenith, on the seam between the zenith face and the right-hand face. A body 0.9 au
    # out sits just inside the zenith face and its label, to its right, crosses the seam.
    size = 1024
    spec = Immersive("dome", (size, size), grid=1)
    away = label_mask(immersive, at_radius(0.45), spec)
    seam = label_mask(immersive, at_radius(0.9), spec)
    seam_col = size / 2 + 0.5 * size / 2          # 45 deg from the zenith on a 180 deg dome
    rows, cols = np.nonzero(seam)
    assert cols.min() < seam_col < cols.max(), "the label does not cross the seam"
    assert away.sum() > 300
    assert seam.sum() == pytest.approx(away.sum(), rel=0.05)


def test_a_label_behind_the_panorama_viewer_reads_as_one_in_front(immersive) -> None:
    # The eye 0.2 au out along +X looks back at the star (-X): a body at 8 deg on the
    # 1 au orbit is behind the eye, near +-180 deg longitude, the panorama's side edges.
    cam = Camera(look="angles", elevation_rad=0.0, azimuth_rad=0.0, width_m=3 * AU_M,
                 distance_m=0.2 * AU_M)
    size = (1024, 512)
    spec = Immersive("panorama", size, grid=1)
    front = label_mask(immersive, labelled(175.0), spec, cam)
    back = label_mask(immersive, labelled(8.0), spec, cam)
    assert front.sum() > 150
    assert back.sum() == pytest.approx(front.sum(), rel=0.05)
    cols = np.nonzero(back)[1]
    assert min(cols.min(), size[0] - cols.max()) < size[0] / 8, "not behind the eye"
    # Drawn once and whole: on one side of the +-180 deg seam, not split over both edges.
    assert np.ptp(cols) < size[0] / 4


def test_a_2048_master_scaled_down_matches_the_1024_master(immersive) -> None:
    scene = load_scene(SCENES / "demo.toml")
    scene = replace(scene, render=replace(scene.render, stars=False))
    small = immersive.render(scene, 0.0, Immersive("dome", (1024, 1024), grid=2))
    big = immersive.render(scene, 0.0, Immersive("dome", (2048, 2048), grid=1))
    down = big[..., :3].astype(np.float64).reshape(1024, 2, 1024, 2, 3).mean(axis=(1, 3))
    ref = small[..., :3].astype(np.float64)
    assert np.abs(down - ref).mean() < 2.0          # of 255, over the whole master
    assert lit(down.astype(np.uint8)).sum() == pytest.approx(lit(small).sum(), rel=0.1)


@pytest.mark.parametrize("name", ["demo.toml", "laws.toml"])
def test_the_bundled_shows_are_composed_for_the_dome(immersive, name) -> None:
    """Orbits span at least half the dome's diameter, mostly in its front half, in
    frames across the whole show (the first included)."""
    scene = load_scene(SCENES / name)
    scene = replace(scene, render=replace(scene.render, stars=False, grid=False,
                                          labels=False))
    tl = scene.timeline
    size = 384
    for k in np.linspace(0, tl.frame_count - 1, 5).astype(int):
        t = float(tl.time_of_frame(k))
        shown = scene_at_show_time(scene, float(tl.show_time_of_frame(k)), t)
        img = immersive.render(shown, t, Immersive("dome", (size, size), grid=1))
        rows, cols = np.nonzero(lit(img))
        span = max(np.ptp(rows), np.ptp(cols)) / size
        front = float(np.mean(rows > size / 2))
        assert span >= 0.5, (k, span)
        assert front >= 0.75, (k, front)


def test_the_dome_grid_rings_and_front_spoke_land_where_the_fisheye_puts_them(
        immersive) -> None:
    size = 1024
    scene = plain_scene((), TOP)
    spec = Immersive("dome", (size, size), grid=1, dome_grid=True)
    img = immersive.render(scene, 0.0, spec)
    c = size / 2
    # Along a line 10 deg clockwise of the right-hand spoke (no spoke, no label there):
    # rings every 15 deg of zenith angle, at radius z / 90 * c (180 deg dome).
    ang = math.radians(-10.0)
    r = np.arange(20, int(c) - 2)
    cols = (c + r * math.cos(ang)).astype(int)
    rows = (c - r * math.sin(ang)).astype(int)
    profile = img[rows, cols, :3].max(axis=1).astype(float)
    hits = r[profile > 60]
    for z in (15, 30, 45, 60, 75):
        want = z / 90.0 * c
        assert np.min(np.abs(hits - want)) <= 1.5, z
    # The front spoke (straight down from the centre) is drawn in its own warm colour.
    front = img[int(c + 0.6 * c), int(c) - 3:int(c) + 4, :3].astype(int)
    assert (front[:, 0] - front[:, 2]).max() > 80
    # And nothing of the grid without the flag.
    assert lit(immersive.render(scene, 0.0, replace(spec, dome_grid=False))).sum() == 0
