"""Make the renders in docs/renders/ from the bundled scenes, so they can be remade after
any change to the renderer or the scenes:

    python docs/make_renders.py            # every bundled scene, plus two other views
    python docs/make_renders.py demo laws  # only these

Each still is the scene at its timeline start through its own camera, at 1600x900
(labels and lines scale with the height), drawn headlessly by the same renderer as the
viewer. Two more show other ways of looking at the demo: a perspective view from low
over the reference plane, and an edge-on view. ``solar-system.png`` is the real sky on
2026-01-01 (every planet from DE421). ``porkchop-earth-mars-2026.png`` and ``.svg`` are
the 2026 Earth-Mars season, made by ``perifocal porkchop`` on the bundled solar system;
``earth-mars-2026-transfer.png`` its least-total transfer halfway through its flight.
``demo-dome.png`` is a 1024 px dome master of the demo's show 14 s in, with its caption
and clock, as a planetarium gets it; ``presentation.png`` is the window in presentation
mode (every panel hidden). ``periapsis-show.png`` is that show 24 s in (pace, smooth
camera, sectors revealed as swept, caption and clock), as ``render --show-at 24`` makes
it; ``third-law-planets.png`` is ``perifocal plot`` of the planets' mean elements.
"""

from __future__ import annotations

import contextlib
import sys
from dataclasses import replace
from importlib import resources
from pathlib import Path

import numpy as np

SIZE = (1600, 900)
OUT = Path(__file__).resolve().parent / "renders"


def _scenes() -> dict[str, Path]:
    folder = Path(str(resources.files("viewer") / "scenes"))
    return {p.stem: p for p in sorted(folder.glob("*.toml"))}


def _extra_views(scene):  # type: ignore[no-untyped-def]
    """(name, camera, time) of the demo's two other views."""
    cam = scene.camera
    low = replace(cam, projection="perspective", look="angles", elevation_rad=np.radians(24),
                  azimuth_rad=np.radians(235), distance_m=cam.width_m * 0.62)
    edge = replace(cam, projection="orthographic", look="edge", width_m=cam.width_m * 0.8)
    return [("demo-perspective", low, 400 * 86400.0), ("demo-edge", edge, 0.0)]


def main(argv: list[str]) -> int:
    from viewer.export.encode import png_bytes
    from viewer.fileio import atomic_write_bytes
    from viewer.render import headless_renderer
    from viewer.scene import load_scene

    wanted = set(argv) or None
    OUT.mkdir(parents=True, exist_ok=True)
    with headless_renderer() as renderer:
        for name, path in _scenes().items():
            scene = load_scene(path)
            jobs = [(name, None, scene.timeline.start_s)]
            if name == "demo":
                jobs += _extra_views(scene)
            for out_name, camera, t_s in jobs:
                if wanted and out_name not in wanted and name not in wanted:
                    continue
                if name == "periapsis-show":  # a show: its frame 24 s in, as exported
                    rgba = _show_still(renderer, scene, 24.0)
                else:
                    rgba = renderer.render(scene, t_s, SIZE, camera)
                target = OUT / f"{out_name}.png"
                atomic_write_bytes(target, png_bytes(rgba))
                print(f"wrote {target.relative_to(OUT.parent.parent)}")
        if not wanted or "third-law" in wanted:
            _third_law(_scenes()["solar-system-mean"])
        if not wanted or "porkchop" in wanted:
            _porkchop(_scenes()["solar-system"], renderer)
        if not wanted or "demo" in wanted or "demo-dome" in wanted:
            _dome_master(renderer, load_scene(_scenes()["demo"]))
    if not wanted or "presentation" in wanted:
        _presentation(_scenes()["demo"])
    if not wanted or "timeline" in wanted:
        _presentation(_scenes()["demo"], "timeline.png", ["--timeline", "--show-at", "9 s"])
    return 0


def _show_still(renderer, scene, show_s: float):  # type: ignore[no-untyped-def]
    """The show's picture ``show_s`` into it (camera keys, pace, reveal, captions, clock),
    as ``perifocal render --show-at`` makes it."""
    from viewer.export.show import ShowFrames

    frames = ShowFrames(renderer, scene, SIZE)
    return frames.at(float(scene.timeline.scene_time_at(show_s)), show_s)


def _third_law(scene_path: Path) -> None:
    """``perifocal plot`` of the planets: log T vs log a beside T^2 vs a^3."""
    from viewer.export.law_plot import plot
    from viewer.fileio import atomic_write_bytes
    from viewer.mission.cautions import CAUTION
    from viewer.scene import load_scene

    target = OUT / "third-law-planets.png"
    atomic_write_bytes(target, plot(load_scene(scene_path), "png", CAUTION))
    print(f"wrote {target.relative_to(OUT.parent.parent)}")


def _presentation(scene_path: Path, name: str = "presentation.png",
                  flags: tuple[str, ...] | list[str] = ("--present",)) -> None:
    """The window in presentation mode (every panel hidden), or with ``flags`` (the
    timeline panel at a show time), on a private Xvfb server."""
    import os
    import subprocess
    import sys
    import tempfile

    from viewer.gui.bench import _start_xvfb

    proc, display = _start_xvfb()
    target = OUT / name
    config = tempfile.TemporaryDirectory()  # the user's settings stay as they are
    try:
        subprocess.run([sys.executable, "-m", "viewer.cli", "open", str(scene_path), *flags,
                        "--size", "1600x900", "--screenshot", str(target), "--force",
                        "--quit-after", "4"], env={**os.environ, "DISPLAY": display,
                                                   "XDG_CONFIG_HOME": config.name},
                       check=True, timeout=120)
    finally:
        proc.terminate()
        config.cleanup()
    with contextlib.suppress(OSError):  # the output rule kept the previous one
        target.with_name(target.name + ".bak").unlink()
    print(f"wrote {target.relative_to(OUT.parent.parent)}")


def _porkchop(scene_path: Path, renderer) -> None:  # type: ignore[no-untyped-def]
    """The 2026 Earth-Mars pork-chop plot (PNG and SVG; the CSV grid is not kept), and the
    least-total transfer it picks, drawn halfway through its flight."""
    import shutil
    import tempfile

    from viewer.cli import main as perifocal
    from viewer.export.encode import png_bytes
    from viewer.fileio import atomic_write_bytes
    from viewer.scene import load_scene

    with tempfile.TemporaryDirectory() as tmp:
        prefix = Path(tmp) / "porkchop"
        saved = Path(tmp) / "with-transfer.toml"
        code = perifocal(["porkchop", str(scene_path), "--from", "Earth", "--to", "Mars",
                          "--depart", "2026-09-01", "2027-01-31", "--arrive", "2027-05-01",
                          "2028-03-01", "-o", str(prefix), "--save", str(saved)])
        if code != 0:
            raise SystemExit(code)
        for ext in ("png", "svg"):
            target = OUT / f"porkchop-earth-mars-2026.{ext}"
            shutil.copyfile(f"{prefix}.{ext}", target)
            print(f"wrote {target.relative_to(OUT.parent.parent)}")
        scene = load_scene(saved)
        leg = scene.bodies[-1]
        assert leg.flight_s is not None
        t_mid = 0.5 * (leg.flight_s[0] + leg.flight_s[1])
        camera = replace(scene.camera, width_m=5.6 * 149_597_870_700.0)
        rgba = renderer.render(scene, t_mid, SIZE, camera)
        target = OUT / "earth-mars-2026-transfer.png"
        atomic_write_bytes(target, png_bytes(rgba))
        print(f"wrote {target.relative_to(OUT.parent.parent)}")


def _dome_master(renderer, scene) -> None:  # type: ignore[no-untyped-def]
    """The demo's dome master 14 s into its show (a caption on), through ShowFrames."""
    from viewer.export.encode import png_bytes
    from viewer.export.immersive import Immersive
    from viewer.export.show import ShowFrames
    from viewer.fileio import atomic_write_bytes

    size = (1024, 1024)
    frames = ShowFrames(renderer, scene, size, Immersive("dome", size))
    try:
        rgba = frames.frame(int(14 * scene.timeline.fps))
    finally:
        frames.close()
    target = OUT / "demo-dome.png"
    atomic_write_bytes(target, png_bytes(rgba))
    print(f"wrote {target.relative_to(OUT.parent.parent)}")


if __name__ == "__main__":
    raise SystemExit(main(sys.argv[1:]))
