"""imgui on moderngl and pyglet: draws imgui's draw data, feeds it pyglet's input.

imgui-bundle's own pyglet backend draws through PyOpenGL; this one draws with moderngl
(the context the scene renderer already uses), with its shaders as files
(``shaders/panel.vert``, ``panel.frag``), and honours imgui's texture protocol (the font
atlas is created and updated by imgui, uploaded here). ``PanelInput`` turns pyglet
window events into imgui input events; it holds no state of its own beyond the imgui io.
"""

from __future__ import annotations

import ctypes
import math
from dataclasses import dataclass
from typing import Any

import numpy as np
from imgui_bundle import imgui

from ..render.shaders import load_program

#: (x, y from the top, width, height) in framebuffer pixels.
Rect = tuple[int, int, int, int]
RGBA = tuple[float, float, float, float]
BLACK: RGBA = (0.0, 0.0, 0.0, 1.0)


@dataclass(frozen=True)
class _Kept:
    """What the screen shows outside ``picture`` after a render with a picture: the
    panels of draw lists with these signatures in these rectangles, over ``outside``."""

    picture: Rect
    framebuffer_size: tuple[int, int]
    outside: RGBA
    display: tuple[float, float, int]  # display size, and the number of draw lists
    sigs: list[bytes]
    boxes: list[Rect | None]


class PanelRenderer:
    """Draws ``imgui.get_draw_data()`` into the current framebuffer of ``ctx``."""

    def __init__(self, ctx: Any) -> None:
        import moderngl

        self.ctx = ctx
        self._mgl = moderngl
        self.program = load_program(ctx, "panel")
        self._vbo = ctx.buffer(reserve=1 << 16, dynamic=True)
        self._ibo = ctx.buffer(reserve=1 << 16, dynamic=True)
        self._vao = self._make_vao()
        self._textures: dict[int, Any] = {}
        #: What the screen shows outside the picture since the last render with a
        #: picture, or None.
        self._kept: _Kept | None = None
        io = imgui.get_io()
        io.backend_flags |= imgui.BackendFlags_.renderer_has_textures
        size = int(ctx.info["GL_MAX_TEXTURE_SIZE"])
        pio = imgui.get_platform_io()
        pio.renderer_texture_max_width = size
        pio.renderer_texture_max_height = size

    def _make_vao(self) -> Any:
        return self.ctx.vertex_array(
            self.program, [(self._vbo, "2f 2f 4f1", "in_pos_px", "in_uv", "in_color")],
            index_buffer=self._ibo, index_element_size=imgui.INDEX_SIZE)

    def _ensure(self, vbytes: int, ibytes: int) -> None:
        grow = False
        if vbytes > self._vbo.size:
            self._vbo.orphan(max(vbytes, 2 * self._vbo.size))
            grow = True
        if ibytes > self._ibo.size:
            self._ibo.orphan(max(ibytes, 2 * self._ibo.size))
            grow = True
        if grow:
            self._vao.release()
            self._vao = self._make_vao()

    # --- textures (imgui >= 1.92 creates and updates them through the backend) ----------

    def _update_textures(self) -> bool:
        """Create, update and destroy the textures imgui asks for; True if any changed."""
        changed = False
        for tex in imgui.get_platform_io().textures:
            status = tex.status
            if status == imgui.ImTextureStatus.ok:
                continue
            changed = True
            if status in (imgui.ImTextureStatus.want_create, imgui.ImTextureStatus.want_updates):
                pixels = tex.get_pixels_array()
                gl_tex = self._textures.get(int(tex.tex_id)) if tex.tex_id else None
                if gl_tex is None or gl_tex.size != (tex.width, tex.height):
                    if gl_tex is not None:
                        self._textures.pop(gl_tex.glo, None)
                        gl_tex.release()
                    gl_tex = self.ctx.texture((tex.width, tex.height), 4, pixels.tobytes())
                    # imgui places glyphs on whole pixels, so nearest sampling keeps text
                    # sharp and costs llvmpipe less than linear (lines are drawn without
                    # the atlas's baked textures, see ViewerWindow).
                    gl_tex.filter = (self._mgl.NEAREST, self._mgl.NEAREST)
                    gl_tex.repeat_x = gl_tex.repeat_y = False
                    self._textures[gl_tex.glo] = gl_tex
                    tex.set_tex_id(gl_tex.glo)
                else:  # a whole upload is simpler than sub-rectangles and cheap for atlases
                    gl_tex.write(pixels.tobytes())
                tex.status = imgui.ImTextureStatus.ok
            elif status == imgui.ImTextureStatus.want_destroy:
                gl_tex = self._textures.pop(int(tex.tex_id), None)
                if gl_tex is not None:
                    gl_tex.release()
                tex.set_tex_id(0)
                tex.status = imgui.ImTextureStatus.destroyed
        return changed

    # --- drawing ----------------------------------------------------------------------

    def keeps(self, picture: Rect, framebuffer_size: tuple[int, int],
              outside: RGBA = BLACK) -> bool:
        """True if the screen outside ``picture`` still holds the panels that the last
        frame's ``render`` left there with this picture over ``outside`` (see
        ``render``): the caller then draws only the picture."""
        k = self._kept
        return k is not None and (k.picture, k.framebuffer_size, k.outside) == (
            picture, framebuffer_size, outside)

    def forget(self) -> None:
        """The screen no longer holds the last frame's panels (resized, exposed, drawn
        another way): the next ``render`` with a picture draws them all again."""
        self._kept = None

    def render(self, draw_data: Any, framebuffer_size: tuple[int, int],
               picture: Rect | None = None, outside: RGBA = BLACK) -> bool:
        """Draw one frame of panels over whatever is in the framebuffer; True if drawn.

        ``picture`` (x, y from the top, width, height; framebuffer pixels) is given only
        on a screen that keeps its pixels from one frame to the next
        (``screen_keeps_pixels``) when the caller draws that area anew each frame and
        leaves the rest the colour ``outside`` (premultiplied RGBA) under the panels (the
        caller clears all of it when ``keeps`` is False). Then, while no panel reaches
        into the picture, a panel (a draw list) that is the same as in the last frame is
        not drawn again, the screen still shows it; one that changed is drawn again over
        its old and new rectangles cleared, with every panel those rectangles touch.
        Otherwise the screen outside the picture is cleared to ``outside`` and every
        panel drawn. Either way the pixels are those of every panel drawn over a whole
        cleared screen. Without ``picture`` every panel is drawn and the kept
        ones are forgotten (the caller draws under them).
        """
        textures_changed = self._update_textures()
        io = imgui.get_io()
        dw, dh = io.display_size.x, io.display_size.y
        fw, fh = framebuffer_size
        if fw <= 0 or fh <= 0 or dw <= 0 or dh <= 0:
            self._kept = None
            return False
        sx, sy = fw / dw, fh / dh
        lists = list(draw_data.cmd_lists)
        vsize, isize = imgui.VERTEX_SIZE, imgui.INDEX_SIZE
        data = [(ctypes.string_at(c.vtx_buffer.data_address(), c.vtx_buffer.size() * vsize),
                 ctypes.string_at(c.idx_buffer.data_address(), c.idx_buffer.size() * isize))
                for c in lists]
        if picture is None:
            self._kept = None
        else:
            kept_before = self.keeps(picture, framebuffer_size, outside)
            head = (float(dw), float(dh), len(lists))
            sigs = [_signature(c, d) for c, d in zip(lists, data, strict=True)]
            last = self._kept
            # A list the same as last frame's, on the same screen, has the same rectangle.
            old = last if last is not None and (last.display, last.framebuffer_size) == (
                head, framebuffer_size) else None
            boxes = [old.boxes[i] if old is not None and old.sigs[i] == sig
                     else _box(c, d, (dw, dh), sx, sy)
                     for i, (c, d, sig) in enumerate(zip(lists, data, sigs, strict=True))]
            reach = any(b is not None and _overlap(b, picture) for b in boxes)
            self._kept = None if reach else _Kept(picture, framebuffer_size, outside, head,
                                                  sigs, boxes)
            if kept_before and last is not None and not reach and not textures_changed \
                    and last.display == head:
                # The same windows: draw again only those that changed and those they
                # touch, each over its old and new rectangle cleared.
                redraw = _to_redraw(last.sigs, last.boxes, sigs, boxes)
                for i in redraw:
                    for box in {b for b in (last.boxes[i], boxes[i]) if b is not None}:
                        x, y, w, h = _on_screen(box, framebuffer_size)
                        if w > 0 and h > 0:
                            self.ctx.screen.clear(*outside, viewport=(x, fh - y - h, w, h))
                if not redraw:
                    return False
                self._draw([lists[i] for i in redraw], [data[i] for i in redraw], (dw, dh),
                           framebuffer_size)
                return True
            if kept_before:  # last frame's panels are still there: clear them first
                for x, y, w, h in _outside(picture, framebuffer_size):
                    self.ctx.screen.clear(*outside, viewport=(x, fh - y - h, w, h))
        self._draw(lists, data, (dw, dh), framebuffer_size)
        return True

    def _draw(self, lists: list[Any], data: list[tuple[bytes, bytes]],
              display: tuple[float, float], framebuffer_size: tuple[int, int]) -> None:
        dw, dh = display
        fw, fh = framebuffer_size
        sx, sy = fw / dw, fh / dh
        ctx = self.ctx
        mgl = self._mgl
        ctx.viewport = (0, 0, fw, fh)
        ctx.enable_only(mgl.BLEND)
        ctx.blend_func = (mgl.SRC_ALPHA, mgl.ONE_MINUS_SRC_ALPHA, mgl.ONE, mgl.ONE_MINUS_SRC_ALPHA)
        ctx.blend_equation = mgl.FUNC_ADD
        self.program["u_display_px"].value = (float(dw), float(dh))
        self.program["u_texture"].value = 0
        try:
            for cmds, (vertices, indices) in zip(lists, data, strict=True):
                self._ensure(len(vertices), len(indices))
                self._vbo.write(vertices)
                self._ibo.write(indices)
                for cmd in cmds.cmd_buffer:
                    tex = self._textures.get(int(cmd.tex_ref.get_tex_id()))
                    if tex is not None:
                        tex.use(0)
                    x0, y0, x1, y1 = cmd.clip_rect
                    x0, x1 = max(0.0, x0 * sx), min(float(fw), x1 * sx)
                    y0, y1 = max(0.0, y0 * sy), min(float(fh), y1 * sy)
                    if x1 <= x0 or y1 <= y0:
                        continue
                    ctx.scissor = (int(x0), int(fh - y1), int(x1 - x0), int(y1 - y0))
                    self._vao.render(mgl.TRIANGLES, vertices=cmd.elem_count,
                                     first=cmd.idx_offset)
        finally:
            ctx.scissor = None

    def release(self) -> None:
        for tex in self._textures.values():
            tex.release()
        self._textures.clear()
        self._vao.release()
        self._vbo.release()
        self._ibo.release()
        self.program.release()


def _signature(cmds: Any, data: tuple[bytes, bytes]) -> bytes:
    """Everything one draw list's pixels depend on: its vertices and indices, and each
    draw's clip, texture and range (the atlas's pixels are checked apart:
    ``_update_textures``; the display size by the caller)."""
    vertices, indices = data
    calls = [(*cmd.clip_rect, float(cmd.tex_ref.get_tex_id()), cmd.elem_count,
              cmd.idx_offset, cmd.vtx_offset) for cmd in cmds.cmd_buffer]
    return b"".join([np.array([len(vertices), len(indices), len(calls)], np.int64).tobytes(),
                     vertices, indices, np.array(calls, dtype=np.float64).tobytes()])


def _to_redraw(old_sigs: list[bytes], old_boxes: list[Rect | None], sigs: list[bytes],
               boxes: list[Rect | None]) -> list[int]:
    """The draw lists to draw again, in order: those that changed, and every list whose
    rectangle meets a rectangle cleared for them (theirs, old and new), until none more
    does."""
    redraw = {i for i, (a, b) in enumerate(zip(old_sigs, sigs, strict=True))
              if a != b or old_boxes[i] != boxes[i]}
    cleared = [r for i in redraw for r in (old_boxes[i], boxes[i]) if r is not None]
    grown = True
    while grown:
        grown = False
        for j, box in enumerate(boxes):
            if j not in redraw and box is not None and any(_overlap(box, r) for r in cleared):
                redraw.add(j)
                cleared.append(box)
                grown = True
    return sorted(redraw)


def _on_screen(box: Rect, framebuffer_size: tuple[int, int]) -> Rect:
    x0, y0 = max(0, box[0]), max(0, box[1])
    x1 = min(framebuffer_size[0], box[0] + box[2])
    y1 = min(framebuffer_size[1], box[1] + box[3])
    return x0, y0, x1 - x0, y1 - y0


def _box(cmds: Any, data: tuple[bytes, bytes], display: tuple[float, float],
         sx: float, sy: float) -> Rect | None:
    """The framebuffer rectangle a draw list can touch (None if it draws nothing), a
    pixel wider each way for rounding: the union over its draws of each one's clip
    rectangle, or where that is the whole display (a window's frame, title and
    background), its triangles' bounding box. imgui clips scrolled-away content, so the
    triangles alone could reach far outside their window."""
    dw, dh = display
    vertices, indices = data
    index_type = np.uint16 if imgui.INDEX_SIZE == 2 else np.uint32
    xy = idx = None
    union: list[float] | None = None
    for cmd in cmds.cmd_buffer:
        if cmd.elem_count == 0:
            continue
        x0, y0, x1, y1 = cmd.clip_rect
        if x0 <= 0.0 and y0 <= 0.0 and x1 >= dw and y1 >= dh:
            if xy is None:
                xy = np.frombuffer(vertices, dtype=np.float32).reshape(
                    -1, imgui.VERTEX_SIZE // 4)[:, :2]
                idx = np.frombuffer(indices, dtype=index_type)
            assert idx is not None
            used = idx[cmd.idx_offset:cmd.idx_offset + cmd.elem_count]
            p = xy[used.astype(np.intp) + cmd.vtx_offset]
            (px0, py0), (px1, py1) = p.min(axis=0), p.max(axis=0)
            x0, y0, x1, y1 = max(x0, float(px0)), max(y0, float(py0)), \
                min(x1, float(px1)), min(y1, float(py1))
        if x1 <= x0 or y1 <= y0:
            continue
        union = [x0, y0, x1, y1] if union is None else [
            min(union[0], x0), min(union[1], y0), max(union[2], x1), max(union[3], y1)]
    if union is None:
        return None
    left, top = math.floor(union[0] * sx) - 1, math.floor(union[1] * sy) - 1
    return (left, top, math.ceil(union[2] * sx) + 1 - left, math.ceil(union[3] * sy) + 1 - top)


def _overlap(a: Rect, b: Rect) -> bool:
    return a[0] < b[0] + b[2] and b[0] < a[0] + a[2] and a[1] < b[1] + b[3] and \
        b[1] < a[1] + a[3]


def _outside(picture: Rect, framebuffer_size: tuple[int, int]) -> list[Rect]:
    """The screen less ``picture``, as up to four rectangles (above, below, left, right)."""
    fw, fh = framebuffer_size
    x, y, w, h = picture
    x0, y0 = max(0, x), max(0, y)
    x1, y1 = min(fw, x + w), min(fh, y + h)
    if x1 <= x0 or y1 <= y0:
        return [(0, 0, fw, fh)]
    rects = [(0, 0, fw, y0), (0, y1, fw, fh - y1), (0, y0, x0, y1 - y0),
             (x1, y0, fw - x1, y1 - y0)]
    return [r for r in rects if r[2] > 0 and r[3] > 0]


def _key_map() -> dict[int, Any]:
    from pyglet.window import key

    K = imgui.Key
    out: dict[int, Any] = {}
    for c in "abcdefghijklmnopqrstuvwxyz":
        out[getattr(key, c.upper())] = getattr(K, c)
    for d in "0123456789":
        out[getattr(key, f"_{d}")] = getattr(K, f"_{d}")
        out[getattr(key, f"NUM_{d}")] = getattr(K, f"keypad{d}")
    named = {
        "TAB": "tab", "BACKSPACE": "backspace", "RETURN": "enter", "ENTER": "enter",
        "NUM_ENTER": "keypad_enter", "ESCAPE": "escape", "DELETE": "delete",
        "INSERT": "insert", "SPACE": "space", "LEFT": "left_arrow", "RIGHT": "right_arrow",
        "UP": "up_arrow", "DOWN": "down_arrow", "HOME": "home", "END": "end",
        "PAGEUP": "page_up", "PAGEDOWN": "page_down", "LCTRL": "left_ctrl",
        "RCTRL": "right_ctrl", "LSHIFT": "left_shift", "RSHIFT": "right_shift",
        "LALT": "left_alt", "RALT": "right_alt", "MINUS": "minus", "EQUAL": "equal",
        "PERIOD": "period", "COMMA": "comma", "SLASH": "slash", "SEMICOLON": "semicolon",
        "BRACKETLEFT": "left_bracket", "BRACKETRIGHT": "right_bracket",
        "NUM_DECIMAL": "keypad_decimal", "NUM_SUBTRACT": "keypad_subtract",
        "NUM_ADD": "keypad_add", "F1": "f1", "F2": "f2", "F3": "f3",
    }
    for pk, ik in named.items():
        if hasattr(key, pk):
            out[getattr(key, pk)] = getattr(K, ik)
    return out


class PanelInput:
    """pyglet window events -> imgui io events (positions in imgui's top-down pixels)."""

    def __init__(self, height_px: int) -> None:
        self.io = imgui.get_io()
        self.height_px = height_px
        self.keys = _key_map()

    def mouse_move(self, x: float, y: float) -> None:
        self.io.add_mouse_pos_event(float(x), float(self.height_px - y))

    def mouse_button(self, x: float, y: float, button: int, down: bool) -> None:
        from pyglet.window import mouse

        self.mouse_move(x, y)
        index = {mouse.LEFT: 0, mouse.RIGHT: 1, mouse.MIDDLE: 2}.get(button)
        if index is not None:
            self.io.add_mouse_button_event(index, down)

    def scroll(self, dx: float, dy: float) -> None:
        self.io.add_mouse_wheel_event(float(dx), float(dy))

    def key(self, symbol: int, modifiers: int, down: bool) -> None:
        from pyglet.window import key

        io = self.io
        for mod, mask, symbols in ((imgui.Key.mod_ctrl, key.MOD_CTRL, (key.LCTRL, key.RCTRL)),
                                   (imgui.Key.mod_shift, key.MOD_SHIFT,
                                    (key.LSHIFT, key.RSHIFT)),
                                   (imgui.Key.mod_alt, key.MOD_ALT, (key.LALT, key.RALT))):
            # The modifier key itself: its own press or release decides (pyglet's
            # modifiers may still show the state before the event).
            io.add_key_event(mod, down if symbol in symbols else bool(modifiers & mask))
        k = self.keys.get(symbol)
        if k is not None:
            io.add_key_event(k, down)

    def text(self, text: str) -> None:
        for ch in text:
            if ch >= " ":
                self.io.add_input_character(ord(ch))
