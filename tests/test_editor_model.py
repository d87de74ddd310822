"""The editor model: element edits with locks, units, refusals, undo/redo, dirty flag, save.

Check values come from published worked examples (named beside each) or from the
two-body formulas computed independently here (vis-viva v^2 = mu (2/r - 1/a), the third
law T = 2 pi sqrt(a^3 / mu), h = sqrt(mu a (1 - e^2))).
"""

from __future__ import annotations

import math
from pathlib import Path

import numpy as np
import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st
from reference_values import CURTIS_MU, CURTIS_R, HOUR, KM, KM_S, MU_EARTH, R_EARTH

from viewer.errors import UserInputError
from viewer.gui.editor import Editor, EditRefused
from viewer.gui.readout import body_readout
from viewer.orbit import Elements, state_from_elements
from viewer.scene.loader import load_scene
from viewer.scene.model import Body, Center, Scene
from viewer.units import parse_epoch

# Curtis, Orbital Mechanics for Engineering Students: mu and R of the Earth as the book
# uses them (from memory).


def make_scene(*orbits: tuple[str, Elements], mu: float = CURTIS_MU,
               radius: float = CURTIS_R) -> Scene:
    center = Center(name="Earth", gm_m3_s2=mu, radius_m=radius)
    bodies = tuple(Body(name=n, elements=el.with_(mu=mu)) for n, el in orbits)
    return Scene(title="test", epoch=parse_epoch("2030-01-01T00:00:00 TDB"),
                 frame="ECLIPJ2000", center=center, bodies=bodies, length_unit="km",
                 time_unit="min")


def circle_editor(r_m: float, mu: float = CURTIS_MU, radius: float = CURTIS_R) -> Editor:
    return Editor(make_scene(("Sat", Elements(a=r_m, e=0.0)), mu=mu, radius=radius))


def vis_viva(mu: float, r: float, a: float) -> float:
    return math.sqrt(mu * (2.0 / r - 1.0 / a))


# --- locks ---------------------------------------------------------------------------


def test_raising_apoapsis_with_periapsis_held_gives_curtis_example_3_1_orbit() -> None:
    # Curtis, Example 3.1 (from memory): perigee 9600 km, apogee 21 000 km give
    # e = 0.37255, h = 72 472 km^2/s, T = 18 834 s.
    ed = circle_editor(9600 * KM)
    ed.hold = "periapsis"
    ed.set_field("apoapsis", "21000 km")
    el = ed.body.elements
    assert float(el.periapsis) == pytest.approx(9600 * KM, rel=1e-14)
    assert float(el.e) == pytest.approx(0.37255, abs=0.000005)
    assert float(el.h) == pytest.approx(72_472 * KM**2, abs=0.5 * KM**2)
    assert float(el.period) == pytest.approx(18_834, abs=0.5)


def test_raising_apoapsis_with_periapsis_held_gives_vallado_6_1_transfer_speeds() -> None:
    # Vallado, Fundamentals of Astrodynamics and Applications (4th ed.), Example 6-1
    # (from memory): a Hohmann transfer from 191.34411 km to 35 781.34857 km altitude
    # has dv_a = 2.457 km/s, dv_b = 1.478 km/s and takes 5.256 h. Raising the apoapsis of
    # the low circle with the periapsis held gives the transfer ellipse.
    r1, r2 = R_EARTH + 191.34411 * KM, R_EARTH + 35_781.34857 * KM
    ed = circle_editor(r1, MU_EARTH, R_EARTH)
    ed.hold = "periapsis"
    ed.set_field("apoapsis_altitude", "35781.34857 km")
    values = body_readout(ed.scene, 0, 0.0).values
    a = (r1 + r2) / 2.0
    vp, va = values["speed_periapsis_m_s"], values["speed_apoapsis_m_s"]
    assert vp == pytest.approx(vis_viva(MU_EARTH, r1, a), rel=1e-13)
    assert va == pytest.approx(vis_viva(MU_EARTH, r2, a), rel=1e-13)
    assert vp - math.sqrt(MU_EARTH / r1) == pytest.approx(2.457 * KM_S, abs=0.5)
    assert math.sqrt(MU_EARTH / r2) - va == pytest.approx(1.478 * KM_S, abs=0.5)
    assert values["period_s"] / 2 == pytest.approx(5.256 * HOUR, abs=0.001 * HOUR)


def test_changing_e_with_periapsis_held_gives_curtis_perigee_speed() -> None:
    # Curtis, ch. 2 example of an Earth satellite with perigee altitude 400 km and
    # e = 0.6 (from memory): perigee speed 9.700 km/s. The apogee and its speed follow
    # from the conic: ra = rp (1 + e) / (1 - e), va = h / ra.
    rp = CURTIS_R + 400 * KM
    ed = circle_editor(rp)
    ed.hold = "periapsis"
    ed.set_field("e", "0.6")
    r = body_readout(ed.scene, 0, 0.0).values
    assert r["periapsis_m"] == pytest.approx(rp, rel=1e-14)
    assert r["speed_periapsis_m_s"] == pytest.approx(9.700 * KM_S, abs=0.5)
    ra = rp * 1.6 / 0.4
    h = math.sqrt(CURTIS_MU * rp * 1.6)
    assert r["apoapsis_m"] == pytest.approx(ra, rel=1e-13)
    assert r["speed_apoapsis_m_s"] == pytest.approx(h / ra, rel=1e-13)


@pytest.mark.parametrize("hold", ["period", "a", "auto"])
def test_changing_e_with_period_or_a_held_keeps_the_period(hold: str) -> None:
    # Curtis 3.1's orbit, T = 18 834 s (from memory); the third law keeps it with a.
    ed = Editor(make_scene(("Sat", Elements.from_periapsis(9600 * KM, 0.37255))))
    T0 = float(ed.body.elements.period)
    a0 = float(ed.body.elements.a)
    ed.hold = hold
    ed.set_field("e", "0.1")
    el = ed.body.elements
    assert float(el.period) == pytest.approx(T0, rel=1e-14)
    assert float(el.a) == pytest.approx(a0, rel=1e-14)
    assert float(el.periapsis) == pytest.approx(a0 * 0.9, rel=1e-14)
    assert float(el.apoapsis) == pytest.approx(a0 * 1.1, rel=1e-14)


def test_changing_periapsis_with_apoapsis_held_moves_only_the_periapsis() -> None:
    ed = Editor(make_scene(("Sat", Elements(a=20_000 * KM, e=0.5))))
    Q = float(ed.body.elements.apoapsis)
    ed.hold = "apoapsis"
    ed.set_field("periapsis_altitude", "1000 km")
    el = ed.body.elements
    q = CURTIS_R + 1000 * KM
    assert float(el.apoapsis) == pytest.approx(Q, rel=1e-14)
    assert float(el.periapsis) == pytest.approx(q, rel=1e-14)
    assert float(el.a) == pytest.approx((q + Q) / 2, rel=1e-14)
    assert float(el.period) == pytest.approx(2 * math.pi * math.sqrt(((q + Q) / 2) ** 3
                                                                     / CURTIS_MU), rel=1e-13)


def test_changing_e_with_apoapsis_held_keeps_the_apoapsis() -> None:
    ed = Editor(make_scene(("Sat", Elements(a=20_000 * KM, e=0.5))))
    ed.hold = "apoapsis"
    ed.set_field("e", "0.2")
    el = ed.body.elements
    assert float(el.apoapsis) == pytest.approx(30_000 * KM, rel=1e-14)
    assert float(el.a) == pytest.approx(30_000 * KM / 1.2, rel=1e-14)


def test_changing_a_with_periapsis_held_stretches_the_ellipse_outward() -> None:
    ed = Editor(make_scene(("Sat", Elements(a=10_000 * KM, e=0.2))))
    ed.hold = "periapsis"
    ed.set_field("a", "16000 km")
    el = ed.body.elements
    assert float(el.periapsis) == pytest.approx(8000 * KM, rel=1e-14)
    assert float(el.e) == pytest.approx(0.5, rel=1e-14)


def test_raising_apoapsis_with_a_held_lowers_the_periapsis_by_as_much() -> None:
    ed = Editor(make_scene(("Sat", Elements(a=10_000 * KM, e=0.2))))
    ed.hold = "a"
    ed.set_field("apoapsis", "13000 km")
    el = ed.body.elements
    assert float(el.a) == pytest.approx(10_000 * KM, rel=1e-14)
    assert float(el.periapsis) == pytest.approx(7000 * KM, rel=1e-14)


def test_holding_the_changed_quantity_holds_its_partner_instead() -> None:
    # Holding the apoapsis while the apoapsis is typed means: hold the periapsis.
    ed = Editor(make_scene(("Sat", Elements(a=10_000 * KM, e=0.2))))
    ed.hold = "apoapsis"
    ed.set_field("apoapsis", "15000 km")
    assert float(ed.body.elements.periapsis) == pytest.approx(8000 * KM, rel=1e-14)


def test_the_natural_partner_lock_says_what_it_kept() -> None:
    # The natural partners (a with e, periapsis with apoapsis): each edit says which one
    # stayed, and the numbers show it did.
    ed = Editor(make_scene(("Sat", Elements(a=10_000 * KM, e=0.2))))
    assert ed.hold == "auto" and ed.kept == ""
    ed.set_field("a", "12000 km")
    assert ed.kept == "semi-major axis changed; kept e (the natural partner)"
    assert float(ed.body.elements.e) == pytest.approx(0.2, rel=1e-15)
    ed.set_field("periapsis", "9000 km")
    assert ed.kept == "periapsis radius changed; kept the apoapsis (the natural partner)"
    assert float(ed.body.elements.apoapsis) == pytest.approx(12_000 * KM * 1.2, rel=1e-14)
    ed.set_field("period", "3 h")
    assert ed.kept == "orbital period changed; kept e (the natural partner)"
    # A lock chosen by hand is named without the "natural partner".
    ed.hold = "periapsis"
    ed.set_field("e", "0.3")
    assert ed.kept == "eccentricity changed; kept the periapsis"
    ed.set_field("i", "10 deg")  # an angle changes no shape quantity
    assert ed.kept == ""


def test_period_input_sets_a_by_the_third_law_for_a_geostationary_orbit() -> None:
    # One sidereal day, 86 164.0905 s, gives the geostationary radius 42 164.17 km
    # (common practice, no source; with the IERS GM).
    ed = circle_editor(7000 * KM, MU_EARTH, R_EARTH)
    ed.set_field("period", "86164.0905 s")
    assert float(ed.body.elements.a) == pytest.approx(42_164.17 * KM, abs=0.01 * KM)
    assert float(ed.body.elements.e) == 0.0


def test_opening_the_orbit_with_periapsis_held_makes_an_escaping_hyperbola() -> None:
    ed = circle_editor(7000 * KM)
    ed.hold = "periapsis"
    ed.set_field("e", "1.5")
    el = ed.body.elements
    assert float(el.a) == pytest.approx(-14_000 * KM, rel=1e-14)
    r = body_readout(ed.scene, 0, 0.0)
    assert r.values["period_s"] is None and r.values["apoapsis_m"] is None
    assert r.values["v_inf_m_s"] == pytest.approx(math.sqrt(CURTIS_MU / (14_000 * KM)),
                                                  rel=1e-13)
    assert any(w.startswith("escape") for w in r.warnings)
    assert ed.body.limit_radius_m is not None and ed.body.limit_radius_m > 7000 * KM


def test_the_body_keeps_its_mean_anomaly_through_a_shape_edit() -> None:
    ed = Editor(make_scene(("Sat", Elements(a=10_000 * KM, e=0.1).at_mean_anomaly(1.0))))
    ed.set_field("e", "0.6")
    assert float(ed.body.elements.mean_anomaly) == pytest.approx(1.0, abs=1e-12)


# --- the readout -----------------------------------------------------------------------


def test_readout_now_matches_the_state_vector_at_that_time() -> None:
    ed = Editor(make_scene(("Sat", Elements(a=12_000 * KM, e=0.3, i=0.5, raan=1.0,
                                            argp=2.0))))
    t = 1234.5
    values = body_readout(ed.scene, 0, t).values
    r, v = state_from_elements(ed.body.elements_at(t))
    rn, vn = np.linalg.norm(r), np.linalg.norm(v)
    assert values["distance_m"] == pytest.approx(rn, rel=1e-12)
    assert values["speed_m_s"] == pytest.approx(vn, rel=1e-12)
    # Flight-path angle above the local horizontal: sin(gamma) = r.v / (|r| |v|).
    assert values["flight_path_angle_rad"] == pytest.approx(
        math.asin(float(np.dot(r, v)) / (rn * vn)), abs=1e-12)
    assert values["specific_energy_j_kg"] == pytest.approx(vn**2 / 2 - CURTIS_MU / rn,
                                                           rel=1e-12)
    assert values["h_m2_s"] == pytest.approx(float(np.linalg.norm(np.cross(r, v))), rel=1e-12)


def test_every_readout_number_carries_its_unit() -> None:
    ed = Editor(make_scene(("Sat", Elements(a=12_000 * KM, e=0.3))))
    units = ("km", "au", "km/s", "deg", "MJ/kg", "km^2/s", " s", "min", " h", " d", "yr")
    for label, text in body_readout(ed.scene, 0, 0.0).rows:
        if label != "eccentricity e":
            assert any(u in text for u in units), (label, text)


def test_periapsis_inside_the_central_body_is_warned_about() -> None:
    ed = circle_editor(7000 * KM)
    ed.hold = "apoapsis"
    ed.set_field("periapsis_altitude", "-100 km")
    assert any(w.startswith("impact") for w in body_readout(ed.scene, 0, 0.0).warnings)


# --- units in inputs ---------------------------------------------------------------------


@pytest.mark.parametrize("text", ["400 km", "0.4 Mm", "400000 m", "400km", "400"])
def test_altitude_input_takes_units_and_bare_numbers_take_the_shown_unit(text: str) -> None:
    ed = circle_editor(6600 * KM)
    ed.hold = "periapsis"
    ed.set_field("apoapsis_altitude", text)
    assert float(ed.body.elements.apoapsis) == pytest.approx(CURTIS_R + 400 * KM, rel=1e-14)


@pytest.mark.parametrize("text", ["12 deg", "0.20943951023931953 rad", "720 arcmin", "12"])
def test_angle_input_takes_units(text: str) -> None:
    ed = circle_editor(7000 * KM)
    ed.set_field("i", text)
    assert float(ed.body.elements.i) == pytest.approx(math.radians(12), rel=1e-14)


@pytest.mark.parametrize("text", ["2.5 h", "150 min", "9000 s", "2.5 hours"])
def test_period_input_takes_time_units(text: str) -> None:
    ed = circle_editor(7000 * KM)
    ed.set_field("period", text)
    assert float(ed.body.elements.period) == pytest.approx(9000.0, rel=1e-13)


def test_field_text_shows_the_value_with_its_unit_and_reads_back_unchanged() -> None:
    ed = Editor(make_scene(("Sat", Elements(a=12_000 * KM, e=0.3, i=0.5))))
    assert ed.field_text("a") == "12000 km"
    assert ed.field_text("i").endswith(" deg")
    assert ed.field_text("period").endswith(" h")  # 3.63 h: shown in hours
    before = ed.scene
    assert ed.set_field("a", ed.field_text("a")) is False  # the current value: no edit
    assert ed.scene is before and not ed.can_undo


# --- refusals ----------------------------------------------------------------------------


@pytest.mark.parametrize(("hold", "field", "text", "why"), [
    ("a", "e", "1.2", "open"),                       # e >= 1 with a held
    ("period", "e", "1", "open"),
    ("auto", "e", "-0.1", "between 0"),
    ("apoapsis", "periapsis", "-5 km", "above"),     # negative periapsis radius
    ("apoapsis", "periapsis_altitude", "-7000 km", "above"),
    ("periapsis", "apoapsis", "5000 km", "below"),   # apoapsis below periapsis
    ("apoapsis", "periapsis", "30000 km", "above the held apoapsis"),
    ("auto", "a", "400 kg", "unit"),                 # wrong units
    ("auto", "i", "12 km", "not an angle"),
    ("auto", "period", "3 deg", "not a time"),
    ("auto", "e", "0.5 km", "bare number"),
    ("auto", "a", "twelve", "not a number"),
    ("auto", "i", "200 deg", "out of range"),
    ("auto", "period", "-3 h", "positive"),
    ("a", "apoapsis", "50000 km", "between a and 2a"),
    ("periapsis", "a", "1000 km", "at least the periapsis"),
])
def test_invalid_input_is_refused_with_a_reason_and_changes_nothing(
        hold: str, field: str, text: str, why: str) -> None:
    ed = Editor(make_scene(("Sat", Elements(a=10_000 * KM, e=0.2))))
    ed.hold = hold
    before, revision = ed.scene, ed.revision
    with pytest.raises(EditRefused) as err:
        ed.set_field(field, text)
    assert why in err.value.problems[0]
    assert ed.scene is before and ed.revision == revision
    assert not ed.can_undo and not ed.dirty


def test_names_must_be_unique_and_not_empty() -> None:
    ed = Editor(make_scene(("A", Elements(a=1e7, e=0.0)), ("B", Elements(a=2e7, e=0.0))))
    with pytest.raises(EditRefused, match="already"):
        ed.rename("B", 0)
    with pytest.raises(EditRefused, match="needs a name"):
        ed.rename("   ", 0)
    ed.rename("Alpha", 0)
    assert [b.name for b in ed.scene.bodies] == ["Alpha", "B"]


# --- bodies ------------------------------------------------------------------------------


def test_a_new_body_is_circular_outside_the_others_and_selected() -> None:
    ed = Editor(make_scene(("A", Elements(a=1e7, e=0.5))))
    k = ed.add_body()
    assert ed.selection == k == 1
    b = ed.scene.bodies[1]
    assert float(b.elements.e) == 0.0
    assert float(b.elements.a) > float(ed.scene.bodies[0].elements.apoapsis)
    assert b.name not in {"A"} and b.elements.mu == ed.scene.center.gm_m3_s2


def test_duplicate_delete_and_move_keep_names_unique_and_order() -> None:
    ed = Editor(make_scene(("A", Elements(a=1e7, e=0.0)), ("B", Elements(a=2e7, e=0.0))))
    ed.duplicate(0)
    ed.duplicate(0)
    assert [b.name for b in ed.scene.bodies] == ["A", "A copy 2", "A copy", "B"]
    ed.move(3, 0)
    assert [b.name for b in ed.scene.bodies] == ["A copy 2", "A copy", "B", "A"]
    assert ed.selection == 3
    ed.delete()
    assert [b.name for b in ed.scene.bodies] == ["A copy 2", "A copy", "B"]
    assert ed.selection == 2


def test_changing_the_central_gm_keeps_shapes_and_changes_periods() -> None:
    ed = Editor(make_scene(("A", Elements(a=1e7, e=0.3))))
    ed.set_center(gm="1594400 km3/s2")  # four times the GM: the period halves (third law)
    el = ed.body.elements
    assert float(el.a) == 1e7 and float(el.e) == 0.3
    assert float(el.period) == pytest.approx(
        2 * math.pi * math.sqrt(1e21 / CURTIS_MU) / 2, rel=1e-13)


# --- history and dirty flag -----------------------------------------------------------------

_FIELDS = ["a", "e", "i", "raan", "argp", "M", "nu", "periapsis", "apoapsis",
           "periapsis_altitude", "apoapsis_altitude", "period"]
_TEXTS = {
    "a": ["9000 km", "2e4 km", "0.5 Mm", "-30000 km"], "e": ["0", "0.3", "0.95", "1.4", "2"],
    "i": ["12 deg", "95 deg", "200 deg"], "raan": ["40 deg", "-10 deg"],
    "argp": ["110 deg", "3 rad"], "M": ["0 deg", "190 deg"], "nu": ["45 deg", "170 deg"],
    "periapsis": ["7000 km", "-1 km", "1e5 km"], "apoapsis": ["9000 km", "50000 km"],
    "periapsis_altitude": ["300 km", "-100 km"], "apoapsis_altitude": ["2000 km", "1 au"],
    "period": ["2 h", "1 d", "90 kg"],
}
_OP = st.one_of(
    st.tuples(st.just("set"), st.sampled_from(_FIELDS), st.integers(0, 4)),
    st.tuples(st.just("hold"), st.sampled_from(["auto", "a", "e", "periapsis", "apoapsis"])),
    st.tuples(st.just("add")), st.tuples(st.just("duplicate")), st.tuples(st.just("delete")),
    st.tuples(st.just("rename"), st.sampled_from(["X", "Y", "A", ""])),
    st.tuples(st.just("move"), st.integers(0, 5)),
    st.tuples(st.just("select"), st.integers(0, 5)),
    st.tuples(st.just("show"), st.sampled_from(["foci", "axes", "sweep", "orbit"]),
              st.booleans()),
    st.tuples(st.just("undo")),
)
#: Edits only (no undo among them), for the history test.
_EDIT = _OP.filter(lambda op: op[0] != "undo")


def _apply(ed: Editor, op: tuple) -> None:
    kind = op[0]
    n = len(ed.scene.bodies)
    try:
        if kind == "set" and ed.body is not None:
            texts = _TEXTS[op[1]]
            ed.set_field(op[1], texts[op[2] % len(texts)])
        elif kind == "hold":
            ed.hold = op[1]
        elif kind == "add":
            ed.add_body()
        elif kind == "duplicate" and ed.body is not None:
            ed.duplicate()
        elif kind == "delete" and ed.body is not None:
            ed.delete()
        elif kind == "rename" and ed.body is not None:
            ed.rename(op[1])
        elif kind == "move" and ed.body is not None:
            ed.move(op[1])
        elif kind == "select" and n:
            ed.select(op[1] % n)
        elif kind == "show" and ed.body is not None:
            ed.set_show(op[1], op[2])
        elif kind == "undo":
            ed.undo()
    except EditRefused:
        pass


@settings(max_examples=60, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(st.lists(_EDIT, min_size=1, max_size=40))
def test_undo_all_returns_the_original_scene_and_redo_all_the_final_one(ops: list) -> None:
    start = make_scene(("A", Elements(a=10_000 * KM, e=0.2)), ("B", Elements(a=3e7, e=0.6)))
    ed = Editor(start)
    for op in ops:
        _apply(ed, op)
    final = ed.scene
    steps = 0
    while ed.undo():
        steps += 1
    assert ed.scene is start and not ed.dirty
    for _ in range(steps):
        assert ed.redo()
    assert ed.scene is final and not ed.redo()


@settings(max_examples=40, deadline=None)
@given(ops=st.lists(_OP, min_size=1, max_size=30))
def test_every_scene_the_editor_makes_is_one_the_loader_accepts(ops: list,
                                                                 tmp_path_factory) -> None:
    path = tmp_path_factory.mktemp("scene") / "s.toml"
    path.write_text(SCENE_TEXT, encoding="utf-8")  # saved by key edits of the loaded text
    ed = Editor.open(path)
    for op in ops:
        _apply(ed, op)
    ed.save()
    loaded = load_scene(path)
    assert [b.name for b in loaded.bodies] == [b.name for b in ed.scene.bodies]
    for got, want in zip(loaded.bodies, ed.scene.bodies, strict=True):
        assert float(got.elements.e) == pytest.approx(float(want.elements.e), rel=1e-12,
                                                      abs=1e-15)
        assert float(got.elements.periapsis) == pytest.approx(float(want.elements.periapsis),
                                                              rel=1e-12)
        assert got.show == want.show


def test_dirty_follows_the_saved_state_through_undo() -> None:
    ed = circle_editor(7000 * KM)
    assert not ed.dirty
    ed.set_field("e", "0.1")
    assert ed.dirty and ed.undo_label == "e of Sat"
    ed.undo()
    assert not ed.dirty and ed.redo_label == "e of Sat"
    ed.redo()
    assert ed.dirty


# --- saving ----------------------------------------------------------------------------------

SCENE_TEXT = """\
# Two satellites for the save tests.
[scene]
title = "Save test"
epoch = "2030-01-01T00:00:00 TDB"
units = { length = "km", time = "min", angle = "deg" }

[center]
name = "Earth"
preset = "earth"

[[body]]
name = "Low"   # keep this comment
a = "6778.137 km"
e = 0.001
i = "51.6 deg"

[[body]]
name = "Transfer"
periapsis = "6678 km"
apoapsis = "42164 km"   # up to geostationary
M = "10 deg"
"""


@pytest.fixture
def scene_file(tmp_path: Path) -> Path:
    p = tmp_path / "two.toml"
    p.write_text(SCENE_TEXT, encoding="utf-8")
    return p


def test_save_round_trip_keeps_comments_and_the_files_size_form(scene_file: Path) -> None:
    ed = Editor.open(scene_file)
    ed.select(1)
    ed.hold = "periapsis"
    ed.set_field("apoapsis_altitude", "1000 km")
    ed.set_show("foci", True)
    ed.select(0)
    ed.set_field("i", "28.5 deg")
    ed.save()
    text = scene_file.read_text(encoding="utf-8")
    assert "# Two satellites for the save tests." in text
    assert 'name = "Low"   # keep this comment' in text
    assert "a = " not in text.split("[[body]]")[2]  # the transfer keeps periapsis+apoapsis
    loaded = load_scene(scene_file)
    want = ed.scene
    assert float(loaded.bodies[1].elements.apoapsis) == pytest.approx(R_EARTH + 1000 * KM,
                                                                      rel=1e-13)
    assert float(loaded.bodies[0].elements.i) == pytest.approx(math.radians(28.5), rel=1e-13)
    assert float(loaded.bodies[1].elements.nu) == pytest.approx(
        float(want.bodies[1].elements.nu), rel=1e-12)
    assert loaded.bodies[1].show.foci
    assert not ed.dirty
    assert (scene_file.parent / "two.toml.bak").read_text(encoding="utf-8") == SCENE_TEXT


def test_save_round_trip_after_adding_deleting_and_reordering(scene_file: Path) -> None:
    ed = Editor.open(scene_file)
    ed.add_body()
    ed.move(0)
    ed.delete(2)
    ed.rename("Inner", 1)
    names = [b.name for b in ed.scene.bodies]
    ed.save()
    loaded = load_scene(scene_file)
    assert [b.name for b in loaded.bodies] == names
    for got, want in zip(loaded.bodies, ed.scene.bodies, strict=True):
        assert float(got.elements.a) == pytest.approx(float(want.elements.a), rel=1e-13)
    # Editing after the save still knows which table is which.
    ed.set_field("e", "0.25", 0)
    ed.save()
    assert float(load_scene(scene_file).bodies[0].elements.e) == 0.25


def test_save_as_writes_a_new_file_and_leaves_the_original(scene_file: Path) -> None:
    ed = Editor.open(scene_file)
    ed.set_field("e", "0.01", 0)
    other = scene_file.parent / "copy.toml"
    ed.save(other)
    assert scene_file.read_text(encoding="utf-8") == SCENE_TEXT
    assert float(load_scene(other).bodies[0].elements.e) == 0.01
    assert ed.path == other and not ed.dirty


def test_save_refuses_when_the_file_changed_on_disk(scene_file: Path) -> None:
    ed = Editor.open(scene_file)
    ed.set_field("e", "0.01", 0)
    scene_file.write_text(SCENE_TEXT + "\n# edited elsewhere\n", encoding="utf-8")
    with pytest.raises(UserInputError, match="changed on disk"):
        ed.save()
    assert scene_file.read_text(encoding="utf-8").endswith("# edited elsewhere\n")
    assert ed.dirty


def test_a_scene_without_a_file_needs_save_as(tmp_path: Path) -> None:
    ed = circle_editor(7000 * KM)
    with pytest.raises(EditRefused, match="save as"):
        ed.save()
    ed.save(tmp_path / "new.toml")
    assert float(load_scene(tmp_path / "new.toml").bodies[0].elements.a) == pytest.approx(
        7000 * KM, rel=1e-13)
