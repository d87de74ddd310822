"""Labels an audience can read: at least 16 px at UI scale 1, with a dark halo so that an
orbit line crossing the text stops short of the glyphs, sized by the window's UI scale
(the export keeps its own sizes), and kept inside the area the panels leave free.

References: the 16 px floor and the halo are the projector requirement of the viewer's
theme (common practice for projected text, no source); glyph heights are compared with
Pillow's own rasterising of the bundled font at 16 px (an independent measure of the
font, not our atlas).
"""

from __future__ import annotations

from dataclasses import replace

import numpy as np
import pytest
from scipy import ndimage

from viewer.geometry.camera import view_for
from viewer.geometry.labels import PlacedLabel
from viewer.gui.camera_input import on_screen
from viewer.orbit import state_from_elements
from viewer.render.text import load_font
from viewer.scene import load_scene
from viewer.scene.model import Scene

pytestmark = pytest.mark.gl

TEXT = "Dunmore apoapsis 4 au"
W, H = 420, 120
#: An orbit colour of the demo scene (#c7a4ff), as bright as a line gets.
LINE_RGB = (0.78, 0.64, 1.0)


@pytest.fixture(scope="module")
def renderer():  # type: ignore[no-untyped-def]
    from viewer.render import headless_renderer

    with headless_renderer() as r:
        yield r


@pytest.fixture(scope="module")
def demo() -> Scene:
    from pathlib import Path

    return load_scene(Path(__file__).resolve().parents[1] / "scenes" / "demo.toml")


def _label_over(renderer, rgb: tuple[float, float, float], size_px: float) -> np.ndarray:  # type: ignore[no-untyped-def]
    """A white label drawn over a flat colour, as RGB floats (H, W, 3)."""
    fbo = renderer.target((W, H))
    fbo.use()
    renderer.ctx.viewport = (0, 0, W, H)
    renderer.ctx.clear(*rgb, 1.0)
    renderer.draw_labels([PlacedLabel(TEXT, 20.0, 60.0, size_px, (1.0, 1.0, 1.0, 1.0))],
                         fbo, (W, H))
    return renderer.read(fbo, (W, H))[..., :3].astype(np.float64) / 255.0


def test_a_glyphs_halo_does_not_darken_its_neighbours_ink(renderer) -> None:  # type: ignore[no-untyped-def]
    # Over a black sky the halo is invisible, so a word is at least as bright everywhere
    # as each of its letters drawn alone at the same pen position: no letter's halo eats
    # into its neighbour's ink.
    text, size = "Wavy Tarn", 16.0
    pens = renderer.fonts.atlas(size, text).pen_positions(text)

    def shot(labels: list[PlacedLabel]) -> np.ndarray:
        fbo = renderer.target((W, H))
        fbo.use()
        renderer.ctx.viewport = (0, 0, W, H)
        renderer.ctx.clear(0.0, 0.0, 0.0, 1.0)
        renderer.draw_labels(labels, fbo, (W, H))
        return renderer.read(fbo, (W, H))[..., :3].astype(int)

    white = (1.0, 1.0, 1.0, 1.0)
    word = shot([PlacedLabel(text, 20.0, 60.0, size, white)])
    letters = np.max([shot([PlacedLabel(ch, 20.0 + round(pen), 60.0, size, white)])
                      for ch, pen in zip(text, pens, strict=False) if ch != " "], axis=0)
    assert word.max() > 200
    assert (word - letters).min() >= -2


def _smallest_label_px(renderer, scene: Scene, view) -> float:  # type: ignore[no-untyped-def]
    return min(lab.size_px for lab in renderer.geometry(scene, 0.0, view).labels)


def test_the_smallest_label_of_the_window_is_at_least_16_px_with_its_glyphs_that_tall(
        renderer, demo: Scene) -> None:  # type: ignore[no-untyped-def]
    shown = replace(demo, bodies=tuple(replace(b, show=replace(b.show, apsides=True))
                                       for b in demo.bodies))
    for size in ((1600, 900), (1280, 720), (1920, 1080)):
        view = on_screen(view_for(shown, 0.0, size), 1.0, (0, 0, *size))
        assert _smallest_label_px(renderer, shown, view) >= 16.0
    # On the pixels: the ink of the text is as tall as the font's own at 16 px.
    ink = _label_over(renderer, (0.0, 0.0, 0.0), 16.0).max(axis=2) > 0.5
    rows = np.flatnonzero(ink.any(axis=1))
    x0, top, x1, bottom = load_font(16).getbbox(TEXT, anchor="ls")
    assert rows.max() - rows.min() + 1 >= bottom - top - 1  # to a pixel of antialiasing
    cols = np.flatnonzero(ink.any(axis=0))
    assert cols.max() - cols.min() + 1 >= x1 - x0 - 4  # the whole text (a letter is 9 px)


def test_a_dark_halo_keeps_a_bright_line_off_the_glyphs(renderer) -> None:  # type: ignore[no-untyped-def]
    ink = _label_over(renderer, (0.0, 0.0, 0.0), 16.0).max(axis=2) > 0.1
    over_line = _label_over(renderer, LINE_RGB, 16.0).mean(axis=2)
    line = over_line[2, 2]  # the line's own brightness, far from the text
    near = ndimage.binary_dilation(ink, np.ones((3, 3))) & ~ink  # a pixel out from the ink
    farther = ndimage.binary_dilation(ink, np.ones((5, 5))) & ~ink & ~near
    assert near.sum() > 500 and farther.sum() > 500
    assert over_line[near].mean() < 0.2 * line
    assert np.percentile(over_line[near], 95) < 0.4 * line
    assert over_line[farther].mean() < 0.5 * line


def test_labels_and_markers_follow_the_ui_scale_and_the_export_keeps_its_own(
        renderer, demo: Scene) -> None:  # type: ignore[no-untyped-def]
    size = (1600, 900)
    base = view_for(demo, 0.0, size)
    one = renderer.geometry(demo, 0.0, on_screen(base, 1.0, (0, 0, *size)))
    big = renderer.geometry(demo, 0.0, on_screen(base, 1.5, (0, 0, *size)))
    label_one = {lab.text: lab.size_px for lab in one.labels}
    label_big = {lab.text: lab.size_px for lab in big.labels}
    for name in ("Pell", "Tarn", "Halcyra"):
        assert label_big[name] == pytest.approx(1.5 * label_one[name])
    # Marker radii (column 2 of a marker row) grow by the same factor.
    assert big.markers[:, 2].max() == pytest.approx(1.5 * one.markers[:, 2].max())
    # In the window a label is as many screen pixels whatever the window's height ...
    small = view_for(demo, 0.0, (1280, 720))
    in_small = renderer.geometry(demo, 0.0, on_screen(small, 1.0, (0, 0, 1280, 720)))
    assert {lab.text: lab.size_px for lab in in_small.labels}["Pell"] == label_one["Pell"]
    # ... while an export sizes it by its own image height, as before.
    export = {lab.text: lab.size_px for lab in renderer.geometry(demo, 0.0, small).labels}
    assert export["Pell"] == pytest.approx(label_one["Pell"] * 720 / 1080)


@pytest.mark.parametrize(("size", "scale"), [((1600, 900), 1.0), ((1920, 1080), 1.5)])
def test_labels_stay_whole_inside_the_area_the_panels_leave_free(
        renderer, demo: Scene, size: tuple[int, int], scale: float) -> None:  # type: ignore[no-untyped-def]
    from viewer.gui.panels.widgets import scene_area

    free = scene_area(size, scale)  # x, y from the top, width, height: the panels' layout
    view = on_screen(view_for(demo, 0.0, size), scale, free)
    labels = renderer.geometry(demo, 0.0, view).labels
    names = {lab.text for lab in labels}
    # Every body seen in the free area keeps its whole name there: one near a panel's
    # edge has its label slid in, not cut short under the panel.
    x0, y0, w, h = free
    seen = {"Halcyra"}
    for body in demo.bodies:
        q, _ = view.project(np.asarray(state_from_elements(body.elements_at(0.0))[0]))
        if x0 + 8 < q[0] < x0 + w - 8 and y0 + 8 < q[1] < y0 + h - 8:
            seen.add(body.name)
    assert len(seen) >= 4 and seen <= names, (seen, names)
    for lab in labels:
        width, ascent, descent = renderer.measure(lab.text, lab.size_px)
        assert free[0] <= lab.x_px and lab.x_px + width <= free[0] + free[2], lab
        assert free[1] <= lab.y_px - ascent and lab.y_px + descent <= free[1] + free[3], lab


def test_kept_pen_positions_are_the_fonts_own_and_stay_bounded() -> None:
    # Pen positions are kept by text (labels repeat every frame); a clock's text is new
    # every frame, so the store is bounded. Kept or not, the advance is Pillow's length
    # of the text at that size (pair kerning included: it is Pillow's own getlength).
    from viewer.render import text as text_mod

    at = text_mod.GlyphAtlas(16)
    first = at.pen_positions(TEXT)
    assert at.pen_positions(TEXT) is first
    assert first[-1] == pytest.approx(load_font(16).getlength(TEXT), abs=1e-6)
    for k in range(text_mod._PENS_KEPT + 10):
        at.pen_positions(f"T+{k} d")
    assert len(at._pens) <= text_mod._PENS_KEPT
    assert at.pen_positions(TEXT) == first
