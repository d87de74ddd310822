"""The renderer draws a busy scene headlessly, and a frame is a pure function of its inputs."""

from __future__ import annotations

import numpy as np
import pytest

from viewer.orbit import DAY_S
from viewer.render.samples import demo_like_scene

pytestmark = pytest.mark.gl


@pytest.fixture(scope="module")
def renderer():
    from viewer.render import headless_renderer

    with headless_renderer() as r:
        yield r


def test_rerender_of_the_same_scene_and_time_is_byte_identical(renderer):
    scene = demo_like_scene(population=2000)
    a = renderer.render(scene, 30 * DAY_S, (640, 360))
    renderer.render(scene, 200 * DAY_S, (800, 450))  # something else in between
    b = renderer.render(scene, 30 * DAY_S, (640, 360))
    assert a.shape == (360, 640, 4) and a.dtype == np.uint8
    assert np.array_equal(a, b)


def test_frames_at_different_times_differ(renderer):
    scene = demo_like_scene()
    a = renderer.render(scene, 0.0, (640, 360))
    b = renderer.render(scene, 40 * DAY_S, (640, 360))
    assert np.count_nonzero(np.any(a != b, axis=2)) > 50
