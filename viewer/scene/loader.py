"""Loading a scene file: TOML text -> a validated, frozen Scene in SI units and radians.

``load_scene(path)`` reads the file (refusing missing files, folders, files over
``MAX_FILE_BYTES``, binary data and text that is not UTF-8), parses it with the standard
library's tomllib, checks every key against ``viewer.scene.spec`` and every value against
its kind and range, fills in the defaults of docs/scene-format.md and returns a Scene. All
problems of a file are collected and raised together as one
``UserInputError(path, [one line per problem])``; legal but suspicious values become
``Scene.warnings`` (and ``Body.warnings``).

Bodies are parsed one by one into plain floats; the Kepler solve from mean anomaly to true
anomaly is one vectorised call for all bodies, so 1,000 bodies load in a few tens of ms.
"""

from __future__ import annotations

import math
import re
import tomllib
from collections.abc import Sequence
from dataclasses import dataclass, replace
from pathlib import Path
from typing import Any

import numpy as np

from ..errors import UserInputError
from ..fileio import NotRegularFileError, read_regular_bytes
from ..orbit import CATALOGUE, Elements, true_from_mean
from ..orbit.constants import G_SI
from ..units import Epoch, parse_epoch
from . import spec
from .model import (
    DEFAULT_EPOCH_TEXT,
    Body,
    BodyShow,
    Camera,
    CameraKey,
    Caption,
    Center,
    DomeSettings,
    Fade,
    Population,
    RateKey,
    RenderSettings,
    Scene,
    Sweep,
    Timeline,
    name_key,
)
from .population import TableError, generate_belt, read_csv, read_npy, to_elements
from .report import orbit_warnings
from .values import (
    MAX_E,
    MAX_LENGTH_M,
    MAX_TIME_S,
    MIN_GM,
    MIN_SIZE_M,
    Reader,
    file_in_folder,
    one_line,
    parse_color,
)

#: Scene files larger than this are refused before reading (large populations belong in
#: a table file, see ``population.table``).
MAX_FILE_BYTES = 64 * 1024 * 1024
#: At most this many [[body]] tables in one file.
MAX_BODIES = 100_000
#: Eccentricities above this are refused (numbers stay well conditioned below it).
#: Open conics are drawn out to this many periapsis radii when limit_radius is not given.
DEFAULT_LIMIT_PERIAPSES = 5.0

TWO_PI = 2.0 * math.pi
SIZE_FORMS = "a | period | periapsis+apoapsis | periapsis+e"

#: Colours of bodies that give none, in order (our own palette, distinct on black).
PALETTE = ("#7fd0ff", "#ffb347", "#9be37a", "#ff7f9f", "#c7a4ff", "#f5e663", "#5fe0c8",
           "#ff9966")


def free_color(bodies: Sequence[Body]) -> tuple[float, float, float]:
    """The first palette colour no body has yet (the palette again once all are taken)."""
    taken = {b.color for b in bodies}
    colors = [parse_color(c) for c in PALETTE]
    return next((c for c in colors if c not in taken), colors[len(bodies) % len(colors)])


# --- reading the file ---------------------------------------------------------------


def read_scene_text(path: str | Path) -> str:
    """The text of a scene file, or UserInputError saying why it cannot be read."""
    p = Path(path)
    src = str(path)
    try:
        st = p.stat()
    except FileNotFoundError:
        raise UserInputError(src, "no such file; give the path of a .toml scene "
                             "(the bundled ones are in scenes/)") from None
    except OSError as err:
        raise UserInputError(src, f"cannot read the file: {err.strerror}") from None
    if p.is_dir():
        raise UserInputError(src, "this is a folder; give the path of a .toml scene file")
    if st.st_size > MAX_FILE_BYTES:
        raise UserInputError(src, f"the file is {st.st_size / 2**20:.1f} MiB; a scene file may "
                             f"be at most {MAX_FILE_BYTES // 2**20} MiB (put large populations "
                             "in a table file: population.table)")
    try:
        raw = read_regular_bytes(p, MAX_FILE_BYTES)
    except NotRegularFileError:
        raise UserInputError(src, "this is not a regular file (a FIFO, device or socket); "
                             "give the path of a .toml scene file") from None
    except OSError as err:
        raise UserInputError(src, f"cannot read the file: {err.strerror}") from None
    if len(raw) > MAX_FILE_BYTES:
        raise UserInputError(src, f"the file is over {MAX_FILE_BYTES // 2**20} MiB; a scene "
                             "file may be at most that")
    return decode_scene_bytes(raw, src)


def decode_scene_bytes(raw: bytes, source: str) -> str:
    """UTF-8 text from the bytes of a scene file (a BOM is dropped); refuses binary data."""
    zero = raw.find(b"\x00")
    if zero >= 0:
        raise UserInputError(source, f"this is not a text file (a zero byte at offset {zero}); "
                             "a scene is a UTF-8 TOML text file")
    try:
        text = raw.decode("utf-8")
    except UnicodeDecodeError as err:
        line = raw[: err.start].count(b"\n") + 1
        raise UserInputError(source, f"line {line}: not UTF-8 text (byte 0x{raw[err.start]:02x} "
                             f"at offset {err.start}); save the file as UTF-8") from None
    return text[1:] if text.startswith("\ufeff") else text


def load_scene(path: str | Path) -> Scene:
    """The Scene of a TOML scene file; UserInputError(path, problems) if it is not valid.

    Population table files are found relative to the scene file's folder.
    """
    p = Path(path)
    return load_scene_text(read_scene_text(p), source=p, base_dir=p.parent)


def load_scene_text(text: str, source: str | Path = "<scene>",
                    base_dir: str | Path | None = None) -> Scene:
    """The Scene of TOML ``text``; ``source`` names it in messages, ``base_dir`` is where
    population tables are looked for (default: the current folder)."""
    src = str(source)
    try:
        data = tomllib.loads(text)
        r = Reader(text)
        title = Path(source).stem if isinstance(source, Path) else "Untitled scene"
        loaded = _Loader(r, data, Path(base_dir) if base_dir is not None else Path("."), title)
        scene = loaded.scene(Path(source) if isinstance(source, Path) else None)
    except tomllib.TOMLDecodeError as err:
        raise UserInputError(src, syntax_message(err, text)) from None
    except RecursionError:  # [[[[...]]]] or {a={a={...}}} thousands deep
        raise UserInputError(src, "arrays or inline tables are nested too deeply; a scene "
                             "nests them a few levels at most") from None
    if r.problems or scene is None:
        raise UserInputError(src, r.problems or ["the scene could not be read"])
    return scene


_AT = re.compile(r"^(.*?)\s*\(at (?:line (\d+), column (\d+)|end of document)\)\s*$")


def syntax_message(err: tomllib.TOMLDecodeError, text: str) -> str:
    """One line for a TOML syntax error: where, what the parser said, and a likely fix."""
    m = _AT.match(str(err))
    what = m.group(1) if m else str(err)
    line = int(m.group(2)) if m and m.group(2) else None
    where = f"line {line}, column {m.group(3)}" if m and line else "at the end of the file"
    hint = ""
    lines = text.splitlines()
    source_line = lines[line - 1] if line and line <= len(lines) else ""
    column = int(m.group(3)) if m and m.group(3) else 0
    rest = source_line[column - 1:] if column else ""  # where the parser stopped
    key, _, value = (part.strip() for part in source_line.partition("="))
    value = value.split("#")[0].strip()
    quantity = r"^[+-]?[\d.]+(?:[eE][+-]?\d+)?\s*[A-Za-z/]"
    if rest.startswith(("True", "False")):
        hint = "; booleans are lower case: true, false"
    elif re.match(quantity, value):
        hint = f'; a value with a unit needs quotes: {key} = "{value}"'
    elif re.match(r"^[A-Za-z_]", value) and value.split()[0] not in ("true", "false",
                                                                        "inf", "nan"):
        hint = f'; text needs quotes: {key} = "{value}"'
    elif re.match(quantity, rest) or re.match(r"^[A-Za-z_]", rest):
        hint = '; text and values with units need quotes, e.g. a = "1.2 au"'
    elif "Illegal character" in what and source_line.count('"') % 2 == 1:
        hint = "; a string is not closed: add the closing quote on the same line"
    elif "overwrite" in what or "declare" in what.lower():
        hint = "; a key or table is given twice"
    return f"{where}: not valid TOML: {what}{hint}"


# --- the sections ------------------------------------------------------------------


@dataclass
class _RawBody:
    """A body parsed to plain floats, before the vectorised anomaly conversion."""

    index: int
    name: str
    a: float
    e: float
    parabola_p: float | None
    i: float
    raan: float
    argp: float
    M: float | None
    nu: float | None
    epoch_offset_s: float
    t: dict[str, Any]
    path: str
    color: tuple[float, float, float]
    line_width: float | None
    radius: float | None
    flags: dict[str, bool | None]
    sweep: dict[str, Any] | None
    limit: float | None
    gm: float = 0.0
    track: Any = None
    flight: tuple[float, float] | None = None


class _Loader:
    def __init__(self, r: Reader, data: dict[str, Any], base_dir: Path, title: str) -> None:
        self.r = r
        self.data = data
        self.base_dir = base_dir
        self.default_title = title
        self.warnings: list[str] = []
        self.body_names: list[str] = []
        self.frame = "ECLIPJ2000"
        self.center: Center | None = None
        self.kernel: Any = None

    def scene(self, source: Path | None) -> Scene | None:
        r = self.r
        r.check_keys(self.data, spec.TOP, "")
        for name in ("body", "population"):
            if isinstance(self.data.get(name), dict):
                r.problem(name, f"write [[{name}]] with two pairs of brackets: {name} is an "
                          f"array of tables, one per {name}")
        s = r.table(self.data, spec.SCENE, "")
        title, frame, epoch = self._scene_table(s or {})
        r.epoch = epoch
        self.frame = frame
        center = self._center()
        bodies = self._bodies(center)
        populations = self._populations(center)
        render = self._render()
        camera = self._camera(bodies, populations, center, render)
        timeline = self._timeline()
        dome = self._dome()
        if r.problems or center is None or bodies is None:
            return None
        return Scene(title=title, epoch=epoch, frame=frame, center=center, bodies=bodies,
                     camera=camera, render=render, timeline=timeline,
                     populations=populations, source=source, length_unit=r.units["length"],
                     time_unit=r.units["time"], angle_unit=r.units["angle"],
                     warnings=tuple(self.warnings), dome=dome)

    # [scene] -------------------------------------------------------------------------

    def _scene_table(self, s: dict[str, Any]) -> tuple[str, str, Epoch]:
        r = self.r
        fmt = r.integer(s, "format", "scene", 0, 1_000_000)
        if fmt is not None and fmt != 1:
            r.problem("scene.format", f"format = {fmt}: this version of Perifocal reads scene "
                      "format 1 only")
        units = r.table(s, spec.UNITS, "scene")
        for dim in ("length", "time", "angle"):
            key = spec.UNITS.key(dim)
            assert key is not None
            u = r.choice(units or {}, dim, "scene.units", key.choices)
            if u is not None:
                r.units[dim] = u
        title = r.string(s, "title", "scene", nonempty=True, max_len=200) or self.default_title
        r.string(s, "description", "scene")
        frame = r.frame(s, "frame", "scene") or "ECLIPJ2000"
        epoch = r.epoch_key(s, "epoch", "scene") or parse_epoch(DEFAULT_EPOCH_TEXT)
        return title, frame, epoch

    # [center] ------------------------------------------------------------------------

    def _center(self) -> Center | None:
        r = self.r
        if "center" not in self.data:
            r.problem("center", 'missing [center] table: give it gm = "..." (e.g. gm = '
                      '"1.32712440018e20 m3/s2") or preset = "sun"')
            return None
        c = r.table(self.data, spec.CENTER, "")
        if c is None:
            return None
        m0 = r.mark()
        preset_key = spec.CENTER.key("preset")
        assert preset_key is not None
        preset = r.choice(c, "preset", "center", preset_key.choices, fold_case=True)
        gm = r.quantity(c, "gm", "center", "gm")
        if "gm" in c and "preset" in c:
            r.problem("center.gm", "both gm and preset are given; give one (preset sets gm "
                      "and radius; radius may still be given to override it)")
        elif "gm" not in c and "preset" not in c:
            r.problem("center", 'missing gm: give gm = "..." (e.g. "3.986004418e14 m3/s2") or '
                      f"preset = one of {', '.join(CATALOGUE)}")
        if gm is not None and not gm >= MIN_GM:
            r.problem("center.gm", f"gm must be positive (at least {MIN_GM:g} m3/s2)")
        radius = self._nonneg(c, "radius", "center")
        atmosphere = self._nonneg(c, "atmosphere", "center")
        soi = self._nonneg(c, "soi_radius", "center")
        color = r.color(c, "color", "center") or parse_color("#ffd27f")
        show = r.table(c, spec.CENTER.keys[-1], "center") or {}
        show_body = r.boolean(show, "body", "center.show")
        show_label = r.boolean(show, "label", "center.show")
        name = r.string(c, "name", "center", nonempty=True, max_len=200)
        origin = r.choice(c, "origin", "center", spec.ORIGINS) or "body"
        if r.failed_since(m0):
            return None
        entry = CATALOGUE[preset] if preset else None
        if entry is not None:
            gm = entry.gm_m3_s2
            radius = entry.radius_m if radius is None else radius
        assert gm is not None
        radius = radius or 0.0
        if soi is not None and soi <= radius:
            r.problem("center.soi_radius", "soi_radius must be larger than the radius")
            return None
        return Center(name=name or (entry.name if entry else "Center"), gm_m3_s2=gm,
                      radius_m=radius, color=color,
                      show_body=True if show_body is None else show_body,
                      show_label=True if show_label is None else show_label, preset=preset,
                      atmosphere_m=atmosphere, soi_radius_m=soi, origin=origin)

    def _nonneg(self, t: dict[str, Any], key: str, path: str,
                positive: bool = False) -> float | None:
        x = self.r.quantity(t, key, path, "length")
        if x is not None and (x < 0 or (positive and x == 0)):
            what = "positive" if positive else "zero or positive"
            self.r.problem(f"{path}.{key}", f"{key} must be {what}")
            return None
        return x

    # [[body]] ------------------------------------------------------------------------

    def _bodies(self, center: Center | None) -> tuple[Body, ...] | None:
        r = self.r
        raw = self.data.get("body", [])
        if isinstance(raw, dict):
            return None  # reported in scene()
        if not isinstance(raw, list):
            r.problem("body", "write each body as a [[body]] table")
            return None
        if len(raw) > MAX_BODIES:
            r.problem("body", f"{len(raw)} bodies; a file may have at most {MAX_BODIES} "
                      "(put large populations in a table file: [[population]])")
            return None
        mu = center.gm_m3_s2 if center is not None else None
        self.center = center
        parsed: list[_RawBody] = []
        names: dict[str, int] = {}
        # Names the camera's target already means: "center" and the central body's own.
        taken = {name_key("center"): 'the word "center" (the camera\'s name for the central '
                                     'body)'}
        if center is not None:
            taken[name_key(center.name)] = f'the central body\'s name ("{center.name}")'
        for k, t in enumerate(raw):
            b = self._raw_body(k, t, mu, names, taken)
            if b is not None:
                parsed.append(b)
        if center is None:
            return None
        # One vectorised Kepler solve for every body given by M (or tp).
        by_m = [b for b in parsed if b.M is not None]
        if by_m:
            nus = np.atleast_1d(true_from_mean(np.array([b.M for b in by_m]),
                                               np.array([b.e for b in by_m])))
            for b, nu in zip(by_m, nus, strict=True):
                b.nu = float(nu)
        return tuple(self._finish_body(b, center) for b in parsed)

    def _raw_body(self, k: int, t: Any, mu: float | None, names: dict[str, int],
                  taken: dict[str, str]) -> _RawBody | None:
        r = self.r
        path = f"body[{k}]"
        if not isinstance(t, dict):
            r.problem(path, "write each body as a [[body]] table of keys")
            return None
        name = t.get("name")
        if isinstance(name, str) and name.strip():
            r.labels[path] = name
        m0 = r.mark()
        r.check_keys(t, spec.BODY, path)
        if "name" not in t:
            r.problem(path, 'missing name: every body needs name = "..."')
        name = r.string(t, "name", path, nonempty=True, max_len=200)
        if name is not None:
            key = name_key(name)
            if key in names:
                r.problem(f"{path}.name", f'"{name}" is already the name of body[{names[key]}] '
                          "(names equal after trimming spaces and Unicode NFC are the same); "
                          "names must be unique (the camera and the editor find bodies by name)")
            elif key in taken:
                r.problem(f"{path}.name", f'"{name}" is {taken[key]}; give the body another '
                          "name (the camera's target would be ambiguous)")
            names.setdefault(key, k)
            self.body_names.append(name)
        gm_body = r.quantity(t, "gm", path, "gm")
        if gm_body is not None and not gm_body >= 0.0:
            r.problem(f"{path}.gm", "gm must be zero or positive")
        mass = r.number(t, "mass", path, 0.0, 1e45)
        if mass is not None:
            if "gm" in t:
                r.problem(f"{path}.mass", "both gm and mass are given; give one")
            gm_body = G_SI * mass
        follows = "ephemeris" in t or "ephemeris_body" in t
        track = self._track(t, path, name) if follows else None
        size: tuple[float, float, float | None] | None = None
        if track is not None:
            gm_body = track[1] if gm_body is None else gm_body
            size = (float(track[2].a), float(track[2].e), None)
        elif not follows:
            if "osculating_epoch" in t:
                r.problem(f"{path}.osculating_epoch", "osculating_epoch is for a body that "
                          'follows an ephemeris (ephemeris = "DE421"); remove it')
            size = self._size(t, path, None if mu is None else mu + (gm_body or 0.0))
        i = r.quantity(t, "i", path, "angle")
        if i is not None and not -1e-12 <= i <= math.pi * (1 + 1e-12):
            r.problem(f"{path}.i", f"i = {math.degrees(i):.6g} deg is out of range; allowed: 0 to "
                      "180 deg (above 90 deg is retrograde)")
            i = None
        raan = r.quantity(t, "raan", path, "angle")
        argp = r.quantity(t, "argp", path, "angle")
        epoch = r.epoch_key(t, "epoch", path)
        offset = 0.0
        if epoch is not None and r.epoch is not None:
            offset = epoch.seconds_since(r.epoch)
            if abs(offset) > MAX_TIME_S:
                r.problem(f"{path}.epoch", f"the epoch is too far from the scene epoch; allowed "
                          f"within {MAX_TIME_S:g} s")
        given = [key for key in spec.ANOMALY_KEYS if key in t]
        if len(given) > 1:
            r.problem(f"{path}.{given[1]}", f"{' and '.join(given)} are both given; give one of "
                      "M | nu | tp (where the body is at its epoch)")
        M = r.quantity(t, "M", path, "angle")
        nu = r.quantity(t, "nu", path, "angle")
        tp = r.time_or_epoch(t, "tp", path)
        color = r.color(t, "color", path) or parse_color(PALETTE[k % len(PALETTE)])
        # Keys that do not depend on the orbit are checked even when the orbit is wrong.
        line_width = r.number(t, "line_width", path, 0.0, 100.0, lo_open=True)
        radius = self._nonneg(t, "radius", path)
        show_t = r.table(t, spec.SHOW, path) or {}
        flags = {key.name: r.boolean(show_t, key.name, f"{path}.show") for key in spec.SHOW.keys}
        if flags["sweep"] and "sweep" not in t:
            r.problem(f"{path}.show.sweep", "show.sweep = true needs a sweep table "
                      '(e.g. sweep = { interval = "30 d", count = 6 })')
        sweep = self._sweep_values(t, path)
        limit = r.quantity(t, "limit_radius", path, "length")
        if r.failed_since(m0) or size is None:
            return None
        a, e, parabola_p = size
        nu_value: float | None = None
        M_value: float | None = None
        if track is not None:  # the osculating conic at the scene epoch
            osc = track[2]
            i, raan, argp, nu = float(osc.i), float(osc.raan), float(osc.argp), float(osc.nu)
        if nu is not None:
            nu_value = nu
            if e >= 1.0:
                nu_w = math.remainder(nu, TWO_PI)
                asymptote = math.pi if e == 1.0 else math.acos(-1.0 / e)
                if abs(nu_w) >= asymptote:
                    r.problem(f"{path}.nu", f"nu = {math.degrees(nu):.6g} deg is beyond the "
                              f"asymptotes of this open orbit; allowed: |nu| < "
                              f"{math.degrees(asymptote):.6g} deg")
                    return None
                nu_value = nu_w
            else:
                nu_value = nu % TWO_PI
        else:
            if tp is not None:
                if mu is None:
                    return None  # the centre's problem is already reported
                n = (2.0 * math.sqrt(mu / parabola_p**3) if parabola_p is not None
                     else math.sqrt(mu / abs(a) ** 3))
                M_value = n * (offset - tp)
            else:
                M_value = M or 0.0
            if e < 1.0:
                M_value = M_value % TWO_PI
        return _RawBody(k, name or "", a, e, parabola_p, max(0.0, min(i or 0.0, math.pi)),
                        (raan or 0.0) % TWO_PI, (argp or 0.0) % TWO_PI, M_value, nu_value, offset,
                        t, path, color, line_width, radius, flags, sweep, limit,
                        gm_body or 0.0, None if track is None else track[0],
                        self._flight(t, path))

    def _flight(self, t: dict[str, Any], path: str) -> tuple[float, float] | None:
        """(start, end) scene times of a [[body]] flight table, or None."""
        r = self.r
        if "flight" not in t:
            return None
        ft = r.table(t, spec.FLIGHT, path)
        if ft is None:
            return None
        where = f"{path}.flight"
        missing = [k for k in ("start", "end") if k not in ft]
        if missing:
            r.problem(where, f"missing {' and '.join(missing)}: a flight needs start and end "
                      '(e.g. flight = { start = "0 d", end = "259 d" })')
            return None
        start = r.time_or_epoch(ft, "start", where)
        end = r.time_or_epoch(ft, "end", where)
        if start is None or end is None:
            return None
        if not end > start:
            r.problem(f"{where}.end", "the end of the flight must come after its start")
            return None
        return start, end

    def _track(self, t: dict[str, Any], path: str, name: str | None) -> Any:
        """(Track, GM of the body, osculating Elements at the scene epoch) of a body that
        follows an ephemeris, or None with the problems recorded."""
        from ..ephemeris import (
            ECLIPTIC_FRAMES,
            EPHEMERIDES,
            EQUATORIAL_FRAMES,
            TARGETS,
            Kernel,
            Track,
            frame_rotation,
        )

        r = self.r
        m0 = r.mark()
        source = r.choice(t, "ephemeris", path, EPHEMERIDES) or "DE421"
        target = r.choice(t, "ephemeris_body", path, TARGETS, fold_case=True)
        if target is None and "ephemeris_body" not in t and name is not None:
            target = name.strip().lower()
            if target not in TARGETS:
                r.problem(f"{path}.ephemeris_body", f"{source.upper()} has no body named "
                          f"{name!r}; give ephemeris_body = one of {', '.join(TARGETS)}")
        orbit_keys = [k for k in (*spec.SIZE_KEYS, "e", "i", "raan", "argp",
                                  *spec.ANOMALY_KEYS, "epoch") if k in t]
        if orbit_keys:
            r.problem(f"{path}.{orbit_keys[0]}", f"{', '.join(orbit_keys)}: a body that follows "
                      "an ephemeris takes its orbit from it; remove these keys")
        center = self.center
        if center is None:
            return None
        if center.preset not in TARGETS and center.origin != "barycenter":
            r.problem(path, f"a body that follows {source.upper()} needs a [center] preset "
                      f"the ephemeris has (preset = one of {', '.join(p for p in CATALOGUE)})")
        elif target == center.preset and center.origin != "barycenter":
            r.problem(f"{path}.ephemeris_body", f"{target!r} is the centre itself")
        if frame_rotation(self.frame) is None:
            r.problem("scene.frame", f"frame {self.frame!r}: a body that follows "
                      f"{source.upper()} needs frame = one of "
                      f"{', '.join(EQUATORIAL_FRAMES + ECLIPTIC_FRAMES)}")
        osculate_s = r.time_or_epoch(t, "osculating_epoch", path)
        if r.failed_since(m0) or target is None or r.epoch is None:
            return None
        if self.kernel is None:
            self.kernel = Kernel(source)
        gm_body = self.kernel.gm_m3_s2(target)
        centre = "barycenter" if center.origin == "barycenter" else str(center.preset)
        track = Track(kernel=self.kernel, target=target, centre=centre,
                      frame=self.frame.upper(), epoch_jd=(r.epoch.jd1, r.epoch.jd2),
                      mu=center.gm_m3_s2 + gm_body, osculate_s=osculate_s)
        try:
            osc = track.elements_at(0.0)
        except UserInputError as err:
            r.problem("scene.epoch", f"{err.problems[0]} (body {name!r} follows it)")
            return None
        if osculate_s is not None:
            try:
                track.elements_at(osculate_s)
            except UserInputError as err:
                r.problem(f"{path}.osculating_epoch", err.problems[0])
                return None
        return track, gm_body, osc

    def _size(self, t: dict[str, Any], path: str,
              mu: float | None) -> tuple[float, float, float | None] | None:
        """(a, e, parabola_p) from one size form, or None with the problem recorded."""
        r = self.r
        e = r.number(t, "e", path, 0.0, MAX_E)
        if e is not None and e < 1e-150:
            e = 0.0
        given = [k for k in spec.SIZE_KEYS if k in t]
        a = r.quantity(t, "a", path, "length")
        period = r.quantity(t, "period", path, "time")
        q = r.quantity(t, "periapsis", path, "length")
        apo = r.quantity(t, "apoapsis", path, "length")
        allowed = f"give exactly one size: {SIZE_FORMS}"
        if not given:
            r.problem(path, f"no size: {allowed}")
            return None
        if len(given) > 1 and ("a" in given or "period" in given):
            r.problem(f"{path}.{given[1]}", f"{' and '.join(given)} are both given; {allowed}")
            return None
        if given == ["apoapsis"]:
            r.problem(f"{path}.apoapsis", f"apoapsis needs periapsis too; {allowed}")
            return None
        if given == ["periapsis"] and "e" not in t:
            r.problem(f"{path}.periapsis", "periapsis needs e or apoapsis too (periapsis+e or "
                      "periapsis+apoapsis)")
            return None
        if given == ["periapsis", "apoapsis"] and "e" in t:
            r.problem(f"{path}.e", "periapsis and apoapsis already fix e; remove e (or "
                      "apoapsis)")
            return None
        if "e" in t and e is None:
            return None
        if any(k in t and v is None for k, v in
               (("a", a), ("period", period), ("periapsis", q), ("apoapsis", apo))):
            return None
        ecc = e or 0.0
        if a is not None:
            return self._from_a(a, ecc, path)
        if period is not None:
            if period <= 0:
                r.problem(f"{path}.period", "period must be positive")
                return None
            if ecc >= 1.0:
                r.problem(f"{path}.period", f"e = {ecc:g}: an open orbit (e >= 1) has no period; "
                          "give periapsis and e instead")
                return None
            if mu is None:
                return None
            return self._from_a((mu * period**2 / (4.0 * math.pi**2)) ** (1.0 / 3.0), ecc, path)
        assert q is not None
        if q < MIN_SIZE_M:
            r.problem(f"{path}.periapsis", f"periapsis must be positive (at least "
                      f"{MIN_SIZE_M:g} m)")
            return None
        if apo is not None:
            if apo < q:
                r.problem(f"{path}.apoapsis", "apoapsis is below periapsis; apoapsis >= "
                          "periapsis")
                return None
            return (apo + q) / 2.0, (apo - q) / (apo + q), None
        if ecc == 1.0:
            return math.inf, 1.0, 2.0 * q
        a_q = q / (1.0 - ecc)
        if abs(a_q) > 1e30:
            r.problem(f"{path}.e", f"e = {ecc!r} is too close to 1 for a finite orbit; use e = 1 "
                      "(a parabola) or move e away from 1")
            return None
        return a_q, ecc, None

    def _from_a(self, a: float, e: float, path: str) -> tuple[float, float, None] | None:
        r = self.r
        if abs(a) < MIN_SIZE_M:
            r.problem(f"{path}.a", f"a = {a:g} m is not a size; |a| must be at least "
                      f"{MIN_SIZE_M:g} m")
            return None
        if a > 0 and e == 1.0:
            r.problem(f"{path}.e", "e = 1 (a parabola) has no finite a; give periapsis and e = 1 "
                      "instead of a")
            return None
        if a > 0 and e > 1.0:
            r.problem(f"{path}.e", f"e = {e:g} with a positive a: an ellipse has 0 <= e < 1; for "
                      "a hyperbola give a negative a, or periapsis and e")
            return None
        if a < 0 and e <= 1.0:
            r.problem(f"{path}.a", f"a negative a is a hyperbola and needs e > 1 (got e = {e:g}); "
                      "an ellipse has a positive a")
            return None
        return a, e, None

    def _finish_body(self, b: _RawBody, center: Center) -> Body:
        r = self.r
        assert b.nu is not None
        el = Elements(a=b.a, e=b.e, i=b.i, raan=b.raan, argp=b.argp, nu=b.nu,
                      mu=center.gm_m3_s2 + b.gm, parabola_p=b.parabola_p)
        warnings = orbit_warnings(el, center)
        sweep = self._sweep(b, el)
        defaults = BodyShow()
        show = BodyShow(**{k: (getattr(defaults, k) if v is None else v)
                           for k, v in b.flags.items() if k != "sweep"},
                        sweep=(sweep is not None) if b.flags["sweep"] is None
                        else bool(b.flags["sweep"]))
        limit = b.limit
        q = float(el.periapsis)
        if b.e < 1.0:
            if limit is not None:
                warnings.append("limit_radius is used only for open orbits (e >= 1); ignored")
            limit = None
        elif limit is not None and limit <= q:
            r.problem(f"{b.path}.limit_radius", f"limit_radius must be beyond the periapsis "
                      f"({q:.6g} m)")
        elif limit is None:
            now = el.after(-b.epoch_offset_s)
            limit = max(DEFAULT_LIMIT_PERIAPSES * q, 1.25 * float(now.radius_at(now.nu)))
            limit = min(limit, MAX_LENGTH_M)
        if sweep is not None and b.e < 1.0:
            span = sweep.count * sweep.interval_s
            if span > float(el.period) * (1 + 1e-9):
                warnings.append(f"the sweep spans {span / float(el.period):.3g} periods: sectors "
                                "after the first period overlap earlier ones")
        for w in warnings:
            self.warnings.append(f'{b.path} ("{b.name}"): {w}')
        return Body(name=b.name, elements=el, epoch_offset_s=b.epoch_offset_s, color=b.color,
                    line_width_px=2.0 if b.line_width is None else b.line_width, show=show,
                    sweep=sweep, limit_radius_m=limit, radius_m=b.radius,
                    warnings=tuple(warnings), gm_m3_s2=b.gm, track=b.track,
                    flight_s=b.flight)

    def _sweep_values(self, t: dict[str, Any], path: str) -> dict[str, Any] | None:
        """The sweep table's own values (None if absent or wrong); defaults come later."""
        r = self.r
        s = r.table(t, spec.SWEEP, path)
        if s is None or "sweep" not in t:
            return None
        where = f"{path}.sweep"
        m0 = r.mark()
        v: dict[str, Any] = {
            "start": r.time_or_epoch(s, "start", where),
            "count": r.integer(s, "count", where, 1, 1000),
            "interval": r.quantity(s, "interval", where, "time"),
            "opacity": r.number(s, "opacity", where, 0.0, 1.0),
            "color": r.color(s, "color", where),
            "show_area": r.boolean(s, "show_area", where),
            "reveal": r.choice(s, "reveal", where, spec.REVEALS),
        }
        if v["interval"] is not None and v["interval"] <= 0:
            r.problem(f"{where}.interval", "interval must be positive")
        return None if r.failed_since(m0) else v

    def _sweep(self, b: _RawBody, el: Elements) -> Sweep | None:
        v = b.sweep
        if v is None:
            return None
        count = 6 if v["count"] is None else v["count"]
        interval = v["interval"]
        if interval is None:
            if float(el.e) >= 1.0:
                self.r.problem(f"{b.path}.sweep", "interval is required on an open orbit (there "
                               'is no period to divide); e.g. interval = "2 h"')
                return None
            interval = float(el.period) / count
        return Sweep(start_s=v["start"] or 0.0, interval_s=interval, count=count,
                     color=v["color"] or b.color,
                     opacity=0.45 if v["opacity"] is None else v["opacity"],
                     show_area=bool(v["show_area"]), interval_given=v["interval"] is not None,
                     reveal=v["reveal"] or "all")

    # [[population]] ------------------------------------------------------------------

    def _populations(self, center: Center | None) -> tuple[Population, ...]:
        r = self.r
        raw = self.data.get("population", [])
        if not isinstance(raw, list):
            if not isinstance(raw, dict):
                r.problem("population", "write each population as a [[population]] table")
            return ()
        out = []
        for k, t in enumerate(raw):
            p = self._population(k, t, center)
            if p is not None:
                out.append(p)
        return tuple(out)

    def _population(self, k: int, t: Any, center: Center | None) -> Population | None:
        r = self.r
        path = f"population[{k}]"
        if not isinstance(t, dict):
            r.problem(path, "write each population as a [[population]] table of keys")
            return None
        if isinstance(t.get("name"), str) and t["name"].strip():
            r.labels[path] = t["name"]
        m0 = r.mark()
        r.check_keys(t, spec.POPULATION, path)
        if "name" not in t:
            r.problem(path, 'missing name: every population needs name = "..."')
        name = r.string(t, "name", path, nonempty=True, max_len=200)
        units_t = r.table(t, spec.UNITS, path) or {}
        units = dict(r.units)
        for dim in ("length", "angle"):
            key = spec.UNITS.key(dim)
            assert key is not None
            u = r.choice(units_t, dim, f"{path}.units", key.choices)
            if u is not None:
                units[dim] = u
        if "time" in units_t:
            r.choice(units_t, "time", f"{path}.units", spec.UNITS.keys[1].choices)
        epoch = r.epoch_key(t, "epoch", path)
        color = r.color(t, "color", path) or parse_color("#b0b0b0")
        size = r.number(t, "point_size", path, 0.0, 100.0, lo_open=True)
        table = r.string(t, "table", path, nonempty=True, max_len=4096)
        columns = self._columns(t, path)
        gen = r.table(t, spec.GENERATE, path)
        if ("table" in t) == ("generate" in t):
            r.problem(path, "give exactly one of table = \"FILE.csv\" (or .npy) and "
                      "generate = { ... }")
        if "columns" in t and "table" in t and not str(t["table"]).endswith(".npy"):
            r.problem(f"{path}.columns", "columns is for .npy tables; a CSV table names its "
                      "columns in its header row")
        gen_args = self._generate(gen, path) if "generate" in t and gen is not None else None
        if r.failed_since(m0) or center is None:
            return None
        label = f'{path} ("{name}")'
        source = None
        try:
            if table is not None:
                source, refused = file_in_folder(self.base_dir, table)
                if source is None:
                    r.problem(f"{path}.table", str(refused))
                    return None
                label = f'{path} ("{name}") {table}'
                if source.suffix.lower() == ".npy":
                    cols = read_npy(source, label, columns or ("a", "e", "i", "raan", "argp",
                                                               "M"), units)
                elif source.suffix.lower() == ".csv":
                    cols = read_csv(source, label, units)
                else:
                    r.problem(f"{path}.table", f"{table!r}: a table is a .csv or .npy file")
                    return None
            else:
                assert gen_args is not None
                cols = generate_belt(*gen_args)
            elements = to_elements(cols, center.gm_m3_s2, label)
        except TableError as err:
            line = r.lines.line(f"{path}.table" if table is not None else f"{path}.generate")
            at = f" (scene line {line})" if line else ""
            r.problems.extend(one_line(p + (at if n == 0 else ""))
                              for n, p in enumerate(err.problems))
            return None
        offset = epoch.seconds_since(r.epoch) if epoch is not None and r.epoch else 0.0
        if center.radius_m > 0:
            inside = int(np.count_nonzero(np.asarray(elements.periapsis) < center.radius_m))
            if inside:
                self.warnings.append(f'{path} ("{name}"): {inside} bodies have their periapsis '
                                     f"inside the central body")
        return Population(name=name or "", elements=elements, epoch_offset_s=offset,
                          color=color, point_size_px=1.5 if size is None else size,
                          source=source)

    def _columns(self, t: dict[str, Any], path: str) -> tuple[str, ...] | None:
        if "columns" not in t:
            return None
        v = t["columns"]
        if not isinstance(v, list) or not v or not all(isinstance(c, str) for c in v):
            self.r.problem(f"{path}.columns", 'columns is a list of column names, e.g. '
                           '["a", "e", "i", "raan", "argp", "M"]')
            return None
        return tuple(v)

    def _generate(self, g: dict[str, Any], path: str) -> tuple[Any, ...] | None:
        r = self.r
        where = f"{path}.generate"
        count = r.integer(g, "count", where, 1, 5_000_000)
        seed = r.integer(g, "seed", where, 0, 2**63 - 1)
        for key in ("count", "a"):
            if key not in g:
                r.problem(where, f"missing {key}: generate needs count and a, e.g. generate = "
                          '{ count = 100000, seed = 1, a = ["2.1 au", "3.3 au"] }')
        a = self._range(g, "a", where, "length", lo=MIN_SIZE_M, hi=MAX_LENGTH_M)
        e = self._range(g, "e", where, "number", lo=0.0, hi=0.999999)
        i = self._range(g, "i", where, "angle", lo=0.0, hi=math.pi)
        if count is None or a is None or ("e" in g and e is None) or ("i" in g and i is None):
            return None
        return (count, seed or 0, a, e or (0.0, 0.0), i or (0.0, 0.0))

    def _range(self, g: dict[str, Any], key: str, where: str, dim: str, lo: float,
               hi: float) -> tuple[float, float] | None:
        r = self.r
        if key not in g:
            return None
        v = g[key]
        path = f"{where}.{key}"
        if not isinstance(v, list) or len(v) != 2:
            r.problem(path, f"{key} is a range of two values [low, high]")
            return None
        if dim == "number":
            vals = [r.number({key: x}, key, where) for x in v]
        else:
            vals = [r.quantity_value(x, path, dim) for x in v]
        if vals[0] is None or vals[1] is None:
            return None
        if not lo - 1e-12 <= vals[0] <= vals[1] <= hi * (1 + 1e-12):
            r.problem(path, f"{key} must satisfy low <= high within the allowed range "
                      f"({lo:g} to {hi:g} in SI units)")
            return None
        return (vals[0], vals[1])

    # [render], [camera], [timeline] -------------------------------------------------

    def _render(self) -> RenderSettings:
        r = self.r
        t = r.table(self.data, spec.RENDER, "") or {}
        size: tuple[int, int] = (1920, 1080)
        if "size" in t:
            v = t["size"]
            ok = (isinstance(v, list) and len(v) == 2
                  and all(isinstance(x, int) and not isinstance(x, bool) for x in v))
            if not ok or not all(16 <= x <= 16384 for x in v):
                r.problem("render.size", "size is [width, height] in whole pixels, each 16 to "
                          "16384, e.g. [1920, 1080]")
            else:
                size = (int(v[0]), int(v[1]))
        bg = r.color(t, "background", "render")
        flags = {k: r.boolean(t, k, "render") for k in ("stars", "grid", "labels")}
        d = RenderSettings()
        return RenderSettings(size_px=size, background=bg or d.background,
                              **{k: (getattr(d, k) if v is None else v) for k, v in flags.items()})

    def _camera(self, bodies: tuple[Body, ...] | None, populations: tuple[Population, ...],
                center: Center | None, render: RenderSettings) -> Camera:
        r = self.r
        t = r.table(self.data, spec.CAMERA, "") or {}
        d = Camera()
        proj_key, look_key = spec.CAMERA.keys[0], spec.CAMERA.keys[1]
        projection = r.choice(t, "projection", "camera", proj_key.choices) or d.projection
        look = r.choice(t, "look", "camera", look_key.choices)
        elevation = r.quantity(t, "elevation", "camera", "angle")
        azimuth = r.quantity(t, "azimuth", "camera", "angle")
        angles = [k for k in ("elevation", "azimuth") if k in t]
        if look in ("top", "edge") and angles:
            r.problem(f"camera.{angles[0]}", f'look = "{look}" fixes the direction; remove '
                      f'{" and ".join(angles)} or set look = "angles"')
        if look is None:
            look = "angles" if angles else "top"
        if elevation is not None and not -math.pi / 2 - 1e-12 <= elevation <= math.pi / 2 + 1e-12:
            r.problem("camera.elevation", "elevation is -90 to 90 deg")
            elevation = None
        width = self._positive(t, "width", "camera")
        distance = self._positive(t, "distance", "camera")
        fov = r.quantity(t, "fov", "camera", "angle")
        if fov is not None and not 0.0 < fov < math.pi:
            r.problem("camera.fov", "fov must be above 0 and below 180 deg")
            fov = None
        target = self._target(t, center)
        fov = d.fov_rad if fov is None else fov
        extent = self._extent(bodies, populations, center)
        if extent is not None:
            aspect = render.size_px[0] / render.size_px[1]
            width = width or 2.2 * extent * max(1.0, aspect)
            distance = distance or 1.2 * extent / math.tan(fov / 2.0)
        dome = self._dome_framing(t, "camera")
        return Camera(projection=projection, look=look,
                      elevation_rad=d.elevation_rad if elevation is None else elevation,
                      azimuth_rad=(azimuth or 0.0) % TWO_PI, target=target,
                      width_m=width or d.width_m, distance_m=distance or d.distance_m,
                      fov_rad=fov, dome_distance_m=dome["dome_distance_m"],
                      dome_elevation_rad=d.dome_elevation_rad
                      if dome["dome_elevation_rad"] is None else dome["dome_elevation_rad"],
                      dome_tilt_rad=dome["dome_tilt_rad"] or 0.0)

    def _dome_framing(self, t: dict[str, Any], path: str) -> dict[str, float | None]:
        """dome_distance, dome_elevation (0 to 90 deg) and dome_tilt (0 to 45 deg)."""
        r = self.r
        out: dict[str, float | None] = {
            "dome_distance_m": self._positive(t, "dome_distance", path)}
        for key, hi_deg in (("dome_elevation", 90.0), ("dome_tilt", 45.0)):
            v = r.quantity(t, key, path, "angle")
            if v is not None and not -1e-12 <= v <= math.radians(hi_deg) + 1e-12:
                r.problem(f"{path}.{key}", f"{key} is 0 to {hi_deg:g} deg")
                v = None
            out[key + "_rad"] = v
        return out

    def _dome(self) -> DomeSettings:
        """[dome]: sizes as angles, their scales, and the dome grid."""
        r = self.r
        t = r.table(self.data, spec.DOME, "") or {}
        d = DomeSettings()
        values: dict[str, Any] = {}
        for key, hi_deg in (("line_width", 5.0), ("label_size", 20.0), ("caption_size", 20.0)):
            v = r.quantity(t, key, "dome", "angle")
            if v is not None and not 0.0 < v <= math.radians(hi_deg):
                r.problem(f"dome.{key}", f"{key} is an angle above 0 and at most {hi_deg:g} deg")
                v = None
            if v is not None:
                values[key + "_rad"] = v
        for key in ("line_scale", "label_scale"):
            v = r.number(t, key, "dome", 0.1, 10.0)
            if v is not None:
                values[key] = float(v)
        grid = r.boolean(t, "grid", "dome")
        return replace(d, **values, grid=d.grid if grid is None else grid)

    def _positive(self, t: dict[str, Any], key: str, path: str) -> float | None:
        x = self.r.quantity(t, key, path, "length")
        if x is not None and x <= 0:
            self.r.problem(f"{path}.{key}", f"{key} must be positive")
            return None
        return x

    def _target(self, t: dict[str, Any], center: Center | None,
                path: str = "camera") -> str | tuple[float, float, float]:
        r = self.r
        where = f"{path}.target"
        if "target" not in t:
            return "center"
        v = t["target"]
        if isinstance(v, list):
            if len(v) != 3:
                r.problem(where, "a point target is [x, y, z] (three lengths)")
                return "center"
            xyz = [r.quantity_value(x, where, "length") for x in v]
            if any(x is None for x in xyz):
                return "center"
            return (float(xyz[0]), float(xyz[1]), float(xyz[2]))  # type: ignore[arg-type]
        if not isinstance(v, str):
            r.problem(where, f'target is "center", a body\'s name or [x, y, z]; got '
                      f"a {type(v).__name__}")
            return "center"
        if v == "center" or (center is not None and name_key(v) == name_key(center.name)):
            return "center"
        names = self.body_names
        by_key = {name_key(n): n for n in names}
        if name_key(v) in by_key:
            return by_key[name_key(v)]
        if v not in names:
            from .values import suggest

            r.problem(where, f'no body is named "{v}"{suggest(v, names)}; target is '
                      '"center", a body\'s name or [x, y, z]')
            return "center"
        return v

    @staticmethod
    def _extent(bodies: tuple[Body, ...] | None, populations: tuple[Population, ...],
                center: Center | None) -> float | None:
        """The largest distance from the centre that something is drawn at, m."""
        sizes = []
        for b in bodies or ():
            e = float(b.elements.e)
            sizes.append(float(b.elements.apoapsis) if e < 1.0 else (b.limit_radius_m or 0.0))
        for p in populations:
            apo = np.asarray(p.elements.apoapsis)
            if apo.size:
                sizes.append(float(np.max(apo)))
        if center is not None and center.radius_m > 0:
            sizes.append(3.0 * center.radius_m)
        sizes = [s for s in sizes if math.isfinite(s) and s > 0]
        return max(sizes) if sizes else None

    # [[timeline.camera]], [[timeline.pace]], [[timeline.fade]], [[timeline.caption]] ------

    def _items(self, t: dict[str, Any], key: spec.Key) -> list[tuple[str, dict[str, Any]]]:
        """(path, table) of each [[timeline.<key>]] table, keys checked."""
        v = t.get(key.name)
        if v is None:
            return []
        if not isinstance(v, list) or not all(isinstance(x, dict) for x in v):
            self.r.problem(f"timeline.{key.name}", f"write each one as a [[timeline.{key.name}]] "
                           "table")
            return []
        out = []
        for i, item in enumerate(v):
            path = f"timeline.{key.name}[{i}]"
            self.r.check_keys(item, key, path)
            out.append((path, item))
        return out

    def _show_time(self, t: dict[str, Any], key: str, path: str) -> float | None:
        if key not in t:
            return None
        x = self.r.quantity_value(t[key], f"{path}.{key}", "time", "s")
        if x is not None and x < 0:
            self.r.problem(f"{path}.{key}", "times into the show are 0 or later")
            return None
        return x

    def _key_time(self, item: dict[str, Any], key: str, path: str,
                  duration_s: float) -> float | None:
        """A time into the show that must lie within it (0 to the duration)."""
        x = self._show_time(item, key, path)
        if x is not None and x > duration_s * (1 + 1e-12):
            self.r.problem(f"{path}.{key}", f"{x:g} s is after the end of the show "
                           f"({duration_s:g} s); times into the show are 0 to the duration")
            return None
        return x

    def _in_order(self, items: list[tuple[str, float]], what: str) -> None:
        """Keys in order of increasing "at", each at a different time: the first key out
        of order is reported at its own "at"."""
        for (_, before), (path, at) in zip(items[:-1], items[1:], strict=False):
            if at <= before:
                self.r.problem(f"{path}.at", f'{what} must be in order of increasing "at", '
                               f"each at a different time; this one at {at:g} s comes after "
                               f"one at {before:g} s")
                return

    def _camera_keys(self, t: dict[str, Any], duration_s: float) -> tuple[CameraKey, ...]:
        r = self.r
        keys = []
        paths = []
        for path, item in self._items(t, spec.CAMERA_KEY):
            at = self._key_time(item, "at", path, duration_s)
            if at is None:
                if "at" not in item:
                    r.problem(path, 'a camera keyframe needs "at", its time into the show')
                continue
            look = r.choice(item, "look", path, ("top", "edge", "angles"))
            angles = [k for k in ("elevation", "azimuth") if k in item]
            if look in ("top", "edge") and angles:
                r.problem(f"{path}.{angles[0]}", f'look = "{look}" fixes the direction; remove '
                          f'{" and ".join(angles)} or set look = "angles"')
                continue
            elevation = r.quantity(item, "elevation", path, "angle")
            if elevation is not None and abs(elevation) > math.pi / 2 + 1e-12:
                r.problem(f"{path}.elevation", "elevation is -90 to 90 deg")
                elevation = None
            azimuth = r.quantity(item, "azimuth", path, "angle")
            if look is None and (elevation is not None or azimuth is not None):
                look = "angles"
            fov = r.quantity(item, "fov", path, "angle")
            if fov is not None and not 0.0 < fov < math.pi:
                r.problem(f"{path}.fov", "fov must be above 0 and below 180 deg")
                fov = None
            keys.append(CameraKey(
                at_s=at, ease=r.choice(item, "ease", path, spec.EASES) or "in-out",
                projection=r.choice(item, "projection", path, ("orthographic", "perspective")),
                look=look, elevation_rad=elevation, azimuth_rad=azimuth,
                target=self._target(item, self.center, path) if "target" in item else None,
                width_m=self._positive(item, "width", path),
                distance_m=self._positive(item, "distance", path), fov_rad=fov,
                path=r.choice(item, "path", path, spec.CAMERA_PATHS) or "eased",
                **self._dome_framing(item, path)))
            paths.append(path)
        self._in_order([(p, k.at_s) for p, k in zip(paths, keys, strict=True)],
                       "camera keyframes")
        return tuple(keys)

    def _rate_keys(self, t: dict[str, Any], rate: float,
                   duration_s: float) -> tuple[RateKey, ...]:
        """[[timeline.pace]]: time-rate keys, each rate nonzero and of the sign of the
        timeline's rate (scene time runs one way through a show)."""
        r = self.r
        keys: list[tuple[str, RateKey]] = []
        for path, item in self._items(t, spec.PACE):
            at = self._key_time(item, "at", path, duration_s)
            value = r.quantity(item, "rate", path, "rate")
            for key, got in (("at", at), ("rate", value)):
                if got is None and key not in item:
                    r.problem(path, f'a pace key needs "{key}" ('
                              + ("its time into the show" if key == "at"
                                 else 'scene time per second of show, such as "1 d/s"') + ")")
            if at is None or value is None:
                continue
            if value == 0 or (value > 0) != (rate > 0):
                way = "positive" if rate > 0 else "negative"
                r.problem(f"{path}.rate", f"a pace rate is nonzero and {way}, as the "
                          "timeline's rate is (scene time runs one way through a show)")
                continue
            keys.append((path, RateKey(at_s=at, rate=value,
                                       ease=r.choice(item, "ease", path, spec.EASES)
                                       or "in-out")))
        self._in_order([(p, k.at_s) for p, k in keys], "pace keys")
        return tuple(k for _, k in keys)

    def _fades(self, t: dict[str, Any], duration_s: float) -> tuple[Fade, ...]:
        r = self.r
        fades = []
        for path, item in self._items(t, spec.FADE):
            body = r.string(item, "body", path, nonempty=True)
            if body is None:
                if "body" not in item:
                    r.problem(path, 'a fade needs "body": a body\'s name, or "*" for every body')
                continue
            if body != "*" and body not in self.body_names:
                from .values import suggest

                r.problem(f"{path}.body", f'no body is named "{body}"'
                          f'{suggest(body, self.body_names)}; write a body\'s name or "*"')
                continue
            mark = r.choice(item, "mark", path, spec.FADE_MARKS) or "all"
            times = self._list(item, "at", path, lambda v, w: self.r.quantity_value(
                v, w, "time", "s"))
            values = self._list(item, "opacity", path, self._opacity)
            if times is None or values is None:
                continue
            if len(times) != len(values):
                r.problem(path, f'"at" has {len(times)} times but "opacity" has {len(values)} '
                          "values; give one opacity per time")
                continue
            if any(b <= a for a, b in zip(times[:-1], times[1:], strict=True)) or min(times) < 0:
                r.problem(f"{path}.at", "times must be 0 or later and increasing")
                continue
            if max(times) > duration_s * (1 + 1e-12):
                r.problem(f"{path}.at", f"{max(times):g} s is after the end of the show "
                          f"({duration_s:g} s); times into the show are 0 to the duration")
                continue
            fades.append(Fade(body, mark, tuple(times), tuple(values),
                              r.choice(item, "ease", path, spec.EASES) or "in-out"))
        return tuple(fades)

    def _opacity(self, v: Any, where: str) -> float | None:
        if isinstance(v, bool) or not isinstance(v, (int, float)) or not 0.0 <= v <= 1.0:
            self.r.problem(where, f"{v!r} is not an opacity: a bare number from 0 to 1")
            return None
        return float(v)

    def _list(self, t: dict[str, Any], key: str, path: str, parse: Any) -> list[float] | None:
        where = f"{path}.{key}"
        if key not in t:
            self.r.problem(path, f'"{key}" is required here')
            return None
        v = t[key]
        if not isinstance(v, list) or not v:
            self.r.problem(where, f"{key} is a non-empty list [ ... ], one entry per time")
            return None
        out = [parse(x, f"{where}[{i}]") for i, x in enumerate(v)]
        return None if any(x is None for x in out) else out

    def _captions(self, t: dict[str, Any], duration_s: float) -> tuple[Caption, ...]:
        r = self.r
        out = []
        d = Caption("")
        for path, item in self._items(t, spec.CAPTION):
            text = r.string(item, "text", path, nonempty=True, max_len=500)
            if text is None:
                if "text" not in item:
                    r.problem(path, 'a caption needs "text"')
                continue
            start = self._key_time(item, "start", path, duration_s)
            end = self._show_time(item, "end", path)
            if start is not None and end is not None and end <= start:
                r.problem(f"{path}.end", "end must be after start")
                continue
            if end is not None and end > duration_s * (1 + 1e-12):
                self.warnings.append(f"{r.where(path + '.end')}: the caption ends at {end:g} s, "
                                     f"after the end of the show ({duration_s:g} s); it is cut "
                                     "short there")
            fade = self._show_time(item, "fade", path)
            size = r.number(item, "size", path, 0.0, 400.0, lo_open=True)
            out.append(Caption(text, d.start_s if start is None else start,
                               d.end_s if end is None else end, d.fade_s if fade is None else fade,
                               r.choice(item, "position", path, spec.CAPTION_POSITIONS)
                               or d.position, size or d.size_px,
                               r.color(item, "color", path) or d.color))
        return tuple(out)

    def _timeline(self) -> Timeline:
        r = self.r
        t = r.table(self.data, spec.TIMELINE, "") or {}
        d = Timeline()
        start = r.time_or_epoch(t, "start", "timeline")
        rate = r.quantity(t, "rate", "timeline", "rate")
        if rate is not None and rate == 0:
            r.problem("timeline.rate", "rate must not be 0 (negative runs the show backwards)")
        fps = r.number(t, "fps", "timeline", 0.0, 1000.0, lo_open=True)
        duration = None
        if "duration" in t:
            duration = r.quantity_value(t["duration"], "timeline.duration", "time", "s")
            if duration is not None and duration <= 0:
                r.problem("timeline.duration", "duration must be positive")
                duration = None
        clock = r.choice(t, "clock", "timeline", ("none", "date", "elapsed")) or "none"
        show_s = duration or d.duration_s
        tl = Timeline(start_s=start or 0.0, rate=rate or d.rate, fps=fps or d.fps,
                      duration_s=show_s, clock=clock,
                      camera_keys=self._camera_keys(t, show_s), fades=self._fades(t, show_s),
                      captions=self._captions(t, show_s),
                      rate_keys=self._rate_keys(t, rate or d.rate, show_s))
        if tl.frame_count < 1 or tl.frame_count > 10_000_000:
            r.problem("timeline", f"duration x fps gives {tl.frame_count} frames; allowed: 1 to "
                      "10,000,000")
        return tl
