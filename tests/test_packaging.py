"""The wheel carries the shaders, scenes and font inside the package, so a plain
(non-editable) ``pip install .`` finds them through importlib.resources from any folder."""

from __future__ import annotations

import subprocess
import sys
import zipfile
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[1]


@pytest.mark.slow
def test_the_wheel_carries_every_shader_scene_and_the_font(tmp_path: Path) -> None:
    proc = subprocess.run([sys.executable, "-m", "pip", "wheel", "--no-deps",
                           "--no-build-isolation", "-q", "-w", str(tmp_path), str(ROOT)],
                          capture_output=True, text=True)
    if proc.returncode != 0 and "No module named" in proc.stderr:
        pytest.skip("setuptools is not installed in this environment")
    assert proc.returncode == 0, proc.stderr
    (wheel,) = tmp_path.glob("perifocal-*.whl")
    names = set(zipfile.ZipFile(wheel).namelist())
    for shader in (ROOT / "shaders").iterdir():
        assert f"viewer/shaders/{shader.name}" in names
    for scene in (ROOT / "scenes").glob("*.toml"):
        assert f"viewer/scenes/{scene.name}" in names
    assert any(n.startswith("viewer/fonts/") and n.endswith(".ttf") for n in names)
    assert "viewer/cli/__init__.py" in names


def test_resources_are_found_through_the_package() -> None:
    from importlib import resources

    root = resources.files("viewer")
    assert (root / "shaders" / "stroke.vert").is_file()
    assert (root / "scenes" / "demo.toml").is_file()
