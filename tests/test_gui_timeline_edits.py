"""Show edits of the window (viewer.gui.timeline_edits) and its show clock
(viewer.gui.clock): what the scene format allows (docs/scene-format.md, "[timeline]") is
what an edit allows, a refusal is one line and changes nothing, and the clock plays the
show at real time on the export's frame grid."""

from __future__ import annotations

import math
from dataclasses import replace

import pytest

from viewer.gui import timeline_edits as te
from viewer.gui.clock import Clock
from viewer.gui.editor import Editor
from viewer.scene import load_scene_text
from viewer.scene.model import Camera

SCENE = """
[scene]
format = 1
title = "A show"
epoch = "2030-01-01T00:00:00 TDB"

[center]
preset = "sun"

[[body]]
name = "Quill"
a = "1 au"
e = 0.3

[timeline]
rate = "2 d/s"
duration = "20 s"

[[timeline.camera]]
at = "0 s"
width = "4 au"

[[timeline.camera]]
at = "10 s"
width = "2 au"

[[timeline.fade]]
body = "Quill"
mark = "sweep"
at = ["2 s", "4 s"]
opacity = [0, 1]

[[timeline.caption]]
text = "Equal areas"
start = "5 s"
end = "9 s"
"""


@pytest.fixture
def scene():  # type: ignore[no-untyped-def]
    return load_scene_text(SCENE)


def test_a_key_goes_in_time_order_and_refusals_say_what_is_allowed(scene) -> None:  # type: ignore[no-untyped-def]
    tl = scene.timeline
    key = te.key_from_camera(replace(scene.camera, look="top", width_m=3e11), 5.0)
    tl2, j = te.add_camera_key(tl, key)
    assert j == 1 and [k.at_s for k in tl2.camera_keys] == [0.0, 5.0, 10.0]
    assert tl.camera_keys != tl2.camera_keys  # the old timeline is untouched (frozen)
    for bad, words in ((25.0, "outside the show"), (-1.0, "outside the show"),
                       (10.0, "its own time")):
        with pytest.raises(te.TimelineRefused) as err:
            te.add_camera_key(tl, replace(key, at_s=bad))
        assert len(err.value.problems) == 1 and words in err.value.problems[0]
    # A key moves only between its neighbours (the file wants increasing "at").
    with pytest.raises(te.TimelineRefused, match="keys stay in order"):
        te.move_camera_key(tl2, 1, 12.0)
    assert te.move_camera_key(tl2, 1, 7.5).camera_keys[1].at_s == 7.5


def test_camera_values_are_typed_with_units_and_checked(scene) -> None:  # type: ignore[no-untyped-def]
    tl = scene.timeline
    tl2 = te.set_camera_key(scene, tl, 1, "elevation", "30 deg")
    k = tl2.camera_keys[1]
    assert k.elevation_rad == pytest.approx(math.radians(30)) and k.look == "angles"
    assert te.set_camera_key(scene, tl, 1, "width", "1.5 au").camera_keys[1].width_m == \
        pytest.approx(1.5 * 1.495978707e11)  # IAU 2012 au
    assert te.set_camera_key(scene, tl, 1, "target", "Quill").camera_keys[1].target == "Quill"
    for name, text, words in (("elevation", "95 deg", "-90 to 90"),
                              ("fov", "180 deg", "below 180"),
                              ("width", "-2 au", "positive"),
                              ("target", "Nobody", "no body is named"),
                              ("ease", "bounce", "one of")):
        with pytest.raises(te.TimelineRefused, match=words):
            te.set_camera_key(scene, tl, 1, name, text)


def test_fades_keep_increasing_times_and_opacities_0_to_1(scene) -> None:  # type: ignore[no-untyped-def]
    tl = scene.timeline
    assert te.move_fade_point(tl, 0, 1, 6.0).fades[0].at_s == (2.0, 6.0)
    with pytest.raises(te.TimelineRefused, match="times increase"):
        te.move_fade_point(tl, 0, 1, 1.0)
    with pytest.raises(te.TimelineRefused, match="0 .hidden. to 1"):
        te.set_fade_point(tl, 0, 0, 1.5)
    tl2, j = te.add_fade_point(tl, 0, 3.0)
    # Added at the fade's own value there: in-out easing at the middle is 0.5.
    assert j == 1 and tl2.fades[0].opacity[1] == pytest.approx(0.5)
    with pytest.raises(te.TimelineRefused, match="at least one point"):
        te.delete_fade_point(replace(tl, fades=(replace(tl.fades[0], at_s=(2.0,),
                                                        opacity=(1.0,)),)), 0, 0)
    with pytest.raises(te.TimelineRefused, match="no body is named"):
        te.add_fade(scene, tl, "Nobody", "all", [1.0], [1.0])


def test_captions_need_text_and_end_after_they_start(scene) -> None:  # type: ignore[no-untyped-def]
    tl = scene.timeline
    with pytest.raises(te.TimelineRefused, match="needs text"):
        te.set_caption(tl, 0, "text", "   ")
    with pytest.raises(te.TimelineRefused, match="ends after it starts"):
        te.set_caption(tl, 0, "end", "4 s")
    with pytest.raises(te.TimelineRefused, match="end of the show"):
        te.set_caption(tl, 0, "end", "25 s")
    moved = te.move_caption(tl, 0, 10.0).captions[0]
    assert (moved.start_s, moved.end_s) == (10.0, 14.0)  # it keeps its length
    assert te.set_caption(tl, 0, "color", "#ff8000").captions[0].color == \
        pytest.approx((1.0, 128 / 255, 0.0))


def test_a_new_show_and_its_settings(scene) -> None:  # type: ignore[no-untyped-def]
    tl = te.new_show_from_text("30 s", "5 d/s", "25", "date")
    assert (tl.duration_s, tl.rate, tl.fps, tl.frame_count) == (30.0, 5 * 86400.0, 25.0, 750)
    with pytest.raises(te.TimelineRefused, match="frames"):
        te.new_show_from_text("1e6 s", "5 d/s", "1000", "none")
    with pytest.raises(te.TimelineRefused, match="must not be 0"):
        te.new_show_from_text("30 s", "0 d/s", "30", "none")
    # A show cannot be cut shorter than its keys.
    with pytest.raises(te.TimelineRefused, match="at least that long"):
        te.set_show(scene, scene.timeline, "duration", "8 s")


def test_show_edits_undo_and_redo_through_the_editor(scene) -> None:  # type: ignore[no-untyped-def]
    ed = Editor(scene)
    tl, _ = te.add_camera_key(scene.timeline, te.key_from_camera(Camera(), 4.0))
    assert ed.edit_timeline(tl, "key")
    assert len(ed.scene.timeline.camera_keys) == 3 and ed.dirty
    # A drag is one undo step however many frames it moves the key.
    for t in (4.5, 5.0, 5.5):
        ed.edit_timeline(te.move_camera_key(ed.scene.timeline, 1, t), "move", merge=True)
    ed.undo()
    assert ed.scene.timeline.camera_keys[1].at_s == 4.0
    ed.undo()
    assert len(ed.scene.timeline.camera_keys) == 2 and not ed.dirty
    ed.redo()
    ed.redo()
    assert ed.scene.timeline.camera_keys[1].at_s == 5.5


def test_the_show_clock_keeps_real_time_and_the_frame_grid(scene) -> None:  # type: ignore[no-untyped-def]
    c = Clock.for_scene(scene)
    assert c.on_show and c.show_s == 0.0
    c.play()
    # A frame that took 0.4 s of wall time moves the show 0.4 s (frames are dropped,
    # the show is not slowed), and the picture is frame floor(0.4 * 30) = 12.
    assert c.advance(0.4)
    assert c.show_s == pytest.approx(0.4) and c.frame == 12
    assert c.t_s == pytest.approx(scene.timeline.scene_time_at(12 / 30))
    c.speed = 2.0
    c.advance(0.5)
    assert c.show_s == pytest.approx(1.4)
    # At the end the show stops; with loop on it starts again in the loop range.
    c.advance(100.0)
    assert c.show_s == 20.0 and not c.playing
    c.loop, c.loop_range, c.speed = True, (2.0, 4.0), 1.0
    c.play()
    assert c.show_s == 2.0
    c.advance(2.5)
    assert c.playing and c.show_s == pytest.approx(2.5)
    c.seek_show(10.01)
    c.step(1)
    assert c.frame == 301 and c.show_s == pytest.approx(301 / 30)
    c.seek_scene(5 * 86400.0)
    assert not c.on_show and c.show_s == pytest.approx(2.5)


def test_a_saved_show_edit_changes_only_its_own_table(tmp_path, scene) -> None:  # type: ignore[no-untyped-def]
    import difflib

    path = tmp_path / "show.toml"
    text = SCENE.replace('[[timeline.fade]]', '# the sectors come in\n[[timeline.fade]]')
    path.write_text(text, encoding="utf-8")
    ed = Editor.open(path)
    key = te.key_from_camera(replace(ed.scene.camera, look="top", width_m=3e11), 5.0)
    ed.edit_timeline(te.add_camera_key(ed.scene.timeline, key)[0], "key")
    ed.edit_timeline(te.move_fade_point(ed.scene.timeline, 0, 1, 6.0), "move")
    ed.save()
    after = path.read_text(encoding="utf-8")
    diff = [ln for ln in difflib.unified_diff(text.splitlines(), after.splitlines(),
                                              lineterm="", n=0)
            if ln[:1] in "+-" and not ln.startswith(("+++", "---"))]
    removed = [ln[1:] for ln in diff if ln.startswith("-")]
    added = [ln[1:] for ln in diff if ln.startswith("+")]
    # The fade table is rewritten, its comment kept; the new key is a readable table.
    assert removed == ['at = ["2 s", "4 s"]'] or set(removed) <= {
        '[[timeline.fade]]', 'body = "Quill"', 'mark = "sweep"', 'at = ["2 s", "4 s"]',
        'opacity = [0, 1]', ''}
    assert "[[timeline.camera]]" in added and 'at = "5 s"' in added
    assert 'look = "top"' in added and "# the sectors come in" in after
    again = Editor.open(path).scene.timeline
    assert [k.at_s for k in again.camera_keys] == [0.0, 5.0, 10.0]
    assert again.fades[0].at_s == (2.0, 6.0)
    assert again.camera_keys[1].width_m == pytest.approx(3e11)
    assert (tmp_path / "show.toml.bak").exists()


def test_a_render_job_of_a_show_time_range_and_of_a_dome_master(tmp_path, scene) -> None:  # type: ignore[no-untyped-def]
    from viewer.errors import UserInputError
    from viewer.gui.jobs import job_request

    # 4 s to 6 s at 30 frames/s: frames 120 to 179 (the frame at 6 s starts the next part).
    req = job_request(f"{tmp_path}/f/", "", "", scene, from_text="4 s", to_text="6 s")
    assert req.frames == range(120, 180) and req.view == "flat"
    dome = job_request(f"{tmp_path}/d/", "", "", scene, view="dome")
    h = scene.render.size_px[1]
    assert dome.size_px == (h, h) and dome.spec.kind == "dome"
    assert len(dome.frames) == scene.timeline.frame_count
    with pytest.raises(UserInputError, match="outside the show"):
        job_request(f"{tmp_path}/f/", "", "", scene, from_text="4 s", to_text="60 s")
    with pytest.raises(UserInputError, match="ends after it starts"):
        job_request(f"{tmp_path}/f/", "", "", scene, from_text="6 s", to_text="4 s")


AU = 1.495978707e11  # m, IAU 2012 Resolution B2


def test_a_keyed_view_is_stored_as_a_person_would_type_it(tmp_path, scene) -> None:  # type: ignore[no-untyped-def]
    """A view framed with the mouse has values like azimuth -99.99999999999999 deg; the key
    stores the view rounded (4 significant digits, 0.01 deg, azimuth in [0, 360)) so the
    file reads like a hand-written one, and the file's text gives back the very values."""
    cam = replace(scene.camera, look="angles", elevation_rad=math.radians(40.0000001),
                  azimuth_rad=math.radians(-99.99999999999999),
                  target=(0.13112877632134373 * AU, 0.08702643349364793 * AU,
                          0.12927496978785302 * AU), width_m=26.29757785467128 * AU)
    tidy = te.tidy_view(cam, "au")
    assert math.degrees(tidy.azimuth_rad) == pytest.approx(260.0, abs=1e-12)
    assert math.degrees(tidy.elevation_rad) == pytest.approx(40.0, abs=1e-12)
    assert tidy.width_m == pytest.approx(26.3 * AU, rel=1e-15)
    # The target moves by less than 1e-4 of the picture's width (0.2 px at 1920 px).
    moved = math.dist(tidy.target, cam.target)  # type: ignore[arg-type]
    assert 0 < moved < 1e-4 * cam.width_m
    path = tmp_path / "show.toml"
    path.write_text(SCENE, encoding="utf-8")
    ed = Editor.open(path)
    ed.edit_timeline(te.add_camera_key(ed.scene.timeline, te.key_from_camera(tidy, 5.0))[0],
                     "key")
    ed.save()
    text = path.read_text(encoding="utf-8")
    assert 'azimuth = "260 deg"' in text and 'width = "26.3 au"' in text
    assert 'target = ["0.131 au", "0.087 au", "0.129 au"]' in text
    key = Editor.open(path).scene.timeline.camera_keys[1]
    assert (key.azimuth_rad, key.width_m, key.target) == (tidy.azimuth_rad, tidy.width_m,
                                                          tidy.target)


def test_the_show_start_is_typed_as_scene_time_and_saved_in_the_scene_unit(
        tmp_path, scene) -> None:  # type: ignore[no-untyped-def]
    tl = te.set_show(scene, scene.timeline, "start", "180 d")
    assert tl.start_s == 180 * 86400.0
    # An epoch is the offset from the scene epoch (2030-01-01 to 2030-07-01: 181 days).
    tl2 = te.set_show(scene, scene.timeline, "start", "2030-07-01T00:00:00 TDB")
    assert tl2.start_s == 181 * 86400.0
    with pytest.raises(te.TimelineRefused, match="offset from the scene epoch"):
        te.set_show(scene, scene.timeline, "start", "soon")
    path = tmp_path / "show.toml"
    path.write_text(SCENE, encoding="utf-8")
    ed = Editor.open(path)
    ed.edit_timeline(te.set_show(ed.scene, ed.scene.timeline, "start", "180 d"), "start")
    ed.save()
    assert 'start = "180 d"' in path.read_text(encoding="utf-8")
    assert Editor.open(path).scene.timeline.start_s == 180 * 86400.0


def test_mouse_times_snap_to_a_grid_the_axis_can_show() -> None:
    from viewer.gui.panels.timeline import snap, zoom_span

    # 18.7 px per second (a 30 s show on 562 px): steps of 0.5 s are the finest 6 px apart.
    assert snap(11.96, 18.7, 30.0) == 12.0
    assert snap(8.3, 18.7, 30.0) == 8.5
    # Zoomed to 100 px/s: tenths; to 400 px/s: single frames (1/30 s = 13 px).
    assert snap(4.96, 100.0, 30.0) == pytest.approx(5.0)
    assert snap(4.96, 400.0, 30.0) == pytest.approx(149 / 30)
    # Alt held: the frame grid only.
    assert snap(11.96, 18.7, 30.0, free=True) == pytest.approx(359 / 30)
    # Zoom keeps the time under the pointer in place and stays inside the show.
    a, b = zoom_span((0.0, 30.0), 30.0, 3.0, 15.0)  # type: ignore[misc]
    assert b - a == pytest.approx(30 * 0.8 ** 3) and (15 - a) / (b - a) == pytest.approx(0.5)
    a, b = zoom_span((0.0, 30.0), 30.0, 3.0, 0.0)  # type: ignore[misc]
    assert a == 0.0
    assert zoom_span((10.0, 20.0), 30.0, -10.0, 15.0) is None  # out to the whole show
    a, b = zoom_span((0.0, 30.0), 30.0, 40.0, 29.0)  # type: ignore[misc]
    assert b - a == pytest.approx(0.5) and b <= 30.0
