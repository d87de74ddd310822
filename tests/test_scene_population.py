"""Populations: element tables (CSV, .npy) and the seeded belt, validated row by row."""

from __future__ import annotations

import math
from pathlib import Path

import mpmath
import numpy as np
import pytest
from reference_values import AU, DEG

from viewer.errors import UserInputError
from viewer.scene import load_scene, load_scene_text
from viewer.scene.bench import bench_scene, many_bodies_text
from viewer.scene.population import generate_belt, main, uniform_stream

SUN = '[center]\npreset = "sun"\n'


def _scene(folder: Path, population: str) -> Path:
    path = folder / "pop.toml"
    path.write_text(SUN + '[[population]]\nname = "Belt"\n' + population)
    return path


def test_csv_table_with_units_in_the_header(tmp_path):
    (tmp_path / "t.csv").write_text("# made by hand\na [au], e, i [deg], M [deg]\n"
                                    "2.5, 0.1, 3, 0\n3.0, 0.6, 10, 60\n")
    pop = load_scene(_scene(tmp_path, 'table = "t.csv"\n')).populations[0]
    assert pop.count == 2
    np.testing.assert_allclose(pop.elements.a, [2.5 * AU, 3.0 * AU], rtol=1e-15)
    np.testing.assert_allclose(pop.elements.i, [3 * DEG, 10 * DEG], rtol=1e-15)
    # M = 60 deg, e = 0.6: the true anomaly from a 50-digit Kepler solve (mpmath)
    mpmath.mp.dps = 50
    E = mpmath.findroot(lambda x: x - 0.6 * mpmath.sin(x) - 60 * mpmath.pi / 180, 1.0)
    nu = float(2 * mpmath.atan(mpmath.sqrt(1.6 / 0.4) * mpmath.tan(E / 2)))
    assert pop.elements.nu[1] == pytest.approx(nu, abs=1e-12)
    assert pop.source == tmp_path / "t.csv"


def test_csv_columns_without_units_take_the_population_units(tmp_path):
    (tmp_path / "t.csv").write_text("periapsis, e, raan\n7000, 0.5, 1.0\n")
    pop = load_scene(_scene(tmp_path, 'table = "t.csv"\nunits = { length = "km", '
                                      'angle = "rad" }\n')).populations[0]
    assert pop.elements.a[0] == pytest.approx(7000e3 / 0.5)
    assert pop.elements.raan[0] == 1.0


def test_npy_table_with_named_columns(tmp_path):
    np.save(tmp_path / "t.npy", np.array([[2.0, 0.1, 5.0], [2.2, 0.2, 6.0]]))
    pop = load_scene(_scene(tmp_path, 'table = "t.npy"\ncolumns = ["a", "e", "i"]\n'
                                      'epoch = "2000-01-02T12:00:00 TDB"\n')).populations[0]
    np.testing.assert_allclose(pop.elements.e, [0.1, 0.2])
    assert pop.epoch_offset_s == pytest.approx(86_400.0)


def _problems(path: Path) -> list[str]:
    with pytest.raises(UserInputError) as info:
        load_scene(path)
    return info.value.problems


def test_bad_csv_rows_are_named_by_their_line(tmp_path):
    (tmp_path / "t.csv").write_text("a [au], e\n2.5, 0.1\n# comment\n2.6, 1.0\n2.7, nan\n"
                                    "-1, 0.1\n")
    msgs = _problems(_scene(tmp_path, 'table = "t.csv"\n'))
    assert any("t.csv line 4" in m and "0 <= e < 1" in m for m in msgs), msgs
    assert any("t.csv line 5" in m and "NaN" in m for m in msgs), msgs
    assert any("t.csv line 6" in m and "size" in m for m in msgs), msgs


def test_bad_npy_rows_are_named_by_their_index(tmp_path):
    data = np.zeros((5, 2))
    data[:, 0] = 2.0
    data[3, 1] = 1.5
    np.save(tmp_path / "t.npy", data)
    msgs = _problems(_scene(tmp_path, 'table = "t.npy"\ncolumns = ["a", "e"]\n'))
    assert len(msgs) == 1 and "t.npy row 3" in msgs[0] and "scene line" in msgs[0]


def test_many_bad_rows_are_counted_not_all_listed(tmp_path):
    rows = "\n".join("2.5, 1.5" for _ in range(500))
    (tmp_path / "t.csv").write_text("a [au], e\n" + rows + "\n")
    msgs = _problems(_scene(tmp_path, 'table = "t.csv"\n'))
    assert len(msgs) == 21
    assert msgs[-1].endswith("... and 480 more rows with problems (500 in all)")


@pytest.mark.parametrize("content, words", [
    ("a [au], e, colour\n1, 0, 0\n", ['unknown column "colour"']),
    ("a [kg], e\n1, 0\n", ["column a", "kg"]),
    ("a, e\n1, 0, 3\n", ["line 2", "3 cells"]),
    ("", ["empty"]),
    ("a [au], a [au]\n1, 2\n", ["given twice"]),
])
def test_bad_csv_headers_and_shapes(tmp_path, content, words):
    (tmp_path / "t.csv").write_text(content)
    text = " ".join(_problems(_scene(tmp_path, 'table = "t.csv"\n')))
    for w in words:
        assert w in text


def test_a_table_that_is_not_a_table_file(tmp_path):
    (tmp_path / "t.npy").write_bytes(b"not numpy at all")
    (tmp_path / "t.txt").write_text("a, e\n")
    assert "not a readable .npy" in " ".join(_problems(_scene(tmp_path, 'table = "t.npy"\n')))
    assert ".csv or .npy" in " ".join(_problems(_scene(tmp_path, 'table = "t.txt"\n')))


def test_the_generated_belt_is_the_same_every_time_and_follows_its_ranges():
    a, b = generate_belt(20_000, 7, (2e11, 3e11), (0.0, 0.2)), generate_belt(20_000, 7,
                                                                                (2e11, 3e11),
                                                                                (0.0, 0.2))
    for key in a.values:
        np.testing.assert_array_equal(a.values[key], b.values[key])
    other = generate_belt(20_000, 8, (2e11, 3e11), (0.0, 0.2))
    assert not np.array_equal(a.values["a"], other.values["a"])
    assert a.values["a"].min() >= 2e11 and a.values["a"].max() < 3e11
    # a uniform variable on [2e11, 3e11): mean 2.5e11, standard error 1e11/sqrt(12 n)
    assert abs(a.values["a"].mean() - 2.5e11) < 5 * 1e11 / math.sqrt(12 * 20_000)


def test_the_uniform_stream_is_numpys_pcg64_double():
    # numpy.random.Generator(PCG64(seed)).random() makes each double from the top 53
    # bits of one raw word (numpy's documented method), as uniform_stream does by hand.
    ours = uniform_stream(12345, 1000)
    numpys = np.random.Generator(np.random.PCG64(12345)).random(1000)
    np.testing.assert_array_equal(ours, numpys)


def test_the_bundled_belt_has_100000_bodies_in_its_ranges():
    scene = load_scene(Path(__file__).resolve().parents[1] / "scenes" / "belt.toml")
    (pop,) = scene.populations
    assert pop.count == 100_000
    a = np.asarray(pop.elements.a)
    assert a.min() >= 2.1 * AU and a.max() <= 3.3 * AU
    assert np.asarray(pop.elements.i).max() <= 20 * DEG


def test_the_table_writer_round_trips_through_the_loader(tmp_path):
    for name in ("belt.csv", "belt.npy"):
        out = tmp_path / name
        assert main(["--count", "500", "--seed", "3", "--a", "2 au", "3 au", "--e", "0",
                     "0.2", "-o", str(out)]) == 0
        pop = load_scene(_scene(tmp_path, f'table = "{name}"\n')).populations[0]
        gen = load_scene_text(SUN + '[[population]]\nname = "B"\ngenerate = { count = 500, '
                              'seed = 3, a = ["2 au", "3 au"], e = [0, 0.2] }\n').populations[0]
        np.testing.assert_allclose(pop.elements.a, gen.elements.a, rtol=1e-15)
        np.testing.assert_allclose(pop.elements.nu, gen.elements.nu, rtol=1e-12, atol=1e-12)


def test_generate_needs_count_and_a():
    with pytest.raises(UserInputError) as info:
        load_scene_text(SUN + '[[population]]\nname = "B"\ngenerate = { seed = 1 }\n')
    assert any("missing count" in p for p in info.value.problems)


def test_many_bodies_text_loads_all_bodies():
    scene = load_scene_text(many_bodies_text(50))
    assert len(scene.bodies) == 50 and scene.bodies[49].name == "Body 49"


def test_the_benchmark_reports_every_figure_with_its_baseline():
    res = bench_scene(n_bodies=20, n_rows=200, repeat=1)
    assert res["counts"] == {"csv": 200, "npy": 200, "generated": 200}
    assert set(res["timings_s"]) == {
        "bodies_load", "bodies_tomllib", "bodies_edit", "population_csv_load",
        "population_csv_numpy", "population_npy_load", "population_npy_numpy",
        "population_generated_load"}
    assert all(t > 0 for t in res["timings_s"].values())
    assert len(res["rows"]) == 8 and len(res["verdicts"]) == 4
