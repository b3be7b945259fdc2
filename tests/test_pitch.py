"""Playing frequencies (drift.pitch): the bundled instruments, air and wall effects, the resonance
search."""

import math

import numpy as np
import pytest

from conftest import BUNDLED
from drift import pitch
from drift.climate import Room
from drift.instrument import load_instrument
from drift.scale import cents, note_to_midi
from drift.bore_state import BoreProfile
from drift.thermal import design_profile
from references import nearest_note


def test_bundled_instruments_in_equal_temperament_at_design(design_notes):
    # The layouts were tuned to A4 = 440 Hz (ISO 16) at their [design] condition: every note
    # within +-10 cent of equal temperament there.
    assert sorted(design_notes) == sorted(BUNDLED)
    for name, (ins, notes) in design_notes.items():
        assert len(notes) == len(ins.notes)
        dev = np.array([n.deviation_cents for n in notes])
        assert np.all(np.isfinite(dev)), name
        assert np.max(np.abs(dev)) <= 10.0, (name, dev)


def test_cylinder_reed_sounds_lower_than_longer_cone(design_notes):
    # Common practice (fact of the trade): a cylindrical reed instrument about 66 cm long sounds
    # its lowest note near D3, lower than a conical reed instrument about 71 cm long whose lowest
    # note is near Ab3 -- the closed cylinder's fundamental has lambda = 4L, the cone's 2L.
    cyl, cone = design_notes["cylindrical-reed"], design_notes["conical-reed"]
    low_cyl = min(n.frequency_hz for n in cyl[1])
    low_cone = min(n.frequency_hz for n in cone[1])
    assert nearest_note(low_cyl) == "D3"
    assert nearest_note(low_cone) == "Ab3"
    assert cyl[0].length_m < cone[0].length_m and low_cyl < low_cone


def test_registers_overblow_at_twelfth_and_octave(design_notes):
    # Benade (1976): the closed cylinder's second register is the third harmonic (a twelfth, 1902
    # cent), the cone's the second (an octave); the first fingering of each register differs so.
    for name, interval in (("cylindrical-reed", 19), ("conical-reed", 12), ("side-blown-flute", 12)):
        ins, notes = design_notes[name]
        low = next(n for n in notes if n.register == 1)
        high = next(n for n in notes if n.register == 2)
        assert note_to_midi(high.note) - note_to_midi(low.note) == interval
        assert abs(cents(high.frequency_hz, low.frequency_hz) - 100 * interval) < 20


def test_warmer_air_raises_every_note(bundled_instruments):
    # c ~ sqrt(T): from 20 to 30 °C about +29 cent (Fletcher & Rossing 1998, Sec. 8.1); wall
    # expansion and losses change it by a cent or two.
    ins = bundled_instruments["cylindrical-reed"]
    cool = pitch.note_frequencies(ins, BoreProfile.uniform(Room(293.15, relative_humidity=0.5)))
    warm = pitch.note_frequencies(ins, BoreProfile.uniform(Room(303.15, relative_humidity=0.5)))
    shift = np.array([cents(w.frequency_hz, c.frequency_hz) for w, c in zip(warm, cool)])
    assert np.all((shift > 24) & (shift < 34))


def test_wall_expansion_lowers_pitch_by_alpha(bundled_instruments):
    # A bore uniformly expanded by (1 + alpha dT) at unchanged air plays lower by that factor
    # (dimensional scaling, lossless), i.e. -1200 log2(1 + alpha dT) cent.
    ins = bundled_instruments["conical-reed"]
    room = Room(293.15, relative_humidity=0.5)
    t = np.array([room.temperature_k])
    plain = BoreProfile(room, np.array([0.0]), t, np.array([0.0]), t)
    hot_wall = BoreProfile(room, np.array([0.0]), t, np.array([0.0]), t + 40.0)
    alpha = ins.wall_material.expansion_per_k
    f0 = pitch.note_frequencies(ins, plain, lossless=True)
    f1 = pitch.note_frequencies(ins, hot_wall, lossless=True)
    shift = np.array([cents(b.frequency_hz, a.frequency_hz) for a, b in zip(f0, f1)])
    assert np.allclose(shift, -1200 * math.log2(1 + alpha * 40.0), atol=1e-3)


def test_resonances_and_unnamed_fingering(write_toml):
    ins = load_instrument(write_toml('name = "p"\nexcitation = "reed"\n[bore]\nstations_mm = [[0, 12], [400, 12]]\n',
                                     "p.toml"))
    found = pitch.find_resonances(ins, design_profile(ins), count=4)
    res = found.frequencies_hz
    assert len(res) == 1 and len(res[0]) == 4 and np.all(np.diff(res[0]) > 0)
    assert found.instrument == "p" and found.notes == ins.fingerings()
    (note,) = pitch.note_frequencies(ins, design_profile(ins))
    assert note.note is None and note.register is None and note.frequency_hz == pytest.approx(res[0][0])
    # A room fills the bore with its air, walls at its temperature: the same as its uniform profile.
    room = ins.design.room()
    np.testing.assert_array_equal(pitch.find_resonances(ins, room, count=4).frequencies_hz[0],
                                  pitch.find_resonances(ins, BoreProfile.uniform(room), count=4).frequencies_hz[0])


def test_refinement_reaches_hundredth_of_a_cent(bundled_instruments, design_profiles):
    # The bracketed refinement must locate each peak to < 0.01 cent: evaluating |Z| a hundredth
    # of a cent to either side gives smaller values.
    ins = bundled_instruments["cylindrical-reed"]
    profile = design_profiles["cylindrical-reed"]
    net = pitch.bore_network(ins, profile)
    notes = pitch.note_frequencies(ins, profile, network=net)
    mask = ins.open_mask()
    step = 2 ** (0.01 / 1200)
    for i, n in enumerate(notes):
        f = np.array([n.frequency_hz / step, n.frequency_hz, n.frequency_hz * step])
        z = np.abs(net.impedance(f, mask[i:i + 1]))[0]
        assert z[1] > z[0] and z[1] > z[2]
