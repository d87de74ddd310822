"""SVG diagrams: the file parses, and its ellipse matches the scene's a, b and foci.

Orthographic top view of known width: pixels per metre are W / width, the target (the
central body) maps to the image centre, +X right and +Y up (scene-format.md).
"""

from __future__ import annotations

import math
import re
import xml.etree.ElementTree as ET
from pathlib import Path

import numpy as np
import pytest

from viewer.cli import main
from viewer.export.svg import write_svg
from viewer.orbit import AU_M, state_from_elements
from viewer.render.samples import elements, plain_scene
from viewer.scene.model import Body, BodyShow, Camera

SVG = "{http://www.w3.org/2000/svg}"
PIXEL = 1.0
W, H = 1600, 1200
WIDTH_M = 4.0 * AU_M


def fit_conic(x: np.ndarray, y: np.ndarray) -> dict[str, float]:
    """Least-squares ellipse through points: centre, semi-axes, orientation (deg)."""
    D = np.stack([x * x, x * y, y * y, x, y, np.ones_like(x)], axis=1)
    _, _, vt = np.linalg.svd(D)
    A, B, C, Dx, Ey, F = vt[-1]
    M = np.array([[A, B / 2], [B / 2, C]])
    centre = np.linalg.solve(2 * M, [-Dx, -Ey])
    k = F + 0.5 * (Dx * centre[0] + Ey * centre[1])
    evals, evecs = np.linalg.eigh(M)
    axes = np.sqrt(-k / evals)
    major = int(np.argmax(axes))
    angle = math.degrees(math.atan2(evecs[1, major], evecs[0, major])) % 180.0
    return {"cx": centre[0], "cy": centre[1], "a": axes[major], "b": axes[1 - major],
            "angle": angle}


def path_points(d: str) -> np.ndarray:
    nums = [float(v) for v in re.findall(r"-?\d+(?:\.\d+)?", d)]
    return np.array(nums).reshape(-1, 2)


@pytest.mark.parametrize(("a_au", "e", "argp_deg"), [(1.2, 0.21, 110.0), (1.5, 0.6, 30.0)])
def test_the_svg_ellipse_matches_a_b_and_the_foci(tmp_path: Path, a_au: float, e: float,
                                                  argp_deg: float) -> None:
    el = elements(a_au, e, 0.0, 0.0, argp_deg, 0.0)
    body = Body("Tarn", el, show=BodyShow(orbit=True, marker=False, label=False, foci=True))
    scene = plain_scene((body,), Camera(width_m=WIDTH_M), size_px=(W, H))
    out = tmp_path / "d.svg"
    write_svg(scene, 0.0, out)
    root = ET.parse(out).getroot()  # it parses as XML
    assert root.tag == f"{SVG}svg" and root.get("width") == str(W)
    orbit = [p for p in root.iter(f"{SVG}path") if p.get("class") == "line"]
    assert len(orbit) == 1
    pts = path_points(orbit[0].get("d"))
    fit = fit_conic(pts[:, 0], pts[:, 1])
    px_per_m = W / WIDTH_M
    a_px = float(el.a) * px_per_m
    b_px = float(el.b) * px_per_m
    c_px = float(el.focal_distance) * px_per_m
    # The centre lies c from the occupied focus (the image centre), away from periapsis.
    w = math.radians(argp_deg)
    want_cx = W / 2 - c_px * math.cos(w)
    want_cy = H / 2 + c_px * math.sin(w)  # image y is down
    assert fit["a"] == pytest.approx(a_px, abs=PIXEL)
    assert fit["b"] == pytest.approx(b_px, abs=PIXEL)
    assert fit["cx"] == pytest.approx(want_cx, abs=PIXEL)
    assert fit["cy"] == pytest.approx(want_cy, abs=PIXEL)
    assert min(abs(fit["angle"] - (-argp_deg % 180.0)),
               180 - abs(fit["angle"] - (-argp_deg % 180.0))) < 0.1
    circles = [(float(c.get("cx")), float(c.get("cy"))) for c in root.iter(f"{SVG}circle")]
    assert any(math.hypot(x - W / 2, y - H / 2) < PIXEL for x, y in circles)  # occupied
    cross = [g for g in root.iter(f"{SVG}g") if g.find(f"{SVG}circle") is not None
             and g.find(f"{SVG}path") is not None]
    assert len(cross) == 1  # the empty focus, 2c from the occupied one
    c = cross[0].find(f"{SVG}circle")
    ex, ey = float(c.get("cx")), float(c.get("cy"))
    assert math.hypot(ex - (W / 2 - 2 * c_px * math.cos(w)),
                      ey - (H / 2 + 2 * c_px * math.sin(w))) < PIXEL


@pytest.mark.gl
def test_the_svg_body_marker_sits_on_the_raster_marker(tmp_path: Path) -> None:
    from viewer.render.renderer import render_still

    el = elements(1.0, 0.4, 0.0, 0.0, 40.0, 75.0)
    body = Body("Wren", el, color=(1.0, 1.0, 1.0),
                show=BodyShow(orbit=False, marker=True, label=False))
    scene = plain_scene((body,), Camera(width_m=WIDTH_M), size_px=(W, H))
    write_svg(scene, 0.0, tmp_path / "m.svg")
    root = ET.parse(tmp_path / "m.svg").getroot()
    (marker,) = [c for c in root.iter(f"{SVG}circle")]
    img = render_still(scene, 0.0).astype(np.float64)[..., :3].sum(axis=2)
    rows, cols = np.nonzero(img)
    wts = img[rows, cols]
    centroid = ((cols + 0.5) * wts).sum() / wts.sum(), ((rows + 0.5) * wts).sum() / wts.sum()
    assert math.hypot(centroid[0] - float(marker.get("cx")),
                      centroid[1] - float(marker.get("cy"))) < 0.5 * PIXEL
    r, _ = state_from_elements(el)
    want = (W / 2 + r[0] * W / WIDTH_M, H / 2 - r[1] * W / WIDTH_M)
    assert math.hypot(float(marker.get("cx")) - want[0],
                      float(marker.get("cy")) - want[1]) < 0.5 * PIXEL


def test_render_writes_an_svg_with_labels_as_text(tmp_path: Path) -> None:
    scene_file = Path(__file__).parents[1] / "scenes" / "demo.toml"
    out = tmp_path / "demo.svg"
    assert main(["render", str(scene_file), "-o", str(out)]) == 0
    root = ET.parse(out).getroot()
    texts = {t.text for t in root.iter(f"{SVG}text")}
    assert "periapsis" in texts and len(texts) > 5
    assert oct(out.stat().st_mode & 0o777) != oct(0o600)  # not private like a temp file
