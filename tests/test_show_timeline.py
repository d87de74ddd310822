"""A show's keyframes: camera moves, fades, captions and the clock, checked on the numbers
and on the rendered pixels."""

from __future__ import annotations

import math

import numpy as np
import pytest

from viewer.orbit import AU_M, DAY_S
from viewer.scene import load_scene_text
from viewer.scene.timeline import (
    camera_at,
    captions_at,
    clock_text,
    ease,
    mark_opacity,
    overlay_at,
    scene_at_show_time,
)

SHOW = """
[scene]
title = "Keyframed show"
epoch = "2030-01-01T00:00:00 TDB"
[center]
preset = "sun"
show = { body = false, label = false }
[[body]]
name = "Wren"
a = "1 au"
e = 0.0
show = { marker = false, label = false }
[camera]
width = "4 au"
[render]
size = [400, 300]
stars = false
labels = true
[timeline]
rate = "10 d/s"
fps = 10
duration = "10 s"
clock = "date"
[[timeline.camera]]
at = "2 s"
width = "4 au"
[[timeline.camera]]
at = "6 s"
width = "1 au"
ease = "linear"
elevation = "30 deg"
azimuth = "-90 deg"
[[timeline.fade]]
body = "Wren"
mark = "orbit"
at = ["1 s", "3 s"]
opacity = [0, 1]
ease = "linear"
[[timeline.caption]]
text = "Hello dome"
start = "4 s"
end = "8 s"
fade = "1 s"
position = "top"
"""


@pytest.fixture(scope="module")
def scene():
    return load_scene_text(SHOW)


def test_eases_start_at_0_end_at_1_and_in_out_is_symmetric() -> None:
    for kind in ("linear", "in", "out", "in-out"):
        assert ease(0.0, kind) == 0.0 and ease(1.0, kind) == 1.0
    assert ease(0.25, "in-out") + ease(0.75, "in-out") == pytest.approx(1.0)
    assert ease(0.5, "in") < 0.5 < ease(0.5, "out")


def test_the_camera_holds_before_the_first_key_and_after_the_last(scene) -> None:
    assert camera_at(scene, 0.0).width_m == pytest.approx(4 * AU_M)
    assert camera_at(scene, 9.0).width_m == pytest.approx(1 * AU_M)
    assert camera_at(scene, 9.0).elevation_rad == pytest.approx(math.radians(30))


def test_a_zoom_moves_geometrically_and_angles_move_evenly(scene) -> None:
    mid = camera_at(scene, 4.0)  # halfway, linear ease
    assert mid.width_m == pytest.approx(2 * AU_M, rel=1e-12)  # sqrt(4 * 1) au
    # From the top view (elevation 90, azimuth 0) to (30, -90): halfway is (60, -45).
    assert mid.elevation_rad == pytest.approx(math.radians(60))
    assert (mid.azimuth_rad - math.radians(-45)) % (2 * math.pi) == pytest.approx(0.0)


def test_a_fade_multiplies_the_mark_and_leaves_others(scene) -> None:
    assert mark_opacity(scene, "Wren", "orbit", 0.0) == 0.0
    assert mark_opacity(scene, "Wren", "orbit", 2.0) == pytest.approx(0.5)
    assert mark_opacity(scene, "Wren", "orbit", 5.0) == 1.0
    assert mark_opacity(scene, "Wren", "label", 0.0) == 1.0


def test_captions_fade_in_and_out_within_their_times(scene) -> None:
    assert captions_at(scene, 3.9) == []
    assert captions_at(scene, 4.5)[0].opacity == pytest.approx(ease(0.5, "in-out"))
    assert captions_at(scene, 6.0)[0].opacity == 1.0
    assert captions_at(scene, 8.0) == []


def test_the_clock_shows_the_scene_date(scene) -> None:
    assert clock_text(scene, 0.0) == "2030-01-01  00:00:00 TDB"
    assert clock_text(scene, 31 * DAY_S) == "2030-02-01  00:00:00 TDB"


@pytest.mark.gl
def test_the_rendered_orbit_follows_the_fade_and_the_zoom(scene) -> None:
    from viewer.export.show import ShowFrames
    from viewer.render import headless_renderer

    with headless_renderer() as r:
        show = ShowFrames(r, scene, (400, 300))
        # Below the clock's corner (the top 40 rows), only the orbit can be lit.
        lit = [int((show.frame(k)[40:, :, :3].max(axis=2) > 40).sum()) for k in (0, 20, 40)]
        assert lit[0] == 0  # the orbit is faded out at 0 s
        top = show.frame(40)  # 4 s: zoomed to 2 au across, seen from 60 deg up
        cols = np.nonzero(top[150, :, :3].max(axis=1) > 40)[0]
    # Along the middle row, the circle of radius 1 au spans 2 au of a 2 au field: the
    # lit pixels reach both edges (within the stroke width).
    assert cols.min() < 6 and cols.max() > 393
    assert lit[1] > lit[0] + 200


@pytest.mark.gl
def test_the_caption_is_drawn_at_the_top_while_it_is_shown(scene) -> None:
    from viewer.export.show import ShowFrames
    from viewer.render import headless_renderer

    with headless_renderer() as r:
        show = ShowFrames(r, scene, (400, 300))
        before = show.frame(35)[..., :3].astype(int)
        during = show.frame(60)[..., :3].astype(int)
    band = slice(0, 60)  # the top band where a "top" caption sits
    centre = slice(120, 280)
    diff = np.abs(during[band, centre] - before[band, centre]).sum()
    assert diff > 1000
    assert overlay_at(scene, 6.0, 0.0)[0].text == "Hello dome"


def test_a_scene_without_keys_is_drawn_as_it_is(scene) -> None:
    from dataclasses import replace

    from viewer.scene.model import Timeline

    plain = replace(scene, timeline=Timeline())
    assert scene_at_show_time(plain, 3.0) is plain


@pytest.mark.parametrize(
    ("snippet", "needle"),
    [
        ('[[timeline.camera]]\nat = "2 s"\nwidht = "1 au"', 'did you mean "width"'),
        ('[[timeline.camera]]\nwidth = "1 au"', 'needs "at"'),
        ('[[timeline.camera]]\nat = "5 s"\n[[timeline.camera]]\nat = "2 s"', "increasing"),
        ('[[timeline.fade]]\nbody = "Nobody"\nat = ["0 s"]\nopacity = [1]', "no body"),
        ('[[timeline.fade]]\nbody = "Wren"\nat = ["0 s", "1 s"]\nopacity = [1]', "one opacity"),
        ('[[timeline.fade]]\nbody = "Wren"\nat = ["0 s"]\nopacity = [1.5]', "from 0 to 1"),
        ('[[timeline.fade]]\nbody = "Wren"\nmark = "orbits"\nat = ["0 s"]\nopacity = [1]',
         'did you mean "orbit"'),
        ('[[timeline.caption]]\ntext = "x"\nstart = "5 s"\nend = "2 s"', "after start"),
        ('[[timeline.caption]]\nstart = "1 s"', 'needs "text"'),
    ],
)
def test_bad_keyframes_are_refused_with_the_key_and_line(snippet: str, needle: str) -> None:
    from viewer.errors import UserInputError

    text = SHOW.split("[[timeline.camera]]")[0] + snippet + "\n"
    with pytest.raises(UserInputError) as err:
        load_scene_text(text, "show.toml")
    assert any(needle in p for p in err.value.problems), err.value.problems
    assert any("line" in p for p in err.value.problems if needle in p)
