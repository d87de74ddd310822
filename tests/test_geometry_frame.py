"""A frame's geometry: show keys toggle their marks, the cache never changes a frame,
labels do not collide, and only the bodies move with time (no GL)."""

from __future__ import annotations

from dataclasses import replace

import numpy as np
import pytest

from viewer.geometry.camera import view_for
from viewer.geometry.frame import (
    ARROWHEAD,
    CROSSHAIR,
    DIAMOND,
    DISC,
    RING,
    StaticCache,
    build_frame,
)
from viewer.orbit import AU_M, DAY_S, state_from_elements
from viewer.render.samples import demo_like_scene, elements, plain_scene
from viewer.scene import Body, BodyShow, Camera


def _measure(text: str, size: float) -> tuple[float, float, float]:
    return 0.58 * size * len(text), 0.76 * size, 0.24 * size


def _frame(scene, t=0.0, cache=None):
    return build_frame(scene, t, view_for(scene, t), _measure, cache=cache)


def _same(a, b) -> bool:
    return (all(np.array_equal(getattr(a, f), getattr(b, f))
                for f in ("stars", "grid", "fills", "glows", "strokes", "markers"))
            and a.labels == b.labels)


def test_a_frame_is_the_same_with_or_without_the_cache():
    scene = demo_like_scene()
    cache = StaticCache()
    _frame(scene, 0.0, cache)  # warm it with another time
    for t in (10 * DAY_S, 77 * DAY_S):
        assert _same(_frame(scene, t, cache), _frame(scene, t))


def test_only_the_bodies_move_with_time():
    scene = demo_like_scene()
    a, b = _frame(scene, 0.0), _frame(scene, 50 * DAY_S)
    assert np.array_equal(a.fills, b.fills) and np.array_equal(a.grid, b.grid)
    discs_a = a.markers[a.markers[:, 3] == DISC]
    discs_b = b.markers[b.markers[:, 3] == DISC]
    assert not np.array_equal(discs_a[:, :2], discs_b[:, :2])


def _shapes(frame):
    return list(frame.markers[:, 3].astype(int))


@pytest.mark.parametrize("key, shape, count", [("foci", RING, 1), ("foci", CROSSHAIR, 1),
                                               ("apsides", DIAMOND, 2),
                                               ("velocity", ARROWHEAD, 1)])
def test_show_keys_switch_their_marks_on_and_off(key, shape, count):
    el = elements(1.0, 0.4, 10, 20, 30, 40)
    off = plain_scene((Body("B", el, show=BodyShow()),))
    on = plain_scene((Body("B", el, show=replace(BodyShow(), **{key: True})),))
    assert _shapes(_frame(off)).count(shape) == 0
    assert _shapes(_frame(on)).count(shape) == count


def test_axes_and_nodes_are_dashed_lines():
    el = elements(1.0, 0.4, 10, 20, 30, 40)
    plain = _frame(plain_scene((Body("B", el),)))
    marked = _frame(plain_scene((Body("B", el, show=BodyShow(axes=True, nodes=True)),)))
    assert not np.any(plain.strokes[:, 7] > 0)
    dashes = {tuple(r) for r in marked.strokes[marked.strokes[:, 7] > 0][:, 7:9]}
    assert len(dashes) == 2  # one pattern for the axes, one for the line of nodes


def test_an_orbit_in_the_reference_plane_has_no_line_of_nodes():
    el = elements(1.0, 0.4, 0, 20, 30, 40)
    f = _frame(plain_scene((Body("B", el, show=BodyShow(nodes=True)),)))
    assert not np.any(f.strokes[:, 7] > 0)


def test_the_body_marker_is_at_the_body_position_at_that_time():
    el = elements(1.0, 0.4, 0, 0, 30, 40)
    scene = plain_scene((Body("B", el, show=BodyShow(orbit=False)),),
                        Camera(look="top", width_m=4 * AU_M), (1600, 1200))
    t = 33 * DAY_S
    disc = _frame(scene, t).markers
    r, _ = state_from_elements(el.after(t))
    assert np.allclose(disc[0, :2], [800 + r[0] / AU_M * 400, 600 - r[1] / AU_M * 400])


def test_labels_of_a_busy_frame_do_not_overlap():
    frame = _frame(demo_like_scene(), 20 * DAY_S)
    boxes = []
    for lab in frame.labels:
        w, a, d = _measure(lab.text, lab.size_px)
        boxes.append((lab.x_px, lab.y_px - a, lab.x_px + w, lab.y_px + d))
    assert len(boxes) >= 6
    for i in range(len(boxes)):
        for j in range(i + 1, len(boxes)):
            p, q = boxes[i], boxes[j]
            assert not (min(p[2], q[2]) > max(p[0], q[0]) and min(p[3], q[3]) > max(p[1], q[1]))


def test_a_hidden_central_body_and_labels_off_leave_no_central_marks():
    scene = demo_like_scene()
    scene = replace(scene, center=replace(scene.center, show_body=False, show_label=False),
                    render=replace(scene.render, labels=False))
    f = _frame(scene)
    assert len(f.glows) == 0 and f.labels == []


def test_vector_parts_hold_each_sector_once_and_every_line():
    scene = demo_like_scene()
    f = _frame(scene, 5 * DAY_S)
    assert f.vector is not None
    sweeps = sum(b.sweep.count for b in scene.bodies if b.sweep is not None and b.show.sweep)
    assert len(f.vector.sectors) == sweeps
    assert len(f.vector.lines.points) >= len(scene.bodies) + sweeps
