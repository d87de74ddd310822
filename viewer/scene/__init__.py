"""The scene file format: load, validate, defaults, save (atomic, comment-preserving), schema.

Owns the TOML format of docs/scene-format.md and the frozen Scene of ``model``. May
import viewer.orbit and viewer.units; never GL, windowing or UI. tomlkit (for saving) is
imported only when a scene is saved.

* ``load_scene(path)`` / ``load_scene_text(text)`` -> Scene, or UserInputError listing
  every problem of the file (``loader``; keys in ``spec``).
* ``edit_text``, ``save_edits``, ``save_text``, ``write_atomic``, ``dump_scene``,
  ``save_scene`` (``save``).
* ``scene_summary`` / ``body_summary``: the numbers of ``perifocal check`` (``report``).
* ``viewer.scene.schema.scene_schema()``: the JSON Schema of docs/scene.schema.json.
* ``viewer.scene.bench.bench_scene()``: load timings for ``perifocal bench``.
"""

from .loader import MAX_FILE_BYTES, load_scene, load_scene_text, read_scene_text
from .model import (
    Body,
    BodyShow,
    Camera,
    Center,
    Population,
    RenderSettings,
    Scene,
    Sweep,
    Timeline,
)
from .report import body_summary, scene_summary
from .save import SaveError, dump_scene, edit_text, save_edits, save_scene, save_text, write_atomic

__all__ = [
    "Body", "BodyShow", "Camera", "Center", "MAX_FILE_BYTES", "Population", "RenderSettings",
    "SaveError", "Scene", "Sweep", "Timeline", "body_summary", "dump_scene", "edit_text",
    "load_scene", "load_scene_text", "read_scene_text", "save_edits", "save_scene", "save_text",
    "scene_summary", "write_atomic",
]
