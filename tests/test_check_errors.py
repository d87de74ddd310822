"""Broken scene files: each one exits 2 with a message naming the file and the key or line,
never a traceback, and nothing is written.

The table below is the specification: a file's text (or bytes), and the words its message
must contain (a key path, a line, the fix).
"""

from __future__ import annotations

import os
import re
import subprocess
import sys
from pathlib import Path

import pytest

from viewer.cli import main

OK_CENTER = '[center]\ngm = "1.32712440018e20 m3/s2"\n'


def body(lines: str, center: str = OK_CENTER) -> str:
    return center + '[[body]]\nname = "Tarn"\n' + lines


CASES: list[tuple[str, str | bytes, list[str]]] = [
    # --- TOML syntax
    ("unclosed string", '[scene]\ntitle = "x\n' + OK_CENTER, ["line 2", "not valid TOML"]),
    ("unquoted unit", body("a = 1.2 au\n"), ["line 5", 'a = "1.2 au"']),
    ("unquoted word", OK_CENTER + "[camera]\nprojection = orthographic\n",
     ["line 4", 'projection = "orthographic"']),
    ("key given twice", body('a = "1 au"\ne = 0.1\ne = 0.2\n'), ["line 7", "twice"]),
    ("capitalised boolean", body('a = "1 au"\nshow = { foci = True }\n'),
     ["line 6", "lower case"]),
    # --- structure and types
    ("one body as a table", OK_CENTER + '[body]\nname = "x"\na = "1 au"\n', ["[[body]]"]),
    ("center as an array", '[[center]]\ngm = "1e20 m3/s2"\n', ["center", "one pair"]),
    ("e in quotes", body('a = "1 au"\ne = "0.2"\n'), ["body[0].e", "Tarn", "line 6",
                                                    "without quotes"]),
    ("show is not a table", body('a = "1 au"\nshow = true\n'), ["body[0].show", "table"]),
    ("size as text", body('a = "1 au"\n') + '[render]\nsize = "1920x1080"\n',
     ["render.size", "line 7", "[1920, 1080]"]),
    ("colour name", body('a = "1 au"\ncolor = "blue"\n'), ["body[0].color", "#rrggbb"]),
    ("count not whole", body('a = "1 au"\nsweep = { count = 2.5 }\n'),
     ["body[0].sweep.count", "whole number"]),
    # --- units
    ("mass for a length", body('a = "1.5 kg"\n'), ["body[0].a", "line 5", "kg",
                                                   "m, km, Mm, Gm, au"]),
    ("time for a length", body('a = "3 d"\n'), ["body[0].a", "is a time, not a length"]),
    ("unknown unit name", '[scene]\nunits = { length = "parsec" }\n' + OK_CENTER,
     ["scene.units.length", "parsec", '"au"']),
    ("bare gm is SI, gm as angle", '[center]\ngm = "3 deg"\n', ["center.gm", "angle"]),
    # --- contradictions and ranges
    ("two sizes", body('a = "1 au"\nperiod = "365 d"\n'), ["body[0].period", "line 6",
                                                          "a and period", "exactly one"]),
    ("hyperbolic e with positive a", body('a = "1.2 au"\ne = 1.5\n'),
     ["body[0].e", "e = 1.5", "negative a"]),
    ("negative e", body('a = "1 au"\ne = -0.1\n'), ["body[0].e", "e >= 0"]),
    ("parabola with a", body('a = "1 au"\ne = 1\n'), ["body[0].e", "periapsis"]),
    ("periapsis alone", body('periapsis = "1 au"\n'), ["body[0].periapsis", "e or apoapsis"]),
    ("apoapsis below periapsis", body('periapsis = "2 au"\napoapsis = "1 au"\n'),
     ["body[0].apoapsis", "below periapsis"]),
    ("no size", body('e = 0.1\n'), ["body[0]", "line 3", "no size"]),
    ("two anomalies", body('a = "1 au"\nM = "1 deg"\nnu = "2 deg"\n'),
     ["body[0].nu", "M and nu"]),
    ("inclination beyond 180", body('a = "1 au"\ni = "190 deg"\n'),
     ["body[0].i", "0 to 180 deg"]),
    ("beyond the asymptotes", body('periapsis = "1 au"\ne = 2\nnu = "150 deg"\n'),
     ["body[0].nu", "asymptotes", "120 deg"]),
    ("open orbit sweep without interval", body('periapsis = "1 au"\ne = 2\nsweep = {count=3}\n'),
     ["body[0].sweep", "interval is required"]),
    ("fps zero", OK_CENTER + "[timeline]\nfps = 0\n", ["timeline.fps", "fps > 0"]),
    ("format 2", '[scene]\nformat = 2\n' + OK_CENTER, ["scene.format", "format 1"]),
    # --- NaN and infinity
    ("nan e", body('a = "1 au"\ne = nan\n'), ["body[0].e", "finite"]),
    ("infinite a", body("a = inf\n"), ["body[0].a", "finite"]),
    ("nan in a quantity", body('a = "nan au"\n'), ["body[0].a", "line 5"]),
    # --- missing required keys
    ("missing gm", '[center]\nname = "Star"\n', ["center", "missing gm", "preset"]),
    ("gm and preset", '[center]\ngm = "1e20 m3/s2"\npreset = "sun"\n',
     ["center.gm", "both gm and preset"]),
    ("no center at all", '[scene]\ntitle = "x"\n', ["missing [center]"]),
    ("body without a name", OK_CENTER + '[[body]]\na = "1 au"\n', ["body[0]", "missing name"]),
    ("empty file", "", ["missing [center]"]),
    # --- typos
    ("typo in a body key", body('a = "1 au"\ninclination = "3 deg"\n'),
     ["body[0].inclination", 'did you mean "i"']),
    ("typo in a table name", OK_CENTER + '[camra]\nwidth = "4 au"\n',
     ["camra", 'did you mean "camera"']),
    ("typo in a preset", '[center]\npreset = "earht"\n', ["center.preset", '"earth"']),
    ("camera target typo", body('a = "1 au"\n') + '[camera]\ntarget = "Tran"\n',
     ["camera.target", 'did you mean "Tarn"']),
    ("duplicate body names", body('a = "1 au"\n[[body]]\nname = "Tarn"\na = "2 au"\n'),
     ["body[1].name", "unique"]),
    # --- epochs
    ("no such day", '[scene]\nepoch = "2030-02-30T00:00:00"\n' + OK_CENTER,
     ["scene.epoch", "line 2", "no day 30"]),
    ("unquoted TOML date", '[scene]\nepoch = 2030-01-01T00:00:00\n' + OK_CENTER,
     ["scene.epoch", "in quotes"]),
    ("unknown time scale", '[scene]\nepoch = "2030-01-01T00:00:00 GPS"\n' + OK_CENTER,
     ["scene.epoch", "GPS", "TDB"]),
    # --- not text at all
    ("binary garbage", bytes(range(256)) * 8, ["not a text file"]),
    ("latin-1 text", ('[scene]\ntitle = "Caf\u00e9"\n' + OK_CENTER).encode("latin-1"),
     ["line 2", "not UTF-8"]),
]


def _run(path: Path, capsys) -> tuple[int, str]:
    rc = main(["check", str(path)])
    out = capsys.readouterr()
    return rc, out.err + out.out


def _listing(folder: Path) -> dict[str, tuple[int, int]]:
    return {p.name: (p.stat().st_size, p.stat().st_mtime_ns) for p in folder.iterdir()}


def test_the_table_has_at_least_25_broken_files():
    assert len(CASES) >= 25


@pytest.mark.parametrize("name, content, expected", CASES, ids=[c[0] for c in CASES])
def test_broken_file_exits_2_naming_the_file_and_the_key_or_line(tmp_path, capsys, name,
                                                                  content, expected):
    path = tmp_path / "broken.toml"
    if isinstance(content, bytes):
        path.write_bytes(content)
    else:
        path.write_text(content, encoding="utf-8")
    before = _listing(tmp_path)
    rc, text = _run(path, capsys)
    assert rc == 2, text
    lines = text.splitlines()
    assert lines[0] == f"perifocal: error in {path}"
    assert len(lines) >= 2
    for want in expected:
        assert want in text, f"{name}: {want!r} not in:\n{text}"
    assert "Traceback" not in text
    assert _listing(tmp_path) == before  # nothing written, nothing touched


def test_every_problem_line_names_a_key_or_a_line(tmp_path, capsys):
    # one file with many mistakes: each gets its own line with its own location
    path = tmp_path / "many.toml"
    path.write_text('[scene]\ntitel = "x"\n[center]\nname = "S"\n'
                    '[[body]]\nname = "A"\na = "1 kg"\n[[body]]\nname = "B"\ne = nan\n'
                    '[camera]\nfov = "200 deg"\n')
    rc, text = _run(path, capsys)
    assert rc == 2
    problems = text.splitlines()[1:]
    assert len(problems) == 6, text
    for line in problems:
        assert re.search(r"[(, ]line \d+\)", line), line


def test_missing_file(tmp_path, capsys):
    rc, text = _run(tmp_path / "nothere.toml", capsys)
    assert rc == 2 and "nothere.toml" in text and "no such file" in text
    assert list(tmp_path.iterdir()) == []


def test_a_folder_is_not_a_scene(tmp_path, capsys):
    rc, text = _run(tmp_path, capsys)
    assert rc == 2 and "folder" in text


def test_a_file_over_64_mib_is_refused_before_reading(tmp_path, capsys):
    path = tmp_path / "huge.toml"
    with open(path, "wb") as f:
        f.truncate(65 * 2**20)  # sparse: no 65 MiB of disk needed
    rc, text = _run(path, capsys)
    assert rc == 2 and "65.0 MiB" in text and "at most 64 MiB" in text


def test_population_table_problems_name_the_table_and_row(tmp_path, capsys):
    (tmp_path / "rows.csv").write_text("a [au], e, i [deg]\n2.5, 0.1, 3\n# a comment\n"
                                       "2.6, 1.2, 3\n2.7, 0.1, x\n")
    path = tmp_path / "pop.toml"
    path.write_text(OK_CENTER + '[[population]]\nname = "Belt"\ntable = "rows.csv"\n'
                    '[[population]]\nname = "Gone"\ntable = "missing.npy"\n')
    rc, text = _run(path, capsys)
    assert rc == 2
    assert 'population[0] ("Belt") rows.csv line 5' in text and "not a number" in text
    assert 'population[1] ("Gone") missing.npy' in text and "no such file" in text


@pytest.mark.parametrize("name", ["unquoted unit", "binary garbage", "missing gm"])
def test_a_real_process_prints_no_traceback(tmp_path, name):
    content = dict((c[0], c[1]) for c in CASES)[name]
    path = tmp_path / "broken.toml"
    path.write_bytes(content if isinstance(content, bytes) else content.encode())
    res = subprocess.run([sys.executable, "-m", "viewer.cli", "check", str(path)],
                         capture_output=True, text=True, timeout=60,
                         cwd=Path(__file__).resolve().parents[1],
                         env={**os.environ, "PYTHONWARNINGS": "error"})
    assert res.returncode == 2
    assert res.stderr.startswith(f"perifocal: error in {path}\n")
    assert "Traceback" not in res.stderr and res.stdout == ""
