"""Dome masters and panoramas measured from their pixels.

A body at a known direction from the eye must land where the square angular fisheye
(the Dome Master draft format: angle from the zenith proportional to the radius, the
bottom of the frame the front of the dome) or the equirectangular projection puts it;
nothing is lit outside the dome's circle.
"""

from __future__ import annotations

import math
from dataclasses import replace

import numpy as np
import pytest

from viewer.export.immersive import Immersive
from viewer.export.projection import dome_pixel, panorama_pixel
from viewer.geometry.camera import view_for
from viewer.orbit import AU_M, state_from_elements
from viewer.render.samples import elements, plain_scene
from viewer.scene.model import Body, BodyShow, Camera

pytestmark = pytest.mark.gl

PIXEL = 1.0


def marker_only(nu_deg: float, a_au: float = 1.0, i_deg: float = 20.0) -> Body:
    return Body("probe", elements(a_au, 0.0, i_deg, 30.0, 0.0, nu_deg), color=(1.0, 1.0, 1.0),
                show=BodyShow(orbit=False, marker=True, label=False))


def centroid(img: np.ndarray, near: np.ndarray, box: int = 24) -> np.ndarray:
    """Brightness-weighted centroid (column, row) of the pixels near ``near``."""
    c0, r0 = (int(round(v)) for v in near)
    h, w = img.shape[:2]
    rows = slice(max(0, r0 - box), min(h, r0 + box + 1))
    cols = slice(max(0, c0 - box), min(w, c0 + box + 1))
    lum = img[rows, cols, :3].astype(np.float64).sum(axis=2)
    assert lum.sum() > 0, "nothing drawn near the expected place"
    rr, cc = np.mgrid[rows, cols]
    # Pixel (i, j) covers [i, i+1]: its centre is at i + 0.5 in the projection's
    # convention of pixel centres at integers, so no offset is added here.
    return np.array([(cc * lum).sum() / lum.sum(), (rr * lum).sum() / lum.sum()])


def camera_direction(scene, camera, body: Body) -> np.ndarray:
    view = view_for(scene, 0.0, (64, 64), camera)
    r, _ = state_from_elements(body.elements_at(0.0))
    d = np.asarray(r) - view.eye_m
    basis = np.vstack([view.basis[0], view.basis[1], -view.basis[2]])
    return basis @ d


CAMERA = Camera(projection="orthographic", look="angles", elevation_rad=math.radians(40.0),
                azimuth_rad=math.radians(-70.0), width_m=3 * AU_M, distance_m=2.5 * AU_M)


#: An eye just outside the orbit, so bodies are seen far from the zenith, near the rim.
CLOSE = replace(CAMERA, distance_m=1.1 * AU_M)


@pytest.mark.parametrize(("camera", "nu_deg", "fov", "tilt"),
                         [(CAMERA, 0.0, 180.0, 0.0), (CAMERA, 140.0, 180.0, 0.0),
                          (CAMERA, 250.0, 200.0, 15.0), (CAMERA, 310.0, 160.0, -10.0),
                          (CLOSE, 60.0, 180.0, 0.0), (CLOSE, 200.0, 180.0, 0.0),
                          (CLOSE, 300.0, 180.0, 25.0), (CLOSE, 120.0, 220.0, 0.0)])
def test_a_body_lands_where_the_angular_fisheye_puts_it(immersive, camera, nu_deg, fov,
                                                        tilt) -> None:
    body = marker_only(nu_deg)
    scene = plain_scene((body,), camera)
    size = 768
    img = immersive.render(scene, 0.0, Immersive("dome", (size, size), fov, tilt))
    want = dome_pixel(camera_direction(scene, camera, body), size, fov, tilt)
    assert np.hypot(*(want - (size - 1) / 2)) < size / 2, "test body outside the dome"
    got = centroid(img, want)
    assert np.hypot(*(got - want)) < 1.5 * PIXEL


def test_nothing_is_lit_outside_the_dome_circle(immersive) -> None:
    scene = replace(plain_scene((marker_only(0.0),), CAMERA),
                    render=replace(plain_scene((), CAMERA).render, stars=True, grid=True))
    size = 512
    img = immersive.render(scene, 0.0, Immersive("dome", (size, size), 180.0))
    x = (np.arange(size) + 0.5) / size * 2 - 1
    rho = np.hypot(*np.meshgrid(x, x))
    outside = rho > 1.0 + 2.0 / size
    assert img[outside][:, :3].max() == 0
    assert (img[outside][:, 3] == 255).all()
    assert img[rho < 0.99][:, :3].max() > 0  # the inside is drawn (stars, grid)


@pytest.mark.parametrize("nu_deg", [0.0, 95.0, 200.0])
def test_a_body_lands_where_the_equirectangular_panorama_puts_it(immersive, nu_deg) -> None:
    body = marker_only(nu_deg)
    scene = plain_scene((body,), CAMERA)
    w, h = 1024, 512
    img = immersive.render(scene, 0.0, Immersive("panorama", (w, h)))
    want = panorama_pixel(camera_direction(scene, CAMERA, body), w, h)
    got = centroid(img, want)
    assert np.hypot(*(got - want)) < 1.5 * PIXEL


def test_a_dome_re_render_is_byte_identical(immersive) -> None:
    scene = plain_scene((marker_only(30.0),), CAMERA)
    spec = Immersive("dome", (256, 256))
    assert np.array_equal(immersive.render(scene, 0.0, spec), immersive.render(scene, 0.0, spec))


def test_bad_immersive_sizes_are_refused() -> None:
    from viewer.errors import UserInputError

    with pytest.raises(UserInputError, match="square"):
        Immersive("dome", (800, 600))
    with pytest.raises(UserInputError, match="2:1"):
        Immersive("panorama", (800, 600))
    with pytest.raises(UserInputError, match="FOV"):
        Immersive("dome", (512, 512), fov_deg=400.0)


@pytest.mark.parametrize(("camera", "nu_deg", "fov", "tilt"),
                         [(CAMERA, 140.0, 180.0, 0.0), (CLOSE, 300.0, 180.0, 25.0),
                          (CAMERA, 250.0, 160.0, 15.0)])
def test_a_draft_dome_puts_a_body_where_the_master_does(immersive, camera, nu_deg, fov,
                                                        tilt) -> None:
    """The window's draft (immersive.draft_rig: four faces turned about the image's
    right axis) lands a body on the pixel the angular fisheye gives, like the master."""
    from viewer.export.immersive import draft_rig, face_views, needed_faces

    scene = plain_scene((marker_only(nu_deg),), camera)
    size = 768
    spec = Immersive("dome", (size, size), fov, tilt)
    rig, drafted = draft_rig(view_for(scene, 0.0, (size, size), camera), spec)
    assert len(needed_faces(drafted, 0.999)) == 4
    assert len(face_views(rig, drafted, reach=0.999)) == 4
    r = immersive.renderer
    draft = r.read(immersive.draw(scene, 0.0, spec, draft=True), (size, size)).copy()
    want = dome_pixel(camera_direction(scene, camera, scene.bodies[0]), size, fov, tilt)
    got = centroid(draft, want)
    assert np.hypot(*(got - want)) < 1.5 * PIXEL


def test_a_draft_of_the_demo_dome_looks_like_its_master(immersive) -> None:
    """Whole frames: the draft differs from the master only where a line or a letter is
    resampled (measured: 0.68 levels on average, 9 pixels of 854,000 by more than 100)."""
    from importlib import resources

    from viewer.scene import load_scene

    scene = load_scene(str(resources.files("viewer") / "scenes" / "demo.toml"))
    spec = Immersive("dome", (512, 512), grid=1)
    r = immersive.renderer
    master = r.read(immersive.draw(scene, 0.0, spec), (512, 512)).astype(int)
    draft = r.read(immersive.draw(scene, 0.0, spec, draft=True), (512, 512)).astype(int)
    diff = np.abs(master - draft)[..., :3].max(axis=2)
    assert diff.mean() < 2.0
    assert np.count_nonzero(diff > 100) < 0.001 * diff.size
    lit = master[..., :3].sum(axis=2) > 120
    assert np.count_nonzero(lit) > 2000  # the test sees the orbits, not an empty sky
    assert abs(np.count_nonzero(draft[..., :3].sum(axis=2) > 120) - np.count_nonzero(lit)) \
        < 0.05 * np.count_nonzero(lit)


def _demo_scene():
    from importlib import resources

    from viewer.scene import load_scene

    return load_scene(str(resources.files("viewer") / "scenes" / "demo.toml"))


@pytest.mark.parametrize(("kind", "size", "fov", "tilt", "transparent"),
                         [("dome", (640, 640), 180.0, 0.0, False),
                          ("dome", (600, 600), 200.0, 20.0, True),
                          ("panorama", (800, 400), 180.0, 0.0, False)])
def test_a_sequence_through_the_table_of_atlas_points_is_the_direct_frames(
        immersive, kind, size, fov, tilt, transparent) -> None:
    """From its second frame, one sample per pixel reprojects through the table that
    reproject.frag wrote of each pixel's atlas point (reproject_lut.frag): every frame
    must be the direct path's, byte for byte (a fresh renderer draws each one direct)."""
    from viewer.export.immersive import ImmersiveRenderer

    scene = _demo_scene()
    spec = Immersive(kind, size, fov, tilt, grid=1)
    kept = ImmersiveRenderer(immersive.renderer)
    try:
        for k in range(3):
            t = 3e5 * k
            seq = kept.render(scene, t, spec, transparent=transparent).copy()
            fresh = ImmersiveRenderer(immersive.renderer)
            try:
                direct = fresh.render(scene, t, spec, transparent=transparent)
                assert not fresh._tables or all(v is None for v in fresh._tables.values())
                assert np.array_equal(seq, direct), f"frame {k}"
            finally:
                fresh.release()
        assert any(v is not None for v in kept._tables.values())  # the table was used
        lit = np.count_nonzero(seq[..., :3].sum(axis=2) > 120)
        assert lit > 1000  # a picture with orbits in it, not an empty sky
    finally:
        kept.release()


def test_the_drafts_table_on_a_screen_puts_the_direct_pixels_in_place(immersive) -> None:
    """The window's draft goes onto its screen at an offset, rows counted from the
    bottom: through the table it is the same picture as the direct draft, in place."""
    from viewer.export.immersive import ImmersiveRenderer

    scene = _demo_scene()
    n = 400
    spec = Immersive("dome", (n, n), grid=1)
    r = immersive.renderer
    screen = r.ctx.framebuffer(color_attachments=[r.ctx.texture((700, 520), 4)])
    kept = ImmersiveRenderer(r)
    try:
        for k in range(3):
            screen.clear(0.0, 0.0, 0.0, 1.0)
            kept.draw(scene, 1e5 * k, spec, draft=True, screen=(screen, (120, 60)))
            shot = np.frombuffer(screen.read(components=4), np.uint8).reshape(520, 700, 4)
            on_screen = shot[60:60 + n, 120:120 + n][::-1]  # GL rows from the bottom
            fresh = ImmersiveRenderer(r)
            try:
                direct = r.read(fresh.draw(scene, 1e5 * k, spec, draft=True), (n, n))
                assert np.array_equal(on_screen[..., :3], direct[..., :3]), f"frame {k}"
            finally:
                fresh.release()
        assert any(v is not None for v in kept._tables.values())
    finally:
        kept.release()
        screen.release()


def _whole_output(self, prog, fbo, spec, origin, outside) -> int:
    """ImmersiveRenderer._shaded_area as it was: one triangle over the whole output."""
    prog["u_fan_sides"].value = 0
    return 3


@pytest.mark.parametrize(("size", "fov", "tilt", "grid", "transparent"),
                         [(640, 180.0, 0.0, 1, False), (333, 200.0, 25.0, 2, True),
                          (257, 150.0, -10.0, 3, False)])
def test_the_domes_fan_of_triangles_shades_every_pixel_the_whole_output_would(
        immersive, monkeypatch, size, fov, tilt, grid, transparent) -> None:
    """A dome's reprojection shades a polygon round its circle over a clear to the
    outside colour: the master is byte for byte the one shaded over the whole square,
    at odd sizes, FOVs over and under 180 degrees and 1 to 3 x 3 samples per pixel."""
    from viewer.export.immersive import ImmersiveRenderer

    scene = _demo_scene()
    spec = Immersive("dome", (size, size), fov, tilt, grid=grid)
    fan = ImmersiveRenderer(immersive.renderer)
    try:
        ours = fan.render(scene, 2e5, spec, transparent=transparent).copy()
    finally:
        fan.release()
    monkeypatch.setattr(ImmersiveRenderer, "_shaded_area", _whole_output)
    whole = ImmersiveRenderer(immersive.renderer)
    try:
        reference = whole.render(scene, 2e5, spec, transparent=transparent)
    finally:
        whole.release()
    assert np.array_equal(ours, reference)
    lit = np.count_nonzero(ours[..., :3].sum(axis=2) > 120)
    assert lit > 200  # orbits drawn, not an empty disc


def test_the_domes_clear_on_a_screen_stays_inside_the_picture(immersive) -> None:
    """On a window's screen the dome's clear covers its own square only: the screen
    round it keeps its colour."""
    from viewer.export.immersive import ImmersiveRenderer

    scene = _demo_scene()
    n = 300
    r = immersive.renderer
    screen = r.ctx.framebuffer(color_attachments=[r.ctx.texture((640, 480), 4)])
    kept = ImmersiveRenderer(r)
    try:
        screen.clear(0.2, 0.4, 0.6, 1.0)
        kept.draw(scene, 0.0, Immersive("dome", (n, n), grid=1), draft=True,
                  screen=(screen, (100, 50)))
        shot = np.frombuffer(screen.read(components=4), np.uint8).reshape(480, 640, 4)
        around = np.ones(shot.shape[:2], bool)
        around[50:50 + n, 100:100 + n] = False
        assert np.all(shot[around] == (51, 102, 153, 255))
        assert np.all(shot[50, 100, :3] == 0)  # the picture's corner: outside the dome
    finally:
        kept.release()
        screen.release()


def test_an_output_whose_table_the_gl_refuses_is_drawn_direct_in_every_frame(
        immersive, monkeypatch) -> None:
    """llvmpipe refuses textures over 1 GiB, so a 16384 master has no table of atlas
    points (16384 x 16384 x 8 bytes): the refusal is caught, leaves no GL error, and
    every frame of such an output is drawn directly, the same bytes as a fresh renderer."""
    from viewer.export.immersive import ImmersiveRenderer

    r = immersive.renderer
    if "llvmpipe" not in r.ctx.info["GL_RENDERER"]:
        pytest.skip("the 1 GiB texture limit is llvmpipe's")
    probe = ImmersiveRenderer(r)
    try:
        assert probe._table_target((16384, 16384)) is None
        assert r.ctx.error == "GL_NO_ERROR"
    finally:
        probe.release()
    # The same fallback at a small size, the GL's refusal simulated.
    monkeypatch.setattr(ImmersiveRenderer, "_table_target", lambda self, size: None)
    scene = _demo_scene()
    spec = Immersive("dome", (320, 320), grid=1)
    kept = ImmersiveRenderer(r)
    try:
        for k in range(3):
            seq = kept.render(scene, 2e5 * k, spec).copy()
            fresh = ImmersiveRenderer(r)
            try:
                assert np.array_equal(seq, fresh.render(scene, 2e5 * k, spec)), f"frame {k}"
            finally:
                fresh.release()
        assert list(kept._tables.values()) == [False]
    finally:
        kept.release()
