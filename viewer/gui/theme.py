"""The viewer's own look, made for projectors: panel text of at least 18 px at UI scale 1,
high-contrast secondary text, and panels of a deep blue-black that keeps the picture the
brightest thing in the room. Colours are our own; the panels' accents (amber for
warnings, a light coral for refusals) stay distinct under the common colour-vision
deficiencies (the body palette's check is in tests/test_gui_theme.py).
"""

from __future__ import annotations

from typing import Any

#: Panel text height in pixels at UI scale 1.
PANEL_FONT_PX = 18.0

#: RGBA in [0, 1].
TEXT = (0.93, 0.94, 0.96, 1.0)
TEXT_SECONDARY = (0.78, 0.81, 0.86, 1.0)  # contrast about 10:1 on the panel background
#: Opaque: the picture stays between the panels, so panels that did not change need not
#: be drawn again over it (ViewerWindow on a screen that keeps its pixels).
PANEL_BG = (0.055, 0.065, 0.095, 1.0)
FRAME_BG = (0.12, 0.14, 0.20, 1.0)
FRAME_HOVER = (0.18, 0.22, 0.32, 1.0)
ACCENT = (0.30, 0.52, 0.86, 1.0)
ACCENT_HOVER = (0.40, 0.62, 0.95, 1.0)
HEADER = (0.16, 0.24, 0.40, 1.0)
WARNING = (1.0, 0.75, 0.3, 1.0)
REFUSAL = (1.0, 0.55, 0.5, 1.0)


def apply_theme(imgui: Any, scale: float = 1.0) -> None:
    """Set imgui's colours and sizes to ours, every size multiplied by ``scale``."""
    style = imgui.get_style()
    imgui.style_colors_dark(style)
    c = imgui.Col_
    colors = {
        c.text: TEXT, c.text_disabled: TEXT_SECONDARY, c.window_bg: PANEL_BG,
        c.popup_bg: (0.07, 0.08, 0.12, 0.98), c.border: (0.25, 0.30, 0.42, 0.8),
        c.frame_bg: FRAME_BG, c.frame_bg_hovered: FRAME_HOVER, c.frame_bg_active: HEADER,
        c.title_bg: (0.08, 0.10, 0.16, 1.0), c.title_bg_active: HEADER,
        c.menu_bar_bg: (0.07, 0.08, 0.12, 1.0), c.check_mark: ACCENT_HOVER,
        c.slider_grab: ACCENT, c.slider_grab_active: ACCENT_HOVER, c.button: HEADER,
        c.button_hovered: ACCENT, c.button_active: ACCENT_HOVER, c.header: HEADER,
        c.header_hovered: ACCENT, c.header_active: ACCENT_HOVER, c.tab: FRAME_BG,
        c.tab_hovered: ACCENT, c.tab_selected: HEADER,
    }
    for key, rgba in colors.items():
        style.set_color_(key, imgui.ImVec4(*rgba))
    style.window_rounding = 4.0
    style.frame_rounding = 3.0
    style.frame_border_size = 1.0  # radio buttons and fields stand out from the panel
    style.scale_all_sizes(scale)
