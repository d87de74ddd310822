"""``perifocal bench``: measure this machine, each part beside its baseline in the same run."""

from __future__ import annotations

import argparse
import importlib
from typing import Any

#: Part name -> "module:function" returning a dict with "rows" (label, value, unit, note).
PARTS: dict[str, str] = {
    "kepler": "viewer.orbit.bench:bench_kepler",
    "porkchop": "viewer.mission.bench:bench_porkchop",
    "scene": "viewer.scene.bench:bench_scene",
    "start": "viewer.scene.bench:bench_cold_start",
    "render": "viewer.render.bench:bench_all",
    "export": "viewer.export.bench:bench_export",
    "window": "viewer.gui.bench:bench_window",
}

EXAMPLES = """examples:
  perifocal bench            # every part
  perifocal bench kepler     # 1e6 Kepler solves beside scipy.optimize.newton
  perifocal bench porkchop   # a 200 x 200 Earth-Mars grid beside a per-cell scipy loop
  perifocal bench scene      # loading 1,000 bodies and 100,000-row populations
  perifocal bench start      # perifocal check in a fresh process, beside importing numpy
  perifocal bench render     # demo frame beside matplotlib; 100k bodies; memory; real sky
  perifocal bench export     # PNG sequence beside matplotlib, MP4 rate, 4K and 8K domes
  perifocal bench window     # the viewer at 1920x1080 (starts Xvfb if there is no display)
  perifocal bench kepler --json

Benchmarks need the test extras (scipy, matplotlib): pip install 'perifocal[test]'.
"""


def add_parser(sub: Any) -> None:
    p = sub.add_parser(
        "bench", help="measure this machine (each part beside its baseline)",
        description="Benchmarks: each part is measured side by side with a baseline in the "
        "same run, and the machine is printed with the figures.",
        epilog=EXAMPLES, formatter_class=argparse.RawDescriptionHelpFormatter,
    )
    p.add_argument("part", nargs="?", choices=sorted(PARTS), help="one part (default: all)")
    p.add_argument("--json", action="store_true", help="print the figures as JSON")
    p.set_defaults(run=run)


def machine() -> dict[str, Any]:
    """What the figures were measured on."""
    import os
    import platform

    cpu = platform.processor() or platform.machine()
    try:
        with open("/proc/cpuinfo") as f:
            for line in f:
                if line.startswith("model name"):
                    cpu = line.split(":", 1)[1].strip()
                    break
    except OSError:
        pass
    return {"cpu": cpu, "cores": os.cpu_count(), "python": platform.python_version(),
            "system": f"{platform.system()} {platform.release()}"}


def run(args: argparse.Namespace) -> int:
    parts = [args.part] if args.part else list(PARTS)
    results: dict[str, Any] = {"machine": machine()}
    if not args.json:
        m = results["machine"]
        print(f"machine: {m['cpu']}, {m['cores']} cores, Python {m['python']}, {m['system']}")
    for name in parts:
        module, func = PARTS[name].split(":")
        res = getattr(importlib.import_module(module), func)()
        results[name] = res
        if not args.json:
            print(f"\n[{name}] {res.get('title', '')}")
            for label, value, unit, note in res["rows"]:
                print(f"  {label:<48} {value:>12.4g} {unit:<8} {note}")
            for verdict in res.get("verdicts", []):
                print(f"  -> {verdict}")
    if args.json:
        from .options import write_json

        write_json(results)
    return 0
