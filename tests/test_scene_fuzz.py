"""Property tests: whatever the text of a scene file, loading it either gives a Scene or
raises the project's own UserInputError (exit 2), never another exception, a numpy
floating-point error or a warning."""

from __future__ import annotations

import math
from pathlib import Path
from typing import Any

import numpy as np
import tomlkit
from hypothesis import HealthCheck, assume, given, settings
from hypothesis import strategies as st

from viewer.errors import UserInputError
from viewer.scene import Scene, load_scene_text
from viewer.scene.spec import TOP, Key

SCENES = Path(__file__).resolve().parents[1] / "scenes"
#: The belt generates 100,000 bodies per load; the fuzz uses the scenes that load in ms.
TEXTS = {p.name: p.read_text() for p in sorted(SCENES.glob("*.toml")) if p.name != "belt.toml"}

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


LITERALS = ["nan", "inf", "-inf", "1e308", "-1e308", "5e-324", "0", "-1", "1", '""', "[]",
            "{}", "true", "false", '"1.5 kg"', '"3 d"', '"2030-01-01"', "1979-05-27T07:32:00Z",
            '"abc"', "[1, 2, 3]", "{ a = 1 }", '"1e-320 deg"', '"1e-320 au"', '"-0 au"',
            '"1e30 au"', "1.5", "0.999999999", "1.0000000001", '"#zzzzzz"', '"center"',
            '["1 au", "2 au"]', "2", "100000", '"-1e6 deg"', '"1e20 d"', '"9e15 s"']


@st.composite
def _mutated(draw) -> str:
    name = draw(st.sampled_from(sorted(TEXTS)))
    lines = TEXTS[name].splitlines()
    for _ in range(draw(st.integers(1, 4))):
        k = draw(st.integers(0, len(lines) - 1))
        op = draw(st.sampled_from(["value", "value", "value", "delete", "duplicate", "swap",
                                   "chars", "truncate"]))
        if op == "value" and "=" in lines[k] and not lines[k].lstrip().startswith("#"):
            key = lines[k].split("=", 1)[0]
            lines[k] = f"{key}= {draw(st.sampled_from(LITERALS))}"
        elif op == "delete":
            del lines[k]
        elif op == "duplicate":
            lines.insert(k, lines[k])
        elif op == "swap":
            j = draw(st.integers(0, len(lines) - 1))
            lines[k], lines[j] = lines[j], lines[k]
        elif op == "chars":
            pos = draw(st.integers(0, len(lines[k])))
            junk = draw(st.text(max_size=4))
            lines[k] = lines[k][:pos] + junk + lines[k][pos:]
        elif op == "truncate":
            lines = lines[:k]
        if not lines:
            break
    return "\n".join(lines) + "\n"


@settings(max_examples=400, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(_mutated())
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
