"""Property tests: whatever the text of a scene file, loading it either gives a Scene or
raises the project's own UserInputError (exit 2), never another exception, a numpy
floating-point error or a warning."""

from __future__ import annotations

import math
from typing import Any

import numpy as np
import tomlkit
from hypothesis import HealthCheck, assume, given, settings
from hypothesis import strategies as st
from support.broken_scenes import mutated_scene

from viewer.errors import UserInputError
from viewer.scene import Scene, load_scene_text
from viewer.scene.spec import TOP, Key

#: The belt generates 100,000 bodies per load; the fuzz uses the scenes that load in ms.

UNITS = ["au", "km", "m", "Gm", "d", "h", "s", "min", "yr", "deg", "rad", "arcsec",
         "m3/s2", "km3/s2", "d/s", "kg", "", "AU", "parsec", "%"]
NUMBERS = st.one_of(
    st.floats(allow_nan=True, allow_infinity=True),
    st.floats(min_value=-1e3, max_value=1e3),
    st.sampled_from([0.0, -0.0, 1.0, 5e-324, 1e-310, 1e-160, 1e308, -1e308, 0.98, 0.999999,
                     1.0000001, 2**53 + 1.0]),
)
INTS = st.one_of(st.integers(-1000, 1000), st.integers(-2**63, 2**63 - 1),
                 st.sampled_from([0, 1, 2, 6, 1000, 1001, 16, 16384, 5_000_001]))


def _quantity_text(x: float, unit: str) -> str:
    return f"{x!r} {unit}".strip()


TEXT_VALUES = st.one_of(
    st.builds(_quantity_text, NUMBERS, st.sampled_from(UNITS)),
    st.sampled_from(["center", "top", "edge", "angles", "orthographic", "perspective",
                     "sun", "earth", "#7fd0ff", "#fff", "blue", "2030-01-01T00:00:00 TDB",
                     "2030-02-30", "1999-12-31T23:59:60 UTC", "2016-12-31T23:59:60 UTC",
                     "9999-12-31T23:59:59 TT", "0001-01-01", "ECLIPJ2000", "", " ", "x.npy",
                     "x.csv", "nan deg", "-inf au", "1e400 au", "Tarn"]),
    st.text(max_size=12),
)


def _leaf() -> st.SearchStrategy[Any]:
    return st.one_of(NUMBERS, INTS, st.booleans(), TEXT_VALUES,
                     st.lists(st.one_of(NUMBERS, INTS, TEXT_VALUES), max_size=4))


def _table_for(spec: Key, depth: int) -> st.SearchStrategy[dict[str, Any]]:
    """A table whose keys are mostly the format's own (so deep checks run), some not."""
    names = list(spec.names) or ["x"]
    key = st.one_of(st.sampled_from(names), st.sampled_from(names),
                    st.text(alphabet="abcdefghijklmnopqrstuvwxyzAEM_", min_size=1, max_size=8))

    def value_for(name: str) -> st.SearchStrategy[Any]:
        sub = spec.key(name)
        if sub is not None and sub.keys and depth < 3:
            inner = _table_for(sub, depth + 1)
            if sub.kind == "tables":
                return st.one_of(st.lists(inner, max_size=3), inner)
            return st.one_of(inner, _leaf())
        return _leaf()

    return st.dictionaries(key, st.none(), max_size=8).flatmap(
        lambda d: st.fixed_dictionaries({k: value_for(k) for k in d}))


def _load(text: str) -> Scene | None:
    with np.errstate(all="raise"):
        try:
            return load_scene_text(text)
        except UserInputError as err:
            assert err.problems and all(isinstance(p, str) and p for p in err.problems)
            assert all("\n" not in p for p in err.problems), err.problems
            return None


@settings(max_examples=300, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(_table_for(TOP, 0))
def test_random_scene_trees_raise_only_the_scene_error(tree):
    try:
        text = tomlkit.dumps(tree)
    except Exception:  # a tree tomlkit cannot write is no TOML file at all
        assume(False)
        raise
    scene = _load(text)
    if scene is not None:
        for b in scene.bodies:
            assert math.isfinite(float(b.elements.periapsis))






@settings(max_examples=400, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(mutated_scene())
def test_mutated_bundled_scenes_raise_only_the_scene_error(text):
    _load(text)


@settings(max_examples=200, deadline=None)
@given(st.binary(max_size=300))
def test_random_bytes_raise_only_the_scene_error(data):
    from viewer.scene.loader import decode_scene_bytes

    try:
        text = decode_scene_bytes(data, "fuzz")
    except UserInputError:
        return
    _load(text)
