"""Every bundled scene renders a frame worth showing, and `perifocal render` writes stills."""

from __future__ import annotations

from importlib import resources
from pathlib import Path

import numpy as np
import pytest
from PIL import Image

from viewer.cli import main

pytestmark = pytest.mark.gl

SCENES = sorted(Path(str(resources.files("viewer") / "scenes")).glob("*.toml"))


@pytest.fixture(scope="module")
def renderer():
    from viewer.render import headless_renderer

    with headless_renderer() as r:
        yield r


def test_there_are_bundled_scenes():
    assert len(SCENES) >= 3


@pytest.mark.parametrize("path", SCENES, ids=[p.stem for p in SCENES])
def test_every_bundled_scene_renders_with_its_orbits_and_labels(renderer, path):
    from viewer.geometry.camera import view_for
    from viewer.scene import load_scene

    scene = load_scene(path)
    t = scene.timeline.start_s
    size = (960, 540)
    img = renderer.render(scene, t, size)
    assert img.shape == (540, 960, 4)
    bg = np.round(np.array(scene.render.background) * 255).astype(int)
    lit = np.any(np.abs(img[..., :3].astype(int) - bg) > 40, axis=2)
    assert lit.mean() > 0.002  # orbits, bodies, text: not an empty sky
    # Colour, not only grey: the bodies' own colours reach the picture.
    rgb = img[..., :3].astype(int)
    assert np.count_nonzero(rgb.max(axis=2) - rgb.min(axis=2) > 60) > 200
    geom = renderer.geometry(scene, t, view_for(scene, t, size))
    if scene.render.labels and scene.bodies:
        assert geom.labels, "a scene with labels on shows some"
        for lab in geom.labels[:3]:
            w, asc, desc = renderer.measure(lab.text, lab.size_px)
            x0, y0 = max(int(lab.x_px), 0), max(int(lab.y_px - asc), 0)
            box = img[y0:int(lab.y_px + desc) + 1, x0:int(lab.x_px + w) + 1, :3]
            assert box.size and box.max() > 150, lab.text


def test_render_writes_a_png_of_the_requested_size_at_a_time_offset(tmp_path):
    out = tmp_path / "still.png"
    assert main(["render", str(SCENES[0]), "--at", "12 d", "--size", "320x200", "-o",
                 str(out)]) == 0
    with Image.open(out) as im:
        assert im.size == (320, 200) and im.mode == "RGB"


def test_render_writes_a_transparent_png_and_a_jpeg(tmp_path):
    png = tmp_path / "overlay.png"
    jpg = tmp_path / "still.jpg"
    assert main(["render", str(SCENES[0]), "--transparent", "--size", "320x200", "-o",
                 str(png)]) == 0
    assert main(["render", str(SCENES[0]), "--at", "2030-02-01T00:00:00 UTC", "--size",
                 "320x200", "-o", str(jpg)]) == 0
    with Image.open(png) as im:
        assert im.mode == "RGBA" and np.asarray(im)[0, 0, 3] == 0
    with Image.open(jpg) as im:
        assert im.format == "JPEG" and im.size == (320, 200)


def test_the_same_still_twice_is_the_same_file(tmp_path):
    a, b = tmp_path / "a.png", tmp_path / "b.png"
    for p in (a, b):
        assert main(["render", str(SCENES[0]), "--at", "5 d", "--size", "320x200", "-o",
                     str(p)]) == 0
    assert a.read_bytes() == b.read_bytes()


@pytest.mark.parametrize("flags, names", [
    (["--size", "big"], "--size"),
    (["--size", "0x100"], "--size"),
    (["--at", "3 furlongs"], "--at"),
    (["--at", "2030-13-45T00:00:00 TDB"], "--at"),
    (["--transparent", "-o", "x.jpg"], "--transparent"),
    (["-o", "x.gif"], "-o"),
])
def test_bad_flags_exit_2_naming_the_flag_and_write_nothing(tmp_path, capsys, flags, names,
                                                            monkeypatch):
    monkeypatch.chdir(tmp_path)
    argv = ["render", str(SCENES[0])] + flags
    if "-o" not in flags:
        argv += ["-o", "out.png"]
    assert main(argv) == 2
    err = capsys.readouterr().err
    assert names in err.splitlines()[0] and "Traceback" not in err
    assert list(tmp_path.iterdir()) == []


def test_a_broken_scene_file_exits_2(tmp_path, capsys):
    bad = tmp_path / "bad.toml"
    bad.write_text("[center]\ngm = \"lots\"\n")
    assert main(["render", str(bad), "-o", str(tmp_path / "x.png")]) == 2
    assert "bad.toml" in capsys.readouterr().err
    assert not (tmp_path / "x.png").exists()


def test_with_no_usable_opengl_render_says_in_one_line_what_to_install(tmp_path, capsys,
                                                                       monkeypatch):
    import moderngl

    def no_egl(*args, **kwargs):
        raise Exception("libEGL.so.1: cannot open shared object file")

    monkeypatch.setattr(moderngl, "create_standalone_context", no_egl)
    out = tmp_path / "x.png"
    assert main(["render", str(SCENES[0]), "-o", str(out)]) == 2
    err = capsys.readouterr().err.strip().splitlines()
    assert len(err) == 2 and "OpenGL" in err[0]
    assert "libegl1" in err[1] and "libgl1-mesa-dri" in err[1] and "Traceback" not in err[1]
    assert not out.exists()
