"""The viewer's settings saved per user: the UI scale and the recent scene files. Plain
Python: no imgui.

They live in ``$XDG_CONFIG_HOME/perifocal/settings.toml`` (``~/.config/perifocal/`` when
the variable is not set), written atomically; each writer keeps the other settings. A
file that cannot be read or holds something else is ignored: the defaults are used, and
nothing of the user's is lost.
"""

from __future__ import annotations

import math
import os
import tomllib
from pathlib import Path
from typing import Any

from ..fileio import WriteError, write_atomic

#: The UI scales allowed (panel text, labels and markers scale together).
UI_SCALE_RANGE = (0.5, 3.0)
#: How many recent scene files are remembered.
RECENT_MAX = 10


def settings_path() -> Path:
    base = os.environ.get("XDG_CONFIG_HOME") or str(Path.home() / ".config")
    return Path(base) / "perifocal" / "settings.toml"


def _read(path: Path) -> dict[str, Any]:
    try:
        return tomllib.loads(path.read_text(encoding="utf-8"))
    except (OSError, ValueError, tomllib.TOMLDecodeError):
        return {}


def _write(path: Path, values: dict[str, Any]) -> Path | None:
    import tomlkit

    doc = tomlkit.document()
    doc.add(tomlkit.comment("Perifocal's viewer settings"))
    for key, value in values.items():
        doc[key] = value
    try:
        path.parent.mkdir(parents=True, exist_ok=True)
        return write_atomic(path, tomlkit.dumps(doc))
    except (OSError, WriteError):  # the settings are a convenience, never fatal
        return None


def load_ui_scale(path: Path | None = None) -> float:
    """The saved UI scale, 1 when there is none (or it cannot be read)."""
    try:
        value = float(_read(path or settings_path()).get("ui_scale", 1.0))
    except (ValueError, TypeError):
        return 1.0
    lo, hi = UI_SCALE_RANGE
    return value if math.isfinite(value) and lo <= value <= hi else 1.0


def save_ui_scale(scale: float, path: Path | None = None) -> Path | None:
    """Save the UI scale for the next windows; None when the folder cannot be written."""
    path = path or settings_path()
    return _write(path, {**_read(path), "ui_scale": float(scale)})


def load_recent(path: Path | None = None) -> list[str]:
    """The recent scene files, newest first (only paths that are text)."""
    recent = _read(path or settings_path()).get("recent", [])
    if not isinstance(recent, list):
        return []
    return [p for p in recent if isinstance(p, str) and p][:RECENT_MAX]


def add_recent(scene: Path, path: Path | None = None) -> list[str]:
    """Put ``scene`` (made absolute) first in the recent files and save them; returns the
    list (also when it could not be saved)."""
    path = path or settings_path()
    values = _read(path)
    name = str(Path(scene).expanduser().absolute())
    recent = [name] + [p for p in load_recent(path) if p != name]
    _write(path, {**values, "recent": recent[:RECENT_MAX]})
    return recent[:RECENT_MAX]
