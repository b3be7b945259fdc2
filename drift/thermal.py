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
  room by natural convection (Churchill & Chu 1975, horizontal cylinder) and radiation.
- **Rests.** No flow: the bore air takes the temperature of the inner wall (its own relaxation time
  is under a second), and the breath gas gives way to room air exponentially in time.
- The wall temperatures obey an ODE solved with :func:`scipy.integrate.solve_ivp` over a play/rest
  plan; the steady state solves the same heat balance with :func:`scipy.optimize.root`.

The result handed to the acoustics is a :class:`BoreProfile`: air temperature, breath fraction and
wall temperature along the bore. Gas properties are not evaluated inside the ODE: the air layer
(CoolProp) is called for three states up front (inflowing gas at its inlet temperature and at the
mean of inlet and room temperature, room air at room temperature) and the saturation water
fraction is tabulated over the temperature range of the problem and interpolated. The correlations
live in :mod:`drift.heat_transfer`, the wall segments in :mod:`drift.segments`.

References
----------
Incropera, F. P., DeWitt, D. P., Bergman, T. L., Lavine, A. S. (2007). Fundamentals of Heat and Mass
Transfer, 6th ed. Wiley (Eqs. 3.27, 8.42b).
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from typing import Sequence

import numpy as np

from drift import air
from drift import constants as K
from drift.climate import (DEFAULT_BREATH, Blowing, Breath, Climate, Phase, Room, default_blowing,
                           plan_duration_s)
from drift.errors import OutOfRangeError
from drift.heat_transfer import latent_heat_condensation, outer_coefficient, pipe_conductance
from drift.instrument import Instrument
from drift.bore_state import BoreProfile
from drift.segments import Wall, instrument_wall

# --------------------------------------------------------------------------------------------
# The heat balance
# --------------------------------------------------------------------------------------------


@dataclass(frozen=True)
class _AirFlow:
    """The breath flowing down the bore over given wall temperatures (:meth:`_Model.air_play`).

    air_k (n,) mean air temperature per segment [K]; outlet_k (n,) air leaving each segment [K];
    wall_w (n,) heat into each segment's wall [W] (sensible + latent); latent_w (n,) [W];
    condensation_kg_s (n,) [kg/s]; breath_heat_w, the heat the breath gives up: sensible heat of
    the inflow minus that of every outflow (constant cp), plus the latent heat released [W].
    """

    air_k: np.ndarray
    outlet_k: np.ndarray
    wall_w: np.ndarray
    latent_w: np.ndarray
    condensation_kg_s: np.ndarray
    breath_heat_w: float


@dataclass(frozen=True)
class _Balance:
    """Diagnostics of the heat balance at one moment (:meth:`_Model.heat_flows`), totals over the
    bore: the fields of :class:`ThermalState` of the same names."""

    air_k: np.ndarray
    breath_heat_w: float
    room_loss_w: float
    latent_w: float
    condensation_kg_s: float
    condensing: np.ndarray
    outlet_k: np.ndarray


def _auto_layers(wall: Wall) -> int:
    """Radial layers of the wall: one when its conduction resistance is small (Biot number
    h w / k below 0.1 with h = 10 W/(m^2 K), a typical outer coefficient), else four."""
    biot = 10.0 * np.max(wall.thickness_m) / wall.material.conductivity_across
    return 1 if biot < 0.1 else 4


class _Model:
    """Precomputed conductances, capacities and gas properties of one wall in one room."""

    def __init__(self, wall: Wall, room: Room, blowing: Blowing, breath: Breath,
                 layers: int | None = None):
        self.wall, self.room, self.blowing, self.breath = wall, room, blowing, breath
        m = _auto_layers(wall) if layers is None else int(layers)
        if m < 1:
            raise OutOfRangeError("the wall needs at least one radial layer")
        self.n, self.m = n, m = wall.positions_m.size, m
        shells = wall.shells(m)
        self.capacity, self.g_radial, self.g_axial = shells.capacity_j_k, shells.radial_w_k, shells.axial_w_k
        self.r_inner, self.r_outer = shells.inner_k_w, shells.outer_k_w
        self.outer_area, self.outer_diameter = shells.outer_area_m2, shells.outer_diameter_m
        self.t_room = room.temperature_k
        p = room.pressure_pa

        # Gas properties, evaluated once (see the module docstring).
        room_x = air.room_air(room.temperature_k, p, room.relative_humidity, room.co2_fraction)
        breath_x = air.breath_air(p, breath)
        phi = blowing.inlet_breath_fraction
        self.t_in = phi * breath.temperature_k + (1.0 - phi) * room.temperature_k
        x_in, _ = air.mix(room_x, breath_x, phi, self.t_in, p)
        self.x_in_water = float(x_in[4])
        gas_in = air.gas_properties(self.t_in, p, x_in)
        # The flowing gas at the mean of inlet and room temperature, its water capped at
        # saturation there as it is in the bore (the excess condenses on the wall).
        t_film = 0.5 * (self.t_in + room.temperature_k)
        x_film, _ = air.mix(room_x, breath_x, phi, t_film, p)
        gas = air.gas_properties(t_film, p, x_film)
        room_gas = air.gas_properties(room.temperature_k, p, room_x)
        self.cp = float(gas.cp)
        self.k_gas = float(gas.conductivity)
        self.mu_gas = float(gas.viscosity)
        self.pr_gas = float(gas.prandtl)
        self.room_gas = room_gas
        molar_mass_in = float(gas_in.density) * K.MOLAR_GAS_CONSTANT * self.t_in / p
        self.mdot_in = float(gas_in.density) * blowing.flow_m3_s                  # [kg/s]
        self.ndot_dry_in = self.mdot_in / molar_mass_in * (1.0 - self.x_in_water)  # [mol/s]
        self.r_in = self.x_in_water / (1.0 - self.x_in_water)

        # Saturation water fraction over the temperature range of the problem, tabulated.
        low = min(room.temperature_k, self.t_in) - 2.0
        high = max(room.temperature_k, self.t_in) + 2.0
        self._t_grid = np.linspace(low, high, max(16, int((high - low) / 0.25) + 1))
        x_sat = air.saturation_water_fraction(self._t_grid, p)
        self._log_r_sat = np.log(x_sat / (1.0 - x_sat))

        # Internal convection, per segment (used while playing).
        w = np.asarray(wall.flow_fraction, dtype=float)
        self.inlet = int(np.argmax(w > 0.0)) if np.any(w > 0.0) and blowing.flow_m3_s > 0.0 else n
        # Breath fills the bore wherever the flow passes, and the dead-end cavity before the inlet
        # (mixed by the oscillating flow at the embouchure); beyond the last exit, room air.
        reached = w > 0.0
        reached[: self.inlet] = True
        self.phi_play = np.where(reached, phi, 0.0) if blowing.flow_m3_s > 0.0 else np.zeros(n)
        self.mdot = w * self.mdot_in
        self.ndot_dry = w * self.ndot_dry_in
        self.mdot_cp = self.mdot * self.cp
        self.exit_share = w - np.append(w[1:], 0.0)          # flow leaving after each segment
        self.flows = self.mdot > 0.0
        first = min(self.inlet, n - 1)
        ua = pipe_conductance(np.maximum(wall.edges_m - wall.edges_m[first], 0.0), self.mdot,
                              2.0 * wall.inner_radius_m, self.cp, self.k_gas, self.mu_gas,
                              self.pr_gas) * blowing.heat_transfer_factor
        # Convection in series with the conduction to the first layer's mid-radius.
        ua_eff = np.zeros(n)
        ua_eff[self.flows] = 1.0 / (1.0 / ua[self.flows] + self.r_inner[self.flows])
        self.ntu = np.zeros(n)
        self.ntu[self.flows] = ua_eff[self.flows] / self.mdot_cp[self.flows]
        self.decay = np.exp(-self.ntu)
        # Mean air temperature over a segment: T_w + (T_in - T_w) (1 - e^-NTU) / NTU (-> 1 as NTU -> 0).
        self.mean_share = np.ones(n)
        big = self.ntu > 1e-12
        self.mean_share[big] = (1.0 - self.decay[big]) / self.ntu[big]
        # The flow passes segments inlet, inlet + 1, ... up to the first without flow (the share
        # does not grow). Over them T_out,i = d_i T_out,i-1 + (1 - d_i) T_w,i with T_out,inlet-1 =
        # T_in, a linear recurrence: T_out = W T_w + T_in D with W_ij = (1 - d_j) prod_{j<l<=i} d_l
        # and D_i = prod_{l<=i} d_l, built here once (products only, no division).
        stop = self.inlet
        while stop < n and self.flows[stop]:
            stop += 1
        self.flow_run = slice(self.inlet, stop)
        d = self.decay[self.flow_run]
        self.outlet_weights = np.zeros((d.size, d.size))
        self.outlet_offset = np.zeros(d.size)
        for i in range(d.size):
            product = 1.0
            for j in range(i, -1, -1):
                self.outlet_weights[i, j] = product * (1.0 - d[j])
                product *= d[j]
            self.outlet_offset[i] = product * self.t_in

    # -- pieces of the balance -----------------------------------------------------------------

    def r_sat(self, temperature_k):
        """Water-to-dry-gas mole ratio at saturation [mol/mol], from the table."""
        t = np.asarray(temperature_k, dtype=float)
        if np.any(t < self._t_grid[0]) or np.any(t > self._t_grid[-1]):
            x = air.saturation_water_fraction(t, self.room.pressure_pa)
            return x / (1.0 - x)
        return np.exp(np.interp(t, self._t_grid, self._log_r_sat))

    def air_play(self, t_inner):
        """The flowing air over inner-layer temperatures (k, n) [K], for k states at once.

        Segment by segment from the inlet, T_out = T_w + (T_in - T_w) exp(-NTU) with
        NTU = UA / (mdot cp) (uniform wall temperature over a segment; Incropera et al. 2007,
        Eq. 8.42b), and the segment's mean air temperature T_w + (T_in - T_w)(1 - exp(-NTU))/NTU.
        Water is capped at saturation at T_out; the condensed water's latent heat goes into the
        wall.

        Returns
        -------
        _AirFlow
            Its arrays (k, n), its ``breath_heat_w`` (k,).
        """
        n = self.n
        tw = np.asarray(t_inner, dtype=float)
        t_out = tw.copy()
        t_mean = tw.copy()
        k = tw.shape[0]
        if self.inlet >= n:  # no flow at all
            zero = np.zeros((k, n))
            return _AirFlow(t_mean, np.full((k, n), np.nan), zero, zero, zero, np.zeros(k))
        run = self.flow_run
        t_out[:, run] = tw[:, run] @ self.outlet_weights.T + self.outlet_offset
        t_before = np.concatenate([np.full((k, 1), self.t_in), t_out[:, run][:, :-1]], axis=1)
        t_mean[:, run] = tw[:, run] + (t_before - tw[:, run]) * self.mean_share[run]
        t_up = np.concatenate([np.full((k, 1), self.t_in), t_out[:, :-1]], axis=1)
        t_up[:, self.inlet] = self.t_in
        sensible = np.where(self.flows, self.mdot_cp * (t_up - t_out), 0.0)
        r_out = np.full((k, n), self.r_in)
        r_out[:, self.flows] = np.minimum.accumulate(np.minimum(self.r_in, self.r_sat(t_out[:, self.flows])),
                                                     axis=1)
        r_up = np.concatenate([np.full((k, 1), self.r_in), r_out[:, :-1]], axis=1)
        r_up[:, self.inlet] = self.r_in
        condensed_kg = np.where(self.flows, self.ndot_dry * (r_up - r_out), 0.0) * K.WATER_MOLAR_MASS
        latent = condensed_kg * latent_heat_condensation(t_out)
        inflow = self.mdot_cp[self.inlet] * self.t_in
        outflow = np.sum(self.exit_share * self.mdot_in * self.cp * np.where(self.flows, t_out, 0.0), axis=1)
        return _AirFlow(t_mean, np.where(self.flows, t_out, np.nan), sensible + latent, latent, condensed_kg,
                        inflow - outflow + np.sum(latent, axis=1))

    def outer_conductance(self, t_outer):
        """Conductance from the outer layer to the room [W/K], per segment: wall conduction in
        series with convection and radiation (:func:`drift.heat_transfer.outer_coefficient`), the
        film evaluated at the outer layer's temperature."""
        h = outer_coefficient(t_outer, self.t_room, self.outer_diameter, self.room_gas,
                              self.blowing.air_speed_m_s, self.wall.material.emissivity)
        return 1.0 / (self.r_outer + 1.0 / (h * self.outer_area))

    def heat_flows(self, temps, playing: bool) -> tuple[np.ndarray, _Balance]:
        """Net heat into every wall node [W] (k, n, m) of k states of the wall (k, n, m) [K] at
        once, and the diagnostics of the balance (arrays with a first axis of k)."""
        temps = np.asarray(temps, dtype=float)
        k = temps.shape[0]
        q = np.zeros((k, self.n, self.m))
        if playing:
            a = self.air_play(temps[:, :, 0])
            q[:, :, 0] += a.wall_w
            t_air, latent, cond, given, outlet = (a.air_k, a.latent_w, a.condensation_kg_s, a.breath_heat_w,
                                                  a.outlet_k)
        else:
            t_air, latent, cond, given = temps[:, :, 0].copy(), np.zeros((k, self.n)), np.zeros((k, self.n)), \
                np.zeros(k)
            outlet = np.full((k, self.n), np.nan)
        if self.m > 1:
            f = self.g_radial * (temps[:, :, 1:] - temps[:, :, :-1])
            q[:, :, :-1] += f
            q[:, :, 1:] -= f
        if self.n > 1:
            f = self.g_axial * (temps[:, 1:] - temps[:, :-1])
            q[:, :-1] += f
            q[:, 1:] -= f
        loss = self.outer_conductance(temps[:, :, -1]) * (temps[:, :, -1] - self.t_room)
        q[:, :, -1] -= loss
        return q, _Balance(t_air, given, np.sum(loss, axis=1), np.sum(latent, axis=1), np.sum(cond, axis=1),
                           np.asarray(cond) > 0.0, outlet)

    def derivatives(self, y, playing: bool) -> np.ndarray:
        """Time derivatives of the ODE state (k, n m + 2): wall temperatures [K/s], then the
        rates of the two heat totals [W] (breath heat given up, heat lost to the room)."""
        y = np.asarray(y, dtype=float)
        q, d = self.heat_flows(y[:, : self.n * self.m].reshape(-1, self.n, self.m), playing)
        return np.concatenate([(q / self.capacity).reshape(len(y), -1), d.breath_heat_w[:, None],
                               d.room_loss_w[:, None]], axis=1)

    def jacobian(self, y, playing: bool) -> np.ndarray:
        """d(:meth:`derivatives`)/dy (n m + 2, n m + 2) at one state, by forward differences of
        0.1 mK in every wall temperature, all evaluated in one batch (the heat totals enter
        nothing, so their columns are zero)."""
        y = np.asarray(y, dtype=float)
        size = y.size
        nodes = self.n * self.m
        step = 1e-4
        batch = np.repeat(y[None, :], nodes + 1, axis=0)
        batch[np.arange(1, nodes + 1), np.arange(nodes)] += step
        f = self.derivatives(batch, playing)
        jac = np.zeros((size, size))
        jac[:, :nodes] = ((f[1:] - f[0]) / step).T
        return jac

    def rhs(self, playing: bool):
        def f(_t, y):
            return self.derivatives(y[None, :], playing)[0]

        return f

    def stored_j(self, temps) -> float:
        """Heat held by the wall above room temperature [J]."""
        return float(np.sum(self.capacity * (temps - self.t_room)))


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
        Temperature of every wall layer [K], inner layer first.
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


def _state(model: _Model, time_s, phase, temps, breath_fraction, totals=(0.0, 0.0)) -> ThermalState:
    _, d = model.heat_flows(temps[None], phase == "play")
    wall_mean = np.sum(model.capacity * temps, axis=1) / np.sum(model.capacity, axis=1)
    profile = BoreProfile(model.room, model.wall.positions_m.copy(), d.air_k[0],
                          np.asarray(breath_fraction, dtype=float), wall_mean, model.breath)
    return ThermalState(float(time_s), phase, profile, temps.copy(), float(d.breath_heat_w[0]),
                        float(d.room_loss_w[0]), float(d.latent_w[0]), float(d.condensation_kg_s[0]),
                        d.condensing[0], d.outlet_k[0], model.stored_j(temps), float(totals[0]),
                        float(totals[1]))


def steady_state(wall: Wall, room: Room, blowing: Blowing, breath: Breath = DEFAULT_BREATH,
                 layers: int | None = None) -> ThermalState:
    """The thermal state of a bore played long enough: wall heat balance at rest in time.

    Solves, for every wall node, 0 = (heat from the breath) + (conduction from neighbours) - (loss
    to the room) by damped Newton steps from the room temperature (:func:`_newton`, the Jacobian
    by forward differences evaluated in one batch, :meth:`_Model.jacobian`), to 1e-10 W per node;
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
    model = _Model(wall, room, blowing, breath, layers)
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


def _integrate(model: _Model, playing: bool, y0, t0, t1):
    """Integrate the wall temperatures (and two heat totals) from t0 to t1 [s] with dense output."""
    from scipy.integrate import solve_ivp

    n_nodes = model.n * model.m
    y0 = np.asarray(y0, dtype=float)
    if y0.size == n_nodes:
        y0 = np.concatenate([y0, [0.0, 0.0]])
    sol = solve_ivp(model.rhs(playing), (t0, t1), y0, method="LSODA", dense_output=True,
                    jac=lambda _t, y: model.jacobian(y, playing),
                    rtol=1e-7, atol=np.concatenate([np.full(n_nodes, 1e-6), [1e-3, 1e-3]]))
    if not sol.success:
        raise OutOfRangeError(f"the thermal integration failed: {sol.message}")
    return sol


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
    room : Room
    plan : sequence of Phase
    blowing : Blowing
    breath : Breath
    initial : ThermalState, optional
        State to start from (its wall layers and breath fraction).
    layers : int, optional
        Radial layers of the wall.
    """

    def __init__(self, wall: Wall, room: Room, plan: Sequence[Phase], blowing: Blowing,
                 breath: Breath = DEFAULT_BREATH, initial: ThermalState | None = None,
                 layers: int | None = None):
        if not plan:
            raise OutOfRangeError("a plan needs at least one phase")
        self.model = model = _Model(wall, room, blowing, breath, layers)
        self.plan = tuple(plan)
        self.total_s = plan_duration_s(plan)
        shape = (model.n, model.m)
        if initial is None:
            y = np.full(model.n * model.m, room.temperature_k)
            phi = np.zeros(model.n)
        else:
            if initial.wall_k.shape != shape:
                raise OutOfRangeError("the initial state does not belong to this wall (segments or layers differ)")
            y = initial.wall_k.ravel().copy()
            phi = np.interp(wall.positions_m, initial.profile.positions_m, initial.profile.breath_fraction)
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
