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


def test_a_sequence_with_still_layers_is_byte_identical_to_drawing_every_layer(renderer):
    """``render`` copies the layers under the markers from the frame before when they
    are the same (a still camera, still orbits and sectors): every frame must be the
    bytes that drawing all of its layers gives, through hits, misses and changes of
    camera, size and scene."""
    import math

    from viewer.export.bench import busy_scene
    from viewer.geometry.camera import view_for
    from viewer.orbit import AU_M
    from viewer.render.renderer import Renderer
    from viewer.scene.model import Camera

    busy = busy_scene()
    labelled = demo_like_scene()
    turned = Camera(look="angles", elevation_rad=math.radians(35.0), azimuth_rad=-1.2,
                    width_m=busy.camera.width_m, distance_m=3.0 * AU_M)
    # (scene, frame, size, camera): runs of still frames, a camera that moves, a size
    # change, another scene with labels, then back to the first run's layers.
    steps = [(busy, k, (640, 360), None) for k in range(4)]
    steps += [(busy, 4 + k, (640, 360), Camera(
        look="angles", elevation_rad=math.radians(30.0 + 5 * k), azimuth_rad=-1.2,
        width_m=busy.camera.width_m, distance_m=3.0 * AU_M)) for k in range(3)]
    steps += [(busy, 7 + k, (480, 270), turned) for k in range(3)]
    steps += [(labelled, 2 * k, (640, 360), None) for k in range(3)]
    steps += [(busy, 10 + k, (640, 360), None) for k in range(3)]
    reference = Renderer(renderer.ctx)
    copied = 0
    try:
        for scene, k, size, camera in steps:
            t = scene.timeline.time_of_frame(k) if scene is busy else k * 5 * DAY_S
            got = renderer.render(scene, t, size, camera).copy()
            copied += renderer._under.fbo is not None
            view = view_for(scene, t, size, camera)
            fbo = reference.target(size)
            reference.draw(reference.geometry(scene, t, view), fbo, top_row_first=True)
            want = reference.read(fbo, size)
            assert np.array_equal(got, want), (scene.bodies[0].name, k, size, camera)
    finally:
        reference.release()
    # The busy scene's three still runs keep the picture from their second frame on
    # (3 + 2 + 2 frames); the moving camera keeps none.
    assert copied >= 7


def _decoded_rgb(path, size):
    """Every frame of a video as (N, H, W, 3) uint8, decoded by the bundled ffmpeg."""
    import subprocess

    import imageio_ffmpeg

    proc = subprocess.run([imageio_ffmpeg.get_ffmpeg_exe(), "-v", "error", "-i", str(path),
                           "-f", "rawvideo", "-pix_fmt", "rgb24", "-"], capture_output=True)
    assert proc.returncode == 0, proc.stderr.decode()
    w, h = size
    return np.frombuffer(proc.stdout, np.uint8).reshape(-1, h, w, 3)


def test_the_decoded_mp4_shows_each_frame_the_renderer_drew(renderer, tmp_path):
    """A video of the busy scene with a still camera (the layers under the markers kept
    from frame to frame) decodes to the renderer's own frames, each drawn whole, within
    what H.264 at the default quality (CRF 23) and 4:2:0 chroma lose: at least 30 dB of
    PSNR on the whole frame, and where the bodies moved between two frames the decoded
    frame is nearer its own frame than the one before (a picture kept too long fails)."""
    import io

    from viewer.export.bench import busy_scene
    from viewer.export.frames import render_video
    from viewer.geometry.camera import view_for
    from viewer.render.renderer import Renderer

    scene = busy_scene()
    size = (640, 360)
    times = [scene.timeline.time_of_frame(20 * k) for k in range(8)]  # bodies move
    out = tmp_path / "show.mp4"
    render_video(range(len(times)), lambda k: renderer.render(scene, times[k], size), out,
                 size, scene.timeline.fps, stream=io.StringIO())
    reference = Renderer(renderer.ctx)
    try:
        want = []
        for t in times:
            fbo = reference.target(size)
            reference.draw(reference.geometry(scene, t, view_for(scene, t, size, None)), fbo,
                           top_row_first=True)
            want.append(reference.read(fbo, size)[..., :3].astype(np.float64))
    finally:
        reference.release()
    got = _decoded_rgb(out, size).astype(np.float64)
    assert len(got) == len(times)
    for k in range(len(times)):
        mse = np.mean((got[k] - want[k]) ** 2)
        assert 10 * np.log10(255.0 ** 2 / mse) >= 30.0, k
        if k:
            moved = np.any(want[k] != want[k - 1], axis=2)
            assert moved.sum() > 20, k  # the bodies' markers moved
            own = np.abs(got[k] - want[k])[moved].mean()
            before = np.abs(got[k] - want[k - 1])[moved].mean()
            assert own < 0.5 * before, (k, own, before)


def test_read_hands_out_a_kept_array_only_when_nothing_holds_it(renderer, monkeypatch):
    """Frames read back into new arrays are kept and reused once let go (fresh pages
    are slow to fill at 8K): an array or a view of it that is still held is never
    handed out again, so its pixels stay as they were read."""
    import viewer.render.renderer as module

    monkeypatch.setattr(module, "READ_KEEP_BYTES", 0)  # every size kept, for a small test
    scene = demo_like_scene()
    size = (320, 180)
    a = renderer.render(scene, 0.0, size)
    a_pixels = a.copy()
    view = renderer.render(scene, 50 * DAY_S, size)[..., :3]  # only a view held
    b = renderer.render(scene, 100 * DAY_S, size)
    assert len({id(a), id(view.base), id(b)}) == 3
    assert np.array_equal(a, a_pixels)
    assert not np.array_equal(a, b)
    a_address = a.ctypes.data
    del a
    c = renderer.render(scene, 0.0, size)
    assert c.ctypes.data == a_address  # let go, so reused
    assert np.array_equal(c, a_pixels)
    assert view.base is not c and view.base is not b
    assert len(renderer._read_arrays) <= module.READ_ARRAYS_KEPT


def test_a_png_sequence_through_kept_arrays_writes_each_frame_as_drawn(
        renderer, monkeypatch, tmp_path):
    """Through the sequence writer (frames encoding on its threads while the next are
    drawn), kept arrays and kept PNG rows: every file decodes to its own frame."""
    import io

    from PIL import Image

    import viewer.render.renderer as module
    from viewer.export.frames import frame_path, render_sequence

    monkeypatch.setattr(module, "READ_KEEP_BYTES", 0)
    scene = demo_like_scene()
    size = (256, 144)
    times = [k * 9 * DAY_S for k in range(14)]
    addresses = []

    def frame(k: int) -> np.ndarray:
        img = renderer.render(scene, times[k], size)
        addresses.append(img.ctypes.data)
        return img

    render_sequence(range(len(times)), frame, tmp_path, stream=io.StringIO())
    assert len(set(addresses)) < len(times)  # arrays were reused
    monkeypatch.setattr(module, "READ_KEEP_BYTES", 1 << 62)  # new arrays: the reference
    for k, t in enumerate(times):
        with Image.open(frame_path(tmp_path, k, "png")) as img:
            got = np.asarray(img)
        assert np.array_equal(got, renderer.render(scene, t, size)[..., :3]), f"frame {k}"
