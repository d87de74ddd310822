"""`perifocal demo` with no display: the demo's files land in the output folder."""

from __future__ import annotations

import subprocess
import sys
from pathlib import Path

import pytest

pytestmark = pytest.mark.gl


def test_demo_without_a_display_renders_stills_and_a_video(tmp_path: Path) -> None:
    env = {k: v for k, v in __import__("os").environ.items() if k != "DISPLAY"}
    proc = subprocess.run([sys.executable, "-m", "viewer.cli", "demo", "--out",
                           str(tmp_path / "out")], capture_output=True, text=True, env=env,
                          timeout=300)
    assert proc.returncode == 0, proc.stderr
    assert "no display here" in proc.stderr
    names = sorted(p.name for p in (tmp_path / "out").iterdir())
    assert names == ["demo-dome.png", "demo.mp4", "demo.png", "demo.svg"]
    assert all((tmp_path / "out" / n).stat().st_size > 1000 for n in names)
    assert str(tmp_path / "out") in proc.stdout  # it says where the files are
