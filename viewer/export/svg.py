"""SVG diagrams of a still: the same geometry as the raster frame, as paths and text.

``build_frame`` gives the frame's world polylines and sector outlines (before they become
triangles), its markers and its placed labels; here they are projected with the same
View and written as SVG paths, circles and text, so the diagram matches the raster
render geometrically (same pixels per metre, same image coordinates, y down). Sizes in
the file are pixels of that image. Stars are written as small circles; populations as
one circle per body.

Differences from the raster frame, by design: lines that pass behind the central body
are not cut where it hides them, and a stroke that the raster offsets to lie inside its
sector is drawn on the sector's edge.
"""

from __future__ import annotations

import math
from pathlib import Path
from xml.sax.saxutils import escape

import numpy as np
from numpy.typing import NDArray

from ..fileio import atomic_write_bytes, user_write_error
from ..geometry.camera import View, view_for
from ..geometry.frame import (
    ARROWHEAD,
    CROSSHAIR,
    DIAMOND,
    DISC,
    GLOW,
    RING,
    SPHERE,
    FrameGeometry,
    build_frame,
)
from ..geometry.strokes import PolylineBatch
from ..scene.model import Scene

Floats = NDArray[np.float64]
FONT_FAMILY = "DejaVu Sans, Verdana, sans-serif"


def _colour(rgba: tuple[float, ...] | Floats) -> str:
    r, g, b = (max(0, min(255, int(round(float(c) * 255)))) for c in rgba[:3])
    return f"#{r:02x}{g:02x}{b:02x}"


def _num(x: float) -> str:
    return f"{x:.2f}".rstrip("0").rstrip(".") if math.isfinite(x) else "0"


def _runs(view: View, pts_m: Floats) -> list[Floats]:
    """The visible runs of a world polyline, in pixels (split where it goes behind the eye)."""
    px, front = view.project(pts_m)
    runs, start = [], None
    for i, ok in enumerate(front):
        if ok and start is None:
            start = i
        if (not ok or i == len(front) - 1) and start is not None:
            end = i + 1 if ok else i
            if end - start >= 2:
                runs.append(px[start:end])
            start = None
    return runs


def _path_d(run: Floats, closed: bool) -> str:
    d = "M" + " L".join(f"{_num(x)} {_num(y)}" for x, y in run)
    return d + (" Z" if closed else "")


def _strokes(view: View, batch: PolylineBatch, scale: float, css: str) -> list[str]:
    out = []
    for pts, closed, style in zip(batch.points, batch.closed, batch.styles, strict=True):
        for run in _runs(view, pts):
            dash = ""
            if style.dash_px is not None:
                on, off = style.dash_px
                dash = f' stroke-dasharray="{_num(on * scale)} {_num(off * scale)}"'
            out.append(
                f'<path class="{css}" d="{_path_d(run, closed and len(run) == len(pts))}" '
                f'fill="none" stroke="{_colour(style.rgba)}" '
                f'stroke-opacity="{_num(style.rgba[3])}" '
                f'stroke-width="{_num(style.width_px * scale)}"{dash} '
                f'stroke-linejoin="round" stroke-linecap="round"/>')
    return out


def _marker(row: Floats) -> str:
    x, y, r, shape, param, angle, cr, cg, cb, ca = (float(v) for v in row)
    col = _colour((cr, cg, cb))
    op = _num(ca)
    shape_i = int(shape)
    if shape_i == DISC:
        return (f'<circle cx="{_num(x)}" cy="{_num(y)}" r="{_num(r)}" fill="{col}" '
                f'fill-opacity="{op}" stroke="#05080d" stroke-width="{_num(param)}"/>')
    if shape_i == RING:
        return (f'<circle cx="{_num(x)}" cy="{_num(y)}" r="{_num(r - param / 2)}" fill="none" '
                f'stroke="{col}" stroke-opacity="{op}" stroke-width="{_num(param)}"/>')
    if shape_i == DIAMOND:
        pts = " ".join(f"{_num(x + dx)},{_num(y + dy)}"
                       for dx, dy in ((r, 0), (0, r), (-r, 0), (0, -r)))
        return f'<polygon points="{pts}" fill="{col}" fill-opacity="{op}"/>'
    if shape_i == GLOW:
        return (f'<circle cx="{_num(x)}" cy="{_num(y)}" r="{_num(r)}" fill="url(#glow)" '
                f'style="color:{col}" opacity="{op}"/>')
    if shape_i == SPHERE:
        return (f'<circle cx="{_num(x)}" cy="{_num(y)}" r="{_num(r)}" fill="{col}" '
                f'fill-opacity="{op}"/>')
    if shape_i == CROSSHAIR:
        arm = 0.45 * r
        return (f'<g stroke="{col}" stroke-opacity="{op}" stroke-width="{_num(param)}" '
                f'fill="none"><circle cx="{_num(x)}" cy="{_num(y)}" r="{_num(r - param / 2)}"/>'
                f'<path d="M{_num(x - arm)} {_num(y)} L{_num(x + arm)} {_num(y)} '
                f'M{_num(x)} {_num(y - arm)} L{_num(x)} {_num(y + arm)}"/></g>')
    if shape_i == ARROWHEAD:
        c, s = math.cos(angle), math.sin(angle)
        local = ((r, 0.0), (-r, 0.75 * r * 1.6), (-r, -0.75 * r * 1.6))
        pts = " ".join(f"{_num(x + c * lx - s * ly)},{_num(y + s * lx + c * ly)}"
                       for lx, ly in local)
        return f'<polygon points="{pts}" fill="{col}" fill-opacity="{op}"/>'
    return ""


def svg_text(geom: FrameGeometry, title: str = "") -> str:
    """The SVG document of one frame's geometry."""
    view = geom.view
    w, h = view.size_px
    scale = view.style_scale
    parts = [
        '<?xml version="1.0" encoding="UTF-8"?>',
        f'<svg xmlns="http://www.w3.org/2000/svg" width="{w}" height="{h}" '
        f'viewBox="0 0 {w} {h}">',
        f"<title>{escape(title)}</title>",
        '<defs><radialGradient id="glow"><stop offset="0" stop-color="currentColor" '
        'stop-opacity="0.9"/><stop offset="1" stop-color="currentColor" stop-opacity="0"/>'
        "</radialGradient></defs>",
    ]
    bg = geom.background
    if bg[3] > 0:
        parts.append(f'<rect width="{w}" height="{h}" fill="{_colour(bg)}"/>')
    if len(geom.stars):
        parts.append('<g class="stars">')
        for x, y, size, r, g, b, a in geom.stars:
            parts.append(f'<circle cx="{_num(x)}" cy="{_num(y)}" r="{_num(max(size, 0.6) / 2)}" '
                         f'fill="{_colour((r, g, b))}" fill-opacity="{_num(a)}"/>')
        parts.append("</g>")
    vec = geom.vector
    if vec is not None:
        parts.append('<g class="grid">')
        parts += _strokes(view, vec.grid, scale, "grid")
        parts.append('</g><g class="sectors">')
        for ring, rgba in vec.sectors:
            for run in _runs(view, ring):
                parts.append(f'<path class="sector" d="{_path_d(run, True)}" '
                             f'fill="{_colour(rgba)}" fill-opacity="{_num(rgba[3])}"/>')
        parts.append("</g>")
    parts.append('<g class="central-body">')
    parts += [_marker(row) for row in geom.glows]
    parts.append("</g>")
    if vec is not None:
        parts.append('<g class="lines">')
        parts += _strokes(view, vec.lines, scale, "line")
        parts.append("</g>")
    parts.append('<g class="markers">')
    parts += [_marker(row) for row in geom.markers]
    parts.append("</g>")
    for pop in geom.populations:
        parts.append(_population(view, pop, geom.t_s))
    parts.append(f'<g class="labels" font-family="{FONT_FAMILY}" paint-order="stroke" '
                 'stroke="#000000" stroke-opacity="0.8" stroke-linejoin="round">')
    for lab in geom.labels:
        parts.append(f'<text x="{_num(lab.x_px)}" y="{_num(lab.y_px)}" '
                     f'font-size="{_num(lab.size_px)}" fill="{_colour(lab.rgba)}" '
                     f'fill-opacity="{_num(lab.rgba[3])}" '
                     f'stroke-width="{_num(0.25 * lab.size_px)}">{escape(lab.text)}</text>')
    parts.append("</g></svg>")
    return "\n".join(parts) + "\n"


def _population(view: View, pop: object, t_s: float) -> str:
    from ..geometry.population import population_constants, positions_at

    c = population_constants(pop)  # type: ignore[arg-type]
    px, front = view.project(positions_at(c, t_s))
    col = _colour(pop.color)  # type: ignore[attr-defined]
    r = _num(0.5 * pop.point_size_px * view.style_scale)  # type: ignore[attr-defined]
    dots = "".join(f'<circle cx="{_num(x)}" cy="{_num(y)}" r="{r}"/>'
                   for (x, y), ok in zip(px, front, strict=True) if ok)
    return f'<g class="population" fill="{col}" fill-opacity="0.8">{dots}</g>'


def write_svg(scene: Scene, t_s: float, path: str | Path,
              size_px: tuple[int, int] | None = None, show_s: float | None = None) -> None:
    """Write the SVG diagram of ``scene`` at scene time ``t_s`` atomically (with the
    show's camera, fades, captions and clock at ``show_s`` into the show, by default the
    show time that t_s falls at)."""
    from ..render.text import FontCache
    from ..scene.timeline import overlay_at, scene_at_show_time, show_time_of

    if show_s is None:
        show_s = show_time_of(scene, t_s)
    shown = scene_at_show_time(scene, show_s, t_s)
    view = view_for(shown, t_s, size_px)
    fonts = FontCache()
    geom = build_frame(shown, t_s, view, fonts.measure, overlay=overlay_at(scene, show_s, t_s))
    data = svg_text(geom, scene.title).encode("utf-8")
    try:
        atomic_write_bytes(path, data)
    except OSError as err:
        raise user_write_error(path, err) from None
