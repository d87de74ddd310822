"""One table of marks (viewer.scene.marks): every other list of mark names agrees with it."""

from __future__ import annotations

import dataclasses
import re
from pathlib import Path

from viewer.scene import spec
from viewer.scene.marks import MARKS, NAMES
from viewer.scene.model import BodyShow, MarkOpacity

ROOT = Path(__file__).resolve().parents[1]


def test_what_to_draw_and_the_fade_opacities_have_one_field_per_mark() -> None:
    assert tuple(f.name for f in dataclasses.fields(BodyShow)) == NAMES
    assert tuple(f.name for f in dataclasses.fields(MarkOpacity)) == NAMES


def test_the_show_keys_and_the_fade_marks_come_from_the_table() -> None:
    show = next(k for k in spec.BODY.keys if k.name == "show")
    assert tuple(k.name for k in show.keys) == NAMES
    assert spec.FADE_MARKS == ("all", *NAMES)


def test_the_docs_list_the_same_marks() -> None:
    doc = (ROOT / "docs" / "scene-format.md").read_text(encoding="utf-8")
    fade_row = next(line for line in doc.splitlines() if line.startswith("| `mark` |"))
    allowed = fade_row.split("|")[2]
    assert tuple(re.findall(r"`\"([a-z]+)\"`", allowed)) == ("all", *NAMES)
    for m in MARKS:
        assert f"`{m.name}`" in doc, m.name
