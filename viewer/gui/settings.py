"""The viewer's settings saved per user: the UI scale. Plain Python: no imgui.

They live in ``$XDG_CONFIG_HOME/perifocal/settings.toml`` (``~/.config/perifocal/`` when
the variable is not set), written atomically. A file that cannot be read or holds
something else is ignored: the defaults are used, and nothing of the user's is lost.
"""

from __future__ import annotations

import math
import os
import tomllib
from pathlib import Path

from ..fileio import WriteError, write_atomic

#: The UI scales allowed (panel text, labels and markers scale together).
UI_SCALE_RANGE = (0.5, 3.0)


def settings_path() -> Path:
    base = os.environ.get("XDG_CONFIG_HOME") or str(Path.home() / ".config")
    return Path(base) / "perifocal" / "settings.toml"


def load_ui_scale() -> float:
    """The saved UI scale, 1 when there is none (or it cannot be read)."""
    try:
        data = tomllib.loads(settings_path().read_text(encoding="utf-8"))
        value = float(data.get("ui_scale", 1.0))
    except (OSError, ValueError, TypeError, tomllib.TOMLDecodeError):
        return 1.0
    lo, hi = UI_SCALE_RANGE
    return value if math.isfinite(value) and lo <= value <= hi else 1.0


def save_ui_scale(scale: float) -> Path | None:
    """Save the UI scale for the next windows; None when the folder cannot be written."""
    path = settings_path()
    try:
        path.parent.mkdir(parents=True, exist_ok=True)
        return write_atomic(path, f"# Perifocal's viewer settings\nui_scale = {scale!r}\n")
    except (OSError, WriteError):  # the settings are a convenience, never fatal
        return None
