"""Several views made together (the cube faces of a dome master or a panorama) give,
bit for bit, the frames each view gives on its own (no GL)."""

from __future__ import annotations

from dataclasses import replace
from importlib import resources

import numpy as np
import pytest

from viewer.export.immersive import Immersive, face_views, view_for
from viewer.geometry.conic import ConicShape, CurveBatch, tessellate, tessellate_views
from viewer.geometry.frame import StaticCache, build_frame, build_frames
from viewer.geometry.strokes import (
    PolylineBatch,
    StrokeStyle,
    stroke_vertices,
    stroke_vertices_views,
)
from viewer.orbit import AU_M
from viewer.scene import load_scene

PARTS = ("stars", "grid", "fills", "glows", "strokes", "markers")


def _measure(text: str, size: float) -> tuple[float, float, float]:
    return 0.58 * size * len(text), 0.76 * size, 0.24 * size


def _faces(scene, kind: str, size: tuple[int, int], t_s: float = 0.0):
    spec = Immersive(kind, size).framed(scene.camera)
    cam = scene.camera
    base = view_for(scene, t_s, spec.size_px, replace(cam, distance_m=cam.immersive_distance_m))
    return list(face_views(base, spec, scene.dome).values())


def _scene(name: str):
    return load_scene(str(resources.files("viewer") / "scenes" / name))


@pytest.mark.parametrize("name", ["demo.toml", "laws.toml", "periapsis-show.toml",
                                  "earth-mission.toml"])
@pytest.mark.parametrize("kind,size", [("dome", (1024, 1024)), ("panorama", (1024, 512))])
def test_faces_made_together_equal_each_face_made_alone(name, kind, size):
    scene = _scene(name)
    views = _faces(scene, kind, size)
    assert len(views) >= 5
    for t in (0.0, 3.7e6):
        together = build_frames(scene, t, views, _measure, place=False)
        for view, geom in zip(views, together, strict=True):
            alone = build_frame(scene, t, view, _measure, place=False)
            for part in PARTS:
                assert np.array_equal(getattr(geom, part), getattr(alone, part)), part
                assert getattr(geom, part).tobytes() == getattr(alone, part).tobytes(), part
            assert geom.label_requests == alone.label_requests


def test_the_cache_keeps_faces_made_together():
    scene = _scene("demo.toml")
    views = _faces(scene, "dome", (512, 512))
    cache = StaticCache()
    first = build_frames(scene, 0.0, views, _measure, cache=cache, place=False)
    again = build_frames(scene, 1e5, views, _measure, cache=cache, place=False)
    fresh = build_frames(scene, 1e5, views, _measure, place=False)
    assert len(first) == len(again) == len(views)
    for b, c in zip(again, fresh, strict=True):
        for part in PARTS:
            assert np.array_equal(getattr(b, part), getattr(c, part)), part


def test_tessellating_and_stroking_views_together_is_bit_identical():
    scene = _scene("laws.toml")
    views = _faces(scene, "panorama", (800, 400))
    rng = np.random.default_rng(7)
    batches, lines = [], []
    eye = views[0].eye_m  # lines all around the eye, so every face sees some
    for _v in views:
        curves = CurveBatch.empty()
        polys = PolylineBatch.empty()
        for _ in range(int(rng.integers(1, 4))):
            a = float(rng.uniform(0.3, 3.0)) * AU_M
            e = float(rng.uniform(0.0, 0.95))
            P, Q = np.array([1.0, 0, 0]), np.array([0, np.cos(0.3), np.sin(0.3)])
            curves.add(ConicShape(0, -a * e, a, a * np.sqrt(1 - e * e), P, Q), 0.0, 2 * np.pi)
            polys.add(eye + rng.normal(size=(int(rng.integers(2, 40)), 3)) * AU_M,
                      StrokeStyle((1, 1, 1, 1), float(rng.uniform(0.5, 6.0)), (4.0, 3.0)))
        batches.append(curves)
        lines.append(polys)
    occluders = [(eye + [0.0, 0.0, 0.5 * AU_M], 0.3 * AU_M) if k % 2 else None
                 for k in range(len(views))]
    for t_all, b, v in zip(tessellate_views(batches, views), batches, views, strict=True):
        t_one = tessellate(b, v)
        assert t_all.points_m.tobytes() == t_one.points_m.tobytes()
        assert np.array_equal(t_all.starts, t_one.starts)
    together = stroke_vertices_views(lines, views, height_scale=0.8, occluders=occluders)
    assert sum(len(rows) > 0 for rows in together) >= 4  # most faces see some lines
    for rows, ln, v, o in zip(together, lines, views, occluders, strict=True):
        assert rows.tobytes() == stroke_vertices(ln, v, height_scale=0.8, occluder=o).tobytes()
