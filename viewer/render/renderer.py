"""The renderer: one way to draw a frame, for the window and for every export.

``Renderer(ctx)`` compiles the programs once; ``draw(geometry, framebuffer)`` draws a
FrameGeometry into any framebuffer of that context (the window's screen, an offscreen
target); ``render(scene, t_s, ...)`` builds the geometry and returns the frame as an RGBA
uint8 array, top row first. A frame is a pure function of (scene, time, camera, size):
buffers are reused between frames, and ``render`` copies the layers under the markers
from the frame before when they are the same arrays (``_UnderCache``), which gives the
same bytes as drawing them.

Per frame: one clear and about eight draw calls (stars, grid, sector fills, glows,
lines, markers, one per label size). Populations (100,000 bodies and more) cost one
transform-feedback pass each (Kepler's equation in the vertex stage, four bodies a vertex, no
rasterising): their pixels come back and are splatted, on the CPU, into the backdrop that
replaces the clear. llvmpipe spends about 0.1 us per point primitive but only ns per touched
pixel in numpy, so this is several times faster than drawing points. No depth buffer
(draw order does the layering), no MSAA (the shaders anti-alias), premultiplied alpha
throughout.
"""

from __future__ import annotations

import sys
from collections.abc import Iterator, Sequence
from contextlib import contextmanager
from dataclasses import dataclass, replace
from typing import Any

import numpy as np
from numpy.typing import NDArray

from ..geometry.camera import View, view_for
from ..geometry.fills import FILL_FLOATS
from ..geometry.frame import (
    MARKER_FLOATS,
    FrameGeometry,
    StaticCache,
    build_frame,
    build_frames,
    frame_view_key,
)
from ..geometry.labels import PlacedLabel
from ..geometry.population import (
    PopulationConstants,
    SplatScratch,
    composite_population,
    mean_anomaly_at,
    population_constants,
)
from ..geometry.stars import make_starfield
from ..geometry.strokes import STROKE_FLOATS
from ..scene.model import Camera, Population, Scene
from ..scene.timeline import OverlayText
from .shaders import load_program
from .text import TEXT_FLOATS, FontCache, GlyphAtlas

UInt8s = NDArray[np.uint8]

#: ``Renderer.read`` keeps the arrays it returns from this size on (bytes; below it the
#: C allocator reuses memory by itself) for reuse once nothing holds them, at most
#: READ_ARRAYS_KEPT (a sequence writer's four frames in flight and one being read).
READ_KEEP_BYTES = 32 * 2**20
READ_ARRAYS_KEPT = 5
#: Bodies of a population per vertex of its transform-feedback stage (shaders/population.vert).
BODIES_PER_VERTEX = 4

#: Dark halo behind label glyphs (premultiplied in the shader).
HALO_RGBA = (0.0, 0.0, 0.0, 0.92)


def _stars_within(stars: NDArray[np.float64], clip_px: tuple[int, int, int, int],
                  size_px: tuple[int, int], top_row_first: bool) -> NDArray[np.float64]:
    """The stars whose whole point lies inside ``clip_px`` (GL's rows, from the bottom).
    llvmpipe lets a wide point spill a pixel past the scissor rectangle, where the
    window keeps its panels; lines, fills and text are clipped by the scissor itself."""
    if len(stars) == 0:
        return stars
    x, y, w, h = clip_px
    top = y if top_row_first else size_px[1] - (y + h)
    half = 0.5 * (np.maximum(stars[:, 2], 1.0) + 1.0) + 1.0  # points.vert's size, a pixel more
    inside = ((stars[:, 0] - half >= x) & (stars[:, 0] + half <= x + w)
              & (stars[:, 1] - half >= top) & (stars[:, 1] + half <= top + h))
    return stars[inside]


class _Stream:
    """A vertex buffer and its vertex array, grown (never shrunk) as frames need."""

    def __init__(self, ctx: Any, program: Any, layout: str, names: tuple[str, ...],
                 extra: list[tuple[Any, ...]] | None = None) -> None:
        self.ctx = ctx
        self.program = program
        self.layout = layout
        self.names = names
        self.extra = extra or []
        self.capacity = 0
        self.buffer: Any = None
        self.vao: Any = None

    def write(self, data: NDArray[np.float32]) -> None:
        raw = np.ascontiguousarray(data, dtype=np.float32).tobytes()
        if len(raw) > self.capacity or self.buffer is None:
            if self.vao is not None:
                self.vao.release()
                self.buffer.release()
            self.capacity = max(len(raw), 2 * self.capacity, 4096)
            self.buffer = self.ctx.buffer(reserve=self.capacity, dynamic=True)
            content = [*self.extra, (self.buffer, self.layout, *self.names)]
            self.vao = self.ctx.vertex_array(self.program, content)
        if raw:
            self.buffer.write(raw)

    def release(self) -> None:
        if self.vao is not None:
            self.vao.release()
            self.buffer.release()
            self.vao = None


@dataclass
class _PopulationGPU:
    population: Population
    constants: PopulationConstants
    static: Any
    anomaly: Any
    pixels: Any
    vao: Any
    mean64: NDArray[np.float64]     # this frame's mean anomalies, float64 then float32
    mean32: NDArray[np.float32]
    px: NDArray[np.float32]         # the stage's output, read back: (N, 2)


class _UnderCache:
    """The layers under the markers (``Renderer._draw_under``) of the last offscreen
    frame, to copy their picture instead of drawing them again.

    A sequence with a still camera and still orbits and sectors draws the same
    background, fills and lines in every frame; only the bodies' markers and the labels
    move. When a frame's under-layers equal the previous frame's (the same size and
    background and the same vertex arrays, compared value for value), their picture is
    saved; from the frame after, it is copied into the target (one blit, about 0.3 ms at
    1080p on llvmpipe, against 20-25 ms of fills and lines on the busy bench scene) and
    only the markers and labels are drawn over it. The copy is exact, and blending is
    done in the same order as a whole draw, so the frame is the same, byte for byte.
    Frames with populations (a backdrop made anew every frame) are never kept.
    """

    def __init__(self) -> None:
        self.key: tuple[Any, ...] | None = None
        self.layers: tuple[NDArray[np.float64], ...] = ()
        self.fbo: Any = None    # the saved picture, once two frames in a row matched

    @staticmethod
    def _parts(geom: FrameGeometry) -> tuple[tuple[Any, ...], tuple[Any, ...]]:
        key = (geom.view.size_px, geom.background)
        return key, (geom.stars, geom.grid, geom.fills, geom.glows, geom.strokes)

    def matches(self, geom: FrameGeometry) -> bool:
        """True if ``geom``'s under-layers are those remembered; otherwise forget them
        (the saved picture no longer applies)."""
        if geom.populations or self.key is None:
            self.forget()
            return False
        key, layers = self._parts(geom)
        if key == self.key and all(np.array_equal(a, b)  # False for another shape
                                   for a, b in zip(layers, self.layers, strict=True)):
            return True
        self.forget()
        return False

    def remember(self, geom: FrameGeometry) -> None:
        if geom.populations:
            return
        key, layers = self._parts(geom)
        self.key = key
        self.layers = tuple(np.array(a, copy=True) for a in layers)
        self.fbo = None

    def forget(self) -> None:
        self.key = None
        self.layers = ()
        self.fbo = None


class Renderer:
    """Draws FrameGeometry with moderngl into a framebuffer of ``ctx``.

    One Renderer per context; it owns its programs, buffers, atlases and offscreen
    targets. ``release()`` frees them (the context is the caller's).
    """

    def __init__(self, ctx: Any) -> None:
        import moderngl

        self.ctx = ctx
        self._mgl = moderngl
        self.fonts = FontCache()
        self.starfield = make_starfield()
        self.static = StaticCache()
        #: (scene, key, geometry) of the last ``geometry`` call.
        self._last_frame: tuple[Scene, tuple[object, ...], FrameGeometry] | None = None
        self.p_stroke = load_program(ctx, "stroke")
        self.p_fill = load_program(ctx, "fill")
        self.p_marker = load_program(ctx, "marker")
        self.p_points = load_program(ctx, "points")
        self.p_pop = load_program(ctx, "population",
                                  varyings=("v_px01", "v_px23"))
        self.p_backdrop = load_program(ctx, "backdrop")
        self._backdrop_vao = ctx.vertex_array(self.p_backdrop, [])
        self._backdrop_tex: dict[tuple[int, int], Any] = {}
        self._backdrop_np: dict[tuple[int, int], tuple[Any, Any]] = {}
        self.p_text = load_program(ctx, "text")
        stroke_layout = "2f 1f 1f 2f 1f 2f 4f"
        stroke_names = ("in_pos_px", "in_across", "in_along", "in_caps", "in_half_width",
                        "in_dash", "in_color")
        self.s_grid = _Stream(ctx, self.p_stroke, stroke_layout, stroke_names)
        self.s_lines = _Stream(ctx, self.p_stroke, stroke_layout, stroke_names)
        self.s_fill = _Stream(ctx, self.p_fill, "2f 4f", ("in_pos_px", "in_color"))
        self.s_stars = _Stream(ctx, self.p_points, "2f 1f 4f",
                               ("in_pos_px", "in_size_px", "in_color"))
        corners = np.array([[-1, -1], [1, -1], [-1, 1], [1, 1]], dtype=np.float32)
        self._corner_buf = ctx.buffer(corners.tobytes())
        marker_layout = "2f 1f 1f 1f 1f 4f/i"
        marker_names = ("in_center_px", "in_radius_px", "in_shape", "in_param", "in_angle",
                        "in_color")
        corner = [(self._corner_buf, "2f", "in_corner")]
        self.s_glow = _Stream(ctx, self.p_marker, marker_layout, marker_names, corner)
        self.s_markers = _Stream(ctx, self.p_marker, marker_layout, marker_names, corner)
        self._text_streams: dict[int, _Stream] = {}
        self._textures: dict[int, tuple[GlyphAtlas, Any]] = {}
        self._populations: dict[int, _PopulationGPU] = {}
        self._targets: dict[tuple[int, int], Any] = {}
        self._under = _UnderCache()
        self._under_fbo: dict[tuple[int, int], Any] = {}
        self._read_arrays: list[UInt8s] = []

    # --- geometry -----------------------------------------------------------------------

    def measure(self, text: str, size_px: float) -> tuple[float, float, float]:
        """Text size (advance, ascent, descent) in px in the bundled font."""
        return self.fonts.measure(text, size_px)

    def geometry(self, scene: Scene, t_s: float, view: View,
                 transparent: bool = False, overlay: Sequence[OverlayText] = (),
                 place: bool = True) -> FrameGeometry:
        """The frame's geometry (viewer.geometry.frame.build_frame with this font).

        The same arguments as the call before (the same scene object, time, view and
        overlay) give the same geometry object back, made once: a window showing one show
        frame in several screen refreshes. Callers treat the geometry as read-only."""
        key = (t_s, frame_view_key(view), tuple(overlay), transparent, place)
        last = self._last_frame
        if last is not None and last[0] is scene and last[1] == key:
            return last[2]
        geom = build_frame(scene, t_s, view, self.measure, transparent, self.starfield,
                           self.static, overlay, place)
        self._last_frame = (scene, key, geom)
        return geom

    def geometries(self, scene: Scene, t_s: float, views: Sequence[View],
                   transparent: bool = False, place: bool = True) -> list[FrameGeometry]:
        """``geometry`` for each of ``views`` (the faces of a dome master), made together
        (viewer.geometry.frame.build_frames): the same frames, fewer numpy calls."""
        return build_frames(scene, t_s, views, self.measure, transparent, self.starfield,
                            self.static, (), place)

    # --- drawing ------------------------------------------------------------------------

    def draw(self, geom: FrameGeometry, framebuffer: Any, top_row_first: bool = False,
             origin_px: tuple[int, int] = (0, 0),
             clip_px: tuple[int, int, int, int] | None = None) -> None:
        """Draw ``geom`` into ``framebuffer`` (cleared to the frame's background first).

        The framebuffer's size must be the view's size; the window passes its screen
        framebuffer here (image up is screen up), the exporters an offscreen one with
        ``top_row_first`` so that its memory reads out as an image, top row first,
        with no flip on the CPU. ``clip_px`` (x, y, width, height; GL's rows, from the
        bottom) limits the clear and every draw to that rectangle: the window leaves
        the panels around its picture untouched.
        """
        self._begin(geom, framebuffer, top_row_first, origin_px)
        self.ctx.scissor = clip_px
        if clip_px is not None:
            geom = replace(geom, stars=_stars_within(geom.stars, clip_px, geom.view.size_px,
                                                     top_row_first))
        try:
            self._draw_under(geom, framebuffer, top_row_first, origin_px, clip_px)
            self._draw_over(geom)
        finally:
            self.ctx.scissor = None

    def _begin(self, geom: FrameGeometry, framebuffer: Any, top_row_first: bool,
               origin_px: tuple[int, int]) -> None:
        """Bind ``framebuffer``, set the viewport and every program's frame uniforms."""
        ctx = self.ctx
        w, h = geom.view.size_px
        framebuffer.use()
        # origin_px places the frame in a larger framebuffer (the dome's face atlas);
        # the clear is limited to that rectangle.
        ctx.viewport = (origin_px[0], origin_px[1], w, h)
        size = (float(w), float(h))
        y_sign = -1.0 if top_row_first else 1.0
        for prog in (self.p_stroke, self.p_fill, self.p_marker, self.p_points, self.p_text,
                     self.p_backdrop):
            prog["u_size_px"].value = size
            prog["u_y_sign"].value = y_sign
        ctx.disable(self._mgl.DEPTH_TEST | self._mgl.CULL_FACE)

    def _blend(self) -> None:
        """Premultiplied-alpha blending, as every layer after the background draws."""
        mgl = self._mgl
        self.ctx.enable(mgl.BLEND | mgl.PROGRAM_POINT_SIZE)
        self.ctx.blend_func = mgl.ONE, mgl.ONE_MINUS_SRC_ALPHA
        self.ctx.blend_equation = mgl.FUNC_ADD

    def _draw_under(self, geom: FrameGeometry, framebuffer: Any, top_row_first: bool,
                    origin_px: tuple[int, int],
                    clip_px: tuple[int, int, int, int] | None = None) -> None:
        """The background (or the populations' backdrop), stars, grid, sector fills,
        glows and lines: every layer under the bodies' markers and the labels."""
        bg = geom.background
        if geom.populations:
            self._backdrop(geom, framebuffer, top_row_first, origin_px)
        else:
            framebuffer.clear(bg[0] * bg[3], bg[1] * bg[3], bg[2] * bg[3], bg[3],
                              viewport=clip_px or self.ctx.viewport)
        self._blend()
        self._points(self.s_stars, geom.stars)
        self._triangles(self.s_grid, geom.grid, STROKE_FLOATS)
        self._triangles(self.s_fill, geom.fills, FILL_FLOATS)
        self._instances(self.s_glow, geom.glows)
        self._triangles(self.s_lines, geom.strokes, STROKE_FLOATS)

    def _draw_over(self, geom: FrameGeometry) -> None:
        """The markers and the labels, over ``_draw_under``'s layers."""
        self._instances(self.s_markers, geom.markers)
        self._labels(geom.labels)

    def draw_labels(self, labels: Sequence[PlacedLabel], framebuffer: Any,
                    size_px: tuple[int, int], top_row_first: bool = True,
                    strokes: NDArray[np.float64] | None = None,
                    origin_px: tuple[int, int] = (0, 0)) -> None:
        """Draw stroke vertices, then placed labels (pixels of ``size_px``, y down), over
        what ``framebuffer`` holds: the dome master's and the panorama's text and the
        dome grid, drawn after the reprojection (``origin_px``: where that picture starts
        in the framebuffer)."""
        ctx = self.ctx
        framebuffer.use()
        ctx.viewport = (*origin_px, *size_px)
        for prog in (self.p_text, self.p_stroke):
            prog["u_size_px"].value = (float(size_px[0]), float(size_px[1]))
            prog["u_y_sign"].value = -1.0 if top_row_first else 1.0
        ctx.enable(self._mgl.BLEND)
        ctx.blend_func = self._mgl.ONE, self._mgl.ONE_MINUS_SRC_ALPHA
        ctx.blend_equation = self._mgl.FUNC_ADD
        if strokes is not None:
            self._triangles(self.s_lines, strokes, STROKE_FLOATS)
        self._labels(labels)

    def _backdrop(self, geom: FrameGeometry, framebuffer: Any, top_row_first: bool,
                  origin_px: tuple[int, int]) -> None:
        """The background colour with every population's dots, made on the CPU from the
        transform-feedback positions and written into the frame in one go: straight into
        an offscreen texture, or by one unblended full-frame draw (the window)."""
        w, h = geom.view.size_px
        bg = geom.background
        bg8 = np.rint(np.array([bg[0] * bg[3], bg[1] * bg[3], bg[2] * bg[3], bg[3]])
                      * 255.0).astype(np.uint8)
        image, scratch = self._backdrop_buffers(w, h)
        image.view(np.uint32).fill(int(bg8.view(np.uint32)[0]))
        uniform: Any = bg8
        for pop in geom.populations:
            px = self.population_pixels(pop, geom)
            if px is not None:
                composite_population(image, px, pop.color,
                                     pop.point_size_px * geom.view.style_scale,
                                     uniform_under=uniform, scratch=scratch)
                uniform = None
        attachment = framebuffer.color_attachments[0] if framebuffer.color_attachments \
            else None
        if top_row_first and isinstance(attachment, self._mgl.Texture) and \
                attachment.components == 4 and attachment.dtype == "f1":
            attachment.write(image, viewport=(origin_px[0], origin_px[1], w, h))
            return
        tex = self._backdrop_tex.get((w, h))
        if tex is None:
            tex = self.ctx.texture((w, h), 4)
            tex.filter = (self._mgl.NEAREST, self._mgl.NEAREST)
            self._backdrop_tex[(w, h)] = tex
        tex.write(image)
        tex.use(0)
        self.p_backdrop["u_image"].value = 0
        self.p_backdrop["u_origin_px"].value = origin_px
        self.ctx.disable(self._mgl.BLEND)
        self._backdrop_vao.render(self._mgl.TRIANGLES, vertices=3)

    def _triangles(self, stream: _Stream, data: np.ndarray, floats: int) -> None:
        if len(data) == 0:
            return
        stream.write(data)
        stream.vao.render(self._mgl.TRIANGLES, vertices=len(data))

    def _points(self, stream: _Stream, data: np.ndarray) -> None:
        if len(data) == 0:
            return
        stream.write(data)
        stream.vao.render(self._mgl.POINTS, vertices=len(data))

    def _instances(self, stream: _Stream, data: np.ndarray) -> None:
        if len(data) == 0:
            return
        rows = np.empty((len(data), 10), dtype=np.float32)
        rows[:] = data[:, :MARKER_FLOATS]
        stream.write(rows)
        stream.vao.render(self._mgl.TRIANGLE_STRIP, vertices=4, instances=len(data))

    def _backdrop_buffers(self, w: int, h: int) -> tuple[Any, Any]:
        """The backdrop image and the splat's scratch for this size, kept between frames
        (both are wholly rewritten before use, so no frame sees another's values)."""
        bufs = self._backdrop_np.get((w, h))
        if bufs is None:
            bufs = (np.empty((h, w, 4), dtype=np.uint8), SplatScratch())
            self._backdrop_np = {(w, h): bufs}
        return bufs

    def population_pixels(self, pop: Population, geom: FrameGeometry) -> Any:
        """(N, 2) float32 rows (x px, y px) of a population at the frame's time; a body
        behind the eye at ``BEHIND_EYE_PX`` (viewer.geometry.population).

        Runs the transform-feedback stage; a framebuffer of this context must be bound.
        The rows are the renderer's own buffer, valid until the next call.
        """
        gpu = self._populations.get(id(pop))
        if gpu is None or gpu.population is not pop:
            if gpu is not None:
                self._release_population(gpu)
            gpu = self._upload_population(pop)
            self._populations[id(pop)] = gpu
        c = gpu.constants
        if c.count == 0:
            return None
        gpu.mean32[:c.count] = mean_anomaly_at(c, geom.t_s, out=gpu.mean64)
        gpu.anomaly.write(gpu.mean32)
        v = geom.view
        p = self.p_pop
        p["u_size_px"].value = (float(v.size_px[0]), float(v.size_px[1]))
        p["u_origin_m"].value = tuple(float(x) for x in v.origin_m)
        p["u_right"].value = tuple(float(x) for x in v.basis[0])
        p["u_up"].value = tuple(float(x) for x in v.basis[1])
        p["u_back"].value = tuple(float(x) for x in v.basis[2])
        p["u_perspective"].value = 1 if v.perspective else 0
        p["u_px_per_m"].value = float(v.px_per_m)
        p["u_focal_px"].value = float(v.focal_px)
        p["u_distance_m"].value = float(v.distance_m)
        p["u_near_m"].value = float(v.near_m)
        gpu.vao.transform(gpu.pixels, self._mgl.POINTS,
                          vertices=len(gpu.mean32) // BODIES_PER_VERTEX)
        gpu.pixels.read_into(gpu.px)
        return gpu.px[:c.count]

    def _upload_population(self, pop: Population) -> _PopulationGPU:
        c = population_constants(pop)
        # BODIES_PER_VERTEX bodies per vertex (the last vertex padded with still bodies at
        # the centre): per vertex, each of the seven constants of its bodies side by side.
        padded = max(1, -(-c.count // BODIES_PER_VERTEX)) * BODIES_PER_VERTEX
        static = np.zeros((padded, 7), dtype=np.float32)
        static[:c.count, 0:3] = c.aP_m
        static[:c.count, 3:6] = c.bQ_m
        static[:c.count, 6] = c.e
        grouped = static.reshape(-1, BODIES_PER_VERTEX, 7).transpose(0, 2, 1)
        sbuf = self.ctx.buffer(np.ascontiguousarray(grouped).tobytes())
        abuf = self.ctx.buffer(reserve=4 * padded, dynamic=True)
        pbuf = self.ctx.buffer(reserve=8 * padded, dynamic=True)
        names = ("in_aPx", "in_aPy", "in_aPz", "in_bQx", "in_bQy", "in_bQz", "in_e")
        vao = self.ctx.vertex_array(self.p_pop, [(sbuf, " ".join(["4f"] * 7), *names),
                                                 (abuf, "4f", "in_M")])
        return _PopulationGPU(pop, c, sbuf, abuf, pbuf, vao, np.empty(c.count),
                              np.zeros(padded, dtype=np.float32),
                              np.empty((padded, 2), dtype=np.float32))

    def _release_population(self, gpu: _PopulationGPU) -> None:
        gpu.vao.release()
        gpu.static.release()
        gpu.anomaly.release()
        gpu.pixels.release()

    def _labels(self, labels: Sequence[PlacedLabel]) -> None:
        if not labels:
            return
        by_size: dict[int, list[Any]] = {}
        for lab in labels:
            by_size.setdefault(max(6, int(round(lab.size_px))), []).append(lab)
        self.p_text["u_halo"].value = HALO_RGBA
        for size in sorted(by_size):
            labs = by_size[size]
            atlas = self.fonts.atlas(size, "".join(lab.text for lab in labs))
            tex = self._texture(size, atlas)
            quads = np.concatenate([atlas.quads(lab) for lab in labs])
            if len(quads) == 0:
                continue
            stream = self._text_streams.get(size)
            if stream is None:
                stream = _Stream(self.ctx, self.p_text, "2f 2f 4f",
                                 ("in_pos_px", "in_uv", "in_color"))
                self._text_streams[size] = stream
            tex.use(0)
            self.p_text["u_atlas"].value = 0
            stream.write(quads[:, :TEXT_FLOATS])
            for layer in (0, 1):  # every halo, then every glyph's ink over them
                self.p_text["u_layer"].value = layer
                stream.vao.render(self._mgl.TRIANGLES, vertices=len(quads))

    def _texture(self, size: int, atlas: GlyphAtlas) -> Any:
        have = self._textures.get(size)
        if have is not None and have[0] is atlas:
            return have[1]
        if have is not None:
            have[1].release()
        h, w = atlas.image.shape[:2]
        tex = self.ctx.texture((w, h), 2, np.ascontiguousarray(atlas.image).tobytes())
        tex.filter = (self._mgl.NEAREST, self._mgl.NEAREST)
        tex.repeat_x = tex.repeat_y = False
        self._textures[size] = (atlas, tex)
        return tex

    # --- offscreen frames ---------------------------------------------------------------

    def target(self, size_px: tuple[int, int]) -> Any:
        """An offscreen RGBA8 framebuffer of ``size_px`` (kept for reuse)."""
        fbo = self._targets.get(size_px)
        if fbo is None:
            # A texture (not a renderbuffer), so a backdrop can be written straight in.
            tex = self.ctx.texture(size_px, 4)
            fbo = self.ctx.framebuffer(color_attachments=[tex])
            self._targets[size_px] = fbo
        return fbo

    def read(self, framebuffer: Any, size_px: tuple[int, int], transparent: bool = False,
             out: UInt8s | None = None) -> UInt8s:
        """A framebuffer drawn with ``top_row_first`` as RGBA uint8 (H, W, 4).

        Opaque frames come back as drawn; transparent ones are converted from
        premultiplied to straight alpha, as PNG expects. ``out`` (a C-contiguous
        (H, W, 4) uint8 array) receives the pixels with no new allocation.
        """
        w, h = size_px
        img = self._spare_array(h, w) if out is None else out
        if img.shape != (h, w, 4) or img.dtype != np.uint8 or not img.flags.c_contiguous:
            raise ValueError(f"out must be a C-contiguous ({h}, {w}, 4) uint8 array")
        framebuffer.read_into(img, viewport=(0, 0, w, h), components=4, alignment=1)
        if not transparent:
            return img
        a = img[..., 3:4].astype(np.uint32)
        rgb = img[..., :3].astype(np.uint32)
        straight = np.where(a > 0, (rgb * 255 + a // 2) // np.maximum(a, 1), 0)
        img[..., :3] = np.minimum(straight, 255).astype(np.uint8)
        return img

    def _spare_array(self, h: int, w: int) -> UInt8s:
        """An (h, w, 4) uint8 array for ``read`` to fill: for frames of READ_KEEP_BYTES
        and more, one of the arrays it returned before that nothing holds any longer
        (a sequence's writer has encoded it and let it go), else a new one, kept.

        A new array of that size comes from fresh pages, which the kernel clears on the
        first write: at 8192 x 8192 that was a fifth of the whole export's CPU time
        (docs/performance.md). An array still held anywhere (by a caller, a view of it,
        an encoder's queue) has more references than the list's own, so it is never
        handed out twice; the count with no holder is measured, not assumed.
        """
        shape = (h, w, 4)
        if h * w * 4 < READ_KEEP_BYTES:
            return np.empty(shape, dtype=np.uint8)
        unheld = _unheld_refcount()
        for kept in self._read_arrays:
            if kept.shape == shape and sys.getrefcount(kept) <= unheld:
                return kept
        fresh = np.empty(shape, dtype=np.uint8)
        self._read_arrays.append(fresh)
        if len(self._read_arrays) > READ_ARRAYS_KEPT:
            del self._read_arrays[0]
        return fresh

    def render(self, scene: Scene, t_s: float, size_px: tuple[int, int] | None = None,
               camera: Camera | None = None, transparent: bool = False,
               out: UInt8s | None = None, overlay: Sequence[OverlayText] = ()) -> UInt8s:
        """The frame of ``scene`` at scene time ``t_s`` (s) as RGBA uint8 (H, W, 4).

        ``size_px`` (W, H) and ``camera`` override the scene's; ``transparent`` gives an
        alpha background (straight alpha) instead of the scene's background colour;
        ``out`` is an array to fill instead of a new one (see ``read``); ``overlay`` is
        text fixed on the picture (captions, the clock).
        """
        view = view_for(scene, t_s, size_px, camera)
        geom = self.geometry(scene, t_s, view, transparent, overlay)
        fbo = self.target(view.size_px)
        self._draw_offscreen(geom, fbo)
        return self.read(fbo, view.size_px, transparent, out)

    def _draw_offscreen(self, geom: FrameGeometry, fbo: Any) -> None:
        """``draw(geom, fbo, top_row_first=True)``, with the layers under the markers
        copied from the last frame's when they are the same (``_UnderCache``)."""
        under = self._under
        same = under.matches(geom)
        self._begin(geom, fbo, True, (0, 0))
        if same and under.fbo is not None:
            self.ctx.copy_framebuffer(fbo, under.fbo)
            self._blend()
        else:
            self._draw_under(geom, fbo, True, (0, 0))
            if same:  # the second frame in a row with these layers: keep their picture
                under.fbo = self._under_target(geom.view.size_px)
                self.ctx.copy_framebuffer(under.fbo, fbo)
            else:
                under.remember(geom)
        self._draw_over(geom)

    def _under_target(self, size_px: tuple[int, int]) -> Any:
        fbo = self._under_fbo.get(size_px)
        if fbo is None:
            self._release_targets(self._under_fbo)
            fbo = self.ctx.framebuffer(color_attachments=[self.ctx.texture(size_px, 4)])
            self._under_fbo[size_px] = fbo
        return fbo

    @staticmethod
    def _release_targets(targets: dict[tuple[int, int], Any]) -> None:
        for fbo in targets.values():
            for att in fbo.color_attachments:
                att.release()
            fbo.release()
        targets.clear()

    def release(self) -> None:
        """Free every GL object this renderer made (not the context)."""
        for s in (self.s_grid, self.s_lines, self.s_fill, self.s_stars, self.s_glow,
                  self.s_markers, *self._text_streams.values()):
            s.release()
        for _atlas, tex in self._textures.values():
            tex.release()
        for gpu in self._populations.values():
            self._release_population(gpu)
        for tex in self._backdrop_tex.values():
            tex.release()
        self._backdrop_tex.clear()
        self._backdrop_vao.release()
        self._release_targets(self._targets)
        self._release_targets(self._under_fbo)
        self._under.forget()
        self._corner_buf.release()
        for prog in (self.p_stroke, self.p_fill, self.p_marker, self.p_points, self.p_pop,
                     self.p_text, self.p_backdrop):
            prog.release()
        self._targets.clear()
        self._populations.clear()
        self._textures.clear()
        self._read_arrays.clear()


def _unheld_refcount() -> int:
    """What ``sys.getrefcount`` says of an array that only a list holds, read as
    ``Renderer._spare_array`` reads it (in a loop over the list): the interpreter's own
    references are counted the same way in both."""
    probe = [np.empty(0, dtype=np.uint8)]
    for kept in probe:
        return sys.getrefcount(kept)
    return 0


@contextmanager
def headless_renderer() -> Iterator[Renderer]:
    """A Renderer in a fresh headless context, both released on leaving the block."""
    from .context import headless_context, release_context

    ctx = headless_context()
    try:
        renderer = Renderer(ctx)
        try:
            yield renderer
        finally:
            renderer.release()
    finally:
        release_context(ctx)


def render_still(scene: Scene, t_s: float, size_px: tuple[int, int] | None = None,
                 camera: Camera | None = None, transparent: bool = False) -> UInt8s:
    """One frame in a fresh headless context (see Renderer.render); frees it afterwards."""
    with headless_renderer() as renderer:
        return renderer.render(scene, t_s, size_px, camera, transparent)
