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

import numpy as np
from numpy.typing import NDArray

#: (text, size_px) -> (advance width, ascent, descent) in pixels.
Measure = Callable[[str, float], tuple[float, float, float]]

RGBA = tuple[float, float, float, float]

_PAD_PX = 2.0
# Rings of places tried, each a line height farther out than the one before.
_RINGS = 3
# Unit directions tried around an anchor: right, upper right, lower right, left, ...
_PLACES = ((1, 0), (1, -1), (1, 1), (-1, 0), (-1, -1), (-1, 1), (0, -1), (0, 1))
_RING_OF = np.repeat(np.arange(_RINGS), len(_PLACES)).astype(np.float64)
_DX = np.tile(np.array([p[0] for p in _PLACES], dtype=np.float64), _RINGS)
_DY = np.tile(np.array([p[1] for p in _PLACES], dtype=np.float64), _RINGS)
# How far above or below its anchor a label's box starts, per unit of its gap.
_LIFT = np.where(_DX != 0, 0.7, 1.0)


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


def _overlaps(cand: NDArray[np.float64], boxes: NDArray[np.float64]) -> NDArray[np.float64]:
    """Overlap areas (C, B) of candidate boxes with placed boxes, all (x0, y0, x1, y1)."""
    w = np.minimum(cand[:, None, 2], boxes[None, :, 2]) - np.maximum(cand[:, None, 0],
                                                                    boxes[None, :, 0])
    h = np.minimum(cand[:, None, 3], boxes[None, :, 3]) - np.maximum(cand[:, None, 1],
                                                                    boxes[None, :, 1])
    return np.where((w > 0) & (h > 0), w * h, 0.0)


def outside_of(box: Box) -> Callable[[NDArray[np.float64]], NDArray[np.float64]]:
    """The ``outside`` of ``place_labels`` for a rectangle (x0, y0, x1, y1) px: the area
    of each candidate box (C, 4) that falls outside it."""
    x0, y0, x1, y1 = box

    def outside(cand: NDArray[np.float64]) -> NDArray[np.float64]:
        iw = np.clip(np.minimum(cand[:, 2], x1) - np.maximum(cand[:, 0], x0), 0, None)
        ih = np.clip(np.minimum(cand[:, 3], y1) - np.maximum(cand[:, 1], y0), 0, None)
        return (cand[:, 2] - cand[:, 0]) * (cand[:, 3] - cand[:, 1]) - iw * ih
    return outside


def _slide_in(box: NDArray[np.float64], keep: Box) -> NDArray[np.float64]:
    """The shift (dx, dy, dx, dy) that brings ``box`` inside ``keep`` along each axis it
    fits in (none along an axis it is wider than)."""
    d = []
    for lo, hi, k0, k1 in ((box[0], box[2], keep[0], keep[2]), (box[1], box[3], keep[1], keep[3])):
        d.append(0.0 if hi - lo > k1 - k0 else max(k0 - lo, 0.0) + min(k1 - hi, 0.0))
    return np.array([d[0], d[1], d[0], d[1]])


def place_labels(requests: Sequence[LabelRequest], measure: Measure, size_px: tuple[int, int],
                 obstacles: Sequence[Box] = (),
                 outside: Callable[[NDArray[np.float64]], NDArray[np.float64]] | None = None,
                 keep_in: Box | None = None) -> list[PlacedLabel]:
    """Place ``requests`` (any order; sorted by priority, stably) in an image of ``size_px``.

    ``obstacles`` are boxes (markers) no label should cover. ``outside`` gives, for
    candidate boxes (C, 4), the area of each that falls off the picture (default: off
    the image rectangle; a dome master passes the area off its circle). ``keep_in`` is
    a rectangle (x0, y0, x1, y1) the labels stay inside (the window's free area): it
    sets ``outside``, and a required label that would stick out of it slides in whole.
    """
    # Within a rectangle (the image, or ``keep_in``) a label's first clear place is
    # found by plain float arithmetic, stopping at the first box it overlaps (most
    # labels fit at their first or second place); the same operations in the same order
    # as the arrays below, so the same place. A label with no clear place, or a picture
    # of another shape (``outside`` given), takes the arrays.
    frame_box = keep_in if keep_in is not None else (
        None if outside is not None else (0.0, 0.0, float(size_px[0]), float(size_px[1])))
    if frame_box is not None:
        outside = outside_of(frame_box)
    assert outside is not None
    placed: list[PlacedLabel] = []
    # Boxes taken so far: placed labels (in order), then the obstacles.
    taken = np.array(obstacles, dtype=np.float64).reshape(-1, 4)
    taken_boxes: list[Box] = [tuple(float(v) for v in b) for b in taken]  # type: ignore[misc]
    n_placed = 0
    order = sorted(range(len(requests)), key=lambda k: requests[k].priority)
    for k in order:
        req = requests[k]
        if not req.text:
            continue
        width, ascent, descent = measure(req.text, req.size_px)
        if req.at_px is not None:
            x, y = req.at_px
            placed.append(PlacedLabel(req.text, x, y, req.size_px, req.rgba))
            box = (x - _PAD_PX, y - ascent - _PAD_PX, x + width + _PAD_PX, y + descent + _PAD_PX)
            taken = _taken_with(taken, n_placed, box)
            taken_boxes.insert(n_placed, box)
            n_placed += 1
            continue
        ax, ay = req.anchor_px
        text_h = ascent + descent
        if frame_box is not None:
            found = _first_clear(req, width, text_h, frame_box, taken_boxes)
            if found is not None:
                x0, y0 = found[0], found[1]
                placed.append(PlacedLabel(req.text, x0 + _PAD_PX, y0 + _PAD_PX + ascent,
                                          req.size_px, req.rgba))
                taken = _taken_with(taken, n_placed, found)
                taken_boxes.insert(n_placed, found)
                n_placed += 1
                continue
        gap = req.clearance_px + (0.25 + 1.1 * _RING_OF) * req.size_px
        # The text box's near edge sits ``gap`` from the anchor in each direction.
        cand = np.empty((len(gap), 4))
        cand[:, 0] = np.where(_DX > 0, ax + gap, np.where(_DX < 0, ax - gap - width,
                                                          ax - 0.5 * width))
        lift = gap * _LIFT
        cand[:, 1] = np.where(_DY < 0, ay - lift - text_h,
                              np.where(_DY > 0, ay + lift, ay - 0.5 * text_h))
        cand[:, 2] = cand[:, 0] + width + _PAD_PX
        cand[:, 3] = cand[:, 1] + text_h + _PAD_PX
        cand[:, :2] -= _PAD_PX
        off = outside(cand)
        score = _overlaps(cand, taken).sum(axis=1) + 4.0 * off
        clear = np.flatnonzero(score == 0.0)
        pick = int(clear[0]) if clear.size else int(np.argmin(score))
        if score[pick] > 0.0 and not req.required:
            continue
        box_a = cand[pick].copy()
        area = (box_a[2] - box_a[0]) * (box_a[3] - box_a[1])
        if off[pick] >= area:
            continue  # wholly off the image: nothing to show
        if keep_in is not None and off[pick] > 0.0:
            box_a += _slide_in(box_a, keep_in)
        placed.append(PlacedLabel(req.text, float(box_a[0] + _PAD_PX),
                                  float(box_a[1] + _PAD_PX + ascent), req.size_px, req.rgba))
        box = (float(box_a[0]), float(box_a[1]), float(box_a[2]), float(box_a[3]))
        taken = _taken_with(taken, n_placed, box)
        taken_boxes.insert(n_placed, box)
        n_placed += 1
    return placed


#: The places tried, in order, as plain floats: (ring, dx, dy, lift per unit of gap).
_PLACE_LIST = [(float(r), float(dx), float(dy), float(lf))
               for r, dx, dy, lf in zip(_RING_OF, _DX, _DY, _LIFT, strict=True)]


def _first_clear(req: LabelRequest, width: float, text_h: float, frame: Box,
                 taken: list[Box]) -> Box | None:
    """The first of a label's candidate boxes (as ``place_labels`` makes them) that lies
    wholly inside ``frame`` and overlaps none of ``taken``; None if none does."""
    ax, ay = req.anchor_px
    fx0, fy0, fx1, fy1 = frame
    for ring, dx, dy, lf in _PLACE_LIST:
        gap = req.clearance_px + (0.25 + 1.1 * ring) * req.size_px
        x0 = ax + gap if dx > 0 else (ax - gap - width if dx < 0 else ax - 0.5 * width)
        lift = gap * lf
        y0 = ay - lift - text_h if dy < 0 else (ay + lift if dy > 0 else ay - 0.5 * text_h)
        x1 = x0 + width + _PAD_PX
        y1 = y0 + text_h + _PAD_PX
        x0 -= _PAD_PX
        y0 -= _PAD_PX
        # Off the frame: outside_of's area, zero only when the box lies within it.
        iw = max(min(x1, fx1) - max(x0, fx0), 0.0)
        ih = max(min(y1, fy1) - max(y0, fy0), 0.0)
        if (x1 - x0) * (y1 - y0) - iw * ih != 0.0:
            continue
        for bx0, by0, bx1, by1 in taken:
            w = min(x1, bx1) - max(x0, bx0)
            if w > 0:
                h = min(y1, by1) - max(y0, by0)
                if h > 0 and w * h != 0.0:
                    break
        else:
            return (x0, y0, x1, y1)
    return None


def _taken_with(taken: NDArray[np.float64], n_placed: int, box: tuple[float, ...]
                ) -> NDArray[np.float64]:
    """``taken`` with ``box`` after its first ``n_placed`` rows (the labels placed)."""
    return np.concatenate([taken[:n_placed], np.array([box]), taken[n_placed:]])
