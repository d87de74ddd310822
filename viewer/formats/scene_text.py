"""Scene-file text (TOML, scene format 1) for bodies that come from outside: an imported
OPM, a computed transfer orbit.

Writes text, not a document model, so that adding a body to an existing scene appends a
``[[body]]`` table and leaves every byte of the user's file (comments, layout) as it
was. Every value goes through the one scene writer (``viewer.scene.writer``), which
writes the digits that load back to the same float64, each with its unit. The caller
checks the result with the scene loader before writing anything.
"""

from __future__ import annotations

from collections.abc import Iterable
from typing import Any

from ..orbit import Elements
from ..scene import writer
from ..scene.writer import comment_block, toml_string


def body_toml(name: str, elements: Elements, epoch_text: str, comments: Iterable[str] = (),
              show: dict[str, bool] | None = None,
              flight: tuple[str, str] | None = None) -> str:
    """A ``[[body]]`` table for ``elements`` (SI, at ``epoch_text``) in km and deg, after
    comment lines, written by the scene writer: ellipses sized by ``a``, open conics by
    ``periapsis`` and ``e``, the place given as ``nu`` for every conic."""
    e = float(elements.e)
    t: dict[str, Any] = {"name": name}
    if e < 1.0:
        t["a"] = writer.length(float(elements.a), "km")
    else:
        t["periapsis"] = writer.length(float(elements.periapsis), "km")
    t["e"] = e
    for key in ("i", "raan", "argp", "nu"):
        t[key] = writer.angle(float(getattr(elements, key)))
    t["epoch"] = epoch_text
    if show:
        t["show"] = dict(show)
    if flight is not None:  # only the arc between these epochs is flown (and drawn)
        t["flight"] = {"start": flight[0], "end": flight[1]}
    return writer.table_text("body", t, comments)


def scene_toml(*, title: str, epoch_text: str, frame: str, center: str, bodies: str,
               header_comments: Iterable[str] = (), timeline: str = "") -> str:
    """A whole scene file: comments, [scene], the given [center] text, bodies, timeline."""
    parts = [
        comment_block(header_comments),
        "[scene]",
        "format = 1",
        f"title = {toml_string(title)}",
        f"epoch = {toml_string(epoch_text)}",
        f"frame = {toml_string(frame)}",
        'units = { length = "km", time = "s", angle = "deg" }',
        "",
        center.rstrip("\n"),
        "",
        bodies.rstrip("\n"),
        "",
    ]
    if timeline:
        parts += [timeline.rstrip("\n"), ""]
    return "\n".join(parts)


def center_toml(name: str, preset: str | None, gm_m3_s2: float | None = None,
                radius_m: float | None = None) -> str:
    """A [center] table: a catalogue ``preset``, or ``gm`` (and ``radius``) given outright."""
    lines = ["[center]", f"name = {toml_string(name)}"]
    if gm_m3_s2 is None:
        lines.append(f"preset = {toml_string(preset or '')}")
    else:
        lines.append(f"gm = {toml_string(writer.quantity(gm_m3_s2, 'gm', 'km3/s2'))}")
        if radius_m is not None:
            lines.append(f"radius = {toml_string(writer.length(radius_m, 'km'))}")
    return "\n".join(lines) + "\n"


def timeline_toml(start_s: float, rate_s_per_s: float, duration_s: float) -> str:
    """A [timeline] table: scene time start (s), scene seconds per show second, show length."""
    return "\n".join([
        "[timeline]",
        f"start = {toml_string(writer.duration(start_s))}",
        f"rate = {toml_string(writer.quantity(rate_s_per_s, 'rate', 's/s'))}",
        f"duration = {toml_string(writer.duration(duration_s))}",
    ]) + "\n"
