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


def _screen_frames(renderer, scene, t, size, clips):
    """Frames drawn as onto a window's screen (a renderbuffer: no direct backdrop write,
    rows counted from the bottom, read back that way), one per entry of ``clips``: the
    ``clip_px`` to draw with, each over a target filled with magenta."""
    ctx = renderer.ctx
    rb = ctx.renderbuffer(size, 4)
    fbo = ctx.framebuffer(color_attachments=[rb])
    out = []
    try:
        geom = renderer.geometry(scene, t, view_for(scene, t, size))
        for clip in clips:
            fbo.clear(1.0, 0.0, 1.0, 1.0)
            renderer.draw(geom, fbo, top_row_first=False, clip_px=clip)
            raw = np.frombuffer(fbo.read(components=4, alignment=1), np.uint8)
            out.append(raw.reshape(size[1], size[0], 4))
    finally:
        fbo.release()
        rb.release()
    return out


@pytest.mark.parametrize("population", [0, 3000])
def test_a_screen_drawn_frame_matches_the_exported_frame(renderer, population):
    scene = demo_like_scene(population=population)
    size = (800, 450)
    t = 42 * DAY_S
    exported = renderer.render(scene, t, size)
    (screen,) = _screen_frames(renderer, scene, t, size, [None])
    _nearly_equal(screen[::-1], exported)


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


@pytest.mark.parametrize("population", [0, 3000])
def test_a_frame_clipped_to_a_rectangle_leaves_the_rest_untouched(renderer, population):
    """``clip_px`` (the window's picture between its kept panels): outside the rectangle
    every pixel stays as it was, stars included (llvmpipe lets a wide point spill a pixel
    past the scissor, so stars that would cross the edge are left out); inside, away
    from the edge, the frame drawn whole."""
    scene = demo_like_scene(population=population)
    size = (800, 450)
    clip = (130, 70, 500, 300)  # x, y from the bottom, width, height
    whole, clipped = _screen_frames(renderer, scene, 42 * DAY_S, size, [None, clip])
    x, y, w, h = clip  # rows of the read-back count from the bottom, as GL's do
    outside = np.ones(size[::-1], dtype=bool)
    outside[y:y + h, x:x + w] = False
    assert (clipped[outside] == (255, 0, 255, 255)).all()
    m = 6  # a star's width: those crossing the edge are not drawn
    inner = (slice(y + m, y + h - m), slice(x + m, x + w - m))
    assert np.array_equal(clipped[inner], whole[inner])
    assert (whole[inner][..., :3].max(axis=2) > 60).sum() > 500  # orbits and labels there


def test_the_same_frame_asked_again_is_the_same_geometry_and_any_change_is_a_new_one(renderer):
    """Renderer.geometry hands back the frame it made last for the same scene object,
    time, view and overlay (a window refreshing one show frame), and makes a new one
    when any of them changes: there a label box kept clear of panels."""
    from dataclasses import replace

    from viewer.scene.timeline import OverlayText

    scene = demo_like_scene()
    view = view_for(scene, 10 * DAY_S, (480, 270))
    caption = (OverlayText("a caption", "bottom", 22.0, (1.0, 1.0, 1.0, 1.0)),)
    first = renderer.geometry(scene, 10 * DAY_S, view, overlay=caption)
    assert renderer.geometry(scene, 10 * DAY_S, view_for(scene, 10 * DAY_S, (480, 270)),
                             overlay=caption) is first
    boxed = replace(view, label_box_px=(200.0, 0.0, 480.0, 270.0))
    for other in (renderer.geometry(scene, 11 * DAY_S, view, overlay=caption),
                  renderer.geometry(scene, 10 * DAY_S, boxed, overlay=caption),
                  renderer.geometry(scene, 10 * DAY_S, view),
                  renderer.geometry(replace(scene), 10 * DAY_S, view, overlay=caption)):
        assert other is not first
    # The boxed frame is its own: placed for the box (a body's name slid inside it).
    boxed_geom = renderer.geometry(scene, 10 * DAY_S, boxed, overlay=caption)
    names = {b.name for b in scene.bodies}

    def body_labels(geom):
        return {lb.text: lb.x_px for lb in geom.labels if lb.text in names}

    assert min(body_labels(first).values()) < 200.0
    assert min(body_labels(boxed_geom).values()) >= 200.0
