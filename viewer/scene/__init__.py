"""The scene file format: load, validate, defaults, save (atomic, comment-preserving), schema.

Owns the TOML format of docs/scene-format.md and the frozen Scene of ``model``. May
import viewer.orbit and viewer.units; never GL, windowing or UI.
"""

from .model import (
    Body,
    BodyShow,
    Camera,
    Center,
    Population,
    RenderSettings,
    Scene,
    Sweep,
    Timeline,
)

__all__ = [
    "Body", "BodyShow", "Camera", "Center", "Population", "RenderSettings", "Scene", "Sweep",
    "Timeline",
]
