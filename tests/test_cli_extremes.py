"""Every command's numeric options fed extreme values (0, negative, 1e+-300, NaN, inf, the
limits and just past them): the answer is one clear refusal with exit 2, or valid output.
Never a traceback, never NaN or infinity printed, and every --json is strict JSON.

The commands run in-process through viewer.cli.main (no subprocess per example).
"""

from __future__ import annotations

import contextlib
import io
import json
import re
from pathlib import Path

import pytest
from hypothesis import HealthCheck, example, given, settings
from hypothesis import strategies as st

from viewer.cli import main

SCENE = """[scene]
epoch = "2030-01-01T00:00:00 UTC"

[center]
preset = "earth"

[[body]]
name = "LEO"
a = "6600 km"
e = 0

[[body]]
name = "GEO"
a = "42164 km"
e = 0

[[body]]
name = "Ellipse"
a = "20000 km"
e = 0.7

[[body]]
name = "Hyp"
a = "-20000 km"
e = 1.5
"""

NUMBERS = ["0", "-0", "1", "-1", "1e300", "-1e300", "1e-300", "-1e-300", "nan", "-nan", "inf",
           "-inf", "1e21", "1.0000001e21", "-1e21", "1e16", "1e17", "-1e16", "1e-3", "360",
           "-1.3356e7", "0.9999999999", "1.0000000001"]
UNITS = ["", " m", " km", " au", " s", " ms", " d", " yr", " deg", " rad", " km/s",
         " m3/s2"]
value = st.builds(lambda n, u: n + u, st.sampled_from(NUMBERS), st.sampled_from(UNITS))
BAD_NUMBER = re.compile(r"(?<![A-Za-z_])(nan|inf|infinity)(?![A-Za-z_])", re.IGNORECASE)


def _refuse_constant(name: str) -> None:
    raise AssertionError(f"JSON holds {name}")


def run(argv: list[str]) -> tuple[int, str, str]:
    out, err = io.StringIO(), io.StringIO()
    with contextlib.redirect_stdout(out), contextlib.redirect_stderr(err):
        try:
            code = main(argv)
        except SystemExit as exit_:  # argparse refusing a flag
            code = int(exit_.code or 0)
    return code, out.getvalue(), err.getvalue()


def check(argv: list[str]) -> None:
    code, out, err = run(argv)
    assert "Traceback" not in err, (argv, err)
    assert code in (0, 2), (argv, code, err)
    if code == 2:
        lines = err.splitlines()
        assert lines and lines[0].startswith("perifocal"), (argv, err)
        assert 2 <= len(lines) <= 4, (argv, err)  # where, then what is wrong
        return
    assert not BAD_NUMBER.search(out.replace("v-infinity", "v-excess")), (argv, out)
    if "--json" in argv:
        json.loads(out, parse_constant=_refuse_constant)


@pytest.fixture(scope="module")
def scene(tmp_path_factory: pytest.TempPathFactory) -> Path:
    path = tmp_path_factory.mktemp("extremes") / "s.toml"
    path.write_text(SCENE)
    return path


FAST = settings(max_examples=60, deadline=None,
                suppress_health_check=[HealthCheck.function_scoped_fixture])
CONVERT_FLAGS = ["--a", "--periapsis", "--e", "--i", "--raan", "--argp", "--nu", "--M"]


# The cases of the hostile-input trial come first, then random ones.
@FAST
@given(picked=st.dictionaries(st.sampled_from(CONVERT_FLAGS), value, min_size=1, max_size=4),
       gm=st.one_of(st.none(), value), json_=st.booleans())
@example(picked={"--a": "1e300 km", "--e": "0.1"}, gm=None, json_=False)
@example(picked={"--a": "-1.3356e7", "--e": "1.5"}, gm=None, json_=True)
@example(picked={"--a": "7000 km", "--e": "0.9999999999", "--nu": "180"}, gm=None, json_=True)
def test_convert_elements(picked: dict[str, str], gm: str | None, json_: bool) -> None:
    base = {"--a": "7000 km", "--e": "0.1"}
    if "--periapsis" in picked:
        base.pop("--a")
    flags = {**base, **picked}
    argv = ["convert", *(["--gm", gm] if gm is not None else ["--center", "earth"])]
    argv += [x for kv in flags.items() for x in kv] + (["--json"] if json_ else [])
    check(argv)


@FAST
@given(r=st.lists(value, min_size=3, max_size=3), v=st.lists(value, min_size=3, max_size=3),
       json_=st.booleans())
@example(r=["1e300", "0", "0"], v=["0", "1", "0"], json_=False)
@example(r=["7000000", "-1e-3", "0"], v=["0", "7500", "0"], json_=True)
def test_convert_state(r: list[str], v: list[str], json_: bool) -> None:
    check(["convert", "--center", "earth", "--r", *r, "--v", *v] + (["--json"] if json_ else []))


@FAST
@given(body=st.sampled_from(["LEO", "Ellipse", "Hyp"]),
       nu=st.one_of(st.none(), st.lists(value, min_size=2, max_size=2)),
       radius=st.one_of(st.none(), value), json_=st.booleans())
@example(body="Hyp", nu=None, radius="1e30 km", json_=False)
@example(body="Hyp", nu=["-1e1", "10"], radius=None, json_=True)
@example(body="LEO", nu=None, radius=None, json_=False)
def test_timing(scene: Path, body: str, nu: list[str] | None, radius: str | None,
                json_: bool) -> None:
    argv = ["timing", str(scene), "--body", body]
    argv += ["--nu", *nu] if nu is not None else []
    argv += ["--radius", radius] if radius is not None else []
    check(argv + (["--json"] if json_ else []))


@FAST
@given(via=st.one_of(st.none(), value), at=st.one_of(st.none(), value), json_=st.booleans(),
       write=st.booleans())
@example(via="1e30 km", at=None, json_=True, write=False)
@example(via="1e30 km", at=None, json_=False, write=True)
@example(via="1e17 km", at=None, json_=False, write=True)
@example(via=None, at="-1e3", json_=True, write=False)
def test_transfer(scene: Path, via: str | None, at: str | None, json_: bool,
                  write: bool) -> None:
    argv = ["transfer", str(scene), "--from", "LEO", "--to", "GEO"]
    argv += ["--via", via] if via is not None else []
    argv += ["--at", at] if at is not None else []
    argv += ["-o", str(scene.parent / "t.toml"), "--force"] if write else []
    check(argv + (["--json"] if json_ else []))


@FAST
@given(start=value, stop=value, step=st.one_of(value, st.just("60 s")))
@example(start="0 s", stop="1e9 d", step="1 d")
@example(start="1e300 d", stop="1e301 d", step="1 d")
def test_ephemeris(scene: Path, start: str, stop: str, step: str) -> None:
    check(["ephemeris", str(scene), "--body", "Ellipse", "--start", start, "--stop", stop,
           "--step", step, "-o", str(scene.parent / "e.oem"), "--force"])


@settings(max_examples=40, deadline=None,
          suppress_health_check=[HealthCheck.function_scoped_fixture])
@given(at=value, size=st.sampled_from(["0x0", "-1x5", "64x36", "1e3x10", "nanxnan",
                                       "99999x99999"]))
@example(at="1e300 d", size="64x36")
@example(at="1e20 d", size="64x36")
def test_render_svg(scene: Path, at: str, size: str) -> None:
    check(["render", str(scene), "--at", at, "--size", size, "-o",
           str(scene.parent / "r.svg"), "--force"])


@pytest.mark.parametrize("dome, tilt", [("nan", "0"), ("inf", "0"), ("-1e3", "0"),
                                        ("0", "0"), ("180", "nan"), ("180", "-1e300"),
                                        ("1e300", "1e-300")])
def test_render_dome_options(scene: Path, dome: str, tilt: str) -> None:
    code, _, err = run(["render", str(scene), "--dome", dome, "--tilt", tilt,
                        "-o", str(scene.parent / "d.png")])
    assert code == 2 and "Traceback" not in err, err


@pytest.mark.parametrize("flag, bad", [("--size", "nanxnan"), ("--size", "0x0"),
                                       ("--size", "-1e3x10"), ("--size", "1e300x1"),
                                       ("--quit-after", "-1"), ("--quit-after", "nan"),
                                       ("--quit-after", "1e300"), ("--quit-after", "inf")])
def test_open_refuses_extreme_window_options_before_any_window(
        scene: Path, flag: str, bad: str, monkeypatch: pytest.MonkeyPatch) -> None:
    monkeypatch.delenv("DISPLAY", raising=False)
    code, _, err = run(["open", str(scene), flag, bad])
    assert code == 2 and "Traceback" not in err and flag in err, err
