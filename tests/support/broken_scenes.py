"""Broken scene files as data: ``CASES`` (a file's text or bytes and the words its
message must contain) and ``mutated_scene``, a hypothesis strategy that breaks bundled
scenes line by line."""

from __future__ import annotations

from pathlib import Path

from hypothesis import strategies as st

SCENES = Path(__file__).resolve().parents[2] / "scenes"
TEXTS = {p.name: p.read_text() for p in sorted(SCENES.glob("*.toml")) if p.name != "belt.toml"}
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


LITERALS = ["nan", "inf", "-inf", "1e308", "-1e308", "5e-324", "0", "-1", "1", '""', "[]",
            "{}", "true", "false", '"1.5 kg"', '"3 d"', '"2030-01-01"', "1979-05-27T07:32:00Z",
            '"abc"', "[1, 2, 3]", "{ a = 1 }", '"1e-320 deg"', '"1e-320 au"', '"-0 au"',
            '"1e30 au"', "1.5", "0.999999999", "1.0000000001", '"#zzzzzz"', '"center"',
            '["1 au", "2 au"]', "2", "100000", '"-1e6 deg"', '"1e20 d"', '"9e15 s"']


@st.composite
def mutated_scene(draw) -> str:  # type: ignore[no-untyped-def]
    """A bundled scene with one to four lines broken (values, deletions, swaps, junk)."""
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
