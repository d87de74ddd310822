"""Every field of the panels refuses bad input in one line that says what is allowed,
and a refused edit changes nothing: not the scene, not the undo history, not the file.

The fields are driven through the editor calls the panels' typed fields make
(``Widgets.typed_field`` shows ``problems[0]`` of the refusal under the field); the
bad values are common practice for hostile input (no source): no number, a wrong unit,
out of range, not finite, impossible for the orbit or the lock.
"""

from __future__ import annotations

import shutil
from collections.abc import Callable
from pathlib import Path

import pytest

from viewer.gui.editor import Editor, EditRefused
from viewer.units import QuantityError

ROOT = Path(__file__).resolve().parents[1]

#: Words by which a refusal says what would be allowed.
ALLOWED = ("allowed", "must", "at most", "between", "e.g.", "positive", "hold the",
           "unique", "needs", "may not", "above")

Commit = Callable[[Editor, str], object]


def field(name: str) -> Commit:
    return lambda ed, text: ed.set_field(name, text)


CASES: list[tuple[str, Commit, str]] = [
    ("a: no number", field("a"), "abc"),
    ("a: a mass", field("a"), "5 kg"),
    ("a: negative for an ellipse", field("a"), "-5 km"),
    ("a: beyond every length", field("a"), "1e30 km"),
    ("e: negative", field("e"), "-0.1"),
    ("e: a parabola with a held", field("e"), "1"),
    ("i: out of range", field("i"), "200 deg"),
    ("i: a length", field("i"), "5 km"),
    ("raan: not finite", field("raan"), "nan"),
    ("argp: infinite", field("argp"), "inf deg"),
    ("nu: no number", field("nu"), "abc"),
    ("periapsis: above the apoapsis", field("periapsis"), "50000 km"),
    ("periapsis altitude: below the centre", field("periapsis_altitude"), "-7000 km"),
    ("apoapsis altitude: no number", field("apoapsis_altitude"), "x"),
    ("period: negative", field("period"), "-1 h"),
    ("period: a length", field("period"), "5 km"),
    ("name: empty", lambda ed, t: ed.rename(t), ""),
    ("name: taken", lambda ed, t: ed.rename(t), "Wren parking"),
    ("name: control character", lambda ed, t: ed.rename(t), "a\x01"),
    ("sectors: negative interval", lambda ed, t: ed.set_sweep(interval=t), "-1 h"),
    ("sectors: no number", lambda ed, t: ed.set_sweep(interval=t), "abc"),
    ("sectors: no sector", lambda ed, t: ed.set_sweep(count=int(t)), "0"),
    ("centre: negative gm", lambda ed, t: ed.set_center(gm=t), "-1 m3/s2"),
    ("centre: gm without a unit", lambda ed, t: ed.set_center(gm=t), "-1"),
    ("centre: negative radius", lambda ed, t: ed.set_center(radius=t), "-1 km"),
    ("centre: no name", lambda ed, t: ed.set_center(name=t), ""),
    ("epoch: not a date", lambda ed, t: ed.set_epoch(t), "yesterday"),
    ("epoch: month 13", lambda ed, t: ed.set_epoch(t), "2031-13-01"),
]


@pytest.mark.parametrize(("what", "commit", "text"), CASES, ids=[c[0] for c in CASES])
def test_a_refused_field_is_one_line_saying_what_is_allowed_and_changes_nothing(
        tmp_path: Path, what: str, commit: Commit, text: str) -> None:
    path = tmp_path / "mission.toml"
    shutil.copy(ROOT / "scenes" / "earth-mission.toml", path)
    before = path.read_bytes()
    ed = Editor.open(path)
    ed.select(1)  # "Wren transfer": an ellipse with equal-time sectors
    scene, revision = ed.scene, ed.revision
    with pytest.raises((EditRefused, QuantityError)) as refused:
        commit(ed, text)
    err = refused.value
    line = err.problems[0] if isinstance(err, EditRefused) else str(err)
    assert line and "\n" not in line and len(line) < 200, line
    assert any(word in line for word in ALLOWED), line
    assert ed.scene is scene and ed.revision == revision
    assert not ed.dirty and not ed.can_undo
    ed.save()  # nothing to write: the file stays byte for byte
    assert path.read_bytes() == before
