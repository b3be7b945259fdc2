"""Warm-up in pitch: every note of an instrument over a play/rest plan, and when it settles.

The thermal timeline of :mod:`drift.thermal` gives the air and wall along the bore at each sample
time; :mod:`drift.pitch` turns each into the playing frequency of every note; the drift is in
cents against a reference condition, and the settle times say when the notes come within a
tolerance of the steady state of playing.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Sequence

import numpy as np

from drift import constants as K
from drift import pitch, thermal
from drift.climate import DEFAULT_BREATH, Blowing, Breath, Phase, Room, parse_plan, plan_duration_s
from drift.errors import OutOfRangeError
from drift.instrument import Instrument
from drift.scale import cents
from drift.segments import instrument_wall


@dataclass(frozen=True)
class Warmup:
    """The pitch of every note over a play/rest plan.

    Attributes
    ----------
    notes : tuple of str
        Note labels (the fingering's name, or ``fingering N``).
    times_s : ndarray (t,)
        Sample times [s].
    states : list of drift.thermal.ThermalState (t,)
        The thermal state at each time (``phase`` says play or rest).
    frequencies_hz : ndarray (t, k)
        Playing frequency of each note at each time [Hz].
    reference_hz : ndarray (k,)
        Frequency of each note at the reference condition [Hz].
    drift_cents : ndarray (t, k)
        1200 log2(f / f_reference) [cent].
    steady_hz : ndarray (k,)
        Frequency of each note in the steady state of playing in the same room [Hz].
    steady : drift.thermal.ThermalState
    settle : list of (phase index, start [s], settled [s] or None)
        For each play phase: the first sample time from which every note stays within
        ``tolerance_cents`` of its steady-state frequency until the phase ends.
    tolerance_cents : float
    plan : tuple of Phase
    instrument, climate, reference : str
        Names for the report.
    settle_from_cold_s : float or None
        Time [s] of continuous playing from a cold start after which every note is within
        ``tolerance_cents`` of its steady state (:func:`settle_from_cold`); None beyond 10 h.
    inlet_position_m : float
        Centre of the segment where the breath enters the bore [m] (the embouchure for a jet).
    """

    notes: tuple[str, ...]
    times_s: np.ndarray
    states: list
    frequencies_hz: np.ndarray
    reference_hz: np.ndarray
    drift_cents: np.ndarray
    steady_hz: np.ndarray
    steady: thermal.ThermalState
    settle: list
    tolerance_cents: float
    plan: tuple = ()
    instrument: str = ""
    climate: str = ""
    reference: str = ""
    settle_from_cold_s: float | None = None
    inlet_position_m: float = 0.0

    @property
    def steady_drift_cents(self) -> np.ndarray:
        """Drift of each note in the steady state of playing against the reference [cent]."""
        return cents(self.steady_hz, self.reference_hz)

    def key_notes(self) -> list[int]:
        """Indices of a handful of notes, in ascending pitch: the lowest, the middle and the highest
        (by reference frequency) and the tuning note (A4 if there is one, else the note nearest
        440 Hz)."""
        f = self.reference_hz
        valid = np.flatnonzero(np.isfinite(f))
        if valid.size == 0:
            return list(range(min(4, len(self.notes))))
        by_pitch = valid[np.argsort(f[valid])]
        picks = {int(by_pitch[0]), int(by_pitch[len(by_pitch) // 2]), int(by_pitch[-1])}
        if "A4" in self.notes:
            picks.add(self.notes.index("A4"))
        else:
            picks.add(int(valid[np.argmin(np.abs(np.log(f[valid] / K.A4_HZ)))]))
        return sorted(picks, key=lambda i: f[i])


def sample_times(plan: Sequence[Phase], step_s: float) -> np.ndarray:
    """Times [s] every ``step_s`` from 0 to the end of the plan, plus every phase boundary."""
    if not step_s > 0.0:
        raise OutOfRangeError(f"step {step_s:g} s must be positive")
    total = plan_duration_s(plan)
    if total / step_s > 5000:
        raise OutOfRangeError(f"step {step_s:g} s gives more than 5000 samples over {total / 60:g} min")
    bounds = np.cumsum([0.0] + [p.duration_s for p in plan])
    grid = np.arange(0.0, total + 1e-9, step_s)
    return np.unique(np.round(np.concatenate([grid, bounds]), 9))


#: Longest continuous playing searched for a settle time [s] (10 h).
SETTLE_SEARCH_S = K.LONGEST_PLAN_S


def settle_from_cold(instrument: Instrument, room: Room, steady_hz, tolerance_cents: float = 2.0,
                     breath: Breath = DEFAULT_BREATH, blowing: Blowing | None = None,
                     notes=None, progress=None, resolution_s: float = 5.0) -> float | None:
    """Time [s] of continuous playing from a cold start until every note is within
    ``tolerance_cents`` of its steady-state frequency ``steady_hz`` [Hz].

    Found by bracketed root finding (:func:`scipy.optimize.brentq`, to ``resolution_s``) on
    g(t) = max over notes |1200 log2(f(t) / f_steady)| - tolerance, each f(t) from a fresh
    timeline of t seconds' playing. This assumes the approach is monotone, as the wall
    temperatures are when warming from cold; returns 0 when the first note is already inside and
    None when 10 h of playing do not reach the band.
    """
    from scipy.optimize import brentq

    notes = instrument.fingerings() if notes is None else tuple(notes)
    steady_hz = np.asarray(steady_hz, dtype=float)

    def gap(t):
        t = float(t)
        plan = (Phase("play", max(t, 1.0)),)
        state = thermal.instrument_timeline(instrument, room, plan, [t], breath, blowing)[0]
        f = np.array([r.frequency_hz for r in pitch.note_frequencies(instrument, state.profile, notes=notes)])
        if progress is not None:
            progress()
        return float(np.nanmax(np.abs(cents(f, steady_hz)))) - tolerance_cents

    if gap(0.0) <= 0.0:
        return 0.0
    if gap(SETTLE_SEARCH_S) > 0.0:
        return None
    return float(brentq(gap, 0.0, SETTLE_SEARCH_S, xtol=resolution_s))


def warmup_timeline(instrument: Instrument, room: Room, plan: Sequence[Phase] | str, step_s: float = 30.0,
                    breath: Breath = DEFAULT_BREATH, reference: thermal.BoreProfile | None = None,
                    blowing: Blowing | None = None, tolerance_cents: float = 2.0, progress=None,
                    names: tuple[str, str] = ("", "")) -> Warmup:
    """The pitch of every note of an instrument over a play/rest plan, starting cold.

    Parameters
    ----------
    instrument : drift.instrument.Instrument
    room : drift.climate.Room
        The room during the plan.
    plan : sequence of drift.climate.Phase, or str
        Phases of playing and rest, or their text form (``"play:10,rest:3,play:5"``, minutes;
        :func:`drift.climate.parse_plan`).
    step_s : float
        Time between samples [s]; every phase boundary is sampled too.
    breath : drift.climate.Breath
        The player's breath.
    reference : drift.thermal.BoreProfile, optional
        Condition the drift is measured from (default: the instrument's design condition,
        :func:`drift.thermal.design_profile`).
    blowing : drift.climate.Blowing, optional
        Breath flow and heat exchange (default: the excitation's).
    tolerance_cents : float
        Band around the steady state [cent] for the settle times.
    progress : callable, optional
        Called once per bore state evaluated.
    names : (str, str)
        Names of the climate and the reference, for reports.

    Returns
    -------
    Warmup

    Notes
    -----
    Thermal states at :func:`sample_times` (:func:`drift.thermal.instrument_timeline`) become
    note frequencies through :func:`drift.pitch.note_frequencies`. The settle time of each play
    phase is read on the sample grid against the steady state of playing
    (:func:`drift.thermal.instrument_steady_state`, :func:`settle_time`); the settle time from
    cold by root finding (:func:`settle_from_cold`).

    Examples
    --------
    >>> from drift import load_instrument, warmup_timeline
    >>> inst = load_instrument("side-blown-flute")
    >>> result = warmup_timeline(inst, inst.design.room(), "play:2", step_s=60.0)
    >>> [round(t) for t in result.times_s]
    [0, 60, 120]
    """
    plan = parse_plan(plan) if isinstance(plan, str) else tuple(plan)
    times = sample_times(plan, step_s)
    states = thermal.instrument_timeline(instrument, room, plan, times, breath, blowing)
    steady = thermal.instrument_steady_state(instrument, room, breath, blowing)
    reference = thermal.design_profile(instrument, breath) if reference is None else reference
    notes = instrument.fingerings()
    labels = tuple(n.name if n.name else f"fingering {i + 1}" for i, n in enumerate(notes))

    def hz(profile):
        out = np.array([r.frequency_hz for r in pitch.note_frequencies(instrument, profile, notes=notes)])
        if progress is not None:
            progress()
        return out

    freqs = np.array([hz(s.profile) for s in states])
    ref = hz(reference)
    steady_hz = hz(steady.profile)
    drift = cents(freqs, ref[None, :])
    steady_cents = cents(freqs, steady_hz[None, :])
    settle = []
    start = 0.0
    for index, phase in enumerate(plan):
        end = start + phase.duration_s
        if phase.state == "play":
            # A boundary time belongs to the phase before it (see :func:`timeline`).
            after_start = (times > start + 1e-9) | ((times <= 1e-9) if index == 0 else False)
            inside = after_start & (times <= end + 1e-9)
            t = settle_time(times[inside], steady_cents[inside], np.zeros(len(notes)), tolerance_cents)
            settle.append((index, start, t))
        start = end
    from_cold = settle_from_cold(instrument, room, steady_hz, tolerance_cents, breath, blowing, notes,
                                 progress)
    wall = instrument_wall(instrument)
    inlet = wall.positions_m[int(np.argmax(wall.flow_fraction > 0.0))]
    return Warmup(labels, times, states, freqs, ref, drift, steady_hz, steady, settle, tolerance_cents,
                  tuple(plan), instrument.name, names[0], names[1], from_cold, float(inlet))


def settle_time(times_s, values, steady_values, tolerance) -> float | None:
    """Earliest time [s] from which every series stays within ``tolerance`` of its steady value.

    Parameters
    ----------
    times_s : array_like (t,)
        Ascending sample times [s].
    values : array_like (t, k)
        k series sampled at those times (for example cents of every note).
    steady_values : array_like (k,)
        The value each series settles to.
    tolerance : float
        Allowed distance, in the unit of ``values``.

    Returns
    -------
    float or None
        The first sample time after which no sample leaves the band; None if the last sample is
        still outside it.
    """
    t = np.asarray(times_s, dtype=float)
    v = np.asarray(values, dtype=float).reshape(t.size, -1)
    inside = np.all(np.abs(v - np.asarray(steady_values, dtype=float).reshape(1, -1)) <= tolerance, axis=1)
    if not inside.size or not inside[-1]:
        return None
    outside = np.flatnonzero(~inside)
    return float(t[0] if outside.size == 0 else t[outside[-1] + 1])
