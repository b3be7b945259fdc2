"""Instrument files (drift.instrument): parsing, defaults, bad input, bundled instruments, joint
changes."""

import dataclasses
import tomllib

import numpy as np
import pytest

from conftest import BUNDLED, TWO_HOLE_PIPE
from drift import instrument, instrument_file, materials, pitch, thermal
from drift.errors import DriftError, InputFileError, OutOfRangeError
from drift.scale import note_to_midi


def test_minimal_file_and_defaults(write_toml):
    ins = instrument.load_instrument(
        write_toml('name = "p"\nexcitation = "reed"\n[bore]\nstations_mm = [[0, 10], [500, 10]]\n', "pipe.toml"))
    assert ins.length_m == pytest.approx(0.5)
    assert ins.reference_temperature_k == pytest.approx(293.15)
    # the reed: 1 cm³ at gamma p = 1.4 x 101325 Pa, no cavity
    assert ins.input_end.reed_compliance_m3_pa == pytest.approx(1e-6 / (1.4 * 101325.0))
    assert ins.input_end.added_volume_m3 == 0.0
    assert ins.design.a4_hz == 440.0 and ins.design.playing is False
    assert ins.design.relative_humidity == pytest.approx(0.5)
    assert ins.tuning is None and ins.material is None
    assert ins.wall_thickness_m == pytest.approx(instrument.DEFAULT_WALL)
    # no [[note]]: one fingering, every hole open
    assert ins.fingerings() == (instrument.Note(None, (), 1),)
    # no material: the wall is the excitation's default material
    assert ins.wall_material is materials.material(materials.DEFAULT_MATERIALS["reed"])


def test_full_file(two_hole_pipe):
    ins = instrument.load_instrument(two_hole_pipe)
    assert ins.hole_names == ("h1", "h2")
    assert ins.holes[1].chimney_m == pytest.approx(instrument.DEFAULT_WALL)  # chimney defaults to the wall
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
    (("position_mm = 400.0", "position_mm = 450.0"), ["pipe.toml", "'h1' and 'h2' sit at one position"]),
    (("position_mm = 400.0", "position_mm = 444.0"), ["'h2' and 'h1' overlap", "-1.50 mm", "at least 1 mm apart"]),
    (('name = "E3"', 'name = "E10"'), ["[[note]] #2 name", "octave 10 is outside -1 to 9"]),
    (("register = 1", "register = " + "9" * 400), ["register", "must be a whole number from 1 to 12"]),
    (('name = "pipe"', 'name = "pipe"\ntransposition_semitones = 2.5'), ["transposition_semitones", "-36 to 36"]),
    (('name = "pipe"', 'name = "pipe"\ntransposition_semitones = 40'), ["transposition_semitones", "whole number"]),
])
def test_bad_files_name_file_and_key(write_toml, edit, words):
    path = write_toml(TWO_HOLE_PIPE.replace(*edit, 1), "pipe.toml")
    with pytest.raises(InputFileError) as info:
        instrument.load_instrument(path)
    for word in words:
        assert word in str(info.value)


def test_unreadable_and_unknown(tmp_path, write_toml):
    with pytest.raises(InputFileError, match="no such instrument file"):
        instrument.load_instrument(tmp_path / "missing.toml")
    with pytest.raises(InputFileError, match="not valid TOML"):
        instrument.load_instrument(write_toml("name = ", "broken.toml"))
    with pytest.raises(InputFileError, match="unknown instrument 'cylindrical-red'.*did you mean 'cylindrical-reed'"):
        instrument.load_instrument("cylindrical-red")
    with pytest.raises(InputFileError, match="material"):
        instrument.load_instrument(write_toml(
            TWO_HOLE_PIPE.replace('excitation = "reed"', 'excitation = "reed"\nmaterial = "cheese"'), "pipe.toml"))


def test_bundled_instruments(bundled_instruments):
    listed = instrument.bundled_instruments()
    assert [i.name for i in listed] == list(BUNDLED)
    assert all("Invented" in i.description for i in listed)
    for ins in listed:
        assert ins.name in bundled_instruments
        assert ins.tuning is not None and ins.material is not None
        assert ins.design.a4_hz == 440.0
    assert instrument.DEFAULT_INSTRUMENT in BUNDLED


#: The open notes of the brass instruments by register (sounding): an instrument in B-flat, the
#: valved one an octave above the slide one (common practice).
VALVED_OPEN = {2: "Bb3", 3: "F4", 4: "Bb4", 5: "D5", 6: "F5", 8: "Bb5"}
SLIDE_OPEN = {2: "Bb2", 3: "F3", 4: "Bb3", 5: "D4", 6: "F4"}


def test_bundled_instruments_meet_their_brief(bundled_instruments):
    a, b, c = (bundled_instruments[n] for n in ("cylindrical-reed", "conical-reed", "side-blown-flute"))
    assert 0.60 <= a.length_m <= 0.67 and len(a.notes) >= 18 and {n.register for n in a.notes} == {1, 2}
    assert 0.65 <= b.length_m <= 0.75 and len(b.notes) >= 18 and {n.register for n in b.notes} == {1, 2}
    assert 0.60 <= c.length_m <= 0.66 and len(c.notes) >= 14 and c.excitation == "jet"
    assert a.stations_m[-1, 1] > a.stations_m[0, 1]  # a bell flare
    # the families of issue 15: a double reed, a duct flute, valved and slide brass
    reed, duct, slide, valved = (bundled_instruments[n] for n in ("double-reed", "duct-flute", "slide-brass",
                                                                  "valved-brass"))
    assert reed.excitation == "reed" and reed.stations_m[-1, 1] > 5 * reed.stations_m[0, 1]   # conical
    assert duct.excitation == "jet" and duct.input_end.embouchure_position_m == 0.0          # end-blown
    assert valved.excitation == "lips" and len(valved.valves) == 3 and valved.transposition_semitones == 2
    assert slide.excitation == "lips" and len(slide.slide.positions_m) == 7
    # the brass play their normal range, every chromatic note once (common practice): valved from
    # register 2 on all three valves to register 8 open (register 7 unused), slide from register
    # 2 in the seventh position to register 6 open
    for ins, low, high, registers in ((valved, "E3", "Bb5", {2, 3, 4, 5, 6, 8}),
                                      (slide, "E2", "F4", {2, 3, 4, 5, 6})):
        midi = sorted(note_to_midi(n.name) for n in ins.notes)
        assert midi == list(range(note_to_midi(low), note_to_midi(high) + 1))
        assert {n.register for n in ins.notes} == registers
    # each note in the usual fingering: the open note of its register lowered by the fingering's
    # semitones (2: one, 1: two, 1+2: three, 2+3: four, 1+3: five, 1+2+3: six), or by a
    # semitone a slide position (common practice)
    lowered = {(): 0, ("v2",): 1, ("v1",): 2, ("v1", "v2"): 3, ("v2", "v3"): 4, ("v1", "v3"): 5,
               ("v1", "v2", "v3"): 6}
    for ins, opens, steps in ((valved, VALVED_OPEN, lambda n: lowered[tuple(sorted(n.valves))]),
                              (slide, SLIDE_OPEN, lambda n: slide.slide.positions_m.index(n.slide_m))):
        for n in ins.notes:
            assert note_to_midi(opens[n.register]) - note_to_midi(n.name) == steps(n), n
    assert {tuple(sorted(n.valves)) for n in valved.notes} == set(lowered)
    assert {n.slide_m for n in slide.notes} == set(slide.slide.positions_m)
    # the third loop a little longer than the first and second together, so that 2+3 and 1+3
    # are not too sharp (common practice)
    loop = {v.name: v.loop_length_m for v in valved.valves}
    assert loop["v2"] < loop["v1"] < loop["v1"] + loop["v2"] < loop["v3"]


def test_joint_change(two_hole_pipe):
    ins = instrument.load_instrument(two_hole_pipe)
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


def test_length_change_refuses_to_cut_a_hole(two_hole_pipe):
    ins = instrument.load_instrument(two_hole_pipe)
    with pytest.raises(OutOfRangeError, match="would cut hole h2"):
        ins.with_length_change(0.39, -0.02)
    with pytest.raises(OutOfRangeError, match="cannot remove"):
        ins.with_length_change(0.5, -0.2)
    assert ins.with_length_change(0.2, 0.0) is ins


def test_lengthening_lowers_the_pitch(two_hole_pipe):
    ins = instrument.load_instrument(two_hole_pipe)
    profile = thermal.design_profile(ins)
    f0 = [n.frequency_hz for n in pitch.note_frequencies(ins, profile)]
    f1 = [n.frequency_hz for n in pitch.note_frequencies(ins.with_joint_change(0.005), profile)]
    assert all(b < a for a, b in zip(f0, f1))


def test_toml_round_trip(bundled_instruments):
    for ins in bundled_instruments.values():
        again = instrument.parse_instrument(tomllib.loads(instrument_file.to_toml(ins)), "again")
        assert np.allclose(again.stations_m, ins.stations_m, atol=1e-6)
        assert again.notes == ins.notes and again.design == ins.design and again.tuning == ins.tuning
        assert [h.name for h in again.holes] == [h.name for h in ins.holes]
        assert np.allclose([h.position_m for h in again.holes], [h.position_m for h in ins.holes], atol=1e-6)


def test_transposition_is_read_and_written(write_toml):
    path = write_toml(TWO_HOLE_PIPE.replace('name = "pipe"', 'name = "pipe"\ntransposition_semitones = -3', 1))
    ins = instrument.load_instrument(path)
    assert ins.transposition_semitones == -3
    assert instrument.parse_instrument(tomllib.loads(instrument_file.to_toml(ins))).transposition_semitones == -3
    assert instrument.load_instrument(write_toml(TWO_HOLE_PIPE, "plain.toml")).transposition_semitones == 0


def test_design_room_and_lip_and_jet_defaults(write_toml):
    lips = instrument.load_instrument(write_toml(
        'name = "l"\nexcitation = "lips"\n[bore]\nstations_mm = [[0, 12], [1000, 12]]\n'
        '[design]\ntemperature_c = 25\nrelative_humidity_pct = 30\n', "l.toml"))
    room = lips.design.room()
    assert room.temperature_k == pytest.approx(298.15) and room.relative_humidity == pytest.approx(0.3)
    assert lips.input_end.throat_diameter_m == pytest.approx(instrument.DEFAULT_THROAT_DIAMETER)
    assert lips.wall_material.name == materials.DEFAULT_MATERIALS["lips"]
    # A jet's default embouchure is capped at the local bore diameter.
    jet = instrument.load_instrument(write_toml(
        'name = "j"\nexcitation = "jet"\n[bore]\nstations_mm = [[0, 8], [600, 8]]\n'
        '[input]\nembouchure_position_mm = 17\n', "j.toml"))
    assert jet.input_end.embouchure_diameter_m == pytest.approx(0.008)
    assert jet.input_end.lip_cover == pytest.approx(instrument.DEFAULT_LIP_COVER)
    assert jet.wall_material.name == materials.DEFAULT_MATERIALS["jet"]
    changed = dataclasses.replace(jet, material="abs")
    assert changed.wall_material.name == "abs"


@pytest.mark.parametrize("extra, words", [
    ("lip_cover_pct = 80", ["j.toml", "lip_cover_pct", "0 to 70"]),
    ("lip_cover_pct = 30\nembouchure_outer_correction_mm = 4", ["lip_cover_pct", "embouchure_outer_correction_mm",
                                                                 "give one"]),
])
def test_lip_cover_is_checked(write_toml, extra, words):
    path = write_toml('name = "j"\nexcitation = "jet"\n[bore]\nstations_mm = [[0, 19], [600, 19]]\n'
                      f'[input]\nembouchure_position_mm = 17\n{extra}\n', "j.toml")
    with pytest.raises(InputFileError) as info:
        instrument.load_instrument(path)
    for word in words:
        assert word in str(info.value)
