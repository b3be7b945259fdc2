"""The drift chart: every note of an instrument across climates, and the tuning-joint setting.

For each climate: the thermal state of the bore (steady, or after ``minutes_played``), the air
along the bore, the playing frequency of every note; then the drift of each note against a
reference condition, its offset from equal temperament, and per climate the joint change that
brings the mean drift to zero (found by recomputing the notes with the changed bore, not by a
linear estimate), the spread left after it and the notes still beyond the tolerance.
"""

from __future__ import annotations

import dataclasses
import functools
import math
from dataclasses import dataclass

import numpy as np

from drift import pitch, thermal
from drift.bore_state import BoreProfile
from drift.climate import Climate, Player
from drift.constants import NAME_WARNING_CENTS, TOLERANCE_CENTS
from drift.errors import DriftError, OutOfRangeError
from drift.instrument import Instrument
from drift.scale import cents, equal_temperament_hz
#: Largest joint change the solver searches [m], either way; beyond the joint's own limits the
#: result is reported with a warning.
SEARCH_LIMIT_M = 0.06


@dataclass(frozen=True)
class DriftRow:
    """One note in one climate: frequency [Hz], drift against the reference [cent], offset from
    equal temperament at the chart's A4 [cent]."""

    note: str
    register: int
    climate: str
    frequency_hz: float
    drift_cents: float
    offset_from_equal_cents: float


@dataclass(frozen=True)
class ClimateSummary:
    """The drift of all notes in one climate and the joint setting that centres it.

    Drifts in cents; ``adjust_m`` [m] > 0 pulls the joint out (adds length), < 0 pushes it in;
    None when the instrument has no tuning joint. ``residual_spread_cents`` and
    ``out_of_tolerance`` are after that change. ``warning`` says when the change exceeds what the
    joint allows.
    """

    climate: str
    mean_drift_cents: float
    min_drift_cents: float
    max_drift_cents: float
    spread_cents: float
    adjust_m: float | None
    residual_spread_cents: float
    out_of_tolerance: list[str]
    adjusted_drift_cents: list[float]
    warning: str | None = None


@dataclass(frozen=True)
class Chart:
    """The drift chart of one instrument: a :class:`DriftRow` per note and climate, a
    :class:`ClimateSummary` per climate, and the chart's settings (A4 [Hz], reference climate,
    tolerance [cent]); each note's frequency at the reference [Hz] and its offset from equal
    temperament there [cent]; the notes far from their names (:func:`name_warnings`)."""

    instrument: str
    a4_hz: float
    reference: str
    tolerance_cents: float
    climates: list[str]
    notes: list[str]
    rows: list[DriftRow]
    summary: list[ClimateSummary]
    reference_hz: tuple[float, ...] = ()
    reference_offset_cents: tuple[float, ...] = ()
    name_warnings: tuple[NameWarning, ...] = ()


@dataclass(frozen=True)
class NameWarning:
    """A note whose playing frequency at the instrument's design condition lies more than
    :data:`drift.constants.NAME_WARNING_CENTS` from the equal-temperament pitch of its name.

    Attributes
    ----------
    note : str
        The note's name (scientific pitch notation).
    register : int
    frequency_hz : float
        Playing frequency at the design condition [Hz].
    target_hz : float
        Equal-temperament frequency of the name at the design A4 [Hz].
    offset_cents : float
        1200 log2(frequency / target) [cent].
    a4_hz : float
        The design A4 the target is taken at [Hz].
    """

    note: str
    register: int
    frequency_hz: float
    target_hz: float
    offset_cents: float
    a4_hz: float


def name_warnings(instrument: Instrument, notes=None, frequencies_hz=None) -> tuple[NameWarning, ...]:
    """The named notes that sound more than :data:`drift.constants.NAME_WARNING_CENTS` (50 cents,
    half a semitone) from their name at the design condition.

    Parameters
    ----------
    instrument : drift.instrument.Instrument
    notes : sequence of drift.instrument.Note, optional
        The notes to check (default: all of the instrument's); unnamed fingerings are skipped.
    frequencies_hz : array_like [Hz], optional
        The playing frequency of each of ``notes`` at the design condition, when already known;
        otherwise computed from :func:`drift.thermal.design_profile`.

    Returns
    -------
    tuple of :class:`NameWarning`, in the order of ``notes`` (a note that does not sound, NaN,
    is not flagged).

    Notes
    -----
    The target is the equal-temperament pitch a4 2^((m - 69)/12) of the name's MIDI number m at
    the instrument's ``[design] a4_hz`` (:func:`drift.scale.equal_temperament_hz`; ISO 16:1975).
    """
    notes = instrument.notes if notes is None else tuple(notes)
    if not any(n.name for n in notes):
        return ()
    if frequencies_hz is None:
        found = pitch.note_frequencies(instrument, thermal.design_profile(instrument), notes=notes)
        frequencies_hz = [n.frequency_hz for n in found]
    a4 = instrument.design.a4_hz
    out = []
    for note, f in zip(notes, np.asarray(frequencies_hz, dtype=float)):
        if not note.name or not math.isfinite(f):
            continue
        target = float(equal_temperament_hz(note.name, a4))
        offset = float(cents(f, target))
        if abs(offset) > NAME_WARNING_CENTS:
            out.append(NameWarning(note.name, note.register, float(f), target, offset, a4))
    return tuple(out)


def design_climate(instrument: Instrument) -> Climate:
    """The instrument's ``[design]`` condition as a climate named "design"."""
    d = instrument.design
    return Climate("design", d.room(), Player(playing=d.playing),
                   description=f"design condition of {instrument.name}")


def frequencies(instrument: Instrument, profile: BoreProfile) -> np.ndarray:
    """Playing frequency [Hz] of every note of the instrument with the bore air of ``profile``."""
    return pitch.frequencies_hz(instrument, [profile])[0]


def free_joint(instrument: Instrument) -> Instrument:
    """The instrument with its joint free to move over the whole search range."""
    return dataclasses.replace(instrument, tuning=dataclasses.replace(
        instrument.tuning, min_change_m=-SEARCH_LIMIT_M, max_change_m=SEARCH_LIMIT_M))


#: The joint change is found to this [m] (1 um, about 0.003 cent): the last secant correction is below it.
JOINT_XTOL_M = 1e-6
#: Secant steps without a change of sign before the solver stops looking.
_MAX_UNBRACKETED = 12


def joint_change(instrument: Instrument, profile: BoreProfile, reference_hz: np.ndarray,
                 drift_cents: np.ndarray | None = None) -> float:
    """The joint change [m] that brings the mean drift of all notes against ``reference_hz`` to zero.

    Parameters
    ----------
    instrument : drift.instrument.Instrument
        With a tuning joint.
    profile : drift.bore_state.BoreProfile
        The bore state, held as computed for the unchanged instrument: a few millimetres of tube
        more or less move the profile negligibly.
    reference_hz : ndarray [Hz]
        Each note's frequency at the reference.
    drift_cents : ndarray [cent], optional
        The notes' drift with the joint unchanged; saves recomputing it when known.

    Returns
    -------
    float [m]; > 0 pulls the joint out.

    Raises
    ------
    drift.errors.OutOfRangeError
        When no change within +-:data:`SEARCH_LIMIT_M` centres the notes.

    Notes
    -----
    Secant steps on the mean drift of the instrument with the changed bore
    (:meth:`drift.instrument.Instrument.with_joint_change`), recomputed at every step
    (:func:`joint_changes`).
    """
    if drift_cents is None:
        drift_cents = cents(frequencies(free_joint(instrument), profile), reference_hz)
    (result,) = joint_changes(instrument, [profile], reference_hz, [drift_cents])
    if isinstance(result, OutOfRangeError):
        raise result
    return result[0]


def joint_changes(instrument: Instrument, profiles, reference_hz: np.ndarray, drifts) -> list:
    """The joint change that centres the notes in each of several bore states, solved together.

    Parameters
    ----------
    instrument : drift.instrument.Instrument
        With a tuning joint.
    profiles : sequence of drift.bore_state.BoreProfile
    reference_hz : ndarray [Hz]
        Each note's frequency at the reference.
    drifts : sequence of ndarray [cent]
        Each state's drift of the notes against ``reference_hz`` with the joint unchanged.

    Returns
    -------
    list, per state: (change [m], the notes' frequencies [Hz] with that change), or the
    :class:`drift.errors.OutOfRangeError` saying that no change within
    +-:data:`SEARCH_LIMIT_M` centres the notes.

    Notes
    -----
    The mean drift d(delta) [cent] is close to linear in the change delta (pitch ~ 1/L), so
    secant steps delta <- delta - d (delta - delta_prev) / (d - d_prev) converge in a few
    recomputations. The first step is delta_1 = L (2^(d_0/1200) - 1) (L the bore length, at
    least 0.2 mm). Once two points bracket the root the secant is kept inside the bracket
    (bisection when it would leave it); without a bracket a step is held within
    +-:data:`SEARCH_LIMIT_M`, and a change the bore cannot take (it would cut a hole) halves
    the step instead. The returned change is the last one computed; the solve stops when the
    next correction is below :data:`JOINT_XTOL_M` (1 um; the error of a secant iterate is
    of the order of that correction). All states advance together, their notes recomputed
    in one batched search per step (:func:`drift.pitch.state_frequencies`), tracked from the
    frequencies of the step before.
    """
    free = free_joint(instrument)
    no_root = OutOfRangeError(
        f"{instrument.name}: no joint change within ±{SEARCH_LIMIT_M * 1e3:g} mm centres the notes")
    n = len(profiles)
    points = [[] for _ in range(n)]      # (change, mean drift, frequencies), as computed
    walls = [[-SEARCH_LIMIT_M - 1e-12, SEARCH_LIMIT_M + 1e-12] for _ in range(n)]
    result: list = [None] * n
    trial: list = [None] * n
    for k in range(n):
        start = float(np.nanmean(drifts[k])) if np.any(np.isfinite(drifts[k])) else math.nan
        f0 = reference_hz * 2.0 ** (np.asarray(drifts[k], dtype=float) / 1200.0)
        if start == 0.0:
            result[k] = (0.0, f0)
        elif not math.isfinite(start):
            result[k] = no_root
        else:
            points[k].append((0.0, start, f0))
            step = math.copysign(max(abs(instrument.length_m * (2 ** (start / 1200) - 1)), 2e-4), start)
            trial[k] = max(-SEARCH_LIMIT_M, min(SEARCH_LIMIT_M, step))
    while True:
        todo = [k for k in range(n) if result[k] is None]
        if not todo:
            return result
        changed, ok = [], []
        for k in todo:
            try:
                changed.append(free.with_joint_change(trial[k]))
                ok.append(k)
            except OutOfRangeError:
                _failed(walls[k], points[k], trial[k])
        near = [points[k][-1][2] for k in ok]
        for k, f in zip(ok, pitch.state_frequencies(changed, [profiles[k] for k in ok], near_hz=near)):
            mean = float(np.nanmean(cents(f, reference_hz))) if np.any(np.isfinite(f)) else math.nan
            if math.isfinite(mean):
                points[k].append((trial[k], mean, f))
            else:
                _failed(walls[k], points[k], trial[k])
        for k in todo:
            trial[k], result[k] = _next_change(points[k], walls[k], no_root)


def _failed(walls, points, change):
    """A change the bore could not take (or gave no notes) bounds the search on its side."""
    if change > points[-1][0]:
        walls[1] = min(walls[1], change)
    else:
        walls[0] = max(walls[0], change)


def _next_change(points, walls, no_root):
    """The next change to compute and, when solved, the result (see :func:`joint_changes`)."""
    last = points[-1]
    if last[1] == 0.0:
        return None, (last[0], last[2])
    ordered = sorted(points, key=lambda p: p[0])
    bracket = next(((a, b) for a, b in zip(ordered[:-1], ordered[1:]) if a[1] * b[1] < 0), None)
    guess = math.nan
    if len(points) >= 2:
        prev = points[-2]
        if last[1] != prev[1]:
            guess = last[0] - last[1] * (last[0] - prev[0]) / (last[1] - prev[1])
    if bracket is not None:
        (a, fa, _), (b, fb, _) = bracket
        if b - a <= 2 * JOINT_XTOL_M:
            best = min(bracket, key=lambda p: abs(p[1]))
            return None, (best[0], best[2])
        if not a < guess < b:
            guess = 0.5 * (a + b)
        if abs(guess - last[0]) <= JOINT_XTOL_M:
            return None, (last[0], last[2])
        return guess, None
    if len(points) > _MAX_UNBRACKETED:
        return None, no_root
    low, high = walls
    if not math.isfinite(guess) or (guess - last[0]) * last[1] <= 0:
        # no usable secant (or it points the wrong way): double the last step
        step = last[0] - points[-2][0] if len(points) >= 2 else 2e-4
        guess = last[0] + 2.0 * math.copysign(abs(step), last[1])
    if abs(guess - last[0]) <= JOINT_XTOL_M:
        return None, (last[0], last[2])
    if not low < guess < high:
        wall = high if guess > last[0] else low
        if abs(wall) > SEARCH_LIMIT_M:      # the search range's own end: try it exactly
            guess = math.copysign(SEARCH_LIMIT_M, wall)
        else:                                # a change the bore cannot take: halve the step
            guess = 0.5 * (last[0] + wall)
        if abs(guess - last[0]) <= JOINT_XTOL_M:
            return None, no_root
    return guess, None


def summarise(instrument: Instrument, label: str, drift, solved, reference_hz, names,
              tolerance) -> ClimateSummary:
    """The :class:`ClimateSummary` of one bore state labelled ``label``: the notes' ``drift``
    [cent], the joint change ``solved`` (an item of :func:`joint_changes`, or None without a
    joint), the notes still beyond ``tolerance`` [cent] after it."""
    warning = None
    adjust_m = None
    adjusted = drift
    if instrument.tuning is None:
        warning = "the instrument has no tuning joint; the drift stands as shown"
    elif isinstance(solved, OutOfRangeError):
        warning = str(solved)
    else:
        adjust_m, f = solved
        adjusted = cents(f, reference_hz)
        t = instrument.tuning
        if not t.min_change_m <= adjust_m <= t.max_change_m:
            warning = (f"the needed change of {adjust_m * 1e3:+.1f} mm exceeds what the joint allows "
                       f"({t.min_change_m * 1e3:+.1f} to {t.max_change_m * 1e3:+.1f} mm)")
    return ClimateSummary(
        climate=label,
        mean_drift_cents=float(np.nanmean(drift)),
        min_drift_cents=float(np.nanmin(drift)),
        max_drift_cents=float(np.nanmax(drift)),
        spread_cents=float(np.nanmax(drift) - np.nanmin(drift)),
        adjust_m=adjust_m,
        residual_spread_cents=float(np.nanmax(adjusted) - np.nanmin(adjusted)),
        out_of_tolerance=[n for n, d in zip(names, adjusted) if not abs(d) <= tolerance],
        adjusted_drift_cents=[float(d) for d in adjusted],
        warning=warning,
    )


def drift_chart(instrument: Instrument, climates: list[Climate], reference: Climate | None = None,
                a4_hz: float | None = None, tolerance_cents: float = TOLERANCE_CENTS, progress=None) -> Chart:
    """Compute the drift chart of ``instrument`` over ``climates``.

    Parameters
    ----------
    instrument : drift.instrument.Instrument
    climates : list of Climate
    reference : Climate, optional
        The condition drift is measured from (default: :func:`design_climate`).
    a4_hz : float, optional
        Reference pitch for the offset from equal temperament [Hz] (default: the instrument's
        ``[design] a4_hz``).
    tolerance_cents : float
        Notes whose drift after the joint change exceeds this [cent] are listed.
    progress : callable, optional
        Called with no argument after each climate's bore state is computed (and once for the
        reference's).

    Returns
    -------
    Chart
        A :class:`DriftRow` per note and climate (frequency [Hz], drift against the reference
        and offset from equal temperament [cent]) and a :class:`ClimateSummary` per climate
        (mean, spread, the joint change [m] that centres the mean, what stays out of tune); the
        notes' frequencies at the reference [Hz]; the notes far from their names at the design
        condition (:func:`name_warnings`).

    Raises
    ------
    drift.errors.DriftError
        When the instrument file names no notes.

    Notes
    -----
    Each climate's bore state comes from :func:`drift.thermal.climate_profile`; the notes of
    all of them (and of the reference) are searched together
    (:func:`drift.pitch.state_frequencies`, the same frequencies as
    :func:`drift.pitch.note_frequencies`), and the joint changes of all climates are solved
    together (:func:`joint_changes`).

    Examples
    --------
    >>> from drift import drift_chart, load_climate, load_instrument
    >>> chart = drift_chart(load_instrument("cylindrical-reed"), [load_climate("sunny-lawn")])
    >>> chart.summary[0].mean_drift_cents > 0
    True
    """
    if not instrument.notes:
        raise DriftError(f"{instrument.name}: the instrument file has no [[note]]; a chart needs named notes")
    pitch.check_sounds(instrument)
    a4_hz = instrument.design.a4_hz if a4_hz is None else a4_hz
    at_design = reference is None
    reference = reference or design_climate(instrument)
    names = [n.name for n in instrument.notes]
    equal = np.array([equal_temperament_hz(n, a4_hz) for n in names])
    profiles = []
    for c in [reference, *climates]:
        profiles.append(thermal.climate_profile(instrument, c))
        if progress:
            progress()
    if not at_design:
        profiles.append(thermal.design_profile(instrument))
    # The reference searched in full; every state (the reference again, so that a climate equal to
    # it gives the very same numbers) tracked from there.
    near = pitch.frequencies_hz(instrument, profiles[:1])[0]
    reference_hz, *found = pitch.frequencies_hz(instrument, profiles, near)
    design_hz = reference_hz if at_design else found.pop()
    profiles = profiles[:len(climates) + 1]
    drifts = [cents(f, reference_hz) for f in found]
    solved = (joint_changes(instrument, profiles[1:], reference_hz, drifts) if instrument.tuning is not None
              else [None] * len(climates))
    rows, summary = [], []
    for c, f, drift, fix in zip(climates, found, drifts, solved):
        offset = cents(f, equal)
        for note, value, d, o in zip(instrument.notes, f, drift, offset):
            rows.append(DriftRow(note.name, note.register, c.name, float(value), float(d), float(o)))
        summary.append(summarise(instrument, c.name, drift, fix, reference_hz, names, tolerance_cents))
    return Chart(instrument.name, a4_hz, reference.name, tolerance_cents, [c.name for c in climates],
                 names, rows, summary, tuple(float(f) for f in reference_hz),
                 tuple(float(o) for o in cents(reference_hz, equal)),
                 name_warnings(instrument, instrument.notes, design_hz))



def drift_charts(instruments, climates: list[Climate], reference: Climate | None = None,
                 a4_hz: float | None = None, tolerance_cents: float = TOLERANCE_CENTS, map=map) -> list[Chart]:
    """Drift charts of many instruments (designs) over the same climates: a maker's sweep.

    Parameters
    ----------
    instruments : iterable of drift.instrument.Instrument
        For example one design retuned for each of several rooms.
    climates : list of Climate
    reference, a4_hz, tolerance_cents
        As for :func:`drift_chart`.
    map : callable
        Applies a function to every instrument: the built-in ``map`` (one process, default), or the
        ``map`` of a :class:`concurrent.futures.ProcessPoolExecutor` to spread the charts over
        processes. Every argument is plain data that pickles, so no other change is needed; see
        docs/performance.md for a cluster.

    Returns
    -------
    list of Chart, in the order of ``instruments``.

    Examples
    --------
    >>> from concurrent.futures import ProcessPoolExecutor
    >>> from drift import bundled_instruments, load_climate
    >>> from drift.chart import drift_charts
    >>> with ProcessPoolExecutor(2) as pool:                                 # doctest: +SKIP
    ...     charts = drift_charts(bundled_instruments(), [load_climate("tent-evening")], map=pool.map)
    """
    job = functools.partial(_chart_of, climates=list(climates), reference=reference, a4_hz=a4_hz,
                            tolerance_cents=tolerance_cents)
    return list(map(job, instruments))


def _chart_of(instrument: Instrument, climates, reference, a4_hz, tolerance_cents) -> Chart:
    """:func:`drift_chart` with keyword arguments only (a picklable job for a process pool)."""
    return drift_chart(instrument, climates, reference, a4_hz, tolerance_cents)
