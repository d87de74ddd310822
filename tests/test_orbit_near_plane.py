"""Orbits a hair out of the reference plane keep that hair through elements and back.

Found by the hypothesis round trip: acos(h_z / |h|) returns exactly 180 deg for an orbit
whose inclination is 180 deg - 1.6e-9 rad, dropping a 1 cm offset from the plane; the
inclination is now atan2 of h's in-plane and normal parts (common practice, no source).
"""

from __future__ import annotations

import numpy as np
import pytest
from reference_values import MU_EARTH

from viewer.orbit import elements_from_state, state_from_elements


@pytest.mark.parametrize("vy_sign", [1.0, -1.0])
@pytest.mark.parametrize("z_m", [1.0537461e-02, 1e-6, -3e-4])
def test_a_millimetre_out_of_the_plane_survives_the_round_trip(vy_sign: float,
                                                              z_m: float) -> None:
    r = np.array([0.0, 6.6e6, z_m])
    v = np.array([vy_sign * 5495.18, 0.0, 0.0])
    el = elements_from_state(r, v, MU_EARTH)
    r2, v2 = state_from_elements(el)
    assert abs(r2[2] - z_m) < 1e-9 * 6.6e6 * 1e-3  # the offset itself, to a micrometre
    np.testing.assert_allclose(r2, r, rtol=0, atol=1e-12 * 6.6e6)
    np.testing.assert_allclose(v2, v, rtol=0, atol=1e-12 * 5495.18)
    assert 0.0 < el.i < np.pi
