"""Warm-up in pitch: every note of an instrument over a play/rest plan, and when it settles.

The thermal timeline of :mod:`drift.thermal` gives the air and wall along the bore at each sample
time; :mod:`drift.pitch` turns each into the playing frequency of every note; the drift is in
cents against a reference condition, and the settle times say when the notes come within a
tolerance of the steady state of playing.
"""

from __future__ import annotations

import dataclasses
from dataclasses import dataclass
from typing import Sequence

import numpy as np

from drift import constants as K
from drift import chart, pitch, thermal
from drift.bore_state import BoreProfile
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
        The thermal state at each time (``phase`` says play or rest). During a rest, the state of
        the first note had playing resumed then (:meth:`drift.thermal.Trajectory.resumed`: the
        wall as it has cooled, the bore refilled with breath); the pitch of that row is its pitch.
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
        For each play phase: the time from which every note stays within ``tolerance_cents`` of
        its steady-state frequency until the phase ends (:func:`settle_time`, interpolated
        between rows).
    tolerance_cents : float
    plan : tuple of Phase
    instrument, climate, reference : str
        Names for the report.
    settle_from_cold_s : float or None
        Time [s] of continuous playing from a cold start after which every note is within
        ``tolerance_cents`` of its steady state (:func:`settle_from_cold`); None beyond 10 h.
    inlet_position_m : float
        Centre of the segment where the breath enters the bore [m] (the embouchure for a jet).
    name_warnings : tuple of drift.chart.NameWarning
        The notes far from their names at the design condition (:func:`drift.chart.name_warnings`).
    tune_s : float or None
        When to tune [s]: the first time of the first play phase after which the notes' mean
        drift stays within ``tolerance_cents`` of its steady value (None: not within the phase).
    tune_adjust_m : float or None
        The joint change [m] that centres the notes' mean at ``tune_s`` (> 0 out); None without
        a joint or when no change centres it.
    joint_m : ndarray (t,) or None
        At each row, the joint change [m] (> 0 out) that would centre the notes' mean drift,
        linearised (:func:`joint_settings`); None without a joint.
    loop_note : int or None
        Index of the note that plays through the longest valve loops (None without valves).
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
    name_warnings: tuple = ()
    tune_s: float | None = None
    tune_adjust_m: float | None = None
    joint_m: np.ndarray | None = None
    loop_note: int | None = None

    @property
    def steady_drift_cents(self) -> np.ndarray:
        """Drift of each note in the steady state of playing against the reference [cent]."""
        return cents(self.steady_hz, self.reference_hz)

    def key_notes(self) -> list[int]:
        """Indices of a handful of notes, in ascending pitch: the lowest, the middle and the highest
        (by reference frequency), the tuning note (A4 if there is one, else the note nearest
        440 Hz) and the note through the longest valve loops, if any."""
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
        if self.loop_note is not None and np.isfinite(f[self.loop_note]):
            picks.add(self.loop_note)
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
#: Times [s] at which the settle search from cold first looks: 5 s, then every factor sqrt(2), to
#: 10 h.
SETTLE_GRID_S = 5.0 * np.sqrt(2.0) ** np.arange(26)
SETTLE_GRID_S = np.append(SETTLE_GRID_S[SETTLE_GRID_S < SETTLE_SEARCH_S], SETTLE_SEARCH_S)
#: Largest difference [cent] between a note's interpolated pitch and a full resonance search at
#: the rows checked; knots are added until every check passes (:func:`phase_pitch`).
KNOT_TOLERANCE_CENTS = 0.02
#: First knots of a phase, as fractions of its duration from its start: dense at the start, where
#: the breath fills or leaves the bore and the wall moves fastest.
FIRST_KNOTS = (0.0, 1 / 64, 1 / 16, 1 / 4, 1 / 2, 1.0)


def pchip(x, y, x_new) -> np.ndarray:
    """Monotone piecewise-cubic Hermite interpolation of ``y`` (n, ...) at ``x`` (n,) ascending,
    evaluated at ``x_new``.

    Fritsch & Carlson (1980), SIAM J. Numer. Anal. 17, 238-246, with the slopes of Fritsch &
    Butland (1984): at an interior knot the weighted harmonic mean of the neighbouring secants
    (zero where they differ in sign), at the ends the one-sided three-point formula limited to
    keep the shape. These are the rules of ``scipy.interpolate.PchipInterpolator``, written here so
    that a warm-up does not import scipy's interpolation package (tests compare the two).
    """
    x = np.asarray(x, dtype=float)
    y = np.asarray(y, dtype=float)
    h = np.diff(x)
    m = np.diff(y, axis=0) / h.reshape((-1,) + (1,) * (y.ndim - 1))
    d = np.zeros_like(y)
    if x.size == 2:
        d[:] = m[0]
    else:
        hs = h.reshape((-1,) + (1,) * (y.ndim - 1))
        w1, w2 = 2 * hs[1:] + hs[:-1], hs[1:] + 2 * hs[:-1]
        same = (np.sign(m[:-1]) == np.sign(m[1:])) & (m[:-1] != 0) & (m[1:] != 0)
        with np.errstate(divide="ignore", invalid="ignore"):
            mean = (w1 + w2) / (w1 / m[:-1] + w2 / m[1:])
        d[1:-1] = np.where(same, mean, 0.0)
        for end, h0, h1, m0, m1 in ((0, h[0], h[1], m[0], m[1]), (-1, h[-1], h[-2], m[-1], m[-2])):
            edge = ((2 * h0 + h1) * m0 - h0 * m1) / (h0 + h1)
            edge = np.where(np.sign(edge) != np.sign(m0), 0.0, edge)
            edge = np.where((np.sign(m0) != np.sign(m1)) & (np.abs(edge) > 3 * np.abs(m0)), 3 * m0, edge)
            d[end] = edge
    q = np.asarray(x_new, dtype=float)
    i = np.clip(np.searchsorted(x, q, side="right") - 1, 0, x.size - 2)
    span = h[i].reshape((-1,) + (1,) * (y.ndim - 1))
    t = ((q - x[i]) / h[i]).reshape(span.shape)
    return ((2 * t**3 - 3 * t**2 + 1) * y[i] + (t**3 - 2 * t**2 + t) * span * d[i]
            + (-2 * t**3 + 3 * t**2) * y[i + 1] + (t**3 - t**2) * span * d[i + 1])


def phase_pitch(pitch_at, start_s: float, times_s, tolerance_cents: float = KNOT_TOLERANCE_CENTS,
                progress=None) -> np.ndarray:
    """Frequencies [Hz] of every note at the ascending ``times_s`` of one phase, from as few full
    resonance searches as the interpolation between them allows.

    Parameters
    ----------
    pitch_at : callable
        Times [s] (k,) -> frequencies [Hz] (k, notes) by full resonance searches of the phase's
        bore states.
    start_s : float
        Start of the phase [s] (its bore state is the first knot).
    times_s : array_like
        Ascending times wanted [s], after ``start_s``.
    tolerance_cents : float
        Largest allowed interpolation error [cent] at the checked times.
    progress : callable, optional
        Called with the number of states searched after each batch.

    Notes
    -----
    The knots are the phase's start and some of ``times_s``: first the times nearest to
    :data:`FIRST_KNOTS` of the phase and the last one. log2 f of each note is interpolated
    between knots by a monotone piecewise cubic (:func:`pchip`). Then the middle time of every gap between knots is
    searched in full and compared with the interpolation without it; each gap whose middle
    misses by more than ``tolerance_cents`` is split there and its halves checked the same way.
    Every time searched becomes a knot, so no more than ``len(times_s) + 1`` states are ever
    searched, and a time that is a knot gets its searched value. Where a search finds no resonance for a register (NaN), every time is searched.
    """
    times = np.asarray(times_s, dtype=float)
    # The knot grid: the phase's start (unless it is the first time wanted), then the times.
    lead = 0 if times[0] <= start_s else 1
    grid = np.concatenate([[start_s], times]) if lead else times
    n = grid.size - 1
    span = grid[-1] - start_s
    first = {0, n} | {int(np.argmin(np.abs(grid - (start_s + f * span)))) for f in FIRST_KNOTS}
    known = np.full((n + 1, 0), np.nan)

    def search(indices):
        nonlocal known
        found = np.log2(pitch_at(grid[indices]))
        if known.shape[1] == 0:
            known = np.full((n + 1, found.shape[1]), np.nan)
        known[indices] = found
        if progress is not None:
            progress(len(indices))
        return found

    knots = sorted(first)
    search(np.array(knots))
    pending = [(a, b) for a, b in zip(knots[:-1], knots[1:]) if b - a > 1]
    while pending and np.all(np.isfinite(known[knots])):
        middles = np.array([(a + b) // 2 for a, b in pending])
        guess = pchip(grid[knots], known[knots], grid[middles])
        found = search(middles)
        miss = np.max(np.abs(guess - found), axis=1) * 1200.0
        knots = sorted(set(knots) | set(middles.tolist()))
        pending = [half for (a, b), m, err in zip(pending, middles, miss) if not err <= tolerance_cents
                   for half in ((a, m), (m, b)) if half[1] - half[0] > 1]
    if not np.all(np.isfinite(known[knots])):
        rest = np.flatnonzero(np.isnan(known[lead:, 0])) + lead
        if rest.size:
            search(rest)
        return 2.0 ** known[lead:]
    if len(knots) == 1:
        return 2.0 ** known[knots]
    return 2.0 ** pchip(grid[knots], known[knots], times)


def plan_frequencies(instrument: Instrument, trajectory: thermal.Trajectory, times_s, progress=None,
                     near_hz=None) -> np.ndarray:
    """Frequencies [Hz] (t, notes) of every note at the ascending ``times_s`` [s] of a thermal
    trajectory, phase by phase from a few resonance searches (:func:`phase_pitch`), tracked from
    ``near_hz`` when given (:func:`drift.pitch.frequencies_hz`). During a rest, the frequencies
    are those of the first note had playing resumed then (:meth:`drift.thermal.Trajectory.resumed`:
    the wall as it has cooled, the bore refilled with breath)."""
    times = np.asarray(times_s, dtype=float)
    freqs = np.empty((len(times), len(instrument.fingerings())))
    phase_of_row = np.array([trajectory.phase_of(t) for t in times])
    for index in range(len(trajectory.plan)):
        rows = phase_of_row == index
        if not np.any(rows):
            continue

        def pitch_at(ts, index=index):
            if trajectory.plan[index].state == "rest":
                return pitch.frequencies_hz(instrument, [trajectory.resumed(t).profile for t in ts], near_hz)
            return pitch.frequencies_hz(instrument, [trajectory.state(t, index).profile for t in ts], near_hz)

        freqs[rows] = phase_pitch(pitch_at, trajectory.starts_s[index], times[rows], progress=progress)
    return freqs


def settle_from_cold(instrument: Instrument, room: Room, steady_hz, tolerance_cents: float = K.SETTLE_CENTS,
                     breath: Breath = DEFAULT_BREATH, blowing: Blowing | None = None,
                     progress=None, resolution_s: float = 5.0) -> float | None:
    """Time [s] of continuous playing from a cold start until every note is within
    ``tolerance_cents`` of its steady-state frequency ``steady_hz`` [Hz].

    The root of g(t) = max over notes |1200 log2(f(t) / f_steady)| - tolerance, f(t) from the
    states of one thermal trajectory of 10 h of playing (:class:`drift.thermal.Trajectory`),
    tracked from the steady frequencies (:func:`drift.pitch.frequencies_hz`):
    g is searched at :data:`SETTLE_GRID_S` (all those states in one stacked search) for the first
    time it is no longer positive, and the root within that bracket is refined by the Illinois
    variant of regula falsi (Dowell & Jarratt 1971, BIT 11, 168-174) to ``resolution_s``. This
    assumes the approach is monotone, as the wall temperatures are when warming from cold;
    returns 0 when the first note is already inside and None when 10 h of playing do not reach
    the band.
    """
    steady_hz = np.asarray(steady_hz, dtype=float)
    trajectory = thermal.instrument_trajectory(instrument, room, (Phase("play", SETTLE_SEARCH_S),), breath,
                                               blowing)

    def gaps(times):
        f = pitch.frequencies_hz(instrument, [trajectory.state(float(t)).profile for t in times], steady_hz)
        if progress is not None:
            progress(len(times))
        return np.nanmax(np.abs(cents(f, steady_hz[None, :])), axis=1) - tolerance_cents

    grid = np.concatenate([[0.0], SETTLE_GRID_S])
    g = gaps(grid)
    if g[0] <= 0.0:
        return 0.0
    inside = np.flatnonzero(g <= 0.0)
    if inside.size == 0:
        return None
    k = int(inside[0])
    a, b, ga, gb = grid[k - 1], grid[k], g[k - 1], g[k]
    side = 0
    while b - a > resolution_s:
        t = b - gb * (b - a) / (gb - ga)
        t = min(max(t, a + 0.1 * resolution_s), b - 0.1 * resolution_s)
        gt = float(gaps([t])[0])
        if gt > 0.0:
            a, ga = t, gt
            if side == -1:
                gb *= 0.5
            side = -1
        else:
            b, gb = t, gt
            if side == 1:
                ga *= 0.5
            side = 1
    return float(b - gb * (b - a) / (gb - ga))


def warmup_timeline(instrument: Instrument, room: Room, plan: Sequence[Phase] | str, step_s: float = 30.0,
                    breath: Breath = DEFAULT_BREATH, reference: BoreProfile | None = None,
                    blowing: Blowing | None = None, tolerance_cents: float = K.SETTLE_CENTS, progress=None,
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
    reference : drift.bore_state.BoreProfile, optional
        Condition the drift is measured from (default: the instrument's design condition,
        :func:`drift.thermal.design_profile`).
    blowing : drift.climate.Blowing, optional
        Breath flow and heat exchange (default: the excitation's).
    tolerance_cents : float
        Band around the steady state [cent] for the settle times.
    progress : callable, optional
        Called with the number of bore states just searched, after each batch.
    names : (str, str)
        Names of the climate and the reference, for reports.

    Returns
    -------
    Warmup

    Notes
    -----
    The thermal timeline is integrated once (:func:`drift.thermal.instrument_trajectory`) and
    read at :func:`sample_times`; the note frequencies come from full resonance searches
    (:func:`drift.pitch.note_frequencies`) at a few knots of each phase, interpolated in time
    between them and checked against full searches to :data:`KNOT_TOLERANCE_CENTS`
    (:func:`phase_pitch`). The settle time of each play phase is read on the sample grid against
    the steady state of playing (:func:`drift.thermal.instrument_steady_state`,
    :func:`settle_time`); the settle time from cold by root finding (:func:`settle_from_cold`).

    Examples
    --------
    >>> from drift import load_instrument, warmup_timeline
    >>> inst = load_instrument("side-blown-flute")
    >>> result = warmup_timeline(inst, inst.design.room(), "play:2", step_s=60.0)
    >>> [round(t) for t in result.times_s]
    [0, 60, 120]
    """
    plan = parse_plan(plan) if isinstance(plan, str) else tuple(plan)
    pitch.check_sounds(instrument)
    times = sample_times(plan, step_s)
    trajectory = thermal.instrument_trajectory(instrument, room, plan, breath, blowing)
    phase_of_row = np.array([trajectory.phase_of(t) for t in times])
    # During a rest, each row is the first note had playing resumed then.
    states = [trajectory.state(t) if plan[i].state == "play" else
              dataclasses.replace(trajectory.resumed(t), phase="rest") for t, i in zip(times, phase_of_row)]
    steady = thermal.instrument_steady_state(instrument, room, breath, blowing)
    at_design = reference is None
    reference = thermal.design_profile(instrument, breath) if reference is None else reference
    notes = instrument.fingerings()
    labels = tuple(n.name if n.name else f"fingering {i + 1}" for i, n in enumerate(notes))

    ref, steady_hz = pitch.frequencies_hz(instrument, [reference, steady.profile])
    if progress is not None:
        progress(2)
    freqs = plan_frequencies(instrument, trajectory, times, progress, steady_hz)
    drift = cents(freqs, ref[None, :])
    steady_cents = cents(freqs, steady_hz[None, :])
    settle = []
    for index, phase in enumerate(plan):
        if phase.state == "play":
            inside = phase_of_row == index
            t = settle_time(times[inside], steady_cents[inside], np.zeros(len(notes)), tolerance_cents)
            settle.append((index, trajectory.starts_s[index], t))
    from_cold = settle_from_cold(instrument, room, steady_hz, tolerance_cents, breath, blowing, progress)
    tune_s, tune_adjust_m = _tune(instrument, trajectory, plan, times, phase_of_row, drift, steady_hz, ref,
                                  tolerance_cents)
    joint = joint_settings(instrument, steady.profile, steady_hz, drift)
    wall = instrument_wall(instrument)
    inlet = wall.positions_m[int(np.argmax(wall.flow_fraction > 0.0))]
    far = chart.name_warnings(instrument, notes, ref if at_design and breath == DEFAULT_BREATH else None)
    loops = [sum(v.loop_length_m for v in instrument.valves if v.name in n.valves) for n in notes]
    loop_note = int(np.argmax(loops)) if max(loops, default=0.0) > 0.0 else None
    return Warmup(labels, times, states, freqs, ref, drift, steady_hz, steady, settle, tolerance_cents,
                  tuple(plan), instrument.name, names[0], names[1], from_cold, float(inlet), far, tune_s,
                  tune_adjust_m, joint, loop_note)


#: Joint change that measures the pitch's slope against the joint [m].
JOINT_PROBE_M = 1.0e-3


def joint_settings(instrument: Instrument, profile, at_hz, drift_cents) -> np.ndarray | None:
    """The joint change [m] (> 0 out) that centres the mean drift of each row, linearised.

    The notes' mean pitch moves with the joint change delta nearly linearly (pitch ~ 1/L): its
    slope s [cent/m] is measured once, in the bore state ``profile`` whose frequencies are
    ``at_hz``, from a change of :data:`JOINT_PROBE_M`; each row's change is then
    delta = -mean(drift) / s. The neglected curvature is of the order of delta / L, about 1 % of
    a change of a few mm (tested against the exact solve of :func:`drift.chart.joint_changes`).

    Parameters
    ----------
    instrument : Instrument
    profile : drift.bore_state.BoreProfile
        The state the slope is measured in (the steady state of playing).
    at_hz : ndarray (k,)
        The notes' frequencies in ``profile`` [Hz].
    drift_cents : ndarray (t, k)
        Each row's drift of the notes [cent].

    Returns
    -------
    ndarray (t,) [m], or None for an instrument without a joint.
    """
    if instrument.tuning is None:
        return None
    free = chart.free_joint(instrument)
    probe = pitch.frequencies_hz(free.with_joint_change(JOINT_PROBE_M), [profile])[0]
    slope = float(np.nanmean(cents(probe, at_hz))) / JOINT_PROBE_M
    return -np.nanmean(drift_cents, axis=1) / slope


def _tune(instrument, trajectory, plan, times, phase_of_row, drift, steady_hz, reference_hz, tolerance):
    """When to tune in the first play phase, and the joint change then: the first time [s] after
    which the mean drift of the notes stays within ``tolerance`` of its steady value
    (:func:`settle_time`, interpolated between rows), and the change [m] that centres the notes'
    mean there (:func:`drift.chart.joint_changes`; None without a joint or a time)."""
    if plan[0].state != "play":
        return None, None
    rows = phase_of_row == 0
    steady_mean = float(np.nanmean(cents(steady_hz, reference_hz)))
    mean = np.nanmean(drift[rows], axis=1)
    t = settle_time(times[rows], mean[:, None], [steady_mean], tolerance)
    if t is None or instrument.tuning is None:
        return t, None
    profile = trajectory.state(t, 0).profile
    at = pitch.frequencies_hz(instrument, [profile])[0]
    (solved,) = chart.joint_changes(instrument, [profile], reference_hz, [cents(at, reference_hz)])
    return t, (None if isinstance(solved, OutOfRangeError) else solved[0])


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
        The time after which no sample leaves the band: where the largest distance from the
        steady values minus the tolerance, g, crosses zero between the last sample outside the
        band and the next, linear between them (t_a + g_a (t_b - t_a) / (g_a - g_b)); the first
        time when every sample is inside; None if the last sample is still outside.
    """
    t = np.asarray(times_s, dtype=float)
    v = np.asarray(values, dtype=float).reshape(t.size, -1)
    gap = np.max(np.abs(v - np.asarray(steady_values, dtype=float).reshape(1, -1)), axis=1) - tolerance
    inside = gap <= 0.0
    if not inside.size or not inside[-1]:
        return None
    outside = np.flatnonzero(~inside)
    if outside.size == 0:
        return float(t[0])
    a = outside[-1]
    return float(t[a] + gap[a] * (t[a + 1] - t[a]) / (gap[a] - gap[a + 1]))
