"""Scene files from strangers: they read only regular files inside their own folder, never
echo a refused file's content, and deep nesting or a FIFO is one clear line (exit 2)."""

from __future__ import annotations

import os
import subprocess
import sys
from pathlib import Path

import pytest

from viewer.cli import main

SUN = '[center]\npreset = "sun"\n'
SECRET = "root:x:0:0:the first line of a private file"
ROWS = f"a [au], e, i [deg], M [deg]\n{SECRET}\n"


def _show(tmp_path: Path, table: str) -> Path:
    show = tmp_path / "show"
    show.mkdir(exist_ok=True)
    path = show / "pop.toml"
    path.write_text(SUN + f'[[population]]\nname = "Belt"\ntable = "{table}"\n')
    return path


def _refused(path: Path, capsys: pytest.CaptureFixture[str], *words: str) -> str:
    code = main(["check", str(path)])
    err = capsys.readouterr().err
    assert code == 2, err
    assert "Traceback" not in err
    assert SECRET not in err and "root:x" not in err  # the content is never printed
    for w in words:
        assert w in err, err
    return err


@pytest.fixture
def outside(tmp_path: Path) -> Path:
    secret = tmp_path / "private.csv"
    secret.write_text(ROWS)
    return secret


def test_a_table_outside_the_folder_is_refused(tmp_path: Path, outside: Path,
                                               capsys: pytest.CaptureFixture[str]) -> None:
    _refused(_show(tmp_path, "../private.csv"), capsys, "population[0].table", "outside")
    _refused(_show(tmp_path, str(outside)), capsys, "absolute")


def test_a_symlink_out_of_the_folder_is_refused(tmp_path: Path, outside: Path,
                                                capsys: pytest.CaptureFixture[str]) -> None:
    path = _show(tmp_path, "link.csv")
    (path.parent / "link.csv").symlink_to(outside)
    _refused(path, capsys, "outside", "links")
    # a link to a folder outside, then a file in it
    (path.parent / "out").symlink_to(tmp_path)
    _refused(_show(tmp_path, "out/private.csv"), capsys, "outside")


def test_a_table_inside_the_folder_and_a_link_within_it_are_read(
        tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    path = _show(tmp_path, "sub/t.csv")
    (path.parent / "sub").mkdir()
    (path.parent / "sub" / "t.csv").write_text("a [au], e, i [deg], M [deg]\n2.5, 0.1, 3, 0\n")
    assert main(["check", str(path)]) == 0
    (path.parent / "inside.csv").symlink_to(path.parent / "sub" / "t.csv")
    assert main(["check", str(_show(tmp_path, "inside.csv"))]) == 0


@pytest.mark.parametrize("text", [
    "x = " + "[" * 5000 + "]" * 5000 + "\n",
    "x = " + "[" * 500 + "]" * 500 + "\n",
    "x = " + "{a = " * 3000 + "1" + "}" * 3000 + "\n",
], ids=["5000 arrays", "500 arrays", "3000 inline tables"])
def test_deep_nesting_is_one_line(tmp_path: Path, text: str,
                                  capsys: pytest.CaptureFixture[str]) -> None:
    path = tmp_path / "deep.toml"
    path.write_text(SUN + text)
    code = main(["check", str(path)])
    err = capsys.readouterr().err
    assert code == 2
    assert "Traceback" not in err and len(err.splitlines()) == 2  # source, one problem


@pytest.mark.skipif(not hasattr(os, "mkfifo"), reason="needs FIFOs (POSIX)")
def test_a_fifo_is_refused_at_once(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    fifo = tmp_path / "scene.toml"
    os.mkfifo(fifo)
    # in a subprocess, so that a hang is a failed test and not a stuck suite
    done = subprocess.run([sys.executable, "-m", "viewer.cli", "check", str(fifo)],
                          capture_output=True, text=True, timeout=60)
    assert done.returncode == 2 and "regular file" in done.stderr, done.stderr
    table = _show(tmp_path, "t.csv")
    os.mkfifo(table.parent / "t.csv")
    _refused(table, capsys, "regular file")
    opm = tmp_path / "in.opm"
    os.mkfifo(opm)
    done = subprocess.run([sys.executable, "-m", "viewer.cli", "import", str(opm), "-o",
                           str(tmp_path / "x.toml")], capture_output=True, text=True, timeout=60)
    assert done.returncode == 2 and "regular file" in done.stderr, done.stderr


EARTH = '[center]\npreset = "earth"\n'


def _names_problems(tmp_path: Path, *names: str) -> list[str]:
    from viewer.errors import UserInputError
    from viewer.scene import load_scene_text

    text = EARTH + "".join(f'[[body]]\nname = "{n}"\na = "{7000 + 100 * k} km"\ne = 0\n'
                           for k, n in enumerate(names))
    try:
        load_scene_text(text)
    except UserInputError as err:
        return err.problems
    return []


def test_a_body_may_not_take_the_central_bodys_name(tmp_path: Path) -> None:
    from viewer.orbit import central_body

    earth = central_body("earth").name
    for name in (earth, f"  {earth} ", "center"):
        problems = _names_problems(tmp_path, "Sat", name)
        assert len(problems) == 1 and "body[1].name" in problems[0], problems
    assert _names_problems(tmp_path, "Sat", "Moonlet") == []


def test_names_equal_after_trimming_and_nfc_are_one_name(tmp_path: Path) -> None:
    composed, decomposed = "C\u00e9res", "Ce\u0301res"  # the same name in two Unicode forms
    assert composed != decomposed
    for pair in ((composed, decomposed), ("Sat", " Sat "), ("Sat", "Sat\t")):
        problems = _names_problems(tmp_path, *pair)
        assert len(problems) == 1 and "already the name of body[0]" in problems[0], problems
