"""Note names, equal temperament and cents (drift.scale)."""

import numpy as np
import pytest

from drift import scale


def test_note_names(outside):
    # MIDI numbering: A4 = 69, middle C = C4 = 60 (MIDI 1.0 specification; ISO 16 for A4 = 440 Hz).
    outside.check([scale.note_to_midi("A4"), scale.note_to_midi("C4")], [69, 60],
                  quantity="MIDI note numbers of A4 and C4", source="MIDI 1.0 specification", abs=0.0)
    assert scale.note_to_midi("Bb3") == scale.note_to_midi("A#3") == 58
    assert scale.note_to_midi("Cb4") == 59 and scale.note_to_midi("B#3") == 60
    assert scale.note_to_midi("C-1") == 0
    assert [scale.note_to_midi(n) for n in ("A4", "C#4", "Bb4", "Ab3")] == [69, 61, 70, 56]
    for bad in ("H4", "A", "4A", "A#b#4", ""):
        with pytest.raises(ValueError):
            scale.note_to_midi(bad)


def test_note_name_spellings_and_parse_errors():
    # Double accidentals, the musical sharp and flat signs, and lower-case letters (common practice).
    assert scale.note_to_midi("F##4") == scale.note_to_midi("G4") == 67
    assert scale.note_to_midi("Dbb4") == scale.note_to_midi("C4")
    assert scale.note_to_midi("C♯4") == 61 and scale.note_to_midi("B♭3") == 58
    assert scale.note_to_midi("a4") == 69 and scale.note_to_midi(" A4 ") == 69
    for bad in ("A###4", "A4.5", "A 4", "Ab", "A4b", "X#3", None):
        with pytest.raises(ValueError, match="scientific pitch notation"):
            scale.note_to_midi(bad)


def test_equal_temperament_and_cents(outside):
    outside.check(scale.equal_temperament_hz("A4"), 440.0, quantity="frequency of A4 at standard pitch",
                  source="ISO 16:1975", rel=1e-6, unit="Hz")
    # Middle C at A4 = 440 Hz is 261.626 Hz (standard tables, e.g. Fletcher & Rossing 1998, App.)
    outside.check(scale.equal_temperament_hz("C4"), 261.6256, quantity="equal-tempered frequency of C4, A4 = 440 Hz",
                  source="standard tables, e.g. Fletcher & Rossing (1998), Appendix", abs=1e-4, unit="Hz")
    assert scale.equal_temperament_hz("A4", a4_hz=442.0) == pytest.approx(442.0)
    assert scale.cents(880.0, 440.0) == pytest.approx(1200.0)
    assert scale.cents(300.0 * 2 ** (17.0 / 1200), 300.0) == pytest.approx(17.0)
    assert np.isnan(scale.cents(np.nan, 440.0))


def test_octaves_and_semitones_written_independently(outside):
    # Twelve-tone equal temperament: f = 440 * 2^(n/12) Hz for n semitones from A4 (ISO 16:1975;
    # common practice). A3 = 220 Hz, A5 = 880 Hz, and C4 = 440 * 2^(-9/12) = 261.6256 Hz (from
    # memory, as printed in tuning tables).
    outside.check([scale.equal_temperament_hz(n) for n in ("A3", "A5", "C4")],
                  [220.0, 880.0, 440.0 * 2 ** (-9 / 12)], quantity="equal-tempered frequencies of A3, A5 and C4",
                  source="f = 440 * 2^(n/12) Hz, ISO 16:1975 (common practice); C4 as printed in tuning tables "
                  "(from memory)", rel=1e-12, unit="Hz")
    # MIDI numbers as an array: one octave either side of A4.
    np.testing.assert_allclose(scale.equal_temperament_hz(np.array([57, 69, 81])), [220.0, 440.0, 880.0])
    # A semitone is 100 cents; an equal-tempered fifth 700.
    assert scale.cents(scale.equal_temperament_hz("A#4"), 440.0) == pytest.approx(100.0)
    assert scale.cents(scale.equal_temperament_hz("E5"), 440.0) == pytest.approx(700.0)
    np.testing.assert_allclose(scale.cents([440.0, 880.0], [220.0, 440.0]), [1200.0, 1200.0])


@pytest.mark.parametrize("transposition, key, pairs", [
    # In B♭ (clarinet, trumpet): written a major second above the sound (common practice).
    (2, "Bb", [("Bb3", "C4"), ("Eb4", "F4"), ("A4", "B4"), ("F#4", "G#4"), ("C5", "D5"), ("D3", "E3")]),
    # In E♭, written a minor third below the sound (E♭ soprano clarinet; common practice).
    (-3, "Eb", [("Eb5", "C5"), ("C5", "A4"), ("G4", "E4"), ("Bb4", "G4"), ("F#5", "D#5")]),
    # In F (horn): written a perfect fifth above the sound (common practice).
    (7, "F", [("F3", "C4"), ("Bb3", "F4"), ("A4", "E5"), ("C#4", "G#4"), ("Eb4", "Bb4")]),
    # In E♭, written a major sixth above the sound (alto saxophone; common practice).
    (9, "Eb", [("Eb4", "C5"), ("Db4", "Bb4"), ("A3", "F#4")]),
])
def test_written_names_of_transposing_instruments(transposition, key, pairs):
    for sounding, written in pairs:
        assert scale.written_name(sounding, transposition) == written, (sounding, transposition)
        assert scale.note_to_midi(written) - scale.note_to_midi(sounding) == transposition
    assert scale.key_name(transposition) == key


def test_written_names_at_concert_pitch_and_in_unicode():
    assert scale.written_name("F#4", 0) == "F#4"
    assert scale.written_name("B♭3", 2) == "C4"
    assert scale.written_name("Bb3", 14) == "C5"
    assert scale.key_name(0) == "C"
    # every pitch of two octaves, in every transposition of an octave either way: the written
    # name is the sounding pitch moved by the interval, with at most two accidentals
    for midi in range(48, 72):
        name = ("C", "C#", "D", "Eb", "E", "F", "F#", "G", "Ab", "A", "Bb", "B")[midi % 12] + str(midi // 12 - 1)
        for t in range(-12, 13):
            written = scale.written_name(name, t)
            assert scale.note_to_midi(written) == midi + t, (name, t, written)
