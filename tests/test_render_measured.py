"""The picture is measured, not compared with a golden image.

Known geometry is drawn with an orthographic top view of known width (400 px per au),
then the pixels are measured: an ellipse fitted to an orbit line, the centroids of the
foci and of a body, the coverage of solid sectors, the stability of a far body seen at a
tiny field. References: the conic's own geometry (centre -a e P, semi-axes a and b,
Vallado 4th ed. sec. 2.4), an independent numerical two-body integration
(scipy.integrate.solve_ivp) for a body's position, and the second law (area swept in
dt is pi a b dt / T) for the sectors.
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from scipy import ndimage
from scipy.integrate import solve_ivp

from viewer.orbit import AU_M, DAY_S, Elements, state_from_elements
from viewer.render.samples import GM_SUN, belt_population, elements, plain_scene
from viewer.scene import Body, BodyShow, Camera, Sweep

pytestmark = pytest.mark.gl

W, H = 1600, 1200
PX_PER_AU = 400.0
TOP = Camera(look="top", width_m=W / PX_PER_AU * AU_M)
ONLY_ORBIT = BodyShow(orbit=True, marker=False, label=False)
NOTHING = BodyShow(orbit=False, marker=False, label=False)


@pytest.fixture(scope="module")
def renderer():
    from viewer.render import headless_renderer

    with headless_renderer() as r:
        yield r


def _alpha(renderer, scene, t_s=0.0, camera=None):
    img = renderer.render(scene, t_s, (W, H), camera, transparent=True)
    return img[..., 3].astype(np.float64) / 255.0


def _to_px(world_m, px_per_au=PX_PER_AU):
    """Continuous image coordinates of a world point in the top view (pixel centres at +0.5)."""
    x, y = world_m[0] / AU_M * px_per_au, world_m[1] / AU_M * px_per_au
    return np.array([W / 2 + x, H / 2 - y])


def _centroid(weights):
    ys, xs = np.nonzero(weights > 0)
    w = weights[ys, xs]
    return np.array([np.sum((xs + 0.5) * w), np.sum((ys + 0.5) * w)]) / np.sum(w)


def _fit_ellipse(weights):
    """Weighted algebraic conic fit: (centre px, semi-axes px (major, minor), major angle)."""
    ys, xs = np.nonzero(weights > 0.02)
    w = np.sqrt(weights[ys, xs])
    x = xs + 0.5
    y = ys + 0.5
    mx, my, s = x.mean(), y.mean(), max(x.std(), y.std())
    u, v = (x - mx) / s, (y - my) / s
    D = np.stack([u * u, u * v, v * v, u, v, np.ones_like(u)], axis=1) * w[:, None]
    A, B, C, Dx, Ey, F = np.linalg.svd(D, full_matrices=False)[2][-1]
    centre = np.linalg.solve([[2 * A, B], [B, 2 * C]], [-Dx, -Ey])
    M = np.array([[A, B / 2], [B / 2, C]])
    k = A * centre[0] ** 2 + B * centre[0] * centre[1] + C * centre[1] ** 2 + Dx * centre[0] \
        + Ey * centre[1] + F
    evals, evecs = np.linalg.eigh(M / -k)
    axes = 1.0 / np.sqrt(evals)  # larger axis for the smaller eigenvalue
    order = np.argsort(axes)[::-1]
    major_dir = evecs[:, order[0]]
    return (centre * s + [mx, my], axes[order] * s,
            math.atan2(major_dir[1], major_dir[0]))


def test_an_orbit_line_fits_the_ellipse_of_its_elements_to_a_pixel(renderer):
    el = elements(1.0, 0.5, 0.0, 0.0, 30.0)
    scene = plain_scene((Body("B", el, show=ONLY_ORBIT, line_width_px=2.0),), TOP, (W, H))
    centre, axes, angle = _fit_ellipse(_alpha(renderer, scene))
    P = np.asarray(el.perifocal_basis()[0])
    expected_centre = _to_px(-float(el.a) * float(el.e) * P)
    assert np.allclose(centre, expected_centre, atol=1.0)
    assert np.allclose(axes, [float(el.a) / AU_M * PX_PER_AU, float(el.b) / AU_M * PX_PER_AU],
                       atol=1.0)
    # The major axis points along P (image y is down, so the angle is -30 degrees).
    expected_angle = math.atan2(-P[1], P[0])
    turn = (angle - expected_angle + math.pi / 2) % math.pi - math.pi / 2
    assert abs(turn) < 1.0 / 400.0  # one pixel at the end of the semi-major axis


def test_foci_markers_sit_on_the_occupied_and_empty_foci(renderer):
    el = elements(1.1, 0.55, 0.0, 0.0, 200.0)
    body = Body("B", el, show=BodyShow(orbit=False, marker=False, label=False, foci=True))
    alpha = _alpha(renderer, plain_scene((body,), TOP, (W, H)))
    labels, n = ndimage.label(ndimage.binary_dilation(alpha > 0, iterations=3))
    assert n == 2
    found = sorted((_centroid(np.where(labels == k, alpha, 0.0)) for k in (1, 2)),
                   key=lambda c: c[0])
    P = np.asarray(el.perifocal_basis()[0])
    expected = sorted([_to_px(np.zeros(3)), _to_px(-2 * float(el.a) * float(el.e) * P)],
                      key=lambda c: c[0])
    for f, e in zip(found, expected, strict=True):
        assert np.allclose(f, e, atol=0.1)


def test_a_body_marker_is_where_an_independent_integration_puts_the_body(renderer):
    el = elements(0.9, 0.35, 0.0, 0.0, 75.0, 10.0)
    t = 47.0 * DAY_S
    body = Body("B", el, show=BodyShow(orbit=False, marker=True, label=False))
    alpha = _alpha(renderer, plain_scene((body,), TOP, (W, H)), t)
    r0, v0 = state_from_elements(el)

    def rhs(_t, y):
        r = y[:3]
        return np.concatenate([y[3:], -GM_SUN * r / np.linalg.norm(r) ** 3])

    with np.errstate(under="ignore"):  # scipy's step-size control may underflow harmlessly
        sol = solve_ivp(rhs, (0.0, t), np.concatenate([r0, v0]), rtol=1e-12, atol=1e-3)
    assert np.allclose(_centroid(alpha), _to_px(sol.y[:3, -1]), atol=0.1)


def _sector_scene(el: Elements, start_s: float, interval_s: float):
    body = Body("B", el, show=BodyShow(orbit=False, marker=False, label=False, sweep=True),
                sweep=Sweep(start_s, interval_s, 1, (1.0, 0.7, 0.3), 1.0))
    return plain_scene((body,), TOP, (W, H))


def test_solid_sectors_of_equal_time_cover_equal_areas_near_periapsis_and_apoapsis(renderer):
    el = elements(0.8, 0.6, 0.0, 0.0, 0.0)  # apoapsis 1.28 au = 512 px: inside the image
    period = float(el.period)
    dt = period / 10
    peri = _alpha(renderer, _sector_scene(el, -dt / 2, dt)).sum()
    apo = _alpha(renderer, _sector_scene(el, period / 2 - dt / 2, dt)).sum()
    expected = math.pi * float(el.a) * float(el.b) / AU_M**2 * PX_PER_AU**2 * dt / period
    assert abs(peri - expected) < 0.01 * expected
    assert abs(apo - expected) < 0.01 * expected
    assert abs(peri - apo) < 0.01 * expected


def test_a_body_40_au_out_seen_in_a_field_of_1e_minus_4_au_does_not_jitter(renderer):
    el = elements(40.0, 0.1, 2.0, 30.0, 60.0, 100.0)
    cam = Camera(look="top", target="B", width_m=1e-4 * AU_M)
    marker_only = plain_scene((Body("B", el, show=BodyShow(orbit=False, label=False)),),
                              cam, (W, H))
    orbit_only = plain_scene((Body("B", el, show=ONLY_ORBIT),), cam, (W, H))
    centre = np.array([W / 2, H / 2])
    for k in range(6):
        t = 1000.0 * DAY_S + k * 3600.0
        assert np.allclose(_centroid(_alpha(renderer, marker_only, t, cam)), centre,
                           atol=0.05)
        # The orbit line runs through the body, along its velocity.
        a = _alpha(renderer, orbit_only, t, cam)
        ys, xs = np.nonzero(a > 0)
        w = a[ys, xs]
        pts = np.stack([xs + 0.5, ys + 0.5], axis=1)
        mean = (pts * w[:, None]).sum(0) / w.sum()
        cov = np.cov((pts - mean).T, aweights=w)
        direction = np.linalg.eigh(cov)[1][:, -1]
        normal = np.array([-direction[1], direction[0]])
        # Within the tessellation's 0.25 px (the chords may cut inside the curve).
        assert abs(np.dot(centre - mean, normal)) < 0.3
        _, v = state_from_elements(el.after(t))
        v_img = np.array([v[0], -v[1]]) / math.hypot(v[0], v[1])
        assert abs(abs(np.dot(direction, v_img)) - 1.0) < 1e-5


def test_a_perspective_view_puts_its_target_body_at_the_image_centre(renderer):
    el = elements(1.3, 0.2, 5.0, 10.0, 20.0, 30.0)
    cam = Camera(projection="perspective", look="angles", elevation_rad=0.6, azimuth_rad=2.2,
                 target="B", distance_m=0.5 * AU_M)
    scene = plain_scene((Body("B", el, show=BodyShow(orbit=False, label=False)),), cam, (W, H))
    assert np.allclose(_centroid(_alpha(renderer, scene, 12 * DAY_S)), [W / 2, H / 2],
                       atol=0.05)


def test_population_points_drawn_by_the_shader_sit_on_the_float64_positions(renderer):
    from dataclasses import replace

    from viewer.geometry.population import population_constants, positions_at

    pop = replace(belt_population(60), point_size_px=3.0)
    wide = Camera(look="top", width_m=8 * AU_M)  # 200 px per au: the whole belt
    scene = replace(plain_scene((Body("B", elements(1, 0), show=NOTHING),), wide, (W, H)),
                    populations=(pop,))
    t = 300.0 * DAY_S
    alpha = _alpha(renderer, scene, t)
    expected = np.array([_to_px(p, 200.0)
                         for p in positions_at(population_constants(pop), t)])
    labels, n = ndimage.label(alpha > 0)
    found = np.array([_centroid(np.where(labels == k, alpha, 0.0)) for k in range(1, n + 1)])
    checked = 0
    for e in expected:
        others = np.linalg.norm(expected - e, axis=1)
        if np.sort(others)[1] < 8.0 or not (5 < e[0] < W - 5 and 5 < e[1] < H - 5):
            continue  # overlapping or clipped dots cannot be measured alone
        d = np.linalg.norm(found - e, axis=1).min()
        assert d < 0.25
        checked += 1
    assert checked > 40


def test_labels_are_in_the_exported_pixels(renderer):
    from dataclasses import replace

    from viewer.geometry.camera import view_for

    body = Body("Tarnwick", elements(1.0, 0.2, 0, 0, 0, 45), color=(0.5, 0.8, 1.0),
                show=BodyShow(orbit=False, marker=True, label=True))
    scene = plain_scene((body,), TOP, (W, H), labels=True)
    img = renderer.render(scene, 0.0, (W, H))
    labs = [lab for lab in renderer.geometry(scene, 0.0, view_for(scene, 0.0, (W, H))).labels
            if lab.text == "Tarnwick"]
    assert len(labs) == 1
    lab = labs[0]
    width, ascent, descent = renderer.measure(lab.text, lab.size_px)
    x0, x1 = int(lab.x_px), int(math.ceil(lab.x_px + width))
    y0, y1 = int(lab.y_px - ascent), int(math.ceil(lab.y_px + descent))
    box = img[y0:y1, x0:x1, :3].max(axis=2)
    assert np.count_nonzero(box > 128) > 40  # glyph strokes, bright on the dark sky
    no_labels = replace(scene, render=replace(scene.render, labels=False))
    dark = renderer.render(no_labels, 0.0, (W, H))[y0:y1, x0:x1, :3]
    assert dark.max() == 0


def test_transparent_frames_have_a_clear_sky_and_opaque_frames_none(renderer):
    scene = plain_scene((Body("B", elements(1.0, 0.3), show=ONLY_ORBIT),), TOP, (W, H))
    clear = renderer.render(scene, 0.0, (W, H), transparent=True)
    opaque = renderer.render(scene, 0.0, (W, H))
    assert clear[0, 0, 3] == 0 and clear[..., 3].max() > 200
    assert np.all(opaque[..., 3] == 255)
    # In the line's core the transparent frame holds the line's own colour (straight
    # alpha) and the opaque one that colour over the black sky.
    core = clear[..., 3] == clear[..., 3].max()
    a = clear[core, 3:4].astype(float) / 255.0
    line_rgb = np.round(np.array(scene.bodies[0].color) * 255)
    assert np.allclose(clear[core, :3], line_rgb, atol=1.0)
    assert np.allclose(opaque[core, :3], line_rgb * a, atol=1.0)


def test_the_vertex_stage_solves_kepler_like_the_float64_reference_for_any_eccentricity(
        renderer):
    from dataclasses import replace

    from viewer.geometry.camera import view_for
    from viewer.geometry.population import population_constants, positions_at
    from viewer.scene import Population

    # 20,000 orbits with e spread over [0, 0.97]: the shader's Newton steps must converge
    # everywhere, not only for a belt's small eccentricities.
    n = 20000
    k = np.arange(n)
    el = Elements(a=(1.0 + (k % 7) * 0.25) * AU_M, e=0.97 * (k % 101) / 100.0,
                  i=0.3 * np.sin(k), raan=k * 0.7, argp=k * 1.3, nu=k * 0.37, mu=GM_SUN)
    pop = Population("test", el, 0.0, (1, 1, 1), 1.0)
    wide = Camera(look="top", width_m=8 * AU_M)
    scene = replace(plain_scene((Body("B", elements(1, 0), show=NOTHING),), wide, (W, H)),
                    populations=(pop,))
    t = 777.0 * DAY_S
    view = view_for(scene, t, (W, H))
    geom = renderer.geometry(scene, t, view)
    renderer.target((W, H)).use()
    got = renderer.population_pixels(pop, geom)
    ref, front = view.project(positions_at(population_constants(pop), t))
    err = np.linalg.norm(got[:, :2] - ref, axis=1)
    # float32 keeps about 1e-7 of a position (3 au at 200 px per au: ~1e-4 px); a solver
    # that had not converged would be off by whole pixels.
    assert np.all(front) and err.max() < 0.01


def test_every_body_of_a_population_lands_where_it_would_on_its_own(renderer):
    """The vertex stage packs four bodies a vertex (and pads the last vertex): each row
    that comes back is its own body's position, against that body propagated alone
    through Elements.after and state_from_elements (Vallado 4th ed., alg. 10 COE2RV: an
    independent path from the population's constants), seen in perspective; a body
    behind the eye comes back off the image."""
    from dataclasses import replace

    from viewer.geometry.camera import view_for
    from viewer.geometry.population import BEHIND_EYE_PX
    from viewer.scene import Population

    n = 4 * 250 + 3  # not a multiple of four: the padded last vertex is exercised
    k = np.arange(n)
    el = Elements(a=(1.0 + (k % 11) * 0.2) * AU_M, e=0.9 * (k % 37) / 36.0,
                  i=0.4 * np.cos(k), raan=k * 0.9, argp=k * 2.1, nu=k * 0.53, mu=GM_SUN)
    pop = Population("sample", el, 0.0, (1, 1, 1), 1.0)
    cam = Camera(projection="perspective", look="angles", elevation_rad=0.5, azimuth_rad=1.1,
                 distance_m=1.8 * AU_M)  # inside the outer orbits: some bodies behind the eye
    scene = replace(plain_scene((Body("B", elements(1, 0), show=NOTHING),), cam, (W, H)),
                    populations=(pop,))
    t = 41.5 * DAY_S
    view = view_for(scene, t, (W, H))
    renderer.target((W, H)).use()
    got = renderer.population_pixels(pop, renderer.geometry(scene, t, view))
    seen = behind = 0
    assert got.shape == (n, 2)
    for j in [*range(0, n, 7), n - 3, n - 2, n - 1]:
        one = Elements(float(el.a[j]), float(el.e[j]), float(el.i[j]), float(el.raan[j]),
                       float(el.argp[j]), float(el.nu[j]), mu=GM_SUN)
        r, _ = state_from_elements(one.after(t))
        ref, front = view.project(r)
        if not front:
            assert np.all(got[j] == BEHIND_EYE_PX), j
            behind += 1
            continue
        # On and around the image (a body close to the eye's plane lands far off it, where
        # float32 pixels are coarse). float32 in the shader: about 1e-7 of the scene's
        # size, far below a pixel here.
        if np.all(np.abs(ref - (W / 2, H / 2)) < (W, H)):
            assert np.linalg.norm(got[j] - ref) < 0.01, j
            seen += 1
    assert seen > 10 and behind > 3
