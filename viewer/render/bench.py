"""Renderer benchmarks, each beside its baseline in the same run (``perifocal bench render``).

* A demo frame at 1920x1080: geometry, drawing and readback into an RGBA array, as a
  timeline plays (the camera still, the bodies moving) and as the camera moves (nothing
  kept between frames); beside matplotlib's Agg drawing the same frame (the same
  projected lines, sectors, markers, labels and stars) into its raw RGBA buffer, no
  file. matplotlib is given our geometry, so its time is drawing only: a conservative
  comparison.
* 100,000 bodies at their propagated positions, every frame at a new time, beside the
  float64 numpy propagation of the same bodies alone.
* Peak resident memory of a fresh process rendering 100,000 bodies.

Each function returns {"title", "rows": [(label, value, unit, note)], "verdicts"}.
Medians over the frames; LP_NUM_THREADS is set to the core count (headless_context).
"""

from __future__ import annotations

import json
import os
import subprocess
import sys
import time
from typing import Any

import numpy as np

SIZE = (1920, 1080)


def _demo_scene() -> Any:
    """The bundled demo scene (or the built-in demo-like scene if it is not there)."""
    from importlib import resources

    path = resources.files("viewer") / "scenes" / "demo.toml"
    try:
        from ..scene import load_scene

        return load_scene(str(path))
    except Exception:  # a build without the scenes: the Python-made equivalent
        from .samples import demo_like_scene

        return demo_like_scene()


def _belt_scene(n: int) -> Any:
    """A generated belt of ``n`` bodies between two planets' orbits (as scenes/belt.toml),
    with stars and labels, seen from 35 degrees above the plane."""
    import math
    from dataclasses import replace

    from ..orbit import AU_M
    from .samples import belt_population, demo_like_scene

    base = demo_like_scene()
    planets = tuple(replace(b, show=type(b.show)()) for b in base.bodies[:3:2])
    camera = replace(base.camera, look="angles", elevation_rad=math.radians(35),
                     azimuth_rad=math.radians(300), width_m=9 * AU_M)
    return replace(base, bodies=planets, camera=camera, populations=(belt_population(n),),
                   render=replace(base.render, grid=False))


def _median_ms(samples: list[float]) -> float:
    return float(np.median(samples)) * 1e3


def _matplotlib_frame(geom: Any) -> tuple[float, np.ndarray]:
    """Draw ``geom`` with matplotlib Agg into its RGBA buffer; (seconds, pixels)."""
    import matplotlib

    matplotlib.use("Agg")
    from matplotlib.backends.backend_agg import FigureCanvasAgg
    from matplotlib.collections import LineCollection, PolyCollection
    from matplotlib.figure import Figure

    view = geom.view
    w, h = view.size_px
    hs = view.style_scale

    def runs(points: np.ndarray) -> list[np.ndarray]:
        px, front = view.project(points)
        return [px] if np.all(front) else []

    t0 = time.perf_counter()
    fig = Figure(figsize=(w / 100, h / 100), dpi=100)
    canvas = FigureCanvasAgg(fig)
    ax = fig.add_axes((0, 0, 1, 1))
    ax.set_xlim(0, w)
    ax.set_ylim(h, 0)
    ax.set_axis_off()
    fig.patch.set_facecolor(geom.background[:3])
    if len(geom.stars):
        ax.scatter(geom.stars[:, 0], geom.stars[:, 1], s=(geom.stars[:, 2] * 0.72) ** 2,
                   c=np.column_stack([geom.stars[:, 3:6], geom.stars[:, 6]]), linewidths=0)
    vec = geom.vector
    if vec is not None:
        for batch in (vec.grid, vec.lines):
            segs, cols, widths = [], [], []
            for pts, style in zip(batch.points, batch.styles, strict=True):
                for run in runs(pts):
                    segs.append(run)
                    cols.append(style.rgba)
                    widths.append(style.width_px * hs * 0.72)
            ax.add_collection(LineCollection(segs, colors=cols, linewidths=widths))
        polys = [runs(ring)[0] for ring, _ in vec.sectors if runs(ring)]
        ax.add_collection(PolyCollection(polys, facecolors=[c for _, c in vec.sectors][:len(polys)],
                                         edgecolors="none"))
    for rows in (geom.glows, geom.markers):
        if len(rows):
            ax.scatter(rows[:, 0], rows[:, 1], s=(rows[:, 2] * 2 * 0.72) ** 2,
                       c=np.column_stack([rows[:, 6:9], rows[:, 9]]), linewidths=0)
    for lab in geom.labels:
        ax.text(lab.x_px, lab.y_px, lab.text, fontsize=lab.size_px * 0.72, color=lab.rgba,
                family="DejaVu Sans")
    canvas.draw()
    pixels = np.asarray(canvas.buffer_rgba()).copy()
    return time.perf_counter() - t0, pixels


def bench_render(frames: int = 60) -> dict[str, Any]:
    """The demo frame at 1920x1080: ours (timeline and moving camera) beside matplotlib."""
    from dataclasses import replace

    from ..geometry.camera import view_for
    from .renderer import headless_renderer

    scene = _demo_scene()
    out = np.empty((SIZE[1], SIZE[0], 4), dtype=np.uint8)
    timeline, moving, parts = [], [], []
    with headless_renderer() as r:
        r.render(scene, 0.0, SIZE, out=out)  # compile, atlases, first upload
        renderer_name = r.ctx.info.get("GL_RENDERER", "?")
        for k in range(frames):
            t = scene.timeline.time_of_frame(k)
            t0 = time.perf_counter()
            r.render(scene, float(t), SIZE, out=out)
            timeline.append(time.perf_counter() - t0)
        cam = scene.camera
        for k in range(frames):
            turned = replace(cam, look="angles", elevation_rad=0.5 + 0.01 * k,
                             azimuth_rad=0.3 + 0.02 * k)
            t0 = time.perf_counter()
            view = view_for(scene, 0.0, SIZE, turned)
            geom = r.geometry(scene, 0.0, view)
            t1 = time.perf_counter()
            fbo = r.target(SIZE)
            r.draw(geom, fbo, top_row_first=True)
            r.read(fbo, SIZE, out=out)
            t2 = time.perf_counter()
            moving.append(t2 - t0)
            parts.append((t1 - t0, t2 - t1))
        geom = r.geometry(scene, 0.0, view_for(scene, 0.0, SIZE))
    mpl = [_matplotlib_frame(geom)[0] for _ in range(max(5, frames // 6))]
    ours, theirs = _median_ms(timeline), _median_ms(mpl)
    geo_ms, gl_ms = (float(np.median([p[i] for p in parts])) * 1e3 for i in (0, 1))
    rows = [
        ("perifocal, timeline frame (render + readback)", ours, "ms", "median, camera still"),
        ("perifocal, moving camera (nothing kept)", _median_ms(moving), "ms",
         f"geometry {geo_ms:.1f} ms + GL and readback {gl_ms:.1f} ms"),
        ("matplotlib Agg, same frame to RGBA buffer (baseline)", theirs, "ms",
         "drawing only, given our geometry"),
        ("speed-up over the baseline", theirs / ours, "x", ""),
    ]
    verdicts = [f"render + readback median <= 10 ms: {'met' if ours <= 10 else 'NOT met'}"]
    return {"title": f"demo frame {SIZE[0]}x{SIZE[1]} on {renderer_name}, "
                     f"LP_NUM_THREADS={os.environ.get('LP_NUM_THREADS')}",
            "rows": rows, "verdicts": verdicts}


def bench_population(n: int = 100_000, frames: int = 40) -> dict[str, Any]:
    """``n`` bodies drawn at their propagated positions, a new time every frame."""
    from ..geometry.population import population_constants, positions_at
    from .renderer import headless_renderer

    scene = _belt_scene(n)
    out = np.empty((SIZE[1], SIZE[0], 4), dtype=np.uint8)
    times = []
    with headless_renderer() as r:
        r.render(scene, 0.0, SIZE, out=out)  # uploads the constants once
        for k in range(frames):
            t0 = time.perf_counter()
            r.render(scene, 86400.0 * (3 * k + 1), SIZE, out=out)
            times.append(time.perf_counter() - t0)
    c = population_constants(scene.populations[0])
    cpu = []
    for k in range(5):
        t0 = time.perf_counter()
        positions_at(c, 86400.0 * k)
        cpu.append(time.perf_counter() - t0)
    ours = _median_ms(times)
    rows = [(f"perifocal, {n:,} bodies + 2 orbits, frame with readback", ours, "ms",
             "propagation included (Kepler in the vertex stage, four bodies a vertex)"),
            (f"numpy float64 propagation of the {n:,} alone (baseline)", _median_ms(cpu), "ms",
             "Markley solver, positions only, no drawing")]
    return {"title": f"{n:,} small bodies at {SIZE[0]}x{SIZE[1]}", "rows": rows,
            "verdicts": [f"<= 12 ms per frame: {'met' if ours <= 12 else 'NOT met'}"]}


_MEMORY_CHILD = """
import json, resource, sys
from viewer.render.bench import _belt_scene, SIZE
from viewer.render import headless_renderer
import numpy as np
scene = _belt_scene(int(sys.argv[1]))
out = np.empty((SIZE[1], SIZE[0], 4), dtype=np.uint8)
with headless_renderer() as r:
    for k in range(10):
        r.render(scene, 86400.0 * k, SIZE, out=out)
# VmHWM, not ru_maxrss: Linux carries ru_maxrss over from the parent across exec.
hwm = [line for line in open("/proc/self/status") if line.startswith("VmHWM")]
kb = int(hwm[0].split()[1]) if hwm else resource.getrusage(resource.RUSAGE_SELF).ru_maxrss
print(json.dumps({"maxrss_kb": kb}))
"""


def bench_memory(n: int = 100_000) -> dict[str, Any]:
    """Peak resident memory of a fresh process drawing ``n`` bodies (and of one drawing
    none, the baseline: Python, numpy, the GL driver)."""
    def peak_mb(count: int) -> float:
        res = subprocess.run([sys.executable, "-c", _MEMORY_CHILD, str(count)],
                             capture_output=True, text=True, check=True)
        return json.loads(res.stdout.strip().splitlines()[-1])["maxrss_kb"] / 1024.0

    ours, base = peak_mb(n), peak_mb(1)
    return {"title": f"peak resident memory, {SIZE[0]}x{SIZE[1]}, 10 frames",
            "rows": [(f"{n:,} bodies", ours, "MB", "fresh process, peak (VmHWM)"),
                     ("1 body (baseline: interpreter, numpy, GL driver)", base, "MB", "")],
            "verdicts": [f"under 300 MB: {'met' if ours < 300 else 'NOT met'}"]}


def bench_real_sky(frames: int = 30) -> dict[str, Any]:
    """A frame of the bundled DE421 solar system (every body from the ephemeris, drawn on
    its osculating conic) beside the same planets as fixed conics (the mean-element scene),
    each frame five days after the last."""
    from importlib import resources

    from ..scene import load_scene
    from .renderer import headless_renderer

    folder = resources.files("viewer") / "scenes"
    scenes = {name: load_scene(str(folder / f"{name}.toml"))
              for name in ("solar-system", "solar-system-mean")}
    times: dict[str, list[float]] = {name: [] for name in scenes}
    with headless_renderer() as r:
        for name, scene in scenes.items():
            r.render(scene, 0.0, SIZE)
            for k in range(frames):
                t0 = time.perf_counter()
                r.render(scene, k * 5 * 86400.0, SIZE)
                times[name].append(time.perf_counter() - t0)
    ours, base = _median_ms(times["solar-system"]), _median_ms(times["solar-system-mean"])
    rows = [("real sky frame (8 DE421 bodies, osculating conics)", ours, "ms", "median"),
            ("  baseline: the same planets as fixed conics", base, "ms", "median")]
    return {"title": f"real-sky frame {SIZE[0]}x{SIZE[1]}", "rows": rows,
            "verdicts": [f"real sky frame <= 33 ms (30 frames/s): "
                         f"{'met' if ours <= 33 else 'NOT met'}"]}


def bench_all() -> dict[str, Any]:
    """Every renderer benchmark, for ``perifocal bench render``."""
    parts = [bench_render(), bench_population(), bench_memory(), bench_real_sky()]
    return {"title": "renderer (" + "; ".join(p["title"] for p in parts) + ")",
            "rows": [row for p in parts for row in p["rows"]],
            "verdicts": [v for p in parts for v in p["verdicts"]]}
