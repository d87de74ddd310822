"""Label placement: beside the anchor, no two labels overlap, optional ones give way."""

from __future__ import annotations

from viewer.geometry.labels import LabelRequest, place_labels


def _measure(text: str, size: float) -> tuple[float, float, float]:
    return 0.6 * size * len(text), 0.75 * size, 0.25 * size


def _box(lab, size=16.0):
    w, a, d = _measure(lab.text, lab.size_px)
    return lab.x_px, lab.y_px - a, lab.x_px + w, lab.y_px + d


def _overlap(a, b) -> bool:
    return min(a[2], b[2]) > max(a[0], b[0]) and min(a[3], b[3]) > max(a[1], b[1])


def _req(text, x, y, priority, required=True):
    return LabelRequest(text, (x, y), 6.0, 16.0, (1, 1, 1, 1), priority, required)


def test_crowded_labels_are_placed_without_overlapping():
    reqs = [_req(f"Body {k}", 400 + 3 * k, 300 + 2 * k, k) for k in range(6)]
    placed = place_labels(reqs, _measure, (1000, 800))
    assert len(placed) == 6
    boxes = [_box(p) for p in placed]
    for i in range(len(boxes)):
        for j in range(i + 1, len(boxes)):
            assert not _overlap(boxes[i], boxes[j])


def test_a_label_keeps_clear_of_its_own_marker_and_prefers_the_right_side():
    placed = place_labels([_req("Tarn", 500, 400, 0)], _measure, (1000, 800))[0]
    assert placed.x_px >= 500 + 6.0
    assert abs(placed.y_px - 0.75 * 16 / 2 + 0.25 * 16 / 2 - 400) < 8


def test_an_optional_label_with_no_room_is_dropped_and_a_required_one_is_kept():
    obstacles = [(0.0, 0.0, 1000.0, 800.0)]  # every place is taken
    placed = place_labels([_req("must", 500, 400, 0), _req("maybe", 520, 420, 1, False)],
                          _measure, (1000, 800), obstacles)
    assert [p.text for p in placed] == ["must"]


def test_labels_near_the_edge_stay_inside_the_image():
    placed = place_labels([_req("Far right", 995, 400, 0)], _measure, (1000, 800))[0]
    x0, y0, x1, y1 = _box(placed)
    assert x0 >= 0 and x1 <= 1000 and y0 >= 0 and y1 <= 800


def test_placement_is_deterministic_and_follows_priority_not_input_order():
    reqs = [_req("B", 500, 400, 2), _req("A", 501, 401, 1)]
    a = place_labels(reqs, _measure, (1000, 800))
    b = place_labels(list(reversed(reqs)), _measure, (1000, 800))
    assert a == b and a[0].text == "A"
