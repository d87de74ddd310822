"""The dome's keys: framing in [camera] (and its keyframes), sizes as angles in [dome]."""

from __future__ import annotations

import math

import pytest

from viewer.errors import UserInputError
from viewer.orbit import AU_M
from viewer.scene import load_scene_text
from viewer.scene.timeline import camera_at

BASE = """
[center]
preset = "Sun"
[[body]]
name = "A"
a = "1 au"
"""


def test_dome_framing_and_sizes_are_read_in_si_units() -> None:
    scene = load_scene_text(BASE + """
[camera]
distance = "16 au"
dome_distance = "4 au"
dome_elevation = "45 deg"
dome_tilt = "20 deg"
[dome]
line_width = "0.5 deg"
label_size = "3 deg"
label_scale = 1.5
""")
    cam = scene.camera
    assert cam.distance_m == pytest.approx(16 * AU_M)
    assert cam.immersive_distance_m == pytest.approx(4 * AU_M)
    assert cam.dome_elevation_rad == pytest.approx(math.radians(45))
    assert cam.dome_tilt_rad == pytest.approx(math.radians(20))
    assert scene.dome.line_width_rad == pytest.approx(math.radians(0.5))
    assert scene.dome.label_size_rad == pytest.approx(math.radians(3))
    assert scene.dome.label_scale == 1.5


def test_without_dome_keys_the_dome_keeps_the_contract_framing() -> None:
    cam = load_scene_text(BASE + '[camera]\ndistance = "9 au"\n').camera
    assert cam.immersive_distance_m == pytest.approx(9 * AU_M)
    assert cam.dome_elevation_rad == pytest.approx(math.pi / 2)  # the target at the zenith
    assert cam.dome_tilt_rad == 0.0


def test_keyframes_move_the_dome_framing() -> None:
    scene = load_scene_text(BASE + """
[camera]
dome_distance = "2 au"
dome_elevation = "30 deg"
[[timeline.camera]]
at = "0 s"
ease = "linear"
[[timeline.camera]]
at = "10 s"
ease = "linear"
dome_distance = "8 au"
dome_elevation = "60 deg"
dome_tilt = "20 deg"
""")
    mid = camera_at(scene, 5.0)
    assert mid.immersive_distance_m == pytest.approx(4 * AU_M)      # geometric mean
    assert mid.dome_elevation_rad == pytest.approx(math.radians(45))
    assert mid.dome_tilt_rad == pytest.approx(math.radians(10))


@pytest.mark.parametrize(("text", "needle"), [
    ('[camera]\ndome_tilt = "60 deg"\n', "camera.dome_tilt (line 8): dome_tilt is 0 to 45"),
    ('[camera]\ndome_elevation = "-5 deg"\n', "camera.dome_elevation (line 8)"),
    ('[dome]\nline_width = "3 px"\n', "dome.line_width (line 8): unknown unit 'px'"),
    ('[dome]\nlabel_size = 2.5\nlabel_scale = 50\n', "dome.label_scale"),
    ('[dome]\ncaption_size = "30 deg"\n', "at most 20 deg"),
    ('[[timeline.camera]]\nat = "1 s"\ndome_tilt = "-3 deg"\n', "timeline.camera[0].dome_tilt"),
])
def test_bad_dome_keys_name_the_key_and_what_is_allowed(text: str, needle: str) -> None:
    with pytest.raises(UserInputError) as err:
        load_scene_text(BASE + text, "s.toml")
    assert needle in str(err.value)


def test_dome_keys_survive_a_dump_and_load() -> None:
    from viewer.scene.save import dump_scene

    scene = load_scene_text(BASE + """
[camera]
dome_distance = "3 au"
dome_elevation = "40 deg"
dome_tilt = "15 deg"
[dome]
label_size = "3 deg"
line_scale = 2
[[timeline.camera]]
at = "4 s"
dome_elevation = "60 deg"
""")
    again = load_scene_text(dump_scene(scene))
    assert again.camera == scene.camera
    assert again.dome == scene.dome
    assert again.timeline.camera_keys == scene.timeline.camera_keys
