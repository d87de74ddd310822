"""Exports from the window draw the show as `perifocal render` does: fades, captions and
the clock apply; the window's own camera replaces the show's camera keyframes."""

from __future__ import annotations

import xml.etree.ElementTree as ET
from pathlib import Path

from viewer.gui.jobs import export_still, still_request, with_camera
from viewer.scene import load_scene_text

SCENE = """
[scene]
title = "Captioned"
epoch = "2030-01-01T00:00:00 TDB"
[center]
preset = "sun"
[[body]]
name = "Wren"
a = "1 au"
[render]
size = [320, 200]
[timeline]
rate = "10 d/s"
[[timeline.camera]]
at = "0 s"
width = "9 au"
[[timeline.caption]]
text = "Hello from the window"
start = "0 s"
end = "10 s"
"""


def test_the_window_camera_replaces_the_show_camera_and_keeps_captions(tmp_path: Path) -> None:
    scene = load_scene_text(SCENE)
    camera = scene.camera.__class__(width_m=2.0e11)
    seen = with_camera(scene, camera)
    assert seen.camera == camera and seen.timeline.camera_keys == ()
    assert seen.timeline.captions == scene.timeline.captions
    request = still_request(str(tmp_path / "v.svg"), "", scene)
    export_still(scene, camera, 5 * 86400.0, request)
    root = ET.parse(tmp_path / "v.svg").getroot()
    texts = {t.text for t in root.iter("{http://www.w3.org/2000/svg}text")}
    assert "Hello from the window" in texts
