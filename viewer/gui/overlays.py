"""View-wide overlay switches: labels, grid, stars, foci, sectors and axes for the whole
scene at once. They change what the window draws, never the Scene being edited, so they
do not mark the file changed. Plain Python: no imgui.

``OVERLAYS`` names each switch with its label; ``scene_with_overlays(scene, switches)``
is the Scene drawn: a switch that is on or off overrides the scene's own setting (the
``[render]`` flag, or the ``show`` mark of every body); a switch not set follows the
scene.
"""

from __future__ import annotations

from dataclasses import replace

from ..scene.model import Scene

#: Switch name -> (label, where it acts: "render" flag or body "show" mark).
OVERLAYS: dict[str, tuple[str, str]] = {
    "labels": ("labels", "render"),
    "grid": ("reference grid", "render"),
    "stars": ("stars", "render"),
    "foci": ("foci of every body", "show"),
    "sweep": ("equal-time sectors of every body", "show"),
    "axes": ("axes of every body", "show"),
}


def scene_with_overlays(scene: Scene, switches: dict[str, bool]) -> Scene:
    """The scene as the window draws it under ``switches`` (see the module docstring)."""
    if not switches:
        return scene
    render = {k: v for k, v in switches.items() if OVERLAYS[k][1] == "render"}
    marks = {k: v for k, v in switches.items() if OVERLAYS[k][1] == "show"}
    out = scene
    if render:
        out = replace(out, render=replace(out.render, **render))  # type: ignore[arg-type]
    if marks:
        bodies = []
        for b in out.bodies:
            show = {k: v and (k != "sweep" or b.sweep is not None) for k, v in marks.items()}
            bodies.append(replace(b, show=replace(b.show, **show)))
        out = replace(out, bodies=tuple(bodies))
    return out


def toggled(scene: Scene, switches: dict[str, bool], name: str) -> dict[str, bool]:
    """``switches`` with ``name`` flipped from what is drawn now."""
    drawn = scene_with_overlays(scene, switches)
    if OVERLAYS[name][1] == "render":
        now = bool(getattr(drawn.render, name))
    else:
        now = any(getattr(b.show, name) for b in drawn.bodies)
    return {**switches, name: not now}
