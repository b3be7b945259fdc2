"""Thermal state of a played bore: air temperature, breath content and wall temperature in time.

The model, in brief (equations, assumptions and sources in docs/physics.md, section "Thermal state"):

- **Air side, playing.** A mean breath flow enters the bore at the breath temperature, saturated,
  and flows down the bore to where it leaves (the first open tone hole of the note being played, or
  the open end). It exchanges heat with the wall through laminar internal convection (thermal entry
  length correlation of Hausen 1943, blended into Gnielinski 1976 above Re = 2300). The air holds so
  little heat that it is quasi-steady: over a segment at wall temperature T_w the air temperature
  approaches T_w as exp(-NTU). Where it cools below its dew point, water condenses (composition capped
  at saturation through the air layer) and the latent heat goes into the wall.
- **Wall.** Each bore segment is a cylindrical shell of the instrument's material, lumped into one
  or a few radial layers, conducting along the bore and through its thickness, and losing heat to the
  room by natural and forced convection (Churchill & Chu 1975; Churchill & Bernstein 1977, the
  air speed the instrument's motion and the wind) and radiation, and gaining the sunshine its
  surface absorbs outdoors.
- **Valve loops.** Each loop is a wall of its own beside the bore, carrying the share of the
  flow of the notes that press its valve and fed by the air flowing past it; a loop no note uses
  stays at room temperature (:class:`drift.heat_balance.HeatBalance`).
- **Rests.** No flow: the bore air takes the temperature of the inner wall (its own relaxation time
  is under a second), and the breath gas gives way to room air exponentially in time.
- The wall temperatures obey an ODE solved with :func:`scipy.integrate.solve_ivp` over a play/rest
  plan; the steady state solves the same heat balance with :func:`scipy.optimize.root`.

The result handed to the acoustics is a :class:`BoreProfile`: air temperature, breath fraction and
wall temperature along the bore. Gas properties are not evaluated inside the ODE: the air layer
(CoolProp) is called for three states up front (inflowing gas at its inlet temperature and at the
mean of inlet and room temperature, room air at room temperature) and the saturation water
fraction is tabulated over the temperature range of the problem and interpolated. The heat balance
itself (also in a room that changes in time) lives in :mod:`drift.heat_balance`, the correlations
in :mod:`drift.heat_transfer`, the wall segments in :mod:`drift.segments`.

References
----------
Incropera, F. P., DeWitt, D. P., Bergman, T. L., Lavine, A. S. (2007). Fundamentals of Heat and Mass
Transfer, 6th ed. Wiley (Eqs. 3.27, 8.42b).
"""

from __future__ import annotations

import bisect
import dataclasses
import math
from dataclasses import dataclass, field
from typing import Sequence

import numpy as np

from drift import constants as K
from drift.bore_state import BoreProfile
from drift.climate import (DEFAULT_BREATH, Blowing, Breath, Climate, Phase, Room, Weather, default_blowing,
                           plan_duration_s)
from drift.errors import OutOfRangeError
from drift.heat_balance import HeatBalance, heat_balance
from drift.instrument import Instrument
from drift.segments import Wall, instrument_wall


@dataclass(frozen=True)
class ThermalState:
    """The instrument at one moment: the profile handed to the acoustics layer, and the balance.

    Attributes
    ----------
    time_s : float
        Time since the start of the plan [s] (inf for the steady state).
    phase : str
        'play' or 'rest'.
    profile : BoreProfile
        Air temperature, breath fraction and (mean) wall temperature at the segment centres.
    wall_k : ndarray (n, m)
        Temperature of every wall layer [K], inner layer first (the bore's segments, then those
        of each valve loop).
    breath_heat_w : float
        Heat the breath gives up in the bore at this moment [W] (sensible + latent).
    room_loss_w : float
        Heat the outer surface loses to the room [W].
    latent_w : float
        Latent heat of condensation released into the wall [W].
    condensation_kg_s : float
        Water condensing in the bore [kg/s].
    condensing : ndarray of bool (n,)
        Segments where water condenses.
    outlet_k : ndarray (n,)
        Temperature of the air leaving each segment while playing [K] (NaN where no flow passes
        and while resting).
    stored_j : float
        Heat held by the wall above room temperature [J].
    breath_heat_j, room_loss_j : float
        Heat given up by the breath and lost to the room since the start of the plan [J].
    """

    time_s: float
    phase: str
    profile: BoreProfile
    wall_k: np.ndarray = field(repr=False)
    breath_heat_w: float = 0.0
    room_loss_w: float = 0.0
    latent_w: float = 0.0
    condensation_kg_s: float = 0.0
    condensing: np.ndarray = field(default=None, repr=False)
    outlet_k: np.ndarray = field(default=None, repr=False)
    stored_j: float = 0.0
    breath_heat_j: float = 0.0
    room_loss_j: float = 0.0

    @property
    def breath_fraction(self) -> np.ndarray:
        """Breath fraction of every wall segment of the state [0-1]: the bore's, then each valve
        loop's."""
        return np.concatenate([self.profile.breath_fraction] + [p.breath_fraction for _, p in self.profile.loops])


def _state(model: HeatBalance, time_s, phase, temps, breath_fraction, totals=(0.0, 0.0)) -> ThermalState:
    _, d = model.heat_flows(temps[None], phase == "play", time_s)
    wall_mean = np.sum(model.capacity * temps, axis=1) / np.sum(model.capacity, axis=1)
    phi = np.asarray(breath_fraction, dtype=float)
    room = model.room_at(time_s)
    profiles = {name: BoreProfile(room, wall.positions_m.copy(), d.air_k[0, part], phi[part], wall_mean[part],
                                  model.breath) for name, wall, part in model.parts}
    bore = profiles.pop(None)
    profile = dataclasses.replace(bore, loops=tuple(profiles.items())) if profiles else bore
    return ThermalState(float(time_s), phase, profile, temps.copy(), float(d.breath_heat_w[0]),
                        float(d.room_loss_w[0]), float(d.latent_w[0]), float(d.condensation_kg_s[0]),
                        d.condensing[0], d.outlet_k[0], model.stored_j(temps, time_s), float(totals[0]),
                        float(totals[1]))


def steady_state(wall: Wall, room: Room, blowing: Blowing, breath: Breath = DEFAULT_BREATH,
                 layers: int | None = None) -> ThermalState:
    """The thermal state of a bore played long enough: wall heat balance at rest in time.

    Solves, for every wall node, 0 = (heat from the breath) + (conduction from neighbours) - (loss
    to the room) by damped Newton steps from the room temperature (:func:`_newton`, the Jacobian
    by forward differences evaluated in one batch, :meth:`drift.heat_balance.HeatBalance.jacobian`), to 1e-10 W per node;
    should that fail, by :func:`scipy.optimize.root` (Powell's hybrid method) from a long
    integration of the transient, checked to 1e-9 W per node.

    Parameters
    ----------
    wall : Wall
    room : Room
    blowing : Blowing
    breath : Breath
    layers : int, optional
        Radial layers of the wall (default: 1 for thin conductive walls, 4 otherwise).

    Returns
    -------
    ThermalState
        With ``time_s = inf`` and ``phase = 'play'``.
    """
    model = heat_balance(wall, room, blowing, breath, layers)
    shape = (model.n, model.m)
    nodes = model.n * model.m
    capacity = model.capacity.ravel()

    def residual(y):
        return model.heat_flows(y.reshape((1,) + shape), True)[0].ravel()

    def jacobian(y):
        return model.jacobian(np.concatenate([y, [0.0, 0.0]]), True)[:nodes, :nodes] * capacity[:, None]

    guess = np.full(nodes, room.temperature_k)
    y, worst = _newton(residual, jacobian, guess)
    if worst > 1e-9:
        # Rarely needed: Powell's hybrid method, from a long integration of the transient.
        from scipy.optimize import root

        start = _integrate(model, True, guess, 0.0, 4 * 3600.0).y[:-2, -1]
        y = root(residual, start, jac=jacobian, method="hybr", options={"xtol": 1e-12}).x
        worst = float(np.max(np.abs(residual(y))))
        if worst > 1e-6:
            raise OutOfRangeError(f"the steady thermal state did not converge (residual {worst:.2g} W)")
    return _state(model, math.inf, "play", y.reshape(shape), model.phi_play)


def _newton(residual, jacobian, y, tolerance: float = 1e-10, iterations: int = 40):
    """Damped Newton iteration on ``residual(y) = 0``: full steps, halved while they do not lower
    the largest residual (Dennis & Schnabel 1996, Numerical Methods for Unconstrained Optimization
    and Nonlinear Equations, SIAM, Sec. 6.3: backtracking on the residual's norm). Returns the last
    iterate and its largest |residual|."""
    r = residual(y)
    worst = float(np.max(np.abs(r)))
    for _ in range(iterations):
        if worst <= tolerance:
            break
        step = np.linalg.solve(jacobian(y), -r)
        damping = 1.0
        while damping > 1e-3:
            trial = y + damping * step
            r_trial = residual(trial)
            worst_trial = float(np.max(np.abs(r_trial)))
            if worst_trial < worst:
                break
            damping *= 0.5
        else:
            break
        y, r, worst = trial, r_trial, worst_trial
        if np.max(np.abs(damping * step)) < 1e-13:
            break
    return y, worst


def _integrate(model: HeatBalance, playing: bool, y0, t0, t1):
    """Integrate the wall temperatures (and two heat totals) from t0 to t1 [s] with dense output,
    restarting at the times where the weather changes its rate (``model.kinks_s``)."""
    from scipy.integrate import solve_ivp

    n_nodes = model.n * model.m
    y = np.asarray(y0, dtype=float)
    if y.size == n_nodes:
        y = np.concatenate([y, [0.0, 0.0]])
    pieces = []
    for a, b in _spans(t0, t1, model.kinks_s):
        sol = solve_ivp(model.rhs(playing), (a, b), y, method="LSODA", dense_output=True,
                        jac=model.jac(playing),
                        rtol=1e-7, atol=np.concatenate([np.full(n_nodes, 1e-6), [1e-3, 1e-3]]))
        if not sol.success:
            raise OutOfRangeError(f"the thermal integration failed: {sol.message}")
        pieces.append(sol)
        y = sol.y[:, -1]
    return pieces[0] if len(pieces) == 1 else _Pieces(pieces)


def _spans(t0: float, t1: float, cuts) -> list[tuple[float, float]]:
    """[t0, t1] cut at the times of ``cuts`` strictly inside it."""
    edges = [t0, *(t for t in cuts if t0 < t < t1), t1]
    return list(zip(edges[:-1], edges[1:]))


class _Pieces:
    """Solutions of consecutive spans read as one: ``sol(t)`` from the span holding t, ``y`` of
    the last."""

    def __init__(self, pieces):
        self.pieces, self.ends = pieces, [p.t[-1] for p in pieces]
        self.y = pieces[-1].y

    def sol(self, t):
        return self.pieces[min(bisect.bisect_left(self.ends, t), len(self.pieces) - 1)].sol(t)


class Trajectory:
    """The thermal timeline of a play/rest plan, integrated once, and its state at any time.

    The plan starts from ``initial`` (default: wall at room temperature, bore full of room air).
    While playing, the wall temperatures follow C dT/dt = (heat from the breath) + (conduction) -
    (loss to the room), integrated phase by phase by :func:`scipy.integrate.solve_ivp` (LSODA,
    rtol 1e-7) with its dense output (the solver's own interpolant between steps), so a state at
    any time costs no new integration; the air is quasi-steady over the wall. While resting there
    is no flow, the air takes the inner-wall temperature and the breath fraction decays as
    exp(-t / tau) with tau = ``blowing.exchange_time_s``.

    Parameters
    ----------
    wall : Wall
    room : Room or Weather
        The room, or a room that changes in time from the start of the plan
        (:class:`drift.heat_balance.ChangingHeatBalance`).
    plan : sequence of Phase
    blowing : Blowing
    breath : Breath
    initial : ThermalState, optional
        State to start from (its wall layers and breath fraction).
    layers : int, optional
        Radial layers of the wall.
    """

    def __init__(self, wall: Wall, room: Room | Weather, plan: Sequence[Phase], blowing: Blowing,
                 breath: Breath = DEFAULT_BREATH, initial: ThermalState | None = None,
                 layers: int | None = None):
        if not plan:
            raise OutOfRangeError("a plan needs at least one phase")
        self.model = model = heat_balance(wall, room, blowing, breath, layers)
        self.plan = tuple(plan)
        self.total_s = plan_duration_s(plan)
        shape = (model.n, model.m)
        if initial is None:
            y = np.full(model.n * model.m, model.room_at(0.0).temperature_k)
            phi = np.zeros(model.n)
        else:
            if initial.wall_k.shape != shape:
                raise OutOfRangeError("the initial state does not belong to this wall (segments or layers differ)")
            y = initial.wall_k.ravel().copy()
            phi = initial.breath_fraction
        self.starts_s, self.ends_s, self._solutions, self._phi_start = [], [], [], []
        start = 0.0
        for index, phase in enumerate(self.plan):
            end = start + phase.duration_s if index < len(self.plan) - 1 else self.total_s
            solution = _integrate(model, phase.state == "play", y, start, end)
            self.starts_s.append(start)
            self.ends_s.append(end)
            self._solutions.append(solution)
            self._phi_start.append(phi)
            y = solution.y[:, -1]
            phi = self._breath_fraction(index, end)
            start = end

    def _breath_fraction(self, index: int, time_s: float) -> np.ndarray:
        if self.plan[index].state == "play":
            return self.model.phi_play
        tau = self.model.blowing.exchange_time_s
        return self._phi_start[index] * math.exp(-(time_s - self.starts_s[index]) / tau)

    def phase_of(self, time_s: float) -> int:
        """Index of the phase a time [s] belongs to: a time on the boundary between two phases
        belongs to the earlier one, time 0 to the first."""
        if not (np.isfinite(time_s) and -1e-9 <= time_s <= self.total_s + 1e-9):
            raise OutOfRangeError(f"times must lie within the plan, 0 to {self.total_s / 60.0:g} min")
        return min(int(np.searchsorted(self.ends_s, time_s - 1e-9)), len(self.plan) - 1)

    def state(self, time_s: float, phase: int | None = None) -> ThermalState:
        """The :class:`ThermalState` at a time [s] of the plan.

        ``phase`` evaluates the given phase's dynamics at ``time_s`` (clipped to the phase), for
        example a play phase at its own start, just after a rest; default :meth:`phase_of`.
        """
        index = self.phase_of(time_s) if phase is None else int(phase)
        t = min(max(float(time_s), self.starts_s[index]), self.ends_s[index])
        y = self._solutions[index].sol(t)
        n_nodes = self.model.n * self.model.m
        return _state(self.model, float(time_s), self.plan[index].state,
                      y[:n_nodes].reshape(self.model.n, self.model.m), self._breath_fraction(index, t),
                      y[n_nodes:])

    def resumed(self, time_s: float) -> ThermalState:
        """The state at a time [s] of the plan as if playing resumed then: the wall as it is at
        that time (cooled, during a rest), the bore air and breath of the played heat balance
        over it (the first note after a break). Within a play phase, :meth:`state` itself."""
        now = self.state(time_s)
        if now.phase == "play":
            return now
        return _state(self.model, float(time_s), "play", now.wall_k, self.model.phi_play,
                      (now.breath_heat_j, now.room_loss_j))

    def states(self, times_s) -> list[ThermalState]:
        """:meth:`state` at every time [s], in the order given."""
        return [self.state(float(t)) for t in np.asarray(times_s, dtype=float).ravel()]


def timeline(wall: Wall, room: Room, plan: Sequence[Phase], times_s, blowing: Blowing,
             breath: Breath = DEFAULT_BREATH, initial: ThermalState | None = None,
             layers: int | None = None) -> list[ThermalState]:
    """Thermal states at chosen times [s] of a play/rest plan (:class:`Trajectory`).

    A time on the boundary between two phases belongs to the earlier one; time 0 to the first.
    Returns one :class:`ThermalState` per time, in the order of ``times_s``.
    """
    return Trajectory(wall, room, plan, blowing, breath, initial, layers).states(times_s)


# --------------------------------------------------------------------------------------------
# Instruments
# --------------------------------------------------------------------------------------------


def instrument_steady_state(instrument: Instrument, room: Room, breath: Breath = DEFAULT_BREATH,
                            blowing: Blowing | None = None) -> ThermalState:
    """:func:`steady_state` of an instrument (its wall from :func:`instrument_wall`)."""
    return steady_state(instrument_wall(instrument), room, blowing or default_blowing(instrument.excitation), breath)


def instrument_trajectory(instrument: Instrument, room: Room, plan: Sequence[Phase],
                          breath: Breath = DEFAULT_BREATH, blowing: Blowing | None = None,
                          initial: ThermalState | None = None) -> Trajectory:
    """:class:`Trajectory` of an instrument over a plan (its wall from :func:`instrument_wall`,
    its blowing by default the excitation's)."""
    blowing = blowing or default_blowing(instrument.excitation)
    return Trajectory(instrument_wall(instrument), room, plan, blowing, breath, initial)


def instrument_timeline(instrument: Instrument, room: Room, plan: Sequence[Phase], times_s,
                        breath: Breath = DEFAULT_BREATH, blowing: Blowing | None = None,
                        initial: ThermalState | None = None) -> list[ThermalState]:
    """:func:`timeline` of an instrument (:func:`instrument_trajectory`)."""
    return instrument_trajectory(instrument, room, plan, breath, blowing, initial).states(times_s)


def bore_profile(instrument: Instrument, room: Room, playing: bool = True, minutes_played: float | None = None,
                 breath: Breath = DEFAULT_BREATH, blowing: Blowing | None = None) -> BoreProfile:
    """The bore profile of an instrument in a room, for the acoustics layer.

    Parameters
    ----------
    instrument : drift.instrument.Instrument
    room : Room
    playing : bool
        False: the instrument rests at room temperature, full of room air.
    minutes_played : float or None
        Minutes of playing from a cold start (instrument at room temperature, full of room air);
        None: played long enough for the steady state.
    breath : Breath
    blowing : Blowing, optional
        Default: the excitation's (:func:`drift.climate.default_blowing`).
    """
    if not playing:
        return BoreProfile.uniform(room, 0.0, breath)
    if minutes_played is None:
        return instrument_steady_state(instrument, room, breath, blowing).profile
    if not 0.0 <= minutes_played * 60.0 <= K.LONGEST_PLAN_S:
        raise OutOfRangeError(f"minutes played {minutes_played:g} is outside the allowed range "
                              f"0 to {K.LONGEST_PLAN_S / 60:g}")
    if minutes_played == 0.0:
        plan, t = (Phase("play", 60.0),), 0.0
    else:
        plan, t = (Phase("play", minutes_played * 60.0),), minutes_played * 60.0
    return instrument_timeline(instrument, room, plan, [t], breath, blowing)[0].profile


def climate_profile(instrument: Instrument, climate: Climate) -> BoreProfile:
    """The bore profile of an instrument in a :class:`drift.climate.Climate`: its room, and its
    player's ``playing``, ``minutes_played``, breath and blowing (:func:`bore_profile`)."""
    p = climate.player
    return bore_profile(instrument, climate.room, p.playing, p.minutes_played, p.breath,
                        p.blowing(instrument.excitation))


def design_profile(instrument: Instrument, breath: Breath = DEFAULT_BREATH) -> BoreProfile:
    """The bore profile of an instrument's ``[design]`` condition: at rest (uniform room air), or,
    with ``playing = true``, the steady state of playing in the design room."""
    design = instrument.design
    return bore_profile(instrument, design.room(), design.playing, None, breath)
