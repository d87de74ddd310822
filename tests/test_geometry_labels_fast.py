"""Label placement's plain-float search gives the places the array search gives.

``place_labels`` looks for a label's first clear place with plain float arithmetic
when the picture is a rectangle, and falls back to the arrays when no place is clear.
Its docstring promises the same places as the arrays alone; these checks hold it to
that on random crowds of labels and markers (the reference: the same function with the
float search switched off, so every label takes the arrays).
"""

from __future__ import annotations

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from viewer.geometry import labels as lab
from viewer.geometry.labels import LabelRequest, place_labels


def _measure(text: str, size_px: float) -> tuple[float, float, float]:
    return 0.55 * size_px * len(text), 0.8 * size_px, 0.25 * size_px


coord = st.floats(-200.0, 2200.0, allow_nan=False, allow_subnormal=False)
request = st.builds(
    LabelRequest,
    text=st.text("abcdefgh Q", min_size=0, max_size=14),
    anchor_px=st.tuples(coord, coord),
    clearance_px=st.floats(0.0, 30.0, allow_subnormal=False),
    size_px=st.sampled_from([10.0, 13.0, 16.5, 22.0, 40.0]),
    rgba=st.just((1.0, 1.0, 1.0, 1.0)),
    priority=st.integers(-1, 5),
    required=st.booleans(),
    at_px=st.one_of(st.none(), st.tuples(coord, coord)),
)
box = st.tuples(coord, coord, st.floats(1.0, 300.0), st.floats(1.0, 300.0)).map(
    lambda b: (b[0], b[1], b[0] + b[2], b[1] + b[3]))


def _arrays_only(call):
    with pytest.MonkeyPatch.context() as m:
        m.setattr(lab, "_first_clear", lambda *a: None)
        return call()


@settings(max_examples=150, deadline=None)
@given(st.lists(request, max_size=30), st.lists(box, max_size=30),
       st.one_of(st.none(), box))
def test_the_float_search_places_every_label_where_the_arrays_do(requests, obstacles,
                                                                  keep_in):
    def call():
        return place_labels(requests, _measure, (1920, 1080), obstacles, keep_in=keep_in)

    assert call() == _arrays_only(call)


def test_a_crowd_uses_both_searches_and_agrees(monkeypatch):
    """A dense cluster: the first labels find clear places by the float search, later
    ones find none and take the arrays (and their least-crowded place)."""
    calls = []
    real = lab._first_clear

    def counting(*a):
        found = real(*a)
        calls.append(found is not None)
        return found

    reqs = [LabelRequest(f"body {k}", (960.0 + 3 * k, 540.0 + 2 * k), 4.0, 16.0,
                         (1, 1, 1, 1), 1 + k) for k in range(40)]
    monkeypatch.setattr(lab, "_first_clear", counting)
    fast = place_labels(reqs, _measure, (1920, 1080))
    monkeypatch.undo()
    assert True in calls and False in calls
    assert fast == _arrays_only(lambda: place_labels(reqs, _measure, (1920, 1080)))
    assert len(fast) == 40  # every body's name is required
