"""Text on dome masters and panoramas, placed in the output's own pixels (pure numpy).

The cube faces are drawn without their labels. Each label request of a face keeps the
face whose pixels hold its anchor (every direction belongs to one face, so a label is
taken once); its anchor goes back to a direction and through the same fisheye or
equirectangular mapping as the picture (``projection.py``), and all labels are then
placed together in output pixels, clear of each other and of the markers, and drawn
upright and unmirrored after the reprojection. So nothing is cut or doubled at a face
seam, and a label behind the viewer of a panorama reads as any other.

Captions and the clock follow placement rules of their own (docs/export.md, "Text on the
dome"): on a dome master, the front of the dome (the bottom of the frame), upright for a
viewer facing front, in a band from about 20 to 50 deg above the front edge; on a
panorama, above or below the centre (the target). Sizes are angles on the sky
(``DomeSettings``).
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass, replace

import numpy as np
from numpy.typing import NDArray

from ..errors import UserInputError
from ..geometry.camera import View
from ..geometry.frame import LABEL_PX
from ..geometry.labels import Box, LabelRequest, Measure
from ..scene.model import DomeSettings
from ..scene.timeline import OverlayText
from .projection import dome_pixel, panorama_pixel

Floats = NDArray[np.float64]

#: Caption size a [dome] caption_size applies to (the flat caption's default, px).
CAPTION_REFERENCE_PX = 30.0
#: Dome: elevation above the front edge of the caption band's rows (deg) by position.
DOME_BAND_DEG = {"bottom": 24.0, "center": 35.0, "top": 46.0}
#: Dome: azimuth of a caption's centre from the front, left and right (deg).
DOME_SIDE_DEG = 45.0
#: Dome: the clock sits low beside the front, clear of the subject: (elevation above the
#: front edge, azimuth from the front to the left) in deg.
DOME_CLOCK_DEG = (18.0, 42.0)
#: Panorama: latitude of the caption rows (deg), and longitude of the sides (deg).
PANO_ROW_DEG = {"bottom": -30.0, "center": 0.0, "top": 30.0}
PANO_SIDE_DEG = 40.0


#: Where OutputMap.outside samples a box along each side (a 5 x 5 grid).
_SAMPLE_AT = np.linspace(0.0, 1.0, 5)


@dataclass(frozen=True)
class OutputMap:
    """Where camera-basis directions land on one output (a dome master or a panorama)."""

    kind: str
    size_px: tuple[int, int]
    fov_deg: float = 180.0
    tilt_deg: float = 0.0

    @property
    def px_per_rad(self) -> float:
        """Output pixels per radian on the sky (exact along the radius of a dome)."""
        w, h = self.size_px
        return h / math.radians(self.fov_deg) if self.kind == "dome" else w / (2 * math.pi)

    def pixel(self, directions: Floats) -> tuple[Floats, NDArray[np.bool_]]:
        """(x, y) image pixels (pixel i covers [i, i + 1]) and whether each is on the
        output (inside the dome's circle)."""
        d = np.asarray(directions, dtype=np.float64).reshape(-1, 3)
        if self.kind == "dome":
            px = dome_pixel(d, self.size_px[0], self.fov_deg, self.tilt_deg) + 0.5
            s = self.size_px[0]
            on = np.hypot(px[:, 0] - s / 2, px[:, 1] - s / 2) <= s / 2
        else:
            px = panorama_pixel(d, *self.size_px) + 0.5
            on = np.ones(len(d), dtype=bool)
        return px, on

    def outside(self, boxes: Floats) -> Floats:
        """Area of each box (C, 4: x0, y0, x1, y1) off the output, from a 5 x 5 sample."""
        b = np.asarray(boxes, dtype=np.float64).reshape(-1, 4)
        w, h = self.size_px
        u = _SAMPLE_AT
        xs = b[:, None, None, 0] + (b[:, None, None, 2] - b[:, None, None, 0]) * u[None, :, None]
        ys = b[:, None, None, 1] + (b[:, None, None, 3] - b[:, None, None, 1]) * u[None, None, :]
        if self.kind == "dome":
            off = np.hypot(xs - w / 2, ys - h / 2) > w / 2
        else:
            off = (xs < 0) | (xs > w) | (ys < 0) | (ys > h)
        area = (b[:, 2] - b[:, 0]) * (b[:, 3] - b[:, 1])
        return area * off.reshape(len(b), -1).mean(axis=1)

    def sky_point(self, position: str, clock: bool = False) -> Floats:
        """The output pixel (x, y) a caption at ``position`` (or the clock) is centred on."""
        row = position.split("-")[0]
        side = position.split("-")[1] if "-" in position else ""
        w, h = self.size_px
        if self.kind == "dome":
            elev, az = (DOME_BAND_DEG[row], {"left": -1.0, "right": 1.0, "": 0.0}[side]
                        * DOME_SIDE_DEG)
            if clock:
                elev, az = DOME_CLOCK_DEG[0], -DOME_CLOCK_DEG[1]
            theta = math.radians(self.fov_deg / 2.0 - elev)
            phi = -math.pi / 2 + math.radians(az)
            rho = theta / math.radians(self.fov_deg / 2.0)
            return np.array([(1.0 + rho * math.cos(phi)) * w / 2,
                             (1.0 - rho * math.sin(phi)) * h / 2])
        lon = {"left": -1.0, "right": 1.0, "": 0.0}[side] * PANO_SIDE_DEG
        lat = PANO_ROW_DEG[row]
        return np.array([(lon / 180.0 + 1.0) * w / 2, (1.0 - lat / 90.0) * h / 2])


def face_directions(face: View, base: View, px: Floats) -> Floats:
    """Camera-basis directions (r, u, f of ``base``) of pixels of a 90 deg cube face."""
    size = face.size_px[0]
    p = np.asarray(px, dtype=np.float64).reshape(-1, 2)
    a = 2.0 * p[:, 0] / size - 1.0
    b = 1.0 - 2.0 * p[:, 1] / size
    world = -face.basis[2][None, :] + a[:, None] * face.basis[0] + b[:, None] * face.basis[1]
    cam = np.vstack([base.basis[0], base.basis[1], -base.basis[2]])
    return world @ cam.T


def output_requests(faces: Sequence[tuple[View, Sequence[LabelRequest], Sequence[Box]]],
                    base: View, out: OutputMap, scale: float
                    ) -> tuple[list[LabelRequest], list[Box]]:
    """Each face's label requests and marker boxes moved to output pixels, each taken from
    the one face that holds its anchor; text sizes multiplied by ``scale``."""
    requests: list[LabelRequest] = []
    boxes: list[Box] = []
    for view, reqs, obstacles in faces:
        size = view.size_px[0]

        def own(p: Floats, size: int = size) -> NDArray[np.bool_]:
            return (p[:, 0] >= 0) & (p[:, 0] < size) & (p[:, 1] >= 0) & (p[:, 1] < size)

        if reqs:
            anchors = np.array([r.anchor_px for r in reqs], dtype=np.float64)
            mine = own(anchors)
            px, on = out.pixel(face_directions(view, base, anchors))
            for req, keep, q, a in zip(reqs, mine & on, px, anchors, strict=True):
                if not keep:
                    continue
                at = None
                if req.at_px is not None:
                    at = (float(q[0] + scale * (req.at_px[0] - a[0])),
                          float(q[1] + scale * (req.at_px[1] - a[1])))
                requests.append(replace(req, anchor_px=(float(q[0]), float(q[1])),
                                        clearance_px=req.clearance_px * scale,
                                        size_px=req.size_px * scale, at_px=at))
        if obstacles:
            ob = np.array(obstacles, dtype=np.float64)
            centres = 0.5 * (ob[:, :2] + ob[:, 2:])
            half = 0.5 * (ob[:, 2:] - ob[:, :2])
            mine = own(centres)
            px, on = out.pixel(face_directions(view, base, centres))
            for keep, q, hw in zip(mine & on, px, half, strict=True):
                if keep:
                    boxes.append((float(q[0] - hw[0]), float(q[1] - hw[1]),
                                  float(q[0] + hw[0]), float(q[1] + hw[1])))
    return requests, boxes


def label_scale(style: DomeSettings, out: OutputMap, face_label_px: float) -> float:
    """Factor from a face's body-label size (px) to the [dome] label_size on the output."""
    want = style.label_size_rad * style.label_scale * out.px_per_rad
    return want / face_label_px


def caption_requests(overlay: Sequence[OverlayText], style: DomeSettings, out: OutputMap,
                     measure: Measure, source: str) -> list[LabelRequest]:
    """Captions and the clock placed by the rules of the output; a caption that does not
    fit on the output is refused (UserInputError naming the caption)."""
    reqs = []
    problems = []
    for text in overlay:
        px = (style.caption_size_rad * style.label_scale * out.px_per_rad
              * text.size_px / CAPTION_REFERENCE_PX)
        tw, asc, desc = measure(text.text, px)
        cx, cy = out.sky_point(text.position, text.kind == "clock")
        x, y = cx - 0.5 * tw, cy + 0.5 * (asc - desc)
        box = np.array([[x, y - asc, x + tw, y + desc]])
        if out.outside(box)[0] > 0.0:
            what = "timeline.clock" if text.kind == "clock" else "timeline.caption"
            problems.append(
                f'{what} "{text.text}": at position "{text.position}" and '
                f"{math.degrees(px / out.px_per_rad):.3g} deg high it does not fit on the "
                f"{out.kind}; shorten it, split it into two captions, or lower "
                "[dome] caption_size or the caption's size")
            continue
        reqs.append(LabelRequest(text.text, (float(cx), float(cy)), 0.0, px, text.rgba, -1,
                                 at_px=(float(x), float(y))))
    if problems:
        raise UserInputError(source, problems)
    return reqs


def body_label_px(view: View) -> float:
    """A body label's size (px) on a face drawn with ``view``'s style height."""
    return LABEL_PX * view.style_scale

