"""The gig plan: one instrument or an ensemble through an evening whose weather changes, and what
to tell the players.

For each instrument, the thermal trajectory of the evening's plan (:class:`drift.thermal.Trajectory`
in the climate's :class:`drift.climate.Weather`, sun and wind included) gives the bore at the
plan's moments: the start (the first notes, the instrument at air temperature), the end of the
warm-up (the first play phase), the start of each set (each play phase after a rest: the first
note after the break, the wall as it has cooled) and the end. At each moment: every note's drift
against the instrument's design tuning moved to the evening's A4, the mean drift, the joint
setting that centres it (:func:`drift.chart.joint_changes`, recomputing the notes) and what it
leaves out of tune; for the ensemble, each instrument's distance from the ensemble's mean and the
widest gap. During every rest the first note after it is computed for a few lengths of the break
(:meth:`drift.thermal.Trajectory.resumed`), which says how long a break may be before the pitch
moves beyond the tolerance. The advice and the care cautions (:mod:`drift.advice`, common
practice) follow from these.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from drift import advice, chart, pitch, thermal
from drift.climate import Climate, Phase, Room, parse_plan, plan_duration_s
from drift.constants import A4_HZ, GIG_PLAN, TOLERANCE_CENTS
from drift.ensemble import Member
from drift.errors import DriftError, OutOfRangeError
from drift.instrument import Instrument
from drift.scale import cents

#: Fractions of each rest at which the first note after it is computed.
REST_SAMPLES = (0.125, 0.25, 0.5, 0.75, 1.0)


@dataclass(frozen=True)
class Standing:
    """One instrument at one moment.

    Attributes
    ----------
    instrument : str
    mean_drift_cents : float
        Mean drift of the notes [cent] against the instrument's design tuning moved to the
        evening's A4.
    adjust_m : float or None
        Joint change that centres the mean [m] (> 0 out, < 0 in); None without a joint or
        when no change centres it.
    joint_reachable : bool
        Whether the joint has the change within its limits.
    from_ensemble_cents : float
        Mean drift minus the ensemble's mean of the mean drifts [cent].
    out_of_tolerance : list of str
        Notes still beyond the tolerance after the joint change.
    spread_cents : float
        Highest minus lowest note's drift after the joint change [cent].
    warning : str or None
        Why the joint cannot centre the notes.
    has_joint : bool
        Whether the instrument has a tuning joint at all.
    transposition_semitones : int
        The instrument's written minus sounding pitch [semitones] (0 at concert pitch), for
        naming its notes as written.
    """

    instrument: str
    mean_drift_cents: float
    adjust_m: float | None
    joint_reachable: bool
    from_ensemble_cents: float
    out_of_tolerance: list[str]
    spread_cents: float
    warning: str | None = None
    has_joint: bool = True
    transposition_semitones: int = 0


@dataclass(frozen=True)
class GigMoment:
    """The ensemble at one moment of the plan: time [s], label, the room then, one
    :class:`Standing` per instrument, the widest gap between two instruments' mean drifts [cent]
    and between whom (the sharper first)."""

    time_s: float
    label: str
    room: Room
    standings: list[Standing]
    widest_gap_cents: float
    widest_pair: tuple[str, str]


@dataclass(frozen=True)
class BreakShift:
    """How far an instrument's first note after a break moves with the break's length.

    ``rest_s`` (k,) lengths of the break so far [s]; ``shift_cents`` (k,) the mean drift of the
    first note played then, minus the mean drift when the break began [cent]; ``retune_after_s``
    the length [s] at which the shift first exceeds the tolerance (linear between the lengths
    computed), None when it never does within the break.
    """

    instrument: str
    label: str
    start_s: float
    rest_s: np.ndarray
    shift_cents: np.ndarray
    retune_after_s: float | None


@dataclass(frozen=True)
class GigCaution:
    """A care caution (common practice) with the condition that calls for it and the instruments
    it concerns."""

    topic: str
    when: str
    text: str
    instruments: tuple[str, ...]


@dataclass(frozen=True)
class GigPlan:
    """The evening: the moments, the breaks, the advice and the cautions.

    ``tune_to`` is the instrument the others tune to; ``retune_after_s`` [s] the shortest break
    after which some instrument's first note lies beyond the tolerance (None: no break of the
    plan moves any that far); ``advice`` plain sentences; ``extremes`` the climate's coldest,
    hottest, sunniest, dampest and driest moments (:func:`drift.advice.extremes`).
    """

    instruments: list[str]
    climate: str
    plan: tuple[Phase, ...]
    a4_hz: float
    tolerance_cents: float
    moments: list[GigMoment]
    breaks: list[BreakShift]
    tune_to: str
    retune_after_s: float | None
    advice: list[str]
    cautions: list[GigCaution]
    extremes: dict


def plan_moments(plan) -> list[tuple[float, str, int]]:
    """(time [s], label, phase index) of the moments of a plan: 'start', 'after warm-up' (end of
    the first play phase), 'set N' (start of each play phase after a rest) and 'end' (when the
    plan ends playing after a set)."""
    if plan[0].state != "play":
        raise OutOfRangeError("the plan must start with play (the warm-up), e.g. play:10,rest:10,play:45")
    marks = [(0.0, "start", 0), (plan[0].duration_s, "after warm-up", 0)]
    start, sets = 0.0, 0
    for index, phase in enumerate(plan):
        if index > 0 and phase.state == "play" and plan[index - 1].state == "rest":
            sets += 1
            marks.append((start, f"set {sets}", index))
        start += phase.duration_s
    if sets and plan[-1].state == "play":
        marks.append((start, "end", len(plan) - 1))
    return marks


def _labels(names) -> list[str]:
    """The names, numbered where the same name appears twice."""
    out = []
    for k, name in enumerate(names):
        n = names[:k + 1].count(name)
        out.append(name if names.count(name) == 1 else f"{name} {n}")
    return out


def _crossing(rest_s, shift, tolerance) -> float | None:
    """First rest length [s] at which |shift| exceeds ``tolerance``, linear between samples
    (the shift is 0 at a break's start)."""
    x = np.concatenate([[0.0], rest_s])
    y = np.abs(np.concatenate([[0.0], shift]))
    over = np.flatnonzero(y > tolerance)
    if over.size == 0:
        return None
    k = int(over[0])
    return float(x[k - 1] + (tolerance - y[k - 1]) * (x[k] - x[k - 1]) / (y[k] - y[k - 1]))


def _instrument_evening(instrument: Instrument, climate: Climate, plan, own_plan, marks, a4_hz, tolerance,
                        label):
    """The summaries of one instrument at the moments, and its breaks. With ``own_plan`` (the
    player's own), the moments of the ensemble's ``plan`` find the player playing, or give their
    first note had they played then (:meth:`drift.thermal.Trajectory.resumed`)."""
    if not instrument.notes:
        raise DriftError(f"{instrument.name}: the instrument file has no [[note]]; advice needs named notes")
    breath = climate.player.breath
    if own_plan is not None and plan_duration_s(own_plan) != plan_duration_s(plan):
        raise OutOfRangeError(f"{label}: its own plan lasts {plan_duration_s(own_plan) / 60:g} min, the "
                              f"ensemble's {plan_duration_s(plan) / 60:g} min; they must last as long")
    plan = plan if own_plan is None else own_plan
    trajectory = thermal.instrument_trajectory(instrument, climate.schedule(), plan, breath)
    states = [trajectory.state(t, index) if own_plan is None else trajectory.resumed(t)
              for t, _, index in marks]
    rests = [i for i in range(1, len(plan) - 1)
             if plan[i].state == "rest" and plan[i - 1].state == "play" and plan[i + 1].state == "play"]
    rest_profiles, rest_times = [], []
    for i in rests:
        start = trajectory.starts_s[i]
        lengths = np.array(REST_SAMPLES) * plan[i].duration_s
        rest_times.append(lengths)
        rest_profiles.append(trajectory.state(start, i - 1).profile)
        rest_profiles.extend(trajectory.resumed(start + x).profile for x in lengths)
    profiles = [s.profile for s in states]
    design_profile = thermal.design_profile(instrument, breath)
    near = pitch.frequencies_hz(instrument, [design_profile])[0]
    design, *found = pitch.frequencies_hz(instrument, [design_profile, *profiles, *rest_profiles], near)
    reference_hz = design * (a4_hz / instrument.design.a4_hz)
    drifts = [cents(f, reference_hz) for f in found]
    moment_drifts = drifts[:len(marks)]
    solved = (chart.joint_changes(instrument, profiles, reference_hz, moment_drifts)
              if instrument.tuning is not None else [None] * len(marks))
    names = [n.name for n in instrument.notes]
    summaries = [chart.summarise(instrument, m[1], d, s, reference_hz, names, tolerance)
                 for m, d, s in zip(marks, moment_drifts, solved)]
    breaks = []
    rest_drifts = drifts[len(marks):]
    per = len(REST_SAMPLES) + 1
    for k, i in enumerate(rests):
        block = [float(np.nanmean(d)) for d in rest_drifts[k * per:(k + 1) * per]]
        shift = np.array(block[1:]) - block[0]
        start = trajectory.starts_s[i]
        breaks.append(BreakShift(label, f"break from minute {start / 60:g}", start, rest_times[k], shift,
                                 _crossing(rest_times[k], shift, tolerance)))
    return summaries, breaks


def plan_gig(instruments, climate: Climate, plan=GIG_PLAN, a4_hz: float | None = None,
             tolerance_cents: float = TOLERANCE_CENTS, progress=None) -> GigPlan:
    """Where each instrument of an ensemble sits through an evening, and what to tell the players.

    Parameters
    ----------
    instruments : sequence of drift.instrument.Instrument or drift.ensemble.Member
        One or more players (the same name twice is numbered); a member may have a plan of its
        own, as long as the ensemble's.
    climate : drift.climate.Climate
        Its weather (``[[change]]``, sun and wind) and its breath; its ``[player]`` playing and
        minutes_played give way to the plan.
    plan : str or sequence of Phase
        Starting with play (the warm-up); every play phase after a rest is a set.
    a4_hz : float, optional
        The evening's A4 [Hz] (default 440): each instrument's design tuning is moved to it.
    tolerance_cents : float
        Notes beyond this after the joint change are listed [cent]; a break that moves an
        instrument's mean further calls for retuning.
    progress : callable, optional
        Called once per instrument done.

    Returns
    -------
    GigPlan

    Examples
    --------
    >>> from drift import load_climate, load_instrument, plan_gig
    >>> gig = plan_gig([load_instrument("cylindrical-reed")], load_climate("hillside-evening"),
    ...                "play:5,rest:5,play:5")                          # doctest: +SKIP
    >>> [m.label for m in gig.moments]                                  # doctest: +SKIP
    ['start', 'after warm-up', 'set 1', 'end']
    """
    instruments = list(instruments)
    if not instruments:
        raise OutOfRangeError("advice needs at least one instrument")
    plan = parse_plan(plan) if isinstance(plan, str) else tuple(plan)
    a4_hz = A4_HZ if a4_hz is None else float(a4_hz)
    marks = plan_moments(plan)
    members = [m if isinstance(m, Member) else Member(m, m.name) for m in instruments]
    instruments = [m.instrument for m in members]
    for instrument in instruments:
        pitch.check_sounds(instrument)
    labels = _labels([m.label for m in members])
    per_instrument, breaks = [], []
    for member, label in zip(members, labels):
        summaries, shifts = _instrument_evening(member.instrument, climate, plan, member.plan, marks, a4_hz,
                                                tolerance_cents, label)
        per_instrument.append(summaries)
        breaks.extend(shifts)
        if progress is not None:
            progress()
    weather = climate.schedule()
    moments = []
    for k, (t, label, _) in enumerate(marks):
        means = np.array([s[k].mean_drift_cents for s in per_instrument])
        centre = float(np.mean(means))
        standings = [Standing(name, s[k].mean_drift_cents, s[k].adjust_m,
                              s[k].adjust_m is not None and s[k].warning is None,
                              float(s[k].mean_drift_cents - centre), list(s[k].out_of_tolerance),
                              s[k].residual_spread_cents, s[k].warning, inst.tuning is not None,
                              inst.transposition_semitones)
                     for name, s, inst in zip(labels, per_instrument, instruments)]
        high, low = int(np.argmax(means)), int(np.argmin(means))
        moments.append(GigMoment(t, label, weather.room_at(t), standings, float(means[high] - means[low]),
                                 (labels[high], labels[low])))
    tune_to = _tune_to(moments[1])
    crossings = [b.retune_after_s for b in breaks if b.retune_after_s is not None]
    retune_after = min(crossings) if crossings else None
    gig = GigPlan(labels, climate.name, plan, a4_hz, tolerance_cents, moments, breaks, tune_to, retune_after,
                  [], _cautions(instruments, labels, climate), advice.extremes(climate))
    gig.advice.extend(_advice(gig))
    return gig


def _tune_to(moment: GigMoment) -> str:
    """Whom the others tune to: among the instruments without a joint, else among those whose
    joint cannot centre them, else among all, the one nearest the ensemble's mean (the smallest
    moves for the others)."""
    candidates = ([s for s in moment.standings if not s.has_joint]
                  or [s for s in moment.standings if not s.joint_reachable] or moment.standings)
    return min(candidates, key=lambda s: abs(s.from_ensemble_cents)).instrument


def _minutes(seconds: float) -> str:
    return f"{seconds / 60.0:.0f} min"


def _short(seconds: float) -> str:
    """A duration in minutes, with a decimal under 10 min."""
    minutes = seconds / 60.0
    return f"{minutes:.1f} min" if minutes < 10 else f"{minutes:.0f} min"


def _advice(gig: GigPlan) -> list[str]:
    """The plain advice that follows from the moments and the breaks."""
    tol = gig.tolerance_cents
    out = []
    start, warm = gig.moments[0], gig.moments[1]
    ensemble = len(gig.instruments) > 1
    if ensemble:
        standing = next(s for s in warm.standings if s.instrument == gig.tune_to)
        why = ("it has no tuning joint" if not standing.has_joint else
               "its joint cannot centre it" if not standing.joint_reachable
               else "it sits nearest the ensemble's middle")
        out.append(f"Tune to the {gig.tune_to} after the warm-up ({why}).")
        for m in (start, warm):
            if m.widest_gap_cents > tol:
                out.append(f"{m.label.capitalize()}: the {m.widest_pair[0]} sits "
                           f"{m.widest_gap_cents:.0f} cents sharp of the {m.widest_pair[1]}.")
    if start.standings and max(abs(s.mean_drift_cents - w.mean_drift_cents)
                               for s, w in zip(start.standings, warm.standings)) > tol:
        out.append(f"Do not tune on the first notes: play {_minutes(warm.time_s)} first; the pitch "
                   f"moves by more than {tol:g} cents while the instruments warm.")
    for m in gig.moments[2:]:
        if not m.label.startswith("set"):
            continue
        moved = max(m.standings, key=lambda s: abs(s.mean_drift_cents - _at(warm, s.instrument)))
        change = moved.mean_drift_cents - _at(warm, moved.instrument)
        when = f"{m.label} (minute {m.time_s / 60:.0f})"
        if abs(change) > tol or (ensemble and m.widest_gap_cents > tol):
            out.append(f"Retune before {when}: the {moved.instrument} has moved {change:+.0f} cents since "
                       f"the warm-up" + (f"; widest gap {m.widest_gap_cents:.0f} cents." if ensemble else "."))
        else:
            out.append(f"Check the tuning before {when}: no instrument has moved more than {tol:g} cents "
                       f"since the warm-up.")
    if gig.breaks:
        if gig.retune_after_s is not None:
            first = min((b for b in gig.breaks if b.retune_after_s is not None), key=lambda b: b.retune_after_s)
            out.append(f"After a break longer than {_short(gig.retune_after_s)}, retune: the "
                       f"{first.instrument}'s first note then lies more than {tol:g} cents from where "
                       f"it was ({first.label}).")
        else:
            longest = max(float(b.rest_s[-1]) for b in gig.breaks)
            out.append(f"Breaks of up to {longest / 60:.0f} min move no first note by more than {tol:g} cents.")
    for name in gig.instruments:
        stuck = [(m.label, s.warning) for m in gig.moments for s in m.standings
                 if s.instrument == name and s.warning]
        if stuck:
            out.append(f"The {name} at {', '.join(label for label, _ in stuck)}: {stuck[0][1]}.")
    return out


def _at(moment: GigMoment, name: str) -> float:
    return next(s.mean_drift_cents for s in moment.standings if s.instrument == name)


def _cautions(instruments, labels, climate) -> list[GigCaution]:
    """The cautions of every instrument's material, each listed once with the instruments it
    concerns."""
    merged: dict = {}
    for instrument, label in zip(instruments, labels):
        material = instrument.wall_material
        for c in advice.cautions(material.name, climate, material.solar_absorptance):
            merged.setdefault((c.topic, c.when, c.text), []).append(label)
    return [GigCaution(topic, when, text, tuple(names)) for (topic, when, text), names in merged.items()]

