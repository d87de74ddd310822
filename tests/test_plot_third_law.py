"""The third-law plot (``perifocal plot`` and the window's Plots): T^2 against a^3 is a
straight line through the origin of slope 4 pi^2 / GM, checked on the bundled planets
against the NASA NSSDCA Planetary Fact Sheet's sidereal periods (tests/reference_values,
from memory) and against the law itself (Vallado 4th ed. eq. 2-21, T = 2 pi sqrt(a^3/mu)).
"""

from __future__ import annotations

import math
from pathlib import Path

import numpy as np
import pytest
from reference_values import NSSDCA

from viewer.cli import main
from viewer.orbit import DAY_S, JULIAN_YEAR_S
from viewer.scene import load_scene
from viewer.scene.third_law import square_cube, third_law

ROOT = Path(__file__).resolve().parents[1]
PLANETS = ROOT / "scenes" / "solar-system-mean.toml"
NAMES = {"mercury": "Mercury", "venus": "Venus", "earth": "Earth-Moon barycentre",
         "mars": "Mars", "jupiter": "Jupiter"}


@pytest.fixture(scope="module")
def planets():
    return load_scene(PLANETS)


def test_the_fitted_slope_of_t2_against_a3_is_four_pi_squared_over_gm(planets) -> None:
    sq = square_cube(planets)
    assert (sq.length_unit, sq.time_unit) == ("au", "yr")
    fitted = float(np.sum(sq.a3 * sq.t2) / np.sum(sq.a3 ** 2))  # least squares, origin
    gm = planets.center.gm_m3_s2
    expected = 4 * math.pi ** 2 / gm * (1.495978707e11 ** 3) / JULIAN_YEAR_S ** 2
    assert fitted == pytest.approx(expected, rel=1e-9)
    assert sq.slope == pytest.approx(expected, rel=1e-12)
    # In au and years the law is T^2 = a^3 to the Sun's GM (common practice, no source).
    assert sq.slope == pytest.approx(1.0, abs=1e-4)
    # A line through the origin: the intercept of a free fit is nothing.
    slope, intercept = np.polyfit(sq.a3, sq.t2, 1)
    assert abs(intercept) < 1e-6 * float(sq.t2.max())


def test_the_planets_periods_are_the_handbook_ones(planets) -> None:
    law = third_law(planets)
    period_d = dict(zip(law.names, law.period_s / DAY_S, strict=True))
    for key, name in NAMES.items():
        # The fact sheet prints 4 significant figures (365.2 d for the Earth).
        assert period_d[name] == pytest.approx(NSSDCA[key]["period_d"], rel=1e-3), name


def test_plot_writes_both_views_with_the_slope_printed(tmp_path: Path,
                                                       capsys: pytest.CaptureFixture[str]
                                                       ) -> None:
    svg = tmp_path / "planets.svg"
    png = tmp_path / "planets.png"
    assert main(["plot", str(PLANETS), "-o", str(svg)]) == 0
    out = capsys.readouterr().out
    assert "4π²/GM = 1.00004 yr²/au³" in out and "Jupiter" in out
    text = svg.read_text()
    assert "4π²/GM = 1.00004 yr²/au³" in text
    assert "log T against log a" in text and "T² against a³" in text
    assert main(["plot", str(PLANETS), "-o", str(png)]) == 0
    assert png.read_bytes()[:8] == b"\x89PNG\r\n\x1a\n"


def test_plot_refuses_with_one_line_and_exit_2(tmp_path: Path,
                                                capsys: pytest.CaptureFixture[str]) -> None:
    assert main(["plot", str(PLANETS), "-o", str(tmp_path / "law.gif")]) == 2
    assert ".png or .svg" in capsys.readouterr().err
    open_only = tmp_path / "open.toml"
    open_only.write_text('[center]\npreset = "sun"\n[[body]]\nname = "Flyby"\n'
                         'periapsis = "1 au"\ne = 1.5\n')
    assert main(["plot", str(open_only), "-o", str(tmp_path / "law.png")]) == 2
    assert "no closed orbit" in capsys.readouterr().err
    assert not (tmp_path / "law.png").exists()
    taken = tmp_path / "taken.png"
    taken.write_bytes(b"keep")
    assert main(["plot", str(PLANETS), "-o", str(taken)]) == 2
    assert taken.read_bytes() == b"keep"
