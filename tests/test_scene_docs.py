"""docs/scene-format.md documents every key of the format, and its examples are valid."""

from __future__ import annotations

import json
import re
from pathlib import Path

import pytest

from viewer.scene import load_scene_text, scene_summary
from viewer.scene.spec import TOP, Key

DOC = (Path(__file__).resolve().parents[1] / "docs" / "scene-format.md").read_text()


def _section(title: str) -> str:
    start = DOC.index(f"\n## {title}\n")
    end = DOC.find("\n## ", start + 1)
    return DOC[start:end if end > 0 else None]


def _documented(spec: Key, text: str, path: str) -> list[str]:
    missing = [f"{path}.{k.name}" for k in spec.keys if f"`{k.name}`" not in text]
    for k in spec.keys:
        if k.keys:
            missing += _documented(k, text, f"{path}.{k.name}")
    return missing


@pytest.mark.parametrize("table", TOP.keys, ids=[k.name for k in TOP.keys])
def test_every_key_is_documented_in_its_section(table):
    title = f"`[[{table.name}]]`" if table.kind == "tables" else f"`[{table.name}]`"
    assert _documented(table, _section(title), table.name) == []


def _toml_blocks() -> list[str]:
    return re.findall(r"```toml\n(.*?)```", DOC, flags=re.S)


def test_the_docs_have_full_examples():
    assert len([b for b in _toml_blocks() if "[center]" in b]) >= 3


@pytest.mark.parametrize("block", [b for b in _toml_blocks() if "[center]" in b])
def test_every_full_example_in_the_docs_loads(block):
    scene = load_scene_text(block)
    assert scene.bodies or scene.populations


def test_the_documented_check_json_has_the_real_keys():
    documented = json.loads(re.search(r"```json\n(.*?)```", _section("`check --json`"),
                                      flags=re.S).group(1))
    full = next(b for b in _toml_blocks() if "Tarn" in b)
    real = scene_summary(load_scene_text(full))
    assert set(documented) == set(real)
    assert set(documented["bodies"][0]) == set(real["bodies"][0])
    assert set(documented["center"]) == set(real["center"])
