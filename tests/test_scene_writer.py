"""The one scene writer: every typed value it writes loads back to the same float64, and
a whole scene written and loaded again is the same Scene (every key of every bundled
scene, and a scene that uses every key family)."""

from __future__ import annotations

import dataclasses
import math
from pathlib import Path

import numpy as np
import pytest
from hypothesis import given
from hypothesis import strategies as st

from viewer.scene import load_scene, load_scene_text, writer
from viewer.scene.save import dump_scene
from viewer.units import parse_quantity, unit_factor

ROOT = Path(__file__).resolve().parents[1]
BUNDLED = sorted((ROOT / "scenes").glob("*.toml"))
EVERY_KEY = ROOT / "tests" / "data" / "scenes" / "every_key.toml"


@given(st.floats(min_value=-1e21, max_value=1e21, allow_nan=False, allow_infinity=False),
       st.sampled_from([("length", "au"), ("length", "km"), ("angle", "deg"),
                        ("time", "d"), ("gm", "km3/s2"), ("time", "s")]))
def test_a_written_quantity_loads_back_to_the_same_float(x: float, dim_unit: tuple[str, str]
                                                          ) -> None:
    dimension, unit = dim_unit
    text = writer.quantity(x, dimension, unit)
    # Exact where a decimal can be; within one unit of the last place where none can.
    assert math.isclose(parse_quantity(text, dimension), x, rel_tol=2.3e-16, abs_tol=1e-300)
    assert text.endswith(" " + unit)


def test_round_values_are_written_without_division_noise() -> None:
    au = unit_factor("au", "length")
    assert writer.length(1.52 * au, "au") == "1.52 au"
    assert writer.angle(math.radians(28.5)) == "28.5 deg"
    assert writer.duration(86400.0) == "86400 s"
    assert writer.color((1.0, 0.5, 0.0)) == "#ff8000"


def _same(a: object, b: object, path: str) -> None:
    if dataclasses.is_dataclass(a) and not isinstance(a, type):
        assert type(a) is type(b), path
        for f in dataclasses.fields(a):
            if f.name in ("source", "warnings", "kernel"):  # kernel: the same file, reopened
                continue
            _same(getattr(a, f.name), getattr(b, f.name), f"{path}.{f.name}")
    elif isinstance(a, (tuple, list)):
        assert isinstance(b, (tuple, list)) and len(a) == len(b), path
        for k, (x, y) in enumerate(zip(a, b, strict=True)):
            _same(x, y, f"{path}[{k}]")
    elif isinstance(a, np.ndarray) or isinstance(b, np.ndarray):
        np.testing.assert_array_equal(a, b, err_msg=path)
    elif isinstance(a, float) and isinstance(b, float) and math.isnan(a):
        assert math.isnan(b), path
    elif isinstance(a, float) and isinstance(b, float):
        # Epochs are written to the microsecond; a few angles in degrees have no exact
        # decimal, so they come back within a unit of the last place.
        abs_tol = 1e-6 if path.endswith("_s") else 0.0
        assert math.isclose(a, b, rel_tol=4.5e-16, abs_tol=abs_tol), f"{path}: {a!r} != {b!r}"
    else:
        assert a == b, f"{path}: {a!r} != {b!r}"


@pytest.mark.parametrize("path", [*BUNDLED, EVERY_KEY], ids=lambda p: p.name)
def test_a_scene_written_and_loaded_again_is_the_same_scene(path: Path) -> None:
    scene = load_scene(path)
    text = dump_scene(scene)
    again = load_scene_text(text, source=path, base_dir=path.parent)
    generated = [p for p in scene.populations if p.source is None]
    if generated:  # a generated belt's recipe is not kept in the Scene (documented)
        scene = dataclasses.replace(scene, populations=tuple(
            p for p in scene.populations if p.source is not None))
    _same(scene, again, path.name)


def test_a_body_table_appended_to_a_file_loads_as_the_same_body(tmp_path: Path) -> None:
    scene = load_scene(ROOT / "scenes" / "earth-mission.toml")
    for body in scene.bodies:
        stripped = dataclasses.replace(scene, bodies=())
        text = dump_scene(stripped) + "\n" + writer.body_text(scene, body, ["a comment"])
        again = load_scene_text(text, base_dir=tmp_path)
        _same(body, again.bodies[0], body.name)
