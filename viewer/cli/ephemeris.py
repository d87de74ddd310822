"""``perifocal ephemeris``: a CCSDS Orbit Ephemeris Message (KVN) of one body of a scene.

Epochs are written to the millisecond (``YYYY-MM-DDThh:mm:ss.sss``, cli.md) in the time
scale of ``--start``, stepping by ``--step`` on that scale's clock; each state is computed
at the epoch exactly as printed, so the file is self-consistent to far below 0.1 m.
"""

from __future__ import annotations

import argparse
import datetime as dt
import sys
from typing import Any

from ..errors import UserInputError

EXAMPLES = """examples:
  one day of a body every 10 minutes, from the scene epoch (the scene's time scale):
    perifocal ephemeris sat.toml --body "TESTSAT 1" --start "0 s" --stop "1 d" \\
        --step "10 min" -o testsat.oem
  between two UTC epochs (TIME_SYSTEM = UTC):
    perifocal ephemeris sat.toml --body "TESTSAT 1" --start "2030-01-01T00:00:00 UTC" \\
        --stop "2030-01-02T00:00:00 UTC" --step "60 s" -o testsat.oem

T is an epoch (ISO 8601, TDB when it has no scale suffix) or an offset from the scene
epoch ("90 d", "-15 min"; a bare number is in the scene's time unit, as in the scene
file). Lines run from start to stop inclusive: every step, and the stop itself. The OEM's
REF_FRAME is the scene's frame, its TIME_SYSTEM the time scale of --start (of the scene
epoch for an offset).
"""

#: Most data lines one file may have (a guard against a step typed in the wrong unit).
MAX_LINES = 1_000_000


def add_parser(sub: Any) -> None:
    from . import CAUTION

    p = sub.add_parser(
        "ephemeris",
        help="a CCSDS OEM (KVN) of one body",
        description="Write a CCSDS Orbit Ephemeris Message (CCSDS 502.0-B, KVN) of one body of "
        "a scene: its two-body position and velocity from start to stop.",
        epilog=EXAMPLES + "\n" + CAUTION,
        formatter_class=argparse.RawDescriptionHelpFormatter,
    )
    p.add_argument("scene", metavar="SCENE", help="the scene file")
    p.add_argument("--body", required=True, metavar="NAME", help="the body's name")
    p.add_argument("--start", required=True, metavar="T", help="first epoch or offset")
    p.add_argument("--stop", required=True, metavar="T", help="last epoch or offset")
    p.add_argument("--step", required=True, metavar="DT", help='time step, e.g. "60 s"')
    p.add_argument("-o", "--output", required=True, metavar="FILE.oem", help="the OEM to write")
    p.add_argument("--force", action="store_true",
                   help="replace an existing file (the old one is kept as NAME.bak)")
    p.add_argument("--object-id", metavar="ID",
                   help="OBJECT_ID (e.g. an international designator; default: the name)")
    p.set_defaults(run=run)


def body_by_name(scene: Any, name: str, flag: str) -> Any:
    """The scene's body called ``name``, or UserInputError naming ``flag`` and the bodies."""
    try:
        return scene.body(name)
    except KeyError:
        names = ", ".join(repr(b.name) for b in scene.bodies) or "none"
        raise UserInputError(flag, f"the scene has no body named {name!r}; its bodies: "
                             f"{names}") from None


def time_arg(text: str, flag: str, scene: Any) -> Any:
    """An Epoch from a flag: an ISO epoch (TDB without a suffix) or an offset from the
    scene epoch (bare numbers in the scene's time unit), by
    ``viewer.units.forms.epoch_from_text``."""
    from ..units.forms import EpochError, QuantityError, epoch_from_text

    try:
        return epoch_from_text(text, scene.epoch, scene.time_unit)
    except (EpochError, QuantityError) as err:
        raise UserInputError(flag, str(err)) from None


def _label(epoch: Any, scale: str, flag: str) -> tuple[dt.datetime, str | None]:
    """The epoch's calendar label in ``scale``, to the millisecond, as a naive datetime,
    and its CCSDS text when it falls in a leap second (second 60, which CCSDS allows in
    UTC and a datetime cannot hold; the datetime is then second 59 of that minute)."""
    from ..formats.kvn import format_epoch

    text = format_epoch(epoch, scale, 3)
    leap = text[17:19] == "60"
    try:
        label = dt.datetime.strptime(text[:17] + "59" + text[19:] if leap else text,
                                     "%Y-%m-%dT%H:%M:%S.%f")
    except ValueError:
        raise UserInputError(flag, f"{text} {scale} is outside years 1-9999; choose another "
                             f"time") from None
    return label, (text if leap else None)


def epoch_labels(start: Any, stop: Any, step_s: float, scale: str) -> tuple[list[str], Any]:
    """The data lines' epochs: start, start + k step, ..., and stop, as CCSDS text in
    ``scale`` to the millisecond, and each one's offset from the first on that scale's
    calendar in seconds. Steps are counted on the calendar (no leap seconds in labels)."""
    import numpy as np

    t0, leap0 = _label(start, scale, "--start")
    t1, leap1 = _label(stop, scale, "--stop")
    if stop < start:
        raise UserInputError("--stop", f"stop ({stop.iso(scale, 3)}) is before start "
                             f"({start.iso(scale, 3)})")
    if leap0 is not None:
        if leap1 == leap0:
            return [leap0], np.zeros(1)
        # Steps count from the second after the leap second: 23:59:60.5, then 00:01:00.5...
        t0 += dt.timedelta(seconds=1)
        t1 = max(t1, t0)
    span_ms = round((t1 - t0).total_seconds() * 1000.0)
    step_ms = step_s * 1000.0
    count = int(np.floor(span_ms / step_ms + 1e-9)) + 1
    if count > MAX_LINES:
        raise UserInputError("--step", f"{count:,} lines from start to stop; at most "
                             f"{MAX_LINES:,} per file (use a longer step)")
    offsets = [round(k * step_ms) for k in range(count)]
    stop_on_grid = offsets[-1] == span_ms
    if offsets[-1] < span_ms:
        offsets.append(span_ms)
    texts = [(t0 + dt.timedelta(milliseconds=ms)).strftime("%Y-%m-%dT%H:%M:%S.%f")[:-3]
             for ms in offsets]
    calendar_s = [ms / 1000.0 for ms in offsets]
    if leap0 is not None:
        texts[0] = leap0  # second 60 lies one second before the calendar's t0
    if leap1 is not None:
        # The stop is second 60, a second after t1 (second 59): it is the last line, and
        # t1 stays only if a step lands on it.
        if not stop_on_grid:
            texts.pop()
            calendar_s.pop()
        texts.append(leap1)
        calendar_s.append(span_ms / 1000.0 + 1.0)
    return texts, np.array(calendar_s, dtype=np.float64)


def label_times(texts: list[str], calendar_s: Any, scale: str, epoch0: Any) -> Any:
    """TDB seconds from ``epoch0`` to each label (``calendar_s`` its calendar offset).

    Labels an hour apart are converted exactly (leap seconds, TDB - TT); between them the
    difference to the calendar offset, smooth to a nanosecond over an hour (TDB - TT
    changes by at most 1.2 us an hour), is interpolated linearly. Where it jumps (a leap
    second), every label in between is converted exactly.
    """
    import numpy as np

    from ..units import parse_epoch

    def exact(i: int) -> float:
        return parse_epoch(f"{texts[i]} {scale}").seconds_since(epoch0) - calendar_s[i]

    n = len(texts)
    anchors = [0]
    for i in range(1, n):
        if calendar_s[i] - calendar_s[anchors[-1]] >= 3600.0 or i == n - 1:
            anchors.append(i)
    diff = {i: exact(i) for i in anchors}
    out = np.empty(n)
    out[0] = diff[0]
    for a, b in zip(anchors[:-1], anchors[1:], strict=True):
        if abs(diff[b] - diff[a]) > 1e-3:
            out[a:b + 1] = [exact(i) for i in range(a, b + 1)]
        else:
            out[a:b + 1] = np.interp(calendar_s[a:b + 1], [calendar_s[a], calendar_s[b]],
                                     [diff[a], diff[b]])
    return out + calendar_s


def run(args: argparse.Namespace) -> int:

    from ..fileio import claim_output, write_output
    from ..formats import write_oem
    from ..formats.kvn import creation_date_now
    from ..orbit import propagate, state_from_elements
    from ..scene import load_scene
    from . import CAUTION
    from .options import quantity

    scene = load_scene(args.scene)
    claim_output(args.output, force=args.force, inputs=[args.scene])
    body = body_by_name(scene, args.body, "--body")
    start = time_arg(args.start, "--start", scene)
    stop = time_arg(args.stop, "--stop", scene)
    step_s = quantity(args.step, "--step", "time", scene.time_unit)
    if not step_s >= 1e-3:
        raise UserInputError("--step", f"the step must be at least 1 ms (epochs are written to "
                             f"the millisecond); got {args.step!r}")
    scale = start.scale
    labels, calendar_s = epoch_labels(start, stop, step_s, scale)
    # Seconds of TDB from the body's epoch to each label, as printed.
    dts = label_times(labels, calendar_s, scale,
                      scene.epoch.plus_seconds(body.epoch_offset_s))
    if body.track is not None:  # positions from the ephemeris itself
        r, v = body.track.state(dts + body.epoch_offset_s, "--start/--stop")
        how = (f"positions from {body.track.source} ({body.track.target} relative to "
               f"{body.track.centre}, TDB), not a two-body conic.")
    else:
        mu = float(body.elements.mu)
        r0, v0 = state_from_elements(body.elements, mu)
        r, v = propagate(r0, v0, mu, dts)
        how = f"two-body Keplerian motion about {scene.center.name} (GM = {mu / 1e9:.12g} km3/s2)."
    comments = [
        f"Made by Perifocal from the scene {args.scene}, body {body.name!r}:",
        how,
        CAUTION,
    ]
    text = write_oem(
        object_name=body.name, object_id=args.object_id or body.name,
        center_name=scene.center.name.upper(), ref_frame=scene.frame, time_system=scale,
        epoch_texts=labels, r_m=r.reshape(-1, 3), v_m_s=v.reshape(-1, 3),
        creation_date=creation_date_now(), comments=comments)
    write_output(args.output, text.encode("utf-8"))
    sys.stdout.write(f"wrote {args.output}: {len(labels)} states of {body.name!r} from "
                     f"{labels[0]} to {labels[-1]} {scale}, step {step_s:g} s, frame "
                     f"{scene.frame}\n\n{CAUTION}\n")
    return 0
