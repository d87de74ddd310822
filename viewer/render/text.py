"""Label text: a glyph atlas rendered with Pillow from the bundled font, and glyph quads.

The font is DejaVu Sans (viewer/fonts, Bitstream Vera licence beside it), loaded from the
package with importlib.resources. Each glyph is rasterised once per pixel size into an
atlas whose red channel is the glyph's coverage and green channel a dark halo (opaque
a pixel out from the ink, then fading); the
text shader composites one over the other. Glyphs are placed on whole pixels and sampled
texel for texel, so labels are as crisp in an export as in the window. The atlas is pure
numpy; only ``upload`` touches GL.
"""

from __future__ import annotations

from dataclasses import dataclass
from importlib import resources
from typing import Any

import numpy as np
from numpy.typing import NDArray

from ..geometry.labels import PlacedLabel

Floats = NDArray[np.float64]

FONT_FILE = "DejaVuSans.ttf"
#: Characters always in an atlas; others are added when a label needs them.
BASE_CHARS = ("".join(chr(c) for c in range(32, 127))
              + "\u00b0\u00b2\u00b3\u00b7\u00b5\u00d7\u2212\u2248\u00b1\u2013\u2014\u2019"
              + "\u03b1\u03b2\u03b3\u03b4\u03b5\u03b8\u03bb\u03bc\u03bd\u03c0\u03c1\u03c3"
              + "\u03c9\u0394\u03a9")
_PAD = 4
_ATLAS_WIDTH = 1024
#: Floats per text vertex: x, y (px), u, v, r, g, b, a.
TEXT_FLOATS = 8


def load_font(size_px: int) -> Any:
    """The bundled font at ``size_px`` pixels (a Pillow FreeTypeFont)."""
    from PIL import ImageFont

    data = resources.files("viewer").joinpath("fonts", FONT_FILE).read_bytes()
    import io

    return ImageFont.truetype(io.BytesIO(data), size_px)


@dataclass(frozen=True)
class Glyph:
    x0: int      # atlas texel rectangle
    y0: int
    w: int
    h: int
    left: int    # bitmap offset from the pen position on the baseline, px
    top: int
    advance: float


#: Texts whose pen positions an atlas keeps (GlyphAtlas.pen_positions).
_PENS_KEPT = 4096


class GlyphAtlas:
    """Every glyph of one pixel size, packed into one two-channel image."""

    def __init__(self, size_px: int, chars: str = BASE_CHARS) -> None:
        from PIL import Image, ImageDraw, ImageFilter

        self.size_px = size_px
        self.font = load_font(size_px)
        self.chars = "".join(sorted(set(chars)))
        self.glyphs: dict[str, Glyph] = {}
        bitmaps = []
        for ch in self.chars:
            x0, y0, x1, y1 = self.font.getbbox(ch, anchor="ls")
            w = max(x1 - x0, 0) + 2 * _PAD
            h = max(y1 - y0, 0) + 2 * _PAD
            glyph = Image.new("L", (w, h), 0)
            ImageDraw.Draw(glyph).text((_PAD - x0, _PAD - y0), ch, font=self.font, fill=255,
                                     anchor="ls")
            # The halo: opaque a pixel out from the ink, fading over the next two, so a
            # bright orbit line crossing the text stops short of the glyphs.
            near = np.asarray(glyph.filter(ImageFilter.MaxFilter(3)))
            far = np.asarray(glyph.filter(ImageFilter.MaxFilter(5))
                             .filter(ImageFilter.GaussianBlur(0.8)))
            halo_img = np.maximum(near, far)
            bitmaps.append((ch, np.asarray(glyph), halo_img, x0 - _PAD, y0 - _PAD,
                            float(self.font.getlength(ch))))
        # Shelf packing, in character order (deterministic).
        x = y = row_h = 0
        places = []
        for _ch, img, _halo, _l, _t, _adv in bitmaps:
            h, w = img.shape
            if x + w > _ATLAS_WIDTH:
                x, y, row_h = 0, y + row_h, 0
            places.append((x, y))
            x += w
            row_h = max(row_h, h)
        height = int(2 ** np.ceil(np.log2(max(y + row_h, 1))))
        atlas = np.zeros((height, _ATLAS_WIDTH, 2), dtype=np.uint8)
        for (ch, img, halo, left, top, adv), (px, py) in zip(bitmaps, places, strict=True):
            h, w = img.shape
            atlas[py:py + h, px:px + w, 0] = img
            atlas[py:py + h, px:px + w, 1] = np.maximum(halo, img)
            self.glyphs[ch] = Glyph(px, py, w, h, left, top, adv)
        self.image = atlas
        bx0, by0, bx1, by1 = self.font.getbbox("Hgy", anchor="ls")
        self.ascent = float(-by0)
        self.descent = float(by1)
        self._kern: dict[str, float] = {}
        self._pens: dict[str, tuple[float, ...]] = {}
        self._corners: dict[str, Floats] = {}

    def has(self, text: str) -> bool:
        return all(ch in self.glyphs for ch in text)

    def _pair(self, a: str, b: str) -> float:
        key = a + b
        k = self._kern.get(key)
        if k is None:
            k = float(self.font.getlength(key)) - self.glyphs[a].advance - self.glyphs[b].advance
            self._kern[key] = k
        return k

    def pen_positions(self, text: str) -> tuple[float, ...]:
        """Pen x (px) of each character from the start, with pair kerning, and the
        advance of the whole text last (kept by text: labels repeat every frame)."""
        kept = self._pens.get(text)
        if kept is None:
            if len(self._pens) >= _PENS_KEPT:  # a clock's text is new every frame
                self._pens.clear()
            kept = self._pens[text] = tuple(self._pen_positions(text))
        return kept

    def _pen_positions(self, text: str) -> list[float]:
        out = []
        x = 0.0
        prev = None
        for ch in text:
            g = self.glyphs.get(ch) or self.glyphs["?"]
            if prev is not None:
                x += self._pair(prev, ch if ch in self.glyphs else "?")
            out.append(x)
            x += g.advance
            prev = ch if ch in self.glyphs else "?"
        out.append(x)
        return out

    def measure(self, text: str) -> tuple[float, float, float]:
        """(advance width, ascent, descent) of ``text`` in px."""
        return self.pen_positions(text)[-1], self.ascent, self.descent

    def quads(self, label: PlacedLabel) -> Floats:
        """Text vertices (6 per glyph) for ``label``, glyphs on whole pixels."""
        corners = self._corners.get(label.text)
        if corners is None:
            if len(self._corners) >= _PENS_KEPT:  # a clock's text is new every frame
                self._corners.clear()
            corners = self._corners[label.text] = self._glyph_corners(label.text)
        out = np.empty((len(corners), TEXT_FLOATS), dtype=np.float64)
        out[:, :4] = corners
        out[:, 0] += round(label.x_px)  # whole pixels added to whole pixels: exact
        out[:, 1] += round(label.y_px)
        out[:, 4:] = label.rgba
        return out

    def _glyph_corners(self, text: str) -> Floats:
        """(x, y, u, v) of the six vertices of each glyph of ``text``, x and y from the
        text's origin in whole pixels (kept by text, as the pens are)."""
        pens = self.pen_positions(text)
        rows = []
        H, W = self.image.shape[:2]
        for ch, pen in zip(text, pens, strict=False):
            g = self.glyphs.get(ch) or self.glyphs["?"]
            if ch == " ":
                continue
            gx = round(pen) + g.left
            gy = g.top
            u0, v0 = g.x0 / W, g.y0 / H
            u1, v1 = (g.x0 + g.w) / W, (g.y0 + g.h) / H
            rows += [(gx, gy, u0, v0), (gx + g.w, gy, u1, v0), (gx, gy + g.h, u0, v1),
                     (gx, gy + g.h, u0, v1), (gx + g.w, gy, u1, v0),
                     (gx + g.w, gy + g.h, u1, v1)]
        return np.array(rows, dtype=np.float64).reshape(-1, 4)


class FontCache:
    """Atlases by pixel size, grown when a label needs a character they lack."""

    def __init__(self) -> None:
        self._atlases: dict[int, GlyphAtlas] = {}

    def atlas(self, size_px: float, text: str = "") -> GlyphAtlas:
        size = max(6, int(round(size_px)))
        at = self._atlases.get(size)
        if at is None or not at.has(text):
            chars = BASE_CHARS + (at.chars if at else "") + text
            at = GlyphAtlas(size, chars)
            self._atlases[size] = at
        return at

    def measure(self, text: str, size_px: float) -> tuple[float, float, float]:
        return self.atlas(size_px, text).measure(text)
