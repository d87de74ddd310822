"""The window and the exporters share one drawing path: a frame drawn bottom-first (as
on a screen) is the same image as one drawn for readback, row for row."""

from __future__ import annotations

import numpy as np
import pytest

from viewer.geometry.camera import view_for
from viewer.orbit import DAY_S
from viewer.render.samples import demo_like_scene

pytestmark = pytest.mark.gl


@pytest.fixture(scope="module")
def renderer():
    from viewer.render import headless_renderer

    with headless_renderer() as r:
        yield r


def _nearly_equal(a, b):
    """Equal but for the rasteriser's tie-breaking on edges that land exactly on pixel
    centres (mirroring the image flips which side wins): one level, in a few pixels."""
    diff = np.abs(a.astype(int) - b.astype(int))
    assert diff.max() <= 1
    assert np.count_nonzero(diff.any(axis=2)) < 0.002 * a.shape[0] * a.shape[1]


@pytest.mark.parametrize("population", [0, 3000])
def test_a_screen_drawn_frame_matches_the_exported_frame(renderer, population):
    scene = demo_like_scene(population=population)
    size = (800, 450)
    t = 42 * DAY_S
    exported = renderer.render(scene, t, size)
    # A renderbuffer target, as a window's screen: no direct backdrop write, y up.
    ctx = renderer.ctx
    rb = ctx.renderbuffer(size, 4)
    fbo = ctx.framebuffer(color_attachments=[rb])
    try:
        geom = renderer.geometry(scene, t, view_for(scene, t, size))
        renderer.draw(geom, fbo, top_row_first=False)
        raw = np.frombuffer(fbo.read(components=4, alignment=1), np.uint8)
        screen = raw.reshape(size[1], size[0], 4)[::-1]
    finally:
        fbo.release()
        rb.release()
    _nearly_equal(screen, exported)


def test_a_frame_drawn_into_part_of_a_larger_target_matches_a_frame_of_its_own(renderer):
    scene = demo_like_scene(population=2000)
    size = (400, 300)
    alone = renderer.render(scene, 5 * DAY_S, size)
    ctx = renderer.ctx
    tex = ctx.texture((1000, 700), 4)
    fbo = ctx.framebuffer(color_attachments=[tex])
    try:
        fbo.clear(0.0, 0.0, 0.0, 0.0)
        geom = renderer.geometry(scene, 5 * DAY_S, view_for(scene, 5 * DAY_S, size))
        renderer.draw(geom, fbo, top_row_first=True, origin_px=(300, 200))
        raw = np.frombuffer(fbo.read(viewport=(300, 200, 400, 300), components=4,
                                     alignment=1), np.uint8)
        part = raw.reshape(300, 400, 4)
        outside = np.frombuffer(fbo.read(viewport=(0, 0, 300, 200), components=4), np.uint8)
    finally:
        fbo.release()
        tex.release()
    _nearly_equal(part, alone)
    assert not outside.any()  # nothing spilled outside its rectangle
