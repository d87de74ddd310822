"""``perifocal import``: a CCSDS Orbit Parameter Message (KVN) into a new scene, or as one
more body of an existing scene (``--into``)."""

from __future__ import annotations

import argparse
import math
import sys
from pathlib import Path
from typing import Any

from ..errors import UserInputError

EXAMPLES = """examples:
  a new scene from an OPM (its REF_FRAME becomes the scene's frame):
    perifocal import sat.opm -o sat.toml
  add the OPM's object to a scene (its REF_FRAME must be the scene's frame):
    perifocal import chaser.opm --into mission.toml --name "Chaser"

The OPM's OBJECT_NAME names the body, CENTER_NAME picks the central body from the
catalogue (the message's GM is used when it gives one), EPOCH in TIME_SYSTEM (UTC, TAI,
TT, TDB) is the body's epoch, and COMMENT lines become comments in the scene. The state
vector is the truth: elements are computed from it with the scene's GM, so the scene
reproduces the message's position and velocity at its epoch.
"""


def add_parser(sub: Any) -> None:
    from . import CAUTION

    p = sub.add_parser(
        "import",
        help="a CCSDS OPM (KVN) into a scene",
        description="Read a CCSDS Orbit Parameter Message (CCSDS 502.0-B, KVN) and write a "
        "new scene (-o) or add its object to an existing scene (--into).",
        epilog=EXAMPLES + "\n" + CAUTION,
        formatter_class=argparse.RawDescriptionHelpFormatter,
    )
    p.add_argument("file", metavar="FILE", help="the OPM (KVN text)")
    out = p.add_mutually_exclusive_group(required=True)
    out.add_argument("-o", "--output", metavar="SCENE", help="the new scene file to write")
    out.add_argument("--into", metavar="SCENE", help="an existing scene to add the body to")
    p.add_argument("--name", help="the body's name (default: the OPM's OBJECT_NAME)")
    p.add_argument("--force", action="store_true", help="with -o: replace an existing file")
    p.set_defaults(run=run)


def run(args: argparse.Namespace) -> int:
    from ..fileio import claim_output, write_output
    from ..formats import parse_opm
    from ..scene import write_atomic
    from . import CAUTION

    src = str(args.file)
    message = parse_opm(_read(src), src)
    _refuse_rotating_frame(message, src)
    name = (args.name if args.name is not None else message.object_name).strip()
    if not name:
        raise UserInputError("--name", "the body's name must not be empty")
    if args.into is not None:
        target = Path(args.into)
        text, notes, summary = _into(message, src, target, name)
    else:
        target = claim_output(args.output, force=args.force, inputs=[src])
        text, notes, summary = _new_scene(message, src, target, name)
    if args.into is not None:
        write_atomic(target, text)  # the scene it adds to is kept as NAME.toml.bak
    else:
        write_output(target, text.encode("utf-8"))
    verb = "added to" if args.into is not None else "wrote"
    lines = [f"{verb} {target}: body {name!r}", *summary]
    lines += [f"note: {n}" for n in notes]
    sys.stdout.write("\n".join(lines) + "\n\n" + CAUTION + "\n")
    return 0


def _read(path: str) -> str:
    from ..fileio import NotRegularFileError, read_regular_bytes

    try:
        raw = read_regular_bytes(path)
    except NotRegularFileError:
        raise UserInputError(path, "this is not a regular file (a folder, FIFO, device or "
                             "socket); give the path of an OPM file") from None
    except FileNotFoundError:
        raise UserInputError(path, "no such file; give the path of an OPM in KVN text") from None
    except IsADirectoryError:
        raise UserInputError(path, "this is a folder; give the path of an OPM file") from None
    except OSError as err:
        raise UserInputError(path, f"cannot read the file: {err.strerror}") from None
    try:
        return raw.decode("utf-8-sig")
    except UnicodeDecodeError:
        raise UserInputError(path, "not UTF-8 text: an OPM in KVN is a text file (the XML form "
                             "is not read)") from None


def _refuse_rotating_frame(message: Any, src: str) -> None:
    from ..formats import ROTATING_FRAMES

    frame = message.ref_frame.strip().upper()
    if frame in ROTATING_FRAMES or frame.startswith("ITRF"):
        raise UserInputError(src, f"line {message.lines['REF_FRAME']}: REF_FRAME = "
                             f"{message.ref_frame} rotates with the Earth; a two-body orbit "
                             f"needs an inertial frame (EME2000, GCRF, ICRF, TOD, TEME, ...): "
                             f"convert the state first")


def _catalogue_entry(center_name: str) -> Any:
    from ..orbit import CATALOGUE

    return CATALOGUE.get(center_name.strip().lower())


def _body_text(message: Any, src: str, name: str, mu: float, epoch_text: str,
               notes: list[str], header_comments: bool) -> tuple[str, Any]:
    """The [[body]] text and the elements of the message's object about ``mu``; the
    message's header and metadata comments go with it when ``header_comments``."""
    import dataclasses

    import numpy as np

    from ..formats.scene_text import body_toml
    from ..orbit import OrbitError, elements_from_state

    r, v = message.state(mu)
    if message.r_m is not None and message.keplerian is not None:
        # Both forms given: the state vector is the primary (CCSDS 502.0-B sec. 3.2.4);
        # say so when the elements describe a different place.
        kr, _ = dataclasses.replace(message, r_m=None, v_m_s=None).state(mu)
        miss = float(np.linalg.norm(kr - r))
        if miss > 1.0:
            notes.append(f"the Keplerian elements (line {message.lines['SEMI_MAJOR_AXIS']}) "
                         f"put the object {miss / 1e3:,.3f} km from the state vector; the "
                         f"state vector is used")
    try:
        el = elements_from_state(r, v, mu)
    except OrbitError as err:
        raise UserInputError(src, f"line {message.lines.get('X', message.lines['EPOCH'])}: "
                             f"{err}") from None
    comments = [f"Imported from {Path(src).name} (CCSDS OPM {message.version}, ORIGINATOR "
                f"{message.originator}, CREATION_DATE {message.creation_date}):",
                f"OBJECT_NAME = {message.object_name}, OBJECT_ID = {message.object_id}, "
                f"CENTER_NAME = {message.center_name}, REF_FRAME = {message.ref_frame}"]
    comments += [f"OPM COMMENT: {c.text}" for c in message.comments
                 if header_comments or not _header_goes_on_top(c)]
    unused = sorted({k for k, _, _ in message.unused})
    if unused:
        comments.append(f"Not used by the two-body model: {', '.join(unused)}")
        if any(k.startswith("MAN_") for k in unused):
            notes.append("the message's manoeuvres are not applied (kept as a comment)")
    return body_toml(name, el, epoch_text, comments), el


def _header_goes_on_top(comment: Any) -> bool:
    return comment.section in ("header", "metadata")


def _epoch_text(message: Any) -> str:
    from ..formats.kvn import ccsds_epoch_to_iso

    return f"{ccsds_epoch_to_iso(message.epoch_text)} {message.time_system}"


def _new_scene(message: Any, src: str, target: Path, name: str) -> tuple[str, list[str],
                                                                          list[str]]:
    from ..formats.scene_text import center_toml, scene_toml, timeline_toml
    from . import CAUTION

    notes: list[str] = []
    entry = _catalogue_entry(message.center_name)
    gm = message.gm_m3_s2
    if entry is None and gm is None:
        from ..orbit import CATALOGUE

        raise UserInputError(src, f"line {message.lines['CENTER_NAME']}: CENTER_NAME = "
                             f"{message.center_name} is not in the catalogue "
                             f"({', '.join(CATALOGUE)}) and the message gives no GM")
    mu = gm if gm is not None else entry.gm_m3_s2
    if gm is not None and entry is not None and abs(gm - entry.gm_m3_s2) > 1e-9 * gm:
        notes.append(f"the message's GM {gm / 1e9:.10g} km3/s2 is used (the catalogue's "
                     f"{entry.name} has {entry.gm_m3_s2 / 1e9:.10g})")
    epoch_text = _epoch_text(message)
    body, el = _body_text(message, src, name, mu, epoch_text, notes, header_comments=False)
    center_name = entry.name if entry is not None else message.center_name.title()
    center = center_toml(center_name, entry.key if entry else None,
                         None if gm is None else gm, entry.radius_m if entry else None)
    top = [f"Perifocal scene made by `perifocal import` from {Path(src).name}.", CAUTION]
    top += [f"OPM COMMENT: {c.text}" for c in message.comments if _header_goes_on_top(c)]
    text = scene_toml(title=f"{name} (from {Path(src).name})", epoch_text=epoch_text,
                      frame=message.ref_frame.strip(), center=center, bodies=body,
                      header_comments=top, timeline=timeline_toml(*_show_timing(el)))
    scene = _check_loads(text, target, name, el, mu, src)
    return text, notes + list(scene.warnings), _summary(scene, name)


def _show_timing(el: Any) -> tuple[float, float, float]:
    """(start, rate, duration): two revolutions in 20 s of show, or an open conic's pass
    from 5 periapsis radii in to 5 out."""
    from ..orbit.flight import time_from_periapsis_to_radius

    duration = 20.0
    if float(el.e) < 1.0:
        return 0.0, 2.0 * float(el.period) / duration, duration
    t_far = float(time_from_periapsis_to_radius(el, 5.0 * float(el.periapsis)))
    t_now = float(el.time_since_periapsis)
    span = max(2.0 * t_far, abs(t_now) * 2.0)
    return -t_now - span / 2.0, span / duration, duration


def _into(message: Any, src: str, target: Path, name: str) -> tuple[str, list[str], list[str]]:
    from ..scene import load_scene, read_scene_text

    scene = load_scene(target)
    text = read_scene_text(target)
    notes: list[str] = []
    problems = []
    if message.ref_frame.strip().upper() != scene.frame.strip().upper():
        problems.append(f"line {message.lines['REF_FRAME']}: REF_FRAME = {message.ref_frame}, "
                        f"but the scene's frame is {scene.frame}: the states would be mixed "
                        f"across frames. Convert the state to {scene.frame} first (or, if "
                        f"they are one frame under two names, set the scene's frame)")
    entry = _catalogue_entry(message.center_name)
    same_center = (message.center_name.strip().lower() == scene.center.name.strip().lower()
                   or (entry is not None and scene.center.preset == entry.key))
    if not same_center:
        problems.append(f"line {message.lines['CENTER_NAME']}: CENTER_NAME = "
                        f"{message.center_name}, but the scene's centre is {scene.center.name}")
    if any(b.name == name for b in scene.bodies):
        problems.append(f"the scene already has a body named {name!r}; give another with "
                        f"--name")
    if problems:
        raise UserInputError(src, problems)
    mu = scene.center.gm_m3_s2
    gm = message.gm_m3_s2
    if gm is not None and abs(gm - mu) > 1e-9 * mu:
        notes.append(f"the message's GM is {gm / 1e9:.10g} km3/s2 and the scene's "
                     f"{mu / 1e9:.10g}: the state vector is kept and the elements are "
                     f"computed with the scene's GM")
    body, el = _body_text(message, src, name, mu, _epoch_text(message), notes,
                          header_comments=True)
    new_text = text + ("" if text.endswith("\n") else "\n") + "\n" + body
    loaded = _check_loads(new_text, target, name, el, mu, src)
    new_warnings = [w for w in loaded.warnings if w not in scene.warnings]
    return new_text, notes + new_warnings, _summary(loaded, name)


def _check_loads(text: str, target: Path, name: str, el: Any, mu: float, src: str) -> Any:
    """Load the scene text as Perifocal will; it must give back the message's orbit."""
    import numpy as np

    from ..orbit import state_from_elements
    from ..scene import load_scene_text

    try:
        scene = load_scene_text(text, source=target, base_dir=target.parent)
    except UserInputError as err:
        raise UserInputError(src, [f"the scene made from this message would not be valid "
                                   f"({target}):", *err.problems]) from None
    body = scene.body(name)
    r0, v0 = state_from_elements(el, mu)
    r1, v1 = state_from_elements(body.elements, scene.center.gm_m3_s2)
    if np.linalg.norm(r1 - r0) > 1e-3 or np.linalg.norm(v1 - v0) > 1e-6:
        raise RuntimeError(f"the scene written for {src} does not reproduce its state "
                           f"({np.linalg.norm(r1 - r0):.3g} m apart)")
    return scene


def _summary(scene: Any, name: str) -> list[str]:
    from ..units import format_eccentricity

    body = scene.body(name)
    el = body.elements
    c = scene.center
    e = float(el.e)
    q = float(el.periapsis)
    rows = [f"  centre {c.name}, frame {scene.frame}, epoch {scene.epoch.iso(decimals=3)}",
            f"  e = {format_eccentricity(e, 9)}, periapsis {q / 1e3:,.3f} km (altitude "
            f"{(q - c.radius_m) / 1e3:,.3f} km), speed there "
            f"{float(el.speed_periapsis) / 1e3:.6f} km/s"]
    if e < 1.0:
        rows.append(f"  a = {float(el.a) / 1e3:,.3f} km, apoapsis {float(el.apoapsis) / 1e3:,.3f}"
                    f" km, period {float(el.period) / 3600:.6f} h")
    else:
        rows.append(f"  open orbit: v_inf = {float(el.v_infinity) / 1e3:.6f} km/s, turning angle "
                    f"{math.degrees(float(el.turning_angle)):.4f} deg" if e > 1.0 else
                    "  open orbit (parabola): escape speed exactly")
    return rows
