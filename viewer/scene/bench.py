"""Benchmarks of the scene format, for ``perifocal bench``: each figure beside a baseline
measured in the same run (the bare parser or numpy reader doing the same file).

``bench_scene()`` returns ``{"title", "rows": [(label, value, unit, note)], "verdicts",
"timings_s"}``; ``timings_s`` holds the medians by name for programs. Budgets (issue 3):
1,000 [[body]] tables load in under 0.5 s, a 100,000-row population in under 1 s.
"""

from __future__ import annotations

import statistics
import tempfile
import time
from collections.abc import Callable
from pathlib import Path
from typing import Any

import numpy as np

BODY_BUDGET_S = 0.5
POPULATION_BUDGET_S = 1.0


def _median_s(fn: Callable[[], Any], repeat: int) -> float:
    times = []
    for _ in range(repeat):
        t0 = time.perf_counter()
        fn()
        times.append(time.perf_counter() - t0)
    return statistics.median(times)


def many_bodies_text(n: int) -> str:
    """A scene of ``n`` [[body]] tables with every common key, as people write them."""
    parts = ['[scene]\ntitle = "Many bodies"\nepoch = "2030-01-01T00:00:00 TDB"\n'
             '[center]\npreset = "sun"\n']
    for k in range(n):
        parts.append(
            f'\n[[body]]\nname = "Body {k}"   # a comment\na = "{1.0 + 0.003 * k} au"\n'
            f"e = {0.01 + (k % 90) / 100}\ni = \"{k % 40} deg\"\nraan = \"{k % 360} deg\"\n"
            f'argp = "{(7 * k) % 360} deg"\nM = "{(13 * k) % 360} deg"\ncolor = "#7fd0ff"\n'
            "show = { orbit = true, foci = true }\n")
    return "".join(parts)


def bench_scene(n_bodies: int = 1000, n_rows: int = 100_000, repeat: int = 5) -> dict[str, Any]:
    """Load times of many [[body]] tables and of a population table (CSV, .npy, generated)."""
    import tomllib

    from .loader import load_scene, load_scene_text
    from .population import generate_belt, write_table
    from .save import edit_text

    timings: dict[str, float] = {}
    text = many_bodies_text(n_bodies)
    timings["bodies_load"] = _median_s(lambda: load_scene_text(text), repeat)
    timings["bodies_tomllib"] = _median_s(lambda: tomllib.loads(text), repeat)
    timings["bodies_edit"] = _median_s(lambda: edit_text(text, {"body[0].e": 0.5}), 1)

    cols = generate_belt(n_rows, 2030, (2.1 * 1.495978707e11, 3.3 * 1.495978707e11),
                         (0.0, 0.25), (0.0, 0.35))
    counts: dict[str, int] = {}
    with tempfile.TemporaryDirectory() as tmp:
        folder = Path(tmp)
        units = {"length": "au", "angle": "deg"}
        for ext in ("csv", "npy"):
            write_table(cols, folder / f"belt.{ext}", units)
            (folder / f"{ext}.toml").write_text(
                f'[center]\npreset = "sun"\n[[population]]\nname = "Belt"\ntable = "belt.{ext}"\n')
        timings["population_csv_load"] = _median_s(lambda: load_scene(folder / "csv.toml"),
                                                   repeat)
        timings["population_csv_numpy"] = _median_s(
            lambda: np.loadtxt(folder / "belt.csv", delimiter=",", skiprows=1), repeat)
        timings["population_npy_load"] = _median_s(lambda: load_scene(folder / "npy.toml"),
                                                   repeat)
        timings["population_npy_numpy"] = _median_s(lambda: np.load(folder / "belt.npy"),
                                                    repeat)
        counts["csv"] = load_scene(folder / "csv.toml").populations[0].count
        counts["npy"] = load_scene(folder / "npy.toml").populations[0].count
    gen_text = ('[center]\npreset = "sun"\n[[population]]\nname = "Belt"\n'
                f'generate = {{ count = {n_rows}, seed = 2030, a = ["2.1 au", "3.3 au"], '
                'e = [0, 0.25], i = ["0 deg", "20 deg"] }\n')
    timings["population_generated_load"] = _median_s(lambda: load_scene_text(gen_text), repeat)
    counts["generated"] = load_scene_text(gen_text).populations[0].count

    rows = [
        (f"load {n_bodies} [[body]] tables", timings["bodies_load"], "s",
         f"budget {BODY_BUDGET_S} s"),
        ("  baseline: tomllib.loads of the same text", timings["bodies_tomllib"], "s", ""),
        ("  edit one value of it (tomlkit, keeps comments)", timings["bodies_edit"], "s", ""),
        (f"load a {n_rows}-row CSV population", timings["population_csv_load"], "s",
         f"budget {POPULATION_BUDGET_S} s"),
        ("  baseline: numpy.loadtxt of the same file", timings["population_csv_numpy"], "s", ""),
        (f"load a {n_rows}-row .npy population", timings["population_npy_load"], "s",
         f"budget {POPULATION_BUDGET_S} s"),
        ("  baseline: numpy.load of the same file", timings["population_npy_numpy"], "s", ""),
        (f"generate a {n_rows}-body belt (scene key generate)",
         timings["population_generated_load"], "s", f"budget {POPULATION_BUDGET_S} s"),
    ]
    verdicts = [
        f"{n_bodies} bodies: {'within' if timings['bodies_load'] < BODY_BUDGET_S else 'OVER'} "
        f"the {BODY_BUDGET_S} s budget",
    ]
    for key, name in (("population_csv_load", "CSV"), ("population_npy_load", ".npy"),
                      ("population_generated_load", "generated")):
        ok = timings[key] < POPULATION_BUDGET_S
        verdicts.append(f"{n_rows} rows ({name}): {'within' if ok else 'OVER'} the "
                        f"{POPULATION_BUDGET_S} s budget")
    return {"title": "scene files: loading and validation (median of "
            f"{repeat} runs)", "rows": rows, "verdicts": verdicts, "timings_s": timings,
            "counts": counts}


COLD_START_BUDGET_S = 0.3


def _child_s(argv: list[str], repeat: int, pycache: str) -> tuple[float, float]:
    """Median wall time and median CPU time (user + system) of a fresh process.

    The processes keep their compiled bytecode in ``pycache`` (made by one untimed run
    first), as an installed package has it (pip compiles it at install): a machine
    that sets PYTHONDONTWRITEBYTECODE would otherwise compile every module of ours
    from source at each start and time the compiler."""
    import os
    import subprocess
    import sys

    env = {k: v for k, v in os.environ.items() if k != "PYTHONDONTWRITEBYTECODE"}
    env["PYTHONPYCACHEPREFIX"] = pycache
    run = [sys.executable, *argv]
    subprocess.run(run, check=True, stdout=subprocess.DEVNULL, env=env)
    walls, cpus = [], []
    for _ in range(repeat):
        before = os.times()
        t0 = time.perf_counter()
        subprocess.run(run, check=True, stdout=subprocess.DEVNULL, env=env)
        walls.append(time.perf_counter() - t0)
        after = os.times()
        cpus.append((after.children_user - before.children_user)
                    + (after.children_system - before.children_system))
    return statistics.median(walls), statistics.median(cpus)


def bench_cold_start(repeat: int = 9) -> dict[str, Any]:
    """``perifocal check`` on a bundled scene in a fresh process, beside a fresh process
    that only imports numpy (the floor any numpy program pays)."""
    import tempfile
    from importlib.resources import files

    scene = str(files("viewer") / "scenes" / "demo.toml")
    with tempfile.TemporaryDirectory(prefix="perifocal-pycache-") as pycache:
        wall, cpu = _child_s(["-m", "viewer.cli", "check", scene], repeat, pycache)
        floor_wall, floor_cpu = _child_s(["-c", "import numpy"], repeat, pycache)
    rows = [("perifocal check scenes/demo.toml, fresh process", wall * 1e3, "ms",
             f"CPU {cpu * 1e3:.0f} ms (user + system)"),
            ("python -c 'import numpy' (baseline: the floor)", floor_wall * 1e3, "ms",
             f"CPU {floor_cpu * 1e3:.0f} ms"),
            ("check above the floor", (wall - floor_wall) * 1e3, "ms",
             f"CPU {(cpu - floor_cpu) * 1e3:.0f} ms")]
    verdicts = [f"cold start <= {COLD_START_BUDGET_S} s: "
                f"{'met' if wall <= COLD_START_BUDGET_S else 'NOT met'} (wall); "
                f"{'met' if cpu <= COLD_START_BUDGET_S else 'NOT met'} (CPU, what a "
                "loaded machine cannot inflate)"]
    return {"title": f"cold start, median of {repeat} fresh processes", "rows": rows,
            "verdicts": verdicts, "timings_s": {"check": wall, "check_cpu": cpu,
                                                "numpy": floor_wall, "numpy_cpu": floor_cpu}}
