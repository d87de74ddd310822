"""A trajectory with a `flight` (scene-format.md): only the flown arc is drawn, and the
marker shows only during the flight; measured in pixels against the conic's geometry."""

from __future__ import annotations

import math

import numpy as np
import pytest

from viewer.errors import UserInputError
from viewer.orbit import AU_M, state_from_elements
from viewer.render.samples import elements, plain_scene
from viewer.scene import Body, BodyShow, Camera, load_scene_text

W, H = 1200, 900
PX_PER_AU = 300.0
TOP = Camera(look="top", width_m=W / PX_PER_AU * AU_M)


def _px(r):
    return int(round(W / 2 + r[0] / AU_M * PX_PER_AU - 0.5)), \
        int(round(H / 2 - r[1] / AU_M * PX_PER_AU - 0.5))


def _lit_near(alpha, r, radius=3):
    x, y = _px(r)
    return alpha[y - radius:y + radius + 1, x - radius:x + radius + 1].max()


@pytest.mark.gl
def test_only_the_flown_half_is_drawn_and_the_marker_only_in_flight():
    from viewer.render import headless_renderer

    el = elements(1.25, 0.2)  # periapsis on +x, moving toward +y
    half = float(el.period) / 2.0
    body = Body("T", el, show=BodyShow(orbit=True, marker=False, label=False),
                flight_s=(0.0, half))
    scene = plain_scene((body,), TOP, (W, H))

    def point(nu_deg):
        return state_from_elements(el.with_(nu=math.radians(nu_deg)))[0]

    with headless_renderer() as renderer:
        alpha = renderer.render(scene, 0.0, (W, H), TOP, transparent=True)[..., 3]
        for nu in (20.0, 90.0, 160.0):  # on the flown arc (+y side)
            assert _lit_near(alpha, point(nu)) > 200, nu
        for nu in (200.0, 270.0, 340.0):  # the half that is not flown
            assert _lit_near(alpha, point(nu)) == 0, nu
        marker = Body("T", el, show=BodyShow(orbit=False, marker=True, label=False),
                      flight_s=(0.25 * half, 0.75 * half))
        shot = plain_scene((marker,), TOP, (W, H))
        for t, seen in ((0.1 * half, False), (0.5 * half, True), (0.9 * half, False)):
            a = renderer.render(shot, t, (W, H), TOP, transparent=True)[..., 3]
            assert (a.max() > 0) == seen, t


def test_a_flight_loads_and_bad_flights_are_clear():
    base = '[center]\npreset = "sun"\n[[body]]\nname = "T"\na = "1.2 au"\ne = 0.2\n'
    scene = load_scene_text(base + 'flight = { start = "10 d", end = "2030-01-01" }\n'
                            '[scene]\nepoch = "2029-01-01T00:00:00 TDB"\n')
    assert scene.body("T").flight_s == pytest.approx((10 * 86400.0, 365 * 86400.0))
    for flight, where in (('{ start = "10 d", end = "5 d" }', "body[0].flight.end"),
                          ('{ start = "10 d" }', "body[0].flight")):
        with pytest.raises(UserInputError) as err:
            load_scene_text(base + f"flight = {flight}\n")
        assert any(where in p for p in err.value.problems)
    assert np.isfinite(float(scene.body("T").elements.period))


def test_a_flight_keeps_its_dates_when_the_scene_epoch_moves():
    body = Body("T", elements(1.25, 0.2), flight_s=(100.0, 900.0), epoch_offset_s=50.0)
    moved = body.with_epoch_moved(40.0)
    assert moved.flight_s == (60.0, 860.0) and moved.epoch_offset_s == 10.0
