"""The cost of a run, estimated before any heavy work, and the budget it must fit.

A bore the model can serve may still take too long: a long wooden bore has thousands of wall nodes,
and every thermal solve (a steady state, a trajectory) costs about the square to the cube of that
number (a dense finite-difference Jacobian of the heat balance and its factorisation, Newton and
LSODA); every bore state searched for resonances costs about its acoustic segments times its notes,
once per played path of a brass instrument. The estimate counts that work from what is known up
front (the wall the thermal model will use, :func:`drift.segments.instrument_wall`, with its
radial layers; the plan, its rows, the climates, the notes, the played paths, the fit's
evaluations) and weighs it with constants calibrated on measured runs (docs/performance.md,
"Time budget"; ``bench/bench_budget.py``). The estimate is for ordering and refusing, not a
promise: on the 53 runs its constants were fitted to it gave 0.44 to 1.63 times the measured CPU
time, on 7 runs held out 0.84 to 1.53.

Nothing here computes physics: each function reads the instrument and the inputs and counts.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass

from drift.climate import Climate, Phase, plan_duration_s
from drift.constants import LONGEST_PLAN_S, SEGMENT_LENGTH_M
from drift.ensemble import Member
from drift.errors import DriftError
from drift.heat_balance import radial_layers
from drift.instrument import Instrument
from drift.segments import instrument_wall, played_path

#: Seconds per unit of each kind of work (:func:`features`), fitted to the measured CPU time of
#: whole processes (``bench/bench_budget.py --fit``; docs/performance.md, "Time budget"):
#: ``start`` the interpreter, numpy, scipy and the first search [s]; ``solve`` a thermal solve (in
#: steady states) whatever its size, ``solve_n2`` and ``solve_n3`` per N^2 and N^3 of its N wall
#: nodes (the batched Jacobian of N + 1 states of N nodes, then its factorisation) [s]; ``state``
#: a bore state searched, per played path [s]; ``segment`` per acoustic segment of each path (its
#: network built) [s]; ``segment_note`` per acoustic segment and note searched [s]; ``row`` an
#: output row, and ``row_node`` per row and wall node (its state read from the trajectory) [s].
WEIGHTS = {"start": 0.597, "solve": 0.0, "solve_n2": 2.86e-07, "solve_n3": 2.47e-10, "state": 0.00747,
           "segment": 5.97e-05, "segment_note": 3.86e-06, "row": 0.00117, "row_node": 1.17e-06}

#: A trajectory phase of t minutes costs PHASE_FACTOR t^PHASE_EXPONENT steady states (LSODA's
#: steps grow with the time span, less than in proportion). Set by hand, not fitted: in process on
#: a 5 m wooden bore (1000 nodes), 2 min of playing took 0.11-0.16 steady states, 20 + 10 min
#: 1.4-1.5, the 10-hour trajectory of the settle time 4.0-5.0; the rule gives 0.15, 0.9 and 3.6,
#: and the fitted weights take up the rest (docs/performance.md, "Time budget").
PHASE_FACTOR, PHASE_EXPONENT = 0.1, 0.56
#: The settle time from cold follows 10 hours of playing (drift.warmup.SETTLE_SEARCH_S) [s].
SETTLE_SEARCH_S = LONGEST_PLAN_S
#: Bore states searched by a warm-up besides its knots: the reference, the steady state, the
#: settle search from cold (about 32), the joint settings and the check that some note sounds.
WARMUP_STATES = 40
#: Knots searched per phase of a warm-up (about 20 for an hour of playing; fewer for short phases).
KNOTS_PER_PHASE = 12
#: Secant steps of the joint change, each searching every climate or moment once more.
JOINT_STEPS = 4
#: Bore states of a design study (scan, root, sensitivities) and per customer's climate.
DESIGN_STATES, DESIGN_CLIMATE_STATES = 17, 3
#: Evaluations of every note by a retune (65-80 measured on the bundled instruments) and its
#: steady states (the starting and the final layout).
RETUNE_EVALUATIONS, RETUNE_SOLVES = 100, 2
#: Model evaluations of a fit: at most 30 (drift.fit.MOST_TRIALS; 19-24 measured on the guide's
#: log), and its fitted curve. The most, as a budget should err long.
FIT_EVALUATIONS = 31


@dataclass(frozen=True)
class Bore:
    """What the estimate knows of one instrument.

    Attributes
    ----------
    name : str
    length_m : float
        Bore length without loops [m].
    segments : int
        Wall segments of the thermal model (:func:`drift.segments.instrument_wall`), its valve
        loops' included.
    layers : int
        Radial layers of its wall (1 for a thin conductive wall, else 4).
    paths : int
        Played paths (valve combinations, slide positions; 1 without).
    acoustic : int
        Sum over the played paths of acoustic segments times the notes played on that path.
    path_segments : int
        Sum over the played paths of their acoustic segments.
    """

    name: str
    length_m: float
    segments: int
    layers: int
    paths: int
    acoustic: int
    path_segments: int

    @property
    def nodes(self) -> int:
        """Wall nodes of the heat balance: segments times layers."""
        return self.segments * self.layers


def bore_of(instrument: Instrument, names: Sequence[str] | None = None) -> Bore:
    """The :class:`Bore` of an instrument: its wall as the thermal model cuts it, and its notes
    (those named in ``names``, default all) grouped by played path (as
    :func:`drift.pitch.played_paths` groups them)."""
    wall = instrument_wall(instrument)
    notes = instrument.fingerings()
    if names is not None:
        notes = tuple(n for n in notes if n.name in set(names)) or notes
    groups: dict = {}
    for note in notes:
        groups.setdefault(note.path, []).append(note)
    plain = not instrument.valves and instrument.slide is None
    acoustic = cuts = 0
    for members in ([list(notes)] if plain else groups.values()):
        path = instrument if plain else played_path(instrument, members[0]).instrument
        cut = max(1, math.ceil(path.length_m / SEGMENT_LENGTH_M)) + len(path.holes)
        acoustic += cut * len(members)
        cuts += cut
    segments = wall.positions_m.size + sum(b.wall.positions_m.size for b in wall.branches)   # valve loops too
    return Bore(instrument.name, instrument.length_m, int(segments), radial_layers(wall),
                1 if plain else max(1, len(groups)), int(acoustic), int(cuts))


@dataclass(frozen=True)
class Estimate:
    """The estimated cost of a run.

    Attributes
    ----------
    seconds : float
        Estimated CPU time [s].
    thermal_s, acoustic_s, rows_s : float
        Its parts: thermal solves, resonance searches, output rows [s].
    largest : Bore
        The instrument with the most wall nodes.
    busiest : Bore
        The instrument with the most acoustic work.
    solves : float
        Thermal solves of that instrument, in steady states.
    states : int
        Bore states searched, over all instruments.
    rows : int
        Output rows.
    units : dict
        The units of work (:func:`features`).
    """

    seconds: float
    thermal_s: float
    acoustic_s: float
    rows_s: float
    largest: Bore
    busiest: Bore
    solves: float
    states: int
    rows: int
    units: dict


def features(work: Sequence[tuple[Bore, float, int]], rows: int = 0) -> dict[str, float]:
    """The units of work that the constants weigh, for the instruments' (bore, thermal solves in
    steady states, bore states searched) and the output rows: the keys of :data:`WEIGHTS`."""
    nodes = max(b.nodes for b, _, _ in work)
    return {"start": 1.0,
            "solve": sum(solves for _, solves, _ in work),
            "solve_n2": sum(solves * b.nodes**2 for b, solves, _ in work),
            "solve_n3": sum(solves * b.nodes**3 for b, solves, _ in work),
            "state": sum(states * b.paths for b, _, states in work),
            "segment": sum(states * b.path_segments for b, _, states in work),
            "segment_note": sum(states * b.acoustic for b, _, states in work),
            "row": float(rows), "row_node": float(rows * nodes)}


def _estimate(work: Sequence[tuple[Bore, float, int]], rows: int = 0) -> Estimate:
    """Sum the work (:func:`features`) weighed by :data:`WEIGHTS`."""
    units = features(work, rows)
    part = {k: WEIGHTS[k] * v for k, v in units.items()}
    largest, solves, _ = max(work, key=lambda w: w[0].nodes)
    busiest = max(work, key=lambda w: w[2] * (w[0].paths + w[0].acoustic))[0]
    thermal = part["solve"] + part["solve_n2"] + part["solve_n3"]
    acoustic = part["state"] + part["segment"] + part["segment_note"]
    return Estimate(sum(part.values()), thermal, acoustic, part["row"] + part["row_node"], largest, busiest,
                    solves, int(sum(s for _, _, s in work)), int(rows), units)


def phase_solves(duration_s: float) -> float:
    """Thermal solves, in steady states, of a trajectory phase of ``duration_s`` [s]."""
    return PHASE_FACTOR * (max(duration_s, 60.0) / 60.0) ** PHASE_EXPONENT


def plan_solves(plan: Sequence[Phase], restarts: int = 0) -> float:
    """Thermal solves of a plan's trajectory, restarted ``restarts`` times more (at the changes of
    the weather)."""
    return sum(phase_solves(p.duration_s) for p in plan) + restarts * phase_solves(
        plan_duration_s(plan) / (restarts + 1))


def _climate_solves(instrument: Instrument, climate: Climate) -> float:
    """Thermal solves of one climate's bore state: none at rest, a steady state, or a trajectory."""
    if not climate.player.playing:
        return 0.0
    minutes = climate.player.minutes_played
    return 1.0 if minutes is None else phase_solves(minutes * 60.0)


def _design_solves(instrument: Instrument) -> float:
    return 1.0 if instrument.design.playing else 0.0


def chart_cost(instrument: Instrument, climates: Sequence[Climate], reference: Climate | None = None) -> Estimate:
    """The cost of :func:`drift.chart.drift_chart`: a bore state per climate and the reference
    (and the design's), the joint change's steps over all climates."""
    bore = bore_of(instrument)
    solves = sum(_climate_solves(instrument, c) for c in climates) + _design_solves(instrument)
    if reference is not None:
        solves += _climate_solves(instrument, reference)
    states = 2 + len(climates) * (1 + (JOINT_STEPS if instrument.tuning is not None else 0)) + 1
    return _estimate([(bore, solves, states)])


def warmup_cost(instrument: Instrument, plan: Sequence[Phase], step_s: float) -> Estimate:
    """The cost of :func:`drift.warmup.warmup_timeline`: the plan's trajectory, the steady state,
    the reference, the 10-hour trajectory of the settle time from cold; the knots of each phase
    and the other searches; a row every ``step_s`` [s]."""
    bore = bore_of(instrument)
    solves = plan_solves(plan) + 1.0 + _design_solves(instrument) + phase_solves(SETTLE_SEARCH_S)
    rows = int(plan_duration_s(plan) / step_s) + len(plan) + 1
    states = WARMUP_STATES + KNOTS_PER_PHASE * len(plan)
    return _estimate([(bore, solves, states)], rows)


def advise_cost(players, plan: Sequence[Phase], changes: int) -> Estimate:
    """The cost of :func:`drift.gig.plan_gig`: per player (an instrument, or a
    :class:`drift.ensemble.Member` with perhaps a plan of its own), the trajectory of its plan
    (restarted at each of the weather's ``changes``) and the design's steady state; its moments
    (one per play phase, the start and the end) with the joint change at each, and each break
    at 5 lengths."""
    work = []
    for player in players:
        instrument, own = (player.instrument, player.plan) if isinstance(player, Member) else (player, None)
        phases = own or plan
        bore = bore_of(instrument)
        moments = sum(1 for p in plan if p.state == "play") + 2
        breaks = sum(1 for p in plan if p.state == "rest")
        solves = plan_solves(phases, changes) + _design_solves(instrument)
        states = 1 + moments * (1 + (JOINT_STEPS if instrument.tuning is not None else 0)) + 6 * breaks + 1
        work.append((bore, solves, states))
    return _estimate(work)


def design_cost(instrument: Instrument, climates: Sequence[Climate], playing: bool = True) -> Estimate:
    """The cost of :func:`drift.design.design_study`: about 17 bore states (a steady state each when
    played), and per customer's climate its own and the compromise's."""
    bore = bore_of(instrument)
    states = DESIGN_STATES + (DESIGN_CLIMATE_STATES * len(climates) + 3 if climates else 0)
    solves = (states if playing else 0.0) + sum(_climate_solves(instrument, c) for c in climates)
    return _estimate([(bore, solves, states + 1)])


def retune_cost(instrument: Instrument, playing: bool = True) -> Estimate:
    """The cost of :func:`drift.design.retune`: about 100 evaluations of every note (each a layout
    searched), and the steady states of the starting and final layouts when played."""
    bore = bore_of(instrument)
    return _estimate([(bore, RETUNE_SOLVES if playing else 0.0, RETUNE_EVALUATIONS + 3)])


def fit_cost(instrument: Instrument, plan: Sequence[Phase], readings: int,
             names: Sequence[str] | None = None) -> Estimate:
    """The cost of :func:`drift.fit.fit_player`: at most 31 evaluations of the model, each a
    trajectory over the plan and a search of the states at the readings' times, of the notes
    read (``names``, default all)."""
    bore = bore_of(instrument, names)
    solves = FIT_EVALUATIONS * plan_solves(plan)
    return _estimate([(bore, solves, FIT_EVALUATIONS * readings + 2)])


def _minutes(seconds: float) -> str:
    """A time for a message: seconds up to a minute and a half, then minutes."""
    return f"{seconds / 60:.2g} min" if seconds >= 90.0 else f"{seconds:.2g} s"


def check(estimate: Estimate, max_minutes: float, option: str, remedy: str) -> None:
    """Raise :class:`drift.errors.DriftError` when ``estimate`` exceeds ``max_minutes`` [min]: two
    lines naming the estimate, what makes it large, ``remedy`` (what would bring it down) and
    ``option`` with the value that would allow it."""
    if estimate.seconds <= max_minutes * 60.0:
        return
    b = estimate.largest
    parts = {"heat balance": estimate.thermal_s, "resonance searches": estimate.acoustic_s,
             "output rows": estimate.rows_s}
    cause = max(parts, key=parts.get)
    if cause == "heat balance":
        why = (f"bore {b.length_m:.3g} m: {b.nodes} wall nodes ({b.segments} segments x {b.layers} "
               f"layer{'s' if b.layers > 1 else ''}), the work of about {estimate.solves:.0f} steady states")
    elif cause == "resonance searches":
        b = estimate.busiest
        why = (f"{estimate.states} bore states searched; {b.name}: {b.paths} played path{'s' if b.paths > 1 else ''} "
               f"of a {b.length_m:.3g} m bore")
    else:
        why = f"{estimate.rows} output rows of a bore with {b.nodes} wall nodes"
    # Whole minutes, with room for the estimate's error (the shortest estimate was 0.56 times the
    # measured time: twice the estimate covers it).
    allow = max(math.ceil(estimate.seconds / 60.0 * 2.0), 1)
    raise OverBudgetError(
        f"this run would take about {_minutes(estimate.seconds)} of computing, over the limit of "
        f"{option} {max_minutes:g}; most of it the {cause} ({why})\n"
        f"{remedy}; or allow it with {option} {allow}")


class OverBudgetError(DriftError):
    """A run whose estimated cost exceeds its budget, refused before it starts."""
