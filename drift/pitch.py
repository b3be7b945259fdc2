"""The playing frequencies of an instrument's fingerings for a given state of the air in its bore.

The playing frequency of a fingering in register n is taken as the n-th maximum of the input
impedance magnitude |Z_in| for reed and lip excitation (pressure-controlled valves play near the
impedance peaks), and the n-th minimum for jet excitation (flow-controlled, plays near the
minima) (Benade 1976, Ch. 21-22; Fletcher & Rossing 1998, Secs. 15.2 and 16.3). The extrema are
bracketed on a 25-cent logarithmic grid that reaches only as far as the registers asked for need,
and refined by successive complex quadratic interpolation to within 0.0004 cent, all fingerings
(and, for several bore states of one bore, all states) at once
(:func:`drift.resonance.search_resonances`).

References
----------
Benade, A. H. (1976). Fundamentals of Musical Acoustics. Oxford University Press.
Fletcher, N. H., Rossing, T. D. (1998). The Physics of Musical Instruments, 2nd ed. Springer.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from drift.network import Network
from drift.resonance import GRID_LIMIT_HZ, search_resonances, track_resonances
from drift.climate import Room
from drift.constants import SEGMENT_LENGTH_M
from drift.errors import DriftError
from drift.instrument import Instrument, Note
from drift.scale import cents, equal_temperament_hz
from drift.segments import expanded_segments, played_path
from drift.bore_state import BoreProfile, PathProfile

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
                 radiation: str = "norris-sheng-1989") -> Network:
    """The :class:`drift.network.Network` of an instrument filled with the air of ``profile``.

    The bore is discretised and expanded by the temperature of its wall
    (:func:`drift.segments.expanded_segments`, from ``profile.wall_temperature_at``), and the air
    is evaluated at the segment midpoints in one batched call of ``profile.air_at``.
    ``radiation`` names the open-end model of :func:`drift.acoustics.radiation_unflanged`.
    """
    segs = expanded_segments(instrument, profile.wall_temperature_at, max_segment_m)
    state = profile.air_at(np.clip(segs.midpoints_m, 0.0, None))
    return Network(segs, state.properties, lossless=lossless, radiation=radiation)


def played_paths(instrument: Instrument, notes, profile: BoreProfile) -> list:
    """The notes grouped by the bore they play on: a list of (path instrument, its bore profile,
    indices into ``notes``). An instrument without valves or slide is one group, as it stands;
    otherwise one group per set of valves pressed and slide travel
    (:func:`drift.segments.played_path`, :class:`PathProfile`)."""
    if not instrument.valves and instrument.slide is None:
        return [(instrument, profile, list(range(len(notes))))]
    groups: dict = {}
    for i, note in enumerate(notes):
        groups.setdefault(note.path, []).append(i)
    out = []
    for idx in groups.values():
        path = played_path(instrument, notes[idx[0]])
        out.append((path.instrument, PathProfile(profile, path), idx))
    return out


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
    air : drift.climate.Room or drift.bore_state.BoreProfile
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
    minima = instrument.excitation == "jet" if minima is None else minima
    found: list = [None] * len(notes)
    for path, view, idx in played_paths(instrument, notes, profile):
        net = bore_network(path, view, lossless, max_segment_m, radiation=radiation)
        mask = path.open_mask([notes[i] for i in idx])
        for i, res in zip(idx, search_resonances(net, mask, [count] * len(idx), minima=minima)):
            found[i] = res
    return Resonances(instrument.name, notes, found)


def check_sounds(instrument: Instrument) -> None:
    """Raise :class:`drift.errors.DriftError` when no fingering of ``instrument`` sounds in the
    model: none has the resonance of its register below 15 kHz (:data:`GRID_LIMIT_HZ`) with the
    bore full of the design room's air.

    A bore too thin to resonate (its losses, or an input volume far larger than the bore's,
    leave |Z_in| without extrema) or too short for its registers would otherwise give every note
    NaN, and every mean and spread of a chart or warm-up with it. One resonance search of one
    bore state (uniform air), cheap beside the thermal work that follows; notes of which only
    some are out of reach keep their NaN (shown as "—").
    """
    notes = instrument.fingerings()
    net = bore_network(instrument, BoreProfile.uniform(instrument.design.room()))
    found = search_resonances(net, instrument.open_mask(notes), [n.register for n in notes],
                              minima=instrument.excitation == "jet")
    if any(len(r) >= n.register for n, r in zip(notes, found)):
        return
    x, d = instrument.stations_m[:, 0], instrument.stations_m[:, 1]
    raise DriftError(
        f"{instrument.source or instrument.name}: no note sounds in the model (no fingering has its register's "
        f"resonance below {GRID_LIMIT_HZ / 1e3:g} kHz): the bore, {x[-1] * 1e3:g} mm long and {d.min() * 1e3:g} mm "
        "at its narrowest, is too thin for its input volume or too short for its registers")


def note_frequencies(instrument: Instrument, profile: BoreProfile, lossless: bool = False, notes=None,
                     max_segment_m: float = SEGMENT_LENGTH_M, a4_hz: float | None = None,
                     network: Network | None = None) -> list[NoteFrequency]:
    """Playing frequency of every fingering of ``instrument`` with the bore air of ``profile``.

    Parameters
    ----------
    instrument : drift.instrument.Instrument
    profile : drift.bore_state.BoreProfile
        Air temperature, breath fraction and wall temperature along the bore.
    lossless : bool
        Drop wall and radiation losses (for validation).
    notes : sequence of drift.instrument.Note, optional
        Fingerings to evaluate (default: all of the instrument's).
    max_segment_m : float, optional
        Longest segment of the discretised bore [m] (default 0.02).
    a4_hz : float, optional
        Reference pitch of the targets [Hz] (default: the instrument's design A4).
    network : drift.network.Network, optional
        A prebuilt network (skips discretisation and air evaluation); not for an instrument with
        valves or a slide, whose notes play on several bores.

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
    if network is not None and (instrument.valves or instrument.slide is not None):
        raise ValueError("a prebuilt network serves one bore; an instrument with valves or a slide has several")
    played = np.full(len(notes), math.nan)
    for path, view, idx in played_paths(instrument, notes, profile):
        net = network or bore_network(path, view, lossless, max_segment_m)
        sub = [notes[i] for i in idx]
        found = search_resonances(net, path.open_mask(sub), [n.register for n in sub],
                                  minima=instrument.excitation == "jet")
        played[idx] = _played(sub, found)
    out = []
    for note, f in zip(notes, played):
        if note.name is None:
            out.append(NoteFrequency(None, None if not instrument.notes else note.register, f))
            continue
        target = float(equal_temperament_hz(note.name, a4))
        out.append(NoteFrequency(note.name, note.register, f, target, float(cents(f, target))))
    return out


def _played(notes, found) -> np.ndarray:
    """Each note's register out of its fingering's resonances [Hz] (NaN when not found)."""
    return np.array([float(r[n.register - 1]) if len(r) >= n.register else math.nan for n, r in zip(notes, found)])


def state_frequencies(instruments, profiles, lossless: bool = False,
                      max_segment_m: float = SEGMENT_LENGTH_M, near_hz=None) -> list[np.ndarray]:
    """Playing frequency [Hz] of every fingering, for each (instrument, bore profile) pair.

    Parameters
    ----------
    instruments : sequence of drift.instrument.Instrument
    profiles : sequence of drift.bore_state.BoreProfile
        One per instrument.
    lossless : bool
        Drop wall and radiation losses (for validation).
    max_segment_m : float
        Longest segment of the discretised bore [m].
    near_hz : sequence of array_like, optional
        For each pair, where each fingering's note is expected [Hz]: its frequency in a nearby
        state of the same instrument. The notes are then tracked from there
        (:func:`drift.resonance.track_resonances`), a group of pairs searched in full only when
        a note's window does not hold exactly one extremum; the result agrees with the full
        search to its refinement tolerance (0.0004 cent).

    Returns
    -------
    list of ndarray, one per pair: ``[n.frequency_hz for n in note_frequencies(instrument,
    profile)]`` (NaN where a register is out of reach).

    Notes
    -----
    The pairs whose networks share a topology and fingerings (the same instrument in several
    climates, or after the same kind of joint change) are stacked
    (:meth:`drift.network.Network.stack`) and searched together
    (:func:`search_resonances`): one pass along the bore serves them all.
    """
    parts = []            # (pair, note indices, network, notes, open mask): one per played path of a pair
    for k, (ins, profile) in enumerate(zip(instruments, profiles)):
        notes = ins.fingerings()
        for path, view, idx in played_paths(ins, notes, profile):
            sub = [notes[i] for i in idx]
            parts.append((k, idx, bore_network(path, view, lossless, max_segment_m), sub, path.open_mask(sub)))
    groups: dict = {}
    for j, (k, _, net, sub, mask) in enumerate(parts):
        key = (net.topology, mask.shape, mask.tobytes(), tuple(n.register for n in sub), instruments[k].excitation)
        groups.setdefault(key, []).append(j)
    out = [np.full(len(ins.fingerings()), math.nan) for ins in instruments]
    for members in groups.values():
        k, _, _, sub, mask = parts[members[0]]
        net = Network.stack([parts[j][2] for j in members])
        jet = instruments[k].excitation == "jet"
        if near_hz is not None:
            guess = np.array([np.asarray(near_hz[parts[j][0]], dtype=float)[parts[j][1]] for j in members])
            tracked = track_resonances(net, np.tile(mask, (len(members), 1)), guess.ravel(), jet,
                                       np.repeat(np.arange(len(members)), len(sub))).reshape(guess.shape)
            if np.all(np.isfinite(tracked)):
                for j, row in zip(members, tracked):
                    out[parts[j][0]][parts[j][1]] = row
                continue
        found = search_resonances(net, mask, [n.register for n in sub], minima=jet)
        for j, res in zip(members, found):
            out[parts[j][0]][parts[j][1]] = _played(sub, res)
    return out


def frequencies_hz(instrument: Instrument, profiles, near_hz=None) -> np.ndarray:
    """Playing frequency [Hz] of each fingering (columns) of one instrument in each bore state
    (rows), all states searched together (:func:`state_frequencies`); ``near_hz`` (one value per
    fingering [Hz]), where the notes are expected in every state, tracks them from there."""
    near = None if near_hz is None else [near_hz] * len(profiles)
    found = state_frequencies([instrument] * len(profiles), list(profiles), near_hz=near)
    return np.array(found).reshape(len(profiles), len(instrument.fingerings()))
