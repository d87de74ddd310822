"""viewer.orbit imports numpy only: never GL, windowing, UI, the time-scale library or
the file-format libraries (ARCHITECTURE.md, the table of packages). Checked in a fresh
interpreter, so nothing imported by other tests can hide an import."""

from __future__ import annotations

import json
import subprocess
import sys
from pathlib import Path

REPO = Path(__file__).resolve().parents[1]
FORBIDDEN = ("moderngl", "pyglet", "imgui_bundle", "erfa", "tomlkit", "PIL", "pyrr")

_PROBE = """
import importlib, json, pkgutil, sys
import viewer.orbit
after_package = sorted({m.split(".")[0] for m in sys.modules})
for info in pkgutil.iter_modules(viewer.orbit.__path__):
    if info.name != "bench":  # the benchmark may compare against scipy, lazily
        importlib.import_module("viewer.orbit." + info.name)
after_modules = sorted({m.split(".")[0] for m in sys.modules})
print(json.dumps({"package": after_package, "modules": after_modules,
                  "stdlib": sorted(sys.stdlib_module_names)}))
"""


def _loaded_in_fresh_interpreter() -> dict[str, list[str]]:
    done = subprocess.run([sys.executable, "-c", _PROBE], cwd=REPO, capture_output=True,
                          text=True, check=True, timeout=60)
    return json.loads(done.stdout)


def test_importing_viewer_orbit_loads_no_gl_window_ui_or_format_library() -> None:
    loaded = _loaded_in_fresh_interpreter()
    for stage in ("package", "modules"):
        assert not set(FORBIDDEN) & set(loaded[stage]), stage


def test_viewer_orbit_needs_nothing_beyond_numpy_and_the_standard_library() -> None:
    loaded = _loaded_in_fresh_interpreter()
    third_party = {name for name in loaded["modules"]
                   if name not in loaded["stdlib"] and not name.startswith("_")}
    assert third_party <= {"numpy", "viewer"}, third_party
