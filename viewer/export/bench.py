"""Export benchmarks for ``perifocal bench export``, each beside its baseline in one run.

* A 1920x1080 PNG sequence of a busy scene (eight orbits, twelve translucent sectors
  each, markers, foci; no stars or labels): the marginal cost per frame (a long run minus
  a short run, so start-up does not count) beside a matplotlib-Agg script drawing the
  same geometry (``plot`` lines, ``Polygon`` sectors, ``savefig`` at 19.2 x 10.8 in and
  100 dpi).
* A 1920x1080 MP4 with the default settings: frames of output per second, beside the
  same video with every layer drawn in every frame (the path before the renderer kept
  the layers under the markers) and a video whose camera turns every frame (nothing
  kept), whole videos taken in turn.
* A 4096x4096 dome master sequence with its PNGs written, beside the earlier
  reprojection, and an 8192x8192 one: seconds per frame in the sequence's steady state
  (from one frame's render to the next, from the seventh frame on, the PNGs before
  encoding meanwhile), whole sequences of the three taken in turn for three rounds, the
  median of each path's frames; and the 8K's ratio to the 4096 (four times the pixels).
"""

from __future__ import annotations

import math
import tempfile
import time
from pathlib import Path
from typing import Any

import numpy as np

from ..orbit import AU_M, DAY_S, conic_points, sector_polygon, state_from_elements
from ..scene.model import Body, BodyShow, Camera, Sweep, Timeline


def busy_scene() -> Any:
    """Eight orbits, twelve translucent sectors each, markers and foci (invented)."""
    from dataclasses import replace

    from ..render.samples import elements, plain_scene

    palette = [(0.50, 0.82, 1.0), (1.0, 0.72, 0.28), (0.78, 0.62, 1.0), (0.55, 0.95, 0.75),
               (1.0, 0.55, 0.62), (0.95, 0.92, 0.45), (0.45, 0.75, 0.95), (0.9, 0.6, 0.9)]
    bodies = []
    for k in range(8):
        el = elements(0.4 + 0.22 * k, 0.05 + 0.08 * k, 2.0 * k, 37.0 * k, 50.0 * k, 30.0 * k)
        period = float(el.period)
        bodies.append(Body(
            f"B{k}", el, color=palette[k], line_width_px=2.0,
            show=BodyShow(label=False, foci=True, sweep=True),
            sweep=Sweep(0.0, period / 12.0, 12, palette[k], 0.35)))
    scene = plain_scene(tuple(bodies), Camera(width_m=4.6 * AU_M), size_px=(1920, 1080),
                        show_center=True)
    return replace(scene, timeline=Timeline(start_s=0.0, rate=10 * DAY_S, fps=30.0,
                                            duration_s=60.0))


def _matplotlib_sequence(scene: Any, frames: range, folder: Path) -> None:
    import matplotlib

    matplotlib.use("Agg")
    import matplotlib.pyplot as plt
    from matplotlib.patches import Polygon

    folder.mkdir(parents=True, exist_ok=True)
    half_w = scene.camera.width_m / 2 / AU_M
    half_h = half_w * 1080 / 1920
    fig = plt.figure(figsize=(19.2, 10.8), dpi=100)
    ax = fig.add_axes((0, 0, 1, 1))
    nu = np.linspace(0, 2 * np.pi, 721)
    for k in frames:
        t = scene.timeline.time_of_frame(k)
        ax.clear()
        ax.set_facecolor("black")
        ax.set_xlim(-half_w, half_w)
        ax.set_ylim(-half_h, half_h)
        ax.set_axis_off()
        for b in scene.bodies:
            el = b.elements
            for t0, t1 in b.sweep.bounds_s():
                poly = sector_polygon(el, t0, t1, 48)[:, :2] / AU_M
                ax.add_patch(Polygon(poly, closed=True, facecolor=b.color, alpha=0.35,
                                     edgecolor=b.color, linewidth=0.7))
            pts = conic_points(el, nu)[:, :2] / AU_M
            ax.plot(pts[:, 0], pts[:, 1], color=b.color, linewidth=2.0)
            c = -2 * float(el.a) * float(el.e) / AU_M
            P = np.asarray(el.perifocal_basis()[0])[:2]
            ax.plot([0, c * P[0]], [0, c * P[1]], "o", color="white", markersize=6,
                    markerfacecolor="none")
            r, _ = state_from_elements(b.elements_at(t))
            ax.plot([r[0] / AU_M], [r[1] / AU_M], "o", color=b.color, markersize=7)
        fig.savefig(folder / f"frame_{k:06d}.png", dpi=100, facecolor="black")
    plt.close(fig)


#: The frame from which a dome sequence is in its steady state (see ``dome_steady``).
STEADY_FROM = 6


def _ours_sequence(scene: Any, frames: range, folder: Path) -> None:
    import io

    from ..render.context import headless_context, release_context
    from ..render.renderer import Renderer
    from .frames import render_sequence

    ctx = headless_context()
    renderer = Renderer(ctx)
    try:
        render_sequence(frames, lambda k: renderer.render(scene, scene.timeline.time_of_frame(k)),
                        folder, stream=io.StringIO())
    finally:
        renderer.release()
        release_context(ctx)


def _marginal(fn: Any, scene: Any, short: int, long: int) -> float:
    with tempfile.TemporaryDirectory() as d:
        t0 = time.perf_counter()
        fn(scene, range(short), Path(d) / "a")
        t1 = time.perf_counter()
        fn(scene, range(long), Path(d) / "b")
        t2 = time.perf_counter()
    return ((t2 - t1) - (t1 - t0)) / (long - short)


def bench_export(quick: bool = False) -> dict[str, Any]:
    """The three export figures of the module docstring; ``quick`` for a smoke run."""
    import io

    from ..geometry.camera import view_for
    from ..render.context import headless_context, release_context
    from ..render.renderer import Renderer
    from .frames import render_sequence, render_video
    from .immersive import Immersive, ImmersiveRenderer

    scene = busy_scene()
    short, long = (2, 6) if quick else (10, 40)
    ours = _marginal(_ours_sequence, scene, short, long)
    mpl = _marginal(_matplotlib_sequence, scene, short // 2 or 1, long // 2)
    rows: list[tuple[str, float, str, str]] = [
        ("busy 1080p PNG sequence, perifocal (marginal)", ours * 1e3, "ms/frame", ""),
        ("  baseline: matplotlib Agg, same geometry", mpl * 1e3, "ms/frame", ""),
        ("  speed-up", mpl / ours, "x", "target >= 10x"),
    ]
    verdicts = [f"PNG sequence >= 10x matplotlib: {'met' if mpl / ours >= 10 else 'NOT met'}"]

    ctx = headless_context()
    renderer = Renderer(ctx)
    try:
        n = 20 if quick else 75

        def still(k: int) -> Any:
            return renderer.render(scene, scene.timeline.time_of_frame(k))

        def every_layer(k: int) -> Any:
            """The previous path: every layer drawn in every frame (``draw`` keeps no
            picture between frames)."""
            t = scene.timeline.time_of_frame(k)
            view = view_for(scene, t, None, None)
            fbo = renderer.target(view.size_px)
            renderer.draw(renderer.geometry(scene, t, view), fbo, top_row_first=True)
            return renderer.read(fbo, view.size_px)

        def turning(k: int) -> Any:
            """The camera turns every frame, so no layer can be kept."""
            cam = Camera(look="angles", elevation_rad=math.radians(35.0 + 0.1 * k),
                         azimuth_rad=-1.2, width_m=scene.camera.width_m,
                         distance_m=3.0 * AU_M)
            return renderer.render(scene, scene.timeline.time_of_frame(k), camera=cam)

        def video_rates(paths: list[Any], rounds: int) -> list[float]:
            """Frames of output per second of each path, whole videos taken in turn
            (A, B, A, B) so that a change of the machine's load hits them alike."""
            spent = [0.0] * len(paths)
            with tempfile.TemporaryDirectory() as d:
                for _ in range(rounds):
                    for j, render in enumerate(paths):
                        t0 = time.perf_counter()
                        render_video(range(n), render, Path(d) / f"v{j}.mp4", (1920, 1080),
                                     scene.timeline.fps, stream=io.StringIO())
                        spent[j] += time.perf_counter() - t0
            return [rounds * n / s for s in spent]

        fps, before_fps, turning_fps = video_rates([still, every_layer, turning],
                                                   1 if quick else 2)
        rows.append(("busy 1080p MP4, default settings", fps, "frames/s", "target >= 45"))
        rows.append(("  baseline: every layer drawn in every frame (the previous path)",
                     before_fps, "frames/s", ""))
        rows.append(("  the camera turning every frame (no layer kept)", turning_fps,
                     "frames/s", ""))
        verdicts.append(f"MP4 >= 45 frames/s: {'met' if fps >= 45 else 'NOT met'}")

        cam = Camera(look="angles", elevation_rad=math.radians(35.0), azimuth_rad=-1.2,
                     width_m=scene.camera.width_m, distance_m=3.0 * AU_M)

        def dome_steady(side: int, baseline: bool, frames: int) -> list[float]:
            """Seconds per frame of a dome master sequence written as PNGs, in its steady
            state: from each frame's render to the next's, from the seventh frame on
            (the first is drawn direct, the second writes the table of atlas points, and
            the first six fill the writer's queue and the arrays the renderer reuses),
            the PNGs of the frames before encoding meanwhile, as in any export."""
            spec = Immersive("dome", (side, side), grid=1)
            immersive = ImmersiveRenderer(renderer, uniform_grid=baseline)
            starts: list[float] = []

            def frame(k: int) -> Any:
                starts.append(time.perf_counter())
                return immersive.render(scene, scene.timeline.time_of_frame(k), spec, cam)

            try:
                with tempfile.TemporaryDirectory() as d:
                    render_sequence(range(frames), frame, Path(d), stream=io.StringIO())
            finally:
                immersive.release()
            return list(np.diff(starts)[STEADY_FROM:])

        # Whole sequences of each path in turn, round after round (a change in the
        # machine's load hits all alike); the median of each path's frames.
        paths = {"4096": (4096, False, STEADY_FROM + 6), "before": (4096, True, STEADY_FROM + 6),
                 "8192": (8192, False, STEADY_FROM + 4)}
        rounds: dict[str, list[float]] = {key: [] for key in paths}
        for _round in range(1 if quick else 3):
            for key, (side, baseline, frames) in paths.items():
                rounds[key].extend(dome_steady(side, baseline, frames))
        dome_s, before_s, dome8_s = (float(np.median(rounds[key])) for key in paths)
        rows.append(("4096x4096 dome master, PNG written (steady state)", dome_s,
                     "s/frame", "target <= 0.4 s"))
        rows.append(("  baseline: the sample loop bounded by a uniform (the earlier path)",
                     before_s, "s/frame", ""))
        verdicts.append(f"4K dome <= 0.4 s/frame: {'met' if dome_s <= 0.4 else 'NOT met'}")
        rows.append(("8192x8192 dome master, PNG written (steady state)", dome8_s,
                     "s/frame", "target <= 4x the 4096"))
        rows.append(("  8192 / 4096", dome8_s / dome_s, "x", "4x the pixels"))
        verdicts.append(f"8K dome <= 4x the 4K: "
                        f"{'met' if dome8_s <= 4 * dome_s else 'NOT met'}")
    finally:
        renderer.release()
        release_context(ctx)
    return {"title": "export: busy scene (8 orbits x 12 sectors), 1920x1080", "rows": rows,
            "verdicts": verdicts}
