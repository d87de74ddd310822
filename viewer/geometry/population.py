"""Large populations (belts, debris) prepared for fast propagation: per-body constants.

A population of N elliptic orbits is reduced once to constants, so that the position at
any time is r = (cos E - e) a P + sin E b Q with E from Kepler's equation
M = E - e sin E and M = M0 + n (t - t0) (Vallado, *Fundamentals of Astrodynamics and
Applications*, 4th ed., sec. 2.2 and 2.6). Per frame the CPU only advances and reduces the
mean anomalies in float64 (two array operations); the renderer solves Kepler's equation
and projects in its vertex shader. ``positions_at`` is the float64 reference on the CPU.

Open orbits (e >= 1) in a population are left out: a belt table is for bound bodies.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np
from numpy.typing import NDArray

from ..orbit import eccentric_anomaly
from ..scene.model import Population

Floats = NDArray[np.float64]

#: Image coordinates (px) given to a body behind the eye (shaders/population.vert): off
#: any image, so the splat leaves it out.
BEHIND_EYE_PX = -1.0e30


@dataclass(frozen=True)
class PopulationConstants:
    """Per-body constants of the elliptic members of a population (SI units)."""

    M0: Floats          # mean anomaly at the population's epoch, rad
    n_rad_s: Floats     # mean motion, rad/s
    e: Floats
    aP_m: Floats        # a * P, (N, 3)
    bQ_m: Floats        # b * Q, (N, 3)
    epoch_offset_s: float

    @property
    def count(self) -> int:
        return len(self.e)


def population_constants(pop: Population) -> PopulationConstants:
    """Reduce a population's elements to the constants above (elliptic members only)."""
    el = pop.elements
    e_all = np.atleast_1d(np.asarray(el.e, dtype=np.float64))
    keep = e_all < 1.0
    sub = el.with_(**{f: np.atleast_1d(np.asarray(getattr(el, f), dtype=np.float64))[keep]
                      for f in ("a", "e", "i", "raan", "argp", "nu")})
    P, Q, _ = sub.perifocal_basis()
    a = np.asarray(sub.a, dtype=np.float64)
    b = np.asarray(sub.b, dtype=np.float64)
    return PopulationConstants(
        M0=np.atleast_1d(np.asarray(sub.mean_anomaly, dtype=np.float64)),
        n_rad_s=np.atleast_1d(np.asarray(sub.mean_motion, dtype=np.float64)),
        e=np.asarray(sub.e, dtype=np.float64),
        aP_m=np.asarray(P).reshape(-1, 3) * a[:, None],
        bQ_m=np.asarray(Q).reshape(-1, 3) * b[:, None],
        epoch_offset_s=float(pop.epoch_offset_s),
    )


def mean_anomaly_at(c: PopulationConstants, t_s: float, out: Floats | None = None) -> Floats:
    """Mean anomalies at scene time t_s, reduced to [0, 2 pi) in float64.

    ``out`` (float64, one per body) receives them with no new array."""
    M = np.multiply(c.n_rad_s, t_s - c.epoch_offset_s, out=out)
    M += c.M0
    return np.mod(M, 2.0 * np.pi, out=M)


def positions_at(c: PopulationConstants, t_s: float) -> Floats:
    """Positions (m, (N, 3)) at scene time t_s, in float64: the reference for the shader."""
    E = np.asarray(eccentric_anomaly(mean_anomaly_at(c, t_s), c.e))
    return (np.cos(E) - c.e)[:, None] * c.aP_m + np.sin(E)[:, None] * c.bQ_m


@dataclass
class SplatScratch:
    """Arrays reused by ``splat_density`` from frame to frame (grown, never shrunk); each
    is wholly rewritten before it is read, so no frame sees another's values."""

    density: NDArray[np.float32] = field(default_factory=lambda: np.zeros(0, np.float32))
    index: NDArray[np.intp] = field(default_factory=lambda: np.zeros(0, np.intp))
    weight: NDArray[np.float32] = field(default_factory=lambda: np.zeros(0, np.float32))

    def sized(self, pixels: int, corners: int) -> SplatScratch:
        if self.density.size < pixels:
            self.density = np.zeros(pixels, dtype=np.float32)
        if self.index.size < corners:
            self.index = np.empty(corners, dtype=np.intp)
            self.weight = np.empty(corners, dtype=np.float32)
        return self


def splat_density(px: NDArray[np.float32], size_px: tuple[int, int],
                  scratch: SplatScratch | None = None
                  ) -> tuple[int, NDArray[np.float32]]:
    """Density of the seen points over the image, as (first pixel index, values).

    Each point's unit weight is shared bilinearly among the four pixels around it, so a
    dot moving by a fraction of a pixel moves its light smoothly (no crawling from pixel
    to pixel). Pixel k of the flat image (row-major, top row first) holds
    ``values[k - first]``; the values span only the rows the points reach.
    ``px`` rows are (x, y) in image pixels (y down), as the renderer's
    transform-feedback stage writes them (a body behind the eye at ``BEHIND_EYE_PX``).
    ``scratch`` is reused instead of new arrays, and the values are a view into it.
    """
    lo, dens, _ = _splat(px, size_px, scratch or SplatScratch())
    return lo, dens


def _splat(px: NDArray[np.float32], size_px: tuple[int, int], scratch: SplatScratch
           ) -> tuple[int, NDArray[np.float32], NDArray[np.intp]]:
    """``splat_density``, and the index (from the first pixel) of every corner each
    point's weight went to: the pixels touched, some more than once."""
    w, h = size_px
    x = px[:, 0] - np.float32(0.5)
    y = px[:, 1] - np.float32(0.5)
    ok = (x >= 0) & (x < w - 1) & (y >= 0) & (y < h - 1)
    x = x[ok]
    y = y[ok]
    m = x.size
    if m == 0:
        return 0, np.zeros(0, dtype=np.float32), np.zeros(0, dtype=np.intp)
    s = scratch.sized(w * h + w + 2, 4 * m)
    ix = x.astype(np.intp)  # floor, as x >= 0
    iy = y.astype(np.intp)
    fx = x - ix.astype(np.float32)
    fy = y - iy.astype(np.float32)
    idx = s.index[:4 * m]
    base = idx[:m]
    np.multiply(iy, w, out=base)
    base += ix
    lo = int(base.min())
    base -= lo
    span = int(base.max()) + w + 2
    for k, step in enumerate((1, w, w + 1), start=1):
        np.add(base, step, out=idx[k * m:(k + 1) * m])
    gx = np.float32(1.0) - fx
    gy = np.float32(1.0) - fy
    wts = s.weight[:4 * m]
    for k, (u, v) in enumerate(((gx, gy), (fx, gy), (gx, fy), (fx, fy))):
        np.multiply(u, v, out=wts[k * m:(k + 1) * m])
    dens = s.density[:span]
    dens[:] = 0.0
    np.add.at(dens, idx, wts)  # in index order: the same sums every time
    return lo, dens, idx


def composite_population(image: NDArray[np.uint8], px: NDArray[np.float32],
                         rgb: tuple[float, float, float], point_size_px: float,
                         opacity: float = 0.9,
                         uniform_under: NDArray[np.uint8] | None = None,
                         scratch: SplatScratch | None = None) -> None:
    """Lay a population's dots over ``image`` (H, W, 4 uint8, premultiplied, top row first).

    A dot of diameter d px carries pi d^2 / 4 px^2 of ink (at least 1), spread by the
    splat; dots of 1.8 px and more are softened by a [1 2 1] / 4 filter each way.
    Coverage saturates as 1 - exp(-ink) where bodies crowd, and is kept in 8 bits (the
    output's own precision). Only touched pixels are computed, so the cost follows the
    number of bodies, not the image size. ``uniform_under`` (4 uint8), when the image
    is still that one colour everywhere, lets every pixel come from a 256-entry table;
    ``scratch`` is passed on to the splat.
    """
    h, w = image.shape[:2]
    lo, dens, corners = _splat(px, (w, h), scratch or SplatScratch())
    pix: NDArray[np.intp] = corners
    if dens.size == 0:
        return
    if point_size_px >= 1.8:
        lo, dens = _soften(lo, dens, w, h)
        pix = np.flatnonzero(dens > 0)
    # Unsoftened, the pixels are the splat's corners, a pixel shared by several points
    # listed once for each: it gets the same value each time, as every value is read
    # before any is written.
    ink = np.float32(max(1.0, math.pi * point_size_px * point_size_px / 4.0))
    a = dens[pix]
    a *= -ink
    np.exp(a, out=a)
    np.subtract(np.float32(1.0), a, out=a)
    a *= np.float32(255.0 * opacity)
    a8 = np.rint(a, out=a).astype(np.uint8)
    src = np.array([rgb[0], rgb[1], rgb[2], 1.0]) * 255.0
    k = np.arange(256)[:, None] / 255.0
    if uniform_under is not None:
        table = np.rint(src * k + uniform_under.astype(np.float64) * (1.0 - k))
        table32 = np.ascontiguousarray(table.astype(np.uint8)).view(np.uint32).reshape(-1)
        image.view(np.uint32).reshape(-1)[lo:][pix] = table32[a8]
        return
    flat = image.reshape(-1, 4)[lo:]
    af = (a8.astype(np.float32) / np.float32(255.0))[:, None]
    out = src.astype(np.float32) * af + flat[pix].astype(np.float32) * (1.0 - af)
    flat[pix] = np.minimum(np.rint(out), 255).astype(np.uint8)


def _soften(lo: int, dens: NDArray[np.float32], w: int, h: int
            ) -> tuple[int, NDArray[np.float32]]:
    """The [1 2 1] / 4 filter along rows and columns of a density window (one row of
    spread kept above and below), clipped to the image."""
    r0 = lo // w
    r1 = (lo + dens.size - 1) // w + 1
    grid = np.zeros((r1 - r0) * w, dtype=np.float32)
    grid[lo - r0 * w:lo - r0 * w + dens.size] = dens
    g = np.pad(grid.reshape(r1 - r0, w), ((2, 2), (1, 1)))
    g = 0.25 * g[:, :-2] + 0.5 * g[:, 1:-1] + 0.25 * g[:, 2:]
    g = 0.25 * g[:-2] + 0.5 * g[1:-1] + 0.25 * g[2:]       # rows r0 - 1 .. r1
    top = r0 - 1
    if top < 0:
        g = g[-top:]
        top = 0
    g = g[:h - top]
    return top * w, g.ravel()
