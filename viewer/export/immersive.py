"""Fulldome masters and panoramas: render cube faces with the one renderer, then reproject.

The eye is the camera's eye (``target + distance * d``, also for orthographic cameras).
Each needed cube face is drawn by ``Renderer.draw`` as a 90 deg square perspective view
from that eye into a texture; ``shaders/reproject.frag`` then maps every output pixel's
direction (the definitions of ``projection.py``) to the face that sees it, averaging an
n x n grid of sub-pixel samples so lines stay crisp at 4K and 8K. Line widths and
markers are sized as angles on the sky (the scene's [dome] table), not in face pixels.

Labels, captions and the clock are not drawn on the faces: they are placed again in the
output's pixels and drawn after the reprojection (``immersive_text.py``), so none is cut
or doubled at a face seam.

Composition (docs/export.md, "Composing for the dome"): the camera's ``dome_distance``
sets the eye, ``dome_elevation`` puts the target that far above the audience's horizon
straight ahead at the front, and ``dome_tilt`` (or ``--tilt``) is the dome's own tilt
toward the front; together they turn the master's zenith by
``dome_elevation + dome_tilt - 90 deg`` toward the front from the target.
"""

from __future__ import annotations

import functools
import math
from collections.abc import Sequence
from dataclasses import dataclass, replace
from typing import Any

import numpy as np
from numpy.typing import NDArray

from ..errors import UserInputError
from ..geometry.camera import View, view_for
from ..geometry.labels import place_labels
from ..render.context import flush
from ..render.renderer import READ_ARRAYS_KEPT, Renderer
from ..render.shaders import load_program
from ..scene.model import Camera, DomeSettings, Scene
from ..scene.timeline import OverlayText
from .dome_grid import dome_grid
from .encode import STILL_WORKERS
from .immersive_text import (
    OutputMap,
    body_label_px,
    caption_requests,
    label_scale,
    output_requests,
)
from .projection import CUBE_FACES, dome_directions, panorama_directions
from .projection import tilt as turned_toward_front

UInt8s = NDArray[np.uint8]
FACE_NAMES = tuple(CUBE_FACES)
#: Largest face the renderer is asked for: the atlas holds three faces across, and
#: llvmpipe's texture limit is 16384 px (the faces of masters above about 10,900 px are
#: then a little coarser than the output).
MAX_FACE_PX = 16384 // 3
#: The program itself (Python, numpy, Mesa), bytes.
BASE_BYTES = 256 * 2**20
#: Share of the machine's free memory a render may plan to use.
MEMORY_SHARE = 0.8


def available_memory_bytes() -> int:
    """Memory the system reports free for new work (MemAvailable), in bytes."""
    try:
        with open("/proc/meminfo") as f:
            for line in f:
                if line.startswith("MemAvailable:"):
                    return int(line.split()[1]) * 1024
    except OSError:
        pass
    import os

    return int(os.sysconf("SC_AVPHYS_PAGES") * os.sysconf("SC_PAGE_SIZE"))


@dataclass(frozen=True)
class Immersive:
    """What to make: ``kind`` "dome" (square, FOV and tilt in degrees) or "panorama" (2:1)."""

    kind: str
    size_px: tuple[int, int]
    fov_deg: float = 180.0
    tilt_deg: float = 0.0
    grid: int = 2
    #: The dome's tilt toward the front (deg), overriding the camera's ``dome_tilt``;
    #: None keeps the camera's. ``tilt_deg`` is the turn of the zenith the renderer uses.
    dome_tilt_deg: float | None = None
    #: Draw the dome grid (dome_grid.py) even if the scene's [dome] grid is off.
    dome_grid: bool = False

    def __post_init__(self) -> None:
        w, h = self.size_px
        if self.kind == "dome":
            if w != h:
                raise UserInputError("--size", f"a dome master is square; got {w}x{h}")
            if not 0.0 < self.fov_deg <= 360.0:
                raise UserInputError("--dome", f"FOV must be in (0, 360] deg, got "
                                     f"{self.fov_deg:g}")
            if not -90.0 <= self.tilt_deg <= 90.0:
                raise UserInputError("--tilt", f"tilt must be within -90..90 deg, got "
                                     f"{self.tilt_deg:g}")
        elif self.kind == "panorama":
            if w != 2 * h:
                raise UserInputError("--size", f"a panorama is 2:1; got {w}x{h}")
        else:
            raise ValueError(self.kind)

    def framed(self, camera: Camera) -> Immersive:
        """This request with the zenith turn of ``camera``'s dome framing added:
        ``tilt_deg`` + dome_elevation + dome tilt - 90 deg (dome masters only)."""
        if self.kind != "dome":
            return self
        tilt = math.degrees(camera.dome_tilt_rad) if self.dome_tilt_deg is None \
            else self.dome_tilt_deg
        turn = self.tilt_deg + math.degrees(camera.dome_elevation_rad) + tilt - 90.0
        return replace(self, tilt_deg=turn, dome_tilt_deg=0.0)

    def output_map(self) -> OutputMap:
        return OutputMap(self.kind, self.size_px, self.fov_deg, self.tilt_deg)

    def face_px(self) -> int:
        """Face size so a face pixel is no larger than an output pixel where they meet."""
        w, h = self.size_px
        per_rad = h / math.radians(self.fov_deg) if self.kind == "dome" else w / (2 * math.pi)
        return min(MAX_FACE_PX, max(16, int(math.ceil(per_rad * math.pi / 2))))

    def memory_bytes(self, bits: int = 8, sequence: bool = False) -> int:
        """What a render holds at once: the faces' atlas, the output framebuffer, the
        frame read back, the table of atlas points at one sample per pixel
        (reproject_lut.frag: two float32 per pixel), and the PNG rows (with the 16-bit
        copy when ``bits`` is 16). A ``sequence`` (frames or a video) holds more: the
        frames its writer still encodes, up to the READ_ARRAYS_KEPT arrays the renderer
        reads into, and STILL_WORKERS PNG encodes at once."""
        w, h = self.size_px
        f = self.face_px()
        out = w * h * 4
        # A 16-bit encode holds the frame widened, its big-endian copy and the rows (up
        # to 2 + 2 + 2 times the 8-bit frame); an 8-bit one its rows and their deflate.
        per_png = out * 6 if bits == 16 else out * 3 // 2
        table = 2 * out if self.grid == 1 else 0
        frames, encodes = (READ_ARRAYS_KEPT, STILL_WORKERS) if sequence else (1, 1)
        return 6 * f * f * 4 + out + frames * out + table + encodes * per_png + BASE_BYTES

    def check_memory(self, bits: int = 8, available: int | None = None,
                     sequence: bool = False) -> None:
        """Refuse (UserInputError on --size) a master this machine cannot hold."""
        have = available_memory_bytes() if available is None else available
        need = self.memory_bytes(bits, sequence)
        if need > MEMORY_SHARE * have:
            side = self.size_px[1]
            while side > 16 and replace(self, size_px=(
                    side if self.kind == "dome" else 2 * side, side)).memory_bytes(
                        bits, sequence) > MEMORY_SHARE * have:
                side = side * 3 // 4
            w = side if self.kind == "dome" else 2 * side
            what = f"{self.kind} sequence" if sequence else self.kind
            raise UserInputError("--size", f"a {self.size_px[0]}x{self.size_px[1]} {what} "
                                 f"needs about {need / 2**30:.1f} GiB of memory and "
                                 f"{have / 2**30:.1f} GiB is free; at most about {w}x{side} "
                                 "fits here now")

    def directions(self, n: int = 128, reach: float = 1.01) -> NDArray[np.float64]:
        """A grid of this output's camera-basis directions (to find the needed faces),
        reaching ``reach`` times the dome's field (1 % past its edge, so sub-pixel
        samples there are covered), and the edge itself sampled finely: a face seen only
        in a sliver of the dome must cross its edge (a face spans 90 deg, far more than
        the grid's step)."""
        if self.kind == "dome":
            fov = min(360.0, self.fov_deg * reach)
            d, inside = dome_directions(n, fov, self.tilt_deg)
            phi = np.linspace(0.0, 2.0 * np.pi, 8 * n, endpoint=False)
            theta = np.radians(fov) / 2.0
            rim = np.stack([np.sin(theta) * np.cos(phi), np.sin(theta) * np.sin(phi),
                            np.full_like(phi, np.cos(theta))], axis=-1)
            return np.vstack([d[inside], turned_toward_front(rim, self.tilt_deg)])
        return panorama_directions(2 * n, n).reshape(-1, 3)


#: Largest preview the window draws (px high).
PREVIEW_MAX_PX = 1024


def preview_size(kind: str, screen_px: tuple[int, int]) -> tuple[int, int]:
    """The window preview's master size: the largest dome (H x H) or panorama (2H x H)
    that fits the screen, at most PREVIEW_MAX_PX high and with an even height."""
    fw, fh = screen_px
    h = min(fh, PREVIEW_MAX_PX, fw if kind == "dome" else fw // 2)
    h = max(16, h - h % 2)
    return (h, h) if kind == "dome" else (2 * h, h)


@functools.lru_cache(maxsize=16)
def needed_faces(spec: Immersive, reach: float = 1.01) -> tuple[str, ...]:
    """The faces that some output direction falls on (others are not drawn)."""
    d = spec.directions(reach=reach)
    fwd = np.array([CUBE_FACES[k][0] for k in FACE_NAMES])
    hit = set(np.unique(np.argmax(d @ fwd.T, axis=1)).tolist())
    return tuple(name for i, name in enumerate(FACE_NAMES) if i in hit)


#: Face pixels per radian, as a fraction of the face size, that angle sizes are set for:
#: a 90 deg face has size/2 at its centre and twice that at its edges.
FACE_PX_PER_RAD = 0.7


def style_height(spec: Immersive, dome: DomeSettings) -> float:
    """The faces' style height (px): a line of width 2 is ``dome.line_width`` wide."""
    face_px = dome.line_width_rad * dome.line_scale * FACE_PX_PER_RAD * spec.face_px()
    return 1080.0 * face_px / 2.0


def face_views(base: View, spec: Immersive, dome: DomeSettings | None = None,
               reach: float = 1.01) -> dict[str, View]:
    """One perspective View per needed face, from the base view's eye."""
    r, u, f = base.basis[0], base.basis[1], -base.basis[2]
    eye = base.eye_m
    size = spec.face_px()
    style = style_height(spec, dome or DomeSettings())
    views = {}
    for name in needed_faces(spec, reach):
        (fx, fy, fz), (ux, uy, uz) = CUBE_FACES[name]
        F = fx * r + fy * u + fz * f
        U = ux * r + uy * u + uz * f
        R = np.cross(F, U)
        views[name] = replace(
            base, size_px=(size, size), projection="perspective",
            origin_m=eye + base.distance_m * F, basis=np.vstack([R, U, -F]),
            fov_rad=math.pi / 2, style_height_px=style)  # type: ignore[arg-type]
    return views


#: The turn of the zenith a draft dome is drawn with: the dome's axis then lies on the
#: edge between the front and up faces, and a dome of up to 180 deg needs four faces.
DRAFT_TILT_DEG = -45.0


def draft_rig(base: View, spec: Immersive) -> tuple[View, Immersive]:
    """The same dome from the same eye, through a cube turned about the image's right
    axis so the dome's axis lies on a face edge (``DRAFT_TILT_DEG``): four faces instead
    of five or six for a dome of up to 180 deg. A draft, for the window while the
    picture moves: the faces sample the sky at other points than the master's, so its
    pixels differ slightly from the master's (never its geometry)."""
    if spec.kind != "dome" or spec.fov_deg > 180.0:
        return base, spec
    turn = math.radians(spec.tilt_deg - DRAFT_TILT_DEG)
    r, u, d = base.basis
    c, s = math.cos(turn), math.sin(turn)
    # A direction (x, y, z) in (r, u, -d) turned by ``tilt`` lands on the same world
    # direction when the basis turns the other way about r (projection.tilt).
    u2, d2 = c * u - s * d, c * d + s * u
    eye = base.eye_m
    rig = replace(base, basis=np.vstack([r, u2, d2]), origin_m=eye - base.distance_m * d2)
    return rig, replace(spec, tilt_deg=DRAFT_TILT_DEG)


#: The reference-plane grid's opacity on dome masters and panoramas, times the flat one's:
#: a faint line vanishes on a projected dome (common practice, no source).
GRID_EMPHASIS = 2.2


def emphasised_grid(grid: NDArray[np.float64]) -> NDArray[np.float64]:
    """Grid stroke vertices with their opacity raised by GRID_EMPHASIS (at most 1)."""
    if len(grid) == 0:
        return grid
    out = grid.copy()
    out[:, -1] = np.minimum(1.0, out[:, -1] * GRID_EMPHASIS)
    return out


#: Outputs whose table of atlas points ImmersiveRenderer keeps (the window's draft and
#: its still preview; an export has one).
TABLES_KEPT = 2
#: The dome's reprojection shades a regular polygon this many sides round the circle
#: (1.3 % more than the circle, against 27 % for the square) with this margin, which
#: covers every pixel with a sample inside it (half a diagonal is 0.71 px).
FAN_SIDES = 32
FAN_MARGIN_PX = 2.0


@dataclass
class FacePlan:
    """What ``ImmersiveRenderer.faces`` makes for ``draw``: the output as framed, the
    view it is seen from, the faces drawn (atlas tile, view) and their geometry."""

    spec: Immersive
    base: View
    drawn: list[tuple[int, View]]
    geoms: list[Any]


class ImmersiveRenderer:
    """Dome masters and panoramas through one Renderer; GL objects kept between frames."""

    def __init__(self, renderer: Renderer, uniform_grid: bool = False) -> None:
        #: The baseline of the benchmark: the sample grid as a uniform loop bound.
        self.uniform_grid = uniform_grid
        self.renderer = renderer
        self.ctx = renderer.ctx
        self._programs: dict[int | str, tuple[Any, Any]] = {}
        self._faces: dict[int, tuple[Any, Any]] = {}
        self._out: dict[tuple[int, int], Any] = {}
        # Per output: None once seen, (texture, framebuffer) when made, False when the GL
        # cannot make one (llvmpipe refuses textures over 1 GiB: 16384 x 16384 x 8 bytes).
        self._tables: dict[tuple[object, ...], tuple[Any, Any] | bool | None] = {}

    def _kept_program(self, key: int | str, fragment: str = "reproject",
                      defines: dict[str, int] | None = None) -> tuple[Any, Any]:
        """A program of reproject.vert with ``fragment`` and its vertex array (kept)."""
        if key not in self._programs:
            prog = load_program(self.ctx, "reproject", fragment, defines=defines)
            self._programs[key] = (prog, self.ctx.vertex_array(prog, []))
        return self._programs[key]

    def _program(self, grid: int) -> tuple[Any, Any]:
        """The reprojection program and its vertex array for n x n samples (kept)."""
        if self.uniform_grid:
            prog, vao = self._kept_program(grid, defines={"UNIFORM_GRID": 1})
            prog["u_grid"].value = int(grid)
            return prog, vao
        return self._kept_program(grid, defines={"GRID": int(grid)})

    @staticmethod
    def _direct_uniforms(prog: Any, spec: Immersive, face_px: int) -> None:
        """The uniforms of reproject.frag that define the output's mapping."""
        prog["u_face_px"].value = float(face_px)
        prog["u_mode"].value = 0 if spec.kind == "dome" else 1
        prog["u_out_size"].value = tuple(float(x) for x in spec.size_px)
        prog["u_half_fov"].value = math.radians(spec.fov_deg) / 2
        tilt = math.radians(spec.tilt_deg)
        prog["u_tilt_cs"].value = (math.cos(tilt), math.sin(tilt))

    def _shaded_area(self, prog: Any, fbo: Any, spec: Immersive, origin: tuple[int, int],
                     outside: tuple[float, float, float, float]) -> int:
        """Set reproject.vert's area for ``spec`` and return its vertex count: for a dome,
        the output cleared to ``outside`` and a fan of FAN_SIDES triangles round the
        dome's circle with FAN_MARGIN_PX to spare (every pixel with a sample inside the
        circle, the rest left as cleared: the shader would give them ``outside`` too,
        and 0 and 1 clear to the same bytes); else the whole output."""
        if spec.kind != "dome":
            prog["u_fan_sides"].value = 0
            return 3
        fbo.clear(*outside, viewport=(*origin, *spec.size_px))
        prog["u_fan_sides"].value = FAN_SIDES
        prog["u_fan_radius"].value = ((1.0 + 2.0 * FAN_MARGIN_PX / spec.size_px[0])
                                      / math.cos(math.pi / FAN_SIDES))
        return 3 * FAN_SIDES

    def _table(self, spec: Immersive, face_px: int) -> Any:
        """The texture of each output pixel's atlas point for ``spec`` at one sample per
        pixel, or None. A sequence of frames of one output maps every pixel the same
        way, so from its second frame the reprojection only fetches (reproject_lut.frag,
        the same pixels, bit for bit). The first frame of an output is drawn directly,
        so a single still costs no more; the table is written at the second. Two
        outputs are kept (the window's draft and its still preview). Where the GL cannot
        hold the table (a texture too large for it), every frame is drawn directly."""
        if spec.grid != 1 or self.uniform_grid:
            return None
        key = (spec.kind, spec.size_px, spec.fov_deg, spec.tilt_deg, face_px)
        if key not in self._tables:
            while len(self._tables) >= TABLES_KEPT:
                self._release_table(next(iter(self._tables)))
            self._tables[key] = None  # seen once
            return None
        kept = self._tables[key]
        if kept is False:
            return None
        if kept is None:
            made = self._table_target(spec.size_px)
            if made is None:
                self._tables[key] = False
                return None
            tex, fbo = made
            prog, vao = self._kept_program("record", defines={"GRID": 1, "RECORD_LUT": 1})
            self._direct_uniforms(prog, spec, face_px)
            prog["u_origin"].value = (0.0, 0.0)
            prog["u_rows_up"].value = False
            prog["u_fan_sides"].value = 0  # the whole table: no pixel is left unwritten
            fbo.use()
            self.ctx.viewport = (0, 0, *spec.size_px)
            vao.render(self.renderer._mgl.TRIANGLES, vertices=3)
            self._tables[key] = kept = (tex, fbo)
        assert isinstance(kept, tuple)
        return kept[0]

    def _table_target(self, size_px: tuple[int, int]) -> tuple[Any, Any] | None:
        """A two-channel float32 texture of ``size_px`` and its framebuffer, or None if
        the GL refuses them."""
        tex = None
        try:
            tex = self.ctx.texture(size_px, 2, dtype="f4")
            return tex, self.ctx.framebuffer(color_attachments=[tex])
        except self.renderer._mgl.Error:
            if tex is not None:
                tex.release()
            _ = self.ctx.error  # clear the GL error the refusal left
            return None

    def _release_table(self, key: tuple[object, ...]) -> None:
        kept = self._tables.pop(key)
        if isinstance(kept, tuple):
            kept[1].release()
            kept[0].release()

    def _atlas(self, size: int) -> tuple[Any, Any]:
        """The faces' texture: six tiles of size x size, 3 across, 2 down (kept)."""
        if size not in self._faces:
            mgl = self.renderer._mgl
            tex = self.ctx.texture((3 * size, 2 * size), 4)
            tex.filter = (mgl.LINEAR, mgl.LINEAR)
            tex.repeat_x = tex.repeat_y = False
            self._faces[size] = (tex, self.ctx.framebuffer(color_attachments=[tex]))
        return self._faces[size]

    def render(self, scene: Scene, t_s: float, spec: Immersive, camera: Camera | None = None,
               transparent: bool = False, out: UInt8s | None = None,
               overlay: Sequence[OverlayText] = ()) -> UInt8s:
        """The dome master or panorama of ``scene`` at scene time ``t_s`` as RGBA uint8,
        with its labels, and ``overlay`` (captions, the clock) placed by the output's rules."""
        fbo = self.draw(scene, t_s, spec, camera, transparent, overlay)
        return self.renderer.read(fbo, spec.size_px, transparent, out)

    def faces(self, scene: Scene, t_s: float, spec: Immersive, camera: Camera | None = None,
              transparent: bool = False, draft: bool = False) -> FacePlan:
        """The part of ``draw`` that needs no GL: the output's framing, the cube faces
        to draw and their geometry. The window makes it ahead, while llvmpipe still
        draws the frame before, and passes it to ``draw`` with the same arguments."""
        cam = scene.camera if camera is None else camera
        spec = spec.framed(cam)
        base = view_for(scene, t_s, spec.size_px,
                        replace(cam, distance_m=cam.immersive_distance_m))
        reach = 1.01
        if draft:
            base, spec = draft_rig(base, spec)
            reach = 0.999  # the shader samples inside the dome's circle only
        views = face_views(base, spec, scene.dome, reach)
        drawn = [(i, views[n]) for i, n in enumerate(FACE_NAMES) if n in views]
        geoms = self.renderer.geometries(scene, t_s, [v for _i, v in drawn], transparent,
                                         place=False)
        return FacePlan(spec, base, drawn, geoms)

    def draw(self, scene: Scene, t_s: float, spec: Immersive, camera: Camera | None = None,
             transparent: bool = False, overlay: Sequence[OverlayText] = (),
             draft: bool = False, screen: tuple[Any, tuple[int, int]] | None = None,
             faces: FacePlan | None = None) -> Any:
        """Draw what ``render`` returns into the renderer's offscreen framebuffer of the
        output's size (top row first) and return that framebuffer (the window's preview
        shows it without reading it back). ``draft``: through ``draft_rig``'s fewer
        faces (the window while the picture moves). ``screen`` (framebuffer, (x, y)
        of the picture's bottom-left corner there): draw into that framebuffer instead,
        rows counted from the bottom, as a window's screen counts them. ``faces``: what
        ``faces`` returned for the same scene, time and arguments, if made already."""
        plan = faces if faces is not None else self.faces(scene, t_s, spec, camera,
                                                          transparent, draft)
        spec, base, drawn, geoms = plan.spec, plan.base, plan.drawn, plan.geoms
        omap = spec.output_map()
        prog, vao = self._program(spec.grid)
        size = spec.face_px()
        atlas, atlas_fbo = self._atlas(size)
        face_text = []
        for (i, view), geom in zip(drawn, geoms, strict=True):
            face_text.append((view, geom.label_requests, geom.label_obstacles))
            # A copy with the grid raised: the plan's geometry stays as made.
            geom = replace(geom, grid=emphasised_grid(geom.grid))
            self.renderer.draw(geom, atlas_fbo, top_row_first=False,
                               origin_px=((i % 3) * size, (i // 3) * size))
        # llvmpipe rasterises the faces on its threads while the labels are placed here.
        flush()
        source = str(scene.source) if scene.source else "scene"
        captions = caption_requests(overlay, scene.dome, omap, self.renderer.measure, source)
        grid_strokes, grid_labels = (dome_grid(omap) if spec.dome_grid or scene.dome.grid
                                     else (None, []))
        placed: list[Any] = []
        if face_text:
            k = label_scale(scene.dome, omap, body_label_px(face_text[0][0]))
            requests, boxes = output_requests(face_text, base, omap, k)
            placed = place_labels(captions + grid_labels + requests, self.renderer.measure,
                                  spec.size_px, boxes, omap.outside)
        atlas.use(location=0)
        outside = (0.0, 0.0, 0.0, 0.0 if transparent else 1.0)
        fbo, origin = screen if screen is not None else (self.renderer.target(spec.size_px),
                                                           (0, 0))
        self.ctx.disable(self.renderer._mgl.BLEND)
        table = self._table(spec, size)
        if table is not None:
            prog, vao = self._kept_program("table", "reproject_lut")
            table.use(location=1)
            prog["u_lut"].value = 1
        else:
            self._direct_uniforms(prog, spec, size)
        prog["u_atlas"].value = 0
        prog["u_outside"].value = outside
        prog["u_out_size"].value = tuple(float(x) for x in spec.size_px)
        prog["u_origin"].value = (float(origin[0]), float(origin[1]))
        prog["u_rows_up"].value = screen is not None
        fbo.use()
        self.ctx.viewport = (*origin, *spec.size_px)
        vao.render(self.renderer._mgl.TRIANGLES, vertices=self._shaded_area(prog, fbo, spec,
                                                                           origin, outside))
        self.ctx.enable(self.renderer._mgl.BLEND)
        if face_text:
            self.renderer.draw_labels(placed, fbo, spec.size_px, screen is None,
                                      grid_strokes, origin)
        flush()
        return fbo

    def release(self) -> None:
        for tex, fbo in self._faces.values():
            fbo.release()
            tex.release()
        self._faces.clear()
        for prog, vao in self._programs.values():
            vao.release()
            prog.release()
        self._programs.clear()
        for key in list(self._tables):
            self._release_table(key)
