"""Note names, equal temperament, and the playing frequencies of an instrument's fingerings.

The playing frequency of a fingering in register n is taken as the n-th maximum of the input
impedance magnitude |Z_in| for reed and lip excitation (pressure-controlled valves play near the
impedance peaks), and the n-th minimum for jet excitation (flow-controlled, plays near the
minima) (Benade 1976, Ch. 21-22; Fletcher & Rossing 1998, Secs. 15.2 and 16.3). Peaks are found
on a logarithmic frequency grid and refined by a bracketed minimiser
(``scipy.optimize.elementwise.find_minimum``, Chandrupatla's algorithm), all fingerings at once,
to better than 0.001 cent.

References
----------
Benade, A. H. (1976). Fundamentals of Musical Acoustics. Oxford University Press.
Fletcher, N. H., Rossing, T. D. (1998). The Physics of Musical Instruments, 2nd ed. Springer.
ISO 16:1975. Acoustics - Standard tuning frequency (standard musical pitch): A4 = 440 Hz.
"""

from __future__ import annotations

import math
import re
from dataclasses import dataclass

import numpy as np

#: Standard tuning frequency [Hz]: A4 = 440 Hz (ISO 16:1975).
A4_HZ = 440.0

_NOTE = re.compile(r"^([A-Ga-g])([#b♯♭]{0,2})(-?\d+)$")
_STEPS = {"C": 0, "D": 2, "E": 4, "F": 5, "G": 7, "A": 9, "B": 11}
_SHARP_NAMES = ("C", "C#", "D", "Eb", "E", "F", "F#", "G", "Ab", "A", "Bb", "B")


def note_to_midi(name: str) -> int:
    """MIDI number of a note in scientific pitch notation ("A4" -> 69, "Bb3" -> 58, "C#5" -> 73).

    Letters A-G, then up to two accidentals (# or b, also ♯ ♭), then the octave number (C4 is
    middle C). Raises ValueError for anything else.
    """
    m = _NOTE.match(str(name).strip())
    if not m:
        raise ValueError("not a note name; use scientific pitch notation such as C4, F#3 or Bb5")
    letter, acc, octave = m.groups()
    shift = sum(1 if ch in "#♯" else -1 for ch in acc)
    return 12 * (int(octave) + 1) + _STEPS[letter.upper()] + shift


def midi_to_note(midi: int) -> str:
    """Scientific-pitch name of a MIDI number, flats for Eb Ab Bb and sharps for C# F# (69 -> "A4")."""
    midi = int(midi)
    return f"{_SHARP_NAMES[midi % 12]}{midi // 12 - 1}"


def equal_temperament_hz(name_or_midi, a4_hz: float = A4_HZ) -> float:
    """Frequency [Hz] of a note in twelve-tone equal temperament: a4 * 2^((m - 69)/12)."""
    m = note_to_midi(name_or_midi) if isinstance(name_or_midi, str) else name_or_midi
    return a4_hz * 2.0 ** ((np.asarray(m, dtype=float) - 69.0) / 12.0)


def cents(frequency_hz, reference_hz):
    """Interval [cent] from ``reference_hz`` to ``frequency_hz``: 1200 log2(f / f_ref)."""
    return 1200.0 * np.log2(np.asarray(frequency_hz, dtype=float) / np.asarray(reference_hz, dtype=float))


def from_cents(reference_hz, interval_cents):
    """Frequency [Hz] an interval [cent] above ``reference_hz``: f_ref 2^(c/1200)."""
    return np.asarray(reference_hz, dtype=float) * 2.0 ** (np.asarray(interval_cents, dtype=float) / 1200.0)


def nearest_note(frequency_hz: float, a4_hz: float = A4_HZ) -> tuple[str, float]:
    """(name, deviation [cent]) of the equal-tempered note nearest to a frequency [Hz]."""
    m = 69.0 + 12.0 * math.log2(frequency_hz / a4_hz)
    mi = int(round(m))
    return midi_to_note(mi), 100.0 * (m - mi)


# --------------------------------------------------------------------------------------------
# Resonance search
# --------------------------------------------------------------------------------------------

#: Grid of the first search: 1/48 octave (25 cent) steps from 20 Hz, extended in blocks.
GRID_STEP_OCTAVES = 1.0 / 48.0
GRID_START_HZ = 20.0
GRID_BLOCK_HZ = (2500.0, 6000.0, 15000.0)
#: Relative tolerance of the refinement: 1e-7 of the frequency, about 0.0002 cent.
REFINE_XRTOL = 1e-7


def _grid(f_lo: float, f_hi: float) -> np.ndarray:
    n = int(math.ceil(math.log2(f_hi / f_lo) / GRID_STEP_OCTAVES))
    return f_lo * 2.0 ** (GRID_STEP_OCTAVES * np.arange(n + 1))


def find_resonances(network, open_holes, counts, minima: bool = False) -> list[np.ndarray]:
    """The first resonances [Hz] of each fingering of a :class:`drift.acoustics.Network`.

    Parameters
    ----------
    network : drift.acoustics.Network
    open_holes : bool array (F, H)
    counts : sequence of int (F,)
        How many resonances to find for each fingering.
    minima : bool
        Find minima of |Z| (jet) instead of maxima (reed, lips).

    Returns
    -------
    list of F arrays, ascending [Hz]; shorter than asked when the search range (up to 15 kHz)
    holds fewer resonances.

    Notes
    -----
    |Z| is sampled on a 25-cent logarithmic grid; every interior local extremum of the samples
    gives a three-point bracket (f[i-1], f[i], f[i+1]) that holds exactly one extremum of the
    smooth |Z|, as long as peaks and dips are more than one grid step apart. Each bracket is then
    refined by Chandrupatla's bracketed minimiser (``scipy.optimize.elementwise.find_minimum``)
    on -log|Z| (or log|Z|) to a relative tolerance of 1e-7, every fingering at once.
    """
    open_holes = np.asarray(open_holes, dtype=bool)
    nf = open_holes.shape[0]
    counts = np.asarray(counts, dtype=int)
    sign = 1.0 if minima else -1.0
    brackets = [[] for _ in range(nf)]
    lo = GRID_START_HZ
    for hi in GRID_BLOCK_HZ:
        f = _grid(lo, hi)
        if lo > GRID_START_HZ:
            f = np.concatenate([prev_tail, f[1:]])
        val = sign * np.log(np.abs(network.impedance(f, open_holes)))
        inner = (val[:, 1:-1] < val[:, :-2]) & (val[:, 1:-1] <= val[:, 2:])
        for i in range(nf):
            if len(brackets[i]) >= counts[i]:
                continue
            for j in np.nonzero(inner[i])[0]:
                bracket = (f[j], f[j + 1], f[j + 2])
                if not brackets[i] or bracket[1] > brackets[i][-1][1] * (1 + 1e-9):
                    brackets[i].append(bracket)
        if all(len(brackets[i]) >= counts[i] for i in range(nf)):
            break
        prev_tail = f[-2:]
        lo = f[-1]
    rows, x1, x2, x3 = [], [], [], []
    for i in range(nf):
        for bracket in brackets[i][: counts[i]]:
            rows.append(i)
            x1.append(bracket[0]); x2.append(bracket[1]); x3.append(bracket[2])
    out = [np.zeros(0) for _ in range(nf)]
    if not rows:
        return out
    rows = np.asarray(rows)
    refined = refine_extrema(network, open_holes[rows], np.array(x1), np.array(x2), np.array(x3), minima)
    for i in range(nf):
        out[i] = np.sort(refined[rows == i])
    return out


def refine_extrema(network, open_rows, x1, x2, x3, minima: bool = False) -> np.ndarray:
    """Refine extrema of |Z| [Hz] inside brackets x1 < x2 < x3 (one fingering row per bracket).

    Chandrupatla's bracketed minimisation (``scipy.optimize.elementwise.find_minimum``) of
    -log|Z| (maxima) or log|Z| (minima), elementwise over all brackets, to xrtol = 1e-7.
    """
    from scipy.optimize import elementwise

    sign = 1.0 if minima else -1.0
    open_rows = np.asarray(open_rows, dtype=bool)

    def objective(x, rows):
        shape = np.shape(x)
        xs = np.asarray(x, dtype=float).ravel()
        idx = np.broadcast_to(rows, shape).ravel().astype(int)
        z = network.impedance(xs, open_rows[idx], paired=True)
        return (sign * np.log(np.abs(z))).reshape(shape)

    rows = np.arange(len(x1))
    res = elementwise.find_minimum(objective, (x1, x2, x3), args=(rows,),
                                   tolerances=dict(xrtol=REFINE_XRTOL, xatol=0.0, fatol=0.0, frtol=0.0), maxiter=200)
    return np.asarray(res.x, dtype=float)


# --------------------------------------------------------------------------------------------
# From an instrument and a bore profile to note frequencies
# --------------------------------------------------------------------------------------------


@dataclass(frozen=True)
class NoteFrequency:
    """The playing frequency of one fingering.

    Attributes
    ----------
    note : str or None
        Name of the fingering's note (None for an unnamed fingering).
    register : int or None
    frequency_hz : float
        Playing frequency [Hz] (NaN if the register's resonance lies beyond 15 kHz).
    target_hz : float or None
        Equal-tempered frequency of ``note`` at the design A4 [Hz].
    deviation_cents : float or None
        frequency relative to target [cent].
    """

    note: str | None
    register: int | None
    frequency_hz: float
    target_hz: float | None = None
    deviation_cents: float | None = None


def _expansion_coefficients(instrument):
    """(axial, radial) linear expansion coefficients [1/K] of the instrument's material, or None."""
    if instrument.material is None:
        return None
    from drift import thermal

    m = thermal.material(instrument.material)
    return m.expansion_per_k, m.expansion_across_per_k


def bore_network(instrument, profile, lossless: bool = False, max_segment_m: float | None = None,
                 expansion: bool = True, radiation: str = "norris-sheng-1989"):
    """The :class:`drift.acoustics.Network` of an instrument filled with the air of ``profile``.

    The bore is discretised (:meth:`drift.bore.Instrument.segments`), the air is evaluated at
    the segment midpoints in one batched call of ``profile.air_at``, and, when the instrument's
    material is known and ``expansion`` is true, every segment and hole is scaled by thermal
    expansion from the reference temperature with the wall temperature from
    ``profile.wall_temperature_at`` (axial coefficient for lengths, across-grain coefficient for
    diameters; :func:`drift.bore.expansion_factors`). ``radiation`` names the open-end model of
    :func:`drift.acoustics.radiation_unflanged`.
    """
    from drift import acoustics, bore

    segs = instrument.segments(max_segment_m or bore.DEFAULT_MAX_SEGMENT)
    mid = segs.midpoints_m
    coefficients = _expansion_coefficients(instrument) if expansion else None
    if coefficients is not None:
        t_ref = instrument.reference_temperature_k
        t_seg = profile.wall_temperature_at(np.clip(mid, 0.0, None))
        t_hole = profile.wall_temperature_at(segs.hole_position_m)
        ax, rad = coefficients
        segs = segs.expanded(bore.expansion_factors(t_seg, ax, t_ref), bore.expansion_factors(t_seg, rad, t_ref),
                             bore.expansion_factors(t_hole, ax, t_ref), bore.expansion_factors(t_hole, rad, t_ref))
        mid = segs.midpoints_m
    state = profile.air_at(np.clip(mid, 0.0, None))
    return acoustics.Network(segs, state.properties, lossless=lossless, radiation=radiation)


def resonances(instrument, profile, count: int = 5, notes=None, lossless: bool = False,
               max_segment_m: float | None = None, radiation: str = "norris-sheng-1989",
               minima: bool | None = None) -> list[np.ndarray]:
    """The first ``count`` resonances [Hz] of each fingering: peaks of |Z_in| for reed and lips,
    minima for jet (see :func:`find_resonances`).

    ``notes`` defaults to the instrument's fingerings (:meth:`drift.bore.Instrument.fingerings`).
    ``minima`` overrides the choice of peaks or dips (default: dips for jet only). Returns one
    ascending array per fingering.
    """
    notes = instrument.fingerings() if notes is None else tuple(notes)
    net = bore_network(instrument, profile, lossless, max_segment_m, radiation=radiation)
    mask = instrument.open_mask(notes)
    minima = instrument.excitation == "jet" if minima is None else minima
    return find_resonances(net, mask, [count] * len(notes), minima=minima)


def note_frequencies(instrument, profile, lossless: bool = False, notes=None,
                     max_segment_m: float | None = None, a4_hz: float | None = None,
                     network=None) -> list[NoteFrequency]:
    """Playing frequency of every fingering of ``instrument`` with the bore air of ``profile``.

    Parameters
    ----------
    instrument : drift.bore.Instrument
    profile : drift.air.BoreProfile
        Air temperature, breath fraction and wall temperature along the bore.
    lossless : bool
        Drop wall and radiation losses (for validation).
    notes : sequence of drift.bore.Note, optional
        Fingerings to evaluate (default: all of the instrument's).
    max_segment_m : float, optional
        Longest segment of the discretised bore [m] (default 0.02).
    a4_hz : float, optional
        Reference pitch of the targets [Hz] (default: the instrument's design A4).
    network : drift.acoustics.Network, optional
        A prebuilt network (skips discretisation and air evaluation).

    Returns
    -------
    list of :class:`NoteFrequency`, in the order of ``notes``.

    Notes
    -----
    Register n plays at the n-th maximum of |Z_in| (reed, lips) or n-th minimum (jet),
    :func:`find_resonances`.
    """
    notes = instrument.fingerings() if notes is None else tuple(notes)
    a4 = instrument.design.a4_hz if a4_hz is None else a4_hz
    net = network or bore_network(instrument, profile, lossless, max_segment_m)
    mask = instrument.open_mask(notes)
    found = find_resonances(net, mask, [n.register for n in notes], minima=instrument.excitation == "jet")
    out = []
    for note, res in zip(notes, found):
        f = float(res[note.register - 1]) if len(res) >= note.register else math.nan
        if note.name is None:
            out.append(NoteFrequency(None, None if not instrument.notes else note.register, f))
            continue
        target = float(equal_temperament_hz(note.name, a4))
        out.append(NoteFrequency(note.name, note.register, f, target, float(cents(f, target))))
    return out


def design_profile(instrument):
    """The bore profile of the instrument's ``[design]`` condition.

    At rest (``playing = false``): uniform room air of ``instrument.design`` at room temperature
    (:meth:`drift.air.BoreProfile.uniform`). Played (``playing = true``): the steady played state
    of the thermal model in the design room (:func:`drift.thermal.design_profile`).
    """
    from drift import air

    if instrument.design.playing:
        from drift import thermal

        return thermal.design_profile(instrument)
    return air.BoreProfile.uniform(instrument.design.room())
