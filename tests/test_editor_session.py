"""The window's flows without a window: opening another scene (the unsaved-changes prompt
first, the loader's problems in the dialog, the current scene kept), a still of the
current view, and render jobs of the timeline that run while the window stays live.

Render jobs are driven here the way the window drives them: the export pipeline runs on
its worker thread and each frame it asks for is drawn by ``pump`` on this thread. Most
tests draw synthetic frames (a function of the scene time, no GL); the ones marked gl
draw with the real renderer in a headless context.
"""

from __future__ import annotations

import re
import shutil
import time
from dataclasses import replace
from pathlib import Path

import numpy as np
import pytest
from PIL import Image
from reference_values import KM

from viewer.errors import UserInputError
from viewer.export.encode import image_is_complete
from viewer.gui.clock import Clock
from viewer.gui.editor import Editor
from viewer.gui.jobs import RenderJob, job_request, still_request
from viewer.gui.session import Session

ROOT = Path(__file__).resolve().parents[1]


def session_on(path: Path) -> Session:
    ed = Editor.open(path)
    return Session(editor=ed, clock=Clock.for_scene(ed.scene), camera=ed.scene.camera)


@pytest.fixture
def mission(tmp_path: Path) -> Path:
    p = tmp_path / "mission.toml"
    shutil.copy(ROOT / "scenes" / "earth-mission.toml", p)
    return p


def synthetic(t_s: float, size: tuple[int, int] = (64, 36)) -> np.ndarray:
    """A frame that says which scene time it is: a flat grey of t mod 251."""
    img = np.full((size[1], size[0], 4), 255, np.uint8)
    img[..., :3] = int(t_s) % 251
    return img


def run_job(job: RenderJob, draw=synthetic, budget_s: float = 0.05,  # type: ignore[no-untyped-def]
            timeout_s: float = 60.0) -> None:
    end = time.monotonic() + timeout_s
    while job.active and time.monotonic() < end:
        job.pump(draw, budget_s)
    assert job.join(30.0)


# --- opening another scene -------------------------------------------------------------


def test_opening_with_unsaved_changes_asks_first_and_keeping_editing_changes_nothing(
        mission: Path) -> None:
    s = session_on(mission)
    s.editor.set_field("e", "0.2", 0)
    s.request_open()
    assert s.unsaved_for == "open" and not s.open_prompt
    s.unsaved_choice("cancel")
    assert s.unsaved_for == "" and not s.open_prompt and s.editor.dirty


def test_discarding_leads_to_the_dialog_and_a_bad_file_keeps_the_current_scene(
        mission: Path, tmp_path: Path) -> None:
    s = session_on(mission)
    s.editor.set_field("e", "0.2", 0)
    editor, scene = s.editor, s.editor.scene
    s.request_open()
    s.unsaved_choice("discard")
    assert s.open_prompt and s.open_text == str(mission.parent) + "/"
    broken = tmp_path / "broken.toml"
    broken.write_text('[center]\npreset = "earth"\n\n[[body]]\nname = "X"\na = "-5 parsecs"\n'
                      'e = 3\ncolour = "red"\n', encoding="utf-8")
    assert s.open_scene(str(broken)) is False
    assert s.open_errors[0] == f"{broken}:"
    assert len(s.open_errors) >= 3  # one line per problem of the file
    assert all("\n" not in line for line in s.open_errors)
    assert any("colour" in line for line in s.open_errors)
    assert s.editor is editor and s.editor.scene is scene and s.editor.dirty
    assert s.open_scene(str(tmp_path / "missing.toml")) is False
    assert "no such file" in s.open_errors[1]


def test_opening_a_scene_shows_it_from_its_timeline_start_with_its_camera(
        mission: Path) -> None:
    s = session_on(mission)
    s.clock.t_s = 12345.0
    s.camera = replace(s.camera, width_m=1.0)
    assert s.open_scene(str(ROOT / "scenes" / "laws.toml"))
    assert not s.open_prompt and s.message.startswith("opened ")
    assert s.editor.path == ROOT / "scenes" / "laws.toml" and not s.editor.dirty
    assert s.clock.t_s == s.editor.scene.timeline.start_s
    assert s.camera == s.editor.scene.camera


def test_saving_from_the_prompt_saves_then_opens_the_dialog(mission: Path) -> None:
    s = session_on(mission)
    s.editor.set_field("e", "0.2", 0)
    s.request_open()
    s.unsaved_choice("save")
    assert not s.editor.dirty and s.open_prompt
    assert "e = 0.2" in mission.read_text(encoding="utf-8")


def test_quitting_a_scene_with_no_file_asks_for_a_name_before_anything_is_lost() -> None:
    ed = Editor.open(ROOT / "scenes" / "demo.toml")
    ed.path = None
    s = Session(editor=ed, clock=Clock(), camera=ed.scene.camera)
    s.editor.add_body()
    s.request_quit()
    assert s.quit_prompt
    s.unsaved_choice("save")
    assert s.save_as_prompt and not s.quit_now  # save as first; no quitting yet


# --- stills ------------------------------------------------------------------------------


def test_a_still_request_is_checked_before_anything_is_drawn(mission: Path,
                                                             tmp_path: Path) -> None:
    scene = Editor.open(mission).scene
    r = still_request(str(tmp_path / "a.JPEG"), "", scene)
    assert (r.fmt, r.size_px) == ("jpg", (1920, 1080))
    assert still_request(str(tmp_path / "a.svg"), " 800 x 450 ", scene).size_px == (800, 450)
    for path, size, says in ((tmp_path / "a.gif", "", "written as .png, .jpg or .svg"),
                             (tmp_path / "no" / "a.png", "", "does not exist"),
                             (tmp_path / "a.png", "big", "is not a size"),
                             (tmp_path / "a.png", "0x10", "each side must be")):
        with pytest.raises(UserInputError) as err:
            still_request(str(path), size, scene)
        assert says in err.value.problems[0]


def test_an_svg_still_is_drawn_with_the_windows_camera(mission: Path, tmp_path: Path) -> None:
    s = session_on(mission)
    s.camera = replace(s.camera, width_m=55_000 * KM)  # zoomed in twice from the file's
    s.show_still()
    assert s.still_text == str(mission.with_suffix(".png"))
    s.still_text = str(tmp_path / "view.svg")
    s.still_size = "800x450"
    assert s.export_still(), s.still_errors
    assert not s.still_prompt and s.message.startswith(f"wrote {tmp_path / 'view.svg'}")
    svg = (tmp_path / "view.svg").read_text(encoding="utf-8")
    # The Earth (the earth preset's 6378.137 km) across 800 px for 55 000 km.
    radius = re.search(r'<circle cx="400" cy="225" r="([\d.]+)" fill="#4f8fe0"', svg)
    assert radius is not None
    assert float(radius.group(1)) == pytest.approx(6378.137 / 55_000 * 800, abs=0.01)


def test_a_failed_still_stays_in_the_dialog_with_its_reason(mission: Path,
                                                            tmp_path: Path) -> None:
    s = session_on(mission)
    s.show_still()
    s.still_text = str(tmp_path / "view.tiff")
    assert not s.export_still()
    assert s.still_prompt and s.still_errors[0].endswith("a still is written as .png, .jpg "
                                                         "or .svg")


@pytest.mark.gl
def test_a_png_still_is_the_renderers_frame_of_the_current_view(mission: Path,
                                                                tmp_path: Path) -> None:
    from viewer.render import headless_renderer

    s = session_on(mission)
    s.camera = replace(s.camera, width_m=40_000 * KM, look="edge")
    s.clock.t_s = 1800.0
    with headless_renderer() as renderer:
        s.renderer = renderer
        s.show_still()
        s.still_text = str(tmp_path / "view.png")
        s.still_size = "480x270"
        assert s.export_still(), s.still_errors
        seen = renderer.render(replace(s.editor.scene, camera=s.camera), 1800.0, (480, 270))
        file_camera = renderer.render(s.editor.scene, 1800.0, (480, 270))
    png = np.asarray(Image.open(tmp_path / "view.png").convert("RGBA"))
    assert np.array_equal(png[..., :3], seen[..., :3])
    assert not np.array_equal(png[..., :3], file_camera[..., :3])


# --- render jobs -------------------------------------------------------------------------


def test_a_job_request_is_checked_before_it_starts(mission: Path, tmp_path: Path) -> None:
    scene = Editor.open(mission).scene
    assert scene.timeline.frame_count == 660
    r = job_request(str(tmp_path / "frames") + "/", "", "", scene)
    assert (r.kind, r.fmt, r.size_px, r.frames) == ("sequence", "png", (1920, 1080),
                                                   range(660))
    r = job_request(str(tmp_path / "show.mp4"), "640x360", "10:20", scene, quality="draft")
    assert (r.kind, r.size_px, r.frames, r.quality) == ("video", (640, 360), range(10, 20),
                                                        "draft")
    for out, size, frames, says in (("x.gif", "", "", "a folder ending in /"),
                                    ("v.mp4", "641x360", "", "even width"),
                                    ("f/", "", "5:1000", "the timeline has 660"),
                                    ("no/v.mp4", "", "", "does not exist")):
        with pytest.raises(UserInputError) as err:
            job_request(f"{tmp_path}/{out}", size, frames, scene)
        assert says in err.value.problems[0], err.value.problems

def test_a_dome_job_too_large_for_memory_is_refused_before_it_starts(
        mission: Path, tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> None:
    """With 3 GiB free, an 8192 dome sequence (its writer's frames in flight counted)
    is refused on the size field, as `perifocal render` refuses it."""
    import viewer.export.immersive as immersive

    monkeypatch.setattr(immersive, "available_memory_bytes", lambda: 3 * 2**30)
    scene = Editor.open(mission).scene
    with pytest.raises(UserInputError) as err:
        job_request(f"{tmp_path}/big/", "8192x8192", "", scene, view="dome")
    assert err.value.source == "size"
    assert "dome sequence needs about" in err.value.problems[0]


def test_a_sequence_job_writes_each_frame_of_the_timeline_while_the_caller_draws(
        mission: Path, tmp_path: Path) -> None:
    s = session_on(mission)
    s.show_job()
    assert s.job_text == str(mission.with_suffix("")) + "-frames/"
    s.job_text = str(tmp_path / "frames") + "/"
    s.job_frames = "100:112"
    s.job_size = "64x36"
    assert s.start_job(), s.job_errors
    job = s.job
    assert job is not None and job.active and not s.job_prompt
    assert not s.start_job() and "a render is running" in s.job_errors[0]
    run_job(job)
    assert job.state == "done" and (job.done, job.total) == (12, 12)
    assert job.summary.startswith(f"wrote {tmp_path / 'frames'}: 12 frames in ")
    tl = s.editor.scene.timeline
    for k in (100, 111):
        img = np.asarray(Image.open(tmp_path / "frames" / f"frame_{k:06d}.png"))
        assert img[0, 0, 0] == int(tl.time_of_frame(k)) % 251
    assert sorted(p.name for p in (tmp_path / "frames").iterdir()) == [
        f"frame_{k:06d}.png" for k in range(100, 112)]


def test_progress_counts_frames_per_second_and_time_left(tmp_path: Path) -> None:
    now = [0.0]
    scene = Editor.open(ROOT / "scenes" / "earth-mission.toml").scene
    request = job_request(str(tmp_path / "show.mp4"), "64x36", "0:40", scene)
    job = RenderJob(scene, None, request, clock=lambda: now[0])
    try:
        while job.done < 10:
            job.pump(synthetic, 0.0)  # no time to spare: at most the one frame waiting
        now[0] = 2.0
        assert job.done == 10
        assert job.progress_text() == "10/40 frames, 5.0 frames/s, 0:06 left"
        assert job.fraction == 0.25
    finally:
        job.cancel()
        assert job.join(30.0)
    assert job.state == "cancelled" and list(tmp_path.iterdir()) == []


def test_cancelling_a_sequence_leaves_only_whole_frames(mission: Path, tmp_path: Path) -> None:
    scene = Editor.open(mission).scene
    job = RenderJob(scene, None, job_request(str(tmp_path / "f") + "/", "320x180", "", scene))
    while job.done < 5:
        job.pump(lambda t: synthetic(t, (320, 180)), 0.01)
    job.cancel()
    run_job(job)
    assert job.state == "cancelled" and "the frames written so far are whole" in job.summary
    files = list((tmp_path / "f").iterdir())
    assert 1 <= len(files) <= job.done < 660
    assert all(p.suffix == ".png" and image_is_complete(p) for p in files)


def test_cancelling_a_video_leaves_no_file(mission: Path, tmp_path: Path) -> None:
    scene = Editor.open(mission).scene
    out = tmp_path / "show.mp4"
    job = RenderJob(scene, None, job_request(str(out), "64x36", "", scene))
    while job.done < 5:
        job.pump(synthetic, 0.01)
    job.cancel()
    run_job(job)
    assert job.state == "cancelled" and job.summary.endswith("nothing was written")
    assert list(tmp_path.iterdir()) == [mission]


def test_a_frame_that_cannot_be_drawn_ends_the_job_not_the_window(mission: Path,
                                                                  tmp_path: Path) -> None:
    scene = Editor.open(mission).scene
    job = RenderJob(scene, None, job_request(str(tmp_path / "f") + "/", "64x36", "0:5", scene))

    def broken(t_s: float) -> np.ndarray:
        raise RuntimeError("the GL context is gone")

    run_job(job, broken)
    assert job.state == "failed"
    assert job.summary == "not rendered: the frame cannot be drawn: the GL context is gone"


@pytest.mark.gl
def test_a_video_job_through_the_renderer_is_a_whole_mp4(mission: Path, tmp_path: Path) -> None:
    import imageio_ffmpeg

    from viewer.render import headless_renderer

    s = session_on(mission)
    s.camera = replace(s.camera, width_m=60_000 * KM)
    s.show_job()
    s.job_text, s.job_size, s.job_frames = str(tmp_path / "show.mp4"), "320x180", "0:15"
    with headless_renderer() as renderer:
        assert s.start_job(), s.job_errors
        job = s.job
        assert job is not None and job.scene.camera == s.camera  # the window's view
        run_job(job, lambda t: renderer.render(job.scene, t, (320, 180)))
    assert job.state == "done", job.summary
    frames, seconds = imageio_ffmpeg.count_frames_and_secs(str(tmp_path / "show.mp4"))
    assert frames == 15
    assert [p.name for p in tmp_path.iterdir() if p.name != mission.name] == ["show.mp4"]
