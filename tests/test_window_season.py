"""The launch season in the real window under Xvfb: Ctrl+L opens the pork-chop plot of
the solar system's Earth-Mars season, and a click (xdotool) on the least-dv mark makes
that transfer a body of the scene, with the numbers the plot's cell shows."""

from __future__ import annotations

import shutil
from pathlib import Path

import pytest
from support.xwindow import ROOT, Display, click, read_report, running_viewer, wait_for

pytestmark = [
    pytest.mark.window,
    pytest.mark.skipif(shutil.which("Xvfb") is None, reason="Xvfb is not installed"),
]


def test_a_click_on_the_plot_makes_that_transfer(display: Display, tmp_path: Path) -> None:
    scene = tmp_path / "solar.toml"
    shutil.copy(ROOT / "scenes" / "solar-system.toml", scene)
    with running_viewer(display, tmp_path, scene) as (report, origin):
        n = len(read_report(report)["bodies"])  # type: ignore[index]
        display.xdotool("key", "ctrl+l")
        r = wait_for(lambda: (r := read_report(report)) and "least dv" in (
            r.get("season") or {}).get("marks_px", {}) and r, what="the launch season")
        x, y = r["season"]["marks_px"]["least dv"]
        click(display, origin, [x, y, x, y])
        r = wait_for(lambda: (r := read_report(report)) and len(r["bodies"]) == n + 1
                     and r["season"]["rows"] and r, what="the transfer to be added")
        assert r["bodies"][-1] == "Earth to Mars (Lambert)"
        assert r["message"].startswith("added the transfer Earth to Mars departing")
        rows = dict(r["season"]["rows"])
        # The season the window opens on: late 2026 (from memory: the 2026 launch period).
        assert rows["departure"][:7] in ("2026-10", "2026-11", "2026-12")
        assert 8.0 < float(rows["departure C3"].split()[0]) < 12.0
