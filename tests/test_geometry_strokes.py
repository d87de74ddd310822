"""Stroke quads: mitred joins that never overlap, exact across-line distances, one-sided
strokes on the inside of a shape, near-plane clipping and the central body's limb."""

from __future__ import annotations

import math

import numpy as np

from viewer.geometry.camera import view_for
from viewer.geometry.strokes import (
    STROKE_FLOATS,
    PolylineBatch,
    StrokeStyle,
    hidden_by_sphere,
    stroke_coverage,
    stroke_vertices,
)
from viewer.orbit import AU_M
from viewer.render.samples import elements, plain_scene
from viewer.scene import Body, Camera

W, H = 1000, 1000
PX = AU_M / 250.0  # 4 au across 1000 px: 250 px per au


def _top_view(width_m=4 * AU_M):
    return view_for(plain_scene((Body("B", elements(1, 0)),), Camera(look="top",
                                                                       width_m=width_m),
                                (W, H)), 0.0)


def _world(px_points):
    """World points (m) that a 1000 px top view of 4 au shows at these pixels."""
    p = np.asarray(px_points, dtype=float)
    return np.stack([(p[:, 0] - W / 2) * PX, (H / 2 - p[:, 1]) * PX, np.zeros(len(p))], axis=1)


def _quads(verts):
    return verts.reshape(-1, 6, STROKE_FLOATS)


def _signed_distance(point, a, b):
    """Distance (px) of ``point`` from line a->b, positive on its left in a y-down image."""
    t = (b - a) / np.linalg.norm(b - a)
    n = np.array([t[1], -t[0]])
    return float(np.dot(point - a, n))


def test_across_distance_of_every_vertex_is_its_distance_from_the_segment_line():
    batch = PolylineBatch.empty()
    pts_px = np.array([[100, 100], [400, 130], [600, 400], [620, 800]], dtype=float)
    batch.add(_world(pts_px), StrokeStyle((1, 1, 1, 1), 4.0))
    q = _quads(stroke_vertices(batch, _top_view()))
    assert len(q) == 3
    for k, quad in enumerate(q):
        a, b = pts_px[k], pts_px[k + 1]
        for v in quad:
            assert math.isclose(_signed_distance(v[:2], a, b), v[2], abs_tol=1e-6)


def test_joined_segments_share_their_mitre_edge_so_a_line_never_overlaps_itself():
    batch = PolylineBatch.empty()
    pts_px = np.array([[100, 500], [500, 500], [800, 300]], dtype=float)
    batch.add(_world(pts_px), StrokeStyle((1, 1, 1, 0.5), 6.0))
    q = _quads(stroke_vertices(batch, _top_view()))
    # Quad corners: triangles (0, 1, 2) and (2, 1, 3) of corners c0..c3; c2, c3 end the
    # first segment and c0, c1 start the second.
    end_first = q[0][[2, 5], :2]
    start_second = q[1][[0, 1], :2]
    assert np.allclose(end_first, start_second, atol=1e-9)
    # The shared edge lies on the bisector of the corner.
    edge = start_second[0] - start_second[1]
    t1 = (pts_px[1] - pts_px[0]) / np.linalg.norm(pts_px[1] - pts_px[0])
    t2 = (pts_px[2] - pts_px[1]) / np.linalg.norm(pts_px[2] - pts_px[1])
    bisector_normal = (t1 + t2) / np.linalg.norm(t1 + t2)
    assert abs(np.dot(edge, bisector_normal)) < 1e-9


def test_open_ends_get_caps_whose_coverage_falls_to_half_at_the_end_point():
    batch = PolylineBatch.empty()
    batch.add(_world([[200, 200], [700, 200]]), StrokeStyle((1, 1, 1, 1), 3.0))
    q = _quads(stroke_vertices(batch, _top_view()))[0]
    along, cap_lo, cap_hi, hw = q[:, 3], q[0, 4], q[0, 5], q[0, 6]
    assert math.isclose(cap_lo, 0.0, abs_tol=1e-9) and math.isclose(cap_hi, 500.0)
    assert along.min() < 0 and along.max() > 500  # the quad holds the cap's ramp
    assert stroke_coverage(np.array([0.0]), np.array([0.0]), hw, cap_lo, cap_hi)[0] == 0.5
    assert stroke_coverage(np.array([0.0]), np.array([250.0]), hw, cap_lo, cap_hi)[0] == 1.0


def test_coverage_across_a_line_integrates_to_its_width():
    across = np.linspace(-5, 5, 100001)
    for width in (1.0, 2.0, 3.3):
        c = stroke_coverage(across, np.zeros_like(across), width / 2)
        assert math.isclose(np.trapezoid(c, across), width, rel_tol=1e-4)


def test_an_offset_stroke_lies_inside_its_shape_with_its_half_coverage_edge_on_the_boundary():
    # A square traced clockwise on screen (y down): the inside is on the right, offset -1.
    sq = np.array([[300, 300], [700, 300], [700, 700], [300, 700], [300, 300]], dtype=float)
    batch = PolylineBatch.empty()
    batch.add(_world(sq), StrokeStyle((1, 1, 1, 1), 4.0, offset=-1.0), closed=True)
    q = _quads(stroke_vertices(batch, _top_view()))
    for k, quad in enumerate(q):
        a, b = sq[k], sq[k + 1]
        d = np.array([_signed_distance(v[:2], a, b) for v in quad])
        centre_offset = d - quad[:, 2]       # where the stroke's centre line is
        assert np.allclose(centre_offset, -2.0)  # half the width to the right (inside)
        assert math.isclose(d.max(), 1.0, abs_tol=1e-9)  # one AA pixel outside, no more
        assert math.isclose(d.min(), -5.0, abs_tol=1e-9)  # width plus one AA pixel inside
        # On the boundary itself (d = 0) the coverage is one half: the edge of the shape.
        at_boundary = stroke_coverage(np.array([0.0 - centre_offset[0]]), np.zeros(1), 2.0)
        assert at_boundary[0] == 0.5


def test_a_segment_through_the_perspective_eye_is_cut_at_the_near_plane():
    cam = Camera(projection="perspective", look="top", distance_m=2 * AU_M,
                 fov_rad=math.radians(60))
    view = view_for(plain_scene((Body("B", elements(1, 0)),), cam, (W, H)), 0.0)
    batch = PolylineBatch.empty()
    # From below the eye, straight up through it and beyond.
    batch.add(np.array([[0.1 * AU_M, 0, 0], [0.1 * AU_M, 0, 4 * AU_M]]),
              StrokeStyle((1, 1, 1, 1), 2.0))
    v = stroke_vertices(batch, view)
    assert len(v) == 6
    assert np.all(np.isfinite(v)) and np.abs(v[:, :2]).max() < 5 * W  # clipped to the image


def test_lines_behind_the_central_body_are_cut_at_its_limb():
    view = view_for(plain_scene((Body("B", elements(1, 0)),), Camera(look="edge",
                                                                      width_m=4 * AU_M),
                                (W, H)), 0.0)
    radius = 0.5 * AU_M  # 125 px in the image
    batch = PolylineBatch.empty()
    # Two straight lines along X, 0.2 au above the plane behind the body (+Y is away
    # from an edge-view eye) and 0.2 au below it in front: image rows 450 and 550.
    for y, z in ((1.0, 0.2), (-1.0, -0.2)):
        batch.add(np.array([[-1.5 * AU_M, y * AU_M, z * AU_M],
                            [1.5 * AU_M, y * AU_M, z * AU_M]]),
                  StrokeStyle((1, 1, 1, 1), 2.0))
    q = _quads(stroke_vertices(batch, view, occluder=(np.zeros(3), radius)))
    far = q[np.abs(q[:, :, 1].mean(axis=1) - 450) < 5]
    near = q[np.abs(q[:, :, 1].mean(axis=1) - 550) < 5]
    # Row 450 is 50 px from the centre: the limb is sqrt(125^2 - 50^2) px either side.
    half = math.sqrt(125.0**2 - 50.0**2)
    caps = sorted({round(float(c), 3) for quad in far for c in quad[0, 4:6] if abs(c) < 1e8})
    assert np.allclose(caps, [0.0, 375 - half, 375 + half, 750.0], atol=1e-3)
    inside = (far[:, :, 0] > 500 - half + 1.5) & (far[:, :, 0] < 500 + half - 1.5)
    assert not inside.any()
    # The line in front is whole: caps only at its two ends.
    caps_near = sorted({round(float(c), 3) for quad in near for c in quad[0, 4:6]
                        if abs(c) < 1e8})
    assert caps_near == [0.0, 750.0]


def test_hidden_by_sphere_matches_the_sight_line_geometry():
    view = _top_view()
    centre = np.zeros(3)
    pts = np.array([[0, 0, -1.0], [0, 0, 0.9], [0.5, 0, -3], [1.5, 0, -3]]) * AU_M
    hid = hidden_by_sphere(view, view.to_camera(pts), centre, 1.0 * AU_M)
    assert list(hid) == [True, True, True, False]  # the point at z=0.9 au is inside it
