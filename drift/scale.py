"""Note names, twelve-tone equal temperament and intervals in cents.

Notes are named in scientific pitch notation (C4 is middle C, A4 the tuning note); equal
temperament divides the octave into twelve equal semitones of 100 cents from A4 (ISO 16:1975:
A4 = 440 Hz unless another reference is given).

References
----------
ISO 16:1975. Acoustics - Standard tuning frequency (standard musical pitch): A4 = 440 Hz.
"""

from __future__ import annotations

import re

import numpy as np

from drift.constants import A4_HZ

_NOTE = re.compile(r"^([A-Ga-g])([#b♯♭]{0,2})(-?\d+)$")
_STEPS = {"C": 0, "D": 2, "E": 4, "F": 5, "G": 7, "A": 9, "B": 11}
#: Octaves of note names accepted: C-1 (8.2 Hz) to B9 (15.8 kHz), the MIDI range and a little more.
LOWEST_OCTAVE, HIGHEST_OCTAVE = -1, 9


def note_to_midi(name: str) -> int:
    """MIDI number of a note in scientific pitch notation ("A4" -> 69, "Bb3" -> 58, "C#5" -> 73).

    Letters A-G, then up to two accidentals (# or b, also ♯ ♭), then the octave number (C4 is
    middle C). Raises ValueError for anything else.
    """
    m = _NOTE.match(str(name).strip())
    if not m:
        raise ValueError("not a note name; use scientific pitch notation such as C4, F#3 or Bb5")
    letter, acc, octave = m.groups()
    if len(octave) > 2 or not LOWEST_OCTAVE <= int(octave) <= HIGHEST_OCTAVE:
        raise ValueError(f"octave {octave[:6]} is outside {LOWEST_OCTAVE} to {HIGHEST_OCTAVE}")
    shift = sum(1 if ch in "#♯" else -1 for ch in acc)
    return 12 * (int(octave) + 1) + _STEPS[letter.upper()] + shift


def equal_temperament_hz(name_or_midi, a4_hz: float = A4_HZ):
    """Frequency [Hz] of a note in twelve-tone equal temperament: a4 * 2^((m - 69)/12).

    Parameters
    ----------
    name_or_midi : str or array_like of int
        A note name, or MIDI numbers.
    a4_hz : float
        Pitch of A4 [Hz] (default 440, ISO 16).
    """
    m = note_to_midi(name_or_midi) if isinstance(name_or_midi, str) else name_or_midi
    return a4_hz * 2.0 ** ((np.asarray(m, dtype=float) - 69.0) / 12.0)


def cents(frequency_hz, reference_hz):
    """Interval [cent] from ``reference_hz`` to ``frequency_hz``: 1200 log2(f / f_ref)."""
    return 1200.0 * np.log2(np.asarray(frequency_hz, dtype=float) / np.asarray(reference_hz, dtype=float))


_LETTERS = "CDEFGAB"
#: Letter steps of each interval of 0 to 11 semitones as the trade spells it: unison, minor
#: second, major second, minor third, ..., the tritone as an augmented fourth (common practice).
_INTERVAL_LETTERS = (0, 1, 1, 2, 2, 3, 3, 4, 5, 5, 6, 6)
#: Key names of transposing instruments: the sounding pitch class of their written C, flats as
#: the trade names them (B♭ clarinet, E♭ alto saxophone, F horn; common practice).
_KEY_NAMES = ("C", "Db", "D", "Eb", "E", "F", "Gb", "G", "Ab", "A", "Bb", "B")


def written_name(name: str, transposition_semitones: int) -> str:
    """The written name of a sounding note on a transposing instrument.

    Parameters
    ----------
    name : str
        Sounding pitch in scientific pitch notation ("Bb3", "F#4"; also ♯ ♭).
    transposition_semitones : int
        Written pitch minus sounding pitch [semitones]: 2 for an instrument in B♭ (written C4
        sounds B♭3), 7 in F, -3 for one in E♭ written a minor third below its sound, 9 for one
        in E♭ written a major sixth above it (common practice).

    Returns
    -------
    str
        The written note, spelled by moving the letter by the interval's letter steps (a major
        second moves it one letter, a perfect fifth four) and then choosing the accidental, as
        a transposed part is written (common practice): "Bb3" -> "C4" and "F#4" -> "G#4" in
        B♭. Accidentals are written ``#`` and ``b``; where more than two would be needed, the
        plain sharp spelling is used.
    """
    n = int(transposition_semitones)
    midi = note_to_midi(name) + n
    letter = _LETTERS.index(_NOTE.match(str(name).strip()).group(1).upper())
    octaves, rest = divmod(abs(n), 12)
    steps = (7 * octaves + _INTERVAL_LETTERS[rest]) * (1 if n >= 0 else -1)
    octave_shift, new_letter = divmod(letter + steps, 7)
    octave = int(_NOTE.match(str(name).strip()).group(3)) + octave_shift
    shift = midi - (12 * (octave + 1) + _STEPS[_LETTERS[new_letter]])
    if abs(shift) > 2:
        octave, pitch = divmod(midi, 12)
        sharps = ("C", "C#", "D", "D#", "E", "F", "F#", "G", "G#", "A", "A#", "B")
        return f"{sharps[pitch]}{octave - 1}"
    return f"{_LETTERS[new_letter]}{('#' if shift > 0 else 'b') * abs(shift)}{octave}"


def key_name(transposition_semitones: int) -> str:
    """The key a transposing instrument is named by: the sounding pitch class of its written C
    ("Bb" for 2, "Eb" for -3 or 9, "F" for 7; "C" for an instrument at concert pitch)."""
    return _KEY_NAMES[(-int(transposition_semitones)) % 12]
