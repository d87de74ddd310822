"""The text forms people type at the edges, parsed once: an image size ``"WxH"`` and a
scene time given as an offset from the scene epoch (``"90 d"``, ``"-15 d"``) or as an
epoch (``"2030-06-01T00:00:00 TDB"``). Scene keys, command-line flags and panel fields
all call these, and wrap the error in their own place (a key path, a flag, a field).
"""

from __future__ import annotations

import re

from .epoch import Epoch, EpochError, parse_epoch
from .limits import limit_problem, parse_limited
from .quantity import QuantityError

#: The largest image side in pixels (the renderer's framebuffer limit on llvmpipe).
MAX_SIDE_PX = 16384
#: Text that starts like an ISO 8601 date is an epoch; anything else is an offset.
EPOCH_START = re.compile(r"^\s*[+-]?\d{4}-\d{2}-\d{2}")
_SIZE = re.compile(r"\s*(\d+)\s*[xX\u00d7]\s*(\d+)\s*")


class SizeError(ValueError):
    """Text that is not an image size within the limits; the message says what is allowed."""


def parse_size(text: str, low: tuple[int, int] = (1, 1),
               high: tuple[int, int] = (MAX_SIDE_PX, MAX_SIDE_PX)) -> tuple[int, int]:
    """(W, H) in pixels from "WxH" ("1920x1080", "1920 x 1080", "1920×1080")."""
    m = _SIZE.fullmatch(text)
    if not m:
        raise SizeError(f"{text!r} is not a size; write WxH, e.g. 1920x1080")
    w, h = int(m.group(1)), int(m.group(2))
    if not (low[0] <= w <= high[0] and low[1] <= h <= high[1]):
        if low == (1, 1) and high[0] == high[1]:
            raise SizeError(f"{text!r}: each side must be 1 to {high[0]} px")
        raise SizeError(f"{text!r}: allowed {low[0]}x{low[1]} to {high[0]}x{high[1]} px")
    return w, h


def is_epoch_text(value: object) -> bool:
    """Whether ``value`` is text that starts like an ISO 8601 date."""
    return isinstance(value, str) and EPOCH_START.match(value) is not None


def parse_scene_time(value: object, scene_epoch: Epoch, time_unit: str) -> float:
    """Seconds from ``scene_epoch``: an epoch's offset from it, or an offset as a time
    (a bare number in ``time_unit``), held to the time limit scene files have
    (``viewer.units.limits``). Raises EpochError or QuantityError."""
    if is_epoch_text(value):
        t_s = parse_epoch(value).seconds_since(scene_epoch)
        too_large = limit_problem(t_s, "time")
        if too_large is not None:
            raise QuantityError(f"{value!r} is {t_s:.3g} s from the scene epoch, which "
                                f"{too_large}")
        return t_s
    return parse_limited(value, "time", time_unit)


def epoch_from_text(value: str, scene_epoch: Epoch, time_unit: str) -> Epoch:
    """An Epoch from a date typed as an ISO epoch (kept in its own time scale, TDB when
    none is given) or as an offset from ``scene_epoch`` (a bare number in
    ``time_unit``), within years 1 to 9999. Raises EpochError or QuantityError, whose
    text says what may be written."""
    try:
        if is_epoch_text(value):
            epoch = parse_epoch(value)
        else:
            epoch = scene_epoch.plus_seconds(parse_scene_time(value, scene_epoch, time_unit))
    except (EpochError, QuantityError) as err:
        raise type(err)(f"{err}; {scene_time_hint()}") from None
    if not epoch.in_calendar():
        raise EpochError(f"{value!r} is outside years 1 to 9999 (epochs are written with "
                         "four-digit years); give a nearer time")
    return epoch


def scene_time_hint() -> str:
    """What a scene time may be, for refusals."""
    return ('give an epoch such as "2030-01-01T00:00:00 UTC" or an offset from the scene '
            'epoch such as "90 d"')


__all__ = ["EPOCH_START", "MAX_SIDE_PX", "EpochError", "QuantityError", "SizeError",
           "epoch_from_text", "is_epoch_text", "parse_epoch", "parse_scene_time", "parse_size",
           "scene_time_hint"]
