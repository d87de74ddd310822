"""Label placement: each label beside its anchor, clear of other labels and of markers.

Greedy and deterministic: labels go in priority order (the central body, then bodies,
then the smaller annotations); each tries eight places around its anchor, then the same
eight a line farther out (three rings), and takes the first that overlaps nothing
already placed and stays inside the image. A label that
must be shown (a body's name) takes its least-crowded place when none is clear; an
optional one (an apsis tag, a grid radius) is dropped instead. Text is measured by a
function the renderer passes in, so this module needs no font and no GL.
"""

from __future__ import annotations

from collections.abc import Callable, Sequence
from dataclasses import dataclass

#: (text, size_px) -> (advance width, ascent, descent) in pixels.
Measure = Callable[[str, float], tuple[float, float, float]]

RGBA = tuple[float, float, float, float]

_PAD_PX = 2.0
# Rings of places tried, each a line height farther out than the one before.
_RINGS = 3
# Unit directions tried around an anchor: right, upper right, lower right, left, ...
_PLACES = ((1, 0), (1, -1), (1, 1), (-1, 0), (-1, -1), (-1, 1), (0, -1), (0, 1))


@dataclass(frozen=True)
class LabelRequest:
    """A label wanted beside ``anchor_px`` (x, y), outside a circle of ``clearance_px``."""

    text: str
    anchor_px: tuple[float, float]
    clearance_px: float
    size_px: float
    rgba: RGBA
    priority: int
    required: bool = True
    #: Fixed placement (x, y of the text's left baseline) instead of a search, if given.
    at_px: tuple[float, float] | None = None


@dataclass(frozen=True)
class PlacedLabel:
    """A label's text, left end of its baseline (px, y down), size and colour."""

    text: str
    x_px: float
    y_px: float
    size_px: float
    rgba: RGBA


Box = tuple[float, float, float, float]  # x0, y0, x1, y1


def _overlap(a: Box, b: Box) -> float:
    w = min(a[2], b[2]) - max(a[0], b[0])
    h = min(a[3], b[3]) - max(a[1], b[1])
    return w * h if w > 0 and h > 0 else 0.0


def _outside(box: Box, size: tuple[int, int]) -> float:
    w, h = size
    inside = (min(box[2], w) - max(box[0], 0)) * (min(box[3], h) - max(box[1], 0))
    area = (box[2] - box[0]) * (box[3] - box[1])
    return area - max(inside, 0.0) if inside > 0 else area


def place_labels(requests: Sequence[LabelRequest], measure: Measure, size_px: tuple[int, int],
                 obstacles: Sequence[Box] = ()) -> list[PlacedLabel]:
    """Place ``requests`` (any order; sorted by priority, stably) in an image of ``size_px``.

    ``obstacles`` are boxes (markers) no label should cover.
    """
    placed: list[PlacedLabel] = []
    boxes: list[Box] = []
    order = sorted(range(len(requests)), key=lambda k: requests[k].priority)
    for k in order:
        req = requests[k]
        if not req.text:
            continue
        width, ascent, descent = measure(req.text, req.size_px)
        if req.at_px is not None:
            x, y = req.at_px
            placed.append(PlacedLabel(req.text, x, y, req.size_px, req.rgba))
            boxes.append((x - _PAD_PX, y - ascent - _PAD_PX, x + width + _PAD_PX,
                          y + descent + _PAD_PX))
            continue
        ax, ay = req.anchor_px
        best: tuple[float, float, float, Box] | None = None
        for ring, (dx, dy) in ((r, p) for r in range(_RINGS) for p in _PLACES):
            gap = req.clearance_px + (0.25 + 1.1 * ring) * req.size_px
            # The text box's near edge sits ``gap`` from the anchor in this direction.
            if dx > 0:
                x = ax + gap
            elif dx < 0:
                x = ax - gap - width
            else:
                x = ax - 0.5 * width
            text_h = ascent + descent
            if dy < 0:
                top = ay - gap * (0.7 if dx else 1.0) - text_h
            elif dy > 0:
                top = ay + gap * (0.7 if dx else 1.0)
            else:
                top = ay - 0.5 * text_h
            y = top + ascent
            box = (x - _PAD_PX, top - _PAD_PX, x + width + _PAD_PX, top + text_h + _PAD_PX)
            score = sum(_overlap(box, b) for b in boxes)
            score += sum(_overlap(box, b) for b in obstacles)
            score += 4.0 * _outside(box, size_px)
            if best is None or score < best[0]:
                best = (score, x, y, box)
            if score == 0.0:
                break
        assert best is not None
        score, x, y, box = best
        if score > 0.0 and not req.required:
            continue
        if _outside(box, size_px) >= (box[2] - box[0]) * (box[3] - box[1]):
            continue  # wholly off the image: nothing to show
        placed.append(PlacedLabel(req.text, x, y, req.size_px, req.rgba))
        boxes.append(box)
    return placed
