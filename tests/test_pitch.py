"""Note names, equal temperament and the playing frequencies of the bundled instruments."""

import math

import numpy as np
import pytest

from drift import air, bore, layout, pitch


def test_note_names():
    # MIDI numbering: A4 = 69, middle C = C4 = 60 (MIDI 1.0 specification; ISO 16 for A4 = 440 Hz).
    assert pitch.note_to_midi("A4") == 69
    assert pitch.note_to_midi("C4") == 60
    assert pitch.note_to_midi("Bb3") == pitch.note_to_midi("A#3") == 58
    assert pitch.note_to_midi("Cb4") == 59 and pitch.note_to_midi("B#3") == 60
    assert pitch.note_to_midi("C-1") == 0
    assert [pitch.midi_to_note(m) for m in (69, 61, 70, 56)] == ["A4", "C#4", "Bb4", "Ab3"]
    for bad in ("H4", "A", "4A", "A#b#4", ""):
        with pytest.raises(ValueError):
            pitch.note_to_midi(bad)


def test_equal_temperament_and_cents():
    assert pitch.equal_temperament_hz("A4") == pytest.approx(440.0)
    # Middle C at A4 = 440 Hz is 261.626 Hz (standard tables, e.g. Fletcher & Rossing 1998, App.)
    assert pitch.equal_temperament_hz("C4") == pytest.approx(261.6256, abs=1e-4)
    assert pitch.equal_temperament_hz("A4", a4_hz=442.0) == pytest.approx(442.0)
    assert pitch.cents(880.0, 440.0) == pytest.approx(1200.0)
    assert pitch.cents(pitch.from_cents(300.0, 17.0), 300.0) == pytest.approx(17.0)
    assert np.isnan(pitch.cents(np.nan, 440.0))
    assert pitch.nearest_note(446.0) == ("A4", pytest.approx(1200 * math.log2(446 / 440)))


@pytest.fixture(scope="module")
def bundled():
    out = {}
    for name, _ in bore.bundled_instruments():
        ins = bore.load_instrument(name)
        out[name] = (ins, pitch.note_frequencies(ins, pitch.design_profile(ins)))
    return out


def test_bundled_instruments_in_equal_temperament_at_design(bundled):
    # The layouts were tuned to A4 = 440 Hz (ISO 16) at their [design] condition: every note
    # within +-10 cent of equal temperament there.
    for name, (ins, notes) in bundled.items():
        assert len(notes) == len(ins.notes)
        dev = np.array([n.deviation_cents for n in notes])
        assert np.all(np.isfinite(dev)), name
        assert np.max(np.abs(dev)) <= 10.0, (name, dev)


def test_cylinder_reed_sounds_lower_than_longer_cone(bundled):
    # Common practice (fact of the trade): a cylindrical reed instrument about 66 cm long sounds
    # its lowest note near D3, lower than a conical reed instrument about 71 cm long whose lowest
    # note is near Ab3 -- the closed cylinder's fundamental has lambda = 4L, the cone's 2L.
    cyl, cone = bundled["cylindrical-reed"], bundled["conical-reed"]
    low_cyl = min(n.frequency_hz for n in cyl[1])
    low_cone = min(n.frequency_hz for n in cone[1])
    assert pitch.nearest_note(low_cyl)[0] == "D3"
    assert pitch.nearest_note(low_cone)[0] == "Ab3"
    assert cyl[0].length_m < cone[0].length_m and low_cyl < low_cone


def test_registers_overblow_at_twelfth_and_octave(bundled):
    # Benade (1976): the closed cylinder's second register is the third harmonic (a twelfth, 1902
    # cent), the cone's the second (an octave); the first fingering of each register differs so.
    for name, interval in (("cylindrical-reed", 19), ("conical-reed", 12), ("side-blown-flute", 12)):
        ins, notes = bundled[name]
        low = next(n for n in notes if n.register == 1)
        high = next(n for n in notes if n.register == 2)
        assert pitch.note_to_midi(high.note) - pitch.note_to_midi(low.note) == interval
        assert abs(pitch.cents(high.frequency_hz, low.frequency_hz) - 100 * interval) < 20


def test_warmer_air_raises_every_note():
    # c ~ sqrt(T): from 20 to 30 °C about +29 cent (Fletcher & Rossing 1998, Sec. 8.1); wall
    # expansion and losses change it by a cent or two.
    ins = bore.load_instrument("cylindrical-reed")
    cool = pitch.note_frequencies(ins, air.BoreProfile.uniform(air.Room(293.15, relative_humidity=0.5)))
    warm = pitch.note_frequencies(ins, air.BoreProfile.uniform(air.Room(303.15, relative_humidity=0.5)))
    shift = np.array([pitch.cents(w.frequency_hz, c.frequency_hz) for w, c in zip(warm, cool)])
    assert np.all((shift > 24) & (shift < 34))


def test_wall_expansion_lowers_pitch_by_alpha():
    # A bore uniformly expanded by (1 + alpha dT) at unchanged air plays lower by that factor
    # (dimensional scaling, lossless), i.e. -1200 log2(1 + alpha dT) cent.
    ins = bore.load_instrument("conical-reed")
    room = air.Room(293.15, relative_humidity=0.5)
    t = np.array([room.temperature_k])
    plain = air.BoreProfile(room, np.array([0.0]), t, np.array([0.0]), t)
    hot_wall = air.BoreProfile(room, np.array([0.0]), t, np.array([0.0]), t + 40.0)
    from drift import thermal

    alpha = thermal.material(ins.material).expansion_per_k
    f0 = pitch.note_frequencies(ins, plain, lossless=True)
    f1 = pitch.note_frequencies(ins, hot_wall, lossless=True)
    shift = np.array([pitch.cents(b.frequency_hz, a.frequency_hz) for a, b in zip(f0, f1)])
    assert np.allclose(shift, -1200 * math.log2(1 + alpha * 40.0), atol=1e-3)


def test_resonances_and_unnamed_fingering(tmp_path):
    path = tmp_path / "p.toml"
    path.write_text('name = "p"\nexcitation = "reed"\n[bore]\nstations_mm = [[0, 12], [400, 12]]\n')
    ins = bore.load_instrument(path)
    res = pitch.resonances(ins, pitch.design_profile(ins), count=4)
    assert len(res) == 1 and len(res[0]) == 4 and np.all(np.diff(res[0]) > 0)
    (note,) = pitch.note_frequencies(ins, pitch.design_profile(ins))
    assert note.note is None and note.register is None and note.frequency_hz == pytest.approx(res[0][0])


def test_refinement_reaches_hundredth_of_a_cent():
    # The bracketed refinement must locate each peak to < 0.01 cent: evaluating |Z| a hundredth
    # of a cent to either side gives smaller values.
    ins = bore.load_instrument("cylindrical-reed")
    profile = pitch.design_profile(ins)
    net = pitch.bore_network(ins, profile)
    notes = pitch.note_frequencies(ins, profile, network=net)
    mask = ins.open_mask()
    for i, n in enumerate(notes):
        f = np.array([pitch.from_cents(n.frequency_hz, -0.01), n.frequency_hz, pitch.from_cents(n.frequency_hz, 0.01)])
        z = np.abs(net.impedance(f, mask[i:i + 1]))[0]
        assert z[1] > z[0] and z[1] > z[2]


def test_played_design_profile_comes_from_the_thermal_model():
    # A design condition "while played" fills the bore with warm breath: every note sounds higher
    # than with the bore at rest in the same room (c rises with temperature, Fletcher & Rossing
    # 1998, Sec. 8.1).
    import dataclasses

    base = bore.load_instrument("cylindrical-reed")
    ins = dataclasses.replace(base, design=dataclasses.replace(base.design, playing=False))
    played = dataclasses.replace(base, design=dataclasses.replace(base.design, playing=True))
    profile = pitch.design_profile(played)
    assert np.max(profile.temperature_k) > ins.design.temperature_k + 1.0
    rest = pitch.note_frequencies(ins, pitch.design_profile(ins))
    warm = pitch.note_frequencies(played, profile)
    assert all(w.frequency_hz > r.frequency_hz for w, r in zip(warm, rest))


def test_layout_solver_retunes_for_another_design_temperature():
    # The reusable solver: move the side-blown flute's (played) design from 22 to 28 °C;
    # re-solving must bring all notes back within 10 cent (they start about +17 cent sharp).
    import dataclasses

    ins = bore.load_instrument("side-blown-flute")
    hotter = dataclasses.replace(ins, design=dataclasses.replace(ins.design, temperature_k=301.15))
    warm = pitch.design_profile(hotter)
    shift = layout.deviations(ins, warm) - layout.deviations(ins)
    assert np.min(shift) > 10
    result = layout.tune_layout(ins, warm, length_change_at_m=0.55, max_nfev=30)
    assert result.worst_cents <= 10.0
    assert result.instrument.length_m > ins.length_m
