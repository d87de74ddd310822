"""The text forms people type at the edges, parsed once: an image size ``"WxH"``, a
scene time given as an offset from the scene epoch (``"90 d"``, ``"-15 d"``) or as an
epoch (``"2030-06-01T00:00:00 TDB"``), and a time into a show (``"12 s"``, ``"1:05"``,
``"121/30"``, ``"frame 121"``). Scene keys, command-line flags and panel fields all call
these, and wrap the error in their own place (a key path, a flag, a field).
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


class ShowTimeError(QuantityError):
    """Text that is not a time into the show (within it); the message says what is allowed."""


_CLOCK = re.compile(r"\s*(?:(\d+):)?(\d+):(\d+(?:\.\d*)?)\s*")
_RATIO = re.compile(r"\s*(\d+(?:\.\d*)?)\s*/\s*(\d+(?:\.\d*)?)\s*")
_FRAME = re.compile(r"\s*frame\s+(\d+)\s*", re.IGNORECASE)


def show_time_hint() -> str:
    """What a time into the show may be, for refusals."""
    return ('write seconds into the show ("12 s", "1.5 min"; a bare number is seconds), '
            'minutes:seconds ("1:05"), a frame as frame/fps ("121/30") or "frame 121"')


def parse_show_time(value: object, duration_s: float | None = None, *,
                    fps: float | None = None) -> float:
    """Seconds into a show from the forms people type: a time (``"12 s"``, ``"1.5 min"``;
    a bare number is in seconds), ``m:ss`` or ``h:mm:ss`` (``"1:05"``, ``"0:07.5"``), a
    frame as ``k/fps`` (``"121/30"``: the very float ``121 / 30`` that frame 121 of a
    30 fps show is at) or, with ``fps`` given, ``"frame 121"``. 0 or later, and no later
    than ``duration_s`` when it is given. Raises ShowTimeError."""
    text = value if isinstance(value, str) else None
    if isinstance(value, bool):
        raise ShowTimeError(f"{value!r} is not a time into the show; {show_time_hint()}")
    clock = _CLOCK.fullmatch(text) if text is not None else None
    ratio = _RATIO.fullmatch(text) if text is not None else None
    frame = _FRAME.fullmatch(text) if text is not None else None
    if clock:
        hours, minutes, seconds = clock.groups()
        if float(seconds) >= 60.0 or (hours is not None and int(minutes) >= 60):
            raise ShowTimeError(f"{value!r}: minutes and seconds after a colon are below 60; "
                                f"{show_time_hint()}")
        x = int(hours or 0) * 3600.0 + int(minutes) * 60.0 + float(seconds)
    elif ratio:
        num, den = float(ratio.group(1)), float(ratio.group(2))
        if den <= 0.0:
            raise ShowTimeError(f"{value!r}: the frame rate after / must be above 0")
        x = num / den
    elif frame:
        if fps is None:
            raise ShowTimeError(f"{value!r}: a frame number needs the show's frame rate here; "
                                'write it as frame/fps, such as "121/30"')
        x = int(frame.group(1)) / fps
    else:
        try:
            x = parse_limited(value, "time", "s")
        except QuantityError:
            raise ShowTimeError(f"{value!r} is not a time into the show; "
                                f"{show_time_hint()}") from None
    if not x >= 0.0:
        raise ShowTimeError(f"{value!r} is before the show; times into the show are 0 or later")
    if duration_s is not None and x > duration_s * (1 + 1e-12):
        raise ShowTimeError(f"{value!r} is {x:g} s, after the end of the show ({duration_s:g} "
                            f"s); times into the show are 0 to {duration_s:g} s")
    return x


def scene_time_hint() -> str:
    """What a scene time may be, for refusals."""
    return ('give an epoch such as "2030-01-01T00:00:00 UTC" or an offset from the scene '
            'epoch such as "90 d"')


__all__ = ["EPOCH_START", "MAX_SIDE_PX", "EpochError", "QuantityError", "ShowTimeError",
           "SizeError", "epoch_from_text", "is_epoch_text", "parse_epoch", "parse_scene_time",
           "parse_show_time", "parse_size", "scene_time_hint", "show_time_hint"]
