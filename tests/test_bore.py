"""Instrument files, discretisation, joint changes and thermal expansion."""

import numpy as np
import pytest

from drift import bore, pitch
from drift.errors import DriftError, InputFileError, OutOfRangeError

BASE = """
name = "pipe"
excitation = "reed"
[bore]
stations_mm = [[0, 15], [300, 15], [600, 20]]
[[hole]]
name = "h1"
position_mm = 450.0
diameter_mm = 8.0
chimney_mm = 4.0
[[hole]]
name = "h2"
position_mm = 400.0
diameter_mm = 7.0
[[note]]
name = "D3"
closed = ["h1", "h2"]
[[note]]
name = "E3"
closed = ["h2"]
register = 1
[tuning]
position_mm = 100.0
"""


def write(tmp_path, text, name="pipe.toml"):
    path = tmp_path / name
    path.write_text(text, encoding="utf-8")
    return path


def test_minimal_file_and_defaults(tmp_path):
    ins = bore.load_instrument(write(tmp_path, 'name = "p"\nexcitation = "reed"\n[bore]\nstations_mm = [[0, 10], [500, 10]]\n'))
    assert ins.length_m == pytest.approx(0.5)
    assert ins.reference_temperature_k == pytest.approx(293.15)
    assert ins.input_end.added_volume_m3 == pytest.approx(1e-6)
    assert ins.design.a4_hz == 440.0 and ins.design.playing is False
    assert ins.design.relative_humidity == pytest.approx(0.5)
    assert ins.tuning is None and ins.material is None
    assert ins.wall_thickness_m == pytest.approx(bore.DEFAULT_WALL)
    # no [[note]]: one fingering, every hole open
    assert ins.fingerings() == (bore.Note(None, (), 1),)


def test_full_file(tmp_path):
    ins = bore.load_instrument(write(tmp_path, BASE))
    assert ins.hole_names == ("h1", "h2")
    assert ins.holes[1].chimney_m == pytest.approx(bore.DEFAULT_WALL)  # chimney defaults to the wall
    assert ins.open_mask().tolist() == [[False, False], [True, False]]
    assert ins.tuning.position_m == pytest.approx(0.1)
    assert ins.tuning.min_change_m == pytest.approx(-0.002)


@pytest.mark.parametrize("edit, words", [
    (("position_mm = 450.0", "positon_mm = 450.0"), ["pipe.toml", "positon_mm", "did you mean 'position_mm'"]),
    (('excitation = "reed"', 'excitation = "bow"'), ["excitation", "reed, lips, jet"]),
    (('closed = ["h2"]', 'closed = ["h3"]'), ["closed", "h3", "holes: h1, h2"]),
    (('name = "E3"', 'name = "H3"'), ["[[note]] #2 name", "scientific pitch"]),
    (("[[0, 15], [300, 15]", "[[0, 15], [0, 15]"), ["stations_mm", "increase"]),
    (("diameter_mm = 8.0", "diameter_mm = 30.0"), ["diameter_mm", "at most the bore"]),
    (("register = 1", "register = 0"), ["register", "1 to 12"]),
    (("position_mm = 100.0", "position_mm = 450.0"), ["[tuning] position_mm", "within hole h1"]),
    (('name = "pipe"', 'nme = "pipe"'), ["nme", "did you mean 'name'"]),
])
def test_bad_files_name_file_and_key(tmp_path, edit, words):
    path = write(tmp_path, BASE.replace(*edit, 1))
    with pytest.raises(InputFileError) as info:
        bore.load_instrument(path)
    for word in words:
        assert word in str(info.value)


def test_unreadable_and_unknown(tmp_path):
    with pytest.raises(InputFileError, match="no such instrument file"):
        bore.load_instrument(tmp_path / "missing.toml")
    with pytest.raises(InputFileError, match="not valid TOML"):
        bore.load_instrument(write(tmp_path, "name = ", "broken.toml"))
    with pytest.raises(InputFileError, match="unknown instrument 'cylindrical-red'.*did you mean 'cylindrical-reed'"):
        bore.load_instrument("cylindrical-red")
    with pytest.raises(InputFileError, match="material"):
        bore.load_instrument(write(tmp_path, BASE.replace('excitation = "reed"', 'excitation = "reed"\nmaterial = "cheese"')))


def test_bundled_instruments():
    listed = dict(bore.bundled_instruments())
    assert set(listed) == {"cylindrical-reed", "conical-reed", "side-blown-flute"}
    assert all("Invented" in d for d in listed.values())
    for name in listed:
        ins = bore.load_instrument(name)
        assert ins.name == name and ins.tuning is not None and ins.material is not None
        assert ins.design.a4_hz == 440.0


def test_bundled_instruments_meet_their_brief():
    a, b, c = (bore.load_instrument(n) for n in ("cylindrical-reed", "conical-reed", "side-blown-flute"))
    assert 0.60 <= a.length_m <= 0.67 and len(a.notes) >= 18 and {n.register for n in a.notes} == {1, 2}
    assert 0.65 <= b.length_m <= 0.75 and len(b.notes) >= 18 and {n.register for n in b.notes} == {1, 2}
    assert 0.60 <= c.length_m <= 0.66 and len(c.notes) >= 14 and c.excitation == "jet"
    assert a.stations_m[-1, 1] > a.stations_m[0, 1]  # a bell flare


def test_discretise_splits_at_holes_and_keeps_length(tmp_path):
    ins = bore.load_instrument(write(tmp_path, BASE))
    seg = ins.segments(0.02)
    assert np.all(seg.length_m <= 0.02 + 1e-12)
    assert seg.start_m[-1] + seg.length_m[-1] == pytest.approx(0.6)
    assert np.allclose(seg.start_m[seg.hole_segment], [0.45, 0.4])
    assert np.allclose(seg.radius_in_m[1:], seg.radius_out_m[:-1])
    assert seg.hole_bore_radius_m[0] == pytest.approx(float(ins.diameter_at(0.45)) / 2)


def test_joint_change(tmp_path):
    ins = bore.load_instrument(write(tmp_path, BASE))
    longer = ins.with_joint_change(0.004)
    assert longer.length_m == pytest.approx(0.604)
    assert longer.holes[0].position_m == pytest.approx(0.454)
    shorter = ins.with_joint_change(-0.002)
    assert shorter.length_m == pytest.approx(0.598)
    assert np.allclose(shorter.diameter_at([0.05, 0.5]), ins.diameter_at([0.05, 0.502]))
    with pytest.raises(OutOfRangeError, match="outside the allowed range -2 to 6 mm"):
        ins.with_joint_change(0.01)
    with pytest.raises(DriftError, match="no \\[tuning\\] joint"):
        ins.__class__(**{**ins.__dict__, "tuning": None}).with_joint_change(0.001)


def test_lengthening_lowers_the_pitch(tmp_path):
    ins = bore.load_instrument(write(tmp_path, BASE))
    profile = pitch.design_profile(ins)
    f0 = [n.frequency_hz for n in pitch.note_frequencies(ins, profile)]
    f1 = [n.frequency_hz for n in pitch.note_frequencies(ins.with_joint_change(0.005), profile)]
    assert all(b < a for a, b in zip(f0, f1))


def test_expansion_scales_positions_and_diameters(tmp_path):
    ins = bore.load_instrument(write(tmp_path, BASE))
    seg = ins.segments()
    alpha, dT = 20e-6, 30.0
    k = bore.expansion_factors(np.full(seg.n, 293.15 + dT), alpha)
    assert k[0] == pytest.approx(1 + alpha * dT)
    kh = bore.expansion_factors(np.full(2, 293.15 + dT), alpha)
    big = seg.expanded(k, k, kh, kh)
    end = big.start_m[-1] + big.length_m[-1]
    assert end == pytest.approx(0.6 * (1 + alpha * dT), rel=1e-12)
    assert np.allclose(big.hole_position_m, seg.hole_position_m * (1 + alpha * dT))
    assert np.allclose(big.hole_radius_m, seg.hole_radius_m * (1 + alpha * dT))
    assert np.allclose(big.radius_in_m, seg.radius_in_m * (1 + alpha * dT))


def test_toml_round_trip():
    for name, _ in bore.bundled_instruments():
        ins = bore.load_instrument(name)
        again = bore.parse_instrument(__import__("tomllib").loads(bore.to_toml(ins)), "again")
        assert np.allclose(again.stations_m, ins.stations_m, atol=1e-6)
        assert again.notes == ins.notes and again.design == ins.design and again.tuning == ins.tuning
        assert [h.name for h in again.holes] == [h.name for h in ins.holes]
        assert np.allclose([h.position_m for h in again.holes], [h.position_m for h in ins.holes], atol=1e-6)
