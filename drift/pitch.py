"""The playing frequencies of an instrument's fingerings for a given state of the air in its bore.

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
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from drift import acoustics
from drift.climate import Room
from drift.constants import SEGMENT_LENGTH_M
from drift.instrument import Instrument, Note
from drift.scale import cents, equal_temperament_hz
from drift.segments import expanded_segments
from drift.thermal import BoreProfile

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


def search_resonances(network: acoustics.Network, open_holes, counts, minima: bool = False) -> list[np.ndarray]:
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
    prev_tail = None
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


def refine_extrema(network: acoustics.Network, open_rows, x1, x2, x3, minima: bool = False) -> np.ndarray:
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


def bore_network(instrument: Instrument, profile: BoreProfile, lossless: bool = False,
                 max_segment_m: float = SEGMENT_LENGTH_M,
                 radiation: str = "norris-sheng-1989") -> acoustics.Network:
    """The :class:`drift.acoustics.Network` of an instrument filled with the air of ``profile``.

    The bore is discretised and expanded by the temperature of its wall
    (:func:`drift.segments.expanded_segments`, from ``profile.wall_temperature_at``), and the air
    is evaluated at the segment midpoints in one batched call of ``profile.air_at``.
    ``radiation`` names the open-end model of :func:`drift.acoustics.radiation_unflanged`.
    """
    segs = expanded_segments(instrument, profile.wall_temperature_at, max_segment_m)
    state = profile.air_at(np.clip(segs.midpoints_m, 0.0, None))
    return acoustics.Network(segs, state.properties, lossless=lossless, radiation=radiation)


@dataclass(frozen=True)
class Resonances:
    """The resonance frequencies of an instrument's fingerings at one bore state.

    Attributes
    ----------
    instrument : str
    notes : tuple of drift.instrument.Note
        The fingerings, in the order asked.
    frequencies_hz : list of ndarray
        For each fingering, its first resonances in ascending order [Hz]: peaks of |Z_in| for
        reed and lips, dips for jet (fewer than asked when the search range ends first).
    """

    instrument: str
    notes: tuple[Note, ...]
    frequencies_hz: list[np.ndarray]


def find_resonances(instrument: Instrument, air: Room | BoreProfile, count: int = 5, notes=None,
                    lossless: bool = False, max_segment_m: float = SEGMENT_LENGTH_M,
                    radiation: str = "norris-sheng-1989", minima: bool | None = None) -> Resonances:
    """The first ``count`` resonances [Hz] of each fingering of an instrument.

    Parameters
    ----------
    instrument : drift.instrument.Instrument
    air : drift.climate.Room or drift.thermal.BoreProfile
        A room (the bore filled with its air, walls at its temperature) or the air and wall along
        the bore.
    count : int
        Resonances per fingering.
    notes : sequence of drift.instrument.Note, optional
        Fingerings (default: all of the instrument's, :meth:`~drift.instrument.Instrument.fingerings`).
    lossless : bool
        Drop wall and radiation losses (for validation).
    max_segment_m : float
        Longest segment of the discretised bore [m].
    radiation : str
        Open-end model (:func:`drift.acoustics.radiation_unflanged`).
    minima : bool, optional
        Dips instead of peaks of |Z_in| (default: dips for jet only).

    Returns
    -------
    Resonances

    Notes
    -----
    Peaks of |Z_in| for reed and lips, minima for jet (:func:`search_resonances`).

    Examples
    --------
    >>> from drift import Room, find_resonances, load_instrument
    >>> found = find_resonances(load_instrument("cylindrical-reed"), Room(293.15), count=2)
    >>> len(found.frequencies_hz[0])
    2
    """
    profile = BoreProfile.uniform(air) if isinstance(air, Room) else air
    notes = instrument.fingerings() if notes is None else tuple(notes)
    net = bore_network(instrument, profile, lossless, max_segment_m, radiation=radiation)
    mask = instrument.open_mask(notes)
    minima = instrument.excitation == "jet" if minima is None else minima
    found = search_resonances(net, mask, [count] * len(notes), minima=minima)
    return Resonances(instrument.name, notes, found)


def note_frequencies(instrument: Instrument, profile: BoreProfile, lossless: bool = False, notes=None,
                     max_segment_m: float = SEGMENT_LENGTH_M, a4_hz: float | None = None,
                     network: acoustics.Network | None = None) -> list[NoteFrequency]:
    """Playing frequency of every fingering of ``instrument`` with the bore air of ``profile``.

    Parameters
    ----------
    instrument : drift.instrument.Instrument
    profile : drift.thermal.BoreProfile
        Air temperature, breath fraction and wall temperature along the bore.
    lossless : bool
        Drop wall and radiation losses (for validation).
    notes : sequence of drift.instrument.Note, optional
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
    :func:`search_resonances`.
    """
    notes = instrument.fingerings() if notes is None else tuple(notes)
    a4 = instrument.design.a4_hz if a4_hz is None else a4_hz
    net = network or bore_network(instrument, profile, lossless, max_segment_m)
    mask = instrument.open_mask(notes)
    found = search_resonances(net, mask, [n.register for n in notes], minima=instrument.excitation == "jet")
    out = []
    for note, res in zip(notes, found):
        f = float(res[note.register - 1]) if len(res) >= note.register else math.nan
        if note.name is None:
            out.append(NoteFrequency(None, None if not instrument.notes else note.register, f))
            continue
        target = float(equal_temperament_hz(note.name, a4))
        out.append(NoteFrequency(note.name, note.register, f, target, float(cents(f, target))))
    return out
