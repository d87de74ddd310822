"""The new panels and dialogs under Xvfb, driven through the X server with xdotool: the
transfer tab adds its orbit to the scene, the quick answers follow typed input, a bad
epoch is refused in place, File > Open keeps the scene on a bad file, and a render job
shows its progress and cancels while the window stays live.

The X server, the report file and the helpers are those of test_window_open.
"""

from __future__ import annotations

import math
import shutil
import time
from pathlib import Path

import numpy as np
import pytest
from reference_values import KM, MU_EARTH
from support.xwindow import (
    ROOT,
    Display,
    click,
    read_report,
    running_viewer,
    select_all,
    stable_rect,
    type_into,
    wait_for,
)

pytestmark = [
    pytest.mark.window,
    pytest.mark.skipif(shutil.which("Xvfb") is None, reason="Xvfb is not installed"),
]


TWO_CIRCLES = """\
[scene]
title = "Two circles"
epoch = "2030-01-01T00:00:00 TDB"
units = { length = "km", time = "min", angle = "deg" }

[center]
preset = "earth"

[[body]]
name = "Low"
a = "6678.137 km"
e = 0

[[body]]
name = "High"
a = "42164 km"
e = 0
M = "150 deg"

[camera]
width = "110000 km"
"""


@pytest.fixture
def viewer(display: Display, tmp_path: Path):  # type: ignore[no-untyped-def]
    """``perifocal open`` on the two-circle scene: (report path, window origin, scene)."""
    scene = tmp_path / "two.toml"
    scene.write_text(TWO_CIRCLES, encoding="utf-8")
    with running_viewer(display, tmp_path, scene) as (report, origin):
        yield report, origin, scene


def changed_pixels(a: np.ndarray, b: np.ndarray) -> int:
    region = (slice(100, 650), slice(400, 1100))  # the picture between the panels
    return int((np.abs(a[region].astype(int) - b[region].astype(int)).max(axis=2) > 40).sum())


def test_the_transfer_tab_adds_a_hohmann_orbit_that_undo_takes_away(
        display: Display, viewer) -> None:  # type: ignore[no-untyped-def]
    report, origin, _ = viewer
    click(display, origin, read_report(report)["rects"]["tab:Transfer"])
    ui = wait_for(lambda: (r := read_report(report)) and r.get("transfer") and r,
                  what="the transfer tab")
    # Hohmann from 6678.137 km to 42 164 km, vis-viva (computed here): the speed changes
    # at both ends and their sum.
    r1, r2 = 6678.137 * KM, 42_164 * KM
    a = (r1 + r2) / 2
    dv1 = math.sqrt(MU_EARTH * (2 / r1 - 1 / a)) - math.sqrt(MU_EARTH / r1)
    dv2 = math.sqrt(MU_EARTH / r2) - math.sqrt(MU_EARTH * (2 / r2 - 1 / a))
    burns = ui["transfer"]["burns"]
    assert burns[0][:2] == ["departure", f"{dv1 / KM:+.4f} km/s"]
    assert burns[1][:2] == ["arrival", f"{dv2 / KM:+.4f} km/s"]
    assert dict(ui["transfer"]["totals"])["total dv"] == f"{(dv1 + dv2) / KM:.4f} km/s"
    assert ui["mission_warnings"] == []  # both circles are well above the Earth
    assert ui["caution"].startswith("Caution: two-body, Keplerian model only.")
    time.sleep(0.5)
    before = display.screen()

    click(display, origin, ui["rects"]["button:Add to the scene"])
    ui = wait_for(lambda: (r := read_report(report)) and len(r["bodies"]) == 3 and r,
                  what="the transfer body")
    assert ui["bodies"] == ["Low", "High", "Low to High"]
    assert ui["selection"] == 2 and ui["dirty"] is True
    assert ui["message"] == "added Low to High (Ctrl+Z undoes)"
    time.sleep(0.5)
    assert changed_pixels(before, display.screen()) > 300  # the ellipse is drawn

    display.xdotool("key", "ctrl+z")
    ui = wait_for(lambda: (r := read_report(report)) and len(r["bodies"]) == 2 and r,
                  what="the undo")
    assert ui["dirty"] is False


def test_quick_answers_follow_what_is_typed_and_refuse_a_radius_never_reached(
        display: Display, viewer) -> None:  # type: ignore[no-untyped-def]
    report, origin, _ = viewer
    display.xdotool("key", "Down")  # select "High"
    click(display, origin, read_report(report)["rects"]["tab:Quick answers"])
    ui = wait_for(lambda: (r := read_report(report)) and r.get("answers") and
                  r["selection"] == 1 and r, what="the quick answers")
    # Half an orbit of a circle, 0 to 180 deg: half the period (third law, computed here).
    half = math.pi * math.sqrt((42_164 * KM) ** 3 / MU_EARTH)
    assert ui["answers"]["flight"][0][1] == f"{half / 3600:.7g} h  ({half:,.1f} s)"
    type_into(display, origin, ui["rects"]["quick:nu_to"], "90 deg")
    ui = wait_for(lambda: (r := read_report(report)) and r["answers"].get("flight") and
                  r["answers"]["flight"][0][1].endswith(f"({half / 2:,.1f} s)") and r,
                  what="the quarter orbit")
    type_into(display, origin, ui["rects"]["quick:radius"], "20000 km")
    # The answers follow each keystroke ("2000", "20000 k" are refused too): wait for the
    # answer to the whole text.
    refusal = "never at 20,000 km: the orbit is a circle: it stays at 42,164 km"
    ui = wait_for(lambda: (r := read_report(report)) and r["answer_problems"].get(
        "radius") == refusal and r, what="the refusal")
    escape = math.sqrt(2 * MU_EARTH / (42_164 * KM))
    assert dict(ui["answers"]["speed"])["escape speed here"] == f"{escape / KM:.6g} km/s"


def test_a_bad_epoch_is_refused_in_place_and_a_good_one_moves_t_zero(
        display: Display, viewer) -> None:  # type: ignore[no-untyped-def]
    report, origin, _ = viewer
    ui = read_report(report)
    assert ui["epoch"] == "2030-01-01T00:00:00 TDB"
    type_into(display, origin, ui["rects"]["epoch"], "2030-13-01T00:00:00 UTC")
    ui = wait_for(lambda: (r := read_report(report)) and r.get("epoch_error") and r,
                  what="the refusal")
    assert "out of range" in ui["epoch_error"] and ui["epoch"] == "2030-01-01T00:00:00 TDB"
    assert ui["dirty"] is False
    type_into(display, origin, ui["rects"]["epoch"], "2030-06-01T12:00:00 UTC")
    ui = wait_for(lambda: (r := read_report(report)) and r["epoch"].endswith("UTC") and r,
                  what="the new epoch")
    assert ui["epoch"] == "2030-06-01T12:00:00 UTC" and ui["dirty"] is True
    assert "epoch_error" not in ui


def test_file_open_lists_the_problems_of_a_bad_scene_and_keeps_the_current_one(
        display: Display, viewer, tmp_path: Path) -> None:  # type: ignore[no-untyped-def]
    report, origin, scene = viewer
    bad = tmp_path / "bad.toml"
    bad.write_text('[center]\npreset = "earth"\n\n[[body]]\nname = "X"\na = "7000 km"\n'
                   'e = 2.5\nspeed = 3\n', encoding="utf-8")
    display.xdotool("key", "ctrl+o")
    ui = wait_for(lambda: stable_rect(report, "open"), what="the open dialog")
    type_into(display, origin, ui["rects"]["open"], str(bad))
    ui = wait_for(lambda: (r := read_report(report)) and r.get("open_errors") and r,
                  what="the problems")
    assert ui["open_errors"][0] == f"{bad}:"
    assert any("speed" in line for line in ui["open_errors"][1:])
    assert ui["scene"] == str(scene) and ui["bodies"] == ["Low", "High"]
    # The dialog grew around the problems and stays centred: find its input again.
    ui = wait_for(lambda: stable_rect(report, "open"), what="the dialog's new layout")
    type_into(display, origin, ui["rects"]["open"], str(ROOT / "scenes" / "laws.toml"))
    ui = wait_for(lambda: (r := read_report(report)) and r["scene"].endswith("laws.toml")
                  and r, what="the other scene")
    assert ui["message"].startswith("opened ") and ui["dirty"] is False
    assert display.xdotool("search", "--name", "Perifocal").split()  # still one window


def test_a_render_job_shows_its_progress_and_cancels_while_the_window_stays_live(
        display: Display, viewer, tmp_path: Path) -> None:  # type: ignore[no-untyped-def]
    report, origin, _ = viewer
    out = tmp_path / "frames"
    display.xdotool("key", "ctrl+r")
    ui = wait_for(lambda: stable_rect(report, "job"), what="the render dialog")
    click(display, origin, ui["rects"]["job"])
    time.sleep(0.3)
    select_all(display)
    display.xdotool("type", "--delay", "20", f"{out}/")
    display.xdotool("key", "Return")
    ui = wait_for(lambda: (r := read_report(report)) and r.get("job") and
                  r["job"]["done"] >= 20 and r, what="the job's first frames")
    frames_then = ui["frames"]
    assert ui["job"]["state"] == "running" and ui["job"]["total"] == 600
    assert " frames/s, " in ui["job"]["text"] and ui["job"]["text"].endswith(" left")
    # The window keeps drawing and answering input while the job runs.
    display.xdotool("key", "Down")
    ui = wait_for(lambda: (r := read_report(report)) and r["selection"] == 1 and r,
                  what="a selection during the job")
    assert ui["frames"] > frames_then
    ui = wait_for(lambda: stable_rect(report, "button:Cancel"), what="the cancel button")
    click(display, origin, ui["rects"]["button:Cancel"])
    ui = wait_for(lambda: (r := read_report(report)) and r["job"]["state"] == "cancelled"
                  and r, what="the cancel")
    done = ui["job"]["done"]
    assert 20 <= done < 600
    files = sorted(out.iterdir())
    assert 0 < len(files) <= done
    assert all(f.suffix == ".png" and f.read_bytes().endswith(b"IEND\xaeB`\x82")
               for f in files)  # whole files only; no temporary ones left
