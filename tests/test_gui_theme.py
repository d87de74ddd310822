"""The colours people must tell apart stay apart for viewers with colour-vision
deficiency, and new bodies get a colour no other body has.

Simulation: Machado, Oliveira and Fernandes (2009), "A physiologically-based model for
simulation of color vision deficiency", IEEE TVCG 15(6), the severity-1.0 matrices for
protanopia, deuteranopia and tritanopia applied to linear sRGB (matrix values from
memory). Distances are CIE76 Delta E in CIELAB (D65); a Delta E above about 10 is a
clearly different colour at a glance (common practice, no source).
"""

from __future__ import annotations

import itertools
from pathlib import Path

import numpy as np

from viewer.gui import theme
from viewer.gui.editor import Editor
from viewer.scene.loader import PALETTE
from viewer.scene.values import parse_color

ROOT = Path(__file__).resolve().parents[1]

MACHADO_2009 = {  # severity 1.0 (from memory)
    "protanopia": [[0.152286, 1.052583, -0.204868], [0.114503, 0.786281, 0.099216],
                   [-0.003882, -0.048116, 1.051998]],
    "deuteranopia": [[0.367322, 0.860646, -0.227968], [0.280085, 0.672501, 0.047413],
                     [-0.011820, 0.042940, 0.968881]],
    "tritanopia": [[1.255528, -0.076749, -0.178779], [-0.078411, 0.930809, 0.147602],
                   [0.004733, 0.691367, 0.303900]],
}


def linear(rgb: np.ndarray) -> np.ndarray:
    return np.where(rgb <= 0.04045, rgb / 12.92, ((rgb + 0.055) / 1.055) ** 2.4)


def lab(lin: np.ndarray) -> np.ndarray:
    """CIELAB (D65) of linear sRGB (IEC 61966-2-1 matrix)."""
    m = np.array([[0.4124, 0.3576, 0.1805], [0.2126, 0.7152, 0.0722],
                  [0.0193, 0.1192, 0.9505]])
    xyz = lin @ m.T / np.array([0.95047, 1.0, 1.08883])
    f = np.where(xyz > (6 / 29) ** 3, np.cbrt(xyz), xyz / (3 * (6 / 29) ** 2) + 4 / 29)
    return np.stack([116 * f[..., 1] - 16, 500 * (f[..., 0] - f[..., 1]),
                     200 * (f[..., 1] - f[..., 2])], axis=-1)


def min_delta_e(colors: list[tuple[float, float, float]], vision: str | None) -> float:
    lin = linear(np.array(colors))
    if vision is not None:
        lin = np.clip(lin @ np.array(MACHADO_2009[vision]).T, 0.0, 1.0)
    L = lab(lin)
    return min(float(np.linalg.norm(L[i] - L[j]))
               for i, j in itertools.combinations(range(len(colors)), 2))


def test_the_body_palette_stays_apart_under_each_deficiency() -> None:
    colors = [parse_color(c) for c in PALETTE]
    assert min_delta_e(colors, None) > 20
    for vision in MACHADO_2009:
        # Eight hues cannot all stay far apart under dichromacy; the nearest pair must
        # still be distinguishable side by side.
        assert min_delta_e(colors, vision) > 5, vision


def test_warnings_refusals_and_secondary_text_stay_apart_on_the_panels() -> None:
    marks = [theme.WARNING[:3], theme.REFUSAL[:3], theme.TEXT_SECONDARY[:3], theme.PANEL_BG[:3]]
    for vision in (None, *MACHADO_2009):
        assert min_delta_e(marks, vision) > 10, vision


def test_secondary_text_has_high_contrast_on_the_panels() -> None:
    # WCAG 2.x contrast ratio (L1 + 0.05) / (L2 + 0.05) of relative luminances.
    def luminance(rgb: tuple[float, ...]) -> float:
        return float(np.array([0.2126, 0.7152, 0.0722]) @ linear(np.array(rgb[:3])))

    ratio = (luminance(theme.TEXT_SECONDARY) + 0.05) / (luminance(theme.PANEL_BG) + 0.05)
    assert ratio >= 7.0  # WCAG AAA for text (common practice)
    assert theme.PANEL_FONT_PX >= 18


def test_a_new_body_gets_a_colour_no_other_body_has() -> None:
    ed = Editor.open(ROOT / "scenes" / "laws.toml")
    for _ in range(3):
        ed.add_body()
        colors = [b.color for b in ed.scene.bodies]
        assert len(set(colors)) == len(colors)
