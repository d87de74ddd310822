"""Choreography of a show: time-rate keys ([[timeline.pace]]), camera paths that pass
through their keyframes (path = "smooth"), sectors revealed as they are swept, and stills
at a show time (render --show-at).

References: scipy.integrate.quad for the integral of the eased pace; the cubic Hermite
basis and the Catmull-Rom tangent (Catmull & Rom 1974, "A class of local interpolating
splines"; the finite-difference tangent of non-uniform keys, from memory) for the smooth
camera; the second law (area swept in dt is pi a b dt / T, Vallado 4th ed. sec. 2.2) for
the revealed sectors, measured in pixels.
"""

from __future__ import annotations

import math
from dataclasses import replace
from pathlib import Path

import numpy as np
import pytest
from scipy.integrate import quad

from viewer.cli import main
from viewer.errors import UserInputError
from viewer.orbit import AU_M, DAY_S
from viewer.scene import dump_scene, edit_text, load_scene_text
from viewer.scene.model import EASE_CURVES, RateKey, Timeline
from viewer.scene.spec import EASES
from viewer.scene.timeline import camera_at
from viewer.units.forms import ShowTimeError, parse_show_time

SHOW = """
[scene]
title = "Choreographed show"
epoch = "2030-01-01T00:00:00 TDB"

[center]
preset = "sun"
show = { body = false, label = false }

[[body]]
name = "Quill"
a = "1 au"
e = 0.5
color = "#7fd0ff"
show = { label = false }
sweep = { count = 6, color = "#ffb347", opacity = 0.5, reveal = "swept" }

[camera]
width = "4 au"

[render]
size = [320, 240]
stars = false

[timeline]
rate = "20 d/s"
fps = 10
duration = "20 s"
clock = "date"

[[timeline.pace]]
at = "4 s"
rate = "20 d/s"

[[timeline.pace]]
at = "8 s"
rate = "2 d/s"
ease = "in-out"

[[timeline.pace]]
at = "12 s"
rate = "2 d/s"
ease = "linear"

[[timeline.pace]]
at = "16 s"
rate = "30 d/s"
ease = "out"

[[timeline.camera]]
at = "0 s"
width = "4 au"

[[timeline.camera]]
at = "6 s"
width = "2 au"
azimuth = "40 deg"
elevation = "60 deg"
path = "smooth"

[[timeline.camera]]
at = "10 s"
width = "3 au"
azimuth = "100 deg"
elevation = "30 deg"
path = "smooth"

[[timeline.camera]]
at = "15 s"
width = "4 au"
look = "top"

[[timeline.caption]]
text = "Slow through periapsis"
start = "7 s"
end = "13 s"
"""


@pytest.fixture(scope="module")
def scene():
    return load_scene_text(SHOW)


def _timeline(rate: float, *keys: tuple[float, float, str]) -> Timeline:
    return Timeline(start_s=1.0e6, rate=rate, duration_s=30.0,
                    rate_keys=tuple(RateKey(a, r, e) for a, r, e in keys))


PACES = [
    _timeline(5 * DAY_S, (3.0, 5 * DAY_S, "in-out"), (7.0, 0.25 * DAY_S, "in-out"),
              (11.0, 0.25 * DAY_S, "linear"), (20.0, 9 * DAY_S, "out")),
    _timeline(2 * DAY_S, (4.0, 0.5 * DAY_S, "in")),  # from the base rate at 0 s
    _timeline(-3 * DAY_S, (0.0, -1 * DAY_S, "linear"), (10.0, -8 * DAY_S, "in-out")),
    _timeline(1.0, *[(2.0 * k, 1.0 + k % 3, EASES[k % 4]) for k in range(1, 14)]),
]


# --- the pace -------------------------------------------------------------------------


@pytest.mark.parametrize("tl", PACES)
def test_scene_time_is_the_integral_of_the_eased_rate(tl: Timeline) -> None:
    knots = [k.at_s for k in tl.rate_keys]
    for t in np.linspace(0.0, 30.0, 37):
        expected, _ = quad(tl.rate_at, 0.0, t, points=[k for k in knots if k < t] or None,
                           limit=200, epsabs=0.0, epsrel=1e-13)
        got = tl.scene_time_at(t) - tl.start_s
        assert got == pytest.approx(expected, rel=1e-11, abs=1e-9 * abs(tl.rate))


@pytest.mark.parametrize("kind", EASES)
def test_each_ease_curve_integral_is_the_quadrature_of_its_curve(kind: str) -> None:
    f, integral = EASE_CURVES[kind]
    assert f(0.0) == 0.0 and f(1.0) == 1.0
    for u in (0.1, 0.37, 0.5, 0.9, 1.0):
        assert integral(u) == pytest.approx(quad(f, 0.0, u, epsrel=1e-14)[0], rel=1e-13)


@pytest.mark.parametrize("tl", PACES)
def test_show_time_at_inverts_scene_time_at(tl: Timeline) -> None:
    t = np.linspace(0.0, 30.0, 3001)
    back = tl.show_time_at(tl.scene_time_at(t))
    assert np.max(np.abs(back - t)) < 1e-9
    for x in (0.0, 3.0, 7.25, 29.999):  # scalars come back as floats
        y = tl.show_time_at(tl.scene_time_at(x))
        assert isinstance(y, float) and y == pytest.approx(x, abs=1e-9)
    assert tl.show_time_at(tl.start_s - 10 * abs(tl.rate) * np.sign(tl.rate)) == 0.0


@pytest.mark.parametrize("tl", PACES)
def test_the_rate_reaches_each_key_and_runs_one_way(tl: Timeline) -> None:
    for key in tl.rate_keys:
        assert tl.rate_at(key.at_s) == pytest.approx(key.rate, rel=1e-12)
    rates = tl.rate_at(np.linspace(0.0, 30.0, 2001))
    assert np.all(np.sign(rates) == np.sign(tl.rate))
    steps = np.diff(tl.scene_time_at(np.linspace(0.0, 30.0, 2001)))
    assert np.all(np.sign(steps) == np.sign(tl.rate))


def test_without_pace_keys_frame_k_is_at_start_plus_k_rate_over_fps() -> None:
    tl = Timeline(start_s=-40.0, rate=7.5, fps=24.0)
    k = np.arange(100)
    assert np.array_equal(tl.time_of_frame(k), -40.0 + (k / 24.0) * 7.5)
    assert tl.show_time_at(-40.0 + 12 * 7.5) == 12.0


def test_the_bundled_show_slows_through_its_pace_keys(scene) -> None:
    tl = scene.timeline
    assert tl.rate_at(2.0) == pytest.approx(20 * DAY_S)
    assert tl.rate_at(10.0) == pytest.approx(2 * DAY_S)
    # 0-4 s at 20 d/s, 4-8 s easing to 2 d/s (mean 11 d/s for in-out), 8-10 s at 2 d/s
    assert tl.scene_time_at(10.0) / DAY_S == pytest.approx(80 + 44 + 4, rel=1e-12)
    # frames follow the same map
    assert tl.time_of_frame(100) == tl.scene_time_at(10.0)


# --- smooth camera paths -----------------------------------------------------------------


def _width_au(scene, s: float) -> float:
    return camera_at(scene, s).width_m / AU_M


def _slope(f, s: float, h: float = 1e-4) -> tuple[float, float]:
    """One-sided slopes just before and just after s."""
    return (f(s) - f(s - h)) / h, (f(s + h) - f(s)) / h


def test_a_smooth_path_passes_each_key_exactly_without_stopping(scene) -> None:
    keys = scene.timeline.camera_keys
    for key in keys:
        cam = camera_at(scene, key.at_s)
        if key.width_m is not None:
            assert cam.width_m == pytest.approx(key.width_m, rel=1e-12)
        if key.azimuth_rad is not None:
            assert cam.azimuth_rad == pytest.approx(key.azimuth_rad, abs=1e-12)
    # At 6 s (smooth, between 0 s and 10 s): the velocity is the Catmull-Rom tangent,
    # the same on both sides; width moves in log space, azimuth evenly.
    before, after = _slope(lambda s: math.log(_width_au(scene, s)), 6.0)
    tangent = (math.log(3.0) - math.log(4.0)) / (10.0 - 0.0)
    assert before == pytest.approx(tangent, rel=1e-3) and after == pytest.approx(tangent,
                                                                                rel=1e-3)
    az_before, az_after = _slope(lambda s: camera_at(scene, s).azimuth_rad, 10.0)
    az_tangent = (0.0 - math.radians(40.0)) / (15.0 - 6.0)  # top view: azimuth 0
    assert az_before == pytest.approx(az_tangent, rel=1e-3)
    assert az_after == pytest.approx(az_tangent, rel=1e-3)
    assert abs(az_tangent) > 0.05


def test_an_eased_key_brings_the_camera_to_rest(scene) -> None:
    eased = load_scene_text(SHOW.replace('path = "smooth"', 'path = "eased"'))
    for at in (6.0, 10.0):
        before, after = _slope(lambda s, sc=eased: math.log(_width_au(sc, s)), at)
        assert abs(before) < 1e-3 and abs(after) < 1e-3
        assert _width_au(eased, at) == pytest.approx(_width_au(scene, at), rel=1e-12)
    # The first and the last keys always come to rest: the camera holds outside them.
    before, after = _slope(lambda s: math.log(_width_au(scene, s)), 15.0)
    assert abs(before) < 1e-3 and after == 0.0


def test_a_show_without_smooth_keys_moves_as_before(scene) -> None:
    eased = load_scene_text(SHOW.replace('path = "smooth"\n', ""))
    plain = [k for k in eased.timeline.camera_keys]
    assert all(k.path == "eased" for k in plain)
    # in-out between two eased keys is the smoothstep of the fraction, in log width
    u = 0.3
    s = 6.0 + u * 4.0
    smooth = u * u * (3 - 2 * u)
    assert _width_au(eased, s) == pytest.approx(2.0 * (3.0 / 2.0) ** smooth, rel=1e-12)


# --- sectors revealed as they are swept --------------------------------------------------


def test_the_sectors_drawn_are_those_swept_by_then(scene) -> None:
    body = scene.bodies[0]
    sw = body.sweep
    assert sw.reveal == "swept"
    period = float(body.elements.period)
    assert sw.interval_s == pytest.approx(period / 6)
    for k in range(7):
        at = sw.start_s + k * sw.interval_s
        drawn = scene.swept_at(at).bodies[0].sweep.drawn_s()
        assert len(drawn) == k and all(whole for *_, whole in drawn)
        grown = scene.swept_at(at + 0.25 * sw.interval_s).bodies[0].sweep.drawn_s()
        if k < 6:
            assert len(grown) == k + 1 and not grown[-1][2]
            assert grown[-1][1] == pytest.approx(at + 0.25 * sw.interval_s)
    everything = load_scene_text(SHOW.replace(', reveal = "swept"', ""))
    assert everything.swept_at(0.0) is everything
    assert len(everything.bodies[0].sweep.drawn_s()) == 6


@pytest.mark.gl
def test_a_revealed_sweep_fills_k_sectors_of_pixels_when_k_are_swept(scene) -> None:
    from viewer.render import headless_renderer
    from viewer.scene import Camera

    # Solid sectors, nothing else drawn, a top view of 400 px per au.
    body = scene.bodies[0]
    solid = replace(body, show=replace(body.show, orbit=False, marker=False, label=False),
                    sweep=replace(body.sweep, opacity=1.0))
    still = replace(scene, bodies=(solid,), timeline=Timeline(),
                    render=replace(scene.render, labels=False))
    w, h, px_per_au = 1200, 900, 400.0
    cam = Camera(look="top", width_m=w / px_per_au * AU_M)
    el = solid.elements
    sector_px = (math.pi * float(el.a) * float(el.b) / 6) / AU_M**2 * px_per_au**2
    with headless_renderer() as r:
        for k in (0, 1, 3, 5):
            t = solid.sweep.start_s + k * solid.sweep.interval_s + 1e-6
            img = r.render(still, t, (w, h), cam, transparent=True)
            covered = float(img[..., 3].astype(np.float64).sum() / 255.0)
            assert covered == pytest.approx(k * sector_px, rel=0.01, abs=40.0), k


def test_area_labels_go_only_on_whole_sectors(scene) -> None:
    from viewer.geometry import view_for
    from viewer.geometry.frame import build_frame
    from viewer.render.text import FontCache

    body = scene.bodies[0]
    labelled = replace(scene, bodies=(replace(body, sweep=replace(body.sweep,
                                                                  show_area=True)),))
    fonts = FontCache()
    sw = body.sweep
    t = sw.start_s + 2.5 * sw.interval_s
    geom = build_frame(labelled, t, view_for(labelled, t), fonts.measure, place=False)
    areas = [lab for lab in geom.label_requests if "au" in lab.text]
    assert len(areas) == 2


# --- stills at a show time ----------------------------------------------------------------


@pytest.mark.parametrize(("text", "seconds"), [
    ("12 s", 12.0), ("12", 12.0), ("0.5 min", 30.0), ("1:05", 65.0), ("0:07.5", 7.5),
    ("1:00:00", 3600.0), ("121/30", 121 / 30), (" 3 / 4 ", 0.75),
])
def test_show_times_are_read_in_the_forms_people_type(text: str, seconds: float) -> None:
    assert parse_show_time(text) == seconds


@pytest.mark.parametrize(("text", "needle"), [
    ("-1 s", "before the show"), ("1:75", "below 60"), ("soon", "not a time"),
    ("25 s", "after the end"), ("3/0", "above 0"), ("frame 12", "frame rate"),
    ("2 au", "not a time"),
])
def test_bad_show_times_are_refused_saying_what_is_allowed(text: str, needle: str) -> None:
    with pytest.raises(ShowTimeError) as err:
        parse_show_time(text, 20.0)
    assert needle in str(err.value)
    assert parse_show_time("frame 12", 20.0, fps=30.0) == 12 / 30


@pytest.fixture
def show_file(tmp_path: Path) -> Path:
    path = tmp_path / "show.toml"
    path.write_text(SHOW)
    return path


@pytest.mark.gl
@pytest.mark.parametrize("k", [0, 73, 101, 163])
def test_a_still_at_show_time_k_over_fps_is_frame_k(show_file: Path, tmp_path: Path,
                                                    k: int) -> None:
    from PIL import Image

    still = tmp_path / f"still{k}.png"
    frames = tmp_path / "frames"
    assert main(["render", str(show_file), "--show-at", f"{k}/10", "-o", str(still)]) == 0
    assert main(["render", str(show_file), "--frames", f"{k}:{k + 1}", "-o",
                 f"{frames}/"]) == 0
    (frame,) = [p for p in frames.iterdir() if p.suffix == ".png"]
    a, b = np.asarray(Image.open(still)), np.asarray(Image.open(frame))
    assert a.shape == b.shape and np.array_equal(a, b)
    assert a[..., :3].max() > 100  # a picture, not a blank


@pytest.mark.parametrize(("flags", "needle"), [
    (["--show-at", "soon", "-o", "x.png"], "--show-at"),
    (["--show-at", "21 s", "-o", "x.png"], "after the end"),
    (["--show-at", "2 s", "--at", "3 d", "-o", "x.png"], "give one"),
    (["--show-at", "2 s", "-o", "frames/"], "sequences"),
])
def test_bad_show_at_exits_2_with_one_line(show_file: Path, tmp_path: Path, flags: list[str],
                                           needle: str, capsys: pytest.CaptureFixture[str],
                                           monkeypatch: pytest.MonkeyPatch) -> None:
    monkeypatch.chdir(tmp_path)
    assert main(["render", str(show_file), *flags]) == 2
    err = capsys.readouterr().err
    assert needle in err and "Traceback" not in err
    assert not (tmp_path / "x.png").exists() and not (tmp_path / "frames").exists()


# --- the file: bad input and saving ---------------------------------------------------------


def _line_of(text: str, needle: str, occurrence: int = 0) -> int:
    lines = [i for i, line in enumerate(text.splitlines(), start=1) if line.strip() == needle]
    return lines[occurrence]


def _problems(text: str) -> list[str]:
    with pytest.raises(UserInputError) as err:
        load_scene_text(text, "show.toml")
    return err.value.problems


def test_a_misspelt_target_in_a_keyframe_names_that_keyframe_and_its_line() -> None:
    text = SHOW.replace('at = "10 s"\nwidth = "3 au"', 'at = "10 s"\ntarget = "Quil"\n'
                        'width = "3 au"')
    (problem,) = _problems(text)
    line = _line_of(text, 'target = "Quil"')
    assert problem.startswith(f"timeline.camera[2].target (line {line}): ")
    assert 'did you mean "Quill"' in problem and "camera.target " not in problem


def test_a_keyframe_out_of_order_is_reported_at_its_own_line() -> None:
    text = SHOW.replace('at = "15 s"', 'at = "9 s"')
    (problem,) = _problems(text)
    line = _line_of(text, 'at = "9 s"')
    assert problem.startswith(f"timeline.camera[3].at (line {line}):")
    assert "increasing" in problem and "10 s" in problem


def test_a_pace_key_out_of_order_or_against_the_rate_is_refused_at_its_line() -> None:
    text = SHOW.replace('at = "12 s"\nrate = "2 d/s"', 'at = "6 s"\nrate = "2 d/s"')
    (problem,) = _problems(text)
    line = _line_of(text, 'at = "6 s"')
    assert problem.startswith(f"timeline.pace[2].at (line {line}):")
    text = SHOW.replace('rate = "30 d/s"', 'rate = "-30 d/s"')
    (problem,) = _problems(text)
    line = _line_of(text, 'rate = "-30 d/s"')
    assert problem.startswith(f"timeline.pace[3].rate (line {line}):")
    assert "positive" in problem
    for rate in ('"0 d/s"', "0"):
        (problem,) = _problems(SHOW.replace('rate = "30 d/s"', f"rate = {rate}"))
        assert "nonzero" in problem


def test_look_with_angles_in_a_keyframe_is_refused_as_in_the_camera_table() -> None:
    text = SHOW.replace('at = "15 s"\nwidth = "4 au"\nlook = "top"',
                        'at = "15 s"\nwidth = "4 au"\nlook = "top"\nelevation = "20 deg"')
    (problem,) = _problems(text)
    line = _line_of(text, 'elevation = "20 deg"')
    assert problem.startswith(f"timeline.camera[3].elevation (line {line}):")
    assert 'look = "top" fixes the direction' in problem
    camera = _problems(SHOW.replace('[camera]\nwidth = "4 au"',
                                    '[camera]\nlook = "top"\nelevation = "20 deg"'))
    assert camera[0].split(": ", 1)[1] == problem.split(": ", 1)[1]


@pytest.mark.parametrize(("old", "new", "path"), [
    ('at = "15 s"', 'at = "21 s"', "timeline.camera[3].at"),
    ('at = "16 s"', 'at = "25 s"', "timeline.pace[3].at"),
    ('start = "7 s"', 'start = "22 s"', "timeline.caption[0].start"),
])
def test_key_times_after_the_show_are_refused(old: str, new: str, path: str) -> None:
    text = SHOW.replace(old, new)
    (problem,) = _problems(text)
    assert problem.startswith(f"{path} (line {_line_of(text, new)}):")
    assert "after the end of the show (20 s)" in problem


def test_an_empty_caption_is_refused() -> None:
    text = SHOW.replace('text = "Slow through periapsis"', 'text = "  "')
    (problem,) = _problems(text)
    line = _line_of(text, 'text = "  "')
    assert problem.startswith(f"timeline.caption[0].text (line {line})")


def test_a_caption_past_the_end_of_the_show_is_a_warning_that_check_prints(
        tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    text = SHOW.replace('end = "13 s"', 'end = "24 s"')
    scene = load_scene_text(text, "show.toml")
    line = _line_of(text, 'end = "24 s"')
    (warning,) = [w for w in scene.warnings if "caption" in w]
    assert warning.startswith(f"timeline.caption[0].end (line {line}):")
    assert "after the end of the show" in warning
    path = tmp_path / "show.toml"
    path.write_text(text)
    assert main(["check", str(path)]) == 0
    assert "after the end of the show" in capsys.readouterr().out


def test_pace_paths_and_reveal_survive_save_and_load(scene) -> None:
    again = load_scene_text(dump_scene(scene))
    assert again.timeline.rate_keys == scene.timeline.rate_keys
    assert [k.path for k in again.timeline.camera_keys] == \
        [k.path for k in scene.timeline.camera_keys]
    assert again.bodies[0].sweep.reveal == "swept"
    t = np.linspace(0.0, 20.0, 41)
    assert np.array_equal(again.timeline.scene_time_at(t), scene.timeline.scene_time_at(t))
    text = dump_scene(scene)
    assert text.count("[[timeline.pace]]") == 4 and text.count('path = "smooth"') == 2
    assert 'path = "eased"' not in text  # the default is not written


def test_the_writer_tables_append_as_plain_keyframe_tables(scene) -> None:
    from viewer.scene import writer

    key = replace(scene.timeline.camera_keys[1], at_s=18.0)
    pace = RateKey(19.0, 4 * DAY_S, "linear")
    text = edit_text(SHOW, {"timeline.camera[+]": writer.camera_key_table(key, "au"),
                            "timeline.pace[+]": writer.pace_table(pace)})
    # Every line kept: the edit only inserts the two new tables' lines.
    import difflib

    ops = difflib.SequenceMatcher(a=SHOW.splitlines(), b=text.splitlines()).get_opcodes()
    assert {op for op, *_ in ops} <= {"equal", "insert"}
    inserted = [line for op, _, _, j0, j1 in ops if op == "insert"
                for line in text.splitlines()[j0:j1] if line.strip()]
    assert inserted.count("[[timeline.camera]]") == 1 and inserted.count("[[timeline.pace]]") == 1
    again = load_scene_text(text)
    assert again.timeline.camera_keys[-1] == key
    assert again.timeline.rate_keys[-1] == pace
    for caption in scene.timeline.captions:
        assert load_scene_text(edit_text(SHOW, {"timeline.caption[0]": writer.caption_table(
            caption)})).timeline.captions == scene.timeline.captions


def test_the_svg_diagram_draws_the_sectors_swept_by_its_time(show_file: Path,
                                                             tmp_path: Path) -> None:
    scene = load_scene_text(SHOW)
    sw = scene.bodies[0].sweep
    counts = []
    for k in (1, 4):
        out = tmp_path / f"at{k}.svg"
        t_d = (sw.start_s + k * sw.interval_s) / DAY_S
        assert main(["render", str(show_file), "--at", f"{t_d!r} d", "-o", str(out)]) == 0
        counts.append(out.read_text().count('class="sector"'))
    assert counts == [1, 4]
