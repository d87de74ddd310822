"""The JSON Schema in docs/: it is what the code generates, every bundled scene passes it
and the loader, and it rejects the structural mistakes the loader rejects."""

from __future__ import annotations

import json
import tomllib
from pathlib import Path

import jsonschema
import pytest
from hypothesis import HealthCheck, given, settings
from support.broken_scenes import CASES, mutated_scene

from viewer.errors import UserInputError
from viewer.scene import load_scene, load_scene_text
from viewer.scene.schema import schema_text

ROOT = Path(__file__).resolve().parents[1]
SCHEMA_FILE = ROOT / "docs" / "scene.schema.json"
BUNDLED = sorted((ROOT / "scenes").glob("*.toml"))


@pytest.fixture(scope="module")
def validator() -> jsonschema.Draft202012Validator:
    schema = json.loads(SCHEMA_FILE.read_text())
    jsonschema.Draft202012Validator.check_schema(schema)
    return jsonschema.Draft202012Validator(schema)


def test_the_schema_file_is_the_generated_one():
    assert SCHEMA_FILE.read_text() == schema_text(), \
        "regenerate it: python -m viewer.scene.schema > docs/scene.schema.json"


def test_there_are_bundled_scenes():
    assert {p.stem for p in BUNDLED} >= {"demo", "laws", "earth-mission", "solar-system",
                                         "belt"}


@pytest.mark.parametrize("path", BUNDLED, ids=[p.stem for p in BUNDLED])
def test_every_bundled_scene_passes_the_loader_and_the_schema(path, validator):
    scene = load_scene(path)
    assert scene.bodies or scene.populations
    errors = [e.message for e in validator.iter_errors(tomllib.loads(path.read_text()))]
    assert errors == []


#: Cases of the broken-file table that are structural (types, unknown keys, missing or
#: conflicting keys, ranges of bare numbers): the schema must reject each, as the loader does.
STRUCTURAL = [
    "one body as a table", "center as an array", "e in quotes", "show is not a table",
    "size as text", "colour name", "count not whole", "two sizes", "negative e",
    "periapsis alone", "two anomalies", "fps zero", "format 2", "missing gm",
    "gm and preset", "no center at all", "body without a name", "empty file",
    "typo in a body key", "typo in a table name", "typo in a preset", "unknown unit name",
]

EXTRA_STRUCTURAL = {
    "apoapsis without periapsis": '[center]\npreset = "sun"\n[[body]]\nname = "X"\n'
                                  'apoapsis = "2 au"\n',
    "periapsis, apoapsis and e": '[center]\npreset = "sun"\n[[body]]\nname = "X"\n'
                                 'periapsis = "1 au"\napoapsis = "2 au"\ne = 0.3\n',
    "population with table and generate":
        '[center]\npreset = "sun"\n[[population]]\nname = "P"\ntable = "x.csv"\n'
        'generate = { count = 3, a = ["2 au", "3 au"] }\n',
    "generate without count": '[center]\npreset = "sun"\n[[population]]\nname = "P"\n'
                              'generate = { a = ["2 au", "3 au"] }\n',
    "quantity that is not a number": '[center]\npreset = "sun"\n[[body]]\nname = "X"\n'
                                     'a = "far away"\n',
    "render size of three": '[center]\npreset = "sun"\n[render]\nsize = [1, 2, 3]\n',
    "unknown key in show": '[center]\npreset = "sun"\n[[body]]\nname = "X"\na = "1 au"\n'
                           "show = { focus = true }\n",
}


def _structural_cases() -> list[tuple[str, str]]:
    table = {name: content for name, content, _ in CASES}
    cases = [(name, table[name]) for name in STRUCTURAL]
    return cases + sorted(EXTRA_STRUCTURAL.items())


@pytest.mark.parametrize("name, text", _structural_cases(), ids=[c[0] for c in
                                                                 _structural_cases()])
def test_the_schema_rejects_what_the_loader_rejects_structurally(name, text, validator):
    with pytest.raises(UserInputError):
        load_scene_text(text)
    assert not validator.is_valid(tomllib.loads(text)), name


def test_the_schema_accepts_a_case_folded_preset_like_the_loader(validator):
    text = '[center]\npreset = "Earth"\n[[body]]\nname = "X"\na = "7000 km"\n'
    load_scene_text(text)
    assert validator.is_valid(tomllib.loads(text))


@settings(max_examples=300, deadline=None,
          suppress_health_check=[HealthCheck.too_slow, HealthCheck.function_scoped_fixture])
@given(text=mutated_scene())
def test_a_file_that_loads_is_never_rejected_by_the_schema(text, validator):
    try:
        load_scene_text(text)
    except UserInputError:
        return
    errors = [e.message for e in validator.iter_errors(tomllib.loads(text))]
    assert errors == [], text
