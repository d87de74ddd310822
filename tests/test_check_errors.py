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
from support.broken_scenes import CASES, OK_CENTER

from viewer.cli import main


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
