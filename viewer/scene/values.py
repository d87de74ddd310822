"""Reading typed values out of a parsed TOML table, collecting every problem.

A ``Reader`` belongs to one file. Each getter returns the value in SI units (or None when
the key is absent or wrong) and, when the value is wrong, records one line naming the key
path, the body's name, the TOML line, what is wrong and what is allowed. Nothing here
raises for bad input; the loader raises once, with all the problems, at the end.
"""

from __future__ import annotations

import difflib
import json
import math
import re
from collections.abc import Iterable
from pathlib import Path
from typing import Any

from ..units import Epoch, EpochError, QuantityError, parse_epoch, parse_quantity
from ..units.forms import is_epoch_text

# The magnitude limits have one home, shared with the command line and the panels.
from ..units.limits import (  # noqa: F401  (re-exported for the loader)
    MAX_E,
    MAX_GM,
    MAX_LENGTH_M,
    MAX_TIME_S,
    MIN_GM,
    MIN_SIZE_M,
    TINY,
    limit_problem,
)
from .lines import LineIndex
from .spec import ALIASES, KINDS, Key

RGB = tuple[float, float, float]

_HEX = re.compile(r"^#(?:[0-9a-fA-F]{3}|[0-9a-fA-F]{6})$")
_FRAME = re.compile(r"^[A-Za-z][A-Za-z0-9_]{0,31}$")


def file_in_folder(folder: Path, name: str) -> tuple[Path | None, str | None]:
    """The one rule for every key that names a file: (the file, None) or (None, why not).

    Shows are shared as folders, so a scene reads only regular files inside its own folder,
    after every symlink is resolved: no absolute path, no "..", no link out of the folder,
    no FIFO or device. The reason never holds any of the file's content.
    """
    allowed = "a scene reads only files inside its own folder (a path relative to the scene)"
    if Path(name).is_absolute():
        return None, f"{describe(name)} is an absolute path; {allowed}"
    try:
        root = folder.resolve()
        target = (folder / name).resolve()
    except (OSError, RuntimeError):  # a symlink loop
        return None, f"{describe(name)} cannot be followed (a symlink loop?); {allowed}"
    if not target.is_relative_to(root):
        return None, f"{describe(name)} is outside the scene's folder (after links are followed)" \
            f"; {allowed}"
    if target.exists() and not target.is_file():
        return None, f"{describe(name)} is not a regular file (a folder, FIFO or device); " \
            f"{allowed}, each a regular file"
    return target, None


def describe(value: Any) -> str:
    """A short rendering of a TOML value for messages."""
    if isinstance(value, bool):
        return "true" if value else "false"
    if isinstance(value, str):
        return json.dumps(value if len(value) <= 40 else value[:37] + "...", ensure_ascii=False)
    if isinstance(value, dict):
        return "a table"
    if isinstance(value, list):
        return "an array"
    if isinstance(value, float) and not math.isfinite(value):
        return str(value)
    if isinstance(value, (int, float)):
        return repr(value)
    return f"a TOML {type(value).__name__} (write it in quotes)"


def suggest(name: str, allowed: Iterable[str]) -> str:
    """' (did you mean "x"?)' for a mistyped key, or ''."""
    allowed = list(allowed)
    if name in ALIASES and ALIASES[name] in allowed:
        return f' (did you mean "{ALIASES[name]}"?)'
    lower = {a.lower(): a for a in allowed}
    if name.lower() in lower:
        return f' (did you mean "{lower[name.lower()]}"? keys are case-sensitive)'
    close = difflib.get_close_matches(name, allowed, n=1, cutoff=0.6)
    if close:
        return f' (did you mean "{close[0]}"?)'
    return ""


class Reader:
    """Typed getters over TOML tables for one file; problems and warnings collect here."""

    def __init__(self, text: str) -> None:
        self.lines = LineIndex(text)
        self.problems: list[str] = []
        self.labels: dict[str, str] = {}
        self.units = {"length": "au", "time": "d", "angle": "deg"}
        self.epoch: Epoch | None = None

    # --- messages ------------------------------------------------------------------

    def where(self, path: str) -> str:
        head = path.split(".", 1)[0]
        extras = []
        if head in self.labels:
            extras.append(f'"{self.labels[head]}"')
        line = self.lines.line(path)
        if line is not None:
            extras.append(f"line {line}")
        return path + (f" ({', '.join(extras)})" if extras else "")

    def problem(self, path: str, message: str) -> None:
        self.problems.append(one_line(f"{self.where(path)}: {message}"))

    def mark(self) -> int:
        """A bookmark: ``failed_since(mark)`` says whether problems were added after it."""
        return len(self.problems)

    def failed_since(self, mark: int) -> bool:
        return len(self.problems) > mark

    # --- structure -------------------------------------------------------------------

    def check_keys(self, table: dict[str, Any], spec: Key, path: str) -> None:
        """Report keys of ``table`` that ``spec`` does not define, with a hint."""
        for name in table:
            if spec.key(name) is None:
                where = f"{path}.{name}" if path else name
                what = "table" if not path else "key"
                allowed = ", ".join(spec.names)
                self.problem(where, f'unknown {what} "{name}"{suggest(name, spec.names)}; '
                             f"allowed here: {allowed}")

    def table(self, parent: dict[str, Any], spec: Key, path: str) -> dict[str, Any] | None:
        """The sub-table ``spec.name`` of ``parent`` (keys checked), {} if absent, None if wrong."""
        where = f"{path}.{spec.name}" if path else spec.name
        value = parent.get(spec.name)
        if value is None:
            return {}
        if not isinstance(value, dict):
            hint = ""
            if isinstance(value, list):
                hint = f" (write [{where}] with one pair of brackets, not [[{where}]])"
            self.problem(where, f"expected a table of keys ({', '.join(spec.names)}), got "
                         f"{describe(value)}{hint}")
            return None
        self.check_keys(value, spec, where)
        return value

    # --- scalars ---------------------------------------------------------------------

    def _bad(self, path: str, value: Any, kind: str, extra: str = "") -> None:
        self.problem(path, f"{describe(value)} is not {KINDS[kind]}{extra}")

    def string(self, t: dict[str, Any], key: str, path: str, *, nonempty: bool = False,
               max_len: int = 10_000) -> str | None:
        if key not in t:
            return None
        v = t[key]
        if not isinstance(v, str):
            self._bad(f"{path}.{key}", v, "string")
            return None
        if nonempty and not v.strip():
            self.problem(f"{path}.{key}", "must not be empty")
            return None
        if len(v) > max_len or any(ord(c) < 32 and c not in "\t\n" for c in v):
            self.problem(f"{path}.{key}", f"must be printable text of at most {max_len} "
                         "characters")
            return None
        return v

    def boolean(self, t: dict[str, Any], key: str, path: str) -> bool | None:
        if key not in t:
            return None
        v = t[key]
        if not isinstance(v, bool):
            hint = ' (no quotes: true, not "true")' if v in ("true", "false") else ""
            self._bad(f"{path}.{key}", v, "bool", hint)
            return None
        return v

    def number(self, t: dict[str, Any], key: str, path: str, lo: float | None = None,
               hi: float | None = None, *, lo_open: bool = False, hi_open: bool = False,
               what: str = "") -> float | None:
        """A bare number (int or float) within [lo, hi] (ends open when asked)."""
        if key not in t:
            return None
        v = t[key]
        where = f"{path}.{key}"
        if isinstance(v, bool) or not isinstance(v, (int, float)):
            hint = ""
            if isinstance(v, str):
                try:
                    float(v)
                    hint = f" (write it without quotes: {key} = {v.strip()})"
                except ValueError:
                    hint = " (this value is a bare number, without a unit)"
            self._bad(where, v, "number", hint)
            return None
        x = float(v)
        if not math.isfinite(x):
            self.problem(where, f"{describe(v)} is not a finite number")
            return None
        return self._within(where, key, x, lo, hi, lo_open, hi_open, what, str(v))

    def integer(self, t: dict[str, Any], key: str, path: str, lo: int, hi: int) -> int | None:
        if key not in t:
            return None
        v = t[key]
        where = f"{path}.{key}"
        if isinstance(v, float) and math.isfinite(v) and v == int(v):
            v = int(v)
        if isinstance(v, bool) or not isinstance(v, int):
            self._bad(where, v, "int", f" ({lo} to {hi})")
            return None
        if not lo <= v <= hi:
            self.problem(where, f"{key} = {v} is out of range; allowed: {lo} to {hi}")
            return None
        return int(v)

    def _within(self, where: str, key: str, x: float, lo: float | None, hi: float | None,
                lo_open: bool, hi_open: bool, what: str, shown: str) -> float | None:
        below = lo is not None and (x <= lo if lo_open else x < lo)
        above = hi is not None and (x >= hi if hi_open else x > hi)
        if below or above:
            parts = []
            if lo is not None:
                parts.append(f"{key} {'>' if lo_open else '>='} {_g(lo)}")
            if hi is not None:
                parts.append(f"{key} {'<' if hi_open else '<='} {_g(hi)}")
            self.problem(where, f"{key} = {shown} is out of range; allowed: "
                         + " and ".join(parts) + (f" ({what})" if what else ""))
            return None
        return x

    def quantity(self, t: dict[str, Any], key: str, path: str, dimension: str) -> float | None:
        """A quantity in SI; bare numbers take the file's unit for the dimension."""
        if key not in t:
            return None
        return self.quantity_value(t[key], f"{path}.{key}", dimension)

    def quantity_value(self, v: Any, where: str, dimension: str,
                       default_unit: str | None = None) -> float | None:
        unit = default_unit
        if unit is None:
            unit = {"length": self.units["length"], "time": self.units["time"],
                    "angle": self.units["angle"], "gm": "m3/s2",
                    "rate": self.units["time"] + "/s"}.get(dimension)
        if isinstance(v, str) and len(v) > 200:
            self.problem(where, f"{describe(v)} is not {KINDS[dimension]}")
            return None
        try:
            x = parse_quantity(v, dimension, unit)
        except QuantityError as err:
            self.problem(where, f"{err}")
            return None
        too_large = limit_problem(x, dimension)
        if too_large is not None:
            self.problem(where, f"{describe(v)} {too_large}")
            return None
        return 0.0 if abs(x) < TINY else x

    def epoch_value(self, v: Any, where: str) -> Epoch | None:
        if not isinstance(v, str):
            if isinstance(v, (int, float, bool, list, dict)):
                self.problem(where, f"{describe(v)} is not {KINDS['epoch']}")
            else:  # a TOML date or date-time
                self.problem(where, "an unquoted TOML date has no time scale; write the epoch "
                             'in quotes with its scale, e.g. "2030-01-01T00:00:00 TDB"')
            return None
        try:
            return parse_epoch(v)
        except EpochError as err:
            self.problem(where, str(err))
            return None

    def epoch_key(self, t: dict[str, Any], key: str, path: str) -> Epoch | None:
        if key not in t:
            return None
        return self.epoch_value(t[key], f"{path}.{key}")

    def time_or_epoch(self, t: dict[str, Any], key: str, path: str) -> float | None:
        """Scene time in seconds from an offset ("90 d") or an epoch (needs the scene epoch)."""
        if key not in t:
            return None
        v = t[key]
        where = f"{path}.{key}"
        if is_epoch_text(v):
            ep = self.epoch_value(v, where)
            if ep is None or self.epoch is None:
                return None
            offset = ep.seconds_since(self.epoch)
            if abs(offset) > MAX_TIME_S:
                self.problem(where, f"{describe(v)} is too far from the scene epoch; allowed "
                             f"within {_g(MAX_TIME_S)} s")
                return None
            return offset
        if not isinstance(v, (int, float, str)) or isinstance(v, bool):
            self.problem(where, f"{describe(v)} is not {KINDS['time_or_epoch']}")
            return None
        return self.quantity_value(v, where, "time")

    def color(self, t: dict[str, Any], key: str, path: str) -> RGB | None:
        if key not in t:
            return None
        v = t[key]
        if not isinstance(v, str) or not _HEX.match(v.strip()):
            self._bad(f"{path}.{key}", v, "color", ' ("#rrggbb" or "#rgb")')
            return None
        return parse_color(v)

    def choice(self, t: dict[str, Any], key: str, path: str, choices: Iterable[str], *,
               fold_case: bool = False) -> str | None:
        if key not in t:
            return None
        v = t[key]
        choices = tuple(choices)
        shown = ", ".join(f'"{c}"' for c in choices)
        if not isinstance(v, str):
            self.problem(f"{path}.{key}", f"{describe(v)} is not one of {shown}")
            return None
        w = v.strip().lower() if fold_case else v
        if w in choices:
            return w
        self.problem(f"{path}.{key}", f"{describe(v)} is not allowed"
                     f"{suggest(w, choices)}; "
                     f"allowed: {shown}")
        return None

    def frame(self, t: dict[str, Any], key: str, path: str) -> str | None:
        v = self.string(t, key, path)
        if v is None:
            return None
        if not _FRAME.match(v.strip()):
            self.problem(f"{path}.{key}", f"{describe(v)} is not a frame name: letters, digits "
                         "and _ (at most 32), e.g. \"ECLIPJ2000\" or \"EME2000\"")
            return None
        return v.strip()


_CONTROL = re.compile(r"[\x00-\x1f\x7f]")


def one_line(text: str) -> str:
    """``text`` with control characters (newlines from the user's strings) escaped."""
    return _CONTROL.sub(lambda m: repr(m.group(0))[1:-1], text)


def parse_color(text: str) -> RGB:
    """sRGB floats in [0, 1] from "#rrggbb" or "#rgb"."""
    h = text.strip()[1:]
    if len(h) == 3:
        h = "".join(c * 2 for c in h)
    return (int(h[0:2], 16) / 255.0, int(h[2:4], 16) / 255.0, int(h[4:6], 16) / 255.0)


def _g(x: float) -> str:
    return f"{x:g}"
