"""Scene-file text (TOML, scene format 1) for bodies that come from outside: an imported
OPM, a computed transfer orbit.

Writes text, not a document model, so that adding a body to an existing scene appends a
``[[body]]`` table and leaves every byte of the user's file (comments, layout) as it
was. Numbers are written with every digit a float64 holds (``repr``), each with its
unit, so the scene loader gives back the same orbit: the state at the body's epoch to
well below a millimetre. The caller checks the result with the scene loader before
writing anything.
"""

from __future__ import annotations

import json
import math
from collections.abc import Iterable
from typing import Any

from ..orbit import Elements, mean_from_true


def toml_string(text: str) -> str:
    """A TOML basic string (JSON escaping is valid TOML)."""
    return json.dumps(text, ensure_ascii=False)


def comment_block(lines: Iterable[str], prefix: str = "") -> str:
    """TOML comment lines ('# ...') for each line of text, one per line."""
    out = []
    for line in lines:
        for part in (line.splitlines() or [""]):
            out.append(f"# {prefix}{part}".rstrip())
    return "\n".join(out) + ("\n" if out else "")


def _km(x_m: Any) -> str:
    return toml_string(f"{float(x_m) / 1e3!r} km")


def _deg(x_rad: Any) -> str:
    return toml_string(f"{math.degrees(float(x_rad))!r} deg")


def body_toml(name: str, elements: Elements, epoch_text: str, comments: Iterable[str] = (),
              show: str | None = None) -> str:
    """A ``[[body]]`` table for ``elements`` (SI, at ``epoch_text``), preceded by comments.

    Ellipses are sized by ``a``; open conics by ``periapsis`` and ``e`` (the form the
    scene format gives for hyperbolas and parabolas). Where the body is at its epoch is
    given as ``nu`` (ellipses) or as the conic's mean anomaly ``M`` (open conics).
    ``show`` is an inline table text such as '{ apsides = true }'.
    """
    e = float(elements.e)
    size = (f"a = {_km(elements.a)}" if e < 1.0 else f"periapsis = {_km(elements.periapsis)}")
    # Open conics give their own mean anomaly M (as the loader's hyperbolic path expects
    # for every form); ellipses give nu, which needs no Kepler solve on loading.
    where = (f"nu = {_deg(elements.nu)}" if e < 1.0
             else f"M = {_deg(mean_from_true(elements.nu, e))}")
    lines = [
        comment_block(comments).rstrip("\n"),
        "[[body]]",
        f"name = {toml_string(name)}",
        size,
        f"e = {e!r}",
        f"i = {_deg(elements.i)}",
        f"raan = {_deg(elements.raan)}",
        f"argp = {_deg(elements.argp)}",
        where,
        f"epoch = {toml_string(epoch_text)}",
    ]
    if show:
        lines.append(f"show = {show}")
    return "\n".join(line for line in lines if line) + "\n"


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
        lines.append(f"gm = {toml_string(f'{gm_m3_s2 / 1e9!r} km3/s2')}")
        if radius_m is not None:
            lines.append(f"radius = {_km(radius_m)}")
    return "\n".join(lines) + "\n"


def timeline_toml(start_s: float, rate_s_per_s: float, duration_s: float) -> str:
    """A [timeline] table: scene time start (s), scene seconds per show second, show length."""
    return "\n".join([
        "[timeline]",
        f"start = {toml_string(f'{float(start_s)!r} s')}",
        f"rate = {toml_string(f'{float(rate_s_per_s)!r} s/s')}",
        f"duration = {toml_string(f'{float(duration_s)!r} s')}",
    ]) + "\n"
