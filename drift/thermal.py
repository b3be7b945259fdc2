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

import functools
import math
from dataclasses import dataclass, field, fields
from typing import Sequence

import numpy as np

from drift import air
from drift import constants as K
from drift.climate import (DEFAULT_BREATH, Blowing, Breath, Climate, Phase, Room, default_blowing,
                           plan_duration_s)
from drift.errors import OutOfRangeError
from drift.heat_transfer import latent_heat_condensation, outer_coefficient, pipe_conductance
from drift.instrument import Instrument
from drift.segments import Wall, instrument_wall

# --------------------------------------------------------------------------------------------
# The hand-off to the acoustics: air and wall along the bore
# --------------------------------------------------------------------------------------------


@dataclass(frozen=True)
class BoreProfile:
    """Air temperature, breath fraction and wall temperature sampled along a bore.

    This is what the thermal layer hands to the acoustics layer. Values between samples are
    interpolated linearly, and held constant beyond the first and last sample.

    Attributes
    ----------
    room : Room
    positions_m : ndarray (n,) [m] from the input end, ascending
    temperature_k : ndarray (n,) air temperature [K]
    breath_fraction : ndarray (n,) [0-1], mole fraction of breath in the bore air
    wall_temperature_k : ndarray (n,) [K]
    breath : Breath
    """

    room: Room
    positions_m: np.ndarray
    temperature_k: np.ndarray
    breath_fraction: np.ndarray
    wall_temperature_k: np.ndarray
    breath: Breath = DEFAULT_BREATH

    @classmethod
    def uniform(cls, room: Room, breath_fraction: float = 0.0, breath: Breath = DEFAULT_BREATH):
        """Air and wall at room temperature everywhere, with a uniform breath fraction."""
        t = np.array([room.temperature_k])
        return cls(room, np.array([0.0]), t, np.array([float(breath_fraction)]), t, breath)

    def _interp(self, values, positions_m):
        return np.interp(np.asarray(positions_m, dtype=float), self.positions_m, values)

    def wall_temperature_at(self, positions_m):
        """Wall temperature [K] at positions [m]."""
        return self._interp(self.wall_temperature_k, positions_m)

    @functools.cached_property
    def sampled_air(self) -> air.AirState:
        """The gas at the profile's own sample positions, through :func:`drift.air.air_state` (computed once)."""
        return air.air_state(
            self.temperature_k,
            self.room.pressure_pa,
            self.room.temperature_k,
            self.room.relative_humidity,
            self.room.co2_fraction,
            np.clip(self.breath_fraction, 0.0, 1.0),
            self.breath,
        )

    def air_at(self, positions_m) -> air.AirState:
        """The gas (:class:`drift.air.AirState`) at positions [m] along the bore.

        The real-gas state is computed once at the profile's samples (:attr:`sampled_air`) and its
        temperature, composition and properties are interpolated linearly to ``positions_m``. The
        properties are smooth in temperature and composition, so between samples a few
        centimetres and a kelvin or two apart this differs from a fresh evaluation by far less
        than the model's own uncertainty (tests/test_thermal.py bounds it), and moving positions (a
        joint change, an expanded bore) costs no new CoolProp states.
        """
        x = np.asarray(positions_m, dtype=float)
        s = self.sampled_air
        if self.positions_m.size == 1:
            def at(values):
                return np.broadcast_to(np.asarray(values)[0], x.shape).copy()
        else:
            def at(values):
                return np.interp(x, self.positions_m, values)
        props = air.GasProperties(*(at(getattr(s.properties, f.name)) for f in fields(air.GasProperties)))
        fractions = np.stack([at(s.mole_fractions[:, i]) for i in range(5)], axis=-1)
        return air.AirState(at(s.temperature), at(s.pressure), fractions, at(s.condensed.astype(float)) > 0.5,
                        props)


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

    # -- pieces of the balance -----------------------------------------------------------------

    def r_sat(self, temperature_k):
        """Water-to-dry-gas mole ratio at saturation [mol/mol], from the table."""
        t = np.asarray(temperature_k, dtype=float)
        if np.any(t < self._t_grid[0]) or np.any(t > self._t_grid[-1]):
            x = air.saturation_water_fraction(t, self.room.pressure_pa)
            return x / (1.0 - x)
        return np.exp(np.interp(t, self._t_grid, self._log_r_sat))

    def air_play(self, t_inner):
        """The flowing air over inner-layer temperatures (n,) [K].

        Segment by segment from the inlet, T_out = T_w + (T_in - T_w) exp(-NTU) with
        NTU = UA / (mdot cp) (uniform wall temperature over a segment; Incropera et al. 2007,
        Eq. 8.42b), and the segment's mean air temperature T_w + (T_in - T_w)(1 - exp(-NTU))/NTU.
        Water is capped at saturation at T_out; the condensed water's latent heat goes into the
        wall.

        Returns
        -------
        _AirFlow
        """
        n = self.n
        t_out = np.array(t_inner, dtype=float, copy=True)
        t_mean = t_out.copy()
        if self.inlet >= n:  # no flow at all
            zero = np.zeros(n)
            return _AirFlow(t_mean, np.full(n, np.nan), zero, zero, zero, 0.0)
        t = self.t_in
        decay, share, flows = self.decay.tolist(), self.mean_share.tolist(), self.flows.tolist()
        tw = t_out.tolist()
        for i in range(self.inlet, n):
            if not flows[i]:
                break  # the flow share does not grow: no flow from here on
            t_mean[i] = tw[i] + (t - tw[i]) * share[i]
            t = tw[i] + (t - tw[i]) * decay[i]
            t_out[i] = t
        t_up = np.concatenate([[self.t_in], t_out[:-1]])
        t_up[self.inlet] = self.t_in
        sensible = np.where(self.flows, self.mdot_cp * (t_up - t_out), 0.0)
        r_out = np.full(n, self.r_in)
        r_out[self.flows] = np.minimum.accumulate(np.minimum(self.r_in, self.r_sat(t_out[self.flows])))
        r_up = np.concatenate([[self.r_in], r_out[:-1]])
        r_up[self.inlet] = self.r_in
        condensed_kg = np.where(self.flows, self.ndot_dry * (r_up - r_out), 0.0) * K.WATER_MOLAR_MASS
        latent = condensed_kg * latent_heat_condensation(t_out)
        inflow = self.mdot_cp[self.inlet] * self.t_in if self.inlet < n else 0.0
        outflow = float(np.sum(self.exit_share * self.mdot_in * self.cp * np.where(self.flows, t_out, 0.0)))
        return _AirFlow(t_mean, np.where(self.flows, t_out, np.nan), sensible + latent, latent, condensed_kg,
                        inflow - outflow + float(np.sum(latent)))

    def outer_conductance(self, t_outer):
        """Conductance from the outer layer to the room [W/K], per segment: wall conduction in
        series with convection and radiation (:func:`drift.heat_transfer.outer_coefficient`), the
        film evaluated at the outer layer's temperature."""
        h = outer_coefficient(t_outer, self.t_room, self.outer_diameter, self.room_gas,
                              self.blowing.air_speed_m_s, self.wall.material.emissivity)
        return 1.0 / (self.r_outer + 1.0 / (h * self.outer_area))

    def heat_flows(self, temps, playing: bool) -> tuple[np.ndarray, _Balance]:
        """Net heat into every wall node [W] (n, m), and the diagnostics of the balance."""
        q = np.zeros((self.n, self.m))
        if playing:
            a = self.air_play(temps[:, 0])
            q[:, 0] += a.wall_w
            t_air, latent, cond, given, outlet = (a.air_k, a.latent_w, a.condensation_kg_s, a.breath_heat_w,
                                                  a.outlet_k)
        else:
            t_air, latent, cond, given = temps[:, 0].copy(), np.zeros(self.n), np.zeros(self.n), 0.0
            outlet = np.full(self.n, np.nan)
        if self.m > 1:
            f = self.g_radial * (temps[:, 1:] - temps[:, :-1])
            q[:, :-1] += f
            q[:, 1:] -= f
        if self.n > 1:
            f = self.g_axial * (temps[1:] - temps[:-1])
            q[:-1] += f
            q[1:] -= f
        loss = self.outer_conductance(temps[:, -1]) * (temps[:, -1] - self.t_room)
        q[:, -1] -= loss
        return q, _Balance(t_air, given, float(np.sum(loss)), float(np.sum(latent)), float(np.sum(cond)),
                           np.asarray(cond) > 0.0, outlet)

    def rhs(self, playing: bool):
        n, m, cap = self.n, self.m, self.capacity

        def f(_t, y):
            temps = y[: n * m].reshape(n, m)
            q, d = self.heat_flows(temps, playing)
            return np.concatenate([(q / cap).ravel(), [d.breath_heat_w, d.room_loss_w]])

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
    q, d = model.heat_flows(temps, phase == "play")
    wall_mean = np.sum(model.capacity * temps, axis=1) / np.sum(model.capacity, axis=1)
    profile = BoreProfile(model.room, model.wall.positions_m.copy(), d.air_k,
                              np.asarray(breath_fraction, dtype=float), wall_mean, model.breath)
    return ThermalState(float(time_s), phase, profile, temps.copy(), d.breath_heat_w, d.room_loss_w,
                        d.latent_w, d.condensation_kg_s, d.condensing, d.outlet_k,
                        model.stored_j(temps),
                        float(totals[0]), float(totals[1]))


def steady_state(wall: Wall, room: Room, blowing: Blowing, breath: Breath = DEFAULT_BREATH,
                 layers: int | None = None) -> ThermalState:
    """The thermal state of a bore played long enough: wall heat balance at rest in time.

    Solves, for every wall node, 0 = (heat from the breath) + (conduction from neighbours) - (loss
    to the room) with :func:`scipy.optimize.root` (Powell hybrid method), started from the room
    temperature; the residual is checked to 1e-9 W per node.

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
    from scipy.optimize import root

    model = _Model(wall, room, blowing, breath, layers)
    shape = (model.n, model.m)

    def residual(y):
        return model.heat_flows(y.reshape(shape), True)[0].ravel()

    guess = np.full(model.n * model.m, room.temperature_k)
    solution = root(residual, guess, method="hybr", options={"xtol": 1e-12})
    worst = float(np.max(np.abs(residual(solution.x))))
    if not solution.success and worst > 1e-9:
        # Fall back on a long integration of the transient, then polish.
        y = _integrate(model, True, guess, 0.0, 4 * 3600.0).y[:-2, -1]
        solution = root(residual, y, method="hybr", options={"xtol": 1e-12})
        worst = float(np.max(np.abs(residual(solution.x))))
        if worst > 1e-6:
            raise OutOfRangeError(f"the steady thermal state did not converge (residual {worst:.2g} W)")
    return _state(model, math.inf, "play", solution.x.reshape(shape), model.phi_play)


def _integrate(model: _Model, playing: bool, y0, t0, t1):
    """Integrate the wall temperatures (and two heat totals) from t0 to t1 [s] with dense output."""
    from scipy.integrate import solve_ivp

    n_nodes = model.n * model.m
    y0 = np.asarray(y0, dtype=float)
    if y0.size == n_nodes:
        y0 = np.concatenate([y0, [0.0, 0.0]])
    sol = solve_ivp(model.rhs(playing), (t0, t1), y0, method="LSODA", dense_output=True,
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
    player's ``playing``, ``minutes_played`` and breath (:func:`bore_profile`)."""
    p = climate.player
    return bore_profile(instrument, climate.room, p.playing, p.minutes_played, p.breath)


def design_profile(instrument: Instrument, breath: Breath = DEFAULT_BREATH) -> BoreProfile:
    """The bore profile of an instrument's ``[design]`` condition: at rest (uniform room air), or,
    with ``playing = true``, the steady state of playing in the design room."""
    design = instrument.design
    return bore_profile(instrument, design.room(), design.playing, None, breath)
